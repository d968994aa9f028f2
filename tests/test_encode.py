"""encode_column / encode_frame: the EncodedColumn contract for every dtype.

Every check names its outside reference beside it (numpy, pandas, scipy calls) or
says "contract" where it checks DEVELOPERS.md's EncodedColumn rules.
"""
from __future__ import annotations

import datetime
import warnings

import numpy as np
import pandas as pd
import pytest
import scipy.stats
from hypothesis import given
from hypothesis import strategies as st

from infoscope import DataQualityWarning
from infoscope.encode import (
    MISSING_LABEL,
    OTHER_LABEL,
    EncodedColumn,
    EncodingCache,
    codes_dtype,
    column_keys,
    content_key,
    encode_column,
    encode_columns,
    encode_frame,
)
from infoscope.encode.columns import HEAVY_TAIL_INDEX, tail_index


def enc(values, **kw):
    kw.setdefault("name", "col")
    kw.setdefault("cache", False)
    return encode_column(values, **kw)


def check_contract(col: EncodedColumn) -> None:
    """DEVELOPERS.md, EncodedColumn."""
    assert col.codes.ndim == 1 and col.codes.flags.c_contiguous
    assert col.codes.dtype == codes_dtype(col.k)
    assert len(col.labels) == col.k and all(isinstance(s, str) for s in col.labels)
    assert len(set(col.labels)) == col.k
    assert col.codes.size == col.n
    assert int(col.codes.max(initial=0)) <= col.k
    missing_policy = dict(col.settings)["missing"]
    n_code_k = int(np.count_nonzero(col.codes == col.k))
    if missing_policy == "drop":
        assert n_code_k == col.n_missing
    else:
        assert n_code_k == 0
        if col.n_missing:
            assert col.labels[-1] == MISSING_LABEL
            assert int(np.count_nonzero(col.codes == col.k - 1)) == col.n_missing
    hash(col.settings)


# ---------------------------------------------------------------- numbers


def test_quantile_codes_equal_numpy_digitize_and_pandas_cut(rng):
    # references: numpy.digitize(x, edges[1:-1]) and numpy.histogram(x, edges) on the
    # same edges; pandas.cut(x, edges, right=False) for values below the last edge
    x = rng.gamma(2.0, size=4000)
    col = enc(x, bins=10)
    assert col.kind == "numeric" and col.k == 10
    np.testing.assert_array_equal(col.edges, np.quantile(x, np.linspace(0, 1, 11)))
    np.testing.assert_array_equal(col.codes, np.digitize(x, col.edges[1:-1]))
    np.testing.assert_array_equal(col.counts(), np.histogram(x, col.edges)[0])
    inside = x < col.edges[-1]
    ref = pd.cut(x, col.edges, right=False, labels=False)
    np.testing.assert_array_equal(col.codes[inside], ref[inside].astype(int))
    # equal frequency: 4000 distinct values in 10 quantile bins (numpy.quantile, linear)
    assert set(col.counts().tolist()) == {400}
    assert col.labels[0].startswith("[") and col.labels[-1].endswith("]")
    check_contract(col)


@pytest.mark.parametrize("bins", ["fd", "sturges", "knuth", 7])
def test_uniform_and_rules_use_bin_edges(bins, rng):
    # reference: numpy.histogram_bin_edges / numpy.histogram on the same data
    x = rng.normal(size=3000)
    col = enc(x, bins=bins, strategy="uniform")
    if bins != "knuth":
        np.testing.assert_array_equal(col.edges, np.histogram_bin_edges(x, bins=bins))
    np.testing.assert_array_equal(col.counts(), np.histogram(x, col.edges)[0])


def test_zero_one_column_is_two_categories_not_sixteen_bins():
    # contract: a 0/1 column is not binned into 16 bins
    col = enc(np.array([0, 1, 1, 0, 1] * 20))
    assert (col.kind, col.k, col.labels, col.edges) == ("integer_categories", 2, ("0", "1"), None)
    # reference: numpy.unique(..., return_counts=True)
    np.testing.assert_array_equal(col.counts(), np.unique([0, 1, 1, 0, 1] * 20, return_counts=True)[1])


def test_whole_valued_floats_with_few_values_are_integer_categories_in_numeric_order():
    # integers stored as float (the NaN made them float) are whole numbers: levels
    col = enc([2.0, 0.0, 1.0, 0.0, np.nan])
    assert col.kind == "integer_categories"
    assert col.labels == ("0", "1", "2")
    np.testing.assert_array_equal(col.codes, [2, 0, 1, 0, 3])


def test_fractional_floats_are_numeric_however_few_their_values():
    # issue 10: a 32-row grade average (29 distinct values) was "integer_categories";
    # floats with fractional values are measurements and are binned
    rng = np.random.default_rng(3)
    gpa = np.round(rng.uniform(2.0, 4.0, 32), 2)
    col = enc(gpa, bins=4, strategy="uniform")
    assert col.kind == "numeric" and col.k == 4 and col.edges is not None
    # reference: numpy.histogram with the same 4 equal-width bins
    np.testing.assert_array_equal(col.counts(), np.histogram(gpa, bins=4)[0])
    # the threshold still keeps whole numbers as levels, and 0 bins them
    assert enc(np.arange(10.0).repeat(3)).kind == "integer_categories"
    assert enc(np.arange(10.0).repeat(3), categorical_threshold=0, bins=2).kind == "numeric"


