"""Calibration of ``df.info_profile.conditional(x, y, given=...)``: the test and its interval.

Run ``python benchmarks/conditional.py`` (about ten minutes on two cores) or with
``--reps 100`` for a quicker, noisier look.

Sections
--------
* null — X and Y both driven by Z and by nothing else (X and Y dependent, X ⊥ Y | Z),
  at n = 50, 200, 1,000 and 5,000 rows and three shapes (binary, multi-level, and a
  sparse 8 x 8 x 10 table), through the frame path at the default settings
  (999 shuffles within strata): the share of rows with p < 0.05 and p < 0.01, and
  the share whose 95% interval excludes 0 (which, by the interval's rule, is the
  share with p < 0.025).  Each rate with its 95% Clopper-Pearson interval.
* coverage — tables drawn from distributions of known I(X;Y|Z) (computed exactly by
  enumeration): the share of 95% intervals of ``cmi_above_chance`` holding it.

Nothing is asserted here: ``tests/test_conditional.py`` checks the same at a smaller
scale with binomial tolerances.
"""
from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

import numpy as np
import pandas as pd
from scipy import stats

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import machine_note  # noqa: E402

import infoscope  # noqa: E402,F401  (registers df.info_profile)
from infoscope.estimators.conditional import cmi_interval_from_table  # noqa: E402

SIZES = (50, 200, 1_000, 5_000)
SHAPES = ((2, 2, 2), (4, 3, 6), (8, 8, 10))


def clopper_pearson(hits: int, n: int) -> tuple[float, float]:
    low = stats.beta.ppf(0.025, hits, n - hits + 1) if hits else 0.0
    high = stats.beta.ppf(0.975, hits + 1, n - hits) if hits < n else 1.0
    return float(low), float(high)


def rate(hits: int, n: int) -> str:
    low, high = clopper_pearson(hits, n)
    return f"{hits / n:.1%} [{low:.1%}, {high:.1%}]"


def null_frame(rng, n, kx, ky, kz) -> pd.DataFrame:
    z = rng.integers(0, kz, n)
    x = np.where(rng.random(n) < 0.6, z % kx, rng.integers(0, kx, n))
    y = np.where(rng.random(n) < 0.6, (z * 7) % ky, rng.integers(0, ky, n))
    return pd.DataFrame({"x": x.astype(str), "y": y.astype(str), "z": z.astype(str)})


def section_null(reps: int) -> None:
    print("| n | table | p < 0.05 | p < 0.01 | interval excludes 0 |")
    print("|---|---|---|---|---|")
    for n in SIZES:
        for shape in SHAPES:
            rng = np.random.default_rng(n * 100 + sum(shape))
            p05 = p01 = excl = 0
            for i in range(reps):
                row = null_frame(rng, n, *shape).info_profile.conditional(
                    "x", "y", given="z", n_boot=0, seed=i).iloc[0]
                p05 += row["p_value"] < 0.05
                p01 += row["p_value"] < 0.01
                excl += row["ci_low"] > 0
            print(f"| {n:,} | {'x'.join(map(str, shape))} | {rate(p05, reps)} | {rate(p01, reps)} | "
                  f"{rate(excl, reps)} |", flush=True)


def known_cmi(kx, ky, kz, flip, copy, rng):
    pz = rng.dirichlet(np.full(kz, 4.0))
    p = np.zeros((kx, ky, kz))
    for zz in range(kz):
        px = np.full(kx, flip / kx)
        px[zz % kx] += 1 - flip
        py = np.full((kx, ky), (1 - copy) / ky)
        for xx in range(kx):
            py[xx, xx % ky] += copy
        p[:, :, zz] = pz[zz] * px[:, None] * py
    pxz, pyz, pzz = p.sum(axis=1), p.sum(axis=0), p.sum(axis=(0, 1))
    true = sum(p[i, j, k] * math.log2(p[i, j, k] * pzz[k] / (pxz[i, k] * pyz[j, k]))
               for i in range(kx) for j in range(ky) for k in range(kz) if p[i, j, k] > 0)
    return p, true


def section_coverage(reps: int) -> None:
    print("| n | table | true CMI (bits) | coverage | mean width (bits) |")
    print("|---|---|---|---|---|")
    for n in (200, 1_000, 5_000):
        for shape, copy in (((2, 2, 2), 0.0), ((2, 2, 2), 0.3), ((4, 3, 6), 0.15), ((8, 8, 10), 0.3)):
            rng = np.random.default_rng(n + int(copy * 100))
            p, true = known_cmi(*shape, 0.3, copy, rng)
            hits, width = 0, 0.0
            for _ in range(reps):
                t = rng.multinomial(n, p.ravel()).reshape(shape)
                r = cmi_interval_from_table(t)
                hits += r.low <= true <= r.high
                width += r.high - r.low
            print(f"| {n:,} | {'x'.join(map(str, shape))} | {true:.4f} | {rate(hits, reps)} | "
                  f"{width / reps:.4f} |", flush=True)


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--reps", type=int, default=400)
    parser.add_argument("--section", choices=("null", "coverage"), default=None)
    args = parser.parse_args(argv)
    print(machine_note())
    if args.section in (None, "null"):
        section_null(args.reps)
    if args.section in (None, "coverage"):
        section_coverage(args.reps)


if __name__ == "__main__":
    main()
