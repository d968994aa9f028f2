"""The frame layer: the profile finds what the demo planted; sessions are incremental.

The demo data are invented (infoscope.datasets); what they plant is listed in
PLANTED and confirmed independently of infoscope in test_datasets.py.  Checks of
the numbers against outside references are in test_frame_reference.py.
"""
from __future__ import annotations

import math
import sys

import numpy as np
import pandas as pd
import pytest
import scipy.stats

import infoscope  # noqa: F401  (registers df.info_profile)
from infoscope.datasets import PLANTED, make_deliveries, make_deliveries_batch
from infoscope.frame.results import (
    DRIFT_COLUMNS,
    ENTROPY_COLUMNS,
    PAIRS_COLUMNS,
    RELEVANCE_COLUMNS,
)
from infoscope.frame.session import ProfileSession

TARGET = PLANTED["target"]

# The demo log has two many-level columns on purpose (an identifier and a goods
# category with rare levels); folding their rare levels warns every time a session
# encodes them.  test_folding_warns_and_names_the_columns checks that warning once.
pytestmark = pytest.mark.filterwarnings("ignore:column '(parcel_ref|contents)'.*folded:UserWarning")


@pytest.fixture(scope="module")
def log():
    return make_deliveries(20_000, seed=0)


@pytest.fixture(scope="module")
def session(log):
    return ProfileSession(log, target=TARGET, n_boot=50)


# ------------------------------------------------------------------ contracts
def test_tables_have_the_contract_columns_and_attrs(session, log):
    entropy = session.entropy()
    assert tuple(entropy.columns) == ENTROPY_COLUMNS
    assert tuple(session.pairs().columns) == PAIRS_COLUMNS
    assert tuple(session.relevance().columns) == RELEVANCE_COLUMNS
    assert tuple(session.drift(log).columns) == DRIFT_COLUMNS
    for table in (entropy, session.pairs(), session.relevance(), session.matrix(), session.drift(log)):
        assert table.attrs["unit"] == "bits"
        assert table.attrs["estimator"] == "miller_madow"
        assert table.attrs["sampled"] is None
    assert session.pairs("nmi").attrs["measure"] == "nmi"
    assert list(entropy["column"]) == session.names == list(log.columns)
    p = len(log.columns)
    assert len(session.pairs()) == p * (p - 1) // 2


def test_entropy_table_is_consistent(session):
    e = session.entropy()
    finite = e.dropna(subset=["entropy"])
    # max H = log2 K, efficiency = H / max H, effective categories = 2 ** H (definitions)
    np.testing.assert_allclose(finite["max_entropy"], np.log2(finite["k"]))
    ok = finite["max_entropy"] > 0
    np.testing.assert_allclose(finite.loc[ok, "efficiency"],
                               finite.loc[ok, "entropy"] / finite.loc[ok, "max_entropy"])
    np.testing.assert_allclose(finite["effective_categories"], 2.0 ** finite["entropy"])
    varied = finite[finite["k"] > 1]
    assert (varied["ci_low"] <= varied["ci_high"]).all()
    assert (e["missing_share"] == e["missing"] / e["n"]).all()


def test_units_scale(log):
    bits = ProfileSession(log[["depot", "service"]], n_boot=0).entropy()["entropy"]
    nats = ProfileSession(log[["depot", "service"]], n_boot=0, base="nats").entropy()["entropy"]
    # 1 bit = ln 2 nats (definition of the units)
    np.testing.assert_allclose(nats, bits * np.log(2.0))


# ------------------------------------------------------------------ planted structure
@pytest.mark.filterwarnings("error")
def test_folding_warns_and_names_the_columns(log):
    from infoscope import DataQualityWarning

    with pytest.warns(DataQualityWarning) as record:
        ProfileSession(log, n_boot=0)
    messages = [str(w.message) for w in record]
    assert any("'parcel_ref'" in m and "folded" in m for m in messages)
    assert any("'contents'" in m and "folded" in m for m in messages)
    assert len(messages) == 2


def test_near_duplicates_have_the_top_nmi(session):
    pairs = session.pairs("nmi").sort_values("nmi", ascending=False)
    top = pairs.iloc[0]
    assert {top["a"], top["b"]} == set(PLANTED["near_duplicates"])
    assert top["nmi"] > 0.8


