"""Results of a static solution: every load case and combination along every shaft.

Arrays have one row per result (load cases first, in model order, then combinations) and one
column per mesh station; the per-shaft, per-result views and the tables users take away are
built from them on demand. Results describe their case by its columns (the solved
:class:`~workbench.solver.columns.CaseTable`), so a case solved straight from its file never
builds one object per segment; the :class:`~workbench.solver.model.Model` is built only when a
reader asks for it.
"""

from __future__ import annotations

import functools
from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.case.errors import InputError, listing, quoted
from workbench.case.units import SI, UnitSystem, display_units
from workbench.solver.columns import CaseTable
from workbench.solver.mesh import Mesh
from workbench.solver.sections import FloatArray
from workbench.solver.soundness import rotation_warning
from workbench.solver.warping_statics import WarpingStationValues
from workbench.solver.warping_supports import unstated_restraint_warning

if TYPE_CHECKING:
    from workbench.solver.model import Model


@dataclass(frozen=True)
class ShaftResult:
    """Results along one shaft for one load case or combination, at the mesh stations.

    At a point where a value jumps (a point torque, a support, a gear, a change of section) the
    station x appears twice: the value just left, then just right.

    Attributes
    ----------
    x
        Station positions along the shaft (m).
    torque
        Internal torque T(x) (N·m): the torque on the cut face whose outward normal is +x.
    angle
        Angle of twist θ(x) (rad), the rotation of the section.
    shear_stress
        Largest shear-stress magnitude over the section (Pa), over all layers.
    """

    x: FloatArray
    torque: FloatArray
    angle: FloatArray
    shear_stress: FloatArray


@dataclass(frozen=True)
class LoadResult:
    """Every result of one load case or combination.

    Attributes
    ----------
    name
        The load case's or combination's name.
    is_combination
        Whether it is a combination.
    reactions
        Torque each support exerts on its shaft (N·m), in model order.
    gear_torques
        (n_gears, 2): torque the mesh exerts on the shaft of gear a and of gear b (N·m).
    shafts
        Results along each shaft, by shaft id.
    """

    name: str
    is_combination: bool
    reactions: FloatArray
    gear_torques: FloatArray
    shafts: Mapping[str, ShaftResult]


@dataclass(frozen=True)
class Envelope:
    """Least and greatest values over all load cases and combinations, station by station.

    Attributes
    ----------
    x
        Stations (m).
    torque_min, torque_max
        Internal torque bounds (N·m).
    angle_min, angle_max
        Rotation bounds (rad).
    shear_stress_max
        Largest shear stress (Pa).
    """

    x: FloatArray
    torque_min: FloatArray
    torque_max: FloatArray
    angle_min: FloatArray
    angle_max: FloatArray
    shear_stress_max: FloatArray


