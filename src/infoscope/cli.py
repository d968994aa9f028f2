"""The ``infoscope`` command line.

One function per subcommand (``cmd_<name>``) and one ``add_<name>_parser`` that
declares its options, so that new subcommands slot in beside the others:

* ``infoscope demo`` — profile the built-in demo data (an invented parcel-courier
  log, :mod:`infoscope.datasets`) and print its tables in the terminal;
  ``--out profile.html`` also writes the self-contained offline profile page.
* ``infoscope profile DATA.csv|DATA.parquet`` — profile a file of your own: print
  its tables, and with ``--out`` write the self-contained offline profile page;
  a glob, a folder or several files are read out of core, ``--dask`` /
  ``--scheduler`` count on a Dask cluster (:mod:`infoscope.cli_sources`).

Files are read by :func:`infoscope.reading.read_table` (one reader for every
subcommand: :func:`read_input` with the ``--sep`` / ``--encoding`` options that
:func:`add_read_options` declares, and :func:`print_read_notes` to say what the
reader decided).
"""
from __future__ import annotations

import argparse
import contextlib
import sys
import warnings

import numpy as np
import pandas as pd

from infoscope._docs import fill_doc
from infoscope.cli_sources import add_source_options, open_profile
from infoscope.reading import ReadError, parse_datetime_columns, read_table

__all__ = ["build_parser", "main", "cmd_demo", "cmd_drift", "cmd_profile", "format_table", "read_input",
           "print_read_notes", "parse_datetime_columns", "read_table"]


class CommandError(Exception):
    """A problem with the user's input: printed as one line, exit status 2."""


CAUTION = (
    "Caution: these are estimates from a sample (see the intervals and p-values); "
    "mutual information measures dependence, not cause."
)


#: Columns holding probabilities: below 0.001 they read "below 0.001".
_PROBABILITY_COLUMNS = ("p_value", "q_value")


#: Docstring blocks of the command functions (see :mod:`infoscope._docs`).
_DOCS = {
    "out": """out : file-like, optional
    Where to print (default ``sys.stdout``).""",
    "parser_returns": """Returns
-------
argparse.ArgumentParser

References
----------
.. [1] Python documentation, ``argparse`` (sub-commands).""",
}


def format_table(table: pd.DataFrame, *, digits: int = 3, max_rows: int | None = None,
                 max_width: int = 28) -> str:
    """Plain-text rendering of a result table for a terminal.

    Parameters
    ----------
    table : pandas.DataFrame
        A result table.
    digits : int, default=3
        Significant digits of floats, no finer than 0.0001 (smaller values read
        "0"); p- and q-values below 0.001 read "below 0.001".
    max_rows : int, optional
        Show at most this many rows (a note says how many were left out).
    max_width : int, default=28
        Longer cell texts are cut with "...".

    Returns
    -------
    str

    References
    ----------
    .. [1] pandas.DataFrame.to_string (the layout used).

    Examples
    --------
    >>> import pandas as pd
    >>> print(format_table(pd.DataFrame({"column": ["a", "bb"], "entropy": [1.23456, 0.5]})))
    column  entropy
    a          1.23
    bb          0.5
    """
    shown = table if max_rows is None else table.head(max_rows)

    def cell(value, column: str = "") -> str:
        if isinstance(value, (float, np.floating)):
            if np.isnan(value):
                return ""
            if column in _PROBABILITY_COLUMNS and value < 0.001:
                return "below 0.001"  # a tail probability is never exactly 0
            # the display's precision: 3 significant digits, no finer than 1e-4; a
            # rounding residue (6.4e-16 bits) or a tiny negative estimate reads "0"
            value = round(float(value), 4)
            return "0" if value == 0 else f"{value:.{digits}g}"
        text = str(value)
        return text if len(text) <= max_width else text[: max_width - 3] + "..."

    columns = [str(c) for c in shown.columns]
    cells = [[cell(v, str(c)) for v in shown[c]] for c in shown.columns]
    # numbers right-aligned, text (names, labels, flags) left-aligned
    numeric = [pd.api.types.is_numeric_dtype(shown[c]) and not pd.api.types.is_bool_dtype(shown[c])
               for c in shown.columns]
    widths = [max([len(h), *map(len, col)]) for h, col in zip(columns, cells)]

    def line(parts) -> str:
        return "  ".join(p.rjust(w) if num else p.ljust(w)
                         for p, w, num in zip(parts, widths, numeric)).rstrip()

    lines = [line(columns)] + [line(row) for row in zip(*cells)]
    text = "\n".join(lines)
    if max_rows is not None and len(table) > max_rows:
        text += f"\n({len(table) - max_rows} more rows not shown)"
    return text


