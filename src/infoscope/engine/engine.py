"""PairEngine: the joint count table of every column pair, cached and recounted incrementally."""
from __future__ import annotations

import contextlib
import numbers
from collections import OrderedDict
from collections.abc import Callable, Iterable, Sequence

import numpy as np

from infoscope.encode.cache import array_digest

from infoscope.engine.counting import (
    KERNELS,
    available_threads,
    block_dtype,
    pair_layout,
    resolve_backend,
)
from infoscope.engine.sampling import sample_rows

__all__ = ["PairEngine", "DEFAULT_CACHE_BYTES", "DEFAULT_CHUNK_ROWS"]

DEFAULT_CACHE_BYTES = 256 * 1024 * 1024
# Rows per chunk. Each chunk ends with all threads meeting (and lets the progress bar
# and Ctrl-C in); per pair the kernel streams two code columns of the chunk, so the
# chunk need not fit in cache. 262,144 rows x 50 uint8 columns = 12.5 MiB of copies;
# on the benchmark frame 65,536 to 262,144 rows measured alike (within the noise of
# the shared machine), the larger meeting less often.
DEFAULT_CHUNK_ROWS = 1 << 18
# Above this many counter increments (rows x pairs, about a second of counting on
# two cores) progress="auto" shows a bar.
_AUTO_PROGRESS_INCREMENTS = 1_000_000_000


def _positive_int(value, parameter: str, *, allow_none: bool = True):
    if value is None and allow_none:
        return None
    if isinstance(value, bool) or not isinstance(value, numbers.Integral) or value < 1:
        raise ValueError(f"{parameter}: expected a positive integer{' or None' if allow_none else ''}, got {value!r}")
    return int(value)


@contextlib.contextmanager
def _numba_threads(threads: int):
    """numba's thread count for the duration, with pairs handed out one at a time.

    Handing out pairs dynamically (chunk size 1) instead of in one static block per
    thread keeps a thread that the operating system has paused (a shared machine)
    from holding up the whole chunk.
    """
    from infoscope._numba import numba

    previous = numba.get_num_threads()
    previous_chunk = numba.get_parallel_chunksize()
    numba.set_num_threads(max(1, min(threads, numba.config.NUMBA_NUM_THREADS)))
    numba.set_parallel_chunksize(1)
    try:
        yield
    finally:
        numba.set_parallel_chunksize(previous_chunk)
        numba.set_num_threads(previous)


def _content_key(codes: np.ndarray, k: int) -> tuple:
    # Keyed by content, not identity: a slider that returns to an earlier binning
    # finds that binning's tables still cached.
    return (int(k), codes.dtype.str, array_digest(codes))  # XXH3: the one key function of the package


