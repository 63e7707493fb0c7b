"""Results in a reader's units: the ``solve --json`` document and plain-text tables.

Everything here converts SI results to a :class:`UnitSystem` at the edge; nothing computes
mechanics.
"""

from __future__ import annotations

import itertools
from collections.abc import Callable, Iterator
from typing import Any

import numpy as np

from workbench.case.errors import InputError, quoted
from workbench.case.units import UnitSystem
from workbench.solver.results import Results, support_labels

#: The base quantities a results document reports, with their unit keys.
REPORTED_UNITS = ("length", "torque", "stress", "angle")
#: The station values of each shaft in the document: (key, the quantity of its unit).
STATION_VALUES = (("torque", "torque"), ("angle", "angle"), ("shear_stress", "stress"))
#: The restrained-torsion values of each shaft, written only for a case whose sections warp:
#: (key, the array of :class:`~workbench.solver.warping_statics.WarpingStationValues`, the
#: quantity of its unit and the power of the length unit it is further divided by).
WARPING_VALUES = (
    ("rate_of_twist", "rate", "twist_rate", 0),
    ("twist_second_derivative", "second", "twist_rate", 1),
    ("twist_third_derivative", "third", "twist_rate", 2),
    ("saint_venant_torque", "saint_venant_torque", "torque", 0),
    ("warping_torque", "warping_torque", "torque", 0),
    ("bimoment", "bimoment", "torque", -1),
)
#: How a message names each array of the document.
_WORDS = {"reactions": "reaction", "shear_stress": "shear stress", "x": "station position"}
#: Values written to JSON text at once (bounds the Python floats held while writing).
TEXT_BLOCK = 1 << 16


def _derived(units: UnitSystem, quantity: str, per_length: int) -> Callable[[Any], Any]:
    """SI → the reader's units of ``quantity``/length^per_length (angle/length², torque·length)."""
    scale = units.from_si(1.0, "length") ** per_length
    if per_length == 0:
        return lambda values: units.from_si(values, quantity)
    return lambda values: units.from_si(values, quantity) / scale


def _finite(
    results: Results,
    key: str,
    values: Any,
    units: UnitSystem,
    quantity: str,
    convert: Callable[[Any], Any] | None = None,
) -> None:
    """Raise :class:`InputError` naming the result and quantity of a value JSON cannot hold.

    JSON has no infinity or NaN; a value that is not finite in the reader's units (an overflow
    of a huge load, or of a tiny unit) is refused with its place instead of being written. The
    values are converted a result at a time (a whole converted copy of a million-segment
    result would cost as much memory as the results themselves).
    """
    rows = values.reshape(len(values), -1)
    for row in range(len(rows)):  # a loop over results
        with np.errstate(over="ignore"):  # an overflow is what is looked for
            converted = (
                units.from_si(rows[row], quantity) if convert is None else convert(rows[row])
            )
        finite = np.isfinite(converted)
        if finite.all():
            continue
        column = int(np.argmin(finite))
        name = results.names[row]
        kind = "combination" if row >= results.table.n_cases else "load case"
        if key in ("reactions", "bimoment_reactions"):
            where, path = f"support {column}", f"results[{row}].reactions[{column}]"
        else:
            shaft = int(np.searchsorted(results.mesh.shaft_station_start, column, "right")) - 1
            shaft_id = results.shaft_ids[shaft]
            x = units.from_si(float(results.mesh.station_x[column]), "length")
            where = f"shaft {quoted(shaft_id)} at x = {x:g} {units.label('length')}"
            path = f"results[{row}].shafts.{shaft_id}.{key}"
        msg = (
            f"the {_WORDS.get(key, key)} of {kind} {quoted(name)} at {where} is "
            f"{float(converted[column])} {units.label(quantity)}: JSON cannot hold it (no "
            "document is written)"
        )
        raise InputError(path, msg)


def _array_text(values: Any, encode: Callable[[Any], bytes]) -> Iterator[bytes]:
    """A JSON array of floats, written a block at a time (Python floats for a block only)."""
    if len(values) <= TEXT_BLOCK:
        yield encode(values.tolist())
        return
    yield b"["
    for start in range(0, len(values), TEXT_BLOCK):  # a loop over blocks of values
        text = encode(values[start : start + TEXT_BLOCK].tolist())
        yield (b"," if start else b"") + text[1:-1]
    yield b"]"


