"""Sum a count table's rows and columns into coarser symbols (fine tables into the bins asked for).

A table counted with fine codes becomes the table of coarse codes ``c = map[f]``
by adding the rows (and columns) that share a coarse symbol: counting is linear,
so when the coarse codes of every row are the map of its fine codes, the merged
table equals the table counted directly from the coarse codes (the tests compare
with ``pandas.crosstab`` of both codes).
"""
from __future__ import annotations

import numpy as np

__all__ = ["group_starts", "merge_marginal", "merge_table"]


def group_starts(mapping, k: int) -> np.ndarray:
    """Where each coarse symbol's run of fine symbols starts (checked once, reused per table).

    Parameters
    ----------
    mapping : array_like of int
        Coarse symbol of each fine symbol: non-decreasing and onto ``0 .. k - 1``.
    k : int

    Returns
    -------
    numpy.ndarray of intp
        The ``numpy.add.reduceat`` indices.

    Examples
    --------
    >>> group_starts([0, 0, 1, 2, 2], 3).tolist()
    [0, 2, 3]
    """
    mapping = np.asarray(mapping, dtype=np.int64)
    if mapping.ndim != 1 or mapping.size == 0:
        raise ValueError("a symbol map must be a non-empty 1-D array")
    if mapping[0] != 0 or mapping[-1] != k - 1 or np.any(np.diff(mapping) < 0) or np.any(np.diff(mapping) > 1):
        raise ValueError(f"a symbol map must be non-decreasing and onto 0..{k - 1}")
    return np.flatnonzero(np.concatenate(([True], np.diff(mapping) != 0)))


def merge_table(table, map_rows=None, map_cols=None, k_rows=None, k_cols=None) -> np.ndarray:
    """The table of coarse symbols: rows (columns) with the same coarse symbol added.

    Parameters
    ----------
    table : array_like of int, shape (r, c)
        Counts of fine symbols.
    map_rows, map_cols : array_like of int, optional
        Coarse symbol of each fine row (column): non-decreasing and onto
        ``0 .. k - 1`` (bins merged in order). None keeps that axis.
    k_rows, k_cols : int, optional
        Coarse alphabet sizes (needed with a map).

    Returns
    -------
    numpy.ndarray of int64, shape (k_rows, k_cols)

    Examples
    --------
    >>> merge_table([[1, 2, 3], [4, 5, 6]], None, [0, 0, 1], 2, 2).tolist()
    [[3, 3], [9, 6]]
    """
    t = np.asarray(table, dtype=np.int64)
    if t.ndim != 2:
        raise ValueError(f"a count table must be 2-D, got shape {t.shape}")
    if map_rows is not None:
        if len(map_rows) != t.shape[0]:
            raise ValueError(f"the row map has {len(map_rows)} entries for {t.shape[0]} rows")
        t = np.add.reduceat(t, group_starts(map_rows, int(k_rows)), axis=0)
    if map_cols is not None:
        if len(map_cols) != t.shape[1]:
            raise ValueError(f"the column map has {len(map_cols)} entries for {t.shape[1]} columns")
        t = np.add.reduceat(t, group_starts(map_cols, int(k_cols)), axis=1)
    return t


def merge_marginal(counts, mapping, k: int) -> np.ndarray:
    """Counts of fine symbols added into their coarse symbols.

    Parameters
    ----------
    counts : array_like of int, shape (r,)
    mapping : array_like of int, shape (r,)
        As for :func:`merge_table`.
    k : int

    Returns
    -------
    numpy.ndarray of int64, shape (k,)

    Examples
    --------
    >>> merge_marginal([1, 2, 3], [0, 1, 1], 2).tolist()
    [1, 5]
    """
    c = np.asarray(counts, dtype=np.int64)
    if len(mapping) != c.size:
        raise ValueError(f"the map has {len(mapping)} entries for {c.size} symbols")
    return np.add.reduceat(c, group_starts(mapping, int(k)))
