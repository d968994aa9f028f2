"""Feature selection for a target: mRMR, JMI and CMIM, the gain's significance and the stop rule.

Checks:
* a constructed example that forces the order (a relevant column R, an exact copy C
  of it, and a weaker column W independent of R): every method takes R, then W, and
  stops at C, because the copy adds nothing once R is chosen;
* the chosen order and the criterion values against a direct implementation of each
  paper's criterion written here, on plug-in entropies from ``numpy.unique`` counts:
  Peng, Long & Ding (2005), eq. (8)/(9) difference form "MID"; Yang & Moody (1999),
  JMI = sum over chosen j of I(X, Xj; Y); Fleuret (2004), CMIM = min over chosen j of
  I(X; Y | Xj) (equation numbers from memory);
* calibration: under the null (no remaining column tells about the target) the step's
  significance fires at most at its nominal rate, at two sample sizes, for the first
  step and for a later step;
* the demo data: the planted leak is reported and left out, the near-duplicate weight
  columns are not both chosen, the chosen columns are among the planted informative ones.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest

import infoscope  # noqa: F401  (registers the accessor)
from infoscope.datasets import PLANTED, make_deliveries
from infoscope.frame.selection import SELECTION_COLUMNS, SELECTION_STATUS, select_table
from infoscope.frame.session import ProfileSession


# ------------------------------------------------------------------ direct implementation
def _h(*cols):
    """Plug-in joint entropy (nats) of integer columns, from numpy.unique counts."""
    _, counts = np.unique(np.stack(cols, axis=1), axis=0, return_counts=True)
    p = counts / counts.sum()
    return float(-(p * np.log(p)).sum())


def _mi(a, b):
    return _h(a) + _h(b) - _h(a, b)


def _cmi(a, b, c):
    return _h(a, c) + _h(b, c) - _h(a, b, c) - _h(c)


def _reference_order(features: dict, y, method: str, k: int):
    """Greedy selection by the papers' criteria (plug-in), with the values at each step."""
    chosen, values = [], []
    for _ in range(k):
        scores = {}
        for name, x in features.items():
            if name in chosen:
                continue
            if not chosen:
                scores[name] = _mi(x, y)
            elif method == "mrmr":   # Peng et al. 2005: I(x;y) - 1/|S| sum_j I(x;xj)
                scores[name] = _mi(x, y) - np.mean([_mi(x, features[j]) for j in chosen])
            elif method == "jmi":    # Yang & Moody 1999: sum_j I(x, xj; y)
                scores[name] = sum(_h(x, features[j]) + _h(y) - _h(x, features[j], y) for j in chosen)
            else:                    # Fleuret 2004: min_j I(x; y | xj)
                scores[name] = min(_cmi(x, y, features[j]) for j in chosen)
        best = max(scores, key=lambda n: (scores[n], _mi(features[n], y)))
        chosen.append(best)
        values.append(scores[best])
    return chosen, values


def _random_frame(rng, n=4000):
    a = rng.integers(0, 4, n)
    b = rng.integers(0, 3, n)
    c = np.where(rng.random(n) < 0.7, a, rng.integers(0, 4, n))      # redundant with a
    d = rng.integers(0, 2, n)
    e = np.where(rng.random(n) < 0.5, (a + b) % 3, rng.integers(0, 3, n))
    f = rng.integers(0, 5, n)
    y = ((a >= 2) ^ (b == 1) ^ (rng.random(n) < 0.15) ^ ((d == 1) & (rng.random(n) < 0.3))).astype(int)
    return {"a": a, "b": b, "c": c, "d": d, "e": e, "f": f}, y


@pytest.mark.parametrize("method", ["mrmr", "jmi", "cmim"])
def test_order_and_criterion_match_a_direct_implementation(rng, method):
    features, y = _random_frame(rng)
    df = pd.DataFrame({**{k: v.astype(str) for k, v in features.items()}, "y": y})
    out = df.info_profile.select("y", k=4, method=method, estimator="plugin", n_permutations=19)
    steps = out[out["step"].notna()]
    order, values = _reference_order(features, y, method, 4)
    assert steps["column"].tolist() == order
    np.testing.assert_allclose(steps["criterion"].to_numpy(), np.array(values) / math.log(2), atol=1e-10)
    # relevance is I(X;Y) and redundancy the mean I(X;Xj) over the columns chosen before
    np.testing.assert_allclose(steps["relevance"], [_mi(features[c], y) / math.log(2) for c in order], atol=1e-10)
    expected_red = [np.nan] + [np.mean([_mi(features[c], features[j]) for j in order[:i]]) / math.log(2)
                               for i, c in enumerate(order) if i]
    np.testing.assert_allclose(steps["redundancy"], expected_red, atol=1e-10)
    # the gain is I(X; Y | all chosen before), on the same rows
    gains = [_cmi(features[c], y, np.stack([features[j] for j in order[:i]] or [np.zeros_like(y)], 1)
                  @ (10 ** np.arange(max(i, 1))))
             for i, c in enumerate(order)]
    supported = steps["gain_supported"].to_numpy()
    np.testing.assert_allclose(steps["gain"].to_numpy()[supported], (np.array(gains) / math.log(2))[supported],
                               atol=1e-10)


