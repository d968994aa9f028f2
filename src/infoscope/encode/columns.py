"""Columns -> small integer codes: the :class:`EncodedColumn` every later layer reads.

One entry point, :func:`encode_column`, takes a column of any dtype (NumPy array,
list, pandas Series of a NumPy, nullable, string, categorical, datetime or object
dtype) and returns codes ``0 .. k-1`` for its symbols and ``k`` for missing rows
(under ``missing="drop"``).  The decisions it makes on the user's behalf are named
in the docstring, flagged on the result and, where they change what the numbers
mean (infinite values, mixed types, unhashable cells, folded levels, merged
quantile edges), announced with a :class:`~infoscope.DataQualityWarning` that names
the column.  The user's data are never modified.
"""
from __future__ import annotations

import dataclasses
import re
import warnings
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning
from infoscope.encode import binning
from infoscope.encode.cache import EncodingCache, content_key, default_cache

__all__ = [
    "EncodedColumn",
    "encode_column",
    "encode_frame",
    "column_keys",
    "codes_dtype",
    "KINDS",
    "FLAGS",
    "MISSING_LABEL",
    "OTHER_LABEL",
    "DEFAULT_CATEGORICAL_THRESHOLD",
    "ID_LIKE_SHARE",
    "ID_LIKE_MIN_ROWS",
    "MOSTLY_MISSING_SHARE",
    "HEAVY_TAIL_INDEX",
    "HEAVY_TAIL_MIN_ROWS",
    "tail_index",
]

KINDS = ("numeric", "integer_categories", "categorical", "boolean", "datetime", "timedelta", "text")
FLAGS = (
    "constant", "id_like", "mostly_missing", "sparse_cells", "heavy_tail",
    "levels_folded", "mixed_types", "infinite_values", "rare_levels", "exceeds_log_k",
)
MISSING_LABEL = "(missing)"
OTHER_LABEL = "(other)"

#: Numeric (and datetime / duration) columns with at most this many distinct values
#: are kept as categories rather than binned.  32 keeps the usual small codes whole:
#: flags (0/1), rating scales (5, 7, 10 or 11 points), months (12), hours (24) and
#: days of the month (31); binning such a column into 16 bins would split or merge
#: values arbitrarily (16 bins on a 0/1 column), while with more than 32 distinct
#: values the default 16 bins already merge neighbours.  Pass
#: ``categorical_threshold=0`` to always bin.
DEFAULT_CATEGORICAL_THRESHOLD = 32
#: A text / categorical / integer column is ID-like when at least this share of its
#: non-missing values are distinct ...
ID_LIKE_SHARE = 0.95
#: ... and it has at least this many non-missing values (below that, all-distinct
#: values happen by chance in any column).
ID_LIKE_MIN_ROWS = 20
#: ``mostly_missing`` when at least this share of the rows is missing (incl. ±inf).
MOSTLY_MISSING_SHARE = 0.5
#: ``heavy_tail`` when the tail index max(q999 - q50, q50 - q001) / (q75 - q25) of a
#: binned numeric column exceeds this.  Population values (scipy.stats ``ppf``):
#: normal 2.3, Student t with 3 dof 6.7, exponential 5.7, lognormal(sigma=1) 14.5,
#: Student t with 2 dof 13.7, Cauchy 159.  8 sits above the exponential, the usual
#: boundary between light and heavy tails.  Equal-width bins on such a column put
#: nearly every row into one bin.
HEAVY_TAIL_INDEX = 8.0
#: The tail index is only computed from this many finite values on.
HEAVY_TAIL_MIN_ROWS = 50

_ID_NAME_CAMEL = re.compile(r"[a-z0-9](Id|ID|Key|UUID)$")
_ID_NAME_PLAIN = re.compile(r"(^|[_\s.\-])(id|key|uuid|guid)$", re.IGNORECASE)


def codes_dtype(k: int) -> np.dtype:
    """Smallest unsigned dtype holding codes ``0 .. k`` (``k`` is the missing code).

    Parameters
    ----------
    k : int
        Alphabet size.

    Returns
    -------
    numpy.dtype
        ``uint8`` when ``k + 1 <= 256``, else ``uint16`` when ``k + 1 <= 65536``,
        else ``uint32``.

    References
    ----------
    .. [1] DEVELOPERS.md, "EncodedColumn".

    Examples
    --------
    >>> codes_dtype(255), codes_dtype(256)
    (dtype('uint8'), dtype('uint16'))
    """
    if k + 1 <= 2**8:
        return np.dtype(np.uint8)
    if k + 1 <= 2**16:
        return np.dtype(np.uint16)
    return np.dtype(np.uint32)


@dataclasses.dataclass(frozen=True, eq=False)
class EncodedColumn:
    """One column as small integer codes (the contract in DEVELOPERS.md).

    Attributes
    ----------
    name : str
        The key of the column (unique within a profile).
    codes : numpy.ndarray
        1-D ``uint8`` / ``uint16`` / ``uint32`` (smallest holding ``k``), C-contiguous
        and read-only.  ``0 .. k-1`` are symbols; ``k`` marks a missing row (only
        under ``missing="drop"``).
    k : int
        Alphabet size (unused categories and the missing symbol included).
    labels : tuple of str
        Length ``k``; bins read ``"[a, b)"`` (the last ``"[a, b]"``).
    kind : str
        One of :data:`KINDS`.
    n, n_missing : int
        Rows, and rows missing (NaN, None, NA, NaT, ±inf).
    edges : numpy.ndarray or None
        Bin edges of a binned column (float64; ``datetime64``/``timedelta64`` in the
        column's unit, UTC for zoned datetimes), else None.
    flags : tuple of str
        Names from :data:`FLAGS` that encoding can tell.
    settings : tuple
        The hashable encoding settings (``(content_key, settings)`` keys the cache).
    n_distinct : int
        Distinct non-missing values before binning or folding.
    level_counts : numpy.ndarray or None, default=None
        Only when levels were folded into ``"(other)"`` (flag ``levels_folded``):
        the rows of every distinct non-missing level *before* folding, int64,
        most frequent first (ties in the order the labels are kept), read-only; its length is
        ``n_distinct`` and its sum ``n - n_missing``.  An entropy computed from the
        folded codes undercounts a long-tailed or ID-like column (50,000 distinct
        IDs folded to 64 symbols read about 0.02 bits instead of about 15.6);
        these counts give the unfolded entropy.  None when nothing was folded and
        for binned columns (their codes are the intended symbols).  It is derived
        from the content and settings, so it is not part of ``settings``; the
        class compares by identity (``eq=False``), so it does not affect caching.
    """

    name: str
    codes: np.ndarray
    k: int
    labels: tuple
    kind: str
    n: int
    n_missing: int
    edges: np.ndarray | None
    flags: tuple
    settings: tuple
    n_distinct: int
    level_counts: np.ndarray | None = None

    @property
    def missing_code(self) -> int | None:
        """The code of a missing row: ``k`` under ``missing="drop"``, else the missing symbol or None."""
        if dict(self.settings).get("missing") == "drop":
            return self.k
        try:
            return self.labels.index(MISSING_LABEL)
        except ValueError:
            return None

    def counts(self) -> np.ndarray:
        """Rows per symbol, int64 of length ``k`` (missing rows under "drop" not counted)."""
        return np.bincount(self.codes, minlength=self.k + 1)[: self.k].astype(np.int64)

    def __repr__(self) -> str:
        flags = ", ".join(self.flags) or "none"
        return (
            f"EncodedColumn(name={self.name!r}, kind={self.kind!r}, k={self.k}, n={self.n}, "
            f"n_missing={self.n_missing}, n_distinct={self.n_distinct}, flags=[{flags}])"
        )


