"""Content keys of columns and frames, and a content-keyed LRU cache of encoded columns.

One key function serves every cache of the package: :func:`content_key` for a
column (the encoder's cache keys ``(content_key, settings)``) and :func:`frame_key`
for a whole frame (the accessors' session cache), so a column and a frame are
told apart by the same rule everywhere.

A key is a digest of the content (values, missingness, dtype, categories and their
order), not of the identity of the object, so a column changed in place gets a new
key and a copy of an unchanged column hits.  The digest is XXH3-128 (the
``xxhash`` package), a non-cryptographic hash that reads the column buffers at
memory speed (about 20 GB/s here: the 1,000,000 x 50 benchmark frame in about
15 ms); the keys only have to be distinct for distinct contents, which they are
up to an accidental 128-bit collision (probability about n**2 / 2**129 for n keys),
never because two contents are hashed through the same text.  Entries of the cache
hold only arrays that infoscope made itself (codes, edges), never a view of the
user's data, and those arrays are read-only.
"""
from __future__ import annotations

import datetime
import decimal
import fractions
import threading
from collections import OrderedDict

import numpy as np
import pandas as pd
import xxhash

__all__ = ["content_key", "frame_key", "array_digest", "EncodingCache", "DEFAULT_CACHE_BYTES", "default_cache", "clear_cache"]

#: Default byte budget of the process-wide cache (codes of ~256 million rows at uint8).
DEFAULT_CACHE_BYTES = 256 * 2**20

# Cell types of an object column whose text (what pandas hashes objects through)
# tells unequal values of the same type apart: str() of a float is its repr (exact),
# of a Decimal or Fraction exact, of a datetime its every field.  A column holding
# any other type (a user class, an enum, a str subclass) has no content key: it is
# encoded afresh on every call rather than risk two unequal cells sharing a text.
_TEXT_EXACT_TYPES = frozenset({
    str, bytes, bool, int, float, complex, type(None),
    decimal.Decimal, fractions.Fraction,
    datetime.datetime, datetime.date, datetime.time, datetime.timedelta,
    pd.Timestamp, pd.Timedelta, pd.Period, type(pd.NA), type(pd.NaT),
})


def _digest():
    return xxhash.xxh3_128()


def _update_array(h, arr: np.ndarray) -> None:
    arr = np.ascontiguousarray(arr)
    h.update(f"{arr.dtype.str}|{arr.size}|".encode())
    if arr.size:
        h.update(arr.reshape(-1).view(np.uint8))


def array_digest(arr: np.ndarray) -> str:
    """XXH3-128 of an array's dtype, length and bytes (the engine keys its pair tables by this).

    Parameters
    ----------
    arr : numpy.ndarray

    Returns
    -------
    str
        A hex digest.

    References
    ----------
    .. [1] Y. Collet, "xxHash" (XXH3), https://xxhash.com.

    Examples
    --------
    >>> import numpy as np
    >>> array_digest(np.arange(3)) == array_digest(np.arange(3)), array_digest(np.arange(3)) == array_digest(np.arange(4))
    (True, False)
    """
    h = _digest()
    _update_array(h, arr)
    return h.hexdigest()


def _text_exact_type(t: type) -> bool:
    return t in _TEXT_EXACT_TYPES or (issubclass(t, np.generic) and not issubclass(t, (np.object_, np.void)))


def _flat_arrow_type(t) -> bool:
    """Arrow types whose buffers, offset and length are the whole content (no child arrays)."""
    import pyarrow.types as pt

    return bool(
        pt.is_primitive(t) or pt.is_null(t) or pt.is_decimal(t)
        or pt.is_string(t) or pt.is_large_string(t) or pt.is_binary(t) or pt.is_large_binary(t)
        or pt.is_fixed_size_binary(t)
        or getattr(pt, "is_string_view", lambda _: False)(t) or getattr(pt, "is_binary_view", lambda _: False)(t)
    )


def _update_arrow(h, chunk) -> bool:
    """Hash one arrow array into ``h``; False for a type whose content the buffers do not fix."""
    import pyarrow
    import pyarrow.types as pt

    t = chunk.type
    if pt.is_dictionary(t):
        # the buffers of a dictionary array are those of its indices only: hash the
        # dictionary (the categories, in their order) as well
        h.update(f"|dictionary|{t.ordered}|".encode())
        return _update_arrow(h, chunk.indices) and _update_arrow(h, chunk.dictionary)
    if not _flat_arrow_type(t):
        return False  # nested types: child arrays carry offsets of their own
    if chunk.get_total_buffer_size() > 2 * chunk.nbytes + 65_536:
        # a small slice of a big column (df.head(), a sample by slicing) shares the
        # parent's buffers: hash a compact copy of its own cells instead of the whole
        # parent (1000 rows of 5M strings: 0.1 s per column)
        chunk = pyarrow.concat_arrays([chunk])
    h.update(f"|{t}|{chunk.offset}|{len(chunk)}|".encode())
    for buf in chunk.buffers():
        if buf is None:
            h.update(b"-")
        else:
            h.update(f"{buf.size}:".encode())
            h.update(memoryview(buf))
    return True


