"""The two passes over a source on one machine: pass 1 (alphabets) and pass 2 (count tables).

A source (:mod:`infoscope.sources.readers`) hands out bounded pandas row batches
of the columns asked for, in a fixed row order.  Pass 1 runs the rounds of
:class:`~infoscope.encode.summaries.Pass1` (each round reads only the columns it
needs) and asks the source the few facts a summary cannot hold; pass 2 codes every
batch with the fixed alphabets and counts it with the engine's additive layer
(:func:`~infoscope.engine.counting.count_chunk` -> :func:`~infoscope.engine.counting.merge`
-> :func:`~infoscope.engine.counting.finalize`).  Peak memory is one batch plus
the summaries and tables, whatever the number of rows.  Ctrl-C stops at the next
batch and leaves nothing behind (no session is made until every table is counted).
"""
from __future__ import annotations

import itertools
import re

import numpy as np

from infoscope.encode.summaries import Pass1, encode_batch, merge, summarize
from infoscope.engine.counting import count_chunk, finalize
from infoscope.engine.counting import merge as merge_tables

__all__ = ["batch_rows_for", "parse_memory", "run_pass1", "count_tables", "progress_bar", "DEFAULT_MEMORY_LIMIT"]

#: Memory a profile may use for its row batches by default.
DEFAULT_MEMORY_LIMIT = 1 << 30
#: Fewest and most rows of one batch.
BATCH_ROWS = (1_024, 1 << 20)
# a batch is held as Arrow, as pandas and as codes, with temporaries: about this many copies
_COPIES = 4
_UNITS = {"": 1, "b": 1, "kb": 10**3, "mb": 10**6, "gb": 10**9, "kib": 2**10, "mib": 2**20, "gib": 2**30}


def parse_memory(limit) -> int:
    """Bytes of a ``memory_limit=`` setting: an int, or text such as ``"512MB"`` / ``"2GiB"``.

    Parameters
    ----------
    limit : int or str

    Returns
    -------
    int

    Examples
    --------
    >>> parse_memory("512MB"), parse_memory("1GiB"), parse_memory(10_000_000)
    (512000000, 1073741824, 10000000)
    """
    if isinstance(limit, bool):
        raise TypeError("memory_limit must be a number of bytes or a text such as '512MB', got a bool")
    if isinstance(limit, (int, np.integer)):
        value = int(limit)
    elif isinstance(limit, str):
        m = re.fullmatch(r"\s*([0-9]+(?:\.[0-9]+)?)\s*([kmg]i?b|b)?\s*", limit.lower())
        if not m:
            raise ValueError(f"memory_limit={limit!r}: expected a number of bytes or a text such as '512MB'")
        value = int(float(m.group(1)) * _UNITS[m.group(2) or ""])
    else:
        raise TypeError(f"memory_limit must be a number of bytes or a text such as '512MB', got {type(limit).__name__}")
    if value < 16 * 2**20:
        raise ValueError(f"memory_limit={limit!r} is below 16 MiB: too little for a row batch")
    return value


def batch_rows_for(bytes_per_row: int, memory_limit: int) -> int:
    """Rows per batch so that a batch's copies stay within the memory limit.

    Examples
    --------
    >>> batch_rows_for(400, 1 << 30)
    671088
    """
    rows = int(memory_limit) // (_COPIES * max(int(bytes_per_row), 1))
    return int(min(max(rows, BATCH_ROWS[0]), BATCH_ROWS[1]))


def progress_bar(progress, total, desc):
    """A tqdm bar over rows (None when ``progress`` is False).

    Parameters
    ----------
    progress : {"auto", True, False}
        ``"auto"``: shown where tqdm can show it.
    total : int or None
        Rows expected.
    desc : str
        Its label.

    Returns
    -------
    tqdm.tqdm or None
    """
    if progress is False:
        return None
    from tqdm.auto import tqdm

    return tqdm(total=total, desc=desc, unit="rows", unit_scale=True, leave=False,
                disable=None if progress == "auto" else False)


def run_pass1(source, specs, *, batch_rows: int, progress="auto") -> Pass1:
    """Pass 1 over a source: every round of summaries, then the source's answers to its queries.

    Parameters
    ----------
    source : Source
        From :func:`infoscope.sources.readers.open_source`.
    specs : mapping
        From :func:`infoscope.encode.summaries.column_specs`.
    batch_rows : int
        Rows per batch.
    progress : {"auto", True, False}
        A tqdm bar per round.

    Returns
    -------
    Pass1
        Complete: :meth:`~infoscope.encode.summaries.Pass1.alphabets` can be called.
    """
    p = Pass1(specs)
    while (req := p.request()) is not None:
        bar = progress_bar(progress, source.n_rows, f"pass 1, round {req.round + 1}")
        total = None
        try:
            for batch in source.batches(req.columns, batch_rows):
                part = summarize(batch, req)
                total = part if total is None else merge(total, part, p.specs)
                if bar is not None:
                    bar.update(len(batch))
        finally:
            if bar is not None:
                bar.close()
        if total is None:
            raise ValueError(f"{source.label}: the source has no rows: there is nothing to profile")
        p.absorb(total)
    for query in p.queries():
        p.answer(query, source.answer(query))
    return p


def count_tables(source, alphabets, *, batch_rows: int, progress="auto", backend: str = "auto"):
    """Pass 2: code every batch with the fixed alphabets and count every pair.

    Parameters
    ----------
    source : Source
    alphabets : sequence of Alphabet
        In column order.
    batch_rows : int
    progress : {"auto", True, False}
    backend : {"auto", "numba", "numpy"}
        Counting kernel (:func:`infoscope.engine.counting.count_chunk`).

    Returns
    -------
    tables : dict
        ``{(a, b): table}`` (pairwise-complete, ``a`` before ``b`` in column order).
    marginals : dict
        ``{name: counts}``.
    n_rows : int
    """
    alphabets = list(alphabets)
    names = [a.name for a in alphabets]
    ks = [a.k for a in alphabets]
    pairs = list(itertools.combinations(range(len(names)), 2))
    acc: dict = {}
    marginals = [np.zeros(k + 1, dtype=np.int64) for k in ks]
    rows = 0
    bar = progress_bar(progress, source.n_rows, "pass 2, counting")
    try:
        for batch in source.batches(names, batch_rows):
            codes = encode_batch(batch, alphabets)
            if pairs:
                acc = merge_tables(acc, count_chunk(codes, ks, pairs, backend=backend)) if acc else \
                    count_chunk(codes, ks, pairs, backend=backend)
            for j, c in enumerate(codes):
                marginals[j] += np.bincount(c, minlength=ks[j] + 1)
            rows += len(batch)
            if bar is not None:
                bar.update(len(batch))
    finally:
        if bar is not None:
            bar.close()
    tables = {(names[i], names[j]): t for (i, j), t in finalize(acc).items()}
    return tables, {n: m[:k] for n, m, k in zip(names, marginals, ks)}, rows