@pytest.mark.parametrize("method", ["mrmr", "jmi", "cmim"])
def test_constructed_example_takes_the_independent_column_before_the_copy(method):
    # R: relevant (4 levels); C: an exact copy of R; W: weaker, independent of R.
    # Y depends on R strongly and on W weakly.  Every method takes R first; mRMR then
    # takes W (its redundancy with R is 0, C's is H(R)); JMI and CMIM take W because
    # I(C; Y | R) = 0 < I(W; Y | R).  The copy is the stop point: it adds nothing.
    rng = np.random.default_rng(7)
    n = 5000
    r = rng.integers(0, 4, n)
    w = rng.integers(0, 2, n)
    y = ((r >= 2) ^ (rng.random(n) < 0.05) ^ ((w == 1) & (rng.random(n) < 0.25))).astype(int)
    df = pd.DataFrame({"R": r, "C": r.copy(), "W": w, "y": y})
    out = df.info_profile.select("y", method=method, n_permutations=99, include_leaks=True)
    assert out["column"].tolist()[:2] == ["R", "W"]
    assert out["status"].tolist()[:2] == ["selected", "selected"]
    rows = out.set_index("column")
    assert rows.loc["W", "gain"] > 0.005
    if len(out) > 2:
        assert out["status"].iloc[2] == "stop" and out["column"].iloc[2] == "C"
        assert rows.loc["C", "gain"] == pytest.approx(0.0, abs=2e-3)


def _null_run(n, seed, later_step):
    rng = np.random.default_rng(seed)
    cols = {"b2": rng.integers(0, 2, n), "c3": rng.integers(0, 3, n), "c8": rng.integers(0, 8, n),
            "x": rng.normal(size=n)}
    if later_step:
        # the target depends on one column only: after it, nothing is left to find
        cols["r"] = rng.integers(0, 3, n)
        cols["y"] = ((cols["r"] == 0) ^ (rng.random(n) < 0.1)).astype(int)
    else:
        cols["y"] = rng.integers(0, 2, n)
    out = pd.DataFrame(cols).info_profile.select("y", n_permutations=99, bins=8, seed=seed, n_boot=0)
    steps = out[out["step"].notna()]
    return steps, steps["significant"].to_numpy()


@pytest.mark.parametrize("n", [150, 1500])
def test_first_step_is_calibrated_under_the_null(n):
    reps = 150
    fired = sum(bool(_null_run(n, 100 * n + i, False)[1][0]) for i in range(reps))
    assert fired / reps <= 0.05 + 3 * math.sqrt(0.05 * 0.95 / reps), fired / reps


@pytest.mark.parametrize("n", [300, 3000])
def test_later_step_is_calibrated_under_the_null(n):
    reps = 100
    fired = 0
    for i in range(reps):
        steps, significant = _null_run(n, 7 * n + i, True)
        if steps["column"].iloc[0] == "r" and len(significant) > 1:
            fired += bool(significant[1])
    assert fired / reps <= 0.05 + 3 * math.sqrt(0.05 * 0.95 / reps), fired / reps


def test_leaks_are_reported_and_left_out_unless_asked():
    rng = np.random.default_rng(3)
    n = 2000
    y = rng.integers(0, 2, n)
    df = pd.DataFrame({"y": y, "leak": y * 5.0, "x": (y ^ (rng.random(n) < 0.3)).astype(int)})
    out = df.info_profile.select("y", n_permutations=99)
    assert list(out.columns) == list(SELECTION_COLUMNS)
    leak = out[out["column"] == "leak"].iloc[0]
    assert leak["status"] == "leakage" and pd.isna(leak["step"]) and "include_leaks" in leak["note"]
    assert out["column"].iloc[0] == "x"
    kept = df.info_profile.select("y", n_permutations=99, include_leaks=True)
    assert kept["column"].iloc[0] == "leak" and "leakage" not in kept["status"].tolist()
    assert set(out["status"]) <= set(SELECTION_STATUS)


def test_k_steps_past_the_stop_are_marked():
    rng = np.random.default_rng(4)
    n = 1000
    a = rng.integers(0, 2, n)
    df = pd.DataFrame({"a": a, "n1": rng.integers(0, 3, n), "n2": rng.integers(0, 3, n),
                       "y": a ^ (rng.random(n) < 0.1)})
    out = df.info_profile.select("y", k=3, n_permutations=99)
    assert out["step"].tolist() == [1, 2, 3]
    assert out["status"].tolist() == ["selected", "past_stop", "past_stop"]
    assert out.attrs["stop_step"] == 2 and out.attrs["method"] == "mrmr"


def test_sparse_gain_is_not_shown_but_tested():
    rng = np.random.default_rng(5)
    n = 400
    df = pd.DataFrame({c: rng.integers(0, 12, n) for c in ("a", "b", "c")})
    df["y"] = (df["a"] + df["b"] + df["c"]) % 2
    out = df.info_profile.select("y", k=3, n_permutations=49)
    last = out.iloc[2]
    assert not last["gain_supported"] and math.isnan(last["gain"])
    assert "fewer than 5 per cell" in last["note"] and 0 < last["p_value"] <= 1


