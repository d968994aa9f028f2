"""The self-contained HTML export opened in headless Chromium with no network.

Checks: zero outside requests (the ``web`` fixture aborts and records any request
whose host is not loopback), every view renders, a hostile column name and a
hostile value show as text and run nothing, and small-cell suppression holds in
the file itself (nothing to recover from the JSON a reader can open).
"""
from __future__ import annotations

import json
import re
import warnings

import numpy as np
import pytest

from infoscope.datasets import make_deliveries
from infoscope.frame.session import ProfileSession
from infoscope.report.html import to_html
from infoscope.widgets.profile import ProfileWidget

HOSTILE_NAME = "<img src=x onerror=alert(1)>"
HOSTILE_VALUE = "<script>window.__pwned=1</script>"
MIN_COUNT = 10


@pytest.fixture(scope="module")
def exported(tmp_path_factory):
    frame = make_deliveries(3_000, seed=7)
    frame = frame.rename(columns={"booking_channel": HOSTILE_NAME})
    depot = frame["depot"].astype(str).to_numpy(copy=True)
    depot[:40] = HOSTILE_VALUE
    frame["depot"] = depot
    frame = frame.drop(columns=["parcel_ref", "contents", "courier_note"])  # keep the page small
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the demo's planted data-quality warnings
        session = ProfileSession(frame, target="late", n_boot=0)
        widget = ProfileWidget(session, threaded=False, selected_pair=[HOSTILE_NAME, "depot"])
        widget.wait()
        path = to_html(widget, tmp_path_factory.mktemp("export") / "profile.html", min_count=MIN_COUNT)
    yield {"path": path, "session": session, "widget": widget}
    widget.close()


def _payload(text: str) -> dict:
    match = re.search(r'<script type="application/json" id="isc-payload">(.*?)</script>', text, re.S)
    assert match, "the payload element is in the file"
    return json.loads(match.group(1))


def test_export_makes_no_outside_request_and_renders_every_view(exported, served, web, artifacts):
    url = served.put("/export/profile.html", exported["path"].read_bytes())
    seen = len(served.requests)  # the server is shared by the session's tests
    web.goto(url)
    web.page.wait_for_selector("body[data-rendered]", timeout=20_000)
    assert web.page.evaluate("document.body.dataset.rendered") == "yes", web.page.inner_text("body")[:500]
    text = web.page.inner_text("#isc-view")
    for heading in ("Entropy bars", "Information grid", "Pair view", "Relevance"):
        assert heading in text
    # every column of the profile has an entropy bar row
    for name in exported["session"].names:
        assert name in text
    web.screenshot(artifacts / "export.png", full_page=True)
    assert web.outside_requests == []
    assert web.page_errors == [] and web.console_errors == []
    # only the page itself came from the server: nothing else was fetched
    assert [r for r in served.requests[seen:] if r.startswith("/export/")] == ["/export/profile.html"]


def test_hostile_name_and_value_are_text_and_run_nothing(exported, served, web):
    url = served.put("/export/hostile.html", exported["path"].read_bytes())
    web.goto(url)
    web.page.wait_for_selector("body[data-rendered='yes']", timeout=20_000)
    text = web.page.inner_text("body")
    assert HOSTILE_NAME in text
    assert HOSTILE_VALUE in text  # the depot label shows in the pair view of (name, depot)
    assert web.page.evaluate("window.__pwned === undefined")
    assert web.page.evaluate("document.querySelectorAll('img[src=x], #isc-view script').length") == 0
    assert web.dialogs == []


def test_suppression_holds_in_the_file(exported):
    text = exported["path"].read_text(encoding="utf-8")
    payload = _payload(text)
    session = exported["session"]
    views = [payload["state"]["_pair"], *payload["pair_cache"].values()]
    checked = 0
    for view in views:
        if not view or not view.get("counts"):
            continue
        true = session.pair(view["a"], view["b"]).counts.to_numpy()
        shipped = np.array([[np.nan if c is None else c for c in row] for row in view["counts"]], dtype=float)
        small = (true > 0) & (true < MIN_COUNT)
        assert np.isnan(shipped[small]).all(), f"small cells of {view['a']} x {view['b']} are hidden"
        visible = ~np.isnan(shipped)
        assert (shipped[visible] == true[visible]).all()
        if small.any():
            checked += 1
            assert view["row_totals"] is None and view["col_totals"] is None
            for line in [*np.isnan(shipped), *np.isnan(shipped).T]:
                assert line.sum() != 1
            pmi = np.array([[np.nan if c is None else 0 for c in row] for row in view["pmi"]])
            assert np.isnan(pmi[~visible]).all()
    assert checked >= 1, "the export holds at least one pair view with small cells"
    assert f"counts below {MIN_COUNT} are hidden" in text


def test_export_refuses_a_missing_folder(exported, tmp_path):
    with pytest.raises(FileNotFoundError, match="does not exist"):
        to_html(exported["widget"], tmp_path / "nope" / "p.html")


