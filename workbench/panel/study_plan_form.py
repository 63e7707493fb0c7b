"""The Study tab's plan entry: varied inputs with their distributions, sampling, count, seed.

Widgets only; the plan's keys and the distributions' parameters are read from the plan's one
declaration (:mod:`workbench.study.plan`), each parameter shown with the unit of the key it
varies (:func:`~workbench.panel.keys.quantity_of`). :meth:`PlanForm.plan_document` reads every
entry (``60``, ``2 1/4 in``) into the plan's JSON values in the case's own units, or raises
:class:`~workbench.case.errors.InputError` naming the entry.
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

import ipywidgets as w
import msgspec.inspect

from workbench.case.errors import InputError
from workbench.panel.document import Path, get_at
from workbench.panel.form import Form, entry_text, sized
from workbench.panel.keys import quantity_of
from workbench.panel.markup import render_study
from workbench.panel.shared import close_tree
from workbench.panel.whatif import count_entry, numeric_inputs, read_count
from workbench.study.evaluate import parse_path
from workbench.study.plan import (
    MAX_VARIANTS,
    LogNormal,
    Normal,
    Sampling,
    Tolerance,
    Triangular,
    Uniform,
    Values,
)

#: The distributions offered, by their plan ``kind``.
KINDS = {kind.__struct_config__.tag: kind for kind in (Normal, LogNormal, Uniform, Triangular,
                                                        Tolerance, Values)}  # fmt: skip
#: Parameters that are not in the varied key's unit (a logarithm's standard deviation).
UNITLESS = frozenset({"sigma"})
#: Keys a study cannot vary (a position moves the mesh; discs and densities are not on the
#: batch path); the engine says so too, this keeps them out of the list.
NOT_VARIED = frozenset({"x", "start", "end", "inertia", "density"})
#: Material keys a study varies (every layer of that material).
MATERIAL_KEYS = ("shear_modulus", "yield_strength", "ultimate_strength")
#: The panel's range of seeds (whole numbers typed as text are read as floats: exact below 2^53).
SEED_RANGE = (0, 2**53)


def study_inputs(document: dict[str, Any]) -> Iterator[tuple[str, str]]:
    """The inputs a study may vary, as (case-file path text, readable label)."""
    for path, label in numeric_inputs(document):
        if path[0] != "design" and path[-1] not in NOT_VARIED:
            yield path_text(path), label
    for name, material in (document.get("materials") or {}).items():
        for key in MATERIAL_KEYS:
            if isinstance(material, dict) and isinstance(material.get(key), (int, float)):
                yield f"materials.{name}.{key}", f"{name} · {key.replace('_', ' ')}"


def path_text(path: Path) -> str:
    """``("shafts", 0, "segments", 1, "length")`` → ``"shafts[0].segments[1].length"``."""
    text = ""
    for step in path:
        text += f"[{step}]" if isinstance(step, int) else (f".{step}" if text else str(step))
    return text


def _parameters(kind: str) -> list[str]:
    info: Any = msgspec.inspect.type_info(KINDS[kind])
    return [field.encode_name for field in info.fields]


def _literal_values(struct: type, name: str) -> list[str]:
    """The values a plan key of a Literal type takes, read from the declaration."""
    info: Any = msgspec.inspect.type_info(struct)
    found = next(field for field in info.fields if field.encode_name == name)
    kind: Any = next(t for t in getattr(found.type, "types", (found.type,))
                if isinstance(t, msgspec.inspect.Metadata)).type  # fmt: skip
    return list(kind.values)


def _starting_values(kind: str, value: float) -> dict[str, str]:
    """Entries to start from, about the case's own value (the engineer edits them)."""
    spread = abs(value) * 0.02 or 1.0
    numbers = {
        "mean": value, "std": spread, "median": value if value > 0 else 1.0, "sigma": 0.02,
        "low": value - 2 * spread, "mode": value, "high": value + 2 * spread,
        "lower": -spread, "upper": spread,
    }  # fmt: skip
    shown = {name: entry_text(number) for name, number in numbers.items()}
    shown["values"] = ", ".join(entry_text(value + k * spread) for k in (-1, 0, 1))
    return shown