# --------------------------------------------------------------------------- settings


def _time_edges(bins):
    """Datetime-like edges (Timestamps, DatetimeIndex, zoned or not) as datetime64 (zoned: UTC)."""
    if isinstance(bins, (str, int, np.integer, float)) or (isinstance(bins, np.ndarray) and bins.dtype != object):
        return bins
    try:
        idx = pd.Index(bins)
    except (TypeError, ValueError):
        return bins
    if isinstance(idx.dtype, pd.DatetimeTZDtype):
        return idx.tz_convert("UTC").tz_localize(None).to_numpy()
    if idx.dtype.kind in "mM":
        return idx.to_numpy()
    return bins


def _check_settings(bins, strategy, missing, max_categories, categorical_threshold):
    bins = binning._check_bins(_time_edges(bins))
    strategy = binning._check_strategy(strategy)
    if not isinstance(missing, str) or missing not in ("drop", "category"):
        raise ValueError(f"missing={missing!r} is not valid; choose one of: 'drop', 'category'")
    if max_categories is not None:
        if isinstance(max_categories, bool) or not isinstance(max_categories, (int, np.integer)):
            raise TypeError(f"max_categories must be an integer or None, got {type(max_categories).__name__}")
        if max_categories < 2:
            raise ValueError(f"max_categories={max_categories} is invalid: it must be >= 2 (or None for no folding)")
        max_categories = int(max_categories)
    if categorical_threshold is None:
        categorical_threshold = DEFAULT_CATEGORICAL_THRESHOLD
    if isinstance(categorical_threshold, bool) or not isinstance(categorical_threshold, (int, np.integer)):
        raise TypeError(f"categorical_threshold must be an integer, got {type(categorical_threshold).__name__}")
    if categorical_threshold < 0:
        raise ValueError(f"categorical_threshold={categorical_threshold} is invalid: it must be >= 0")
    if isinstance(bins, np.ndarray):
        bins_key = ("edges", str(bins.dtype), tuple(bins.tolist()))
    else:
        bins_key = bins
    settings = (
        ("bins", bins_key),
        ("strategy", strategy),
        ("missing", missing),
        ("max_categories", max_categories),
        ("categorical_threshold", int(categorical_threshold)),
    )
    return bins, strategy, missing, max_categories, int(categorical_threshold), settings


# --------------------------------------------------------------------------- input


def _as_series(values, name: str) -> pd.Series:
    """A pandas Series over ``values`` without copying NumPy data (never written to)."""
    if isinstance(values, pd.Series):
        return values
    if isinstance(values, pd.DataFrame):
        raise ValueError(f"column {name!r}: expected one column, got a DataFrame with {values.shape[1]} columns")
    if isinstance(values, (pd.Index, pd.api.extensions.ExtensionArray)):
        return pd.Series(values, copy=False)
    if not isinstance(values, np.ndarray) and hasattr(values, "to_pandas"):
        # Polars Series, pyarrow (Chunked)Array
        converted = values.to_pandas()
        if isinstance(converted, pd.DataFrame):
            raise ValueError(f"column {name!r}: expected one column, got a table")
        return pd.Series(converted, copy=False)
    if isinstance(values, (str, bytes)) or np.isscalar(values) or values is None:
        raise TypeError(f"column {name!r}: expected a sequence of values, got a scalar {type(values).__name__}")
    if isinstance(values, (set, frozenset)):
        raise TypeError(
            f"column {name!r}: expected a sequence in row order, got a {type(values).__name__} "
            "(it has no row order); pass a list, an array or a Series"
        )
    if isinstance(values, Mapping):
        raise TypeError(
            f"column {name!r}: expected a sequence in row order, got a {type(values).__name__}; say "
            "whether its keys or its values are the rows: pass list(d.values()), list(d) or a Series"
        )
    if not isinstance(values, np.ndarray):
        # pandas infers a list's dtype cell by cell (numpy would turn [1, "1"] into
        # two equal strings, and nested lists into a 2-D array)
        try:
            return pd.Series(list(values), dtype=None)
        except TypeError:
            raise TypeError(f"column {name!r}: expected a sequence of values, got {type(values).__name__}") from None
    arr = values
    if arr.ndim != 1:
        raise ValueError(f"column {name!r}: expected a 1-D column, got shape {arr.shape}")
    if arr.dtype.kind in "US":
        arr = arr.astype(object)
    return pd.Series(arr, copy=False)


# --------------------------------------------------------------------------- drafts


@dataclasses.dataclass
class _Levels:
    """Values as level indices (``-1`` missing) before ordering, folding and the missing policy."""

    raw: np.ndarray
    labels: list
    natural: bool  # keep the given order (ordered values) instead of most-frequent-first
    kind: str
    n_distinct: int
    counts: np.ndarray | None = None  # rows per level, when the draft counted them already


@dataclasses.dataclass
class _Bins:
    raw: np.ndarray
    labels: list
    edges: np.ndarray
    kind: str
    n_distinct: int


