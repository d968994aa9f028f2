"""Compiled counting kernels (imported only when the numba back-end first counts).

``cache=True`` stores the machine code beside this file (``__pycache__``), so only the
first process on a machine pays the compile time; ``nogil=True`` lets a caller's other
threads run meanwhile.
"""
from __future__ import annotations

import numpy as np
from numba import njit, prange


@njit(nogil=True, cache=True, boundscheck=False)
def _count_one(a, b, stride, out):
    # The table of one pair over one chunk: two streamed code columns, one small
    # table (at most (64 + 1)^2 cells for the usual folded columns) that stays in L1.
    for r in range(a.shape[0]):
        out[np.intp(a[r]) * stride + np.intp(b[r])] += 1


@njit(parallel=True, nogil=True, cache=True, boundscheck=False)
def count_pairs(block, first, second, stride, offset, out):
    """Add the sentinel tables of every pair over ``block`` (columns, rows) into ``out``."""
    for q in prange(first.shape[0]):
        _count_one(block[first[q]], block[second[q]], stride[q], out[offset[q]:offset[q + 1]])


@njit(nogil=True, cache=True, boundscheck=False)
def count_pairs_serial(block, first, second, stride, offset, out):
    """As :func:`count_pairs` in the calling thread: small chunks, where waking the
    thread pool would cost more than the counting."""
    for q in range(first.shape[0]):
        _count_one(block[first[q]], block[second[q]], stride[q], out[offset[q]:offset[q + 1]])
