"""NSB estimator: the integral, its pieces and its statistical behaviour.

Sources: Nemenman, Shafee & Bialek (2002), NIPS 14 (the prior d xi / d beta, the
posterior over beta and E[H | n, beta]); Wolpert & Wolf (1995), Phys. Rev. E 52
(posterior moments of H under a Dirichlet, from memory -- hence the Monte Carlo
checks below); scipy.integrate.quad and scipy.special as the reference numerics;
numpy's Dirichlet sampler for Monte Carlo.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.stats
from scipy.integrate import quad
from scipy.special import digamma, gammaln, polygamma

from infoscope.estimators.entropy import entropy_from_counts, entropy_of_count_rows
from infoscope.estimators.nsb import (
    _dxi_dbeta,
    _log_rising,
    _Posterior,
    _trigamma,
    nsb_posterior,
)


# --------------------------------------------------------------------------- a naive reference

def _naive_nsb(counts, with_std=True):
    """NSB from the 2002 paper, term by term over all K cells, integrated over beta
    (not ln beta) by scipy.integrate.quad.  Deliberately simple and independent of
    the package's code (no grouping of equal counts, no series, no log-space grid)."""
    n = np.asarray(counts, dtype=float)
    K, N = n.size, n.sum()

    def log_rho(beta):
        prior = K * polygamma(1, K * beta + 1) - polygamma(1, beta + 1)
        return (gammaln(K * beta) - gammaln(N + K * beta)
                + np.sum(gammaln(n + beta) - gammaln(beta)) + math.log(prior))

    def e_h(beta):
        a = n + beta
        A = a.sum()
        return digamma(A + 1) - np.sum(a / A * digamma(a + 1))

    def e_h2(beta):
        # Wolpert & Wolf (1995) second moment, written as explicit double sums.
        a = n + beta
        A = a.sum()
        d2, t2 = digamma(A + 2), polygamma(1, A + 2)
        total = 0.0
        for i in range(K):
            for j in range(K):
                if i == j:
                    total += a[i] * (a[i] + 1) * ((digamma(a[i] + 2) - d2) ** 2 + polygamma(1, a[i] + 2) - t2)
                else:
                    total += a[i] * a[j] * ((digamma(a[i] + 1) - d2) * (digamma(a[j] + 1) - d2) - t2)
        return total / (A * (A + 1))

    grid = np.exp(np.linspace(math.log(1e-6), math.log(1e6), 400))
    logs = np.array([log_rho(b) for b in grid])
    ref, peak = logs.max(), grid[logs.argmax()]

    def integral(g):
        f = lambda b: math.exp(log_rho(b) - ref) * g(b)  # noqa: E731
        opts = dict(epsabs=0.0, epsrel=1e-11, limit=400)
        return quad(f, 0.0, peak, **opts)[0] + quad(f, peak, np.inf, **opts)[0]

    z = integral(lambda b: 1.0)
    mean = integral(e_h) / z
    if not with_std:
        return mean, math.nan
    second = integral(e_h2) / z
    return mean, math.sqrt(second - mean**2)


@pytest.mark.parametrize(
    "counts",
    [[3, 1, 0], [5, 5], [1, 1, 1, 1, 0, 0, 0, 0, 0, 0], [10, 0, 0, 0], [2, 1, 1, 0, 0, 0], [1, 0], [7, 2, 2, 1, 1, 1]],
)
def test_nsb_matches_direct_quadrature_over_beta(counts):
    # Reference: the paper's integrals done by scipy.integrate.quad (see _naive_nsb).
    mean, std = _naive_nsb(counts)
    post = nsb_posterior(counts, base="nats")
    assert post.entropy == pytest.approx(mean, rel=1e-8)
    assert post.std == pytest.approx(std, rel=1e-6)


@pytest.mark.parametrize(
    "counts",
    [[1000, 0], [100000, 1] + [0] * 20, [500000, 500000], [1] + [0] * 1999, [1] * 50 + [0] * 1950, [1] * 300],
    ids=["all-same-K2", "one-stray-K22", "huge-N-K2", "N1-K2000", "50-singletons-K2000", "all-distinct-K300"],
)
def test_nsb_matches_direct_quadrature_in_extreme_cases(counts):
    # Same reference as above (scipy.integrate.quad over beta), for the cases where
    # the integrand is sharp, one-sided or far out in beta.
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # quad's round-off notices at epsrel=1e-11
        mean, _ = _naive_nsb(counts, with_std=False)
    assert nsb_posterior(counts, base="nats").entropy == pytest.approx(mean, rel=1e-9, abs=1e-12)


