"""Entropy estimators on counts, checked against outside references.

Each check names its source: scipy / dit / pyitlib calls, or the published formula
(paper, equation) recomputed by hand in plain ``math`` on small vectors.
"""
from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
import scipy.stats
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.special import digamma

from infoscope.estimators.entropy import (
    DIRICHLET_PRIORS,
    ENTROPY_ESTIMATORS,
    entropy_from_counts,
    entropy_of_count_rows,
)

FAST = [e for e in ENTROPY_ESTIMATORS if e != "nsb"]  # nsb has its own test file
COUNT_VECTORS = [
    [7, 3, 0, 2, 1, 0, 0, 5],
    [1, 1, 1, 1],
    [100, 1],
    [3, 2, 1, 1, 0],
    [50, 20, 20, 5, 3, 1, 1],
    [2, 2, 2, 2, 2, 2, 9, 0, 0, 0, 0],
]


def _sample(counts):
    """Rows whose symbol i occurs counts[i] times (for libraries that take samples)."""
    return np.repeat(np.arange(len(counts)), counts)


# --------------------------------------------------------------------------- plug-in

@pytest.mark.parametrize("counts", COUNT_VECTORS)
@pytest.mark.parametrize("base", [2, math.e, 10, 3.5])
def test_plugin_matches_scipy_stats_entropy(counts, base):
    # Reference: scipy.stats.entropy(counts, base=base) normalises counts to p.
    expected = scipy.stats.entropy(counts, base=base)
    assert entropy_from_counts(counts, estimator="plugin", base=base) == pytest.approx(expected, rel=1e-13)


@pytest.mark.parametrize("counts", COUNT_VECTORS)
def test_plugin_matches_dit_entropy_0_in_bits(counts):
    # Reference: dit.inference.entropy_0(samples) -- the naive estimate, in bits.
    from dit.inference import entropy_0

    assert entropy_from_counts(counts, estimator="plugin") == pytest.approx(entropy_0(_sample(counts)), rel=1e-12)


def test_plugin_of_uniform_is_log_k():
    # Closed form: H(uniform over K) = ln K.
    assert entropy_from_counts([4] * 6, estimator="plugin", base="nats") == pytest.approx(math.log(6), rel=1e-15)


# --------------------------------------------------------------------------- pyitlib

@pytest.mark.parametrize("counts", COUNT_VECTORS)
@pytest.mark.parametrize("base", [2, math.e, 10])
@pytest.mark.parametrize(
    ("pyitlib_estimator", "ours", "alpha"),
    [
        ("JAMES-STEIN", "james_stein", None),
        (0.5, "dirichlet", 0.5),
        (0.5, "dirichlet", "jeffreys"),
        (1.0, "dirichlet", "laplace"),
        (2.5, "dirichlet", 2.5),
        ("PERKS", "dirichlet", "perks"),
        ("MINIMAX", "dirichlet", "minimax"),
    ],
)
def test_shrinkage_and_dirichlet_match_pyitlib_with_full_alphabet(counts, base, pyitlib_estimator, ours, alpha):
    # Reference: pyitlib.discrete_random_variable.entropy(X, estimator=...,
    # Alphabet_X=A, base=base).  A lists every symbol, including the ones that never
    # occur in X, so pyitlib's K equals len(counts) like ours.  pyitlib returns the
    # value in the requested base directly (it divides by log(base) itself).
    import pyitlib.discrete_random_variable as drv

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # pyitlib/sklearn deprecation chatter, not ours
        expected = drv.entropy(_sample(counts), estimator=pyitlib_estimator, Alphabet_X=np.arange(len(counts)), base=base)
    got = entropy_from_counts(counts, estimator=ours, alpha=alpha, base=base)
    assert got == pytest.approx(float(expected), rel=1e-12)


def test_james_stein_k_is_the_declared_alphabet():
    # Reference: pyitlib without Alphabet_X uses only the observed symbols as K;
    # ours uses len(counts), so dropping the empty cells must reproduce pyitlib's
    # observed-alphabet value, and keeping them must not.
    import pyitlib.discrete_random_variable as drv

    counts = np.array([7, 3, 0, 2, 1, 0, 0, 5])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        observed_only = float(drv.entropy(_sample(counts), estimator="JAMES-STEIN"))
    assert entropy_from_counts(counts[counts > 0], estimator="james_stein") == pytest.approx(observed_only, rel=1e-12)
    assert abs(entropy_from_counts(counts, estimator="james_stein") - observed_only) > 1e-3


