"""Scores of many shuffled tables at once: the counting inside the selection test.

``frame/selection.py`` shuffles the target within the strata of the chosen
columns (numpy's generator, so the shuffles are those of the seed) and, for every
shuffle and every candidate, needs ``sum over cells of n ln n`` of the table of
(candidate and strata cell, shuffled target).  :func:`table_scores` counts and
scores all shuffles of one candidate in one call: a compiled kernel
(``_numba_strata``, serial, without the GIL) once numba's kernels are loaded
(:func:`infoscope.engine.counting.numba_ready`, which loads these with the counting
kernels, so nothing compiles on a widget's worker thread), else one ``numpy.bincount`` over
all shuffles.  Both count the same integers; the sums differ only in the order of
floating-point additions (about 1e-13 relative).
"""
from __future__ import annotations

import numpy as np

from infoscope.engine.counting import numba_ready

__all__ = ["table_scores"]


def table_scores(y_rows: np.ndarray, cell_base: np.ndarray, cells: int, lut: np.ndarray, *,
                 rows: np.ndarray | None = None, backend: str = "auto") -> np.ndarray:
    """``sum_c lut[count_c]`` of the table ``cell_base[j] + y_rows[i, rows[j]]`` for each shuffle i.

    Parameters
    ----------
    y_rows : numpy.ndarray of int, shape (b, n)
        Shuffled codes, one shuffle per row.
    cell_base : numpy.ndarray of int64, shape (m,)
        The fixed part of each used row's cell (``m = n``, or ``len(rows)``).
    cells : int
        Number of cells of the table (every ``cell_base + y`` is below it).
    lut : numpy.ndarray of float64
        ``lut[j]`` is the score of a cell with count j (``j ln j``), for j up to m.
    rows : numpy.ndarray of int64, optional
        The columns of ``y_rows`` used (all when None).
    backend : {"auto", "numba", "numpy"}, default="auto"
        ``"auto"``: the compiled kernel when numba's kernels are loaded.

    Returns
    -------
    numpy.ndarray of float64, shape (b,)

    Examples
    --------
    >>> import numpy as np
    >>> from scipy.special import xlogy
    >>> lut = xlogy(np.arange(5.0), np.arange(5.0))
    >>> table_scores(np.array([[0, 0, 1, 1]]), np.zeros(4, dtype=np.int64), 2, lut, backend="numpy")  # 2 * 2 ln 2
    array([2.77258872])
    """
    b = y_rows.shape[0]
    out = np.empty(b, dtype=np.float64)
    if b == 0:
        return out
    if backend == "numba" or (backend == "auto" and numba_ready()):
        from infoscope.engine import _numba_strata

        y = np.ascontiguousarray(y_rows)
        base = np.ascontiguousarray(cell_base, dtype=np.int64)
        if rows is None:
            _numba_strata.score_rows(y, base, int(cells), lut, out)
        else:
            _numba_strata.score_rows_at(y, np.ascontiguousarray(rows, dtype=np.int64), base, int(cells), lut, out)
        return out
    yv = y_rows if rows is None else y_rows[:, rows]
    dtype = np.int32 if b * cells < 2**31 else np.int64
    index = yv.astype(dtype)  # a fresh array: the in-place additions below do not touch y_rows
    index += np.asarray(cell_base).astype(dtype)[None, :]
    index += (np.arange(b, dtype=dtype) * cells)[:, None]
    counts = np.bincount(index.ravel(), minlength=b * cells).reshape(b, cells)
    return lut[counts].sum(axis=-1)