class _Notes:
    """Warnings and flags collected while encoding one column."""

    def __init__(self, name: str) -> None:
        self.name = name
        self.flags: set[str] = set()
        self.messages: list[str] = []

    def warn(self, message: str) -> None:
        self.messages.append(f"column {self.name!r}: {message}")


def _format_numbers(values: np.ndarray) -> list[str]:
    if values.dtype.kind in "iu":
        return [str(int(v)) for v in values]
    return binning.format_edges(values)


def _sorted_distinct(s: np.ndarray) -> np.ndarray:
    if s.size == 0:
        return s
    keep = np.empty(s.size, dtype=bool)
    keep[0] = True
    np.not_equal(s[1:], s[:-1], out=keep[1:])
    return s[keep]


def _is_id_name(name: str) -> bool:
    return bool(_ID_NAME_PLAIN.search(name) or _ID_NAME_CAMEL.search(name))


def _integer_id_like(values: np.ndarray, sorted_distinct: np.ndarray, name: str) -> bool:
    """Whole-number values that look like a row identifier (see encode_column, Notes)."""
    n_valid = values.size
    if n_valid < ID_LIKE_MIN_ROWS or sorted_distinct.size < ID_LIKE_SHARE * n_valid:
        return False
    span = float(sorted_distinct[-1]) - float(sorted_distinct[0]) + 1
    dense = span <= 2 * sorted_distinct.size
    monotone = bool(np.all(values[1:] > values[:-1]) or np.all(values[1:] < values[:-1]))
    return dense or monotone or _is_id_name(name)


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
    q001, q25, q50, q75, q999 = binning.sorted_quantile(sorted_values, [0.001, 0.25, 0.5, 0.75, 0.999])
    iqr = float(q75) - float(q25)
    if iqr <= 0:
        return float("nan")
    return max(float(q999) - float(q50), float(q50) - float(q001)) / iqr


def _heavy_tail(s: np.ndarray) -> bool:
    # nan (zero IQR) compares False: no flag when the middle half is one value
    return s.size >= HEAVY_TAIL_MIN_ROWS and tail_index(s) > HEAVY_TAIL_INDEX


def _numeric(x: np.ndarray, na: np.ndarray | None, notes: _Notes, bins, strategy, threshold) -> _Levels | _Bins:
    """Float or integer values (``na``: mask of missing rows of a nullable dtype)."""
    n = x.size
    missing = np.zeros(n, dtype=bool) if na is None else na.copy()
    if x.dtype.kind == "f":
        missing |= np.isnan(x)
        inf = np.isinf(x)
        n_inf = int(np.count_nonzero(inf))
        if n_inf:
            n_pos = int(np.count_nonzero(inf & (x > 0)))
            notes.flags.add("infinite_values")
            notes.warn(
                f"{n_inf} infinite value(s) ({n_pos} +inf, {n_inf - n_pos} -inf) are treated as missing"
            )
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
                if _integer_id_like(v, distinct, notes.name):
                    notes.flags.add("id_like")
                return _Levels(raw, _format_numbers(distinct), True, "integer_categories", n_distinct)
    s = np.sort(v)
    distinct = _sorted_distinct(s)
    n_distinct = int(distinct.size)
    integral = x.dtype.kind in "iu" or (s.size > 0 and bool(np.all(np.floor(distinct) == distinct)))
    if integral and _integer_id_like(v, distinct, notes.name):
        notes.flags.add("id_like")
    if n_distinct == 0 or (not explicit and n_distinct <= threshold):
        raw = np.full(n, -1, dtype=np.int64)
        if n_distinct:
            raw[~missing] = np.searchsorted(distinct, v)
        kind = "integer_categories" if n_distinct else "numeric"
        return _Levels(raw, _format_numbers(distinct), True, kind, n_distinct)
    edges, note = binning._edges(s, bins, strategy, is_sorted=True)
    if note is not None:
        notes.warn(note)
    if explicit:
        outside = int(np.count_nonzero(s < edges[0]) + np.count_nonzero(s > edges[-1]))
        if outside:
            notes.warn(
                f"{outside} value(s) lie outside the given bin edges "
                f"[{edges[0]:g}, {edges[-1]:g}] and are counted in the end bins"
            )
    codes = binning.assign_bins(v, edges)
    if any_missing:
        # -1 marks missing rows; int16 is enough for up to 32,766 bins (and 4x
        # smaller than int64 to write and to turn into the final codes)
        raw = np.full(n, -1, dtype=np.int16 if edges.size <= 32_000 else np.int64)
        raw[~missing] = codes
    else:
        raw = codes  # non-negative already (uint8 up to 25 bins)
    if _heavy_tail(s):
        notes.flags.add("heavy_tail")
    labels = list(binning.interval_labels(binning.format_edges(edges)))
    return _Bins(raw, labels, edges, "numeric", n_distinct)


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
    if explicit:
        if bins.dtype.kind != ("m" if kind == "timedelta" else "M"):
            raise TypeError(
                f"column {notes.name!r}: bin edges for a {kind} column must be "
                f"{'timedelta64' if kind == 'timedelta' else 'datetime64'} values, got {bins.dtype}"
            )
        edges = bins.astype(f"{bins.dtype.kind}8[{unit}]").view(np.int64)
        if np.any(np.diff(edges) <= 0):
            raise ValueError(f"column {notes.name!r}: bin edges must increase strictly")
        outside = int(np.count_nonzero(s < edges[0]) + np.count_nonzero(s > edges[-1]))
        if outside:
            notes.warn(f"{outside} value(s) lie outside the given bin edges and are counted in the end bins")
    else:
        edges_f, note = binning._edges(s, bins, strategy, is_sorted=True)
        if note is not None:
            notes.warn(note)
        edges = np.unique(np.round(edges_f).astype(np.int64))
        # float64 cannot hold nanosecond instants exactly: the ends are the data's own
        edges[0], edges[-1] = s[0], s[-1]
        edges = np.unique(edges)
    step_ns = None
    if not explicit:
        edges, step_ns = _round_time_edges(edges, unit)
    raw = np.full(ints.size, -1, dtype=np.int64)
    raw[~missing] = binning.assign_bins(v, edges)
    labels = list(binning.interval_labels(_time_texts(edges, unit, kind, tz, step_ns)))
    edge_arr = edges.view(f"{'m' if kind == 'timedelta' else 'M'}8[{unit}]").copy()
    return _Bins(raw, labels, edge_arr, kind, n_distinct)


