"""Browser tier: the drift panel on the harness page (headless Chromium, keys pressed).

The page is the harness of ``test_views.py`` (the bundled front end's ``render``
on ``modelFromPayload``); the payloads are ``infoscope.views.payload`` of a batch
against a reference, computed in this module, so every number on screen is
infoscope's own. The checks read the numbers back from the record the page was given.
"""
from __future__ import annotations

import json
import sys
import warnings
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from _waits import eventually  # noqa: E402
from test_views import CSS, ESM, HARNESS  # noqa: E402

ACTIVE_KEEP = "document.activeElement && document.activeElement.dataset.keep"


def _quiet(fn, *args, **kwargs):
    from infoscope import InfoscopeWarning

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        return fn(*args, **kwargs)


@pytest.fixture(scope="module")
def drift_payloads():
    from infoscope.datasets import make_deliveries
    from infoscope.frame.session import ProfileSession
    from infoscope.views.payload import payload

    reference = make_deliveries(800, seed=3)
    batch = make_deliveries(800, seed=4)
    batch["distance_km"] = batch["distance_km"] * 1.6  # a planted drift
    session = _quiet(ProfileSession, batch, n_boot=0)
    plain = _quiet(payload, session, reference=reference, top_pairs=0)
    hidden = _quiet(payload, session, reference=reference, top_pairs=0, min_count=10)
    over = _quiet(payload, session, reference=reference, top_pairs=0,
                  drift_over=("dispatched_at", "4W"))
    return {"base": plain, "hidden": hidden, "over": over, "answers": []}


@pytest.fixture
def page_of(served, web, drift_payloads):
    served.put_file("/profile.js", ESM)
    served.put_file("/profile.css", CSS)
    served.put("/payloads.json", json.dumps(drift_payloads))
    served.put("/harness.html", HARNESS)

    def open_(query: str = ""):
        web.goto(served.url("/harness.html" + query))
        web.page.wait_for_function("window.__ready === true", timeout=15_000)
        web.page.locator(".isc-drift").wait_for(state="visible", timeout=20_000)
        return web.page

    return open_


def _order(page):
    return page.eval_on_selector_all(".isc-drift .isc-drow", "rows => rows.map(r => r.dataset.column)")


def _redraw(page, name="_drift"):
    """New numbers arrive (the same record under a new generation): the panel redraws."""
    page.evaluate(f"(n) => {{ const m = window.__model; const v = m.get(n); m.set(n, {{...v, generation: (v.generation || 0) + 1}}); }}", name)


def test_sort_control_by_keyboard_keeps_its_choice_and_focus(page_of, web, drift_payloads, artifacts):
    page = page_of("?payload=base&offline")
    record = drift_payloads["base"]["state"]["_drift"]
    cols = record["columns"]
    by_psi = sorted(cols, key=lambda r: (-(r["psi"] if r["psi"] is not None else -1), r["column"]))
    assert _order(page)[0] == by_psi[0]["column"] == "distance_km"
    page.locator(".isc-dsortbtn[aria-checked=true]").focus()
    page.keyboard.press("ArrowRight")  # PSI -> PSI beyond chance
    eventually(page, ACTIVE_KEEP, "drift-sort:beyond")
    beyond = [r for r in cols if r["psi"] is not None and r["psi_chance"] is not None]
    beyond.sort(key=lambda r: (-(r["psi"] - r["psi_chance"]), r["column"]))
    assert _order(page)[:len(beyond)] == [r["column"] for r in beyond]
    page.keyboard.press("ArrowRight")  # -> q-value, from the smallest
    eventually(page, ACTIVE_KEEP, "drift-sort:q")
    shown_q = [next(r["q_value"] for r in cols if r["column"] == c) for c in _order(page)]
    finite = [q for q in shown_q if q is not None]
    assert finite == sorted(finite) and shown_q[:len(finite)] == finite
    page.keyboard.press("End")  # -> name
    eventually(page, ACTIVE_KEEP, "drift-sort:name")
    names = _order(page)
    assert names == page.evaluate("(n) => [...n].sort((a, b) => a.localeCompare(b))", names)
    # new numbers arrive: the order and the focused control stay
    _redraw(page)
    page.wait_for_timeout(150)
    eventually(page, ACTIVE_KEEP, "drift-sort:name", message="the sort control lost focus")
    assert _order(page) == names
    # the view taken down and drawn again for the same model keeps the choice
    page.evaluate("window.__rerender()")
    page.locator(".isc-drift").wait_for(state="visible")
    assert page.get_attribute(".isc-dsortbtn[aria-checked=true]", "data-sort") == "name"
    assert _order(page) == names
    assert web.page_errors == [] and web.outside_requests == []
    page.locator(".isc-drift").screenshot(path=str(artifacts / "drift-sorted.png"))


