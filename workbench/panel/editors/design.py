"""The Design tab: factor of safety, shear criterion, stated limits, rotation limits, fatigue."""

from __future__ import annotations

from collections.abc import Callable

import ipywidgets as w

from workbench.case.declaration.criteria import word_options
from workbench.case.design import SHEAR_CRITERIA
from workbench.panel.bound import Editor, row
from workbench.panel.document import Path, get_at, shaft_length
from workbench.panel.editors.fatigue import FatigueEditor
from workbench.panel.form import Form, button, clean_number, sized
from workbench.panel.markup import render


class DesignEditor(Editor):
    """The design criteria of the case (``design``), the fatigue check's among them."""

    title = "Design"

    def __init__(self, form: Form, shown_shaft: Callable[[], int]) -> None:
        super().__init__(form, shown_shaft)
        self.fatigue = FatigueEditor(form)

    def build(self) -> None:
        form = self.form
        design = self.document.setdefault("design", {})
        design.setdefault("factor_of_safety", 2.0)
        design.setdefault("shear_criterion", "von_mises")
        keyway = w.Checkbox(value=bool(design.get("keyway", False)), description="keyways")
        keyway.observe(lambda c: form.write(("design", "keyway"), c["new"]), "value")
        self.box.children = [
            form.number(("design", "factor_of_safety"), "factor of safety", width="200px"),
            form.choice(
                ("design", "shear_criterion"),
                "criterion",
                word_options(SHEAR_CRITERIA),
                width="300px",
            ),
            keyway,
            form.number(
                ("design", "allowable_shear_stress"),
                "stated allowable (0 = none)",
                optional=True,
                width="300px",
            ),
            form.number(
                ("design", "max_twist_rate"),
                "largest twist rate (0 = none)",
                optional=True,
                width="300px",
            ),
            w.HTML(
                render(
                    "heading",
                    "Rotation limits",
                    ": largest |θ(end) − θ(start)| between two stations",
                )
            ),
            *self._rotation_limit_rows(),
            w.HBox(
                [
                    button("add rotation limit", self.add_rotation_limit, width="150px"),
                    form.message(("design", "rotation_limits")),
                ]
            ),
            w.HTML(
                render(
                    "heading",
                    "Coexisting stresses",
                    ": from bending, by segment (warping checks of open sections)",
                )
            ),
            *self._coexisting_rows(),
            w.HBox(
                [
                    button("add coexisting stresses", self.add_coexisting, width="190px"),
                    form.message(("design", "coexisting_stresses")),
                ]
            ),
            *self.fatigue.rows(),
            form.message("design"),
        ]

    def _rotation_limit_rows(self) -> list[w.Widget]:
        form = self.form
        rows: list[w.Widget] = []
        limits = get_at(self.document, ("design", "rotation_limits")) or []
        for n, _limit in enumerate(limits):
            base: Path = ("design", "rotation_limits", n)
            parts = [
                w.Label(f"{n}", layout=sized("24px")),
                form.choice((*base, "shaft"), "shaft", self.shaft_ids(), width="160px"),
                form.number((*base, "start"), "from x", width="150px"),
                form.number((*base, "end"), "to x", width="150px"),
                form.number((*base, "limit"), "limit", width="150px"),
                button("✕", lambda n=n: self.remove_rotation_limit(n)),
                form.message(base),
            ]
            rows.append(row(parts))
        return rows

    def _coexisting_rows(self) -> list[w.Widget]:
        form = self.form
        rows: list[w.Widget] = []
        entries = get_at(self.document, ("design", "coexisting_stresses")) or []
        for n in range(len(entries)):
            base: Path = ("design", "coexisting_stresses", n)
            parts = [
                w.Label(f"{n}", layout=sized("24px")),
                form.choice((*base, "shaft"), "shaft", self.shaft_ids(), width="160px"),
                form.number((*base, "segment"), "segment", width="120px"),
                form.number((*base, "normal_stress"), "normal", optional=True, width="150px"),
                form.number((*base, "shear_stress"), "shear", optional=True, width="150px"),
                button("✕", lambda n=n: self.remove_coexisting(n)),
                form.message(base),
            ]
            rows.append(row(parts))
        return rows

    def add_coexisting(self) -> None:
        """Stated bending stresses on the first segment of the shaft shown, none yet."""
        shaft = self.document["shafts"][self.shown_shaft()]
        entry = {"shaft": shaft["id"], "segment": 0, "normal_stress": 0, "shear_stress": 0}
        design = self.document.setdefault("design", {})
        self.form.structural(lambda: design.setdefault("coexisting_stresses", []).append(entry))

    def remove_coexisting(self, n: int) -> None:
        """Remove coexisting-stress entry ``n`` (and the list, when it was the last)."""
        self.form.remove(("design", "coexisting_stresses"), n, drop_empty=True)

    def add_rotation_limit(self) -> None:
        """A new limit over the whole shaft shown, 1 angle unit (to be set by the engineer)."""
        shaft = self.document["shafts"][self.shown_shaft()]
        entry = {
            "shaft": shaft["id"],
            "start": 0,
            "end": clean_number(shaft_length(shaft)),
            "limit": 1,
        }
        design = self.document.setdefault("design", {})
        self.form.structural(lambda: design.setdefault("rotation_limits", []).append(entry))

    def remove_rotation_limit(self, n: int) -> None:
        """Remove rotation limit ``n`` (and the list, when it was the last)."""
        self.form.remove(("design", "rotation_limits"), n, drop_empty=True)
