"""THE study plan: every key once (msgspec structs), read from JSON with the field named on error.

A plan names the inputs a study varies by their path in the case file, each with a distribution
in the case's own units; how the variants are drawn (``sampling``); and what is recorded of each
variant (``outputs``). The README's plan reference is generated from these structs
(:func:`plan_reference`), so the keys are declared here only.

Distributions (scipy.stats, in the case file's unit of the varied key):

* ``normal`` — ``mean``, ``std``;
* ``lognormal`` — ``median``, ``sigma`` (the standard deviation of the logarithm);
* ``uniform`` — ``low``, ``high``;
* ``triangular`` — ``low``, ``mode``, ``high``;
* ``tolerance`` — ``lower`` and ``upper`` deviations from the case's own value, spread
  ``uniform`` over the band or ``normal`` with ±3 standard deviations on its limits, cut at them;
* ``values`` — one of a list, each equally likely.

References
----------
.. [1] scipy.stats (``norm``, ``lognorm``, ``uniform``, ``triang``, ``truncnorm``) and
   scipy.stats.qmc, SciPy 1.17 reference guide.
"""

from __future__ import annotations

import json
import re
from typing import Annotated, Any, Literal

import msgspec
import msgspec.inspect

from workbench.case.errors import InputError, short

#: Most inputs a plan may vary.
MAX_INPUTS = 100
#: Most variants of one study (also of a full grid).
MAX_VARIANTS = 1_000_000_000
#: Monte Carlo draws come from one random stream per block of this many variants.
BLOCK = 4_096
#: The outputs a plan may ask for (``governing_utilisation`` is always recorded).
OUTPUTS = ("governing_utilisation", "check_utilisations", "reactions", "twists")
#: Outputs refused, with the reason (said in the message, and in the README).
NOT_ON_THE_BATCH_PATH = {
    "first_natural_frequency": (
        "natural frequencies are solved variant by variant (an eigenproblem of each model), "
        "not on the batch path a study runs on"
    ),
}


def _about(description: str, **bounds: Any) -> msgspec.Meta:
    """A key's description (the README's plan reference reads it) and its bounds."""
    return msgspec.Meta(description=description, **bounds)


class _Struct(msgspec.Struct, forbid_unknown_fields=True, frozen=True, tag_field="kind"):
    pass


class Normal(_Struct, frozen=True, tag="normal"):
    """Normal distribution (kind `normal`)."""

    mean: Annotated[float, _about("mean (the key's unit)")]
    std: Annotated[float, _about("standard deviation (the key's unit)", gt=0.0)]


class LogNormal(_Struct, frozen=True, tag="lognormal"):
    """Log-normal distribution (kind `lognormal`)."""

    median: Annotated[float, _about("median (the key's unit)", gt=0.0)]
    sigma: Annotated[float, _about("standard deviation of the natural logarithm", gt=0.0)]


class Uniform(_Struct, frozen=True, tag="uniform"):
    """Uniform distribution (kind `uniform`)."""

    low: Annotated[float, _about("lower end (the key's unit)")]
    high: Annotated[float, _about("upper end (the key's unit), above low")]


class Triangular(_Struct, frozen=True, tag="triangular"):
    """Triangular distribution (kind `triangular`)."""

    low: Annotated[float, _about("lower end (the key's unit)")]
    mode: Annotated[float, _about("most likely value, between low and high")]
    high: Annotated[float, _about("upper end (the key's unit)")]


class Tolerance(_Struct, frozen=True, tag="tolerance"):
    """A tolerance band about the case's own value (kind `tolerance`)."""

    lower: Annotated[float, _about("lower deviation from the case's value (the key's unit)")]
    upper: Annotated[float, _about("upper deviation from the case's value, above lower")]
    shape: Annotated[
        Literal["uniform", "normal"],
        _about(
            "uniform over the band, or normal centred on it with its limits at ±3 standard "
            "deviations, cut at them (common practice, no source)"
        ),
    ] = "uniform"


class Values(_Struct, frozen=True, tag="values"):
    """A list of values (kind `values`)."""

    values: Annotated[
        list[float],
        _about("the values (the key's unit), each equally likely", min_length=1, max_length=10_000),
    ]


Distribution = Normal | LogNormal | Uniform | Triangular | Tolerance | Values


