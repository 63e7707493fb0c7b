"""The governing utilisation's histogram and cumulative fraction, read from a study's rows.

Read a row group at a time (one per chunk), so a study of any size is drawn in flat memory: a
first pass finds the extent of the valid, finite values (and holds the limit, 1), a second
counts them into equal bins. The cumulative fraction at each bin's upper edge is the empirical
distribution function there.

References
----------
.. [1] numpy.histogram, NumPy 2.x reference guide (equal bins, the last one closed).
"""

from __future__ import annotations

import os
from dataclasses import dataclass

import numpy as np
import pyarrow.parquet as pq

#: Bins of the histogram.
BINS = 40


@dataclass(frozen=True)
class UtilisationHistogram:
    """Counts of the valid variants' governing utilisation in equal bins.

    Attributes
    ----------
    edges
        (bins + 1,) the bins' edges (utilisation, dimensionless).
    counts
        (bins,) valid variants in each bin.
    cumulative
        (bins,) fraction of the valid variants at or below each bin's upper edge.
    variants
        Valid variants counted (finite utilisation).
    """

    edges: np.ndarray
    counts: np.ndarray
    cumulative: np.ndarray
    variants: int


def _valid_values(source: pq.ParquetFile, group: int) -> np.ndarray:
    table = source.read_row_group(group, columns=["valid", "governing_utilisation"])
    valid = table.column("valid").to_numpy(zero_copy_only=False)
    values = table.column("governing_utilisation").to_numpy(zero_copy_only=False)[valid]
    return values[np.isfinite(values)]


def utilisation_histogram(path: str | os.PathLike[str], bins: int = BINS) -> UtilisationHistogram:
    """The histogram of a study's parquet file (rows written by the engine)."""
    source = pq.ParquetFile(path)
    low, high = 1.0, 1.0  # the limit always on the chart
    for group in range(source.num_row_groups):
        values = _valid_values(source, group)
        if len(values):
            low, high = min(low, float(values.min())), max(high, float(values.max()))
    if high - low <= 0.0:
        low, high = low - 0.5, high + 0.5
    edges = np.linspace(low, high, bins + 1)
    counts = np.zeros(bins, dtype=np.int64)
    for group in range(source.num_row_groups):
        counts += np.histogram(_valid_values(source, group), bins=edges)[0]
    variants = int(counts.sum())
    cumulative = np.cumsum(counts) / variants if variants else np.zeros(bins)
    return UtilisationHistogram(edges, counts, cumulative, variants)