def _stable_text(v) -> str:
    """A repr of a cell that does not depend on dict / set iteration order."""
    if isinstance(v, dict):
        items = sorted((_stable_text(a), _stable_text(b)) for a, b in v.items())
        return "{" + ", ".join(f"{a}: {b}" for a, b in items) + "}"
    if isinstance(v, (set, frozenset)):
        inner = ", ".join(sorted(_stable_text(a) for a in v))
        return ("frozenset({" + inner + "})") if isinstance(v, frozenset) else ("{" + inner + "}" if v else "set()")
    if isinstance(v, list):
        return "[" + ", ".join(_stable_text(a) for a in v) + "]"
    if isinstance(v, tuple):
        return "(" + ", ".join(_stable_text(a) for a in v) + ("," if len(v) == 1 else "") + ")"
    if isinstance(v, np.ndarray):
        return "array(" + _stable_text(v.tolist()) + ")"
    if isinstance(v, np.generic):
        return repr(v.item())
    return repr(v)


def _plain(v):
    return v.item() if isinstance(v, np.generic) else v


def _hashable(v) -> bool:
    try:
        hash(v)
    except TypeError:
        return False
    return True


def _cell_texts(cells: np.ndarray, notes: _Notes) -> np.ndarray:
    """Text of each (non-missing) cell; type-tagged when the cells are of several types."""
    plain = np.frompyfunc(_plain, 1, 1)(cells) if cells.size else cells
    types = np.frompyfunc(type, 1, 1)(plain) if cells.size else cells
    type_codes, type_list = pd.factorize(types)
    type_counts = np.bincount(type_codes, minlength=len(type_list)) if cells.size else np.array([], int)
    hashable_type = [_hashable(plain[int(np.argmax(type_codes == i))]) for i in range(len(type_list))]
    n_unhashable = int(sum(int(c) for c, ok in zip(type_counts, hashable_type) if not ok))
    if n_unhashable:
        names = sorted({t.__name__ for t, ok in zip(type_list, hashable_type) if not ok})
        notes.warn(
            f"{n_unhashable} cell(s) hold unhashable values ({', '.join(names)}); "
            "they are encoded by a stable text form of their contents"
        )
    mixed = len(type_list) > 1
    if mixed:
        notes.flags.add("mixed_types")
        order = np.argsort(-type_counts, kind="stable")
        listing = ", ".join(f"{type_list[i].__name__}: {int(type_counts[i])}" for i in order)
        notes.warn(
            f"values of several types ({listing}); encoded as type-tagged text so that, "
            "for example, 1 and '1' stay distinct"
        )

    def text(v):
        t = v if isinstance(v, str) else (_stable_text(v) if not _hashable(v) else str(v))
        return f"{type(v).__name__}:{t}" if mixed else t

    return np.frompyfunc(text, 1, 1)(plain) if cells.size else cells


def _factorized(series: pd.Series, kind: str) -> _Levels:
    raw, uniques = pd.factorize(series, use_na_sentinel=True)
    # one array conversion, not a Python loop over the levels: an ID column has as
    # many levels as rows, and iterating an Arrow-backed Index cell by cell is slow
    labels = uniques.to_numpy(dtype=object)
    if labels.size and pd.api.types.infer_dtype(labels, skipna=False) != "string":
        labels = np.frompyfunc(str, 1, 1)(labels).astype(object)
    return _Levels(raw.astype(np.int64, copy=False), labels, False, kind, len(uniques))


def _objects(series: pd.Series, notes: _Notes, bins, strategy, threshold):
    """Object columns: route homogeneous ones to their typed encoders, tag mixed ones."""
    inferred = pd.api.types.infer_dtype(series, skipna=True)
    if inferred in ("string", "empty"):
        return _factorized(series, "text")
    if inferred == "boolean":
        na = series.isna().to_numpy()
        x = np.zeros(len(series), dtype=bool)
        x[~na] = series.to_numpy()[~na].astype(bool)
        return _boolean(x, na)
    if inferred in ("integer", "floating", "mixed-integer-float", "decimal"):
        num = pd.to_numeric(series, errors="coerce")
        exact = not (inferred == "integer" and num.dtype.kind == "f")  # ints beyond 64 bits
        if num.dtype != object and exact and int(num.isna().sum()) == int(series.isna().sum()):
            arr = num.to_numpy()
            return _numeric(arr, None, notes, bins, strategy, threshold)
    if inferred in ("datetime", "datetime64", "date", "timedelta", "timedelta64"):
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                conv = pd.to_timedelta(series) if inferred.startswith("timedelta") else pd.to_datetime(series)
        except (TypeError, ValueError):
            conv = None
        if conv is not None and conv.dtype.kind in "mM":
            return _temporal(conv, notes, bins, strategy, threshold)
    na = series.isna().to_numpy(dtype=bool)
    cells = series.to_numpy(dtype=object)
    texts = np.empty(cells.size, dtype=object)
    texts[~na] = _cell_texts(cells[~na], notes)
    texts[na] = None
    return _factorized(pd.Series(texts, dtype=object), "text")


def _boolean(x: np.ndarray, na: np.ndarray | None) -> _Levels:
    raw = x.astype(np.int64)
    if na is not None:
        raw[na] = -1
    present = np.bincount(raw[raw >= 0], minlength=2)
    # a boolean's alphabet is {False, True} whatever the sample shows
    return _Levels(raw, ["False", "True"], True, "boolean", int(np.count_nonzero(present)))


def _categorical(series: pd.Series, notes: _Notes) -> _Levels:
    cats = series.cat.categories
    raw = series.cat.codes.to_numpy()  # int8 / int16 / ..., -1 missing (kept narrow)
    if cats.dtype.kind in "iuf":
        labels = _format_numbers(cats.to_numpy())
    elif cats.dtype.kind in "mM":
        labels = [str(c) for c in cats]
    else:
        labels = list(_cell_texts(cats.to_numpy(dtype=object), notes))
    used = _level_counts(raw, len(cats))
    return _Levels(raw, labels, bool(series.cat.ordered), "categorical", int(np.count_nonzero(used)), used)


