"""Numeric columns (floats, integers, nullable numbers): levels or bins, ID-like and heavy tails."""
from __future__ import annotations

import math

import numpy as np

from infoscope.encode import binning, order_stats
from infoscope.encode.drafts import (
    HEAVY_TAIL_INDEX,
    HEAVY_TAIL_MIN_ROWS,
    ID_LIKE_MIN_ROWS,
    ID_LIKE_SHARE,
    _Bins,
    _format_numbers,
    _is_id_name,
    _Levels,
    _Notes,
    _sorted_distinct,
)

__all__ = ["tail_index"]


def _integer_id_like(values: np.ndarray, n_distinct: int, lo, hi, name: str) -> bool:
    """Whole-number values that look like a row identifier (see encode_column, Notes).

    ``n_distinct``, ``lo`` and ``hi``: the distinct count, minimum and maximum of ``values``.
    """
    return _id_like_rule(values.size, n_distinct, lo, hi,
                         lambda: bool(np.all(values[1:] > values[:-1]) or np.all(values[1:] < values[:-1])),
                         name)


def _id_like_rule(n_valid: int, n_distinct: int, lo, hi, monotone, name: str) -> bool:
    """The ID-like rule of whole numbers from counts (``monotone``: a bool, or a callable giving it).

    Strictly monotone in row order, dense (range <= 2 x distinct count) or named
    like a key, with at least :data:`ID_LIKE_MIN_ROWS` values of which at least
    :data:`ID_LIKE_SHARE` are distinct.
    """
    if n_valid < ID_LIKE_MIN_ROWS or n_distinct < ID_LIKE_SHARE * n_valid:
        return False
    # exact for integers beyond 2**53 (Python ints), floats otherwise
    span = (int(hi) - int(lo) + 1) if isinstance(lo, (int, np.integer)) else float(hi) - float(lo) + 1
    if span <= 2 * n_distinct:
        return True
    return bool(monotone() if callable(monotone) else monotone) or _is_id_name(name)


def tail_index(sorted_values: np.ndarray) -> float:
    """Tail index max(q999 - q50, q50 - q001) / (q75 - q25) of sorted finite values.

    A robust, scale-free measure of how far the extreme quantiles reach compared
    with the central half of the data (``heavy_tail`` flag above
    :data:`HEAVY_TAIL_INDEX`).

    Parameters
    ----------
    sorted_values : numpy.ndarray
        Sorted finite numbers, non-empty.

    Returns
    -------
    float
        The index, or nan when the interquartile range is 0.

    References
    ----------
    .. [1] Quantile-spread ratios as tail measures are common practice (compare
       the tail-weight measures in D. C. Hoaglin, F. Mosteller and J. W. Tukey
       (eds.), Exploring Data Tables, Trends, and Shapes, Wiley, 1985; from memory).

    Examples
    --------
    >>> import numpy as np
    >>> round(tail_index(np.sort(np.random.default_rng(0).normal(size=100_000))), 1)
    2.3
    """
    return _tail_index_of(*binning.sorted_quantile(sorted_values, _TAIL_PROBS))


_TAIL_PROBS = (0.001, 0.25, 0.5, 0.75, 0.999)


def _tail_index_of(q001, q25, q50, q75, q999) -> float:
    iqr = float(q75) - float(q25)
    if iqr <= 0:
        return float("nan")
    return max(float(q999) - float(q50), float(q50) - float(q001)) / iqr


def _heavy_tail(s: np.ndarray) -> bool:
    # nan (zero IQR) compares False: no flag when the middle half is one value
    return s.size >= HEAVY_TAIL_MIN_ROWS and tail_index(s) > HEAVY_TAIL_INDEX


def _value_edges(distinct: np.ndarray, n_values: int, bins, strategy: str):
    """One bin per value when a measurement has no more distinct values than quantile bins.

    Quantile edges of a column with few distinct values (a voucher of 0, 2.5, 5 or
    15) coincide at the tied values and the bins merge unpredictably; when the
    column has at most as many values as bins were asked for, each value gets a
    bin of its own, cut halfway between neighbours, and nothing is merged.  None
    when the rule does not apply (more values, equal-width bins, a width rule).
    """
    if strategy != "quantile" or distinct.size < 2:
        return None
    if isinstance(bins, str):
        if bins != "rows":
            return None
        bins = binning.rows_bin_count(n_values)
    if not isinstance(bins, (int, np.integer)) or distinct.size > bins:
        return None
    return _midpoint_edges(distinct)


