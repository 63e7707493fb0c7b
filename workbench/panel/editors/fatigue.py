"""The fatigue check's editor (``design.fatigue``), part of the Design tab."""

from __future__ import annotations

import ipywidgets as w

from workbench.case.declaration.criteria import word_options
from workbench.case.design import FATIGUE_CRITERIA, MEAN_CONCENTRATIONS, SURFACE_FINISHES
from workbench.design.fatigue import RELIABILITY_FACTORS
from workbench.panel.bound import row
from workbench.panel.document import Path, get_at, result_names
from workbench.panel.form import Form, sized
from workbench.panel.markup import render

#: How the two torque states are given.
_PAIRS = ("extremes", "mean and alternating")


class FatigueEditor:
    """The fatigue check: switched on and off by a check box; the two results; the factors."""

    def __init__(self, form: Form) -> None:
        self.form = form

    def rows(self) -> list[w.Widget]:
        """The editor's rows (only the switch while the check is off)."""
        form = self.form
        document = form.document
        fatigue = get_at(document, ("design", "fatigue"))
        switch = w.Checkbox(value=isinstance(fatigue, dict), description="fatigue check")
        switch.observe(lambda c: self.switch(c["new"]), "value")
        rows: list[w.Widget] = [
            w.HTML(
                render("heading", "Fatigue", " under a torque that fluctuates between two results")
            ),
            w.HBox([switch, form.message(("design", "fatigue"))]),
        ]
        if not isinstance(fatigue, dict):
            return rows
        base: Path = ("design", "fatigue")
        names = result_names(document)
        pair = "extremes" if "extremes" in fatigue else "mean and alternating"
        how = w.Dropdown(
            options=list(_PAIRS),
            value=pair,
            description="torques are",
            layout=sized("300px"),
            style={"description_width": "initial"},
        )
        how.observe(lambda c: self.pair(c["new"]), "value")
        if pair == "extremes":
            picks = [
                form.choice((*base, "extremes", 0), "between", names, width="260px"),
                form.choice((*base, "extremes", 1), "and", names, width="220px"),
                form.message((*base, "extremes")),
            ]
        else:
            picks = [
                form.choice((*base, "mean"), "mean", names, width="240px"),
                form.choice((*base, "alternating"), "alternating", names, width="260px"),
            ]
        rows += [
            row([how, *picks]),
            row(
                [
                    form.choice((*base, "finish"), "finish", word_options(SURFACE_FINISHES)),
                    form.choice((*base, "reliability"), "reliability", list(RELIABILITY_FACTORS)),
                    form.choice(
                        (*base, "criterion"),
                        "criterion",
                        word_options(FATIGUE_CRITERIA),
                        width="220px",
                    ),
                    form.number(
                        (*base, "factor_of_safety"),
                        "fatigue factor of safety",
                        width="240px",
                        default=1.5,
                    ),
                    form.choice(
                        (*base, "mean_concentration"),
                        "mean stress",
                        word_options(MEAN_CONCENTRATIONS),
                        width="260px",
                    ),
                ]
            ),
        ]
        return rows

    def switch(self, on: bool) -> None:
        """Switch the fatigue check on (between the first two load cases) or off."""
        document = self.form.document
        design = document.setdefault("design", {})
        names = [c.get("name") for c in document.get("load_cases", [])]

        def change() -> None:
            if on:
                first, second = (names * 2)[:2] if names else ("", "")
                design["fatigue"] = {
                    "extremes": [first, second],
                    "finish": "machined",
                    "reliability": 0.5,
                    "criterion": "goodman",
                    "factor_of_safety": 1.5,
                }
            else:
                design.pop("fatigue", None)

        self.form.structural(change)

    def pair(self, pair: str) -> None:
        """Give the two torque states as extremes, or as a mean and an alternating result."""
        fatigue = self.form.document["design"]["fatigue"]

        def change() -> None:
            if pair == "extremes":
                first, second = fatigue.pop("mean", None), fatigue.pop("alternating", None)
                fatigue["extremes"] = [first, second]
            else:
                first, second = (fatigue.pop("extremes", None) or [None, None])[:2]
                fatigue["mean"], fatigue["alternating"] = first, second

        self.form.structural(change)
