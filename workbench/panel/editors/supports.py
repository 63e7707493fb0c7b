"""The Supports and Gears tabs: one row per support, one per gear mesh."""

from __future__ import annotations

import ipywidgets as w

from workbench.panel.bound import Editor, row
from workbench.panel.document import Path, shaft_length
from workbench.panel.form import button, sized

#: The kinds of support offered (a prescribed rotation is a fixed support with a rotation).
SUPPORT_KINDS = ("fixed", "spring", "prescribed rotation")


class SupportsEditor(Editor):
    """Support rows: shaft, x, kind, stiffness of a spring, prescribed rotation."""

    title = "Supports"

    def build(self) -> None:
        form = self.form
        rows = []
        for n, support in enumerate(self.document.get("supports", [])):
            base: Path = ("supports", n)
            kind = support.get("kind", "fixed")
            shown = "prescribed rotation" if kind == "fixed" and "rotation" in support else kind
            kinds = w.Dropdown(options=SUPPORT_KINDS, value=shown, layout=sized("170px"))
            kinds.observe(lambda c, n=n: self.set_kind(n, c["new"]), "value")
            parts = [
                w.Label(f"{n}", layout=sized("24px")),
                form.choice((*base, "shaft"), "shaft", self.shaft_ids(), width="160px"),
                form.number((*base, "x"), "x"),
                kinds,
            ]
            if kind == "spring":
                parts.append(form.number((*base, "stiffness"), "stiffness", width="180px"))
            if shown != "fixed":
                parts.append(form.number((*base, "rotation"), "rotation"))
            parts += [button("✕", lambda n=n: form.remove(("supports",), n)), form.message(base)]
            rows.append(row(parts, wrap=False))
        add = button("add support", self.add, width="120px")
        self.box.children = [*rows, w.HBox([add, form.message("supports")])]

    def set_kind(self, n: int, shown: str) -> None:
        """Make support ``n`` of a kind of :data:`SUPPORT_KINDS`."""
        support = self.document["supports"][n]

        def change() -> None:
            if shown == "spring":
                support["kind"] = "spring"
                support.setdefault("stiffness", 1000.0)
            else:
                support["kind"] = "fixed"
                support.pop("stiffness", None)
                if shown == "prescribed rotation":
                    support.setdefault("rotation", 0.0)
                else:
                    support.pop("rotation", None)

        self.form.structural(change)

    def add(self) -> None:
        """Add a fixed support at the end of the shaft shown."""
        shaft = self.document["shafts"][self.shown_shaft()]
        end = shaft_length(shaft)
        supports = self.document.setdefault("supports", [])
        self.form.structural(
            lambda: supports.append({"shaft": shaft["id"], "x": end, "kind": "fixed"})
        )


class GearsEditor(Editor):
    """Gear-mesh rows: each end's shaft, x and pitch radius, and the kind of mesh."""

    title = "Gears"

    def build(self) -> None:
        form = self.form
        rows = []
        for n, gear in enumerate(self.document.get("gears", [])):
            base: Path = ("gears", n)
            parts: list[w.Widget] = [w.Label(f"{n}", layout=sized("24px"))]
            for end in ("a", "b"):
                parts += [
                    form.choice((*base, end, "shaft"), end, self.shaft_ids(), width="140px"),
                    form.number((*base, end, "x"), "x", width="120px"),
                    form.number((*base, end, "radius"), "r", width="120px"),
                ]
            mesh = w.Dropdown(
                options=["external", "internal"],
                value=gear.get("mesh", "external"),
                layout=sized("100px"),
            )
            mesh.observe(lambda c, base=base: form.write((*base, "mesh"), c["new"]), "value")
            parts += [
                mesh,
                button("✕", lambda n=n: form.remove(("gears",), n)),
                form.message(base),
            ]
            rows.append(row(parts))
        add = button("add gear mesh", self.add, width="130px")
        self.box.children = [*rows, w.HBox([add, form.message("gears")])]

    def add(self) -> None:
        """Add a gear mesh between the first and the last shaft (radius 50 each)."""
        ids = self.shaft_ids()
        gear = {
            "a": {"shaft": ids[0], "x": 0, "radius": 50},
            "b": {"shaft": ids[-1], "x": 0, "radius": 50},
        }
        self.form.structural(lambda: self.document.setdefault("gears", []).append(gear))
