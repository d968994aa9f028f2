"""Tests of the nearest-neighbour estimators for continuous data.

Every check names its outside source: a closed form, a published equation, or a
reference library call.  Tolerances of the statistical checks are set from the
sampling spread of the estimator, measured once over 30 seeded repetitions at the
sample size used (quoted beside each check): about 4 standard deviations, so a
correct estimator passes and a wrong formula (e.g. a missing digamma term, an
off-by-one count, a radius/diameter mix-up, which move the estimate by 0.1 nats or
more) fails.  All data are seeded.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import integrate, stats
from scipy.special import digamma

from infoscope import DataQualityWarning, SmallSampleWarning
from infoscope.estimators.continuous import (
    differential_entropy,
    ksg_mutual_information,
    mixed_mutual_information,
)

LN2 = math.log(2.0)


def gaussian_pair(rng, n, rho):
    x = rng.normal(size=n)
    y = rho * x + math.sqrt(1.0 - rho**2) * rng.normal(size=n)
    return x, y


# ----------------------------------------------------------------------------
# Differential entropy: closed forms
# ----------------------------------------------------------------------------
@pytest.mark.parametrize("metric", ["chebyshev", "euclidean"])
def test_entropy_of_gaussian_matches_closed_form(rng, metric):
    # Closed form: h(N(0, s^2)) = 1/2 ln(2 pi e s^2) nats (Cover & Thomas 2006,
    # Elements of Information Theory, 2nd ed., Ch. 8 -- from memory).
    # Spread of the estimate at n=4000, k=3: sd 0.015 nats -> tolerance 0.06.
    sigma = 2.5
    x = rng.normal(scale=sigma, size=4000)
    truth = 0.5 * math.log(2 * math.pi * math.e * sigma**2)
    assert differential_entropy(x, base="nats", metric=metric) == pytest.approx(truth, abs=0.06)


@pytest.mark.parametrize("metric", ["chebyshev", "euclidean"])
def test_entropy_of_multivariate_gaussian_matches_closed_form(rng, metric):
    # Closed form: h(N(0, C)) = 1/2 ln((2 pi e)^d det C) (Cover & Thomas 2006, Thm 8.4.1,
    # from memory).  Spread at n=4000, d=3: mean -0.02, sd 0.027 nats -> tolerance 0.1.
    cov = np.array([[2.0, 0.5, 0.3], [0.5, 1.0, 0.2], [0.3, 0.2, 0.5]])
    x = rng.multivariate_normal(np.zeros(3), cov, size=4000)
    truth = 0.5 * math.log((2 * math.pi * math.e) ** 3 * np.linalg.det(cov))
    assert differential_entropy(x, base="nats", metric=metric) == pytest.approx(truth, abs=0.1)


def test_entropy_of_uniform_is_log_width(rng):
    # Closed form: h(U[0, a]) = ln a.  Spread at n=4000: sd 0.010 nats -> tolerance 0.04.
    a = 3.0
    x = rng.uniform(0.0, a, size=4000)
    assert differential_entropy(x, base="nats") == pytest.approx(math.log(a), abs=0.04)


def test_entropy_matches_dit_knn_estimator():
    # Reference library: dit.inference.differential_entropy_knn(data, k=4) -- the same
    # estimator, maximum norm, bits, after adding N(0, 1e-10) noise from the global
    # np.random (seeded here).  Noise of 1e-10 moves ln(radius) by ~1e-9 at most.
    from dit import inference as dit
    data = np.random.default_rng(11).normal(size=(1500, 2)) @ np.array([[1.0, 0.4], [0.0, 0.7]])
    np.random.seed(0)
    expected = dit.differential_entropy_knn(data, k=4)
    assert differential_entropy(data, k=4, base=2) == pytest.approx(expected, abs=1e-7)


def test_entropy_agrees_with_scipy_spacing_estimator(rng):
    # Reference library: scipy.stats.differential_entropy (a spacing estimator,
    # Vasicek 1976 / Ebrahimi et al. 1994): a different estimator of the same truth,
    # so only a loose agreement is expected (both within ~0.03 nats of the truth here).
    x = rng.normal(size=3000)
    theirs = stats.differential_entropy(x)
    assert differential_entropy(x, base="nats") == pytest.approx(theirs, abs=0.06)


def test_entropy_formula_matches_direct_evaluation(rng):
    # Kraskov et al. 2004, eq. 20: H = -psi(k) + psi(N) + ln c_d + d <ln eps>, eps = twice
    # the k-th neighbour distance, c_d = 1 for the maximum norm.  Evaluated here by brute
    # force (all pairwise distances), independently of the KD-tree code.
    x = rng.normal(size=(300, 2))
    k = 3
    dist = np.abs(x[:, None, :] - x[None, :, :]).max(axis=2)
    np.fill_diagonal(dist, np.inf)
    eps = 2.0 * np.sort(dist, axis=1)[:, k - 1]
    expected = -digamma(k) + digamma(300) + 0.0 + 2 * np.mean(np.log(eps))
    assert differential_entropy(x, k=k, base="nats") == pytest.approx(expected, rel=1e-12)


@given(
    seed=st.integers(0, 2**32 - 1),
    n=st.integers(6, 80),
    d=st.integers(1, 4),
    k=st.integers(1, 5),
    metric=st.sampled_from(["chebyshev", "euclidean"]),
)
def test_entropy_matches_formula_on_random_shapes(seed, n, d, k, metric):
    # Kraskov et al. 2004, eq. 20, by brute force, with c_d the volume of the unit-
    # diameter ball: 1 for the maximum norm, pi^(d/2) / Gamma(d/2 + 1) / 2^d for the
    # Euclidean norm (the d-ball volume formula is common practice).
    r = np.random.default_rng(seed)
    x = r.standard_t(4, size=(n, d))
    k = min(k, n - 1)
    diff = x[:, None, :] - x[None, :, :]
    dist = np.abs(diff).max(axis=2) if metric == "chebyshev" else np.sqrt((diff**2).sum(axis=2))
    np.fill_diagonal(dist, np.inf)
    eps = 2.0 * np.sort(dist, axis=1)[:, k - 1]
    log_cd = 0.0 if metric == "chebyshev" else 0.5 * d * math.log(math.pi) - math.lgamma(d / 2 + 1) - d * LN2
    expected = -digamma(k) + digamma(n) + log_cd + d * np.mean(np.log(eps))
    got = differential_entropy(x, k=k, base="nats", metric=metric)
    assert got == pytest.approx(expected, rel=1e-10, abs=1e-10)


# ----------------------------------------------------------------------------
# Differential entropy: properties
# ----------------------------------------------------------------------------
@pytest.mark.parametrize("metric", ["chebyshev", "euclidean"])
def test_entropy_of_scaled_sample_shifts_by_d_log_a(rng, metric):
    # Identity h(aX + b) = h(X) + d ln|a| (Cover & Thomas 2006, Thm 8.6.4, from memory);
    # the kNN estimate obeys it exactly, since all distances scale by |a|.
    x = rng.normal(size=(800, 2))
    a, b = 7.5, np.array([3.0, -1.0])
    h = differential_entropy(x, base="nats", metric=metric)
    assert differential_entropy(a * x + b, base="nats", metric=metric) == pytest.approx(h + 2 * math.log(a), rel=1e-10)


def test_entropy_bits_equal_nats_over_ln2(rng):
    # Units: 1 bit = ln 2 nats (common practice).
    x = rng.normal(size=500)
    assert differential_entropy(x, base=2) == pytest.approx(differential_entropy(x, base="nats") / LN2, rel=1e-12)


def test_entropy_does_not_modify_input(rng):
    x = np.repeat(rng.normal(size=100), 5)
    before = x.copy()
    with pytest.warns(DataQualityWarning, match="duplicates"):
        differential_entropy(x, jitter=1e-6)
    np.testing.assert_array_equal(x, before)


def test_entropy_of_duplicated_points_raises_without_jitter(rng):
    x = np.repeat(rng.normal(size=200), 4)  # every value 4 times: 3 exact duplicates each
    with pytest.raises(ValueError, match=r"k=3 exact duplicates.*-inf"):
        differential_entropy(x, k=3)


def test_entropy_with_jitter_warns_and_is_finite(rng):
    x = np.repeat(rng.normal(size=200), 4)
    with pytest.warns(DataQualityWarning, match="jitter"):
        h = differential_entropy(x, k=3, jitter=1e-6)
    assert np.isfinite(h)
    # ... and the noise, not the data, sets the scale: a smaller jitter gives a far
    # smaller estimate (h -> -inf as jitter -> 0), which is why a warning is shown.
    with pytest.warns(DataQualityWarning):
        assert differential_entropy(x, k=3, jitter=1e-9) < h - 5


def test_entropy_warns_on_discrete_looking_sample(rng):
    x = np.repeat(rng.normal(size=300), 2)  # ties, but fewer than k=3 duplicates
    with pytest.warns(DataQualityWarning, match=r"x has only 300 distinct values in 600 rows"):
        assert np.isfinite(differential_entropy(x, k=3))


def test_entropy_of_constant_sample_raises_even_with_jitter():
    with pytest.warns(DataQualityWarning):
        with pytest.raises(ValueError, match="constant"):
            differential_entropy(np.full(50, 2.0), jitter=1e-6)


# ----------------------------------------------------------------------------
# KSG mutual information: closed forms
# ----------------------------------------------------------------------------
@pytest.mark.parametrize("algorithm", [1, 2])
@pytest.mark.parametrize("rho", [0.6, 0.9])
def test_ksg_of_bivariate_gaussian_matches_closed_form(rng, algorithm, rho):
    # Closed form: I = -1/2 ln(1 - rho^2) nats for a bivariate Gaussian (Kraskov et al.
    # 2004, Sec. IV, use it as their test case).  Spread at n=3000, k=3: sd <= 0.022
    # nats for both algorithms -> tolerance 0.08.
    x, y = gaussian_pair(rng, 3000, rho)
    truth = -0.5 * math.log(1.0 - rho**2)
    assert ksg_mutual_information(x, y, algorithm=algorithm, base="nats") == pytest.approx(truth, abs=0.08)


@pytest.mark.parametrize("algorithm", [1, 2])
def test_ksg_of_multivariate_gaussian_matches_closed_form(rng, algorithm):
    # Closed form: I(X; Y) = 1/2 ln(det C_xx det C_yy / det C) for jointly Gaussian X, Y
    # (Cover & Thomas 2006, from memory).  Here X is 2-D and Y 1-D; n=3000.
    cov = np.array([[1.0, 0.3, 0.5], [0.3, 1.0, 0.4], [0.5, 0.4, 1.0]])
    z = rng.multivariate_normal(np.zeros(3), cov, size=3000)
    truth = 0.5 * math.log(np.linalg.det(cov[:2, :2]) * cov[2, 2] / np.linalg.det(cov))
    est = ksg_mutual_information(z[:, :2], z[:, 2], algorithm=algorithm, base="nats")
    assert est == pytest.approx(truth, abs=0.08)


@pytest.mark.parametrize("algorithm", [1, 2])
def test_ksg_of_independent_variables_is_near_zero(rng, algorithm):
    # Closed form: independent variables have I = 0.  Spread at n=3000: sd 0.013 nats.
    x, y = rng.normal(size=3000), rng.exponential(size=3000)
    assert abs(ksg_mutual_information(x, y, algorithm=algorithm, base="nats")) < 0.05


def _ksg_brute_force(x, y, k, algorithm):
    """KSG I(1) / I(2) straight from the definitions of Kraskov et al. 2004 (eqs. 8, 9,
    from memory), with all pairwise maximum-norm distances; O(n^2), for small n."""
    n = x.shape[0]
    dx = np.abs(x[:, None, :] - x[None, :, :]).max(axis=2)
    dy = np.abs(y[:, None, :] - y[None, :, :]).max(axis=2)
    dz = np.maximum(dx, dy)
    np.fill_diagonal(dz, np.inf)
    nx = np.empty(n)
    ny = np.empty(n)
    for i in range(n):
        nbrs = np.argsort(dz[i], kind="stable")[:k]
        if algorithm == 1:
            half_eps = dz[i, nbrs].max()  # eps(i)/2: distance to the k-th neighbour
            nx[i] = np.sum(dx[i] < half_eps) - 1  # strict, minus the point itself
            ny[i] = np.sum(dy[i] < half_eps) - 1
        else:
            nx[i] = np.sum(dx[i] <= dx[i, nbrs].max()) - 1
            ny[i] = np.sum(dy[i] <= dy[i, nbrs].max()) - 1
    if algorithm == 1:
        return digamma(k) - np.mean(digamma(nx + 1) + digamma(ny + 1)) + digamma(n)
    return digamma(k) - 1.0 / k - np.mean(digamma(nx) + digamma(ny)) + digamma(n)


@pytest.mark.parametrize("algorithm", [1, 2])
@pytest.mark.parametrize("k", [1, 4])
def test_ksg_counts_match_definition_by_brute_force(rng, algorithm, k):
    # Kraskov et al. 2004, eqs. 8 and 9 evaluated by brute force on 2-D x and 1-D y.
    x = rng.normal(size=(250, 2))
    y = (x[:, :1] + 0.5 * rng.normal(size=(250, 1))) ** 3
    expected = _ksg_brute_force(x, y, k, algorithm)
    got = ksg_mutual_information(x, y, k=k, algorithm=algorithm, base="nats", standardize=False, jitter=0)
    assert got == pytest.approx(expected, rel=1e-12, abs=1e-12)


@given(
    seed=st.integers(0, 2**32 - 1),
    n=st.integers(8, 60),
    dx=st.integers(1, 3),
    dy=st.integers(1, 2),
    k=st.integers(1, 5),
    algorithm=st.sampled_from([1, 2]),
)
def test_ksg_matches_definition_on_random_shapes(seed, n, dx, dy, k, algorithm):
    # Kraskov et al. 2004, eqs. 8 and 9 by brute force, over random sizes, dimensions
    # and k (continuous draws: no ties, so the neighbour sets are unambiguous).
    r = np.random.default_rng(seed)
    x = r.normal(size=(n, dx))
    y = x[:, :dy] * r.uniform(-1, 1) + r.standard_t(3, size=(n, dy))
    k = min(k, n - 1)
    got = ksg_mutual_information(x, y, k=k, algorithm=algorithm, base="nats", standardize=False, jitter=0)
    assert got == pytest.approx(_ksg_brute_force(x, y, k, algorithm), rel=1e-12, abs=1e-12)


# ----------------------------------------------------------------------------
# KSG-1 against scikit-learn
# ----------------------------------------------------------------------------
def _sklearn_preprocessed(x, y, random_state=0):
    """The preprocessing of sklearn.feature_selection._mutual_info._estimate_mi (read
    with inspect.getsource, scikit-learn 1.x): scale(with_mean=False), then add
    1e-10 * max(1, mean|col|) * standard normal noise from RandomState(random_state),
    first for the features (n, 1), then for the target (n,)."""
    from sklearn.preprocessing import scale

    r = np.random.RandomState(random_state)
    X = scale(x.reshape(-1, 1).astype(np.float64), with_mean=False)
    X += 1e-10 * np.maximum(1, np.mean(np.abs(X), axis=0)) * r.standard_normal(size=X.shape)
    Y = scale(y.astype(np.float64), with_mean=False)
    Y += 1e-10 * max(1, np.mean(np.abs(Y))) * r.standard_normal(size=Y.shape[0])
    return X[:, 0], Y


@pytest.mark.parametrize("scenario", ["gaussian", "skewed"])
def test_ksg1_matches_sklearn_mutual_info_regression(rng, scenario):
    # Reference library: sklearn.feature_selection.mutual_info_regression(X, y,
    # n_neighbors=3, random_state=0) implements KSG-1 (nats, clipped at 0).
    from sklearn.feature_selection import mutual_info_regression

    if scenario == "gaussian":
        x, y = gaussian_pair(rng, 2000, 0.7)
    else:
        x = rng.lognormal(sigma=1.0, size=2000)
        y = np.sin(3 * x) + 0.3 * rng.normal(size=2000)
    expected = mutual_info_regression(x.reshape(-1, 1), y, n_neighbors=3, random_state=0)[0]
    assert expected > 0.05  # a real dependence, so the clip at 0 plays no part
    # 1) same preprocessed data, no further scaling or noise: identical counts.
    xs, ys = _sklearn_preprocessed(x, y)
    same = ksg_mutual_information(xs, ys, k=3, base="nats", standardize=False, jitter=0)
    assert same == pytest.approx(expected, rel=1e-12)
    # 2) our own defaults (standardise, noise of 1e-10 sd from our seed) on tie-free data.
    assert ksg_mutual_information(x, y, k=3, base="nats") == pytest.approx(expected, abs=1e-9)


def test_ksg1_clip_matches_sklearn_on_independent_data(rng):
    # Reference library: mutual_info_regression clips negative estimates to 0.
    from sklearn.feature_selection import mutual_info_regression

    for seed in range(10):
        r = np.random.default_rng(seed)
        x, y = r.normal(size=400), r.normal(size=400)
        raw = ksg_mutual_information(x, y, base="nats")
        if raw < 0:
            break
    else:  # pragma: no cover - the seeds above do give a negative estimate
        pytest.fail("no negative raw estimate found")
    assert mutual_info_regression(x.reshape(-1, 1), y, n_neighbors=3, random_state=0)[0] == 0.0
    assert ksg_mutual_information(x, y, base="nats", clip=True) == 0.0


# ----------------------------------------------------------------------------
# KSG: properties
# ----------------------------------------------------------------------------
@pytest.mark.parametrize("algorithm", [1, 2])
def test_ksg_is_symmetric(rng, algorithm):
    # MI is symmetric; both KSG estimators are symmetric in (x, y) for the same data
    # (the joint neighbours and the two marginal counts just swap roles).
    x, y = gaussian_pair(rng, 1000, 0.5)
    y = np.exp(y)
    a = ksg_mutual_information(x, y, algorithm=algorithm, jitter=0)
    b = ksg_mutual_information(y, x, algorithm=algorithm, jitter=0)
    assert a == pytest.approx(b, rel=1e-13)


@pytest.mark.parametrize("algorithm", [1, 2])
def test_ksg_is_invariant_to_rescaling_and_shifting_each_column(rng, algorithm):
    # True MI is invariant to I(ax + b; cy + d) for a, c != 0; with standardisation the
    # estimate is too (only the relative scale of the axes enters the maximum norm).
    x, y = gaussian_pair(rng, 1500, 0.6)
    base_value = ksg_mutual_information(x, y, algorithm=algorithm, jitter=0)
    moved = ksg_mutual_information(1000.0 * x - 5.0, 0.001 * y + 2.0, algorithm=algorithm, jitter=0)
    assert moved == pytest.approx(base_value, abs=1e-9)


def test_ksg_without_standardising_depends_on_column_scale(rng):
    # Why standardise=True is the default: with the maximum norm the joint neighbours
    # change when one axis is stretched (Kraskov et al. 2004 discuss rescaling the
    # marginals), so the raw estimate moves far from the truth 0.223 nats.
    x, y = gaussian_pair(rng, 1500, 0.6)
    raw = ksg_mutual_information(1000.0 * x, y, base="nats", standardize=False, jitter=0)
    assert abs(raw - ksg_mutual_information(x, y, base="nats", jitter=0)) > 0.05


def test_ksg_is_nearly_invariant_to_monotone_transforms(rng):
    # True MI is invariant to invertible maps of each variable (Kraskov et al. 2004,
    # Sec. II).  The estimate is only approximately so (the neighbours change); at
    # n=3000 it stays within the sampling tolerance of the truth.
    x, y = gaussian_pair(rng, 3000, 0.6)
    truth = -0.5 * math.log(1.0 - 0.36)
    est = ksg_mutual_information(np.exp(x), y**3, base="nats")
    assert est == pytest.approx(truth, abs=0.1)


def test_ksg_bits_equal_nats_over_ln2(rng):
    x, y = gaussian_pair(rng, 500, 0.5)
    assert ksg_mutual_information(x, y, base="bits") == pytest.approx(
        ksg_mutual_information(x, y, base="nats") / LN2, rel=1e-12
    )


def test_ksg_with_constant_variable_is_zero(rng):
    # Closed form: I(X; c) = 0 for a constant c.
    assert ksg_mutual_information(rng.normal(size=100), np.full(100, 4.0)) == 0.0


def test_ksg_does_not_modify_inputs(rng):
    x, y = gaussian_pair(rng, 300, 0.5)
    x0, y0 = x.copy(), y.copy()
    ksg_mutual_information(x, y, algorithm=2)
    np.testing.assert_array_equal(x, x0)
    np.testing.assert_array_equal(y, y0)


def test_ksg_is_reproducible_for_a_seed(rng):
    x = rng.integers(0, 50, size=400).astype(float)
    y = x + rng.integers(0, 50, size=400)
    with pytest.warns(DataQualityWarning):
        a = ksg_mutual_information(x, y, seed=5)
    with pytest.warns(DataQualityWarning):
        b = ksg_mutual_information(x, y, seed=5)
    assert a == b


def test_ksg_warns_on_discrete_looking_columns(rng):
    x = rng.integers(0, 4, size=500).astype(float)
    with pytest.warns(DataQualityWarning, match=r"x has only 4 distinct values in 500 rows"):
        ksg_mutual_information(x, rng.normal(size=500))


def test_ksg_duplicates_without_jitter_raise(rng):
    x = np.repeat(rng.normal(size=50), 4)
    y = np.repeat(rng.normal(size=50), 4)
    with pytest.warns(DataQualityWarning):
        with pytest.raises(ValueError, match=r"k=3 exact duplicates in the joint.*jitter"):
            ksg_mutual_information(x, y, jitter=0)


# ----------------------------------------------------------------------------
# Mixed discrete-continuous (Ross 2014)
# ----------------------------------------------------------------------------
def test_mixed_matches_sklearn_mutual_info_classif(rng):
    # Reference library: sklearn.feature_selection.mutual_info_classif(X, y,
    # n_neighbors=3, random_state=0) implements Ross 2014 (nats, clipped at 0).
    from sklearn.feature_selection import mutual_info_classif

    labels = rng.choice(np.array(["a", "b", "c"]), size=1500, p=[0.5, 0.3, 0.2])
    shift = {"a": 0.0, "b": 0.8, "c": 2.0}
    x = rng.normal(size=1500) + np.array([shift[v] for v in labels])
    expected = mutual_info_classif(x.reshape(-1, 1), labels, n_neighbors=3, random_state=0)[0]
    assert expected > 0.1
    assert mixed_mutual_information(x, labels, k=3, base="nats") == pytest.approx(expected, abs=1e-9)


def test_mixed_small_classes_shrink_like_sklearn(rng):
    # Reference library: sklearn's _compute_mi_cd uses k_c = min(k, N_c - 1) for a class
    # of N_c <= k members and drops single-member classes (read with inspect.getsource).
    from sklearn.feature_selection import mutual_info_classif

    # sklearn finds the neighbours of a tiny class by brute-force Euclidean distances,
    # sqrt(a^2 - 2ab + b^2), whose rounding (~4e-16) can put the k-th neighbour itself
    # inside the nextafter-shrunk radius and add 1 to its m.  The small classes therefore
    # sit on dyadic values (exact in float64) and the tight check calls sklearn's
    # private _compute_mi_cd on the noise-free data; the public call, whose 1e-10
    # noise undoes the exactness, is compared to within 2e-4 nats (one m off by one
    # for two points moves the estimate by ~1e-5).
    from sklearn.feature_selection._mutual_info import _compute_mi_cd

    labels = np.concatenate([np.zeros(300, int), np.ones(200, int), [2, 2], [3], [4, 4, 4]])
    x = np.concatenate([rng.normal(size=500) + 0.7 * labels[:500], [1.5, 1.25], [0.5], [0.75, 2.0, 2.5]])
    message = r"3 class\(es\) with k=3 or fewer members: 2 \(2\), 3 \(1\), 4 \(3\)"
    with pytest.warns(SmallSampleWarning, match=message):
        exact = mixed_mutual_information(x, labels, k=3, base="nats", jitter=0)
    assert exact == pytest.approx(_compute_mi_cd(x, labels, 3), rel=1e-12)
    with pytest.warns(SmallSampleWarning, match=message):
        default = mixed_mutual_information(x, labels, k=3, base="nats")
    public = mutual_info_classif(x.reshape(-1, 1), labels, n_neighbors=3, random_state=0)[0]
    assert default == pytest.approx(public, abs=2e-4)


def test_mixed_small_classes_error_names_k(rng):
    labels = np.array([0] * 20 + [1] * 3)
    with pytest.raises(ValueError, match=r"k=3 needs classes of at least k \+ 1 = 4 members.*1 \(3\)"):
        mixed_mutual_information(rng.normal(size=23), labels, k=3, small_classes="error")
    names = np.array(["north"] * 20 + ["south"] * 2, dtype=object)
    with pytest.raises(ValueError, match=r"1 smaller class\(es\): 'south' \(2\)"):
        mixed_mutual_information(rng.normal(size=22), names, k=3, small_classes="error")


def test_mixed_with_separated_classes_equals_digamma_entropy_of_labels(rng):
    # When the classes do not overlap, every m_i = k_c, and Ross's estimate reduces to
    # psi(N) - sum_c (N_c/N) psi(N_c): the digamma entropy estimator of the labels,
    # which dit ships as dit.inference.entropy_1 (bits).
    from dit import inference as dit
    labels = rng.choice(4, size=2000, p=[0.4, 0.3, 0.2, 0.1])
    x = rng.uniform(0.0, 1.0, size=2000) + 10.0 * labels
    expected_bits = dit.entropy_1(labels.tolist())
    assert mixed_mutual_information(x, labels, base=2) == pytest.approx(expected_bits, rel=1e-12)


def test_mixed_of_gaussian_mixture_matches_numerical_integral(rng):
    # Closed form up to a 1-D integral: for X | C=c ~ N(mu_c, 1),
    # I(X; C) = h(X) - h(X | C) with h(X|C) = 1/2 ln(2 pi e) and h(X) = -int f ln f,
    # computed with scipy.integrate.quad.  Spread at n=3000: sd ~0.015 nats -> tol 0.06.
    p = np.array([0.5, 0.3, 0.2])
    mu = np.array([0.0, 1.5, 3.0])
    labels = rng.choice(3, size=3000, p=p)
    x = rng.normal(size=3000) + mu[labels]

    def density(t):
        return float(np.sum(p * stats.norm.pdf(t, loc=mu)))

    h_x, _ = integrate.quad(lambda t: -density(t) * math.log(density(t)), -12, 15, limit=200)
    truth = h_x - 0.5 * math.log(2 * math.pi * math.e)
    assert mixed_mutual_information(x, labels, base="nats") == pytest.approx(truth, abs=0.06)


def test_mixed_of_independent_label_is_near_zero(rng):
    # Closed form: independent variables have I = 0.
    labels = rng.integers(0, 3, size=3000)
    assert abs(mixed_mutual_information(rng.normal(size=3000), labels, base="nats")) < 0.04


def test_mixed_single_class_is_zero(rng):
    # One class: I = 0; the estimator gives psi(N)+psi(k)-psi(N)-psi(k) = 0 (m_i = k).
    assert mixed_mutual_information(rng.normal(size=200), np.zeros(200)) == pytest.approx(0.0, abs=1e-12)


def test_mixed_multivariate_continuous_input(rng):
    # Same integral check as above with a 2-D continuous part whose second axis is
    # pure noise on a very different scale: standardising keeps it from swamping
    # the informative axis.  Tolerance 0.08 nats (n=3000, more kNN bias in 2-D).
    p = np.array([0.5, 0.5])
    mu = np.array([0.0, 2.0])
    labels = rng.choice(2, size=3000, p=p)
    x = np.column_stack([rng.normal(size=3000) + mu[labels], 500.0 * rng.normal(size=3000)])

    def density(t):
        return float(np.sum(p * stats.norm.pdf(t, loc=mu)))

    h_x, _ = integrate.quad(lambda t: -density(t) * math.log(density(t)), -12, 14, limit=200)
    truth = h_x - 0.5 * math.log(2 * math.pi * math.e)
    assert mixed_mutual_information(x, labels, base="nats") == pytest.approx(truth, abs=0.08)


# ----------------------------------------------------------------------------
# Bad input
# ----------------------------------------------------------------------------
def test_k_not_smaller_than_n_raises():
    x = np.arange(5.0)
    with pytest.raises(ValueError, match=r"k=5 must be smaller than the number of samples n=5"):
        differential_entropy(x, k=5)
    with pytest.raises(ValueError, match=r"k=7 must be smaller than the number of samples n=5"):
        ksg_mutual_information(x, x**2, k=7)
    with pytest.raises(ValueError, match=r"k=5 must be smaller .* n=5"):
        mixed_mutual_information(x, [0, 0, 1, 1, 1], k=5)


@pytest.mark.parametrize("bad_k", [0, -1])
def test_k_below_one_raises(bad_k):
    with pytest.raises(ValueError, match=rf"k={bad_k} is invalid"):
        differential_entropy(np.arange(10.0), k=bad_k)


@pytest.mark.parametrize("bad_k", [2.5, True, "3"])
def test_k_of_wrong_type_raises(bad_k):
    with pytest.raises(TypeError, match="k must be a positive integer"):
        ksg_mutual_information(np.arange(10.0), np.arange(10.0) ** 2, k=bad_k)


@pytest.mark.parametrize("bad", [np.nan, np.inf, -np.inf])
def test_nonfinite_values_raise_naming_the_input(rng, bad):
    x = rng.normal(size=50)
    x[7] = bad
    y = rng.normal(size=50)
    with pytest.raises(ValueError, match=r"x contains NaN or infinite values in 1 row\(s\) \(first at row 7\)"):
        differential_entropy(x)
    with pytest.raises(ValueError, match=r"^y contains NaN or infinite"):
        ksg_mutual_information(y, x)
    with pytest.raises(ValueError, match=r"x_continuous contains NaN"):
        mixed_mutual_information(x, np.arange(50) % 2)


def test_missing_labels_raise_naming_the_input(rng):
    x = rng.normal(size=6)
    with pytest.raises(ValueError, match=r"y_discrete contains NaN or infinite labels in 1 row\(s\) \(first at row 2\)"):
        mixed_mutual_information(x, [0.0, 1.0, np.nan, 1.0, 0.0, 1.0], k=1)
    with pytest.raises(ValueError, match=r"y_discrete contains missing labels \(None/NaN\) in 1 row\(s\)"):
        mixed_mutual_information(x, np.array(["a", "b", None, "a", "b", "a"], dtype=object), k=1)


def test_mismatched_lengths_raise(rng):
    with pytest.raises(ValueError, match=r"same length: x has 10, y has 9"):
        ksg_mutual_information(rng.normal(size=10), rng.normal(size=9))
    with pytest.raises(ValueError, match=r"same length: x_continuous has 10, y_discrete has 11"):
        mixed_mutual_information(rng.normal(size=10), np.arange(11) % 2)


def test_bad_base_metric_algorithm_raise(rng):
    x, y = rng.normal(size=30), rng.normal(size=30)
    with pytest.raises(ValueError, match=r"base=1 is invalid"):
        differential_entropy(x, base=1)
    with pytest.raises(ValueError, match=r"base='furlongs' is not a known unit"):
        ksg_mutual_information(x, y, base="furlongs")
    with pytest.raises(ValueError, match=r"metric='manhattan' is not valid"):
        differential_entropy(x, metric="manhattan")
    with pytest.raises(ValueError, match=r"algorithm=3 is not valid; choose 1 or 2"):
        ksg_mutual_information(x, y, algorithm=3)
    with pytest.raises(ValueError, match=r"small_classes='drop' is not valid"):
        mixed_mutual_information(x, np.arange(30) % 2, small_classes="drop")
    with pytest.raises(ValueError, match=r"jitter=-1.0 is invalid"):
        ksg_mutual_information(x, y, jitter=-1.0)


def test_non_numeric_and_badly_shaped_inputs_raise(rng):
    with pytest.raises(TypeError, match="x must hold numbers"):
        differential_entropy(np.array(["a", "b", "c", "d", "e"], dtype=object))
    with pytest.raises(TypeError, match="y must hold real numbers"):
        ksg_mutual_information(np.arange(5.0), np.array(["a", "b", "c", "d", "e"]))
    with pytest.raises(TypeError, match="x is boolean"):
        differential_entropy(np.array([True, False] * 10))
    with pytest.raises(ValueError, match=r"x must be 1-D \(n,\) or 2-D \(n, d\).*\(4, 2, 2\)"):
        differential_entropy(np.zeros((4, 2, 2)))
    with pytest.raises(ValueError, match="x is empty"):
        differential_entropy([])
    with pytest.raises(ValueError, match=r"y_discrete must be 1-D"):
        mixed_mutual_information(np.arange(4.0), np.zeros((4, 2)))
    with pytest.raises(TypeError, match="y_discrete mixes label types"):
        mixed_mutual_information(np.arange(6.0), np.array([1, "a", 2, "b", 1, "a"], dtype=object), k=1)


def test_only_single_member_classes_raise(rng):
    with pytest.warns(SmallSampleWarning):
        with pytest.raises(ValueError, match="no class with two or more members"):
            mixed_mutual_information(rng.normal(size=5), np.arange(5), k=1)


def test_mixed_duplicates_without_jitter_raise(rng):
    x = np.repeat(rng.normal(size=40), 4)
    labels = np.repeat(np.arange(40) % 2, 4)
    with pytest.warns(DataQualityWarning):
        with pytest.raises(ValueError, match=r"x_continuous have at least k exact duplicates.*jitter"):
            mixed_mutual_information(x, labels, jitter=0)
