"""Data warnings point at the user's line, not at a library line (``warnings.warn`` stack level).

Reference: the Python documentation of ``warnings.warn`` (``stacklevel``): the
warning's ``filename`` and ``lineno`` are those of the frame it is attributed to.
"""
from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest

import infoscope
from infoscope import DataQualityWarning, InfoscopeWarning
from infoscope.encode import clear_cache, encode_column
from infoscope.frame import sessions as accessor
from infoscope.frame.session import ProfileSession


def _caught(fn):
    accessor._SESSIONS.clear()
    clear_cache()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        fn()
    ours = [w for w in caught if issubclass(w.category, InfoscopeWarning)]
    assert ours, "the call warns about the data"
    return ours


@pytest.fixture
def frame():
    x = np.linspace(0.0, 1.0, 200)
    x[:3] = np.inf
    return pd.DataFrame({"x": x, "c": ["a", "b"] * 100})


@pytest.mark.parametrize("call", [
    lambda df: df.info_profile.entropy(n_boot=0),
    lambda df: df.info_profile.pairs(),
    lambda df: ProfileSession(df, n_boot=0).entropy(),
    lambda df: encode_column(df["x"], name="x"),
    lambda df: infoscope.entropy(df["x"].to_numpy(), bins=4),
], ids=["accessor.entropy", "accessor.pairs", "session", "encode_column", "entropy"])
def test_data_warnings_point_at_the_callers_line(frame, call):
    for w in _caught(lambda: call(frame)):
        assert w.filename == __file__, (w.filename, w.lineno, str(w.message))
        assert issubclass(w.category, DataQualityWarning)
