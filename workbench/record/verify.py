"""Check a calculation record: who signed it, when, with which key, and that nothing changed.

The verifier reads the record as text and never runs anything from it (no browser, no
script, no template). It

1. finds the signature block (exactly one, followed by nothing but ``</body></html>``: a file
   cut short or with anything appended fails here);
2. checks the JWS (EdDSA) against the public key given, or else against the key embedded in
   the record — then the fingerprint it reports is what a reader compares with the one the
   signer published;
3. recomputes the content digest of the file outside the signature block and compares it
   with the signed one (any changed number or word, in the body or the CSS, fails);
4. rebuilds the signature block from the token and key and compares it byte for byte;
5. re-runs the solver and the checks from the signed case and compares the results digest,
   (natural modes and fatigue cycles included), and compares the results, checks, torsional
   vibration and fatigue sections written in the record with those rebuilt from the
   recomputation;
6. checks the chain of countersignatures (:mod:`workbench.signing.chain`): each signs the one
   before and the content digest, in the order prepared → checked → approved, by a key the
   reader gave (when keys are given) and on the reader's trusted-signers list (when given).

A calculation package (zip, see :mod:`workbench.record.package`) is checked by
:func:`verify_package`: the manifest's signature, every file's size and SHA-256 against the
manifest, no file added or given twice, the record inside as above, and the case file and
results digest against what the record signs.
"""

from __future__ import annotations

import hashlib
import io
import json
import zipfile
import zlib
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError, WorkbenchError
from workbench.record.document import (
    BLOCK_END,
    BLOCK_START,
    FORMAT,
    compute,
    content_digest,
    signature_block,
)
from workbench.record.reader_keys import as_list, pick, read_trusted, read_with_key
from workbench.record.render import document_end, render_sections
from workbench.signing import JWK_SCRIPT, PAYLOAD_SCRIPT, TOKEN_SCRIPT, BlockData

__all__ = [
    "PACKAGE_FORMAT",
    "Verification",
    "verify_package",
    "verify_package_bytes",
    "verify_record",
    "verify_text",
]

#: ``format`` of a package manifest.
PACKAGE_FORMAT = FORMAT + "-package"
#: Names of package members: the manifest and its signature (not listed in it), record, case.
MANIFEST, MANIFEST_SIGNATURE, RECORD, CASE = (
    "manifest.json",
    "manifest.jws",
    "record.html",
    "case.json",
)
#: Largest member read from a package (bytes): a guard against a zip that inflates without end.
MAX_MEMBER_BYTES = 256 * 1024 * 1024

#: What zipfile raises on a damaged or unusual archive (a seek before its start is a
#: ValueError, an encrypted member a RuntimeError, an unknown compression NotImplementedError).
_ZIP_FAULTS = (
    zipfile.BadZipFile,
    zlib.error,
    EOFError,
    OSError,
    ValueError,
    RuntimeError,
    NotImplementedError,
)

#: What the verifier says of each section it rebuilds from the case, by the section's id.
_REBUILT = {
    "results": "results",
    "checks": "design checks",
    "vibration": "torsional vibration section",
    "fatigue": "fatigue section",
}

#: The vibration section's reference to a vibration text as records signed before it stopped
#: saying "from memory" wrote it, and as the template writes it now: (earlier, now).
_EARLIER_VIBRATION_REFERENCE = (
    "(torsional systems of discs on shafts; from memory)",
    "(torsional systems of discs on shafts; edition and chapter not cited)",
)


@dataclass
class Verification:
    """The outcome of checking a record.

    Attributes
    ----------
    ok
        Whether every check holds (signed, unchanged, results confirmed).
    facts
        What the record says and what was confirmed (signer, time, fingerprint…).
    problems
        What failed, one clear line each.
    payload
        The record's payload as read (signed or not), ``None`` when it could not be read.
    """

    ok: bool = False
    facts: list[str] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)
    payload: dict[str, Any] | None = None

    def lines(self) -> list[str]:
        """Readable report lines, the verdict last."""
        verdict = "VERIFIED" if self.ok and not self.problems else "NOT VERIFIED"
        return [*self.facts, *(f"FAILED: {p}" for p in self.problems), verdict]