def test_james_stein_lambda_by_hand():
    # Formula from Hausser & Strimmer (2009), JMLR 10, eq. 8 region (shrinkage
    # intensity lambda* = (1 - sum p^2) / ((N - 1) sum (1/K - p)^2)), recomputed here.
    counts = [6, 3, 1, 0]
    N, K = 10, 4
    p = [c / N for c in counts]
    lam = (1 - sum(q * q for q in p)) / ((N - 1) * sum((1 / K - q) ** 2 for q in p))
    shrunk = [lam / K + (1 - lam) * q for q in p]
    expected = -sum(q * math.log(q) for q in shrunk if q > 0)
    assert 0 < lam < 1
    assert entropy_from_counts(counts, estimator="james_stein", base="nats") == pytest.approx(expected, rel=1e-13)


def test_james_stein_with_one_observation_shrinks_fully():
    # Hausser & Strimmer's estimator has no variance estimate at N = 1; like their
    # R code (from memory) and pyitlib, lambda = 1: the uniform distribution.
    assert entropy_from_counts([0, 1, 0], estimator="james_stein", base="nats") == pytest.approx(math.log(3))


# --------------------------------------------------------------------------- Miller-Madow

@pytest.mark.parametrize("counts", COUNT_VECTORS)
def test_miller_madow_is_plugin_plus_m_minus_1_over_2n(counts):
    # Formula from Miller (1955): H_ML + (m - 1) / (2N), m = non-empty cells, in nats.
    N = sum(counts)
    m = sum(1 for c in counts if c > 0)
    plugin = -sum(c / N * math.log(c / N) for c in counts if c > 0)
    expected = plugin + (m - 1) / (2 * N)
    assert entropy_from_counts(counts, estimator="miller_madow", base="nats") == pytest.approx(expected, rel=1e-13)


# --------------------------------------------------------------------------- Chao-Shen

def _chao_shen_by_hand(counts):
    # Chao & Shen (2003), Environ. Ecol. Stat. 10: Horvitz-Thompson sum over seen
    # species of -C p ln(C p) / (1 - (1 - C p)^N) with coverage C = 1 - f1/N; when
    # f1 == N the paper replaces f1 by N - 1 (equation number not checked).
    N = sum(counts)
    f1 = sum(1 for c in counts if c == 1)
    if f1 == N:
        f1 = N - 1
    C = 1 - f1 / N
    total = 0.0
    for c in counts:
        if c > 0:
            pa = C * c / N
            total += -pa * math.log(pa) / (1 - (1 - pa) ** N)
    return total


@pytest.mark.parametrize("counts", [*COUNT_VECTORS, [1, 1, 1], [1, 1, 1, 1, 1, 0, 0], [1], [2, 0], [1, 0, 0]])
def test_chao_shen_matches_the_published_formula(counts):
    expected = _chao_shen_by_hand(counts) if len(counts) > 1 else 0.0
    assert entropy_from_counts(counts, estimator="chao_shen", base="nats") == pytest.approx(expected, rel=1e-12, abs=1e-15)


def test_chao_shen_all_singletons_uses_n_minus_1():
    # f1 == N == 3 -> f1 := 2, C = 1/3, pa = 1/9 each (Chao & Shen 2003).
    pa = 1 / 9
    expected = 3 * (-pa * math.log(pa) / (1 - (1 - pa) ** 3))
    assert entropy_from_counts([1, 1, 1], estimator="chao_shen", base="nats") == pytest.approx(expected, rel=1e-13)


# --------------------------------------------------------------------------- Grassberger

@pytest.mark.parametrize("counts", COUNT_VECTORS)
def test_grassberger_differs_from_dit_entropy_2_by_log_n_minus_digamma_n(counts):
    # Reference: dit.inference.entropy_2 (bits) implements Grassberger (2003) with
    # psi(N) in place of ln N (its source: digamma_N - digamma(n) + log 2 + alternating
    # sum).  We implement eq. 35 with ln N, so ours - dit == (ln N - psi(N)) / ln 2.
    from dit.inference import entropy_2

    N = sum(counts)
    expected = float(entropy_2(_sample(counts))) + (math.log(N) - digamma(N)) / math.log(2)
    assert entropy_from_counts(counts, estimator="grassberger") == pytest.approx(expected, rel=1e-12)


