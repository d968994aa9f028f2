"""Tests of independence at every sample size: the chi-square rule, Williams' correction,
the batched permutation test, and their calibration in seeded simulations.

Outside references, named beside each check:
- ``scipy.stats.chi2_contingency(lambda_="log-likelihood", correction=False)`` for G;
- Williams (1976), Biometrika 63(1), 33-37, for the correction factor (the formula
  for the r x c test of independence, as also printed in Sokal & Rohlf 1995, Biometry,
  3rd ed.; from memory);
- ``scipy.stats.permutation_test(..., permutation_type="pairings")`` for the shuffle
  p-values on the same codes;
- the binomial distribution (``scipy.stats.binom``) for every simulation tolerance;
- scikit-learn's bundled wine data (``sklearn.datasets.load_wine``), shuffled.
"""
from __future__ import annotations

import warnings
from types import SimpleNamespace as Col

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope.engine import PairEngine
from infoscope.engine.permutation import score_lookup, shuffle_counts, table_score
from infoscope.estimators.significance import (
    CHI2_CLEAR_P,
    CHI2_MIN_MEAN_COUNT,
    PERMUTATION_STOP_AFTER,
    UNEVEN_PERMUTATION_ROWS,
    WILLIAMS_MAX,
    g_statistics,
    independence_tests,
    monte_carlo_p_value,
    table_reliability,
    table_tests,
    williams_correction,
)
from infoscope.frame.inference import pair_tests


def _table(x, y, r, c):
    t = np.zeros((r, c), dtype=np.int64)
    np.add.at(t, (x, y), 1)
    return t


# --------------------------------------------------------------------- G and Williams
@pytest.mark.parametrize("table", [
    [[120, 35, 40], [30, 90, 55]],
    [[25, 31, 18, 40], [22, 29, 35, 17], [41, 12, 30, 26]],
    [[500, 10], [10, 500]],
])
def test_g_statistic_matches_scipy_chi2_contingency(table):
    # scipy.stats.chi2_contingency(lambda_="log-likelihood", correction=False): G and dof
    ref = stats.chi2_contingency(np.array(table), lambda_="log-likelihood", correction=False)
    g, dof, n, r, c, q = g_statistics([table])
    assert g[0] == pytest.approx(ref.statistic, rel=1e-12)
    assert dof[0] == ref.dof
    # where the rule uses the approximation, p is the chi-square tail of G / q
    res = independence_tests([table])
    assert res.p_method[0] == "chi2"
    assert res.p_value[0] == pytest.approx(stats.chi2.sf(ref.statistic / q[0], ref.dof), rel=1e-9)
    if q[0] == pytest.approx(1.0, abs=1e-3):  # nearly no correction: close to scipy's own p
        assert res.p_value[0] == pytest.approx(ref.pvalue, rel=0.05)


def test_williams_correction_against_its_formula():
    # Williams (1976), Biometrika 63(1), 33-37: q = 1 + (N sum 1/R_i - 1)(N sum 1/C_j - 1)
    # / (6 N (r - 1)(c - 1)), written out here by hand for one 2 x 3 table.
    t = np.array([[12, 5, 9], [3, 20, 7]], dtype=float)
    rows, cols, n = t.sum(axis=1), t.sum(axis=0), t.sum()
    by_hand = 1 + (n * (1 / 26 + 1 / 30) - 1) * (n * (1 / 15 + 1 / 25 + 1 / 16) - 1) / (6 * n * 1 * 2)
    assert float(williams_correction(rows, cols)) == pytest.approx(by_hand, rel=1e-14)
    # empty rows and columns carry nothing: the same as the table without them
    padded = np.zeros((3, 4))
    padded[:2, :3] = t
    assert float(williams_correction(padded.sum(axis=1), padded.sum(axis=0))) == pytest.approx(by_hand, rel=1e-14)
    # q > 1 always, and tends to 1 as the table fills (G / q -> G)
    big = t * 1000
    assert 1 < float(williams_correction(big.sum(axis=1), big.sum(axis=0))) < 1 + 1e-3