def _polars_key(series) -> str | None:
    if str(series.dtype) == "Object":
        return None  # its arrow form holds the addresses of the Python objects, not their values
    h = _digest()
    h.update(f"polars|{series.dtype}|{len(series)}|".encode())
    try:
        arr = series.to_arrow()
    except Exception:  # noqa: BLE001 - Object columns and the like: no arrow form, no key
        return None
    for chunk in getattr(arr, "chunks", [arr]):
        if not _update_arrow(h, chunk):
            return None
    return h.hexdigest()


def content_key(series) -> str | None:
    """A digest of a column's values and dtype, or None when the values cannot be keyed.

    Plain NumPy dtypes are hashed as raw bytes, zoned datetimes as their UTC
    instants (the zone is in the dtype), nullable and arrow numbers as values plus
    NA mask, other arrow-backed columns (strings) as their arrow buffers with offset
    and length (dictionary arrays with their dictionary), and categoricals as codes
    plus the key of their categories and their order (unused categories change K,
    and their order the order of the levels).  Everything else goes through
    :func:`pandas.util.hash_pandas_object` (values only, not the index) plus the
    missing mask, plus for object columns the type of every cell (pandas hashes
    objects through their text, so 1 and "1", or b"a" and "a", would otherwise
    collide).  Polars series are hashed through their arrow buffers.
    Cells pandas cannot hash (lists, dicts; tuples beside numbers), cell types
    whose text may not tell unequal values apart (user classes), nested arrow /
    Polars types and Polars ``Object`` columns have no key: None, and the column
    is then never cached.

    Parameters
    ----------
    series : pandas.Series or polars.Series
        The column (a pandas index is ignored).

    Returns
    -------
    str or None
        A hex digest (XXH3-128, not used for security), or None.

    References
    ----------
    .. [1] Y. Collet, "xxHash: extremely fast non-cryptographic hash algorithm"
       (XXH3, 128-bit variant), https://xxhash.com; the ``xxhash`` Python package.
    .. [2] pandas, ``pandas.util.hash_pandas_object``.

    Examples
    --------
    >>> import pandas as pd
    >>> content_key(pd.Series([1.0, 2.0])) == content_key(pd.Series([1.0, 2.0]))
    True
    >>> content_key(pd.Series([1, "x"], dtype=object)) == content_key(pd.Series(["1", "x"], dtype=object))
    False
    """
    if not isinstance(series, pd.Series) and type(series).__module__.split(".")[0] == "polars":
        return _polars_key(series)
    h = _digest()
    dtype = series.dtype
    h.update(f"pandas|{type(dtype).__qualname__}|{dtype}|{getattr(dtype, 'storage', '')}|"
             f"{getattr(dtype, 'na_value', '')!r}|{len(series)}|".encode())
    if isinstance(dtype, np.dtype) and dtype.kind in "biufcmM":
        _update_array(h, series.to_numpy())
        return h.hexdigest()
    if isinstance(dtype, pd.CategoricalDtype):
        _update_array(h, series.cat.codes.to_numpy())
        cats = content_key(pd.Series(dtype.categories))
        if cats is None:
            return None
        h.update(f"|{cats}|{dtype.ordered}".encode())
        return h.hexdigest()
    if isinstance(dtype, pd.DatetimeTZDtype):
        _update_array(h, series.dt.tz_convert("UTC").dt.tz_localize(None).to_numpy())
        return h.hexdigest()
    numpy_dtype = getattr(dtype, "numpy_dtype", None)
    if numpy_dtype is not None and numpy_dtype.kind in "biuf" and dtype.kind in "biuf":
        # nullable / arrow numbers: the values with NA as 0, and the NA mask
        _update_array(h, series.to_numpy(dtype=numpy_dtype, na_value=numpy_dtype.type(0)))
        _update_array(h, np.packbits(series.isna().to_numpy(dtype=bool)))
        return h.hexdigest()
    chunks = getattr(getattr(series.array, "_pa_array", None), "chunks", None)
    if chunks is not None:
        # arrow-backed (e.g. pandas' default string dtype): hash the arrow buffers
        # chunk by chunk (a slice shares its parent's buffers: offset and length say which part)
        h.update(f"|chunks {len(chunks)}|".encode())
        if all(_update_arrow(h, chunk) for chunk in chunks):
            return h.hexdigest()
        h = _digest()  # a nested arrow type: through its values below
        h.update(f"pandas|{dtype}|{len(series)}|values|".encode())
    try:
        hashed = pd.util.hash_pandas_object(series, index=False).to_numpy()
    except (TypeError, ValueError):
        # unhashable cells raise TypeError; cells pandas turns into arrays (tuples
        # beside numbers: "setting an array element with a sequence") ValueError
        return None
    _update_array(h, hashed)
    _update_array(h, np.packbits(series.isna().to_numpy(dtype=bool)))
    if dtype == object:
        inferred = pd.api.types.infer_dtype(series, skipna=True)
        h.update(f"|{inferred}|".encode())
        if inferred in ("string", "empty", "boolean", "bytes"):
            return h.hexdigest()  # one type of cell: the hash above tells them apart
        types = pd.factorize(np.frompyfunc(type, 1, 1)(series.to_numpy()))
        if not all(_text_exact_type(t) for t in types[1]):
            return None
        _update_array(h, types[0])
        h.update("|".join(f"{t.__module__}.{t.__qualname__}" for t in types[1]).encode())
    return h.hexdigest()