def _level_counts(raw: np.ndarray, n_levels: int) -> np.ndarray:
    """Rows of each level ``0 .. n_levels-1`` of ``raw`` (``-1`` missing rows left out)."""
    if raw.dtype.kind == "i" and raw.dtype.itemsize <= 2 and n_levels <= 1 << (8 * raw.dtype.itemsize - 1):
        # narrow codes: -1 reads as the top unsigned value, so one bincount without
        # a masked copy (pandas' categorical codes are int8 up to 127 categories)
        unsigned = raw.view(np.uint8 if raw.dtype.itemsize == 1 else np.uint16)
        return np.bincount(unsigned, minlength=1 << (8 * raw.dtype.itemsize))[:n_levels]
    return np.bincount(raw[raw >= 0], minlength=n_levels)[:n_levels]


def _draft(series: pd.Series, notes: _Notes, bins, strategy, threshold):
    dtype = series.dtype
    if isinstance(dtype, pd.SparseDtype):
        series = series.sparse.to_dense()
        dtype = series.dtype
    if isinstance(dtype, pd.CategoricalDtype):
        return _categorical(series, notes)
    if dtype == bool:
        return _boolean(series.to_numpy(), None)
    if isinstance(dtype, pd.BooleanDtype) or (isinstance(dtype, pd.ArrowDtype) and dtype.kind == "b"):
        na = series.isna().to_numpy(dtype=bool)
        return _boolean(series.to_numpy(dtype=bool, na_value=False), na)
    if dtype.kind in "mM":
        if isinstance(dtype, pd.ArrowDtype):
            series = series.astype(dtype.numpy_dtype if dtype.kind == "m" else (
                pd.DatetimeTZDtype(unit=dtype.pyarrow_dtype.unit, tz=dtype.pyarrow_dtype.tz)
                if getattr(dtype.pyarrow_dtype, "tz", None) else dtype.numpy_dtype))
        return _temporal(series, notes, bins, strategy, threshold)
    if dtype.kind in "iu":
        if isinstance(dtype, np.dtype):
            return _numeric(series.to_numpy(), None, notes, bins, strategy, threshold)
        na = series.isna().to_numpy(dtype=bool)
        return _numeric(series.to_numpy(dtype=dtype.numpy_dtype, na_value=0), na, notes, bins, strategy, threshold)
    if dtype.kind == "f":
        if isinstance(dtype, np.dtype):
            x = series.to_numpy()
            if x.dtype != np.float64 and x.dtype.itemsize < 8:
                x = x.astype(np.float64)
            return _numeric(x, None, notes, bins, strategy, threshold)
        na = series.isna().to_numpy(dtype=bool)
        return _numeric(series.to_numpy(dtype=np.float64, na_value=np.nan), na, notes, bins, strategy, threshold)
    if isinstance(dtype, pd.StringDtype) or (isinstance(dtype, pd.ArrowDtype) and dtype.kind in "OU" and
                                             str(dtype.pyarrow_dtype) in ("string", "large_string")):
        return _factorized(series, "text")
    if dtype == object:
        return _objects(series, notes, bins, strategy, threshold)
    # anything else (complex, period, interval, arrow lists / structs ...): cell by cell
    return _objects(pd.Series(series.to_numpy(dtype=object), dtype=object), notes, bins, strategy, threshold)


# --------------------------------------------------------------------------- finishing


def _reserve(label: str) -> str:
    """A data label that reads like one of our symbols is quoted so the two stay apart."""
    return f'"{label}"' if label in (MISSING_LABEL, OTHER_LABEL) else label


def _distinct_labels(labels: list) -> tuple:
    seen: dict[str, int] = {}
    out = []
    for lab in labels:
        lab = str(lab)
        if lab in seen:
            seen[lab] += 1
            new = f"{lab} [{seen[lab]}]"
            while new in seen:
                seen[lab] += 1
                new = f"{lab} [{seen[lab]}]"
            seen[new] = 1
            out.append(new)
        else:
            seen[lab] = 1
            out.append(lab)
    return tuple(out)


def _finish_levels(d: _Levels, notes: _Notes, missing: str, max_categories):
    n_levels = len(d.labels)
    raw = d.raw
    if d.counts is not None and d.counts.shape == (n_levels,):
        counts = d.counts
    else:
        counts = _level_counts(raw, n_levels) if n_levels else np.zeros(0, np.int64)
    n_missing = int(raw.size - counts.sum())
    with_missing_symbol = missing == "category" and n_missing > 0
    labels = np.empty(n_levels, dtype=object)  # a data label, or an array of them (vectorised)
    labels[:] = list(d.labels) if not isinstance(d.labels, np.ndarray) else d.labels
    if n_levels:
        reserved = np.flatnonzero((labels == MISSING_LABEL) | (labels == OTHER_LABEL))
        labels[reserved] = [_reserve(labels[i]) for i in reserved]
    if d.natural:
        order = np.arange(n_levels)
    else:
        # most frequent first; ties in label order so the result does not depend on row order
        order = np.lexsort((labels.astype(str), -counts)) if n_levels else np.arange(0)
    kept = order
    folded = False
    if max_categories is not None and n_levels + with_missing_symbol > max_categories:
        room = max_categories - 1 - with_missing_symbol
        if room < 1:
            raise ValueError(
                f"column {notes.name!r}: max_categories={max_categories} leaves no room for a level "
                "beside '(other)' and '(missing)'; use max_categories >= 3 or missing='drop'"
            )
        by_count = order[np.argsort(-counts[order], kind="stable")]
        keep_set = np.zeros(n_levels, dtype=bool)
        keep_set[by_count[:room]] = True
        kept = order[keep_set[order]]
        folded = True
        n_folded = n_levels - room
        rows_folded = int(counts[~keep_set].sum())
        notes.flags.add("levels_folded")
        notes.warn(
            f"{n_folded} of {n_levels} levels ({rows_folded} row(s)) are folded into {OTHER_LABEL!r} "
            f"to keep at most max_categories={max_categories} symbols"
        )
    new_index = np.full(n_levels + 1, -1, dtype=np.int64)
    new_index[kept] = np.arange(kept.size)
    out_labels = labels[kept].tolist()
    if folded:
        new_index[:n_levels][new_index[:n_levels] < 0] = len(out_labels)
        out_labels.append(OTHER_LABEL)
    if with_missing_symbol:
        out_labels.append(MISSING_LABEL)
    k = len(out_labels)
    # raw == -1 picks the last entry: the missing code
    new_index[n_levels] = k - 1 if with_missing_symbol else k
    # every entry of new_index is set by now; gathered straight into the codes' dtype
    codes = new_index.astype(codes_dtype(k))[raw] if raw.size else raw.astype(np.int64)
    level_counts = None
    if folded:
        # every present level, most frequent first (ties in label order, as `order`)
        present = order[counts[order] > 0]
        level_counts = np.array(counts[present[np.argsort(-counts[present], kind="stable")]], dtype=np.int64)
        level_counts.setflags(write=False)
    return codes, k, _distinct_labels(out_labels), n_missing, level_counts