@dataclass(frozen=True)
class Results:
    """The solution of a model: every load case, then every combination.

    Arrays have one row per result (load cases first, in model order, then combinations) and one
    column per station; :meth:`__getitem__` gives a per-result view.

    Attributes
    ----------
    table
        The system solved, as columns (shaft ids, supports, gears, load-case names).
    mesh
        Its mesh.
    names
        Result names in order.
    reactions
        (n_results, n_supports) support torques (N·m).
    gear_torques
        (n_results, n_gears, 2) mesh torques on gear a's and gear b's shaft (N·m).
    torque, angle, shear_stress
        (n_results, n_stations) internal torque (N·m), rotation (rad), peak shear stress (Pa).
    node_angle
        (n_results, n_nodes) rotation at the mesh nodes (rad).
    units
        The units the case was written in, to report it back.
    title
        The case's title.
    source
        The model solved, or a function that builds it (called once, when :attr:`model` is
        first read).
    warping
        Where some section warps (restrained torsion): θ′, θ″, θ‴, the Saint-Venant and warping
        torques and the bimoment, each (n_results, n_stations), and the bimoment reactions
        (n_results, n_supports) (:class:`~workbench.solver.warping_statics.WarpingStationValues`
        without its variant axis); ``None`` for a case in Saint-Venant torsion only.
    """

    table: CaseTable
    mesh: Mesh
    names: tuple[str, ...]
    reactions: FloatArray
    gear_torques: FloatArray
    torque: FloatArray
    angle: FloatArray
    shear_stress: FloatArray
    node_angle: FloatArray
    units: UnitSystem = SI
    title: str = ""
    source: Model | Callable[[], Model] | None = field(default=None, repr=False, compare=False)
    warping: WarpingStationValues | None = None

    @functools.cached_property
    def model(self) -> Model:
        """The model solved (built from the case file on first use when solved from columns)."""
        source = self.source
        if source is None:
            msg = "these results were made without a model"
            raise TypeError(msg)
        return source() if callable(source) else source

    @functools.cached_property
    def warnings(self) -> tuple[str, ...]:
        """Cautions on results that are otherwise reported: one line each, in the case's units.

        Rotations beyond :data:`~workbench.solver.soundness.ROTATION_LIMIT` (1 rad) are outside
        the small-rotation theory of the solution; an open section that warps at a fixed
        support stating no ``warping`` is taken as free to warp there
        (:data:`~workbench.solver.warping_supports.UNSTATED_RESTRAINT`).
        """
        token = display_units.set(self.units)
        try:
            rotation = rotation_warning(
                self.angle,
                self.mesh.element_shaft[self.mesh.station_element],
                self.mesh.station_x,
                self.table,
                self.names,
            )
        finally:
            display_units.reset(token)
        found = (rotation, unstated_restraint_warning(self.table))
        return tuple(warning for warning in found if warning is not None)

    @property
    def shaft_ids(self) -> tuple[str, ...]:
        """The shafts' ids, in order."""
        return self.table.segments.shaft_ids

    def shaft_number(self, shaft_id: str) -> int:
        """The index of the shaft with this id."""
        return self.shaft_ids.index(shaft_id)

    def index(self, name: str) -> int:
        """Row of the named load case or combination."""
        try:
            return self.names.index(name)
        except ValueError:
            msg = f"unknown load case or combination {quoted(name)}; known: {listing(self.names)}"
            raise InputError("result", msg) from None

    def __getitem__(self, name: str) -> LoadResult:
        row = self.index(name)
        shafts = {}
        for number, shaft_id in enumerate(self.shaft_ids):
            window = self._window(number)
            shafts[shaft_id] = ShaftResult(
                x=self.mesh.station_x[window],
                torque=self.torque[row, window],
                angle=self.angle[row, window],
                shear_stress=self.shear_stress[row, window],
            )
        return LoadResult(
            name=name,
            is_combination=row >= self.table.n_cases,
            reactions=self.reactions[row],
            gear_torques=self.gear_torques[row],
            shafts=shafts,
        )

    def __iter__(self) -> Iterator[LoadResult]:
        return (self[name] for name in self.names)

    def __len__(self) -> int:
        return len(self.names)

    def _window(self, shaft_number: int) -> slice:
        starts = self.mesh.shaft_station_start
        return slice(int(starts[shaft_number]), int(starts[shaft_number + 1]))

    def envelope(self, shaft_id: str) -> Envelope:
        """Bounds over all results along one shaft."""
        window = self._window(self.shaft_number(shaft_id))
        return Envelope(
            x=self.mesh.station_x[window],
            torque_min=self.torque[:, window].min(axis=0),
            torque_max=self.torque[:, window].max(axis=0),
            angle_min=self.angle[:, window].min(axis=0),
            angle_max=self.angle[:, window].max(axis=0),
            shear_stress_max=self.shear_stress[:, window].max(axis=0),
        )

    def to_frame(self) -> Any:
        """All station results as a long pandas DataFrame (SI units).

        Columns: ``result``, ``shaft``, ``x``, ``torque``, ``angle``, ``shear_stress``.
        """
        import pandas as pd  # noqa: PLC0415 - tables are an edge; the solver core stays light

        shaft_of_station = self.mesh.element_shaft[self.mesh.station_element]
        shaft_ids = np.array(self.shaft_ids, dtype=object)
        rows = len(self.names)
        return pd.DataFrame(
            {
                "result": np.repeat(np.array(self.names, dtype=object), len(shaft_of_station)),
                "shaft": np.tile(shaft_ids[shaft_of_station], rows),
                "x": np.tile(self.mesh.station_x, rows),
                "torque": self.torque.ravel(),
                "angle": self.angle.ravel(),
                "shear_stress": self.shear_stress.ravel(),
            }
        )

    def reactions_frame(self) -> Any:
        """Support reactions (N·m) as a DataFrame: one row per result, one column per support."""
        import pandas as pd  # noqa: PLC0415

        columns = [
            f"{shaft_id}@{x:g} m ({kind})" for shaft_id, x, kind in support_labels(self.table)
        ]
        return pd.DataFrame(self.reactions, index=list(self.names), columns=columns)


def support_labels(table: CaseTable) -> list[tuple[str, float, str]]:
    """(shaft id, x (m), kind) of every support of a table, in order."""
    shaft_ids = table.segments.shaft_ids
    return [
        (shaft_ids[shaft], x, "fixed" if fixed else "spring")
        for shaft, x, fixed in zip(
            table.support_shaft.tolist(),
            table.support_x.tolist(),
            table.support_fixed.tolist(),
            strict=True,
        )
    ]


__all__ = ["Envelope", "LoadResult", "Results", "ShaftResult", "support_labels"]