def test_threshold_zero_forces_binning_and_explicit_edges_always_bin():
    x = np.array([0, 1, 2, 3] * 10)
    assert enc(x, categorical_threshold=0, bins=2, strategy="uniform").kind == "numeric"
    col = enc(x, bins=[0.0, 1.5, 3.0])
    assert col.kind == "numeric" and col.labels == ("[0, 1.5)", "[1.5, 3]")
    # reference: numpy.histogram(x, [0, 1.5, 3])
    np.testing.assert_array_equal(col.counts(), np.histogram(x, [0.0, 1.5, 3.0])[0])


def test_values_outside_explicit_edges_warn_and_fill_end_bins():
    x = np.arange(100.0)
    with pytest.warns(DataQualityWarning, match=r"column 'col': 40 value\(s\) lie outside"):
        col = enc(x, bins=[20.0, 50.0, 79.0])
    assert col.counts().tolist() == [50, 50]


def test_nullable_integer_and_float_na_is_missing():
    s = pd.Series([1, None, 3, 3] * 5, dtype="Int64")
    col = enc(s)
    assert (col.kind, col.k, col.n_missing, col.labels) == ("integer_categories", 2, 5, ("1", "3"))
    f = pd.Series(np.r_[np.linspace(0, 1, 99), [np.nan]], dtype="Float64")
    col = enc(f, bins=4)
    assert col.n_missing == 1 and col.k == 4
    # reference: numpy.quantile on the 99 non-missing values
    np.testing.assert_array_equal(col.edges, np.quantile(np.linspace(0, 1, 99), np.linspace(0, 1, 5)))
    check_contract(col)


def test_pyarrow_backed_numbers(rng):
    x = rng.normal(size=500)
    s = pd.Series(x, dtype="double[pyarrow]")
    np.testing.assert_array_equal(enc(s).codes, enc(x).codes)


# ---------------------------------------------------------------- missing policy


def test_missing_drop_gets_code_k_and_category_gets_a_symbol(rng):
    x = rng.normal(size=400)
    x[::10] = np.nan
    drop = enc(x, bins=8, missing="drop")
    assert drop.k == 8 and drop.n_missing == 40
    assert np.all(drop.codes[::10] == 8)
    cat = enc(x, bins=8, missing="category")
    assert cat.k == 9 and cat.labels[-1] == MISSING_LABEL
    assert np.all(cat.codes[::10] == 8) and not np.any(cat.codes == 9)
    np.testing.assert_array_equal(drop.codes, cat.codes)  # same rows, same symbol numbers
    check_contract(drop)
    check_contract(cat)


def test_missing_symbol_only_when_something_is_missing():
    col = enc(["a", "b", "a"], missing="category")
    assert col.labels == ("a", "b") and col.k == 2


def test_missing_values_of_every_spelling_are_missing():
    cells = pd.Series(["a", None, np.nan, pd.NA, "b", "a"], dtype=object)
    col = enc(cells, missing="category")
    assert col.n_missing == 3 and col.labels == ("a", "b", MISSING_LABEL)
    t = pd.Series(pd.to_datetime(["2024-01-01", None, "2024-01-02"]))
    assert enc(t).n_missing == 1


def test_infinite_values_warn_flag_and_count_as_missing():
    x = np.r_[np.linspace(0, 1, 97), [np.inf, -np.inf, np.inf]]
    for policy in ("drop", "category"):
        with pytest.warns(DataQualityWarning, match=r"column 'col': 3 infinite value\(s\) \(2 \+inf, 1 -inf\)"):
            col = enc(x, bins=4, missing=policy)
        assert "infinite_values" in col.flags and col.n_missing == 3
        # never binned into the edge bins: edges from the finite values only (numpy.quantile)
        np.testing.assert_array_equal(col.edges, np.quantile(x[:97], np.linspace(0, 1, 5)))
        assert col.counts()[:4].sum() == 97


def test_all_missing_and_empty_columns():
    col = enc(np.full(5, np.nan))
    assert (col.k, col.n_missing, col.labels) == (0, 5, ())
    assert {"constant", "mostly_missing"} <= set(col.flags)
    assert enc(np.full(5, np.nan), missing="category").labels == (MISSING_LABEL,)
    empty = enc([])
    assert empty.n == 0 and empty.k == 0 and empty.codes.size == 0


# ---------------------------------------------------------------- categories and text


def test_categorical_unused_categories_count_in_k():
    # contract: K = number of categories; pandas.Categorical.value_counts() lists unused ones with 0
    c = pd.Categorical(["lo", "hi", "lo"], categories=["lo", "mid", "hi"], ordered=True)
    col = enc(pd.Series(c))
    assert (col.kind, col.k, col.labels, col.n_distinct) == ("categorical", 3, ("lo", "mid", "hi"), 2)
    np.testing.assert_array_equal(col.counts(), pd.Series(c).value_counts(sort=False).to_numpy())


def test_unordered_categorical_and_text_are_most_frequent_first():
    col = enc(pd.Series(["x", "y", "y", "z", "z", "z"], dtype="category"))
    assert col.labels == ("z", "y", "x")
    # reference: pandas.Series.value_counts (descending counts)
    s = pd.Series(["q", "r", "r", "s", "s", "s", "s"])
    col = enc(s)
    vc = s.value_counts()
    assert col.labels == tuple(vc.index) and col.counts().tolist() == vc.tolist()


