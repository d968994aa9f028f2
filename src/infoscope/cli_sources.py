"""How ``infoscope profile`` opens its DATA: one file in memory, many files out of core, or on Dask.

* one file (``data.csv``, ``data.parquet``) is read into memory by
  :func:`infoscope.reading.read_table`, as before (every view works);
* a glob (``'events/*.parquet'``, quoted so that the shell leaves it alone), a
  folder, several files (an unquoted glob the shell expanded), or one file with
  ``--memory-limit`` are read out of core by :func:`infoscope.profile`: two
  passes of row batches bounded by ``--memory-limit``, never the whole table;
* ``--dask`` runs the same two passes as Dask computations on a local cluster of
  worker processes (``distributed.LocalCluster``), and ``--scheduler ADDRESS`` on
  a running cluster (``distributed.Client(ADDRESS)``); the workers read the files
  themselves, so the paths (or ``s3://`` / ``gs://`` addresses) must be ones the
  workers can reach.

The count tables equal the in-memory ones on the same rows in every case.
"""
from __future__ import annotations

import argparse
import contextlib
import os
from dataclasses import dataclass, field

import pandas as pd

__all__ = ["add_source_options", "open_profile", "Opened", "out_of_core"]

#: Characters that make DATA a glob pattern.
_GLOB = "*?["


@dataclass
class Opened:
    """What :func:`open_profile` opened.

    Attributes
    ----------
    session : ProfileSession or TableSession
        The profile.
    label : str
        DATA as the user gave it.
    how : str
        One line on how it was read (in memory, out of core, on which cluster).
    frame : pandas.DataFrame or None
        The frame read into memory (for the reader's notes), None otherwise.
    """

    session: object
    label: str
    how: str
    frame: pd.DataFrame | None = field(default=None, repr=False)


def add_source_options(p: argparse.ArgumentParser) -> None:
    """Declare ``--memory-limit``, ``--dask`` and ``--scheduler`` on a subcommand.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The subcommand's parser.

    Returns
    -------
    None

    References
    ----------
    .. [1] Dask documentation, "Distributed: Quickstart" (``Client(address)``) and
       ``distributed.LocalCluster``.

    Examples
    --------
    >>> p = argparse.ArgumentParser(); add_source_options(p)
    >>> p.parse_args(["--scheduler", "tcp://10.0.0.5:8786"]).scheduler
    'tcp://10.0.0.5:8786'
    """
    p.add_argument("--memory-limit", default=None, metavar="SIZE", dest="memory_limit",
                   help="read the data out of core in row batches within SIZE (e.g. 512MB, 2GiB); "
                        "a glob, a folder or several files are always read this way (default 1GiB)")
    where = p.add_mutually_exclusive_group()
    where.add_argument("--dask", action="store_true",
                       help="count on a local Dask cluster of worker processes (needs infoscope[dask])")
    where.add_argument("--scheduler", default=None, metavar="ADDRESS",
                       help="count on a running Dask cluster, e.g. tcp://host:8786; its workers read "
                            "the files, so give paths they can reach")


def out_of_core(data: list[str], args: argparse.Namespace) -> bool:
    """Whether DATA is read out of core (or on Dask) rather than into memory.

    Parameters
    ----------
    data : list of str
        The DATA arguments.
    args : argparse.Namespace
        Parsed options (``memory_limit``, ``dask``, ``scheduler``).

    Returns
    -------
    bool
        True for several paths, a glob, a folder, ``--memory-limit``, ``--dask`` or ``--scheduler``.

    Examples
    --------
    >>> out_of_core(["events/*.parquet"], argparse.Namespace())
    True
    >>> out_of_core(["data.csv"], argparse.Namespace())
    False
    """
    if getattr(args, "dask", False) or getattr(args, "scheduler", None) or getattr(args, "memory_limit", None):
        return True
    return len(data) > 1 or any(ch in data[0] for ch in _GLOB) or os.path.isdir(data[0])


@contextlib.contextmanager
def open_profile(data: list[str], args: argparse.Namespace, settings: dict, *, read_frame):
    """Open DATA as a profile session the way :mod:`infoscope.cli_sources` describes.

    Parameters
    ----------
    data : list of str
        The DATA arguments (one path, glob or folder, or several files).
    args : argparse.Namespace
        Parsed options (``memory_limit``, ``dask``, ``scheduler``, ``sep``, ``encoding``).
    settings : dict
        Settings of the session (``bins``, ``target``, ``sample`` ...).
    read_frame : callable
        ``read_frame(path) -> DataFrame`` for one file read into memory.

    Yields
    ------
    Opened
        The session and how it was read; a Dask cluster this started is closed on exit.

    Raises
    ------
    infoscope.sources.SourceError
        A missing path, an empty folder, a cut-short file, files that disagree (naming the file or column).
    ValueError
        A setting the source cannot take (e.g. a width rule for ``--bins`` out of core), naming it.
    ImportError
        ``--dask`` or ``--scheduler`` without Dask's distributed scheduler installed.
    """
    from infoscope.frame.session import ProfileSession
    from infoscope.sources import profile

    label = data[0] if len(data) == 1 else f"{data[0]} and {len(data) - 1} more"
    if not out_of_core(data, args):
        frame = read_frame(data[0])
        yield Opened(ProfileSession(frame, **settings), label, "read into memory", frame)
        return
    source = data[0] if len(data) == 1 else list(data)
    if not (getattr(args, "dask", False) or getattr(args, "scheduler", None)):
        limit = getattr(args, "memory_limit", None) or "1GiB"
        session = profile(source, memory_limit=limit, sep=getattr(args, "sep", None),
                          encoding=getattr(args, "encoding", None), **settings)
        yield Opened(session, label, f"read out of core in row batches within {limit}")
        return
    with _dask_client(args) as (client, where):
        ddf = _dask_frame(source, args)
        session = profile(ddf, **settings)
        yield Opened(session, label, f"counted on {where} ({ddf.npartitions} partitions)")


@contextlib.contextmanager
def _dask_client(args):
    try:
        from distributed import Client, LocalCluster
    except ImportError:
        raise ImportError("--dask and --scheduler need Dask's distributed scheduler: "
                          "python -m pip install 'infoscope[dask]'") from None
    if args.scheduler:
        client = Client(args.scheduler, timeout="30s")
        try:
            yield client, f"the Dask cluster at {args.scheduler}"
        finally:
            client.close()
        return
    with LocalCluster(processes=True, threads_per_worker=1, dashboard_address=":0") as cluster, \
            Client(cluster) as client:
        yield client, f"a local Dask cluster of {len(cluster.workers)} worker processes"


def _dask_frame(source, args):
    """A Dask DataFrame of the files, checked here first when they are local."""
    import dask.dataframe as dd

    from infoscope.sources.readers import csv_delimiter, local_files, open_source

    paths = source if isinstance(source, list) else [source]
    if any("://" in p for p in paths):  # remote storage: the workers (and fsspec) read and check it
        fmt = "csv" if paths[0].lower().endswith((".csv", ".tsv", ".csv.gz")) else "parquet"
        files = paths if len(paths) > 1 else paths[0]
    else:
        files, fmt = local_files(source)
        open_source(files, sep=args.sep, encoding=args.encoding)  # schemas, cut-short files: one clear error
    if fmt == "parquet":
        return dd.read_parquet(files)
    sep = csv_delimiter(files if isinstance(files, list) else [files], args.sep, args.encoding)
    return dd.read_csv(files, sep=sep, encoding=args.encoding or "utf-8")