def _section(title: str, body: str, out) -> None:
    print(f"\n== {title}", file=out)
    print(body, file=out)


#: The false discovery rate below which ``top pairs`` lists a pair.
PAIR_Q_LEVEL = 0.05
_INTERVAL_NOTE = "{ci}% bootstrap interval"
_NEGATIVE_NOTE = "an estimate below 0 means no dependence beyond the bias correction"


def _top_pairs_section(session, top: int, out) -> None:
    pairs = session.pairs("nmi")
    kept = pairs[pairs["q_value"] < PAIR_Q_LEVEL].sort_values("nmi", ascending=False)
    title = (f"top {top} pairs by normalised mutual information (only pairs with "
             f"q < {PAIR_Q_LEVEL:g}, Benjamini-Hochberg; {len(kept)} of {len(pairs)} pairs)")
    if kept.empty:
        body = f"no pair has q < {PAIR_Q_LEVEL:g}: no dependence between columns stands out"
    else:
        body = format_table(kept[["a", "b", "n", "mi", "nmi", "q_value", "p_method", "reliability"]],
                            max_rows=top)
    body += "\n" + _reliability_note(pairs, "pairs")
    _section(title, body, out)


def _reliability_note(table, what: str) -> str:
    """How many rows of a pairs / relevance table rest on thin tables, and what the tests were."""
    rel = table["reliability"].astype(str)
    thin, few = int((rel == "sparse").sum()), int((rel == "too_few").sum())
    permuted = int((table["p_method"].astype(str) == "permutation").sum())
    parts = [f"{thin} of {len(table)} {what} sparse (under 5 rows per cell: estimates uncertain), "
             f"{few} with too few rows to tell anything (under 1 row per cell)"]
    if permuted:
        parts.append(f"p-values of {permuted} from a permutation test (the chi-square law "
                     "needs 20 rows per cell)")
    return "; ".join(parts)


def _entropy_title(session, entropy) -> str:
    sampled = entropy.attrs.get("sampled")
    ci = _INTERVAL_NOTE.format(ci=int(round(session.settings["ci"] * 100)))
    if session.settings.get("n_boot", 1) == 0:
        ci = "no interval (n_boot=0)"
    return (f"entropy per column ({entropy.attrs['unit']}, {entropy.attrs['estimator']}, {ci}"
            + (f", sample of {sampled} rows" if sampled else "") + ")")


def _relevance_title(target, unit) -> str:
    return (f"relevance to {target!r} ({unit}; leakage = the column nearly determines the "
            f"target; {_NEGATIVE_NOTE})")


def _entropy_section(session, entropy, out) -> None:
    _section(_entropy_title(session, entropy),
             format_table(entropy[["column", "kind", "k", "missing_share", "entropy", "ci_low",
                                   "ci_high", "efficiency", "flags"]], max_width=44), out)


def _relevance_section(relevance, target, unit, out) -> None:
    _section(_relevance_title(target, unit),
             format_table(relevance[["column", "mi", "mi_above_chance", "ci_low", "ci_high", "share_of_target",
                                     "reliability", "q_value", "leakage"]])
             + "\n" + _reliability_note(relevance, "columns"), out)


@contextlib.contextmanager
def _noting():
    """Collect infoscope's warnings as notes (this runs in the main thread only)."""
    from infoscope._warnings import InfoscopeWarning

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", InfoscopeWarning)
        yield caught


def _notes(caught) -> list[str]:
    return sorted({str(w.message) for w in caught})


def _notes_section(lines, out) -> None:
    if lines:
        _section("notes on the data", "\n".join(lines), out)


@contextlib.contextmanager
def _refused_as_command_error():
    """A ValueError, TypeError, KeyError or ImportError of the library becomes a one-line CommandError."""
    try:
        yield
    except (ValueError, TypeError, KeyError, ImportError) as exc:
        raise CommandError(str(exc).strip().splitlines()[0]) from None