@pytest.mark.parametrize("dtype", [object, "string", "string[pyarrow]", "str"])
def test_string_dtypes_agree_with_pandas_factorize(dtype):
    # reference: pandas.factorize (codes up to relabelling) and value_counts
    s = pd.Series(["b", "a", None, "b", "c", "a", "b"], dtype=dtype)
    col = enc(s)
    ref, uniques = pd.factorize(s)
    mapping = {lab: i for i, lab in enumerate(col.labels)}
    expected = [col.k if r < 0 else mapping[str(uniques[r])] for r in ref]
    assert col.codes.tolist() == expected and col.kind == "text"


def test_booleans_have_both_symbols():
    col = enc(np.array([True, True, True]))
    assert (col.kind, col.k, col.labels) == ("boolean", 2, ("False", "True"))
    assert "constant" in col.flags
    nb = enc(pd.Series([True, None, False], dtype="boolean"))
    assert nb.codes.tolist() == [1, 2, 0]
    assert enc(pd.Series([True, None, False], dtype=object)).codes.tolist() == [1, 2, 0]


def test_mixed_types_keep_one_and_string_one_apart():
    with pytest.warns(DataQualityWarning, match=r"column 'mix': values of several types \(int: 2, str: 2"):
        col = enc(pd.Series([1, "1", 1, "1", True], dtype=object), name="mix")
    assert "mixed_types" in col.flags
    assert col.k == 3 and set(col.labels) == {"int:1", "str:1", "bool:True"}


def test_lists_keep_cell_types_and_nested_cells():
    # numpy.asarray([1, "1"]) would make two equal strings; the list's cells are kept
    with pytest.warns(DataQualityWarning, match="several types"):
        assert enc([1, "1"]).k == 2
    with pytest.warns(DataQualityWarning, match="unhashable"):
        col = enc([[1, 2], [3, 4], [1, 2]])
    assert col.labels == ("[1, 2]", "[3, 4]") and col.n == 3
    assert enc((x for x in [1.0, 2.0])).kind == "integer_categories"


def test_unhashable_cells_use_a_stable_text_and_warn():
    cells = pd.Series([[1, 2], {"a": 1, "b": 2}, {"b": 2, "a": 1}, {3, 1}, [1, 2], None], dtype=object)
    with pytest.warns(DataQualityWarning) as record:
        col = enc(cells, name="blobs")
    messages = [str(w.message) for w in record]
    assert "column 'blobs': 5 cell(s) hold unhashable values (dict, list, set)" in messages[0]
    assert "column 'blobs': values of several types (list: 2, dict: 2, set: 1)" in messages[1]
    codes = col.codes.tolist()
    assert codes[0] == codes[4] and codes[1] == codes[2] and codes[5] == col.k
    assert "dict:{'a': 1, 'b': 2}" in col.labels and "set:{1, 3}" in col.labels


def test_all_list_cells_are_one_type_text():
    with pytest.warns(DataQualityWarning, match="unhashable"):
        col = enc(pd.Series([[1], [2], [1]], dtype=object))
    assert col.labels == ("[1]", "[2]") and "mixed_types" not in col.flags


def test_reserved_labels_in_the_data_stay_distinct():
    col = enc(pd.Series(["(missing)", None, "(other)"]), missing="category")
    assert col.k == 3 and len(set(col.labels)) == 3 and col.labels[-1] == MISSING_LABEL


# ---------------------------------------------------------------- folding


def test_folding_keeps_the_most_frequent_levels():
    # contract: K <= max_categories; the rarest levels fold into "(other)"
    values = [f"v{i}" for i in range(10) for _ in range(10 - i)]  # v0 x10, v1 x9, ... v9 x1
    with pytest.warns(DataQualityWarning, match=r"column 'col': 6 of 10 levels \(21 row\(s\)\) are folded"):
        col = enc(values, max_categories=5)
    assert col.k == 5 and "levels_folded" in col.flags
    assert col.labels == ("v0", "v1", "v2", "v3", OTHER_LABEL)
    assert col.counts().tolist() == [10, 9, 8, 7, 6 + 5 + 4 + 3 + 2 + 1]
    assert col.n_distinct == 10


def test_folding_counts_the_missing_symbol_in_k():
    values = [f"v{i}" for i in range(10) for _ in range(10 - i)] + [None] * 3
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(values, max_categories=5, missing="category")
    assert col.k == 5 and col.labels[-2:] == (OTHER_LABEL, MISSING_LABEL)
    check_contract(col)


def test_folding_an_ordered_categorical_keeps_natural_order():
    cats = ["a", "b", "c", "d", "e"]
    c = pd.Categorical(["e"] * 5 + ["a"] * 4 + ["c"] * 3 + ["b", "d"], categories=cats, ordered=True)
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(pd.Series(c), max_categories=4)
    assert col.labels == ("a", "c", "e", OTHER_LABEL)


def _value_counts(values) -> np.ndarray:
    # reference: pandas.Series.value_counts() (missing dropped, most frequent first)
    return np.sort(pd.Series(values, dtype=object).value_counts(dropna=True).to_numpy())[::-1]


def test_level_counts_keep_the_unfolded_levels():
    values = [f"v{i}" for i in range(10) for _ in range(10 - i)] + [None] * 4
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(values, max_categories=5)
    # contract (EncodedColumn.level_counts): int64, most frequent first, every level
    assert col.level_counts.dtype == np.int64 and not col.level_counts.flags.writeable
    assert col.level_counts.tolist() == list(range(10, 0, -1))
    assert len(col.level_counts) == col.n_distinct == 10
    assert col.level_counts.sum() == col.n - col.n_missing
    np.testing.assert_array_equal(col.level_counts, _value_counts(values))
    # the folded symbols still count the same rows (the codes are unchanged by the field)
    assert col.counts().sum() == col.level_counts.sum()


