"""Drift over time: every column of a frame, period by period, against a reference.

``drift_over(time_column, every="1W", reference="first")`` cuts the rows into
calendar periods of the time column (pandas period frequencies: ``"1D"``,
``"1W"``, ``"1M"``, ``"1Q"``, ...) and compares every other column in each period
with a reference:

* ``"first"`` — the first period (its rows are the reference; it gets no row);
* ``"previous"`` — the period before (the last one with rows);
* a frame — that frame, for every period.

Each column gets **one** shared alphabet for all periods, so that the periods are
counted together: the reference's bins (the first period's for ``"first"`` and
``"previous"``, the frame's otherwise) and the levels of all rows, folded on the
pooled counts (:func:`infoscope.frame.drift.align_to_reference`).  The engine
then counts the (period x symbol) table of every column in one pass over the rows
(:func:`infoscope.engine.counting.count_chunk` with the period as one more
column), not one profile per period.  Each (period, column) gets the numbers of
:meth:`ProfileSession.drift` — divergences, their chance level from random splits
of the two periods' pooled rows, p-value — and the q-values are Benjamini–Hochberg
within each period (one period is one batch checked against its reference).

For ``"previous"`` the alphabet and ``new_share`` stay those of the first period
(``new_share`` is NaN: "new" would mean new since the first period).
"""
from __future__ import annotations

import math
import re
import warnings

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.frame.results import DRIFT_COLUMNS, TEST_LEVEL

__all__ = ["DRIFT_OVER_COLUMNS", "REFERENCE_MODES", "assign_periods", "drift_over_table"]

DRIFT_OVER_COLUMNS = ("period", "start", "reference") + DRIFT_COLUMNS
#: ``reference=`` choices other than a frame.
REFERENCE_MODES = ("first", "previous")


