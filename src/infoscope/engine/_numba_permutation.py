"""Compiled permutation kernel (imported only when a permutation test first runs).

One call permutes many pairs: threads take one pair each; for its pair a thread
shuffles the second column's codes in place (Fisher-Yates), counts the table of the
shuffled pair and scores it, again and again, until it has its budget of shuffles or
enough of them reached the observed score.  No Python runs between two shuffles.

The score of a table is ``sum_ij O_ij ln O_ij``: with both margins fixed by the
shuffle, this is the G statistic up to a constant (G = 2 (S - sum R ln R - sum C ln C
+ N ln N)), so "shuffled score >= observed score" is "shuffled G >= observed G".

Random numbers: SplitMix64 (Steele, Lea & Flood 2014, "Fast splittable pseudorandom
number generators", OOPSLA), one stream per pair, seeded by the caller, so a pair's
p-value does not depend on the thread that ran it or on the other pairs of the call.
Bounded integers by Lemire's (2019) multiply-and-reject method ("Fast random integer
generation in an interval", ACM TOMACS 29(1)), which is exactly uniform.
"""
from __future__ import annotations

import numpy as np
from infoscope._numba import njit, prange, uint64

_GOLDEN = uint64(0x9E3779B97F4A7C15)
_MIX1 = uint64(0xBF58476D1CE4E5B9)
_MIX2 = uint64(0x94D049BB133111EB)
_LOW32 = uint64(0xFFFFFFFF)


@njit(nogil=True, cache=True)
def _next(state):
    # SplitMix64: returns (new state, 64 random bits)
    state = uint64(state + _GOLDEN)
    z = state
    z = uint64((z ^ (z >> uint64(30))) * _MIX1)
    z = uint64((z ^ (z >> uint64(27))) * _MIX2)
    return state, uint64(z ^ (z >> uint64(31)))


@njit(nogil=True, cache=True)
def _below(state, spare, has_spare, s):
    # A uniform integer in [0, s), s < 2**32, by Lemire's (2019) multiply-and-reject
    # method on 32 random bits (exact).  Each 64-bit draw serves two calls: the low
    # half is kept in `spare` for the next one.
    s64 = uint64(s)
    while True:
        if has_spare:
            r = spare
            has_spare = False
        else:
            state, z = _next(state)
            r = z >> uint64(32)
            spare = z & _LOW32
            has_spare = True
        m = r * s64
        low = m & _LOW32
        if low >= s64 or low >= (uint64(4294967296) - s64) % s64:
            return state, spare, has_spare, np.intp(m >> uint64(32))


@njit(nogil=True, cache=True, boundscheck=False)
def _one_pair(x, y, width, cells, observed, budget, stop_after, seed, xlogx):
    n = x.shape[0]
    yy = y.copy()
    table = np.zeros(cells, dtype=np.int32)
    state = uint64(seed)
    spare = uint64(0)
    has_spare = False
    done = 0
    exceed = 0
    while done < budget and exceed < stop_after:
        # Fisher-Yates from the end: once position i has been swapped it is final,
        # so its cell is counted at once (one pass over the rows per shuffle).
        for i in range(n - 1, 0, -1):
            state, spare, has_spare, j = _below(state, spare, has_spare, i + 1)
            t = yy[j]
            yy[j] = yy[i]
            yy[i] = t
            table[np.intp(x[i]) * width + np.intp(t)] += 1
        if n > 0:
            table[np.intp(x[0]) * width + np.intp(yy[0])] += 1
        score = 0.0
        if cells <= n:  # a small table: read every cell, and clear it
            for c in range(cells):
                v = table[c]
                if v > 0:
                    score += xlogx[v]
                    table[c] = 0
        else:  # a large sparse table: visit the non-empty cells through the rows
            for i in range(n):
                c = np.intp(x[i]) * width + np.intp(yy[i])
                v = table[c]
                if v > 0:
                    score += xlogx[v]
                    table[c] = 0
        done += 1
        if score >= observed:
            exceed += 1
    return done, exceed


@njit(parallel=True, nogil=True, cache=True, boundscheck=False)
def permute_pairs(x_all, y_all, offsets, widths, cells, observed, budget, stop_after, seeds, xlogx,
                  done_out, exceed_out):
    """Shuffle-and-count every pair ``p`` (rows ``offsets[p]:offsets[p + 1]``) in parallel.

    ``observed[p]`` is the threshold already lowered by the caller's rounding
    tolerance; ``done_out[p]`` gets the number of shuffles made and ``exceed_out[p]``
    how many scored at least ``observed[p]``; pair ``p`` stops early once
    ``stop_after[p]`` shuffles have.
    """
    for p in prange(offsets.shape[0] - 1):
        lo = offsets[p]
        hi = offsets[p + 1]
        d, e = _one_pair(x_all[lo:hi], y_all[lo:hi], widths[p], cells[p], observed[p], budget[p],
                         stop_after[p], seeds[p], xlogx)
        done_out[p] = d
        exceed_out[p] = e
