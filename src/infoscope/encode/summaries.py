"""Out-of-core encoding: mergeable summaries of row batches decide each column's alphabet.

The in-memory encoder (:func:`~infoscope.encode.encode_column`) decides a column's
alphabet from all its values at once.  A table that does not fit in memory is read
in row batches instead, twice:

* **pass 1** summarises every batch (:func:`summarize`), adds the summaries up
  (:func:`merge`: associative, so partitions of a cluster can be reduced in a tree;
  not commutative, ``merge(a, b)`` means a's rows come before b's) and decides each
  column's :class:`Alphabet` from the total (:class:`Pass1`) by the encoder's own
  rules (:mod:`.levels`, :mod:`.numeric`, :mod:`.temporal`, :mod:`.encoder` expose
  them as functions of counts);
* **pass 2** turns every batch into codes with the fixed alphabets
  (:func:`encode_batch`), which the engine counts chunk by chunk.

What a summary holds per column: rows, missing rows, infinities, the range, the
whole-number test, strict monotonicity in row order (the ID-like rule) and the
exact value counts while the column has at most :data:`LEVEL_CAP` distinct
values.  A binned column with more distinct values gets its quantile edges from
exact order statistics found by a radix selection over the order-preserving
integer keys of its values: each further round counts the values of the key
ranges that hold a wanted rank in :data:`SELECT_BUCKETS` sub-ranges, until a range
is small enough to collect its values (:data:`COLLECT_MAX`).  The order statistics
are exact, so the edges are numpy's to the bit (:func:`~infoscope.encode.binning.lerp_quantiles`).

Two facts need the whole column and come from the source itself (a
:class:`SourceQuery`, e.g. a DuckDB ``GROUP BY``): the levels of a text column
with more than :data:`LEVEL_CAP` distinct values (the kept levels, the distinct
count and the counts of counts), and the exact distinct count of a whole-number
column beyond the cap when the ID-like rule depends on it.  Otherwise the distinct
count of a binned column beyond the cap is not counted: ``n_distinct`` then holds
the lower bound ``LEVEL_CAP + 1`` and :attr:`Alphabet.n_distinct_exact` is False
(no table, flag or label depends on it).
"""
from __future__ import annotations

import dataclasses
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd

from infoscope.encode import binning
from infoscope.encode.checks import _check_settings
from infoscope.encode.drafts import (
    DEFAULT_CATEGORICAL_THRESHOLD,
    HEAVY_TAIL_INDEX,
    HEAVY_TAIL_MIN_ROWS,
    ID_LIKE_MIN_ROWS,
    _format_numbers,
    _is_id_name,
    _Notes,
)
from infoscope.encode.encoded import EncodedColumn, MISSING_LABEL, OTHER_LABEL, codes_dtype
from infoscope.encode.encoder import _column_flags
from infoscope.encode.levels import _distinct_labels, _fold_message, _fold_room, _level_alphabet, _reserve
from infoscope.encode.numeric import (
    _TAIL_PROBS,
    _id_like_rule,
    _infinite_note,
    _integer_bin_labels,
    _integer_edges,
    _integer_quantile_ranks,
    _outside_note,
    _tail_index_of,
    _value_edges,
)
from infoscope.encode.order_stats import _keys as _float_keys
from infoscope.encode.temporal import _time_bins, _time_texts, edges_of
from infoscope.encode.text import _cell_texts

__all__ = [
    "LEVEL_CAP", "SELECT_BUCKETS", "COLLECT_MAX", "FAMILIES", "ColumnSpec", "column_specs", "Request",
    "Summary", "summarize", "merge", "SourceQuery", "Pass1", "Alphabet", "encode_batch", "family_of",
    "OutOfCoreError",
]

#: Exact value counts are kept per column up to this many distinct values.
LEVEL_CAP = 1 << 15
#: Sub-ranges a selection round splits each key range into (the first round: 2**16).
SELECT_BUCKETS = 1 << 12
_FIRST_BUCKETS = 1 << 16
#: A key range with at most this many values is collected (its values with counts).
COLLECT_MAX = 1 << 15
#: The kinds of column a batch can hold, from its pandas dtype.
FAMILIES = ("boolean", "integer", "float", "text", "datetime", "timedelta", "categorical")
_RULES_IN_MEMORY = tuple(r for r in binning.BIN_RULES if r != "rows")


class OutOfCoreError(ValueError):
    """A source or a setting that the out-of-core path cannot handle; the message names the column."""


