"""Cases and widget look-ups shared by the panel's tests (invented data)."""

from __future__ import annotations

import shutil
from pathlib import Path

import ipywidgets as w

from workbench.panel import Workbench

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "notebooks" / "press_drive.json"


def simple_case(diameter: float = 40.0, torque: float = 500.0) -> dict:
    return {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {"steel": {"shear_modulus": 80000, "yield_strength": 400}},
        "shafts": [
            {
                "id": "s",
                "segments": [
                    {
                        "length": 1000,
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": diameter},
                    }
                ],
            }
        ],
        "supports": [{"shaft": "s", "x": 0, "kind": "fixed"}],
        "load_cases": [{"name": "drive", "torques": [{"shaft": "s", "x": 1000, "torque": torque}]}],
    }


def field(panel: Workbench, path: str):
    return panel.form.fields[path][0]


def open_demo(folder: Path) -> Workbench:
    """The demo case, copied into ``folder``, open in a panel (not displayed)."""
    target = folder / "press_drive.json"
    shutil.copy(CASE, target)
    return Workbench.open(target, show=False)


def box_of(root: w.Widget, widget: w.Widget) -> w.Box | None:
    """The box whose children hold ``widget`` (depth-first through boxes and tabs)."""
    children = getattr(root, "children", ())
    if widget in children:
        return root
    for child in children:
        found = box_of(child, widget)
        if found is not None:
            return found
    return None


def message_beside(panel: Workbench, path: str) -> w.HTML:
    """The one message line in the same box as the field at ``path``, after the field."""
    entry = field(panel, path)
    box = box_of(panel.root, entry)
    assert box is not None, f"{path} is not shown in the panel"
    after = list(box.children)[list(box.children).index(entry) + 1 :]
    lines = [c for c in after if isinstance(c, w.HTML) and "wb-msg" in c._dom_classes]
    assert len(lines) == 1
    return lines[0]


def shown_messages(panel: Workbench) -> list[str]:
    """The message shown on each field, row or list that shows one (a field shown both in the
    table view and in the inspector counts once; both its lines say the same)."""
    shown = []
    for lines in panel.form.messages.values():
        texts = {line.value for line in lines if line.value}
        assert len(texts) <= 1, texts
        shown += sorted(texts)
    return shown


def widgets_in(root: w.Widget) -> list[w.Widget]:
    """``root`` and every widget under it, depth-first through boxes and tabs."""
    found = [root]
    for child in getattr(root, "children", ()):
        found += widgets_in(child)
    return found


def inspector_entry(panel: Workbench, path: str) -> w.Text:
    """The inspector's text entry of the field at ``path`` (the part picked shows it)."""
    inside = widgets_in(panel.drawing_editor.inspector.box)
    (entry,) = [x for x in panel.form.fields[path] if x in inside and isinstance(x, w.Text)]
    return entry
