"""Standard thin-walled open shapes (I, channel, Z, angle, tee) laid out as wall mid-lines.

Each builder takes the overall dimensions a drawing gives, places the walls' mid-line (web on the
y axis) and calls the one general routine :func:`~workbench.solver.open_sections.open_section`.
Dimensions are in SI metres; errors name ``field.<dimension>``.

References
----------
.. [1] P. A. Seaburg and C. J. Carter, *Torsional Analysis of Structural Steel Members*, AISC
   Design Guide 9, 1997, App. C (the shapes' mid-line dimensions; from memory).
"""

from __future__ import annotations

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.solver.open_sections import OpenSectionWarping, open_section, polyline_section


def _require_dimensions(field: str, across: tuple[str, ...], **sizes: float) -> None:
    """Every size positive, and ``across[0]`` larger than the ``across[1]`` across it."""
    for name, value in sizes.items():
        require_positive(f"{field}.{name}", value)
    overall, *inside = across
    thick = sum(sizes[name] for name in inside)
    if sizes[overall] <= thick:
        msg = f"must exceed the walls across it ({quote(thick, 'length')} of {' + '.join(inside)})"
        raise InputError(f"{field}.{overall}", msg)


def _flanged(
    depth: float,
    width: float,
    flange_thickness: float,
    web_thickness: float,
    field: str,
    top_towards: float,
) -> OpenSectionWarping:
    """Web on the y axis, bottom flange towards +x, top flange towards ``top_towards``·x."""
    _require_dimensions(
        field,
        ("depth", "flange_thickness", "flange_thickness"),
        depth=depth,
        width=width,
        flange_thickness=flange_thickness,
        web_thickness=web_thickness,
    )
    top, bottom = depth - flange_thickness / 2.0, flange_thickness / 2.0
    reach = width - web_thickness / 2.0
    points = [(top_towards * reach, top), (0.0, top), (0.0, bottom), (reach, bottom)]
    return polyline_section(points, [flange_thickness, web_thickness, flange_thickness], field)


def i_section(
    depth: float,
    top_width: float,
    bottom_width: float,
    top_thickness: float,
    bottom_thickness: float,
    web_thickness: float,
    field: str = "section",
) -> OpenSectionWarping:
    """I section, doubly or singly symmetric (flanges may differ), web on the y axis.

    Parameters
    ----------
    depth
        Overall depth, outside of flange to outside of flange (m).
    top_width, bottom_width
        Widths of the top and bottom flanges (m).
    top_thickness, bottom_thickness
        Thicknesses of the top and bottom flanges (m).
    web_thickness
        Web thickness (m).
    field
        Field path that error messages name.

    Notes
    -----
    Mid-line: flanges at y = depth − t_top/2 and y = t_bot/2, web between them at x = 0.

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, App. C (I shapes; from memory).
    """
    _require_dimensions(
        field,
        ("depth", "top_thickness", "bottom_thickness"),
        depth=depth,
        top_width=top_width,
        bottom_width=bottom_width,
        top_thickness=top_thickness,
        bottom_thickness=bottom_thickness,
        web_thickness=web_thickness,
    )
    top, bottom = depth - top_thickness / 2.0, bottom_thickness / 2.0
    points = [
        (0.0, top),
        (-top_width / 2.0, top),
        (top_width / 2.0, top),
        (0.0, bottom),
        (-bottom_width / 2.0, bottom),
        (bottom_width / 2.0, bottom),
    ]
    walls = [(0, 1), (0, 2), (0, 3), (3, 4), (3, 5)]
    thicknesses = [top_thickness, top_thickness, web_thickness, bottom_thickness, bottom_thickness]
    return open_section(points, walls, thicknesses, field)


def channel_section(
    depth: float,
    width: float,
    flange_thickness: float,
    web_thickness: float,
    field: str = "section",
) -> OpenSectionWarping:
    """Channel: web on the y axis, both flanges towards +x.

    Parameters
    ----------
    depth
        Overall depth (m).
    width
        Overall flange width, including the web (m).
    flange_thickness, web_thickness
        Thicknesses (m).
    field
        Field path that error messages name.

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, App. C (channels; from memory).
    """
    return _flanged(depth, width, flange_thickness, web_thickness, field, top_towards=1.0)


def z_section(
    depth: float,
    width: float,
    flange_thickness: float,
    web_thickness: float,
    field: str = "section",
) -> OpenSectionWarping:
    """Z section: web on the y axis, top flange towards −x, bottom flange towards +x.

    Parameters are those of :func:`channel_section`.

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, App. C (Z shapes; from memory).
    """
    return _flanged(depth, width, flange_thickness, web_thickness, field, top_towards=-1.0)


def angle_section(
    leg_a: float, leg_b: float, thickness: float, field: str = "section"
) -> OpenSectionWarping:
    """Angle of legs ``leg_a`` (along y) and ``leg_b`` (along x), heel at the origin.

    Parameters
    ----------
    leg_a, leg_b
        Overall leg lengths, heel to toe (m).
    thickness
        Wall thickness of both legs (m).
    field
        Field path that error messages name.

    Notes
    -----
    Both mid-line legs meet at one point, the shear centre, so Cw = 0 in thin-walled theory.

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, ch. 3 (angles and tees: Cw negligible;
       from memory).
    """
    _require_dimensions(
        field, ("leg_a", "thickness"), leg_a=leg_a, leg_b=leg_b, thickness=thickness
    )
    _require_dimensions(field, ("leg_b", "thickness"), leg_b=leg_b, thickness=thickness)
    half = thickness / 2.0
    points = [(half, leg_a), (half, half), (leg_b, half)]
    return polyline_section(points, [thickness, thickness], field)


def tee_section(
    depth: float,
    width: float,
    flange_thickness: float,
    stem_thickness: float,
    field: str = "section",
) -> OpenSectionWarping:
    """Tee: flange along the top, stem down the y axis.

    Parameters
    ----------
    depth
        Overall depth, top of flange to tip of stem (m).
    width
        Flange width (m).
    flange_thickness, stem_thickness
        Thicknesses (m).
    field
        Field path that error messages name.

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, ch. 3 (tees: Cw negligible; from memory).
    """
    _require_dimensions(
        field,
        ("depth", "flange_thickness"),
        depth=depth,
        width=width,
        flange_thickness=flange_thickness,
        stem_thickness=stem_thickness,
    )
    top = depth - flange_thickness / 2.0
    points = [(0.0, top), (-width / 2.0, top), (width / 2.0, top), (0.0, 0.0)]
    walls = [(0, 1), (0, 2), (0, 3)]
    thicknesses = [flange_thickness, flange_thickness, stem_thickness]
    return open_section(points, walls, thicknesses, field)


__all__ = ["angle_section", "channel_section", "i_section", "tee_section", "z_section"]