def test_enter_opens_the_bins_a_redraw_keeps_them_escape_closes(page_of, web, drift_payloads, artifacts):
    page = page_of("?payload=base&offline")
    record = drift_payloads["base"]["state"]["_drift"]
    col = next(r for r in record["columns"] if r["column"] == "distance_km")
    row = page.locator(".isc-drift .isc-drow[data-column='distance_km']")
    row.focus()
    page.keyboard.press("Enter")
    detail = page.locator(".isc-ddetail")
    detail.wait_for(state="visible")
    assert detail.get_attribute("data-column") == "distance_km"
    assert row.get_attribute("aria-expanded") == "true"
    bins = detail.locator(".isc-dbin:not(.isc-daxis)")
    assert bins.count() == len(col["bins"])
    # both distributions on the shared alphabet, each bin's contribution in nats
    first = col["bins"][0]
    assert bins.first.get_attribute("data-label") == first["label"]
    text = bins.first.text_content()
    assert f"{first['contribution']:.3g}"[:4] in text or f"{first['contribution']:.3f}" in text, (text, first)
    assert "nats" in detail.text_content() and "share of rows" in detail.text_content()
    # the contributions sum to the column's PSI (bin_rows: PSI = sum (a - e) ln(a / e), Siddiqi 2006)
    assert abs(sum(b["contribution"] for b in col["bins"]) - col["psi"]) < 1e-9
    detail.screenshot(path=str(artifacts / "drift-detail.png"))
    # a redraw keeps the open column and the focused row
    _redraw(page)
    page.wait_for_timeout(150)
    assert page.locator(".isc-ddetail").get_attribute("data-column") == "distance_km"
    eventually(page, ACTIVE_KEEP, "drift:distance_km", message="the row lost focus on a redraw")
    # Escape closes and leaves focus on the row; Space opens another
    page.keyboard.press("Escape")
    eventually(page, "document.querySelectorAll('.isc-ddetail').length", 0)
    eventually(page, ACTIVE_KEEP, "drift:distance_km")
    other = page.locator(".isc-drift .isc-drow").nth(1)
    other.focus()
    page.keyboard.press(" ")
    eventually(page, "document.querySelector('.isc-ddetail') && document.querySelector('.isc-ddetail').dataset.column",
               other.get_attribute("data-column"))
    # Escape from the detail's own close button works too
    page.locator(".isc-dclose").focus()
    page.keyboard.press("Escape")
    eventually(page, "document.querySelectorAll('.isc-ddetail').length", 0)
    assert web.page_errors == []


def test_hidden_bins_stay_hidden_in_the_detail(page_of, web, drift_payloads):
    page = page_of("?payload=hidden&offline")
    record = drift_payloads["hidden"]["state"]["_drift"]
    assert record["settings"]["min_count"] == 10
    col = next(r for r in record["columns"] if r["bins"] and any(b.get("hidden") for b in r["bins"]))
    page.locator(f".isc-drift .isc-drow[data-column='{col['column']}']").click()
    detail = page.locator(".isc-ddetail")
    detail.wait_for(state="visible")
    for b in col["bins"]:
        row = detail.locator(f".isc-dbin[data-label='{b['label']}']")
        if b.get("hidden"):
            assert row.get_attribute("data-hidden") == b["hidden"]
            assert "hidden" in row.text_content()
            if b["contribution"] is None:
                assert row.locator(".isc-dcon").count() == 0
        row.hover()
        tip = page.text_content(".isc-tip")
        for side in ("reference", "current"):
            if b[side] is None:
                assert ("hidden" in tip), tip
    assert "hidden" in detail.locator(".isc-legend").text_content()
    assert web.page_errors == []