def add_demo_parser(subparsers) -> argparse.ArgumentParser:
    """Declare ``infoscope demo`` and its options.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        From ``ArgumentParser.add_subparsers``.

    Returns
    -------
    argparse.ArgumentParser
        The ``demo`` parser (its ``handler`` default is :func:`cmd_demo`).

    References
    ----------
    .. [1] Python documentation, ``argparse`` (sub-commands).

    Examples
    --------
    >>> import argparse
    >>> sub = argparse.ArgumentParser().add_subparsers()
    >>> add_demo_parser(sub).parse_args(["--top", "3"]).top
    3
    """
    p = subparsers.add_parser(
        "demo", help="profile the built-in demo data and print the tables",
        description="Profile an invented parcel-courier delivery log (generated by "
                    "infoscope.datasets) and print entropy, top pairs, relevance to the "
                    "target and drift of a second batch.")
    p.add_argument("--rows", type=int, default=50_000, help="rows of the demo log (default 50000)")
    p.add_argument("--batch-rows", type=int, default=20_000,
                   help="rows of the second, drifted batch (default 20000)")
    p.add_argument("--seed", type=int, default=0, help="seed of the generator (default 0)")
    p.add_argument("--bins", type=_bins_option, default="rows",
                   help="bins for numeric columns: a number or a rule name (default 'rows': "
                        "floor(sqrt(n/10)) within 2..16)")
    p.add_argument("--top", type=int, default=10, help="pairs to show (default 10)")
    p.add_argument("--write-parquet", default=None, metavar="FOLDER", dest="write_parquet",
                   help="write the demo log (--rows rows) as 8 Parquet files in FOLDER instead of "
                        "profiling it, to try `infoscope profile 'FOLDER/*.parquet'` out of core")
    _add_export_options(p)
    p.set_defaults(handler=cmd_demo)
    return p


@fill_doc(_DOCS)
def cmd_demo(args: argparse.Namespace, out=None) -> int:
    """Run ``infoscope demo``: print the demo profile's tables.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options (``rows``, ``batch_rows``, ``seed``, ``bins``, ``top``).
    {out}

    Returns
    -------
    int
        The exit status (0).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (the PSI thresholds).

    Examples
    --------
    >>> import argparse, io
    >>> buf = io.StringIO()
    >>> ns = argparse.Namespace(rows=2000, batch_rows=1000, seed=0, bins=8, top=3)
    >>> cmd_demo(ns, out=buf)
    0
    >>> "relevance" in buf.getvalue()
    True
    """
    from infoscope.datasets import PLANTED, make_deliveries, make_deliveries_batch
    from infoscope.frame.session import ProfileSession

    out = sys.stdout if out is None else out
    _check_out(args)
    for name in ("rows", "batch_rows", "top", "bins"):
        if isinstance(getattr(args, name), int) and getattr(args, name) < 1:
            raise CommandError(f"--{name.replace('_', '-')} must be >= 1, got {getattr(args, name)}")
    if args.seed < 0:
        raise CommandError(f"--seed must be >= 0, got {args.seed}")
    target = PLANTED["target"]
    if getattr(args, "write_parquet", None):
        return _write_demo_files(args, out)
    frame = make_deliveries(args.rows, seed=args.seed)
    batch = make_deliveries_batch(args.batch_rows, seed=args.seed + 1, drift=True)
    print(f"infoscope demo: an invented parcel-courier log, {len(frame)} rows x "
          f"{frame.shape[1]} columns; target {target!r}.", file=out)
    print(CAUTION, file=out)
    with _noting() as caught:
        session = ProfileSession(frame, bins=args.bins, target=target, seed=args.seed)
        entropy = session.entropy()
        unit = entropy.attrs["unit"]
        _entropy_section(session, entropy, out)
        _top_pairs_section(session, args.top, out)
        relevance = session.relevance(target)
        _relevance_section(relevance, target, unit, out)
    log_notes = _notes(caught)
    with _noting() as caught:
        drift = ProfileSession(batch, bins=args.bins).drift(frame)
        _section(f"drift of a later batch ({len(batch)} rows) from the log "
                 "(PSI: < 0.10 stable, 0.10-0.25 moderate, >= 0.25 major; id_like / time_axis: "
                 "drift by construction (identifiers; another period), not a change of distribution; "
                 f"PSI in {drift.attrs['units']['psi']}; KL and JS in {drift.attrs['units']['kl']})",
                 format_table(drift[["column", "kind", "k", "psi", "kl", "js", "p_value", "flag"]]), out)
    batch_notes = [m for m in _notes(caught) if m not in log_notes]
    notes = [f"- log ({len(frame)} rows): {m}" for m in log_notes]
    notes += [f"- later batch ({len(batch)} rows): {m}" for m in batch_notes]
    _notes_section(notes, out)
    if getattr(args, "out", None):
        return _write_page(session, args, out, command="demo")
    return 0