def test_leak_is_flagged_and_only_the_leak(session):
    rel = session.relevance()
    flagged = rel.loc[rel["leakage"], "column"].tolist()
    assert flagged == [PLANTED["leak"]]
    assert rel.iloc[0]["column"] == PLANTED["leak"]
    assert rel.iloc[0]["share_of_target"] > 0.95


def test_informative_columns_are_significant(session):
    rel = session.relevance().set_index("column")
    for column in PLANTED["informative"]:
        assert rel.loc[column, "q_value"] < 1e-6, column
    # independent columns (planted without a link to the target) are not
    for column in ("fragile", "booking_channel"):
        assert rel.loc[column, "q_value"] > 0.001, column


def test_planted_flags_are_found(session):
    flags = session.entropy().set_index("column")["flags"].str.split(",")
    for column, flag in PLANTED["flags"].items():
        assert flag in flags[column], (column, flags[column])
    for column, more in PLANTED["more_flags"].items():
        assert set(more) <= set(flags[column]), (column, flags[column])
    # a flag planted on one column is not sprayed over the others
    for flag in ("id_like", "constant", "heavy_tail"):
        holders = [c for c, f in flags.items() if flag in f]
        assert holders == [c for c, f in PLANTED["flags"].items() if f == flag], flag
    # rare_levels: the long-tailed goods column only (not the identifier, not the
    # count of stops with a few rare large values)
    holders = [c for c, f in flags.items() if "rare_levels" in f]
    assert holders == [c for c, f in PLANTED["more_flags"].items() if "rare_levels" in f]


def test_rare_levels_threshold():
    # The documented rule (common practice: fewer than 5 rows or under 1% of the rows
    # is a rare level; flagged when rare levels hold at least 5% of the rows), checked
    # on both sides of the 5% line: 1,000 rows, one common level and 49 or 50 levels of
    # one row each; 4 rows (<5) then 1 row per level; and a binned column never.
    def flags(counts):
        values = np.repeat([f"v{i:03d}" for i in range(len(counts))], counts)
        frame = pd.DataFrame({"c": values, "x": np.linspace(0, 1, len(values))})
        return ProfileSession(frame, n_boot=0, max_categories=200).entropy().set_index("column")["flags"]

    assert "rare_levels" in flags([950] + [1] * 50)["c"]          # 50 of 1000 rows: 5%
    assert "rare_levels" not in flags([951] + [1] * 49)["c"]      # 49 of 1000 rows: 4.9%
    assert "rare_levels" not in flags([951] + [1] * 49)["x"]      # binned: its bins are meant
    # a level of 9 rows out of 1,000 is under 1%: ten of them are 9% of the rows
    assert "rare_levels" in flags([910] + [9] * 10)["c"]
    # 11 rows each (1.1%) is not rare, however many such levels there are
    assert "rare_levels" not in flags([912] + [11] * 8)["c"]


def test_drift_flags_exactly_the_drifted_columns(log):
    batch = make_deliveries_batch(10_000, seed=1, drift=True)
    flags = ProfileSession(batch).drift(log).set_index("column")["flag"]
    expected = {c: PLANTED["drift"].get(c, "stable") for c in log.columns}
    assert flags.to_dict() == expected


def test_batch_without_drift_is_stable(log):
    batch = make_deliveries_batch(10_000, seed=2, drift=False)
    flags = ProfileSession(batch).drift(log).set_index("column")["flag"]
    expected = {c: PLANTED["no_drift"].get(c, "stable") for c in log.columns}
    assert flags.to_dict() == expected


def test_drift_of_a_frame_from_itself_is_zero(log):
    d = ProfileSession(log).drift(log)
    assert (d["psi"].abs() < 1e-12).all()
    # the identifier keeps its own flag: its PSI never reads as a distribution
    flags = d.set_index("column")["flag"]
    assert flags.to_dict() == {c: ("id_like" if c == "parcel_ref" else "stable") for c in log.columns}
    assert (d["p_value"] > 0.999).all()


