"""Joint count tables of many column pairs: the additive chunk / merge / finalize layer.

Every table here carries the missing sentinel: a pair of columns with alphabet sizes
``k_a`` and ``k_b`` is counted into a ``(k_a + 1) x (k_b + 1)`` table whose last row
and column hold the rows where that column is missing (code ``k``). Tables of row
chunks add up (:func:`merge`), so any back-end that can hand over row chunks of codes
(in memory, a database cursor, the partitions of a cluster frame) gets the same totals;
:func:`finalize` drops the sentinel row and column, leaving the pairwise-complete table.

Two kernels count a chunk, chosen with ``backend=``:

``"numba"``
    a compiled kernel that walks its tasks in parallel (``prange``). A task is either
    one pair (the two code columns of the chunk streamed once) or a *three-column
    table*: three low-cardinality columns counted together into one
    ``(k_a + 1)(k_b + 1)(k_c + 1)`` table of at most :data:`TRIPLE_MAX_CELLS` cells,
    one increment per row for three pairs, whose sums over one axis each are the
    three pair tables (a greedy cover, :func:`pair_layout`). Each task owns its slice
    of one flat counter array, so threads never write to the same cell and no
    per-thread copies need merging. (A row-major layout, all pairs of a row block
    counted into per-thread tables, measured 5-6x slower on the benchmark frame:
    its 700,000 counters do not stay in cache.)
``"numpy"``
    one ``numpy.bincount`` of ``a * (k_b + 1) + b`` per pair; no compiler needed.

Both give identical tables (``tests/test_engine.py`` checks them against
``pandas.crosstab``). ``numba`` is imported only when a count is first asked of it.
"""
from __future__ import annotations

import os
import threading
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

__all__ = ["count_chunk", "merge", "finalize", "BACKENDS", "MAX_TABLE_CELLS"]

BACKENDS = ("auto", "numba", "numpy")

# A dense int64 table larger than this (128 MiB) is almost always a mistake (an
# ID-like column that was not folded); refuse it with a message instead of
# exhausting memory.
MAX_TABLE_CELLS = 1 << 24


# A small table (few cells: low-cardinality columns) is counted into COPIES
# interleaved copies (row r goes to copy r % COPIES), summed at the end: with few
# cells, consecutive rows often hit the same counter and each increment would wait
# for the previous store to it. Larger tables get one copy (pitch 0): there the
# repeats are rarer and four copies would quadruple the counters streamed through
# the cache for every chunk (measured on the benchmark frame: one copy ~30% faster).
COPIES = 4
SMALL_TABLE_CELLS = 64


