"""Conditional mutual information with an interval and a within-strata permutation test.

Checks: the statistic against ``pyitlib`` (drv.information_mutual_conditional, plug-in
in bits), the estimate against a table built by ``pandas.crosstab``, and the
calibration of the p-value by simulating the null X ⊥ Y | Z (Z drives both X and Y,
so X and Y are dependent but conditionally independent) at several sample sizes and
column kinds: the false-positive rate must not exceed the nominal level beyond
Monte Carlo error (3 standard errors of a binomial proportion over the replicates).
The interval of ``cmi_above_chance`` follows the pair tables' rule: its chance level
is checked against scikit-learn's exact expected mutual information per stratum
(``sklearn.metrics.cluster._expected_mutual_info_fast.expected_mutual_information``)
and against the mean of the within-strata shuffles, its lower end against the
p-value on every simulated row (``ci_low > 0`` exactly when ``p < (1 - ci) / 2``), and
its coverage against distributions of known CMI (computed exactly by enumeration).
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from pyitlib import discrete_random_variable as drv

import infoscope  # noqa: F401  (registers the accessor)
from sklearn.metrics.cluster._expected_mutual_info_fast import expected_mutual_information

from infoscope.estimators.conditional import bootstrap_cmi_ci, cmi_interval_from_table, conditional_permutation_test
from infoscope.estimators.information import conditional_mutual_information_from_table
from infoscope.frame.conditional import CONDITIONAL_COLUMNS


def _null_sample(rng, n, kx, ky, kz):
    """X and Y both depend on Z, and on nothing else: X ⊥ Y | Z, yet X and Y are dependent."""
    z = rng.integers(0, kz, n)
    x = np.where(rng.random(n) < 0.6, z % kx, rng.integers(0, kx, n))
    y = np.where(rng.random(n) < 0.6, (z * 7) % ky, rng.integers(0, ky, n))
    return x, y, z


def test_statistic_is_the_plugin_cmi_of_pyitlib(rng):
    x, y, z = _null_sample(rng, 700, 3, 4, 5)
    y = np.where(rng.random(700) < 0.3, x, y)  # some conditional dependence too
    res = conditional_permutation_test(x, y, z, n_permutations=49, seed=1)
    # pyitlib drv.information_mutual_conditional(X, Y, Z): plug-in I(X;Y|Z) in bits
    assert res.statistic == pytest.approx(drv.information_mutual_conditional(x, y, z), abs=1e-10)
    assert res.p_value == pytest.approx(1 / 50)


def test_codes_need_not_be_compact(rng):
    x, y, z = _null_sample(rng, 300, 3, 3, 4)
    a = conditional_permutation_test(x, y, z, n_permutations=99, seed=3)
    b = conditional_permutation_test(x * 10 + 5, y + 100, z * 3, n_permutations=99, seed=3)
    assert a == b


@pytest.mark.parametrize("many_strata", [False, True])
def test_shuffles_keep_each_stratum(rng, many_strata, monkeypatch):
    # the two shuffle paths (a loop over few strata, one sort for many) must only
    # move X values inside their stratum: the (X, Z) table of every shuffle is the
    # observed one (checked on the shuffles themselves)
    from infoscope.estimators import conditional as cond

    monkeypatch.setattr(cond, "_LOOP_STRATA", 10**9 if not many_strata else 0)
    z = np.sort(rng.integers(0, 40, 500))
    x = rng.integers(0, 5, 500)
    cuts = np.flatnonzero(np.diff(z)) + 1
    shuffled = cond._shuffle_within(rng, x, z, np.r_[0, cuts], np.r_[cuts, 500], 20)
    for row in shuffled:
        pd.testing.assert_frame_equal(pd.crosstab(row, z), pd.crosstab(x, z))
    assert not all((row == x).all() for row in shuffled)


CALIBRATION_CASES = [
    # (n, k_x, k_y, k_z): small and large samples; binary, multi-level, and a
    # sparse table (8 x 8 x 10 cells for 200 rows: 0.3 rows per cell)
    (40, 2, 2, 2),
    (200, 4, 3, 6),
    (1000, 2, 5, 3),
    (200, 8, 8, 10),
]


@pytest.mark.parametrize("n,kx,ky,kz", CALIBRATION_CASES)
def test_permutation_p_value_is_calibrated_under_conditional_independence(n, kx, ky, kz):
    rng = np.random.default_rng(1000 + n + kx * ky * kz)
    reps = 400
    p = np.array([
        conditional_permutation_test(*_null_sample(rng, n, kx, ky, kz), n_permutations=99, seed=rng).p_value
        for _ in range(reps)
    ])
    for level in (0.05, 0.01):
        rate = float(np.mean(p <= level))
        se = math.sqrt(level * (1 - level) / reps)
        assert rate <= level + 3 * se, (level, rate)


def test_unconditional_test_rejects_what_conditioning_explains(rng):
    # marginally dependent (through Z), conditionally independent
    x, y, z = _null_sample(rng, 2000, 3, 3, 4)
    assert conditional_permutation_test(x, y, np.zeros_like(z), n_permutations=99, seed=0).p_value == 0.01
    assert conditional_permutation_test(x, y, z, n_permutations=99, seed=0).p_value > 0.05


def test_power_under_conditional_dependence(rng):
    x, y, z = _null_sample(rng, 500, 3, 3, 4)
    y = np.where(rng.random(500) < 0.3, x, y)
    assert conditional_permutation_test(x, y, z, n_permutations=199, seed=0).p_value == pytest.approx(1 / 200)


def test_bootstrap_interval_covers_the_true_cmi():
    # a known distribution: Z fair bit; X | Z flips Z with prob 0.2; Y = X with prob
    # 0.5 else a fresh fair bit, so I(X;Y|Z) = I(X;Y'), computed exactly from the
    # joint distribution (closed form by enumeration) in bits
    p = np.zeros((2, 2, 2))
    for zz in (0, 1):
        for xx in (0, 1):
            px = 0.8 if xx == zz else 0.2
            for yy in (0, 1):
                py = 0.5 * (yy == xx) + 0.25
                p[xx, yy, zz] = 0.5 * px * py
    pz = p.sum((0, 1))
    true = sum(p[i, j, k] * math.log2(p[i, j, k] * pz[k] / (p[i, :, k].sum() * p[:, j, k].sum()))
               for i in range(2) for j in range(2) for k in range(2))
    rng = np.random.default_rng(5)
    reps, hits = 120, 0
    for _ in range(reps):
        t = rng.multinomial(1500, p.ravel()).reshape(2, 2, 2)
        low, high = bootstrap_cmi_ci(t, n_boot=150, seed=rng)
        hits += low <= true <= high
    assert hits / reps >= 0.88   # nominal 0.95; 3 s.e. of 120 replicates is about 0.06


def test_frame_conditional_matches_a_crosstab_table(rng):
    n = 3000
    depot = rng.integers(0, 4, n)
    service = np.where(rng.random(n) < 0.5, depot % 3, rng.integers(0, 3, n))
    late = (rng.random(n) < 0.2 + 0.25 * (service == 2) + 0.1 * (depot == 1)).astype(int)
    df = pd.DataFrame({"depot": depot.astype(str), "service": service.astype(str), "late": late})
    row = df.info_profile.conditional("service", "late", given=["depot"], n_boot=50, n_permutations=199)
    assert list(row.columns) == list(CONDITIONAL_COLUMNS)
    r = row.iloc[0]
    # the three-way table by pandas.crosstab (an independent count), then the
    # Miller-Madow CMI on it
    ct = pd.crosstab([df["service"], df["late"]], df["depot"]).to_numpy().reshape(3, 2, 4)
    assert r["cmi"] == pytest.approx(conditional_mutual_information_from_table(ct), abs=1e-12)
    # above chance: the plug-in CMI less the strata's chance MI (scikit-learn's exact
    # expected_mutual_information per stratum, nats, weighted by the stratum's rows;
    # ours sums cells with an expected count >= 50 to second order: 2% of the chance)
    plugin = conditional_mutual_information_from_table(ct, estimator="plugin", base="nats")
    chance = sum(ct[:, :, z].sum() / n * expected_mutual_information(ct[:, :, z].astype(np.int64),
                                                                      int(ct[:, :, z].sum()))
                 for z in range(4))
    assert r["cmi_above_chance"] * math.log(2) == pytest.approx(plugin - chance, abs=0.02 * chance)
    assert r["ci_low"] <= r["cmi_above_chance"] <= r["ci_high"] and r["ci_low"] > 0
    assert r["co_information"] == pytest.approx(r["mi"] - r["cmi"])
    assert r["p_value"] == pytest.approx(1 / 200)
    assert r["strata"] == 4 and r["n"] == n and r["given"] == ("depot",) and r["reliability"] == "ok"
    assert row.attrs["unit"] == "bits" and row.attrs["n_permutations"] == 199 and row.attrs["ci"] == 0.95


def test_frame_conditional_says_when_the_table_is_sparse(rng):
    n = 300
    df = pd.DataFrame({c: rng.integers(0, 6, n).astype(str) for c in "abcd"})
    row = df.info_profile.conditional("a", "b", given=["c", "d"], n_boot=0, n_permutations=49)
    r = row.iloc[0]
    assert r["reliability"] == "too_few" and r["strata"] == 36
    assert "fewer than 5" in r["note"] and "permutation p-value stays valid" in r["note"]
    assert (r["ci_low"] > 0) == (r["p_value"] < 0.025) and r["ci_low"] <= r["cmi_above_chance"] <= r["ci_high"]


def test_frame_conditional_calibrated_on_numeric_columns():
    # binned numeric X and Y that depend on a categorical Z only: p-values under the
    # null at two sample sizes (the frame path: encoding, strata, permutation)
    for n in (150, 1500):
        rng = np.random.default_rng(n)
        reps, hits, excludes = 150, 0, 0
        for _ in range(reps):
            z = rng.integers(0, 3, n)
            df = pd.DataFrame({"x": z + rng.normal(size=n), "y": -z + rng.normal(size=n), "z": z.astype(str)})
            row = df.info_profile.conditional("x", "y", given="z", bins=4, n_boot=0, n_permutations=99,
                                              seed=int(rng.integers(1 << 30)))
            hits += row["p_value"][0] <= 0.05
            excludes += row["ci_low"][0] > 0
        assert hits / reps <= 0.05 + 3 * math.sqrt(0.05 * 0.95 / reps), (n, hits / reps)
        # the 95% interval excludes 0 only with the one-sided test at 2.5%
        assert excludes / reps <= 0.025 + 3 * math.sqrt(0.025 * 0.975 / reps), (n, excludes / reps)


def _known_cmi(kx, ky, kz, flip, copy, rng):
    """A joint distribution of (X, Y, Z) with X | Z noisy, Y = X with prob ``copy``: p and I(X;Y|Z) in bits."""
    pz = rng.dirichlet(np.full(kz, 4.0))
    p = np.zeros((kx, ky, kz))
    for zz in range(kz):
        px = np.full(kx, flip / kx)
        px[zz % kx] += 1 - flip
        py_given_x = np.full((kx, ky), (1 - copy) / ky)
        for xx in range(kx):
            py_given_x[xx, xx % ky] += copy
        p[:, :, zz] = pz[zz] * px[:, None] * py_given_x
    pxz, pyz, pzz = p.sum(axis=1), p.sum(axis=0), p.sum(axis=(0, 1))
    true = sum(p[i, j, k] * math.log2(p[i, j, k] * pzz[k] / (pxz[i, k] * pyz[j, k]))
               for i in range(kx) for j in range(ky) for k in range(kz) if p[i, j, k] > 0)
    return p, true


@pytest.mark.parametrize("shape,n,copy", [((2, 2, 2), 1500, 0.5), ((4, 3, 5), 600, 0.3), ((3, 3, 4), 400, 0.0)])
def test_cmi_interval_covers_the_true_cmi(shape, n, copy):
    # coverage of the 95% interval of cmi_above_chance on tables drawn from a known
    # distribution (exact CMI by enumeration); copy=0 is conditional independence,
    # where the lower end cannot go below 0 and the nominal coverage is 97.5%
    rng = np.random.default_rng(17 + n)
    p, true = _known_cmi(*shape, 0.3, copy, rng)
    reps, hits = 150, 0
    for _ in range(reps):
        t = rng.multinomial(n, p.ravel()).reshape(shape)
        r = cmi_interval_from_table(t)
        hits += r.low <= true <= r.high
    assert hits / reps >= 0.95 - 3 * math.sqrt(0.95 * 0.05 / reps), (shape, n, hits / reps)


def test_cmi_chance_level_is_the_mean_of_the_within_strata_shuffles(rng):
    # the exact chance level (hypergeometric per stratum) against the Monte-Carlo
    # mean of 4,000 within-strata shuffles of a sparse table (4 x 4 x 6, 150 rows)
    x, y, z = _null_sample(rng, 150, 4, 4, 6)
    t = np.zeros((4, 4, 6))
    np.add.at(t, (x, y, z), 1)
    res = conditional_permutation_test(x, y, z, n_permutations=4000, seed=2, base="nats")
    chance = cmi_interval_from_table(t, base="nats").chance
    assert res.null_mean == pytest.approx(chance, rel=0.02)


@pytest.mark.parametrize("level", [0.95, 0.99])
def test_cmi_interval_agrees_with_the_permutation_test_on_every_row(level):
    # the duality of the pair tables: on simulated rows under the null and under
    # dependence, dense and sparse, ci_low > 0 exactly when p < (1 - ci) / 2
    rng = np.random.default_rng(int(level * 100))
    seen = set()
    for i in range(60):
        n, kx, ky, kz = [(60, 2, 2, 3), (400, 3, 3, 4), (300, 6, 6, 8)][i % 3]
        x, y, z = _null_sample(rng, n, kx, ky, kz)
        if i % 2:
            y = np.where(rng.random(n) < rng.uniform(0.05, 0.4), x % ky, y)
        df = pd.DataFrame({"x": x.astype(str), "y": y.astype(str), "z": z.astype(str)})
        r = df.info_profile.conditional("x", "y", given="z", ci=level, n_boot=0, n_permutations=999,
                                        seed=i).iloc[0]
        assert (r["ci_low"] > 0) == (r["p_value"] < (1 - level) / 2), (i, r["p_value"], r["ci_low"])
        assert r["ci_low"] <= r["cmi_above_chance"] <= r["ci_high"]
        seen.add(bool(r["ci_low"] > 0))
    assert seen == {True, False}  # both sides of the rule were exercised


def test_frame_conditional_bad_input():
    df = pd.DataFrame({"a": [1, 2] * 20, "b": [1, 1, 2, 2] * 10})
    with pytest.raises(KeyError, match="nope"):
        df.info_profile.conditional("a", "nope")
    with pytest.raises(ValueError, match="different columns"):
        df.info_profile.conditional("a", "b", given=["a"])
    with pytest.raises(ValueError, match="n_permutations"):
        df.info_profile.conditional("a", "b", n_permutations=-1)


def test_docstring_examples_run():
    import doctest

    from infoscope.estimators import conditional as est
    from infoscope.frame import conditional as frame

    for module in (est, frame):
        result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
        assert result.attempted > 0 and result.failed == 0, module.__name__