class PairEngine:
    """The pairwise-complete joint count table of every pair of encoded columns.

    The engine holds the codes of the columns and a cache of pair tables. Replacing a
    column (:meth:`set_column`) invalidates only the pairs that touch it; the next
    :meth:`tables` call counts every missing pair together, in one pass over the rows.

    Parameters
    ----------
    columns : sequence of EncodedColumn, default=()
        Encoded columns (``name``, ``codes``, ``k``; missing rows carry code ``k``).
        Every column must have the same number of rows.
    threads : int or None, default=None
        Threads of the numba kernel; None uses every core. The numpy back-end counts
        in the calling thread.
    chunk_rows : int or None, default=None
        Rows per chunk (None: 262,144). Any size gives the same tables.
    cache_bytes : int, default=256 MiB
        Memory budget of the table cache; the least recently used tables are dropped
        beyond it (and recounted when asked for again).
    progress : {"auto", True, False} or callable, default="auto"
        ``"auto"`` shows a ``tqdm`` bar for counts expected to take more than about a
        second; a callable is called as ``progress(rows_done, rows_total)`` after each
        chunk (an exception it raises, e.g. KeyboardInterrupt, cancels the count and
        leaves the engine as it was).
    backend : {"auto", "numba", "numpy"}, default="auto"
        Counting kernel (see :mod:`infoscope.engine.counting`). "auto" counts with
        numba once its compiled kernels are loaded (the first count starts loading
        them on a background thread: a first compile on a machine takes a few
        seconds) and with numpy until then; the tables are the same.
    sample : int or None, default=None
        Count only a seeded random subset of this many rows (simple random sampling
        without replacement). :attr:`sampled` then says how many rows were used.
    seed : int, default=0
        Seed of the row sample.

    Attributes
    ----------
    sampled : int or None
        Number of rows counted when a sample was drawn, None when every row is used.
    n : int or None
        Rows counted per pair (before dropping missing rows); None before any column.
    last_counted : tuple of (str, str)
        The pairs the last :meth:`tables` call had to count (the rest came from cache).
    passes : int
        How many passes over the rows the engine has made so far.

    Notes
    -----
    A pair's table counts the rows where both columns are present (pairwise-complete
    cases), so two pairs may rest on different rows when columns miss different rows.
    Codes are held by reference (not copied) unless a sample is drawn; do not modify
    a column's codes in place after handing it over.

    References
    ----------
    .. [1] Little, R. J. A. & Rubin, D. B. (2019). *Statistical Analysis with Missing
       Data*, 3rd ed., Wiley, sec. 3.4 (available-case analysis; from memory).
    .. [2] Cochran, W. G. (1977). *Sampling Techniques*, 3rd ed., Wiley, ch. 2.

    Examples
    --------
    >>> import numpy as np
    >>> from types import SimpleNamespace as Col
    >>> eng = PairEngine([Col(name="a", codes=np.array([0, 1, 1, 2], np.uint8), k=2),
    ...                   Col(name="b", codes=np.array([1, 0, 1, 1], np.uint8), k=2)],
    ...                  progress=False, backend="numpy")
    >>> eng.table("a", "b").tolist()
    [[0, 1], [1, 1]]
    """

    def __init__(
        self,
        columns: Sequence = (),
        *,
        threads: int | None = None,
        chunk_rows: int | None = None,
        cache_bytes: int = DEFAULT_CACHE_BYTES,
        progress="auto",
        backend: str = "auto",
        sample: int | None = None,
        seed=0,
    ):
        self._threads = _positive_int(threads, "threads")
        self._chunk_rows = _positive_int(chunk_rows, "chunk_rows") or DEFAULT_CHUNK_ROWS
        if isinstance(cache_bytes, bool) or not isinstance(cache_bytes, numbers.Integral) or cache_bytes < 0:
            raise ValueError(f"cache_bytes: expected a non-negative integer, got {cache_bytes!r}")
        self._cache_bytes = int(cache_bytes)
        if not (progress in ("auto", True, False) or callable(progress)):
            raise ValueError(f"progress: expected 'auto', True, False or a callable, got {progress!r}")
        self._progress = progress
        self._backend = resolve_backend(backend)
        # "auto": numba once its kernels are loaded, numpy (identical tables) until then
        self._auto = backend == "auto" and self._backend == "numba"
        self._sample = _positive_int(sample, "sample")
        self._seed = seed
        self._columns: dict[str, object] = {}
        self._codes: dict[str, np.ndarray] = {}
        self._keys: dict[str, tuple] = {}
        self._marginals: dict[str, np.ndarray] = {}
        self._cache: OrderedDict[tuple, np.ndarray] = OrderedDict()
        self._cache_used = 0
        self._n_full: int | None = None
        self._rows: np.ndarray | None = None
        self.sampled: int | None = None
        self.last_counted: tuple = ()
        self.passes = 0
        for col in columns:
            self.set_column(col)

    # ------------------------------------------------------------------ columns
    @property
    def names(self) -> list[str]:
        """Column names in the order they were first added."""
        return list(self._columns)

    @property
    def n(self) -> int | None:
        if self._n_full is None:
            return None
        return self.sampled if self.sampled is not None else self._n_full

    @property
    def backend(self) -> str:
        """The counting kernel in use (``"numba"`` or ``"numpy"``).

        With ``backend="auto"`` this is ``"numpy"`` until numba's kernels are loaded
        (on a background thread, started by the first count) and ``"numba"`` after.
        """
        return self._kernel_backend(start=False)

    def _kernel_backend(self, start: bool = True) -> str:
        if self._auto:
            from infoscope.engine.counting import numba_ready

            if not (numba_ready() if start else _numba_loaded()):
                return "numpy"
        return self._backend

    @property
    def cached_bytes(self) -> int:
        """Bytes held by cached tables (at most ``cache_bytes``)."""
        return self._cache_used

    def column(self, name: str):
        """The column stored under ``name`` (as handed to :meth:`set_column`)."""
        self._check_name(name)
        return self._columns[name]

    def set_column(self, col) -> None:
        """Add a column, or replace the column of the same name.

        Only the pairs that touch this column are invalidated; tables of the other
        pairs stay cached. A column whose codes equal an earlier version's finds
        that version's tables again (the cache is keyed by content).

        Parameters
        ----------
        col : EncodedColumn
            Its ``name``, ``codes`` (1-D unsigned, ``k`` marks missing) and ``k``.

        Returns
        -------
        None

        Raises
        ------
        TypeError, ValueError
            When the name, codes or ``k`` are unusable, or the row count differs from
            the other columns'. The message names the column.

        Examples
        --------
        >>> import numpy as np
        >>> from types import SimpleNamespace as Col
        >>> eng = PairEngine([Col(name="a", codes=np.array([0, 1, 0], np.uint8), k=2),
        ...                   Col(name="b", codes=np.array([0, 0, 1], np.uint8), k=2)], progress=False)
        >>> eng.set_column(Col(name="a", codes=np.array([1, 1, 0], np.uint8), k=2))
        >>> eng.table("a", "b").tolist()
        [[0, 1], [2, 0]]
        """
        name = getattr(col, "name", None)
        if not isinstance(name, str):
            raise TypeError(f"set_column: a column needs a str name, got {name!r}")
        codes = getattr(col, "codes", None)
        k = getattr(col, "k", None)
        if not isinstance(codes, np.ndarray) or codes.ndim != 1:
            raise TypeError(f"column {name!r}: codes must be a 1-D numpy array, got {type(codes).__name__}")
        if codes.dtype.kind != "u":
            raise TypeError(f"column {name!r}: codes must be unsigned integers, got dtype {codes.dtype}")
        if isinstance(k, bool) or not isinstance(k, numbers.Integral) or k < 0:
            raise ValueError(f"column {name!r}: k must be a non-negative integer, got {k!r}")
        k = int(k)
        if codes.size and int(codes.max()) > k:
            raise ValueError(
                f"column {name!r}: codes must lie in 0..{k} (k = {k} marks missing), "
                f"found code {int(codes.max())}"
            )
        n = codes.shape[0]
        others = [c for c in self._columns if c != name]
        if self._n_full is None or not others:
            self._n_full = n
            self._rows = sample_rows(n, self._sample, seed=self._seed) if self._sample else None
            self.sampled = None if self._rows is None else int(self._rows.shape[0])
        elif n != self._n_full:
            raise ValueError(f"column {name!r} has {n} rows but the other columns have {self._n_full}")
        used = codes if self._rows is None else codes[self._rows]
        self._columns[name] = col
        self._codes[name] = used
        self._keys[name] = (name, *_content_key(used, k))
        self._marginals.pop(name, None)

    def remove_column(self, name: str) -> None:
        """Forget a column (its tables leave the cache as the budget needs room).

        Parameters
        ----------
        name : str
            A column of the engine.

        Returns
        -------
        None

        Examples
        --------
        >>> import numpy as np
        >>> from types import SimpleNamespace as Col
        >>> eng = PairEngine([Col(name="a", codes=np.zeros(2, np.uint8), k=1)])
        >>> eng.remove_column("a"); eng.names
        []
        """
        self._check_name(name)
        for store in (self._columns, self._codes, self._keys, self._marginals):
            store.pop(name, None)
        if not self._columns:
            self._n_full = None
            self._rows = None
            self.sampled = None

    def marginal(self, name: str) -> np.ndarray:
        """Counts of each symbol ``0 .. k-1`` of one column (missing rows left out).

        Parameters
        ----------
        name : str
            A column of the engine.

        Returns
        -------
        numpy.ndarray
            int64 of shape ``(k,)`` (read-only).

        Examples
        --------
        >>> import numpy as np
        >>> from types import SimpleNamespace as Col
        >>> PairEngine([Col(name="a", codes=np.array([0, 2, 1, 0], np.uint8), k=2)]).marginal("a").tolist()
        [2, 1]
        """
        self._check_name(name)
        if name not in self._marginals:
            k = self._keys[name][1]
            counts = np.bincount(self._codes[name], minlength=k + 1)[:k].astype(np.int64)
            counts.flags.writeable = False
            self._marginals[name] = counts
        return self._marginals[name]

    # ------------------------------------------------------------------- tables
    def table(self, a: str, b: str) -> np.ndarray:
        """Pairwise-complete joint counts of columns ``a`` (rows) and ``b`` (columns).

        Parameters
        ----------
        a, b : str
            Two different columns of the engine.

        Returns
        -------
        numpy.ndarray
            int64 of shape ``(k_a, k_b)`` (read-only; copy it to modify): the counts of
            the rows where both columns are present.

        References
        ----------
        .. [1] Agresti, A. (2013). *Categorical Data
           Analysis*, 3rd ed., Wiley, sec. 2.1.

        Examples
        --------
        >>> import numpy as np
        >>> from types import SimpleNamespace as Col
        >>> eng = PairEngine([Col(name="a", codes=np.array([0, 1, 2], np.uint8), k=2),
        ...                   Col(name="b", codes=np.array([1, 1, 0], np.uint8), k=2)], progress=False)
        >>> eng.table("a", "b").tolist()  # the third row is missing in a
        [[0, 1], [0, 1]]
        """
        return self.tables([(a, b)])[(a, b)]

    def tables(self, pairs: Iterable[tuple[str, str]] | None = None) -> dict:
        """Joint tables of many pairs; only the ones not cached are counted.

        Parameters
        ----------
        pairs : iterable of (str, str), optional
            Pairs of column names; default every pair ``a < b`` in column order.

        Returns
        -------
        dict
            ``{(a, b): table}``, int64 tables of shape ``(k_a, k_b)``, in the order asked.

        Examples
        --------
        >>> import numpy as np
        >>> from types import SimpleNamespace as Col
        >>> cols = [Col(name=c, codes=np.array([0, 1, 1], np.uint8), k=2) for c in "xyz"]
        >>> eng = PairEngine(cols, progress=False)
        >>> list(eng.tables())
        [('x', 'y'), ('x', 'z'), ('y', 'z')]
        >>> eng.set_column(Col(name="z", codes=np.array([1, 1, 0], np.uint8), k=2))
        >>> _ = eng.tables(); eng.last_counted  # only the pairs touching z
        (('x', 'z'), ('y', 'z'))
        """
        if pairs is None:
            names = self.names
            pairs = [(a, b) for i, a in enumerate(names) for b in names[i + 1:]]
        else:
            pairs = [tuple(p) for p in pairs]
        found: dict = {}
        to_count: dict = {}  # cache key -> (a, b), the first orientation asked
        for pair in pairs:
            if len(pair) != 2:
                raise ValueError(f"pairs: expected (name, name) pairs, got {pair!r}")
            a, b = pair
            self._check_name(a)
            self._check_name(b)
            if a == b:
                raise ValueError(f"pairs: ({a!r}, {b!r}) pairs a column with itself; use marginal({a!r})")
            key = (self._keys[a], self._keys[b])
            if key in self._cache:
                self._cache.move_to_end(key)
                found[pair] = self._cache[key]
            elif key[::-1] in self._cache:
                self._cache.move_to_end(key[::-1])
                found[pair] = self._cache[key[::-1]].T
            elif key not in to_count and key[::-1] not in to_count:
                to_count[key] = pair
        counted = self._count(list(to_count.values())) if to_count else {}
        self.last_counted = tuple(counted)
        for key, pair in to_count.items():
            self._store(key, counted[pair])
        out = {}
        for a, b in pairs:
            if (a, b) in found:
                out[(a, b)] = found[(a, b)]
            elif (a, b) in counted:
                out[(a, b)] = counted[(a, b)]
            else:
                out[(a, b)] = counted[(b, a)].T
        return out

    # ---------------------------------------------------------------- internals
    def shuffle_counts(self, pairs: Sequence[tuple[str, str]], observed, budgets, stop_after, seeds) -> tuple[np.ndarray, np.ndarray]:
        """Permutation null of pair tables: shuffle column ``b`` against ``a`` on their complete rows.

        Parameters
        ----------
        pairs : sequence of (str, str)
            The pairs ``(a, b)``; each is shuffled on the rows where both are present.
        observed : sequence of float
            Each pair's observed score ``sum O ln O`` (from
            :func:`infoscope.engine.permutation.table_score`).
        budgets : sequence of int
            Most shuffles per pair.
        stop_after : int or sequence of int
            A pair stops once this many shuffles reached its observed score.
        seeds : sequence of int
            One seed per pair.

        Returns
        -------
        done, exceed : numpy.ndarray of int64
            Shuffles made and shuffles that reached the observed score, per pair
            (:func:`infoscope.engine.permutation.shuffle_counts`, with this engine's
            back-end and threads).

        References
        ----------
        .. [1] Besag, J., & Clifford, P. (1991). Sequential Monte Carlo p-values.
           Biometrika, 78(2), 301-304.

        Examples
        --------
        >>> import numpy as np
        >>> from types import SimpleNamespace as Col
        >>> from infoscope.engine.permutation import score_lookup, table_score
        >>> codes = np.repeat(np.array([0, 1], np.uint8), 20)
        >>> eng = PairEngine([Col(name="a", codes=codes, k=2), Col(name="b", codes=codes, k=2)],
        ...                  backend="numpy")
        >>> obs = table_score(eng.table("a", "b"), score_lookup(40))
        >>> done, exceed = eng.shuffle_counts([("a", "b")], [obs], [99], 10, [3])
        >>> int(done[0]), int(exceed[0])
        (99, 0)
        """
        from infoscope.engine.permutation import shuffle_counts

        xs, ys, widths = [], [], []
        for a, b in pairs:
            self._check_name(a)
            self._check_name(b)
            ca, cb = self._codes[a], self._codes[b]
            ka, kb = self._keys[a][1], self._keys[b][1]
            both = (ca != ka) & (cb != kb)
            xs.append(ca[both])
            ys.append(cb[both])
            widths.append(max(kb, 1))
        threads = self._threads or available_threads()
        backend = self._kernel_backend()
        scope = _numba_threads(threads) if backend == "numba" else contextlib.nullcontext()
        with scope:
            return shuffle_counts(xs, ys, widths, observed, budgets, stop_after, seeds, backend=backend)

    def _check_name(self, name) -> None:
        if name not in self._columns:
            raise KeyError(f"no column named {name!r} in the engine (columns: {self.names[:10]}...)")

    def _store(self, key, table: np.ndarray) -> None:
        if table.nbytes > self._cache_bytes:
            return
        self._cache[key] = table
        self._cache_used += table.nbytes
        while self._cache_used > self._cache_bytes:
            _, dropped = self._cache.popitem(last=False)
            self._cache_used -= dropped.nbytes

    def _progress_reporter(self, rows: int, n_pairs: int) -> tuple[Callable | None, object]:
        progress = self._progress
        if callable(progress) and progress not in (True, False):
            return progress, None
        show = progress is True or (progress == "auto" and rows * n_pairs >= _AUTO_PROGRESS_INCREMENTS)
        if not show:
            return None, None
        from tqdm.auto import tqdm

        bar = tqdm(total=rows, unit="rows", unit_scale=True, desc=f"counting {n_pairs} pairs", leave=False)
        return (lambda done, total: bar.update(done - bar.n)), bar

    def _count(self, pairs: list[tuple[str, str]]) -> dict:
        """Count ``pairs`` together in one pass over the rows; nothing is stored here."""
        involved = list(dict.fromkeys(name for pair in pairs for name in pair))
        index = {name: i for i, name in enumerate(involved)}
        ks = [self._keys[name][1] for name in involved]
        backend = self._kernel_backend()
        layout = pair_layout(ks, [(index[a], index[b]) for a, b in pairs], names=involved,
                             triples=backend == "numba", rows=self.n or 0)
        dtype = block_dtype(ks)
        codes = [self._codes[name] for name in involved]
        rows = self.n or 0
        kernel = KERNELS[backend]
        flat = np.zeros(layout.cells, dtype=np.int64)  # a temporary until every chunk is in
        report, bar = self._progress_reporter(rows, len(pairs))
        threads = self._threads or available_threads()
        scope = _numba_threads(threads) if backend == "numba" else contextlib.nullcontext()
        step = self._chunk_rows
        # One buffer for every chunk; the shorter last chunk is a C-contiguous view of
        # its start, so no second buffer is allocated.
        buffer = np.empty(len(involved) * min(step, rows), dtype=dtype)
        try:
            with scope:
                for start in range(0, rows, step):
                    stop = min(start + step, rows)
                    block = buffer[: len(involved) * (stop - start)].reshape(len(involved), stop - start)
                    for i, c in enumerate(codes):
                        block[i] = c[start:stop]
                    kernel(block, layout, flat)
                    if report is not None:
                        report(stop, rows)
        finally:
            if bar is not None:
                bar.close()
        self.passes += 1
        tables = {}
        for pair, t in zip(pairs, layout.split(flat)):
            final = np.ascontiguousarray(t[:-1, :-1])
            final.flags.writeable = False
            tables[pair] = final
        return tables

    def __repr__(self) -> str:
        sampled = f", sampled={self.sampled}" if self.sampled is not None else ""
        return f"PairEngine({len(self._columns)} columns, n={self.n}{sampled}, backend={self._backend!r})"


def _numba_loaded() -> bool:
    from infoscope.engine.counting import _NUMBA_STATE

    return _NUMBA_STATE["ready"]
