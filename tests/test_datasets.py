"""The demo generators: reproducible, and they plant what PLANTED says.

These checks use only numpy/scipy/pandas on the raw generated values, so that the
planted structure is confirmed independently of infoscope's own estimators (the
profile-level checks are in test_frame.py).
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
import scipy.stats

from infoscope.datasets import PLANTED, make_deliveries, make_deliveries_batch, make_wide


@pytest.fixture(scope="module")
def reference():
    return make_deliveries(20_000, seed=0)


@pytest.fixture(scope="module")
def drifted():
    return make_deliveries_batch(10_000, seed=1, drift=True)


def test_same_seed_same_frame():
    pd.testing.assert_frame_equal(make_deliveries(500, seed=7), make_deliveries(500, seed=7))
    pd.testing.assert_frame_equal(make_wide(300, 9, seed=2), make_wide(300, 9, seed=2))


def test_different_seed_different_frame():
    a, b = make_deliveries(500, seed=1), make_deliveries(500, seed=2)
    assert not a["weight_kg"].equals(b["weight_kg"])


def test_planted_names_are_columns(reference):
    columns = set(reference.columns)
    assert PLANTED["target"] in columns
    assert PLANTED["leak"] in columns
    assert set(PLANTED["near_duplicates"]) <= columns
    assert set(PLANTED["informative"]) <= columns
    assert set(PLANTED["flags"]) <= columns
    assert set(PLANTED["drift"]) <= columns


def test_kinds_are_mixed(reference):
    dtypes = reference.dtypes
    assert pd.api.types.is_datetime64_any_dtype(dtypes["dispatched_at"])
    assert isinstance(dtypes["depot"], pd.CategoricalDtype)
    assert dtypes["fragile"] == bool and dtypes["late"] == bool
    assert pd.api.types.is_float_dtype(dtypes["weight_kg"])
    assert pd.api.types.is_integer_dtype(dtypes["stops_before"])
    assert pd.api.types.is_string_dtype(dtypes["courier_note"])


def test_near_duplicates_agree(reference):
    kg, lb = (reference[c] for c in PLANTED["near_duplicates"])
    # Spearman rank correlation via scipy.stats.spearmanr: near 1, but not exactly
    # (two scales, rounding noise), so the pair is a near- and not an exact duplicate.
    rho = scipy.stats.spearmanr(kg, lb).statistic
    assert 0.995 < rho < 1.0
    assert not np.allclose(kg * 2.20462, lb, atol=1e-9)


def test_leak_is_exact(reference):
    target, leak = reference[PLANTED["target"]], reference[PLANTED["leak"]]
    assert ((leak > 0) == target).all()
    # the target is neither rare nor dominant, so the leak matters
    assert 0.1 < target.mean() < 0.4


def test_informative_columns_relate_to_target(reference):
    target = reference[PLANTED["target"]]
    for column in PLANTED["informative"]:
        values = reference[column]
        if pd.api.types.is_float_dtype(values):
            values = pd.qcut(values, 8)
        table = pd.crosstab(values, target)
        # chi-square test of independence (scipy.stats.chi2_contingency): strong dependence
        assert scipy.stats.chi2_contingency(table).pvalue < 1e-6, column


def test_flagged_columns_have_their_property(reference):
    n = len(reference)
    assert reference["parcel_ref"].nunique() == n                      # ID-like
    assert reference["currency"].nunique() == 1                        # constant
    assert reference["courier_note"].isna().mean() >= 0.5              # mostly missing
    assert reference["contents"].nunique() > 64                        # more levels than the default cap
    shares = reference["contents"].value_counts(normalize=True)
    assert (shares < 0.005).sum() > 50                                 # many rare levels
    # rare_levels as documented (levels under 1% hold at least 5% of the rows), by
    # pandas value_counts alone; and the count of stops has only a thin rare tail
    for column in PLANTED["more_flags"]:
        shares = reference[column].value_counts(normalize=True)
        assert shares[shares < 0.01].sum() >= 0.05, column
    stops = reference["stops_before"].value_counts(normalize=True)
    assert stops[stops < 0.01].sum() < 0.05
    # heavy tail: sample kurtosis (scipy.stats.kurtosis, Fisher) far above a normal's 0
    assert scipy.stats.kurtosis(reference["declared_value_eur"]) > 50
    # the weights and distances are skewed but not heavy-tailed in that sense
    assert scipy.stats.kurtosis(reference["weight_kg"]) < 10
    assert scipy.stats.kurtosis(reference["distance_km"]) < 10


def _psi(actual: np.ndarray, expected: np.ndarray) -> float:
    # PSI = sum (a - e) ln(a / e) (credit-scoring practice; Jeffreys J divergence)
    return float(np.sum((actual - expected) * np.log(actual / expected)))


def test_drift_is_planted_where_documented(reference, drifted):
    # booking channel: PSI of the observed shares between the 0.10 and 0.25 thresholds
    ref_share = reference["booking_channel"].value_counts(normalize=True).sort_index()
    new_share = drifted["booking_channel"].value_counts(normalize=True).sort_index()
    assert 0.12 < _psi(new_share.to_numpy(), ref_share.to_numpy()) < 0.21
    # weight: a two-sample Kolmogorov-Smirnov test (scipy.stats.ks_2samp) rejects clearly
    assert scipy.stats.ks_2samp(reference["weight_kg"], drifted["weight_kg"]).pvalue < 1e-12
    assert drifted["dispatched_at"].min() > reference["dispatched_at"].max()
    assert not set(drifted["parcel_ref"]) & set(reference["parcel_ref"])


def test_undrifted_columns_keep_their_distribution(reference, drifted):
    stable = [c for c in reference.columns if c not in PLANTED["drift"]]
    for column in stable:
        a, b = reference[column], drifted[column]
        if pd.api.types.is_float_dtype(a) and a.nunique() > 20:
            # two-sample KS test (scipy.stats.ks_2samp): no evidence of a shift
            assert scipy.stats.ks_2samp(a.dropna(), b.dropna()).pvalue > 1e-3, column
        else:
            labels = pd.concat([a.astype("str"), b.astype("str")], ignore_index=True)
            batch = np.r_[np.zeros(len(a)), np.ones(len(b))]
            table = pd.crosstab(labels.fillna("(missing)"), batch)
            if len(table) > 1:
                # chi-square homogeneity test (scipy.stats.chi2_contingency)
                assert scipy.stats.chi2_contingency(table).pvalue > 1e-3, column


def test_batch_without_drift_is_same_period():
    ref = make_deliveries(5_000, seed=0)
    new = make_deliveries_batch(5_000, seed=3, drift=False)
    # both inside the documented 26 weeks from 2026-01-05
    start, end = pd.Timestamp("2026-01-05"), pd.Timestamp("2026-01-05") + pd.Timedelta(weeks=26)
    for frame in (ref, new):
        assert start <= frame["dispatched_at"].min() and frame["dispatched_at"].max() < end
    assert scipy.stats.ks_2samp(ref["weight_kg"], new["weight_kg"]).pvalue > 1e-3
    assert set(PLANTED["no_drift"]) == {"parcel_ref"}


def test_wide_has_dependent_blocks():
    wide = make_wide(4_000, 10, seed=0)
    assert wide.shape == (4_000, 10)
    # same bay: strongly dependent; different bays: independent (Spearman, scipy)
    same = scipy.stats.spearmanr(wide["bay00_t0"], wide["bay00_t2"], nan_policy="omit").statistic
    other = scipy.stats.spearmanr(wide["bay00_t0"], wide["bay01_t0"], nan_policy="omit").statistic
    assert same > 0.6 and abs(other) < 0.1
    assert isinstance(wide["bay00_c1"].dtype, pd.CategoricalDtype)
    assert 0.02 < wide["bay00_t2"].isna().mean() < 0.08


@pytest.mark.parametrize("bad", [0, -3, 2.5, "10", True])
def test_bad_sizes_are_refused(bad):
    with pytest.raises((TypeError, ValueError), match="n"):
        make_deliveries(bad)


def test_bad_options_are_refused():
    with pytest.raises(TypeError, match="drift"):
        make_deliveries_batch(10, drift="yes")
    with pytest.raises(ValueError, match="missing_share"):
        make_wide(10, 3, missing_share=1.5)
    with pytest.raises(ValueError, match="p=0"):
        make_wide(10, 0)


def test_write_deliveries_writes_parts_of_the_reference_process(tmp_path):
    from infoscope.datasets import PLANTED, make_deliveries, write_deliveries

    paths = write_deliveries(tmp_path / "log", n=10_001, files=4, seed=3)
    parts = [pd.read_parquet(p) for p in paths]
    assert [len(p) for p in parts] == [2501, 2500, 2500, 2500]
    whole = pd.concat(parts, ignore_index=True)
    reference = make_deliveries(100, seed=3)
    assert list(whole.columns) == list(reference.columns)
    # the same kinds of column (Parquet keeps timestamps in milliseconds, not seconds)
    assert [d.kind for d in whole.dtypes] == [d.kind for d in reference.dtypes]
    assert whole["parcel_ref"].is_unique
    assert bool((whole["compensation_eur"] > 0).eq(whole[PLANTED["target"]]).all())  # the planted leak
    again = pd.concat([pd.read_parquet(p) for p in write_deliveries(tmp_path / "again", n=10_001, files=4, seed=3)],
                      ignore_index=True)
    pd.testing.assert_frame_equal(whole, again)
    with pytest.raises(ValueError, match="files=5 is more than the n=4 rows"):
        write_deliveries(tmp_path / "x", n=4, files=5)
