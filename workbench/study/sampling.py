"""The variants' input values: distributions (scipy.stats) and sampling designs (scipy.stats.qmc).

Every design gives the same rows whatever the chunks it is cut into:

* Monte Carlo: variant v is drawn from the random stream of its block, v // :data:`BLOCK`;
  block b's stream is ``numpy.random.SeedSequence(seed).spawn(...)[b]`` (built directly as
  ``SeedSequence(seed, spawn_key=(b,))``, the same sequence), so a chunk of whole blocks draws
  exactly its own variants.
* Latin hypercube, Sobol and Halton: the design is generated once, for every variant, on the
  unit hypercube (:func:`unit_design`); a chunk is given its rows, mapped through each input's
  inverse distribution function (:func:`from_unit`).
* Grid: variant v is the v-th combination of every input's levels (last input fastest).

References
----------
.. [1] scipy.stats and scipy.stats.qmc (``LatinHypercube``, ``Sobol``, ``Halton``), SciPy 1.17
   reference guide; numpy.random ``SeedSequence``, NumPy 2 reference guide ("Parallel random
   number generation").
.. [2] M. D. McKay, R. J. Beckman and W. J. Conover, "A comparison of three methods for
   selecting values of input variables in the analysis of output from a computer code",
   *Technometrics* 21(2), 1979 (Latin hypercube sampling).
"""

from __future__ import annotations

from typing import Any

import numpy as np
from scipy import stats
from scipy.stats import qmc

from workbench.solver.sections import FloatArray
from workbench.study.plan import (
    BLOCK,
    Distribution,
    LogNormal,
    Normal,
    Plan,
    Tolerance,
    Triangular,
    Uniform,
    Values,
    grid_levels,
)

#: The band of a tolerance's normal shape: its limits at ± this many standard deviations
#: (common practice, no source).
TOLERANCE_SIGMAS = 3.0


def frozen(distribution: Distribution, nominal: float) -> Any:
    """The scipy.stats frozen distribution of a continuous input (the case's units).

    Parameters
    ----------
    distribution
        The plan's distribution (not :class:`Values`).
    nominal
        The case's own value of the input (its unit), the centre a tolerance is measured from.
    """
    if isinstance(distribution, Normal):
        return stats.norm(distribution.mean, distribution.std)
    if isinstance(distribution, LogNormal):
        return stats.lognorm(distribution.sigma, scale=distribution.median)
    if isinstance(distribution, Uniform):
        return stats.uniform(distribution.low, distribution.high - distribution.low)
    if isinstance(distribution, Triangular):
        width = distribution.high - distribution.low
        return stats.triang((distribution.mode - distribution.low) / width, distribution.low, width)
    assert isinstance(distribution, Tolerance)
    low, high = nominal + distribution.lower, nominal + distribution.upper
    if distribution.shape == "uniform":
        return stats.uniform(low, high - low)
    sigma = (high - low) / (2.0 * TOLERANCE_SIGMAS)
    return stats.truncnorm(-TOLERANCE_SIGMAS, TOLERANCE_SIGMAS, (low + high) / 2.0, sigma)


def from_unit(distribution: Distribution, nominal: float, unit: FloatArray) -> FloatArray:
    """Values of an input at points of the unit interval (inverse distribution function).

    A list of values takes the ⌊u·n⌋-th value.
    """
    if isinstance(distribution, Values):
        values = np.asarray(distribution.values, dtype=float)
        index = np.minimum((unit * len(values)).astype(np.intp), len(values) - 1)
        return values[index]
    found: FloatArray = frozen(distribution, nominal).ppf(unit)
    return found


def monte_carlo(plan: Plan, nominals: FloatArray, start: int, stop: int) -> FloatArray:
    """(stop − start, k) input values of variants [start, stop), Monte Carlo, block by block.

    ``start`` is a multiple of :data:`BLOCK`. Each block draws its inputs in the plan's order
    from its own stream, so a variant's values do not depend on the chunk that holds it.
    """
    values = np.empty((stop - start, len(plan.inputs)))
    for first in range(start, stop, BLOCK):  # blocks of 4,096 variants: a handful per chunk
        rng = np.random.default_rng(
            np.random.SeedSequence(plan.sampling.seed, spawn_key=(first // BLOCK,))
        )
        size = min(first + BLOCK, plan.count) - first
        rows = slice(first - start, first - start + size)
        for number, entry in enumerate(plan.inputs):  # inputs: a few, not variants
            distribution = entry.distribution
            if isinstance(distribution, Values):
                picks = rng.integers(len(distribution.values), size=size)
                values[rows, number] = np.asarray(distribution.values, dtype=float)[picks]
            else:
                values[rows, number] = frozen(distribution, nominals[number]).rvs(
                    size=size, random_state=rng
                )
    return values[: min(stop, plan.count) - start]


def unit_design(plan: Plan) -> FloatArray | None:
    """(count, k) the global design on the unit hypercube, or ``None`` for Monte Carlo and grid."""
    method, dimensions = plan.sampling.method, len(plan.inputs)
    rng = np.random.default_rng(plan.sampling.seed)
    if method == "latin_hypercube":
        return qmc.LatinHypercube(dimensions, rng=rng).random(plan.count)
    if method == "sobol":
        power = plan.count.bit_length() - 1  # a power of two (read_plan)
        return qmc.Sobol(dimensions, rng=rng).random_base2(power)
    if method == "halton":
        return qmc.Halton(dimensions, rng=rng).random(plan.count)
    return None


def grid(plan: Plan, nominals: FloatArray, start: int, stop: int) -> FloatArray:
    """(stop − start, k) the grid's variants [start, stop): every combination of the levels.

    A list of values uses its own values; any other distribution takes ``levels`` values at the
    middle quantiles (i + ½)/levels.
    """
    counts = [grid_levels(entry.distribution, plan.sampling.levels) for entry in plan.inputs]
    index = np.unravel_index(np.arange(start, stop), counts)
    values = np.empty((stop - start, len(plan.inputs)))
    for number, entry in enumerate(plan.inputs):  # inputs, not variants
        middle = (np.arange(counts[number]) + 0.5) / counts[number]
        levels = from_unit(entry.distribution, nominals[number], middle)
        if isinstance(entry.distribution, Values):
            levels = np.asarray(entry.distribution.values, dtype=float)
        values[:, number] = levels[index[number]]
    return values


def input_values(
    plan: Plan, nominals: FloatArray, start: int, stop: int, unit: FloatArray | None
) -> FloatArray:
    """(stop − start, k) input values (the case's units) of variants [start, stop).

    Parameters
    ----------
    plan
        The plan.
    nominals
        (k,) the case's own value of each input (its unit).
    start, stop
        The variants of the chunk.
    unit
        (stop − start, k) the chunk's rows of :func:`unit_design` for a global design (or of a
        Saltelli plan); ``None`` for Monte Carlo and grid.
    """
    if unit is not None:
        values = np.empty(unit.shape)
        for number, entry in enumerate(plan.inputs):
            values[:, number] = from_unit(entry.distribution, nominals[number], unit[:, number])
        return values
    if plan.sampling.method == "grid":
        return grid(plan, nominals, start, stop)
    return monte_carlo(plan, nominals, start, stop)