def test_rule_and_reliability():
    well = np.full((4, 4), CHI2_MIN_MEAN_COUNT)
    thin = np.full((4, 4), CHI2_MIN_MEAN_COUNT - 1)
    one_side = [[5, 5, 5]]
    res = table_tests([well, thin, one_side, np.zeros((2, 2))])
    assert res.p_method.tolist() == ["chi2", "permutation", "none", "none"]
    assert res.p_value[2] == 1.0 and np.isnan(res.p_value[3]) and np.isnan(res.p_value[1])
    assert table_reliability([80, 40, 300, 9], [4, 4, 16, 2], [4, 4, 16, 2]).tolist() == \
        ["ok", "sparse", "sparse", "too_few"]
    assert table_reliability([100], [16], [16]).tolist() == ["too_few"]  # under one row per cell


def test_uneven_margins_go_to_the_permutation_test_where_affordable():
    # rare levels: Williams' factor far above 1, where the corrected test is very
    # conservative (benchmarks/calibration.py, section rule); permutation up to
    # UNEVEN_PERMUTATION_ROWS rows, the corrected chi-square above
    small = np.array([[942, 19, 19], [19, 1, 0], [19, 0, 1]])  # near independence
    big = np.array([[29_900, 40, 40], [5, 2, 3], [5, 3, 2]])
    for t in (small, big):
        assert t.sum() / t.size >= CHI2_MIN_MEAN_COUNT
        assert float(williams_correction(t.sum(axis=1), t.sum(axis=0))) > WILLIAMS_MAX
    assert small.sum() <= UNEVEN_PERMUTATION_ROWS < big.sum()
    assert table_tests([small, big]).p_method.tolist() == ["permutation", "chi2"]
    # ... unless the conservative corrected test already says p < CHI2_CLEAR_P
    strong = np.array([[960, 0, 0], [0, 20, 0], [0, 0, 20]])
    assert float(williams_correction(strong.sum(axis=1), strong.sum(axis=0))) > WILLIAMS_MAX
    res = table_tests([strong])
    assert res.p_method.tolist() == ["chi2"] and res.p_value[0] < CHI2_CLEAR_P


def test_monte_carlo_p_values():
    # (b + 1) / (m + 1) (Phipson & Smyth 2010); b / L after early stopping (Besag & Clifford 1991)
    p, se = monte_carlo_p_value([0, 3, PERMUTATION_STOP_AFTER], [999, 999, 80])
    assert p.tolist() == [0.001, 0.004, PERMUTATION_STOP_AFTER / 80]
    assert se[0] == pytest.approx(np.sqrt(0.001 * 0.999 / 999))


# --------------------------------------------------------------------- the shuffle kernel
@pytest.mark.parametrize("backend", ["numba", "numpy"])
def test_shuffle_p_value_matches_scipy_permutation_test(backend):
    # scipy.stats.permutation_test(permutation_type="pairings") shuffles one sample
    # against the other: the same null as ours, on the same codes and statistic.
    rng = np.random.default_rng(7)
    x = rng.integers(0, 3, 60)
    y = np.where(rng.random(60) < 0.25, x, rng.integers(0, 4, 60))  # a weak dependence
    lookup = score_lookup(60)
    observed = table_score(_table(x, y, 3, 4), lookup)
    m = 19_999
    done, exceed = shuffle_counts([x], [y], [4], [observed], [m], m + 1, [11], backend=backend)
    ours = (exceed[0] + 1) / (done[0] + 1)
    ref = stats.permutation_test(
        (y,), lambda yy: table_score(_table(x, yy, 3, 4), lookup), permutation_type="pairings",
        n_resamples=m, alternative="greater", random_state=3).pvalue
    # two Monte-Carlo estimates of one tail probability: within 4 standard errors
    se = np.sqrt(2 * ref * (1 - ref) / m)
    assert abs(ours - ref) < 4 * se + 1e-12
    assert 0.0005 < ours < 0.5  # a real but weak dependence


