"""The editor tabs of the panel, one class per group of case-file keys.

Each tab is an :class:`~workbench.panel.form.Editor`: a box rebuilt from the case document by
``build()`` after every structural change, made of the :class:`~workbench.panel.form.Form`'s
bound fields.
"""

from workbench.panel.editors.design import DesignEditor
from workbench.panel.editors.loads import CombinationsEditor, LoadsEditor
from workbench.panel.editors.segments import SegmentsEditor
from workbench.panel.editors.supports import GearsEditor, SupportsEditor
from workbench.panel.editors.vibration import VibrationEditor

__all__ = [
    "CombinationsEditor",
    "DesignEditor",
    "GearsEditor",
    "LoadsEditor",
    "SegmentsEditor",
    "SupportsEditor",
    "VibrationEditor",
]