def test_drift_flags_of_identifier_and_time_axis_keep_the_numbers(log):
    # the demo batch (make_deliveries_batch): new parcel references and the four
    # weeks after the reference period.  PSI itself is unchanged: it equals the
    # closed form sum (a - e) ln(a / e) of the pseudocounted shares (Siddiqi 2006,
    # common practice), recomputed here from pandas value_counts for the IDs.
    from infoscope.frame.results import DRIFT_FLAGS, DRIFT_THRESHOLDS

    batch = make_deliveries_batch(3_000, seed=1, drift=True)
    ref = log.iloc[:6_000]
    d = ProfileSession(batch).drift(ref).set_index("column")
    assert d.loc["parcel_ref", "flag"] == "id_like"
    assert d.loc["dispatched_at", "flag"] == "time_axis"
    assert d.loc["dispatched_at", "psi"] > 1.0 and d.loc["parcel_ref", "new_share"] == 1.0
    # the identifiers share no value.  The alphabet is chosen on the pooled rows
    # (max_categories=64: the 63 levels most frequent in both frames together, ties
    # by label, plus "(other)"); recomputed here from pandas value_counts, PSI is the
    # closed form sum (a - e) ln(a / e) of the pseudocounted shares (Siddiqi 2006,
    # common practice)
    pooled = pd.concat([ref["parcel_ref"], batch["parcel_ref"]]).astype(str)
    counts = pooled.value_counts().rename_axis("label").reset_index()
    kept = counts.sort_values(["count", "label"], ascending=[False, True])["label"].iloc[:63]
    side = lambda s: np.r_[s.astype(str).value_counts().reindex(kept, fill_value=0).to_numpy(),
                           (~s.astype(str).isin(kept)).sum()] + 0.5
    e, a = side(ref["parcel_ref"]), side(batch["parcel_ref"])
    e, a = e / e.sum(), a / a.sum()
    assert d.loc["parcel_ref", "psi"] == pytest.approx(float(np.sum((a - e) * np.log(a / e))), rel=1e-9)
    # a datetime column inside the reference's period is read as usual
    same_period = make_deliveries_batch(3_000, seed=2, drift=False)
    assert ProfileSession(same_period).drift(ref).set_index("column").loc["dispatched_at", "flag"] == "stable"
    # every flag has a legend text for the views
    assert set(d["flag"]) <= set(DRIFT_FLAGS)


# ------------------------------------------------------------------ incremental session
def test_update_re_encodes_only_what_changed(log):
    s = ProfileSession(log, n_boot=0)
    s.pairs()
    binned = set(s.numeric_keys())
    assert {"weight_kg", "distance_km", "dispatched_at"} <= binned
    assert "depot" not in binned
    assert s.update(bins=8) == binned
    assert s.update(estimator="plugin") == set()
    assert s.update(max_categories=32) <= set(s.names) - binned
    # after updates, the tables equal a fresh session's
    fresh = ProfileSession(log, n_boot=0, bins=8, estimator="plugin", max_categories=32)
    pd.testing.assert_frame_equal(s.pairs(), fresh.pairs())


def test_only_touching_pairs_are_recounted(log):
    s = ProfileSession(log[["weight_kg", "depot", "service", "distance_km"]], n_boot=0)
    s.pairs()
    s.set_column_bins("weight_kg", 4)
    assert s.column("weight_kg").k == 4
    s.pairs()
    counted = {frozenset(p) for p in s.engine.last_counted}
    assert counted == {frozenset(("weight_kg", other)) for other in ("depot", "service", "distance_km")}
    s.set_column_bins("weight_kg", None)
    assert s.column("weight_kg").k == 16


def test_matrix_is_symmetric_and_clusters_duplicates(session):
    m = session.matrix("nmi", order="cluster")
    assert list(m.index) == list(m.columns)
    np.testing.assert_allclose(m.to_numpy(), m.to_numpy().T)
    order = list(m.index)
    a, b = PLANTED["near_duplicates"]
    assert abs(order.index(a) - order.index(b)) == 1
    by_name = session.matrix("mi")
    assert list(by_name.index) == session.names
    # the diagonal of the MI matrix is each column's entropy (I(X;X) = H(X),
    # Cover & Thomas 2006, eq. 2.47) on the alphabet of the grid: the entropy
    # table's value, except for folded columns, whose grid alphabet is folded
    table = session.entropy()
    e = table.set_index("column")["entropy"]
    diag = pd.Series(np.diag(by_name.to_numpy()), index=session.names)
    folded = table.attrs["folded_in_pairs"]
    assert set(folded) == {"parcel_ref", "contents"}
    plain = [k for k in session.names if k not in folded]
    # (the entropy table clips a binned / declared alphabet at log K, the grid's
    # diagonal is the estimator's raw value: compare after the same clip)
    t = table.set_index("column")
    kept = t["kind"].isin(["integer_categories", "text"])  # observed alphabets keep the raw value
    expect_diag = np.where(kept[plain], diag[plain], np.minimum(diag[plain], t["max_entropy"][plain]))
    np.testing.assert_allclose(expect_diag, e[plain].to_numpy())
    for key in folded:
        assert diag[key] < e[key]


