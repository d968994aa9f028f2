"""One column -> an :class:`~infoscope.encode.encoded.EncodedColumn`: :func:`encode_column`.

The steps: check the settings and the values (:mod:`.checks`), draft the codes by
dtype (:mod:`.numeric`, :mod:`.temporal`, :mod:`.text`, :mod:`.levels` for
categoricals), finish them (order, fold, missing policy: :mod:`.levels`), flag,
and keep the result in the encoding cache (:mod:`.cache`).
"""
from __future__ import annotations

import dataclasses

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.encode.cache import EncodingCache, content_key, default_cache
from infoscope.encode.checks import _as_series, _check_settings
from infoscope.encode.drafts import (
    DEFAULT_CATEGORICAL_THRESHOLD,
    ID_LIKE_MIN_ROWS,
    ID_LIKE_SHARE,
    MOSTLY_MISSING_SHARE,
    _boolean,
    _Bins,
    _Notes,
)
from infoscope.encode.encoded import FLAGS, EncodedColumn, codes_dtype
from infoscope.encode.levels import _categorical, _finish_bins, _finish_levels
from infoscope.encode.numeric import _numeric
from infoscope.encode.ordered import _interval, _period
from infoscope.encode.temporal import _temporal
from infoscope.encode.text import _factorized, _objects

__all__ = ["encode_column"]


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
    if isinstance(dtype, pd.PeriodDtype):
        return _period(series, notes, bins, strategy, threshold)
    if isinstance(dtype, pd.IntervalDtype):
        return _interval(series, notes, bins, strategy, threshold)
    # anything else (complex: labels, with a warning, as they have no order; arrow
    # lists / structs ...): cell by cell
    return _objects(pd.Series(series.to_numpy(dtype=object), dtype=object), notes, bins, strategy, threshold)


def _column_flags(note_flags, kind: str, n: int, n_missing: int, n_distinct: int) -> tuple:
    """The flags of a finished column, in :data:`FLAGS` order (the rules of encode_column, Notes)."""
    flags = set(note_flags)
    if n_distinct <= 1:
        flags.add("constant")
    if n and n_missing / n >= MOSTLY_MISSING_SHARE:
        flags.add("mostly_missing")
    n_valid = n - n_missing
    if kind in ("text", "categorical") and n_valid >= ID_LIKE_MIN_ROWS and n_distinct >= ID_LIKE_SHARE * n_valid:
        flags.add("id_like")
    return tuple(f for f in FLAGS if f in flags)


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
    ordered_flags = _column_flags(notes.flags, d.kind, n, n_missing, int(d.n_distinct))
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
        warn_user(m, DataQualityWarning)
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
