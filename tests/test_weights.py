"""Observation weights in the profile: ``ProfileSession(frame, weights="w")``.

Checks against outside sources:
* Kish (1965), Survey Sampling, sec. 11.7: the effective sample size
  (sum w)^2 / sum w^2, computed here with numpy from the weights;
* integer weights against replicated rows: a row of weight 3 counts as three rows,
  so the plug-in MI of the weighted profile equals scikit-learn's
  ``sklearn.metrics.mutual_info_score`` on the frame with each row repeated w times,
  up to the rounding of the effective table (each cell moves by less than one
  effective row);
* equal weights (any constant) give exactly the unweighted profile (every table);
* Miller (1955): the Miller-Madow entropy adds (m - 1) / (2N) to the plug-in; with
  weights N is the effective sample size of the column (rounded, the table's total);
* calibration (DESIGN: simulate the null): independent columns, weights drawn
  lognormal with spreads sigma = 0.5, 1, 1.5 independent of the data, or driven by
  one column, at several n: the share of pairs with p < 0.05 stays at or below 5%
  within 3 binomial standard errors (the rule documented in DEVELOPERS.md, "Weights").
"""
from __future__ import annotations

import math
import warnings

import numpy as np
import pandas as pd
import pytest
from sklearn.metrics import mutual_info_score

import infoscope  # noqa: F401  (registers the accessor)
from infoscope import InfoscopeWarning
from infoscope.frame.session import ProfileSession


