"""Bootstrap intervals and the permutation test, against scipy / sklearn references
and known sampling behaviour (each check names its source)."""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.stats
from sklearn.metrics import mutual_info_score

from infoscope.estimators import conditional, continuous, divergence, intervals, two_sample
from infoscope.estimators.entropy import ENTROPY_ESTIMATORS
from infoscope.estimators.resampling import (
    _mi_of_tables_nats,
    bootstrap_entropy_ci,
    bootstrap_mi_ci,
    permutation_test_mi,
)

P8 = np.array([0.3, 0.2, 0.15, 0.1, 0.1, 0.08, 0.05, 0.02])


def _plugin_bits_of_samples(x, axis=-1, k=8):
    """Plug-in entropy (bits) of integer samples along ``axis`` (for scipy.stats.bootstrap)."""
    x = np.moveaxis(np.asarray(x), axis, -1)
    counts = (x[..., None] == np.arange(k)).sum(axis=-2)
    p = counts / counts.sum(axis=-1, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):
        return -np.where(p > 0, p * np.log2(p), 0.0).sum(axis=-1)


# --------------------------------------------------------------------------- bootstrap: entropy

def test_entropy_interval_matches_scipy_percentile_bootstrap(rng):
    # Reference: scipy.stats.bootstrap(..., method="percentile") resamples the rows;
    # a multinomial draw of the counts is the same distribution, so with 4000
    # replicates each the endpoints agree to Monte Carlo error (~0.01 bits here).
    sample = rng.choice(8, size=300, p=P8)
    counts = np.bincount(sample, minlength=8)
    ref = scipy.stats.bootstrap((sample,), _plugin_bits_of_samples, n_resamples=4000, method="percentile",
                                confidence_level=0.9, vectorized=True, random_state=np.random.default_rng(1))
    low, high = bootstrap_entropy_ci(counts, estimator="plugin", level=0.9, n_boot=4000, seed=2,
                                     method="percentile")
    assert low == pytest.approx(ref.confidence_interval.low, abs=0.015)
    assert high == pytest.approx(ref.confidence_interval.high, abs=0.015)


def test_miller_madow_interval_covers_the_truth_near_nominal_rate(rng):
    # Coverage simulation (common practice for judging an interval): 200 samples of
    # N = 500 from a known K = 8 distribution; the 95% interval should cover the true
    # entropy in roughly 95% of them (88-99% allows for Monte Carlo error and the
    # percentile method's small-sample under-coverage).
    truth = scipy.stats.entropy(P8, base=2)
    draws = rng.multinomial(500, P8, size=200)
    covered = 0
    for i, counts in enumerate(draws):
        low, high = bootstrap_entropy_ci(counts, estimator="miller_madow", n_boot=200, seed=i)
        covered += low <= truth <= high
    assert 0.88 <= covered / 200 <= 0.99


def test_plugin_interval_is_centred_on_the_biased_estimate():
    # The percentile caveat (Efron & Tibshirani 1993, ch. 13): with K = 200 equally
    # likely symbols and N = 100 the plug-in estimate is far below log2(200); its
    # interval follows it and misses the truth.  Resampling 100 singletons adds
    # duplicates, so the replicates are biased once more: the interval lies below
    # even the estimate log2(100).
    counts = np.zeros(200, dtype=int)
    counts[:100] = 1                      # 100 distinct symbols seen once
    truth = math.log2(200)
    low, high = bootstrap_entropy_ci(counts, estimator="plugin", n_boot=100, seed=0, method="percentile")
    assert high < truth
    assert high < math.log2(100)


@pytest.mark.parametrize("estimator", list(ENTROPY_ESTIMATORS))
def test_every_estimator_gives_an_ordered_interval_around_its_estimate(estimator):
    from infoscope.estimators.entropy import entropy_from_counts

    counts = [30, 12, 5, 2, 1, 0]
    n_boot = 40 if estimator == "nsb" else 200
    low, high = bootstrap_entropy_ci(counts, estimator=estimator, n_boot=n_boot, seed=3)
    estimate = entropy_from_counts(counts, estimator=estimator)
    assert low <= high
    assert low - 0.1 <= estimate <= high + 0.1


