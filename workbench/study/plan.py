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

import re
from typing import Annotated, Any, Literal

import msgspec

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

Number = Annotated[float, msgspec.Meta(description="a number in the case file's unit")]
Positive = Annotated[float, msgspec.Meta(gt=0.0, description="a positive number")]


class _Struct(msgspec.Struct, forbid_unknown_fields=True, frozen=True, tag_field="kind"):
    pass


class Normal(_Struct, frozen=True, tag="normal"):
    """Normal distribution: ``mean`` and standard deviation ``std`` (the key's unit)."""

    mean: Number
    std: Positive


class LogNormal(_Struct, frozen=True, tag="lognormal"):
    """Log-normal distribution: ``median`` (the key's unit) and ``sigma`` of the logarithm."""

    median: Positive
    sigma: Positive


class Uniform(_Struct, frozen=True, tag="uniform"):
    """Uniform distribution between ``low`` and ``high`` (the key's unit)."""

    low: Number
    high: Number


class Triangular(_Struct, frozen=True, tag="triangular"):
    """Triangular distribution: ``low``, ``mode``, ``high`` (the key's unit)."""

    low: Number
    mode: Number
    high: Number


class Tolerance(_Struct, frozen=True, tag="tolerance"):
    """A tolerance band: ``lower`` and ``upper`` deviations from the case's value.

    ``shape`` ``"uniform"`` spreads the variants evenly over the band; ``"normal"`` centres a
    normal distribution on the band with its limits at ±3 standard deviations, cut at them
    (common practice, no source).
    """

    lower: Number
    upper: Number
    shape: Literal["uniform", "normal"] = "uniform"


class Values(_Struct, frozen=True, tag="values"):
    """One of a list of ``values`` (the key's unit), each equally likely."""

    values: Annotated[list[float], msgspec.Meta(min_length=1, max_length=10_000)]


Distribution = Normal | LogNormal | Uniform | Triangular | Tolerance | Values


class Input(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """One varied input: its ``path`` in the case file and its ``distribution``."""

    path: Annotated[str, msgspec.Meta(min_length=1, max_length=300)]
    distribution: Distribution


Seed = Annotated[int, msgspec.Meta(ge=0, le=2**63 - 1, description="random-number seed")]


class Sampling(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """How the variants are drawn.

    ``method``: ``monte_carlo`` (independent draws), ``latin_hypercube``, ``sobol`` (scrambled;
    ``count`` a power of two), ``halton`` (scrambled), or ``grid`` (every combination of
    ``levels`` values per input; a ``values`` input uses its own list). ``count``: number of
    variants (a grid's is the product of its levels). ``seed``: the random-number seed.
    """

    method: Literal["monte_carlo", "latin_hypercube", "sobol", "halton", "grid"] = "monte_carlo"
    count: Annotated[int, msgspec.Meta(ge=1, le=MAX_VARIANTS)] | None = None
    seed: Seed = 0
    levels: Annotated[int, msgspec.Meta(ge=1, le=10_000)] = 5


class Sensitivity(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """Sobol indices of the governing utilisation through SALib, on a Saltelli plan of its own.

    ``sobol``: whether to compute them; ``base_count``: N of the plan (a power of two; the plan
    holds N·(k + 2) variants for k inputs).
    """

    sobol: bool = False
    base_count: Annotated[int, msgspec.Meta(ge=2, le=2**20)] = 1024


class Plan(msgspec.Struct, forbid_unknown_fields=True, frozen=True):
    """A study plan: ``inputs``, ``sampling``, ``outputs``, ``sensitivity``, ``worst``.

    ``worst``: how many of the highest governing utilisations the summary lists.
    """

    inputs: Annotated[list[Input], msgspec.Meta(min_length=1, max_length=MAX_INPUTS)]
    sampling: Sampling = msgspec.field(default_factory=Sampling)
    outputs: Annotated[list[str], msgspec.Meta(max_length=10)] = msgspec.field(
        default_factory=lambda: ["governing_utilisation"]
    )
    sensitivity: Sensitivity = msgspec.field(default_factory=Sensitivity)
    worst: Annotated[int, msgspec.Meta(ge=0, le=1000)] = 10

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


def plan_keys() -> list[tuple[str, str]]:
    """Every key of a plan, dotted, with the description from its struct's docstring."""
    rows: list[tuple[str, str]] = []

    def walk(struct: type, prefix: str) -> None:
        for field in msgspec.structs.fields(struct):
            name = f"{prefix}{field.encode_name}"
            rows.append((name, _first_line(struct)))
            if field.type in (Sampling, Sensitivity):
                walk(field.type, f"{name}.")
        if struct is Plan:
            walk(Input, "inputs[].")
            for kind in (Normal, LogNormal, Uniform, Triangular, Tolerance, Values):
                tag = kind.__struct_config__.tag
                for field in msgspec.structs.fields(kind):
                    rows.append(
                        (f"inputs[].distribution.{field.encode_name} ({tag})", _first_line(kind))
                    )

    walk(Plan, "")
    return rows


def _first_line(struct: type) -> str:
    return (struct.__doc__ or "").strip().splitlines()[0]


def plan_reference() -> str:
    """The README's table of plan keys, generated from the structs."""
    lines = ["| key | meaning |", "|---|---|"]
    lines += [f"| `{name}` | {text} |" for name, text in plan_keys()]
    return "\n".join(lines) + "\n"


def to_builtins(plan: Plan) -> Any:
    """The plan as plain JSON values (for the summary and the record)."""
    return msgspec.to_builtins(plan)
