"""Dask DataFrames as sources: both passes of a profile as Dask computations.

A Dask DataFrame is profiled without gathering it: every step is a Dask graph
run by whatever scheduler is active (a ``distributed.Client``, or Dask's default
local scheduler), with Dask's own progress display and its own task retries.

* **Pass 1** (the alphabets): each round that
  :class:`infoscope.encode.summaries.Pass1` requests is one reduction over the
  partitions: :func:`~infoscope.encode.summaries.summarize` on each partition,
  the summaries combined by :func:`~infoscope.encode.summaries.merge` in a tree
  of ``split_every`` inputs per node (``dask.delayed`` nodes, laid out as
  ``dask.bag.Bag.reduction`` lays them out), which keeps the partitions in row
  order (the merge is associative but not commutative).  The
  rare source queries of pass 1 (exact distinct counts, level counts of columns
  beyond the cap) are answered with Dask's own ``nunique`` / ``value_counts``.
* **Pass 2** (the tables): each partition is encoded with the fixed alphabets
  (:func:`~infoscope.encode.summaries.encode_batch`) and counted
  (:func:`infoscope.engine.counting.count_chunk`); its sentinel tables travel as
  one flat vector in the smallest unsigned dtype that holds its counts, and the
  vectors are added in the same kind of tree (in int64).  Counts add, so any
  partitioning, any tree and any retried task give the same integers.

The session is then built from the tables alone
(:func:`infoscope.sources.session.session_from_tables`): the alphabets and count
tables equal those of the in-memory encoder on the same rows.

Dask is imported only here, when a Dask frame is profiled.
"""
from __future__ import annotations

import functools
import numbers
import sys
from collections.abc import Sequence

import numpy as np

__all__ = ["is_dask_frame", "profile_dask", "dask_tables", "reduce_partitions", "DEFAULT_SPLIT_EVERY"]

#: Inputs per node of the reduction trees (Dask's own default for bag reductions).
DEFAULT_SPLIT_EVERY = 8


# ------------------------------------------------------------------ Dask plumbing
def is_dask_frame(obj) -> bool:
    """Whether ``obj`` is a Dask DataFrame (never imports Dask itself).

    Parameters
    ----------
    obj : object
        Anything.

    Returns
    -------
    bool
        True for a ``dask.dataframe.DataFrame``; False for anything else,
        including a Dask Series and everything when Dask was never imported.

    Examples
    --------
    >>> import pandas as pd
    >>> is_dask_frame(pd.DataFrame({"a": [1]}))
    False
    """
    if "dask.dataframe" not in sys.modules or not type(obj).__module__.startswith("dask"):
        return False
    import dask.dataframe as dd

    return isinstance(obj, dd.DataFrame)


def _check_split_every(split_every) -> int:
    if split_every is None:
        return DEFAULT_SPLIT_EVERY
    if isinstance(split_every, bool) or not isinstance(split_every, numbers.Integral) or split_every < 2:
        raise ValueError(f"split_every: expected an integer of at least 2 (inputs per node of the "
                         f"reduction tree) or None, got {split_every!r}")
    return int(split_every)


def _check_progress(progress):
    if progress not in ("auto", True, False):
        raise ValueError(f"progress: expected 'auto', True or False, got {progress!r}")
    return progress


def _client_of(collection):
    """The ``distributed.Client`` that Dask would run ``collection`` on, or None."""
    from dask.base import get_scheduler

    scheduler = get_scheduler(collections=[collection])
    owner = getattr(scheduler, "__self__", None)
    if owner is not None and type(owner).__module__.startswith("distributed"):
        return owner
    return None


def _in_notebook() -> bool:
    shell = sys.modules.get("IPython")
    if shell is None:
        return False
    ip = shell.get_ipython()
    return ip is not None and "IPKernelApp" in getattr(ip, "config", {})


