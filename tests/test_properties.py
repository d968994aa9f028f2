"""Property tests (hypothesis) of the information measures and divergences.

The properties are theorems of information theory; the source is named beside each
(theorem and equation numbers from memory; Cover & Thomas 2006 = Elements of Information Theory, 2nd ed., Wiley; Meilă 2007 for
the metric properties of VI; Lin 1991 for the JS bound; Benjamini & Hochberg 1995).
"""
from __future__ import annotations

import math

import numpy as np
from hypothesis import assume, given
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from infoscope import measures as m
from infoscope.estimators.divergence import js_divergence, kl_divergence, psi
from infoscope.estimators.information import (
    adjusted_mutual_information_from_table,
    benjamini_hochberg,
    conditional_mutual_information_from_table,
    g_test_from_table,
    joint_entropy_from_counts,
    mutual_information_from_table,
    normalized_mutual_information_from_table,
    variation_of_information_from_table,
)

TOL = 1e-9

tables = hnp.arrays(
    np.int64,
    st.tuples(st.integers(1, 6), st.integers(1, 6)),
    elements=st.integers(0, 30),
).filter(lambda t: t.sum() > 0)

tables3d = hnp.arrays(
    np.int64,
    st.tuples(st.integers(1, 4), st.integers(1, 4), st.integers(1, 4)),
    elements=st.integers(0, 12),
).filter(lambda t: t.sum() > 0)


@st.composite
def distributions(draw, k=None):
    k = draw(st.integers(1, 8)) if k is None else k
    w = draw(hnp.arrays(np.float64, k, elements=st.floats(0, 1)))
    assume(w.sum() > 1e-3)
    return w / w.sum()


@st.composite
def distribution_pairs(draw):
    k = draw(st.integers(1, 8))
    return draw(distributions(k)), draw(distributions(k))


@st.composite
def label_triples(draw):
    """Three partitions of the same n rows."""
    n = draw(st.integers(1, 40))
    col = st.lists(st.integers(0, 4), min_size=n, max_size=n)
    return draw(col), draw(col), draw(col)


def h(counts):
    return joint_entropy_from_counts(counts, estimator="plugin")


# ----------------------------------------------------------------- MI
@given(tables)
def test_mi_is_between_zero_and_the_smaller_entropy(t):
    # Cover & Thomas (2006), Thm 2.6.3 (I >= 0) and eq. 2.45 with H(X|Y) >= 0.
    mi = mutual_information_from_table(t, estimator="plugin")
    assert mi >= 0.0
    assert mi <= min(h(t.sum(axis=1)), h(t.sum(axis=0))) + TOL


@given(tables)
def test_mi_is_symmetric(t):
    # Cover & Thomas (2006), eq. 2.46 (from memory): I(X; Y) = I(Y; X).
    for est in ("plugin", "miller_madow"):
        assert math.isclose(
            mutual_information_from_table(t, estimator=est),
            mutual_information_from_table(t.T, estimator=est),
            rel_tol=1e-12,
            abs_tol=1e-12,
        )


@given(tables)
def test_joint_entropy_is_subadditive(t):
    # Cover & Thomas (2006), Thm 2.6.6: H(X, Y) <= H(X) + H(Y).
    assert h(t) <= h(t.sum(axis=1)) + h(t.sum(axis=0)) + TOL


@given(tables, st.randoms(use_true_random=False))
def test_mi_is_invariant_to_relabelling(t, random):
    # Relabelling permutes rows and columns; every measure depends only on the cell multiset
    # within each row/column structure (Cover & Thomas 2006, definitions in ch. 2).
    rows = list(range(t.shape[0]))
    cols = list(range(t.shape[1]))
    random.shuffle(rows)
    random.shuffle(cols)
    p = t[rows][:, cols]
    assert math.isclose(
        mutual_information_from_table(p, estimator="plugin"),
        mutual_information_from_table(t, estimator="plugin"),
        rel_tol=1e-12,
        abs_tol=1e-12,
    )
    a, b = normalized_mutual_information_from_table(p), normalized_mutual_information_from_table(t)
    # NaN (a constant side: undefined) stays NaN under relabelling
    assert (math.isnan(a) and math.isnan(b)) or math.isclose(a, b, rel_tol=1e-12)


@given(tables)
def test_bits_equal_nats_over_ln2(t):
    # Change of logarithm base: log_2 a = ln a / ln 2 (common practice).
    nats = mutual_information_from_table(t, estimator="miller_madow", base="nats")
    bits = mutual_information_from_table(t, estimator="miller_madow", base=2)
    assert math.isclose(bits, nats / math.log(2), rel_tol=1e-12, abs_tol=1e-15)


@given(tables)
def test_g_statistic_is_2n_times_mi_in_nats(t):
    # Kullback (1959): G = 2 N I (nats).
    g = g_test_from_table(t)
    assert math.isclose(
        g.statistic, 2 * t.sum() * mutual_information_from_table(t, estimator="plugin", base="nats"),
        rel_tol=1e-9, abs_tol=1e-9,
    )
    assert 0.0 <= g.p_value <= 1.0