def _midpoint_edges(distinct: np.ndarray):
    d = distinct.astype(np.float64)
    edges = np.concatenate(([d[0]], (d[:-1] + d[1:]) / 2.0, [d[-1]]))
    # neighbouring floats can have no float between them: then the usual rule
    return edges if np.all(np.diff(edges) > 0) else None


def _infinite_note(notes: _Notes, n_inf: int, n_pos: int) -> None:
    notes.flags.add("infinite_values")
    notes.warn(f"{n_inf} infinite value(s) ({n_pos} +inf, {n_inf - n_pos} -inf) are treated as missing")


def _outside_note(notes: _Notes, outside: int, first: str, last: str) -> None:
    if outside:
        notes.warn(f"{outside} value(s) lie outside the given bin edges "
                   f"[{first}, {last}] and are counted in the end bins")


def _numeric(x: np.ndarray, na: np.ndarray | None, notes: _Notes, bins, strategy, threshold,
             fractions_as_levels: bool = False) -> _Levels | _Bins:
    """Float or integer values (``na``: mask of missing rows of a nullable dtype)."""
    n = x.size
    missing = np.zeros(n, dtype=bool) if na is None else na.copy()
    if x.dtype.kind == "f":
        missing |= np.isnan(x)
        inf = np.isinf(x)
        n_inf = int(np.count_nonzero(inf))
        if n_inf:
            _infinite_note(notes, n_inf, int(np.count_nonzero(inf & (x > 0))))
            missing |= inf
    any_missing = bool(missing.any())
    v = x[~missing] if any_missing else x
    explicit = isinstance(bins, np.ndarray)
    if explicit and bins.dtype.kind in "mM":
        raise TypeError(f"column {notes.name!r}: datetime bin edges cannot bin a numeric column")
    if x.dtype.kind in "iu" and v.size and not explicit:
        # small integer ranges: counting beats sorting (one pass, no n log n)
        lo, hi = int(v.min()), int(v.max())
        if hi - lo < max(2**16, v.size):
            # offsets from the minimum, computed where they cannot overflow
            if x.dtype.kind == "u":
                offsets = (v - x.dtype.type(lo)).astype(np.intp)
            else:
                offsets = (v.astype(np.int64) - lo).astype(np.intp)
            present = np.bincount(offsets, minlength=hi - lo + 1) > 0
            n_distinct = int(np.count_nonzero(present))
            if n_distinct <= threshold:
                distinct = np.flatnonzero(present).astype(x.dtype) + x.dtype.type(lo)
                lookup = np.cumsum(present) - 1
                raw = np.full(n, -1, dtype=np.int64)
                raw[~missing] = lookup[offsets]
                if _integer_id_like(v, n_distinct, distinct[0], distinct[-1], notes.name):
                    notes.flags.add("id_like")
                return _Levels(raw, _format_numbers(distinct), True, "integer_categories", n_distinct)
    if isinstance(bins, str) and bins == "rows":
        bins = binning.rows_bin_count(int(v.size))  # the default rule is a count: resolve it here
    if x.dtype.kind == "f" and not explicit and not isinstance(bins, str) and v.size >= order_stats.MIN_ROWS:
        fast = _float_bins(v, n, missing, any_missing, notes, bins, strategy, threshold)
        if fast is not None:
            return fast
    s = np.sort(v)
    distinct = _sorted_distinct(s)
    n_distinct = int(distinct.size)
    integral = x.dtype.kind in "iu" or (s.size > 0 and bool(np.all(np.floor(distinct) == distinct)))
    if integral and n_distinct and _integer_id_like(v, n_distinct, distinct[0], distinct[-1], notes.name):
        notes.flags.add("id_like")
    # Only whole numbers become levels: a float column with fractional values (a
    # grade average, a share) is a measurement however few values it shows, and
    # calling it "integer_categories" would be untrue.  Floats that are all whole
    # (integers stored as float, e.g. because of missing values) count as integers.
    # (the midpoints of Interval columns are labels of their intervals: they pass
    # fractions_as_levels, encode/ordered.py)
    if n_distinct == 0 or (not explicit and (integral or fractions_as_levels) and n_distinct <= threshold):
        raw = np.full(n, -1, dtype=np.int64)
        if n_distinct:
            raw[~missing] = np.searchsorted(distinct, v)
        kind = "integer_categories" if n_distinct else "numeric"
        return _Levels(raw, _format_numbers(distinct), True, kind, n_distinct)
    if x.dtype.kind in "iu" and (binning.beyond_float(s[0], s[-1]) or (explicit and bins.dtype.kind in "iu")):
        return _integer_bins(v, s, n, missing, notes, bins, strategy, n_distinct)
    edges = _value_edges(distinct, int(s.size), bins, strategy) if not explicit else None
    if edges is None:
        edges, note = binning._edges(s, bins, strategy, is_sorted=True)
        if note is not None:
            notes.warn(note)
    if explicit:
        outside = int(np.count_nonzero(s < edges[0]) + np.count_nonzero(s > edges[-1]))
        _outside_note(notes, outside, f"{edges[0]:g}", f"{edges[-1]:g}")
    if _heavy_tail(s):
        notes.flags.add("heavy_tail")
    return _binned(v, n, missing, any_missing, edges, n_distinct)