def _finish_bins(d: _Bins, missing: str):
    raw = d.raw
    n_missing = int(np.count_nonzero(raw < 0))
    labels = list(d.labels)
    if missing == "category" and n_missing:
        labels.append(MISSING_LABEL)
        k = len(labels)
        codes = np.where(raw < 0, k - 1, raw)
    else:
        k = len(labels)
        codes = np.where(raw < 0, k, raw) if n_missing else raw
    return codes, k, _distinct_labels(labels), n_missing


def _build(series: pd.Series, name: str, bins, strategy, missing, max_categories, threshold, settings):
    notes = _Notes(name)
    d = _draft(series, notes, bins, strategy, threshold)
    if isinstance(d, _Bins):
        codes, k, labels, n_missing = _finish_bins(d, missing)
        edges = d.edges
        edges.setflags(write=False)
        level_counts = None
    else:
        codes, k, labels, n_missing, level_counts = _finish_levels(d, notes, missing, max_categories)
        edges = None
    n = int(series.size)
    codes = np.ascontiguousarray(codes, dtype=codes_dtype(k))
    codes.setflags(write=False)
    flags = set(notes.flags)
    if d.n_distinct <= 1:
        flags.add("constant")
    if n and n_missing / n >= MOSTLY_MISSING_SHARE:
        flags.add("mostly_missing")
    n_valid = n - n_missing
    if d.kind in ("text", "categorical") and n_valid >= ID_LIKE_MIN_ROWS and d.n_distinct >= ID_LIKE_SHARE * n_valid:
        flags.add("id_like")
    ordered_flags = tuple(f for f in FLAGS if f in flags)
    col = EncodedColumn(
        name=name, codes=codes, k=int(k), labels=labels, kind=d.kind, n=n, n_missing=n_missing,
        edges=edges, flags=ordered_flags, settings=settings, n_distinct=int(d.n_distinct),
        level_counts=level_counts,
    )
    return col, tuple(notes.messages)


def _entry_bytes(col: EncodedColumn, messages) -> int:
    edges = 0 if col.edges is None else col.edges.nbytes
    edges += 0 if col.level_counts is None else col.level_counts.nbytes
    return col.codes.nbytes + edges + sum(len(s) + 56 for s in col.labels) + sum(len(m) for m in messages) + 512


def encode_column(
    values,
    *,
    name: str,
    bins=16,
    strategy: str = "quantile",
    missing: str = "drop",
    max_categories: int | None = 64,
    categorical_threshold: int | None = DEFAULT_CATEGORICAL_THRESHOLD,
    cache: bool | EncodingCache = True,
) -> EncodedColumn:
    """Encode one column as small integer codes: bins, categories, missing policy, flags.

    Parameters
    ----------
    values : array-like or pandas.Series
        Any 1-D column: NumPy array, list, pandas Series (NumPy, nullable
        ``Int64``/``Float64``/``boolean``, string (Python or pyarrow), Categorical,
        ``datetime64`` naive or zoned, ``timedelta64``, object), Polars Series.
        Never modified.
    name : str
        The column's key; every warning names it.
    bins : int, str or sequence, default=16
        For numeric, datetime and duration columns with more than
        ``categorical_threshold`` distinct values: the number of bins (see
        ``strategy``), a rule name (numpy's ``"fd"``, ``"scott"``, ``"sturges"``,
        ``"doane"``, ``"rice"``, ``"sqrt"``, ``"stone"``, ``"auto"``, or ``"knuth"``;
        see :func:`~infoscope.bin_edges`) or explicit edges (always binned; values
        outside the edges go to the end bins with a warning; ``datetime64`` edges
        for datetime columns, UTC for zoned ones).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    missing : {"drop", "category"}, default="drop"
        ``"drop"``: missing rows get code ``k`` (left out of every count).
        ``"category"``: missing rows are the symbol ``"(missing)"``, the last label;
        it is added (and counted in ``k``) only when the column has missing rows.
    max_categories : int or None, default=64
        Categories beyond this are folded: the rarest levels become one
        ``"(other)"`` symbol so that ``k <= max_categories`` (the missing symbol
        included).  Kept levels stay most-frequent-first, or in their natural order
        for ordered values (ordered Categoricals, numbers, booleans, times).  Not
        applied to bins.  None: never fold.
    categorical_threshold : int, default=32
        Numeric, datetime and duration columns with at most this many distinct
        values are encoded as categories (one symbol per value, kind
        ``"integer_categories"`` for numbers), not bins; 0 always bins.  See
        :data:`DEFAULT_CATEGORICAL_THRESHOLD` for why 32.
    cache : bool or EncodingCache, default=True
        Reuse the result for the same content and settings (the process-wide
        cache, or the one given).  A hit returns the stored object itself (its
        arrays are read-only) and repeats its warnings.

    Returns
    -------
    EncodedColumn
        ``codes``, ``k``, ``labels``, ``kind``, ``n``, ``n_missing``, ``edges``,
        ``flags``, ``settings``, ``n_distinct``, ``level_counts`` (the unfolded
        level counts when levels were folded, else None; see :class:`EncodedColumn`).

    Warns
    -----
    DataQualityWarning
        Infinite values (treated as missing; flag ``infinite_values``), values of
        several types (type-tagged; flag ``mixed_types``), unhashable cells (encoded
        by a stable text form), folded levels (flag ``levels_folded``), quantile
        edges merged by ties, values outside explicit edges.

    Notes
    -----
    Kinds: ``"numeric"`` (binned numbers), ``"integer_categories"`` (numbers kept
    as categories), ``"categorical"`` (pandas Categorical: ``k`` counts unused
    categories), ``"boolean"`` (``k = 2``: False, True), ``"datetime"`` (zoned
    datetimes are binned on their UTC instants, labels in the column's zone),
    ``"timedelta"`` (binned on the duration axis), ``"text"`` (everything else;
    object columns of one scalar type go to their typed encoder).  Interior edges
    of datetime / duration bins are rounded to the coarsest of day, hour, minute,
    second, ms, us that is at most 1/100 of the narrowest bin (no edge moves by
    more than 0.5 % of a bin), so labels read well; labels show that step.

    Flags: ``constant`` (at most one distinct non-missing value, an all-missing
    column included); ``mostly_missing`` (missing share >= 0.5); ``id_like``
    (text or categorical columns with >= 20 non-missing values of which >= 95 %
    are distinct; whole-number columns likewise when the values also look like
    row numbers: dense (range <= 2 x distinct count), strictly monotone in row
    order, or the name ends in id / key / uuid; other floats, datetimes and
    booleans never); ``heavy_tail`` (binned numbers whose tail index
    max(q999 - q50, q50 - q001) / IQR exceeds 8, from 50 finite values on, see
    :data:`HEAVY_TAIL_INDEX`); ``levels_folded``; ``mixed_types``;
    ``infinite_values``.  ``sparse_cells`` is a property of pairs, set later.

    References
    ----------
    .. [1] NumPy, ``numpy.histogram`` (bin convention: half-open bins, the last
       closed) and ``numpy.quantile`` (linear interpolation, the default).
    .. [2] pandas, ``pandas.factorize`` and ``pandas.util.hash_pandas_object``
       (codes and content hashes).
    .. [3] K. H. Knuth, "Optimal data-based binning for histograms and
       histogram-based probability density models", arXiv:physics/0605197 (2006).
       Citations from memory.

    Examples
    --------
    >>> import numpy as np
    >>> col = encode_column(np.array([0.5, 1.5, 2.5, 3.5, np.nan]), name="x", bins=2,
    ...                     categorical_threshold=0, cache=False)
    >>> col.codes.tolist(), col.k, col.labels
    ([0, 0, 1, 1, 2], 2, ('[0.5, 2)', '[2, 3.5]'))
    >>> encode_column(["b", "a", "b", None], name="t", missing="category", cache=False).labels
    ('b', 'a', '(missing)')
    """
    col, messages = _encode(values, name, bins, strategy, missing, max_categories, categorical_threshold, cache)
    for m in messages:
        warnings.warn(m, DataQualityWarning, stacklevel=2)
    return col


