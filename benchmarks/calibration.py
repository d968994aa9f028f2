"""Calibration benchmark: are the profile's findings honest at every sample size?

Run ``python benchmarks/calibration.py`` (every section, a few minutes on two cores)
or ``python benchmarks/calibration.py --frames 40`` for a quicker, noisier look;
``--section null`` (or ``power``, ``wine``, ``coverage``, ``rule``) runs one section.

Sections
--------
* ``null`` — frames of independent columns (numeric, categorical, and mixed) at
  n = 100, 300, 1,000 and 5,000 rows, profiled at the default settings through
  ``df.info_profile.pairs()``: the share of pairs with p < 0.05 and the share of
  seeded frames with any q < 0.05.  Both should be at or below 5% within simulation
  error; each rate is printed with its 95% Clopper-Pearson interval.
* ``power`` — the same numeric frames at n = 1,000 with one planted Gaussian pair of
  known mutual information (0.05, 0.07 and 0.1 bits, the continuous MI
  ``-log2(1 - rho**2) / 2``): the share of frames where the planted pair has
  q < 0.05 (target: at least 90% around 0.07 bits).
* ``wine`` — scikit-learn's bundled wine data (178 rows, 14 columns with the class),
  every column shuffled independently (so that nothing is related): the same two
  rates as ``null``.
* ``coverage`` — the 95% intervals of the pair table (``ci_low``, ``ci_high`` of
  ``pairs()``, :mod:`infoscope.estimators.intervals`) on tables of known mutual
  information: a bivariate normal with correlation rho cut at its own quantiles
  into b x b cells (the cell probabilities from ``scipy.stats.multivariate_normal``,
  so the MI of the table is known exactly), b = the default rule's bins at each n
  (3, 5, 10, 16) and also 16 x 16 at n = 100 and 300 (what ``bins=16`` gives);
  each frame holds four such pairs as integer columns, profiled at the defaults, so
  the intervals are exactly the profile's (chi-square or permutation reference,
  whichever the row's test used).  Printed: the share of intervals that hold the
  true MI with its Clopper-Pearson interval, the mean width, and how often the
  lower end was above 0 (the test's rejections at 2.5%).
* ``rule`` — the simulation behind the chi-square rule of
  :mod:`infoscope.estimators.significance`: null tables with fixed margins
  (``scipy.stats.random_table``) of several shapes, margins and rows per cell; the
  rejection rate of the Williams-corrected G-test over its nominal level.

Nothing is asserted here: the CI tests (``tests/test_calibration.py``) check the same
properties at a smaller scale with tolerances from the binomial distribution.
"""
from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
from scipy import special, stats

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import machine_note  # noqa: E402

import infoscope  # noqa: E402,F401  (registers df.info_profile)

SIZES = (100, 300, 1_000, 5_000)
KINDS = ("numeric", "categorical", "mixed")
COLUMNS = 8  # 28 pairs per frame


# ----------------------------------------------------------------------- frames
def _categorical(rng, n: int, j: int) -> pd.Series:
    k = 3 + (5 * j) % 10  # 3 .. 12 levels
    p = rng.dirichlet(np.full(k, 1.5))
    return pd.Series(pd.Categorical.from_codes(rng.choice(k, size=n, p=p),
                                               categories=[f"level{i}" for i in range(k)]))


def null_frame(kind: str, n: int, seed: int, columns: int = COLUMNS) -> pd.DataFrame:
    """Independent columns: numeric (normal, log-normal, uniform, counts), categorical, or half each."""
    rng = np.random.default_rng(seed)
    data = {}
    for j in range(columns):
        numeric = kind == "numeric" or (kind == "mixed" and j % 2 == 0)
        if numeric:
            shape = j % 4
            if shape == 0:
                x = rng.normal(size=n)
            elif shape == 1:
                x = rng.lognormal(size=n)
            elif shape == 2:
                x = rng.uniform(size=n)
            else:
                x = rng.poisson(20, size=n).astype(float) + rng.uniform(0, 1e-3, size=n)
            data[f"x{j}"] = x
        else:
            data[f"c{j}"] = _categorical(rng, n, j)
    return pd.DataFrame(data)