def test_grassberger_g_values_by_hand():
    # G(1) = psi(1) - ln 2 and G(2) = psi(2) + 1 - ln 2 follow from
    # G(n) = psi(n) + 1/2 (-1)^n [psi((n+1)/2) - psi(n/2)] (Grassberger 2003, eq. 35)
    # with psi(1/2) = -gamma - 2 ln 2 and psi(3/2) = 2 - gamma - 2 ln 2 (closed forms).
    gamma = 0.5772156649015329
    g1 = -gamma - math.log(2)
    g2 = (1 - gamma) + 1 - math.log(2)
    N = 3  # counts [1, 2]: H = ln 3 - (1 G(1) + 2 G(2)) / 3
    expected = math.log(N) - (g1 + 2 * g2) / N
    assert entropy_from_counts([1, 2], estimator="grassberger", base="nats") == pytest.approx(expected, rel=1e-13)


# --------------------------------------------------------------------------- degenerate cases

@pytest.mark.parametrize("estimator", list(ENTROPY_ESTIMATORS))
def test_one_possible_symbol_gives_zero(estimator):
    # Definition: a variable with a single possible value has entropy 0.
    assert entropy_from_counts([17], estimator=estimator) == 0.0
    assert entropy_from_counts([1], estimator=estimator) == 0.0


@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen"])
def test_one_observed_symbol_gives_zero_for_support_based_estimators(estimator):
    assert entropy_from_counts([0, 12, 0, 0], estimator=estimator) == 0.0


@pytest.mark.parametrize("estimator", list(ENTROPY_ESTIMATORS))
def test_single_observation_is_finite(estimator):
    value = entropy_from_counts([0, 1, 0, 0], estimator=estimator)
    assert math.isfinite(value)


@pytest.mark.parametrize("counts", [[0, 0, 0], []])
def test_no_observations_is_an_error(counts):
    with pytest.raises(ValueError, match="counts"):
        entropy_from_counts(counts)


def test_huge_counts_do_not_overflow():
    # scipy.stats.entropy as reference on counts near 1e15.
    counts = np.array([3e15, 1e15, 2e15])
    assert entropy_from_counts(counts, estimator="plugin") == pytest.approx(scipy.stats.entropy(counts, base=2), rel=1e-13)
    assert math.isfinite(entropy_from_counts(counts, estimator="grassberger"))


# --------------------------------------------------------------------------- properties

counts_vectors = st.lists(st.integers(min_value=0, max_value=60), min_size=2, max_size=12).filter(lambda c: sum(c) > 0)


@given(counts_vectors)
def test_plugin_lies_between_zero_and_log_k(counts):
    # Common practice / Shannon 1948: 0 <= H <= log K.
    h = entropy_from_counts(counts, estimator="plugin", base="nats")
    assert 0.0 <= h <= math.log(len(counts)) + 1e-12


@given(counts_vectors, st.sampled_from(FAST))
def test_bits_equal_nats_over_ln2(counts, estimator):
    bits = entropy_from_counts(counts, estimator=estimator, base=2)
    nats = entropy_from_counts(counts, estimator=estimator, base="nats")
    assert bits == pytest.approx(nats / math.log(2), rel=1e-12, abs=1e-15)
    assert entropy_from_counts(counts, estimator=estimator, base="hartleys") == pytest.approx(
        nats / math.log(10), rel=1e-12, abs=1e-15
    )


@given(counts_vectors, st.sampled_from(FAST), st.randoms(use_true_random=False))
def test_estimates_are_invariant_to_the_order_of_cells(counts, estimator, random):
    shuffled = list(counts)
    random.shuffle(shuffled)
    assert entropy_from_counts(shuffled, estimator=estimator) == pytest.approx(
        entropy_from_counts(counts, estimator=estimator), rel=1e-12, abs=1e-15
    )


