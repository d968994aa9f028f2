"""Out-of-core pass 1: the mergeable summary of a row batch for one round.

:func:`summarize` turns one batch into a :class:`Summary` for a :class:`Request`
(round 0: counts, ranges, the whole-number and monotonicity tests, exact value
counts up to a column's cap; later rounds: counts of key ranges for the radix
selection), :func:`merge` adds two summaries (associative; ``merge(a, b)`` means
a's rows come before b's).  The two-pass design is described in
:mod:`infoscope.encode.summaries`.
"""
from __future__ import annotations

import dataclasses
from collections.abc import Mapping

import numpy as np
import pandas as pd

from infoscope.encode.batch_specs import (
    ColumnSpec,
    OutOfCoreError,
    _instants,
    _keys,
    _numbers,
    _same_family,
    _time_unit,
)
from infoscope.encode.temporal import edges_of

__all__ = ["Request", "Summary", "summarize", "merge"]


# ----------------------------------------------------------------------------- summaries
@dataclasses.dataclass
class _Counts:
    """Distinct values (sorted, or text labels) with their counts; None beyond the cap."""

    values: object
    counts: np.ndarray


def _value_counts(v: np.ndarray) -> _Counts:
    values, counts = np.unique(v, return_counts=True)
    return _Counts(values, counts.astype(np.int64))


def _merge_counts(a: _Counts | None, b: _Counts | None, cap: int, text: bool) -> _Counts | None:
    if a is None or b is None:
        return None
    if text:
        s = pd.concat([pd.Series(a.counts, index=a.values), pd.Series(b.counts, index=b.values)])
        s = s.groupby(level=0, sort=False).sum()
        if len(s) > cap:
            return None
        return _Counts(s.index.to_numpy(dtype=object), s.to_numpy(dtype=np.int64))
    values = np.concatenate([a.values, b.values])
    counts = np.concatenate([a.counts, b.counts])
    u, inverse = np.unique(values, return_inverse=True)
    if u.size > cap:
        return None
    return _Counts(u, np.bincount(inverse.ravel(), weights=counts, minlength=u.size).astype(np.int64))


@dataclasses.dataclass
class _Column:
    """Round-0 summary of one column over some rows."""

    n: int = 0
    n_missing: int = 0
    n_pos_inf: int = 0
    n_neg_inf: int = 0
    n_valid: int = 0
    lo: object = None
    hi: object = None
    whole: bool = True
    first: object = None
    last: object = None
    increasing: bool = True
    decreasing: bool = True
    outside: int = 0
    counts: _Counts | None = None  # exact value counts (None: beyond the cap)