def test_export_stays_interactive_sort_and_saved_pairs(exported, served, web):
    text = exported["path"].read_text(encoding="utf-8")
    payload = _payload(text)
    names = payload["state"]["_grid_meta"]["names"]
    a, b = "weight_kg", "weight_lb"
    assert a + "\u0000" + b in payload["pair_cache"] or b + "\u0000" + a in payload["pair_cache"]
    url = served.put("/export/interactive.html", exported["path"].read_bytes())
    page = web.page
    web.goto(url)
    page.wait_for_selector("body[data-rendered='yes']", timeout=20_000)
    # sort the entropy bars by name: the rows follow
    page.locator(".isc-root select").filter(has=page.locator("option[value=name]")).first.select_option("name")
    shown = page.eval_on_selector_all(".isc-erow[aria-pressed]", "rows => rows.map(r => r.dataset.column)")
    assert shown == sorted(shown, key=str.lower) or shown == sorted(shown)
    # open a saved pair by clicking its grid cell: the pair view shows it without a kernel
    canvas = page.locator(".isc-gridwrap canvas")
    cell = float(canvas.get_attribute("data-cell"))
    offset = float(canvas.get_attribute("data-offset"))
    i, j = names.index(a), names.index(b)
    heads = page.eval_on_selector_all(".isc-phead", "hs => hs.map(h => h.textContent)")
    assert not any(h.startswith("Pair view") and "weight_lb" in h for h in heads)  # another pair first
    canvas.click(position={"x": offset + (j + 0.5) * cell, "y": offset + (i + 0.5) * cell})
    page.wait_for_function("() => [...document.querySelectorAll('.isc-phead')].some((t) => "
                           "t.textContent.startsWith('Pair view') && t.textContent.includes('weight_kg') "
                           "&& t.textContent.includes('weight_lb'))", timeout=5_000)
    assert web.outside_requests == [] and web.page_errors == []


def test_saved_pair_view_labels_only_small_cells_below_the_threshold(exported, served, web):
    # reference: the session's full counts (pandas.crosstab-checked in test_frame);
    # "<10" only where the true count is 1..9, "·" for the complementary cells
    url = served.put("/export/labels.html", exported["path"].read_bytes())
    web.goto(url)
    page = web.page
    page.wait_for_selector("body[data-rendered='yes']", timeout=20_000)
    view = page.evaluate("window.__infoscopeModel.get('_pair')")
    true = exported["session"].pair(view["a"], view["b"]).counts.to_numpy()
    grid = page.eval_on_selector_all(
        ".isc-pair tbody tr", "trs => trs.map(tr => [...tr.querySelectorAll('td:not(.isc-tot)')].map(td => td.textContent))")
    assert np.array(grid).shape == true.shape
    kinds = set()
    for i in range(true.shape[0]):
        for j in range(true.shape[1]):
            if view["counts"][i][j] is None:
                small = 0 < true[i, j] < MIN_COUNT
                assert grid[i][j] == (f"<{MIN_COUNT}" if small else "\u00b7"), (true[i, j], grid[i][j])
                kinds.add(small)
    assert kinds, "the saved pair view has hidden cells"
    notes = page.text_content(".isc-export-notes")
    assert "hidden to protect a small cell" in notes
    # the caution about slightly negative estimates is said once, in the view's caution line
    assert "slightly negative" in page.text_content(".isc-caution") and "slightly negative" not in notes
    assert web.page_errors == []


def test_export_keeps_long_and_right_to_left_names_in_place(tmp_path, served, web, artifacts):
    import sys
    from pathlib import Path

    sys.path.insert(0, str(Path(__file__).parent))
    from _names import CONTAINED, IN_ORDER, LONG, RTL, odd_names_frame
    from _waits import eventually

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        session = ProfileSession(odd_names_frame(), target=RTL, n_boot=0)
        widget = ProfileWidget(session, threaded=False, selected_pair=[RTL, LONG])
        path = to_html(widget, tmp_path / "odd.html")
        widget.close()
    web.goto(served.put("/export/odd.html", path.read_bytes()))
    page = web.page
    page.wait_for_selector("body[data-rendered='yes']", timeout=20_000)
    eventually(page, f"({CONTAINED})()", [], message="a name ran out of its panel in the export")
    for sel, word in ((".isc-pair .isc-punit", "(columns)"), (".isc-relevance .isc-punit", "bits")):
        assert page.evaluate(IN_ORDER, [sel, word]) == "ok", (sel, word)
    assert LONG in page.eval_on_selector_all("bdi.isc-nm", "els => els.map(e => e.title)")
    assert web.outside_requests == [] and web.page_errors == []
    web.screenshot(artifacts / "export-odd-names.png", full_page=True)


def test_export_draws_selection_and_surprising_rows_with_values_hidden(exported, served, web, artifacts):
    payload = _payload(exported["path"].read_text(encoding="utf-8"))
    surprising = json.loads(payload["state"]["_surprising"])
    assert surprising["hidden_values"] and surprising["min_count"] == MIN_COUNT
    assert all(c["value"] is None and c["symbol"] is None for cells in surprising["cells"] for c in cells)
    url = served.put("/export/beyond.html", exported["path"].read_bytes())
    web.goto(url)
    web.page.wait_for_selector("body[data-rendered]", timeout=20_000)
    sel = web.page.inner_text(".isc-selection")
    assert "Selection" in sel and "late" in sel
    steps = json.loads(payload["state"]["_selection"])
    chosen = [r[1] for r in steps["rows"] if r[0] is not None]
    assert chosen and all(name in sel for name in chosen)
    assert "left out: may leak the target" in sel        # the planted leak is listed, not chosen
    sur = web.page.inner_text(".isc-surprising")
    assert "Surprising rows" in sur and "(hidden)" in sur and "values hidden" in sur
    assert web.page.locator(".isc-surtable tbody tr").count() == len(surprising["rows"])
    assert web.page.locator(".isc-treelist li").count() == len(surprising["tree"]["edges"])
    web.page.locator(".isc-selection").screenshot(path=str(artifacts / "export-selection.png"))
    web.page.locator(".isc-surprising").screenshot(path=str(artifacts / "export-surprising.png"))
    assert web.page_errors == [] and web.console_errors == []
