"""The drift panel's data: the bins of the record, the strip over time, the drift_over= setting.

Numbers are checked against the tables they come from (``ProfileSession.drift`` and
``ProfileSession.drift_over``) and the PSI per bin against its closed form,
PSI = sum over bins of (a_i - e_i) ln(a_i / e_i) on the smoothed shares (Siddiqi
2006, ch. 8, the index as a sum over bands).
"""
from __future__ import annotations

import json
import math
import warnings

import numpy as np
import pandas as pd
import pytest

from infoscope.datasets import make_deliveries
from infoscope.frame.session import ProfileSession
from infoscope.views import serialize as ser
from infoscope.views.payload import drift_data, drift_over_data, drift_over_spec, payload

KEEP = ["dispatched_at", "depot", "service", "distance_km", "late"]


def _quiet(fn, *args, **kwargs):
    from infoscope import InfoscopeWarning

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        return fn(*args, **kwargs)


@pytest.fixture(scope="module")
def frames():
    reference = make_deliveries(600, seed=3)[KEEP]
    batch = make_deliveries(600, seed=4)[KEEP].sort_values("dispatched_at").reset_index(drop=True)
    late_half = batch.index >= len(batch) // 2
    batch.loc[late_half, "distance_km"] = batch.loc[late_half, "distance_km"] * 1.8  # drift from mid-range on
    return reference, batch


@pytest.fixture(scope="module")
def session(frames):
    return _quiet(ProfileSession, frames[1], n_boot=0)


def test_bins_of_the_record_sum_to_the_drift_tables_psi(frames, session):
    reference, _ = frames
    record = _quiet(drift_data, session, reference, pairs=False)
    table = _quiet(session.drift, reference).set_index("column")
    pseudo = record["settings"]["pseudocount"]
    for col in record["columns"]:
        bins = col["bins"]
        if bins is None:
            continue
        psi = table.loc[col["column"], "psi"]
        assert math.isclose(sum(b["contribution"] for b in bins), psi, rel_tol=1e-9, abs_tol=1e-12)
        # closed form of each share and contribution (Siddiqi 2006): smoothed shares
        r = np.array([b["reference"] for b in bins], float)
        c = np.array([b["current"] for b in bins], float)
        e = (r + pseudo) / (r.sum() + pseudo * r.size)
        a = (c + pseudo) / (c.sum() + pseudo * c.size)
        np.testing.assert_allclose([b["reference_share"] for b in bins], e, rtol=1e-12)
        np.testing.assert_allclose([b["current_share"] for b in bins], a, rtol=1e-12)
        np.testing.assert_allclose([b["contribution"] for b in bins], (a - e) * np.log(a / e), rtol=1e-9, atol=1e-15)
        assert c.sum() == table.loc[col["column"], "n"] and r.sum() == table.loc[col["column"], "n_reference"]


def test_the_strip_carries_the_drift_over_table(frames, session):
    reference, _ = frames
    spec = drift_over_spec(("dispatched_at", "4W"), has_reference=True)
    over = _quiet(drift_over_data, session, spec, reference=reference)
    table = _quiet(session.drift_over, "dispatched_at", every="4W", reference=reference)
    assert over["reference"] == "frame" and over["time_column"] == "dispatched_at" and over["every"] == "4W"
    assert [p["period"] for p in over["periods"]] == list(dict.fromkeys(table["period"].astype(str)))
    assert over["columns"] == [c for c in KEEP if c != "dispatched_at"]
    assert len(over["cells"]) == len(table)
    cells = {(c["column"], c["period"]): c for c in over["cells"]}
    for row in table.itertuples(index=False):
        c = cells[(row.column, str(row.period))]
        for field in ("psi", "psi_chance", "psi_chance_high", "p_value", "q_value", "n", "n_reference"):
            want = getattr(row, field)
            assert (c[field] is None) if pd.isna(want) else math.isclose(c[field], want, rel_tol=1e-12), field
        assert c["flag"] == row.flag and c["hidden"] is None
    # the planted shift is a finding in the late periods, not in the first one
    flags = [cells[("distance_km", p["period"])]["flag"] for p in over["periods"]]
    assert flags[-1] in ("moderate", "major") and flags[0] not in ("moderate", "major"), flags
    json.dumps(over, allow_nan=False)  # strict JSON


def test_first_period_mode_marks_the_reference_period(session):
    over = _quiet(drift_over_data, session, drift_over_spec(("dispatched_at", "4W"), has_reference=False))
    table = _quiet(session.drift_over, "dispatched_at", every="4W", reference="first")
    assert over["reference"] == "first"
    assert over["periods"][0]["is_reference"] and not any(p["is_reference"] for p in over["periods"][1:])
    assert over["periods"][0]["period"] == str(table["reference"].iloc[0])
    assert over["periods"][0]["period"] not in set(table["period"].astype(str))


