"""The workbench panel: ipywidgets + bqplot editors and live charts for a torsion case.

``from workbench.panel import Workbench; panel = Workbench.open("case.json")`` shows the panel in
a notebook. :data:`CASE_MIME_TYPE` names the output that carries the case the engineer saw; the
calculation record reads the last output of that type. Importing this package stays light: the
widgets load on first use of :class:`Workbench`.

The modules, from the document up (the panel calls the solver and never computes mechanics):

- ``document``: the case document's paths, units and plain words; ``keys``: the quantity (so
  the unit) of each case-file key, one lookup;
- ``state``: the case being edited, its solve, the coalescing of edit bursts (no widgets);
- ``form``: fields bound to document paths and the messages beside them; ``editors/``: one tab
  per group of keys; ``whatif``: baseline and the sweep's widgets;
- sweeps are computed in the design layer (:mod:`workbench.design.sweep`, the batch path);
- ``plotting``, ``charts``, ``modes_section``, ``fatigue_section``, ``summary``: what is drawn;
  ``markup`` and ``templates/``: all the panel's HTML, autoescaped;
- ``workbench``: the :class:`Workbench` widget composing them;
- ``record_status``: :class:`RecordStatus`, a loaded record's signature status in one line.
"""

from __future__ import annotations

from typing import Any

from workbench.case import CASE_MIME_TYPE

__all__ = ["CASE_MIME_TYPE", "RecordStatus", "Workbench"]


def __getattr__(name: str) -> Any:
    if name == "Workbench":
        from workbench.panel.workbench import Workbench  # noqa: PLC0415

        return Workbench
    if name == "RecordStatus":
        from workbench.panel.record_status import RecordStatus  # noqa: PLC0415

        return RecordStatus
    msg = f"module {__name__!r} has no attribute {name!r}"
    raise AttributeError(msg)
