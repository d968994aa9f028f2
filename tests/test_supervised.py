"""The profile setting bins="mdlp": numeric columns cut against the target, and the optimism shown.

Checks: the session's edges equal ``bin_edges(values, bins="mdlp", target=...)`` (the
functional form, itself checked against a direct implementation of Fayyad & Irani 1993
in test_mdlp.py); the relevance table carries the caution and a held-out MI; and, by
simulation, the in-sample MI of MDLP bins is on average above the held-out one (the
optimism the caution is about).
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import infoscope  # noqa: F401
from infoscope import bin_edges
from infoscope.frame.session import ProfileSession


def _frame(seed, n=1500):
    rng = np.random.default_rng(seed)
    x = rng.normal(size=n)
    y = (rng.random(n) < 0.5 + 0.2 * np.tanh(x)).astype(int)
    return pd.DataFrame({"x": x, "noise": rng.normal(size=n), "c": rng.integers(0, 3, n).astype(str), "y": y})


def test_session_edges_are_the_functional_mdlp_edges():
    df = _frame(0)
    df.loc[5, "x"] = np.nan
    s = ProfileSession(df, bins="mdlp", target="y", n_boot=0)
    expected = bin_edges(df["x"], bins="mdlp", target=df["y"])
    np.testing.assert_allclose(s.column("x").edges, expected)
    assert s.column("c").edges is None and s.column("y").kind == "boolean" or s.column("y").k == 2


def test_relevance_says_it_is_optimistic_and_gives_a_held_out_mi():
    df = _frame(1)
    r = df.info_profile.relevance("y", bins="mdlp", n_boot=0)
    assert r.attrs["binning"] == "mdlp" and "optimistic" in r.attrs["binning_note"]
    assert set(r.attrs["held_out_mi"]) == {"x", "noise"}
    plain = df.info_profile.relevance("y", n_boot=0)
    assert "binning" not in plain.attrs


def test_changing_the_target_recuts_the_columns():
    df = _frame(2)
    df["y2"] = (df["x"] > 1.0).astype(int)
    s = ProfileSession(df, bins="mdlp", target="y", n_boot=0)
    before = s.column("x").edges
    changed = s.update(target="y2")
    assert "x" in changed
    after = s.column("x").edges
    assert not np.array_equal(before, after)
    assert np.any(np.isclose(after, 1.0, atol=0.05))


def test_mdlp_needs_a_target():
    with pytest.raises(ValueError, match="set target="):
        ProfileSession(_frame(3), bins="mdlp")


def test_in_sample_mdlp_relevance_is_optimistic_on_average():
    # 40 seeded samples of a weakly informative column: the MI on the rows the cuts
    # were chosen on exceeds, on average, the MI on held-out rows
    gaps = []
    for seed in range(40):
        df = _frame(100 + seed, n=800)
        r = df.info_profile.relevance("y", bins="mdlp", n_boot=0, seed=seed)
        in_sample = float(r.set_index("column").loc["x", "mi"])
        gaps.append(in_sample - r.attrs["held_out_mi"]["x"])
    gaps = np.array(gaps)
    assert gaps.mean() > 0 and (gaps > 0).mean() > 0.5