def results_json(results: Results, units: UnitSystem | None = None) -> Iterator[bytes]:
    """The ``workbench solve --json`` document as compact UTF-8 JSON text, in pieces.

    Every value is checked finite in the reader's units first, then converted and written a
    block at a time (the same division by the unit's factor as
    :meth:`~workbench.case.units.UnitSystem.from_si`, so each value is the one a value-by-value
    conversion gives), so that a million-segment shaft is never held as Python numbers, nor as
    a converted copy, all at once. msgspec writes each float as the shortest text that reads
    back as the same value (as ``json.dumps`` does, though not always the same text: ``1e-05``
    for ``0.00001``).

    Parameters
    ----------
    results
        Solved results.
    units
        Units for every number (default: the case's).

    Yields
    ------
    bytes
        Consecutive pieces of the document ``{"units": {...}, "results": [{"name",
        "reactions", "shafts": {id: {"x", "torque", "angle", "shear_stress"}}}]}``, load cases
        then combinations, in file order; then ``"warnings": [line, ...]`` when there are any
        (:attr:`~workbench.solver.results.Results.warnings`), and only then. A case whose
        sections warp adds ``"bimoment_reactions"`` (torque·length) after each result's
        reactions and the :data:`WARPING_VALUES` after each shaft's ``shear_stress`` (θ′ in
        angle/length, θ″ in angle/length², θ‴ in angle/length³, torques, bimoment in
        torque·length); no other document changes.

    Raises
    ------
    InputError
        Before the first piece, when a value is not finite in these units (JSON has no
        infinity; msgspec would write ``null``), naming the result, the shaft and the quantity.
    """
    import msgspec  # noqa: PLC0415 - the case loader has loaded it already

    encode = msgspec.json.encode
    units = units or results.units
    _finite(results, "reactions", results.reactions, units, "torque")
    _finite(results, "x", results.mesh.station_x[None], units, "length")
    for key, quantity in STATION_VALUES:
        _finite(results, key, getattr(results, key), units, quantity)
    warping = results.warping
    warping_values = []
    if warping is not None:
        bimoment = _derived(units, "torque", -1)
        _finite(
            results, "bimoment_reactions", warping.bimoment_reactions, units, "torque", bimoment
        )
        for key, name, quantity, power in WARPING_VALUES:
            convert = _derived(units, quantity, power)
            _finite(results, key, getattr(warping, name), units, quantity, convert)
            warping_values.append((key, getattr(warping, name), convert))
    windows = list(itertools.pairwise(results.mesh.shaft_station_start.tolist()))
    station_x = results.mesh.station_x
    yield b'{"units":' + encode({key: getattr(units, key) for key in REPORTED_UNITS})
    yield b',"results":['
    for row, name in enumerate(results.names):
        reactions = units.from_si(results.reactions[row], "torque")
        yield b"," if row else b""
        yield b'{"name":' + encode(name) + b',"reactions":' + encode(reactions.tolist())
        if warping is not None:
            reaction = _derived(units, "torque", -1)(warping.bimoment_reactions[row])
            yield b',"bimoment_reactions":' + encode(reaction.tolist())
        yield b',"shafts":{'
        for number, (shaft_id, (start, end)) in enumerate(
            zip(results.shaft_ids, windows, strict=True)
        ):
            yield (b"," if number else b"") + encode(shaft_id) + b':{"x":'
            yield from _array_text(units.from_si(station_x[start:end], "length"), encode)
            for key, quantity in STATION_VALUES:
                yield b',"' + key.encode() + b'":'
                values = getattr(results, key)[row, start:end]
                yield from _array_text(units.from_si(values, quantity), encode)
            for key, station_array, convert in warping_values:  # only where sections warp
                yield b',"' + key.encode() + b'":'
                yield from _array_text(convert(station_array[row, start:end]), encode)
            yield b"}"
        yield b"}}"
    yield b"]"
    if results.warnings:  # present only when there is one: documents without keep their keys
        yield b',"warnings":' + encode(list(results.warnings))
    yield b"}"


def results_document(results: Results, units: UnitSystem | None = None) -> dict[str, Any]:
    """The ``workbench solve --json`` document as plain values (:func:`results_json`, read back).

    Raises
    ------
    InputError
        When a value is not finite in these units, naming the result, the shaft and the
        quantity.
    """
    import msgspec  # noqa: PLC0415

    document: dict[str, Any] = msgspec.json.decode(b"".join(results_json(results, units)))
    return document