def test_nsb_matches_direct_quadrature_when_the_posterior_is_sharp():
    # Many counts in many cells make the posterior over ln(beta) narrow (width about
    # 1/sqrt(K)); reference as above, scipy.integrate.quad over beta.
    import warnings

    counts = np.random.default_rng(3).multinomial(10**7, np.random.default_rng(4).dirichlet(np.full(300, 0.3)))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        mean, _ = _naive_nsb(counts, with_std=False)
    assert nsb_posterior(counts, base="nats").entropy == pytest.approx(mean, rel=1e-11)


# --------------------------------------------------------------------------- the pieces

@pytest.mark.parametrize("K", [2, 10, 1000])
def test_prior_mean_entropy_xi_matches_dirichlet_monte_carlo(K, rng):
    # NSB (2002): xi(beta) = E[H | beta] = psi(K beta + 1) - psi(beta + 1) under a
    # symmetric Dirichlet(beta).  Reference: numpy's Dirichlet sampler, 4000 draws.
    for beta in (0.05, 1.0, 5.0):
        p = rng.dirichlet(np.full(K, beta), size=4000)
        h = scipy.stats.entropy(p, axis=1)
        xi = digamma(K * beta + 1) - digamma(beta + 1)
        assert h.mean() == pytest.approx(xi, abs=5 * h.std() / math.sqrt(h.size) + 1e-9)


@pytest.mark.parametrize("K", [2, 7, 10**6])
def test_prior_density_is_the_derivative_of_xi(K):
    # Closed form check: d/d beta [psi(K beta + 1) - psi(beta + 1)] by central
    # differences of scipy.special.digamma, across the switch to the asymptotic series.
    for beta in [1e-4, 0.3, 2.0, 50.0, 999.0, 1001.0, 3e4, 1e6]:
        h = beta * 1e-5
        xi = lambda b: digamma(K * b + 1) - digamma(b + 1)  # noqa: E731
        numeric = (xi(beta + h) - xi(beta - h)) / (2 * h)
        assert _dxi_dbeta(np.array([beta]), K)[0] == pytest.approx(numeric, rel=2e-4)


@pytest.mark.parametrize("K", [2, 7, 10**6])
def test_prior_density_series_joins_polygamma(K):
    # Reference: scipy.special.polygamma(1, .) on both sides of the switch to the
    # asymptotic series at beta = 1e3 (direct evaluation there still has ~1e-12
    # relative accuracy, the cancellation costing about 3 digits).
    for beta in [900.0, 999.9, 1000.1, 1200.0]:
        direct = K * polygamma(1, K * beta + 1) - polygamma(1, beta + 1)
        assert _dxi_dbeta(np.array([beta]), K)[0] == pytest.approx(direct, rel=1e-10)


def test_trigamma_matches_scipy_polygamma():
    # Reference: scipy.special.polygamma(1, x).
    x = np.concatenate([np.linspace(1, 40, 500), np.exp(np.linspace(0, 50, 200))])
    np.testing.assert_allclose(_trigamma(x), polygamma(1, x), rtol=5e-15)


@pytest.mark.parametrize("x", [0.01, 3.0, 49.9, 50.0, 9999.0, 1e4, 2.5e4, 1e8, 1e15])
@pytest.mark.parametrize("n", [0, 1, 2, 7, 40])
def test_log_rising_factorial_matches_the_product_form(x, n):
    # Closed form: ln Gamma(x + n) - ln Gamma(x) = sum_{j < n} ln(x + j) for whole n.
    exact = math.fsum(math.log(x + j) for j in range(n))
    assert _log_rising(np.array([x]), np.array([float(n)]))[0] == pytest.approx(exact, rel=1e-13, abs=1e-13)


@pytest.mark.parametrize("counts", [[3, 1, 0, 0], [10, 5, 1, 0, 0, 0, 0, 0]])
@pytest.mark.parametrize("beta", [0.1, 1.0])
def test_posterior_moments_of_h_match_dirichlet_monte_carlo(counts, beta, rng):
    # E[H | n, beta] and E[H^2 | n, beta] under the Dirichlet(n + beta) posterior
    # (NSB 2002; Wolpert & Wolf 1995) against numpy's Dirichlet sampler, 20000 draws.
    post = _Posterior.of_counts(np.array(counts, dtype=float))
    mean, second = post.moments(np.array([math.log(beta)]))
    p = rng.dirichlet(np.array(counts, dtype=float) + beta, size=20000)
    h = scipy.stats.entropy(p, axis=1)
    se = h.std() / math.sqrt(h.size)
    assert mean[0] == pytest.approx(h.mean(), abs=5 * se)
    assert second[0] == pytest.approx((h**2).mean(), abs=5 * (h**2).std() / math.sqrt(h.size))


# --------------------------------------------------------------------------- limits and edge cases

