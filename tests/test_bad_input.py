"""Bad input at the frame level: a correct result or a clear error / warning naming
the column, and the user's frame is never changed.

The expected numbers are closed forms (common practice): the entropy of a
constant column is 0, of two equally frequent values 1 bit, and so on.
"""
from __future__ import annotations

import copy

import numpy as np
import pandas as pd
import pytest

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope import DataQualityWarning, SmallSampleWarning
from infoscope.frame.session import ProfileSession


@pytest.fixture
def unchanged():
    """Yield a function that remembers frames and, at teardown, checks they did not change."""
    kept = []

    def remember(frame):
        kept.append((frame, copy.deepcopy(frame)))
        return frame

    yield remember
    for frame, before in kept:
        pd.testing.assert_frame_equal(frame, before)
        assert frame.attrs == before.attrs


def test_empty_frame_is_a_clear_error(unchanged):
    with pytest.raises(ValueError, match="no columns"):
        unchanged(pd.DataFrame()).info_profile.entropy()
    with pytest.raises(ValueError, match="no rows"):
        unchanged(pd.DataFrame({"a": pd.Series([], dtype=float)})).info_profile.pairs()
    with pytest.raises(ValueError, match="no columns"):
        ProfileSession(pd.DataFrame())


def test_not_a_frame_is_a_clear_error():
    with pytest.raises(TypeError, match="pandas or Polars DataFrame"):
        ProfileSession([[1, 2], [3, 4]])
    with pytest.raises(TypeError, match="reference must be a pandas or Polars DataFrame"):
        ProfileSession(pd.DataFrame({"a": [1, 2]})).drift({"a": [1, 2]})


def test_one_row(unchanged):
    df = unchanged(pd.DataFrame({"x": [2.5], "c": ["k"]}))
    e = df.info_profile.entropy(n_boot=40)
    # one observation: entropy 0, a single symbol (closed form)
    assert (e["entropy"] == 0).all() and (e["k"] == 1).all()
    assert all("constant" in f for f in e["flags"])
    p = df.info_profile.pairs()
    assert p.loc[0, "n"] == 1 and p.loc[0, "p_value"] == 1.0


def test_all_missing_column(unchanged):
    df = unchanged(pd.DataFrame({"gone": [np.nan] * 30, "c": list("xy") * 15}))
    with pytest.warns(DataQualityWarning, match="'gone'.*no non-missing values"):
        e = df.info_profile.entropy(n_boot=40).set_index("column")
    assert np.isnan(e.loc["gone", "entropy"]) and e.loc["gone", "missing_share"] == 1.0
    assert "mostly_missing" in e.loc["gone", "flags"]
    assert e.loc["c", "entropy"] == pytest.approx(1.0, abs=0.05)  # two equal halves: 1 bit
    pairs = df.info_profile.pairs()
    assert pairs.loc[0, "n"] == 0 and np.isnan(pairs.loc[0, "mi"]) and np.isnan(pairs.loc[0, "p_value"])
    with pytest.warns(DataQualityWarning, match="'gone' and 'c' are never present"):
        assert df.info_profile.pair("gone", "c").n == 0
    rel = df.info_profile.relevance("c", n_boot=40)
    assert rel.loc[0, "n"] == 0 and not rel.loc[0, "leakage"]


def test_constant_column(unchanged):
    df = unchanged(pd.DataFrame({"k": [7] * 40, "y": [0, 1] * 20}))
    e = df.info_profile.entropy(n_boot=40).set_index("column")
    assert e.loc["k", "entropy"] == 0 and e.loc["k", "max_entropy"] == 0
    assert "constant" in e.loc["k", "flags"] and np.isnan(e.loc["k", "efficiency"])
    rel = df.info_profile.relevance("y", n_boot=40)
    assert rel.loc[0, "mi"] == 0 and rel.loc[0, "p_value"] == 1.0
    with pytest.warns(DataQualityWarning, match="target 'k' has at most one value"):
        df.info_profile.relevance("k", n_boot=0)


def test_infinite_values_are_missing_with_a_warning(unchanged):
    x = np.r_[np.arange(40.0), [np.inf, -np.inf]]
    df = unchanged(pd.DataFrame({"x": x, "c": list("ab") * 21}))
    with pytest.warns(DataQualityWarning, match="'x'.*infinite"):
        e = df.info_profile.entropy(n_boot=0).set_index("column")
    assert e.loc["x", "missing"] == 2 and "infinite_values" in e.loc["x", "flags"]
    assert np.isfinite(e.loc["x", "entropy"])


