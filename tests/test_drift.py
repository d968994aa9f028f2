"""Drift of a batch from a reference: the numbers against scipy, the chance level by simulation.

Every simulation is seeded; its sizes are written beside it.  A permutation p-value
from ``n_perm`` splits lives on a grid of step ``1 / (n_perm + 1)``, so a
Kolmogorov-Smirnov check against the uniform distribution (``scipy.stats.kstest``)
is read with a tolerance of KS p > 0.001, and a rejection rate at 0.05 with a
binomial allowance of about three standard deviations.
"""
from __future__ import annotations

import copy
import re
import warnings

import numpy as np
import pandas as pd
import pytest
import scipy.stats
from scipy.spatial.distance import jensenshannon
from scipy.special import rel_entr

from infoscope._warnings import DataQualityWarning
from infoscope.datasets import PLANTED, make_deliveries, make_deliveries_batch
from infoscope.estimators.two_sample import (
    divergence_rows,
    drift_chi2_test,
    drift_permutation_test,
    psi_chance_approximation,
)
from infoscope.frame.drift import align_to_reference, drift_table
from infoscope.frame.results import DRIFT_COLUMNS, DRIFT_FLAGS
from infoscope.frame.session import ProfileSession

SETTINGS = (16, "quantile", "drop", 64)
LEVELS200 = np.array([f"L{i:03d}" for i in range(200)])