def planted_frame(n: int, mi_bits: float, seed: int, columns: int = COLUMNS) -> pd.DataFrame:
    """Independent normal columns, except that x0 and x1 share ``mi_bits`` of (continuous) MI."""
    rng = np.random.default_rng(seed)
    rho = np.sqrt(1.0 - 2.0 ** (-2.0 * mi_bits))
    x = rng.normal(size=(columns, n))
    x[1] = rho * x[0] + np.sqrt(1.0 - rho ** 2) * x[1]
    return pd.DataFrame({f"x{j}": x[j] for j in range(columns)})


def shuffled_wine(seed: int) -> pd.DataFrame:
    """scikit-learn's bundled wine data, each column shuffled on its own."""
    from sklearn.datasets import load_wine

    wine = load_wine(as_frame=True).frame
    rng = np.random.default_rng(seed)
    return pd.DataFrame({c: rng.permutation(wine[c].to_numpy()) for c in wine.columns})


# ----------------------------------------------------------------------- rates
def clopper_pearson(k: int, n: int, level: float = 0.95) -> tuple[float, float]:
    """Exact binomial interval of a rate k / n (Clopper & Pearson 1934)."""
    a = (1 - level) / 2
    lo = stats.beta.ppf(a, k, n - k + 1) if k > 0 else 0.0
    hi = stats.beta.ppf(1 - a, k + 1, n - k) if k < n else 1.0
    return float(lo), float(hi)


#: Settings passed to every ``pairs()`` call (empty: the defaults); ``--bins`` sets one.
SETTINGS: dict = {}


def _pairs(frame: pd.DataFrame) -> pd.DataFrame:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # small-sample warnings are the point here
        return frame.info_profile.pairs(**SETTINGS)


def null_rates(make, frames: int) -> dict:
    """Share of pairs at p < 0.05 and of frames with any q < 0.05 over ``frames`` seeds."""
    tests = hits = frames_hit = 0
    methods: dict[str, int] = {}
    perms = []
    start = time.perf_counter()
    for seed in range(frames):
        table = _pairs(make(seed))
        p = table["p_value"].to_numpy(dtype=float)
        ok = np.isfinite(p)
        tests += int(ok.sum())
        hits += int((p[ok] < 0.05).sum())
        frames_hit += bool((table["q_value"] < 0.05).any())
        for mth, count in table["p_method"].value_counts().items():
            methods[str(mth)] = methods.get(str(mth), 0) + int(count)
        perms.extend(table.loc[table["p_method"] == "permutation", "n_permutations"].tolist())
    return {"pairs": tests, "p_hits": hits, "frames": frames, "frames_hit": frames_hit,
            "methods": methods, "mean_perms": float(np.mean(perms)) if perms else 0.0,
            "seconds_per_frame": (time.perf_counter() - start) / frames}


def power_rates(n: int, mi_bits: float, frames: int) -> dict:
    """Share of frames whose planted pair (x0, x1) has q < 0.05."""
    found = 0
    for seed in range(frames):
        table = _pairs(planted_frame(n, mi_bits, 10_000 + seed))
        row = table[(table["a"] == "x0") & (table["b"] == "x1")]
        found += bool(row["q_value"].iloc[0] < 0.05)
    return {"frames": frames, "found": found}


def _rate(k: int, n: int) -> str:
    lo, hi = clopper_pearson(k, n)
    return f"{100 * k / n:.1f}% [{100 * lo:.1f}, {100 * hi:.1f}]"


def section_null(frames: int, kinds=KINDS) -> None:
    print("\n## Independent columns at the defaults: share of p < 0.05 (pairs) and of frames with any q < 0.05")
    print(f"({COLUMNS} columns = {COLUMNS * (COLUMNS - 1) // 2} pairs per frame, {frames} seeded frames; "
          "95% Clopper-Pearson intervals)\n")
    print("| frame | n | pairs with p < 0.05 | frames with any q < 0.05 | tests used | mean shuffles | s / frame |")
    print("|---|---|---|---|---|---|---|")
    for kind in kinds:
        for n in SIZES:
            r = null_rates(lambda seed, kind=kind, n=n: null_frame(kind, n, seed), frames)
            used = ", ".join(f"{k} {v}" for k, v in sorted(r["methods"].items()))
            print(f"| {kind} | {n:,} | {_rate(r['p_hits'], r['pairs'])} | {_rate(r['frames_hit'], r['frames'])} "
                  f"| {used} | {r['mean_perms']:.0f} | {r['seconds_per_frame']:.2f} |", flush=True)


