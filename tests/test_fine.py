"""Draft pair tables from fine quantile encodings (encode/fine.py, engine/coarsen.py, frame/tables/draft.py).

The claim under test: for the bin counts the fine cuts nest (2..16 and 32), the
fine tables summed into ``b`` bins are the tables of the column encoded directly
at ``b`` bins, so every number of a draft equals a fresh session's.  References:
``pandas.crosstab`` of the directly encoded codes (the tables) and
``sklearn.metrics.mutual_info_score`` (the plug-in MI).
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from sklearn.metrics import mutual_info_score

from infoscope.encode.columns import encode_column
from infoscope.encode.fine import NESTED_BIN_COUNTS, coarse_map, fine_column, fine_probabilities
from infoscope.engine.coarsen import merge_marginal, merge_table
from infoscope.frame.session import ProfileSession
from infoscope.widgets.profile import ProfileWidget


def _frame(n=6000, seed=3):
    rng = np.random.default_rng(seed)
    x = rng.normal(size=n)
    ties = np.round(rng.exponential(size=n), 1)          # many ties: some quantile edges coincide
    y = x + rng.normal(size=n)
    y[rng.random(n) < 0.07] = np.nan                      # missing rows
    w = rng.lognormal(sigma=2.0, size=n)
    w[:3] = [np.inf, -np.inf, 0.0]                        # infinities are missing, as in the encoder
    return pd.DataFrame({"x": x, "y": y, "ties": ties, "w": w, "c": rng.choice(list("abcde"), n),
                         "k": pd.Categorical(rng.choice(["p", "q"], n))})


def test_fine_probabilities_hold_every_nested_linspace_exactly():
    p = fine_probabilities()
    assert np.all(np.diff(p) > 0) and p[0] == 0.0 and p[-1] == 1.0
    for b in NESTED_BIN_COUNTS:
        assert np.isin(np.linspace(0.0, 1.0, b + 1), p).all()  # float for float
    assert np.diff(p).max() <= 1 / 32 + 1e-15  # so a non-nested edge moves by at most 1/64


@pytest.mark.filterwarnings("ignore::UserWarning")
@pytest.mark.parametrize("missing", ["drop", "category"])
@pytest.mark.parametrize("name", ["x", "y", "ties", "w"])
def test_mapped_fine_codes_are_the_coarse_codes_row_for_row(missing, name):
    df = _frame()
    fc = fine_column(df[name], name, missing=missing)
    for b in NESTED_BIN_COUNTS:
        direct = encode_column(df[name], name=name, bins=b, missing=missing, cache=False)
        mapping, k, exact = coarse_map(fc, b)
        assert exact and k == direct.k
        fine_codes = fc.column.codes.astype(np.int64)
        mapped = np.where(fine_codes < fc.column.k, mapping[np.minimum(fine_codes, fc.column.k - 1)], k)
        np.testing.assert_array_equal(mapped, direct.codes)


@pytest.mark.filterwarnings("ignore::UserWarning")
def test_long_columns_take_the_selection_path_and_still_nest_exactly():
    # 120,000 values: the encoder and the fine cuts both read their quantiles from
    # the radix selection (order_stats), not from a sort
    from infoscope.encode import order_stats

    assert order_stats.kernels(wait=True) is not None
    rng = np.random.default_rng(11)
    x = pd.Series(np.round(rng.gamma(2.0, size=120_000), 3))
    x[rng.random(x.size) < 0.03] = np.nan
    for missing in ("drop", "category"):
        fc = fine_column(x, "x", missing=missing)
        for b in (4, 11, 16, 32):
            direct = encode_column(x, name="x", bins=b, missing=missing, cache=False)
            mapping, k, _ = coarse_map(fc, b)
            codes = fc.column.codes.astype(np.int64)
            mapped = np.where(codes < fc.column.k, mapping[np.minimum(codes, fc.column.k - 1)], k)
            assert k == direct.k
            np.testing.assert_array_equal(mapped, direct.codes)


@pytest.mark.filterwarnings("ignore::UserWarning")
@pytest.mark.parametrize("missing", ["drop", "category"])
def test_merged_tables_equal_crosstab_of_direct_codes(missing):
    df = _frame()
    fx, fy = fine_column(df["x"], "x", missing=missing), fine_column(df["y"], "y", missing=missing)
    kx, ky = fx.column.k, fy.column.k
    # the fine table with the sentinel row/column of missing under "drop" (dropped below)
    full = pd.crosstab(fx.column.codes, fy.column.codes).reindex(index=range(kx + 1), columns=range(ky + 1),
                                                                 fill_value=0).to_numpy()
    for b in (3, 7, 16, 32):
        (mx, ax, _), (my, ay, _) = coarse_map(fx, b), coarse_map(fy, b)
        got = merge_table(full[:kx, :ky], mx, my, ax, ay)
        ex = encode_column(df["x"], name="x", bins=b, missing=missing, cache=False)
        ey = encode_column(df["y"], name="y", bins=b, missing=missing, cache=False)
        ok = (ex.codes < ex.k) & (ey.codes < ey.k)
        want = pd.crosstab(ex.codes[ok], ey.codes[ok]).reindex(index=range(ex.k), columns=range(ey.k),
                                                                fill_value=0).to_numpy()
        np.testing.assert_array_equal(got, want)
        np.testing.assert_array_equal(merge_marginal(got.sum(axis=1), np.arange(ax), ax), want.sum(axis=1))


@pytest.mark.filterwarnings("ignore::UserWarning")
@pytest.mark.parametrize("missing", ["drop", "category"])
@pytest.mark.parametrize("estimator", ["plugin", "miller_madow"])
def test_draft_numbers_equal_a_fresh_session_for_nested_bins(missing, estimator):
    df = _frame()
    s = ProfileSession(df, bins=16, missing=missing, estimator=estimator, n_boot=0)
    s.pairs()
    assert s.prepare_drafts()
    for b in (2, 5, 9, 12, 16, 32):
        draft, diag = s.draft_pairs(b)
        assert draft.attrs["draft"]["exact"] and draft.attrs["draft"]["bins"] == b
        fresh = ProfileSession(df, bins=b, missing=missing, estimator=estimator, n_boot=0)
        want = fresh.pairs()
        for column in ("a", "b", "k_a", "k_b", "n", "mi", "nmi", "value", "g", "dof"):
            np.testing.assert_array_equal(draft[column].to_numpy(), want[column].to_numpy(), err_msg=column)
        chi2 = (want["p_method"] == "chi2").to_numpy()
        np.testing.assert_array_equal(draft["p_value"].to_numpy()[chi2], want["p_value"].to_numpy()[chi2])
        assert draft["p_value"][~chi2 & (want["p_method"] == "permutation").to_numpy()].isna().all()
        np.testing.assert_array_equal(diag.loc[fresh.names].to_numpy(),
                                      np.diag(fresh.matrix("mi").to_numpy()))
        if estimator == "plugin" and missing == "drop":  # the MI itself, against scikit-learn (bits)
            ex, ey = fresh.column("x"), fresh.column("y")
            ok = (ex.codes < ex.k) & (ey.codes < ey.k)
            row = draft[(draft["a"] == "x") & (draft["b"] == "y")].iloc[0]
            assert row["mi"] == pytest.approx(mutual_info_score(ex.codes[ok], ey.codes[ok]) / np.log(2), abs=1e-12)


@pytest.mark.filterwarnings("ignore::UserWarning")
def test_other_bin_counts_are_close_and_say_so():
    df = _frame(n=20000)
    s = ProfileSession(df, bins=16, estimator="plugin", n_boot=0)
    s.prepare_drafts()
    for b in (20, 40, 64):
        draft, _ = s.draft_pairs(b)
        assert not draft.attrs["draft"]["exact"]
        want = ProfileSession(df, bins=b, estimator="plugin", n_boot=0).pairs()
        gap = np.abs(draft["mi"].to_numpy() - want["mi"].to_numpy())
        # edges at most 1/64 of the rows from their places: the MI moves by a few hundredths of a bit
        assert np.nanmax(gap) < 0.05, (b, np.nanmax(gap))


@pytest.mark.filterwarnings("ignore::UserWarning")
def test_no_draft_where_it_would_not_be_the_same_question():
    df = _frame()
    s = ProfileSession(df, bins=16, n_boot=0)
    assert s.draft_pairs(8) is None                     # not prepared
    s.prepare_drafts()
    assert s.draft_pairs(8) is not None
    assert s.draft_pairs(8, measure="adjusted_mi") is None
    few = ProfileSession(pd.DataFrame({"x": np.tile(np.arange(12) + 0.5, 200), "y": np.arange(2400.0)}),
                         bins=16, n_boot=0)
    few.prepare_drafts()
    assert few.draft_pairs(13) is None                  # 12 values: one bin per value, the encoder's rule
    s.set_column_bins("x", 5)
    assert s.draft_pairs(8) is None                     # a per-column override: not the global bins
    s.set_column_bins("x", None)
    s.update(estimator="nsb")
    assert s.draft_pairs(8) is None
    s.update(estimator="miller_madow", missing="category")
    assert s.draft_pairs(8) is None                     # built for another missing policy
    s.prepare_drafts()
    assert s.draft_pairs(8) is not None
    s.update(sample=3000)
    assert s.draft_pairs(8) is None                     # other rows


def test_merge_refuses_maps_that_are_not_bins_in_order():
    t = np.arange(6).reshape(2, 3)
    with pytest.raises(ValueError, match="non-decreasing"):
        merge_table(t, None, [0, 2, 1], 2, 3)
    with pytest.raises(ValueError, match="3 columns"):
        merge_table(t, None, [0, 1], 2, 2)


def _grid_by_name(w) -> pd.DataFrame:
    names = w._grid_meta["names"]
    values = np.frombuffer(bytes(w._grid_values), dtype=np.float32).reshape(len(names), len(names))
    return pd.DataFrame(values, index=names, columns=names).sort_index().sort_index(axis=1)


@pytest.mark.filterwarnings("ignore::UserWarning")
def test_widget_draws_a_draft_grid_then_the_exact_one():
    df = _frame()
    w = ProfileWidget(ProfileSession(df, bins=16, n_boot=40), threaded=False, drafts="always")
    metas, statuses = [], []
    w.observe(lambda ch: metas.append(ch["new"].get("draft")), names=["_grid_meta"])
    # the status comes last in each update: the grid it goes with is on the widget then
    w.observe(lambda ch: statuses.append((ch["new"], _grid_by_name(w))), names=["_status"])
    w.bins = 12
    assert [m is not None for m in metas] == [True, False]  # the draft, then the exact grid
    assert metas[0]["exact"] and metas[0]["bins"] == 12
    drafts = [v for s, v in statuses if s["state"] == "computing" and s["message"].startswith("Draft grid: ")]
    assert len(drafts) == 1 and statuses[-1][0]["state"] == "idle" and w._drafts_shown == 1
    # exact for 12 bins: the draft's values are the exact grid's, and that grid is a fresh one's
    pd.testing.assert_frame_equal(drafts[0], _grid_by_name(w))
    fresh = ProfileWidget(ProfileSession(df, bins=12, n_boot=40), threaded=False, drafts="never",
                          order=w.order)
    assert fresh._grid_meta["names"] == w._grid_meta["names"]
    assert bytes(fresh._grid_values) == bytes(w._grid_values)
    assert bytes(fresh._grid_q) == bytes(w._grid_q)
    # another setting moved with the bins: no draft (it would answer another question)
    with w.hold_trait_notifications():
        w.bins, w.estimator = 8, "plugin"
    assert w._drafts_shown == 1 and w.session.settings["bins"] == 8


@pytest.mark.filterwarnings("ignore::UserWarning")
def test_small_frames_draw_no_draft_by_default():
    w = ProfileWidget(ProfileSession(_frame(n=2000), bins=16, n_boot=40), threaded=False)
    w.bins = 12
    assert w._drafts_shown == 0 and getattr(w.session, "_fine_state", None) is None
    with pytest.raises(ValueError, match="drafts='sometimes'"):
        ProfileWidget(ProfileSession(_frame(n=200), n_boot=40), threaded=False, drafts="sometimes")
