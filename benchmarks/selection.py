"""Speed of ``df.info_profile.select(target)``: the step tests against a direct computation.

Run ``python benchmarks/selection.py`` (a few minutes on two cores; ``--rows`` and
``--shuffles`` change the frame and the shuffles per step).  The file is not called
``select.py``: that name would hide the standard library's ``select`` module from
the scripts of this folder.

On the demo log (``make_deliveries``, 17 columns, target ``late``) it times, for each
method (mrmr, jmi, cmim):

* ``select_table`` as the library runs it (compiled counting of the shuffled tables,
  ``infoscope.engine.strata``), from an empty cache;
* the same with numpy's ``bincount`` counting (``frame.selection._BACKEND = "numpy"``,
  the path used until numba's kernels are loaded), checked to give the same table;
* the same call again (the session's cache: what a view pays when its method control
  goes back);
* the baseline: a direct per-step computation written here for the same steps (the
  columns the library chose, in its order) and the same number of shuffles: for each
  step and each shuffle, the target permuted within every stratum of the chosen
  columns (one ``Generator.permutation`` per stratum), each remaining candidate's
  three-way table counted with ``numpy.unique`` and ``numpy.bincount`` and scored by
  its conditional G-test's chi-square tail, the maximum kept.  It is timed on
  ``--direct-shuffles`` shuffles per step and scaled to the library's number (its
  cost is linear in the shuffles); it never stops early, the library stops a step
  once it cannot be significant (Besag & Clifford 1991), which is part of the ratio.

Printed: each time and the ratio of the baseline to the library, measured in the same
run (the machine is shared: compare the ratios).
"""
from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
from scipy import stats

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _common import machine_note  # noqa: E402

import infoscope  # noqa: E402,F401  (registers df.info_profile)
from infoscope.datasets import make_deliveries  # noqa: E402
from infoscope.engine.counting import numba_ready  # noqa: E402
from infoscope.frame import selection  # noqa: E402


def _conditional_g_tail(x, y, z) -> float:
    """-log chi-square tail of the conditional G of integer codes (plug-in), directly."""
    _, xi = np.unique(x, return_inverse=True)
    _, yi = np.unique(y, return_inverse=True)
    _, zi = np.unique(z, return_inverse=True)
    kx, ky, kz = xi.max() + 1, yi.max() + 1, zi.max() + 1
    t = np.bincount((xi * ky + yi) * kz + zi, minlength=kx * ky * kz).reshape(kx, ky, kz).astype(float)
    g, dof = 0.0, 0
    for s in range(kz):
        ts = t[:, :, s]
        n = ts.sum()
        if n == 0:
            continue
        e = ts.sum(axis=1, keepdims=True) * ts.sum(axis=0, keepdims=True) / n
        nz = ts > 0
        g += 2.0 * float((ts[nz] * np.log(ts[nz] / e[nz])).sum())
        dof += max(int((ts.sum(axis=1) > 0).sum()) - 1, 0) * max(int((ts.sum(axis=0) > 0).sum()) - 1, 0)
    return float(-stats.chi2.logsf(g, dof)) if dof > 0 else 0.0


def direct_steps(session, target: str, chosen: list[str], candidates: list[str], shuffles: int, seed: int = 0) -> float:
    """Seconds of the direct per-step max-statistic test for the steps ``chosen``."""
    rng = np.random.default_rng(seed)
    codes = {c: np.asarray(session.column(c).codes).astype(np.int64) for c in [*candidates, target]}
    present = {c: codes[c] < session.column(c).k for c in codes}
    start = time.perf_counter()
    for i, best in enumerate(chosen):
        before = chosen[:i]
        keep = present[target].copy()
        for c in before:
            keep &= present[c]
        z = np.zeros(int(keep.sum()), dtype=np.int64)
        for c in before:
            z = z * (codes[c].max() + 1) + codes[c][keep]
        y = codes[target][keep]
        strata = [np.flatnonzero(z == s) for s in np.unique(z)]
        remaining = [c for c in candidates if c not in before]
        for _ in range(shuffles):
            ys = y.copy()
            for rows in strata:
                ys[rows] = ys[rng.permutation(rows)]
            top = 0.0
            for c in remaining:
                m = present[c][keep]
                top = max(top, _conditional_g_tail(codes[c][keep][m], ys[m], z[m]))
    return time.perf_counter() - start


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rows", type=int, default=20_000)
    parser.add_argument("--shuffles", type=int, default=199)
    parser.add_argument("--direct-shuffles", type=int, default=20)
    args = parser.parse_args(argv)
    print(machine_note())
    numba_ready(wait=True)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        df = make_deliveries(n=args.rows, seed=0)
        session = df.info_profile.session(target="late")
        session.pairs()
    print(f"make_deliveries({args.rows:,}) x {df.shape[1]} columns, target 'late', {args.shuffles} shuffles per step")
    print(f"(direct per-step: {min(args.direct_shuffles, args.shuffles)} shuffles per step timed, scaled)")
    print("| method | steps | library | numpy counting | cached again | direct per-step | direct / library |")
    print("|---|---|---|---|---|---|---|")
    for method in ("mrmr", "jmi", "cmim"):
        times = {}
        tables = {}
        for backend in ("numba", "numpy"):
            selection._BACKEND = "auto" if backend == "numba" else "numpy"
            session._selection_cache.clear()
            start = time.perf_counter()
            tables[backend] = selection.select_table(session, "late", method=method, n_permutations=args.shuffles)
            times[backend] = time.perf_counter() - start
        selection._BACKEND = "auto"
        pd.testing.assert_frame_equal(tables["numba"], tables["numpy"])
        start = time.perf_counter()
        selection.select_table(session, "late", method=method, n_permutations=args.shuffles)
        cached = time.perf_counter() - start
        table = tables["numba"]
        steps = table.loc[table["step"].notna(), "column"].tolist()
        left_out = set(table.loc[table["step"].isna(), "column"])
        candidates = [c for c in session.names if c != "late" and c not in left_out]
        timed = min(args.direct_shuffles, args.shuffles)
        direct = direct_steps(session, "late", steps, candidates, timed) * args.shuffles / timed
        print(f"| {method} | {len(steps)} | {times['numba']:.2f} s | {times['numpy']:.2f} s | "
              f"{cached * 1e3:.1f} ms | {direct:.1f} s | {direct / times['numba']:.0f}x |", flush=True)


if __name__ == "__main__":
    main()
