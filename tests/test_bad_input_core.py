"""Bad input at the public functional API: a correct result, or a clear error or
warning that names the parameter and the problem -- never a crash from deep inside
numpy or pandas, never a silent wrong number, never a change to the caller's data.

Expected numbers come from closed forms (common practice: a constant has entropy 0,
n equally frequent labels log2(n) bits) or from reference calls named beside each
check (scipy.stats.entropy, sklearn.metrics.*, numpy.histogram_bin_edges,
pandas.Series.value_counts).
"""
from __future__ import annotations

import copy
import math
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
import scipy.stats
from sklearn import metrics

import infoscope as I
from infoscope import DataQualityWarning, SmallSampleWarning

# --------------------------------------------------------------------------- helpers


def _same(a, b) -> bool:
    if isinstance(a, pd.Series):
        pd.testing.assert_series_equal(a, b)
        return True
    if isinstance(a, (pd.Categorical, pd.api.extensions.ExtensionArray)):
        pd.testing.assert_extension_array_equal(a, b)
        return True
    if isinstance(a, np.ndarray):
        np.testing.assert_array_equal(a, b)
        assert a.dtype == b.dtype
        return True
    assert repr(a) == repr(b)  # lists (NaN-safe: repr, not ==)
    return True


def call_unchanged(func, *args, **kwargs):
    """Call ``func`` and check that no argument was modified (compared with deep copies)."""
    before = copy.deepcopy(args)
    try:
        return func(*args, **kwargs)
    finally:
        for a, b in zip(args, before):
            _same(a, b)


#: the package's own source folder: a clean error is raised by a file in it
PACKAGE_DIR = Path(I.__file__).resolve().parent


def raises_clearly(exc, match, func, *args, **kwargs):
    """``func`` raises ``exc`` matching ``match`` from infoscope's own code, inputs untouched.

    A clean error: the innermost frame of the traceback (where the exception was
    raised) is a file of the infoscope package itself (under ``PACKAGE_DIR``), not
    of numpy, pandas, scipy or the standard library, and the message matches.  The
    path is compared as a path, not as text, so a checkout or a virtual environment
    whose folder happens to be called "infoscope" does not count.
    """
    with pytest.raises(exc, match=match) as info:
        call_unchanged(func, *args, **kwargs)
    last = Path(str(info.traceback[-1].path)).resolve()
    assert last.is_relative_to(PACKAGE_DIR), f"raised from {last}, not from infoscope's checks in {PACKAGE_DIR}"
    return info


def test_raises_clearly_refuses_errors_from_outside_the_package(tmp_path):
    # the check must be able to fail: an error raised by numpy, and one raised by a
    # file in a folder that is merely *called* infoscope, are not clean errors
    with pytest.raises(AssertionError, match="not from infoscope"):
        raises_clearly(ValueError, "could not convert", np.array(["x"]).astype, float)
    fake = tmp_path / "infoscope" / "checks.py"
    fake.parent.mkdir()
    fake.write_text("def check(x):\n    raise ValueError('x is bad')\n")
    namespace: dict = {}
    exec(compile(fake.read_text(), str(fake), "exec"), namespace)
    with pytest.raises(AssertionError, match="not from infoscope"):
        raises_clearly(ValueError, "x is bad", namespace["check"], 1)


def plugin_bits(labels) -> float:
    # reference: pandas.Series.value_counts + scipy.stats.entropy(counts, base=2)
    return float(scipy.stats.entropy(pd.Series(labels, dtype=object).value_counts().to_numpy(), base=2))


SAMPLE_FUNCS = {
    "entropy": lambda v, **kw: I.entropy(v, **kw),
    "joint_entropy": lambda v, **kw: I.joint_entropy(v, v, **kw),
    "conditional_entropy": lambda v, **kw: I.conditional_entropy(v, v, **kw),
    "mutual_information": lambda v, **kw: I.mutual_information(v, v, **kw),
    "conditional_mutual_information": lambda v, **kw: I.conditional_mutual_information(v, v, v, **kw),
    "normalized_mutual_information": lambda v, **kw: I.normalized_mutual_information(v, v, **kw),
    "adjusted_mutual_information": lambda v, **kw: I.adjusted_mutual_information(v, v, **kw),
    "variation_of_information": lambda v, **kw: I.variation_of_information(v, v, **kw),
    "g_test": lambda v, **kw: I.g_test(v, v, **kw),
}
TABLE_FUNCS = {
    "entropy_from_counts": I.entropy_from_counts,
    "joint_entropy_from_counts": I.joint_entropy_from_counts,
    "mutual_information_from_table": I.mutual_information_from_table,
    "conditional_entropy_from_table": I.conditional_entropy_from_table,
    "normalized_mutual_information_from_table": I.normalized_mutual_information_from_table,
    "adjusted_mutual_information_from_table": I.adjusted_mutual_information_from_table,
    "variation_of_information_from_table": I.variation_of_information_from_table,
    "expected_mutual_information_from_table": I.expected_mutual_information_from_table,
    "g_test_from_table": I.g_test_from_table,
    "pointwise_mutual_information": I.pointwise_mutual_information,
}
ONE_D = {"entropy_from_counts", "joint_entropy_from_counts"}


