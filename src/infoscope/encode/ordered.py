"""Columns pandas holds as objects but whose values have a natural order: periods,
intervals and times of day.  Each is converted to the values it is ordered by and
encoded as those (levels or bins), never as text:

* **Period** (``pd.PeriodDtype``): by the instant each period starts
  (``Series.dt.start_time``), as a datetime column; with few distinct periods
  the levels keep the periods' own labels (``2024-03``, ``2024Q1``).
* **Interval** (``pd.IntervalDtype``): by the midpoint of each interval (our
  choice: it orders intervals of different widths by where they lie, where the
  left edge would put ``(0, 100]`` before ``(1, 2]``), as a number or datetime
  column; with few distinct intervals the levels keep the intervals' labels.
  Intervals that share a midpoint are counted together, and the encoder says how
  many.
* **Time of day** (``datetime.time`` cells, e.g. a Polars ``Time`` column after
  ``to_pandas()``): by the time since midnight, as a duration column whose labels
  read ``08:30:00``.

(Complex numbers have no order: they stay labels, see
:func:`infoscope.encode.encoder._draft`.)
"""
from __future__ import annotations

import datetime

import numpy as np
import pandas as pd

from infoscope.encode.drafts import _Bins, _Levels, _Notes
from infoscope.encode.numeric import _numeric
from infoscope.encode.temporal import _temporal


def _period(series: pd.Series, notes: _Notes, bins, strategy, threshold) -> _Levels | _Bins:
    """Periods by their start instants; few distinct ones keep their own labels."""
    try:
        start = series.dt.start_time
    except (ValueError, OverflowError, pd.errors.OutOfBoundsDatetime):
        start = None
    if start is None or start.dtype.kind != "M":
        raise ValueError(f"column {notes.name!r}: periods beyond the datetime range cannot be "
                         "binned; convert them to numbers (e.g. .dt.year)")
    draft = _temporal(start, notes, bins, strategy, threshold)
    if isinstance(draft, _Levels):
        periods = pd.PeriodIndex(series.dropna().unique()).sort_values()
        if len(periods) == len(draft.labels):
            draft.labels = [str(p) for p in periods]
    return draft


def _interval(series: pd.Series, notes: _Notes, bins, strategy, threshold) -> _Levels | _Bins:
    """Intervals by their midpoints; few distinct ones keep their own labels."""
    index = pd.IntervalIndex(series.array)
    mid = pd.Series(index.mid, copy=False)
    present = index[~index.isna()]
    distinct = present.unique()
    n_mid = int(mid.nunique(dropna=True))
    if n_mid < len(distinct):
        notes.warn(f"{len(distinct) - n_mid} distinct interval(s) share their midpoint with another "
                   "and are counted together (intervals are read by their midpoints)")
    if mid.dtype.kind in "mM":
        draft = _temporal(mid, notes, bins, strategy, threshold)
    else:
        draft = _numeric(mid.to_numpy(dtype=np.float64, na_value=np.nan), None, notes, bins, strategy, threshold,
                         fractions_as_levels=True)
    if isinstance(draft, _Levels) and n_mid == len(distinct) == len(draft.labels):
        order = np.argsort(np.asarray(distinct.mid), kind="stable")
        draft.labels = [str(distinct[i]) for i in order]
    return draft


def _time_of_day(series: pd.Series, notes: _Notes, bins, strategy, threshold) -> _Levels | _Bins:
    """``datetime.time`` cells by the time since midnight (a duration column, labelled as times)."""
    def micros(v) -> int:
        if not isinstance(v, datetime.time):
            return -1
        return ((v.hour * 60 + v.minute) * 60 + v.second) * 1_000_000 + v.microsecond

    cells = series.to_numpy(dtype=object)
    us = np.frompyfunc(micros, 1, 1)(cells).astype(np.int64) if cells.size else np.zeros(0, np.int64)
    since = us.astype("m8[us]")
    since[us < 0] = np.timedelta64("NaT")
    draft = _temporal(pd.Series(since, copy=False), notes, bins, strategy, threshold)
    draft.labels = [label.replace("0 days ", "") for label in draft.labels]
    return draft