def verify_record(
    path: str | Path,
    public_key_path: str | Path | Sequence[str | Path] | None = None,
    trusted_path: str | Path | None = None,
    study_rows: str | Path | None = None,
) -> Verification:
    """Check a record file; see :func:`verify_text`.

    Parameters
    ----------
    path
        The record file.
    public_key_path
        One public key file, or several (the preparer's and the countersigners').
    trusted_path
        A trusted-signers file (:mod:`workbench.signing.trusted`).
    study_rows
        The rows file (parquet) of the record's study, to check against its signed SHA-256.

    Raises
    ------
    InputError
        When the file, a key file or the trusted-signers file cannot be read.
    """
    trusted = read_trusted(trusted_path)
    rows = Path(study_rows) if study_rows is not None else None
    return verify_text(*read_with_key(path, "record", public_key_path), trusted, study_rows=rows)


def verify_text(
    data: bytes, public_key: Any = None, trusted: Any = None, *, study_rows: Path | None = None
) -> Verification:
    """Check the bytes of a record and the chain of its signatures.

    Parameters
    ----------
    data
        The record file's bytes.
    public_key
        The signer's Ed25519 public key, a list of keys (the preparer's and the
        countersigners'), or ``None`` to use the keys embedded in the record (then only the
        reported fingerprints tie them to people). A countersignature by a key not given fails.
    trusted
        Trusted signers by fingerprint (:func:`workbench.signing.read_trusted_signers`): each
        signature is named after its signer, and one by a key not on the list, or in a role
        the list does not give its signer, fails.
    study_rows
        The rows file of the record's study (:func:`workbench.record.study.check_study`).

    Returns
    -------
    Verification
        Facts and problems; ``ok`` only when all holds.
    """
    from workbench.signing import (  # noqa: PLC0415
        Link,
        SigningError,
        chain_links,
        chain_report,
        jwk_thumbprint,
        public_key_from_jwk,
        verify_compact,
    )

    outcome = Verification()
    problems = outcome.problems
    public_keys = as_list(public_key)
    given = [jwk_thumbprint(key) for key in public_keys] if public_keys else None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        problems.append("the file is not UTF-8 text: not a workbench record, or damaged")
        return outcome
    if not text.endswith(document_end()):
        problems.append(
            "the file does not end the way a record ends (</body></html>): it was cut short "
            "(truncated) or something was appended"
        )
    starts, ends = text.count(BLOCK_START), text.count(BLOCK_END)
    if starts != 1 or ends != 1:
        problems.append(
            f"expected one signature block, found {starts} start and {ends} end markers: "
            "truncated, or not a workbench record"
        )
        return outcome
    start = text.index(BLOCK_START)
    end = text.index(BLOCK_END) + len(BLOCK_END) + 1
    if end <= start or text[end - 1] != "\n":
        problems.append("the signature block is malformed (truncated or edited)")
        return outcome
    block, outside = text[start:end], text[:start] + text[end:]
    if text[end:] != document_end() and not problems:
        problems.append("something follows the signature block besides </body></html>")

    data_in_block = BlockData(block)
    token, jwk_text = data_in_block.get(TOKEN_SCRIPT), data_in_block.get(JWK_SCRIPT)
    signed = token is not None
    jwk: dict[str, Any] | None = None
    fingerprint: str | None = None
    if token is not None:
        if jwk_text is None:
            problems.append("the record's public key (record-public-key) is missing")
            return outcome
        try:
            jwk = json.loads(jwk_text)
            embedded = public_key_from_jwk(jwk)
        except (ValueError, SigningError) as error:
            problems.append(f"the embedded public key is unreadable: {error}")
            return outcome
        fingerprint = jwk_thumbprint(embedded)
        key = embedded
        if given is not None:
            key = pick(public_keys, fingerprint)
            if jwk_thumbprint(key) != fingerprint:
                problems.append(
                    f"the record was signed with key {fingerprint}, not with the expected key "
                    f"{', '.join(given)}: it was re-signed by someone else, or the wrong key "
                    "was given"
                )
                return outcome
        try:
            _, payload_bytes = verify_compact(token, key)
        except SigningError as error:
            problems.append(f"the signature does not hold: {error}")
            return outcome
        outcome.facts.append(f"Signature: valid EdDSA (Ed25519) signature by key {fingerprint}")
        if given is None:
            outcome.facts.append(
                "Key: taken from the record itself; compare the fingerprint with the one the "
                "signer published (or pass --public-key)"
            )
        else:
            outcome.facts.append("Key: matches the public key given")
    else:
        payload_text = data_in_block.get(PAYLOAD_SCRIPT)
        if payload_text is None:
            problems.append("the record carries neither a signature nor a payload: damaged")
            return outcome
        payload_bytes = payload_text.encode("utf-8")
        outcome.facts.append("Signature: unsigned")
        problems.append("the record is UNSIGNED: nothing proves who made it")
    try:
        payload = json.loads(payload_bytes)
    except ValueError:
        problems.append("the signed payload is not JSON")
        return outcome
    if not isinstance(payload, dict) or payload.get("format") != FORMAT:
        problems.append("the payload is not a workbench calculation record")
        return outcome
    outcome.payload = payload
    if signed:
        outcome.facts += [
            f"Signed by: {payload.get('signer') or 'not named'}",
            f"Signed at: {payload.get('signed_at', '?')} (UTC)",
        ]
    outcome.facts.append(f"Software: workbench {payload.get('software', {}).get('workbench', '?')}")
    title_block = payload.get("title_block") or {}
    if title_block:
        outcome.facts.append(
            "Title: "
            + ", ".join(
                f"{key} {title_block[key]}"
                for key in ("project", "calculation_number", "revision")
                if key in title_block
            )
        )
    if content_digest(outside) == payload.get("content_digest"):
        outcome.facts.append(f"Content: unchanged ({payload.get('content_digest')})")
    else:
        problems.append(
            "the record's content was altered after signing: its visible text, numbers or "
            "styles differ from what was signed (content digest mismatch)"
        )
    links: list[Link] = []
    if token is not None:
        first = Link(
            "prepared",
            str(payload.get("signer") or "not named"),
            str(payload.get("signed_at", "?")),
            fingerprint,
            token,
            jwk,
        )
        links = chain_links(first, data_in_block.countersignatures(), content_digest(outside))
    if len(links) > 1 or trusted is not None:
        chain_facts, chain_problems = chain_report(links, given, trusted)
        outcome.facts += chain_facts
        problems += chain_problems
    if block != signature_block(payload, token, jwk, fingerprint, links[1:]):
        problems.append("the verification details at the end of the record were altered")
    try:
        computation = compute(payload.get("case") or {})
    except WorkbenchError as error:
        problems.append(f"the embedded case cannot be solved again: {error}")
        return outcome
    # Only to compare the sections: a record signed before the vibration references stopped
    # saying "from memory" wrote that fixed phrase; the digests above use the text as signed.
    written = outside.replace(*_EARLIER_VIBRATION_REFERENCE)
    rebuilt_differ = [
        ident for ident, section in render_sections(computation) if section not in written
    ]
    if rebuilt_differ:
        # A record signed before units were printed (N*m, not N·m) writes them the earlier way.
        earlier = dict(render_sections(computation, earlier=True))
        rebuilt_differ = [ident for ident in rebuilt_differ if earlier[ident] not in written]
    for ident in rebuilt_differ:
        problems.append(
            f"the {_REBUILT[ident]} written in the record differ from those recomputed from "
            "the embedded case"
        )
    if computation.results_digest == payload.get("results_digest"):
        outcome.facts.append(
            f"Results: re-solved from the embedded case, every number agrees "
            f"({computation.results_digest})"
        )
    elif not rebuilt_differ:
        # Eigenvalues of a stiff system carry relative noise near 1e-11 from the arithmetic's
        # order (another LAPACK build, another assembly): enough to flip the 10th digit.
        outcome.facts.append(
            "Results: re-solved from the embedded case, every number the record shows agrees; "
            "the digest of all numbers to 10 significant digits differs in the last digits "
            "(floating-point arithmetic of another build)"
        )
    else:
        problems.append(
            "re-solving the embedded case gives results other than those signed "
            "(results digest mismatch)"
        )
    study = payload.get("study")
    if study is not None:
        from workbench.record.study import verify_study  # noqa: PLC0415 - only with a study

        study_facts, study_problems = verify_study(study, computation, written, study_rows)
        outcome.facts += study_facts
        problems += study_problems
    elif study_rows is not None:
        raise InputError("--study-rows", "the record has no study section to check it against")
    outcome.ok = signed and not problems
    return outcome