def _write_demo_files(args: argparse.Namespace, out) -> int:
    """``infoscope demo --write-parquet FOLDER``: the demo log as Parquet files, and what to run next."""
    from infoscope.datasets import PLANTED, write_deliveries

    try:
        paths = write_deliveries(args.write_parquet, n=args.rows, files=min(8, args.rows), seed=args.seed)
    except OSError as exc:
        raise CommandError(f"could not write to {args.write_parquet!r}: {exc}") from None
    folder = args.write_parquet.rstrip("/\\") or args.write_parquet
    print(f"wrote {args.rows} rows of the invented parcel-courier log as {len(paths)} Parquet files in "
          f"{folder}/; profile them out of core with:\n"
          f"  infoscope profile '{folder}/*.parquet' --target {PLANTED['target']} --out profile.html", file=out)
    return 0


# --------------------------------------------------------------------------- profile
def _add_export_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--out", metavar="PAGE.html", default=None,
                   help="also write the profile as one self-contained HTML page (works offline)")
    p.add_argument("--min-count", type=int, default=None, metavar="N",
                   help="in the page, hide counts below N in pair views (small-cell suppression)")


def _check_out(args):
    """The ``--out`` path, checked before any work is done (CommandError if unusable)."""
    from pathlib import Path

    from infoscope.report.suppression import check_min_count

    try:
        check_min_count(getattr(args, "min_count", None))
    except (TypeError, ValueError) as exc:
        raise CommandError(f"--min-count: {exc}") from None
    if not getattr(args, "out", None):
        return None
    path = Path(args.out)
    if path.suffix.lower() not in (".html", ".htm"):
        raise CommandError(f"--out must name an .html file, got {args.out!r}")
    if path.is_dir():
        raise CommandError(f"--out {args.out!r} is a folder; name a file such as profile.html")
    if not path.parent.exists():
        raise CommandError(f"the folder of --out {args.out!r} does not exist")
    _probe_writable(path, args.out)
    return path


def _probe_writable(path, shown: str) -> None:
    """Fail now, not after the work, when ``path`` cannot be written (a file is made and removed)."""
    import os

    if path.exists():
        if not path.is_file() or not os.access(path, os.W_OK):
            raise CommandError(f"--out {shown!r} cannot be written (permission denied or not a file)")
        return
    try:
        with open(path, "xb"):
            pass
    except OSError as exc:
        raise CommandError(f"--out {shown!r} cannot be written: {exc.strerror or exc}") from None
    try:
        path.unlink()
    except OSError:  # pragma: no cover - made a moment ago
        pass


def add_read_options(p: argparse.ArgumentParser) -> None:
    """Declare ``--sep`` and ``--encoding`` (how a text data file is read).

    Parameters
    ----------
    p : argparse.ArgumentParser
        The subcommand's parser.

    Returns
    -------
    None

    References
    ----------
    .. [1] Python documentation, ``argparse``; pandas.read_csv (``sep``, ``encoding``).

    Examples
    --------
    >>> p = argparse.ArgumentParser(); add_read_options(p)
    >>> p.parse_args(["--sep", ";"]).sep
    ';'
    """
    p.add_argument("--sep", default=None, metavar="CHAR",
                   help="delimiter of a CSV file (one character, or 'tab'); sniffed from the "
                        "first lines when not given")
    p.add_argument("--encoding", default=None,
                   help="text encoding of a CSV file (default utf-8), e.g. latin-1 or cp1252")


def read_input(path: str, args: argparse.Namespace) -> pd.DataFrame:
    """Read a data file with the options of :func:`add_read_options`; one line on failure.

    Parameters
    ----------
    path : str
        The data file.
    args : argparse.Namespace
        Parsed options (``sep``, ``encoding``; missing ones count as not given).

    Returns
    -------
    pandas.DataFrame
        As :func:`infoscope.reading.read_table` returns it (notes in ``attrs``).

    Raises
    ------
    CommandError
        When the file cannot be read (the reader's message).

    References
    ----------
    .. [1] pandas.read_csv, pandas.read_parquet (through :func:`infoscope.reading.read_table`).

    Examples
    --------
    >>> read_input("no-such-file.csv", argparse.Namespace())
    Traceback (most recent call last):
    ...
    infoscope.cli.CommandError: no such file: 'no-such-file.csv'
    """
    try:
        return read_table(path, sep=getattr(args, "sep", None), encoding=getattr(args, "encoding", None))
    except ReadError as exc:
        raise CommandError(str(exc)) from None


