"""Sections of any shape, by finite elements: a polygon with holes, or the outline of a DXF drawing.

Each is a prismatic :class:`~workbench.solver.sections.Section` in SI metres whose properties
come from :func:`workbench.solver.fe_sections.section_properties` (sectionproperties): the
Saint-Venant torsion constant J and the largest shear stress per unit torque feed the solver
like any other section's; the warping constant Cw and the shear centre are kept for restrained
torsion. The finite-element module, and sectionproperties with it, is imported the first time
such a section is built, never by a case without one.

References
----------
.. [1] sectionproperties 3 documentation, "Theory" (see :mod:`workbench.solver.fe_sections`).
"""

from __future__ import annotations

import functools
import hashlib
import importlib.util
import os
import pathlib
import stat
from dataclasses import dataclass
from typing import TYPE_CHECKING, ClassVar

import numpy as np

from workbench.case.errors import InputError
from workbench.solver.sections import FloatArray, Section

if TYPE_CHECKING:
    from collections.abc import Iterator

    from workbench.solver.fe_sections import FESectionProperties

#: A polygon's points: ((x, y), ...) in metres.
Points = tuple[tuple[float, float], ...]

#: Largest DXF drawing read (bytes): a section's outline is a few kilobytes.
MAX_DRAWING_BYTES = 16 * 2**20


@dataclass(frozen=True)
class FiniteElementSection(Section):
    """Base of the sections analysed by finite elements (prismatic, not circular)."""

    def __post_init__(self) -> None:
        self.properties  # noqa: B018 - analyses (or finds in the cache) now, naming the key
        self._require_constants()

    def _analyse(self) -> FESectionProperties:
        raise NotImplementedError

    @functools.cached_property
    def properties(self) -> FESectionProperties:
        """J, Cw, shear centre, τ/T and the mesh's convergence (:class:`FESectionProperties`)."""
        return self._analyse()

    @property
    def torsion_constant(self) -> float:
        """Saint-Venant torsion constant J (m⁴), within 1 % of the converged mesh's."""
        return self.properties.torsion_constant

    @property
    def shear_stress_per_torque(self) -> float:
        """Largest Saint-Venant shear stress per unit torque (1/m³) at the accepted mesh."""
        return self.properties.shear_stress_per_torque

    @property
    def warping_constant(self) -> float:
        """Warping constant Cw (m⁶) about the shear centre, within 1 % of the converged mesh's."""
        return self.properties.warping_constant

    @property
    def shear_centre(self) -> tuple[float, float]:
        """Shear centre (x, y) in the outline's own coordinates (m)."""
        return self.properties.shear_centre

    @property
    def outer_radius(self) -> float:
        """Half the overall height of the outline (m)."""
        return self.properties.depth / 2.0

    @property
    def polar_moment(self) -> float:
        """Polar moment of area about the centroid, I_x + I_y (m⁴), by the same mesh."""
        return self.properties.polar_moment

    def _dimensions(self) -> Iterator[tuple[str, float, str]]:
        yield self._size_field, self.properties.depth, "length"

    _size_field: ClassVar[str] = "outer"


def _as_array(points: Points) -> FloatArray:
    return np.asarray(points, dtype=float).reshape(-1, 2)


@dataclass(frozen=True)
class PolygonSection(FiniteElementSection):
    """A solid section bounded by a polygon, with polygonal holes.

    Parameters
    ----------
    outer
        The outer boundary's points (x, y) in order, either way round (m).
    holes
        Each hole's boundary points (x, y) in order (m); none by default.
    """

    outer: Points
    holes: tuple[Points, ...] = ()
    shape: ClassVar[str] = "polygon"

    def _analyse(self) -> FESectionProperties:
        from workbench.solver.fe_sections import section_properties  # noqa: PLC0415 - FE only

        return section_properties(_as_array(self.outer), tuple(map(_as_array, self.holes)))


@dataclass(frozen=True)
class DrawingSection(FiniteElementSection):
    """The section outlined in a DXF drawing: one closed outline, with closed holes inside it.

    Parameters
    ----------
    path
        The drawing's path as the case file gives it.
    file
        The drawing's path resolved against the case file's folder.
    scale
        Metres per drawing unit (the case file's unit of length).
    """

    path: str
    file: str
    scale: float
    shape: ClassVar[str] = "dxf"
    #: Keys the builder derives rather than reads: the drawing found, the case's length unit.
    derived_keys: ClassVar[frozenset[str]] = frozenset({"file", "scale"})
    _size_field: ClassVar[str] = "path"

    def _analyse(self) -> FESectionProperties:
        outer, holes = drawing_outline(self.file, self.scale)
        from workbench.solver.fe_sections import section_properties  # noqa: PLC0415 - FE only

        try:
            return section_properties(outer, holes)
        except InputError as error:
            msg = f"the drawing's {error.field.replace('outer', 'outline')} {error.message}"
            raise InputError("path", msg) from None


def drawing_outline(file: str, scale: float) -> tuple[FloatArray, tuple[FloatArray, ...]]:
    """The outer boundary and the holes (m) of the one closed outline in a DXF drawing.

    Kept by the digest of the file's bytes and the scale, so an unchanged drawing is read once.

    Raises
    ------
    InputError
        On ``path``: a file that cannot be read, is not a DXF drawing, or holds no closed
        outline or more than one; also when the DXF reader is not installed.
    """
    try:
        status = os.stat(file)
        if not stat.S_ISREG(status.st_mode):  # a folder, a device, a pipe: never read
            raise InputError("path", "cannot read the drawing: it is not a file")
        if status.st_size > MAX_DRAWING_BYTES:
            msg = f"the drawing is {status.st_size:,} bytes; at most {MAX_DRAWING_BYTES:,} are read"
            raise InputError("path", msg)
        data = pathlib.Path(file).read_bytes()
    except (OSError, ValueError) as error:  # ValueError: a NUL in the path
        reason = getattr(error, "strerror", None) or str(error)
        raise InputError("path", f"cannot read the drawing: {reason}") from None
    digest = hashlib.sha256(data).digest()
    return _outline(digest, file, scale)


@functools.lru_cache(maxsize=64)
def _outline(digest: bytes, file: str, scale: float) -> tuple[FloatArray, tuple[FloatArray, ...]]:
    del digest  # the cache's key: the same bytes give the same outline
    if importlib.util.find_spec("cad_to_shapely") is None:
        msg = "reading a DXF drawing needs the 'dxf' extra: pip install 'workbench[dxf]'"
        raise InputError("path", msg)
    from workbench.solver.fe_sections import read_drawing  # noqa: PLC0415 - FE only

    outer, holes = read_drawing(file)
    scaled = (outer * scale, *(hole * scale for hole in holes))
    for points in scaled:
        points.setflags(write=False)  # shared by every caller of the cache
    return scaled[0], scaled[1:]


__all__ = ["DrawingSection", "FiniteElementSection", "PolygonSection", "drawing_outline"]