# --- calculation package -------------------------------------------------------------------


def verify_package(
    path: str | Path, public_key_path: str | Path | Sequence[str | Path] | None = None
) -> Verification:
    """Check a calculation package (zip); see :func:`verify_package_bytes`.

    Raises
    ------
    InputError
        When the file (or the key file) cannot be read.
    """
    return verify_package_bytes(*read_with_key(path, "package", public_key_path))


def _read_members(
    archive: zipfile.ZipFile, sizes: dict[str, int], problems: list[str]
) -> dict[str, bytes]:
    """Read the entries named in ``sizes`` (name → expected size), refusing any other size."""
    members = {}
    for info in archive.infolist():
        expected = sizes.get(info.filename)
        if expected is None or info.filename in members:
            continue
        if info.file_size > MAX_MEMBER_BYTES:
            problems.append(
                f"{info.filename} claims {info.file_size:,} bytes, more than a package member "
                f"may hold ({MAX_MEMBER_BYTES:,}): not read"
            )
            continue
        if info.file_size != expected:
            problems.append(
                f"{info.filename} is {info.file_size} bytes, the manifest says {expected}: it "
                "was changed after packaging"
            )
            continue
        try:
            members[info.filename] = archive.read(info)
        except _ZIP_FAULTS as error:
            problems.append(f"{info.filename} cannot be read from the zip ({error}): damaged")
    return members


