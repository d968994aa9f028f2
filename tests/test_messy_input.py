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