def _table_for(name, table):
    """A 1-D count vector for the entropy functions, the 2-D table for the others."""
    return np.asarray(table, dtype=object).ravel().tolist() if name in ONE_D else table


# --------------------------------------------------------------------------- empty / one row / all missing


@pytest.mark.parametrize("name", SAMPLE_FUNCS)
@pytest.mark.parametrize("empty", [[], np.array([]), pd.Series([], dtype=float)], ids=["list", "array", "series"])
def test_empty_samples_are_a_clear_error(name, empty):
    raises_clearly(ValueError, r"empty \(no rows\)", SAMPLE_FUNCS[name], empty)


@pytest.mark.parametrize("name", SAMPLE_FUNCS)
def test_all_missing_samples_are_a_clear_error(name):
    raises_clearly(ValueError, "no rows left", SAMPLE_FUNCS[name], np.array([np.nan] * 6))
    raises_clearly(ValueError, "no rows left", SAMPLE_FUNCS[name], pd.array([pd.NA] * 6, dtype="Int64"))


def test_one_row_gives_the_closed_forms():
    # closed forms (common practice): one observation has entropy 0 and shares nothing
    assert call_unchanged(I.entropy, [7]) == 0.0
    assert I.joint_entropy([7], ["a"]) == 0.0
    assert I.conditional_entropy([7], ["a"]) == 0.0
    assert I.variation_of_information([7], ["a"]) == 0.0
    with pytest.warns(SmallSampleWarning, match="1 cells for 1 rows"):
        assert I.mutual_information([7], ["a"]) == 0.0
    with pytest.warns(SmallSampleWarning, match="1 cells for 1 rows"):
        res = I.g_test([7], ["a"])
    # scipy.stats.chi2_contingency convention for dof 0: statistic 0, p-value 1
    assert (res.statistic, res.dof, res.p_value) == (0.0, 0, 1.0)
    # sklearn.metrics.normalized_mutual_info_score([7], ["a"]) == 1.0 (one cluster each
    # side); we depart on purpose: a normalised measure of a variable without
    # entropy is undefined (NaN), never 1 (issue 10)
    assert metrics.normalized_mutual_info_score([7], ["a"]) == 1.0
    assert math.isnan(I.normalized_mutual_information([7], ["a"]))
    assert math.isnan(I.adjusted_mutual_information([7], ["a"]))


@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen", "james_stein", "dirichlet", "grassberger", "nsb"])
def test_constant_column_has_zero_entropy_for_every_estimator(estimator):
    # closed form: one symbol, entropy 0 whatever the correction (K = 1)
    assert call_unchanged(I.entropy, np.full(50, 3.5), estimator=estimator) == 0.0


def test_constant_column_against_the_reference_libraries(rng):
    y = rng.integers(0, 4, size=200)
    const = np.zeros(200, dtype=int)
    # sklearn.metrics.mutual_info_score / normalized_mutual_info_score / adjusted_mutual_info_score
    assert I.mutual_information(const, y, estimator="plugin", base="nats") == metrics.mutual_info_score(const, y)
    # scikit-learn's normalised scores give 0.0 here; ours are NaN on purpose (a
    # constant has no entropy to normalise by: undefined, issue 10)
    assert metrics.normalized_mutual_info_score(const, y) == 0.0
    assert math.isnan(I.normalized_mutual_information(const, y))
    assert math.isnan(I.adjusted_mutual_information(const, y))
    # VI(const, y) = H(y) (Meila 2007: H(X|Y) + H(Y|X) with H(X) = 0)
    assert I.variation_of_information(const, y) == pytest.approx(plugin_bits(y.tolist()), rel=1e-12)
    res = I.g_test(const, y)
    assert (res.statistic, res.dof, res.p_value) == (0.0, 0, 1.0)
    assert I.ksg_mutual_information(np.ones(50), rng.normal(size=50)) == 0.0
    with pytest.raises(ValueError, match="exact duplicates"):
        I.differential_entropy(np.ones(50))


# --------------------------------------------------------------------------- infinities


@pytest.mark.parametrize("name", ["entropy", "mutual_information", "g_test", "variation_of_information"])
def test_infinite_values_warn_and_count_as_missing(name):
    x = np.array([1.0, np.inf, 2.0, -np.inf, 1.0, 2.0] * 5)
    finite = x[np.isfinite(x)]
    with pytest.warns(DataQualityWarning, match=r"infinite value\(s\); they are treated as missing"):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", SmallSampleWarning)
            got = call_unchanged(SAMPLE_FUNCS[name], x)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", SmallSampleWarning)
        want = SAMPLE_FUNCS[name](finite)
    assert got == want


def test_infinite_values_in_knn_and_bins_inputs():
    x = np.array([0.1, 0.5, np.inf, 0.9, 1.3, 2.2])
    raises_clearly(ValueError, r"x contains NaN or infinite values in 1 row\(s\) \(first at row 2\)",
                   I.differential_entropy, x, k=1)
    raises_clearly(ValueError, "y contains NaN or infinite", I.ksg_mutual_information, np.arange(6.0), x, k=1)
    # numpy.histogram_bin_edges on the finite values
    np.testing.assert_array_equal(call_unchanged(I.bin_edges, x, bins=3),
                                  np.histogram_bin_edges(x[np.isfinite(x)], bins=3))
    with pytest.warns(DataQualityWarning, match=r"column 'x': 1 infinite value\(s\) \(1 \+inf, 0 -inf\)"):
        col = call_unchanged(I.encode_column, x, name="x", cache=False)
    assert col.n_missing == 1 and "infinite_values" in col.flags