def _encode(values, name, bins, strategy, missing, max_categories, categorical_threshold, cache):
    """:func:`encode_column` without issuing its warnings: ``(column, messages)``.

    Safe to call from worker threads (it touches no warning filters); the caller
    issues the messages, in column order, from its own thread.
    """
    if not isinstance(name, str):
        raise TypeError(f"name must be a str (the column's key), got {type(name).__name__}; see column_keys")
    bins, strategy, missing, max_categories, threshold, settings = _check_settings(
        bins, strategy, missing, max_categories, categorical_threshold
    )
    series = _as_series(values, name)
    store: EncodingCache | None
    if cache is True:
        store = default_cache()
    elif cache is False or cache is None:
        store = None
    elif isinstance(cache, EncodingCache):
        store = cache
    else:
        raise TypeError(f"cache must be True, False or an EncodingCache, got {type(cache).__name__}")
    key = None
    if store is not None and store.max_bytes > 0:
        ckey = content_key(series)
        if ckey is not None:
            key = (ckey, settings)
            hit = store.get(key)
            if hit is not None:
                col, messages = hit
                if col.name != name:
                    col = dataclasses.replace(col, name=name)
                    old = f"column {hit[0].name!r}: "
                    messages = tuple(f"column {name!r}: " + m[len(old):] for m in messages)
                return col, messages
    col, messages = _build(series, name, bins, strategy, missing, max_categories, threshold, settings)
    if key is not None:
        store.put(key, (col, messages), _entry_bytes(col, messages))
    return col, messages


# --------------------------------------------------------------------------- frames


def _key_text(label) -> str:
    if isinstance(label, tuple):
        parts = [str(p) for p in label if not (p is None or (isinstance(p, str) and p == ""))]
        return " / ".join(parts) if parts else str(label)
    return label if isinstance(label, str) else str(label)


def column_keys(columns: Sequence, *, warn: bool = True, _stacklevel: int = 2) -> list[str]:
    """Unique string keys for column labels (duplicates, numbers, MultiIndex tuples).

    Parameters
    ----------
    columns : sequence
        Column labels, e.g. ``df.columns``.
    warn : bool, default=True
        Warn (:class:`~infoscope.DataQualityWarning`) when labels repeat.

    Returns
    -------
    list of str
        One key per label: strings as they are, other labels by ``str``, tuples
        joined with ``" / "`` (empty parts left out); a repeated key gets
        ``" (2)"``, ``" (3)"``, ... in order of appearance.

    References
    ----------
    .. [1] pandas, ``pandas.MultiIndex`` (tuple labels) — common practice for
       flattening them into one string.

    Examples
    --------
    >>> column_keys(["a", "a", 3, ("b", "x")], warn=False)
    ['a', 'a (2)', '3', 'b / x']
    """
    texts = [_key_text(c) for c in columns]
    used = set(texts)
    seen: dict[str, int] = {}
    out = []
    repeated = []
    for t in texts:
        if t not in seen:
            seen[t] = 1
            out.append(t)
            continue
        seen[t] += 1
        j = seen[t]
        new = f"{t} ({j})"
        while new in used:
            j += 1
            new = f"{t} ({j})"
        seen[t] = j
        used.add(new)
        out.append(new)
        repeated.append(t)
    if repeated and warn:
        names = ", ".join(repr(t) for t in dict.fromkeys(repeated))
        warnings.warn(
            f"column names repeat ({names}); later ones are keyed with ' (2)', ' (3)', ...",
            DataQualityWarning,
            stacklevel=_stacklevel,
        )
    return out


# Columns of at least this many rows are worth a worker thread (below it the pool
# costs more than it saves); small frames are encoded in the calling thread.
PARALLEL_MIN_ROWS = 50_000

_FRAME_SETTINGS = {
    "bins": 16, "strategy": "quantile", "missing": "drop", "max_categories": 64,
    "categorical_threshold": DEFAULT_CATEGORICAL_THRESHOLD, "cache": True,
}


