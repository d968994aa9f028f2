"""Intervals: the chance-corrected MI interval, bounded entropy intervals, replicate floor.

Each check names its outside reference: scikit-learn's exact expected mutual
information, scipy's noncentral chi-square, closed forms of tables with a known MI
(bivariate normal probabilities from scipy), and the binomial distribution for the
tolerance of every simulated coverage.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.optimize
import scipy.stats
from sklearn.metrics.cluster._expected_mutual_info_fast import expected_mutual_information

from infoscope.estimators.information import g_test_from_table
from infoscope.estimators.intervals import (
    chance_mi_nats,
    entropy_standard_error,
    mi_interval_from_table,
    mi_intervals_from_tables,
)
from infoscope.estimators.resampling import bootstrap_entropy_ci, min_replicates


def gaussian_table(rho: float, bins: int) -> np.ndarray:
    """Cell probabilities of a bivariate normal (correlation rho) cut at its own quantiles.

    scipy.stats.multivariate_normal.cdf gives the rectangle probabilities, so the MI
    of the table is known exactly (closed form of a discretised normal, computed).
    """
    q = scipy.stats.norm.ppf(np.linspace(0, 1, bins + 1))
    q[0], q[-1] = -9.0, 9.0
    mvn = scipy.stats.multivariate_normal([0.0, 0.0], [[1.0, rho], [rho, 1.0]])
    f = np.array([[mvn.cdf([a, b]) for b in q] for a in q])
    p = f[1:, 1:] - f[:-1, 1:] - f[1:, :-1] + f[:-1, :-1]
    p = np.clip(p, 0.0, None)
    return p / p.sum()


def table_mi_nats(p: np.ndarray) -> float:
    px, py = p.sum(axis=1, keepdims=True), p.sum(axis=0, keepdims=True)
    m = p > 0
    return max(float(np.sum(p[m] * np.log(p[m] / (px @ py)[m]))), 0.0)


# ------------------------------------------------------------------ chance level

@pytest.mark.parametrize("shape,n", [((2, 2), 4), ((3, 4), 50), ((7, 5), 400), ((16, 16), 300)])
def test_chance_mi_equals_sklearn_expected_mi_on_sparse_tables(rng, shape, n):
    # every cell here expects fewer than 50 rows: the exact hypergeometric sum,
    # reference sklearn's expected_mutual_information(contingency, n) (nats)
    t = rng.multinomial(n, np.full(shape[0] * shape[1], 1.0 / (shape[0] * shape[1]))).reshape(shape)
    t = t[t.sum(axis=1) > 0][:, t.sum(axis=0) > 0]
    ref = expected_mutual_information(t.astype(np.int64), int(t.sum()))
    assert chance_mi_nats(t) == pytest.approx(ref, rel=1e-9)


@pytest.mark.parametrize("shape,n", [((4, 4), 5_000), ((16, 16), 100_000), ((12, 5), 40_000)])
def test_chance_mi_of_well_filled_tables_is_within_a_fifth_of_a_percent(rng, shape, n):
    # large cells use the delta-method term (N - a)(N - b) / (2 N^2 (N - 1)); against
    # the exact sum of sklearn's expected_mutual_information
    p = np.outer(rng.dirichlet(np.ones(shape[0]) * 5), rng.dirichlet(np.ones(shape[1]) * 5))
    t = rng.multinomial(n, p.ravel()).reshape(shape)
    ref = expected_mutual_information(t.astype(np.int64), int(t.sum()))
    assert chance_mi_nats(t) == pytest.approx(ref, rel=2e-3)
    # and the familiar chi-square mean (r - 1)(c - 1) / (2 (N - 1)) to first order
    assert chance_mi_nats(t) == pytest.approx((shape[0] - 1) * (shape[1] - 1) / (2 * (n - 1)), rel=0.05)


# ------------------------------------------------------------------ the MI interval

def test_interval_ends_solve_the_noncentral_chi_square_equations():
    # scipy.stats.ncx2: at the ends, F(G'; dof, lambda) = (1 +- level) / 2, with
    # G' = G / q and q = 2 N EMI / dof (module notes of infoscope.estimators.intervals)
    t = np.array([[30, 12, 8], [10, 25, 15], [6, 9, 35]])
    n = t.sum()
    res = mi_interval_from_table(t, level=0.9, base="nats")
    g = g_test_from_table(t)
    q = 2 * n * chance_mi_nats(t) / g.dof
    lam_lo, lam_hi = res.low * 2 * n / q, res.high * 2 * n / q
    assert scipy.stats.ncx2.cdf(g.statistic / q, g.dof, lam_lo) == pytest.approx(0.95, abs=1e-9)
    assert scipy.stats.ncx2.cdf(g.statistic / q, g.dof, lam_hi) == pytest.approx(0.05, abs=1e-9)
    # the estimate is the chance-corrected plug-in MI
    assert res.estimate == pytest.approx(g.statistic / (2 * n) - chance_mi_nats(t), rel=1e-12)
    assert res.low < res.estimate < res.high and res.dof == 4


def test_lower_end_is_zero_exactly_when_the_scaled_g_test_does_not_reject(rng):
    # agreement with the test by construction: low > 0 iff the mean-scaled G has
    # chi-square p < (1 - level) / 2 (scipy.stats.chi2.sf)
    tables = [rng.multinomial(200, np.outer([.5, .3, .2], [.4, .4, .2]).ravel()).reshape(3, 3)
              for _ in range(40)]
    tables += [t + np.diag([s, s, s]) for s, t in zip(range(1, 20), tables)]
    res = mi_intervals_from_tables(tables, level=0.95)
    for t, low in zip(tables, res.low):
        g = g_test_from_table(t)
        q = 2 * t.sum() * chance_mi_nats(t) / g.dof
        p = scipy.stats.chi2.sf(g.statistic / q, g.dof)
        assert (low > 0) == (p < 0.025), (p, low)
    assert 0 < np.count_nonzero(res.low > 0) < len(tables)


def test_degenerate_tables():
    res = mi_intervals_from_tables([np.zeros((2, 2)), [[5, 7]], [[3]]])
    assert np.isnan(res.estimate[0]) and np.isnan(res.low[0]) and np.isnan(res.high[0])
    # a constant side: no degree of freedom, nothing shared
    assert res.estimate[1:].tolist() == [0.0, 0.0] and res.high[1:].tolist() == [0.0, 0.0]
    with pytest.raises(ValueError, match="level"):
        mi_intervals_from_tables([[[1, 2], [3, 4]]], level=1.0)


def test_bits_equal_nats_over_ln2():
    # change of base (common practice)
    t = [[20, 5], [4, 21]]
    bits, nats = mi_interval_from_table(t), mi_interval_from_table(t, base="nats")
    for a, b in zip(bits[:4], nats[:4]):
        assert a == pytest.approx(b / math.log(2), rel=1e-12)


def _coverage(rho, bins, n, reps, seed):
    p = gaussian_table(rho, bins)
    truth = table_mi_nats(p)
    rng = np.random.default_rng(seed)
    tables = [rng.multinomial(n, p.ravel()).reshape(p.shape) for _ in range(reps)]
    res = mi_intervals_from_tables(tables, level=0.95, base="nats")
    return float(np.mean((res.low <= truth + 1e-12) & (truth <= res.high + 1e-12)))


@pytest.mark.parametrize("rho,bins,n", [(0.35, 4, 100), (0.35, 7, 300), (0.6, 16, 300), (0.2, 14, 1000)])
def test_coverage_of_known_mi_is_near_nominal(rho, bins, n):
    # Tables of known MI: a bivariate normal cut at its own quantiles (scipy's
    # multivariate_normal.cdf), 400 seeded tables each.  The tolerance comes from the
    # binomial distribution: with 400 draws at the nominal 0.95, coverage below
    # scipy.stats.binom.ppf(0.001, 400, 0.93) / 400 (i.e. a true coverage under 93%,
    # 2 points below nominal, is rejected at 0.1%) fails; above 0.99 fails too (far
    # too wide to be useful).  The full grid is in benchmarks/calibration.py.
    reps = 400
    cover = _coverage(rho, bins, n, reps, seed=int(rho * 100) + bins + n)
    low = scipy.stats.binom.ppf(0.001, reps, 0.93) / reps
    assert low <= cover <= 0.99 + 1e-12, cover


def test_independent_columns_cover_zero_at_one_sided_rate(rng):
    # at MI = 0 the interval's lower end cannot go below 0, so it covers 0 unless the
    # scaled test rejects at 2.5%: coverage (1 + level) / 2 = 97.5%, tolerance from
    # scipy.stats.binom (0.1% two-sided band for 600 draws)
    p = np.outer([.3, .3, .2, .2], [.25, .25, .25, .25]).ravel()
    tables = [rng.multinomial(120, p).reshape(4, 4) for _ in range(600)]
    res = mi_intervals_from_tables(tables)
    cover = np.mean(res.low <= 0)
    lo, hi = scipy.stats.binom.ppf([0.0005, 0.9995], 600, 0.975) / 600
    assert lo <= cover <= hi


# ------------------------------------------------------------------ entropy intervals

def test_entropy_standard_error_closed_forms():
    # p = (1/2, 1/2): the first-order (Basharin 1959) term vanishes; the second-order
    # term is sqrt(2 (m - 1)) / (2 N) nats (chi-square with m - 1 dof, variance 2(m - 1))
    assert entropy_standard_error([50, 50], base="nats") == pytest.approx(math.sqrt(2) / 200, rel=1e-12)
    # Basharin (1959): Var = (sum p ln^2 p - H^2) / N to first order
    p = np.array([0.5, 0.25, 0.25])
    h = -np.sum(p * np.log(p))
    first = (np.sum(p * np.log(p) ** 2) - h * h) / 400
    assert entropy_standard_error([200, 100, 100], base="nats") == pytest.approx(
        math.sqrt(first + 2 / (2 * 400 ** 2)), rel=1e-12)
    assert math.isnan(entropy_standard_error([0, 0]))


def test_an_even_binned_column_gets_a_real_interval_below_log_k():
    # 500 rows in 16 equal quantile bins: Miller-Madow lands above log K = 4 bits and
    # is clipped there; the interval of the clipped estimator keeps its spread below
    # 4 bits instead of collapsing to the point [4, 4] (issue 10)
    counts = np.array([32, 31] * 8)[:16]
    counts[0] += 500 - counts.sum()
    lo, hi = bootstrap_entropy_ci(counts, n_boot=200, seed=0, fixed_alphabet=True)
    assert lo < hi == pytest.approx(4.0, abs=1e-12)
    assert 3.9 < lo
    # plug-in: the replicates lie below the estimate and the centred shift moves the
    # top up; it stays at log K (was 4.0108 > 4.0)
    lo, hi = bootstrap_entropy_ci(counts, estimator="plugin", n_boot=200, seed=0, fixed_alphabet=True)
    assert lo < hi <= 4.0
    # without a fixed alphabet only the bound 0 applies
    lo, hi = bootstrap_entropy_ci(counts, n_boot=200, seed=0)
    assert hi > 4.0 and lo >= 0


def test_min_replicates_puts_one_replicate_beyond_each_end():
    # (1 - level) / 2 * n_boot >= 1 (Efron & Tibshirani 1993, ch. 13: the percentile
    # ends are order statistics of the replicates)
    for level in (0.8, 0.9, 0.95, 0.99):
        b = min_replicates(level)
        assert b * (1 - level) / 2 >= 1 - 1e-9 > (b - 1) * (1 - level) / 2


def test_interval_from_the_shown_p_value_agrees_with_it_exactly(rng):
    # one reference distribution for the test and the interval: with the p-values
    # of a permutation test (infoscope's permutation_test_mi, Phipson & Smyth 2010),
    # low > 0 exactly when p < (1 - level) / 2, on sparse and dense tables
    from infoscope.estimators.resampling import permutation_test_mi

    tables, ps, perms = [], [], []
    for n, k, shift in [(60, 6, 0), (60, 6, 2), (400, 4, 0), (400, 4, 1), (150, 8, 3)]:
        for rep in range(6):
            x = rng.integers(0, k, n)
            y = (x + rng.integers(0, k, n) * (rep % 3 != 0 or shift == 0)) % k if shift else rng.integers(0, k, n)
            t = np.zeros((k, k), dtype=np.int64)
            np.add.at(t, (x, y), 1)
            tables.append(t)
            ps.append(permutation_test_mi(x, y, n_permutations=199, seed=rep).p_value)
            perms.append(199)
    for level in (0.9, 0.95):
        res = mi_intervals_from_tables(tables, level=level, p_values=ps)
        for p, low in zip(ps, res.low):
            assert (low > 0) == (p < (1 - level) / 2), (p, low)
    assert {bool(v > 0) for v in res.low} == {True, False}
    # a p-value at the Monte-Carlo floor 1/(m + 1) does not cap a strong dependence:
    # the ends come from the statistic, the p-value only decides the sign
    t = np.diag([50, 50, 50, 50])
    capped = mi_intervals_from_tables([t], p_values=[1 / 200])
    free = mi_intervals_from_tables([t])
    assert capped.low[0] == pytest.approx(free.low[0], rel=1e-9)
    with pytest.raises(ValueError, match="p_values has 2 entries for 1 tables"):
        mi_intervals_from_tables([t], p_values=[0.1, 0.2])


# ------------------------------------------------------------------ the profile's entropy table

def _profile(frame, **settings):
    import warnings

    from infoscope.frame.session import ProfileSession

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return ProfileSession(frame, **settings)


def test_entropy_rows_of_even_columns_at_500_rows():
    # issue 10: at 500 rows every quantile-binned column got the point interval
    # [4.0, 4.0] (default estimator) and ci_high 4.0108 > max_entropy (plugin); a
    # balanced 0/1 integer column was flagged exceeds_log_k at 1.0005 bits, and the
    # boolean interval was not clipped at log 2
    import pandas as pd

    rng = np.random.default_rng(0)
    df = pd.DataFrame({"x": rng.normal(size=500), "b01": np.tile([0, 1], 250),
                       "flag": np.tile([True, False], 250)})
    for estimator in ("miller_madow", "plugin"):
        e = _profile(df, estimator=estimator, bins=16).entropy().set_index("column")
        assert e.loc["x", "ci_low"] < e.loc["x", "ci_high"] <= e.loc["x", "max_entropy"] == 4.0
        assert e.loc["x", "ci_low"] <= e.loc["x", "entropy"] <= e.loc["x", "ci_high"]
        assert e.loc["flag", "ci_high"] <= e.loc["flag", "max_entropy"] == 1.0
        assert "exceeds_log_k" not in e.loc["b01", "flags"]
    # Miller-Madow of a balanced 0/1 column: log 2 + 1 / (2N) nats (Miller 1955),
    # inside its standard error sqrt(1 / (2 N^2)) times 1.96: not a finding
    e = _profile(df[["b01"]], n_boot=0).entropy()
    assert e.loc[0, "entropy"] == pytest.approx(1 + 1 / (2 * 500 * math.log(2)), rel=1e-12)


def test_an_excess_beyond_the_standard_error_is_flagged():
    # 60 rows over 40 levels, most seen once: Miller-Madow adds (m - 1) / (2N) =
    # 0.325 nats to a plug-in of about log 40, far beyond its standard error
    import pandas as pd

    values = [f"v{i}" for i in range(40)] + [f"v{i}" for i in range(20)]
    e = _profile(pd.DataFrame({"c": values}), n_boot=0).entropy()
    assert "exceeds_log_k" in e.loc[0, "flags"]


def test_one_bin_is_flagged_and_nmi_of_it_is_undefined():
    # issue 10 / 13: Knuth's rule can give a uniform sample one bin; two such
    # independent columns read NMI 1.0 before.  A column without entropy has no
    # share to normalise: NaN, and the entropy table says why (flag one_bin)
    import pandas as pd

    rng = np.random.default_rng(1)
    df = pd.DataFrame({"u1": rng.uniform(size=200), "u2": rng.uniform(size=200)})
    s = _profile(df, bins="knuth", n_boot=0)
    e = s.entropy()
    if (e["k"] == 1).all():  # Knuth's posterior (Knuth 2006) chose one bin here
        assert all("one_bin" in f for f in e["flags"])
        assert s.pairs("nmi")["value"].isna().all() and s.pairs("adjusted_mi")["value"].isna().all()
    e = _profile(df, bins=1, n_boot=0).entropy()   # a one-bin request is flagged the same way
    assert all("one_bin" in f for f in e["flags"])


def test_fractional_floats_are_binned_and_the_threshold_is_a_setting():
    # issue 10: a 32-row grade average became integer_categories (k = 29)
    import pandas as pd

    rng = np.random.default_rng(2)
    df = pd.DataFrame({"gpa": np.round(rng.uniform(2.0, 4.0, 32), 2), "grade": rng.integers(1, 6, 32)})
    e = _profile(df, n_boot=0).entropy().set_index("column")
    assert e.loc["gpa", "kind"] == "numeric" and e.loc["gpa", "k"] == 2   # floor(sqrt(32 / 10)) = 1 -> 2
    assert e.loc["grade", "kind"] == "integer_categories"
    s = _profile(df, n_boot=0, categorical_threshold=0, bins=3)
    assert s.entropy().set_index("column").loc["grade", "kind"] == "numeric"
    assert "grade" in s.update(categorical_threshold=32)
    assert s.entropy().set_index("column").loc["grade", "kind"] == "integer_categories"


def test_pairs_and_relevance_intervals_agree_with_their_p_values_exactly():
    # the duality on every row of both tables, on simulated frames with sparse
    # (permutation-tested) and well-filled (chi-square) pairs: ci_low > 0 exactly
    # when p_value < (1 - ci) / 2, and each interval holds its own estimate
    import pandas as pd

    rng = np.random.default_rng(7)
    for n in (120, 3000):
        x = rng.normal(size=n)
        df = pd.DataFrame({"x": x, "y": x + rng.normal(size=n), "z": rng.normal(size=n),
                           "c": rng.choice(list("abcdefghij"), n), "t": rng.integers(0, 3, n)})
        for ci in (0.9, 0.95):
            s = _profile(df, n_boot=0, ci=ci, target="t")
            for table in (s.pairs(), s.relevance()):
                tested = table["p_value"].notna()
                assert ((table["ci_low"] > 0) == (table["p_value"] < (1 - ci) / 2))[tested].all()
                assert (table["ci_low"] <= table["mi_above_chance"] + 1e-15)[tested].all()
                assert (table["mi_above_chance"] <= table["ci_high"] + 1e-15)[tested].all()
                assert table.attrs["ci"] == ci
        methods = set(s.pairs()["p_method"])
        assert methods <= {"chi2", "permutation", "none"}


def _forty_bisection_steps(g, dof, target):
    """The noncentrality search written out as plain bisection (the definition the solver must keep)."""
    spread = 10.0 * np.sqrt(2.0 * (dof + 2.0 * g)) + 10.0
    lo = np.maximum(g - dof - spread, 0.0)
    hi = np.maximum(g - dof, 0.0) + spread
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        above = scipy.stats.ncx2.cdf(g, dof, np.maximum(mid, 1e-300)) > target
        lo = np.where(above, mid, lo)
        hi = np.where(above, hi, mid)
    return 0.5 * (lo + hi)


@pytest.mark.parametrize("shape", ["near_chance", "far_from_chance", "chi2_draws"])
def test_fast_noncentrality_search_equals_plain_bisection_bit_for_bit(rng, shape):
    # the solver answers each bisection step from points where F is known and
    # evaluates scipy.stats.ncx2.cdf (Boost) only between them: the result must be
    # the plain bisection's exactly, and F at it must be the target (scipy.optimize.brentq)
    from infoscope.estimators.intervals import _solve_noncentrality

    m = 300
    dof = rng.integers(1, 2000, m).astype(float)
    g = {"near_chance": dof * rng.uniform(0.2, 3.0, m),
         "far_from_chance": dof + rng.exponential(1.0, m) * 10 ** rng.uniform(0, 6, m),
         "chi2_draws": rng.chisquare(dof)}[shape]
    for target in (0.975, 0.025, 0.995):
        got = _solve_noncentrality(g, dof, target, np.ones(m, dtype=bool))
        want = np.maximum(_forty_bisection_steps(g, dof, target), np.finfo(np.float64).tiny)
        np.testing.assert_array_equal(got, want)
        for i in np.flatnonzero(scipy.stats.chi2.cdf(g, dof) > target)[:5]:
            root = scipy.optimize.brentq(lambda lam: scipy.stats.ncx2.cdf(g[i], dof[i], lam) - target,
                                         1e-12, g[i] + 100 * np.sqrt(g[i] + dof[i]) + 100, xtol=1e-12, rtol=1e-14)
            assert got[i] == pytest.approx(root, rel=1e-9, abs=1e-6)