def print_read_notes(frame: pd.DataFrame, out, *, label: str = "") -> None:
    """Print what the reader decided about a file (delimiter, encoding, stray fields, dates).

    Parameters
    ----------
    frame : pandas.DataFrame
        From :func:`read_input`.
    out : file-like
        Where to print.
    label : str, optional
        Put before each line (e.g. the file's role when a command reads two).

    Returns
    -------
    None

    References
    ----------
    .. [1] :func:`infoscope.reading.read_table` (what the notes say).

    Examples
    --------
    >>> import io
    >>> df = pd.DataFrame({"a": [1]}); df.attrs["read_notes"] = ["read as delimited text"]
    >>> buf = io.StringIO(); print_read_notes(df, buf); print(buf.getvalue().strip())
    read as delimited text
    """
    for note in frame.attrs.get("read_notes") or []:
        print(f"{label}{note}", file=out)
    parsed = frame.attrs.get("parsed_datetimes") or []
    if parsed:
        print(f"{label}read as dates/times (text in the file): " + ", ".join(map(repr, parsed)), file=out)


def _bins_option(text: str):
    """``--bins``: a whole number, or a rule name (fd, scott, sturges, ...)."""
    try:
        return int(text)
    except ValueError:
        return text


def _write_page(session, args, out, *, command: str) -> int:
    """Write ``args.out`` (the offline page) for a session; one line on failure."""
    from infoscope.report.html import to_html

    path = _check_out(args)
    try:
        written = to_html(session, path, min_count=args.min_count, title=getattr(args, "title", None))
    except (OSError, ValueError, TypeError) as exc:
        raise CommandError(f"could not write {args.out!r}: {exc}") from None
    note = f" (counts below {args.min_count} hidden in pair views)" if args.min_count and args.min_count > 1 else ""
    print(f"\nwrote {written}{note}", file=out)
    return 0


def add_profile_parser(subparsers) -> argparse.ArgumentParser:
    """Declare ``infoscope profile`` and its options."""
    p = subparsers.add_parser(
        "profile", help="profile a CSV or Parquet file",
        description="Profile the columns of a CSV or Parquet file: entropy of every column, "
                    "the most informative pairs, relevance to a target; with --out, one "
                    "self-contained HTML page that works offline.")
    p.add_argument("data", metavar="DATA", nargs="+",
                   help="a .csv (or .csv.gz, .tsv) or .parquet file, read into memory; or a glob "
                        "('events/*.parquet', quoted), a folder or several files of one kind, read "
                        "out of core in row batches")
    p.add_argument("--target", default=None, help="column to measure every other column against")
    p.add_argument("--bins", type=_bins_option, default="rows",
                   help="bins for numeric columns: a number or a rule name (fd, scott, sturges, "
                        "doane, rice, sqrt, stone, auto, knuth, rows); default 'rows': "
                        "floor(sqrt(n/10)) bins within 2..16 for n values, about 10 rows per "
                        "cell of a pair")
    p.add_argument("--strategy", default="quantile",
                   help="where a fixed number of bins go: quantile (default) or uniform")
    p.add_argument("--estimator", default="miller_madow", help="entropy estimator (default miller_madow)")
    p.add_argument("--sample", type=int, default=None, metavar="N",
                   help="profile a random sample of N rows (faster on big files)")
    p.add_argument("--seed", type=int, default=0, help="seed of the sample and the bootstrap (default 0)")
    p.add_argument("--top", type=int, default=10, help="pairs to show (default 10)")
    p.add_argument("--title", default=None, help="title of the HTML page")
    add_read_options(p)
    add_source_options(p)
    _add_export_options(p)
    p.set_defaults(handler=cmd_profile)
    return p


