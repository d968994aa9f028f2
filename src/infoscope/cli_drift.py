"""``infoscope drift REFERENCE CURRENT``: check a batch against a reference in a pipeline.

Prints a short table (one line per column), writes the record as JSON
(``--json``, schema ``infoscope-drift`` version 1, see ``docs/drift-json.md``) and
as a self-contained HTML page (``--out``), and exits with a status a scheduled
job or a CI step can act on:

* ``0`` — the check ran and no column reached the ``--fail-on`` level (or none was given);
* ``1`` — at least one column reached it (``major``; or ``moderate``, which counts
  moderate and major);
* ``2`` — the input could not be used (one line on stderr says why).
"""
from __future__ import annotations

import argparse
import sys
import warnings

__all__ = ["EXIT_DRIFT", "add_drift_parser", "cmd_drift"]

#: Exit status when a column reaches the ``--fail-on`` level.
EXIT_DRIFT = 1


def add_drift_parser(subparsers) -> argparse.ArgumentParser:
    """Declare ``infoscope drift`` and its options.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        The ``infoscope`` subcommands.

    Returns
    -------
    argparse.ArgumentParser

    References
    ----------
    .. [1] Python documentation, ``argparse`` (sub-commands).

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
    p.add_argument("current", metavar="CURRENT", help="the batch to check (CSV, TSV or Parquet)")
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
    p.set_defaults(handler=cmd_drift)
    return p


def _format_rows(report) -> str:
    from infoscope.cli import format_table

    t = report.columns[["column", "kind", "k", "n", "psi", "psi_chance_high", "q_value",
                        "new_share", "flag"]].rename(columns={"psi_chance_high": "chance_95"})
    return format_table(t, max_width=32)


def cmd_drift(args: argparse.Namespace, out=None) -> int:
    """Run ``infoscope drift REFERENCE CURRENT``.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options (``reference``, ``current``, ``out``, ``json_path``,
        ``fail_on``, ``pairs``, ``bins``, ``n_perm``, ``seed``).
    out : file-like, optional
        Where to print (default ``sys.stdout``).

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
    >>> from infoscope.cli import main
    >>> main(["drift", "train.csv", "today.csv", "--fail-on", "major"])  # doctest: +SKIP
    0
    """
    from pathlib import Path

    from infoscope._warnings import InfoscopeWarning
    from infoscope.cli import CAUTION, CommandError, _section, read_table
    from infoscope.frame.session import ProfileSession

    out = sys.stdout if out is None else out
    if args.bins < 1:
        raise CommandError(f"--bins must be >= 1, got {args.bins}")
    if args.n_perm < 1:
        raise CommandError(f"--n-perm must be >= 1, got {args.n_perm}")
    if args.seed < 0:
        raise CommandError(f"--seed must be >= 0, got {args.seed}")
    for option, path in (("--out", args.out), ("--json", args.json_path)):
        if path and path != "-" and not Path(path).resolve().parent.is_dir():
            raise CommandError(f"{option} {path!r}: the folder does not exist")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", InfoscopeWarning)
        reference = read_table(args.reference)
        current = read_table(args.current)
        try:
            session = ProfileSession(current, bins=args.bins, seed=args.seed, n_boot=100)
            report = session.drift_report(reference, pairs=args.pairs, n_perm=args.n_perm,
                                          reference_name=str(args.reference),
                                          current_name=str(args.current))
        except (ValueError, TypeError, KeyError) as exc:
            raise CommandError(str(exc).strip().splitlines()[0]) from None
    to_stdout = args.json_path == "-"
    show = sys.stderr if to_stdout else out
    print(f"infoscope drift: {args.current} ({report.current_rows} rows) against {args.reference} "
          f"({report.reference_rows} rows); {len(report.columns)} common column(s).", file=show)
    for flag_list, words in ((report.missing_columns, "only in the reference"),
                             (report.extra_columns, "only in the batch")):
        if flag_list:
            print(f"{words}: " + ", ".join(map(repr, flag_list)), file=show)
    _section("drift per column (psi and chance_95 in nats: chance_95 is the PSI that sampling alone "
             "stays under 95 % of the time at these sizes; flag needs q < 0.05 and PSI beyond chance "
             ">= 0.10 moderate / 0.25 major, common practice)", _format_rows(report), show)
    if report.pairs is not None:
        from infoscope.cli import format_table

        moved = report.pairs[report.pairs["flag"].isin(["stronger", "weaker"])]
        body = format_table(moved[["a", "b", "mi_reference", "mi", "change", "ci_low", "ci_high",
                                   "q_value", "flag"]]) if len(moved) else "no pair changed beyond chance"
        _section(f"pairs whose dependence changed (MI in {report.units.get('kl', 'bits')})", body, show)
    notes = sorted({str(w.message) for w in caught})
    if notes:
        _section("notes on the data", "\n".join(f"- {m}" for m in notes), show)
    if args.json_path:
        text = report.to_json()
        if to_stdout:
            print(text, file=out)
        else:
            Path(args.json_path).write_text(text + "\n", encoding="utf-8")
            print(f"wrote {args.json_path}", file=show)
    if args.out:
        from infoscope.report.drift_page import drift_page

        Path(args.out).write_text(drift_page(report), encoding="utf-8")
        print(f"wrote {args.out}", file=show)
    print(f"\n{CAUTION}", file=show)
    if args.fail_on:
        hit = report.reaching(args.fail_on)
        if hit:
            print(f"drift at or above {args.fail_on!r} in: " + ", ".join(map(repr, hit)), file=show)
            return EXIT_DRIFT
    return 0