def test_level_counts_give_the_entropy_of_an_id_column():
    # closed form (common practice): n equally frequent values have entropy log2(n)
    # bits; reference: scipy.stats.entropy(counts, base=2).  Folding to 64 symbols
    # leaves one big "(other)" symbol and almost no entropy.
    ids = [f"row-{i:05d}" for i in range(50_000)]
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(ids)
    assert col.k == 64 and len(col.level_counts) == 50_000
    assert scipy.stats.entropy(col.level_counts, base=2) == pytest.approx(np.log2(50_000), rel=1e-12)
    assert scipy.stats.entropy(col.counts(), base=2) < 0.05


def test_level_counts_for_missing_category_and_categoricals():
    values = ["a"] * 6 + ["b"] * 3 + ["c"] * 2 + ["d"] + [None] * 5
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(values, max_categories=3, missing="category")
    # the missing symbol is not a level: sum == n - n_missing (contract)
    assert col.level_counts.tolist() == [6, 3, 2, 1] and col.level_counts.sum() == col.n - col.n_missing
    # unused categories are not levels: len == n_distinct (pandas value_counts drops zeros here)
    c = pd.Categorical(["x"] * 4 + ["y"] * 2 + ["z"], categories=["w", "x", "y", "z", "v"])
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(pd.Series(c), max_categories=2)
    assert col.level_counts.tolist() == [4, 2, 1] and col.n_distinct == 3
    expected = pd.Series(c).value_counts()
    np.testing.assert_array_equal(col.level_counts, expected[expected > 0].to_numpy())


def test_level_counts_of_folded_integer_categories_and_none_otherwise(rng):
    x = rng.integers(0, 40, size=2_000)
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(x, categorical_threshold=50, max_categories=10)
    assert col.kind == "integer_categories" and col.k == 10
    np.testing.assert_array_equal(col.level_counts, np.sort(np.bincount(x))[::-1])  # numpy.bincount
    # nothing folded, binned, boolean: no level counts
    assert enc(["a", "b", "a"]).level_counts is None
    assert enc(rng.normal(size=500), bins=8).level_counts is None
    assert enc(np.array([True, False])).level_counts is None


def test_level_counts_stay_out_of_settings_and_survive_the_cache():
    store = EncodingCache()
    values = pd.Series([f"v{i % 70}" for i in range(700)])
    with pytest.warns(DataQualityWarning, match="folded"):
        first = encode_column(values, name="a", cache=store)
    with pytest.warns(DataQualityWarning, match="folded"):
        again = encode_column(values, name="b", cache=store)  # a hit under another name
    assert again.level_counts is first.level_counts and len(store) == 1
    assert "level_counts" not in dict(first.settings)
    # backward compatible: the field has a default, so older constructions still work
    old = EncodedColumn(name="c", codes=first.codes, k=first.k, labels=first.labels, kind=first.kind,
                        n=first.n, n_missing=first.n_missing, edges=None, flags=first.flags,
                        settings=first.settings, n_distinct=first.n_distinct)
    assert old.level_counts is None


@given(st.lists(st.one_of(st.none(), st.sampled_from("abcdefghij")), max_size=80), st.integers(3, 6))
def test_level_counts_match_pandas_value_counts(values, max_categories):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        col = enc(values, max_categories=max_categories)
    if "levels_folded" not in col.flags:
        assert col.level_counts is None
        return
    np.testing.assert_array_equal(col.level_counts, _value_counts(values))  # pandas value_counts
    assert len(col.level_counts) == col.n_distinct
    assert col.level_counts.sum() == col.n - col.n_missing


def test_max_categories_none_never_folds_and_bad_values_raise():
    values = [str(i) for i in range(300)]
    col = enc(values, max_categories=None)
    assert col.k == 300 and col.codes.dtype == np.uint16
    with pytest.raises(ValueError, match="max_categories=1 is invalid"):
        enc(values, max_categories=1)
    with pytest.raises(ValueError, match=r"column 'col': max_categories=2 leaves no room"):
        enc(["a", "b", None], max_categories=2, missing="category")


def test_codes_dtype_follows_k():
    # contract: uint8 when k + 1 <= 256, else uint16, else uint32
    assert [codes_dtype(k) for k in (0, 255, 256, 65535, 65536)] == [
        np.uint8, np.uint8, np.uint16, np.uint16, np.uint32,
    ]
    assert enc([str(i) for i in range(255)], max_categories=None).codes.dtype == np.uint8
    assert enc([str(i) for i in range(256)], max_categories=None).codes.dtype == np.uint16


# ---------------------------------------------------------------- time


def test_zoned_datetimes_bin_on_utc_instants_with_local_labels(rng):
    # reference: pandas.Series.dt.tz_convert("UTC"): the same instants in UTC and in
    # New York (across the March DST change) get identical codes
    utc = pd.Series(pd.date_range("2024-03-01", periods=24 * 30, freq="h", tz="UTC"))
    ny = utc.dt.tz_convert("America/New_York")
    a, b = enc(utc, bins=6), enc(ny, bins=6)
    assert a.kind == b.kind == "datetime"
    np.testing.assert_array_equal(a.codes, b.codes)
    np.testing.assert_array_equal(a.edges, b.edges)
    assert b.labels[0].startswith("[2024-02-29 19:00-05:00")
    assert b.labels[-1].endswith("-04:00]")
    # reference: numpy.digitize on the int64 UTC instants with the same edges
    ints = utc.dt.tz_localize(None).to_numpy().view(np.int64)
    np.testing.assert_array_equal(b.codes, np.digitize(ints, b.edges.view(np.int64)[1:-1]))


