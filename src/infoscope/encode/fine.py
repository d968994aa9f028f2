"""Fine quantile encodings that the usual bin counts nest in: a first answer when bins change.

A float column binned into ``b`` quantile bins has the edges of numpy's "linear"
quantiles at ``numpy.linspace(0, 1, b + 1)`` (duplicates merged,
:func:`infoscope.encode.binning._edges`).  The *fine* encoding here cuts the same
column at the quantiles of every probability any of :data:`NESTED_BIN_COUNTS`
asks for (the union of those ``linspace`` arrays, :func:`fine_probabilities`:
{i / b} for b = 2 .. 16 and b = 32, 95 interior cuts, one of which two ``linspace``
calls round to neighbouring floats: at most 97 fine bins, about 96).  For those
bin counts every edge of the coarse encoding is also an edge of the fine one, so
a coarse bin is a union of whole fine bins, its code a function of the fine code
(:func:`coarse_map`), and any table counted with the fine codes sums exactly to
the table the coarse codes would give.  Other bin counts take each wanted
quantile at the nearest fine probability: the edges move by at most half a fine
bin (1/64 of the rows), a close answer and labelled as one.

Which columns: float64 columns that the session bins by quantiles (kind
``numeric`` with edges) and that hold more distinct values than the bins asked
for (fewer get one bin per value, :func:`infoscope.encode.numeric._value_edges`).
Everything else is left to the ordinary encoder.

The fine quantiles are computed by the same steps as the encoder's
(:func:`infoscope.encode.binning.quantile_ranks` and
:func:`~infoscope.encode.binning.lerp_quantiles` on the exact order statistics), at
the very same float probabilities, so they are the coarse edges bit for bit;
``tests/test_fine.py`` compares merged tables with directly encoded and counted
ones.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from infoscope.encode import binning, order_stats
from infoscope.encode.encoded import MISSING_LABEL, EncodedColumn, codes_dtype

__all__ = ["NESTED_BIN_COUNTS", "FineColumn", "coarse_map", "fine_column", "fine_probabilities"]

#: Bin counts whose quantile edges are all fine edges: merged tables are exact for them.
NESTED_BIN_COUNTS = tuple(range(2, 17)) + (32,)


def fine_probabilities() -> np.ndarray:
    """The probabilities of the fine cuts: every ``numpy.linspace(0, 1, b + 1)`` of :data:`NESTED_BIN_COUNTS`.

    Returns
    -------
    numpy.ndarray of float64
        Sorted, distinct floats from 0.0 to 1.0 (98: 95 interior cuts, one of them
        as two neighbouring floats).

    Examples
    --------
    >>> p = fine_probabilities()
    >>> p.size, float(p[0]), float(p[-1]), bool(np.isin(np.linspace(0, 1, 8), p).all())
    (98, 0.0, 1.0, True)
    """
    return np.unique(np.concatenate([np.linspace(0.0, 1.0, b + 1) for b in NESTED_BIN_COUNTS]))


@dataclass(frozen=True)
class FineColumn:
    """A column's fine encoding and the quantiles it was cut at.

    Attributes
    ----------
    column : EncodedColumn
        The fine encoding (same name, missing policy and row order as the session's).
    quantiles : numpy.ndarray
        The column's quantile at each of :func:`fine_probabilities` (float64).
    edges : numpy.ndarray
        The distinct quantiles: the fine bin edges (``column.edges``).
    n_distinct : int
        Distinct finite values.
    missing_symbol : bool
        Whether the last symbol of ``column`` is the missing one (``missing="category"``).
    """

    column: EncodedColumn
    quantiles: np.ndarray
    edges: np.ndarray
    n_distinct: int
    missing_symbol: bool


def _quantiles(v: np.ndarray, probs: np.ndarray) -> tuple[np.ndarray, int]:
    """numpy's "linear" quantiles of finite ``v`` at ``probs`` and the distinct count, exactly.

    The encoder's own steps: the order statistics by radix selection when the
    compiled kernels are loaded and the column is long, else from a sort.
    """
    prev_i, next_i, gamma = binning.quantile_ranks(v.size, probs)
    k = order_stats.kernels() if v.size >= order_stats.MIN_ROWS else None
    if k is not None:
        summary = order_stats.float_summary(k, v)
        ranks = np.unique(np.concatenate([prev_i, next_i]))
        stats = order_stats.order_statistics(k, v, ranks, summary.lo, summary.hi, summary.hist, summary.buckets)
        a, b = stats[np.searchsorted(ranks, prev_i)], stats[np.searchsorted(ranks, next_i)]
        return binning.lerp_quantiles(a, b, gamma), int(summary.n_distinct)
    s = np.sort(v)
    return binning.lerp_quantiles(s[prev_i], s[next_i], gamma), int(np.count_nonzero(np.diff(s)) + 1)


def fine_column(series: pd.Series, name: str, *, missing: str = "drop") -> FineColumn | None:
    """The fine encoding of a float64 column, or None when it has too few values to cut.

    Parameters
    ----------
    series : pandas.Series
        The values (the rows the session profiles).
    name : str
        Column key.
    missing : {"drop", "category"}
        The session's missing policy (NaN and +-inf are missing, as in the encoder).

    Returns
    -------
    FineColumn or None
        None for a dtype other than float64 or fewer than three distinct finite values.

    Notes
    -----
    The codes follow the encoder's rules (:func:`infoscope.encode.binning.assign_bins`
    on the fine edges; a missing row is the last symbol under ``"category"``, the
    code ``k`` under ``"drop"``), so the engine counts them like any column; the
    labels are the fine intervals.  No flags, no warnings: the session's own
    encoding of the column has said what there is to say.

    Examples
    --------
    >>> fc = fine_column(pd.Series(np.arange(1000.0) ** 1.5), "x")
    >>> fc.column.k, fc.n_distinct
    (97, 1000)
    """
    if series.dtype != np.float64:
        return None
    x = series.to_numpy(dtype=np.float64)
    finite = np.isfinite(x)
    v = np.ascontiguousarray(x[finite])
    if v.size < 3:
        return None
    quantiles, n_distinct = _quantiles(v, fine_probabilities())
    if n_distinct < 3:
        return None
    quantiles = quantiles + 0.0  # -0.0 reads 0.0
    edges = np.unique(quantiles)
    bins = binning.assign_bins(v, edges)
    n_missing = int(x.size - v.size)
    k = int(edges.size - 1)
    labels = list(binning.interval_labels(binning.format_edges(edges)))
    with_symbol = missing == "category" and n_missing > 0
    if with_symbol:
        labels.append(MISSING_LABEL)
    k_all = len(labels)
    codes = np.full(x.size, k, dtype=codes_dtype(k_all))  # k: the missing symbol or the "drop" code
    codes[finite] = bins
    for arr in (codes, quantiles, edges):
        arr.setflags(write=False)
    column = EncodedColumn(name, codes, k_all, tuple(labels), "numeric", int(x.size), n_missing, edges, (),
                           (("missing", missing), ("fine", True)), n_distinct)
    return FineColumn(column, quantiles, edges, n_distinct, with_symbol)


def coarse_map(fine: FineColumn, bins: int) -> tuple[np.ndarray, int, bool]:
    """Coarse symbol of each fine symbol for ``bins`` quantile bins.

    Parameters
    ----------
    fine : FineColumn
    bins : int
        The bin count asked for (at least 2, below the column's distinct values).

    Returns
    -------
    (numpy.ndarray of int64, int, bool)
        The map (one entry per fine symbol, non-decreasing, onto ``0 .. k - 1``),
        the coarse alphabet size ``k`` (the missing symbol included) and whether the
        map is exact (``bins`` in :data:`NESTED_BIN_COUNTS`): then the coarse codes
        are those the encoder gives for ``bins`` bins, row for row.

    Examples
    --------
    >>> fc = fine_column(pd.Series(np.arange(1000.0)), "x")
    >>> m, k, exact = coarse_map(fc, 4)
    >>> k, exact, np.bincount(m).tolist()
    (4, True, [24, 24, 25, 24])
    """
    probs = fine_probabilities()
    want = np.linspace(0.0, 1.0, int(bins) + 1)
    at = np.searchsorted(probs, want)
    at = np.clip(at, 0, probs.size - 1)
    exact = bool(np.array_equal(probs[at], want))
    if not exact:  # the nearest fine probability of each wanted one
        below = np.clip(at - 1, 0, probs.size - 1)
        at = np.where(np.abs(probs[below] - want) <= np.abs(probs[at] - want), below, at)
    coarse = np.unique(fine.quantiles[at])
    inner = coarse[1:-1]
    fine_edges = fine.edges
    # a fine bin [e_j, e_j+1) lies inside the coarse bin of its lower edge
    mapping = np.searchsorted(inner, fine_edges[:-1], side="right").astype(np.int64)
    k = int(coarse.size - 1)
    if fine.missing_symbol:
        mapping = np.append(mapping, k)
        k += 1
    return mapping, k, exact
