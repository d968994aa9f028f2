"""Many columns at once: :func:`encode_frame` and :func:`encode_columns`, in worker threads."""
from __future__ import annotations

import os
from collections.abc import Mapping
from concurrent.futures import ThreadPoolExecutor

import pandas as pd

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.encode.checks import _polars_to_pandas
from infoscope.encode.drafts import DEFAULT_CATEGORICAL_THRESHOLD
from infoscope.encode.encoded import EncodedColumn
from infoscope.encode.encoder import _encode
from infoscope.encode.keys import column_keys

__all__ = ["encode_frame", "encode_columns"]


# Columns of at least this many rows are worth a worker thread (below it the pool
# costs more than it saves); small frames are encoded in the calling thread.
PARALLEL_MIN_ROWS = 50_000
_FRAME_SETTINGS = {
    "bins": 16, "strategy": "quantile", "missing": "drop", "max_categories": 64,
    "categorical_threshold": DEFAULT_CATEGORICAL_THRESHOLD, "cache": True,
}


def _frame_threads(threads, n_columns: int, n_rows: int) -> int:
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
        if type(frame).__module__.split(".")[0] == "polars" and hasattr(frame, "schema"):
            frame = _polars_to_pandas(frame.collect() if not hasattr(frame, "to_pandas") else frame)
        elif hasattr(frame, "to_pandas"):
            frame = frame.to_pandas()
        else:
            raise TypeError(f"frame must be a pandas or Polars DataFrame, got {type(frame).__name__}")
    keys = column_keys(list(frame.columns))
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
                warn_user(m, DataQualityWarning)
            out.append(col)
        return out
    with ThreadPoolExecutor(max_workers=n_threads, thread_name_prefix="infoscope-encode") as pool:
        futures = [pool.submit(one, job) for job in jobs]
        try:
            for future in futures:
                col, messages = future.result()  # the first failing column raises, as serially
                for m in messages:
                    warn_user(m, DataQualityWarning)
                out.append(col)
        except BaseException:
            for future in futures:
                future.cancel()
            raise
    return out