def test_pair_table(session, log):
    pt = session.pair("service", TARGET)
    assert pt.counts.shape == (3, 2)
    assert pt.n == len(log)
    np.testing.assert_allclose(pt.expected.to_numpy().sum(), pt.n)
    row = session.pairs().set_index(["a", "b"]).loc[("service", TARGET)]
    assert pt.mi == pytest.approx(row["mi"])
    assert pt.g_test[2] == pytest.approx(row["p_value"])


def test_measures(session):
    for measure in ("mi", "nmi", "adjusted_mi", "vi"):
        t = session.pairs(measure, columns=["depot", "service", TARGET])
        assert t.attrs["measure"] == measure and len(t) == 3
    vi = session.pairs("vi", columns=["depot", TARGET])["value"].iloc[0]
    e = session.entropy().set_index("column")["entropy"]
    mi = session.pairs("mi", columns=["depot", TARGET])["mi"].iloc[0]
    # VI = H(A) + H(B) - 2 I(A; B) (Meila 2007), with the same estimator
    assert vi == pytest.approx(e["depot"] + e[TARGET] - 2 * mi, abs=1e-3)


def test_sample_is_reported(log):
    s = ProfileSession(log, sample=5_000, seed=3, n_boot=0)
    e = s.entropy()
    assert e.attrs["sampled"] == 5_000 and s.pairs().attrs["sampled"] == 5_000
    assert (e["n"] == 5_000).all()
    again = ProfileSession(log, sample=5_000, seed=3, n_boot=0).entropy()
    pd.testing.assert_frame_equal(e, again)
    assert s.update(sample=None) == set(s.names)
    assert s.entropy().attrs["sampled"] is None


def test_bootstrap_is_seeded(log):
    a = ProfileSession(log[["depot", "late"]], n_boot=50, seed=4).entropy()
    b = ProfileSession(log[["depot", "late"]], n_boot=50, seed=4).entropy()
    pd.testing.assert_frame_equal(a, b)