@fill_doc(_DOCS)
def cmd_profile(args: argparse.Namespace, out=None) -> int:
    """Run ``infoscope profile DATA``: print the tables, write ``--out`` if given.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options (``data``, ``target``, ``bins``, ``strategy``, ``estimator``,
        ``sample``, ``seed``, ``top``, ``out``, ``min_count``, ``title``, ``sep``,
        ``encoding``, ``memory_limit``, ``dask``, ``scheduler``); how DATA is read
        (in memory, out of core, on Dask) is :mod:`infoscope.cli_sources`.
    {out}

    Returns
    -------
    int
        0 on success; 2 (one line on stderr) when the input is unusable.

    References
    ----------
    .. [1] Benjamini, Y. & Hochberg, Y. (1995). Controlling the false discovery rate.
       J. R. Stat. Soc. B 57(1), 289-300 (the q-values printed with the pairs).

    Examples
    --------
    >>> main(["profile", "deliveries.csv", "--target", "late", "--out", "p.html"])  # doctest: +SKIP
    0
    """
    from tqdm.auto import tqdm

    out = sys.stdout if out is None else out
    if isinstance(args.bins, int) and args.bins < 1:
        raise CommandError(f"--bins must be >= 1 or a rule name, got {args.bins}")
    if args.top < 1:
        raise CommandError(f"--top must be >= 1, got {args.top}")
    if args.sample is not None and args.sample < 1:
        raise CommandError(f"--sample must be >= 1, got {args.sample}")
    data = args.data if isinstance(args.data, list) else [args.data]
    _check_out(args)
    steps = ["read, encode and count", "entropy", "pairs", "relevance"] + (["page"] if args.out else [])
    bar = tqdm(total=len(steps), desc="infoscope profile", unit="step", file=sys.stderr, disable=None,
               leave=False)
    settings = dict(bins=args.bins, strategy=args.strategy, estimator=args.estimator, target=args.target,
                    sample=args.sample, seed=args.seed)
    with _noting() as caught, contextlib.ExitStack() as stack:
        with _refused_as_command_error():
            opened = stack.enter_context(
                open_profile(data, args, settings, read_frame=lambda path: _read_with_target(path, args)))
        session = opened.session
        bar.update()
        print(f"infoscope profile: {opened.label}, {session.n_rows} rows x {len(session.names)} columns"
              + (f"; a seeded sample of {session.sampled} rows" if session.sampled else "")
              + (f"; target {args.target!r}" if args.target else "") + f"; {opened.how}.", file=out)
        if opened.frame is not None:
            print_read_notes(opened.frame, out)
        elif args.sample is None:
            print("Out of core the profile holds count tables: entropy, pairs, relevance and the page; "
                  "--sample N reads a seeded sample for every view.", file=out)
        print(CAUTION, file=out)
        bar.set_postfix_str("entropy")
        entropy = session.entropy()
        bar.update()
        unit = entropy.attrs["unit"]
        _entropy_section(session, entropy, out)
        bar.set_postfix_str("pairs")
        if len(session.names) >= 2:
            _top_pairs_section(session, args.top, out)
        bar.update()
        bar.set_postfix_str("relevance")
        if args.target is not None:
            relevance = session.relevance(args.target)
            _relevance_section(relevance, args.target, unit, out)
        bar.update()
        status = 0
        if args.out:
            bar.set_postfix_str("writing the page")
            status = _write_page(session, args, out, command="profile")
            bar.update()
    bar.close()
    _notes_section([f"- {m}" for m in _notes(caught)], out)
    return status


def _read_with_target(path: str, args: argparse.Namespace) -> pd.DataFrame:
    """One file read into memory; ``--target`` checked against its columns."""
    frame = read_input(path, args)
    if args.target is not None and args.target not in frame.columns:
        names = ", ".join(repr(str(c)) for c in list(frame.columns)[:12])
        more = " ..." if frame.shape[1] > 12 else ""
        raise CommandError(f"--target {args.target!r} is not a column of {path!r} (columns: {names}{more})")
    return frame


# ------------------------------------------------------------------ infoscope drift
# ``infoscope drift REFERENCE CURRENT``: check a batch against a reference in a
# pipeline.  Prints a short table, writes the record as JSON (``--json``, schema
# ``infoscope-drift`` version 1, docs/drift-json.md) and as an offline page
# (``--out``); exit status 0 (no column reached ``--fail-on``, or none given), 1 (a
# column reached it), 2 (the input could not be used).

#: Exit status when a column reaches the ``--fail-on`` level.
EXIT_DRIFT = 1