def section_power(frames: int) -> None:
    print("\n## Power: one planted Gaussian pair among independent columns, n = 1,000, found at q < 0.05\n")
    print("| planted MI (bits) | frames where the pair is found |")
    print("|---|---|")
    for mi_bits in (0.05, 0.07, 0.1):
        r = power_rates(1_000, mi_bits, frames)
        print(f"| {mi_bits} | {_rate(r['found'], r['frames'])} |", flush=True)


def section_wine(frames: int) -> None:
    print("\n## scikit-learn's wine data, every column shuffled on its own (178 rows, 14 columns)\n")
    r = null_rates(shuffled_wine, frames)
    print("| pairs with p < 0.05 | shuffles with any q < 0.05 | tests used |")
    print("|---|---|---|")
    used = ", ".join(f"{k} {v}" for k, v in sorted(r["methods"].items()))
    print(f"| {_rate(r['p_hits'], r['pairs'])} | {_rate(r['frames_hit'], r['frames'])} | {used} |")


def _g(tables: np.ndarray) -> np.ndarray:
    n = tables.sum(axis=(1, 2))
    rows, cols = tables.sum(axis=2), tables.sum(axis=1)
    return 2 * (special.xlogy(tables, tables).sum(axis=(1, 2)) - special.xlogy(rows, rows).sum(axis=1)
                - special.xlogy(cols, cols).sum(axis=1) + special.xlogy(n, n))


def section_rule(reps: int) -> None:
    from infoscope.estimators.significance import williams_correction

    print("\n## The chi-square rule: Williams-corrected G-test on null tables, rejection rate / nominal level\n")
    print("| table | margins | rows per cell | at 0.05 | at 0.01 | at 0.001 |")
    print("|---|---|---|---|---|---|")
    rng = np.random.default_rng(2)
    for r, c in ((8, 8), (16, 16), (3, 40), (16, 64)):
        for margins, conc in (("uniform", None), ("uneven", 5.0), ("skewed", 0.7)):
            for mean in (5, 10, 20):
                n = mean * r * c
                pr = np.full(r, 1 / r) if conc is None else rng.dirichlet(np.full(r, conc))
                pc = np.full(c, 1 / c) if conc is None else rng.dirichlet(np.full(c, conc))
                rows, cols = rng.multinomial(n, pr), rng.multinomial(n, pc)
                rows, cols = rows[rows > 0], cols[cols > 0]
                tables = stats.random_table(rows, cols, seed=rng).rvs(reps).astype(float)
                dof = (rows.size - 1) * (cols.size - 1)
                p = stats.chi2.sf(_g(tables) / williams_correction(rows, cols), dof)
                ratios = " | ".join(f"{np.mean(p < a) / a:.2f}" for a in (0.05, 0.01, 0.001))
                print(f"| {r} x {c} | {margins} | {mean} | {ratios} |", flush=True)


def gaussian_cells(rho: float, bins: int) -> np.ndarray:
    """Cell probabilities of a bivariate normal (correlation rho) cut at its own quantiles."""
    q = stats.norm.ppf(np.linspace(0, 1, bins + 1))
    q[0], q[-1] = -9.0, 9.0
    mvn = stats.multivariate_normal([0.0, 0.0], [[1.0, rho], [rho, 1.0]])
    f = np.array([[mvn.cdf([a, b]) for b in q] for a in q])
    p = np.clip(f[1:, 1:] - f[:-1, 1:] - f[1:, :-1] + f[:-1, :-1], 0.0, None)
    return p / p.sum()


def cells_mi_bits(p: np.ndarray) -> float:
    """Mutual information (bits) of a table of cell probabilities (closed form)."""
    px, py = p.sum(axis=1, keepdims=True), p.sum(axis=0, keepdims=True)
    m = p > 0
    return max(float(np.sum(p[m] * np.log2(p[m] / (px @ py)[m]))), 0.0)