@given(counts_vectors, st.integers(min_value=1, max_value=5), st.sampled_from(["plugin", "miller_madow", "chao_shen", "grassberger"]))
def test_adding_empty_cells_leaves_support_based_estimators_unchanged(counts, extra, estimator):
    padded = list(counts) + [0] * extra
    assert entropy_from_counts(padded, estimator=estimator) == pytest.approx(
        entropy_from_counts(counts, estimator=estimator), rel=1e-12, abs=1e-15
    )


@given(counts_vectors.filter(lambda c: sum(1 for x in c if x > 0) >= 2), st.integers(min_value=1, max_value=5),
       st.sampled_from([("james_stein", None), ("dirichlet", 0.5), ("dirichlet", "perks"), ("dirichlet", "minimax")]))
def test_adding_empty_cells_changes_alphabet_based_estimators(counts, extra, choice):
    # K (len(counts)) enters james_stein's target 1/K and every Dirichlet pseudocount.
    estimator, alpha = choice
    padded = list(counts) + [0] * extra
    before = entropy_from_counts(counts, estimator=estimator, alpha=alpha)
    after = entropy_from_counts(padded, estimator=estimator, alpha=alpha)
    if estimator == "james_stein" and before == pytest.approx(entropy_from_counts(counts, estimator="plugin")):
        # lambda clipped to 0 at K = len(counts): no shrinkage, then K need not matter
        return
    assert after != pytest.approx(before, rel=1e-9)


@given(st.lists(counts_vectors.filter(lambda c: len(c) == 6), min_size=1, max_size=8), st.sampled_from(FAST))
def test_rows_version_equals_one_call_per_vector(rows, estimator):
    stacked = np.array(rows)
    expected = [entropy_from_counts(r, estimator=estimator) for r in rows]
    np.testing.assert_allclose(entropy_of_count_rows(stacked, estimator=estimator), expected, rtol=1e-12, atol=1e-15)


# --------------------------------------------------------------------------- statistics

def test_miller_madow_and_grassberger_reduce_plugin_bias_at_small_n(rng):
    # Simulation with known truth (common practice for judging bias; Miller 1955
    # derives the first-order plug-in bias -(m - 1)/(2N)): K = 20 Zipf-like
    # probabilities, N = 40, 400 replicates.
    K, N, reps = 20, 40, 400
    p = 1.0 / np.arange(1, K + 1)
    p /= p.sum()
    truth = scipy.stats.entropy(p)
    draws = rng.multinomial(N, p, size=reps).astype(float)
    bias = {
        e: abs(entropy_of_count_rows(draws, estimator=e, base="nats").mean() - truth)
        for e in ["plugin", "miller_madow", "grassberger", "chao_shen"]
    }
    assert bias["miller_madow"] < 0.5 * bias["plugin"]
    assert bias["grassberger"] < 0.5 * bias["plugin"]
    assert bias["chao_shen"] < 0.5 * bias["plugin"]


def test_all_estimators_converge_to_the_truth_at_large_n(rng):
    # Consistency (common practice): at N = 10**6, K = 8 every estimator is within
    # a few standard errors (about 1e-3 nats) of the true entropy.
    p = np.array([0.3, 0.2, 0.15, 0.1, 0.1, 0.08, 0.05, 0.02])
    counts = rng.multinomial(10**6, p)
    truth = scipy.stats.entropy(p)
    for estimator in ENTROPY_ESTIMATORS:
        assert entropy_from_counts(counts, estimator=estimator, base="nats") == pytest.approx(truth, abs=5e-3), estimator


# --------------------------------------------------------------------------- bad input

@pytest.mark.parametrize(
    ("counts", "error", "match"),
    [
        ([3, -1, 2], ValueError, "negative"),
        ([3, 1.5, 2], ValueError, "non-integer"),
        ([3, np.nan, 2], ValueError, "NaN"),
        ([3, np.inf, 2], ValueError, "NaN or infinite"),
        ([[1, 2], [3, 4]], ValueError, "1-D"),
        (["a", "b"], TypeError, "numeric"),
        (5, ValueError, "1-D"),
    ],
)
def test_bad_counts_are_rejected_with_a_clear_message(counts, error, match):
    with pytest.raises(error, match=match):
        entropy_from_counts(counts)


@pytest.mark.parametrize("base", [0, -2, 1, 1.0, float("nan"), "decibels"])
def test_bad_base_is_rejected(base):
    with pytest.raises(ValueError, match="base"):
        entropy_from_counts([1, 2], base=base)


