"""The nbconvert exporter of the calculation record (``--to workbench_record``).

The exporter executes the notebook when it holds no case output, takes the case the panel
holds and the title block (metadata, then the title-block editor's output, then the
``title_block`` option: see :mod:`workbench.record.notebook`), recomputes every result and check
from the case and writes one self-contained HTML record, signed when a key is given. The notebook's own cells
follow the record, sanitized: nothing from them can run or fetch.
"""

from __future__ import annotations

import copy
import functools
from pathlib import Path
from typing import Any

from nbconvert.exporters import HTMLExporter
from traitlets import Bool, Dict, Unicode, default

from workbench.record.document import compute, render_record
from workbench.record.notebook import find_case, has_case_output, title_block_from
from workbench.record.sanitize import sanitize_notebook_html
from workbench.record.study import find_study, study_payload
from workbench.record.templating import templates_dir

__all__ = ["RecordExporter", "execute_notebook"]

#: Seconds a cell may run when the exporter executes the notebook.
CELL_TIMEOUT = 600


def execute_notebook(nb: Any, folder: Path | None) -> Any:
    """Run every cell of ``nb`` in a fresh ``python3`` kernel, in ``folder``; return it."""
    from nbclient import NotebookClient  # noqa: PLC0415

    client = NotebookClient(
        nb,
        kernel_name="python3",
        timeout=CELL_TIMEOUT,
        resources={"metadata": {"path": str(folder or Path.cwd())}},
    )
    client.execute()
    return nb


@functools.lru_cache(maxsize=4)
def _read_css(path: str) -> str:
    """A template stylesheet, read once per process (it is part of the installed nbconvert)."""
    return Path(path).read_text("utf-8")


class RecordExporter(HTMLExporter):
    """Export a notebook as a signed, self-contained calculation record (HTML)."""

    export_from_notebook = "Workbench calculation record"

    key_file = Unicode(
        "", help="Ed25519 private key (PEM) to sign the record with; empty for UNSIGNED."
    ).tag(config=True)
    signer = Unicode("", help="Name of the signer (default: the title block's prepared_by).").tag(
        config=True
    )
    execute = Bool(True, help="Execute the notebook when it holds no case output.").tag(config=True)
    title_block = Dict(help="Title-block fields over the notebook's metadata.").tag(config=True)
    signed_at = Unicode("", help="ISO 8601 UTC signing time (default: now).").tag(config=True)
    #: Passphrase of an encrypted key file; set from Python only, never from a config file.
    key_passphrase: bytes | None = None

    @default("template_name")
    def _template_name_default(self) -> str:
        return "workbench_record"

    @default("extra_template_basedirs")
    def _extra_template_basedirs_default(self) -> list[str]:
        return [str(templates_dir())]

    @default("file_extension")
    def _file_extension_default(self) -> str:
        return ".html"

    def _lab_css(self) -> str:
        for folder in self.template_paths:
            candidate = Path(folder) / "static" / "index.css"
            if Path(folder).name == "lab" and candidate.is_file():
                return _read_css(str(candidate))
        return ""

    def from_notebook_node(  # type: ignore[override]
        self, nb: Any, resources: dict[str, Any] | None = None, **kw: Any
    ) -> tuple[str, dict[str, Any]]:
        """Build the record of ``nb``; returns ``(record text, resources)``."""
        from workbench.signing import load_private_key  # noqa: PLC0415

        resources = self._init_resources(resources)
        path = (resources.get("metadata") or {}).get("path") or ""
        folder = Path(path) if path else None
        if self.execute and not has_case_output(nb):
            # Executing fills the outputs in place: run a copy, never the caller's notebook.
            # (Otherwise nbconvert copies the notebook itself before its preprocessors run.)
            nb = execute_notebook(copy.deepcopy(nb), folder)
        case, source = find_case(nb, folder)
        computation = compute(case)
        found = find_study(nb)
        study = study_payload(found, computation.case, folder) if found is not None else None
        title_block = title_block_from(nb, dict(self.title_block))
        private_key = (
            load_private_key(self.key_file, self.key_passphrase) if self.key_file else None
        )
        cells_html, resources = super().from_notebook_node(nb, resources, **kw)
        inlined = "\n".join(resources.get("inlining", {}).get("css", []))
        name = (resources.get("metadata") or {}).get("name") or ""
        record = render_record(
            computation,
            title_block,
            sanitize_notebook_html(cells_html),
            private_key=private_key,
            signer=self.signer,
            signed_at=self.signed_at or None,
            case_source=source,
            notebook_name=f"{name}.ipynb" if name else "",
            extra_css=self._lab_css() + "\n" + inlined,
            study=study,
        )
        resources["workbench_case"] = computation.case
        resources["workbench_results_digest"] = computation.results_digest
        return record, resources


def export_file(
    notebook: str | Path,
    *,
    key_file: str | Path | None = None,
    key_passphrase: bytes | None = None,
    signer: str = "",
    title_block: dict[str, Any] | None = None,
    execute: bool = True,
    signed_at: str = "",
) -> tuple[str, dict[str, Any]]:
    """Export a notebook file as a record; returns ``(record text, resources)``.

    ``key_passphrase`` opens an encrypted key file (``None`` for an unencrypted one).

    Raises
    ------
    InputError
        When the notebook cannot be read or holds no valid case.
    """
    import nbformat  # noqa: PLC0415

    from workbench.case.errors import InputError  # noqa: PLC0415

    path = Path(notebook)
    try:
        nb = nbformat.read(str(path), as_version=4)
    except (OSError, ValueError) as error:
        msg = f"cannot read the notebook: {error}"
        raise InputError(str(path), msg) from None
    exporter = RecordExporter(
        key_file=str(key_file or ""),
        signer=signer,
        title_block=dict(title_block or {}),
        execute=execute,
        signed_at=signed_at,
    )
    exporter.key_passphrase = key_passphrase
    resources = {"metadata": {"path": str(path.parent.resolve()), "name": path.stem}}
    return exporter.from_notebook_node(nb, resources)