def test_naive_datetimes_quantile_bins_are_near_equal_frequency(rng):
    t = pd.Series(pd.Timestamp("2020-01-01") + pd.to_timedelta(rng.uniform(0, 365, 2000), unit="D"))
    col = enc(t, bins=4)
    assert col.kind == "datetime" and col.edges.dtype.kind == "M"
    # edges are numpy.quantile of the instants, rounded to whole units for readability
    assert np.all(np.abs(col.counts() - 500) <= 5)


def test_few_distinct_dates_are_categories_with_date_labels():
    d = [datetime.date(2024, 1, 2), datetime.date(2024, 1, 1), None, datetime.date(2024, 1, 2)]
    col = enc(d)
    assert (col.kind, col.labels, col.codes.tolist()) == ("datetime", ("2024-01-01", "2024-01-02"), [1, 0, 2, 1])


def test_timedeltas_bin_on_the_duration_axis(rng):
    td = pd.Series(pd.to_timedelta(rng.integers(0, 10_000, 1000), unit="s"))
    col = enc(td, bins=5)
    assert col.kind == "timedelta" and col.edges.dtype.kind == "m"
    # reference: numpy.digitize on the int64 durations
    np.testing.assert_array_equal(col.codes, np.digitize(td.to_numpy().view(np.int64), col.edges.view(np.int64)[1:-1]))


def test_datetime_edges_reuse_on_another_sample(rng):
    t = pd.Series(pd.date_range("2024-01-01", periods=1000, freq="min", tz="Europe/Paris"))
    ref = enc(t, bins=4)
    again = enc(t, bins=ref.edges)
    np.testing.assert_array_equal(again.codes, ref.codes)
    # zoned edges (e.g. a DatetimeIndex in another zone) mean the same instants
    zoned = pd.DatetimeIndex(ref.edges).tz_localize("UTC").tz_convert("America/Chicago")
    np.testing.assert_array_equal(enc(t, bins=zoned).codes, ref.codes)
    np.testing.assert_array_equal(enc(t, bins=list(zoned)).codes, ref.codes)
    with pytest.raises(TypeError, match="datetime64"):
        enc(t, bins=[0.0, 1.0])


# ---------------------------------------------------------------- flags


def test_id_like_text_and_row_numbers():
    assert "id_like" in enc([f"user-{i}" for i in range(100)], max_categories=None).flags
    assert "id_like" not in enc([f"user-{i}" for i in range(10)]).flags  # too few rows to tell
    assert "id_like" in enc(np.arange(1000)).flags  # dense whole numbers


def test_id_like_is_not_every_all_distinct_number(rng):
    assert "id_like" not in enc(rng.normal(size=1000)).flags
    amounts = rng.choice(10**7, size=500, replace=False)  # distinct, sparse, unordered
    assert "id_like" not in enc(amounts, name="amount").flags
    assert "id_like" in enc(amounts, name="customer_id").flags
    assert "id_like" in enc(np.sort(amounts), name="amount").flags  # strictly increasing: a counter


def test_constant_and_mostly_missing():
    assert "constant" in enc(["k"] * 30).flags
    col = enc(np.r_[np.ones(5), np.full(5, np.nan)])
    assert {"constant", "mostly_missing"} <= set(col.flags)
    assert "mostly_missing" not in enc(np.r_[np.arange(6.0), np.full(4, np.nan)]).flags


def test_tail_index_thresholds_separate_light_and_heavy_tails():
    # reference: population quantiles from scipy.stats ppf; the documented values
    def population(dist):
        q = dist.ppf([0.001, 0.25, 0.5, 0.75, 0.999])
        return max(q[4] - q[2], q[2] - q[0]) / (q[3] - q[1])

    assert population(scipy.stats.norm) == pytest.approx(2.29, abs=0.01)
    assert population(scipy.stats.expon) == pytest.approx(5.66, abs=0.01)
    assert population(scipy.stats.lognorm(1.0)) == pytest.approx(14.5, abs=0.1)
    assert population(scipy.stats.cauchy) == pytest.approx(159, abs=1)
    assert population(scipy.stats.expon) < HEAVY_TAIL_INDEX < population(scipy.stats.lognorm(1.0))
    rng = np.random.default_rng(7)
    sample = np.sort(scipy.stats.lognorm(1.0).rvs(size=20_000, random_state=rng))
    assert tail_index(sample) == pytest.approx(population(scipy.stats.lognorm(1.0)), rel=0.15)


def test_heavy_tail_flag(rng):
    assert "heavy_tail" in enc(rng.lognormal(sigma=1.0, size=5000)).flags
    assert "heavy_tail" in enc(rng.standard_cauchy(size=5000)).flags
    assert "heavy_tail" not in enc(rng.normal(size=5000)).flags
    assert "heavy_tail" not in enc(rng.exponential(size=5000)).flags


# ---------------------------------------------------------------- cache


