"""The frame layer's numbers against outside references.

Every check names its reference beside it.  The data are datasets that
scikit-learn ships (iris, wine, breast cancer), so nothing here is invented
except the small frames of the pandas.crosstab / drift checks, which only need
known counts.  Codes for the references are computed independently in this file
(np.quantile + np.digitize for quantile bins, pandas.factorize for levels).
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
import scipy.stats
from scipy.cluster.hierarchy import leaves_list, linkage
from scipy.spatial.distance import squareform
from sklearn import datasets as skd
from sklearn.metrics import adjusted_mutual_info_score, mutual_info_score, normalized_mutual_info_score

from infoscope.frame.session import ProfileSession

BINS = 8


def _load(loader) -> pd.DataFrame:
    bunch = loader(as_frame=True)
    frame = bunch.frame.copy()
    return frame


@pytest.fixture(scope="module", params=["iris", "wine", "breast_cancer"])
def bundled(request):
    loader = {"iris": skd.load_iris, "wine": skd.load_wine, "breast_cancer": skd.load_breast_cancer}
    frame = _load(loader[request.param])
    if request.param == "breast_cancer":
        frame = frame.iloc[:, list(range(8)) + [frame.shape[1] - 1]]  # keep the test fast
    return frame


def _independent_codes(values: pd.Series, binned: bool) -> np.ndarray:
    """Codes computed without infoscope: quantile bins via np.quantile + np.digitize
    (infoscope's documented rule: BINS equal-frequency bins, tied edges merged,
    half-open bins with the last one closed, as numpy.histogram), or one code per
    distinct value via pandas.factorize."""
    x = values.to_numpy()
    if not binned:
        return pd.factorize(values, sort=True)[0]
    edges = np.unique(np.quantile(x.astype(float), np.linspace(0.0, 1.0, BINS + 1)))
    return np.digitize(x, edges[1:-1], right=False)


def test_pair_mi_equals_sklearn_mutual_info_score(bundled):
    s = ProfileSession(bundled, bins=BINS, strategy="quantile", estimator="plugin", base="nats",
                       n_boot=0)
    codes = {}
    for key, name in zip(s.names, bundled.columns):
        binned = s.column(key).edges is not None
        codes[key] = _independent_codes(bundled[name], binned)
        if binned:
            # the edges themselves: np.quantile (linear interpolation) with ties merged
            expected_edges = np.unique(np.quantile(bundled[name].astype(float),
                                                   np.linspace(0, 1, BINS + 1)))
            np.testing.assert_allclose(s.column(key).edges, expected_edges)
    pairs = s.pairs("nmi")
    for row in pairs.itertuples():
        # sklearn.metrics.mutual_info_score: plug-in MI in nats from two label vectors
        assert row.mi == pytest.approx(mutual_info_score(codes[row.a], codes[row.b]), abs=1e-10)
        # sklearn.metrics.normalized_mutual_info_score(average_method="arithmetic")
        assert row.nmi == pytest.approx(
            normalized_mutual_info_score(codes[row.a], codes[row.b], average_method="arithmetic"),
            abs=1e-10)


def test_relevance_equals_sklearn_on_the_target(bundled):
    target = bundled.columns[-1]
    s = ProfileSession(bundled, bins=BINS, estimator="plugin", base="nats", n_boot=0)
    rel = s.relevance(target).set_index("column")
    y = bundled[target].to_numpy()
    for key, name in zip(s.names[:-1], bundled.columns[:-1]):
        x = _independent_codes(bundled[name], s.column(key).edges is not None)
        # sklearn.metrics.mutual_info_score against the class label
        assert rel.loc[key, "mi"] == pytest.approx(mutual_info_score(x, y), abs=1e-10)
        # share of the target's entropy: scipy.stats.entropy of the class counts (nats)
        h = scipy.stats.entropy(np.bincount(pd.factorize(y)[0]))
        assert rel.loc[key, "share_of_target"] == pytest.approx(mutual_info_score(x, y) / h, abs=1e-10)


def test_ami_equals_sklearn():
    wine = _load(skd.load_wine)[["alcohol", "malic_acid", "hue", "target"]]
    s = ProfileSession(wine, bins=BINS, estimator="plugin", n_boot=0)
    pairs = s.pairs("adjusted_mi")
    codes = {k: _independent_codes(wine[k], s.column(k).edges is not None) for k in s.names}
    for row in pairs.itertuples():
        # sklearn.metrics.adjusted_mutual_info_score(average_method="arithmetic")
        assert row.value == pytest.approx(
            adjusted_mutual_info_score(codes[row.a], codes[row.b], average_method="arithmetic"),
            abs=1e-8)


def test_entropy_plugin_equals_scipy_of_value_counts():
    iris = _load(skd.load_iris)
    iris["species"] = pd.Categorical.from_codes(iris["target"], ["setosa", "versicolor", "virginica"])
    s = ProfileSession(iris, bins=BINS, estimator="plugin", n_boot=0)
    table = s.entropy().set_index("column")
    for key, name in zip(s.names, iris.columns):
        binned = s.column(key).edges is not None
        counts = pd.Series(_independent_codes(iris[name], binned)).value_counts()
        # scipy.stats.entropy(value_counts, base=2)
        assert table.loc[key, "entropy"] == pytest.approx(scipy.stats.entropy(counts, base=2), abs=1e-12)
    assert table.loc["species", "entropy"] == pytest.approx(np.log2(3))  # three classes of 50


def test_entropy_miller_madow_formula():
    wine = _load(skd.load_wine)[["target"]]
    e = ProfileSession(wine, base="nats", n_boot=0).entropy()
    counts = wine["target"].value_counts().to_numpy()
    n, m = counts.sum(), np.count_nonzero(counts)
    # Miller (1955): H_MM = H_plugin + (m - 1) / (2 N), in nats; plug-in via scipy.stats.entropy
    assert e.loc[0, "entropy"] == pytest.approx(scipy.stats.entropy(counts) + (m - 1) / (2 * n))


def test_joint_table_equals_pandas_crosstab():
    iris = _load(skd.load_iris)
    iris["species"] = pd.Categorical.from_codes(iris["target"], ["setosa", "versicolor", "virginica"])
    iris["wide_petal"] = iris["petal width (cm)"] > 1.0
    s = ProfileSession(iris, n_boot=0)
    pt = s.pair("species", "wide_petal")
    # pandas.crosstab of the same two columns
    expected = pd.crosstab(iris["species"], iris["wide_petal"])
    np.testing.assert_array_equal(pt.counts.to_numpy(), expected.to_numpy())
    assert list(pt.counts.index) == list(expected.index.astype(str))
    assert list(pt.counts.columns) == [str(c) for c in expected.columns]
    # expected counts under independence: scipy.stats.contingency.expected_freq
    np.testing.assert_allclose(pt.expected.to_numpy(), scipy.stats.contingency.expected_freq(expected))
    # G-test: scipy.stats.chi2_contingency(correction=False, lambda_="log-likelihood")
    ref = scipy.stats.chi2_contingency(expected, correction=False, lambda_="log-likelihood")
    assert pt.g_test[0] == pytest.approx(ref.statistic)
    assert pt.g_test[2] == pytest.approx(ref.pvalue)
    row = s.pairs().set_index(["a", "b"]).loc[("species", "wide_petal")]
    assert row["g"] == pytest.approx(ref.statistic) and row["dof"] == ref.dof
    assert row["n"] == expected.to_numpy().sum()


def test_pairs_counts_equal_crosstab_with_missing_values():
    wine = _load(skd.load_wine)[["target", "magnesium"]].copy()
    wine["class_text"] = wine["target"].map({0: "a", 1: "b", 2: "c"})
    wine.loc[wine.index[::7], "class_text"] = None
    s = ProfileSession(wine[["target", "class_text"]], n_boot=0)
    pt = s.pair("target", "class_text")
    # pandas.crosstab drops rows with a missing value: pairwise-complete cases
    expected = pd.crosstab(wine["target"], wine["class_text"])
    got = pt.counts.loc[[str(i) for i in expected.index], list(expected.columns)]
    np.testing.assert_array_equal(got.to_numpy(), expected.to_numpy())
    assert pt.n == int(expected.to_numpy().sum()) == int(wine["class_text"].notna().sum())


def test_q_values_equal_scipy_false_discovery_control():
    wine = _load(skd.load_wine).iloc[:, [0, 1, 2, 3, 9, 13]]
    pairs = ProfileSession(wine, bins=4, n_boot=0).pairs()
    # scipy.stats.false_discovery_control(p, method="bh") (Benjamini & Hochberg 1995)
    np.testing.assert_allclose(pairs["q_value"],
                               scipy.stats.false_discovery_control(pairs["p_value"], method="bh"))


def test_cluster_order_equals_scipy_average_linkage():
    wine = _load(skd.load_wine).iloc[:, :7]
    s = ProfileSession(wine, bins=BINS, estimator="plugin", n_boot=0)
    m = s.matrix("nmi", order="cluster")
    nmi = s.matrix("nmi").to_numpy()
    # scipy.cluster.hierarchy.linkage(method="average", optimal_ordering=True) on 1 - NMI
    tree = linkage(squareform(1.0 - nmi, checks=False), method="average", optimal_ordering=True)
    assert list(m.index) == [s.names[i] for i in leaves_list(tree)]


def test_drift_divergences_equal_scipy():
    ref = pd.DataFrame({"c": list("a" * 50 + "b" * 30 + "c" * 20)})
    cur = pd.DataFrame({"c": list("a" * 20 + "b" * 30 + "c" * 40 + "d" * 10)})
    d = ProfileSession(cur).drift(ref, pseudocount=0.5).iloc[0]
    e = np.array([50, 30, 20, 0]) + 0.5   # reference counts + the new level "d", smoothed
    a = np.array([20, 30, 40, 10]) + 0.5
    e, a = e / e.sum(), a / a.sum()
    # PSI = KL(a||e) + KL(e||a): scipy.stats.entropy(a, e) + scipy.stats.entropy(e, a)
    assert d["psi"] == pytest.approx(scipy.stats.entropy(a, e) + scipy.stats.entropy(e, a))
    # KL(current || reference) in bits: scipy.stats.entropy(a, e, base=2)
    assert d["kl"] == pytest.approx(scipy.stats.entropy(a, e, base=2))
    # JS divergence (raw counts): scipy.spatial.distance.jensenshannon(...)**2 (a distance)
    from scipy.spatial.distance import jensenshannon
    js = jensenshannon(np.array([50, 30, 20, 0]), np.array([20, 30, 40, 10]), base=2) ** 2
    assert d["js"] == pytest.approx(js)
    # homogeneity G-test on the 2 x K table: scipy.stats.chi2_contingency(lambda_="log-likelihood")
    table = np.array([[50, 30, 20, 10 * 0], [20, 30, 40, 10]])
    p = scipy.stats.chi2_contingency(table + 0.0, correction=False, lambda_="log-likelihood").pvalue
    from infoscope.estimators.two_sample import drift_chi2_test
    assert drift_chi2_test(table[0], table[1]).p_value == pytest.approx(p)
    # the table's p-value comes from 999 + 9,000 splits of the pooled rows: none is as extreme
    assert p < 1e-6 and d["p_value"] == pytest.approx(1 / 10_000)
    assert d["k"] == 4 and d["n"] == 100 and d["n_reference"] == 100
    assert d["flag"] == "major"


# ------------------------------------------------------------------ folded columns
# The demo log (infoscope.datasets) has an identifier and a long-tailed goods
# column with more levels than max_categories; the pair tables fold them, but the
# column's own entropy must be that of every level: scipy.stats.entropy of
# pandas value_counts is the reference.
@pytest.mark.filterwarnings("ignore:column '(parcel_ref|contents|courier_note)'.*folded:UserWarning")
def test_entropy_of_folded_columns_equals_scipy_of_unfolded_value_counts():
    from infoscope.datasets import make_deliveries

    log = make_deliveries(5_000, seed=0)[["parcel_ref", "contents", "depot"]]
    s = ProfileSession(log, estimator="plugin", n_boot=0, max_categories=64)
    table = s.entropy().set_index("column")
    for column in ("parcel_ref", "contents"):
        counts = log[column].value_counts(dropna=True)
        # scipy.stats.entropy(value_counts, base=2): the plug-in entropy of all levels
        assert table.loc[column, "entropy"] == pytest.approx(scipy.stats.entropy(counts, base=2), rel=1e-12)
        assert table.loc[column, "k"] == counts.size
        assert table.loc[column, "max_entropy"] == pytest.approx(np.log2(counts.size), rel=1e-12)
        assert table.loc[column, "effective_categories"] == pytest.approx(
            np.exp(scipy.stats.entropy(counts)), rel=1e-9)
        assert "levels_folded" in table.loc[column, "flags"]
    # an identifier of 5,000 distinct values: log2(5000) = 12.29 bits (closed form)
    assert table.loc["parcel_ref", "entropy"] == pytest.approx(np.log2(5_000), rel=1e-12)
    # the pair tables keep the folded alphabet, and the table says so
    assert table.attrs["folded_in_pairs"] == {"parcel_ref": 64, "contents": 64}
    pairs = s.pairs().set_index(["a", "b"])
    assert pairs.loc[("parcel_ref", "contents"), "k_a"] == 64
    # the interval comes from the unfolded counts too: it lies far above the plug-in
    # entropy of the folded codes (scipy.stats.entropy of their bincount) and near
    # the unfolded value (percentile bootstrap, Efron & Tibshirani 1993)
    t = ProfileSession(log[["contents"]], estimator="plugin", n_boot=100).entropy()
    codes = s.column("contents").codes
    folded = scipy.stats.entropy(np.bincount(codes[codes < 64]), base=2)
    unfolded = scipy.stats.entropy(log["contents"].value_counts(), base=2)
    assert unfolded - folded > 0.3
    assert folded + 0.2 < t.loc[0, "ci_low"] < unfolded < t.loc[0, "ci_high"] < unfolded + 0.1


@pytest.mark.filterwarnings("ignore:column 'courier_note'.*folded:UserWarning")
def test_entropy_of_folded_column_with_missing_symbol():
    from infoscope.datasets import make_deliveries

    log = make_deliveries(3_000, seed=4)[["courier_note"]]
    s = ProfileSession(log, estimator="miller_madow", base="nats", n_boot=0, max_categories=4,
                       missing="category")
    row = s.entropy().iloc[0]
    counts = log["courier_note"].value_counts(dropna=False).to_numpy()
    n, m = counts.sum(), np.count_nonzero(counts)
    # Miller (1955): H_MM = H_plugin + (m - 1) / (2 N) nats, plug-in via scipy.stats.entropy,
    # over every note and the missing symbol (value_counts(dropna=False))
    assert row["entropy"] == pytest.approx(scipy.stats.entropy(counts) + (m - 1) / (2 * n), rel=1e-12)
    assert row["k"] == log["courier_note"].nunique() + 1
    assert s.column("courier_note").k == 4