# --------------------------------------------------------------------------- mixed types, unhashable cells


def test_mixed_type_labels_stay_apart():
    # 1 and "1" are different labels: 2 equally frequent labels = 1 bit (closed form)
    assert call_unchanged(I.entropy, [1, "1", 1, "1"], estimator="plugin") == 1.0
    # 1, 1.0 and True compare equal in Python; the profile (encode_column) keeps them
    # apart, and so does the functional API, with a warning
    with pytest.warns(DataQualityWarning, match="values holds values of different types that compare equal"):
        got = call_unchanged(I.entropy, [1, True, 1.0, "x"], estimator="plugin")
    assert got == 2.0  # four distinct labels, closed form log2(4)
    with pytest.warns(DataQualityWarning, match="values of several types"):
        col = I.encode_column([1, True, 1.0, "x"], name="c", cache=False)
    assert col.k == 4
    # an object column of one type (with missing values) needs no warning
    assert I.entropy(np.array(["a", None, "b", "a"], dtype=object), estimator="plugin") == pytest.approx(
        plugin_bits(["a", "b", "a"]), rel=1e-12)


@pytest.mark.parametrize("name", list(SAMPLE_FUNCS))
def test_unhashable_cells_are_read_by_their_contents_with_a_warning(name):
    cells = [[1, 2], [1, 2], {"a": 1, "b": 2}, {"b": 2, "a": 1}, [3], (1, 2)] * 5
    with pytest.warns(DataQualityWarning, match=r"has 25 unhashable cell\(s\) \(dict, list\)"):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", SmallSampleWarning)
            got = call_unchanged(SAMPLE_FUNCS[name], cells, **({} if name in ("g_test", "adjusted_mutual_information") else {"estimator": "plugin"}))
    # the same rows as hashable stand-ins: dicts equal whatever their key order, and a
    # list is not the tuple with the same items (as encode_column reads them)
    stand_in = ["L12", "L12", "D", "D", "L3", "T12"] * 5
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", SmallSampleWarning)
        want = SAMPLE_FUNCS[name](stand_in, **({} if name in ("g_test", "adjusted_mutual_information") else {"estimator": "plugin"}))
    assert got == want


def test_unhashable_cells_entropy_value_and_knn_side():
    cells = [[1], [1], {"k": [1, 2]}, [2]]
    with pytest.warns(DataQualityWarning, match="unhashable"):
        got = I.entropy(cells, estimator="plugin")
    assert got == pytest.approx(scipy.stats.entropy([2, 1, 1], base=2), rel=1e-12)  # scipy.stats.entropy
    # a label side of the kNN estimator with list cells: same warning, no crash
    labels = [[0], [1]] * 20
    x = np.r_[np.zeros(20), np.ones(20)] + np.linspace(0, 0.1, 40)
    with pytest.warns(DataQualityWarning, match="unhashable"):
        I.mutual_information(x, labels, estimator="ksg")


@pytest.mark.parametrize("func, args", [
    (I.bin_edges, ([[1, 2], [3]],)),
    (I.differential_entropy, ([[1.0, 2.0], [3.0]],)),
    (I.ksg_mutual_information, ([[1.0, 2.0], [3.0]], [1.0, 2.0])),
    (I.kl_divergence, ([[1, 2], [3]], [1, 1])),
    (I.psi, ([1, 1], [[1, 2], [3]])),
    (I.mutual_information_from_table, ([[1, 2], [3]],)),
    (I.g_test_from_table, ([[1, 2], [3]],)),
    (I.g_test_from_tables, ([[[1, 2], [3]]],)),
], ids=lambda v: getattr(v, "__name__", ""))
def test_ragged_nested_input_is_a_clear_type_error(func, args):
    raises_clearly(TypeError, "nested or ragged|rows differ in length", func, *args)


def test_ragged_counts_to_entropy_from_counts():
    raises_clearly(TypeError, "counts", I.entropy_from_counts, [[1, 2], [3]])


def test_non_numeric_values_to_numeric_functions_name_the_parameter():
    raises_clearly(TypeError, "values must be numeric", I.bin_edges, [1, "a", 2.5])
    raises_clearly(TypeError, "x must hold (real )?numbers", I.differential_entropy, ["a", "b", "c", "d"])
    raises_clearly(TypeError, "x is boolean", I.differential_entropy, np.array([True, False, True]))
    raises_clearly(TypeError, "y must hold (real )?numbers", I.ksg_mutual_information, np.arange(4.0), ["a", "b", "c", "d"])


# --------------------------------------------------------------------------- counts and tables


BAD_TABLES = [
    ([[3, -1], [2, 4]], ValueError, "contains negative values"),
    ([[1.5, 1], [2, 3]], ValueError, "contains non-integer values"),
    ([[np.nan, 1], [2, 3]], ValueError, "contains NaN or infinite values"),
    ([[np.inf, 1], [2, 3]], ValueError, "contains NaN or infinite values"),
    ([[0, 0], [0, 0]], ValueError, r"no observations"),
    ([["a", 1], [2, 3]], TypeError, "must be numeric counts"),
]