def test_cache_returns_the_same_object_for_same_content_and_settings(rng):
    store = EncodingCache()
    x = rng.normal(size=1000)
    a = encode_column(x, name="x", cache=store)
    b = encode_column(x.copy(), name="x", cache=store)  # equal content, another array
    assert a is b and store.hits == 1
    c = encode_column(x, name="x", bins=8, cache=store)
    assert c is not a and c.k == 8
    renamed = encode_column(x, name="y", cache=store)
    assert renamed.name == "y" and renamed.codes is a.codes


def test_cache_sees_changed_content_and_never_holds_user_arrays(rng):
    store = EncodingCache()
    x = rng.normal(size=1000)
    a = encode_column(x, name="x", cache=store)
    assert not np.shares_memory(a.codes, x)
    x[:500] *= 2.0  # the user changes their array in place
    b = encode_column(x, name="x", cache=store)
    assert b is not a
    with pytest.raises(ValueError):
        a.codes[0] = 3  # cached arrays are read-only


def test_cache_repeats_warnings_on_a_hit():
    store = EncodingCache()
    x = np.r_[np.arange(50.0), [np.inf]]
    with pytest.warns(DataQualityWarning, match="column 'a': 1 infinite"):
        first = encode_column(x, name="a", cache=store)
    with pytest.warns(DataQualityWarning, match="column 'b': 1 infinite"):
        second = encode_column(x, name="b", cache=store)
    assert second.codes is first.codes


def test_cache_is_bounded_in_bytes(rng):
    store = EncodingCache(max_bytes=30_000)
    samples = [rng.normal(size=10_000) for _ in range(5)]
    cols = [encode_column(x, name=f"c{i}", cache=store) for i, x in enumerate(samples)]
    assert store.nbytes <= 30_000 and len(store) < 5
    assert encode_column(samples[-1], name="c4", cache=store) is cols[-1]  # newest kept
    assert encode_column(samples[0], name="c0", cache=store) is not cols[0]  # oldest evicted


def test_content_key_tells_apart_what_pandas_hashes_alike():
    # pandas.util.hash_pandas_object hashes objects through their text: 1 and "1" alike
    a = pd.Series([1, "x"], dtype=object)
    b = pd.Series(["1", "x"], dtype=object)
    assert content_key(a) != content_key(b)
    c1 = pd.Series(pd.Categorical(["a"], categories=["a"]))
    c2 = pd.Series(pd.Categorical(["a"], categories=["a", "b"]))
    assert content_key(c1) != content_key(c2)
    assert content_key(pd.Series(["", "a"], dtype="string")) != content_key(pd.Series([None, "a"], dtype="string"))
    assert content_key(pd.Series([[1]], dtype=object)) is None  # unhashable: not cached


def test_content_key_branches_see_values_missingness_and_zone():
    ints = pd.Series([0, 1, 2], dtype="Int64")
    assert content_key(ints) != content_key(pd.Series([None, 1, 2], dtype="Int64"))
    assert content_key(ints) == content_key(pd.Series([0, 1, 2], dtype="Int64"))
    arrow = pd.Series(["a", "b", "c", "d"], dtype="string[pyarrow]")
    assert content_key(arrow.iloc[1:3]) != content_key(arrow.iloc[0:2])
    assert content_key(arrow) != content_key(pd.Series(["a", None, "c", "d"], dtype="string[pyarrow]"))
    t = pd.Series(pd.date_range("2024-01-01", periods=3, freq="h", tz="UTC"))
    assert content_key(t) != content_key(t.dt.tz_convert("Asia/Tokyo"))  # same instants, other labels
    assert content_key(t) != content_key(t + pd.Timedelta(1, "ns"))


def test_content_key_of_a_small_slice_is_the_slice_content():
    # a 1,000-row slice of a long arrow string column shares the parent's buffers;
    # its key must be that of its own cells (the time it takes against
    # pandas.util.hash_pandas_object is in benchmarks/speed_guards.py)
    parent = pd.Series([f"user-{i}" for i in range(100_000)], dtype="string[pyarrow]")
    head = parent.iloc[1000:2000]
    key = content_key(head)
    # the key is the content's: equal to that of a fresh column with the same cells,
    # different from a neighbouring slice
    assert key == content_key(pd.Series(head.tolist(), dtype="string[pyarrow]"))
    assert key != content_key(parent.iloc[1001:2001])


def test_small_integer_range_path_equals_the_sorting_path(rng):
    # the counting shortcut for integers must agree with numpy.unique's sorted levels
    x = rng.integers(-3, 20, size=3000)
    col = enc(x)
    levels, inverse = np.unique(x, return_inverse=True)
    assert col.labels == tuple(str(v) for v in levels)
    np.testing.assert_array_equal(col.codes, inverse)
    np.testing.assert_array_equal(enc(x.astype(float)).codes, col.codes)
    # narrow and unsigned dtypes whose range does not fit the dtype's own differences
    for small in (np.array([-100, 100, 0, -100], dtype=np.int8), np.array([2**64 - 1, 2**64 - 3], dtype=np.uint64)):
        levels, inverse = np.unique(small, return_inverse=True)
        got = enc(small)
        assert got.labels == tuple(str(int(v)) for v in levels)
        np.testing.assert_array_equal(got.codes, inverse)


# ---------------------------------------------------------------- input safety