def compute(collection, *, progress="auto"):
    """Compute one Dask collection on the active scheduler, with Dask's progress display.

    Parameters
    ----------
    collection : dask collection
        What to compute (a ``dask.bag.Item``, a Dask Series, ...).
    progress : {"auto", True, False}, default="auto"
        Show Dask's progress: ``distributed.progress`` (a text bar in a terminal,
        a widget in a notebook) when a ``distributed.Client`` runs it, else
        ``dask.diagnostics.ProgressBar``.  ``"auto"`` shows it in a notebook or
        when standard error is a terminal.

    Returns
    -------
    object
        The computed value.

    Notes
    -----
    An interruption (Ctrl-C) while a cluster computes cancels the computation's
    futures on the cluster before it propagates, so no stray work is left running.

    References
    ----------
    .. [1] Dask documentation, "Diagnostics (local)" (``dask.diagnostics.ProgressBar``)
       and "Diagnostics (distributed)" (``distributed.progress``).

    Examples
    --------
    >>> import dask.bag as db
    >>> compute(db.from_sequence(range(10), npartitions=3).sum(), progress=False)
    45
    """
    progress = _check_progress(progress)
    notebook = _in_notebook()
    if progress == "auto":
        progress = notebook or sys.stderr.isatty()
    client = _client_of(collection)
    if client is None:
        if not progress:
            return collection.compute()
        from dask.diagnostics import ProgressBar

        with ProgressBar():
            return collection.compute()
    future = client.compute(collection)
    try:
        if progress:
            from distributed import progress as dask_progress

            if notebook:
                from IPython.display import display

                display(dask_progress(future, notebook=True, multi=False))
            else:
                dask_progress(future, notebook=False)
        return future.result()
    except BaseException:
        client.cancel(future)
        raise


def _empty_safe(combine):
    """``combine`` over an iterable of partial results, None when there is none."""

    def aggregate(parts):
        parts = [p for p in parts if p is not None]
        if not parts:
            return None
        return functools.reduce(combine, parts)

    aggregate.__name__ = getattr(combine, "__name__", "combine")
    return aggregate


