"""A content-keyed LRU cache of encoded columns, bounded in bytes.

The key of an entry is ``(content_key, settings)``: a digest of the column's values
(not its identity, so a column changed in place gets a new key and a copy of an
unchanged column hits) and the hashable encoding settings.  Entries hold only
arrays that infoscope made itself (codes, edges), never a view of the user's data,
and those arrays are read-only.
"""
from __future__ import annotations

import hashlib
import threading
from collections import OrderedDict

import numpy as np
import pandas as pd

__all__ = ["content_key", "EncodingCache", "DEFAULT_CACHE_BYTES", "default_cache", "clear_cache"]

#: Default byte budget of the process-wide cache (codes of ~256 million rows at uint8).
DEFAULT_CACHE_BYTES = 256 * 2**20


def _digest() -> "hashlib._Hash":
    # sha1 is the fastest digest in hashlib here (about 1.3 GB/s); this is not security
    try:
        return hashlib.sha1(usedforsecurity=False)
    except TypeError:  # pragma: no cover - very old OpenSSL builds
        return hashlib.sha1()


def content_key(series: pd.Series) -> str | None:
    """A digest of a column's values and dtype, or None when the values cannot be hashed.

    Plain NumPy dtypes are hashed as raw bytes, zoned datetimes as their UTC
    instants (the zone is in the dtype), nullable and arrow numbers as values plus
    NA mask, other arrow-backed columns (strings) as their arrow buffers, and
    categoricals as codes plus categories and their order (unused categories change
    K).  Everything else goes through :func:`pandas.util.hash_pandas_object` (values
    only, not the index) plus the missing mask, plus for object columns of mixed
    cells the type of every cell (pandas hashes objects through their text, so 1
    and "1" would otherwise collide).
    Unhashable cells (lists, dicts) make the column uncacheable: None.

    Parameters
    ----------
    series : pandas.Series
        The column (its index is ignored).

    Returns
    -------
    str or None
        A hex digest (SHA-1, not used for security), or None.

    References
    ----------
    .. [1] pandas, ``pandas.util.hash_pandas_object``; Python, ``hashlib``.

    Examples
    --------
    >>> import pandas as pd
    >>> content_key(pd.Series([1.0, 2.0])) == content_key(pd.Series([1.0, 2.0]))
    True
    >>> content_key(pd.Series([1, "x"], dtype=object)) == content_key(pd.Series(["1", "x"], dtype=object))
    False
    """
    h = _digest()
    dtype = series.dtype
    h.update(f"{dtype}|{len(series)}|".encode())
    if isinstance(dtype, np.dtype) and dtype.kind in "biufcmM":
        arr = np.ascontiguousarray(series.to_numpy())
        h.update(arr.view(np.uint8).reshape(-1) if arr.size else b"")
        return h.hexdigest()
    if isinstance(dtype, pd.CategoricalDtype):
        codes = np.ascontiguousarray(series.cat.codes.to_numpy())
        h.update(codes.view(np.uint8).reshape(-1) if codes.size else b"")
        cats = content_key(pd.Series(series.cat.categories))
        if cats is None:
            return None
        h.update(f"|{cats}|{dtype.ordered}".encode())
        return h.hexdigest()
    if isinstance(dtype, pd.DatetimeTZDtype):
        utc = series.dt.tz_convert("UTC").dt.tz_localize(None).to_numpy()
        h.update(np.ascontiguousarray(utc).view(np.uint8).reshape(-1) if utc.size else b"")
        return h.hexdigest()
    numpy_dtype = getattr(dtype, "numpy_dtype", None)
    if numpy_dtype is not None and numpy_dtype.kind in "biuf" and dtype.kind in "biuf":
        # nullable / arrow numbers: the values with NA as 0, and the NA mask
        arr = np.ascontiguousarray(series.to_numpy(dtype=numpy_dtype, na_value=numpy_dtype.type(0)))
        h.update(arr.view(np.uint8).reshape(-1) if arr.size else b"")
        h.update(np.packbits(series.isna().to_numpy(dtype=bool)).tobytes())
        return h.hexdigest()
    chunks = getattr(getattr(series.array, "_pa_array", None), "chunks", None)
    if chunks is not None:
        # arrow-backed (e.g. pandas' default string dtype): hash the arrow buffers,
        # with each chunk's offset and length (a slice shares its parent's buffers)
        for chunk in chunks:
            if chunk.get_total_buffer_size() > 2 * chunk.nbytes + 65_536:
                # a small slice of a big column (df.head(), a sample by slicing) shares
                # the parent's buffers: hash a compact copy of its own cells instead
                # of the whole parent (1000 rows of 5M strings: 0.1 s per column)
                import pyarrow

                chunk = pyarrow.concat_arrays([chunk])
            h.update(f"|{chunk.offset}|{len(chunk)}|".encode())
            for buf in chunk.buffers():
                h.update(b"-" if buf is None else memoryview(buf))
        return h.hexdigest()
    try:
        hashed = pd.util.hash_pandas_object(series, index=False).to_numpy()
    except TypeError:
        return None
    h.update(np.ascontiguousarray(hashed).view(np.uint8).reshape(-1) if hashed.size else b"")
    mask = np.packbits(series.isna().to_numpy(dtype=bool))
    h.update(mask.tobytes())
    if dtype == object:
        inferred = pd.api.types.infer_dtype(series, skipna=True)
        h.update(f"|{inferred}|".encode())
        if inferred in ("string", "empty", "boolean", "bytes"):
            return h.hexdigest()  # one type of cell: the hash above tells them apart
        types = pd.factorize(np.frompyfunc(type, 1, 1)(series.to_numpy()))
        h.update(np.ascontiguousarray(types[0]).view(np.uint8).reshape(-1) if len(series) else b"")
        h.update("|".join(f"{t.__module__}.{t.__qualname__}" for t in types[1]).encode())
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