def test_mixed_types_column(unchanged):
    df = unchanged(pd.DataFrame({"m": [1, "1", 2.5, None] * 10, "c": list("xy") * 20}))
    with pytest.warns(DataQualityWarning, match="'m'.*several types"):
        e = df.info_profile.entropy(n_boot=0).set_index("column")
    # 1, "1" and 2.5 stay three distinct symbols (plus missing rows left out)
    assert e.loc["m", "k"] == 3 and "mixed_types" in e.loc["m", "flags"]
    assert e.loc["m", "missing"] == 10


def test_unhashable_cells(unchanged):
    df = unchanged(pd.DataFrame({"u": [[1], {"x": 1}, {1, 2}, None] * 10, "c": list("xy") * 20}))
    with pytest.warns(DataQualityWarning, match="'u'") as record:
        e = df.info_profile.entropy(n_boot=0).set_index("column")
    assert any("unhashable" in str(w.message) for w in record)
    assert e.loc["u", "k"] == 3
    # the content key cannot hash such cells: a fresh session each call, same numbers
    with pytest.warns(DataQualityWarning, match="'u'"):
        again = df.info_profile.entropy(n_boot=0).set_index("column")
    pd.testing.assert_frame_equal(e, again)


def test_duplicate_column_names(unchanged):
    df = unchanged(pd.DataFrame([[1, 2], [3, 4]] * 10, columns=["a", "a"]))
    with pytest.warns(DataQualityWarning, match="repeat.*'a'"):
        e = df.info_profile.entropy(n_boot=0)
    assert e["column"].tolist() == ["a", "a (2)"]
    with pytest.warns(DataQualityWarning, match="repeat"):
        p = df.info_profile.pair("a", "a (2)")
    assert p.counts.to_numpy().tolist() == [[10, 0], [0, 10]]


def test_non_string_and_multiindex_names(unchanged):
    df = pd.DataFrame({"p": [1, 2] * 10, "q": list("xy") * 10, "r": [0, 1] * 10})
    df.columns = pd.Index([1, 2.5, None], dtype=object)
    unchanged(df)
    e = df.info_profile.entropy(n_boot=0)
    assert e["column"].tolist() == ["1", "2.5", "None"]
    assert df.info_profile.pair("1", "2.5").n == 20
    cols = pd.MultiIndex.from_tuples([("bay", "t"), ("bay", "c")])
    mi = unchanged(pd.DataFrame(np.arange(120).reshape(60, 2) % 3, columns=cols))
    p = mi.info_profile.pairs()
    assert (p.loc[0, "a"], p.loc[0, "b"]) == ("bay / t", "bay / c")
    # a tuple label finds its column too
    assert mi.info_profile.pair(("bay", "t"), ("bay", "c")).n == 60


def test_drift_with_mismatched_columns(unchanged):
    cur = unchanged(pd.DataFrame({"a": [1, 2] * 10, "b": list("xy") * 10}))
    ref = unchanged(pd.DataFrame({"a": [1, 2] * 10, "c": list("xy") * 10}))
    with pytest.warns(DataQualityWarning, match="only in this frame: 'b'; only in the reference: 'c'"):
        d = cur.info_profile.drift(ref)
    assert d["column"].tolist() == ["a"] and d.loc[0, "flag"] == "stable"
    with pytest.raises(ValueError, match="no column in common"):
        cur[["b"]].info_profile.drift(ref[["c"]])
    with pytest.raises(ValueError, match="reference has no rows"):
        cur.info_profile.drift(ref.iloc[:0])


def test_drift_with_a_changed_type_warns(unchanged):
    cur = unchanged(pd.DataFrame({"a": list("xy") * 50}))
    ref = unchanged(pd.DataFrame({"a": np.linspace(0.0, 1.0, 100)}))
    with pytest.warns(DataQualityWarning, match=r"'a' is float64 in the reference, \w+ in this frame"
                      r".*not compared \(flag 'type_changed'\)"):
        d = cur.info_profile.drift(ref)
    assert d.loc[0, "flag"] == "type_changed" and np.isnan(d.loc[0, "psi"])


def test_unknown_target_and_columns():
    df = pd.DataFrame({"a": [1, 2] * 10, "b": [1, 1, 2, 2] * 5})
    with pytest.raises(KeyError, match="target='zz' is not a column.*'a', 'b'"):
        df.info_profile.relevance("zz")
    with pytest.raises(KeyError, match="target='zz'"):
        ProfileSession(df, target="zz")
    with pytest.raises(ValueError, match="needs a target"):
        ProfileSession(df).relevance()
    with pytest.raises(KeyError, match="b='q'"):
        df.info_profile.pair("a", "q")
    with pytest.raises(ValueError, match="same column"):
        df.info_profile.pair("a", "a")
    with pytest.raises(KeyError, match="name='q'"):
        ProfileSession(df).set_column_bins("q", 4)


