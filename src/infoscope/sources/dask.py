"""Dask DataFrames as sources: both passes of a profile as Dask computations.

A Dask DataFrame is profiled without gathering it: every step is a Dask graph
run by whatever scheduler is active (a ``distributed.Client``, or Dask's default
local scheduler), with Dask's own progress display and its own task retries.

* **Pass 1** (the alphabets): each round that
  :class:`infoscope.encode.summaries.Pass1` requests is one reduction over the
  partitions: :func:`~infoscope.encode.summaries.summarize` on each partition,
  the summaries combined by :func:`~infoscope.encode.summaries.merge` in a tree
  of ``split_every`` inputs per node (``dask.bag.Bag.reduction``, which keeps the
  partitions in row order: the merge is associative but not commutative).  The
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


def reduce_partitions(ddf, per_partition, combine, *, split_every=None, progress="auto", name=None):
    """``per_partition`` on every partition, the results combined in a tree, in row order.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The source.
    per_partition : callable
        ``per_partition(pandas_partition) -> value`` (run on the workers; must
        pickle).  An empty partition may be skipped.
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

    Returns
    -------
    object
        The combined value; None when every partition was empty.

    References
    ----------
    .. [1] Dask documentation, ``dask.bag.Bag.reduction`` (tree reduction with
       ``split_every``).

    Examples
    --------
    >>> import pandas as pd, dask.dataframe as dd
    >>> ddf = dd.from_pandas(pd.DataFrame({"a": range(10)}), npartitions=3)
    >>> reduce_partitions(ddf, lambda p: int(p["a"].sum()), lambda x, y: x + y, progress=False)
    45
    """
    import dask.bag as db

    split_every = _check_split_every(split_every)
    bag = db.from_delayed(ddf.to_delayed())
    item = bag.reduction(per_partition, _empty_safe(combine), split_every=split_every, name=name)
    return compute(item, progress=progress)


# ------------------------------------------------------------------ the two passes
def _keyed(part, keys):
    """The partition with the profile's column keys as labels (positional: repeated labels stay apart)."""
    return part.set_axis(list(keys), axis=1)


def _summarize_partition(part, keys, request):
    from infoscope.encode.summaries import summarize

    if len(part) == 0:
        return None
    return summarize(_keyed(part, keys), request)


def _merge_summaries(left, right):
    from infoscope.encode.summaries import merge

    return merge(left, right)


def _pack(tables: dict, pairs, shapes) -> np.ndarray:
    """The sentinel tables of ``pairs`` as one flat vector, in the smallest unsigned dtype."""
    flat = np.concatenate([np.asarray(tables[p]).ravel() for p in pairs]) if pairs else np.zeros(0, np.int64)
    top = int(flat.max()) if flat.size else 0
    return flat.astype(np.min_scalar_type(top), copy=False)


def _count_partition(part, keys, alphabets, pairs, backend):
    from infoscope.encode.summaries import encode_batch
    from infoscope.engine.counting import count_chunk

    if len(part) == 0:
        return None
    codes = encode_batch(_keyed(part, keys), alphabets)
    tables = count_chunk(codes, [a.k for a in alphabets], pairs, backend=backend)
    return _pack(tables, pairs, None)


def _add_counts(left: np.ndarray, right: np.ndarray) -> np.ndarray:
    return np.add(left, right, dtype=np.int64)


def _unpack(flat, pairs, ks) -> dict:
    out, at = {}, 0
    for a, b in pairs:
        shape = (int(ks[a]) + 1, int(ks[b]) + 1)
        size = shape[0] * shape[1]
        out[(a, b)] = flat[at:at + size].astype(np.int64).reshape(shape)
        at += size
    return out


def table_pairs(n_columns: int) -> list[tuple[int, int]]:
    """Every unordered pair ``(i, j)``, ``i < j``, of ``n_columns`` columns, in row-major order."""
    return [(i, j) for i in range(n_columns) for j in range(i + 1, n_columns)]


def dask_tables(ddf, keys: Sequence[str], alphabets: Sequence, *, pairs=None, split_every=None,
                progress="auto", backend: str = "auto") -> dict:
    """Pass 2 on a Dask frame: the finalized count table of every pair of columns.

    Parameters
    ----------
    ddf : dask.dataframe.DataFrame
        The source, columns in the order of ``keys``.
    keys : sequence of str
        The profile's column keys, one per column of ``ddf``.
    alphabets : sequence of Alphabet
        The fixed alphabets of pass 1, one per column.
    pairs : sequence of (int, int), optional
        Column index pairs to count (default every unordered pair).
    split_every : int, optional
        Inputs per node of the reduction tree.
    progress : {"auto", True, False}, default="auto"
        Dask's progress display (see :func:`compute`).
    backend : {"auto", "numba", "numpy"}, default="auto"
        Counting kernel on the workers.

    Returns
    -------
    dict
        ``{(key_a, key_b): table}``: pairwise-complete int64 tables of shape
        ``(k_a, k_b)`` (:func:`infoscope.engine.counting.finalize`).

    References
    ----------
    .. [1] Agresti, A. (2013). *Categorical Data Analysis*, 3rd ed., Wiley, sec. 2.1
       (counts of disjoint samples add).

    Examples
    --------
    >>> # see profile_dask
    """
    from infoscope.engine.counting import finalize, resolve_backend

    keys = list(keys)
    alphabets = list(alphabets)
    backend = resolve_backend(backend)
    pairs = table_pairs(len(keys)) if pairs is None else [(int(a), int(b)) for a, b in pairs]
    ks = [int(a.k) for a in alphabets]
    per_partition = functools.partial(_count_partition, keys=keys, alphabets=alphabets, pairs=pairs,
                                      backend=backend)
    flat = reduce_partitions(ddf, per_partition, _add_counts, split_every=split_every, progress=progress,
                             name="infoscope-count")
    if flat is None:
        flat = np.zeros(sum((ks[a] + 1) * (ks[b] + 1) for a, b in pairs), dtype=np.int64)
    tables = finalize(_unpack(flat, pairs, ks))
    return {(keys[a], keys[b]): t for (a, b), t in tables.items()}