@pytest.mark.parametrize("name", TABLE_FUNCS)
@pytest.mark.parametrize("table, exc, match", BAD_TABLES, ids=["negative", "fraction", "nan", "inf", "zeros", "text"])
def test_bad_counts_name_the_parameter(name, table, exc, match):
    table = _table_for(name, table)
    parameter = "counts" if name in ONE_D else "table"
    raises_clearly(exc, f"{parameter} {match}|{parameter} has no observations", TABLE_FUNCS[name], np.array(table, dtype=object) if exc is TypeError else np.array(table))


def test_bad_counts_to_conditional_mi_and_batch_g_test():
    raises_clearly(ValueError, "table3d must be a 3-D table", I.conditional_mutual_information_from_table, [[1, 2], [3, 4]])
    raises_clearly(ValueError, "table3d contains negative", I.conditional_mutual_information_from_table, -np.ones((2, 2, 2)))
    raises_clearly(ValueError, r"tables\[1\] contains non-integer", I.g_test_from_tables, [np.ones((2, 2)), np.full((2, 2), 0.5)])
    raises_clearly(ValueError, "must be a 2-D table, got shape", I.mutual_information_from_table, [1, 2, 3])


def test_whole_number_floats_are_counts():
    # counts as floats 2.0 are the same counts: scipy.stats.entropy([2, 2], base=2) == 1
    assert call_unchanged(I.entropy_from_counts, np.array([2.0, 2.0]), estimator="plugin") == 1.0
    t = np.array([[5.0, 0.0], [0.0, 5.0]])
    assert call_unchanged(I.mutual_information_from_table, t, estimator="plugin") == 1.0


# --------------------------------------------------------------------------- probability vectors


@pytest.mark.parametrize("func", [I.kl_divergence, I.js_divergence, I.cross_entropy, I.psi])
def test_probabilities_that_do_not_sum_to_one_are_refused(func):
    first = "expected" if func is I.psi else "p"
    raises_clearly(ValueError, rf"{first} sums to 0.6, not 1", func, np.array([0.3, 0.3]), np.array([0.5, 0.5]))
    raises_clearly(ValueError, "contains negative values", func, np.array([1.2, -0.2]), np.array([0.5, 0.5]))
    raises_clearly(ValueError, "is empty", func, np.array([]), np.array([0.5, 0.5]))
    raises_clearly(TypeError, "must be a numeric vector", func, ["a", "b"], [0.5, 0.5])


@pytest.mark.parametrize("func", [I.kl_divergence, I.js_divergence, I.cross_entropy, I.psi])
def test_divergences_of_different_lengths_are_refused(func):
    raises_clearly(ValueError, "same number of (cells|bins)", func, [0.5, 0.5], [0.2, 0.3, 0.5])


def test_psi_of_an_empty_side_is_an_error_not_zero():
    # all-zero counts have no distribution; smoothing them made them uniform and
    # PSI([0, 0], [1, 1]) came out 0 ("stable") before
    raises_clearly(ValueError, "expected has no observations", I.psi, [0, 0], [1, 1])
    raises_clearly(ValueError, "actual has no observations", I.psi, [3, 1], [0, 0], pseudocount=0.5)
    # the index on counts equals the Jeffreys J of the smoothed shares:
    # scipy.stats.entropy(a, e) + scipy.stats.entropy(e, a), pseudocount 0.5 (Yurdakul 2018)
    e, a = np.array([30, 0, 10]), np.array([20, 5, 15])
    es, as_ = (e + 0.5) / (e + 0.5).sum(), (a + 0.5) / (a + 0.5).sum()
    assert I.psi(e, a) == pytest.approx(scipy.stats.entropy(as_, es) + scipy.stats.entropy(es, as_), rel=1e-12)


# --------------------------------------------------------------------------- lengths


@pytest.mark.parametrize("func, args, match", [
    (I.mutual_information, ([1, 2, 3], [1, 2]), "x has 3, y has 2"),
    (I.conditional_entropy, ([1, 2, 3], [1, 2]), "y has 3, given has 2"),
    (I.joint_entropy, ([1, 2, 3], [1, 2]), r"columns\[0\] has 3, columns\[1\] has 2"),
    (I.conditional_mutual_information, ([1, 2], [1, 2], [1, 2, 3]), "x has 2, y has 2, given has 3"),
    (I.normalized_mutual_information, ([1, 2, 3], [1, 2]), "x has 3, y has 2"),
    (I.adjusted_mutual_information, ([1, 2, 3], [1, 2]), "x has 3, y has 2"),
    (I.variation_of_information, ([1, 2, 3], [1, 2]), "x has 3, y has 2"),
    (I.g_test, ([1, 2, 3], [1, 2]), "x has 3, y has 2"),
    (I.ksg_mutual_information, (np.arange(5.0), np.arange(4.0)), "x has 5, y has 4"),
])
def test_mismatched_lengths_name_both_inputs(func, args, match):
    raises_clearly(ValueError, f"same length: {match}", func, *args)


