"""Datetime and duration columns: levels or bins with edges rounded to readable times."""
from __future__ import annotations

import numpy as np
import pandas as pd

from infoscope.encode import binning
from infoscope.encode.drafts import _Bins, _Levels, _Notes, _sorted_distinct


_TIME_STEPS_NS = (86_400 * 10**9, 3_600 * 10**9, 60 * 10**9, 10**9, 10**6, 10**3)
_TIMESPEC = {86_400 * 10**9: "days", 3_600 * 10**9: "minutes", 60 * 10**9: "minutes",
             10**9: "seconds", 10**6: "milliseconds", 10**3: "microseconds"}
_UNIT_NS = {"s": 10**9, "ms": 10**6, "us": 10**3, "ns": 1}


def _round_time_edges(edges: np.ndarray, unit: str) -> tuple[np.ndarray, int | None]:
    """Round interior edges to a readable step (day, hour, minute, second, ms, us).

    The step is the coarsest one no larger than 1/100 of the narrowest bin, so no
    edge moves by more than 0.5 % of its bins' width; the end edges stay the data's
    own.  Returns the edges and the step in nanoseconds (None: not rounded).
    """
    per = _UNIT_NS.get(unit)
    if per is None or edges.size < 2:
        return edges, None
    narrowest_ns = float(np.diff(edges).min()) * per
    for step_ns in _TIME_STEPS_NS:
        if step_ns < per:
            break
        if step_ns > narrowest_ns / 100:
            continue
        step = step_ns // per
        inner = np.round(edges[1:-1] / step).astype(np.int64) * step
        cand = np.concatenate([edges[:1], inner, edges[-1:]])
        if np.all(np.diff(cand) > 0):
            return cand, step_ns
    return edges, None


def _time_texts(ints: np.ndarray, unit: str, kind: str, tz, step_ns: int | None = None) -> list[str]:
    """Text of instants / durations; with a rounding step, shown to that step (ends widened to it)."""
    if step_ns is not None and ints.size >= 2:
        step = max(step_ns // _UNIT_NS[unit], 1)
        ints = ints.copy()
        ints[0] = (ints[0] // step) * step  # floor: the label interval still holds the minimum
        ints[-1] = -((-ints[-1]) // step) * step  # ceil
    if kind == "timedelta":
        return [str(t) for t in pd.to_timedelta(ints.view(f"m8[{unit}]"))]
    idx = pd.DatetimeIndex(ints.view(f"M8[{unit}]"))
    if tz is not None:
        idx = idx.tz_localize("UTC").tz_convert(tz)
    if len(idx) and bool(np.all(idx.normalize() == idx)):
        texts = [t.strftime("%Y-%m-%d") for t in idx]
        if len(set(texts)) == len(texts):
            return texts
    if step_ns is not None:
        spec = _TIMESPEC[step_ns]
        if spec != "days":
            texts = [t.isoformat(sep=" ", timespec=spec) for t in idx]
            if len(set(texts)) == len(texts):
                return texts
    return [str(t) for t in idx]


def edges_of(bins: np.ndarray, unit: str) -> np.ndarray:
    """Explicit datetime / duration edges as int64 in the column's unit."""
    return bins.astype(f"{bins.dtype.kind}8[{unit}]").view(np.int64)


def _time_bins(lo: int, hi: int, s, bins, strategy, notes: _Notes, unit: str, kind: str, tz, outside: int,
               quantile=None):
    """Edges (int64 in ``unit``), labels and datetime64 / timedelta64 edges of a binned time column.

    ``s``: the sorted int64 instants, or (out of core, with ``quantile``) the two
    ends only; ``quantile(probs)`` then gives numpy's quantiles from exact order
    statistics.  ``outside``: values outside explicit ``bins``.
    """
    explicit = isinstance(bins, np.ndarray)
    if explicit:
        if bins.dtype.kind != ("m" if kind == "timedelta" else "M"):
            raise TypeError(
                f"column {notes.name!r}: bin edges for a {kind} column must be "
                f"{'timedelta64' if kind == 'timedelta' else 'datetime64'} values, got {bins.dtype}"
            )
        edges = edges_of(bins, unit)
        if np.any(np.diff(edges) <= 0):
            raise ValueError(f"column {notes.name!r}: bin edges must increase strictly")
        if outside:
            notes.warn(f"{outside} value(s) lie outside the given bin edges and are counted in the end bins")
    else:
        if quantile is None:
            edges_f, note = binning._edges(s, bins, strategy, is_sorted=True)
        else:
            edges_f, note = binning._edges(s, bins, strategy, quantile=quantile, lo_hi=(s[0], s[-1]))
        if note is not None:
            notes.warn(note)
        edges = np.unique(np.round(edges_f).astype(np.int64))
        # float64 cannot hold nanosecond instants exactly: the ends are the data's own
        edges[0], edges[-1] = lo, hi
        edges = np.unique(edges)
    step_ns = None
    if not explicit:
        edges, step_ns = _round_time_edges(edges, unit)
    labels = list(binning.interval_labels(_time_texts(edges, unit, kind, tz, step_ns)))
    edge_arr = edges.view(f"{'m' if kind == 'timedelta' else 'M'}8[{unit}]").copy()
    return edges, labels, edge_arr


def _temporal(series: pd.Series, notes: _Notes, bins, strategy, threshold) -> _Levels | _Bins:
    """datetime64 (naive or zoned: binned on UTC instants) and timedelta64 columns."""
    dtype = series.dtype
    kind = "timedelta" if dtype.kind == "m" else "datetime"
    tz = getattr(dtype, "tz", None)
    naive = series.dt.tz_convert("UTC").dt.tz_localize(None) if tz is not None else series
    arr = naive.to_numpy()
    unit = np.datetime_data(arr.dtype)[0]
    ints = arr.view(np.int64)
    missing = np.isnat(arr)
    v = ints[~missing]
    s = np.sort(v)
    distinct = _sorted_distinct(s)
    n_distinct = int(distinct.size)
    explicit = isinstance(bins, np.ndarray)
    if n_distinct <= 1 or (not explicit and n_distinct <= threshold):
        raw = np.full(ints.size, -1, dtype=np.int64)
        raw[~missing] = np.searchsorted(distinct, v)
        return _Levels(raw, _time_texts(distinct, unit, kind, tz), True, kind, n_distinct)
    outside = int(np.count_nonzero(s < edges_of(bins, unit)[0]) + np.count_nonzero(s > edges_of(bins, unit)[-1])) \
        if explicit and bins.dtype.kind == ("m" if kind == "timedelta" else "M") else 0
    edges, labels, edge_arr = _time_bins(int(s[0]), int(s[-1]), s, bins, strategy, notes, unit, kind, tz, outside)
    raw = np.full(ints.size, -1, dtype=np.int64)
    raw[~missing] = binning.assign_bins(v, edges)
    return _Bins(raw, labels, edge_arr, kind, n_distinct)