def verify_package_bytes(data: bytes, public_key: Any = None) -> Verification:
    """Check the bytes of a calculation package.

    1. ``manifest.jws`` must be a valid EdDSA signature over exactly the bytes of
       ``manifest.json``, by the key given or else by the key the record inside carries (the
       fingerprint reported is then what a reader compares with the published one);
    2. every file the manifest lists must be present once, with its size and SHA-256, and no
       other file may be in the zip;
    3. ``record.html`` must verify (:func:`verify_text`, with the same key), and ``case.json``
       and the manifest's results digest must match what the record signs.

    Parameters
    ----------
    data
        The zip file's bytes.
    public_key
        The signer's Ed25519 public key, or ``None`` to use the key embedded in the record.

    Returns
    -------
    Verification
        Facts and problems; ``ok`` only when all holds.
    """
    from workbench.signing import (  # noqa: PLC0415
        SigningError,
        decode_unverified,
        jwk_thumbprint,
        public_key_from_jwk,
        verify_compact,
    )

    outcome = Verification()
    facts, problems = outcome.facts, outcome.problems
    public_keys = as_list(public_key)
    try:
        archive = zipfile.ZipFile(io.BytesIO(data))
    except _ZIP_FAULTS as error:  # zipfile raises more than BadZipFile on a damaged directory
        problems.append(f"not a zip archive ({error}): not a calculation package, or damaged")
        return outcome
    with archive:
        names = archive.namelist()
        for name, count in sorted(Counter(names).items()):
            if count > 1:
                problems.append(
                    f"the zip holds {count} entries named {name}: one was added after packaging"
                )
        present = {info.filename: info.file_size for info in archive.infolist()}
        head = _read_members(
            archive,
            {name: present[name] for name in (MANIFEST, MANIFEST_SIGNATURE) if name in present},
            problems,
        )
        manifest_bytes = head.get(MANIFEST)
        if manifest_bytes is None:
            problems.append(f"the package has no {MANIFEST}: not a calculation package")
            return outcome
        try:
            manifest = json.loads(manifest_bytes)
        except ValueError:
            manifest = None
        if not isinstance(manifest, dict) or manifest.get("format") != PACKAGE_FORMAT:
            problems.append(f"{MANIFEST} is not the manifest of a workbench calculation package")
            return outcome
        entries = [e for e in manifest.get("files") or [] if isinstance(e, dict)]
        listed = {str(e.get("name")): e for e in entries}
        sizes = {
            name: int(e.get("size", -1))
            for name, e in listed.items()
            if isinstance(e.get("size"), int)
        }
        members = _read_members(archive, sizes, problems)
    record = members.get(RECORD)
    embedded = _record_key(record) if record is not None else None
    token_bytes = head.get(MANIFEST_SIGNATURE)
    signed = token_bytes is not None
    key = None
    if token_bytes is None:
        problems.append(f"the package is UNSIGNED: it has no {MANIFEST_SIGNATURE}")
    else:
        token = token_bytes.decode("ascii", "replace").strip()
        try:
            kid = decode_unverified(token)[0].get("kid")
        except SigningError as error:
            problems.append(f"{MANIFEST_SIGNATURE} is not a readable signature: {error}")
            return outcome
        if public_keys:
            key = pick(public_keys, kid)
        elif embedded is not None:
            try:
                key = public_key_from_jwk(embedded)
            except SigningError as error:
                problems.append(f"the record's embedded public key is unreadable: {error}")
                return outcome
        if key is None:
            problems.append(
                "no key to check the manifest with: give --public-key (the record inside "
                "carries none)"
            )
            return outcome
        fingerprint = jwk_thumbprint(key)
        if kid != fingerprint:
            whose = "the expected key" if public_key is not None else "the record's key"
            problems.append(
                f"the manifest was signed with key {kid}, not with {whose} {fingerprint}: it "
                "was re-signed by someone else, or the wrong key was given"
            )
            return outcome
        try:
            _, signed_manifest = verify_compact(token, key)
        except SigningError as error:
            problems.append(f"the manifest's signature does not hold: {error}")
            return outcome
        if signed_manifest != manifest_bytes:
            problems.append(f"{MANIFEST} differs from the manifest that was signed")
            return outcome
        facts.append(f"Manifest: valid EdDSA (Ed25519) signature by key {fingerprint}")
        facts.append(
            "Key: matches the public key given"
            if public_key is not None
            else "Key: taken from the record inside the package; compare the fingerprint with "
            "the one the signer published (or pass --public-key)"
        )
    unchanged = 0
    for name, entry in listed.items():
        if name not in members:
            if name not in names:
                problems.append(f"{name} is listed in the manifest but missing from the zip")
            continue
        if hashlib.sha256(members[name]).hexdigest() != entry.get("sha256"):
            problems.append(
                f"{name} was changed after packaging: its SHA-256 differs from the manifest's"
            )
        else:
            unchanged += 1
    for name in sorted(set(names) - set(listed) - {MANIFEST, MANIFEST_SIGNATURE}):
        problems.append(f"{name} is not listed in the manifest: it was added after packaging")
    facts.append(f"Files: {unchanged} of {len(listed)} listed files match the manifest (SHA-256)")
    if record is None:
        problems.append(f"the package holds no readable {RECORD}")
    else:
        inner = verify_text(record, public_key)
        facts += [f"Record: {line}" for line in inner.facts]
        problems += [f"{RECORD}: {line}" for line in inner.problems]
        payload = inner.payload or {}
        case_bytes = members.get(CASE)
        if case_bytes is not None:
            try:
                case = json.loads(case_bytes)
            except ValueError:
                case = None
            if case != payload.get("case"):
                problems.append(f"{CASE} is not the case the record signs")
        if manifest.get("results_digest") != payload.get("results_digest"):
            problems.append("the manifest's results digest is not the one the record signs")
    outcome.ok = signed and not problems
    return outcome


def _record_key(record: bytes) -> dict[str, Any] | None:
    """The public key (JWK) a record's signature block carries, or ``None``."""
    text = record.decode("utf-8", "replace")
    start, end = text.find(BLOCK_START), text.find(BLOCK_END)
    if start < 0 or end < start:
        return None
    jwk_text = BlockData(text[start:end]).get(JWK_SCRIPT)
    if jwk_text is None:
        return None
    try:
        jwk = json.loads(jwk_text)
    except ValueError:
        return None
    return jwk if isinstance(jwk, dict) else None