def test_nsb_approaches_miller_madow_when_n_is_much_larger_than_k(rng):
    # Asymptotics (NSB 2002, and the common first-order bias -(K-1)/(2N)): for
    # N >> K every consistent bias-corrected estimate agrees to O(1/N^2).
    p = np.array([0.4, 0.2, 0.15, 0.1, 0.08, 0.04, 0.02, 0.01])
    counts = rng.multinomial(200_000, p)
    nsb = entropy_from_counts(counts, estimator="nsb", base="nats")
    assert nsb == pytest.approx(entropy_from_counts(counts, estimator="miller_madow", base="nats"), abs=1e-4)
    assert nsb == pytest.approx(entropy_from_counts(counts, estimator="plugin", base="nats"), abs=1e-3)


def test_posterior_std_shrinks_like_one_over_sqrt_n(rng):
    # Common practice: the sampling s.d. of H-hat is about sqrt(Var[-ln p]) / sqrt(N).
    p = np.array([0.5, 0.25, 0.125, 0.125])
    counts = rng.multinomial(40_000, p)
    delta_sd = math.sqrt(np.sum(p * np.log(p) ** 2) - scipy.stats.entropy(p) ** 2) / math.sqrt(40_000)
    assert nsb_posterior(counts, base="nats").std == pytest.approx(delta_sd, rel=0.1)


def test_all_same_sample_is_small_and_decreases_with_n():
    values = [nsb_posterior([n, 0, 0, 0, 0], base="nats").entropy for n in (5, 50, 500)]
    assert all(v > 0 for v in values)
    assert values[0] > values[1] > values[2]
    assert values[2] < 0.05


def test_all_distinct_sample_with_huge_alphabet_is_finite_and_above_plugin():
    # 1000 singletons among K = 10**9 cells: grouped by count value, so this is fast.
    counts = np.zeros(10**6)
    counts[:1000] = 1
    post = nsb_posterior(counts, base="nats")
    assert math.isfinite(post.entropy) and math.isfinite(post.std)
    assert post.entropy > math.log(1000)
    assert post.entropy <= math.log(counts.size)


def test_nsb_of_a_single_possible_symbol_is_zero():
    assert nsb_posterior([9]) == (0.0, 0.0, pytest.approx(float("nan"), nan_ok=True))


def test_nsb_units_and_dispatch_agree():
    counts = [6, 3, 2, 1, 0, 0]
    nats = nsb_posterior(counts, base="nats")
    bits = nsb_posterior(counts, base=2)
    assert bits.entropy == pytest.approx(nats.entropy / math.log(2), rel=1e-13)
    assert bits.std == pytest.approx(nats.std / math.log(2), rel=1e-13)
    assert entropy_from_counts(counts, estimator="nsb") == pytest.approx(bits.entropy, rel=1e-13)
    rows = entropy_of_count_rows([counts, counts[::-1]], estimator="nsb")
    np.testing.assert_allclose(rows, [bits.entropy] * 2, rtol=1e-12)


@pytest.mark.parametrize(("counts", "match"), [([], "empty"), ([0, 0], "no observations"), ([1, -1], "negative"),
                                                ([[1, 2]], "1-D"), ([0.5, 1], "non-integer")])
def test_nsb_bad_input_is_rejected(counts, match):
    with pytest.raises(ValueError, match=match):
        nsb_posterior(counts)


# --------------------------------------------------------------------------- statistics

def test_nsb_has_smaller_error_than_plugin_when_undersampled(rng):
    # Seeded simulation with known truth (the undersampled regime NSB 2002 targets):
    # K = 100, N = 30, p drawn from a Dirichlet(1) and, separately, a Zipf law.
    K, N, reps = 100, 30, 30
    for kind in ("dirichlet", "zipf"):
        errors = {"plugin": [], "miller_madow": [], "nsb": []}
        for _ in range(reps):
            if kind == "dirichlet":
                p = rng.dirichlet(np.ones(K))
            else:
                p = 1.0 / np.arange(1, K + 1)
                p /= p.sum()
            truth = scipy.stats.entropy(p)
            counts = rng.multinomial(N, p)
            for e in errors:
                errors[e].append(entropy_from_counts(counts, estimator=e, base="nats") - truth)
        mae = {e: np.mean(np.abs(v)) for e, v in errors.items()}
        assert mae["nsb"] < 0.5 * mae["plugin"], (kind, mae)
        assert mae["nsb"] < mae["miller_madow"], (kind, mae)


# --------------------------------------------------------------------------- properties

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

small_counts = st.lists(st.integers(min_value=0, max_value=40), min_size=2, max_size=10).filter(lambda c: sum(c) > 0)