def test_shuffle_exact_small_case_matches_scipy_enumeration():
    # 8 rows: scipy enumerates all 8! pairings exactly (n_resamples above 8!)
    x = np.array([0, 0, 0, 1, 1, 1, 2, 2])
    y = np.array([0, 0, 1, 1, 1, 0, 1, 1])
    lookup = score_lookup(8)
    stat = lambda yy: table_score(_table(x, yy, 3, 2), lookup)  # noqa: E731
    exact = stats.permutation_test((y,), stat, permutation_type="pairings", n_resamples=100_000,
                                   alternative="greater").pvalue
    m = 99_999
    done, exceed = shuffle_counts([x], [y], [2], [stat(y)], [m], m + 1, [5], backend="numba")
    ours = exceed[0] / done[0]
    assert abs(ours - exact) < 4 * np.sqrt(exact * (1 - exact) / m)


def test_shuffles_are_reproducible_and_do_not_depend_on_the_batch():
    rng = np.random.default_rng(1)
    xs = [rng.integers(0, 5, 200) for _ in range(4)]
    ys = [rng.integers(0, 6, 200) for _ in range(4)]
    lookup = score_lookup(200)
    obs = [table_score(_table(x, y, 5, 6), lookup) for x, y in zip(xs, ys)]
    together = shuffle_counts(xs, ys, [6] * 4, obs, [500] * 4, 10**6, [1, 2, 3, 4])
    alone = shuffle_counts(xs[2:3], ys[2:3], [6], obs[2:3], [500], 10**6, [3])
    assert together[1][2] == alone[1][0]
    again = shuffle_counts(xs, ys, [6] * 4, obs, [500] * 4, 10**6, [1, 2, 3, 4])
    assert np.array_equal(together[1], again[1])
    # sequential stopping: stops exactly at the 20th shuffle reaching the observed score
    done, exceed = shuffle_counts(xs, ys, [6] * 4, [-np.inf] * 4, [999] * 4, 20, [1, 2, 3, 4])
    assert done.tolist() == [20] * 4 and exceed.tolist() == [20] * 4


def test_engine_shuffles_complete_rows_only():
    # missing rows (code k) of either column are left out, as in the pair's table
    a = np.array([0, 1, 0, 1, 2, 0, 1, 2] * 10, dtype=np.uint8)
    b = np.array([1, 0, 1, 2, 0, 1, 2, 2] * 10, dtype=np.uint8)
    a[::7] = 3  # k = 3 marks missing
    eng = PairEngine([Col(name="a", codes=a, k=3), Col(name="b", codes=b, k=3)], progress=False)
    t = eng.table("a", "b")
    res = pair_tests(eng, [("a", "b")], [t])
    assert res.p_method[0] == "permutation" and res.n_permutations[0] > 0
    both = a != 3
    lookup = score_lookup(int(both.sum()))
    done, exceed = shuffle_counts([a[both]], [b[both]], [3], [table_score(t, lookup)], [2_000], 10**6, [9])
    assert abs(res.p_value[0] - (exceed[0] + 1) / (done[0] + 1)) < 0.1


# --------------------------------------------------------------------- calibration in CI
def _quantile_codes(x, bins=16):
    edges = np.quantile(x, np.linspace(0, 1, bins + 1)[1:-1])
    return np.searchsorted(edges, x, side="right").astype(np.uint8)


def _null_frame(rng, n, kind):
    cols = {}
    for j in range(6):
        if kind == "numeric" or j % 2 == 0:
            cols[f"x{j}"] = rng.normal(size=n) if j % 3 else rng.lognormal(size=n)
        else:
            k = 3 + 2 * j
            cols[f"c{j}"] = pd.Categorical.from_codes(rng.choice(k, size=n, p=rng.dirichlet(np.full(k, 1.5))),
                                                     categories=[f"v{i}" for i in range(k)])
    return pd.DataFrame(cols)


@pytest.mark.parametrize("kind,n", [("numeric", 120), ("mixed", 400)])
def test_null_false_positive_rate_at_the_defaults(kind, n):
    # Independent columns, default settings: the share of pairs at p < 0.05 and of frames
    # with any q < 0.05 must not exceed 5% beyond the binomial 99.9% quantile.
    rng = np.random.default_rng(2026 + n)
    frames, hits, tests, frames_hit = 30, 0, 0, 0
    for _ in range(frames):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            table = _null_frame(rng, n, kind).info_profile.pairs()
        p = table["p_value"].to_numpy(dtype=float)
        tests += int(np.isfinite(p).sum())
        hits += int((p < 0.05).sum())
        frames_hit += bool((table["q_value"] < 0.05).any())
    assert tests == frames * 15
    assert hits <= stats.binom.ppf(0.999, tests, 0.05), (hits, tests)
    assert frames_hit <= stats.binom.ppf(0.999, frames, 0.05), frames_hit
    # these tables are too thin for the chi-square law: the permutation test decided
    assert (table["p_method"] == "permutation").any()