def frame_key(frame) -> str | None:
    """A digest of a whole frame: its shape, column labels and every column's :func:`content_key`.

    The key the accessors find a cached session by.  The index is not part of it
    (no result depends on it).  None when a column has no key.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame
        The frame (not modified).

    Returns
    -------
    str or None
        A hex digest (XXH3-128), or None.

    References
    ----------
    .. [1] Y. Collet, "xxHash" (XXH3), https://xxhash.com.

    Examples
    --------
    >>> import pandas as pd
    >>> df = pd.DataFrame({"a": [1, 2], "b": ["x", "y"]})
    >>> frame_key(df) == frame_key(df.copy()), frame_key(df) == frame_key(df.rename(columns={"a": "c"}))
    (True, False)
    """
    h = _digest()
    if isinstance(frame, pd.DataFrame):
        columns = [frame.iloc[:, i] for i in range(frame.shape[1])]
        labels = [(type(c).__qualname__, repr(c)) for c in frame.columns]
        h.update(f"pandas frame|{frame.shape}|{type(frame.columns).__qualname__}|{labels!r}|".encode())
    else:
        columns = frame.get_columns()
        h.update(f"polars frame|{frame.shape}|{list(frame.columns)!r}|".encode())
    for column in columns:
        key = content_key(column)
        if key is None:
            return None
        h.update(key.encode())
    return h.hexdigest()


class EncodingCache:
    """Least-recently-used cache of encoded columns with a byte budget.

    Thread-safe (the engine may encode from worker threads).  An entry larger
    than the whole budget is not stored.

    Parameters
    ----------
    max_bytes : int, default=DEFAULT_CACHE_BYTES
        Budget for the arrays and labels held; the least recently used entries
        are evicted past it.  0 disables caching.

    References
    ----------
    .. [1] Python, ``functools.lru_cache`` (the same eviction rule, bounded by
       entries rather than bytes).

    Examples
    --------
    >>> store = EncodingCache(max_bytes=10)
    >>> store.put("a", "x", 6); store.put("b", "y", 6)
    >>> store.get("a") is None, store.get("b")
    (True, 'y')
    """

    def __init__(self, max_bytes: int = DEFAULT_CACHE_BYTES) -> None:
        if isinstance(max_bytes, bool) or not isinstance(max_bytes, (int, np.integer)) or max_bytes < 0:
            raise ValueError(f"max_bytes={max_bytes!r} is invalid: it must be an integer >= 0")
        self.max_bytes = int(max_bytes)
        self._entries: OrderedDict = OrderedDict()
        self._bytes = 0
        self._lock = threading.Lock()
        self.hits = 0
        self.misses = 0

    def __len__(self) -> int:
        return len(self._entries)

    @property
    def nbytes(self) -> int:
        """Bytes currently held (as estimated when the entries were stored)."""
        return self._bytes

    def get(self, key):
        """The entry stored under ``key`` (now the most recently used), or None."""
        with self._lock:
            entry = self._entries.get(key)
            if entry is None:
                self.misses += 1
                return None
            self._entries.move_to_end(key)
            self.hits += 1
            return entry[0]

    def put(self, key, value, nbytes: int) -> None:
        """Store ``value`` under ``key``, evicting the least recently used entries past the budget."""
        nbytes = int(nbytes)
        with self._lock:
            old = self._entries.pop(key, None)
            if old is not None:
                self._bytes -= old[1]
            if nbytes > self.max_bytes:
                return
            self._entries[key] = (value, nbytes)
            self._bytes += nbytes
            while self._bytes > self.max_bytes and self._entries:
                _, (_, dropped) = self._entries.popitem(last=False)
                self._bytes -= dropped

    def clear(self) -> None:
        """Drop every entry."""
        with self._lock:
            self._entries.clear()
            self._bytes = 0


_DEFAULT = EncodingCache()


def default_cache() -> EncodingCache:
    """The process-wide cache that :func:`~infoscope.encode_column` uses by default.

    Returns
    -------
    EncodingCache

    References
    ----------
    .. [1] Python, ``collections.OrderedDict`` (the LRU order).

    Examples
    --------
    >>> default_cache().max_bytes == DEFAULT_CACHE_BYTES
    True
    """
    return _DEFAULT


def clear_cache() -> None:
    """Empty the process-wide encoding cache.

    Returns
    -------
    None

    References
    ----------
    .. [1] Python, ``collections.OrderedDict.clear``.

    Examples
    --------
    >>> clear_cache()
    >>> len(default_cache())
    0
    """
    _DEFAULT.clear()