def test_small_row_counts_of_the_strip_are_hidden_with_their_complements(session):
    table = _quiet(session.drift_over, "dispatched_at", every="1W", reference="first")
    threshold = int(np.percentile(table["n"].dropna(), 20)) + 1  # some weeks are small
    record = ser.drift_over_record(table, min_count=threshold)
    small = 0
    by_period = {}
    for c, row in zip(record["cells"], table.itertuples(index=False)):
        assert c["column"] == row.column
        if 0 < row.n < threshold:
            small += 1
            assert c["n"] is None and c["hidden"] == "small"
        if c["n"] is not None:
            assert c["n"] == row.n and (c["n"] == 0 or c["n"] >= threshold)
        by_period.setdefault(c["period"], set()).add(c["n"] is None)
    assert small > 0
    # one period hides all of its counts or none (its columns share the row count)
    assert all(len(v) == 1 for v in by_period.values())
    # no column keeps exactly one hidden period (the total would give it back)
    for column in record["columns"]:
        hidden = [c for c in record["cells"] if c["column"] == column and c["n"] is None]
        ref_hidden = record["cells"][0]["n_reference"] is None
        assert len(hidden) + ref_hidden != 1
    assert record["min_count"] == threshold


def test_drift_over_setting_shapes_and_errors():
    assert drift_over_spec(None, has_reference=True) is None
    assert drift_over_spec("t", has_reference=True) == {"time_column": "t", "every": "1W", "against": "reference"}
    assert drift_over_spec(("t", "1M", "previous"), has_reference=False)["against"] == "previous"
    with pytest.raises(TypeError, match="time column's name or a tuple"):
        drift_over_spec(("t", "1W", "first", "x"), has_reference=False)
    with pytest.raises(TypeError, match="period frequency"):
        drift_over_spec(("t", 7), has_reference=False)
    with pytest.raises(ValueError, match="against='later'"):
        drift_over_spec(("t", "1W", "later"), has_reference=False)
    with pytest.raises(ValueError, match="needs a reference frame"):
        drift_over_spec(("t", "1W", "reference"), has_reference=False)


def test_payload_and_export_carry_the_strip(frames, session, tmp_path):
    from infoscope.report.html import to_html

    reference, batch = frames
    p = _quiet(payload, session, reference=reference, drift_over=("dispatched_at", "4W"), top_pairs=0)
    assert p["state"]["_drift_over"]["cells"] and p["state"]["_drift"]["schema"] == "infoscope-drift"
    assert _quiet(payload, session, top_pairs=0)["state"]["_drift_over"] is None
    path = _quiet(batch.info_profile.to_html, tmp_path / "p.html", reference=reference,
                  drift_over=("dispatched_at", "4W"), n_boot=0)
    assert '"_drift_over"' in path.read_text(encoding="utf-8")


def test_widget_fills_the_strip_and_keeps_it_on_a_pair_click(frames):
    from infoscope.widgets import ProfileWidget

    reference, batch = frames
    w = _quiet(ProfileWidget, _quiet(ProfileSession, batch, n_boot=0), threaded=False, reference=reference,
               drift_over=("dispatched_at", "4W"))
    over = json.loads(w._drift_over)
    direct = _quiet(drift_over_data, _quiet(ProfileSession, batch, n_boot=0),
                    drift_over_spec(("dispatched_at", "4W"), has_reference=True), reference=reference)
    assert [c["psi"] for c in over["cells"]] == [c["psi"] for c in direct["cells"]]
    first = over["generation"]
    _quiet(setattr, w, "selected_pair", ["depot", "late"])
    assert json.loads(w._drift_over)["generation"] == first  # a pair click redoes no splits
    _quiet(setattr, w, "bins", 6)
    assert json.loads(w._drift_over)["generation"] > first
    assert _quiet(w.payload)["state"]["_drift_over"]["cells"]
    w.close()


def test_a_bad_time_column_is_said_in_the_strip_and_the_profile_still_shows(frames):
    from infoscope.widgets import ProfileWidget

    reference, batch = frames
    w = _quiet(ProfileWidget, _quiet(ProfileSession, batch, n_boot=0), threaded=False, reference=reference,
               drift_over=("depot", "1W"))
    assert w._status["state"] == "idle", w._status
    over = json.loads(w._drift_over)
    assert "'depot'" in over["error"] and "not a datetime column" in over["error"]
    assert json.loads(w._drift)["schema"] == "infoscope-drift"
    w.close()
    with pytest.raises(ValueError, match="needs a reference frame"):
        ProfileWidget(_quiet(ProfileSession, batch, n_boot=0), threaded=False, drift_over=("t", "1W", "reference"))
