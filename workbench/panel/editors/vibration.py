"""The Vibration tab: discs, running-speed bands, the frequency margin, material densities."""

from __future__ import annotations

import ipywidgets as w

from workbench.case.design import DEFAULT_FREQUENCY_MARGIN
from workbench.panel.bound import Editor, row
from workbench.panel.document import Path, shaft_length
from workbench.panel.form import button, clean_number, sized
from workbench.panel.markup import render


class VibrationEditor(Editor):
    """What the natural frequencies and their separation checks are worked out from."""

    title = "Vibration"

    def build(self) -> None:
        form = self.form
        doc = self.document
        rows: list[w.Widget] = [
            w.HTML(render("heading", "Discs", " (rigid rotors, flywheels, hubs)"))
        ]
        for n, _disc in enumerate(doc.get("discs") or []):
            base: Path = ("discs", n)
            parts = [
                w.Label(f"{n}", layout=sized("24px")),
                form.choice((*base, "shaft"), "shaft", self.shaft_ids(), width="160px"),
                form.number((*base, "x"), "x"),
                form.number((*base, "inertia"), "inertia", width="170px"),
                button("✕", lambda n=n: form.remove(("discs",), n, drop_empty=True)),
                form.message(base),
            ]
            rows.append(row(parts))
        rows.append(
            w.HBox([button("add disc", self.add_disc, width="110px"), form.message("discs")])
        )
        rows.append(w.HTML(render("heading", "Running-speed bands")))
        for n, _speed in enumerate(doc.get("operating_speeds") or []):
            base = ("operating_speeds", n)
            parts = [
                w.Label(f"{n}", layout=sized("24px")),
                form.text((*base, "name"), "name"),
                form.number((*base, "min"), "min"),
                form.number((*base, "max"), "max"),
                button("✕", lambda n=n: form.remove(("operating_speeds",), n, drop_empty=True)),
                form.message(base),
            ]
            rows.append(row(parts))
        rows.append(
            w.HBox(
                [
                    button("add speed band", self.add_speed, width="130px"),
                    form.message("operating_speeds"),
                ]
            )
        )
        rows.append(
            form.number(
                ("design", "frequency_margin"),
                "frequency margin (fraction)",
                width="260px",
                default=DEFAULT_FREQUENCY_MARGIN,
            )
        )
        rows.append(
            w.HTML(
                render(
                    "heading", "Material density", " (0 = massless; the segments then only spring)"
                )
            )
        )
        for name in sorted((doc.get("materials") or {}).keys()):
            if isinstance(doc["materials"][name], dict):
                rows.append(
                    form.number(("materials", name, "density"), name, optional=True, width="260px")
                )
        self.box.children = rows

    def add_disc(self) -> None:
        """Add a disc at the end of the shaft shown (0.1 inertia units, to be set)."""
        shaft = self.document["shafts"][self.shown_shaft()]
        entry = {"shaft": shaft["id"], "x": clean_number(shaft_length(shaft)), "inertia": 0.1}
        self.form.structural(lambda: self.document.setdefault("discs", []).append(entry))

    def add_speed(self) -> None:
        """Add a running-speed band (100 to 200 speed units, to be set)."""
        speeds = self.document.setdefault("operating_speeds", [])
        entry = {"name": f"band {len(speeds) + 1}", "min": 100, "max": 200}
        self.form.structural(lambda: speeds.append(entry))