@pytest.mark.parametrize(
    "make",
    [
        lambda: np.r_[np.arange(50.0), [np.nan, np.inf]],
        lambda: pd.Series([3, None, 1] * 10, dtype="Int64"),
        lambda: pd.Series(["b", None, "a"] * 10, dtype=object),
        lambda: pd.Series(pd.Categorical(["x", "y"], categories=["y", "x", "z"])),
        lambda: pd.Series(pd.date_range("2024-01-01", periods=60, freq="D", tz="Asia/Tokyo")),
        lambda: pd.Series([[1], {"a": 2}, 3], dtype=object),
    ],
)
def test_input_is_never_modified(make):
    original, copy = make(), make()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        col = encode_column(original, name="c", max_categories=2 if isinstance(original, np.ndarray) else 64)
    if isinstance(original, pd.Series):
        pd.testing.assert_series_equal(original, copy)
    else:
        np.testing.assert_array_equal(original, copy)
    check_contract(col)


# ---------------------------------------------------------------- frames


def test_encode_frame_keys_duplicates_and_multiindex():
    df = pd.DataFrame([[1, 2, 3, 4]], columns=["a", "a", 7, "a (2)"])
    with pytest.warns(DataQualityWarning, match=r"column names repeat \('a'\)"):
        cols = encode_frame(df, cache=False)
    assert [c.name for c in cols] == ["a", "a (3)", "7", "a (2)"]
    mi = pd.DataFrame([[1, 2]], columns=pd.MultiIndex.from_tuples([("x", "p"), ("x", "")]))
    assert [c.name for c in encode_frame(mi, cache=False)] == ["x / p", "x"]
    assert column_keys(["a", "a", "a"], warn=False) == ["a", "a (2)", "a (3)"]


def test_encode_frame_accepts_polars():
    import polars as pl
    frame = pl.DataFrame({"n": [1.0, 2.0, None], "s": ["a", None, "a"]})
    cols = encode_frame(frame, cache=False)
    assert [(c.name, c.n_missing) for c in cols] == [("n", 1), ("s", 1)]


