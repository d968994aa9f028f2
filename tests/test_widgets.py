"""Python tier of the widget tests: the trait protocol, without a browser.

What the front end would send (trait sets, the exact comm ``update`` message, the
custom ``cancel`` message) goes in; the kernel's answer (the ``_``-prefixed traits)
is checked against a ``ProfileSession`` computed directly with the same settings,
and for one joint table against ``pandas.crosstab`` (pandas, an outside reference).
"""
from __future__ import annotations

import base64
from pathlib import Path
import json
import threading
import time
import warnings

import numpy as np
import pandas as pd
import pytest

from infoscope import InfoscopeWarning
from infoscope.frame.session import ProfileSession
from infoscope.report.suppression import suppression_mask
from infoscope.widgets import EntropyBarsWidget, ProfileWidget, RelevanceWidget


def quiet(fn, *args, **kwargs):
    """Run fn; the demo frame's folded-level notes are expected, not under test."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        return fn(*args, **kwargs)


@pytest.fixture(scope="module")
def frame():
    from infoscope.datasets import make_deliveries

    return make_deliveries(600, seed=5)


def session_of(frame, **settings):
    # 16 bins, not the row-dependent default: these tests are about the widget's
    # mechanics on 16 x 16 pair tables (the default is tested on its own below)
    settings.setdefault("bins", 16)
    return quiet(ProfileSession, frame, n_boot=0, **settings)


def widget(frame, cls=ProfileWidget, **kw):
    kw.setdefault("threaded", False)
    return quiet(cls, session_of(frame), **kw)


def entropy_rows(w) -> pd.DataFrame:
    data = json.loads(w._entropy)
    return pd.DataFrame(data["rows"], columns=data["fields"]).set_index("column")


def direct_entropy(frame, **settings) -> pd.DataFrame:
    return quiet(session_of(frame, **settings).entropy).set_index("column")


def assert_same_entropy(w, expected: pd.DataFrame):
    got = entropy_rows(w)
    assert list(got.index) == list(expected.index)
    np.testing.assert_allclose(got["entropy"].astype(float), expected["entropy"].astype(float), rtol=1e-12)
    assert (got["k"] == expected["k"]).all()


# ------------------------------------------------------------------ round trips
def test_first_view_matches_the_session(frame):
    w = widget(frame)
    assert w._status["state"] == "idle", w._status
    assert_same_entropy(w, direct_entropy(frame))
    assert w._meta["names"] == session_of(frame).names
    assert json.loads(w._entropy)["unit"] == "bits"


def test_setting_bins_reencodes_and_answers(frame):
    w = widget(frame)
    w.bins = 5  # what the slider sets
    assert w._status["state"] == "idle"
    assert_same_entropy(w, direct_entropy(frame, bins=5))
    assert entropy_rows(w).loc["distance_km", "k"] == 5


def test_comm_update_message_is_answered(frame):
    """Feed the exact message the front end sends; record what goes back on the comm."""
    w = widget(frame)
    sent = []
    w.comm.send = lambda data=None, buffers=None, **kw: sent.append((data, buffers))
    w._handle_msg({"content": {"data": {"method": "update", "state": {"estimator": "plugin"},
                                        "buffer_paths": []}}, "buffers": []})
    assert w.estimator == "plugin"
    assert_same_entropy(w, direct_entropy(frame, estimator="plugin"))
    updates = [d["state"] for d, _ in sent if d and d.get("method") == "update"]
    keys = set().union(*updates)
    assert {"_entropy", "_grid_meta", "_status"} <= keys
    assert updates[-1].get("_status", {}).get("state") == "idle"
    # the grid goes out as binary buffers (float32), not JSON numbers
    paths = [(p, b) for d, bufs in sent if d and d.get("method") == "update"
             for p, b in zip(d.get("buffer_paths", []), bufs or [])]
    grid = [bytes(b) for p, b in paths if p == ["_grid_values"]]
    assert grid and grid[-1] == w._grid_values and len(grid[-1]) == 4 * w._grid_meta["size"] ** 2


def test_grid_buffers_are_the_session_pairs(frame):
    w = widget(frame, measure="nmi", order="cluster")
    s = session_of(frame, measure="nmi")
    pairs = quiet(s.pairs).set_index(["a", "b"])
    order = list(quiet(s.matrix, order="cluster").index)
    meta = w._grid_meta
    assert meta["names"] == order and meta["measure"] == "nmi" and meta["size"] == len(order)
    size = meta["size"]
    values = np.frombuffer(w._grid_values, dtype=np.float32).reshape(size, size)
    n = np.frombuffer(w._grid_n, dtype=np.int32).reshape(size, size)
    q = np.frombuffer(w._grid_q, dtype=np.float32).reshape(size, size)
    for (a, b), row in pairs.iterrows():
        i, j = order.index(a), order.index(b)
        if np.isnan(row["value"]):  # NMI of a constant column: undefined, sent as NaN
            assert np.isnan(values[i, j]) and np.isnan(values[j, i])
        else:
            assert values[i, j] == values[j, i] == pytest.approx(row["value"], rel=1e-6, abs=1e-7)
        assert n[i, j] == row["n"]
        assert q[i, j] == pytest.approx(row["q_value"], rel=1e-6, abs=1e-7)
    # NMI of a column with itself: 1, or NaN (undefined, 0/0) for a column with one
    # observed value; the grid carries the session matrix's own diagonal
    diag = np.diag(quiet(s.matrix, order="cluster").to_numpy(dtype=float))
    constant = np.array([frame[c].nunique(dropna=True) <= 1 for c in order])
    assert np.allclose(np.diag(values)[~constant], 1.0) and np.isnan(np.diag(values)[constant]).all()
    assert np.array_equal(np.isnan(diag), constant)


def test_pair_view_counts_match_crosstab_and_hide_small_cells(frame):
    w = widget(frame, selected_pair=["depot", "service"], min_count=5)
    view = w._pair
    # outside reference: pandas.crosstab of the two categorical columns (no binning)
    ref = pd.crosstab(frame["depot"], frame["service"], dropna=False)
    ref = ref.reindex(index=view["rows"], columns=view["cols"], fill_value=0).to_numpy()
    mask = suppression_mask(ref.astype(float), 5)
    for i in range(ref.shape[0]):
        for j in range(ref.shape[1]):
            got = view["counts"][i][j]
            assert (got is None) == bool(mask[i, j])
            if got is not None:
                assert got == ref[i, j]
            else:
                assert view["pmi"][i][j] is None  # nothing that gives the count back
    assert view["hidden_cells"] == int(mask.sum())
    if mask.any():
        assert view["row_totals"] is None and view["col_totals"] is None
    assert view["min_count"] == 5 and view["n"] == ref.sum()
    w.min_count = 0
    assert w._pair["hidden_cells"] == 0 and w._pair["row_totals"] == ref.sum(axis=1).tolist()


def test_selecting_a_pair_and_a_target(frame):
    w = widget(frame)
    w.selected_pair = ["late", "compensation_eur"]
    assert (w._pair["a"], w._pair["b"]) == ("late", "compensation_eur")
    pt = quiet(session_of(frame).pair, "late", "compensation_eur")
    assert w._pair["mi"] == pytest.approx(pt.mi, rel=1e-12)
    w.target = "late"
    rel = json.loads(w._relevance)
    direct = quiet(session_of(frame, target="late").relevance).set_index("column")
    got = pd.DataFrame(rel["rows"], columns=rel["fields"]).set_index("column")
    assert rel["target"] == "late" and set(got.index) == set(direct.index)
    np.testing.assert_allclose(got.loc[direct.index, "mi"].astype(float), direct["mi"], rtol=1e-12)
    assert bool(got.loc["compensation_eur", "leakage"]) == bool(direct.loc["compensation_eur", "leakage"])


def test_per_column_bins_override(frame):
    w = widget(frame)
    w.selected_column = "distance_km"
    w.column_bins = {"distance_km": 4}
    s = session_of(frame)
    quiet(s.set_column_bins, "distance_km", 4)
    assert_same_entropy(w, quiet(s.entropy).set_index("column"))
    assert entropy_rows(w).loc["distance_km", "k"] == 4 and entropy_rows(w).loc["weight_kg", "k"] == 16
    w.column_bins = {}
    assert entropy_rows(w).loc["distance_km", "k"] == 16


def test_unit_nats_and_dirichlet_smoothing(frame):
    w = widget(frame)
    with w.hold_trait_notifications():
        w.unit = "nats"
        w.estimator = "dirichlet"
        w.alpha = 1.0
    assert json.loads(w._entropy)["unit"] == "nats"
    assert_same_entropy(w, direct_entropy(frame, base="nats", estimator="dirichlet", alpha=1.0))


def test_single_views_compute_only_what_they_show(frame):
    e = widget(frame, cls=EntropyBarsWidget)
    assert e._view == "entropy" and e._entropy and e._grid_meta == {}
    r = widget(frame, cls=RelevanceWidget, target="late")
    assert r._view == "relevance" and json.loads(r._relevance)["target"] == "late" and r._entropy == ""


def test_selection_view_recomputes_when_its_controls_change(frame):
    from infoscope.frame.selection import select_table
    from infoscope.widgets import SelectionWidget

    w = widget(frame, cls=SelectionWidget, target="late")
    data = json.loads(w._selection)
    assert w._view == "selection" and data["target"] == "late" and data["method"] == "mrmr" and w._entropy == ""
    quiet(setattr, w, "selection_method", "cmim")
    quiet(setattr, w, "selection_k", 2)
    data = json.loads(w._selection)
    assert data["method"] == "cmim" and data["k"] == 2
    steps = [r for r in data["rows"] if r[0] is not None]
    # the kernel's answer is the select() table of the same session and settings
    direct = quiet(select_table, w.session, "late", k=2, method="cmim", n_permutations=99)
    assert [r[1] for r in steps] == direct.loc[direct["step"].notna(), "column"].tolist()



def _selection_columns(data) -> list:
    return [r[1] for r in data["rows"] if r[0] is not None]


def test_profile_shows_the_selection_after_the_other_parts(frame):
    # the main profile with a target: the selection arrives as a follow-up generation
    # (after entropy, grid and relevance are shown), equal to select() of the session
    from infoscope.frame.selection import select_table

    w = widget(frame, target="late")
    rel, sel = json.loads(w._relevance), json.loads(w._selection)
    assert sel["target"] == "late" and sel["method"] == "mrmr" and sel["k"] is None
    assert sel["generation"] > rel["generation"] == json.loads(w._entropy)["generation"]
    direct = quiet(select_table, w.session, "late", n_permutations=99)
    assert _selection_columns(sel) == direct.loc[direct["step"].notna(), "column"].tolist()
    # method and k recompute the selection only
    entropy = w._entropy
    quiet(setattr, w, "selection_method", "jmi")
    quiet(setattr, w, "selection_k", 3)
    sel = json.loads(w._selection)
    assert sel["method"] == "jmi" and sel["k"] == 3 and w._entropy == entropy
    direct = quiet(select_table, w.session, "late", k=3, method="jmi", n_permutations=99)
    assert _selection_columns(sel) == direct.loc[direct["step"].notna(), "column"].tolist()
    # a bins move redoes it on the new encodings
    quiet(setattr, w, "bins", 4)
    direct = quiet(select_table, w.session, "late", k=3, method="jmi", n_permutations=99)
    assert _selection_columns(json.loads(w._selection)) == direct.loc[direct["step"].notna(), "column"].tolist()
    assert json.loads(w._selection)["generation"] == w.generation


def test_profile_without_a_target_sends_an_empty_selection_in_one_recompute(frame):
    w = widget(frame)
    sel = json.loads(w._selection)
    assert sel["target"] is None and sel["rows"] == []
    assert sel["generation"] == json.loads(w._entropy)["generation"] == w.generation


def test_a_control_move_does_not_wait_for_the_selection(frame, monkeypatch):
    # a selection is running (held on an event) when the bins move: it stops at its
    # next block of shuffles, the new numbers are shown first, and the selection is
    # redone for the new settings as a later generation; the held one is never shown
    from infoscope.frame import selection

    w = quiet(ProfileWidget, session_of(frame), debounce=0.0, target="late")
    assert w.wait(60)
    started, release = threading.Event(), threading.Event()
    real = selection._select

    def held(*args, **kwargs):
        started.set()
        assert release.wait(60)
        return real(*args, **kwargs)

    shown = []
    w.observe(lambda ch: shown.append((ch["name"], json.loads(ch["new"])["generation"])),
              names=["_entropy", "_selection"])
    monkeypatch.setattr(selection, "_select", held)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.selection_method = "cmim"
        assert started.wait(60)
        monkeypatch.setattr(selection, "_select", real)
        w.bins = 5             # while the selection is held
        release.set()
        assert w.wait(60)
    assert_same_entropy(w, direct_entropy(frame, bins=5))
    assert [name for name, _ in shown] == ["_entropy", "_selection"]  # the held selection never came
    assert shown[0][1] < shown[1][1] == w.generation
    sel = json.loads(w._selection)
    assert sel["method"] == "cmim" and _selection_columns(sel) == select_table_of(w, "cmim")
    w.close()


def select_table_of(w, method):
    from infoscope.frame.selection import select_table

    table = select_table(w.session, w.target, method=method, n_permutations=99)
    return table.loc[table["step"].notna(), "column"].tolist()


def test_a_superseded_recompute_keeps_its_parts(frame, monkeypatch):
    # a measure change (grid only) superseded by a pair click (pair only) before it
    # finished: the grid is still recomputed for the new measure
    w = quiet(ProfileWidget, session_of(frame), debounce=0.0)
    assert w.wait(60)
    started, release = threading.Event(), threading.Event()
    real = w._compute

    def held(gen, parts, snap):
        if "grid" in parts and not started.is_set():
            started.set()
            assert release.wait(60)
        return real(gen, parts, snap)

    w._compute = held
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.measure = "nmi"
        assert started.wait(60)
        w.selected_pair = ["weight_kg", "weight_lb"]
        release.set()
        assert w.wait(60)
    assert w._grid_meta["measure"] == "nmi" and w._pair["a"] == "weight_kg"
    w.close()

def test_surprising_rows_view_hides_values_under_min_count(frame):
    from infoscope.widgets import SurprisingRowsWidget

    w = widget(frame, cls=SurprisingRowsWidget)
    data = json.loads(w._surprising)
    assert w._view == "surprising" and len(data["rows"]) == 20 and data["tree"]["edges"]
    assert any(c["value"] is not None for c in data["cells"][0])
    quiet(setattr, w, "min_count", 10)
    data = json.loads(w._surprising)
    assert data["hidden_values"] and all(c["value"] is None for cells in data["cells"] for c in cells)
    quiet(setattr, w, "surprise_n", 5)
    assert len(json.loads(w._surprising)["rows"]) == 5


# ------------------------------------------------------------------ generations, debounce, worker
def test_burst_of_50_changes_shows_the_final_setting(frame):
    w = quiet(ProfileWidget, session_of(frame), debounce=0.05)
    assert w.wait(30)
    applied = []
    w.observe(lambda ch: applied.append(ch["new"]), names="_entropy")
    rng = np.random.default_rng(1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        for b in rng.integers(2, 30, size=49):
            w.bins = int(b)
        w.bins = 7
        assert w.wait(60)
    assert w._status["state"] == "idle" and w._status["generation"] == w.generation
    assert_same_entropy(w, direct_entropy(frame, bins=7))
    assert 1 <= len(applied) < 10, "rapid changes should collapse into a few recomputes"
    w.close()


def test_first_change_after_a_quiet_spell_starts_at_once(frame):
    # Leading-edge debounce: with a 1.5 s debounce, a lone change is submitted at
    # once (no debounce timer is started for it); changes made while a recompute is
    # pending wait for one trailing recompute, which shows the last of them
    # (generation rule kept).  No wall-clock bound is asserted.
    w = quiet(ProfileWidget, session_of(frame), debounce=1.5)
    assert w.wait(30)
    runs = []
    original = w._compute
    w._compute = lambda gen, parts, snap: (runs.append(snap["session"]["bins"]), original(gen, parts, snap))[1]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.bins = 8
        assert w._timer is None, "the first change should not wait for the debounce"
        assert w.wait(60) and w.session.settings["bins"] == 8
        assert runs == [8] and w._timer is None
        w.bins = 9                       # leads again (nothing pending) ...
        w.bins = 10                      # ... this one waits: 9 is pending
        w.bins = 11
        time.sleep(0.5)
        assert w._timer is not None and w.generation < w._requested
        assert w.wait(10)
    assert runs[0] == 8 and runs[-1] == 11 and 10 not in runs and len(runs) <= 3
    assert_same_entropy(w, direct_entropy(frame, bins=11))
    w.close()


def test_pairs_are_estimated_once_per_recompute(frame):
    # the grid's matrix comes from the pairs table of the same recompute: after a
    # bins change the matrix call estimates no pair again (ProfileSession.last_estimated),
    # and the pairs estimated are only those touching a re-binned (numeric or datetime) column
    w = widget(frame)
    estimated = []
    original = w.session.pairs
    w.session.pairs = lambda *a, **k: (original(*a, **k), estimated.append(w.session.last_estimated))[0]
    quiet(setattr, w, "bins", 5)
    assert len(estimated) >= 1 and all(e == () for e in estimated[1:]), estimated
    kinds = entropy_rows(w)["kind"]
    binned = set(kinds.index[kinds.isin(["numeric", "datetime"])])
    assert binned and estimated[0]
    assert all(a in binned or b in binned for a, b in estimated[0])
    # and the grid is the matrix of a fresh session with those settings
    names = w._grid_meta["names"]
    got = np.frombuffer(w._grid_values, dtype=np.float32).reshape(len(names), len(names))
    expected = quiet(session_of(frame, bins=5).matrix, order="cluster")
    np.testing.assert_allclose(got, expected.loc[names, names].to_numpy(dtype=float), rtol=1e-5, atol=1e-6)


class SlowSession(ProfileSession):
    """A session whose entropy() is slow for bins=3 (to race two requests)."""

    def entropy(self):
        if self.settings["bins"] == 3:
            time.sleep(0.6)
        return super().entropy()


def test_late_result_for_old_setting_never_replaces_newer(frame):
    s = quiet(SlowSession, frame, n_boot=0)
    w = quiet(ProfileWidget, s, debounce=0.0)
    assert w.wait(30)
    shown = []
    w.observe(lambda ch: shown.append(json.loads(ch["new"])["rows"]), names="_entropy")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.bins = 3           # slow job starts on the worker
        time.sleep(0.2)
        w.bins = 5           # newer request while the old one runs
        assert w.wait(30)
    bins3 = json.loads(quiet(ProfileWidget, session_of(frame, bins=3), threaded=False)._entropy)["rows"]
    assert bins3 not in shown
    assert_same_entropy(w, direct_entropy(frame, bins=5))
    w.close()


def test_progress_lines_only_for_slow_recomputes(frame, monkeypatch):
    # a recompute quicker than PROGRESS_AFTER goes from "computing" straight to its
    # numbers (no progress messages in between); a slow one (SlowSession sleeps 0.6 s
    # for bins=3, beyond the default 0.25 s) reports its steps with increasing progress.
    # The quick case is made quick by the rule, not by the machine: under load a
    # 600-row recompute can take longer than 0.25 s, so the threshold is raised there.
    from infoscope.widgets import scheduler

    s = quiet(SlowSession, frame, n_boot=0)
    w = quiet(ProfileWidget, s, threaded=False)
    seen = []
    w.observe(lambda ch: seen.append(ch["new"]), names="_status")
    with monkeypatch.context() as m:
        m.setattr(scheduler, "PROGRESS_AFTER", 600.0)
        quiet(setattr, w, "bins", 5)
    assert [st["state"] for st in seen] == ["computing", "idle"]
    seen.clear()
    quiet(setattr, w, "bins", 3)
    steps = [st["progress"] for st in seen if st["state"] == "computing"][1:]
    assert len(steps) >= 2 and steps == sorted(steps) and seen[-1]["state"] == "idle"


def test_cancel_message_stops_and_restores_controls(frame):
    s = quiet(SlowSession, frame, n_boot=0, bins=16)
    w = quiet(ProfileWidget, s, debounce=0.0)
    assert w.wait(30)
    before = w._entropy
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.bins = 3
        time.sleep(0.2)
        assert w._status["state"] == "computing"
        w._handle_custom_msg({"type": "cancel"}, [])   # what the Cancel button sends
        assert w.wait(30)
    assert w._status["state"] == "idle" and "Cancelled" in w._status["message"]
    assert w.bins == 16 and w._entropy == before
    w.close()


def test_recompute_runs_off_the_calling_thread(frame):
    seen = []

    class Recording(ProfileSession):
        def entropy(self):
            seen.append(threading.current_thread().name)
            return super().entropy()

    w = quiet(ProfileWidget, quiet(Recording, frame, n_boot=0), debounce=0.0)
    assert w.wait(30)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.bins = 6
        assert w.wait(30)
    assert seen[0] == threading.current_thread().name   # first view: in the constructor
    assert seen[-1].startswith("infoscope-widget")        # later ones: the worker
    w.close()


def test_large_frame_first_view_is_a_labelled_sample(frame):
    class Recording(ProfileWidget):
        def _apply(self, gen, result, notes, snap):
            if "_entropy" in result:
                self.history = getattr(self, "history", []) + [json.loads(result["_entropy"])]
            super()._apply(gen, result, notes, snap)

    w = quiet(Recording, session_of(frame), preview_rows=200, threaded=False)
    first, last = w.history[0], w.history[-1]
    assert first["sampled"] == 200 and max(r[3] for r in first["rows"]) == 200
    assert last["sampled"] is None and max(r[3] for r in last["rows"]) == len(frame)
    assert_same_entropy(w, direct_entropy(frame))


# ------------------------------------------------------------------ errors
@pytest.mark.parametrize(("trait", "value", "needle"), [
    ("target", "no such column", "target"),
    ("strategy", "bogus", "strategy='bogus' is not valid"),
    ("selected_pair", ["depot", "nope"], "selected_pair"),
    ("column_bins", {"nope": 4}, "column_bins"),
])
def test_errors_surface_in_status(frame, trait, value, needle):
    w = widget(frame)
    before = w._entropy
    setattr(w, trait, value)
    assert w._status["state"] == "error"
    assert needle in w._status["message"] and repr(value if not isinstance(value, list) else value[1]) in w._status["message"] \
        or needle in w._status["message"]
    assert w._entropy == before  # the last good numbers stay on screen


def test_error_then_recovery(frame):
    w = widget(frame)
    w.strategy = "bogus"
    assert w._status["state"] == "error"
    w.strategy = "uniform"
    assert w._status["state"] == "idle"
    assert_same_entropy(w, direct_entropy(frame, strategy="uniform"))


def test_session_warnings_become_notes(frame):
    w = widget(frame, selected_pair=["weight_kg", "weight_lb"])  # 16 x 16 cells for 600 rows
    assert any("SmallSampleWarning" in note for note in w._status["notes"])


def test_needs_a_session():
    with pytest.raises(TypeError, match="ProfileSession"):
        ProfileWidget(pd.DataFrame({"a": [1, 2]}))


# ------------------------------------------------------------------ sharing and escaping
def test_mimebundle_has_widget_view_and_static_picture(frame):
    w = widget(frame)
    data, _meta = w._repr_mimebundle_()
    assert data["application/vnd.jupyter.widget-view+json"]["model_id"] == w.model_id
    svg = data["image/svg+xml"]
    assert svg.lstrip().startswith(("<svg", "<?xml"))
    html = data["text/html"]
    assert html.startswith("<img ") and html.count("<") == 1
    encoded = html.split("data:image/svg+xml;base64,", 1)[1].split('"', 1)[0]
    assert base64.b64decode(encoded).decode("utf-8") == svg
    assert len(repr(w)) < 120  # no trait dump in text/plain


def test_payload_is_json_and_carries_pairs(frame):
    w = widget(frame, selected_pair=["depot", "service"])
    p = w.payload(top_pairs=3)
    text = json.dumps(p, allow_nan=False)
    back = json.loads(text)
    assert back["format"] == "infoscope-profile/1" and back["view"] == "profile"
    assert set(back["binary"]) == {"_grid_values", "_grid_n", "_grid_q", "_grid_reliability"}
    raw = base64.b64decode(back["state"]["_grid_values"])
    assert raw == w._grid_values
    assert "depot\u0000service" in back["pair_cache"] and 2 <= len(back["pair_cache"]) <= 4
    for key, view in back["pair_cache"].items():
        assert key == view["a"] + "\u0000" + view["b"]


def test_markup_names_travel_as_plain_data():
    evil = "<img src=x onerror=alert(1)>"
    value = "<script>alert(2)</script>"
    rng = np.random.default_rng(3)
    df = pd.DataFrame({evil: rng.choice([value, "a"], 200), "y": rng.choice(["u", "v"], 200)})
    w = quiet(ProfileWidget, quiet(ProfileSession, df, n_boot=0), threaded=False, selected_pair=[evil, "y"])
    assert json.loads(w._entropy)["rows"][0][0] == evil        # the exact name, as a JSON value
    assert w._grid_meta["names"].count(evil) == 1
    assert value in w._pair["rows"] and w._pair["a"] == evil
    data, _ = w._repr_mimebundle_()
    svg = data["image/svg+xml"]
    assert evil not in svg and value not in svg               # escaped in the picture
    assert data["text/html"].count("<img ") == 1              # only our own tag


def test_displayed_picture_follows_the_view_without_touching_it(frame, monkeypatch):
    import IPython.display as ipd

    shown, updated = [], []
    monkeypatch.setattr(ipd, "display", lambda data, raw=False, display_id=None, **kw: shown.append((data, display_id)))
    monkeypatch.setattr(ipd, "update_display", lambda data, raw=False, display_id=None, **kw: updated.append((data, display_id)))
    w = widget(frame, picture_delay=0.05)
    w._ipython_display_()
    # two outputs: the live view (no picture in it, no display id: never updated) ...
    (view, view_id), (data, display_id) = shown
    assert view_id is None and "application/vnd.jupyter.widget-view+json" in view
    assert "image/svg+xml" not in view and "text/html" not in view
    # ... and the static picture under its own display id, hidden beside a drawn live view
    assert display_id and "image/svg+xml" in data and "application/vnd.jupyter.widget-view+json" not in data
    assert 'class="isc-static"' in data["text/html"] and ":has(.isc-root)" in data["text/html"]
    w.bins = 4
    deadline = time.monotonic() + 10
    while not updated and time.monotonic() < deadline:
        time.sleep(0.02)
    assert updated, "the static picture was not refreshed after the view changed"
    new, same_id = updated[-1]
    assert same_id == display_id and new["image/svg+xml"] != data["image/svg+xml"]
    assert all("application/vnd.jupyter.widget-view+json" not in d for d, _ in updated)  # the view is left alone


def test_threaded_widget_shows_at_once_and_fills_in(frame, monkeypatch):
    import IPython.display as ipd

    shown, updated = [], []
    monkeypatch.setattr(ipd, "display", lambda data, raw=False, display_id=None, **kw: shown.append((data, display_id)))
    monkeypatch.setattr(ipd, "update_display", lambda data, raw=False, display_id=None, **kw: updated.append((data, display_id)))
    gate = threading.Event()
    original = ProfileWidget._check_settings

    def gated(self):  # the first view cannot finish before the widget is shown
        gate.wait(120)
        return original(self)

    monkeypatch.setattr(ProfileWidget, "_check_settings", gated)
    w = quiet(ProfileWidget, session_of(frame), picture_delay=0.05, first_view="background")
    assert w._status["state"] == "computing" and "first view" in w._status["message"]
    assert not w._entropy
    w._ipython_display_()
    (_, _), (placeholder, display_id) = shown
    assert "image/svg+xml" not in placeholder and "computing" in placeholder["text/plain"]
    with warnings.catch_warnings():  # warning filters are process-wide: keep ours open meanwhile
        warnings.simplefilter("ignore", InfoscopeWarning)
        gate.set()
        assert w.wait(120) and w._status["state"] == "idle", w._status
    assert_same_entropy(w, direct_entropy(frame))
    deadline = time.monotonic() + 60
    while not updated and time.monotonic() < deadline:
        time.sleep(0.02)
    assert updated and updated[-1][1] == display_id and "image/svg+xml" in updated[-1][0]
    w.close()


def test_threaded_preview_then_full_data_and_wait_covers_both(frame):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w = ProfileWidget(session_of(frame), preview_rows=200, first_view="background")  # 600 rows: sampled first
        assert w._status["state"] == "computing" and "seeded sample of 200 rows" in w._status["message"]
        assert w.wait(60)
    data = json.loads(w._entropy)
    assert data["rows"] and w.session.settings["sample"] is None  # the full data, not the sample
    assert_same_entropy(w, direct_entropy(frame))
    w.close()


def test_a_session_started_on_the_preview_sample_ends_on_the_full_data(frame):
    # sampled_start: the session was built on the preview's sample (df.info_profile()
    # on a big frame does so to show the view sooner); the full data follow
    class Recording(ProfileWidget):
        def _apply(self, gen, result, notes, snap):
            if "_entropy" in result:
                self.history = getattr(self, "history", []) + [json.loads(result["_entropy"])]
            super()._apply(gen, result, notes, snap)

    w = quiet(Recording, session_of(frame, sample=200), threaded=False, sampled_start=True)
    first, last = w.history[0], w.history[-1]
    assert first["sampled"] == 200 and last["sampled"] is None
    assert w.session.sampled is None and w._meta["sampled"] is None  # the caution no longer says sampled
    assert_same_entropy(w, direct_entropy(frame))
    with pytest.raises(ValueError, match="sampled_start=True needs a session built with sample="):
        quiet(ProfileWidget, session_of(frame), threaded=False, sampled_start=True)


def test_accessor_starts_a_big_frame_on_its_sample_and_fills_in(frame, monkeypatch):
    import infoscope.widgets.profile as profile_module

    # "big" for this test: more than 300 rows and 1,000 cells (the real limits are 200,000 rows, 2M cells)
    monkeypatch.setattr(profile_module, "PREVIEW_ROWS", 300)
    monkeypatch.setattr(profile_module, "BACKGROUND_FIRST_VIEW_CELLS", 1_000)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w = frame.info_profile(bins=16, n_boot=0)
        assert w._status["state"] == "computing"       # shown at once, computed on the worker
        assert w.wait(120), w._status
    assert w._status["state"] == "idle" and w.session.sampled is None
    assert_same_entropy(w, direct_entropy(frame))
    w.close()


@pytest.mark.parametrize("name", ["ProfileWidget", "EntropyBarsWidget", "InformationGridWidget",
                                  "PairViewWidget", "RelevanceWidget", "SelectionWidget", "SurprisingRowsWidget"])
def test_public_widgets_have_numpydoc(name):
    import inspect

    import infoscope.widgets as widgets

    doc = inspect.getdoc(getattr(widgets, name))
    for section in ("Parameters", "Returns", "Examples"):
        assert f"\n{section}\n---" in doc, f"{name} lacks {section}"
    for method in ("payload", "wait", "cancel", "picture_svg"):
        doc = inspect.getdoc(getattr(getattr(widgets, name), method))
        for section in ("Returns", "Examples"):
            assert f"\n{section}\n---" in doc, f"{name}.{method} lacks {section}"


# ------------------------------------------------------------------ exports
def test_to_html_writes_the_report_of_this_view(frame, tmp_path):
    import html as html_lib

    from infoscope.report.html import to_html

    evil = "<b onmouseover=alert(1)>depot</b>"
    df = frame.rename(columns={"depot": evil})
    w = quiet(ProfileWidget, quiet(ProfileSession, df, n_boot=0), threaded=False)
    out = quiet(w.to_html, tmp_path / "p.html", min_count=10)
    assert out == tmp_path / "p.html" and out.exists()
    text = out.read_text(encoding="utf-8")
    assert text == quiet(to_html, w, None, min_count=10)       # the same call, path or not
    assert text == quiet(w.to_html, min_count=10)               # no path: the text itself
    assert evil not in text                                     # column names are data
    assert html_lib.escape(evil) in text or "\\u003c" in text   # ... shown escaped
    assert "http://" not in text.replace("http://www.w3.org", "") and "https://" not in text
    # min_count reaches the report: a threshold above every cell count hides more
    assert quiet(w.to_html, min_count=10_000) != text


def test_charts_are_the_profile_charts_of_this_session(frame):
    import scipy.stats

    w = widget(frame, target="late")
    w.session.update(estimator="plugin")
    charts = quiet(w.charts, pair=("depot", "service"), min_count=1)
    assert {"entropy", "grid", "pair", "relevance"} <= set(charts)
    rows = {r["column"]: r for r in charts["entropy"].to_dict()["data"]["values"]}
    # plug-in entropy of a complete column: scipy.stats.entropy of its value counts, base 2
    expected = scipy.stats.entropy(frame["service"].value_counts().to_numpy(), base=2)
    assert rows["service"]["entropy"] == pytest.approx(expected, rel=1e-12)
    # the pair chart counts what pandas.crosstab counts (kw passed through)
    cells = {(r["row"], r["col"]): r["count"] for r in charts["pair"].to_dict()["data"]["values"]}
    table = pd.crosstab(frame["depot"], frame["service"])
    for a in table.index:
        for b in table.columns:
            assert cells.get((str(a), str(b)), 0) == table.loc[a, b]
    with pytest.raises(TypeError):
        w.charts(no_such_option=1)


def test_nsb_says_what_it_costs_before_it_starts(frame):
    w = widget(frame)
    seen = []
    w.observe(lambda change: seen.append(change["new"].get("message", "")), names=["_status"])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        w.estimator = "nsb"
    said = [m for m in seen if m.startswith("NSB estimator: up to")]
    assert said and seen.index(said[0]) < len(seen) - 1, seen  # before the numbers, not after
    p = len(w.session.names)
    integrals = p + p * (p - 1) // 2 + p  # entropy bars + grid (no target here)
    assert f"{integrals:,} posterior integrals" in said[0]
    assert w._status["state"] == "idle" and json.loads(w._entropy)["estimator"] == "nsb"


# ---------------------------------------------------------------- drift view (reference=)
def test_a_reference_adds_the_drift_record_and_follows_the_controls():
    # the widget's _drift is the same record as df.info_profile.drift_report(ref).to_dict():
    # the demo batch is flagged exactly on its planted columns (infoscope.datasets.PLANTED)
    from infoscope.datasets import PLANTED, make_deliveries, make_deliveries_batch

    ref = make_deliveries(n=3000, seed=0)
    cur = make_deliveries_batch(n=2000, seed=1)
    w = quiet(ProfileWidget, quiet(ProfileSession, cur, n_boot=0), reference=ref, threaded=False)
    record = json.loads(w._drift)
    direct = quiet(quiet(ProfileSession, cur, n_boot=0).drift_report, ref, pairs=True).to_dict()
    assert record["schema"] == "infoscope-drift"
    assert {c["column"]: c["flag"] for c in record["columns"]} == {c["column"]: c["flag"] for c in direct["columns"]}
    shifted = {c["column"] for c in record["columns"] if c["flag"] in ("moderate", "major")}
    assert shifted and shifted <= set(PLANTED["drift"])
    first = record["generation"]
    # a pair click or a new grid order does not redo the drift splits ...
    quiet(setattr, w, "selected_pair", [cur.columns[2], cur.columns[3]])
    quiet(setattr, w, "order", "name")
    assert json.loads(w._drift)["generation"] == first
    # ... a new binning does, and the export carries the record
    quiet(setattr, w, "bins", 8)
    assert json.loads(w._drift)["generation"] > first
    assert quiet(w.payload)["state"]["_drift"]["schema"] == "infoscope-drift"
    w.close()


def test_without_a_reference_there_is_no_drift_record(frame):
    w = quiet(ProfileWidget, quiet(ProfileSession, frame.head(500), n_boot=0), threaded=False)
    assert w._drift == "" and quiet(w.payload)["state"]["_drift"] is None
    w.close()


def test_the_accessor_and_the_export_take_a_reference():
    from infoscope.datasets import make_deliveries, make_deliveries_batch

    ref, cur = make_deliveries(n=1500, seed=0), make_deliveries_batch(n=800, seed=1)
    page = quiet(cur.info_profile.to_html, reference=ref, n_boot=0)
    assert '"infoscope-drift"' in page
    with pytest.raises(TypeError, match="reference"):
        quiet(ProfileWidget, quiet(ProfileSession, cur, n_boot=0), reference=[1, 2, 3], threaded=False)


def test_the_slider_starts_at_the_row_dependent_default(frame):
    # the session's default bins="rows" (floor(sqrt(n / 10)) within [2, 16],
    # infoscope.encode.binning.rows_bin_count) reaches the slider as its number
    from infoscope.encode.binning import rows_bin_count

    w = quiet(ProfileWidget, quiet(ProfileSession, frame, n_boot=0), threaded=False)
    assert w.bins == rows_bin_count(len(frame)) == 7 and w.strategy == "quantile"
    w.close()


def test_the_default_rows_rule_stays_while_the_slider_shows_its_number():
    # the slider shows floor(sqrt(n / 10)) within 2..16 for the frame's rows (16 for 4,000 rows); a column
    # with missing values gets the count of its own values under the rule (6 for its 400 values): the
    # first view must keep that, not re-bin the column into the slider's 16 (README, bins="rows")
    rng = np.random.default_rng(4)
    x = rng.normal(size=4000)
    sparse = np.where(rng.random(4000) < 0.9, np.nan, rng.normal(size=4000))
    n_values = int(np.count_nonzero(~np.isnan(sparse)))
    df = pd.DataFrame({"x": x, "sparse": sparse})
    s = quiet(ProfileSession, df, n_boot=0)
    w = quiet(ProfileWidget, s, threaded=False)
    assert w.bins == 16 and s.settings["bins"] == "rows"
    expected = min(16, max(2, int(np.floor(np.sqrt(n_values / 10)))))  # the rule, written out
    assert s.column("sparse").k == expected < 16
    w.bins = 8
    assert s.settings["bins"] == 8 and s.column("sparse").k == 8
    w.bins = 16
    assert s.settings["bins"] == "rows" and s.column("sparse").k == expected