def reduce_partitions(ddf, per_partition, combine, *, split_every=None, progress="auto", name=None,
                      skip_empty=True):
    """``per_partition`` on every partition, the results combined in a tree, in row order.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The source.
    per_partition : callable
        ``per_partition(pandas_partition) -> value`` (run on the workers; must
        pickle).
    combine : callable
        ``combine(left, right) -> value``, associative; ``left`` always holds
        earlier rows than ``right``.
    split_every : int, optional
        Inputs per node of the tree (default :data:`DEFAULT_SPLIT_EVERY`); the tree
        has ``ceil(log(npartitions) / log(split_every))`` levels.
    progress : {"auto", True, False}, default="auto"
        See :func:`compute`.
    name : str, optional
        Prefix of the task names (what Dask's dashboard and progress bar show).
    skip_empty : bool, default=True
        Leave partitions without rows out (``per_partition`` never sees them).

    Returns
    -------
    object
        The combined value; None when every partition was empty.

    References
    ----------
    .. [1] Dask documentation, ``dask.delayed`` and ``dask.bag.Bag.reduction``
       (the tree reduction with ``split_every`` that this one follows).

    Examples
    --------
    >>> import pandas as pd, dask.dataframe as dd
    >>> ddf = dd.from_pandas(pd.DataFrame({"a": range(10)}), npartitions=3)
    >>> reduce_partitions(ddf, lambda p: int(p["a"].sum()), lambda x, y: x + y, progress=False)
    45
    """
    import dask

    split_every = _check_split_every(split_every)
    prefix = name or getattr(per_partition, "__name__", "partition")
    apply = dask.delayed(functools.partial(_apply, per_partition, skip_empty), pure=True)
    aggregate = dask.delayed(_empty_safe(combine), pure=True)
    # the tree of dask.bag.Bag.reduction, on delayed partitions: consecutive groups
    # of split_every, level by level, so that row order is kept at every node
    level = [apply(part, dask_key_name=(f"{prefix}-partition-{token}", i))
             for token in [dask.base.tokenize(ddf, per_partition, skip_empty)]
             for i, part in enumerate(ddf.to_delayed())]
    depth = 0
    while len(level) > 1:
        token = dask.base.tokenize([node.key for node in level], combine, split_every)
        level = [aggregate(level[i:i + split_every], dask_key_name=(f"{prefix}-combine-{depth}-{token}", i // split_every))
                 for i in range(0, len(level), split_every)]
        depth += 1
    if not level:
        return None
    return compute(level[0], progress=progress)


def _apply(per_partition, skip_empty, part):
    if skip_empty and len(part) == 0:
        return None
    return per_partition(part)


# ------------------------------------------------------------------ the two passes
def _known_categories(ddf, *, split_every=None, progress="auto") -> dict:
    """The categories of each categorical column whose Dask dtype does not know them.

    A partition of such a column (e.g. read from Parquet dictionaries) carries its
    own categories; the frame's rows (``ddf.compute()``) carry their union in order
    of first appearance, partition by partition (``pandas.api.types.union_categoricals``).
    That union is collected here in one reduction, so that every partition is then
    read with the same categories, in the same order as the gathered frame.
    """
    import pandas as pd

    unknown = [i for i, dtype in enumerate(ddf.dtypes)
               if isinstance(dtype, pd.CategoricalDtype) and not ddf.iloc[:, i].cat.known]
    if not unknown:
        return {}
    per_partition = functools.partial(_categories_of, positions=unknown)
    union = reduce_partitions(ddf, per_partition, _union_categories, split_every=split_every, progress=progress,
                              name="infoscope-categories", skip_empty=False)
    return dict(zip(unknown, union))


def _categories_of(part, positions):
    return [list(part.iloc[:, i].cat.categories) for i in positions]


def _union_categories(left, right):
    out = []
    for a, b in zip(left, right):
        seen = set(a)
        out.append(a + [c for c in b if c not in seen])
    return out


def _prepared(part, keys, categories):
    """The partition with the profile's column keys as labels and the union categories.

    Keys are set by position, so repeated labels stay apart.
    """
    part = part.set_axis(list(keys), axis=1)
    if categories:
        import pandas as pd

        part = part.copy(deep=False)
        for i, cats in categories.items():
            column = part.iloc[:, i]
            dtype = pd.CategoricalDtype(pd.Index(cats, dtype=column.cat.categories.dtype) if len(cats) else cats,
                                        ordered=column.cat.ordered)
            part.isetitem(i, column.cat.set_categories(dtype.categories, ordered=dtype.ordered))
    return part


def _summarize_partition(part, keys, categories, request):
    from infoscope.encode.summaries import summarize

    return summarize(_prepared(part, keys, categories), request)


def _merge_summaries(left, right, specs):
    from infoscope.encode.summaries import merge

    return merge(left, right, specs)


def _pack(codes, ks, tables: dict, pairs) -> np.ndarray:
    """One partition's counts as one flat vector, in the smallest unsigned dtype that holds them.

    First every column's symbol counts (``k + 1`` each, the last one missing rows),
    then the sentinel table of each pair in ``pairs`` order, row-major.
    """
    parts = [np.bincount(c, minlength=k + 1) for c, k in zip(codes, ks)]
    parts += [np.asarray(tables[p]).ravel() for p in pairs]
    flat = np.concatenate(parts) if parts else np.zeros(0, np.int64)
    top = int(flat.max()) if flat.size else 0
    return flat.astype(np.min_scalar_type(top), copy=False)


def _count_partition(part, keys, categories, alphabets, pairs, backend):
    from infoscope.encode.summaries import encode_batch
    from infoscope.engine.counting import count_chunk

    codes = encode_batch(_prepared(part, keys, categories), alphabets)
    ks = [a.k for a in alphabets]
    tables = count_chunk(codes, ks, pairs, backend=backend) if pairs else {}
    return _pack(codes, ks, tables, pairs)


def _add_counts(left: np.ndarray, right: np.ndarray) -> np.ndarray:
    return np.add(left, right, dtype=np.int64)


def _packed_size(ks, pairs) -> int:
    return sum(k + 1 for k in ks) + sum((ks[a] + 1) * (ks[b] + 1) for a, b in pairs)


def _unpack(flat, ks, pairs) -> tuple[list, dict]:
    """(symbol counts with the missing count last, per column; sentinel tables) of a packed vector."""
    flat = np.asarray(flat, dtype=np.int64)
    at = 0
    marginals = []
    for k in ks:
        marginals.append(flat[at:at + k + 1])
        at += k + 1
    tables = {}
    for a, b in pairs:
        shape = (int(ks[a]) + 1, int(ks[b]) + 1)
        size = shape[0] * shape[1]
        tables[(a, b)] = flat[at:at + size].reshape(shape)
        at += size
    return marginals, tables


def table_pairs(n_columns: int) -> list[tuple[int, int]]:
    """Every unordered pair ``(i, j)``, ``i < j``, of ``n_columns`` columns, in row-major order.

    Parameters
    ----------
    n_columns : int

    Returns
    -------
    list of (int, int)

    Examples
    --------
    >>> table_pairs(3)
    [(0, 1), (0, 2), (1, 2)]
    """
    return [(i, j) for i in range(n_columns) for j in range(i + 1, n_columns)]


def _answer(ddf, position: int, query, *, progress):
    """Dask's answer to one pass-1 :class:`~infoscope.encode.summaries.SourceQuery`."""
    import dask

    column = ddf.iloc[:, position]
    if query.kind == "distinct":
        return int(compute(column.nunique(dropna=True), progress=progress))
    if query.kind == "levels":
        counts = column.value_counts(dropna=True)
        n_distinct, of_counts, largest = dask.compute(
            counts.size, counts.value_counts(), counts.nlargest(max(int(query.limit), 1)))
        floor = int(largest.min()) if len(largest) else 0
        top = compute(counts[counts >= floor], progress=progress) if len(largest) else counts.head(0)
        return {
            "n_distinct": int(n_distinct),
            "counts_of_counts": sorted((int(c), int(m)) for c, m in of_counts.items()),
            "top": [(label, int(c)) for label, c in top.items()],
        }
    raise ValueError(f"unknown source query kind {query.kind!r}")  # pragma: no cover - Pass1 asks only these


def dask_alphabets(ddf, keys: Sequence[str], specs, *, categories=None, split_every=None, progress="auto") -> dict:
    """Pass 1 on a Dask frame: every column's alphabet, decided as the in-memory encoder decides it.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The source, columns in the order of ``keys``.
    keys : sequence of str
        The profile's column keys, one per column of ``ddf``.
    specs : mapping of str to ColumnSpec
        From :func:`infoscope.encode.summaries.column_specs`, keyed by ``keys``.
    categories : dict, optional
        Position -> union categories of categorical columns the Dask dtype does not know.
    split_every : int, optional
        Inputs per node of the reduction trees.
    progress : {"auto", True, False}, default="auto"
        Dask's progress display, one bar per round (see :func:`compute`).

    Returns
    -------
    (Pass1, dict of str to Alphabet)
        The finished pass (its ``rows``) and the alphabets in column order.

    References
    ----------
    .. [1] Dask documentation, ``dask.delayed``, ``Series.nunique``,
       ``Series.value_counts``.

    Examples
    --------
    >>> import pandas as pd, dask.dataframe as dd
    >>> from infoscope.encode.summaries import column_specs
    >>> ddf = dd.from_pandas(pd.DataFrame({"c": list("abca")}), npartitions=2)
    >>> _, alphabets = dask_alphabets(ddf, ["c"], column_specs(ddf.dtypes), progress=False)
    >>> alphabets["c"].labels
    ('a', 'b', 'c')
    """
    from infoscope.encode.summaries import Pass1

    keys = list(keys)
    p = Pass1(specs)
    combine = functools.partial(_merge_summaries, specs=p.specs)
    while (request := p.request()) is not None:
        per_partition = functools.partial(_summarize_partition, keys=keys, categories=categories or {},
                                          request=request)
        total = reduce_partitions(ddf, per_partition, combine, split_every=split_every, progress=progress,
                                  name=f"infoscope-summary-{request.round}")
        if total is None:  # every partition was empty
            total = _summarize_partition(ddf._meta, keys, categories or {}, request)
        p.absorb(total)
    position = {key: i for i, key in enumerate(keys)}
    for query in p.queries():
        p.answer(query, _answer(ddf, position[query.column], query, progress=progress))
    return p, p.alphabets()


def dask_tables(ddf, keys: Sequence[str], alphabets: Sequence, *, categories=None, split_every=None,
                progress="auto", backend: str = "auto") -> tuple[dict, dict]:
    """Pass 2 on a Dask frame: every pair's count table and every column's symbol counts.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The source, columns in the order of ``keys``.
    keys : sequence of str
        The profile's column keys, one per column of ``ddf``.
    alphabets : sequence of Alphabet
        The fixed alphabets of pass 1, one per column, in column order.
    categories : dict, optional
        As for :func:`dask_alphabets`.
    split_every : int, optional
        Inputs per node of the reduction tree.
    progress : {"auto", True, False}, default="auto"
        Dask's progress display (see :func:`compute`).
    backend : {"auto", "numba", "numpy"}, default="auto"
        Counting kernel on the workers.

    Returns
    -------
    tables : dict
        ``{(key_a, key_b): table}`` for every pair in column order: pairwise-complete
        int64 tables of shape ``(k_a, k_b)`` (:func:`infoscope.engine.counting.finalize`).
    marginals : dict
        ``{key: counts}``: rows per symbol ``0 .. k-1`` of every column.

    Notes
    -----
    Each partition ships one vector of ``sum(k + 1) + sum((k_a + 1) * (k_b + 1))``
    counts (symbol counts, then the sentinel tables), in the smallest unsigned
    dtype that holds its largest count; the tree adds them in int64.

    References
    ----------
    .. [1] Agresti, A. (2013). *Categorical Data Analysis*, 3rd ed., Wiley, sec. 2.1
       (counts of disjoint samples add).

    Examples
    --------
    >>> import pandas as pd, dask.dataframe as dd
    >>> from infoscope.encode.summaries import column_specs
    >>> ddf = dd.from_pandas(pd.DataFrame({"a": list("xyxy"), "b": list("ppqq")}), npartitions=2)
    >>> _, alphabets = dask_alphabets(ddf, ["a", "b"], column_specs(ddf.dtypes), progress=False)
    >>> tables, marginals = dask_tables(ddf, ["a", "b"], list(alphabets.values()), progress=False)
    >>> tables[("a", "b")].tolist(), marginals["a"].tolist()
    ([[1, 1], [1, 1]], [2, 2])
    """
    from infoscope.engine.counting import finalize, resolve_backend

    keys = list(keys)
    alphabets = list(alphabets)
    backend = resolve_backend(backend)
    pairs = table_pairs(len(keys))
    ks = [int(a.k) for a in alphabets]
    per_partition = functools.partial(_count_partition, keys=keys, categories=categories or {},
                                      alphabets=alphabets, pairs=pairs, backend=backend)
    flat = reduce_partitions(ddf, per_partition, _add_counts, split_every=split_every, progress=progress,
                             name="infoscope-count")
    if flat is None:
        flat = np.zeros(_packed_size(ks, pairs), dtype=np.int64)
    marginals, sentinel = _unpack(flat, ks, pairs)
    tables = {(keys[a], keys[b]): t for (a, b), t in finalize(sentinel).items()}
    return tables, {key: m[:k].copy() for key, m, k in zip(keys, marginals, ks)}


# ------------------------------------------------------------------ the profile
def _check_frame(ddf) -> list[str]:
    """The profile's column keys of a Dask frame, or a clear error."""
    from infoscope.frame.keys import column_keys

    if not is_dask_frame(ddf):
        raise TypeError(f"expected a dask.dataframe.DataFrame, got {type(ddf).__name__}")
    if len(ddf.columns) == 0:
        raise ValueError("the Dask DataFrame has no columns: there is nothing to profile")
    return column_keys(ddf.columns)


def _take(part, labels, categories, positions):
    return _prepared(part, labels, categories).iloc[positions]


def _concat(parts):
    import pandas as pd

    return pd.concat(parts, ignore_index=True)


def _sampled(ddf, categories, settings, *, progress):
    """The seeded row sample of the in-memory path, gathered from the partitions that hold it.

    The row positions are those :func:`infoscope.engine.sampling.sample_rows` picks
    among all the frame's rows in order (partition lengths first, one small Dask
    computation), so the sample holds the rows ``ProfileSession(ddf.compute(),
    sample=..., seed=...)`` profiles; only they are sent to this process.
    """
    import dask

    from infoscope.engine.sampling import sample_rows
    from infoscope.frame.settings import _DEFAULTS
    from infoscope.sources.session import SampledSession

    lengths = np.asarray(compute(ddf.map_partitions(len), progress=progress), dtype=np.int64)
    n = int(lengths.sum())
    if n == 0:
        raise ValueError("the Dask DataFrame has no rows: there is nothing to profile")
    rows = sample_rows(n, settings["sample"], seed=settings.get("seed", _DEFAULTS["seed"]))
    if rows is None:
        rows = np.arange(n, dtype=np.int64)
    starts = np.concatenate([[0], np.cumsum(lengths)])
    labels = list(ddf.columns)
    taken = []
    for i, part in enumerate(ddf.to_delayed()):
        lo, hi = np.searchsorted(rows, [starts[i], starts[i + 1]])
        if hi > lo:
            taken.append(dask.delayed(_take, pure=True)(part, labels, categories, rows[lo:hi] - starts[i]))
    frame = compute(dask.delayed(_concat, pure=True)(taken), progress=progress)
    rest = {k: v for k, v in settings.items() if k != "sample"}
    return SampledSession(frame, of_rows=n, **rest)


def profile_dask(ddf, *, split_every=None, progress="auto", backend: str = "auto", **settings):
    """The information profile of a Dask DataFrame, computed on the active Dask scheduler.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The source; it is read (twice, or a few more times for exact quantile
        edges of columns with very many distinct values) and never gathered.
    split_every : int, optional
        Inputs per node of the reduction trees (default 8).
    progress : {"auto", True, False}, default="auto"
        Dask's progress display for each computation (see :func:`compute`).
    backend : {"auto", "numba", "numpy"}, default="auto"
        Counting kernel on the workers.
    **settings
        Settings of :class:`~infoscope.frame.session.ProfileSession` (``bins``,
        ``estimator``, ``target``, ``sample``, ``seed`` ...).

    Returns
    -------
    TableSession or SampledSession
        The session built from the alphabets and count tables
        (:func:`infoscope.sources.session.session_from_tables`): its tables equal
        those of ``ProfileSession(ddf.compute(), **settings)``.  With ``sample=``,
        the rows that session would sample are gathered (and only they) into an
        in-memory :class:`infoscope.sources.SampledSession`, where every view works.

    Raises
    ------
    ValueError
        The frame has no columns or no rows; a setting that needs every value
        in memory (a width rule such as ``bins="fd"``), naming the column.

    References
    ----------
    .. [1] Dask documentation, "Dask DataFrame" and "Dask Delayed".

    Examples
    --------
    >>> import pandas as pd, dask.dataframe as dd
    >>> ddf = dd.from_pandas(pd.DataFrame({"a": [1, 2] * 50, "b": list("xy") * 50}), npartitions=4)
    >>> s = profile_dask(ddf, progress=False, n_boot=0)
    >>> s.pair("a", "b").n
    100
    """
    from infoscope.encode.summaries import column_specs
    from infoscope.frame.settings import _DEFAULTS, _ENCODING_SETTINGS, _check_settings
    from infoscope.sources.session import session_from_tables

    keys = _check_frame(ddf)
    split_every = _check_split_every(split_every)
    progress = _check_progress(progress)
    checked = _check_settings({**_DEFAULTS, **settings})  # a bad setting fails before any data is read
    encoding = {k: settings[k] for k in _ENCODING_SETTINGS if k in settings}
    categories = _known_categories(ddf, split_every=split_every, progress=progress)
    if checked["sample"] is not None:
        return _sampled(ddf, categories, settings, progress=progress)
    meta = _prepared(ddf._meta, keys, categories)
    specs = column_specs(meta.dtypes, **encoding)
    p, alphabets = dask_alphabets(ddf, keys, specs, categories=categories, split_every=split_every,
                                  progress=progress)
    if p.rows == 0:
        raise ValueError("the Dask DataFrame has no rows: there is nothing to profile")
    ordered = [alphabets[key] for key in keys]
    tables, marginals = dask_tables(ddf, keys, ordered, categories=categories, split_every=split_every,
                                    progress=progress, backend=backend)
    return session_from_tables(ordered, tables, marginals, n_rows=p.rows,
                               source=f"Dask DataFrame ({ddf.npartitions} partitions)", **settings)