def _threaded_frame(rows: int = 60_000) -> pd.DataFrame:
    rng = np.random.default_rng(7)
    x = rng.normal(size=rows)
    x[:3] = [np.inf, -np.inf, np.nan]
    many = pd.Categorical.from_codes(rng.integers(0, 90, size=rows), categories=[f"v{i}" for i in range(90)])
    mixed = np.array([1, "1"] * (rows // 2), dtype=object)
    return pd.DataFrame({"x": x, "many": many, "t": rng.choice(["p", "q", "r"], size=rows),
                         "mixed": mixed, "i": rng.integers(0, 5, size=rows)})


def test_encode_frame_threads_match_the_serial_path_and_warn_in_column_order():
    df = _threaded_frame()
    with pytest.warns(DataQualityWarning) as serial_w:
        serial = [encode_column(df[c], name=c, cache=False) for c in df.columns]
    for threads in (1, 2, 4):
        with pytest.warns(DataQualityWarning) as got_w:
            cols = encode_frame(df, threads=threads, cache=False)
        # contract: the same EncodedColumn as encode_column, column by column
        for a, b in zip(cols, serial):
            assert (a.name, a.k, a.labels, a.kind, a.n_missing, a.flags, a.n_distinct) == \
                   (b.name, b.k, b.labels, b.kind, b.n_missing, b.flags, b.n_distinct)
            assert np.array_equal(a.codes, b.codes) and a.codes.dtype == b.codes.dtype
        # the same warnings, each naming its column, in column order
        assert [str(w.message) for w in got_w] == [str(w.message) for w in serial_w]
    assert [str(w.message).split(":")[0] for w in got_w] == ["column 'x'", "column 'many'", "column 'mixed'"]
    # numpy reference: 16 quantile bins of the finite values are numpy.quantile edges
    # and numpy.digitize on the interior edges (the numpy.histogram convention)
    finite = df["x"].to_numpy()[3:]
    edges = np.quantile(finite, np.linspace(0, 1, 17))
    assert np.array_equal(cols[0].codes[3:], np.digitize(finite, edges[1:-1]))


def test_encode_frame_threads_raise_the_first_failing_column():
    df = _threaded_frame()
    df["many2"] = df["many"]
    # max_categories=2 leaves no room beside '(other)' and '(missing)' in 'many' (the
    # first column that needs folding and has missing rows)
    df.loc[5, "many"] = np.nan
    df.loc[6, "many2"] = np.nan
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        for threads in (1, 2):
            with pytest.raises(ValueError, match=r"column 'many': max_categories=2 leaves no room"):
                encode_frame(df, threads=threads, cache=False, missing="category", max_categories=2)
    with pytest.raises(ValueError, match="threads: expected a positive integer"):
        encode_frame(df, threads=0)
    with pytest.raises(TypeError, match=r"unknown setting\(s\) \['bin'\]"):
        encode_frame(df, bin=3)


def test_encode_columns_with_per_column_settings_match_encode_column():
    df = _threaded_frame()
    jobs = [("x", df["x"], {"bins": 8}), ("many", df["many"]), ("i", df["i"].to_numpy(), {"categorical_threshold": 0,
                                                                                         "bins": 3})]
    with warnings.catch_warnings(record=True) as serial_w:
        warnings.simplefilter("always")
        serial = [encode_column(job[1], name=job[0], cache=False, max_categories=20, **(job[2] if len(job) > 2 else {}))
                  for job in jobs]
    for threads in (1, 2):
        with warnings.catch_warnings(record=True) as got_w:
            warnings.simplefilter("always")
            cols = encode_columns(jobs, threads=threads, cache=False, max_categories=20)
        assert [str(w.message) for w in got_w] == [str(w.message) for w in serial_w]
        for a, b in zip(cols, serial):  # contract: encode_column with the merged settings
            assert (a.name, a.k, a.labels, a.flags) == (b.name, b.k, b.labels, b.flags)
            assert np.array_equal(a.codes, b.codes)
    assert [c.k for c in cols] == [8, 20, 3]
    # numpy reference: 3 quantile bins of the integers are numpy.quantile edges + digitize
    edges = np.quantile(df["i"].to_numpy(), np.linspace(0, 1, 4))
    assert np.array_equal(cols[2].codes, np.digitize(df["i"].to_numpy(), edges[1:-1]))
    with pytest.raises(TypeError, match=r"column 'x': unknown setting\(s\) \['bin'\]"):
        encode_columns([("x", df["x"], {"bin": 3})])
    with pytest.raises(TypeError, match="expected \\(name, values\\)"):
        encode_columns([df["x"]])


def test_encode_frame_threads_share_the_cache():
    df = _threaded_frame(1_000)
    store = EncodingCache()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        first = encode_frame(df, threads=2, cache=store)
        again = encode_frame(df, threads=2, cache=store)
    assert len(store) == df.shape[1]
    assert all(a is b for a, b in zip(first, again))  # contract: a hit returns the stored column


# ---------------------------------------------------------------- bad input


def test_bad_arguments_name_the_problem():
    with pytest.raises(TypeError, match="name must be a str"):
        encode_column([1, 2], name=3)
    with pytest.raises(ValueError, match="missing='keep' is not valid"):
        enc([1, 2], missing="keep")
    with pytest.raises(ValueError, match=r"column 'col': expected a 1-D column"):
        enc(np.zeros((2, 2)))
    with pytest.raises(TypeError, match="scalar"):
        enc(5)
    with pytest.raises(ValueError, match="bins='nope'"):
        enc([1.0], bins="nope")
    with pytest.raises(ValueError, match="categorical_threshold=-1"):
        enc([1.0], categorical_threshold=-1)


# ---------------------------------------------------------------- properties

cells = st.one_of(
    st.none(), st.floats(allow_nan=True, allow_infinity=False), st.integers(-5, 5),
    st.sampled_from(["a", "b", "c"]),
)


@given(st.lists(cells, max_size=60), st.sampled_from(["drop", "category"]), st.integers(2, 6))
def test_codes_stay_in_the_alphabet(values, missing, max_categories):
    # contract: codes in 0..k; k only for missing rows under "drop"; len(labels) == k
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        col = enc(pd.Series(values, dtype=object), missing=missing,
                  max_categories=max(max_categories, 3))
    check_contract(col)
    assert col.k <= max(max_categories, 3)
    assert col.counts().sum() == col.n - (col.n_missing if missing == "drop" else 0)


@given(st.lists(st.floats(-1e9, 1e9), min_size=1, max_size=200), st.integers(1, 20),
       st.sampled_from(["quantile", "uniform"]))
def test_binned_codes_match_numpy_histogram(values, bins, strategy):
    # reference: numpy.histogram(x, edges) counts on the edges encode_column chose
    x = np.array(values)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        col = enc(x, bins=bins, strategy=strategy, categorical_threshold=0)
    check_contract(col)
    np.testing.assert_array_equal(col.counts(), np.histogram(x, col.edges)[0])


def test_integers_beyond_64_bits_keep_exact_labels():
    col = enc(pd.Series([2**70, 1, 2**70], dtype=object))
    assert set(col.labels) == {str(2**70), "1"}


def test_a_million_floats_encode_into_equal_quantile_bins(rng):
    # (the time it takes against numpy's sort of the same values is in
    # benchmarks/speed_guards.py)
    x = rng.normal(size=1_000_000)
    col = enc(x, bins=16)
    assert col.k == 16
    assert np.all(np.abs(col.counts() - 62_500) <= 1)


# ---------------------------------------------------------------- documentation


def _encode_modules():
    import importlib

    names = ("binning", "cache", "columns", "encoded", "encoder", "numeric", "temporal", "text",
             "levels", "drafts", "checks", "keys", "frames")
    return [importlib.import_module(f"infoscope.encode.{name}") for name in names]


_MODULES = _encode_modules()


def _public_functions():
    import inspect

    for module in _MODULES:
        for name in getattr(module, "__all__", ()):
            obj = getattr(module, name)
            if inspect.isfunction(obj) or inspect.isclass(obj):
                yield f"{module.__name__}.{name}", obj


@pytest.mark.parametrize(("qualname", "obj"), list(_public_functions()))
def test_public_names_have_numpydoc_with_examples(qualname, obj):
    import inspect

    doc = inspect.getdoc(obj) or ""
    # References only where a source is followed (tests/test_public_api.py checks them)
    sections = ("Attributes",) if qualname.endswith("EncodedColumn") else ("Examples",)
    for section in sections:
        assert f"\n{section}\n---" in doc, f"{qualname}: no {section} section"


def test_docstring_examples_run():
    # the examples in the docstrings are doctests: they must print what they say
    import doctest

    for module in _MODULES:
        result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE)
        assert result.failed == 0, module.__name__


def test_an_id_column_of_arrow_strings_keeps_every_level_count():
    # the levels are converted as arrays, not one Python call per level; how fast that
    # is against pandas.factorize is measured in benchmarks/speed_guards.py (5.)
    ids = pd.Series([f"row-{i}" for i in range(300_000)], dtype="string[pyarrow]")
    with pytest.warns(DataQualityWarning, match="folded"):
        col = enc(ids)
    assert col.k == 64 and len(col.level_counts) == 300_000
