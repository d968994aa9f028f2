"""infoscope.sources: profiles of tables that are not an in-memory frame (out of core).

:func:`profile` reads a path, glob or folder of Parquet or CSV files, a
:class:`pyarrow.dataset.Dataset`, a DuckDB relation or a Polars LazyFrame in
bounded row batches, twice (pass 1: each column's alphabet from mergeable
summaries, :mod:`infoscope.encode.summaries`; pass 2: codes counted into pair
tables by the engine, :mod:`infoscope.sources.passes`), and returns a
:class:`~infoscope.sources.session.TableSession` with the methods of a
:class:`~infoscope.frame.session.ProfileSession`.  The tables equal the in-memory
ones on the same rows exactly.
"""
from __future__ import annotations

from infoscope.frame.sessions import session_for
from infoscope.frame.settings import _DEFAULTS, _ENCODING_SETTINGS, _check_settings
from infoscope.sources.passes import DEFAULT_MEMORY_LIMIT, batch_rows_for, count_tables, parse_memory, run_pass1
from infoscope.sources.readers import SourceError, arrow_to_pandas, open_source, source_kind
from infoscope.sources.session import NeedsRows, SampledSession, TableSession, session_from_tables

__all__ = ["profile", "TableSession", "session_from_tables", "SourceError", "NeedsRows", "open_source",
           "arrow_to_pandas", "SampledSession"]

def profile(source, *, memory_limit=DEFAULT_MEMORY_LIMIT, columns=None, progress="auto", sep=None,
            encoding=None, **settings):
    """The information profile of a table in memory or not: files, Arrow datasets, DuckDB, Polars.

    Parameters
    ----------
    source : str, os.PathLike, pyarrow.dataset.Dataset, duckdb relation, polars.LazyFrame or DataFrame
        A path, glob (``"events/*.parquet"``) or folder of Parquet or CSV files
        (all of one kind, the same columns and types), an Arrow dataset or table,
        a DuckDB relation, a Polars LazyFrame; or an in-memory pandas / Polars
        DataFrame (then the usual :class:`~infoscope.frame.session.ProfileSession`).
    memory_limit : int or str, default=1 GiB
        Bounds the row batches (``"512MB"``, ``"2GiB"`` or bytes): a batch's
        copies stay within it.  Peak memory does not grow with the rows.
    columns : list of str, optional
        Profile only these columns (only they are read).
    progress : {"auto", True, False}, default="auto"
        A progress bar per pass (tqdm).
    sep, encoding : str, optional
        For CSV files (see :func:`infoscope.reading.read_table`).
    **settings
        Settings of :class:`~infoscope.frame.session.ProfileSession`.  ``bins``
        must be a number, ``"rows"`` or edges (the width rules read every value
        at once).  ``sample=n`` reads a seeded random sample of ``n`` rows into
        memory instead and profiles it in memory (every view then works,
        ``attrs["sampled"]`` says so).

    Returns
    -------
    TableSession or ProfileSession

    Raises
    ------
    infoscope.sources.SourceError
        A missing path, an empty folder, a cut-short file, files whose schemas
        disagree, a column type that cannot be profiled; the message names the
        file or column.

    Notes
    -----
    Out of core, conditional tables, feature selection, surprising rows and drift
    read the rows: they raise :class:`NeedsRows`, which says to use ``sample=``.
    The p-values come from the tables alone: a permutation test of independence
    has the null of random tables with the observed margins (Patefield 1981).

    References
    ----------
    .. [1] Patefield, W. M. (1981). Algorithm AS 159: An efficient method of
       generating random R x C tables with given row and column totals. Applied
       Statistics 30(1), 91-97.

    Examples
    --------
    >>> import pandas as pd, tempfile, os
    >>> folder = tempfile.mkdtemp()
    >>> pd.DataFrame({"a": list("xyxy") * 25, "b": range(100)}).to_parquet(os.path.join(folder, "p.parquet"))
    >>> s = profile(folder, progress=False, n_boot=0)
    >>> s.entropy()[["column", "kind", "k"]].values.tolist()
    [['a', 'text', 2], ['b', 'numeric', 3]]
    """
    kind = source_kind(source)
    if kind in ("pandas", "polars"):
        return session_for(source, **settings)
    if kind == "dask":
        from infoscope.sources import dask as dask_source  # the Dask adapter (issue 7, Dask part)

        if columns is not None:
            source = source[list(columns)]
        return dask_source.profile_dask(source, progress=progress, **settings)
    merged = _check_settings({**_DEFAULTS, **settings})  # a bad setting fails before any file is read
    if merged["weights"] is not None:
        raise ValueError("weights= is not taken by a profile of a file or dataset source yet: load the frame "
                         "(pandas or Polars) to weight its rows")
    src = open_source(source, columns=columns, sep=sep, encoding=encoding)
    if merged["sample"] is not None:
        return _sampled(src, merged, settings)
    from infoscope.encode.summaries import column_specs

    dtypes = src.dtypes()
    specs = column_specs(dtypes, **{k: merged[k] for k in _ENCODING_SETTINGS})
    rows = batch_rows_for(src.bytes_per_row(src.names), parse_memory(memory_limit))
    p = run_pass1(src, specs, batch_rows=rows, progress=progress)
    alphabets = p.alphabets()
    tables, marginals, n = count_tables(src, list(alphabets.values()), batch_rows=rows, progress=progress)
    session = session_from_tables(list(alphabets.values()), tables, marginals, n_rows=n, source=src.label,
                                  **settings)
    session.reads(src, batch_rows=rows, progress=progress)  # drift reads the source once more
    return session


def _sampled(src, merged, settings):
    """A seeded sample of rows read into memory and profiled there (every view works)."""
    import numpy as np
    import pandas as pd

    from infoscope.engine.sampling import sample_rows

    n = src.n_rows
    if n is None:
        n = sum(len(b) for b in src.batches(src.names[:1], 1 << 20))
    rows = sample_rows(n, merged["sample"], seed=merged["seed"])
    keep = np.zeros(n, dtype=bool)
    if rows is None:
        keep[:] = True
    else:
        keep[rows] = True
    parts, start = [], 0
    for batch in src.batches(src.names, 1 << 18):
        mask = keep[start:start + len(batch)]
        start += len(batch)
        if mask.any():
            parts.append(batch[mask])
    frame = pd.concat(parts, ignore_index=True)
    rest = {k: v for k, v in settings.items() if k not in ("sample",)}
    return SampledSession(frame, of_rows=n, **rest)
