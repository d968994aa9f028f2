"""Distinct counts and exact order statistics of big float columns, without a full sort.

Binning a numeric column needs its distinct count (is it a few codes or a
measurement?), whether its values are whole numbers, and a few dozen order
statistics (the quantile edges and the tail quantiles): sorting a million values
to read 40 of them is most of the cost of encoding.  Here:

* the distinct count and the whole-number test are hash sets over parts of the
  values, each small enough to stay in cache (:func:`float_summary`);
* the order statistics are a radix selection (:func:`order_statistics`): one pass
  counts the values of 2**16 buckets of their order-preserving integer key, a second
  copies out only the buckets that hold a wanted rank, and ``numpy.partition``
  picks the exact values among those few.

Both are exact: the counts equal ``numpy.unique(v).size`` and the order statistics
``numpy.sort(v)[ranks]``, so the edges and flags are the same, bit for bit, as the
sorting path's (the tests compare them).  The kernels are numba-compiled; until they
are loaded (:func:`kernels` loads them on a background thread the first time a big
column asks, or at once with ``wait=True``) the encoder sorts, as it always did.
"""
from __future__ import annotations

import threading

import numpy as np

__all__ = ["MIN_ROWS", "MODE", "kernels", "float_summary", "FloatSummary", "order_statistics"]

#: Columns of fewer finite values are sorted (a sort of 100,000 values costs a few
#: milliseconds, and small frames then never load numba).
MIN_ROWS = 100_000
#: "auto": the compiled path once its kernels are loaded (loading starts on a
#: background thread when a big column first asks); "always": load at once and use
#: it for every column of at least :data:`MIN_ROWS` values; "never": always sort.
MODE = "auto"

_BUCKET_BITS = 16
_lock = threading.Lock()
_state: dict = {"kernels": None, "thread": None, "failed": False}


def _load() -> None:
    with _lock:
        if _state["kernels"] is not None or _state["failed"]:
            return
        try:
            from infoscope.encode import _numba_kernels as k
        except ImportError:  # pragma: no cover - numba is a dependency
            _state["failed"] = True
            return
        # compile (or load from numba's cache) every kernel on a tiny column
        v = np.array([1.0, -0.0, 2.5, 1.0])
        bits = v.view(np.uint64)
        kmin = np.uint64(0)
        k.float_facts(v, bits, 1, kmin, np.uint64(60), 16)
        hist = k.bucket_counts(bits, kmin, np.uint64(60), 16)
        slots = np.full(16, -1, dtype=np.int32)
        k.gather_buckets(v, bits, kmin, np.uint64(60), slots, np.zeros(1, np.int64), np.empty(int(hist.sum())))
        _state["kernels"] = k


def kernels(wait: bool = False):
    """The compiled kernels module, or None while it is not loaded (or :data:`MODE` is "never").

    Parameters
    ----------
    wait : bool, default=False
        Load (compile on the first run on a machine, about 2 s; later runs read
        numba's cache) in this thread and return the kernels.  Otherwise loading
        starts on a background thread and None is returned until it is done.

    Returns
    -------
    module or None

    References
    ----------
    .. [1] numba documentation, "Compiling Python code with @jit" (``cache=True``, ``nogil=True``).

    Examples
    --------
    >>> kernels(wait=True) is not None
    True
    """
    if MODE == "never" or _state["failed"]:
        return None
    if _state["kernels"] is None:
        if wait or MODE == "always":
            _load()
        else:
            with _lock:
                if _state["thread"] is None:
                    # not a daemon: interpreter exit waits for a compile in progress
                    _state["thread"] = threading.Thread(target=_load, name="infoscope-encode-kernels")
                    _state["thread"].start()
            return None
    return _state["kernels"]


def _buckets(lo: float, hi: float) -> tuple[np.uint64, np.uint64, int]:
    """(key of ``lo``, shift, bucket count): at most 2**16 buckets of ``[lo, hi]`` in key order."""
    kmin, kmax = (int(x) for x in _keys(np.array([lo, hi])))
    shift = max(0, (kmax - kmin).bit_length() - _BUCKET_BITS)
    return np.uint64(kmin), np.uint64(shift), ((kmax - kmin) >> shift) + 1


class FloatSummary:
    """What one pass over a float column tells: distinct count, whole numbers, range, bucket counts."""

    __slots__ = ("n_distinct", "whole", "lo", "hi", "buckets", "hist")

    def __init__(self, n_distinct, whole, lo, hi, buckets, hist):
        self.n_distinct, self.whole, self.lo, self.hi = n_distinct, whole, lo, hi
        self.buckets, self.hist = buckets, hist