def _summarize_column(series: pd.Series, spec: ColumnSpec) -> _Column:
    _same_family(series, spec)
    n = len(series)
    fam = spec.family
    if fam in ("boolean", "categorical"):
        if fam == "boolean":
            na = series.isna().to_numpy(dtype=bool)
            x = series.to_numpy(dtype=bool, na_value=False)
            counts = np.bincount(x[~na].astype(np.intp), minlength=2).astype(np.int64)
        else:
            codes = series.cat.codes.to_numpy()
            na = codes < 0
            counts = np.bincount(codes[~na].astype(np.intp), minlength=len(series.cat.categories)).astype(np.int64)
        n_missing = int(np.count_nonzero(na))
        return _Column(n=n, n_missing=n_missing, n_valid=n - n_missing,
                       counts=_Counts(np.arange(counts.size), counts))
    if fam == "text":
        if isinstance(series.dtype, pd.CategoricalDtype):
            codes = series.cat.codes.to_numpy()
            na = codes < 0
            c = np.bincount(codes[~na].astype(np.intp), minlength=len(series.cat.categories))
            present = c > 0
            labels = series.cat.categories.to_numpy(dtype=object)[present]
            vc = _Counts(labels, c[present].astype(np.int64))
        else:
            na = series.isna().to_numpy(dtype=bool)
            inferred = pd.api.types.infer_dtype(series, skipna=True)
            if inferred not in ("string", "empty"):
                raise OutOfCoreError(
                    f"column {spec.name!r}: holds values of type {inferred!r} in a text column; out of core a "
                    "text column must hold text only (cast it in the source, or profile a sample with sample=)")
            s = series.value_counts(dropna=True, sort=False)
            vc = _Counts(s.index.to_numpy(dtype=object), s.to_numpy(dtype=np.int64))
        n_missing = int(np.count_nonzero(na))
        return _Column(n=n, n_missing=n_missing, n_valid=n - n_missing,
                       counts=vc if len(vc.counts) <= spec.cap else None)
    if fam in ("datetime", "timedelta"):
        v, na = _instants(series)
        n_pos = n_neg = 0
    else:
        v, na, n_pos, n_neg = _numbers(series, spec)
    valid = v[~na] if na.any() else v
    out = _Column(n=n, n_missing=int(np.count_nonzero(na)), n_pos_inf=n_pos, n_neg_inf=n_neg, n_valid=int(valid.size))
    if valid.size == 0:
        out.counts = _Counts(valid[:0].copy(), np.zeros(0, np.int64))
        return out
    out.lo, out.hi = valid.min(), valid.max()
    if fam == "float":
        out.whole = bool(np.all(np.floor(valid) == valid))
    if fam in ("integer", "float"):
        out.first, out.last = valid[0], valid[-1]
        out.increasing = bool(np.all(valid[1:] > valid[:-1]))
        out.decreasing = bool(np.all(valid[1:] < valid[:-1]))
    if isinstance(spec.bins, np.ndarray):
        if fam in ("datetime", "timedelta"):
            if spec.bins.dtype.kind == ("m" if fam == "timedelta" else "M"):
                e = edges_of(spec.bins, _time_unit(spec))
                out.outside = int(np.count_nonzero(valid < e[0]) + np.count_nonzero(valid > e[-1]))
        elif spec.bins.dtype.kind not in "mM":
            e = spec.bins
            out.outside = int(np.count_nonzero(valid < e[0]) + np.count_nonzero(valid > e[-1]))
    vc = _value_counts(valid)
    out.counts = vc if vc.values.size <= spec.cap else None
    return out


def _merge_column(a: _Column, b: _Column, spec: ColumnSpec) -> _Column:
    if a.n_valid == 0 or b.n_valid == 0:
        base, other = (b, a) if a.n_valid == 0 else (a, b)
        out = dataclasses.replace(base)
        out.n, out.n_missing = a.n + b.n, a.n_missing + b.n_missing
        out.n_pos_inf, out.n_neg_inf = a.n_pos_inf + b.n_pos_inf, a.n_neg_inf + b.n_neg_inf
        out.outside = a.outside + b.outside
        if spec.family in ("boolean", "categorical"):
            out.counts = _Counts(base.counts.values, a.counts.counts + b.counts.counts)
        elif base.counts is not None and other.counts is not None and spec.family == "text":
            out.counts = _merge_counts(a.counts, b.counts, spec.cap, True)
        return out
    out = _Column(
        n=a.n + b.n, n_missing=a.n_missing + b.n_missing, n_pos_inf=a.n_pos_inf + b.n_pos_inf,
        n_neg_inf=a.n_neg_inf + b.n_neg_inf, n_valid=a.n_valid + b.n_valid,
        lo=None if a.lo is None else min(a.lo, b.lo), hi=None if a.hi is None else max(a.hi, b.hi),
        whole=a.whole and b.whole, first=a.first, last=b.last,
        increasing=a.increasing and b.increasing and (a.last is None or a.last < b.first),
        decreasing=a.decreasing and b.decreasing and (a.last is None or a.last > b.first),
        outside=a.outside + b.outside,
    )
    if spec.family in ("boolean", "categorical"):
        out.counts = _Counts(a.counts.values, a.counts.counts + b.counts.counts)
    else:
        out.counts = _merge_counts(a.counts, b.counts, spec.cap, spec.family == "text")
    return out


@dataclasses.dataclass(frozen=True)
class Request:
    """What a pass-1 round asks of every batch: which columns, and for selection rounds which key ranges.

    Attributes
    ----------
    round : int
        0 for the first round (counts, ranges, value counts), then selection rounds.
    specs : tuple of ColumnSpec
        The columns this round reads (a reader can project to :attr:`columns`).
    ranges : dict
        Selection rounds: column key -> tuple of ``(lo_key, hi_key, buckets)``
        (``buckets`` 0: collect the values of ``[lo_key, hi_key)``).
    """

    round: int
    specs: tuple
    ranges: dict = dataclasses.field(default_factory=dict)

    @property
    def columns(self) -> list:
        """The column keys a batch must hold for this round."""
        return [s.name for s in self.specs]


