"""Speed guards that used to be timed assertions in the tests, as ratios against baselines.

Tests assert what is computed, never how fast (a loaded machine made them fail).
The speed claims they carried are measured here instead, each against a baseline
timed in the same run (interleaved, best of a few rounds, ``_common.interleaved_best``),
and printed with the target the old test asserted:

1. bootstrap interval of a 50,000-cell ID-like column: every estimator against the
   plug-in (target: at most 2x; the counts-of-counts kernels make the scoring cheap);
2. the grouped draw of those 50,000 singletons (200 replicates) against numpy's
   multinomial draw of the same cells (target: at most 1/2 of it);
3. ``content_key`` of a 1,000-row slice of a 1,000,000-row arrow string column
   against ``pandas.util.hash_pandas_object`` of the slice (target: at most 20x);
4. encoding 1,000,000 floats into 16 quantile bins against ``numpy.sort`` of them
   (the old bound was one second; the ratio says how far above a sort it is);
5. encoding a 300,000-level arrow string ID column against ``pandas.factorize`` of it
   (target: at most 12x; a per-level Python loop costs several times more);
6. the static SVG picture of the 50,000-row demo profile against building that
   profile's session (encoding its columns; the old bound was 1.5 s);
7. KSG mutual information of 100,000 Gaussian points against ``numpy.sort`` of
   them (the old bound was 20 s: it fails an O(n^2) neighbour search).

Usage::

    python benchmarks/speed_guards.py [--repeat 3]
"""
from __future__ import annotations

import argparse

import numpy as np
import pandas as pd

from _common import interleaved_best, machine_note


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args(argv)

    from infoscope.encode.cache import content_key
    from infoscope.encode.columns import encode_column
    from infoscope.estimators.entropy import ENTROPY_ESTIMATORS
    from infoscope.estimators.resampling import bootstrap_entropy_ci

    print(machine_note())
    ids = np.ones(50_000, np.int64)
    tasks = {name: (lambda name=name: bootstrap_entropy_ci(ids, estimator=name, n_boot=100, seed=14))
             for name in ENTROPY_ESTIMATORS if name != "nsb"}
    best, _ = interleaved_best(args.repeat, tasks)
    print("\n1. bootstrap of a 50,000-cell ID column (100 replicates), each estimator / plugin (target <= 2x)")
    for name, seconds in best.items():
        print(f"   {name:14s} {seconds:7.3f} s  {seconds / best['plugin']:5.2f}x")

    rng = np.random.default_rng(12)
    best, _ = interleaved_best(args.repeat, {
        "multinomial": lambda: rng.multinomial(50_000, ids / 50_000, size=200),
        "grouped": lambda: bootstrap_entropy_ci(ids, n_boot=200, seed=13),
    })
    print("\n2. 200 replicates of 50,000 singletons: grouped interval / numpy multinomial draw (target <= 0.5)")
    print(f"   {best['grouped']:.3f} s / {best['multinomial']:.3f} s = {best['grouped'] / best['multinomial']:.3f}")

    parent = pd.Series([f"user-{i}" for i in range(1_000_000)], dtype="string[pyarrow]")
    head = parent.iloc[1000:2000]
    best, _ = interleaved_best(args.repeat, {
        "hash_pandas_object": lambda: pd.util.hash_pandas_object(head, index=False),
        "content_key": lambda: content_key(head),
    })
    print("\n3. key of a 1,000-row slice of a 1,000,000-row arrow column / pandas hash of the slice (target <= 20x)")
    print(f"   {best['content_key'] * 1e3:.2f} ms / {best['hash_pandas_object'] * 1e3:.2f} ms = "
          f"{best['content_key'] / best['hash_pandas_object']:.1f}x")

    x = np.random.default_rng(0).normal(size=1_000_000)
    best, _ = interleaved_best(args.repeat, {
        "sort": lambda: np.sort(x),
        "encode": lambda: encode_column(x, name="x", bins=16, cache=False),
    })
    print("\n4. encode 1,000,000 floats into 16 quantile bins / numpy.sort of them")
    print(f"   {best['encode'] * 1e3:.1f} ms / {best['sort'] * 1e3:.1f} ms = {best['encode'] / best['sort']:.2f}x")

    import warnings

    from infoscope.datasets import make_deliveries
    from infoscope.estimators.continuous import ksg_mutual_information
    from infoscope.frame.session import ProfileSession
    from infoscope.report import picture

    ids = pd.Series([f"row-{i}" for i in range(300_000)], dtype="string[pyarrow]")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        best, _ = interleaved_best(args.repeat, {
            "factorize": lambda: pd.factorize(ids),
            "encode": lambda: encode_column(ids, name="id", cache=False),
        })
    print("\n5. encode a 300,000-level arrow string ID column / pandas.factorize of it (target <= 12x)")
    print(f"   {best['encode'] * 1e3:.1f} ms / {best['factorize'] * 1e3:.1f} ms = "
          f"{best['encode'] / best['factorize']:.2f}x")

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        demo = make_deliveries(50_000, seed=0)
        session = ProfileSession(demo, target="late", n_boot=0)
        session.entropy(), session.matrix(order="cluster"), session.relevance("late")
        best, _ = interleaved_best(args.repeat, {
            "session": lambda: ProfileSession(demo, target="late", n_boot=0),
            "picture": lambda: picture.profile_svg(session),
        })
    print("\n6. static picture of the 50,000-row demo profile / building its session")
    print(f"   {best['picture'] * 1e3:.1f} ms / {best['session'] * 1e3:.1f} ms = "
          f"{best['picture'] / best['session']:.2f}x")

    g = np.random.default_rng(3)
    a = g.normal(size=100_000)
    b = 0.5 * a + np.sqrt(0.75) * g.normal(size=100_000)
    best, _ = interleaved_best(1, {
        "sort": lambda: np.sort(a),
        "ksg": lambda: ksg_mutual_information(a, b),
    })
    print("\n7. KSG mutual information of 100,000 Gaussian points / numpy.sort of them")
    print(f"   {best['ksg']:.2f} s / {best['sort'] * 1e3:.2f} ms = {best['ksg'] / best['sort']:.0f}x")


if __name__ == "__main__":
    main()