class PlanForm:
    """The plan's entries: an input picker with its distribution, the list, the sampling."""

    def __init__(self, form: Form) -> None:
        self.form = form
        #: The inputs added, as the plan's ``inputs`` entries (the case's units).
        self.inputs: list[dict[str, Any]] = []
        self.input_path = w.Dropdown(description="vary", layout=sized("420px"))
        self.kind = w.Dropdown(options=list(KINDS), value="normal", description="distribution")
        self.parameters = w.HBox()
        self.shape = w.Dropdown(options=_literal_values(Tolerance, "shape"), description="spread",
                                layout=sized("200px"))  # fmt: skip
        self.input_path.observe(lambda _: self._show_parameters(), "value")
        self.kind.observe(lambda _: self._show_parameters(), "value")
        self.add = w.Button(description="Add input", icon="plus")
        self.add.on_click(lambda _: self.add_input())
        self.remove = w.Button(description="Remove last")
        self.remove.on_click(lambda _: self.remove_input())
        self.listed = w.HTML()
        self.input_message = form.message("study.input")
        methods = _literal_values(Sampling, "method")
        self.method = w.Dropdown(options=list(methods), value="monte_carlo", description="sampling")
        self.count, count_row = count_entry(form, "study.count", "variants", 2000, 1, MAX_VARIANTS)
        self.levels, levels_row = count_entry(form, "study.levels", "grid levels", 5, 1, 10_000)
        self.seed, seed_row = count_entry(form, "study.seed", "seed", 1, *SEED_RANGE)
        self.sobol = w.Checkbox(description="Sobol indices (SALib)", value=False)
        self.base_count, base_row = count_entry(form, "study.base_count", "Sobol N", 256, 2, 2**20)
        self.box = w.VBox(
            [
                self.input_path,
                w.HBox([self.kind, self.parameters]),
                w.HBox([self.add, self.remove, self.input_message]),
                self.listed,
                w.HBox([self.method, count_row, levels_row]),
                w.HBox([seed_row, self.sobol, base_row]),
            ]
        )

    def refresh_inputs(self, document: dict[str, Any]) -> None:
        """Offer the document's inputs (keeping the one picked while it exists)."""
        options = [(label, path) for path, label in study_inputs(document)]
        current = self.input_path.value
        self.input_path.options = options
        paths = [path for _, path in options]
        self.input_path.value = current if current in paths else (paths[0] if paths else None)
        self._show_parameters()

    def _nominal(self, path: str) -> float:
        value = get_at(self.form.document, parse_path(path))
        return float(value) if isinstance(value, (int, float)) else 0.0

    def _unit(self, path: str, name: str) -> str:
        quantity = None if name in UNITLESS else quantity_of(parse_path(path))
        return f" [{self.form.unit(quantity)}]" if quantity else ""

    def _show_parameters(self) -> None:
        path, kind = self.input_path.value, self.kind.value
        if path is None:
            close_tree(*(entry for entry in self.parameters.children if entry is not self.shape))
            self.parameters.children = ()
            return
        start = _starting_values(kind, self._nominal(path))
        names = _parameters(kind)
        shown = self.parameters.children
        if len(shown) == len(names) and all(
            (entry is self.shape) == (name == "shape")
            for entry, name in zip(shown, names, strict=True)
        ):
            # The same kind of distribution (a unit switch, another input): the entries are
            # shown again in place; no widget model is made or closed.
            for entry, name in zip(shown, names, strict=True):
                if entry is not self.shape:
                    entry.description = name + self._unit(path, name)
                    entry.value = start[name]
            return
        # The entries replaced are closed (the shape choice is kept): else each refresh leaves
        # models in the kernel and on the page.
        close_tree(*(entry for entry in shown if entry is not self.shape))
        entries: list[w.Widget] = []
        for name in _parameters(kind):
            if name == "shape":
                entries.append(self.shape)
                continue
            entries.append(
                w.Text(
                    value=start[name],
                    description=name + self._unit(path, name),
                    layout=sized("300px" if name == "values" else "190px"),
                    style={"description_width": "initial"},
                )
            )
        self.parameters.children = tuple(entries)

    def _read_distribution(self, path: str) -> dict[str, Any]:
        kind = self.kind.value
        quantity = quantity_of(parse_path(path))
        distribution: dict[str, Any] = {"kind": kind}
        for entry in self.parameters.children:
            if entry is self.shape:
                distribution["shape"] = self.shape.value
                continue
            name = entry.description.split(" [")[0]
            unit = None if name in UNITLESS else quantity
            if name == "values":
                parts = [part for part in entry.value.split(",") if part.strip()]
                if not parts:
                    raise InputError("study.input", "give the values, separated by commas")
                distribution[name] = [self.form.read(part, unit, f"study {name}") for part in parts]
            else:
                distribution[name] = self.form.read(entry.value, unit, f"study {name}")
        return distribution

    def add_input(self) -> None:
        """Add the input picked with its distribution (replacing one of the same path)."""
        self.input_message.value = ""
        path = self.input_path.value
        try:
            if path is None:
                raise InputError("study.input", "the case has no input a study may vary")
            entry = {"path": path, "distribution": self._read_distribution(path)}
        except InputError as error:
            self.input_message.value = render_study("stale", str(error))
            return
        self.inputs = [old for old in self.inputs if old["path"] != path] + [entry]
        self._list()

    def remove_input(self) -> None:
        """Remove the input added last."""
        self.inputs = self.inputs[:-1]
        self._list()

    def _list(self) -> None:
        rows = []
        for entry in self.inputs:
            shown = {k: v for k, v in entry["distribution"].items() if k != "kind"}
            words = ", ".join(f"{k} {v}" for k, v in shown.items())
            rows.append(f"{entry['path']}: {entry['distribution']['kind']} ({words})")
        self.listed.value = render_study("inputs_list", rows)

    def plan_document(self) -> dict[str, Any]:
        """The plan's JSON values from the entries.

        Raises
        ------
        InputError
            No input added, or a count, seed or level that is not a whole number in range.
        """
        if not self.inputs:
            raise InputError("study.input", "add at least one input to vary")

        def read(text: str, low: int, high: int, field: str) -> int:
            return read_count(text, low, high, field, self.form.state.units)

        method = self.method.value
        sampling: dict[str, Any] = {
            "method": method,
            "seed": read(self.seed.value, *SEED_RANGE, "study seed"),
        }
        if method == "grid":
            sampling["levels"] = read(self.levels.value, 1, 10_000, "study grid levels")
        else:
            sampling["count"] = read(self.count.value, 1, MAX_VARIANTS, "study variants")
        plan: dict[str, Any] = {"inputs": self.inputs, "sampling": sampling,
                                "outputs": ["governing_utilisation", "check_utilisations"]}  # fmt: skip
        if self.sobol.value:
            base = read(self.base_count.value, 2, 2**20, "study Sobol N")
            plan["sensitivity"] = {"sobol": True, "base_count": base}
        return plan
