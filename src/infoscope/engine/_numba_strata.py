"""Compiled scoring of shuffled tables for the selection test (imported on first use).

For each shuffled copy of a column (one row of ``y_rows``) the kernel counts the
table of the fixed cell of each row (``cell_base``) plus the shuffled symbol and
returns ``sum over cells of lut[count]`` (``lut[j] = j ln j``), the part of the G
statistic that the shuffle changes.  The counts are the integers numpy's
``bincount`` gives; only the order of the final floating-point sum differs.
"""
from __future__ import annotations

import numpy as np
from infoscope._numba import njit

# Serial on purpose: a thread pool's wake-up cost more than it saved on the shared
# two-core machine (7 ms against 2 ms for 40 shuffles of 20,000 rows), and a serial
# kernel releases the GIL without needing the engine's lock around numba's pool.


@njit(nogil=True, cache=True, boundscheck=False)
def score_rows(y_rows, cell_base, cells, lut, out):
    b, n = y_rows.shape
    counts = np.zeros(cells, np.int64)
    for i in range(b):
        counts[:] = 0
        for r in range(n):
            counts[cell_base[r] + y_rows[i, r]] += 1
        s = 0.0
        for c in range(cells):
            s += lut[counts[c]]
        out[i] = s


@njit(nogil=True, cache=True, boundscheck=False)
def score_rows_at(y_rows, idx, cell_base, cells, lut, out):
    b = y_rows.shape[0]
    m = idx.shape[0]
    counts = np.zeros(cells, np.int64)
    for i in range(b):
        counts[:] = 0
        for j in range(m):
            counts[cell_base[j] + y_rows[i, idx[j]]] += 1
        s = 0.0
        for c in range(cells):
            s += lut[counts[c]]
        out[i] = s


def warm() -> None:
    """Compile (or load from numba's cache) both kernels for the codes the selection passes (int64)."""
    y = np.zeros((1, 2), dtype=np.int64)
    base = np.zeros(2, dtype=np.int64)
    lut = np.zeros(3)
    out = np.empty(1)
    score_rows(y, base, 1, lut, out)
    score_rows_at(y, np.zeros(1, dtype=np.int64), base[:1], 1, lut, out)