def _binned(v, n, missing, any_missing, edges, n_distinct) -> _Bins:
    codes = binning.assign_bins(v, edges)
    if any_missing:
        # -1 marks missing rows; int16 is enough for up to 32,766 bins (and 4x
        # smaller than int64 to write and to turn into the final codes)
        raw = np.full(n, -1, dtype=np.int16 if edges.size <= 32_000 else np.int64)
        raw[~missing] = codes
    else:
        raw = codes  # non-negative already (uint8 up to 25 bins)
    labels = list(binning.interval_labels(binning.format_edges(edges)))
    return _Bins(raw, labels, edges, "numeric", n_distinct)


def _float_bins(v, n, missing, any_missing, notes, bins, strategy, threshold) -> _Bins | None:
    """The binned float column without sorting it (:mod:`~infoscope.encode.order_stats`), or None.

    None when the compiled kernels are not loaded yet or the column has at most
    ``threshold`` distinct values (it becomes levels: the sorting path does that).
    Same edges, codes, counts and flags as the sorting path, by construction: the
    distinct count, minimum and maximum and the order statistics the quantiles read
    are exact.
    """
    k = order_stats.kernels()
    if k is None:
        return None
    v = np.ascontiguousarray(v, dtype=np.float64)
    summary = order_stats.float_summary(k, v)
    n_distinct, whole, lo, hi = summary.n_distinct, summary.whole, summary.lo, summary.hi
    if n_distinct <= threshold or (strategy == "quantile" and n_distinct <= bins):
        # levels, or one quantile bin per value (_value_edges): the sorting path
        return None
    if whole and _integer_id_like(v, n_distinct, lo, hi, notes.name):
        notes.flags.add("id_like")
    probs = []
    if strategy == "quantile":
        probs.append(np.linspace(0.0, 1.0, bins + 1))
    tail = v.size >= HEAVY_TAIL_MIN_ROWS
    if tail:
        probs.append(np.asarray(_TAIL_PROBS))
    prev_i, next_i, gamma = binning.quantile_ranks(v.size, np.concatenate(probs) if probs else np.zeros(0))
    ranks = np.unique(np.concatenate([prev_i, next_i]))
    stats = (order_stats.order_statistics(k, v, ranks, lo, hi, summary.hist, summary.buckets)
             if ranks.size else np.zeros(0))
    at = np.searchsorted(ranks, prev_i), np.searchsorted(ranks, next_i)
    quantiles = binning.lerp_quantiles(stats[at[0]], stats[at[1]], gamma)
    n_edges = bins + 1 if strategy == "quantile" else 0
    edges, note = binning._edges(v, bins, strategy, quantile=lambda _probs: quantiles[:n_edges], lo_hi=(lo, hi))
    if note is not None:
        notes.warn(note)
    if tail and _tail_index_of(*quantiles[n_edges:]) > HEAVY_TAIL_INDEX:
        notes.flags.add("heavy_tail")
    return _binned(v, n, missing, any_missing, edges, n_distinct)


def _integer_bins(v: np.ndarray, s: np.ndarray, n: int, missing: np.ndarray, notes: _Notes, bins, strategy,
                  n_distinct: int) -> _Bins:
    """Bins of integers beyond float64's exact range (``|v| > 2**53``), in integer arithmetic.

    float64 holds integers exactly only up to 2**53: ``2**60 + i`` for ``i < 100``
    are a handful of floats, and binning them as floats merged every edge.  Here
    the values become exact offsets from the smallest (uint64; the span of an
    int64 or uint64 column fits), the edges are placed on the offsets (as floats,
    exact when the span is below 2**53) and then made integers: the integers in
    ``[e_i, e_i+1)`` are those from ``ceil(e_i)`` on, so integer edges lose nothing.
    Codes come from integer comparisons; labels and edges are the exact integers.
    """
    origin, edges_off = _integer_edges(s.size, int(s[0]), int(s[-1]), lambda i: int(s[i]), bins, strategy, notes,
                                       int(np.count_nonzero(s < bins[0]) + np.count_nonzero(s > bins[-1]))
                                       if isinstance(bins, np.ndarray) else 0,
                                       float_offsets=lambda o: (s.astype(np.uint64) - np.uint64(o % 2**64)).astype(np.float64))
    shift = np.uint64(origin % 2**64)
    # v - origin, exact: two's-complement wrap-around gives the true difference (< 2**64)
    codes = np.searchsorted(edges_off[1:-1], v.astype(np.uint64) - shift, side="right")
    codes = codes.astype(np.uint8 if edges_off.size <= 256 else np.int64)
    if missing.any():
        raw = np.full(n, -1, dtype=np.int16 if edges_off.size <= 32_000 else np.int64)
        raw[~missing] = codes
    else:
        raw = codes
    if _heavy_tail((s.astype(np.uint64) - shift).astype(np.float64)):
        notes.flags.add("heavy_tail")
    edges, labels = _integer_bin_labels(origin, edges_off, bins, s.dtype)
    return _Bins(raw, labels, edges, "numeric", n_distinct)


