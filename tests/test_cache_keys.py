"""The content keys that find cached sessions and encodings never return another frame's numbers.

Every check builds two frames that an older key (pandas' text hash of object
cells, dtype names only, the first pandas copy of a Polars frame) could not tell
apart, profiles the first through the accessor, then the second, and compares the
second's numbers with a reference computed outside infoscope: the plug-in entropy
of the column's value counts by ``scipy.stats.entropy`` (base 2) and its alphabet
size ``log2 K`` from the categories the frame declares.
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy.stats import entropy as scipy_entropy

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope.encode import clear_cache
from infoscope.encode.cache import content_key, frame_key
from infoscope.frame import sessions as accessor
from infoscope.frame.sessions import session_for

pytestmark = pytest.mark.filterwarnings("ignore:column .a.. values of several types:UserWarning")


@pytest.fixture(autouse=True)
def fresh_caches():
    accessor._SESSIONS.clear()
    clear_cache()
    yield
    accessor._SESSIONS.clear()


def _plugin_bits(values) -> float:
    """Reference: scipy.stats.entropy of the value counts (missing left out), in bits."""
    counts = pd.Series(values, dtype=object).dropna().map(lambda v: (type(v), v)).value_counts().to_numpy()
    return float(scipy_entropy(counts, base=2))


def _entropy(frame, column="a"):
    table = frame.info_profile.entropy(estimator="plugin", n_boot=0).set_index("column")
    return float(table.loc[column, "entropy"]), float(table.loc[column, "max_entropy"])


# ------------------------------------------------------------------ pandas
@pytest.mark.parametrize("first, second", [
    ([1, "1"] * 10, ["1", "1"] * 10),            # int and str: one text
    ([b"a", "a"] * 10, ["a", "a"] * 10),          # bytes and str: one text
    (["1", "1"] * 10, [1, "1"] * 10),             # and the other way round
])
def test_object_cells_of_other_types_are_other_content(first, second):
    a = pd.DataFrame({"a": pd.Series(first, dtype=object)})
    b = pd.DataFrame({"a": pd.Series(second, dtype=object)})
    assert frame_key(a) != frame_key(b)
    assert _entropy(a)[0] == pytest.approx(_plugin_bits(first), abs=1e-12)
    assert _entropy(b)[0] == pytest.approx(_plugin_bits(second), abs=1e-12)  # not the first frame's
    assert _entropy(a)[0] != _entropy(b)[0]


def test_categorical_cleaning_loop_sees_the_removed_categories():
    # K comes from the declared categories: 4 before, 2 after remove_unused_categories
    df = pd.DataFrame({"a": pd.Categorical(["x", "y"] * 10, categories=["x", "y", "z", "w"])})
    assert _entropy(df)[1] == pytest.approx(np.log2(4))
    df["a"] = df["a"].cat.remove_unused_categories()
    assert _entropy(df)[1] == pytest.approx(np.log2(2))  # was the stale log2(4) with the old key
    assert _entropy(df)[0] == pytest.approx(_plugin_bits(["x", "y"] * 10), abs=1e-12)


def test_categorical_reorder_gives_the_new_level_order():
    values = ["x", "y", "y"] * 10
    one = pd.DataFrame({"a": pd.Categorical(values, categories=["x", "y"], ordered=True),
                        "b": [0, 1, 1] * 10})
    other = one.assign(a=one["a"].cat.reorder_categories(["y", "x"], ordered=True))
    assert frame_key(one) != frame_key(other)
    assert list(one.info_profile.pair("a", "b").counts.index) == ["x", "y"]
    # the order of the categories is the order of an ordered column's levels
    assert list(other.info_profile.pair("a", "b").counts.index) == ["y", "x"]


def test_in_place_edit_of_a_pandas_frame_is_seen():
    df = pd.DataFrame({"a": [1, 2, 3, 4] * 5})
    first = df.info_profile.entropy(estimator="plugin", n_boot=0)
    df.loc[0, "a"] = 99
    second = df.info_profile.entropy(estimator="plugin", n_boot=0)
    assert float(second["entropy"][0]) == pytest.approx(_plugin_bits(df["a"].tolist()), abs=1e-12)
    assert float(second["entropy"][0]) != float(first["entropy"][0])


def test_equal_content_reuses_one_session_and_settings_are_typed():
    df = pd.DataFrame({"a": [1, 2, 1, 2] * 5, "b": list("xyxy") * 5})
    assert session_for(df) is session_for(df.copy())
    assert session_for(df) is session_for(df.set_axis(range(100, 120)))  # the index is not content
    session_for(df, bins=16)
    with pytest.raises(ValueError, match="bins=16.0"):  # equal to 16 in Python, yet refused: not a cache hit
        session_for(df, bins=16.0)
    assert session_for(df) is not session_for(df.rename(columns={"a": 1}))


@pytest.mark.parametrize("left, right", [
    (pd.Series([1.5, 2.5]), pd.Series([1.5, 2.5], dtype="float32")),            # dtype
    (pd.Series([1, 2], dtype="Int64"), pd.Series([1, pd.NA], dtype="Int64")),   # NA mask
    (pd.Series(["a", "b"], dtype="str"), pd.Series(["a", None], dtype="str")),
    (pd.Series(pd.Categorical(["a"], categories=["a"])),
     pd.Series(pd.Categorical(["a"], categories=["a", "b"]))),                 # unused category
    (pd.Series(pd.Categorical([1, 2])), pd.Series(pd.Categorical(["1", "2"]))),  # category dtype
])
def test_content_keys_differ_for_different_content(left, right):
    assert content_key(left) != content_key(right)
    assert content_key(left) == content_key(left.copy())


def test_arrow_dictionary_columns_hash_their_dictionary():
    import pyarrow as pa
    one = pd.Series(pd.arrays.ArrowExtensionArray(pa.array(["x", "y"]).dictionary_encode()))
    indices = pa.array([0, 1], pa.int32())
    other = pd.Series(pd.arrays.ArrowExtensionArray(
        pa.DictionaryArray.from_arrays(indices, pa.array(["y", "x"]))))  # same indices, other dictionary
    assert content_key(one) != content_key(other)


def test_cells_whose_text_may_not_tell_them_apart_are_not_keyed():
    class Tag:
        def __str__(self):
            return "same"

    assert content_key(pd.Series([Tag(), Tag()], dtype=object)) is None
    assert frame_key(pd.DataFrame({"a": pd.Series([Tag(), 1], dtype=object)})) is None


# ------------------------------------------------------------------ Polars
import polars as pl
import infoscope.polars  # noqa: E402,F401  (registers pl.DataFrame.info_profile)


def _pl_entropy(ns, column="a"):
    table = ns.entropy(estimator="plugin", n_boot=0).set_index("column")
    return float(table.loc[column, "entropy"]), float(table.loc[column, "max_entropy"])


def test_polars_set_item_in_place_is_seen():
    q = pl.DataFrame({"a": [1, 2, 3, 4] * 5, "b": [0, 1] * 10})
    ns = q.info_profile  # Polars keeps this object on the frame
    before = _pl_entropy(ns)[0]
    q[0, "a"] = 99
    after = _pl_entropy(q.info_profile)[0]
    assert q.info_profile is ns
    assert after == pytest.approx(_plugin_bits(q["a"].to_list()), abs=1e-12)
    assert after != before


def test_polars_insert_and_drop_in_place_are_seen():
    q = pl.DataFrame({"a": [1, 2, 3, 4] * 5})
    ns = q.info_profile
    assert ns.entropy(n_boot=0)["column"].tolist() == ["a"]
    q.insert_column(1, pl.Series("b", [0, 1] * 10))
    assert ns.entropy(n_boot=0)["column"].tolist() == ["a", "b"]
    q.drop_in_place("a")
    assert ns.entropy(n_boot=0)["column"].tolist() == ["b"]
    assert _pl_entropy(ns, "b")[0] == pytest.approx(_plugin_bits([0, 1] * 10), abs=1e-12)


def test_polars_enum_categories_and_their_order_are_content():
    values = ["x", "y"] * 10
    wide = pl.DataFrame({"a": pl.Series(values, dtype=pl.Enum(["x", "y", "z", "w"]))})
    narrow = pl.DataFrame({"a": pl.Series(values, dtype=pl.Enum(["x", "y"]))})
    reordered = pl.DataFrame({"a": pl.Series(values, dtype=pl.Enum(["y", "x", "z", "w"]))})
    assert len({frame_key(wide), frame_key(narrow), frame_key(reordered)}) == 3
    assert _pl_entropy(wide.info_profile)[1] == pytest.approx(np.log2(4))
    assert _pl_entropy(narrow.info_profile)[1] == pytest.approx(np.log2(2))


def test_polars_binary_and_text_and_integers_are_other_content():
    frames = [pl.DataFrame({"a": [b"1", b"2"] * 10}), pl.DataFrame({"a": ["1", "2"] * 10}),
              pl.DataFrame({"a": [1, 2] * 10})]
    assert len({frame_key(f) for f in frames}) == 3
    sessions = [session_for(f) for f in frames]
    assert len({id(s) for s in sessions}) == 3


def test_polars_and_pandas_of_one_content_keep_their_own_sessions():
    # a Polars frame converts to pandas dtypes of its own; its key is its own
    q = pl.DataFrame({"a": [1, 2, 3, 4] * 5})
    assert frame_key(q) != frame_key(q.to_pandas())
    assert session_for(q) is session_for(q.clone())
    lazy = q.lazy()
    assert session_for(lazy) is session_for(q)


def test_polars_object_columns_are_not_keyed():
    q = pl.DataFrame({"a": pl.Series([object(), object()], dtype=pl.Object)})
    assert frame_key(q) is None
