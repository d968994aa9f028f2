"""Drift benchmark: drift over time in one pass against one drift check per period.

Run ``python benchmarks/drift.py`` (about a minute on two cores; ``--weeks`` and
``--rows`` change the size).  The log is the demo's (``infoscope.datasets``): the
reference period plus the drifted batch, cut into weeks of ``dispatched_at``.

Printed, all measured in the same run (the machine is shared, so compare ratios):

* ``drift_over`` — every (week, column) against the first week: one shared
  alphabet per column and one engine pass counting every (week x symbol) table;
* the baseline — the same comparisons as one ``drift()`` per week (each week's
  rows against the first week's, a fresh session each: the way one would do it
  without ``drift_over``);
* the ratio, and the columns flagged in the last weeks by both (they agree on
  the drifted columns).

Both spend most of their time on the chance level (999 random splits per
(week, column), more for small p-values), not on counting: the one pass saves the
per-week encoding and counting only, so the ratio stays near 1 on the demo log.
"""
from __future__ import annotations

import argparse
import time
import warnings

import pandas as pd

from infoscope._warnings import InfoscopeWarning
from infoscope.datasets import make_deliveries, make_deliveries_batch
from infoscope.frame.session import ProfileSession


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=60_000, help="rows of the reference log")
    parser.add_argument("--batch", type=int, default=12_000, help="rows of the drifted batch")
    args = parser.parse_args(argv)
    warnings.simplefilter("ignore", InfoscopeWarning)
    log = pd.concat([make_deliveries(args.rows, seed=0), make_deliveries_batch(args.batch, seed=1)],
                    ignore_index=True)
    columns = [c for c in log.columns if c != "dispatched_at"]
    ProfileSession(log.head(2_000)).drift(log.tail(2_000))  # load the kernels before timing

    start = time.perf_counter()
    over = ProfileSession(log).drift_over("dispatched_at", every="1W", reference="first")
    one_pass = time.perf_counter() - start

    week = log["dispatched_at"].dt.to_period("W")
    first = log.loc[week == week.min(), columns]
    start = time.perf_counter()
    flagged_loop = {}
    for period in sorted(week.unique())[1:]:
        rows = log.loc[week == period, columns]
        d = ProfileSession(rows).drift(first)
        flagged_loop[str(period)] = sorted(d.loc[d["flag"].isin(["moderate", "major"]), "column"])
    per_period = time.perf_counter() - start

    flagged_over = {p: sorted(g.loc[g["flag"].isin(["moderate", "major"]), "column"])
                    for p, g in over.groupby("period")}
    weeks = len(flagged_loop)
    print(f"log: {len(log):,} rows x {log.shape[1]} columns, {weeks} weeks after the first")
    print(f"drift_over (one pass):          {one_pass:6.2f} s")
    print(f"one drift() per week (baseline): {per_period:6.2f} s")
    print(f"ratio (per-week loop / drift_over): {per_period / one_pass:.2f}")
    last = sorted(flagged_over)[-3:]
    for p in last:
        print(f"  {p}: drift_over {flagged_over[p]}  per-week drift() {flagged_loop.get(p)}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