def _pitch(size: int) -> int:
    """Cells between two copies of a table (0: a single copy).

    Whole cache lines, and not a multiple of 4 KiB apart (copies 4 KiB apart alias
    in the store buffer's address check).
    """
    if size > SMALL_TABLE_CELLS:
        return 0
    pitch = -(-size // 8) * 8
    if (pitch * 8) % 4096 < 512 or (pitch * 8) % 4096 > 3584:
        pitch += 64
    return pitch


# Three-column tables: a triple of low-cardinality columns (a, b, c) is counted as one
# (k_a + 1)(k_b + 1)(k_c + 1) table, one increment per row for three pairs; the three
# pair tables are its sums over one axis each. A triple table at most this big (int64:
# 256 KiB, half a core's L2 cache here) is used; bigger ones would spill the cache
# and those pairs are counted directly. 0 turns triples off. On the benchmark frame
# (best of 3, quiet machine, planner of _plan_triples): 2 threads, at most 2**14
# cells 1.95 s, 2**15 1.76 s (354 triples cover 1,062 of 1,225 pairs; 34 MiB of
# counters), 2**16 1.79 s (357 triples, 42 MiB); pairs only 2.22 s.
TRIPLE_MAX_CELLS = 1 << 15


@dataclass(frozen=True)
class PairLayout:
    """Where the counters of each pair live inside one flat int64 counter array.

    A pair is counted either directly or inside a three-column table.

    Direct pairs ``d``: ``first[d]``/``second[d]`` index the code columns,
    ``stride[d]`` is ``k_second + 1``, ``dshapes[d]`` the sentinel shape; the pair owns
    ``flat[offset[d]:offset[d + 1]]``, which holds its row-major table once
    (``pitch[d] == 0``) or ``COPIES`` copies of it, ``pitch[d]`` cells apart.

    Triples ``g``: columns ``triples[g]`` (three indices, increasing), the table
    ``flat[toffset[g]:toffset[g + 1]]`` row-major with strides ``tstride[g]``
    (``(k_y + 1)(k_z + 1)`` and ``k_z + 1``).

    ``shapes[q]`` is the sentinel shape of pair ``q`` as asked for, ``source[q]``
    where it is counted: ``(0, d)`` direct pair ``d`` or ``(1, g, axis)`` triple
    ``g`` summed over ``axis``; ``transpose[q]`` when the pair asked for runs
    against the order of the counted table.
    """

    first: np.ndarray
    second: np.ndarray
    stride: np.ndarray
    pitch: np.ndarray
    offset: np.ndarray
    dshapes: tuple[tuple[int, int], ...]
    triples: np.ndarray
    tstride: np.ndarray
    toffset: np.ndarray
    shapes: tuple[tuple[int, int], ...]
    source: tuple
    transpose: tuple

    @property
    def cells(self) -> int:
        return int(self.toffset[-1])

    @property
    def tasks(self) -> int:
        """Counting tasks (direct pairs plus triples); each adds one count per row."""
        return int(self.first.shape[0] + self.triples.shape[0])

    def split(self, flat: np.ndarray) -> list[np.ndarray]:
        """One 2-D int64 sentinel table per pair asked for, in their order."""
        cubes: dict = {}
        out = []
        for q, src in enumerate(self.source):
            if src[0] == 0:
                d = src[1]
                rows, cols = self.dshapes[d]
                pitch = int(self.pitch[d])
                own = flat[self.offset[d]:self.offset[d + 1]]
                if pitch:
                    own = own.reshape(COPIES, pitch)[:, : rows * cols].sum(axis=0)
                t = own.reshape(rows, cols)
            else:
                _, g, axis = src
                if g not in cubes:
                    kz = int(self.tstride[g, 1])
                    ky = int(self.tstride[g, 0]) // kz
                    cubes[g] = flat[self.toffset[g]:self.toffset[g + 1]].reshape(-1, ky, kz)
                t = cubes[g].sum(axis=axis)
            out.append(t.T if self.transpose[q] else t)
        return out


def _plan_triples(ks: Sequence[int], pairs, max_cells: int) -> list[tuple[int, int, int]]:
    """Greedy cover of ``pairs`` (a < b) by column triples of at most ``max_cells`` cells.

    Pairs are taken largest table first (they have the fewest third columns that
    fit); each gets the largest third column that still fits and whose two other
    pairs are also wanted and not yet covered. The rest stay direct. (On the
    benchmark frame this covers 1,071 of 1,225 pairs, against 978 when taking the
    smallest tables and third columns first, and counts 10% faster.)
    """
    if max_cells <= 0 or len(pairs) < 3:
        return []
    p = len(ks)
    kk = np.array([int(k) + 1 for k in ks], dtype=np.int64)
    wanted = np.zeros((p, p), dtype=bool)
    for a, b in pairs:
        wanted[a, b] = wanted[b, a] = True
    out = []
    for a, b in sorted(pairs, key=lambda ab: (-int(kk[ab[0]] * kk[ab[1]]), ab)):
        if not wanted[a, b]:
            continue
        fits = wanted[a] & wanted[b] & (kk[a] * kk[b] * kk <= max_cells)
        candidates = np.flatnonzero(fits)
        if candidates.size == 0:
            continue
        c = int(candidates[np.argmax(kk[candidates])])
        x, y, z = sorted((a, b, c))
        out.append((x, y, z))
        for u, v in ((x, y), (x, z), (y, z)):
            wanted[u, v] = wanted[v, u] = False
    # Second pass, for what is left: a triple may also serve just two wanted pairs
    # that share a column (a star, as when one re-encoded column is recounted against
    # all the others). One increment per row still serves two pairs; the third
    # pair's table is counted but not used.
    for a, b in sorted(pairs, key=lambda ab: (-int(kk[ab[0]] * kk[ab[1]]), ab)):
        if not wanted[a, b]:
            continue
        fits = (wanted[a] | wanted[b]) & (kk[a] * kk[b] * kk <= max_cells)
        fits[a] = fits[b] = False
        candidates = np.flatnonzero(fits)
        if candidates.size == 0:
            continue
        c = int(candidates[np.argmax(kk[candidates])])
        out.append(tuple(sorted((a, b, c))))
        for u, v in ((a, b), (a, c), (b, c)):
            wanted[u, v] = wanted[v, u] = False
    return out


def pair_layout(ks: Sequence[int], pairs: Sequence[tuple[int, int]], names=None, *,
                triples: bool = False, rows: int | None = None) -> PairLayout:
    """Offsets of the sentinel tables of ``pairs`` (indices into ``ks``) in one flat array.

    With ``triples=True``, low-cardinality pairs are grouped into three-column tables
    of at most :data:`TRIPLE_MAX_CELLS` cells (and fewer cells than ``rows``, the
    rows to be counted, when given: a sparser table gains nothing).
    """
    ks = [int(k) for k in ks]
    pairs = [(int(a), int(b)) for a, b in pairs]
    shapes = []
    for a, b in pairs:
        shape = (ks[a] + 1, ks[b] + 1)
        if shape[0] * shape[1] > MAX_TABLE_CELLS:
            label = (names[a], names[b]) if names is not None else (a, b)
            raise ValueError(
                f"pair {label!r}: its joint table would have {shape[0]} x {shape[1]} cells "
                f"(more than {MAX_TABLE_CELLS}); fold the levels of these columns "
                "(e.g. a smaller max_categories) before counting pairs"
            )
        shapes.append(shape)
    limit = TRIPLE_MAX_CELLS if triples else 0
    if rows is not None:
        limit = min(limit, int(rows) - 1)
    unordered = sorted({(min(a, b), max(a, b)) for a, b in pairs if a != b})
    trip = _plan_triples(ks, unordered, limit)
    in_triple = {}
    for g, (x, y, z) in enumerate(trip):
        # a pair may sit in two triples (the second pass's stars); every triple
        # counts all rows, so either gives its table: keep the first
        in_triple.setdefault((y, z), (g, 0))
        in_triple.setdefault((x, z), (g, 1))
        in_triple.setdefault((x, y), (g, 2))
    direct: dict = {}
    source, transpose = [], []
    for a, b in pairs:
        key = (min(a, b), max(a, b))
        if a != b and key in in_triple:
            source.append((1, *in_triple[key]))
            transpose.append(a > b)
        else:
            direct.setdefault((a, b), len(direct))
            source.append((0, direct[(a, b)]))
            transpose.append(False)
    dpairs = list(direct)
    first = np.fromiter((a for a, _ in dpairs), dtype=np.intp, count=len(dpairs))
    second = np.fromiter((b for _, b in dpairs), dtype=np.intp, count=len(dpairs))
    dshapes = tuple((ks[a] + 1, ks[b] + 1) for a, b in dpairs)
    pitch = np.array([_pitch(r * c) for r, c in dshapes], dtype=np.intp)
    offset = np.zeros(len(dpairs) + 1, dtype=np.intp)
    sizes = np.array([r * c for r, c in dshapes], dtype=np.intp)
    np.cumsum(np.where(pitch > 0, COPIES * pitch, sizes), out=offset[1:])
    stride = np.array([c for _, c in dshapes], dtype=np.intp)
    tarr = np.array(trip, dtype=np.intp).reshape(len(trip), 3)
    tstride = np.array([[(ks[y] + 1) * (ks[z] + 1), ks[z] + 1] for _, y, z in trip], dtype=np.intp).reshape(-1, 2)
    tsizes = np.array([(ks[x] + 1) * (ks[y] + 1) * (ks[z] + 1) for x, y, z in trip], dtype=np.intp)
    toffset = np.empty(len(trip) + 1, dtype=np.intp)
    toffset[0] = offset[-1]
    np.cumsum(tsizes, out=toffset[1:])
    toffset[1:] += offset[-1]
    return PairLayout(first, second, stride, pitch, offset, dshapes, tarr, tstride, toffset,
                      tuple(shapes), tuple(source), tuple(transpose))


def block_dtype(ks: Sequence[int]) -> np.dtype:
    """Smallest unsigned dtype that holds every code 0..k (k is the missing sentinel)."""
    top = max((int(k) for k in ks), default=0)
    if top <= 0xFF:
        return np.dtype(np.uint8)
    if top <= 0xFFFF:
        return np.dtype(np.uint16)
    return np.dtype(np.uint32)


def resolve_backend(backend: str) -> str:
    """``"auto"`` -> ``"numba"`` when numba imports, else ``"numpy"``."""
    if backend not in BACKENDS:
        raise ValueError(f"backend must be one of {BACKENDS}, got {backend!r}")
    if backend != "auto":
        return backend
    try:
        import numba  # noqa: F401
    except ImportError:  # pragma: no cover - numba is a dependency
        return "numpy"
    return "numba"


_NUMBA_STATE: dict = {"ready": False, "thread": None, "lock": threading.Lock()}


def _load_numba_kernels() -> None:
    """Load (compile on the first run on a machine, read numba's cache later) every counting kernel."""
    with _NUMBA_STATE["lock"]:
        if _NUMBA_STATE["ready"]:
            return
        from infoscope.engine import _numba_kernels

        ks = [3, 3, 3]
        layout = pair_layout(ks, [(0, 1), (0, 2), (1, 2)], triples=True, rows=64)
        block = np.zeros((3, 64), dtype=np.uint8)
        out = np.zeros(layout.cells, dtype=np.int64)
        args = (block, layout.first, layout.second, layout.stride, layout.pitch, layout.offset,
                layout.triples, layout.tstride, layout.toffset, out)
        _numba_kernels.count_pairs_serial(*args)
        with _PARALLEL_LOCK:
            _numba_kernels.count_pairs(*args)
        # the selection test's counting kernels (engine/strata.py) load with them, so that
        # numba_ready() means "no compile left" and the widget's worker never compiles
        from infoscope.engine import _numba_strata

        _numba_strata.warm()
        _NUMBA_STATE["ready"] = True


def numba_ready(*, wait: bool = False) -> bool:
    """Whether the compiled counting kernels are loaded; starts loading them on a background thread.

    ``backend="auto"`` counts with numpy (the same tables) until they are: the first
    compile on a machine takes a few seconds, which a first view should not wait for.

    Parameters
    ----------
    wait : bool, default=False
        Load them in this thread first.

    Returns
    -------
    bool

    References
    ----------
    .. [1] numba documentation, "Compiling Python code with @jit" (``cache=True``).

    Examples
    --------
    >>> numba_ready(wait=True)
    True
    """
    if _NUMBA_STATE["ready"]:
        return True
    if wait:
        _load_numba_kernels()
        return True
    with _NUMBA_STATE["lock"]:
        if _NUMBA_STATE["thread"] is None and not _NUMBA_STATE["ready"]:
            # not a daemon: interpreter exit waits for a compile in progress
            _NUMBA_STATE["thread"] = threading.Thread(target=_load_numba_kernels, name="infoscope-count-kernels")
            _NUMBA_STATE["thread"].start()
    return _NUMBA_STATE["ready"]


def available_threads() -> int:
    """All cores this process may use."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # pragma: no cover - not Linux
        return os.cpu_count() or 1


# ----------------------------------------------------------------------------- kernels
def count_block_numpy(block: np.ndarray, layout: PairLayout, out: np.ndarray) -> None:
    """Add the counts of ``block`` (shape ``(columns, rows)``) into ``out`` (flat int64)."""
    wide = {}  # a column's codes as intp, converted once per block

    def as_intp(i):
        if i not in wide:
            wide[i] = block[i].astype(np.intp)
        return wide[i]

    for d in range(layout.first.shape[0]):
        a, b = int(layout.first[d]), int(layout.second[d])
        lo = int(layout.offset[d])  # the first copy is enough here
        size = layout.dshapes[d][0] * layout.dshapes[d][1]
        out[lo:lo + size] += np.bincount(as_intp(a) * int(layout.stride[d]) + block[b], minlength=size)
    for g in range(layout.triples.shape[0]):
        x, y, z = (int(v) for v in layout.triples[g])
        lo, hi = int(layout.toffset[g]), int(layout.toffset[g + 1])
        idx = as_intp(x) * int(layout.tstride[g, 0]) + as_intp(y) * int(layout.tstride[g, 1]) + block[z]
        out[lo:hi] += np.bincount(idx, minlength=hi - lo)


# Below this many increments (rows x pairs) a chunk is counted in the calling thread:
# waking numba's thread pool costs tens of microseconds (far more on a busy machine).
SERIAL_INCREMENTS = 1 << 20
_PARALLEL_LOCK = threading.Lock()


def count_block_numba(block: np.ndarray, layout: PairLayout, out: np.ndarray, *, parallel: bool = True) -> None:
    """Add the counts of ``block`` (shape ``(columns, rows)``) into ``out`` (flat int64)."""
    if block.shape[1] == 0 or layout.tasks == 0:
        return
    from infoscope.engine import _numba_kernels  # numba loads here, on the first count

    args = (block, layout.first, layout.second, layout.stride, layout.pitch, layout.offset,
            layout.triples, layout.tstride, layout.toffset, out)
    if not parallel or block.shape[1] * layout.tasks < SERIAL_INCREMENTS:
        _numba_kernels.count_pairs_serial(*args)
        return
    # numba's default thread pool (workqueue) aborts the process when two threads
    # launch parallel kernels at once; counts from several threads take turns.
    with _PARALLEL_LOCK:
        _numba_kernels.count_pairs(*args)


KERNELS = {"numpy": count_block_numpy, "numba": count_block_numba}


# ------------------------------------------------------------------ the additive layer
def _as_block(codes_block, ks) -> np.ndarray:
    if isinstance(codes_block, np.ndarray) and codes_block.ndim == 2:
        columns = list(codes_block)
    elif isinstance(codes_block, np.ndarray):
        raise ValueError(
            f"codes_block: expected a 2-D array shaped (columns, rows) or a sequence of "
            f"1-D code arrays, got an array of shape {codes_block.shape}"
        )
    else:
        columns = [np.asarray(c) for c in codes_block]
    if len(columns) != len(ks):
        raise ValueError(f"codes_block has {len(columns)} columns but ks has {len(ks)} entries")
    lengths = {c.shape[0] if c.ndim == 1 else -1 for c in columns}
    if -1 in lengths or len(lengths) > 1:
        raise ValueError("codes_block: every column must be 1-D and of the same length")
    for i, (c, k) in enumerate(zip(columns, ks)):
        if c.dtype.kind not in "ui":
            raise TypeError(f"codes_block column {i}: codes must be integers, got dtype {c.dtype}")
        if c.size and (int(c.min()) < 0 or int(c.max()) > int(k)):
            raise ValueError(
                f"codes_block column {i}: codes must lie in 0..{int(k)} (k = {int(k)} marks "
                f"missing), found {int(c.min())}..{int(c.max())}"
            )
    dtype = block_dtype(ks)
    rows = lengths.pop() if lengths else 0
    block = np.empty((len(columns), rows), dtype=dtype)
    for i, c in enumerate(columns):
        block[i] = c
    return block


def count_chunk(codes_block, ks, pairs, *, backend: str = "auto") -> dict:
    """Count the joint table, with missing sentinel, of each pair over one row chunk.

    Parameters
    ----------
    codes_block : sequence of 1-D arrays, or 2-D array of shape (columns, rows)
        The codes of the chunk's rows, one array per column (``0 .. k-1`` symbols,
        ``k`` missing). Any number of rows, including zero.
    ks : sequence of int
        Alphabet size ``k`` of each column.
    pairs : sequence of (int, int)
        Column index pairs to count.
    backend : {"auto", "numba", "numpy"}, default="auto"
        Counting kernel; ``"auto"`` uses numba when it imports.

    Returns
    -------
    dict
        ``{(i, j): table}`` with int64 tables of shape ``(k_i + 1, k_j + 1)``; row
        ``k_i`` / column ``k_j`` count the rows where that column is missing.

    Notes
    -----
    Counting is additive: the tables of consecutive chunks :func:`merge` into the
    tables of the whole data, whatever the chunk sizes.

    References
    ----------
    .. [1] Agresti, A. (2013). *Categorical Data Analysis*, 3rd ed., Wiley, sec. 2.1
       (contingency tables as cross-classified counts).

    Examples
    --------
    >>> import numpy as np
    >>> t = count_chunk([np.array([0, 1, 1], np.uint8), np.array([0, 0, 2], np.uint8)],
    ...                 ks=[2, 2], pairs=[(0, 1)], backend="numpy")
    >>> t[(0, 1)].tolist()
    [[1, 0, 0], [1, 0, 1], [0, 0, 0]]
    """
    backend = resolve_backend(backend)
    ks = [int(k) for k in ks]
    pairs = [(int(a), int(b)) for a, b in pairs]
    for a, b in pairs:
        if not (0 <= a < len(ks) and 0 <= b < len(ks)):
            raise ValueError(f"pairs: index pair {(a, b)} out of range for {len(ks)} columns")
    block = _as_block(codes_block, ks)
    layout = pair_layout(ks, pairs, triples=backend == "numba", rows=block.shape[1])
    flat = np.zeros(layout.cells, dtype=np.int64)
    KERNELS[backend](block, layout, flat)
    return dict(zip(pairs, layout.split(flat)))


def merge(left: Mapping, right: Mapping) -> dict:
    """Add two sets of chunk tables (the union of their pairs).

    Parameters
    ----------
    left, right : mapping
        ``{pair: table}`` as returned by :func:`count_chunk` (or an earlier merge).

    Returns
    -------
    dict
        ``{pair: left[pair] + right[pair]}``; a pair present on one side only is copied.

    References
    ----------
    .. [1] Agresti, A. (2013). *Categorical Data Analysis*, 3rd ed., Wiley, sec. 2.1
       (counts of disjoint samples add).

    Examples
    --------
    >>> import numpy as np
    >>> merge({(0, 1): np.ones((2, 2), np.int64)}, {(0, 1): np.ones((2, 2), np.int64)})[(0, 1)].tolist()
    [[2, 2], [2, 2]]
    """
    out = {}
    for pair in {**left, **right}:
        if pair in left and pair in right:
            a, b = np.asarray(left[pair]), np.asarray(right[pair])
            if a.shape != b.shape:
                raise ValueError(f"merge: pair {pair!r} has tables of shapes {a.shape} and {b.shape}")
            out[pair] = a.astype(np.int64) + b
        else:
            out[pair] = np.array(left[pair] if pair in left else right[pair], dtype=np.int64)
    return out


def finalize(tables: Mapping) -> dict:
    """Drop the missing sentinel row and column: the pairwise-complete tables.

    Parameters
    ----------
    tables : mapping
        ``{pair: table}`` with sentinel, shape ``(k_a + 1, k_b + 1)``.

    Returns
    -------
    dict
        ``{pair: table[:-1, :-1]}`` as new C-contiguous int64 arrays, shape ``(k_a, k_b)``:
        the counts over rows where both columns are present.

    References
    ----------
    .. [1] Little, R. J. A. & Rubin, D. B. (2019). *Statistical Analysis with Missing
       Data*, 3rd ed., Wiley, sec. 3.4 (available-case / pairwise-complete analysis).

    Examples
    --------
    >>> import numpy as np
    >>> finalize({(0, 1): np.arange(9).reshape(3, 3)})[(0, 1)].tolist()
    [[0, 1], [3, 4]]
    """
    return {pair: np.ascontiguousarray(np.asarray(t)[:-1, :-1], dtype=np.int64) for pair, t in tables.items()}
