"""Divergences checked against scipy (stats.entropy, spatial.distance.jensenshannon),
pyitlib (drv.divergence_kullbackleibler_symmetrised_pmf) and closed forms.
Section and equation numbers of Cover & Thomas (2006), Elements of Information
Theory, 2nd ed., Wiley, are cited from memory.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.stats
from pyitlib import discrete_random_variable as drv
from scipy.spatial.distance import jensenshannon

from infoscope.estimators.divergence import as_distribution, cross_entropy, js_divergence, kl_divergence, psi


def dirichlet_pair(rng, k):
    return rng.dirichlet(np.ones(k)), rng.dirichlet(np.ones(k))


@pytest.mark.parametrize("k", [2, 5, 17])
def test_kl_matches_scipy_entropy(rng, k):
    p, q = dirichlet_pair(rng, k)
    # scipy: stats.entropy(p, q, base=b) is KL(p || q).
    assert kl_divergence(p, q, base=2) == pytest.approx(scipy.stats.entropy(p, q, base=2), rel=1e-12)
    assert kl_divergence(p, q, base="nats") == pytest.approx(scipy.stats.entropy(p, q), rel=1e-12)
    assert kl_divergence(p, q, base=10) == pytest.approx(scipy.stats.entropy(p, q, base=10), rel=1e-12)


def test_kl_of_counts_normalises_them(rng):
    p, q = rng.integers(1, 50, 6), rng.integers(1, 50, 6)
    # scipy.stats.entropy normalises its arguments too.
    assert kl_divergence(p, q) == pytest.approx(scipy.stats.entropy(p, q, base=2), rel=1e-12)


def test_kl_with_pseudocount_is_kl_of_smoothed_counts():
    p, q = np.array([4, 0, 6]), np.array([0, 5, 5])
    assert kl_divergence(p, q) == math.inf  # mass where q has none: infinite, not hidden
    # scipy on the explicitly smoothed counts (p + 0.5, q + 0.5)
    expected = scipy.stats.entropy(p + 0.5, q + 0.5, base=2)
    assert kl_divergence(p, q, pseudocount=0.5) == pytest.approx(expected, rel=1e-12)


def test_kl_zero_cells_of_p_contribute_nothing():
    # Convention 0 log(0/q) = 0 (Cover & Thomas 2006, sec. 2.3).
    assert kl_divergence([0.0, 1.0], [0.5, 0.5]) == pytest.approx(1.0)


@pytest.mark.parametrize("k", [2, 4, 30])
def test_js_matches_square_of_scipy_jensenshannon(rng, k):
    p, q = dirichlet_pair(rng, k)
    # scipy.spatial.distance.jensenshannon returns the *distance*: square it.
    assert js_divergence(p, q, base=2) == pytest.approx(jensenshannon(p, q, base=2) ** 2, rel=1e-10)
    assert js_divergence(p, q, base="nats") == pytest.approx(jensenshannon(p, q) ** 2, rel=1e-10)


def test_js_of_disjoint_supports_is_one_bit():
    # Closed form (Lin 1991): JS = ln 2 for disjoint supports.
    assert js_divergence([0.5, 0.5, 0, 0], [0, 0, 0.3, 0.7]) == pytest.approx(1.0)
    assert js_divergence([3, 0], [0, 9], base="nats") == pytest.approx(math.log(2))


def test_cross_entropy_is_entropy_plus_kl(rng):
    p, q = dirichlet_pair(rng, 7)
    # scipy: H(p) + KL(p||q) with stats.entropy(p) and stats.entropy(p, q).
    expected = scipy.stats.entropy(p, base=2) + scipy.stats.entropy(p, q, base=2)
    assert cross_entropy(p, q) == pytest.approx(expected, rel=1e-12)
    assert cross_entropy([1, 1], [1, 0]) == math.inf


@pytest.mark.parametrize("k", [3, 10])
def test_psi_is_jeffreys_divergence(rng, k):
    e, a = dirichlet_pair(rng, k)
    # Jeffreys J identity: PSI = KL(a||e) + KL(e||a); scipy.stats.entropy in nats.
    assert psi(e, a) == pytest.approx(scipy.stats.entropy(a, e) + scipy.stats.entropy(e, a), rel=1e-12)
    # pyitlib: drv.divergence_kullbackleibler_symmetrised_pmf(a, e, base=e) is the same sum.
    assert psi(e, a) == pytest.approx(drv.divergence_kullbackleibler_symmetrised_pmf(a, e, base=np.e), rel=1e-10)


def test_psi_hand_worked():
    # Hand-worked: e = (0.25, 0.25, 0.5), a = (0.2, 0.3, 0.5).
    # (0.2 - 0.25) ln(0.2/0.25) + (0.3 - 0.25) ln(0.3/0.25) + 0
    # = -0.05 * ln(0.8) + 0.05 * ln(1.2) = 0.0111572 + 0.0091161 = 0.0202733.
    assert psi([0.25, 0.25, 0.5], [0.2, 0.3, 0.5]) == pytest.approx(0.0202733, abs=1e-7)


def test_psi_default_smooths_counts_by_half_and_raw_is_infinite():
    e, a = np.array([50, 30, 20, 0]), np.array([40, 30, 20, 10])
    assert psi(e, a, pseudocount=0) == math.inf
    # default pseudocount 0.5 on counts: scipy on the smoothed counts
    es, as_ = e + 0.5, a + 0.5
    expected = scipy.stats.entropy(as_, es) + scipy.stats.entropy(es, as_)
    assert psi(e, a) == pytest.approx(expected, rel=1e-12)
    # probabilities are not smoothed by default
    assert psi(e / e.sum(), a / a.sum()) == math.inf


def test_psi_of_identical_distributions_is_zero():
    # Closed form: every term (a - e) ln(a / e) is 0 when a = e.
    assert psi([5, 5, 10], [1, 1, 2], pseudocount=0) == pytest.approx(0.0, abs=1e-15)
    assert psi([5, 0, 10], [5, 0, 10]) == pytest.approx(0.0, abs=1e-15)
    # the default pseudocount is in count units, so it moves a small sample more
    # than a large one: identical shares, different totals -> a small positive PSI
    assert psi([5, 5, 10], [1, 1, 2]) > 0


def test_as_distribution_tells_counts_from_probabilities_and_does_not_touch_input():
    counts = np.array([1, 3])
    out = as_distribution(counts)
    assert out.tolist() == [0.25, 0.75] and counts.tolist() == [1, 3]
    probs = np.array([0.4, 0.6])
    out = as_distribution(probs)
    out[0] = 9.0
    assert probs.tolist() == [0.4, 0.6]


# ----------------------------------------------------------------- bad input
def test_probabilities_not_summing_to_one_are_rejected():
    with pytest.raises(ValueError, match=r"q sums to 0.8, not 1"):
        kl_divergence([0.5, 0.5], [0.3, 0.5])


def test_negative_and_nan_are_rejected():
    with pytest.raises(ValueError, match="p contains negative values"):
        js_divergence([-0.5, 1.5], [0.5, 0.5])
    with pytest.raises(ValueError, match="actual contains NaN"):
        psi([0.5, 0.5], [np.nan, 0.5])


def test_length_mismatch_names_both():
    with pytest.raises(ValueError, match="p has 2, q has 3"):
        kl_divergence([1, 1], [1, 1, 1])
    with pytest.raises(ValueError, match="expected has 2, actual has 3"):
        psi([1, 1], [1, 1, 1])


def test_pseudocount_on_probabilities_is_an_error():
    with pytest.raises(ValueError, match="pseudocount=0.5 applies to counts"):
        kl_divergence([0.5, 0.5], [0.25, 0.75], pseudocount=0.5)
    with pytest.raises(ValueError, match="pseudocount=-1 is invalid"):
        kl_divergence([1, 1], [1, 1], pseudocount=-1)


def test_forced_reading():
    with pytest.raises(ValueError, match="declared as counts"):
        kl_divergence([0.5, 0.5], [0.5, 0.5], counts=True)
    with pytest.raises(ValueError, match="sums to 2"):
        kl_divergence([1, 1], [1, 1], counts=False)
    with pytest.raises(ValueError, match="no observations"):
        kl_divergence([0, 0], [1, 1])


def test_non_vector_input_is_rejected():
    with pytest.raises(ValueError, match="p must be a 1-D vector"):
        kl_divergence([[0.5, 0.5]], [0.5, 0.5])
    with pytest.raises(TypeError, match="q must be a numeric vector"):
        kl_divergence([0.5, 0.5], ["a", "b"])