def test_mismatched_lengths_with_the_knn_estimator():
    raises_clearly(ValueError, "x has 5, y has 4", I.mutual_information, np.arange(5.0), np.arange(4.0), estimator="ksg")


# --------------------------------------------------------------------------- base, names


BASE_CALLS = {
    "entropy": lambda b: I.entropy([1, 2, 1, 2], base=b),
    "joint_entropy": lambda b: I.joint_entropy([1, 2, 1, 2], [1, 1, 2, 2], base=b),
    "conditional_entropy": lambda b: I.conditional_entropy([1, 2, 1, 2], [1, 1, 2, 2], base=b),
    "mutual_information": lambda b: I.mutual_information([1, 2] * 10, [1, 2] * 10, base=b),
    "mutual_information_ksg": lambda b: I.mutual_information(np.arange(10.0), np.arange(10.0) ** 2, base=b, estimator="ksg"),
    "conditional_mutual_information": lambda b: I.conditional_mutual_information([1, 2] * 10, [1, 2] * 10, [1] * 20, base=b),
    "variation_of_information": lambda b: I.variation_of_information([1, 2], [1, 2], base=b),
    "entropy_from_counts": lambda b: I.entropy_from_counts([1, 2], base=b),
    "mutual_information_from_table": lambda b: I.mutual_information_from_table([[1, 2], [3, 4]], base=b),
    "kl_divergence": lambda b: I.kl_divergence([1, 1], [1, 2], base=b),
    "js_divergence": lambda b: I.js_divergence([1, 1], [1, 2], base=b),
    "cross_entropy": lambda b: I.cross_entropy([1, 1], [1, 2], base=b),
    "differential_entropy": lambda b: I.differential_entropy(np.arange(10.0) ** 1.5, base=b),
    "ksg_mutual_information": lambda b: I.ksg_mutual_information(np.arange(10.0), np.arange(10.0) ** 2, base=b),
}


@pytest.mark.parametrize("name", BASE_CALLS)
@pytest.mark.parametrize("base, exc, match", [
    (0, ValueError, "base=0 is invalid"), (-2, ValueError, "base=-2 is invalid"),
    (1, ValueError, "base=1 is invalid: the base of a logarithm must be > 0 and != 1"),
    (math.inf, ValueError, "base=inf is invalid"), ("bytes", ValueError, "base='bytes' is not a known unit"),
    (True, TypeError, "base must be a number or a unit name, got bool"), (None, TypeError, "got NoneType"),
])
def test_bad_base_is_named(name, base, exc, match):
    raises_clearly(exc, match, BASE_CALLS[name], base)


def test_bits_nats_and_hartleys_spellings_agree():
    # log identities (closed form): H in nats = H in bits * ln 2 = H in hartleys * ln 10
    h2, he, h10 = (I.entropy([1, 2, 2, 3], estimator="plugin", base=b) for b in ("bits", "nats", "hartleys"))
    assert he == pytest.approx(h2 * math.log(2), rel=1e-12) and he == pytest.approx(h10 * math.log(10), rel=1e-12)


VALID_ESTIMATORS = r"choose one of: 'plugin', 'miller_madow', 'chao_shen', 'james_stein', 'dirichlet', 'grassberger', 'nsb'"


@pytest.mark.parametrize("func", [
    lambda e: I.entropy([1, 2], estimator=e),
    lambda e: I.mutual_information([1, 2] * 10, [1, 2] * 10, estimator=e),
    lambda e: I.conditional_entropy([1, 2], [1, 2], estimator=e),
    lambda e: I.joint_entropy([1, 2], [1, 2], estimator=e),
    lambda e: I.normalized_mutual_information([1, 2], [1, 2], estimator=e),
    lambda e: I.variation_of_information([1, 2], [1, 2], estimator=e),
    lambda e: I.entropy_from_counts([1, 2], estimator=e),
    lambda e: I.mutual_information_from_table([[1, 2], [3, 4]], estimator=e),
])
@pytest.mark.parametrize("estimator", ["shannon", "Plugin", None, 3])
def test_unknown_estimator_lists_the_valid_ones(func, estimator):
    raises_clearly(ValueError, f"estimator={estimator!r} is not valid; {VALID_ESTIMATORS}", func, estimator)


def test_knn_estimator_names_outside_mutual_information_are_explained():
    raises_clearly(ValueError, "estimator='ksg' works on continuous samples", I.entropy, [1.0, 2.0], estimator="ksg")
    raises_clearly(ValueError, "bins= is not used by estimator='ksg'", I.mutual_information,
                   np.arange(10.0), np.arange(10.0), estimator="ksg", bins=4)


@pytest.mark.parametrize("normalization", ["sqrt", "mean", None])
def test_unknown_normalization_lists_the_valid_ones(normalization):
    valid = "choose one of: 'min', 'geometric', 'arithmetic', 'max', 'joint'"
    raises_clearly(ValueError, f"normalization={normalization!r} is not valid; {valid}",
                   I.normalized_mutual_information, [1, 2], [1, 2], normalization=normalization)
    raises_clearly(ValueError, f"normalization={normalization!r} is not valid; {valid}",
                   I.normalized_mutual_information_from_table, [[1, 0], [0, 1]], normalization=normalization)
    raises_clearly(ValueError, "not valid for the adjusted MI; choose one of: 'min', 'geometric', 'arithmetic', 'max'",
                   I.adjusted_mutual_information, [1, 2], [1, 2], normalization=normalization)