# ----------------------------------------------------------------------------- specs
def family_of(dtype) -> str | None:
    """The column family of a pandas dtype (None: not supported out of core)."""
    if isinstance(dtype, pd.CategoricalDtype):
        return "categorical"
    if isinstance(dtype, pd.BooleanDtype) or dtype == bool:
        return "boolean"
    if isinstance(dtype, pd.ArrowDtype):
        return None
    kind = getattr(dtype, "kind", None)
    if kind in "iu" and kind:
        return "integer"
    if kind == "f":
        return "float"
    if kind == "M":
        return "datetime"
    if kind == "m":
        return "timedelta"
    if isinstance(dtype, pd.StringDtype) or dtype == object:
        return "text"
    return None


@dataclasses.dataclass(frozen=True)
class ColumnSpec:
    """What pass 1 needs to know of one column before reading it: its family and encoding settings."""

    name: str
    family: str
    dtype: object  # integer: the numpy value dtype; datetime / timedelta: the pandas dtype
    bins: object
    strategy: str
    missing: str
    max_categories: int | None
    threshold: int
    settings: tuple
    categories: object = None  # categorical: the pandas CategoricalDtype

    @property
    def cap(self) -> int:
        """Distinct values kept exactly: at least :data:`LEVEL_CAP`, past the threshold, bins and folding."""
        extra = [self.threshold + 1, (self.max_categories or 0) + 1]
        if isinstance(self.bins, (int, np.integer)):
            extra.append(int(self.bins) + 1)
        return max(LEVEL_CAP, *extra)


def column_specs(dtypes: Mapping, *, bins="rows", strategy: str = "quantile", missing: str = "drop",
                 max_categories: int | None = 64, categorical_threshold: int | None = DEFAULT_CATEGORICAL_THRESHOLD,
                 column_bins: Mapping | None = None) -> dict:
    """The :class:`ColumnSpec` of every column, from the pandas dtypes its batches will have.

    Parameters
    ----------
    dtypes : mapping of str to dtype
        Column key -> pandas dtype of its batches (e.g. ``batch.dtypes`` of the first batch).
    bins, strategy, missing, max_categories, categorical_threshold
        As for :func:`~infoscope.encode_column`; ``bins`` must be an integer,
        ``"rows"`` or explicit edges (the width rules read every value at once).
    column_bins : mapping, optional
        Per-column ``bins`` overrides.

    Returns
    -------
    dict of str to ColumnSpec

    Raises
    ------
    OutOfCoreError
        A dtype that cannot be summarised, or a rule that needs all values in memory;
        the message names the column.

    Examples
    --------
    >>> import pandas as pd
    >>> specs = column_specs({"x": pd.Series([1.5]).dtype, "c": pd.Series(["a"]).dtype})
    >>> specs["x"].family, specs["c"].family
    ('float', 'text')
    """
    column_bins = dict(column_bins or {})
    out = {}
    for name, dtype in dtypes.items():
        family = family_of(dtype)
        if family is None:
            raise OutOfCoreError(
                f"column {name!r}: dtype {dtype} cannot be profiled out of core; cast it to a number, "
                "text or time type in the source, or profile a sample (sample=)")
        col_bins = column_bins.get(name, bins)
        if isinstance(col_bins, str) and col_bins.strip().lower() in (*_RULES_IN_MEMORY, "mdlp"):
            raise OutOfCoreError(
                f"column {name!r}: bins={col_bins!r} needs every value of the column in memory at once; "
                "out of core use a number of bins, 'rows' or explicit edges, or profile a sample (sample=)")
        b, s, m, mc, thr, settings = _check_settings(col_bins, strategy, missing, max_categories,
                                                     categorical_threshold)
        value_dtype = dtype
        if family == "integer":
            value_dtype = np.dtype(dtype.numpy_dtype if not isinstance(dtype, np.dtype) else dtype)
        out[name] = ColumnSpec(name, family, value_dtype, b, s, m, mc, thr, settings,
                               dtype if family == "categorical" else None)
    return out


# ----------------------------------------------------------------------------- values of a batch
def _same_family(series: pd.Series, spec: ColumnSpec) -> None:
    family = family_of(series.dtype)
    if spec.family == "text" and family == "categorical":
        return  # dictionary-encoded text (arrow) arrives as a Categorical: read as its values
    ok = family == spec.family
    if ok and spec.family == "integer":
        dt = series.dtype
        ok = np.dtype(dt.numpy_dtype if not isinstance(dt, np.dtype) else dt) == spec.dtype
    if ok and spec.family in ("datetime", "timedelta"):
        ok = series.dtype == spec.dtype
    if ok and spec.family == "categorical":
        ok = series.dtype == spec.categories
    if not ok:
        raise OutOfCoreError(
            f"column {spec.name!r}: a batch has dtype {series.dtype} but the column was planned as "
            f"{spec.dtype if spec.family != 'categorical' else spec.categories} ({spec.family}); "
            "the parts of the source disagree on its type")