def _frame_threads(threads, n_columns: int, n_rows: int) -> int:
    import os

    if threads is None:
        try:
            cores = len(os.sched_getaffinity(0))
        except AttributeError:  # pragma: no cover - not Linux
            cores = os.cpu_count() or 1
        threads = cores if n_rows >= PARALLEL_MIN_ROWS else 1
    elif isinstance(threads, bool) or not isinstance(threads, int) or threads < 1:
        raise ValueError(f"threads: expected a positive integer or None, got {threads!r}")
    return max(1, min(threads, n_columns))


def encode_frame(frame, *, threads: int | None = None, **settings) -> list[EncodedColumn]:
    """Encode every column of a table (pandas or Polars DataFrame), keyed uniquely.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame
        The table; never modified.
    threads : int or None, default=None
        Worker threads that encode columns side by side (sorting, comparisons and
        hashing in numpy / hashlib release the GIL). None: every core for frames of
        at least 50,000 rows, else 1 (the calling thread). The result and the
        warnings (issued in column order from the calling thread, each naming its
        column) are the same whatever the number of threads; an error is the one
        of the first column that fails, as with one thread.
    **settings
        Passed to :func:`encode_column` for every column (``bins``, ``strategy``,
        ``missing``, ``max_categories``, ``categorical_threshold``, ``cache``).

    Returns
    -------
    list of EncodedColumn
        In column order; names from :func:`column_keys` (warns on repeated names).

    References
    ----------
    .. [1] pandas, ``pandas.DataFrame.iloc`` (columns by position, so repeated
       labels stay separate).
    .. [2] Python, ``concurrent.futures.ThreadPoolExecutor``.

    Examples
    --------
    >>> import pandas as pd
    >>> df = pd.DataFrame({"a": [1, 2, 1], "b": ["x", "y", "y"]})
    >>> [(c.name, c.kind, c.k) for c in encode_frame(df, cache=False)]
    [('a', 'integer_categories', 2), ('b', 'text', 2)]
    """
    if "name" in settings:
        raise TypeError("encode_frame: 'name' is not a setting (columns are keyed by their labels)")
    _check_frame_settings(settings, "encode_frame")
    if not isinstance(frame, pd.DataFrame):
        if hasattr(frame, "to_pandas"):
            frame = frame.to_pandas()
        else:
            raise TypeError(f"frame must be a pandas or Polars DataFrame, got {type(frame).__name__}")
    keys = column_keys(list(frame.columns), _stacklevel=3)
    # columns are taken out of the frame here, in the calling thread
    jobs = [(key, frame.iloc[:, i], settings) for i, key in enumerate(keys)]
    return _run(jobs, threads, len(frame))


def _check_frame_settings(settings, where: str) -> None:
    unknown = sorted(set(settings) - set(_FRAME_SETTINGS))
    if unknown:
        raise TypeError(f"{where}: unknown setting(s) {unknown}; valid: {sorted(_FRAME_SETTINGS)}")


def encode_columns(columns, *, threads: int | None = None, **settings) -> list[EncodedColumn]:
    """Encode many columns, each with its own settings if need be, in worker threads.

    Parameters
    ----------
    columns : iterable of (name, values) or (name, values, overrides)
        The key of each column, its values (anything :func:`encode_column` takes)
        and optionally a dict of settings for this column only (e.g. ``{"bins": 8}``).
    threads : int or None, default=None
        Worker threads, as in :func:`encode_frame` (None: every core when the first
        column has at least 50,000 rows, else 1).
    **settings
        Settings for every column (``bins``, ``strategy``, ``missing``,
        ``max_categories``, ``categorical_threshold``, ``cache``).

    Returns
    -------
    list of EncodedColumn
        In the order given, equal to ``encode_column(values, name=name, **settings,
        **overrides)`` for each; warnings are issued in that order from the calling
        thread, each naming its column; an error is the first failing column's.

    References
    ----------
    .. [1] Python, ``concurrent.futures.ThreadPoolExecutor``.

    Examples
    --------
    >>> import numpy as np
    >>> cols = encode_columns([("x", np.arange(100.0)), ("y", np.arange(100.0), {"bins": 4})],
    ...                       categorical_threshold=0, cache=False)
    >>> [(c.name, c.k) for c in cols]
    [('x', 16), ('y', 4)]
    """
    _check_frame_settings(settings, "encode_columns")
    jobs = []
    for item in columns:
        if not isinstance(item, tuple) or len(item) not in (2, 3):
            raise TypeError(f"encode_columns: expected (name, values) or (name, values, overrides), got {item!r:.80}")
        name, values = item[0], item[1]
        overrides = item[2] if len(item) == 3 else {}
        if not isinstance(overrides, Mapping):
            raise TypeError(f"column {name!r}: overrides must be a dict of settings, got {type(overrides).__name__}")
        _check_frame_settings(overrides, f"column {name!r}")
        jobs.append((name, values, {**settings, **overrides}))
    rows = len(jobs[0][1]) if jobs and hasattr(jobs[0][1], "__len__") else 0
    return _run(jobs, threads, rows)


def _run(jobs, threads, n_rows: int) -> list[EncodedColumn]:
    """Encode ``(name, values, settings)`` jobs, serially or in a thread pool; warn in order."""
    n_threads = _frame_threads(threads, len(jobs), n_rows)

    def one(job):
        key, values, settings = job
        args = {**_FRAME_SETTINGS, **settings}
        return _encode(values, key, args["bins"], args["strategy"], args["missing"], args["max_categories"],
                       args["categorical_threshold"], args["cache"])

    out = []
    if n_threads == 1:
        for job in jobs:
            col, messages = one(job)
            for m in messages:  # issued here so that they point at the caller's line
                warnings.warn(m, DataQualityWarning, stacklevel=3)
            out.append(col)
        return out
    from concurrent.futures import ThreadPoolExecutor

    with ThreadPoolExecutor(max_workers=n_threads, thread_name_prefix="infoscope-encode") as pool:
        futures = [pool.submit(one, job) for job in jobs]
        try:
            for future in futures:
                col, messages = future.result()  # the first failing column raises, as serially
                for m in messages:
                    warnings.warn(m, DataQualityWarning, stacklevel=3)
                out.append(col)
        except BaseException:
            for future in futures:
                future.cancel()
            raise
    return out