@settings(max_examples=25)
@given(small_counts)
def test_nsb_is_a_posterior_mean_so_it_lies_between_zero_and_log_k(counts):
    # H(p) is in [0, ln K] for every p on the simplex, hence so is any posterior mean.
    post = nsb_posterior(counts, base="nats")
    assert 0.0 <= post.entropy <= math.log(len(counts)) + 1e-12
    assert 0.0 <= post.std <= math.log(len(counts))


@settings(max_examples=15)
@given(small_counts, st.randoms(use_true_random=False))
def test_nsb_bits_equal_nats_over_ln2_and_order_does_not_matter(counts, random):
    shuffled = list(counts)
    random.shuffle(shuffled)
    nats = nsb_posterior(counts, base="nats").entropy
    assert nsb_posterior(shuffled, base=2).entropy == pytest.approx(nats / math.log(2), rel=1e-9)


@settings(max_examples=15)
@given(small_counts, st.integers(min_value=1, max_value=20))
def test_nsb_depends_on_the_declared_alphabet(counts, extra):
    # The prior is over K cells: declaring more (empty) cells raises the estimate.
    assert nsb_posterior(list(counts) + [0] * extra).entropy > nsb_posterior(counts).entropy


# --------------------------------------------------------------------------- fingerprints
from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from infoscope.estimators.entropy import ENTROPY_ESTIMATORS, count_fingerprint  # noqa: E402
from infoscope.estimators.nsb import nsb_fingerprint_nats, nsb_fingerprints_nats, nsb_posterior_nats  # noqa: E402


@settings(max_examples=15, deadline=None)
@given(st.lists(st.lists(st.sampled_from([0, 0, 1, 1, 2, 3, 8]), min_size=12, max_size=12)
                .filter(lambda c: sum(c) > 0), min_size=1, max_size=4))
def test_batched_nsb_equals_one_integral_per_vector(rows):
    # Reference: the per-vector NSB kernel (ENTROPY_ESTIMATORS["nsb"], checked above
    # against the paper's formulas, dit-free closed forms and Monte Carlo); the batch
    # runs the same grid / multisection / Gauss-Legendre steps for all rows at once.
    counts = np.array(rows, dtype=float)
    values = np.arange(9.0)
    mult = np.stack([np.bincount(r.astype(int), minlength=9) for r in counts]).astype(float)
    batched = nsb_fingerprints_nats(values, mult, 12, counts.sum(axis=1))
    per_cell = ENTROPY_ESTIMATORS["nsb"](counts)
    np.testing.assert_allclose(batched, per_cell, rtol=1e-12)
    for row, got in zip(counts, batched):
        v, m = count_fingerprint(row)
        assert got == pytest.approx(nsb_fingerprint_nats(v, m, 12, row.sum(), with_std=False)[0], rel=1e-12)


def test_nsb_of_a_fingerprint_is_the_nsb_of_its_vector():
    # 100,000 singletons and a few repeats over K = 150,000 cells: the fingerprint has
    # 4 entries; the posterior (mean, std, beta_map) is the one of the full vector
    counts = np.concatenate([np.ones(100_000), np.full(2_000, 3.0), np.zeros(47_999), [40.0]])
    v, m = count_fingerprint(counts)
    assert v.tolist() == [0.0, 1.0, 3.0, 40.0]
    got = nsb_fingerprint_nats(v, m, counts.size, counts.sum())
    assert got == pytest.approx(nsb_posterior_nats(counts), rel=1e-12)


def test_a_stack_of_vectors_is_integrated_together_with_the_same_numbers(rng):
    # the stacked kernel (bootstrap replicates, pair tables of one shape) against the
    # one-vector path, and a few rows against the paper's integrals by scipy.integrate.quad
    from infoscope.estimators.entropy import ENTROPY_ESTIMATORS
    from infoscope.estimators.nsb import nsb_counts_nats

    for K, N, B in [(2, 10, 12), (4, 50, 40), (16, 300, 60), (32, 5, 30), (9, 2000, 25)]:
        stack = rng.multinomial(N, rng.dirichlet(np.full(K, 0.5)), size=B).astype(float)
        one = np.array([nsb_posterior_nats(row, with_std=False)[0] for row in stack])
        np.testing.assert_allclose(ENTROPY_ESTIMATORS["nsb"](stack), one, rtol=1e-12, atol=0)
        np.testing.assert_allclose(nsb_counts_nats(stack), one, rtol=1e-12, atol=0)
        np.testing.assert_allclose(ENTROPY_ESTIMATORS["nsb"](stack.reshape(B, 1, K))[:, 0], one, rtol=1e-12)
    for row in ([3, 1, 0], [7, 2, 2, 1, 1, 1]):
        got = nsb_counts_nats(np.array([row, row[::-1]], dtype=float))
        assert got == pytest.approx([_naive_nsb(row, with_std=False)[0]] * 2, rel=1e-8)