@fill_doc(_DOCS)
def add_drift_parser(subparsers) -> argparse.ArgumentParser:
    """Declare ``infoscope drift`` and its options.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        The ``infoscope`` subcommands.

    {parser_returns}

    Examples
    --------
    >>> p = argparse.ArgumentParser(); sub = p.add_subparsers(dest="command")
    >>> add_drift_parser(sub).parse_args(["ref.csv", "new.csv", "--fail-on", "major"]).fail_on
    'major'
    """
    from infoscope.frame.drift_report import FAIL_LEVELS

    p = subparsers.add_parser(
        "drift", help="check a batch against a reference (drift per column, against chance)",
        description="Compare CURRENT with REFERENCE column by column: PSI, KL and JS divergence, "
                    "the drift sampling alone gives at these sizes, p- and q-values, and a flag "
                    "that needs both a significant change (q < 0.05) and a PSI beyond chance in the "
                    "common-practice bands (0.10 moderate, 0.25 major). Exit status: 0 fine, "
                    "1 a column reached --fail-on, 2 unusable input.")
    p.add_argument("reference", metavar="REFERENCE", help="the reference data (CSV, TSV or Parquet)")
    p.add_argument("current", metavar="CURRENT",
                   help="the batch to check (CSV, TSV or Parquet); a glob ('day/*.parquet', quoted) or a "
                        "folder is read out of core")
    p.add_argument("--memory-limit", default=None, metavar="SIZE", dest="memory_limit",
                   help="read the batch out of core in row batches within SIZE (e.g. 512MB)")
    p.add_argument("--out", metavar="PAGE.html", default=None,
                   help="write the check as one self-contained HTML page (works offline)")
    p.add_argument("--json", metavar="FILE.json", default=None, dest="json_path",
                   help="write the record as JSON (schema infoscope-drift, version 1); '-' for stdout")
    p.add_argument("--fail-on", choices=list(FAIL_LEVELS), default=None,
                   help="exit with status 1 when a column's flag reaches this level "
                        "('moderate' counts moderate and major)")
    p.add_argument("--pairs", action="store_true",
                   help="also check every pair of columns for a change of dependence (slower)")
    p.add_argument("--bins", type=int, default=16, help="bins of numeric columns (default 16)")
    p.add_argument("--n-perm", type=int, default=999, dest="n_perm",
                   help="random splits of the pooled rows per column (default 999)")
    p.add_argument("--seed", type=int, default=0, help="seed of the splits (default 0)")
    p.add_argument("--min-count", type=int, default=None, metavar="N", dest="min_count",
                   help="in the JSON and the page, hide per-bin counts below N (small-cell suppression)")
    add_read_options(p)
    p.set_defaults(handler=cmd_drift)
    return p


def _format_rows(report) -> str:
    t = report.columns[["column", "kind", "k", "n", "psi", "psi_chance_high", "q_value",
                        "new_share", "flag"]].rename(columns={"psi_chance_high": "chance_95"})
    return format_table(t, max_width=32)