def _integer_edges(n: int, lo: int, hi: int, at, bins, strategy, notes: _Notes, outside: int,
                   float_offsets=None):
    """``(origin, edge offsets)`` of :func:`_integer_bins` from ``n`` sorted values given by rank.

    ``lo``, ``hi``: the smallest and largest value; ``at(i)``: the value of rank
    ``i`` (a Python int); ``outside``: values outside explicit ``bins``;
    ``float_offsets(origin)``: all sorted offsets as floats, for a width rule (None:
    only equal widths, which need the two ends alone).
    """
    explicit = isinstance(bins, np.ndarray)
    origin = lo if not explicit else min(lo, int(bins[0]))
    span = hi - origin
    if explicit:
        edges_off = bins.astype(np.uint64) - np.uint64(origin % 2**64)
        _outside_note(notes, outside, str(int(bins[0])), str(int(bins[-1])))
    elif span == 0:
        edges_off = np.array([0, 1], dtype=np.uint64)
    else:
        if strategy == "quantile" and not isinstance(bins, str):
            # exact: floats of the offsets may merge
            wanted = _integer_quantile_edges_at(n, bins, lambda i: at(i) - origin)
        else:  # widths: the float's relative error (2**-53 of the span) moves no edge by a bin
            x = float_offsets(origin) if float_offsets is not None else np.array([0.0, float(span)])
            wanted = [int(math.ceil(e)) for e in binning._edges(x, bins, strategy, is_sorted=True)[0][1:-1]]
        inner = sorted({min(max(e, 1), span) for e in wanted} - {span})
        edges_off = np.array([0, *inner, span], dtype=np.uint64)
        if edges_off.size < len(wanted) + 2:
            notes.warn(f"{len(wanted) + 1} bins were asked for but tied values make "
                       f"{len(wanted) + 2 - edges_off.size} edge(s) coincide; {edges_off.size - 1} bin(s) remain")
    return origin, edges_off


def _integer_bin_labels(origin: int, edges_off: np.ndarray, bins, dtype):
    values = [origin + int(e) for e in edges_off]
    edges = np.array(values, dtype=bins.dtype if isinstance(bins, np.ndarray) else dtype)
    return edges, list(binning.interval_labels([str(e) for e in values]))


def _integer_quantile_edges(s_off: np.ndarray, bins: int) -> list[int]:
    """Interior quantile edges of sorted uint64 offsets, rounded up to whole numbers, exactly.

    numpy's "linear" quantile at ``h = (n - 1) p`` lies between the order
    statistics ``s[floor h]`` and the next; the smallest integer at or above it is
    ``s[i] + ceil(g (s[i + 1] - s[i]))`` with ``g = h - floor h``, computed here in
    Python integers (only the fraction ``g`` is a float).
    """
    return _integer_quantile_edges_at(s_off.size, bins, lambda i: int(s_off[i]))


def _integer_quantile_ranks(n: int, bins: int) -> list[int]:
    """The ranks :func:`_integer_quantile_edges_at` reads."""
    out = []
    for p in np.linspace(0.0, 1.0, int(bins) + 1)[1:-1]:
        i = min(int(math.floor((n - 1) * float(p))), n - 1)
        out += [i, min(i + 1, n - 1)]
    return out


def _integer_quantile_edges_at(n: int, bins: int, at) -> list[int]:
    """:func:`_integer_quantile_edges` of ``n`` sorted offsets, ``at(i)`` giving the one of rank ``i``."""
    out = []
    for p in np.linspace(0.0, 1.0, int(bins) + 1)[1:-1]:
        h = (n - 1) * float(p)
        i = min(int(math.floor(h)), n - 1)
        a, b = at(i), at(min(i + 1, n - 1))
        out.append(a + int(math.ceil((h - i) * (b - a))))
    return out
