"""Drift of an out-of-core source from an in-memory reference: the in-memory drift table, exactly.

The reference is ``ProfileSession(<the same rows read whole by pyarrow>).drift(ref)``, whose
numbers are checked against scipy in tests/test_drift.py (``scipy.special.rel_entr``,
``scipy.spatial.distance.jensenshannon``); here the PSI of one column is also recomputed from
the two count vectors of the record with ``scipy.special.rel_entr`` (PSI = KL(p||q) + KL(q||p)
with the pseudocount, common practice for PSI).
"""
from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pyarrow.dataset as ds
import pytest
import scipy.special

from infoscope import InfoscopeWarning
from infoscope.datasets import make_deliveries, make_deliveries_batch
from infoscope.frame.session import ProfileSession
from infoscope.sources import NeedsRows, arrow_to_pandas, profile


def _quiet(fn, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        return fn(*args, **kwargs)


def _source(folder, **settings):
    return _quiet(profile, folder, progress=False, n_boot=0, **settings)


def _write(folder, frame, parts):
    size = -(-len(frame) // parts)
    for i in range(parts):
        frame.iloc[i * size:(i + 1) * size].to_parquet(folder / f"part-{i:02d}.parquet", index=False)
    files = sorted(str(p) for p in folder.glob("*.parquet"))
    return arrow_to_pandas(ds.dataset(files, format="parquet").to_table())


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    folder = tmp_path_factory.mktemp("batch")
    batch = make_deliveries_batch(12_000, seed=1)
    batch.loc[batch.index[::7], "depot"] = None  # missing values in a column of levels
    full = _write(folder, batch, 4)
    return folder, full, make_deliveries(6_000, seed=0)


@pytest.mark.parametrize("settings", [{}, {"max_categories": 8, "missing": "category"}, {"bins": 5}])
def test_the_drift_table_is_the_in_memory_one(demo, monkeypatch, settings):
    from infoscope.sources import passes

    folder, full, ref = demo
    monkeypatch.setattr(passes, "BATCH_ROWS", (1_111, 1_111))  # batches cut across files
    out = _quiet(_source(folder, **settings).drift, ref)
    mem = _quiet(_quiet(ProfileSession, full, n_boot=0, **settings).drift, ref)
    assert out.attrs.pop("source") == str(folder)
    pd.testing.assert_frame_equal(out, mem)
    flags = out.set_index("column")["flag"]
    assert flags["weight_kg"] == "major" and flags["parcel_ref"] == "id_like" and flags["dispatched_at"] == "time_axis"


def test_the_record_holds_both_distributions_and_psi_is_scipys(demo):
    folder, full, ref = demo
    out = _quiet(_source(folder).drift_report, ref, pairs=True).to_dict()
    mem = _quiet(_quiet(ProfileSession, full, n_boot=0).drift_report, ref).to_dict()
    assert [c["bins"] for c in out["columns"]] == [c["bins"] for c in mem["columns"]]
    assert any("relationship drift" in note for note in out["notes"])
    row = next(c for c in out["columns"] if c["column"] == "booking_channel")
    p = np.array([b["reference"] for b in row["bins"]], dtype=float) + 0.5
    q = np.array([b["current"] for b in row["bins"]], dtype=float) + 0.5
    p, q = p / p.sum(), q / q.sum()
    psi = float(np.sum(scipy.special.rel_entr(q, p) + scipy.special.rel_entr(p, q)))  # nats
    assert row["psi"] == pytest.approx(psi, rel=1e-12)


def test_text_read_as_numbers_is_not_compared_out_of_core_and_says_so(tmp_path):
    rng = np.random.default_rng(3)
    current = pd.DataFrame({"x": [f"{v:.3f}" for v in rng.normal(size=500)], "c": rng.choice(list("ab"), 500)})
    _write(tmp_path, current, 2)
    ref = pd.DataFrame({"x": rng.normal(size=400), "c": rng.choice(list("ab"), 400)})
    with pytest.warns(InfoscopeWarning, match=r"column 'x' is float64 in the reference.*out of core.*sample="):
        out = _source(tmp_path).drift(ref)
    rows = out.set_index("column")
    assert rows.loc["x", "flag"] == "type_changed" and np.isnan(rows.loc["x", "psi"])
    assert rows.loc["c", "flag"] == "stable"


def test_levels_beyond_the_cap_are_left_uncompared_with_a_note(tmp_path, monkeypatch):
    from infoscope.frame import drift_batches

    monkeypatch.setattr(drift_batches, "MAX_LEVELS", 50)
    current = pd.DataFrame({"ref": [f"r{i}" for i in range(400)], "c": list("ab") * 200})
    _write(tmp_path, current, 2)
    ref = pd.DataFrame({"ref": [f"q{i}" for i in range(300)], "c": list("ab") * 150})
    with pytest.warns(InfoscopeWarning, match="more than 50 distinct values"):
        out = _quiet_except_cap(_source(tmp_path).drift, ref)
    rows = out.set_index("column")
    assert rows.loc["ref", "flag"] == "type_changed" and rows.loc["c", "psi"] == 0.0


def _quiet_except_cap(fn, *args):
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", message=r"^(?!.*distinct values: out of core)", category=InfoscopeWarning)
        return fn(*args)


def test_the_widget_on_a_source_shows_the_drift_view(demo):
    import json

    folder, full, ref = demo
    s = _source(folder)
    w = _quiet(s.widget, reference=ref)
    w.wait()
    record = json.loads(w._drift)
    assert w._status["state"] == "idle"
    assert {c["column"]: c["flag"] for c in record["columns"]}["booking_channel"] == "moderate"


def test_a_profile_from_dask_says_drift_needs_a_sample():
    import dask.dataframe as dd

    ddf = dd.from_pandas(pd.DataFrame({"a": list("ab") * 50}), npartitions=2)
    with pytest.raises(NeedsRows, match=r"drift\(\) reads the rows"):
        profile(ddf, progress=False, n_boot=0).drift(pd.DataFrame({"a": list("ab") * 50}))


def test_naive_against_zoned_times_are_not_compared_and_say_why(tmp_path):
    t = pd.Series(pd.date_range("2026-01-01", periods=300, freq="h"))
    _write(tmp_path, pd.DataFrame({"t": t, "c": list("abc") * 100}), 2)
    ref = pd.DataFrame({"t": t.dt.tz_localize("UTC"), "c": list("abc") * 100})
    with pytest.warns(InfoscopeWarning, match="column 't' is datetime64.*naive and time-zone-aware"):
        out = _source(tmp_path).drift(ref)
    assert out.set_index("column").loc["t", "flag"] == "type_changed"
