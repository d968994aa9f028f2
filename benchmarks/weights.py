"""Calibration of the pair tests of a weighted profile (``ProfileSession(frame, weights="w")``).

Run ``python benchmarks/weights.py`` (a few minutes on two cores; ``--reps`` frames per
row).  Each frame has six independent columns (three numeric, three with five uneven
levels) and a weight column: lognormal(0, sigma) weights independent of the data, or
``exp(sigma * x0)`` (weights that depend on one column).  Every pair is null, so the
share of pairs with p < 0.05 should be at most 5% within simulation error; printed with
its 95% Clopper-Pearson interval and the mean Kish effective sample size.

Nothing is asserted here: ``tests/test_weights.py`` checks the same at a smaller scale.
"""
from __future__ import annotations

import argparse
import sys
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
from scipy import stats

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import machine_note  # noqa: E402

import infoscope  # noqa: E402,F401
from infoscope.frame.session import ProfileSession  # noqa: E402


def frame(rng, n, sigma, informative) -> pd.DataFrame:
    cols = {f"x{j}": rng.normal(size=n) for j in range(3)}
    for j in range(3):
        cols[f"c{j}"] = rng.choice(list("abcde"), size=n, p=[0.4, 0.3, 0.15, 0.1, 0.05])
    cols["w"] = np.exp(sigma * cols["x0"]) if informative else rng.lognormal(0.0, sigma, n)
    return pd.DataFrame(cols)


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--reps", type=int, default=20)
    args = parser.parse_args(argv)
    print(machine_note())
    print("| weights | n | sigma | mean n_eff | pairs with p < 0.05 |")
    print("|---|---|---|---|---|")
    warnings.simplefilter("ignore")
    for informative in (False, True):
        for n in (200, 1_000, 5_000):
            for sigma in (0.5, 1.0, 1.5):
                rng = np.random.default_rng(n + int(sigma * 10) + 7 * informative)
                hits = total = 0
                n_eff = []
                for r in range(args.reps):
                    s = ProfileSession(frame(rng, n, sigma, informative), weights="w", n_boot=0, seed=r)
                    p = s.pairs()
                    hits += int((p["p_value"] < 0.05).sum())
                    total += len(p)
                    n_eff.append(p.attrs["n_effective"])
                low = stats.beta.ppf(0.025, hits, total - hits + 1) if hits else 0.0
                high = stats.beta.ppf(0.975, hits + 1, total - hits)
                kind = "exp(sigma x0)" if informative else "lognormal"
                print(f"| {kind} | {n:,} | {sigma} | {np.mean(n_eff):,.0f} | {hits / total:.1%} "
                      f"[{low:.1%}, {high:.1%}] |", flush=True)


if __name__ == "__main__":
    main()