def test_other_bad_options_are_named():
    raises_clearly(ValueError, "missing='skip' is not valid; choose one of: 'drop', 'category', 'error'",
                   I.entropy, [1, 2], missing="skip")
    raises_clearly(ValueError, "strategy='width' is not valid", I.entropy, np.arange(50.0), bins=4, strategy="width")
    raises_clearly(ValueError, "strategy='width' is not valid", I.bin_edges, np.arange(50.0), strategy="width")
    raises_clearly(ValueError, "bins='square' is not a known rule", I.bin_edges, np.arange(50.0), bins="square")
    raises_clearly(TypeError, "bins=None is not valid here", I.bin_edges, np.arange(50.0), bins=None)
    raises_clearly(TypeError, "bins=None is not valid here", I.encode_column, np.arange(50.0), name="c", bins=None)
    raises_clearly(ValueError, "bins=0 is invalid", I.bin_edges, np.arange(50.0), bins=0)
    raises_clearly(ValueError, "bin edges must increase strictly", I.entropy, np.arange(50.0), bins=[3, 1, 2])
    raises_clearly(ValueError, "metric='manhattan' is not valid; choose one of: 'chebyshev', 'euclidean'",
                   I.differential_entropy, np.arange(50.0) ** 1.5, metric="manhattan")
    raises_clearly(ValueError, "algorithm=3 is not valid", I.ksg_mutual_information, np.arange(9.0), np.arange(9.0) ** 2, algorithm=3)
    raises_clearly(ValueError, r"missing=None is not valid", I.encode_column, [1, 2], name="c", missing=None)
    raises_clearly(TypeError, "name must be a str", I.encode_column, [1, 2], name=3)


@pytest.mark.parametrize("func", [
    lambda: I.entropy([1, 2], estimator="plugin", alpha=0.5),
    lambda: I.mutual_information([1, 2] * 10, [1, 2] * 10, estimator="plugin", alpha=0.5),
    lambda: I.mutual_information_from_table([[1, 2], [3, 4]], estimator="plugin", alpha=0.5),
    lambda: I.normalized_mutual_information_from_table([[1, 2], [3, 4]], alpha=0.5),
    lambda: I.variation_of_information_from_table([[1, 2], [3, 4]], alpha=0.5),
    lambda: I.joint_entropy_from_counts([1, 2], estimator="plugin", alpha=0.5),
    lambda: I.entropy_from_counts([1, 2], estimator="plugin", alpha=0.5),
])
def test_alpha_with_an_estimator_that_takes_none_is_refused(func):
    # before: the table functions ignored alpha with "plugin" (a silent no-op)
    with pytest.raises(ValueError, match="alpha=0.5 applies only to estimator='dirichlet', not estimator='plugin'"):
        func()


def test_bad_alpha_is_named():
    raises_clearly(ValueError, "alpha=-1 is invalid", I.entropy, [1, 2], estimator="dirichlet", alpha=-1)
    raises_clearly(ValueError, "alpha='flat' is not valid", I.mutual_information_from_table, [[1, 2], [3, 4]],
                   estimator="dirichlet", alpha="flat")


# --------------------------------------------------------------------------- kNN neighbours


@pytest.mark.parametrize("k", [5, 6])
def test_k_not_below_n_is_refused(k):
    x = np.array([0.1, 0.7, 1.9, 2.4, 3.8])
    raises_clearly(ValueError, f"k={k} must be smaller than the number of samples n=5", I.differential_entropy, x, k=k)
    raises_clearly(ValueError, f"k={k} must be smaller", I.ksg_mutual_information, x, x ** 2, k=k)
    raises_clearly(ValueError, f"k={k} must be smaller", I.mutual_information, x, x ** 2, estimator="ksg", k=k)
    raises_clearly(ValueError, f"k={k} must be smaller", I.mixed_mutual_information, x, [0, 0, 1, 1, 1], k=k)


@pytest.mark.parametrize("k, exc, match", [(0, ValueError, "k=0 is invalid"), (2.5, TypeError, "k must be a positive integer"),
                                           (True, TypeError, "k must be a positive integer"), ("3", TypeError, "got '3'")])
def test_bad_k_is_named(k, exc, match):
    raises_clearly(exc, match, I.differential_entropy, np.arange(10.0) ** 1.5, k=k)
    raises_clearly(exc, match, I.ksg_mutual_information, np.arange(10.0), np.arange(10.0) ** 2, k=k)


def test_empty_input_to_the_knn_estimator():
    raises_clearly(ValueError, r"x and y are empty \(no rows\)", I.mutual_information, [], [], estimator="ksg")
    raises_clearly(ValueError, "x is empty", I.differential_entropy, np.array([]))


# --------------------------------------------------------------------------- pandas dtypes