def test_unknown_estimator_lists_the_valid_names():
    with pytest.raises(ValueError, match="estimator='shrunk'") as info:
        entropy_from_counts([1, 2], estimator="shrunk")
    for name in ENTROPY_ESTIMATORS:
        assert repr(name) in str(info.value)


@pytest.mark.parametrize("alpha", [0, -1, float("nan"), float("inf"), "uniform", True, [0.5]])
def test_invalid_alpha_is_rejected(alpha):
    with pytest.raises((ValueError, TypeError), match="alpha"):
        entropy_from_counts([1, 2], estimator="dirichlet", alpha=alpha)


def test_alpha_with_another_estimator_is_an_error():
    with pytest.raises(ValueError, match="alpha=0.5 applies only to estimator='dirichlet'"):
        entropy_from_counts([1, 2], estimator="plugin", alpha=0.5)


def test_dirichlet_default_alpha_is_jeffreys():
    assert entropy_from_counts([4, 1, 0], estimator="dirichlet") == entropy_from_counts(
        [4, 1, 0], estimator="dirichlet", alpha=0.5
    )
    assert set(DIRICHLET_PRIORS) == {"jeffreys", "laplace", "perks", "minimax"}


def test_user_counts_are_not_modified():
    counts = np.array([3, 0, 2], dtype=np.int64)
    before = counts.copy()
    for estimator in ENTROPY_ESTIMATORS:
        entropy_from_counts(counts, estimator=estimator)
    np.testing.assert_array_equal(counts, before)


def test_rows_with_no_observations_are_named():
    with pytest.raises(ValueError, match="rows 1 have no observations"):
        entropy_of_count_rows([[1, 2], [0, 0]])
    with pytest.raises(ValueError, match="2-D"):
        entropy_of_count_rows([1, 2])


@settings(max_examples=20)
@given(st.lists(st.integers(min_value=0, max_value=30), min_size=2, max_size=6).filter(lambda c: sum(c) > 0))
def test_integer_and_float_counts_agree(counts):
    assert entropy_from_counts(np.array(counts, dtype=np.int32)) == entropy_from_counts(np.array(counts, dtype=float))


@given(counts_vectors, st.sampled_from([("james_stein", None), ("dirichlet", 0.5), ("dirichlet", "perks"),
                                        ("dirichlet", "minimax"), ("dirichlet", 3.0)]))
def test_smoothed_estimates_are_entropies_of_a_distribution(counts, choice):
    # james_stein and dirichlet are plug-ins of a smoothed probability vector over the
    # K cells, so (Shannon 1948) they lie in [0, log K].
    estimator, alpha = choice
    h = entropy_from_counts(counts, estimator=estimator, alpha=alpha, base="nats")
    assert 0.0 <= h <= math.log(len(counts)) + 1e-12


# --------------------------------------------------------------------------- fingerprint kernels
from infoscope.estimators.entropy import (  # noqa: E402
    FINGERPRINT_ESTIMATORS,
    count_fingerprint,
    entropy_nats,
    fingerprint_entropy_nats,
)
from infoscope.estimators import entropy as _entropy_module  # noqa: E402

# every estimator with the options that change its formula
FINGERPRINT_CASES = [(e, None) for e in ENTROPY_ESTIMATORS if e != "dirichlet"] + [
    ("dirichlet", a) for a in ("jeffreys", "laplace", "perks", "minimax", 2.5)
]
# few distinct values (so the fingerprint is really shorter) over up to 40 cells
repeated_counts = st.lists(st.sampled_from([0, 1, 1, 2, 3, 7, 50]), min_size=2, max_size=40)
with_zeros = repeated_counts.filter(lambda c: sum(c) > 0 and 0 in c)
without_zeros = st.lists(st.integers(min_value=1, max_value=9), min_size=2, max_size=40)


def _check_fingerprint_equals_cells(counts, estimator, alpha):
    # Reference: the per-cell kernels ENTROPY_ESTIMATORS, each checked above against
    # scipy.stats.entropy, dit, pyitlib and the published formulas; the estimators are
    # symmetric in the cells, so regrouping the sums by count value changes rounding only.
    n = np.asarray(counts, dtype=np.float64)
    values, mult = count_fingerprint(n)
    fast = float(fingerprint_entropy_nats(values, mult, n.size, n.sum(), estimator, alpha))
    cells = float(entropy_nats(n, estimator, alpha))
    assert fast == pytest.approx(cells, rel=1e-12, abs=1e-15)