@dataclasses.dataclass
class Summary:
    """The merged summary of some rows for one :class:`Request` (picklable, mergeable)."""

    round: int
    columns: dict
    rows: int = 0


def _range_summary(keys: np.ndarray, ranges) -> list:
    out = []
    for lo, hi, buckets in ranges:
        inside = keys[(keys >= np.uint64(lo)) & (keys < np.uint64(hi))] if keys.size else keys
        if buckets:
            width = -(-(hi - lo) // buckets)
            idx = ((inside - np.uint64(lo)) // np.uint64(width)).astype(np.intp)
            out.append(np.bincount(idx, minlength=buckets).astype(np.int64))
        else:
            u, c = np.unique(inside, return_counts=True)
            out.append((u, c.astype(np.int64)))
    return out


def summarize(batch: pd.DataFrame, request: Request) -> Summary:
    """Summarise one row batch for one pass-1 round.

    Parameters
    ----------
    batch : pandas.DataFrame
        Rows of the source holding at least ``request.columns`` (by key), with
        the dtypes the specs were made from.
    request : Request
        From :meth:`Pass1.request`.

    Returns
    -------
    Summary
        Add summaries of consecutive batches with :func:`merge`.

    Raises
    ------
    OutOfCoreError
        A column is missing from the batch or has another type than planned.

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.encode.summaries import Pass1, column_specs
    >>> frame = pd.DataFrame({"x": [1.0, 2.5, 4.0]})
    >>> p = Pass1(column_specs(frame.dtypes))
    >>> summarize(frame, p.request()).rows
    3
    """
    cols = {}
    for spec in request.specs:
        if spec.name not in batch.columns:
            raise OutOfCoreError(f"column {spec.name!r}: not in this part of the source (a file without the column?)")
        series = batch[spec.name]
        if request.round == 0:
            cols[spec.name] = _summarize_column(series, spec)
            continue
        _same_family(series, spec)
        if spec.family in ("datetime", "timedelta"):
            v, na = _instants(series)
        else:
            v, na, _, _ = _numbers(series, spec)
        keys = _keys(v[~na] if na.any() else v)
        cols[spec.name] = _range_summary(keys, request.ranges[spec.name])
    return Summary(request.round, cols, len(batch))


def merge(a: Summary, b: Summary, specs: Mapping | None = None) -> Summary:
    """Add two summaries of the same round; ``a``'s rows come before ``b``'s.

    Parameters
    ----------
    a, b : Summary
        Summaries of disjoint rows for the same :class:`Request`.
    specs : mapping, optional
        Column key -> :class:`ColumnSpec`; needed for round 0 (the caps), taken
        from the summaries' own record otherwise.

    Returns
    -------
    Summary

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.encode.summaries import Pass1, column_specs
    >>> frame = pd.DataFrame({"x": [1.0, 2.5, 4.0, 0.5]})
    >>> p = Pass1(column_specs(frame.dtypes))
    >>> req = p.request()
    >>> merge(summarize(frame[:2], req), summarize(frame[2:], req), p.specs).rows
    4
    """
    if a.round != b.round:
        raise ValueError(f"merge: summaries of rounds {a.round} and {b.round} cannot be added")
    cols = {}
    for name, ca in a.columns.items():
        cb = b.columns[name]
        if a.round == 0:
            spec = (specs or {}).get(name) if specs is not None else None
            if spec is None:
                raise ValueError("merge: round-0 summaries need specs= (the column specs of the Pass1)")
            cols[name] = _merge_column(ca, cb, spec)
        else:
            merged = []
            for ra, rb in zip(ca, cb):
                if isinstance(ra, np.ndarray):
                    merged.append(ra + rb)
                else:
                    u, inverse = np.unique(np.concatenate([ra[0], rb[0]]), return_inverse=True)
                    merged.append((u, np.bincount(inverse.ravel(), weights=np.concatenate([ra[1], rb[1]]),
                                                  minlength=u.size).astype(np.int64)))
            cols[name] = merged
    return Summary(a.round, cols, a.rows + b.rows)