def test_interval_is_reproducible_and_accepts_a_generator():
    a = bootstrap_entropy_ci([5, 9, 2], seed=11)
    b = bootstrap_entropy_ci([5, 9, 2], seed=11)
    c = bootstrap_entropy_ci([5, 9, 2], seed=np.random.default_rng(11))
    assert a == b == c


def test_interval_of_one_possible_symbol_is_zero():
    assert bootstrap_entropy_ci([40], seed=0) == (0.0, 0.0)


def test_units_scale_the_interval():
    bits = bootstrap_entropy_ci([5, 9, 2, 7], seed=4)
    nats = bootstrap_entropy_ci([5, 9, 2, 7], seed=4, base="nats")
    assert nats.low == pytest.approx(bits.low * math.log(2), rel=1e-12)
    assert nats.high == pytest.approx(bits.high * math.log(2), rel=1e-12)


def test_dirichlet_alpha_reaches_the_estimator():
    a = bootstrap_entropy_ci([5, 0, 0, 1], estimator="dirichlet", alpha="laplace", seed=5)
    b = bootstrap_entropy_ci([5, 0, 0, 1], estimator="dirichlet", alpha=0.01, seed=5)
    assert a.low > b.low


# --------------------------------------------------------------------------- bootstrap: MI

@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen", "james_stein", "grassberger", "dirichlet"])
def test_vectorised_mi_equals_mutual_information_from_table(estimator, rng):
    # Cross-layer consistency: the replicates are scored exactly as
    # infoscope.estimators.information.mutual_information_from_table scores a table.
    from infoscope.estimators.information import mutual_information_from_table

    tables = rng.multinomial(60, np.full(12, 1 / 12), size=5).astype(float)
    alpha = 0.5 if estimator == "dirichlet" else None
    got = _mi_of_tables_nats(tables, (3, 4), estimator, alpha)
    kwargs = {"alpha": alpha} if alpha is not None else {}
    expected = [mutual_information_from_table(t.reshape(3, 4), estimator=estimator, base="nats", **kwargs) for t in tables]
    np.testing.assert_allclose(got, expected, rtol=1e-10, atol=1e-13)