def test_relationship_drift_lists_the_pairs_that_moved_most(page_of, web, drift_payloads):
    page = page_of("?payload=base&offline")
    pairs = drift_payloads["base"]["state"]["_drift"]["pairs"]
    rows = page.locator(".isc-dpairs .isc-dprow:not(.isc-daxis)")
    assert rows.count() == min(10, len(pairs))
    for i in range(rows.count()):
        p = pairs[i]
        assert rows.nth(i).get_attribute("data-keep") == f"drift-pair:{p['a']}\u0000{p['b']}"
        assert rows.nth(i).get_attribute("data-flag") == p["flag"]
    moved = [p for p in pairs if p["flag"] in ("stronger", "weaker")]
    assert (page.locator(".isc-dnone").count() == 1) == (not moved)
    rows.first.focus()
    tip = page.text_content(".isc-tip")
    assert "MI in the reference" in tip and "random splits" in tip
    assert web.page_errors == []


def test_strip_over_time_colours_findings_only_and_keys_move_its_cursor(page_of, web, drift_payloads, artifacts):
    page = page_of("?payload=over&offline")
    over = drift_payloads["over"]["state"]["_drift_over"]
    assert over["reference"] == "frame" and over["every"] == "4W"
    strip = page.locator(".isc-dstrip")
    strip.wait_for(state="visible")
    cells = strip.locator(".isc-dgrid .isc-dcell")
    assert cells.count() == len(over["columns"]) * len(over["periods"])
    flag_of = {(c["column"], c["period"]): c["flag"] for c in over["cells"]}
    tones = page.eval_on_selector_all(".isc-dgrid .isc-dcell",
                                      "cs => cs.map(c => [c.dataset.column, c.dataset.period, c.dataset.tone])")
    for column, period, tone in tones:
        flag = flag_of.get((column, period))
        assert (tone in ("major", "moderate")) == (flag in ("major", "moderate")), (column, period, flag, tone)
        if tone in ("major", "moderate"):
            assert tone == flag
    assert any(t in ("major", "moderate") for *_, t in tones), "the planted shift shows in some period"
    # the strip's rows follow the bars' order (PSI: the planted column first)
    assert tones[0][0] == "distance_km"
    grid = strip.locator(".isc-dgrid")
    grid.focus()
    page.keyboard.press("ArrowRight")
    page.keyboard.press("ArrowDown")
    cursor = json.loads(grid.get_attribute("data-cursor"))
    column = page.eval_on_selector_all(".isc-dgrid .isc-name", "ns => ns.map(n => n.textContent)")[1]
    assert cursor == [column, over["periods"][1]["period"]]
    cell = next(c for c in over["cells"] if c["column"] == cursor[0] and c["period"] == cursor[1])
    tip = page.text_content(".isc-tip")
    assert cursor[1] in tip and "PSI" in tip and "q" in tip, tip
    if cell["psi"] is not None:
        assert f"{cell['psi']:.3g}"[:4] in tip or f"{cell['psi']:.3f}" in tip, (tip, cell)
    # new numbers arrive: focus and cursor stay
    _redraw(page, "_drift_over")
    page.wait_for_timeout(150)
    eventually(page, ACTIVE_KEEP, "drift-strip", message="the strip lost focus on a redraw")
    assert json.loads(page.get_attribute(".isc-dgrid", "data-cursor")) == cursor
    legend = strip.locator(".isc-legend").text_content()
    assert "major" in legend and "moderate" in legend and "no rows" in legend
    assert web.page_errors == [] and web.outside_requests == []
    strip.screenshot(path=str(artifacts / "drift-strip.png"))