def _quiet(fn, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        return fn(*args, **kwargs)


def _frame(rng, n, sigma=1.0, informative=False):
    cols = {f"x{j}": rng.normal(size=n) for j in range(3)}
    for j in range(3):
        cols[f"c{j}"] = rng.choice(list("abcde"), size=n, p=[0.4, 0.3, 0.15, 0.1, 0.05])
    cols["w"] = np.exp(sigma * cols["x0"]) if informative else rng.lognormal(0.0, sigma, n)
    return pd.DataFrame(cols)


def test_the_weight_column_is_a_setting_not_a_profiled_column(rng):
    df = _frame(rng, 500)
    s = ProfileSession(df, weights="w", n_boot=0)
    assert "w" not in s.names and s.weighted and s.settings["weights"] == "w"
    e = s.entropy()
    assert "w" not in set(e["column"]) and e.attrs["weights"] == "w"
    w = df["w"].to_numpy()
    # Kish (1965): n_eff = (sum w)^2 / sum w^2
    assert e.attrs["n_effective"] == pytest.approx(w.sum() ** 2 / (w * w).sum(), rel=1e-12)
    assert e.attrs["weight_total"] == pytest.approx(w.sum(), rel=1e-12)
    p = s.pairs()
    assert not ({"w"} & (set(p["a"]) | set(p["b"]))) and p.attrs["weights"] == "w"
    assert (p["n"] == round(e.attrs["n_effective"])).all()  # no missing rows: every pair has all rows
    assert s.relevance("c0").attrs["n_effective"] == pytest.approx(e.attrs["n_effective"])
    with pytest.raises(KeyError, match="weights"):
        s.relevance("w")
    with pytest.raises(ValueError, match="fixed when the session is made"):
        s.update(weights="x0")
    s.update(bins=4)  # other settings change as usual


def test_equal_weights_give_the_unweighted_profile_exactly(rng):
    df = _frame(rng, 700)
    df["w"] = 2.5
    ws = _quiet(ProfileSession, df, weights="w", n_boot=60)
    us = _quiet(ProfileSession, df.drop(columns="w"), n_boot=60)
    for name in ("entropy", "pairs"):
        a, b = getattr(ws, name)(), getattr(us, name)()
        pd.testing.assert_frame_equal(a, b, check_exact=True)
    pd.testing.assert_frame_equal(ws.relevance("c1"), us.relevance("c1"), check_exact=True)


def test_integer_weights_count_like_repeated_rows(rng):
    n = 4000
    a = rng.integers(0, 4, n)
    b = np.where(rng.random(n) < 0.3, a, rng.integers(0, 4, n))
    w = rng.integers(1, 4, n)
    df = pd.DataFrame({"a": a.astype(str), "b": b.astype(str), "w": w})
    s = ProfileSession(df, weights="w", estimator="plugin", n_boot=0)
    mi = s.pairs()["mi"].iloc[0] * math.log(2)
    rep = df.loc[df.index.repeat(df["w"])]
    # sklearn.metrics.mutual_info_score (nats, plug-in) on the replicated rows
    ref = mutual_info_score(rep["a"], rep["b"])
    n_eff = w.sum() ** 2 / (w * w).sum()
    # rounding the effective table moves each of its 16 cells by < 1 of n_eff rows
    assert mi == pytest.approx(ref, abs=16 * 2 * math.log(n_eff) / n_eff)
    assert abs(mi - ref) < 0.01 * ref


def test_miller_madow_corrects_at_the_effective_sample_size(rng):
    df = _frame(rng, 3000, sigma=0.8)
    plug = ProfileSession(df, weights="w", estimator="plugin", n_boot=0).entropy().set_index("column")
    mm = ProfileSession(df, weights="w", estimator="miller_madow", n_boot=0).entropy().set_index("column")
    n_eff = ProfileSession(df, weights="w", n_boot=0).entropy().attrs["n_effective_columns"]
    for col in ("c0", "c1"):
        m = 5  # every level is seen
        # Miller (1955): H_MM = H_plugin + (m - 1) / (2 N), N the table's total = round(n_eff)
        expected = plug.loc[col, "entropy"] + (m - 1) / (2 * round(n_eff[col])) / math.log(2)
        assert mm.loc[col, "entropy"] == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("values,needle", [
    ([1.0, np.nan, 2.0], "missing or infinite"),
    ([1.0, -0.5, 2.0], "negative"),
    ([0.0, 0.0, 0.0], "0 on every row"),
    (["a", "b", "c"], "must be numbers"),
    ([1.0, np.inf, 2.0], "missing or infinite"),
])
def test_bad_weights_are_refused_naming_the_column(values, needle):
    df = pd.DataFrame({"a": list("xyz"), "weight of row": values})
    with pytest.raises((ValueError, TypeError), match=needle) as info:
        ProfileSession(df, weights="weight of row")
    assert "'weight of row'" in str(info.value)
    with pytest.raises(KeyError, match="not a column"):
        ProfileSession(df, weights="nope")


def test_weights_do_not_change_the_users_frame(rng):
    df = _frame(rng, 300)
    before = df.copy()
    _quiet(ProfileSession(df, weights="w").pairs)
    pd.testing.assert_frame_equal(df, before)


def test_tables_on_rows_refuse_weights_clearly(rng):
    df = _frame(rng, 300)
    s = ProfileSession(df, weights="w", n_boot=0)
    for call in (lambda: df.info_profile.select("c0", weights="w"),
                 lambda: df.info_profile.conditional("c0", "c1", given=["c2"], weights="w"),
                 lambda: df.info_profile.surprising_rows(weights="w"),
                 lambda: s.drift(df)):
        with pytest.raises(ValueError, match="does not take observation weights yet.*'w'"):
            call()
    with pytest.raises(ValueError, match="does not take observation weights"):
        ProfileSession(df, weights="w", estimator="nsb")
    from infoscope.frame.tree import tree_table

    assert len(tree_table(s)) == len(s.names) - 1  # the tree reads the pair tables: weighted MI


def test_the_live_profile_says_it_is_weighted(rng):
    import json

    from infoscope.widgets import ProfileWidget

    df = _frame(rng, 600)
    w = _quiet(ProfileWidget, ProfileSession(df, weights="w", n_boot=0), threaded=False, target="c0")
    assert w._meta["weights"] == "w" and w._meta["n_effective"] == pytest.approx(
        df["w"].sum() ** 2 / (df["w"] ** 2).sum())
    sel = json.loads(w._selection)
    assert sel["target"] == "c0" and sel["rows"] == [] and "weights" in sel["note"]
    assert w._status["state"] == "idle" and "w" not in w._meta["names"]
    html = df.info_profile.to_html(weights="w", target="c0")
    assert "infoscope-profile" in html


CALIBRATION = [(200, 0.5), (200, 1.5), (1000, 1.0), (5000, 0.5), (5000, 1.5)]


@pytest.mark.parametrize("informative", [False, True])
@pytest.mark.parametrize("n,sigma", CALIBRATION)
def test_pair_tests_stay_calibrated_with_weights(n, sigma, informative):
    # independent columns (their pairs are null); weights lognormal(0, sigma) or
    # exp(sigma * x0), which makes the weights depend on one column
    rng = np.random.default_rng(n + int(10 * sigma) + 100 * informative)
    reps, hits, total = 16, 0, 0
    for r in range(reps):
        p = _quiet(ProfileSession(_frame(rng, n, sigma, informative), weights="w", n_boot=0, seed=r).pairs)
        hits += int((p["p_value"] < 0.05).sum())
        total += len(p)
    rate = hits / total
    assert rate <= 0.05 + 3 * math.sqrt(0.05 * 0.95 / total), (n, sigma, informative, rate)


def test_sources_refuse_weights_before_reading(tmp_path, rng):
    path = tmp_path / "rows.csv"
    _frame(rng, 50).to_csv(path, index=False)
    with pytest.raises(ValueError, match="weights= is not taken"):
        infoscope.profile(str(path), weights="w")