class Input(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """One varied input."""

    path: Annotated[
        str,
        _about(
            "the key's path in the case file, e.g. shafts[0].segments[1].section.diameter, "
            "materials.NAME.yield_strength, supports[1].stiffness, load_cases[0].torques[0].torque",
            min_length=1,
            max_length=300,
        ),
    ]
    distribution: Annotated[
        Distribution, _about("its distribution, told apart by kind (the rows below)")
    ]


class Sampling(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """How the variants are drawn."""

    method: Annotated[
        Literal["monte_carlo", "latin_hypercube", "sobol", "halton", "grid"],
        _about(
            "monte_carlo (independent draws), latin_hypercube, sobol (scrambled; count a power "
            "of two), halton (scrambled), or grid (every combination of the inputs' levels)"
        ),
    ] = "monte_carlo"
    count: (
        Annotated[int, _about("number of variants: required, except for a grid (the product of its levels)", ge=1,
                              le=MAX_VARIANTS)]
        | None
    ) = None  # fmt: skip
    seed: Annotated[int, _about("the random-number seed", ge=0, le=2**63 - 1)] = 0
    levels: Annotated[
        int, _about("grid: values per input (a values input uses its list)", ge=1, le=10_000)
    ] = 5


class Sensitivity(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """Sobol indices of the governing utilisation (SALib)."""

    sobol: Annotated[bool, _about("whether to compute them, on a Saltelli plan of their own")] = (
        False
    )
    base_count: Annotated[
        int,
        _about("N of the Saltelli plan, a power of two (it holds N·(k + 2) variants)", ge=2,
               le=2**20),
    ] = 1024  # fmt: skip


class Plan(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """A study plan."""

    inputs: Annotated[list[Input], _about("the inputs varied", min_length=1, max_length=MAX_INPUTS)]
    sampling: Annotated[Sampling, _about("how the variants are drawn")] = msgspec.field(
        default_factory=Sampling
    )
    outputs: Annotated[
        list[str],
        _about(
            "recorded per variant besides the governing utilisation: check_utilisations (each "
            "check kind's largest), reactions (per result and support), twists (largest absolute "
            "rotation per result and shaft); first_natural_frequency is refused (not on the batch path)",
            max_length=10,
        ),
    ] = msgspec.field(default_factory=lambda: ["governing_utilisation"])
    sensitivity: Annotated[Sensitivity, _about("Sobol indices")] = msgspec.field(
        default_factory=Sensitivity
    )
    worst: Annotated[
        int, _about("how many variants of highest governing utilisation the summary lists", ge=0,
                    le=1000)
    ] = 10  # fmt: skip

    @property
    def count(self) -> int:
        """The number of variants."""
        if self.sampling.method == "grid":
            total = 1
            for entry in self.inputs:
                total *= grid_levels(entry.distribution, self.sampling.levels)
            return total
        assert self.sampling.count is not None  # checked in read_plan
        return self.sampling.count


def grid_levels(distribution: Distribution, levels: int) -> int:
    """How many values a grid takes of one input (a list's own length, else ``levels``)."""
    return len(distribution.values) if isinstance(distribution, Values) else levels


_WHERE = re.compile(r"^(?P<text>.*?)(?: - at `\$(?P<path>[^`]*)`)?$")


def read_plan(data: bytes | str) -> Plan:
    """Decode and check a plan's JSON text.

    Raises
    ------
    InputError
        A key unknown or missing, a value of the wrong type or out of its bounds, a plan of no
        variants, a Sobol count not a power of two, an output not known: one line naming the
        field (``plan.sampling.count``).
    """
    try:
        plan = msgspec.json.decode(data, type=Plan)
    except msgspec.ValidationError as error:
        found = _WHERE.match(str(error))
        assert found is not None  # the pattern matches any text
        where = (found["path"] or "").lstrip(".")
        raise InputError(f"plan.{where}" if where else "plan", found["text"]) from None
    except msgspec.DecodeError as error:
        raise InputError("plan", f"not valid JSON ({short(str(error))})") from None
    _check(plan)
    return plan


def _check(plan: Plan) -> None:
    sampling = plan.sampling
    if sampling.method == "grid":
        if sampling.count is not None and sampling.count != plan.count:
            msg = f"a grid holds {plan.count} variants (the product of its levels), not {sampling.count}"
            raise InputError("plan.sampling.count", msg)
        if plan.count > MAX_VARIANTS:
            raise InputError("plan.sampling.levels", f"the grid holds {plan.count} variants")
    elif sampling.count is None:
        raise InputError("plan.sampling.count", "the number of variants is required")
    if sampling.method == "sobol" and sampling.count is not None:
        count = sampling.count
        if count & (count - 1):
            below, above = 1 << (count.bit_length() - 1), 1 << count.bit_length()
            msg = (
                f"Sobol points come in powers of two: {count} is not one (take {below} or {above})"
            )
            raise InputError("plan.sampling.count", msg)
    base = plan.sensitivity.base_count
    if plan.sensitivity.sobol and base & (base - 1):
        msg = f"must be a power of two for the Saltelli plan, not {base}"
        raise InputError("plan.sensitivity.base_count", msg)
    for number, entry in enumerate(plan.inputs):
        _check_distribution(entry.distribution, f"plan.inputs[{number}].distribution")
    for number, name in enumerate(plan.outputs):
        field = f"plan.outputs[{number}]"
        if name in NOT_ON_THE_BATCH_PATH:
            raise InputError(field, f"{name!r} is not available: {NOT_ON_THE_BATCH_PATH[name]}")
        if name not in OUTPUTS:
            raise InputError(
                field, f"unknown output {short(repr(name))}; choose from {', '.join(OUTPUTS)}"
            )
    paths = [entry.path for entry in plan.inputs]
    for number, path in enumerate(paths):
        if path in paths[:number]:
            raise InputError(f"plan.inputs[{number}].path", f"{short(path)} is varied twice")


def _check_distribution(distribution: Distribution, field: str) -> None:
    def finite(*names: str) -> None:
        for name in names:
            value = getattr(distribution, name)
            if not -1e300 < value < 1e300:
                raise InputError(f"{field}.{name}", f"must be a finite number, not {value!r}")

    if isinstance(distribution, Normal):
        finite("mean", "std")
    elif isinstance(distribution, LogNormal):
        finite("median", "sigma")
    elif isinstance(distribution, Uniform):
        finite("low", "high")
        if not distribution.low < distribution.high:
            raise InputError(f"{field}.high", "must be greater than low")
    elif isinstance(distribution, Triangular):
        finite("low", "mode", "high")
        if not distribution.low <= distribution.mode <= distribution.high:
            raise InputError(f"{field}.mode", "must lie between low and high")
        if not distribution.low < distribution.high:
            raise InputError(f"{field}.high", "must be greater than low")
    elif isinstance(distribution, Tolerance):
        finite("lower", "upper")
        if not distribution.lower < distribution.upper:
            raise InputError(f"{field}.upper", "must be greater than lower")
    else:
        for number, value in enumerate(distribution.values):
            if not -1e300 < value < 1e300:
                raise InputError(
                    f"{field}.values[{number}]", f"must be a finite number, not {value!r}"
                )


BEGIN = "<!-- study plan keys: generated by `python -m workbench.study.reference`; do not edit -->"
END = "<!-- end of the study plan keys -->"


def plan_keys() -> list[tuple[str, str, str]]:
    """Every key of a plan, dotted: (key, its default or "required", description)."""
    rows: list[tuple[str, str, str]] = []

    def walk(struct: Any, prefix: str) -> None:
        info: Any = msgspec.inspect.type_info(struct)
        for field in info.fields:
            name = f"{prefix}{field.encode_name}"
            if field.required:
                default = "required"
            elif field.default is not msgspec.NODEFAULT:
                default = f"`{json.dumps(field.default)}`"
            elif isinstance(made := field.default_factory(), list):
                default = f"`{json.dumps(made)}`"
            else:
                default = "its keys' defaults"
            described = _unwrap(field.type)
            rows.append((name, default, described.extra_json_schema["description"]))
            inner = described.type
            listed = isinstance(inner, msgspec.inspect.ListType)
            inner = getattr(inner.item_type if listed else inner, "cls", None)
            if inner in (Sampling, Sensitivity, Input):
                walk(inner, f"{name}{'[]' if listed else ''}.")
        if struct is Input:
            for kind in (Normal, LogNormal, Uniform, Triangular, Tolerance, Values):
                tag = kind.__struct_config__.tag
                rows.append(
                    (f"{prefix}distribution.kind", "required", f"`{tag}`: {_first_line(kind)}")
                )
                walk(kind, f"{prefix}distribution.")

    walk(Plan, "")
    return list(dict.fromkeys(rows))


def _unwrap(info: Any) -> Any:
    """The described type of a field (an optional one's non-null member)."""
    for option in getattr(info, "types", (info,)):
        if isinstance(option, msgspec.inspect.Metadata):
            return option
    msg = "every plan key carries a description"
    raise AssertionError(msg)


def _first_line(struct: type) -> str:
    return (struct.__doc__ or "").strip().splitlines()[0]


def plan_reference() -> str:
    """The README's plan reference (markers included), generated from the structs."""
    lines = [BEGIN, "", "| key | default | meaning |", "|---|---|---|"]
    lines += [f"| `{name}` | {default} | {text} |" for name, default, text in plan_keys()]
    return "\n".join([*lines, "", END]) + "\n"


def to_builtins(plan: Plan) -> Any:
    """The plan as plain JSON values (for the summary and the record)."""
    return msgspec.to_builtins(plan)