# ------------------------------------------------------------------ accessor
def test_accessor_matches_session_and_never_goes_stale(log):
    df = log[["depot", "service", TARGET]].copy()
    direct = ProfileSession(df, n_boot=0).entropy()
    via = df.info_profile.entropy(n_boot=0)
    pd.testing.assert_frame_equal(direct, via)
    assert df.info_profile.pairs() is not None
    # change the frame in place: the accessor must not serve the old numbers
    df.loc[: len(df) // 2, "service"] = "express"
    after = df.info_profile.entropy(n_boot=0)
    assert after.set_index("column").loc["service", "entropy"] < via.set_index("column").loc["service", "entropy"]


def test_accessor_methods(log):
    df = log[["depot", "service", "weight_kg", "weight_lb", TARGET]]
    assert len(df.info_profile.pairs("nmi")) == 10
    assert df.info_profile.matrix(order="cluster").shape == (5, 5)
    assert df.info_profile.pair("depot", TARGET).n == len(df)
    assert df.info_profile.relevance(TARGET, n_boot=0).attrs["target"] == TARGET
    assert len(df.info_profile.drift(df)) == 5


def test_widget_call_without_widgets_is_a_clear_import_error(monkeypatch, log):
    monkeypatch.setitem(sys.modules, "infoscope.widgets.profile", None)
    with pytest.raises(ImportError, match="live profile widget"):
        log[["depot"]].info_profile()


def test_polars_frame_gives_the_same_entropy_table(log):
    import polars as pl
    small = log[["depot", "weight_kg", "stops_before", "fragile", "courier_note", TARGET]]
    from_polars = ProfileSession(pl.from_pandas(small), n_boot=40).entropy()
    from_pandas = ProfileSession(small, n_boot=40).entropy()
    pd.testing.assert_frame_equal(from_polars.drop(columns="kind"), from_pandas.drop(columns="kind"))


def test_drift_missing_policy_on_binned_columns():
    rng = np.random.default_rng(5)
    x = rng.normal(size=2_000)
    with_gaps = np.where(rng.random(2_000) < 0.1, np.nan, x)
    ref = pd.DataFrame({"x": with_gaps})
    same = ProfileSession(ref, missing="category", bins=16).drift(ref).iloc[0]
    assert same["k"] == 17 and same["psi"] == 0.0 and same["n"] == 2_000
    dropped = ProfileSession(ref, bins=16).drift(ref).iloc[0]
    assert dropped["k"] == 16 and dropped["n"] == int(np.isfinite(with_gaps).sum())
    # the reference has no missing values, the batch has: under "category" they are unseen
    clean = pd.DataFrame({"x": x})
    d = ProfileSession(ref, missing="category", bins=16).drift(clean).iloc[0]
    assert d["k"] == 17 and d["n"] == 2_000 and d["n_reference"] == 2_000
    assert d["flag"] == "major"  # 10 % of the batch in a symbol the reference never had


@pytest.mark.parametrize("module_name", ["infoscope.datasets", "infoscope.frame.session",
                                         "infoscope.frame.keys",
                                         "infoscope.frame.results", "infoscope.frame.drift",
                                         "infoscope.frame.sessions", "infoscope.accessor", "infoscope.polars",
                                         "infoscope.cli", "infoscope.reading"])
def test_public_functions_have_numpydoc_sections(module_name):
    import importlib
    import inspect

    module = importlib.import_module(module_name)
    checked = 0
    for name in module.__all__:
        obj = getattr(module, name)
        members = [obj]
        if inspect.isclass(obj):
            # the session's methods live in the mixins of infoscope.frame.tables: check them too
            members += [m for klass in obj.__mro__ if klass.__module__.startswith("infoscope.")
                        for n, m in vars(klass).items() if not n.startswith("_") and inspect.isfunction(m)]
        for member in members:
            if not callable(member) or (inspect.isclass(member) and member.__module__ != module_name):
                continue
            doc = inspect.getdoc(member) or ""
            # References only where a source is followed (tests/test_public_api.py checks them)
            sections = ("Examples",) if inspect.isclass(member) else ("Parameters", "Returns", "Examples")
            if inspect.isclass(member) and "Attributes\n---" in doc and "Examples" not in doc:
                sections = ("Attributes",)  # a plain record type (PairTable)
            elif not inspect.isclass(member):
                params = [p for p in inspect.signature(member).parameters if p != "self"]
                if not params:  # nothing to describe under Parameters
                    sections = sections[1:]
            for section in sections:
                assert f"\n{section}\n---" in doc, f"{module_name}.{name}: {member.__name__} lacks {section}"
            checked += 1
    assert checked > 0


@pytest.mark.parametrize("module_name", ["infoscope.datasets", "infoscope.frame.session",
                                         "infoscope.frame.keys", "infoscope.frame.tables.entropy",
                                         "infoscope.frame.tables.pairs", "infoscope.frame.tables.relevance",
                                         "infoscope.frame.tables.drift",
                                         "infoscope.frame.results", "infoscope.frame.drift",
                                         "infoscope.frame.sessions", "infoscope.accessor", "infoscope.polars",
                                         "infoscope.reading"])
def test_docstring_examples_run(module_name):
    import doctest
    import importlib

    module = importlib.import_module(module_name)
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 0 and result.failed == 0


@pytest.mark.parametrize("estimator", ["plugin", "miller_madow", "chao_shen", "james_stein",
                                       "dirichlet", "grassberger", "nsb"])
def test_vectorised_pair_measures_equal_the_per_table_functions(estimator):
    from scipy import stats

    from infoscope.estimators.information import (
        g_test_from_table,
        mutual_information_from_table,
        normalized_mutual_information_from_table,
    )
    from infoscope.estimators.significance import williams_correction

    rng = np.random.default_rng(11)
    n = 300
    frame = pd.DataFrame({
        "a": rng.integers(0, 3, n), "b": rng.integers(0, 7, n), "c": rng.normal(size=n),
        "d": pd.Categorical(rng.choice(list("pqrs"), n), categories=list("pqrst")),
        "e": rng.integers(0, 2, n).astype(bool),
    })
    frame["b"] = frame["b"] + frame["a"]  # some dependence
    frame.loc[rng.random(n) < 0.1, "c"] = np.nan
    s = ProfileSession(frame, estimator=estimator, bins=5, n_boot=0, normalization="geometric")
    pairs = s.pairs()
    for row in pairs.itertuples():
        t = s.engine.table(row.a, row.b)
        # the same numbers, one table at a time, from infoscope.estimators.information
        assert row.mi == pytest.approx(mutual_information_from_table(t, estimator=estimator), abs=1e-9)
        assert row.nmi == pytest.approx(normalized_mutual_information_from_table(
            t, estimator=estimator, normalization="geometric"), abs=1e-9)
        g = g_test_from_table(t)
        assert (row.g, row.dof) == (pytest.approx(g.statistic, abs=1e-8), g.dof)
        # the p-value: the chi-square law with Williams' correction where the table is
        # well filled, else a permutation test (tests/test_significance.py checks both)
        if row.p_method == "chi2":
            q = williams_correction(t.sum(axis=1), t.sum(axis=0))
            assert row.p_value == pytest.approx(stats.chi2.sf(g.statistic / q, g.dof), abs=1e-10)
        else:
            assert row.p_method == "permutation" and row.n_permutations > 0
            assert 0 < row.p_value <= 1


def test_polars_reference_and_lazy_frames(log):
    import polars as pl
    small = log[["depot", "weight_kg", "late"]]
    batch = make_deliveries_batch(5_000, seed=4)[["depot", "weight_kg", "late"]]
    from_polars = ProfileSession(pl.from_pandas(batch)).drift(pl.from_pandas(small).lazy())
    pd.testing.assert_frame_equal(from_polars, ProfileSession(batch).drift(small))
    assert from_polars.set_index("column").loc["weight_kg", "flag"] == "major"


def test_accessor_session_is_fresh_and_tables_reuse_one(log):
    df = log[["depot", "late"]]
    assert df.info_profile.session() is not df.info_profile.session()
    from infoscope.frame.sessions import session_for
    assert session_for(df, n_boot=0) is session_for(df.copy(), n_boot=0)
    assert session_for(df, n_boot=0) is not session_for(df, n_boot=40)


def test_widget_call_returns_the_live_profile(log):
    from infoscope.widgets import profile
    df = log[["depot", "service", TARGET]]
    widget = df.info_profile(target=TARGET, n_boot=0)
    assert isinstance(widget, profile.ProfileWidget)
    assert widget.session.names == ["depot", "service", TARGET]


# ------------------------------------------------------------------ Polars namespace
def test_polars_namespace_equals_the_pandas_accessor(log):
    import polars as pl
    import infoscope.polars  # noqa: F401  (the explicit registration)

    small = log[["depot", "weight_kg", "stops_before", "fragile", "courier_note", "contents", TARGET]]
    pl_df = pl.from_pandas(small)
    # pl_df.info_profile.entropy() equals the pandas accessor's table (pandas.testing);
    # only "kind" may differ, as Polars' own dtypes convert to pandas' (e.g. no Categorical)
    via_polars = pl_df.info_profile.entropy(n_boot=40)
    via_pandas = small.info_profile.entropy(n_boot=40)
    pd.testing.assert_frame_equal(via_polars.drop(columns="kind"), via_pandas.drop(columns="kind"))
    assert via_polars.attrs == via_pandas.attrs
    pd.testing.assert_frame_equal(pl_df.info_profile.pairs("nmi"), small.info_profile.pairs("nmi"),
                                  check_dtype=False)
    lazy = pl_df.lazy().info_profile
    assert lazy.matrix(order="cluster").shape == (7, 7)
    assert pl_df.info_profile.pair("depot", TARGET).n == len(small)
    assert pl_df.info_profile.relevance(TARGET, n_boot=0).iloc[0]["column"] in small.columns
    assert pl_df.info_profile.drift(small)["psi"].abs().max() < 1e-12
    # the user's Polars frame is untouched
    assert pl_df.equals(pl.from_pandas(small))


def test_import_infoscope_never_imports_polars_and_registers_when_present():
    import subprocess

    code = ("import sys, infoscope, infoscope.accessor; "
            "assert 'polars' not in sys.modules, 'polars imported'; "
            "import polars as pl; assert not hasattr(pl.DataFrame, 'info_profile'); "
            "import infoscope.polars; assert hasattr(pl.DataFrame, 'info_profile'); "
            "assert hasattr(pl.LazyFrame, 'info_profile')")
    subprocess.run([sys.executable, "-c", code], check=True, timeout=120)
    # polars first, then infoscope: registered without the explicit import
    code = ("import polars as pl, infoscope; "
            "from infoscope.polars import PolarsInfoProfile; "
            "assert isinstance(pl.DataFrame({'a': [1, 2]}).info_profile, PolarsInfoProfile)")
    subprocess.run([sys.executable, "-c", code], check=True, timeout=120)


def test_flattened_multiindex_labels_name_the_same_column_everywhere():
    # a groupby-agg leaves ('a', '') beside ('b', 'x'): the key of ('a', '') is 'a'
    # in the names, and the tuple finds that column in every method
    df = pd.DataFrame({("a", ""): list("pq") * 20, ("b", "x"): list("ppqq") * 10, ("b", "y"): [1, 2] * 20})
    s = ProfileSession(df, n_boot=0)
    assert s.names == ["a", "b / x", "b / y"]
    by_tuple = s.pair(("a", ""), ("b", "x"))
    by_key = s.pair("a", "b / x")
    assert by_tuple.counts.equals(by_key.counts) and by_tuple.n == 40
    # reference: pandas.crosstab of the two columns
    expected = pd.crosstab(df[("a", "")], df[("b", "x")]).to_numpy()
    assert sorted(by_tuple.counts.to_numpy().ravel().tolist()) == sorted(expected.ravel().tolist())
    assert set(s.relevance(("b", "y"))["column"]) == {"a", "b / x"}
    assert s.column(("a", "")).name == "a"
    assert df.info_profile.pair(("a", ""), ("b", "x"), n_boot=0).n == 40
    with pytest.raises(KeyError, match="not a column"):
        s.pair(("a", "z"), ("b", "x"))


# ================================================================== result-table details
# ------------------------------------------------------------------ exceeds_log_k
@pytest.mark.filterwarnings("ignore:column 'ident'")
def test_all_distinct_column_is_flagged_above_log_k():
    n = 2000
    df = pd.DataFrame({"ident": [f"r{i}" for i in range(n)],
                       "grp": list("abcd") * (n // 4)})
    row = ProfileSession(df, estimator="miller_madow", n_boot=0, base=2).entropy().set_index("column")
    ident = row.loc["ident"]
    # reference: scipy.stats.entropy of the all-distinct counts (plug-in, log2 n)
    # plus the Miller (1955) correction (K - 1) / (2 n) nats, converted to bits
    plug = scipy.stats.entropy(np.ones(n), base=2)
    expected = plug + (n - 1) / (2 * n) / math.log(2)
    assert ident["entropy"] == pytest.approx(expected, rel=1e-9)
    assert ident["max_entropy"] == pytest.approx(math.log2(n), rel=1e-12)
    assert ident["efficiency"] > 1.0  # kept as computed, not clipped
    assert "exceeds_log_k" in ident["flags"].split(",")
    # a uniform four-level column under the plug-in equals log K: no flag
    # (scipy.stats.entropy of [1, 1, 1, 1] in bits = 2, closed form log2 4)
    plain = ProfileSession(df, estimator="plugin", n_boot=0, base=2).entropy().set_index("column")
    assert plain.loc["grp", "entropy"] == pytest.approx(scipy.stats.entropy([1, 1, 1, 1], base=2))
    assert "exceeds_log_k" not in plain.loc["grp", "flags"].split(",")
    assert "exceeds_log_k" not in plain.loc["ident", "flags"].split(",")


def test_binned_column_is_clipped_to_log_k_not_flagged():
    # Quantile bins make the 16 bins almost equally full; Miller-Madow adds
    # (K - 1) / (2 n) nats (Miller 1955) and passes log2 16 = 4 bits.  The alphabet is
    # fixed by the binning, so H <= log K holds for the truth (Shannon 1948, the
    # uniform distribution maximises entropy; common practice to project onto it):
    # the estimate and its interval stop at log K and no flag is raised.
    rng = np.random.default_rng(5)
    df = pd.DataFrame({"x": rng.normal(size=400), "flag": rng.integers(0, 2, 400).astype(bool)})
    out = ProfileSession(df, estimator="miller_madow", bins=16, n_boot=50).entropy().set_index("column")
    x = out.loc["x"]
    raw = scipy.stats.entropy(np.full(16, 25), base=2) + 15 / (2 * 400) / math.log(2)
    assert raw > 4.0  # the unclipped Miller-Madow value would pass log K
    assert x["entropy"] == pytest.approx(4.0, abs=1e-12)
    assert x["ci_high"] <= 4.0 + 1e-12 and x["ci_low"] <= x["entropy"]
    assert x["efficiency"] <= 1.0 + 1e-12 and x["effective_categories"] <= 16 + 1e-9
    assert "exceeds_log_k" not in x["flags"].split(",")


# ------------------------------------------------------------------ drift units
def test_drift_units_psi_in_nats_kl_js_in_session_unit():
    from scipy.spatial.distance import jensenshannon

    cur = pd.DataFrame({"c": ["a"] * 50 + ["b"] * 30 + ["c"] * 20})
    ref = pd.DataFrame({"c": ["a"] * 30 + ["b"] * 30 + ["c"] * 40})
    d = ProfileSession(cur, n_boot=0, base=2).drift(ref, pseudocount=0.5)
    units = d.attrs["units"]
    assert (units["psi"], units["psi_chance"], units["kl"], units["kl_chance"], units["js"]) == (
        "nats", "nats", "bits", "bits", "bits")
    row = d.set_index("column").loc["c"]
    a = np.array([50, 30, 20]) + 0.5  # this frame, pseudocount added to every cell
    e = np.array([30, 30, 40]) + 0.5  # reference
    # reference: PSI = KL(a||e) + KL(e||a) in nats (scipy.stats.entropy, natural log)
    assert row["psi"] == pytest.approx(scipy.stats.entropy(a, e) + scipy.stats.entropy(e, a), rel=1e-10)
    # reference: scipy.stats.entropy(a, e, base=2) for KL in bits
    assert row["kl"] == pytest.approx(scipy.stats.entropy(a, e, base=2), rel=1e-10)
    # reference: scipy.spatial.distance.jensenshannon(base=2) squared, raw counts
    js = jensenshannon([50, 30, 20], [30, 30, 40], base=2) ** 2
    assert row["js"] == pytest.approx(js, rel=1e-9)
    nats = ProfileSession(cur, n_boot=0, base="nats").drift(ref)
    assert {nats.attrs["units"][k] for k in ("psi", "kl", "js", "js_chance")} == {"nats"}
    assert nats.set_index("column").loc["c", "psi"] == pytest.approx(row["psi"], rel=1e-12)


# ------------------------------------------------------------------ matrix diagonal
def _frame_with_constant():
    return pd.DataFrame({"x": list("abc") * 40, "y": list("aaabbbcccddd") * 10, "k": [1.5] * 120})


def test_matrix_diagonal_of_constant_column_is_nan():
    s = ProfileSession(_frame_with_constant(), estimator="plugin", n_boot=0)
    for measure in ("nmi", "adjusted_mi"):
        m = s.matrix(measure)
        assert math.isnan(m.loc["k", "k"]), measure  # 0/0: undefined
        assert m.loc["x", "x"] == 1.0 and m.loc["y", "y"] == 1.0
    # the MI diagonal is H(X): scipy.stats.entropy of the counts (closed form log2 3)
    mi = s.matrix("mi")
    assert mi.loc["x", "x"] == pytest.approx(scipy.stats.entropy([40, 40, 40], base=2))
    assert mi.loc["k", "k"] == 0.0
    assert s.matrix("vi").loc["k", "k"] == 0.0
    # clustering still works with an undefined diagonal
    assert sorted(s.matrix("nmi", order="cluster").index) == ["k", "x", "y"]


def test_matrix_plugin_float_noise_becomes_exact_zero(monkeypatch):
    s = ProfileSession(_frame_with_constant(), estimator="plugin", n_boot=0)
    real = s.pairs

    def noisy(measure=None):  # the rounding residue the review saw on the engine path
        t = real(measure).copy()
        t["value"] = t["value"] + np.array([4e-16, -3e-16, 2e-13])[: len(t)]
        return t

    monkeypatch.setattr(s, "pairs", noisy)
    m = s.matrix("nmi")
    off = m.to_numpy()[~np.eye(3, dtype=bool)]
    # x and y are exactly independent (each x level meets each y level equally):
    # plug-in MI = 0 in closed form; every off-diagonal cell is then exactly 0,
    # except those of the constant column: its NMI is undefined (NaN, issue 10)
    assert np.all((off == 0.0) | np.isnan(off))
    assert np.count_nonzero(off == 0.0) == 2 and np.count_nonzero(np.isnan(off)) == 4
    assert np.all(np.signbit(off[~np.isnan(off)]) == False)  # noqa: E712  (no -0.0 either)
