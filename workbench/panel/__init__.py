"""The workbench panel: ipywidgets + bqplot editors and live charts for a torsion case.

``from workbench.panel import Workbench; panel = Workbench.open("case.json")`` shows the panel in
a notebook. :data:`CASE_MIME_TYPE` names the output that carries the case the engineer saw; the
calculation record reads the last output of that type. Importing this package stays light: the
widgets load on first use of :class:`Workbench`.
"""

from __future__ import annotations

from typing import Any

from workbench.case import CASE_MIME_TYPE

__all__ = ["CASE_MIME_TYPE", "Workbench"]


def __getattr__(name: str) -> Any:
    if name == "Workbench":
        from workbench.panel.workbench import Workbench  # noqa: PLC0415

        return Workbench
    msg = f"module {__name__!r} has no attribute {name!r}"
    raise AttributeError(msg)
