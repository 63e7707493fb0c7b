"""The calculation package: notebook, case file, record, results table and a signed manifest.

The zip holds ``notebook.ipynb``, ``case.json``, ``record.html``, ``record.pdf`` (the record
printed by headless Chromium, :mod:`workbench.record.pdf`; left out on request), ``results.csv``
(and ``results.xlsx`` when openpyxl is installed), ``manifest.json`` listing the SHA-256 and
size of every other file, and ``manifest.jws``: a compact JWS (EdDSA) over the RFC 8785
canonical manifest. Entries carry a fixed time stamp, and the PDF the record's signing time, so
the same inputs signed at the same time give the same zip.
"""

from __future__ import annotations

import hashlib
import io
import json
import zipfile
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError
from workbench.case.files import atomic_file
from workbench.record.document import FORMAT, compute, signing_time
from workbench.record.pdf import PAPER_SIZES, print_pdf
from workbench.signing import canonicalize

__all__ = ["build_package"]

#: The DOS time stamp every zip entry gets (the zip format's earliest date).
_ZIP_TIME = (1980, 1, 1, 0, 0, 0)


def _results_frame(computation: Any) -> Any:
    import pandas as pd  # noqa: PLC0415

    units = computation.model.units
    frame = computation.results.to_frame()
    out = pd.DataFrame(
        {
            "result": frame["result"],
            "shaft": frame["shaft"],
            f"x [{units.label('length')}]": units.from_si(frame["x"].to_numpy(), "length"),
            f"torque [{units.label('torque')}]": units.from_si(
                frame["torque"].to_numpy(), "torque"
            ),
            f"angle [{units.label('angle')}]": units.from_si(frame["angle"].to_numpy(), "angle"),
            f"shear_stress [{units.label('stress')}]": units.from_si(
                frame["shear_stress"].to_numpy(), "stress"
            ),
        }
    )
    return out


def build_package(
    notebook: str | Path,
    output: str | Path,
    *,
    key_file: str | Path | None = None,
    key_passphrase: bytes | None = None,
    signer: str = "",
    title_block: dict[str, Any] | None = None,
    paper: str | None = "A4",
) -> dict[str, Any]:
    """Write the calculation package of a notebook; return the manifest.

    Parameters
    ----------
    notebook, output
        The notebook (.ipynb) and the zip file to write.
    key_file
        Private key (PEM) that signs the record and the manifest; ``None``: unsigned.
    key_passphrase
        Opens an encrypted key file (``None`` for an unencrypted one).
    signer, title_block
        The signer's name and title-block fields over the notebook's.
    paper
        Paper size of ``record.pdf`` (``A4`` or ``Letter``); ``None`` leaves the PDF out.

    Raises
    ------
    InputError
        When the notebook holds no valid case or cannot be read, or the PDF cannot be printed
        (no Chromium, no playwright).
    SigningError
        When the key cannot be read.
    """
    from workbench.record.exporter import export_file  # noqa: PLC0415
    from workbench.signing import load_private_key, sign_compact  # noqa: PLC0415

    notebook = Path(notebook)
    if paper is not None and paper not in PAPER_SIZES:
        raise InputError("paper", f"must be one of {', '.join(PAPER_SIZES)}, not {paper[:20]!r}")
    signed_at = signing_time()
    record, resources = export_file(
        notebook,
        key_file=key_file,
        key_passphrase=key_passphrase,
        signer=signer,
        title_block=title_block,
        signed_at=signed_at,
    )
    case = resources["workbench_case"]
    computation = compute(case)
    frame = _results_frame(computation)
    files: dict[str, bytes] = {
        "notebook.ipynb": notebook.read_bytes(),
        "case.json": (json.dumps(case, indent=2, ensure_ascii=False) + "\n").encode("utf-8"),
        "record.html": record.encode("utf-8"),
        "results.csv": frame.to_csv(index=False, lineterminator="\n").encode("utf-8"),
    }
    if paper is not None:
        files["record.pdf"] = print_pdf(record, paper, created=signed_at)
    try:
        import openpyxl  # noqa: F401, PLC0415
    except ImportError:
        pass
    else:
        buffer = io.BytesIO()
        frame.to_excel(buffer, index=False, sheet_name="results")
        files["results.xlsx"] = buffer.getvalue()
    manifest = {
        "format": FORMAT + "-package",
        "files": [
            {"name": name, "sha256": hashlib.sha256(data).hexdigest(), "size": len(data)}
            for name, data in sorted(files.items())
        ],
        "results_digest": computation.results_digest,
    }
    members = dict(files)
    members["manifest.json"] = canonicalize(manifest)
    if key_file:
        members["manifest.jws"] = sign_compact(
            members["manifest.json"], load_private_key(key_file, key_passphrase), {"typ": "JOSE"}
        ).encode("ascii")
    # Whole or not at all: a package cut short by a kill would still look like a zip.
    with (
        atomic_file(output) as stream,
        zipfile.ZipFile(stream, "w", compression=zipfile.ZIP_DEFLATED) as archive,
    ):
        for name, data in members.items():
            info = zipfile.ZipInfo(name, date_time=_ZIP_TIME)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            archive.writestr(info, data)
    return manifest