def format_table(headers: list[str], rows: list[list[str]]) -> str:
    """Left-aligned first column, right-aligned numbers, a rule under the header."""
    widths = [
        max(len(str(cell)) for cell in column) for column in zip(headers, *rows, strict=False)
    ]
    lines = []
    for line_number, row in enumerate([headers, *rows]):
        cells = [
            str(cell).ljust(width) if index == 0 else str(cell).rjust(width)
            for index, (cell, width) in enumerate(zip(row, widths, strict=True))
        ]
        lines.append("  ".join(cells).rstrip())
        if line_number == 0:
            lines.append("  ".join("-" * width for width in widths))
    return "\n".join(lines)


def _g(value: float) -> str:
    return f"{value:.5g}"


def results_text(results: Results, units: UnitSystem | None = None) -> str:
    """Readable tables: reactions and, per shaft, the values at every node (left and right)."""
    units = units or results.units
    table = results.table
    out = []
    if results.title:
        out.append(results.title)
        out.append("=" * len(results.title))
    mesh = results.mesh
    warping = results.warping
    bimoment = _derived(units, "torque", -1)
    bimoment_label = f"{units.label('torque')}·{units.label('length')}"
    for result in results:
        kind = "combination" if result.is_combination else "load case"
        out.append(f"\n{kind} {result.name!r}")
        rows = [
            [
                f"{shaft_id} x={_g(units.from_si(x, 'length'))}",
                kind,
                _g(units.from_si(reaction, "torque")),
            ]
            for (shaft_id, x, kind), reaction in zip(
                support_labels(table), result.reactions, strict=True
            )
        ]
        headers = ["support", "kind", f"reaction [{units.label('torque')}]"]
        if warping is not None:  # each restraint's bimoment (0 where warping is free)
            bimoment_reactions = bimoment(warping.bimoment_reactions[results.index(result.name)])
            for row, reaction in zip(rows, bimoment_reactions.tolist(), strict=True):
                row.append(_g(reaction))
            headers.append(f"bimoment [{bimoment_label}]")
        out.append(format_table(headers, rows))
        if len(table.gear_x):
            rows = [
                [
                    f"gears[{number}]",
                    _g(units.from_si(torques[0], "torque")),
                    _g(units.from_si(torques[1], "torque")),
                ]
                for number, torques in enumerate(result.gear_torques)
            ]
            out.append(
                format_table(
                    ["mesh", f"on a [{units.label('torque')}]", f"on b [{units.label('torque')}]"],
                    rows,
                )
            )
        for number, (shaft_id, values) in enumerate(result.shafts.items()):
            window = slice(
                int(mesh.shaft_station_start[number]), int(mesh.shaft_station_start[number + 1])
            )
            local = mesh.station_u[window]
            is_end = mesh.station_is_end[window]
            keep = (local == 0.0) | is_end
            columns = [
                units.from_si(values.x[keep], "length"),
                units.from_si(values.torque[keep], "torque"),
                units.from_si(values.angle[keep], "angle"),
                units.from_si(values.shear_stress[keep], "stress"),
            ]
            headers = [
                f"x [{units.label('length')}]",
                f"torque [{units.label('torque')}]",
                f"angle [{units.label('angle')}]",
                f"shear stress [{units.label('stress')}]",
            ]
            if warping is not None:  # the torque's two parts and the bimoment
                at_result = results.index(result.name)
                columns += [
                    units.from_si(warping.saint_venant_torque[at_result, window][keep], "torque"),
                    units.from_si(warping.warping_torque[at_result, window][keep], "torque"),
                    bimoment(warping.bimoment[at_result, window][keep]),
                ]
                headers += [
                    f"Saint-Venant torque [{units.label('torque')}]",
                    f"warping torque [{units.label('torque')}]",
                    f"bimoment [{bimoment_label}]",
                ]
            rows = [[_g(value) for value in line] for line in zip(*columns, strict=True)]
            out.append(f"\nshaft {shaft_id!r}")
            out.append(format_table(headers, rows))
            peak = int(np.argmax(values.shear_stress))
            out.append(
                f"largest shear stress {_g(units.from_si(values.shear_stress[peak], 'stress'))} "
                f"{units.label('stress')} at x = {_g(units.from_si(values.x[peak], 'length'))} "
                f"{units.label('length')}; largest |angle| "
                f"{_g(units.from_si(np.abs(values.angle).max(), 'angle'))} {units.label('angle')}"
            )
            if warping is not None:  # restrained warping: where the bimoment peaks
                along = warping.bimoment[results.index(result.name), window]
                at = int(np.argmax(np.abs(along)))
                value = bimoment(float(along[at]))
                out.append(
                    f"largest |bimoment| {_g(abs(value))} {bimoment_label} at x = "
                    f"{_g(units.from_si(values.x[at], 'length'))} {units.label('length')}"
                )
    return "\n".join(out) + "\n"