@fill_doc(_DOCS)
def cmd_drift(args: argparse.Namespace, out=None) -> int:
    """Run ``infoscope drift REFERENCE CURRENT``.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options (``reference``, ``current``, ``out``, ``json_path``,
        ``fail_on``, ``pairs``, ``bins``, ``n_perm``, ``seed``).
    {out}

    Returns
    -------
    int
        0, or :data:`EXIT_DRIFT` when a column reached ``--fail-on``; bad input
        raises :class:`infoscope.cli.CommandError` (status 2).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI bands, common practice).
    .. [2] Benjamini, Y., & Hochberg, Y. (1995). J. R. Stat. Soc. B 57(1), 289-300.

    Examples
    --------
    >>> main(["drift", "train.csv", "today.csv", "--fail-on", "major"])  # doctest: +SKIP
    0
    """
    from pathlib import Path

    out = sys.stdout if out is None else out
    if args.bins < 1:
        raise CommandError(f"--bins must be >= 1, got {args.bins}")
    if args.n_perm < 1:
        raise CommandError(f"--n-perm must be >= 1, got {args.n_perm}")
    if args.seed < 0:
        raise CommandError(f"--seed must be >= 0, got {args.seed}")
    if args.min_count is not None and args.min_count < 1:
        raise CommandError(f"--min-count must be >= 1, got {args.min_count}")
    for option, path in (("--out", args.out), ("--json", args.json_path)):
        if path and path != "-" and not Path(path).resolve().parent.is_dir():
            raise CommandError(f"{option} {path!r}: the folder does not exist")
    with _noting() as caught, contextlib.ExitStack() as stack:
        reference = read_input(args.reference, args)
        with _refused_as_command_error():  # a glob or folder (or --memory-limit): the batch out of core
            opened = stack.enter_context(open_profile([args.current], args, dict(bins=args.bins, seed=args.seed,
                                                      n_boot=100), read_frame=lambda path: read_input(path, args)))
            report = opened.session.drift_report(reference, pairs=args.pairs, n_perm=args.n_perm,
                                                 reference_name=str(args.reference),
                                                 current_name=str(args.current))
        current = opened.frame
    to_stdout = args.json_path == "-"
    show = sys.stderr if to_stdout else out
    print(f"infoscope drift: {args.current} ({report.current_rows} rows) against {args.reference} "
          f"({report.reference_rows} rows); {len(report.columns)} common column(s).", file=show)
    print_read_notes(reference, show, label="reference: ")
    if current is not None:
        print_read_notes(current, show, label="batch: ")
    else:
        print(f"batch: {opened.how}", file=show)
    for flag_list, words in ((report.missing_columns, "only in the reference"),
                             (report.extra_columns, "only in the batch")):
        if flag_list:
            print(f"{words}: " + ", ".join(map(repr, flag_list)), file=show)
    _section("drift per column (psi and chance_95 in nats: chance_95 is the PSI that sampling alone "
             "stays under 95 % of the time at these sizes; flag needs q < 0.05 and PSI beyond chance "
             ">= 0.10 moderate / 0.25 major, common practice)", _format_rows(report), show)
    if report.pairs is not None:
        moved = report.pairs[report.pairs["flag"].isin(["stronger", "weaker"])]
        body = format_table(moved[["a", "b", "mi_reference", "mi", "change", "ci_low", "ci_high",
                                   "q_value", "flag"]]) if len(moved) else "no pair changed beyond chance"
        _section(f"pairs whose dependence changed (MI in {report.units.get('kl', 'bits')})", body, show)
    _notes_section([f"- {m}" for m in _notes(caught)], show)
    if args.json_path:
        text = report.to_json(min_count=args.min_count)
        if to_stdout:
            print(text, file=out)
        else:
            Path(args.json_path).write_text(text + "\n", encoding="utf-8")
            print(f"wrote {args.json_path}", file=show)
    if args.out:
        from infoscope.report.drift_page import drift_page

        Path(args.out).write_text(drift_page(report, min_count=args.min_count), encoding="utf-8")
        print(f"wrote {args.out}", file=show)
    print(f"\n{CAUTION}", file=show)
    if args.fail_on:
        hit = report.reaching(args.fail_on)
        if hit:
            print(f"drift at or above {args.fail_on!r} in: " + ", ".join(map(repr, hit)), file=show)
            return EXIT_DRIFT
    return 0


@fill_doc(_DOCS)
def build_parser() -> argparse.ArgumentParser:
    """The ``infoscope`` argument parser with every subcommand.

    {parser_returns}

    Examples
    --------
    >>> build_parser().parse_args(["demo", "--rows", "100"]).rows
    100
    """
    parser = argparse.ArgumentParser(
        prog="infoscope", description="How much information the columns of a table carry.")
    subparsers = parser.add_subparsers(dest="command", metavar="COMMAND")
    add_demo_parser(subparsers)
    add_profile_parser(subparsers)
    add_drift_parser(subparsers)
    return parser


def main(argv=None) -> int:
    """Entry point of the ``infoscope`` command.

    Parameters
    ----------
    argv : list of str, optional
        Arguments (default ``sys.argv[1:]``).

    Returns
    -------
    int
        Exit status.

    References
    ----------
    .. [1] Python documentation, ``argparse``.

    Examples
    --------
    >>> main(["--help"])  # doctest: +SKIP
    """
    parser = build_parser()
    args = parser.parse_args(argv)
    if getattr(args, "handler", None) is None:
        parser.print_help()
        return 2
    try:
        return int(args.handler(args) or 0)
    except (CommandError, ReadError) as exc:
        print(f"infoscope {args.command}: {exc}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # the output was piped into a reader that stopped (| head)
        import os

        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