def test_power_to_find_a_planted_pair():
    # one Gaussian pair of 0.1 bits (continuous MI) among 4 columns at n = 1,000 must be
    # found (q < 0.05) in at least 90% of frames: at least the binomial 0.1% quantile
    # of 20 frames at 90%.
    rho = np.sqrt(1 - 2 ** (-0.2))
    frames, found = 20, 0
    for seed in range(frames):
        rng = np.random.default_rng(500 + seed)
        x = rng.normal(size=(4, 1000))
        x[1] = rho * x[0] + np.sqrt(1 - rho ** 2) * x[1]
        table = pd.DataFrame({f"x{j}": x[j] for j in range(4)}).info_profile.pairs()
        found += bool(table.loc[(table.a == "x0") & (table.b == "x1"), "q_value"].iloc[0] < 0.05)
    assert found >= stats.binom.ppf(0.001, frames, 0.9), found


def test_shuffled_wine_shows_no_findings():
    # scikit-learn's bundled wine data with every column shuffled on its own: nothing is
    # related, so findings may appear only at the null rate (binomial 99.9% quantile).
    from sklearn.datasets import load_wine

    wine = load_wine(as_frame=True).frame
    rng = np.random.default_rng(178)
    shuffles, hits, tests, frames_hit = 8, 0, 0, 0
    for _ in range(shuffles):
        frame = pd.DataFrame({c: rng.permutation(wine[c].to_numpy()) for c in wine.columns})
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            table = frame.info_profile.pairs()
        p = table["p_value"].to_numpy(dtype=float)
        tests += int(np.isfinite(p).sum())
        hits += int((p < 0.05).sum())
        frames_hit += bool((table["q_value"] < 0.05).any())
    assert hits <= stats.binom.ppf(0.999, tests, 0.05), (hits, tests)
    assert frames_hit <= stats.binom.ppf(0.999, shuffles, 0.05), frames_hit
    # ... and the unshuffled data do show their real structure
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        real = wine.info_profile.pairs()
    assert (real["q_value"] < 0.05).sum() > 20


def test_relevance_uses_the_same_tests():
    rng = np.random.default_rng(3)
    n = 300
    df = pd.DataFrame({"y": rng.integers(0, 2, n), "z": rng.normal(size=n), "w": rng.normal(size=n)})
    df["x"] = df["y"] + rng.normal(scale=0.7, size=n)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        rel = df.info_profile.relevance("y")
        pairs = df.info_profile.pairs()
    assert rel.loc[rel.column == "x", "q_value"].iloc[0] < 0.05
    assert set(rel["p_method"]) <= {"chi2", "permutation"}
    assert set(rel["reliability"]) <= {"ok", "sparse", "too_few"}
    # one pair, two views: the same p-value when the test is the same
    both = pairs[(pairs.a == "y") & (pairs.b == "z")]
    mine = rel[rel.column == "z"]
    assert both["p_method"].iloc[0] == mine["p_method"].iloc[0]
    if both["p_method"].iloc[0] == "chi2":
        assert both["p_value"].iloc[0] == pytest.approx(mine["p_value"].iloc[0])


def test_pair_view_shows_the_p_value_of_the_pairs_table():
    rng = np.random.default_rng(12)
    n = 400
    x = rng.normal(size=n)
    df = pd.DataFrame({"x": x, "y": x * 0.3 + rng.normal(size=n), "z": rng.normal(size=n)})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        table = df.info_profile.pairs()
        for a, b in (("x", "y"), ("y", "x"), ("x", "z")):
            pt = df.info_profile.pair(a, b)
            row = table[((table.a == a) & (table.b == b)) | ((table.a == b) & (table.b == a))].iloc[0]
            assert pt.g_test.p_value == pytest.approx(row["p_value"])
            assert (pt.p_method, pt.n_permutations) == (row["p_method"], row["n_permutations"])