def float_summary(k, v: np.ndarray) -> FloatSummary:
    """Distinct count (``-0.0`` is ``0.0``), whole-number test, range and bucket counts of finite float64 ``v``.

    Parameters
    ----------
    k : module
        The kernels (:func:`kernels`).
    v : numpy.ndarray of float64
        Finite values, C-contiguous, non-empty.

    Returns
    -------
    FloatSummary
        ``n_distinct`` (equals ``numpy.unique(v).size``), ``whole``, ``lo``, ``hi``;
        ``buckets`` and ``hist`` are for :func:`order_statistics`.

    References
    ----------
    .. [1] Open addressing with linear probing (common practice; D. E. Knuth, The Art
       of Computer Programming, vol. 3, section 6.4, from memory); the hash is
       splitmix64's finaliser (S. Vigna, from memory).

    Examples
    --------
    >>> import numpy as np
    >>> summary = float_summary(kernels(wait=True), np.array([1.0, 2.0, 1.0, -0.0, 0.0]))
    >>> summary.n_distinct, summary.whole
    (3, True)
    """
    lo, hi = v.min(), v.max()
    buckets = _buckets(lo, hi)
    # parts of about 16,384 values: a table of 32,768 slots (256 KiB) per part
    part_bits = int(min(12, max(0, np.ceil(np.log2(max(v.size, 1) / 16_384)))))
    count, whole, hist = k.float_facts(v, v.view(np.uint64), part_bits, *buckets)
    return FloatSummary(int(count), bool(whole), lo, hi, buckets, hist)


def _keys(x: np.ndarray) -> np.ndarray:
    bits = (np.asarray(x, dtype=np.float64) + 0.0).view(np.uint64)
    negative = (bits >> np.uint64(63)).astype(bool)
    return np.where(negative, ~bits, bits | np.uint64(1 << 63))


#: A selected bucket larger than this is selected from again, by its own buckets.
_SMALL = 4096


def order_statistics(k, v: np.ndarray, ranks: np.ndarray, lo: float, hi: float, hist=None,
                     buckets=None) -> np.ndarray:
    """``numpy.sort(v)[ranks]`` by radix selection (two passes over ``v``, no sort of it).

    Parameters
    ----------
    k : module
        The kernels (:func:`kernels`).
    v : numpy.ndarray of float64
        Finite values, C-contiguous, non-empty.
    ranks : numpy.ndarray of int
        0-based positions in sorted order.
    lo, hi : float
        ``v.min()`` and ``v.max()``.
    hist, buckets : optional
        The bucket counts and buckets of :func:`float_summary` (saves a pass).

    Returns
    -------
    numpy.ndarray of float64
        The values at those ranks (``-0.0`` returned as ``0.0``).

    References
    ----------
    .. [1] Radix (bucket) selection: D. E. Knuth, The Art of Computer Programming,
       vol. 3, section 5.2.5 (from memory); the float-to-integer key that keeps the
       order is common practice.

    Examples
    --------
    >>> import numpy as np
    >>> v = np.array([3.0, -1.0, 2.0, 10.0])
    >>> order_statistics(kernels(wait=True), v, np.array([0, 2, 3]), -1.0, 10.0).tolist()
    [-1.0, 3.0, 10.0]
    """
    ranks = np.asarray(ranks, dtype=np.int64)
    bits = v.view(np.uint64)
    if buckets is None or hist is None:
        buckets = _buckets(lo, hi)
        hist = k.bucket_counts(bits, *buckets)
    kmin, shift, n_buckets = buckets
    ends = np.cumsum(hist)
    bucket = np.searchsorted(ends, ranks, side="right")
    wanted = np.unique(bucket)
    slot_of_bucket = np.full(n_buckets, -1, dtype=np.int32)
    slot_of_bucket[wanted] = np.arange(wanted.size, dtype=np.int32)
    sizes = hist[wanted]
    starts = np.concatenate([[0], np.cumsum(sizes)[:-1]]).astype(np.int64)
    out = np.empty(int(sizes.sum()), dtype=np.float64)
    k.gather_buckets(v, bits, kmin, shift, slot_of_bucket, starts, out)
    result = np.empty(ranks.size, dtype=np.float64)
    for j, b in enumerate(wanted):
        here = bucket == b
        inside = ranks[here] - (ends[b] - hist[b])  # ranks within the bucket
        sub = out[starts[j]:starts[j] + sizes[j]]
        if sub.size > _SMALL and n_buckets > 1:
            # a crowded bucket (values of both signs spread the keys over many empty
            # octaves): select again among its own values, by finer buckets
            sub_lo, sub_hi = sub.min(), sub.max()
            if sub_lo == sub_hi:
                result[here] = sub_lo
            else:
                result[here] = order_statistics(k, sub, inside, sub_lo, sub_hi)
            continue
        part = np.partition(sub, np.unique(inside))
        result[here] = part[inside]
    return result
