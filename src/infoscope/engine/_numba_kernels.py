"""Compiled counting kernels (imported only when the numba back-end first counts).

``cache=True`` stores the machine code beside this file (``__pycache__``), so only the
first process on a machine pays the compile time; ``nogil=True`` lets a caller's other
threads run meanwhile.
"""
from __future__ import annotations

import numpy as np
from numba import njit, prange


@njit(nogil=True, cache=True, boundscheck=False)
def _count_one(a, b, stride, pitch, out):
    # The table of one pair over one chunk: two streamed code columns, and four copies
    # of a small table (row r into copy r % 4, `pitch` cells apart) so that repeated
    # codes in consecutive rows do not serialise on one counter; pitch 0 is one copy.
    m = a.shape[0]
    m4 = m - m % 4
    for r in range(0, m4, 4):
        out[np.intp(a[r]) * stride + np.intp(b[r])] += 1
        out[pitch + np.intp(a[r + 1]) * stride + np.intp(b[r + 1])] += 1
        out[2 * pitch + np.intp(a[r + 2]) * stride + np.intp(b[r + 2])] += 1
        out[3 * pitch + np.intp(a[r + 3]) * stride + np.intp(b[r + 3])] += 1
    for r in range(m4, m):
        out[np.intp(a[r]) * stride + np.intp(b[r])] += 1


@njit(parallel=True, nogil=True, cache=True, boundscheck=False)
def count_pairs(block, first, second, stride, pitch, offset, out):
    """Add the sentinel tables of every pair over ``block`` (columns, rows) into ``out``.

    Threads split the pairs; each pair owns ``out[offset[q]:offset[q + 1]]``, so no
    two threads write the same counter and nothing needs merging.
    """
    for q in prange(first.shape[0]):
        _count_one(block[first[q]], block[second[q]], stride[q], pitch[q], out[offset[q]:offset[q + 1]])


@njit(nogil=True, cache=True, boundscheck=False)
def count_pairs_serial(block, first, second, stride, pitch, offset, out):
    """As :func:`count_pairs` in the calling thread: small chunks, where waking the
    thread pool would cost more than the counting."""
    for q in range(first.shape[0]):
        _count_one(block[first[q]], block[second[q]], stride[q], pitch[q], out[offset[q]:offset[q + 1]])