def _table(current: dict, reference: dict, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        return drift_table({k: pd.Series(v) for k, v in current.items()},
                           {k: pd.Series(v) for k, v in reference.items()},
                           encoding={k: SETTINGS for k in current}, **kw)


def _null_p_values(draw, n, m, seeds, n_perm=99, **kw):
    out = []
    for s in range(seeds):
        rng = np.random.default_rng(s)
        rows = _table({"x": draw(rng, m)}, {"x": draw(rng, n)}, n_perm=n_perm, seed=s, **kw)
        out.append(rows[0]["p_value"])
    return np.array(out)


# ------------------------------------------------------------------ the numbers
def test_divergences_equal_scipy_rel_entr_and_jensenshannon():
    rng = np.random.default_rng(3)
    ref = pd.Series(rng.choice(list("abcdef"), size=900, p=[.3, .2, .2, .1, .1, .1]))
    cur = pd.Series(rng.choice(list("abcdefg"), size=400, p=[.2, .2, .2, .1, .1, .1, .1]))
    al = align_to_reference(cur, ref, "c", SETTINGS)
    r, c = al.counts("reference"), al.counts("current")
    assert al.labels[-1] == "g" and r[-1] == 0  # a new level keeps its own symbol
    row = _table({"c": cur}, {"c": ref}, n_perm=99)[0]
    e, a = (r + 0.5) / (r + 0.5).sum(), (c + 0.5) / (c + 0.5).sum()
    # PSI = KL(a||e) + KL(e||a) from scipy.special.rel_entr (Jeffreys' J divergence)
    assert row["psi"] == pytest.approx(float(rel_entr(a, e).sum() + rel_entr(e, a).sum()), rel=1e-12)
    # KL(current || reference) in bits: scipy.special.rel_entr / ln 2
    assert row["kl"] == pytest.approx(float(rel_entr(a, e).sum()) / np.log(2), rel=1e-12)
    # JS: scipy.spatial.distance.jensenshannon returns the distance, its square is the divergence
    assert row["js"] == pytest.approx(jensenshannon(r, c, base=2) ** 2, rel=1e-9)
    # the vectorised rows give the same numbers as one call per row
    many = divergence_rows(np.vstack([r, r]), np.vstack([c, r]))
    assert many["psi"][0] == pytest.approx(row["psi"], rel=1e-12) and many["psi"][1] == 0.0


def test_chi2_form_equals_scipy_g_test_of_homogeneity():
    r, c = np.array([120, 80, 60, 40, 0]), np.array([50, 60, 30, 35, 5])
    t = drift_chi2_test(r, c)
    # scipy.stats.chi2_contingency(lambda_="log-likelihood", correction=False) on the 2 x K table
    # (cells empty on both sides dropped: they carry no information)
    res = scipy.stats.chi2_contingency(np.vstack([r, c]), correction=False, lambda_="log-likelihood")
    assert t.p_value == pytest.approx(res.pvalue, rel=1e-10)
    assert t.psi_chance == pytest.approx(psi_chance_approximation(5, r.sum(), c.sum()))
    row = _table({"c": np.repeat(list("abcde"), c)}, {"c": np.repeat(list("abcde"), r)}, null="chi2")[0]
    assert row["p_value"] == pytest.approx(res.pvalue, rel=1e-10)


def test_permutation_agrees_with_the_chi2_form_on_well_filled_tables():
    # K = 5 cells with hundreds of rows each: the permutation p-value and chance
    # level should match the G-test (Wilks 1938) and (K - 1)(1/n + 1/m) (Pearson
    # 1900) up to Monte Carlo error (2,999 splits: sd of p about 0.008 at p = 0.2)
    r = np.array([900, 700, 600, 500, 300])
    c = np.array([300, 260, 190, 160, 90])
    perm = drift_permutation_test(r, c, n_perm=2999, seed=5)
    chi2 = drift_chi2_test(r, c)
    assert 0.05 < chi2.p_value < 0.6
    assert perm.p_value == pytest.approx(chi2.p_value, abs=0.03)
    assert perm.psi_chance == pytest.approx(chi2.psi_chance, rel=0.1)
    assert perm.psi_chance_high == pytest.approx(chi2.psi_chance_high, rel=0.15)
    assert perm.js_chance == pytest.approx(chi2.js_chance, rel=0.1)
    assert perm.kl_chance == pytest.approx(chi2.kl_chance, rel=0.1)


def test_the_chi2_form_is_off_on_sparse_tables_so_permutation_is_the_default():
    # 64 cells and a 100-row batch: about 1.5 rows per cell; the first-order chance
    # level misses the pseudocount's effect by more than 20 %, and the G-test's
    # rejection rate under the null is off (200 seeded pairs of samples)
    rng = np.random.default_rng(0)
    t = drift_permutation_test(rng.multinomial(2000, np.full(64, 1 / 64)),
                               rng.multinomial(100, np.full(64, 1 / 64)), n_perm=999, seed=1)
    approx = psi_chance_approximation(64, 2000, 100)
    assert abs(t.psi_chance - approx) / approx > 0.2
    draw = lambda rng, size: LEVELS200[rng.integers(0, 64, size=size)]
    p_chi2 = _null_p_values(draw, 2000, 100, 200, null="chi2")
    assert scipy.stats.kstest(p_chi2, "uniform").pvalue < 0.001


# ------------------------------------------------------------------ calibration
NULL_CASES = {
    # name: (draw(rng, size), reference rows, batch rows)
    "normal, 16 quantile bins": (lambda rng, k: rng.normal(size=k), 2000, 100),
    "normal, small reference": (lambda rng, k: rng.normal(size=k), 200, 50),
    "rounded gamma (ties)": (lambda rng, k: np.round(rng.gamma(2.0, 3.0, size=k), 1), 2000, 300),
    "8 levels, uneven": (lambda rng, k: rng.choice(list("abcdefgh"), size=k,
                                                   p=[.3, .2, .15, .1, .1, .08, .05, .02]), 1000, 1000),
    "200 levels folded to 64": (lambda rng, k: LEVELS200[rng.integers(0, 200, size=k)], 2000, 2000),
    "200 levels, batch of 100": (lambda rng, k: LEVELS200[rng.integers(0, 200, size=k)], 2000, 100),
}


@pytest.mark.parametrize("case", list(NULL_CASES))
def test_null_p_values_are_uniform(case):
    # 200 seeded pairs of samples from one distribution, 99 splits each
    draw, n, m = NULL_CASES[case]
    p = _null_p_values(draw, n, m, 200)
    assert scipy.stats.kstest(p, "uniform").pvalue > 0.001, case
    sd = np.sqrt(0.05 * 0.95 / 200)
    assert np.mean(p <= 0.05) <= 0.05 + 3 * sd, case


def test_folding_levels_does_not_bias_the_test():
    # 200 equally likely levels, 2,000 rows a side, max_categories=64: choosing the
    # 63 kept levels from the reference alone gave p < 0.05 in 93 % of seeds; on the
    # pooled rows it is the nominal 5 % (200 seeds, 99 splits; allowance 3 sd)
    draw = lambda rng, size: LEVELS200[rng.choice(200, size=size)]
    p = _null_p_values(draw, 2000, 2000, 200)
    assert np.mean(p < 0.05) <= 0.05 + 3 * np.sqrt(0.05 * 0.95 / 200)


def _mixed_frame(rng, n):
    return pd.DataFrame({
        "amount": rng.lognormal(3.0, 0.8, size=n),
        "channel": rng.choice(list("abcdefgh"), size=n, p=[.3, .2, .15, .1, .1, .08, .05, .02]),
        "product": LEVELS200[rng.integers(0, 200, size=n)],
        "items": rng.poisson(3.0, size=n),
        "express": rng.random(n) < 0.3,
    })


def test_small_batches_against_a_big_reference_do_not_read_as_drift():
    # 40 batches of 100 rows against a 2,000-row reference of the same process
    # (5 columns: numeric, 8 levels, 200 levels, counts, boolean).  The PSI of small
    # batches reads 0.10 or more by chance alone (16 bins: about (K-1)(1/n+1/m) =
    # 0.16), which the flag says ("within_chance") instead of "moderate"/"major".
    # Under BH at q < 0.05 a batch is flagged anywhere with probability <= 5 %:
    # allowance 4 of 40 (binomial(40, 0.05) exceeds 4 with probability 0.05).
    ref = _mixed_frame(np.random.default_rng(100), 2000)
    flagged, within = 0, 0
    for s in range(40):
        batch = _mixed_frame(np.random.default_rng(s), 100)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", DataQualityWarning)
            d = ProfileSession(batch).drift(ref)
        flagged += bool(d["flag"].isin(["moderate", "major"]).any())
        within += int((d["flag"] == "within_chance").sum())
        assert (d["psi_chance"] > 0).all() and (d["psi_chance_high"] >= d["psi_chance"]).all()
    assert flagged <= 4
    assert within > 0


def test_q_values_are_benjamini_hochberg_over_the_tested_columns():
    rng = np.random.default_rng(8)
    ref, cur = _mixed_frame(rng, 1500), _mixed_frame(rng, 600)
    cur["amount"] = cur["amount"] * 1.3
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        d = ProfileSession(cur).drift(ref)
    # scipy.stats.false_discovery_control(method="bh") on the same p-values
    assert np.allclose(d["q_value"], scipy.stats.false_discovery_control(d["p_value"], method="bh"))
    assert tuple(d.columns) == DRIFT_COLUMNS and set(d["flag"]) <= set(DRIFT_FLAGS)


def test_a_planted_shift_fires():
    # a numeric mean shift of 0.5 sd and a categorical share 50 % -> 30 %, 2,000 vs
    # 500 rows (PSI of the numeric shift about 0.25 on 16 quantile bins)
    rng = np.random.default_rng(11)
    ref = {"x": rng.normal(size=2000), "c": rng.choice(list("ab"), size=2000)}
    cur = {"x": rng.normal(0.5, 1.0, size=500), "c": rng.choice(list("ab"), size=500, p=[.3, .7])}
    rows = {r["column"]: r for r in _table(cur, ref)}
    for key in ("x", "c"):
        assert rows[key]["q_value"] < 0.01 and rows[key]["flag"] in ("moderate", "major"), key
        assert rows[key]["psi"] > rows[key]["psi_chance_high"]


def test_null_flag_rate_over_columns_at_q_below_005():
    # 60 seeded batches of 400 rows against a 1,500-row reference, 5 columns each
    # (300 column tests): flagged moderate/major at most 5 % + 3 sd of the columns
    ref = _mixed_frame(np.random.default_rng(200), 1500)
    flags = []
    for s in range(60):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", DataQualityWarning)
            flags += ProfileSession(_mixed_frame(np.random.default_rng(300 + s), 400)).drift(ref)["flag"].tolist()
    rate = np.mean(np.isin(flags, ["moderate", "major"]))
    assert rate <= 0.05 + 3 * np.sqrt(0.05 * 0.95 / len(flags))


# ------------------------------------------------------------------ the demo
@pytest.fixture(scope="module")
def demo_reference():
    return make_deliveries(20_000, seed=0)


def test_demo_batch_is_flagged_exactly_on_its_planted_columns(demo_reference):
    # PLANTED["drift"] lists the flag of every changed column; the rest must read
    # "stable" (q < 0.05 for the flags, infoscope.frame.results.TEST_LEVEL)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        d = ProfileSession(make_deliveries_batch(8_000, seed=1)).drift(demo_reference)
    got = dict(zip(d["column"], d["flag"]))
    expected = {c: PLANTED["drift"].get(c, "stable") for c in got}
    assert got == expected


def test_a_second_batch_from_the_reference_process_is_flagged_on_none(demo_reference):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        d = ProfileSession(make_deliveries_batch(8_000, seed=7, drift=False)).drift(demo_reference)
    got = dict(zip(d["column"], d["flag"]))
    assert got == {c: PLANTED["no_drift"].get(c, "stable") for c in got}


# ------------------------------------------------------------------ types and bad input
def test_int_reference_against_the_same_numbers_as_text_says_what_was_done():
    rng = np.random.default_rng(4)
    ref = pd.DataFrame({"n": rng.integers(0, 6, size=500)})
    cur = pd.DataFrame({"n": rng.integers(0, 6, size=300).astype(str)})
    with pytest.warns(DataQualityWarning, match=r"'n' is int64 in the reference, \w+ in this frame "
                      r".*compared on the printed values, on which 100.0% of this frame's rows match"):
        d = ProfileSession(cur).drift(ref)
    assert d.loc[0, "flag"] == "stable" and d.loc[0, "new_share"] == 0.0 and d.loc[0, "psi"] < 0.1


def test_text_that_reads_as_numbers_shares_the_reference_bins():
    rng = np.random.default_rng(5)
    ref = pd.DataFrame({"x": rng.normal(size=800)})
    cur = pd.DataFrame({"x": rng.normal(size=400).round(4).astype(str)})
    with pytest.warns(DataQualityWarning) as record:  # the profile's own warnings come too
        d = ProfileSession(cur).drift(ref)
    assert any(re.search(r"'x' is float64 .* compared on the numbers its text reads as "
                         r"\(100.0% of the non-missing values parsed", str(w.message)) for w in record)
    # the reference bins: 800 values under the default "rows" rule, floor(sqrt(80)) = 8
    assert d.loc[0, "flag"] == "stable" and d.loc[0, "k"] == 8


def _unchanged(*frames):
    return [(f, copy.deepcopy(f)) for f in frames]


def _assert_unchanged(kept):
    for frame, before in kept:
        pd.testing.assert_frame_equal(frame, before)


def test_one_row_or_zero_row_reference_is_a_clear_error():
    cur = pd.DataFrame({"a": [1.0, 2.0, 3.0] * 10, "b": list("xyz") * 10})
    one, zero = cur.iloc[:1].copy(), cur.iloc[:0].copy()
    kept = _unchanged(cur, one, zero)
    with pytest.raises(ValueError, match=r"the reference has 1 row\(s\): too small to compare with"):
        ProfileSession(cur).drift(one)
    with pytest.raises(ValueError, match="reference has no rows"):
        ProfileSession(cur).drift(zero)
    _assert_unchanged(kept)


def test_naive_against_zoned_datetimes_is_refused_with_the_column_named():
    times = pd.Series(pd.date_range("2026-03-01", periods=300, freq="h"))
    ref = pd.DataFrame({"t": times, "v": np.arange(300) % 7})
    cur = pd.DataFrame({"t": times.dt.tz_localize("UTC"), "v": np.arange(300) % 7})
    kept = _unchanged(ref, cur)
    with pytest.warns(DataQualityWarning, match=r"column 't' is datetime64\[\w+\] in the reference, "
                      r"datetime64\[\w+, UTC\] in this frame: naive and time-zone-aware .* not compared"):
        d = ProfileSession(cur).drift(ref).set_index("column")
    assert d.loc["t", "flag"] == "type_changed" and np.isnan(d.loc["t", "psi"])
    assert d.loc["v", "flag"] == "stable"
    _assert_unchanged(kept)


def test_different_columns_compare_the_common_ones_and_name_the_rest():
    rng = np.random.default_rng(6)
    ref = pd.DataFrame({"a": rng.normal(size=300), "gone": rng.normal(size=300)})
    cur = pd.DataFrame({"a": rng.normal(size=200), "added": rng.normal(size=200)})
    kept = _unchanged(ref, cur)
    with pytest.warns(DataQualityWarning, match="only in this frame: 'added'; only in the reference: 'gone'"):
        d = ProfileSession(cur).drift(ref)
    assert d["column"].tolist() == ["a"]
    _assert_unchanged(kept)


def test_a_changed_type_that_cannot_share_the_alphabet_is_flagged_type_changed():
    ref = pd.DataFrame({"a": np.linspace(0, 1, 200), "b": list("xy") * 100})
    cur = pd.DataFrame({"a": list("pq") * 50, "b": pd.date_range("2026-01-01", periods=100)})
    kept = _unchanged(ref, cur)
    with pytest.warns(DataQualityWarning) as record:
        d = ProfileSession(cur).drift(ref).set_index("column")
    texts = " | ".join(str(w.message) for w in record)
    assert "'a' is float64 in the reference" in texts and "'b' is" in texts
    assert (d["flag"] == "type_changed").all() and d["psi"].isna().all() and d["q_value"].isna().all()
    _assert_unchanged(kept)


# ------------------------------------------------------------------ relationship drift
def _gaussian_pair(rng, n, rho):
    x = rng.normal(size=n)
    y = rho * x + np.sqrt(1 - rho**2) * rng.normal(size=n)
    return pd.DataFrame({"x": x, "y": y, "z": rng.choice(list("pqr"), size=n)})


def test_a_joint_change_with_unchanged_marginals_is_caught_by_the_pairs_only():
    # x, y standard normal on both sides (same marginals); their correlation drops
    # from 0.8 to 0 (Gaussian MI = -1/2 ln(1 - rho^2) = 0.51 nats -> 0; Cover &
    # Thomas 2006, eq. 8.56).  2,000 reference rows, 800 batch rows, seeded.
    ref = _gaussian_pair(np.random.default_rng(21), 2000, 0.8)
    cur = _gaussian_pair(np.random.default_rng(22), 800, 0.0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        columns = ProfileSession(cur).drift(ref)
        pairs = ProfileSession(cur, n_boot=100).pair_drift(ref)
    assert (columns["flag"] == "stable").all()
    top = pairs.iloc[0]
    assert (top["a"], top["b"], top["flag"]) == ("x", "y", "weaker") and top["q_value"] < 0.01
    # Gaussian MI 0.74 bits; binned in 16 x 16 cells a little less; the batch near 0
    assert top["ci_high"] < 0 and top["mi_reference"] > 0.5 and abs(top["mi"]) < 0.1
    assert (pairs.iloc[1:]["flag"] == "unchanged").all()


def test_pair_mi_equals_sklearn_mutual_info_score_on_the_engine_tables():
    # the plug-in MI of each side equals sklearn.metrics.mutual_info_score on the
    # same codes (nats), here converted to bits
    from sklearn.metrics import mutual_info_score

    from infoscope.frame.drift import align_to_reference

    ref = _gaussian_pair(np.random.default_rng(23), 1500, 0.6)
    cur = _gaussian_pair(np.random.default_rng(24), 700, 0.3)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        pairs = ProfileSession(cur, estimator="plugin", n_boot=0, bins=16).pair_drift(ref).set_index(["a", "b"])
    ax = align_to_reference(cur["x"], ref["x"], "x", SETTINGS)
    ay = align_to_reference(cur["y"], ref["y"], "y", SETTINGS)
    ln2 = np.log(2)
    assert pairs.loc[("x", "y"), "mi_reference"] == pytest.approx(
        mutual_info_score(ax.reference_codes, ay.reference_codes) / ln2, rel=1e-9)
    assert pairs.loc[("x", "y"), "mi"] == pytest.approx(
        mutual_info_score(ax.current_codes, ay.current_codes) / ln2, rel=1e-9)
    assert tuple(pairs.reset_index().columns) == tuple(__import__(
        "infoscope.frame.pair_drift", fromlist=["x"]).PAIR_DRIFT_COLUMNS)


def test_pair_drift_p_values_are_uniform_under_no_change():
    # 120 seeded reference/batch pairs from one joint law (rho = 0.5, plus an
    # independent 3-level column): 3 pairs each, 360 p-values from 99 splits
    p = []
    for s in range(120):
        ref = _gaussian_pair(np.random.default_rng(1000 + s), 600, 0.5)
        cur = _gaussian_pair(np.random.default_rng(5000 + s), 250, 0.5)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", DataQualityWarning)
            p += ProfileSession(cur, bins=6, n_boot=0).pair_drift(ref, n_perm=99)["p_value"].tolist()
    p = np.array(p)
    assert scipy.stats.kstest(p, "uniform").pvalue > 0.001
    assert np.mean(p <= 0.05) <= 0.05 + 3 * np.sqrt(0.05 * 0.95 / p.size)


# ------------------------------------------------------------------ drift over time
def _weekly_log(seed, weeks=8, per_week=400, shift_week=None):
    rng = np.random.default_rng(seed)
    start = pd.Timestamp("2026-01-05")  # a Monday: weeks "W-SUN" start on Mondays
    frames = []
    for w in range(weeks):
        f = _mixed_frame(rng, per_week)
        if w == shift_week:
            f["amount"] = f["amount"] * 1.8
        f.insert(0, "at", start + pd.Timedelta(days=7 * w) + pd.to_timedelta(rng.integers(0, 7 * 86400, per_week), "s"))
        frames.append(f)
    return pd.concat(frames, ignore_index=True)


def test_drift_over_counts_every_period_in_one_pass_and_matches_drift_of_the_period():
    # The numbers of one (period, column) equal those of drift() on that period's
    # rows against the first period's rows (columns whose levels occur in every
    # period, so both see the same alphabet); the row counts equal pandas groupby.
    log = _weekly_log(31)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        over = ProfileSession(log).drift_over("at", every="1W")
        week = log["at"].dt.to_period("W")
        first, third = log[week == week.min()], log[week == week.min() + 2]
        direct = ProfileSession(third.drop(columns="at")).drift(first.drop(columns="at")).set_index("column")
    assert over["period"].nunique() == 7 and over["reference"].eq(str(week.min())).all()
    got = over[over["period"] == str(week.min() + 2)].set_index("column")
    for key in ("amount", "channel", "express"):  # ("items": a rare count missing in some week)
        for number in ("n", "n_reference", "psi", "psi_chance", "kl", "js"):
            # the splits of the two calls are seeded differently (the stream is keyed by
            # column and period): the chance level agrees to Monte Carlo error, so do
            # the p-values
            rel = 0.15 if number == "psi_chance" else 1e-9  # 999 splits: 4.5 % sd at 1 dof
            assert got.loc[key, number] == pytest.approx(direct.loc[key, number], rel=rel), (key, number)
        assert got.loc[key, "p_value"] == pytest.approx(direct.loc[key, "p_value"], abs=0.05)
    counts = log.groupby(week.astype(str))["amount"].size()
    assert dict(zip(over.loc[over["column"] == "amount", "period"], over.loc[over["column"] == "amount", "n"])) \
        == {p: int(c) for p, c in counts.items() if p != str(week.min())}


def test_drift_over_flags_the_planted_week_only():
    # week 5 of 8 has amounts x 1.8 (400 rows a week): "first" flags that week's
    # amount; "previous" flags week 5 (the change) and week 6 (the return).  The
    # q-values control false flags within a week, not across the 7 weeks x 5
    # columns: one false flag elsewhere is allowed (none with seed 32 for "first";
    # "previous" shows one, 'product' in the last week, p = 0.003)
    log = _weekly_log(32, shift_week=5)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        first = ProfileSession(log).drift_over("at", every="1W")
        prev = ProfileSession(log).drift_over("at", every="1W", reference="previous")
    weeks = sorted(first["period"].unique())
    hit = set(zip(*first.loc[first["flag"].isin(["moderate", "major"]), ["period", "column"]].T.values))
    assert (weeks[4], "amount") in hit and len(hit) <= 2
    hit = set(zip(*prev.loc[prev["flag"].isin(["moderate", "major"]), ["period", "column"]].T.values))
    assert {(weeks[4], "amount"), (weeks[5], "amount")} <= hit and len(hit) <= 3
    assert first.loc[(first["column"] == "amount") & (first["period"] != weeks[4]), "flag"].isin(
        ["stable", "within_chance"]).all()
    assert (prev.groupby("period")["reference"].first().tolist()[1:] == weeks[:-1])


def test_drift_over_null_flag_rate():
    # a stationary log: 3 seeded logs of 12 weeks x 300 rows, 5 columns, each week
    # against the first (165 (period, column) tests); flags at q < 0.05 within a
    # week: at most 5 % + 3 sd
    flags = []
    for seed in range(3):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", DataQualityWarning)
            flags += ProfileSession(_weekly_log(40 + seed, weeks=12, per_week=300)).drift_over(
                "at", n_perm=199)["flag"].tolist()
    rate = np.mean(np.isin(flags, ["moderate", "major"]))
    assert rate <= 0.05 + 3 * np.sqrt(0.05 * 0.95 / len(flags))


def test_drift_over_against_a_reference_frame_and_a_zoned_time_column():
    log = _weekly_log(33, weeks=4)
    log["at"] = log["at"].dt.tz_localize("Europe/Berlin")
    ref = _mixed_frame(np.random.default_rng(99), 1500)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        d = ProfileSession(log).drift_over("at", every="2W", reference=ref)
    assert d["period"].nunique() == 2 and (d["reference"] == "frame").all()
    assert d["period"].iloc[0] == "2026-01-05/2026-01-18" and d["n"].max() == 800


def test_drift_over_bad_input_is_one_clear_message():
    log = _weekly_log(34, weeks=3).drop(columns="product")  # no folding warnings
    kept = _unchanged(log)
    with pytest.raises(TypeError, match=r"time column 'channel' is not a datetime column \(dtype "):
        ProfileSession(log).drift_over("channel")
    text_times = log.assign(at=log["at"].astype(str))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)  # the text times' own profile warnings
        with pytest.raises(TypeError, match="convert it with pandas.to_datetime first"):
            ProfileSession(text_times).drift_over("at")
    with pytest.raises(ValueError, match="every='fortnight' is not a pandas period frequency"):
        ProfileSession(log).drift_over("at", every="fortnight")
    with pytest.raises(KeyError, match="time_column='nope' is not a column"):
        ProfileSession(log).drift_over("nope")
    with pytest.raises(ValueError, match="rows in only one period"):
        ProfileSession(log).drift_over("at", every="1Y")
    with pytest.raises(ValueError, match="reference='last' is not valid"):
        ProfileSession(log).drift_over("at", reference="last")
    # a week with no rows: a warning naming it, NaN rows with an empty flag
    gap = log[log["at"].dt.to_period("W") != log["at"].dt.to_period("W").min() + 1]
    with pytest.warns(DataQualityWarning, match=r"1 of 3 period\(s\) have no rows: 2026-01-12/2026-01-18"):
        d = ProfileSession(gap).drift_over("at")
    empty = d[d["period"] == "2026-01-12/2026-01-18"]
    assert (empty["n"] == 0).all() and empty["psi"].isna().all() and (empty["flag"] == "").all()
    _assert_unchanged(kept)


# ------------------------------------------------------------------ documentation
DRIFT_MODULES = ["infoscope.estimators.two_sample", "infoscope.frame.drift", "infoscope.frame.drift_batches", "infoscope.frame.pair_drift",
                 "infoscope.frame.drift_over", "infoscope.frame.drift_report", "infoscope.frame.tables.drift",
                 "infoscope.report.drift_page"]


@pytest.mark.parametrize("module_name", DRIFT_MODULES)
def test_drift_modules_have_numpydoc_sections_and_running_examples(module_name):
    import doctest
    import importlib
    import inspect

    module = importlib.import_module(module_name)
    names = getattr(module, "__all__", None) or [n for n, v in vars(module).items()
                                                 if inspect.isclass(v) and v.__module__ == module_name]
    for name in names:
        obj = getattr(module, name)
        members = [obj] + ([m for n, m in vars(obj).items() if not n.startswith("_") and inspect.isfunction(m)]
                           if inspect.isclass(obj) else [])
        for member in members:
            if not callable(member):
                continue
            doc = inspect.getdoc(member) or ""
            if inspect.isclass(member):
                sections = ("Attributes",) if "Attributes\n---" in doc else ("Examples",)
            else:
                params = [p for p in inspect.signature(member).parameters if p != "self"]
                # References only where a source is followed (tests/test_public_api.py checks them)
                sections = ("Parameters",) * bool(params) + ("Returns", "Examples")
            for section in sections:
                assert f"\n{section}\n---" in doc, f"{module_name}.{name}: {member.__name__} lacks {section}"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        result = doctest.testmod(module, optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0