def assign_periods(times: pd.Series, every: str, name: str) -> tuple[np.ndarray, list, list]:
    """The period of every row: codes ``0 .. P-1`` into the full range of periods, ``-1`` for no time.

    Parameters
    ----------
    times : pandas.Series
        A ``datetime64`` column, naive or zoned (zoned times are cut on their
        local calendar).
    every : str
        A pandas period frequency with an optional multiple (``"1D"``, ``"1W"``,
        ``"2W"``, ``"1M"``, ``"1Q"``, ``"1Y"``).  A multiple groups that many
        calendar periods, counted from the first one with a time.
    name : str
        The column key (for messages).

    Returns
    -------
    codes : numpy.ndarray
        int64 per row.
    labels : list of str
        One label per period, from the first to the last time, empty ones included.
    starts : list of pandas.Timestamp
        The start of each period.

    Raises
    ------
    TypeError
        When the column is not a datetime column.
    ValueError
        When ``every`` is not a period frequency, or no row has a time.

    References
    ----------
    .. [1] pandas documentation, "Time series / date functionality: period aliases".

    Examples
    --------
    >>> t = pd.Series(pd.to_datetime(["2026-01-05", "2026-01-06", "2026-01-20"]))
    >>> codes, labels, starts = assign_periods(t, "1W", "t")
    >>> codes.tolist(), labels[0]
    ([0, 0, 2], '2026-01-05/2026-01-11')
    """
    dtype = times.dtype
    if not (isinstance(dtype, pd.DatetimeTZDtype) or getattr(dtype, "kind", "") == "M"):
        hint = " (text: convert it with pandas.to_datetime first)" if dtype == object or \
            pd.api.types.is_string_dtype(dtype) else ""
        raise TypeError(f"time column {name!r} is not a datetime column (dtype {dtype}){hint}: "
                        "drift_over cuts the rows into periods of a datetime64 column")
    bad = (f"every={every!r} is not a pandas period frequency (e.g. '1D', '1W', '2W', '1M', "
           "'1Q', '1Y')")
    if not isinstance(every, str) or not every:
        raise ValueError(bad)
    match = re.fullmatch(r"\s*(\d*)\s*([A-Za-z][A-Za-z-]*)\s*", every)
    if match is None or (match.group(1) and int(match.group(1)) < 1):
        raise ValueError(bad)
    step, unit = int(match.group(1) or 1), match.group(2)
    local = times.dt.tz_localize(None) if isinstance(dtype, pd.DatetimeTZDtype) else times
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", UserWarning)
            per = local.dt.to_period(unit)
    except (ValueError, TypeError, AttributeError) as err:
        raise ValueError(f"{bad}: {err}") from None
    valid = per.notna().to_numpy()
    if not valid.any():
        raise ValueError(f"time column {name!r} has no times: there are no periods to compare")
    ordinals = np.asarray(per.array.asi8, dtype=np.int64)
    first, last = int(ordinals[valid].min()), int(ordinals[valid].max())
    codes = np.where(valid, (ordinals - first) // step, -1)
    base = pd.Period(per[valid].min(), freq=per.dt.freq)
    labels, starts = [], []
    for g in range((last - first) // step + 1):
        lo, hi = base + g * step, base + g * step + (step - 1)
        labels.append(str(lo) if step == 1 else f"{lo.start_time.date()}/{hi.end_time.date()}")
        starts.append(lo.start_time)
    return codes, labels, starts


def drift_over_table(frame_columns: dict, time_codes: np.ndarray, labels: list, starts: list, *,
                     reference, encoding: dict, pseudocount: float = 0.5, base=2, n_perm: int = 999,
                     seed=0, level: float = TEST_LEVEL) -> list[dict]:
    """Rows of the drift-over-time table (see :meth:`ProfileSession.drift_over`).

    Parameters
    ----------
    frame_columns : dict of str -> pandas.Series
        The columns to watch (the time column left out), rows with a time only.
    time_codes : numpy.ndarray
        Period code ``0 .. P-1`` of each row (from :func:`assign_periods`).
    labels, starts : list
        Label and start of each of the P periods (from :func:`assign_periods`).
    reference : {"first", "previous"} or dict of str -> pandas.Series
        The reference mode, or the reference frame's columns (same keys).
    encoding : dict of str -> tuple
        ``(bins, strategy, missing, max_categories)`` per key.
    pseudocount, base, n_perm, seed, level
        As in :func:`infoscope.frame.drift.drift_table`.

    Returns
    -------
    list of dict
        One dict per (period, column) with the keys of :data:`DRIFT_OVER_COLUMNS`.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).
    .. [2] Benjamini, Y., & Hochberg, Y. (1995). Journal of the Royal Statistical
       Society B, 57(1), 289-300.

    Examples
    --------
    >>> t = pd.Series(pd.date_range("2026-01-05", periods=28, freq="D"))
    >>> codes, labels, starts = assign_periods(t, "1W", "t")
    >>> rows = drift_over_table({"c": pd.Series(list("ab") * 14)}, codes, labels, starts,
    ...                         reference="first", encoding={"c": (16, "quantile", "drop", 64)})
    >>> [(r["period"][:10], r["flag"]) for r in rows]
    [('2026-01-12', 'stable'), ('2026-01-19', 'stable'), ('2026-01-26', 'stable')]
    """
    from infoscope.encode.encoded import codes_dtype
    from infoscope.engine.counting import count_chunk, finalize
    from infoscope.estimators._checks import log_base
    from infoscope.frame.drift import (TIME_AXIS_SHARE, align_to_reference, column_seed,
                                       counts_row, finish_drift_rows)

    ln_base = log_base(base)
    n_periods = len(labels)
    rows_per_period = np.bincount(time_codes, minlength=n_periods)
    mode = reference if isinstance(reference, str) else "frame"
    first = int(np.flatnonzero(rows_per_period)[0])
    in_first = time_codes == first
    alphabets, full_codes, new_rows = [], [], []
    for key, values in frame_columns.items():
        if mode == "frame":
            al = align_to_reference(values, reference[key], key, encoding[key])
            codes, new = al.current_codes, al.current_new
        else:
            rest = values[~in_first]
            al = align_to_reference(rest, values[in_first], key, encoding[key])
            codes = np.full(len(values), al.k, dtype=np.int64)
            new = np.zeros(len(values), dtype=bool)
            if al.compared:
                codes[in_first] = al.reference_codes
                codes[~in_first] = al.current_codes
                if al.current_new is not None:
                    new[~in_first] = al.current_new
        alphabets.append(al)
        full_codes.append(codes if al.compared else np.zeros(len(values), dtype=np.int64))
        new_rows.append(new if al.compared else None)
    # one pass of the engine: (period, column) tables of every column at once
    ks = [n_periods] + [max(al.k, 1) for al in alphabets]
    block = [np.ascontiguousarray(time_codes, dtype=codes_dtype(n_periods))]
    block += [np.ascontiguousarray(np.minimum(c, k), dtype=codes_dtype(k)) for c, k in zip(full_codes, ks[1:])]
    tables = finalize(count_chunk(block, ks, [(0, j + 1) for j in range(len(alphabets))]))

    empty = [labels[p] for p in range(n_periods) if rows_per_period[p] == 0]
    if empty:
        warn_user(f"{len(empty)} of {n_periods} period(s) have no rows: "
                      + ", ".join(empty[:6]) + (", ..." if len(empty) > 6 else "")
                      + " (their rows in the table are NaN with an empty flag)", DataQualityWarning)
    out = []
    previous = first
    for p in range(n_periods):
        if mode == "first" and p == first or mode == "previous" and p == first:
            continue
        ref_period = first if mode == "first" else previous
        period_rows = []
        for j, al in enumerate(alphabets):
            table = tables[(0, j + 1)]
            if mode == "frame":
                ref_counts = al.counts("reference") if al.compared else None
                ref_label = "frame"
            else:
                ref_counts = table[ref_period]
                ref_label = labels[ref_period]
            cur_counts = table[p]
            present = int(cur_counts.sum()) if al.compared else 0
            new_share = math.nan
            if al.compared and mode != "previous" and new_rows[j] is not None and present:
                new_share = float(np.count_nonzero(new_rows[j] & (time_codes == p)) / present)
            row = counts_row(al, ref_counts, cur_counts, new_share=new_share,
                             pseudocount=pseudocount, ln_base=ln_base, n_perm=n_perm,
                             seed=column_seed(seed, f"{al.name}@{labels[p]}"),
                             refine="id_like" not in al.reference_flags)
            if row["p_value"] == row["p_value"]:
                if "id_like" in al.reference_flags:
                    row["flag"] = "id_like"
                elif al.kind == "datetime" and new_share == new_share and new_share >= TIME_AXIS_SHARE:
                    row["flag"] = "time_axis"
            row = {"period": labels[p], "start": starts[p],
                   "reference": ref_label, **row}
            period_rows.append(row)
        finish_drift_rows(period_rows, level=level)
        out.extend(period_rows)
        if rows_per_period[p]:
            previous = p
    return out