def _numbers(series: pd.Series, spec: ColumnSpec):
    """``(values in the column's numeric domain, missing mask, n +inf, n -inf)`` of a number column."""
    dtype = series.dtype
    if spec.family == "integer":
        if isinstance(dtype, np.dtype):
            return series.to_numpy(), np.zeros(len(series), dtype=bool), 0, 0
        na = series.isna().to_numpy(dtype=bool)
        return series.to_numpy(dtype=spec.dtype, na_value=0), na, 0, 0
    if isinstance(dtype, np.dtype):
        x = series.to_numpy()
        if x.dtype != np.float64:
            x = x.astype(np.float64)
        missing = np.isnan(x)
    else:
        x = series.to_numpy(dtype=np.float64, na_value=np.nan)
        missing = np.isnan(x)
    inf = np.isinf(x)
    n_pos = n_neg = 0
    if inf.any():
        n_pos = int(np.count_nonzero(inf & (x > 0)))
        n_neg = int(np.count_nonzero(inf)) - n_pos
        missing = missing | inf
    return x, missing, n_pos, n_neg


def _instants(series: pd.Series) -> tuple[np.ndarray, np.ndarray]:
    """int64 instants (UTC for zoned datetimes) or durations, and the missing mask."""
    if getattr(series.dtype, "tz", None) is not None:
        series = series.dt.tz_convert("UTC").dt.tz_localize(None)
    arr = series.to_numpy()
    return arr.view(np.int64), np.isnat(arr)


def _time_unit(spec: ColumnSpec) -> str:
    dtype = spec.dtype
    if getattr(dtype, "tz", None) is not None:
        return dtype.unit
    return np.datetime_data(np.dtype(dtype))[0]


def _keys(v: np.ndarray) -> np.ndarray:
    """Order-preserving uint64 keys of numbers (floats by their bits, signed ints by a flipped sign bit)."""
    if v.dtype.kind == "f":
        return _float_keys(v)
    if v.dtype.kind == "u":
        return v.astype(np.uint64)
    return v.astype(np.int64).view(np.uint64) ^ np.uint64(1 << 63)


def _from_keys(keys: np.ndarray, like: np.dtype) -> np.ndarray:
    keys = np.asarray(keys, dtype=np.uint64)
    if like.kind == "f":
        negative = (keys >> np.uint64(63)) == 0
        bits = np.where(negative, ~keys, keys & np.uint64((1 << 63) - 1))
        return bits.view(np.float64)
    if like.kind == "u":
        return keys.astype(like)
    return (keys ^ np.uint64(1 << 63)).view(np.int64).astype(like)


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