@pytest.mark.parametrize(("settings", "match"), [
    ({"binz": 3}, "unknown setting.*'binz'"),
    ({"estimator": "magic"}, "estimator='magic'.*'miller_madow'"),
    ({"base": 1}, "base=1"),
    ({"bins": 0}, "bins=0"),
    ({"bins": "nope"}, "bins='nope'.*'fd'"),
    ({"missing": "zero"}, "missing='zero'"),
    ({"measure": "corr"}, "measure='corr'"),
    ({"normalization": "sum"}, "normalization='sum'"),
    ({"ci": 1.5}, "ci=1.5"),
    ({"n_boot": -1}, "n_boot=-1"),
    ({"sample": 0}, "sample=0"),
    ({"max_categories": 1}, "max_categories=1"),
    ({"categorical_threshold": -1}, "categorical_threshold=-1"),
    ({"n_boot": 1}, r"n_boot=1 is too few .* at least 40"),
    ({"n_boot": 100, "ci": 0.99}, r"n_boot=100 is too few .*99% interval.* at least 200"),
])
def test_bad_settings_are_named(settings, match):
    df = pd.DataFrame({"a": [1.0, 2.0, 3.0] * 10})
    with pytest.raises((TypeError, ValueError), match=match):
        df.info_profile.entropy(**settings)
    s = ProfileSession(df)
    with pytest.raises((TypeError, ValueError), match=match):
        s.update(**settings)
    assert s.settings["bins"] == "rows"  # a refused update leaves the settings as they were


def test_sparse_pair_warns(unchanged):
    df = unchanged(pd.DataFrame({"a": np.arange(40.0), "b": np.arange(40.0)[::-1]}))
    with pytest.warns(SmallSampleWarning, match="'a' and 'b'.*fewer than 5 per cell"):
        pt = df.info_profile.pair("a", "b", bins=16)
    assert pt.sparse and pt.reliability == "too_few"  # 40 rows in 256 cells: under one per cell
    table = df.info_profile.pairs(bins=16)
    assert table.loc[0, "reliability"] == "too_few"
    assert "sparse" not in table.columns  # the old name collided with pandas' .sparse accessor
    e = df.info_profile.entropy(n_boot=0, bins=16)
    assert all("sparse_cells" in f for f in e["flags"])  # 40 rows in 16 bins
    # the default bins follow the rows (floor(sqrt(40 / 10)) = 2): 10 rows per cell
    assert df.info_profile.pair("a", "b").counts.shape == (2, 2)


def test_session_does_not_see_later_edits():
    df = pd.DataFrame({"c": list("ab") * 20})
    s = ProfileSession(df, n_boot=0)
    before = s.entropy()
    df.loc[:, "c"] = "a"
    s.update(bins=4)
    pd.testing.assert_frame_equal(s.entropy(), before)


def test_polars_namespace_bad_input_is_named():
    import polars as pl
    import infoscope.polars  # noqa: F401

    with pytest.raises(ValueError, match="no columns"):
        pl.DataFrame().info_profile.entropy()
    with pytest.raises(ValueError, match="no rows"):
        pl.DataFrame({"a": []}, schema={"a": pl.Int64}).info_profile.pairs()
    df = pl.DataFrame({"a": [1, 2, 1, 2] * 10, "b": list("xyxy") * 10})
    with pytest.raises(KeyError, match="target='nope' is not a column"):
        df.info_profile.relevance("nope")
    with pytest.raises(TypeError, match="unknown setting"):
        df.info_profile.entropy(bins_per_column=3)
    assert df.equals(pl.DataFrame({"a": [1, 2, 1, 2] * 10, "b": list("xyxy") * 10}))


def test_drift_of_a_datetime_column_with_unparseable_reference_is_read_as_usual(unchanged):
    # time_axis needs comparable times; a reference of another type gets the
    # type-mismatch warning and the usual PSI verdict, never a crash
    times = pd.Series(pd.date_range("2026-01-01", periods=200, freq="h"))
    batch = unchanged(pd.DataFrame({"t": times + pd.Timedelta(days=30)}))
    ref = unchanged(pd.DataFrame({"t": times.astype(str).str.slice(0, 4)}))
    with pytest.warns(DataQualityWarning, match="'t' is .* not compared"):
        d = ProfileSession(batch).drift(ref)
    assert d.loc[0, "flag"] == "type_changed"
    later = ProfileSession(batch).drift(unchanged(pd.DataFrame({"t": times})))
    assert later.loc[0, "flag"] == "time_axis"