NULLABLE = {
    "Int64": (pd.array([1, 2, pd.NA, 2, 3, 1, pd.NA, 2], dtype="Int64"), [1, 2, 2, 3, 1, 2]),
    "boolean": (pd.array([True, False, pd.NA, True, True, pd.NA, False, True], dtype="boolean"),
                [True, False, True, True, False, True]),
    "string[pyarrow]": (pd.array(["a", "b", None, "a", "c", "a", None, "b"], dtype="string[pyarrow]"),
                        ["a", "b", "a", "c", "a", "b"]),
    "Float64": (pd.array([0.5, 1.5, pd.NA, 0.5, 2.5, 0.5, pd.NA, 1.5], dtype="Float64"),
                [0.5, 1.5, 0.5, 2.5, 0.5, 1.5]),
}


@pytest.mark.parametrize("dtype", NULLABLE)
@pytest.mark.parametrize("wrap", [lambda a: a, pd.Series], ids=["array", "series"])
def test_nullable_dtypes_drop_na_like_the_plain_values(dtype, wrap):
    values, present = NULLABLE[dtype]
    values = wrap(values)
    # pandas value_counts + scipy.stats.entropy on the present values
    assert call_unchanged(I.entropy, values, estimator="plugin") == pytest.approx(plugin_bits(present), rel=1e-12)
    other = np.arange(8) % 3
    mask = ~pd.isna(pd.Series(values)).to_numpy()
    # sklearn.metrics.mutual_info_score on the pairwise-complete rows
    want = metrics.mutual_info_score(np.asarray(present, dtype=str), other[mask])
    with pytest.warns(SmallSampleWarning):
        got = call_unchanged(I.mutual_information, values, other, estimator="plugin", base="nats")
    assert got == pytest.approx(want, rel=1e-12, abs=1e-15)
    col = call_unchanged(I.encode_column, values, name="c", cache=False)
    assert col.n_missing == 2 and col.n == 8


def test_nullable_missing_as_a_category():
    values = pd.array([1, 2, pd.NA, 2], dtype="Int64")
    # labels 1, 2, 2, (missing): scipy.stats.entropy([1, 2, 1], base=2)
    assert I.entropy(values, estimator="plugin", missing="category") == pytest.approx(
        scipy.stats.entropy([1, 2, 1], base=2), rel=1e-12)
    raises_clearly(ValueError, r"values has 1 missing value\(s\) \(first at row 2\) and missing='error'",
                   I.entropy, values, missing="error")


def test_categorical_with_unused_categories():
    cat = pd.Categorical(["a", "b", "a", "b", "a", "c"], categories=["a", "b", "c", "never", "unseen"])
    plain = np.asarray(cat, dtype=object)
    # unused categories carry no rows: the estimates equal those of the plain labels
    for est in ("plugin", "miller_madow", "james_stein", "chao_shen"):
        assert call_unchanged(I.entropy, cat, estimator=est) == I.entropy(plain, estimator=est)
    # sklearn.metrics.mutual_info_score on the labels
    y = [0, 1, 0, 1, 1, 0]
    with pytest.warns(SmallSampleWarning):
        got = call_unchanged(I.mutual_information, cat, y, estimator="plugin", base="nats")
    assert got == pytest.approx(metrics.mutual_info_score(plain, y), rel=1e-12)
    # the profile's contract counts them in the alphabet (DEVELOPERS.md, EncodedColumn.k)
    col = call_unchanged(I.encode_column, pd.Series(cat), name="c", cache=False)
    assert col.k == 5 and col.n_distinct == 3


def test_bin_edges_on_nullable_and_constant_values():
    values = pd.array([1, 5, pd.NA, 9, 3], dtype="Int64")
    # numpy.histogram_bin_edges on the present values
    np.testing.assert_array_equal(call_unchanged(I.bin_edges, values, bins=4),
                                  np.histogram_bin_edges([1, 5, 9, 3], bins=4))
    # numpy's convention for a zero range: one bin [v - 0.5, v + 0.5]
    np.testing.assert_array_equal(I.bin_edges([3.0, 3.0, 3.0], bins=1), np.histogram_bin_edges([3.0, 3.0, 3.0], bins=1))
    raises_clearly(ValueError, "no finite values to bin", I.bin_edges, [np.nan, np.inf])
    raises_clearly(ValueError, "no finite values to bin", I.bin_edges, [])
    raises_clearly(TypeError, "values must be numeric", I.bin_edges, pd.array(["a", "b"], dtype="string[pyarrow]"))


def test_encode_column_degenerate_columns():
    empty = call_unchanged(I.encode_column, np.array([]), name="c", cache=False)
    assert (empty.k, empty.n, empty.flags) == (0, 0, ("constant",))
    nan = call_unchanged(I.encode_column, np.full(4, np.nan), name="c", cache=False)
    assert (nan.k, nan.n_missing) == (0, 4) and "mostly_missing" in nan.flags
    with pytest.warns(DataQualityWarning, match=r"column 'c': 2 cell\(s\) hold unhashable values \(dict, list\)"), \
            pytest.warns(DataQualityWarning, match="values of several types"):
        col = call_unchanged(I.encode_column, [[1], {"a": 1}, "x"], name="c", cache=False)
    assert col.k == 3
    raises_clearly(TypeError, "column 'c': expected a sequence of values, got a scalar int",
                   I.encode_column, 5, name="c")
    raises_clearly(ValueError, r"column 'c': expected a 1-D column, got shape \(2, 2\)",
                   I.encode_column, np.ones((2, 2)), name="c")


