"""Messy input at the frame level (issue 13): a correct result or one clear
message naming the column or parameter, never a raw traceback from inside numpy
or pandas, and never a stale or silently wrong number.

Expected numbers are closed forms (common practice) or ``scipy.stats.entropy``
of the counts that the values imply.
"""
from __future__ import annotations

import copy
import warnings

import numpy as np
import pandas as pd
import pytest
import scipy.stats

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope.encode.cache import content_key


def quiet(func, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return func(*args, **kwargs)


def test_numbers_beside_tuples_in_an_object_column():
    # pandas' hashing raises ValueError ("setting an array element with a sequence")
    # on tuples beside numbers; the column is then encoded without the cache
    cells = [1, (1, 2), 2.5, (3,)] * 10
    df = pd.DataFrame({"m": pd.Series(cells, dtype=object), "y": [0, 1] * 20})
    before = copy.deepcopy(df)
    assert content_key(df["m"]) is None
    with pytest.warns(infoscope.DataQualityWarning, match=r"column 'm': values of several types"):
        row = df.info_profile.entropy(estimator="plugin", n_boot=0).set_index("column").loc["m"]
    # four distinct cells, ten rows each: scipy.stats.entropy([10] * 4, base=2) = 2 bits
    assert row["k"] == 4 and row["entropy"] == pytest.approx(scipy.stats.entropy([10] * 4, base=2))
    pair = quiet(df.info_profile.pair, "m", "y")
    assert pair.n == 40
    pd.testing.assert_frame_equal(df, before)


def test_profiles_are_not_reused_across_1_and_the_text_1():
    # pandas hashes object cells through their text: 1 and "1" collided, and the
    # second frame got the first one's session (its mixed_types flag)
    mixed = pd.DataFrame({"m": pd.Series([1, "x", 2, "y"] * 10, dtype=object)})
    text = pd.DataFrame({"m": pd.Series(["1", "x", "2", "y"] * 10, dtype=object)})
    assert "mixed_types" in quiet(mixed.info_profile.entropy).loc[0, "flags"]
    assert "mixed_types" not in quiet(text.info_profile.entropy).loc[0, "flags"]


# ------------------------------------------------------------------ settings, one validation
SMALL = pd.DataFrame({"a": [0, 1] * 20, "b": [0, 0, 1, 1] * 10})


@pytest.mark.parametrize("seed", [-1, -(2**40)])
def test_negative_seed_is_named_before_any_work(seed):
    # numpy's "expected non-negative integer" came from the bootstrap's child seeds
    from infoscope.frame.session import ProfileSession

    with pytest.raises(ValueError, match=rf"seed={seed} must be an integer >= 0"):
        SMALL.info_profile.entropy(seed=seed)
    with pytest.raises(ValueError, match="seed=-1 must be an integer >= 0"):
        ProfileSession(SMALL).update(seed=-1)
    with pytest.raises(ValueError, match="seed=-1"):
        SMALL.info_profile(seed=-1)  # the widget: at the call, not in its worker thread


@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen", "james_stein", "dirichlet",
                                       "grassberger", "nsb"])
@pytest.mark.parametrize(("alpha", "exc", "match"), [
    (-1, ValueError, "alpha=-1 is invalid"),
    (float("nan"), ValueError, "alpha=nan is invalid"),
    (0, ValueError, "alpha=0 is invalid"),
    ("x", ValueError, "alpha='x' is not valid"),
    ([1], TypeError, "alpha must be a number"),
])
def test_bad_alpha_is_refused_for_every_estimator(estimator, alpha, exc, match):
    with pytest.raises(exc, match=match):
        SMALL.info_profile.entropy(estimator=estimator, alpha=alpha)


def test_alpha_unused_by_the_estimator_is_said_once():
    from infoscope import InfoscopeWarning
    from infoscope.frame.session import ProfileSession

    with pytest.warns(InfoscopeWarning, match=r"alpha=0.5 is not used: only estimator='dirichlet'"):
        session = ProfileSession(SMALL, alpha=0.5)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        session.update(bins=4)  # nothing new about alpha: no second note
    # with dirichlet it is used: 2 symbols x 20 rows, alpha 0.5 -> (20.5 / 41) each, 1 bit
    dirichlet = ProfileSession(SMALL, alpha=0.5, estimator="dirichlet", n_boot=0).entropy()
    assert dirichlet["entropy"].tolist() == pytest.approx([scipy.stats.entropy([20.5, 20.5], base=2)] * 2)


def test_multiindex_target_is_a_tuple_like_in_pair():
    columns = pd.MultiIndex.from_tuples([("g", "c"), ("g", "d"), ("h", "e")])
    df = pd.DataFrame(np.arange(120).reshape(40, 3) % 4, columns=columns)
    df[("g", "d")] = df[("g", "c")] * 2  # a copy of the target, relabelled
    by_tuple = quiet(df.info_profile.relevance, ("g", "c"), n_boot=0)
    by_key = quiet(df.info_profile.relevance, "g / c", n_boot=0)
    pd.testing.assert_frame_equal(by_tuple, by_key)
    assert by_tuple.attrs["target"] == "g / c"
    assert by_tuple.set_index("column").loc["g / d", "leakage"]
    with pytest.raises(KeyError, match=r"target=\('g', 'x'\) is not a column"):
        df.info_profile.relevance(("g", "x"))
    numbered = pd.DataFrame({0: [0, 1] * 20, 1: [0, 1] * 20})
    assert quiet(numbered.info_profile.relevance, 0, n_boot=0)["column"].tolist() == ["1"]
