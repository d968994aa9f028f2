"""The offline HTML export with a reference: the drift panel, its bins and the strip over time.

The file of ``to_html(session, reference=..., drift_over=..., min_count=...)`` is
opened in headless Chromium with every non-loopback request aborted and counted.
A hostile column name (markup) is in both frames: it must show as text.
"""
from __future__ import annotations

import json
import re
import warnings

import pytest

from infoscope.datasets import make_deliveries
from infoscope.frame.session import ProfileSession
from infoscope.report.html import to_html

HOSTILE = "<img src=x onerror=window.__pwned=1>"
MIN_COUNT = 20


@pytest.fixture(scope="module")
def exported(tmp_path_factory):
    keep = ["dispatched_at", "depot", "service", "distance_km", "weight_kg", "late"]
    reference = make_deliveries(1_000, seed=3)[keep].rename(columns={"service": HOSTILE})
    batch = make_deliveries(300, seed=4)[keep].rename(columns={"service": HOSTILE})
    batch["distance_km"] = batch["distance_km"] * 1.6  # a planted drift
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the demo's planted data-quality warnings
        session = ProfileSession(batch, n_boot=0)
        path = to_html(session, tmp_path_factory.mktemp("drift-export") / "drift.html", min_count=MIN_COUNT,
                       reference=reference, drift_over=("dispatched_at", "4W"))
    return {"path": path, "session": session}


def _payload(text: str) -> dict:
    match = re.search(r'<script type="application/json" id="isc-payload">(.*?)</script>', text, re.S)
    assert match
    return json.loads(match.group(1))


def test_drift_detail_and_strip_work_offline(exported, served, web, artifacts):
    text = exported["path"].read_text(encoding="utf-8")
    state = _payload(text)["state"]
    record, over = state["_drift"], state["_drift_over"]
    assert record["settings"]["min_count"] == MIN_COUNT and over["min_count"] == MIN_COUNT
    url = served.put("/export/drift.html", exported["path"].read_bytes())
    seen = len(served.requests)  # the server is shared by the session's tests
    page = web.page
    web.goto(url)
    page.wait_for_selector("body[data-rendered='yes']", timeout=20_000)
    panel = page.locator(".isc-drift")
    panel.wait_for(state="visible")
    row = panel.locator(".isc-drow[data-column='distance_km']")
    row.focus()
    page.keyboard.press("Enter")
    detail = page.locator(".isc-ddetail")
    detail.wait_for(state="visible")
    bins = next(c for c in record["columns"] if c["column"] == "distance_km")["bins"]
    assert detail.locator(".isc-dbin:not(.isc-daxis)").count() == len(bins)
    page.keyboard.press("Escape")
    page.wait_for_function("document.querySelectorAll('.isc-ddetail').length === 0")
    # the hostile name is text in the bars, the detail and the strip, and runs nothing
    assert HOSTILE in panel.inner_text()
    panel.locator(".isc-drow").filter(has_text=HOSTILE).click()
    assert HOSTILE in detail.inner_text()
    assert page.evaluate("window.__pwned === undefined")
    assert page.evaluate("document.querySelectorAll('img[src=x]').length") == 0
    strip = page.locator(".isc-dstrip .isc-dgrid")
    assert strip.locator(".isc-dcell").count() == len(over["columns"]) * len(over["periods"])
    assert HOSTILE in strip.inner_text()
    panel.screenshot(path=str(artifacts / "drift-export.png"))
    assert web.outside_requests == []
    assert web.page_errors == [] and web.console_errors == []
    assert [r for r in served.requests[seen:] if r.startswith("/export/")] == ["/export/drift.html"]


def test_hidden_counts_are_not_in_the_file(exported):
    # bins the record hides (counts 1 .. MIN_COUNT - 1 and their complements) carry no
    # count, share or contribution in the file; the strip's hidden row counts are null
    state = _payload(exported["path"].read_text(encoding="utf-8"))["state"]

    seen = 0
    for col in state["_drift"]["columns"]:
        for b in col["bins"] or []:
            if b.get("hidden"):
                seen += 1
                assert b["contribution"] is None
                assert b["reference"] is None or b["current"] is None
            for side in ("reference", "current"):
                if b[side] is not None:
                    assert b[side] == 0 or b[side] >= MIN_COUNT
    for c in state["_drift_over"]["cells"]:
        for side in ("n", "n_reference"):
            assert c[side] is None or c[side] == 0 or c[side] >= MIN_COUNT
    assert seen, "the file holds hidden bins (the check above is not empty)"