COVERAGE_PAIRS = 4  # planted pairs per frame


def coverage_table(n: int, bins: int, rho: float, frames: int, seed: int = 0) -> dict:
    """Coverage of the profile's 95% MI intervals on tables of known MI.

    Each frame holds ``COVERAGE_PAIRS`` independent pairs (x_j, y_j) of integer codes
    drawn from :func:`gaussian_cells`; ``pairs()`` at the default settings gives
    their intervals.  Returns the true MI (bits), the share covered, its
    Clopper-Pearson interval, the mean width, the share with ``ci_low > 0`` and the
    share of rows tested by permutation.
    """
    p = gaussian_cells(rho, bins)
    truth = cells_mi_bits(p)
    rng = np.random.default_rng(seed)
    covered = above = permuted = total = 0
    width = 0.0
    for _ in range(frames):
        cols = {}
        for j in range(COVERAGE_PAIRS):
            cell = rng.choice(p.size, size=n, p=p.ravel())
            cols[f"x{j}"], cols[f"y{j}"] = cell // bins, cell % bins
        table = _pairs(pd.DataFrame(cols)).set_index(["a", "b"])
        for j in range(COVERAGE_PAIRS):
            row = table.loc[(f"x{j}", f"y{j}")]
            if not np.isfinite(row["ci_low"]):
                continue
            total += 1
            covered += bool(row["ci_low"] - 1e-12 <= truth <= row["ci_high"] + 1e-12)
            above += bool(row["ci_low"] > 0)
            permuted += row["p_method"] == "permutation"
            width += float(row["ci_high"] - row["ci_low"])
    lo, hi = clopper_pearson(covered, total)
    return {"mi": truth, "coverage": covered / total, "low": lo, "high": hi, "width": width / total,
            "above_zero": above / total, "permuted": permuted / total, "n_intervals": total}


def section_coverage(frames: int) -> None:
    from infoscope.encode.binning import rows_bin_count

    print("\n## Coverage of the 95% MI intervals (pairs() at the defaults) on tables of known MI\n")
    print("| n | table | true MI (bits) | coverage (95% CI) | mean width (bits) | lower end > 0 | permutation |")
    print("|---|---|---|---|---|---|---|")
    conditions = [(n, rows_bin_count(n)) for n in SIZES] + [(100, 16), (300, 16)]
    for n, bins in conditions:
        for rho in (0.0, 0.2, 0.35, 0.6):
            r = coverage_table(n, bins, rho, frames, seed=int(n + 10 * bins + 100 * rho))
            print(f"| {n:,} | {bins} x {bins} | {r['mi']:.4f} | {r['coverage']:.1%} "
                  f"({r['low']:.1%}-{r['high']:.1%}) | {r['width']:.4f} | {r['above_zero']:.0%} | "
                  f"{r['permuted']:.0%} |", flush=True)


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--frames", type=int, default=200, help="seeded frames per condition")
    parser.add_argument("--section", choices=("all", "null", "power", "wine", "coverage", "rule"), default="all")
    parser.add_argument("--rule-reps", type=int, default=5_000, help="null tables per condition (rule)")
    parser.add_argument("--kinds", default=",".join(KINDS), help="frame kinds of the null section")
    parser.add_argument("--bins", default=None, help="a bins setting instead of the default (e.g. 16 or rows)")
    args = parser.parse_args(argv)
    if args.bins is not None:
        SETTINGS["bins"] = int(args.bins) if args.bins.isdigit() else args.bins
    shown = ", ".join(f"{k}={v!r}" for k, v in SETTINGS.items()) or "default settings"
    print(f"# infoscope calibration, {shown} ({machine_note()}; {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())})")
    start = time.perf_counter()
    if args.section in ("all", "null"):
        section_null(args.frames, tuple(k for k in args.kinds.split(",") if k))
    if args.section in ("all", "power"):
        section_power(args.frames)
    if args.section in ("all", "wine"):
        section_wine(args.frames)
    if args.section in ("all", "coverage"):
        section_coverage(args.frames)
    if args.section in ("all", "rule"):
        section_rule(args.rule_reps)
    print(f"\n({time.perf_counter() - start:.0f} s in all)")


if __name__ == "__main__":
    main()
