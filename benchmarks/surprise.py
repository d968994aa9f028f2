"""Surprising-rows benchmark: the Chow–Liu tree and every row's surprisal on a wide frame.

Run ``python benchmarks/surprise.py`` (1,000,000 rows x 50 columns) or
``python benchmarks/surprise.py --rows 100000 --cols 12`` for a quick look.

Figures are printed beside baselines measured in the same run (the machine is
shared): the encoding of the frame (what every profile pays first), and a plain
Python loop over rows that sums the same per-cell look-ups (a measured subset of
rows, scaled up).  Nothing is asserted except that the loop and the vectorised
scores agree on the rows both computed.
"""
from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import best_of, machine_note  # noqa: E402

from infoscope.datasets import make_wide  # noqa: E402
from infoscope.frame.session import ProfileSession  # noqa: E402
from infoscope.frame.tree import row_scores, surprising_rows_table, tree_table  # noqa: E402


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=1_000_000)
    parser.add_argument("--cols", type=int, default=50)
    parser.add_argument("--repeat", type=int, default=2)
    args = parser.parse_args(argv)
    print(machine_note())
    frame = make_wide(args.rows, args.cols, seed=0)
    t_encode, session = best_of(1, ProfileSession, frame)
    t_tables, _ = best_of(1, tree_table, session)            # counts every pair once (engine cache)
    t_scores, scores = best_of(args.repeat, row_scores, session, model="tree")
    t_top, _ = best_of(args.repeat, surprising_rows_table, session, 20)

    # baseline: one Python loop over rows summing the same look-ups (subset, scaled)
    engine, names = session.engine, scores.names
    lookups = []
    for j, name in enumerate(names):
        col = session.column(name)
        marginal = np.asarray(engine.marginal(name), float)
        own = np.append(-np.log2((marginal + 0.5) / (marginal.sum() + 0.5 * col.k)), 0.0)
        if scores.parent[j] < 0:
            lookups.append((None, own))
            continue
        pname = names[scores.parent[j]]
        t = np.asarray(engine.table(pname, name), float)
        table = np.zeros((session.column(pname).k + 1, col.k + 1))
        table[:-1, :-1] = -np.log2((t + 0.5) / (t.sum(axis=1, keepdims=True) + 0.5 * col.k))
        table[-1, :] = own
        lookups.append((scores.parent[j], table))
    subset = min(args.rows, 20_000)
    codes = [c.tolist() for c in scores.codes]

    def loop():
        out = []
        for r in range(subset):
            total = 0.0
            for j, (pj, table) in enumerate(lookups):
                total += table[codes[j][r]] if pj is None else table[codes[pj][r], codes[j][r]]
            out.append(total)
        return out

    start = time.perf_counter()
    looped = loop()
    t_loop = (time.perf_counter() - start) * args.rows / subset
    assert np.allclose(looped, scores.total[:subset], rtol=1e-5), "loop and vectorised scores differ"

    print(f"{args.rows:,} rows x {args.cols} columns")
    print(f"encode the frame (baseline)            {t_encode:7.2f} s")
    print(f"tree: all pair tables + MI + spanning  {t_tables:7.2f} s  ({t_tables / t_encode:.2f}x encoding)")
    print(f"row surprisal of every row (tree)      {t_scores:7.2f} s  ({t_scores / t_encode:.2f}x encoding)")
    print(f"top 20 rows with their cells           {t_top:7.2f} s  ({t_top / t_encode:.2f}x encoding)")
    print(f"python loop over rows (scaled)         {t_loop:7.2f} s  (vectorised is {t_loop / t_scores:.0f}x faster)")
    print(f"tree + scores after encoding           {t_tables + t_top:7.2f} s")


if __name__ == "__main__":
    main()
