"""Shuffle-and-count: the permutation null of many pair tables, counted in batches.

A permutation test of independence of two coded columns shuffles one column against
the other and asks how often the shuffled table scores at least as high as the
observed one.  :func:`shuffle_counts` does that for many pairs in one call: with the
numba back-end one compiled loop per pair (threads over pairs) makes every shuffle,
counts its table and scores it; the numpy back-end shuffles blocks of copies at once
(``Generator.permuted``) and counts them with one ``bincount`` per block.

The score is ``S = sum_ij O_ij ln O_ij`` over the cells of the table; margins are
fixed by a shuffle, so S orders tables exactly as the G statistic does.  Scores are
summed from one lookup table of ``v ln v`` (the caller's observed score must come
from :func:`table_score`, which uses the same lookup), and a shuffled score within
``SCORE_TOLERANCE`` (relative) of the observed one counts as reaching it: tables
that are rearrangements of each other have the same score up to the order of the
additions.

Sequential stopping (Besag & Clifford 1991): a pair stops as soon as
``stop_after`` shuffles have reached its observed score, or when its budget is spent.
"""
from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from infoscope.engine.counting import resolve_backend

__all__ = ["SCORE_TOLERANCE", "score_lookup", "shuffle_counts", "table_score"]

#: Relative tolerance below the observed score that still counts as "at least as large".
SCORE_TOLERANCE = 1e-10

# numpy back-end: about this many int64 cells (copies x rows) per block
_BLOCK_CELLS = 2_000_000


def score_lookup(n: int) -> np.ndarray:
    """``v ln v`` for ``v = 0 .. n`` (0 at v = 0), the terms of every table score."""
    v = np.arange(n + 1, dtype=np.float64)
    out = np.zeros(n + 1)
    out[1:] = v[1:] * np.log(v[1:])
    return out


def table_score(table: np.ndarray, lookup: np.ndarray) -> float:
    """``sum O ln O`` of a count table from ``lookup`` (see :func:`score_lookup`)."""
    flat = np.asarray(table, dtype=np.int64).ravel()
    return float(lookup[flat[flat > 0]].sum())


def _threshold(observed: np.ndarray) -> np.ndarray:
    observed = np.asarray(observed, dtype=np.float64)
    return observed - SCORE_TOLERANCE * np.maximum(1.0, np.abs(observed))


def shuffle_counts(
    xs: Sequence[np.ndarray],
    ys: Sequence[np.ndarray],
    widths: Sequence[int],
    observed: Sequence[float],
    budgets: Sequence[int],
    stop_after,
    seeds: Sequence[int],
    *,
    backend: str = "auto",
) -> tuple[np.ndarray, np.ndarray]:
    """Shuffle ``ys[p]`` against ``xs[p]`` up to ``budgets[p]`` times for every pair p.

    Parameters
    ----------
    xs, ys : sequence of 1-D integer arrays
        The two columns' codes of each pair on the rows where both are present;
        ``xs[p]`` in ``0 .. r_p - 1``, ``ys[p]`` in ``0 .. widths[p] - 1``.
    widths : sequence of int
        Number of column codes ``c_p`` of each pair (the table is ``r_p x c_p``).
    observed : sequence of float
        The observed score of each pair, from :func:`table_score`.
    budgets : sequence of int
        Most shuffles to make for each pair (0 skips the pair).
    stop_after : int or sequence of int
        Stop a pair once this many of its shuffles reached the observed score (one
        number for all pairs, or one per pair).
    seeds : sequence of int
        One seed per pair (a pair's counts depend only on its codes, budget and seed).
    backend : {"auto", "numba", "numpy"}, default="auto"
        ``"auto"`` uses numba when it imports.

    Returns
    -------
    done, exceed : numpy.ndarray of int64
        Shuffles made, and how many scored at least the observed score, per pair.

    References
    ----------
    .. [1] Besag, J., & Clifford, P. (1991). Sequential Monte Carlo p-values.
       Biometrika, 78(2), 301-304.

    Examples
    --------
    >>> import numpy as np
    >>> x = np.repeat([0, 1], 20)
    >>> lookup = score_lookup(40)
    >>> obs = table_score(np.array([[20, 0], [0, 20]]), lookup)
    >>> done, exceed = shuffle_counts([x], [x], [2], [obs], [99], 99, [1], backend="numpy")
    >>> int(done[0]), int(exceed[0])
    (99, 0)
    """
    m = len(xs)
    if not (len(ys) == len(widths) == len(observed) == len(budgets) == len(seeds) == m):
        raise ValueError("shuffle_counts: xs, ys, widths, observed, budgets and seeds must have one entry per pair")
    done = np.zeros(m, dtype=np.int64)
    exceed = np.zeros(m, dtype=np.int64)
    if m == 0:
        return done, exceed
    lengths = np.array([len(x) for x in xs], dtype=np.int64)
    if any(len(y) != n for y, n in zip(ys, lengths)):
        raise ValueError("shuffle_counts: each pair's two code arrays must have the same length")
    threshold = _threshold(observed)
    budgets = np.asarray(budgets, dtype=np.int64)
    widths = np.asarray(widths, dtype=np.int64)
    heights = np.array([int(x.max()) + 1 if len(x) else 1 for x in xs], dtype=np.int64)
    lookup = score_lookup(int(lengths.max()) if m else 0)
    stop_after = np.broadcast_to(np.asarray(stop_after, dtype=np.int64), (m,)).copy()
    if resolve_backend(backend) == "numba":
        from infoscope.engine import _numba_permutation  # numba loads here, on the first test

        offsets = np.concatenate(([0], np.cumsum(lengths)))
        x_all = np.concatenate([np.asarray(x, dtype=np.int32) for x in xs])
        y_all = np.concatenate([np.asarray(y, dtype=np.int32) for y in ys])
        seeds_u = np.array([int(s) & 0xFFFFFFFFFFFFFFFF for s in seeds], dtype=np.uint64)
        _numba_permutation.permute_pairs(
            x_all, y_all, offsets, widths, heights * widths, threshold, budgets, stop_after,
            seeds_u, lookup, done, exceed)
        return done, exceed
    for p in range(m):
        done[p], exceed[p] = _shuffle_numpy(
            np.asarray(xs[p], dtype=np.int64), np.asarray(ys[p], dtype=np.int64), int(widths[p]),
            int(heights[p]), float(threshold[p]), int(budgets[p]), int(stop_after[p]), int(seeds[p]), lookup)
    return done, exceed


def _shuffle_numpy(x, y, width, height, threshold, budget, stop_after, seed, lookup):
    rng = np.random.default_rng(seed)
    n = x.shape[0]
    cells = width * height
    base = x * width
    block = max(1, _BLOCK_CELLS // max(n, cells, 1))
    done = exceed = 0
    while done < budget and exceed < stop_after:
        b = min(block, budget - done)
        shuffled = rng.permuted(np.tile(y, (b, 1)), axis=1)
        index = (base[None, :] + shuffled) + (np.arange(b, dtype=np.int64) * cells)[:, None]
        tables = np.bincount(index.ravel(), minlength=b * cells).reshape(b, cells)
        scores = lookup[tables].sum(axis=1)
        hits = np.cumsum(scores >= threshold)
        need = stop_after - exceed
        reached = np.flatnonzero(hits >= need)
        if reached.size:  # stop at the shuffle that made the count, as the sequential rule says
            used = int(reached[0]) + 1
            return done + used, exceed + need
        done += b
        exceed += int(hits[-1])
    return done, exceed
