"""Compiled kernels of the numeric encoder (imported only through :mod:`infoscope.encode.order_stats`).

Two one-pass kernels over the finite values of a float column:

* :func:`float_facts` counts the distinct values with open-addressing hash sets
  of their bit patterns, part by part (``-0.0`` counted as ``0.0``, as ``numpy.unique`` does) and
  tells whether every value is a whole number;
* :func:`bucket_counts` and :func:`gather_buckets` are the two passes of a radix
  selection: values are put into 2**16 buckets by their order-preserving integer
  key (so the buckets are in value order), and only the buckets that hold a wanted
  rank are copied out, for an exact selection (``numpy.partition``) among a few
  hundred values.

``cache=True`` stores the machine code beside this file; ``nogil=True`` lets the
encoder's worker threads run them side by side.
"""
from __future__ import annotations

import numpy as np
from infoscope._numba import njit

_SIGN = np.uint64(1) << np.uint64(63)
_NEG_ZERO = np.uint64(1) << np.uint64(63)


@njit(nogil=True, cache=True, boundscheck=False, inline="always")
def _normal_bits(b):
    return np.uint64(0) if b == _NEG_ZERO else b


@njit(nogil=True, cache=True, boundscheck=False, inline="always")
def _key(b):
    # order-preserving: negative floats have every bit flipped, others the sign bit set
    b = _normal_bits(b)
    if b & _SIGN:
        return ~b
    return b | _SIGN


@njit(nogil=True, cache=True, boundscheck=False, inline="always")
def _mix(b):
    # splitmix64's finaliser: every input bit reaches the top bits the slot is taken from
    b = (b ^ (b >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
    b = (b ^ (b >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
    return b ^ (b >> np.uint64(31))


@njit(nogil=True, cache=True, boundscheck=False)
def float_facts(values, bits, part_bits, kmin, shift, n_buckets):
    """(distinct values, every value whole, bucket counts) of finite float64 ``values``.

    ``bits`` is their uint64 view.  The distinct count: the hashes of the bit
    patterns (splitmix64's finaliser, a bijection, so equal hashes are equal
    values) are split into ``2**part_bits`` parts by their top bits (balanced
    whatever the distribution), and each part is counted with a hash set small
    enough to stay in the processor's cache (one random access per value into a
    16 MB table costs several times more).  The bucket counts are those of
    :func:`bucket_counts`, taken in the same pass.
    """
    n = bits.size
    n_parts = 1 << part_bits
    # h >> (64 - part_bits) as two shifts: a shift by 64 is undefined (part_bits = 0)
    part_shift = np.uint64(63 - part_bits)
    one = np.uint64(1)
    sizes = np.zeros(n_parts + 1, dtype=np.int64)
    hist = np.zeros(n_buckets, dtype=np.int64)
    hashes = np.empty(n, dtype=np.uint64)
    whole = True
    for i in range(n):
        if whole:
            x = values[i]
            if np.floor(x) != x:
                whole = False
        b = bits[i]
        hist[np.intp((_key(b) - kmin) >> shift)] += 1
        h = _mix(_normal_bits(b))
        hashes[i] = h
        sizes[np.intp((h >> one) >> part_shift) + 1] += 1
    largest = 0
    for p in range(n_parts):
        largest = max(largest, sizes[p + 1])
        sizes[p + 1] += sizes[p]
    pos = sizes[:n_parts].copy()
    scattered = np.empty(n, dtype=np.uint64)
    for i in range(n):
        h = hashes[i]
        p = np.intp((h >> one) >> part_shift)
        scattered[pos[p]] = h
        pos[p] += 1
    table_bits = 4
    while (1 << table_bits) < 2 * largest:
        table_bits += 1
    size = 1 << table_bits
    mask = np.uint64(size - 1)
    table = np.empty(size, dtype=np.uint64)
    empty = np.uint64(0)  # the hash of +0.0's bits is 0: its presence is kept apart
    zero_seen = False
    count = 0
    for p in range(n_parts):
        table[:] = empty
        for i in range(sizes[p], sizes[p + 1]):
            h = scattered[i]
            if h == empty:
                zero_seen = True
                continue
            slot = h & mask  # the low bits: the top ones chose the part
            while True:
                t = table[slot]
                if t == empty:
                    table[slot] = h
                    count += 1
                    break
                if t == h:
                    break
                slot = (slot + np.uint64(1)) & mask
    return count + zero_seen, whole, hist


@njit(nogil=True, cache=True, boundscheck=False)
def bucket_counts(bits, kmin, shift, n_buckets):
    """Rows of each bucket ``(key - kmin) >> shift``."""
    hist = np.zeros(n_buckets, dtype=np.int64)
    for i in range(bits.size):
        hist[np.intp((_key(bits[i]) - kmin) >> shift)] += 1
    return hist


@njit(nogil=True, cache=True, boundscheck=False)
def gather_buckets(values, bits, kmin, shift, slot_of_bucket, starts, out):
    """Copy the values of the buckets with a slot (``slot_of_bucket >= 0``) to ``out``, slot by slot."""
    pos = starts.copy()
    for i in range(bits.size):
        s = slot_of_bucket[np.intp((_key(bits[i]) - kmin) >> shift)]
        if s >= 0:
            out[pos[s]] = values[i] + 0.0
            pos[s] += 1
