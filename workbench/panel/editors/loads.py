"""The Loads and Combinations tabs: the torques of one load case at a time; the combinations."""

from __future__ import annotations

from collections.abc import Callable

import ipywidgets as w

from workbench.panel.bound import Editor, row
from workbench.panel.document import Path, set_at, shaft_length
from workbench.panel.form import Form, button


class LoadsEditor(Editor):
    """The load case picked: its name, point torques (sliders to drag) and distributed torques."""

    title = "Loads"

    def __init__(self, form: Form, shown_shaft: Callable[[], int]) -> None:
        super().__init__(form, shown_shaft)
        #: Picks the load case edited.
        self.case_picker: w.Dropdown | None = None

    def build(self) -> None:
        form = self.form
        cases = self.document.get("load_cases", [])
        names = [c.get("name") for c in cases]
        current = self.case_picker
        keep = current.value if current is not None and current.value in range(len(names)) else 0
        self.case_picker = w.Dropdown(
            options=[(str(n), i) for i, n in enumerate(names)], value=keep, description="load case"
        )
        self.case_picker.observe(lambda _: form.structural(lambda: None), "value")
        rows: list[w.Widget] = [self.case_picker]
        if not cases:
            self.box.children = rows
            return
        c = keep
        case = cases[c]
        rows.append(form.text(("load_cases", c, "name"), "name"))
        lengths = {s.get("id"): shaft_length(s) for s in self.document.get("shafts", [])}
        for n, torque in enumerate(case.get("torques", [])):
            base: Path = ("load_cases", c, "torques", n)
            length = lengths.get(torque.get("shaft"), 1.0)
            size = max(abs(float(torque.get("torque", 0.0))) * 3.0, 100.0)
            x_path, torque_path = (*base, "x"), (*base, "torque")
            parts = [
                w.Label(f"torque {n}"),
                form.choice((*base, "shaft"), "", self.shaft_ids(), width="110px"),
                form.dragged(x_path, "x", 0.0, length)[1],
                form.dragged(torque_path, "T", -size, size, width="320px")[1],
                button("✕", lambda n=n: form.remove(("load_cases", c, "torques"), n)),
                form.message(base),
            ]
            rows.append(row(parts, wrap=False))
        for n, _load in enumerate(case.get("distributed", [])):
            base = ("load_cases", c, "distributed", n)
            parts = [
                w.Label(f"distributed {n}"),
                form.choice((*base, "shaft"), "", self.shaft_ids(), width="110px"),
                form.number((*base, "start"), "from", width="120px"),
                form.number((*base, "end"), "to", width="120px"),
                form.number((*base, "intensity_start"), "t₁", width="110px"),
                form.number((*base, "intensity_end"), "t₂", width="110px"),
                button("✕", lambda n=n: form.remove(("load_cases", c, "distributed"), n)),
                form.message(base),
            ]
            rows.append(row(parts))
        shaft_id = self.shaft_ids()[self.shown_shaft()]
        length = lengths.get(shaft_id, 1.0)
        torque = {"shaft": shaft_id, "x": round(length / 2, 6), "torque": 100}
        spread = {
            "shaft": shaft_id,
            "start": 0,
            "end": length,
            "intensity_start": 1,
            "intensity_end": 1,
        }
        rows.append(
            w.HBox(
                [
                    button(
                        "add torque",
                        lambda: form.structural(
                            lambda: case.setdefault("torques", []).append(dict(torque))
                        ),
                        width="110px",
                    ),
                    button(
                        "add distributed",
                        lambda: form.structural(
                            lambda: case.setdefault("distributed", []).append(dict(spread))
                        ),
                        width="130px",
                    ),
                    button("add load case", self.add_case, width="120px"),
                    form.message(("load_cases", c)),
                ]
            )
        )
        self.box.children = rows

    def add_case(self) -> None:
        """Add an empty load case."""
        cases = self.document.setdefault("load_cases", [])
        name = f"case {len(cases) + 1}"
        self.form.structural(lambda: cases.append({"name": name}))


class CombinationsEditor(Editor):
    """Combination rows: the name, and a factor on each load case it takes."""

    title = "Combinations"

    def build(self) -> None:
        form = self.form
        cases = [c.get("name") for c in self.document.get("load_cases", [])]
        rows = []
        for n, combination in enumerate(self.document.get("combinations", [])):
            base: Path = ("combinations", n)
            parts = [form.text((*base, "name"), "name")]
            for case in cases:
                if case in combination.get("factors", {}):
                    factor = (*base, "factors", case)
                    parts.append(form.number(factor, f"× {case}", optional=True, width="170px"))
                else:
                    parts.append(
                        button(
                            f"+ {case}",
                            lambda base=base, case=case: form.structural(
                                lambda: set_at(self.document, (*base, "factors", case), 1.0)
                            ),
                            width="auto",
                        )
                    )
            parts += [
                button("✕", lambda n=n: form.remove(("combinations",), n)),
                form.message(base),
            ]
            rows.append(row(parts))
        add = button("add combination", self.add, width="140px")
        self.box.children = [*rows, w.HBox([add, form.message("combinations")])]

    def add(self) -> None:
        """Add a combination taking the first load case once."""
        cases = [c.get("name") for c in self.document.get("load_cases", [])]
        combinations = self.document.setdefault("combinations", [])
        entry = {"name": f"combination {len(combinations) + 1}", "factors": {cases[0]: 1.0}}
        self.form.structural(lambda: combinations.append(entry))