@given(tables)
def test_nmi_lies_in_unit_interval(t):
    # Kvålseth (1987): every normalisation of the plug-in MI lies in [0, 1]
    # (NaN exactly when a side is constant: no entropy to normalise by)
    constant = np.count_nonzero(t.sum(axis=1)) <= 1 or np.count_nonzero(t.sum(axis=0)) <= 1
    for norm in ("min", "geometric", "arithmetic", "max", "joint"):
        v = normalized_mutual_information_from_table(t, normalization=norm)
        assert math.isnan(v) if constant else -TOL <= v <= 1 + TOL


@given(st.lists(st.integers(0, 5), min_size=2, max_size=40))
def test_ami_of_a_partition_with_itself_is_one(x):
    # Vinh, Epps & Bailey (2010): AMI = 1 for identical partitions (non-constant ones).
    assume(len(set(x)) > 1)
    t = np.zeros((6, 6), dtype=int)
    np.add.at(t, (x, x), 1)
    assert math.isclose(adjusted_mutual_information_from_table(t), 1.0, rel_tol=1e-9)


@given(tables3d)
def test_chain_rule_of_mutual_information(t):
    # Cover & Thomas (2006), Thm 2.5.2: I(X; Y, Z) = I(X; Z) + I(X; Y | Z), all plug-in.
    i_x_yz = mutual_information_from_table(t.reshape(t.shape[0], -1), estimator="plugin")
    i_x_z = mutual_information_from_table(t.sum(axis=1), estimator="plugin")
    cmi = conditional_mutual_information_from_table(t, estimator="plugin")
    assert cmi >= 0.0
    assert math.isclose(i_x_yz, i_x_z + cmi, rel_tol=1e-9, abs_tol=1e-9)


# ----------------------------------------------------------------- VI metric
@given(label_triples())
def test_vi_is_a_metric(xyz):
    # Meilă (2007), Property 1: VI is non-negative, symmetric, 0 on identical partitions
    # and obeys the triangle inequality.
    x, y, z = xyz

    def vi(a, b):
        t = np.zeros((5, 5), dtype=np.int64)
        np.add.at(t, (a, b), 1)
        return variation_of_information_from_table(t)

    assert vi(x, x) == 0.0
    assert math.isclose(vi(x, y), vi(y, x), rel_tol=1e-12, abs_tol=1e-12)
    assert vi(x, z) <= vi(x, y) + vi(y, z) + TOL
    # the sample-level function gives the same number
    assert math.isclose(m.variation_of_information(x, z), vi(x, z), rel_tol=1e-12, abs_tol=1e-12)


@given(tables)
def test_vi_of_a_table_is_nonnegative_and_symmetric(t):
    # Meilă (2007), Property 1.
    v = variation_of_information_from_table(t)
    assert v >= 0.0
    assert math.isclose(v, variation_of_information_from_table(t.T), rel_tol=1e-12, abs_tol=1e-12)


# ----------------------------------------------------------------- divergences
@given(distributions())
def test_kl_of_self_is_zero(p):
    # Cover & Thomas (2006), Thm 2.6.3: KL(p || q) = 0 iff p = q.
    assert kl_divergence(p, p) == 0.0 or abs(kl_divergence(p, p)) < 1e-12


@given(distribution_pairs())
def test_kl_is_nonnegative(pq):
    # Gibbs' inequality (Cover & Thomas 2006, Thm 2.6.3).
    p, q = pq
    assert kl_divergence(p, q) >= 0.0


@given(distribution_pairs())
def test_js_is_symmetric_and_at_most_one_bit(pq):
    # Lin (1991): 0 <= JS <= ln 2 (= 1 bit), symmetric in p and q.
    p, q = pq
    js = js_divergence(p, q)
    assert 0.0 <= js <= 1.0 + 1e-12
    assert math.isclose(js, js_divergence(q, p), rel_tol=1e-12, abs_tol=1e-15)


@given(distribution_pairs())
def test_psi_is_symmetric_and_nonnegative(pq):
    # PSI = KL(a||e) + KL(e||a) (Jeffreys' J) is symmetric and >= 0.
    e, a = pq
    v = psi(e, a)
    assert v >= 0.0
    w = psi(a, e)
    assert (math.isinf(v) and math.isinf(w)) or math.isclose(v, w, rel_tol=1e-12, abs_tol=1e-15)


# ----------------------------------------------------------------- BH
@given(hnp.arrays(np.float64, st.integers(1, 30), elements=st.floats(0, 1)))
def test_bh_q_values_are_at_least_p_and_keep_the_order(p):
    # Benjamini & Hochberg (1995): q_(i) = min_{j >= i} min(1, m p_(j) / j) >= p_(i),
    # and the adjustment is monotone in p.
    q = benjamini_hochberg(p)
    assert np.all(q >= p - 1e-15) and np.all(q <= 1.0)
    order = np.argsort(p, kind="stable")
    assert np.all(np.diff(q[order]) >= -1e-15)