@settings(max_examples=40, deadline=None)
@given(st.one_of(with_zeros, without_zeros), st.sampled_from(FINGERPRINT_CASES))
def test_fingerprint_kernels_equal_the_per_cell_kernels(counts, case):
    _check_fingerprint_equals_cells(counts, *case)


@pytest.mark.parametrize("case", FINGERPRINT_CASES)
@pytest.mark.parametrize("counts", [*COUNT_VECTORS, [1, 1, 1], [1, 1, 0, 0], [5, 0], [1, 0], [4, 4, 4]])
def test_fingerprint_kernels_equal_the_per_cell_kernels_on_edge_cases(counts, case):
    # all singletons (Chao-Shen's f1 = N - 1), one observed cell, one observation,
    # a uniform vector (James-Stein's misfit 0): the special branches of each kernel
    _check_fingerprint_equals_cells(counts, *case)


def test_fingerprint_kernels_vectorise_over_rows():
    # A (B, V) stack of multiplicities over shared values, as the bootstrap passes them,
    # equals one call per row (and the per-cell kernel on each row).
    rng = np.random.default_rng(3)
    rows = rng.integers(0, 4, size=(6, 30)).astype(np.float64)
    values = np.arange(4.0)
    mult = np.stack([np.bincount(r.astype(int), minlength=4) for r in rows]).astype(np.float64)
    for estimator, alpha in FINGERPRINT_CASES:
        got = fingerprint_entropy_nats(values, mult, 30, rows.sum(axis=1), estimator, alpha)
        np.testing.assert_allclose(got, entropy_nats(rows, estimator, alpha), rtol=1e-12, atol=1e-15)


def test_count_fingerprint_of_a_vector():
    values, mult = count_fingerprint([0, 3, 1, 1, 0, 1, 10**9])
    assert values.tolist() == [0.0, 1.0, 3.0, 1e9] and mult.tolist() == [2.0, 3.0, 1.0, 1.0]
    with pytest.raises(ValueError, match="counts"):
        count_fingerprint([1, -1])
    assert set(FINGERPRINT_ESTIMATORS) == set(ENTROPY_ESTIMATORS)


@pytest.mark.parametrize("case", FINGERPRINT_CASES)
def test_entropy_from_counts_takes_the_fingerprint_on_id_like_columns(case, monkeypatch):
    # 30,000 cells holding 1, 2 or 3 rows: entropy_from_counts scores the fingerprint;
    # forcing the per-cell kernel (threshold out of reach) gives the same number.
    estimator, alpha = case
    counts = np.tile([1.0, 1.0, 2.0, 3.0, 0.0], 6000)
    fast = entropy_from_counts(counts, estimator=estimator, alpha=alpha)
    monkeypatch.setattr(_entropy_module, "_FINGERPRINT_MIN_CELLS", 10**12)
    assert fast == pytest.approx(entropy_from_counts(counts, estimator=estimator, alpha=alpha), rel=1e-12)


def test_fingerprint_path_matches_scipy_and_closed_forms_on_singletons():
    n = np.ones(100_000)
    # Reference: scipy.stats.entropy(n, base=2) (the plug-in estimate, log2 N here)
    assert entropy_from_counts(n, estimator="plugin") == pytest.approx(scipy.stats.entropy(n, base=2), rel=1e-12)
    # Miller (1955): plug-in + (m - 1) / (2N) nats, m = N occupied cells
    assert entropy_from_counts(n, estimator="miller_madow", base="nats") == pytest.approx(
        math.log(1e5) + (1e5 - 1) / 2e5, rel=1e-12)
    # Chao & Shen (2003) with f1 == N replaced by N - 1: C = 1/N, every pa = 1/N^2
    pa = 1e-10
    expected = 1e5 * (-pa * math.log(pa)) / -math.expm1(1e5 * math.log1p(-pa))
    assert entropy_from_counts(n, estimator="chao_shen", base="nats") == pytest.approx(expected, rel=1e-12)