# ----------------------------------------------------------------------------- order statistics
class _Selection:
    """The exact order statistics of one column beyond the cap: radix selection over key ranges."""

    def __init__(self, lo_key: int, hi_key: int, ranks):
        self.wanted = sorted(set(int(r) for r in ranks))
        self.found: dict[int, int] = {}
        # open ranges: (lo, hi, rows below lo, ranks inside)
        self.open = [(lo_key, hi_key + 1, 0, list(self.wanted))]
        self.first = True
        self._sizes: dict = {}

    def ranges(self):
        out = []
        for lo, hi, _, _ in self.open:
            n_keys = hi - lo
            buckets = 0 if not self.first and self._small(lo, hi) else min(_FIRST_BUCKETS if self.first
                                                                          else SELECT_BUCKETS, n_keys)
            out.append((lo, hi, 0 if n_keys == 1 else buckets))
        return tuple(out)

    def _small(self, lo, hi):
        return self._sizes.get((lo, hi), COLLECT_MAX + 1) <= COLLECT_MAX

    def absorb(self, results, ranges) -> None:
        new_open = []
        sizes = {}
        for (lo, hi, below, ranks), (_, _, buckets), res in zip(self.open, ranges, results):
            if not buckets:
                keys, counts = res
                cum = np.cumsum(counts)
                for r in ranks:
                    self.found[r] = int(keys[int(np.searchsorted(cum, r - below, side="right"))])
                continue
            width = -(-(hi - lo) // buckets)
            cum = np.cumsum(res)
            by_bucket: dict[int, list] = {}
            for r in ranks:
                by_bucket.setdefault(int(np.searchsorted(cum, r - below, side="right")), []).append(r)
            for j, rs in sorted(by_bucket.items()):
                b_lo = lo + j * width
                b_hi = min(hi, b_lo + width)
                b_below = below + (int(cum[j - 1]) if j else 0)
                new_open.append((b_lo, b_hi, b_below, rs))
                sizes[(b_lo, b_hi)] = int(res[j])
        self.open = new_open
        self._sizes = sizes
        self.first = False

    @property
    def done(self) -> bool:
        return not self.open


# ----------------------------------------------------------------------------- alphabets
@dataclasses.dataclass(frozen=True, eq=False)
class Alphabet:
    """A column's fixed alphabet and how to code a batch with it (picklable).

    Attributes
    ----------
    name, kind, k, labels, edges, flags, n, n_missing, n_distinct, level_counts, settings
        As in :class:`~infoscope.encode.EncodedColumn`.
    n_distinct_exact : bool
        False when ``n_distinct`` is the lower bound ``LEVEL_CAP + 1`` of a binned
        column whose distinct values were not counted (nothing depends on it).
    messages : tuple of str
        The warnings the in-memory encoder would give, naming the column.
    spec : ColumnSpec
    mapping : tuple
        How :func:`encode_batch` codes values: ``("sorted", values, new_index)``,
        ``("edges", edges)``, ``("offsets", origin, edge_offsets)``,
        ``("labels", kept labels, other_code)``, ``("index", new_index)``.
    """

    name: str
    kind: str
    k: int
    labels: tuple
    edges: np.ndarray | None
    flags: tuple
    n: int
    n_missing: int
    n_distinct: int
    level_counts: np.ndarray | None
    settings: tuple
    n_distinct_exact: bool
    messages: tuple
    spec: ColumnSpec
    mapping: tuple

    @property
    def missing_code(self) -> int:
        """Code of a missing row: ``k`` under ``missing="drop"``, else the ``"(missing)"`` symbol (or ``k``)."""
        if self.spec.missing == "category" and self.n_missing and self.labels and self.labels[-1] == MISSING_LABEL:
            return self.k - 1
        return self.k

    def column(self) -> EncodedColumn:
        """The :class:`~infoscope.encode.EncodedColumn` of this alphabet, without codes (an empty array)."""
        return EncodedColumn(
            name=self.name, codes=np.zeros(0, dtype=codes_dtype(self.k)), k=self.k, labels=self.labels,
            kind=self.kind, n=self.n, n_missing=self.n_missing, edges=self.edges, flags=self.flags,
            settings=self.settings, n_distinct=self.n_distinct, level_counts=self.level_counts)


@dataclasses.dataclass(frozen=True)
class SourceQuery:
    """A fact pass 1 asks of the source itself (one column at a time).

    ``kind="distinct"``: the exact number of distinct non-missing values (an int).
    ``kind="levels"``: the levels of a text column beyond the cap: answer with a
    dict ``{"n_distinct": int, "counts_of_counts": [(count, how many levels), ...],
    "top": [(label, count), ...]}`` where ``top`` holds at least every level whose
    count is at least that of the ``limit``-th most frequent level.
    """

    kind: str
    column: str
    limit: int = 0


class Pass1:
    """Pass 1 over a source: rounds of batch summaries, then each column's :class:`Alphabet`.

    Parameters
    ----------
    specs : mapping of str to ColumnSpec
        From :func:`column_specs`, in column order.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.encode import encode_column
    >>> frame = pd.DataFrame({"x": np.random.default_rng(0).normal(size=1000)})
    >>> p = Pass1(column_specs(frame.dtypes, bins=8))
    >>> while (req := p.request()) is not None:
    ...     parts = [summarize(frame.iloc[i:i + 300], req) for i in range(0, 1000, 300)]
    ...     total = parts[0]
    ...     for part in parts[1:]:
    ...         total = merge(total, part, p.specs)
    ...     p.absorb(total)
    >>> a = p.alphabets()["x"]
    >>> bool(np.array_equal(a.edges, encode_column(frame["x"], name="x", bins=8, cache=False).edges))
    True
    """

    def __init__(self, specs: Mapping):
        self.specs = dict(specs)
        self._round = 0
        self._columns: dict[str, _Column] | None = None
        self._select: dict[str, _Selection] = {}
        self._ranges: dict = {}
        self._answers: dict = {}
        self._rows = 0

    def request(self) -> Request | None:
        """The next round's :class:`Request`, or None when pass 1 is complete (ask :meth:`queries`)."""
        if self._columns is None:
            return Request(0, tuple(self.specs.values()))
        todo = {name: sel for name, sel in self._select.items() if not sel.done}
        if not todo:
            return None
        self._ranges = {name: sel.ranges() for name, sel in todo.items()}
        return Request(self._round, tuple(self.specs[name] for name in todo), dict(self._ranges))

    def absorb(self, summary: Summary) -> None:
        """Take the merged summary of every row for the current request."""
        if summary.round != self._round:
            raise ValueError(f"Pass1.absorb: expected a summary of round {self._round}, got round {summary.round}")
        if self._round == 0:
            self._columns = dict(summary.columns)
            self._rows = summary.rows
            self._plan_selections()
        else:
            for name, results in summary.columns.items():
                self._select[name].absorb(results, self._ranges[name])
        self._round += 1

    @property
    def rows(self) -> int:
        """Rows summarised in round 0."""
        return self._rows

    def _plan_selections(self) -> None:
        for name, spec in self.specs.items():
            c = self._columns[name]
            if spec.family not in ("integer", "float", "datetime", "timedelta") or c.counts is not None:
                continue
            ranks = self._ranks(spec, c)
            if ranks:
                lo_key, hi_key = (int(k) for k in _keys(np.array([c.lo, c.hi], dtype=np.asarray(c.lo).dtype)))
                self._select[name] = _Selection(lo_key, hi_key, ranks)

    def _ranks(self, spec: ColumnSpec, c: _Column) -> list:
        n = c.n_valid
        explicit = isinstance(spec.bins, np.ndarray)
        bins = binning.rows_bin_count(n) if isinstance(spec.bins, str) else spec.bins
        ranks: list[int] = []
        probs = []
        if spec.family == "integer" and (binning.beyond_float(c.lo, c.hi) or (explicit and spec.bins.dtype.kind in "iu")):
            if not explicit and spec.strategy == "quantile" and c.hi != c.lo:
                ranks += _integer_quantile_ranks(n, bins)
        elif not explicit and spec.strategy == "quantile":
            probs.append(np.linspace(0.0, 1.0, bins + 1))
        if spec.family in ("integer", "float") and n >= HEAVY_TAIL_MIN_ROWS:
            probs.append(np.asarray(_TAIL_PROBS))
        if probs:
            prev_i, next_i, _ = binning.quantile_ranks(n, np.concatenate(probs))
            ranks += prev_i.tolist() + next_i.tolist()
        return ranks

    def queries(self) -> list:
        """The :class:`SourceQuery` list the source must answer (:meth:`answer`) before :meth:`alphabets`."""
        if self._columns is None or self.request() is not None:
            return []
        out = []
        for name, spec in self.specs.items():
            c = self._columns[name]
            if c.counts is not None or name in self._answers:
                continue
            if spec.family == "text":
                if spec.max_categories is None:
                    raise OutOfCoreError(
                        f"column {name!r}: more than {spec.cap:,} distinct values and max_categories=None; out "
                        "of core such a column must be folded: set max_categories, or profile a sample (sample=)")
                with_missing = spec.missing == "category" and c.n_missing > 0
                out.append(SourceQuery("levels", name, _fold_room(name, spec.max_categories, with_missing)))
            elif spec.family in ("integer", "float") and self._needs_distinct(spec, c):
                out.append(SourceQuery("distinct", name))
        return out

    def _needs_distinct(self, spec: ColumnSpec, c: _Column) -> bool:
        integral = spec.family == "integer" or c.whole
        if not integral or c.increasing or c.decreasing or c.n_valid < ID_LIKE_MIN_ROWS:
            return False
        span = (int(c.hi) - int(c.lo) + 1) if spec.family == "integer" else float(c.hi) - float(c.lo) + 1
        return _is_id_name(spec.name) or span <= 2 * c.n_valid

    def answer(self, query: SourceQuery, result) -> None:
        """Record the source's answer to one :class:`SourceQuery`."""
        self._answers[query.column] = result

    def alphabets(self) -> dict:
        """Every column's :class:`Alphabet`, in column order.

        Raises
        ------
        RuntimeError
            Rounds or source queries are still open.
        """
        if self.request() is not None:
            raise RuntimeError("Pass1.alphabets: rounds are still open (call request / absorb until None)")
        missing = [q for q in self.queries() if q.column not in self._answers]
        if missing:
            raise RuntimeError(f"Pass1.alphabets: the source has not answered {missing}")
        return {name: self._alphabet(spec) for name, spec in self.specs.items()}

    # ------------------------------------------------------------------ decisions
    def _stat(self, name: str, c: _Column, dtype):
        """``at(ranks) -> values`` (the column's dtype) of the order statistics of a column."""
        if c.counts is not None:
            values, cum = c.counts.values, np.cumsum(c.counts.counts)

            def at(ranks):
                return values[np.searchsorted(cum, np.asarray(ranks, dtype=np.int64), side="right")]
            return at
        found = self._select[name].found if name in self._select else {}

        def at(ranks):
            keys = np.array([found[int(r)] for r in np.asarray(ranks).ravel()], dtype=np.uint64)
            return _from_keys(keys, np.dtype(dtype)).reshape(np.shape(ranks))
        return at

    def _alphabet(self, spec: ColumnSpec) -> Alphabet:
        c = self._columns[spec.name]
        notes = _Notes(spec.name)
        exact = True
        fam = spec.family
        if fam in ("boolean", "categorical", "text"):
            kind, k, labels, level_counts, n_distinct, mapping = self._levels(spec, c, notes)
            edges = None
        elif fam in ("integer", "float"):
            kind, k, labels, edges, level_counts, n_distinct, exact, mapping = self._numeric(spec, c, notes)
        else:
            kind, k, labels, edges, level_counts, n_distinct, exact, mapping = self._temporal(spec, c, notes)
        flags = _column_flags(notes.flags, kind, c.n, c.n_missing, n_distinct)
        if isinstance(edges, np.ndarray):
            edges.setflags(write=False)
        return Alphabet(spec.name, kind, int(k), tuple(labels), edges, flags, c.n, c.n_missing, int(n_distinct),
                        level_counts, spec.settings, exact, tuple(notes.messages), spec, mapping)

    def _finish_levels(self, spec, c, labels, counts, natural, notes, values):
        new_index, k, out_labels, level_counts = _level_alphabet(labels, counts, natural, c.n_missing, notes,
                                                                 spec.missing, spec.max_categories)
        return k, out_labels, level_counts, new_index

    def _levels(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        if spec.family == "boolean":
            counts = c.counts.counts
            k, labels, lc, new_index = self._finish_levels(spec, c, ["False", "True"], counts, True, notes, None)
            return "boolean", k, labels, lc, int(np.count_nonzero(counts)), ("index", new_index)
        if spec.family == "categorical":
            cats = spec.categories.categories
            if cats.dtype.kind in "iuf":
                cat_labels = _format_numbers(cats.to_numpy())
            elif cats.dtype.kind in "mM":
                cat_labels = [str(x) for x in cats]
            else:
                cat_labels = list(_cell_texts(cats.to_numpy(dtype=object), notes))
            counts = c.counts.counts
            k, labels, lc, new_index = self._finish_levels(spec, c, cat_labels, counts, bool(spec.categories.ordered),
                                                           notes, None)
            return "categorical", k, labels, lc, int(np.count_nonzero(counts)), ("index", new_index)
        if c.counts is not None:
            values, counts = c.counts.values, c.counts.counts
            k, labels, lc, new_index = self._finish_levels(spec, c, values, counts, False, notes, values)
            return "text", k, labels, lc, int(values.size), ("labels", pd.Index(values, dtype=object),
                                                            new_index[:-1], None)
        return self._text_beyond_cap(spec, c, notes)

    def _text_beyond_cap(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        ans = self._answers[spec.name]
        n_distinct = int(ans["n_distinct"])
        with_missing = spec.missing == "category" and c.n_missing > 0
        room = _fold_room(spec.name, spec.max_categories, with_missing)
        top = [(str(label), int(count)) for label, count in ans["top"]]
        # the encoder's order: most frequent first, ties in label order (the labels as shown)
        ranked = sorted(top, key=lambda t: (-t[1], _reserve(t[0])))
        kept = ranked[:room]
        if len(kept) < room or n_distinct + with_missing <= spec.max_categories:
            raise OutOfCoreError(f"column {spec.name!r}: the source's level counts are incomplete "
                                 f"({len(top)} levels for {n_distinct} distinct values)")
        rows_folded = c.n_valid - sum(count for _, count in kept)
        notes.flags.add("levels_folded")
        notes.warn(_fold_message(n_distinct - room, n_distinct, rows_folded, spec.max_categories))
        out_labels = [_reserve(label) for label, _ in kept] + [OTHER_LABEL]
        if with_missing:
            out_labels.append(MISSING_LABEL)
        cc = sorted(((int(a), int(b)) for a, b in ans["counts_of_counts"]), reverse=True)
        level_counts = np.repeat(np.array([a for a, _ in cc], dtype=np.int64), [b for _, b in cc])
        level_counts.setflags(write=False)
        labels = _distinct_labels(out_labels)
        index = pd.Index([label for label, _ in kept], dtype=object)
        return ("text", len(labels), labels, level_counts, n_distinct,
                ("labels", index, np.arange(room, dtype=np.int64), room))

    def _numeric(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        n_valid = c.n_valid
        if c.n_pos_inf + c.n_neg_inf:
            _infinite_note(notes, c.n_pos_inf + c.n_neg_inf, c.n_pos_inf)
        bins = spec.bins
        explicit = isinstance(bins, np.ndarray)
        if explicit and bins.dtype.kind in "mM":
            raise TypeError(f"column {spec.name!r}: datetime bin edges cannot bin a numeric column")
        dtype = spec.dtype if spec.family == "integer" else np.dtype(np.float64)
        known = c.counts is not None
        exact = True
        if known:
            n_distinct = int(c.counts.values.size)
        elif c.increasing or c.decreasing:
            n_distinct = n_valid  # strictly monotone: every value differs
        elif spec.name in self._answers:
            n_distinct = int(self._answers[spec.name])
        else:
            n_distinct, exact = self.specs[spec.name].cap + 1, False
        integral = spec.family == "integer" or (n_valid > 0 and c.whole)
        if integral and n_distinct and _id_like_rule(n_valid, n_distinct, c.lo, c.hi,
                                                     c.increasing or c.decreasing, spec.name):
            notes.flags.add("id_like")
        if n_distinct == 0 or (not explicit and integral and n_distinct <= spec.threshold):
            values, counts = c.counts.values, c.counts.counts
            labels = _format_numbers(values) if n_distinct else []
            kind = "integer_categories" if n_distinct else "numeric"
            k, out_labels, lc, new_index = self._finish_levels(spec, c, labels, counts, True, notes, values)
            return kind, k, out_labels, None, lc, n_distinct, True, ("sorted", values, new_index[:-1])
        n_bins = binning.rows_bin_count(n_valid) if isinstance(bins, str) else bins
        at = self._stat(spec.name, c, dtype)
        tail = n_valid >= HEAVY_TAIL_MIN_ROWS
        if spec.family == "integer" and (binning.beyond_float(c.lo, c.hi) or (explicit and bins.dtype.kind in "iu")):
            origin, edges_off = _integer_edges(n_valid, int(c.lo), int(c.hi), lambda i: int(at([i])[0]), n_bins,
                                               spec.strategy, notes, c.outside)
            if tail:
                prev_i, next_i, gamma = binning.quantile_ranks(n_valid, _TAIL_PROBS)
                a = np.array([float(int(x) - origin) for x in at(prev_i)])
                b = np.array([float(int(x) - origin) for x in at(next_i)])
                if _tail_index_of(*binning.lerp_quantiles(a, b, gamma)) > HEAVY_TAIL_INDEX:
                    notes.flags.add("heavy_tail")
            edges, labels = _integer_bin_labels(origin, edges_off, bins, dtype)
            k = len(labels)
            labels, k, kind = self._bin_missing(spec, c, labels)
            return "numeric", k, labels, edges, None, n_distinct, exact, ("offsets", origin, edges_off)
        edges = _value_edges(c.counts.values, n_valid, n_bins, spec.strategy) if (not explicit and known) else None
        lo, hi = np.asarray(c.lo, dtype=dtype)[()], np.asarray(c.hi, dtype=dtype)[()]
        if edges is None:
            if explicit:
                edges = bins.astype(np.float64)
            else:
                def quantile(probs):
                    prev_i, next_i, gamma = binning.quantile_ranks(n_valid, probs)
                    return binning.lerp_quantiles(at(prev_i), at(next_i), gamma)
                edges, note = binning._edges(np.array([lo, hi], dtype=dtype), n_bins, spec.strategy,
                                             quantile=quantile, lo_hi=(lo, hi))
                if note is not None:
                    notes.warn(note)
        if explicit:
            _outside_note(notes, c.outside, f"{edges[0]:g}", f"{edges[-1]:g}")
        if tail:
            prev_i, next_i, gamma = binning.quantile_ranks(n_valid, _TAIL_PROBS)
            if _tail_index_of(*binning.lerp_quantiles(at(prev_i), at(next_i), gamma)) > HEAVY_TAIL_INDEX:
                notes.flags.add("heavy_tail")
        labels = list(binning.interval_labels(binning.format_edges(edges)))
        labels, k, _ = self._bin_missing(spec, c, labels)
        return "numeric", k, labels, np.asarray(edges, dtype=np.float64), None, n_distinct, exact, ("edges", edges)

    @staticmethod
    def _bin_missing(spec, c, labels):
        labels = list(labels)
        if spec.missing == "category" and c.n_missing:
            labels.append(MISSING_LABEL)
        return _distinct_labels(labels), len(labels), "numeric"

    def _temporal(self, spec: ColumnSpec, c: _Column, notes: _Notes):
        kind = spec.family
        unit = _time_unit(spec)
        tz = getattr(spec.dtype, "tz", None)
        bins = spec.bins
        explicit = isinstance(bins, np.ndarray)
        known = c.counts is not None
        n_distinct, exact = (int(c.counts.values.size), True) if known else (spec.cap + 1, False)
        if known and (n_distinct <= 1 or (not explicit and n_distinct <= spec.threshold)):
            values, counts = c.counts.values, c.counts.counts
            labels = _time_texts(values, unit, kind, tz)
            k, out_labels, lc, new_index = self._finish_levels(spec, c, labels, counts, True, notes, values)
            return kind, k, out_labels, None, lc, n_distinct, True, ("sorted", values, new_index[:-1])
        n_bins = binning.rows_bin_count(c.n_valid) if isinstance(bins, str) else bins
        at = self._stat(spec.name, c, np.int64)

        def quantile(probs):
            prev_i, next_i, gamma = binning.quantile_ranks(c.n_valid, probs)
            return binning.lerp_quantiles(at(prev_i), at(next_i), gamma)
        ends = np.array([c.lo, c.hi], dtype=np.int64)
        edges, labels, edge_arr = _time_bins(int(c.lo), int(c.hi), ends, n_bins, spec.strategy, notes, unit, kind,
                                             tz, c.outside, quantile=quantile)
        labels, k, _ = self._bin_missing(spec, c, labels)
        return kind, k, labels, edge_arr, None, n_distinct, exact, ("edges", edges)


# ----------------------------------------------------------------------------- pass 2
def _code_values(a: Alphabet, v: np.ndarray) -> np.ndarray:
    how = a.mapping[0]
    if how == "edges":
        return binning.assign_bins(v, a.mapping[1])
    if how == "offsets":
        origin, edges_off = a.mapping[1], a.mapping[2]
        return np.searchsorted(edges_off[1:-1], v.astype(np.uint64) - np.uint64(origin % 2**64), side="right")
    values, new_index = a.mapping[1], a.mapping[2]
    if v.size == 0:
        return np.zeros(0, dtype=np.int64)
    idx = np.searchsorted(values, v)
    idx = np.minimum(idx, max(values.size - 1, 0))
    if values.size == 0 or not np.array_equal(values[idx], v):
        raise OutOfCoreError(f"column {a.name!r}: a value was not seen in pass 1; did the source change "
                             "between the two passes?")
    return new_index[idx]


def encode_batch(batch: pd.DataFrame, alphabets: Sequence[Alphabet]) -> list:
    """Pass 2: the codes of one row batch under fixed alphabets.

    Parameters
    ----------
    batch : pandas.DataFrame
        Rows holding every alphabet's column (by key), with the planned dtypes.
    alphabets : sequence of Alphabet
        From :meth:`Pass1.alphabets`, in the order the codes are wanted.

    Returns
    -------
    list of numpy.ndarray
        One code array per alphabet (``0 .. k-1``; ``k`` for a missing row under
        ``missing="drop"``), dtype :func:`~infoscope.encode.codes_dtype` of ``k``:
        the codes the in-memory encoder gives these rows.

    Raises
    ------
    OutOfCoreError
        A column missing from the batch, another type, or a value pass 1 did not see.

    Examples
    --------
    >>> import pandas as pd
    >>> frame = pd.DataFrame({"c": ["a", "b", "a", None]})
    >>> p = Pass1(column_specs(frame.dtypes))
    >>> p.absorb(summarize(frame, p.request()))
    >>> encode_batch(frame, [p.alphabets()["c"]])[0].tolist()
    [0, 1, 0, 2]
    """
    out = []
    for a in alphabets:
        spec = a.spec
        if spec.name not in batch.columns:
            raise OutOfCoreError(f"column {spec.name!r}: not in this part of the source")
        series = batch[spec.name]
        _same_family(series, spec)
        n = len(series)
        missing_code = a.missing_code
        dtype = codes_dtype(a.k)
        how = a.mapping[0]
        if how == "index":
            if spec.family == "boolean":
                na = series.isna().to_numpy(dtype=bool)
                raw = series.to_numpy(dtype=bool, na_value=False).astype(np.intp)
            else:
                raw = series.cat.codes.to_numpy().astype(np.intp)
                na = raw < 0
            new_index = a.mapping[1]
            codes = new_index.astype(dtype)[np.where(na, new_index.size - 1, raw)]
            out.append(np.ascontiguousarray(codes))
            continue
        if how == "labels":
            index, new_index, other = a.mapping[1], a.mapping[2], a.mapping[3]
            if isinstance(series.dtype, pd.CategoricalDtype):
                cats = index.get_indexer(series.cat.categories.to_numpy(dtype=object))
                raw_codes = series.cat.codes.to_numpy()
                na = raw_codes < 0
                idx = np.where(na, -1, cats[np.maximum(raw_codes, 0)]) if cats.size else np.full(n, -1)
            else:
                na = series.isna().to_numpy(dtype=bool)
                idx = index.get_indexer(series.to_numpy(dtype=object))
            unknown = (idx < 0) & ~na
            if unknown.any() and other is None:
                raise OutOfCoreError(f"column {spec.name!r}: a value was not seen in pass 1; did the source change "
                                     "between the two passes?")
            table = np.append(new_index, other if other is not None else 0).astype(dtype)
            codes = table[np.where(idx < 0, new_index.size, idx)]
            codes[na] = missing_code
            out.append(np.ascontiguousarray(codes, dtype=dtype))
            continue
        if spec.family in ("datetime", "timedelta"):
            v, na = _instants(series)
        else:
            v, na, _, _ = _numbers(series, spec)
        codes = np.full(n, missing_code, dtype=dtype)
        if na.any():
            codes[~na] = _code_values(a, v[~na])
        else:
            codes[:] = _code_values(a, v)
        out.append(codes)
    return out

