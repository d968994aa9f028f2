"""The Chow–Liu tree and surprising rows.

Checks:
* the tree's edge set equals a maximum spanning tree computed independently:
  ``scipy.sparse.csgraph.minimum_spanning_tree`` on (c - MI), MI from
  ``sklearn.metrics.mutual_info_score`` on the encoded codes (Chow & Liu 1968: the
  maximum spanning tree of pairwise MI);
* each row's surprisal equals a hand computation of -log2 of the tree's product of
  smoothed conditionals, with the counts taken by ``pandas.crosstab``;
* the planted inconsistent rows of the demo data rank at the top.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from scipy.sparse.csgraph import minimum_spanning_tree
from sklearn.metrics import mutual_info_score

import infoscope  # noqa: F401  (registers the accessor)
from infoscope.datasets import PLANTED, make_deliveries
from infoscope.frame.session import ProfileSession
from infoscope.frame.tree import (
    SURPRISING_COLUMNS,
    TREE_COLUMNS,
    maximum_spanning_tree,
    row_scores,
    surprising_rows_table,
    tree_table,
)

FOLDED = "ignore:column '(parcel_ref|contents)'.*folded:UserWarning"


def _frame(rng, n=3000):
    a = rng.integers(0, 4, n)
    b = np.where(rng.random(n) < 0.7, a, rng.integers(0, 4, n))
    c = np.where(rng.random(n) < 0.5, b % 2, rng.integers(0, 2, n))
    d = rng.normal(size=n) + a
    e = rng.integers(0, 3, n)
    f = np.where(rng.random(n) < 0.4, e, rng.integers(0, 3, n)).astype(str)
    return pd.DataFrame({"a": a, "b": b, "c": c, "d": d, "e": e, "f": f})


def test_edges_equal_scipy_minimum_spanning_tree_on_negated_mi(rng):
    df = _frame(rng)
    s = ProfileSession(df, estimator="plugin", bins=6)
    names = s.names
    codes = [np.asarray(s.column(c).codes) for c in names]
    p = len(names)
    mi = np.zeros((p, p))
    for i in range(p):
        for j in range(i + 1, p):
            # sklearn.metrics.mutual_info_score: the plug-in MI (nats) of two label vectors
            mi[i, j] = mi[j, i] = mutual_info_score(codes[i], codes[j])
    weights = np.triu(mi.max() + 1.0 - mi, 1)   # positive, so that no edge reads as missing
    mst = minimum_spanning_tree(weights).toarray()
    expected = {frozenset((names[i], names[j])) for i, j in zip(*np.nonzero(mst))}
    got = tree_table(s)
    assert list(got.columns) == list(TREE_COLUMNS)
    assert {frozenset(e) for e in got[["parent", "child"]].values.tolist()} == expected
    np.testing.assert_allclose(sorted(got["mi"]), sorted(mi[i, j] / math.log(2) for i, j in zip(*np.nonzero(mst))),
                               atol=1e-10)
    assert got.attrs["total_mi"] == pytest.approx(got["mi"].sum())


def test_prim_on_random_weights_matches_scipy(rng):
    for _ in range(20):
        p = int(rng.integers(2, 12))
        w = rng.random((p, p))
        w = (w + w.T) / 2
        parent = maximum_spanning_tree(w)
        got = {frozenset((i, int(parent[i]))) for i in range(1, p)}
        mst = minimum_spanning_tree(np.triu(2.0 - w, 1)).toarray()   # scipy, on negated weights
        assert got == {frozenset((int(i), int(j))) for i, j in zip(*np.nonzero(mst))}


def test_row_surprisal_is_the_hand_computed_product_of_conditionals(rng):
    df = _frame(rng, 800)[["a", "b", "c", "e"]]
    alpha = 0.5
    s = ProfileSession(df)
    scores = row_scores(s, model="tree", alpha=alpha)
    parent = dict(zip(scores.names, [scores.names[p] if p >= 0 else None for p in scores.parent]))
    for pos in (0, 17, 401, 799):
        row = df.iloc[pos]
        total = 0.0
        for col, par in parent.items():
            k = df[col].nunique()
            if par is None:
                counts = df[col].value_counts()
                prob = (counts.get(row[col], 0) + alpha) / (len(df) + alpha * k)
            else:
                table = pd.crosstab(df[par], df[col])           # pandas.crosstab counts
                n_ab = table.loc[row[par], row[col]] if row[col] in table.columns else 0
                prob = (n_ab + alpha) / (table.loc[row[par]].sum() + alpha * k)
            total += -math.log2(prob)
        assert scores.total[pos] == pytest.approx(total, rel=1e-5)


def test_independent_model_is_the_sum_of_marginal_surprisals(rng):
    df = _frame(rng, 500)[["a", "e", "f"]]
    scores = row_scores(ProfileSession(df), model="independent", alpha=1.0)
    expected = sum(-np.log2((df[c].map(df[c].value_counts()) + 1.0) / (len(df) + df[c].nunique())) for c in df)
    np.testing.assert_allclose(scores.total, expected.to_numpy(), rtol=1e-5)
    assert (scores.parent == -1).all()


def test_missing_cells_are_summed_out():
    a = np.array(["x", "y"] * 50, dtype=object)
    b = a.copy()
    b[3] = None          # child missing: its cell adds nothing
    a[6] = None          # parent missing: the child's cell is its own marginal surprisal
    scores = row_scores(ProfileSession(pd.DataFrame({"a": a, "b": b})), model="tree", alpha=0.5)
    ia, ib = scores.names.index("a"), scores.names.index("b")
    assert scores.parent[ib] == ia and scores.parent[ia] == -1
    assert scores.cells[3, ib] == 0.0 and scores.cells[6, ia] == 0.0
    # b's margin: 50 "x" (row 6 has b = "x"), 49 "y": (50 + 0.5) / (99 + 1)
    assert scores.cells[6, ib] == pytest.approx(-math.log2(50.5 / 100.0), rel=1e-6)


@pytest.mark.filterwarnings(FOLDED)
@pytest.mark.parametrize("n", [20_000, 50_000])
def test_planted_inconsistent_rows_rank_at_the_top(n):
    df = make_deliveries(n, seed=0)
    planted = set(np.flatnonzero(df["weight_kg"] > df["weight_lb"]).tolist())   # PLANTED["inconsistent"]["rule"]
    assert len(planted) == n // PLANTED["inconsistent"]["every"]
    out = df.info_profile.surprising_rows(n=20)
    assert list(out.columns) == list(SURPRISING_COLUMNS)
    top = set(out["position"].head(len(planted)).tolist())
    assert top == planted
    first = out.iloc[0]
    assert {c["column"] for c in first["cells"]} & {"weight_kg", "weight_lb"}
    assert "bits" in first["summary"] and first["excess"] > 10


def test_suppression_hides_values_and_keeps_scores(rng):
    df = _frame(rng, 600)
    plain = df.info_profile.surprising_rows(n=5)
    hidden = df.info_profile.surprising_rows(n=5, min_count=10)
    pd.testing.assert_series_equal(plain["surprisal"], hidden["surprisal"])
    for cells in hidden["cells"]:
        assert all(c["value"] is None and c["symbol"] is None and c["parent_value"] is None for c in cells)
    assert "(hidden)" in hidden["summary"][0] and hidden.attrs["hidden_values"] is True
    assert any(c["value"] is not None for c in plain["cells"][0])


def test_row_labels_follow_the_frame_index(rng):
    df = _frame(rng, 300)
    df.index = [f"r{i}" for i in range(300)]
    out = df.info_profile.surprising_rows(n=3)
    assert all(df.index[p] == r for p, r in zip(out["position"], out["row"]))


def test_id_like_and_constant_columns_are_left_out(rng):
    df = _frame(rng, 2000)
    df["ref"] = [f"id{i}" for i in range(2000)]
    df["k"] = "same"
    with pytest.warns(infoscope.DataQualityWarning):
        out = tree_table(ProfileSession(df))
    assert out.attrs["left_out"] == {"ref": "id_like", "k": "constant"}
    assert "ref" not in set(out["parent"]) | set(out["child"])


def test_bad_input_is_named(rng):
    df = _frame(rng, 100)
    with pytest.raises(ValueError, match="model="):
        df.info_profile.surprising_rows(model="forest")
    with pytest.raises(ValueError, match="n=0"):
        df.info_profile.surprising_rows(n=0)
    with pytest.raises(ValueError, match="alpha="):
        df.info_profile.surprising_rows(alpha=0)
    with pytest.raises(ValueError, match="min_count"):
        df.info_profile.surprising_rows(min_count=-2)


def test_docstring_examples_run():
    import doctest

    from infoscope.frame import tree

    result = doctest.testmod(tree, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0


@pytest.mark.filterwarnings(FOLDED)
def test_payload_carries_both_views_and_hides_values_under_min_count():
    import json

    from infoscope.views.payload import payload

    df = make_deliveries(6_000, seed=2)
    s = ProfileSession(df, target="late", n_boot=0)
    p = payload(s, min_count=10)
    surprising = json.loads(p["state"]["_surprising"])
    assert surprising["hidden_values"] is True and surprising["rows"]
    for cells in surprising["cells"]:
        for cell in cells:
            assert cell["value"] is None and cell["symbol"] is None and cell["parent_value"] is None
            assert cell["bits"] > 0
    assert {tuple(e[:2]) for e in surprising["tree"]["edges"]} == {
        tuple(e) for e in tree_table(s)[["parent", "child"]].values.tolist()}
    selection = json.loads(p["state"]["_selection"])
    assert selection["target"] == "late" and selection["rows"][0][selection["fields"].index("status")] == "selected"
    assert any(r[selection["fields"].index("status")] == "leakage" for r in selection["rows"])
    shown = json.loads(payload(s)["state"]["_surprising"])
    assert shown["hidden_values"] is False and any(c["value"] is not None for c in shown["cells"][0])