# --------------------------------------------------------------------------- inputs never change


def test_sample_functions_never_modify_inputs(rng):
    x = rng.normal(size=60)
    x[3] = np.nan
    x[5] = np.inf
    series = pd.Series(rng.integers(0, 3, size=60), index=np.arange(60)[::-1], name="s")
    cat = pd.Categorical(rng.choice(["u", "v"], size=60), categories=["u", "v", "w"])
    ro = rng.integers(0, 4, size=60)
    ro.setflags(write=False)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        warnings.simplefilter("ignore", SmallSampleWarning)
        for func in SAMPLE_FUNCS.values():
            call_unchanged(func, x, bins=4)
            call_unchanged(func, series)
            call_unchanged(func, cat)
            call_unchanged(func, ro)
        call_unchanged(I.mutual_information, x, series, estimator="ksg")
        call_unchanged(I.mutual_information, series, cat, bins=3, missing="category")
        call_unchanged(I.encode_column, x, name="x", cache=False, bins=4)
        call_unchanged(I.bin_edges, x, bins="fd")
        xs = rng.normal(size=40)
        call_unchanged(I.differential_entropy, np.repeat(xs[:10], 4), jitter=1e-6)
        call_unchanged(I.ksg_mutual_information, xs, xs ** 2)
        call_unchanged(I.psi, np.array([3, 0, 2]), np.array([1, 1, 1]))
        call_unchanged(I.kl_divergence, np.array([2, 0]), np.array([3, 1]), pseudocount=0.5)
        call_unchanged(I.mutual_information_from_table, np.array([[1, 2], [3, 4]]))
    assert not ro.flags.writeable  # still read-only


# --------------------------------------------------------------------------- other containers and dtypes


@pytest.mark.parametrize("values, match", [
    ({3, 1, 2, 4}, "got a set .*no row order"),
    (frozenset({1, 2}), "got a frozenset"),
    ({"a": 1, "b": 2}, r"got a dict; say whether its keys or its values are the rows"),
], ids=["set", "frozenset", "dict"])
def test_unordered_containers_are_refused(values, match):
    raises_clearly(TypeError, f"values must be a sequence in row order, {match}", I.entropy, values)
    raises_clearly(TypeError, f"x must be a sequence in row order, {match}", I.mutual_information, values, [1, 2, 3, 4])
    raises_clearly(TypeError, f"column 'c': expected a sequence in row order, {match}", I.encode_column, values, name="c")


def test_complex_values_are_labels_and_cannot_be_binned():
    z = np.array([1 + 2j, 3j, 1 + 2j, 0j])
    # labels: counts 2, 1, 1 -> scipy.stats.entropy([2, 1, 1], base=2) = 1.5 bits, no ComplexWarning
    with warnings.catch_warnings():
        warnings.simplefilter("error", np.exceptions.ComplexWarning)
        assert call_unchanged(I.entropy, z, estimator="plugin") == scipy.stats.entropy([2, 1, 1], base=2)
    raises_clearly(TypeError, "values holds complex numbers", I.bin_edges, z)


def test_nested_arrow_cells_are_read_by_their_contents():
    import pyarrow as pa
    lists = pd.Series(pd.array([[1], [2], [1], None, [1]], dtype=pd.ArrowDtype(pa.list_(pa.int64()))))
    # labels [1] x3, [2] x1 (the missing row dropped): scipy.stats.entropy([3, 1], base=2)
    with pytest.warns(DataQualityWarning, match=r"values has 4 unhashable cell\(s\) \(ndarray\)"):
        got = call_unchanged(I.entropy, lists, estimator="plugin")
    assert got == pytest.approx(scipy.stats.entropy([3, 1], base=2), rel=1e-12)


@pytest.mark.parametrize("func", [
    lambda: I.entropy([1.0] * 4, estimator="plugin"),
    lambda: I.joint_entropy_from_counts([[4]], estimator="plugin"),
    lambda: I.mutual_information_from_table([[4]], estimator="plugin"),
    lambda: I.mutual_information(["a"] * 30, ["b"] * 30, estimator="plugin"),
    lambda: I.cross_entropy([1, 0], [1, 0]),
    lambda: I.kl_divergence([1, 0], [1, 0]),
    lambda: I.variation_of_information_from_table([[4, 0], [0, 4]]),
])
def test_zero_results_are_positive_zero(func):
    # max(-0.0, 0.0) is -0.0 in Python, which a table or a widget shows as "-0"
    value = func()
    assert value == 0.0 and math.copysign(1.0, value) == 1.0


def test_new_warnings_point_at_the_callers_line():
    # contract of the functional API: a warning names the caller's line, not ours
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        I.entropy([[1], [2], [1]] * 10)
        I.entropy([1, True, 2] * 10)
        I.mutual_information(np.linspace(0, 1, 40), [[0], [1]] * 20, estimator="ksg")
        I.mutual_information(np.r_[np.linspace(0, 1, 39), np.inf], [0, 1] * 20, estimator="ksg", discrete="y")
    assert len(caught) == 4
    assert all(w.filename == __file__ for w in caught), [(w.filename, str(w.message)) for w in caught]