@pytest.mark.filterwarnings("ignore:column '(parcel_ref|contents)'.*folded:UserWarning")
def test_demo_planted_structure_behaves_as_planted():
    df = make_deliveries(20_000, seed=0)
    target = PLANTED["target"]
    out = df.info_profile.select(target, n_permutations=99)
    chosen = out.loc[out["status"] == "selected", "column"].tolist()
    assert chosen and set(chosen) <= set(PLANTED["informative"])
    assert not set(PLANTED["near_duplicates"]) <= set(chosen)      # never both weights
    leak = out[out["column"] == PLANTED["leak"]]
    assert leak["status"].tolist() == ["leakage"]
    assert out.loc[out["column"] == "parcel_ref", "status"].tolist() == ["id_like"]
    with_leak = df.info_profile.select(target, n_permutations=99, include_leaks=True)
    assert with_leak["column"].iloc[0] == PLANTED["leak"]
    assert with_leak["status"].iloc[1] == "stop"          # the leak explains the target: nothing is left


def test_bad_input_is_named():
    df = pd.DataFrame({"a": [0, 1] * 20, "y": [0, 0, 1, 1] * 10})
    with pytest.raises(ValueError, match="method="):
        df.info_profile.select("y", method="best")
    with pytest.raises(ValueError, match="k=0"):
        df.info_profile.select("y", k=0)
    with pytest.raises(KeyError, match="nope"):
        df.info_profile.select("nope")
    with pytest.raises(ValueError, match="needs a target"):
        df.info_profile.select()
    with pytest.raises(ValueError, match="nothing to select"):
        df[["y"]].info_profile.select("y")


def test_docstring_examples_run():
    import doctest

    from infoscope.frame import selection

    result = doctest.testmod(selection, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0


@pytest.mark.parametrize("method", ["mrmr", "jmi", "cmim"])
def test_compiled_and_numpy_counting_give_the_same_selection(method, monkeypatch):
    # the compiled kernel (engine/strata.py) against one numpy.bincount over every
    # shuffle: the same tables, so the same steps, gains and p-values; the frame has
    # missing values (candidates on part of the rows) and a 400-level column (more
    # than 256 strata once chosen: the sorting shuffle)
    from infoscope.engine.counting import numba_ready
    from infoscope.frame import selection

    assert numba_ready(wait=True)
    rng = np.random.default_rng(3)
    n = 3000
    a = rng.integers(0, 4, n)
    many = rng.integers(0, 400, n)
    y = ((a + (many % 3) + rng.integers(0, 2, n)) % 3).astype(str)
    b = np.where(rng.random(n) < 0.1, np.nan, rng.normal(size=n) + (y == "1"))
    df = pd.DataFrame({"a": a.astype(str), "many": many, "b": b, "c": rng.integers(0, 3, n).astype(str), "y": y})
    tables = {}
    for backend in ("numpy", "numba"):
        monkeypatch.setattr(selection, "_BACKEND", backend)
        s = ProfileSession(df, categorical_threshold=500, max_categories=500)
        tables[backend] = selection.select_table(s, "y", method=method, k=4, n_permutations=99)
    pd.testing.assert_frame_equal(tables["numpy"], tables["numba"])
    assert tables["numba"]["step"].notna().sum() == 4


def test_table_scores_count_what_bincount_counts():
    # reference: numpy.bincount of each shuffle's cells, then sum of j ln j (scipy xlogy)
    from scipy.special import xlogy

    from infoscope.engine.strata import table_scores

    rng = np.random.default_rng(8)
    y = rng.integers(0, 3, (7, 500))
    base = rng.integers(0, 20, 300) * 3
    rows = np.sort(rng.choice(500, 300, replace=False))
    lut = xlogy(np.arange(501.0), np.arange(501.0))
    expected = [xlogy(c, c).sum() for c in (np.bincount(base + y[i, rows], minlength=60) for i in range(7))]
    for backend in ("numpy", "numba"):
        np.testing.assert_allclose(table_scores(y, base, 60, lut, rows=rows, backend=backend), expected, rtol=1e-12)


def test_select_tables_are_kept_by_arguments_and_encodings():
    rng = np.random.default_rng(4)
    a = rng.integers(0, 3, 800)
    df = pd.DataFrame({"a": a, "b": rng.normal(size=800), "y": (a % 2) ^ (rng.random(800) < 0.1)})
    s = ProfileSession(df)
    first = select_table(s, "y", n_permutations=49)
    first.loc[0, "column"] = "changed by the user"  # a copy: the kept table is not touched
    again = select_table(s, "y", n_permutations=49)
    assert again.loc[0, "column"] == "a" and len(s._selection_cache) == 1
    s.update(bins=3)  # new encodings: computed again, the old entry let go
    select_table(s, "y", n_permutations=49)
    assert len(s._selection_cache) == 1