def _plugin_mi_nats_of_samples(x, y, axis=-1, k=3):
    """Plug-in MI (nats) of paired integer samples along ``axis`` (vectorised for
    scipy.stats.bootstrap); equal to sklearn.metrics.mutual_info_score on one pair,
    which the first assertion of the test checks."""
    x, y = np.moveaxis(np.asarray(x), axis, -1), np.moveaxis(np.asarray(y), axis, -1)
    joint = ((x[..., None, None] == np.arange(k)[:, None]) & (y[..., None, None] == np.arange(k))).sum(axis=-3)
    p = joint / joint.sum(axis=(-2, -1), keepdims=True)
    px, py = p.sum(axis=-1, keepdims=True), p.sum(axis=-2, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(p > 0, p * np.log(p / (px * py)), 0.0).sum(axis=(-2, -1))


def test_mi_interval_matches_scipy_paired_bootstrap(rng):
    # Reference: scipy.stats.bootstrap(paired=True, method="percentile") over the
    # rows, with the plug-in MI as statistic (itself checked against
    # sklearn.metrics.mutual_info_score here).
    x = rng.integers(0, 3, size=200)
    y = (x + rng.integers(0, 2, size=200)) % 3
    assert _plugin_mi_nats_of_samples(x, y) == pytest.approx(mutual_info_score(x, y), rel=1e-12)
    table = np.zeros((3, 3))
    np.add.at(table, (x, y), 1)
    ref = scipy.stats.bootstrap((x, y), _plugin_mi_nats_of_samples, paired=True, vectorized=True, n_resamples=3000,
                                method="percentile", random_state=np.random.default_rng(0))
    low, high = bootstrap_mi_ci(table, estimator="plugin", base="nats", n_boot=3000, seed=1,
                                method="percentile")
    assert low == pytest.approx(ref.confidence_interval.low, abs=0.015)
    assert high == pytest.approx(ref.confidence_interval.high, abs=0.015)


def test_mi_interval_of_a_strong_dependence_excludes_zero():
    low, high = bootstrap_mi_ci([[45, 5], [5, 45]], seed=0)
    # plug-in MI of this table in bits (closed form: 1 - H2(0.1) = 0.531)
    assert low < 1 - (-(0.1 * math.log2(0.1) + 0.9 * math.log2(0.9))) < high
    assert low > 0.2


def test_corrected_mi_interval_may_go_below_zero_under_independence():
    # Miller-Madow MI subtracts the expected plug-in bias; near independence the
    # estimate and its interval can be negative, and are not clipped.
    low, high = bootstrap_mi_ci(np.full((4, 4), 3), estimator="miller_madow", seed=0)
    assert low < 0


# --------------------------------------------------------------------------- permutation test

def test_permutation_p_value_matches_scipy_exact_enumeration():
    # Reference: scipy.stats.permutation_test((y,), ..., permutation_type="pairings",
    # n_resamples=inf) enumerates all 7! orders of y against the fixed x: the exact
    # p-value of the plug-in MI (statistic checked against
    # sklearn.metrics.mutual_info_score first).  Ours, from 4999 random
    # permutations, is within 4 binomial standard errors of it.
    x = np.array([0, 0, 1, 1, 2, 2, 2])
    y = np.array([0, 1, 1, 1, 2, 2, 0])
    assert _plugin_mi_nats_of_samples(x, y) == pytest.approx(mutual_info_score(x, y), rel=1e-12)

    def statistic(yy, axis=-1):
        yy = np.moveaxis(yy, axis, -1)
        return _plugin_mi_nats_of_samples(np.broadcast_to(x, yy.shape), yy)

    exact = scipy.stats.permutation_test((y,), statistic, permutation_type="pairings", vectorized=True,
                                         n_resamples=np.inf, alternative="greater").pvalue
    res = permutation_test_mi(x, y, n_permutations=4999, seed=0)
    se = math.sqrt(exact * (1 - exact) / 4999)
    assert 0.01 < exact < 0.9  # an informative case
    assert res.p_value == pytest.approx(exact, abs=4 * se + 1 / 5000)


def test_statistic_is_plugin_mi_of_sklearn(rng):
    # Reference: sklearn.metrics.mutual_info_score (nats); ours in bits by default.
    x = rng.integers(0, 4, size=300)
    y = (x * 2 + rng.integers(0, 3, size=300)) % 5
    res = permutation_test_mi(x, y, n_permutations=19, seed=0)
    assert res.statistic == pytest.approx(mutual_info_score(x, y) / math.log(2), rel=1e-10)
    assert permutation_test_mi(x, y, n_permutations=19, seed=0, base="nats").statistic == pytest.approx(
        mutual_info_score(x, y), rel=1e-10
    )


def test_permutation_p_value_agrees_with_the_g_test_in_large_samples(rng):
    # Reference: scipy.stats.chi2_contingency(lambda_="log-likelihood",
    # correction=False), the G-test (Wilks 1938): G = 2 N I ~ chi2((r-1)(c-1)).
    # A weak dependence, n = 3000, 3 x 3: the two p-values agree to Monte Carlo error.
    n = 3000
    x = rng.integers(0, 3, size=n)
    y = np.where(rng.random(n) < 0.05, x, rng.integers(0, 3, size=n))
    table = np.zeros((3, 3))
    np.add.at(table, (x, y), 1)
    g_p = scipy.stats.chi2_contingency(table, correction=False, lambda_="log-likelihood")[1]
    res = permutation_test_mi(x, y, n_permutations=1999, seed=1)
    assert 0.0005 < g_p < 0.5  # the case is informative: neither trivial nor hopeless
    assert res.p_value == pytest.approx(g_p, abs=max(0.02, 4 * math.sqrt(g_p * (1 - g_p) / 1999)))


def test_null_mean_is_the_chance_level_of_plugin_mi(rng):
    # Under independence E[G] ~ dof, so E[I_plugin] ~ (r-1)(c-1) / (2N) nats
    # (chi-square asymptotics of the G statistic, Wilks 1938).
    n = 2000
    x = rng.integers(0, 4, size=n)
    y = rng.integers(0, 5, size=n)
    res = permutation_test_mi(x, y, n_permutations=999, seed=2, base="nats")
    assert res.null_mean == pytest.approx(3 * 4 / (2 * n), rel=0.1)


def test_p_value_follows_the_plus_one_convention():
    # Phipson & Smyth (2010): p = (b + 1)/(m + 1), never 0.  A perfect dependence
    # with many distinct values: no permutation reaches it, so p = 1/(m+1).
    x = np.arange(40) % 8
    res = permutation_test_mi(x, x, n_permutations=99, seed=0)
    assert res.p_value == pytest.approx(1 / 100)
    # A constant column: every permutation ties the observed MI of 0, so p = 1.
    tied = permutation_test_mi(np.zeros(30, dtype=int), x[:30], n_permutations=49, seed=0)
    assert tied.p_value == 1.0 and tied.statistic == 0.0


def test_p_values_are_roughly_uniform_under_independence(rng):
    # Validity of a permutation test (common practice): under H0, P(p <= 0.1) ~ 0.1.
    hits = 0
    for i in range(60):
        x = rng.integers(0, 3, size=80)
        y = rng.integers(0, 3, size=80)
        hits += permutation_test_mi(x, y, n_permutations=99, seed=i).p_value <= 0.1
    assert 1 <= hits <= 14


def test_sparse_codes_are_compacted():
    x = np.array([0, 10**6, 0, 10**6, 5, 5])
    y = np.array([1, 2, 1, 2, 3, 3])
    assert permutation_test_mi(x, y, n_permutations=9, seed=0).statistic == pytest.approx(math.log2(3))


# --------------------------------------------------------------------------- bad input

@pytest.mark.parametrize(
    ("kwargs", "error", "match"),
    [
        ({"level": 1.0}, ValueError, "level"),
        ({"level": 0}, ValueError, "level"),
        ({"level": "95%"}, TypeError, "level"),
        ({"n_boot": 0}, ValueError, "n_boot"),
        ({"n_boot": 2.5}, TypeError, "n_boot"),
        ({"seed": -1}, ValueError, "seed"),
        ({"seed": "abc"}, TypeError, "seed"),
        ({"estimator": "nope"}, ValueError, "estimator='nope'"),
        ({"alpha": 0.5}, ValueError, "alpha"),
        ({"base": 1}, ValueError, "base"),
    ],
)
def test_bootstrap_options_are_checked(kwargs, error, match):
    with pytest.raises(error, match=match):
        bootstrap_entropy_ci([3, 4], **kwargs)
    with pytest.raises(error, match=match):
        bootstrap_mi_ci([[3, 4], [1, 2]], **kwargs)


@pytest.mark.parametrize(("counts", "match"), [([0, 0], "no observations"), ([], "empty"), ([1, -2], "negative"),
                                                ([1.5, 2], "non-integer"), ([[1, 2]], "1-D")])
def test_bootstrap_counts_are_checked(counts, match):
    with pytest.raises(ValueError, match=match):
        bootstrap_entropy_ci(counts)


def test_bootstrap_table_must_be_2d():
    with pytest.raises(ValueError, match="table must be a 2-D table"):
        bootstrap_mi_ci([1, 2, 3])


@pytest.mark.parametrize(
    ("x", "y", "error", "match"),
    [
        ([0.5, 1.0, 2.0], [0, 1, 2], TypeError, "x_codes must hold integer codes"),
        ([0, 1, 2], [0, -1, 2], ValueError, "y_codes contains negative"),
        ([0, 1, 2], [0, 1], ValueError, "same length"),
        ([[0, 1]], [[0, 1]], ValueError, "x_codes must be a 1-D"),
        ([0], [1], ValueError, "at least 2"),
    ],
)
def test_permutation_inputs_are_checked(x, y, error, match):
    with pytest.raises(error, match=match):
        permutation_test_mi(x, y, n_permutations=9)


def test_permutation_count_is_checked():
    with pytest.raises(ValueError, match="n_permutations"):
        permutation_test_mi([0, 1], [1, 0], n_permutations=0)


def test_inputs_are_not_modified():
    x = np.array([0, 1, 1, 2, 0, 2])
    y = np.array([1, 1, 0, 2, 2, 0])
    xc, yc = x.copy(), y.copy()
    permutation_test_mi(x, y, n_permutations=9, seed=0)
    counts = np.array([3, 1, 0])
    bootstrap_entropy_ci(counts, seed=0)
    np.testing.assert_array_equal(x, xc)
    np.testing.assert_array_equal(y, yc)
    np.testing.assert_array_equal(counts, [3, 1, 0])


# --------------------------------------------------------------------------- centred intervals

@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen", "grassberger"])
def test_centred_interval_always_contains_its_estimate(estimator):
    # Undersampled long tail: the percentile interval of these estimates lies wholly on
    # one side of the estimate (resampling loses rare symbols); the centred interval is
    # the percentile interval shifted by the bootstrap bias estimate (Efron &
    # Tibshirani 1993, ch. 10) and must contain the estimate by construction.
    from infoscope.estimators.entropy import entropy_from_counts

    counts = np.r_[np.full(20, 1), np.full(5, 40)]
    estimate = entropy_from_counts(counts, estimator=estimator)
    low, high = bootstrap_entropy_ci(counts, estimator=estimator, n_boot=300, seed=7)
    assert low <= estimate <= high
    p_low, p_high = bootstrap_entropy_ci(counts, estimator=estimator, n_boot=300, seed=7, method="percentile")
    # same spread: a translation of the percentile interval
    assert high - low == pytest.approx(p_high - p_low, rel=1e-9)


def test_centred_mi_interval_contains_a_near_zero_corrected_estimate(rng):
    # Independent X, Y with many levels: the Miller-Madow MI is near 0 and its
    # percentile interval can sit wholly above it; the centred one contains it.
    from infoscope.estimators.information import mutual_information_from_table

    x = rng.integers(0, 30, size=2000)
    y = rng.integers(0, 30, size=2000)
    table = np.zeros((30, 30))
    np.add.at(table, (x, y), 1)
    estimate = mutual_information_from_table(table, estimator="miller_madow")
    low, high = bootstrap_mi_ci(table, n_boot=200, seed=3)
    assert low <= estimate <= high


def test_unknown_interval_method_lists_the_valid_ones():
    with pytest.raises(ValueError, match="method='bca'.*'centred', 'percentile'"):
        bootstrap_entropy_ci([3, 4], method="bca")


# ------------------------------------------------------------------ large alphabets
from infoscope.estimators.entropy import entropy_nats  # noqa: E402
from infoscope.estimators.resampling import (  # noqa: E402
    _fingerprint_entropy_nats,
    _grouped_blocks,
    _grouped_draws,
    _use_grouped,
)

# 2000 symbols seen once, 500 twice, 100 five times: K = 2600 occupied cells,
# N = 3500 rows -- above the grouped-resampling threshold
LARGE = np.concatenate([np.ones(2000, np.int64), np.full(500, 2), np.full(100, 5), np.zeros(40, np.int64)])


def test_large_alphabets_take_the_grouped_draw_small_ones_do_not():
    assert _use_grouped(LARGE, int(LARGE.sum()))
    assert not _use_grouped(np.ones(1999, np.int64), 1999)          # too few cells
    assert not _use_grouped(np.full(5000, 10), 50_000)              # 10 rows per cell: dense


def test_grouped_draw_of_singletons_follows_the_occupancy_law():
    # N rows resampled from N distinct rows: each cell's count is Binomial(N, 1/N),
    # so the expected number of cells seen j times is N * binom.pmf(j, N, 1/N)
    # (classical occupancy problem; Feller, An Introduction to Probability Theory,
    # vol. 1, 3rd ed. 1968, ch. IV -- from memory); checked with scipy.stats.binom.
    n_cells, reps = 5000, 200
    fps = np.array([np.bincount(g[0], minlength=8)[:8]
                    for g in _grouped_draws(np.random.default_rng(4), np.ones(n_cells, np.int64), n_cells, reps)])
    expected = n_cells * scipy.stats.binom.pmf(np.arange(8), n_cells, 1 / n_cells)
    # per replicate F_0 has sd ~ sqrt(N e^-1 (1 - 2 e^-1)) ~ 22 (occupancy variance);
    # the mean of 200 has sd ~ 1.6: 8 is five of them
    np.testing.assert_allclose(fps.mean(axis=0)[:4], expected[:4], atol=8)
    assert (np.array([sum(int(c.sum()) for c in g) for g in
                      _grouped_draws(np.random.default_rng(5), LARGE, int(LARGE.sum()), 20)]) == LARGE.sum()).all()


def test_grouped_draw_keeps_each_cells_expected_count():
    # E[n*_i] = n_i under the multinomial bootstrap (Efron 1979): groups of 1, 2 and 5
    draws = [g for g in _grouped_draws(np.random.default_rng(6), LARGE, int(LARGE.sum()), 300)]
    for index, c in enumerate((1, 2, 5)):
        mean = np.mean([g[index].mean() for g in draws])
        assert mean == pytest.approx(c, rel=0.01)


@pytest.mark.parametrize(("estimator", "alpha"), [(e, None) for e in ENTROPY_ESTIMATORS if e != "dirichlet"]
                         + [("dirichlet", "jeffreys"), ("dirichlet", "minimax"), ("dirichlet", 2.0)])
def test_fingerprint_scoring_equals_the_estimator_kernels(estimator, alpha):
    # same seed, same draws: each replicate scored from its fingerprint equals the
    # per-cell kernel (ENTROPY_ESTIMATORS, checked against scipy / pyitlib / dit and the
    # published formulas in test_entropy_estimators.py) on the full K-cell vector,
    # the 40 never-observed cells included
    total = int(LARGE.sum())
    fast = _fingerprint_entropy_nats(np.random.default_rng(7), LARGE, total, 12, estimator, alpha)
    full = np.concatenate([entropy_nats(b, estimator, alpha)
                           for b in _grouped_blocks(np.random.default_rng(7), LARGE, total, 12)])
    np.testing.assert_allclose(fast, full, rtol=1e-12)


def _plugin_nats_of_rows(x, axis=-1):
    """Plug-in entropy (nats) of each resample of integer codes (for scipy.stats.bootstrap)."""
    x = np.sort(np.moveaxis(np.asarray(x), axis, -1), axis=-1)
    n = x.shape[-1]
    out = np.empty(x.shape[:-1])
    for idx in np.ndindex(*x.shape[:-1]):
        counts = np.diff(np.flatnonzero(np.diff(np.r_[-1, x[idx], -2]) != 0))
        out[idx] = -np.sum(counts / n * np.log(counts / n))
    return out


def test_grouped_interval_matches_scipy_bootstrap_of_the_rows():
    # Reference: scipy.stats.bootstrap(method="percentile") resampling the 3500 rows
    # themselves; our grouped count draw must give the same interval up to Monte Carlo
    # error (1000 replicates each; tolerance a quarter of the interval width).
    codes = np.repeat(np.arange(LARGE.size), LARGE)
    ref = scipy.stats.bootstrap((codes,), _plugin_nats_of_rows, n_resamples=1000, method="percentile",
                                confidence_level=0.95, random_state=np.random.default_rng(8), vectorized=True,
                                batch=100)
    lo, hi = bootstrap_entropy_ci(LARGE, estimator="plugin", base="nats", n_boot=1000, seed=9,
                                  method="percentile")
    width = ref.confidence_interval.high - ref.confidence_interval.low
    assert abs(lo - ref.confidence_interval.low) < width / 4
    assert abs(hi - ref.confidence_interval.high) < width / 4


@pytest.mark.parametrize("estimator", ["miller_madow", "chao_shen", "james_stein", "dirichlet", "grassberger"])
def test_grouped_and_multinomial_draws_give_the_same_interval(estimator, monkeypatch):
    # The two draws are the same distribution (n ~ Multinomial(N, n/N), Efron 1979);
    # the intervals differ by Monte Carlo error only (400 replicates; a third of the width)
    grouped = bootstrap_entropy_ci(LARGE, estimator=estimator, n_boot=400, seed=10, method="percentile")
    import infoscope.estimators.resampling as resampling

    monkeypatch.setattr(resampling, "_GROUPED_MIN_CELLS", 10**9)
    assert not resampling._use_grouped(LARGE, int(LARGE.sum()))
    multinomial = bootstrap_entropy_ci(LARGE, estimator=estimator, n_boot=400, seed=11, method="percentile")
    width = multinomial.high - multinomial.low
    assert width > 0
    assert abs(grouped.low - multinomial.low) < width / 3 and abs(grouped.high - multinomial.high) < width / 3


def test_fifty_thousand_singletons_interval_contains_the_closed_form():
    # the grouped draw of an ID-like column (its speed against numpy's multinomial
    # draw is measured in benchmarks/speed_guards.py, not here)
    n = np.ones(50_000, np.int64)
    low, high = bootstrap_entropy_ci(n, n_boot=200, seed=13)
    from infoscope.estimators.entropy import entropy_from_counts

    # Miller-Madow of N singletons: log2 N + (N - 1) / (2 N ln 2) bits (Miller 1955)
    estimate = entropy_from_counts(n)
    assert estimate == pytest.approx(math.log2(50_000) + 49_999 / (2 * 50_000 * math.log(2)), rel=1e-12)
    assert low <= estimate <= high and high - low < 0.1


# --------------------------------------------------------------------------- shared machinery
# The bootstrap of a table, the shuffle loop and the p-value rule live once in
# estimators/resampling.py and serve both the MI and the conditional-MI functions.

def test_shared_shuffle_loop_gives_the_plus_one_p_value_of_sklearn_statistics():
    # Reference: sklearn.metrics.mutual_info_score (nats) on every shuffled pairing,
    # p = (b + 1)/(m + 1) (Phipson & Smyth 2010).  The shuffles are the ones the test
    # draws: one generator, a single block of m rows of rng.permuted(tile(y)).
    rng = np.random.default_rng(11)
    x = rng.integers(0, 3, 120)
    y = (x + rng.integers(0, 4, 120)) % 4
    m = 199
    res = permutation_test_mi(x, y, n_permutations=m, seed=7, base="nats")
    shuffled = np.random.default_rng(7).permuted(np.tile(y, (m, 1)), axis=1)
    null = np.array([mutual_info_score(x, row) for row in shuffled])
    observed = mutual_info_score(x, y)
    exceed = int(np.count_nonzero(null >= observed - 1e-12 * (1 + observed)))
    assert res.statistic == pytest.approx(observed, rel=1e-12)
    assert res.p_value == (exceed + 1) / (m + 1)
    assert res.null_mean == pytest.approx(null.mean(), rel=1e-10)


def test_shared_shuffle_loop_serves_the_conditional_test_the_same_way():
    # Reference: I(X;Y|Z) = sum_z P(z) I(X;Y | Z=z) with sklearn.metrics.mutual_info_score
    # per stratum (Cover & Thomas 2006, eq. 2.60), on the within-stratum shuffles drawn
    # from the test's own generator; p = (b + 1)/(m + 1).
    cond = conditional
    rng = np.random.default_rng(12)
    z = rng.integers(0, 3, 150)
    x = (z + rng.integers(0, 2, 150)) % 3
    y = (z + rng.integers(0, 2, 150)) % 3
    m = 99

    def cmi(xv, yv, zv):
        return sum((zv == s).mean() * mutual_info_score(xv[zv == s], yv[zv == s]) for s in np.unique(zv))

    res = cond.conditional_permutation_test(x, y, z, n_permutations=m, seed=3, base="nats")
    order = np.argsort(z, kind="stable")
    xs, ys, zs = x[order], y[order], z[order]
    cuts = np.flatnonzero(np.diff(zs)) + 1
    shuffled = cond._shuffle_within(np.random.default_rng(3), xs, zs, np.r_[0, cuts], np.r_[cuts, zs.size], m)
    null = np.array([cmi(row, ys, zs) for row in shuffled])
    observed = cmi(x, y, z)
    exceed = int(np.count_nonzero(null >= observed - 1e-12 * (1 + observed)))
    assert res.statistic == pytest.approx(observed, rel=1e-10, abs=1e-14)
    assert res.p_value == (exceed + 1) / (m + 1)
    assert res.null_mean == pytest.approx(null.mean(), rel=1e-9, abs=1e-14)


def test_shared_table_bootstrap_draws_the_same_replicates_for_mi_and_cmi():
    # A conditional MI with a single stratum is the MI of the table (Cover & Thomas
    # 2006, eq. 2.60 with one value of Z); both functions draw their replicates through
    # the one table bootstrap, so with the same seed their intervals coincide.
    t = np.array([[30, 10, 5], [8, 25, 12]])
    for method in ("centred", "percentile"):
        two = bootstrap_mi_ci(t, estimator="plugin", seed=4, n_boot=120, method=method)
        three = conditional.bootstrap_cmi_ci(t[:, :, None], estimator="plugin", seed=4, n_boot=120, method=method)
        assert three.low == pytest.approx(two.low, rel=1e-12)
        assert three.high == pytest.approx(two.high, rel=1e-12)


@pytest.mark.parametrize(
    "call",
    [
        lambda: permutation_test_mi([0], [1]),
        lambda: conditional.conditional_permutation_test([0], [1], [0]),
    ],
)
def test_shared_permutation_inputs_name_every_column_when_too_short(call):
    with pytest.raises(ValueError, match=r"have 1 rows; a permutation test needs at least 2"):
        call()


@pytest.mark.parametrize(
    "call,match",
    [
        (lambda level: bootstrap_mi_ci([[5, 5], [5, 5]], level=level), "level"),
        (lambda level: bootstrap_entropy_ci([5, 5], level=level), "level"),
        (lambda level: intervals.mi_intervals_from_tables([[[5, 5], [5, 5]]], level=level), "level"),
        (lambda level: conditional.bootstrap_cmi_ci([[[5, 5], [5, 5]]], level=level), "level"),
    ],
)
def test_every_interval_checks_its_level_by_the_one_rule(call, match):
    # One rule (estimators/_checks.check_level) for every function that takes a level.
    for bad, error in ((1.0, ValueError), (0.0, ValueError), (True, TypeError), ("0.9", TypeError)):
        with pytest.raises(error, match=match):
            call(bad)


def test_every_pseudocount_and_jitter_is_checked_by_the_one_rule():
    # One rule (estimators/_checks.check_nonnegative): a finite number >= 0, not a bool.
    calls = {
        "pseudocount": [
            lambda v: divergence.as_distribution([1, 2], pseudocount=v),
            lambda v: divergence.psi([1, 2], [2, 1], pseudocount=v),
            lambda v: two_sample.divergence_rows([1, 2], [2, 1], pseudocount=v),
        ],
        "jitter": [lambda v: continuous._check_jitter(v)],
    }
    for name, fns in calls.items():
        for fn in fns:
            for bad, error in ((-1.0, ValueError), (math.inf, ValueError), (math.nan, ValueError),
                               (True, TypeError), ("1", TypeError)):
                with pytest.raises(error, match=name):
                    fn(bad)
