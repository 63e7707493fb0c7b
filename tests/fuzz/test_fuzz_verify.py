"""``workbench verify`` on arbitrary bytes and on tampered signed records and packages.

Exit 0 verified, 1 not verified (with the report on stdout, its verdict last), 2 bad input
(one line on stderr, ≤ 200 characters, naming the file or the option) — never exit 3, a
traceback, a warning or a hang (README, "Commands"). A record whose bytes were changed never
verifies (its content digest covers every byte outside the signature block, which is rebuilt
byte for byte); a package verifies after a change only if every file in it is unchanged (a zip
header's date or comment is not signed).

The committed records (tests/fixtures/README.md) were signed with the key whose public half is
``before-public.pem``; ``record_hostile_names_signed.html`` with ``record_signer_public.pem``.
"""

from __future__ import annotations

import io
import tempfile
import warnings
import zipfile
from pathlib import Path

from hypothesis import given
from hypothesis import strategies as st

from tests.fuzz.harness import fail, fuzz_settings, run

FIXTURES = Path(__file__).resolve().parents[1] / "fixtures"
#: (file, the public key that signed it).
SIGNED = {
    "record-before.html": "before-public.pem",
    "record-large-integer.html": "before-public.pem",
    "record_hostile_names_signed.html": "record_signer_public.pem",
    "package-before.zip": "before-public.pem",
}
ORIGINALS = {name: (FIXTURES / name).read_bytes() for name in SIGNED}

#: Examples per CI run (a verify that re-solves a record takes about 0.3 s).
CI_EXAMPLES = 400


class Blob(bytes):
    """Bytes that show as their size and first bytes (a failing example is printed)."""

    def __repr__(self) -> str:
        return f"<{len(self):,} bytes: {bytes(self[:80])!r}…>"


def _members(data: bytes) -> dict[str, bytes] | None:
    """The files of a zip by name, or ``None`` when it cannot be read whole."""
    try:
        with zipfile.ZipFile(io.BytesIO(data)) as archive:
            names = archive.namelist()
            if len(set(names)) != len(names):
                return None
            return {name: archive.read(name) for name in names}
    except Exception:
        return None


@st.composite
def _byte_mutation(draw: st.DrawFn, data: bytes) -> tuple[bytes, str]:
    kind = draw(st.sampled_from(["flip", "insert", "delete", "cut", "append", "digit", "repeat"]))
    spot = draw(st.integers(0, len(data) - 1))
    if kind == "flip":
        byte = draw(st.integers(0, 255).filter(lambda b: b != data[spot]))
        return data[:spot] + bytes([byte]) + data[spot + 1 :], f"byte {spot} set to {byte}"
    if kind == "insert":
        piece = draw(st.binary(min_size=1, max_size=16))
        return data[:spot] + piece + data[spot:], f"{piece!r} put at byte {spot}"
    if kind == "delete":
        size = draw(st.integers(1, 64))
        return data[:spot] + data[spot + size :], f"{size} bytes deleted at {spot}"
    if kind == "cut":
        return data[:spot], f"cut at byte {spot}"
    if kind == "append":
        piece = draw(st.binary(min_size=1, max_size=64))
        return data + piece, f"{piece!r} appended"
    if kind == "repeat":
        size = draw(st.integers(1, 256))
        return data[:spot] + data[spot : spot + size] * 2 + data[
            spot + size :
        ], f"{size} bytes at {spot} twice"
    digits = [i for i in range(spot, min(len(data), spot + 4096)) if 0x30 <= data[i] <= 0x39]
    if not digits:
        return data + b" ", "a blank appended"
    at = digits[0]
    new = (data[at] - 0x30 + draw(st.integers(1, 9))) % 10 + 0x30
    return data[:at] + bytes([new]) + data[at + 1 :], f"digit at {at} changed"


@st.composite
def _member_mutation(draw: st.DrawFn, data: bytes) -> tuple[bytes, str]:
    """The package with one of its files changed, dropped, doubled or one added."""
    members = _members(data)
    assert members is not None
    names = sorted(members)
    name = draw(st.sampled_from(names))
    kind = draw(st.sampled_from(["change", "drop", "twice", "add"]))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as archive:
        for other in names:
            content = members[other]
            if other == name and kind == "drop":
                continue
            if other == name and kind == "change":
                content, _ = draw(_byte_mutation(content)) if content else (b"x", "")
            archive.writestr(other, content)
            if other == name and kind == "twice":
                with warnings.catch_warnings():  # zipfile warns of the name it writes twice
                    warnings.simplefilter("ignore", UserWarning)
                    archive.writestr(other, content)
        if kind == "add":
            archive.writestr(
                draw(st.sampled_from(["extra.txt", "../escape.txt", name + "/"])), b"x"
            )
    return out.getvalue(), f"{kind} {name}"


@st.composite
def verify_inputs(draw: st.DrawFn) -> tuple[str, bytes, str | None, str]:
    """(file name, bytes, key file or None, what was done): tampered fixtures or any bytes."""
    source = draw(st.sampled_from([*SIGNED, "any bytes", "any bytes as .zip"]))
    if source.startswith("any bytes"):
        data = draw(st.binary(max_size=2048))
        name = "record.zip" if source.endswith(".zip") else "record.html"
        key = draw(st.sampled_from([None, "before-public.pem", "garbage"]))
        return name, Blob(data), key, "any bytes"
    original = ORIGINALS[source]
    if source.endswith(".zip") and draw(st.booleans()):
        data, what = draw(_member_mutation(original))
    else:
        data, what = draw(_byte_mutation(original))
    key = draw(st.sampled_from([SIGNED[source], SIGNED[source], None, "garbage"]))
    return source, Blob(data), key, f"{source}: {what}"


def _key_argument(key: str | None, folder: Path, garbage: bytes) -> list[str]:
    if key is None:
        return []
    if key == "garbage":
        path = folder / "key.pem"
        path.write_bytes(garbage)
        return ["--public-key", str(path)]
    return ["--public-key", str(FIXTURES / key)]


@fuzz_settings(CI_EXAMPLES)
@given(verify_inputs(), st.binary(max_size=200))
def test_verify_on_any_bytes_gives_only_allowed_outcomes(
    example: tuple[str, bytes, str | None, str], garbage: bytes
) -> None:
    name, data, key, what = example
    with tempfile.TemporaryDirectory(prefix="wb-verify-") as folder:
        target = Path(folder) / name
        target.write_bytes(data)
        result = run("verify", ["verify", str(target), *_key_argument(key, Path(folder), garbage)])
    problem = result.problem()
    if problem is None and result.status == 2:
        line = result.stderr.rstrip("\n")
        if not line.startswith((str(target), "--public-key", str(Path(folder) / "key.pem"))):
            problem = f"the message names neither the file nor the key: {line!r}"
    if problem is None and result.status in (0, 1):
        verdict = result.stdout.rstrip("\n").rsplit("\n", 1)[-1]
        expected = "VERIFIED" if result.status == 0 else "NOT VERIFIED"
        if verdict != expected:
            problem = f"exit {result.status} but the verdict reads {verdict!r}"
    if problem is None and result.status == 0 and name in ORIGINALS and data != ORIGINALS[name]:
        unchanged = name.endswith(".zip") and _members(data) == _members(ORIGINALS[name])
        if not unchanged:  # no mutation re-signs: neither key may verify it
            problem = "a changed record verified"
    if problem:
        fail(problem, [what, f"key {key}"], data[:3000], [result])
