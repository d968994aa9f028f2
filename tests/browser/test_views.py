"""Browser tier: the profile ESM rendered in headless Chromium from a harness page.

The harness imports ``static/profile.js`` (the bundle of ``js/src``), links
``static/profile.css`` (what anywidget injects from ``_css``) and calls the default
export's ``render({model, el})`` with the
small model of ``modelFromPayload``; a fake kernel in the page answers setting
changes with payloads that the real ``ProfileWidget`` computed in this test (so the
numbers on screen are infoscope's own, not invented). Screenshots go to
``test-artifacts/``.
"""
from __future__ import annotations

import json
import sys
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

sys.path.insert(0, str(Path(__file__).parent))
from _names import CONTAINED, IN_ORDER, LONG, RTL  # noqa: E402
from _waits import eventually  # noqa: E402

STATIC = Path(__file__).resolve().parents[2] / "src" / "infoscope" / "widgets" / "static"
ESM = STATIC / "profile.js"
CSS = STATIC / "profile.css"
# JupyterLab's shipped theme stylesheets (jupyterlab is a test dependency)
LAB_THEMES = Path(sys.prefix) / "share" / "jupyter" / "lab" / "themes" / "@jupyterlab"

HARNESS = """<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>infoscope harness</title>
<link rel="stylesheet" href="/profile.css">
<script>
// JupyterLab's own theme stylesheet when asked (?theme=dark|light): its variables
// are what the widget reads inside JupyterLab
const theme = new URLSearchParams(location.search).get("theme");
if (theme) document.write('<link rel="stylesheet" href="/theme-' + theme + '.css">');
// count what ResizeObservers are watching, to catch observers that are never let go
window.__observed = new Set();
const Native = window.ResizeObserver;
window.ResizeObserver = class extends Native {
  observe(t, o) { window.__observed.add([this, t]); this.__targets = (this.__targets || new Set()).add(t); return super.observe(t, o); }
  unobserve(t) { for (const e of window.__observed) if (e[0] === this && e[1] === t) window.__observed.delete(e); return super.unobserve(t); }
  disconnect() { for (const e of [...window.__observed]) if (e[0] === this) window.__observed.delete(e); return super.disconnect(); }
};
</script></head>
<body style="margin:16px;background:var(--jp-layout-color0,#fff)">
<div id="app" style="max-width:1240px"></div>
<script type="module">
import widget, { modelFromPayload, SEQUENTIAL } from "/profile.js";
window.__SEQ = SEQUENTIAL;
const { render } = widget();
const data = await (await fetch("/payloads.json")).json();
window.__pwned = false;
window.__saves = [];
window.__sent = [];
const SETTINGS = ["bins", "strategy", "estimator", "alpha", "measure", "unit", "missing", "target", "min_count", "column_bins"];
const DATA = ["_entropy", "_grid_meta", "_grid_values", "_grid_n", "_grid_q", "_grid_reliability", "_pair", "_relevance", "_meta"];
function decode(state, binary) {
  const out = { ...state };
  for (const k of binary || []) {
    const bin = atob(out[k]); const b = new Uint8Array(bin.length);
    for (let i = 0; i < bin.length; i++) b[i] = bin.charCodeAt(i);
    out[k] = new DataView(b.buffer);
  }
  return out;
}
// the same grid in the reverse column order (values moved with their names)
function reverseGrid(st) {
  const names = st._grid_meta.names, n = names.length;
  for (const [k, Arr] of [["_grid_values", Float32Array], ["_grid_n", Int32Array], ["_grid_q", Float32Array], ["_grid_reliability", Uint8Array]]) {
    const src = new Arr(st[k].buffer.slice(0)), out = new Arr(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = src[(n - 1 - i) * n + (n - 1 - j)];
    st[k] = new DataView(out.buffer);
  }
  st._grid_meta = { ...st._grid_meta, names: [...names].reverse() };
}
// the fake kernel: answer a change with the payload computed for those settings
function answer(keys, m) {
  window.__saves.push(Object.fromEntries(keys.map((k) => [k, m.get(k)])));
  const gen = ((m.get("_status") || {}).generation || 0) + 1;
  m.set("_status", { state: "computing", message: "Recomputing...", generation: gen, progress: 0.3, notes: [] });
  setTimeout(() => {
    if (keys.includes("selected_pair") && keys.length === 1) {
      const [a, b] = m.get("selected_pair");
      const hit = (data.base.pair_cache || {})[a + "\\u0000" + b] || (data.base.pair_cache || {})[b + "\\u0000" + a];
      if (hit) m.set("_pair", hit);
      m.set("_status", { state: "idle", message: "", generation: gen, progress: null, notes: [] });
      return;
    }
    const want = Object.fromEntries(SETTINGS.map((k) => [k, m.get(k)]));
    const found = data.answers.find((p) => SETTINGS.every((k) => JSON.stringify(p.state[k]) === JSON.stringify(want[k])));
    if (!found) {
      m.set("_status", { state: "error", message: "the fake kernel has no answer for " + JSON.stringify(want), generation: gen, progress: null, notes: [] });
      return;
    }
    const st = decode(found.state, found.binary);
    if (window.__reverseOrder) reverseGrid(st); // a kernel whose similarity order changed
    for (const k of DATA) m.set(k, st[k]);
    m.set("_status", { state: "idle", message: "", generation: gen, progress: null, notes: [] });
  }, window.__delay ?? 40);
}
const offline = new URLSearchParams(location.search).has("offline");
const which = new URLSearchParams(location.search).get("payload") || "base";
const only = new URLSearchParams(location.search).get("view");
if (only) data[which].state._view = only;
const model = modelFromPayload(data[which], offline ? {} : { onSave: answer, onSend: (msg) => window.__sent.push(msg) });
window.__model = model;
window.__cleanup = render({ model, el: document.getElementById("app") });
// the view taken down and drawn again for the same model (a re-rendered output)
window.__rerender = () => { window.__cleanup(); window.__cleanup = render({ model, el: document.getElementById("app") }); };
window.__ready = true;
</script></body></html>
"""


def _quiet(fn, *args, **kwargs):
    """Run a session step; folded-level notes are expected in the demo data."""
    from infoscope import InfoscopeWarning

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", InfoscopeWarning)
        return fn(*args, **kwargs)


@pytest.fixture(scope="module")
def payloads():
    from infoscope.datasets import make_deliveries
    from infoscope.frame.session import ProfileSession
    from infoscope.widgets import ProfileWidget

    frame = make_deliveries(800, seed=3)
    # bins=16 given (not the row-dependent default): the fake kernel's answers below are
    # the slider's neighbours and the views' checks were written for 16 bins
    session = _quiet(ProfileSession, frame, n_boot=40, bins=16)
    w = _quiet(ProfileWidget, session, threaded=False, target="late", min_count=5)
    base = _quiet(w.payload)
    answers = [base]
    for change in ({"bins": 17}, {"bins": 8}, {"bins": 8, "estimator": "plugin"},
                   {"bins": 16, "estimator": "plugin"}):
        for key, value in {"bins": 16, "estimator": "miller_madow", **change}.items():
            _quiet(setattr, w, key, value)
        assert w._status["state"] == "idle", w._status
        answers.append(_quiet(w.payload, top_pairs=0))
    # a frame whose names and values are markup: they must show as text
    rng = np.random.default_rng(7)
    evil_name = "<img src=x onerror=alert(1)>"
    evil_value = "<script>window.__pwned = true; alert(2)</script>"
    evil = pd.DataFrame({
        evil_name: rng.choice([evil_value, "plain", "<b>bold</b>"], size=300),
        "size \"quoted\" & <i>": rng.normal(size=300),
        "ok": rng.choice(["x", "y"], size=300),
    })
    ws = _quiet(ProfileWidget, _quiet(ProfileSession, evil, n_boot=0), threaded=False,
                target="ok", selected_pair=[evil_name, "ok"])
    from _names import LONG, RTL, odd_names_frame

    from infoscope.views.payload import payload as view_payload

    batch = make_deliveries(800, seed=4)
    batch["distance_km"] = batch["distance_km"] * 1.6  # a planted drift
    drift = _quiet(view_payload, _quiet(ProfileSession, batch, n_boot=0), reference=frame)
    _quiet(setattr, w, "selected_pair", ["service", "contents"])  # a wide joint table (folded text levels)
    wide_pair = dict(w._pair)

    wo = _quiet(ProfileWidget, _quiet(ProfileSession, odd_names_frame(), n_boot=0), threaded=False,
                target=RTL, selected_pair=[RTL, LONG], selected_column=LONG)
    # a weighted profile (observation weights in column "w"): the caution says so
    weighted = make_deliveries(400, seed=6)
    weighted["w"] = np.random.default_rng(2).lognormal(0.0, 1.0, len(weighted))
    ww = _quiet(ProfileWidget, _quiet(ProfileSession, weighted, n_boot=0, weights="w"), threaded=False,
                target="late")
    return {"base": base, "answers": answers, "evil": _quiet(ws.payload), "weighted": _quiet(ww.payload),
            "evil_name": evil_name, "evil_value": evil_value, "odd": _quiet(wo.payload), "wide_pair": wide_pair,
            "drift": drift}


@pytest.fixture
def harness(served, web, payloads):
    served.put_file("/profile.js", ESM)
    served.put_file("/profile.css", CSS)
    for theme in ("dark", "light"):
        served.put_file(f"/theme-{theme}.css", LAB_THEMES / f"theme-{theme}-extension" / "index.css")
    served.put("/payloads.json", json.dumps(payloads))
    served.put("/harness.html", HARNESS)

    def open_(query: str = ""):
        web.goto(served.url("/harness.html" + query))
        try:
            web.page.wait_for_function("window.__ready === true", timeout=15_000)
        except Exception:
            raise AssertionError(f"the harness did not start: {web.page_errors} {web.console_errors}")
        web.page.wait_for_timeout(120)  # one animation frame of batched redraws
        return web.page

    return open_


def _bar_widths(page):
    return page.eval_on_selector_all(
        ".isc-entropy .isc-erow", "rows => rows.map(r => [r.dataset.column, r.querySelector('.isc-val').textContent])")


def test_profile_renders_every_view_offline_clean(harness, web, artifacts):
    page = harness()
    for sel in (".isc-controls", ".isc-entropy", ".isc-grid", ".isc-pair", ".isc-relevance", ".isc-caution"):
        assert page.locator(sel).count() == 1, sel
    rows = _bar_widths(page)
    assert len(rows) == 17 and all(v != "\u2014" for _, v in rows if _ != "parcel_ref")
    # the caution line says what the numbers are and are not
    caution = page.text_content(".isc-caution")
    assert "dependence, not cause" in caution and "800 rows" in caution
    # the pair view shows the kernel's pair with hidden small cells noted (min_count=5)
    assert "hidden" in page.text_content(".isc-pair") or "none are" in page.text_content(".isc-pair")
    assert web.outside_requests == [] and web.page_errors == [] and web.dialogs == []
    web.screenshot(artifacts / "profile-full.png", full_page=True)
    for name in ("controls", "entropy", "grid", "pair", "relevance"):
        page.locator(f".isc-{name}").screenshot(path=str(artifacts / f"profile-{name}.png"))


def test_bins_slider_and_estimator_dropdown_redraw(harness, web, artifacts):
    page = harness()
    before = dict(_bar_widths(page))
    slider = page.locator(".isc-controls input[type=range]").first
    slider.focus()
    page.keyboard.press("ArrowRight")  # 16 -> 17, keyboard operable
    page.wait_for_function("window.__saves.length >= 1")
    assert page.evaluate("window.__saves[0]") == {"bins": 17}
    page.wait_for_function("(window.__model.get('_status')||{}).state === 'idle'")
    page.wait_for_timeout(80)
    after17 = dict(_bar_widths(page))
    slider.fill("8")
    page.wait_for_function("window.__model.get('bins') === 8 && (window.__model.get('_status')||{}).state === 'idle'")
    page.wait_for_timeout(80)
    after8 = dict(_bar_widths(page))
    numeric = "distance_km"
    assert before[numeric] != after8[numeric], "the bars did not redraw for bins=8"
    assert before[numeric] != after17[numeric] or before != after17
    assert page.text_content(".isc-controls output") == "8"
    page.select_option(".isc-controls select[aria-label=Estimator]", "plugin")
    page.wait_for_function("window.__model.get('estimator') === 'plugin' && (window.__model.get('_status')||{}).state === 'idle'")
    page.wait_for_timeout(80)
    plugin = dict(_bar_widths(page))
    assert plugin != after8, "the bars did not redraw for the plug-in estimator"
    assert "plug-in" in page.text_content(".isc-entropy .isc-punit")
    # the pseudocount slider is only live for the Dirichlet estimator
    assert page.locator(".isc-controls input[aria-label='Pseudocount per cell']").is_disabled()
    assert web.outside_requests == [] and web.page_errors == []
    page.locator(".isc-controls").screenshot(path=str(artifacts / "controls-after-change.png"))


def test_unanswered_change_shows_error_in_view(harness, web):
    page = harness()
    page.select_option(".isc-controls select[aria-label=Binning]", "sturges")
    page.wait_for_function("(window.__model.get('_status')||{}).state === 'error'")
    page.wait_for_timeout(80)
    alert = page.locator(".isc-error")
    assert alert.is_visible() and "no answer" in alert.text_content()
    # a rule sets the bin count: the bins slider is disabled and says so
    assert page.locator(".isc-controls input[type=range]").first.is_disabled()
    assert "by rule" in page.text_content(".isc-controls output")


def test_grid_click_opens_pair_view(harness, web, artifacts):
    page = harness()
    canvas = page.locator(".isc-grid canvas").first
    names = page.evaluate("window.__model.get('_grid_meta').names")
    shown = page.evaluate("window.__model.get('_pair')")
    # a precomputed pair other than the one shown (the fake kernel answers from those)
    a, b = next(k.split("\u0000") for k in page.evaluate("Object.keys(window.__model.get('_pair_cache'))")
                if set(k.split("\u0000")) != {shown["a"], shown["b"]})
    i, j = names.index(a), names.index(b)
    cell = float(canvas.get_attribute("data-cell"))
    off = float(canvas.get_attribute("data-offset"))
    canvas.hover(position={"x": off + (j + 0.5) * cell, "y": off + (i + 0.5) * cell})
    tip = page.locator(".isc-tip")
    said = tip.text_content().replace("\u2068", "").replace("\u2069", "")  # names travel bidi-isolated
    assert tip.is_visible() and said.startswith(f"{a} \u00d7 {b}") and ("q =" in said or "q below" in said)
    canvas.click(position={"x": off + (j + 0.5) * cell, "y": off + (i + 0.5) * cell})
    page.wait_for_function("([a, b]) => JSON.stringify(window.__model.get('selected_pair')) === JSON.stringify([a, b])", arg=[a, b])
    page.wait_for_function("(a) => document.querySelector('.isc-pair .isc-punit').textContent.includes(a)", arg=a)
    title = page.text_content(".isc-pair .isc-punit")
    assert a in title and b in title
    # the pair opens as the tooltip said: the cell's row column gives the table's rows
    assert page.eval_on_selector_all(".isc-pair .isc-punit bdi", "els => els.map(e => e.title)") == [a, b]
    assert page.locator(".isc-pair table td").count() > 4
    rows_ab = page.eval_on_selector_all(".isc-pair tbody th", "els => els.map(e => e.textContent)")
    # the mirror cell (b, a): the saved table of (a, b), turned round to rows b, columns a
    canvas.click(position={"x": off + (i + 0.5) * cell, "y": off + (j + 0.5) * cell})
    page.wait_for_function("([a, b]) => JSON.stringify(window.__model.get('selected_pair')) === JSON.stringify([b, a])", arg=[a, b])
    page.wait_for_function("(b) => document.querySelector('.isc-pair .isc-punit bdi').title === b", arg=b)
    assert page.eval_on_selector_all(".isc-pair .isc-punit bdi", "els => els.map(e => e.title)") == [b, a]
    cols_ba = page.eval_on_selector_all(".isc-pair thead th:not(.isc-corner):not(.isc-tot)", "els => els.map(e => e.textContent)")
    assert cols_ba == [r for r in rows_ab if r != "total"]
    canvas.click(position={"x": off + (j + 0.5) * cell, "y": off + (i + 0.5) * cell})
    page.wait_for_function("([a, b]) => JSON.stringify(window.__model.get('selected_pair')) === JSON.stringify([a, b])", arg=[a, b])
    # keyboard: Enter on the focused grid opens the pair under the cursor
    canvas.focus()
    down = i + 1 < len(names) and i + 1 != j  # step off the clicked cell, never onto the diagonal
    page.keyboard.press("ArrowDown" if down else "ArrowUp")
    page.keyboard.press("Enter")
    page.locator(".isc-pair").screenshot(path=str(artifacts / "pair-after-click.png"))
    page.wait_for_function("window.__saves.filter(s => 'selected_pair' in s).length >= 2")
    moved = names[i + 1 if down else i - 1]
    assert page.evaluate("window.__model.get('selected_pair')") == [moved, b]
    assert web.outside_requests == [] and web.page_errors == []


def test_names_and_values_are_text_not_markup(harness, web, payloads, artifacts):
    page = harness("?payload=evil")
    page.wait_for_timeout(200)
    app = page.locator("#app")
    assert payloads["evil_name"] in app.text_content()
    assert page.locator(f".isc-erow[data-column='{payloads['evil_name']}']").count() == 1
    pair_text = page.text_content(".isc-pair")
    assert payloads["evil_value"] in pair_text
    assert page.locator("#app img").count() == 0
    assert page.locator("#app script").count() == 0
    assert page.locator("#app i").count() == 0  # the name 'size "quoted" & <i>' made no element
    assert page.evaluate("[...document.querySelectorAll('#app b')].every(b => b.textContent !== 'bold')")
    assert "<b>bold</b>" in pair_text or "<b>bold</b>" in app.text_content()
    canvas = page.locator(".isc-grid canvas").first
    cell = float(canvas.get_attribute("data-cell"))
    off = float(canvas.get_attribute("data-offset"))
    canvas.hover(position={"x": off + 1.5 * cell, "y": off + 0.5 * cell})
    assert page.locator(".isc-tip img").count() == 0
    assert page.evaluate("window.__pwned") is False
    assert web.dialogs == [] and web.page_errors == [] and web.outside_requests == []
    web.screenshot(artifacts / "escaping.png", full_page=True)


def test_offline_copy_uses_precomputed_pairs(harness, web):
    page = harness("?offline")
    assert page.locator(".isc-controls select[aria-label=Estimator]").is_disabled()
    assert "saved copy" in page.text_content(".isc-status")
    names = page.evaluate("window.__model.get('_grid_meta').names")
    cache = page.evaluate("Object.keys(window.__model.get('_pair_cache'))")
    a, b = cache[1].split("\u0000")
    canvas = page.locator(".isc-grid canvas").first
    cell = float(canvas.get_attribute("data-cell"))
    off = float(canvas.get_attribute("data-offset"))
    i, j = names.index(a), names.index(b)
    canvas.click(position={"x": off + (j + 0.5) * cell, "y": off + (i + 0.5) * cell})
    page.wait_for_timeout(100)
    title = page.text_content(".isc-pair .isc-punit")
    assert a in title and b in title
    assert web.outside_requests == []


def test_grid_stays_responsive_at_200_columns(harness, web, artifacts):
    page = harness()
    # 200 columns of a synthetic square (a rendering load test, not a numeric check)
    took = page.evaluate("""() => {
      const n = 200, names = Array.from({length: n}, (_, i) => 'col_' + String(i).padStart(3, '0'));
      const v = new Float32Array(n * n), q = new Float32Array(n * n), c = new Int32Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
        const d = Math.abs(i - j); v[i * n + j] = 1 / (1 + d); q[i * n + j] = d < 40 ? 0.001 : 0.5; c[i * n + j] = 1000; }
      const m = window.__model, t0 = performance.now();
      m.set('_grid_values', new DataView(v.buffer)); m.set('_grid_q', new DataView(q.buffer));
      m.set('_grid_n', new DataView(c.buffer));
      m.set('_grid_meta', {names, measure: 'mi', unit: 'bits', order: 'name', alpha: 0.05, size: n, generation: 9});
      return new Promise((res) => requestAnimationFrame(() => requestAnimationFrame(() => res(performance.now() - t0))));
    }""")
    assert took < 1500, f"drawing 200 x 200 cells took {took:.0f} ms"
    assert page.locator(".isc-grid canvas").count() == 2  # the grid and its legend: no DOM per cell
    page.locator(".isc-grid").screenshot(path=str(artifacts / "grid-200.png"))


@pytest.mark.parametrize("view", ["entropy", "grid", "pair", "relevance"])
def test_single_views_render_alone(harness, web, artifacts, view):
    page = harness(f"?view={view}")
    panels = page.eval_on_selector_all(".isc-panel", "els => els.map(e => e.className)")
    assert panels == [f"isc-panel isc-{view}"]
    assert page.locator(".isc-controls").count() == 0
    assert page.locator(".isc-caution").count() == 1  # the cautions go with every view
    assert web.page_errors == [] and web.outside_requests == []
    page.locator(f".isc-{view}").screenshot(path=str(artifacts / f"alone-{view}.png"))


def test_sort_select_column_and_override_its_bins(harness, web):
    page = harness()
    page.select_option(".isc-entropy select", "name")
    page.wait_for_timeout(80)
    order = [c for c, _ in _bar_widths(page)]
    assert order == sorted(order)
    assert page.evaluate("window.__model.get('sort_by')") == "name"
    row = page.locator(".isc-erow[data-column='distance_km']")
    row.hover()
    tip = page.locator(".isc-tip").text_content()
    assert "efficiency" in tip and "effective levels" in tip and "log K =" in tip and "log N =" in tip
    assert "equal-count" in tip and "log K by construction" in tip  # why a quantile column sits at log K
    page.mouse.move(0, 0)
    row.focus()
    assert "log K =" in page.locator(".isc-tip").text_content()  # focus shows the details too
    page.keyboard.press("Enter")  # keyboard selects the column
    page.wait_for_function("window.__model.get('selected_column') === 'distance_km'")
    eventually(page, "document.querySelector(\".isc-erow[data-column='distance_km']\").getAttribute('aria-pressed')", "true")
    label = page.text_content(".isc-controls .isc-ctl:last-child label")
    assert "distance_km" in label
    override = page.locator(".isc-controls .isc-ctl:last-child input[type=range]")
    assert override.is_enabled()
    override.fill("5")
    page.wait_for_function("JSON.stringify(window.__model.get('column_bins')) === '{\"distance_km\":5}'")
    # a categorical column has no bins to override
    page.locator(".isc-erow[data-column='depot']").click()
    eventually(page, "document.querySelector('.isc-controls .isc-ctl:last-child input[type=range]').disabled", True)


def test_cancel_button_sends_cancel(harness, web, artifacts):
    page = harness()
    page.evaluate("window.__delay = 5000")
    slider = page.locator(".isc-controls input[type=range]").first
    slider.fill("20")
    button = page.locator(".isc-status button", has_text="Cancel")
    button.wait_for(state="visible")
    assert page.locator(".isc-status progress").is_visible()
    page.locator(".isc-head").screenshot(path=str(artifacts / "status-computing.png"))
    button.click()
    page.wait_for_function("window.__sent.some(m => m.type === 'cancel')")


def test_sampled_first_view_is_labelled(harness, web):
    page = harness()
    page.evaluate("""() => {
      const m = window.__model, e = JSON.parse(m.get('_entropy'));
      e.sampled = 200;
      m.set('_meta', { ...m.get('_meta'), n_rows: 800 });
      m.set('_status', { state: 'computing', message: 'Counting all pairs...', generation: 2, progress: 0.4, notes: [] });
      m.set('_entropy', JSON.stringify(e));
    }""")
    page.wait_for_timeout(100)
    label = page.locator(".isc-caution .isc-sampled")
    assert label.is_visible()
    assert "seeded sample of 200 rows of 800" in label.text_content() and "full data follow" in label.text_content()


# ----------------------------------------------------------------- hidden-cell labels and view details
def test_pair_view_labels_small_and_complementary_cells_apart(harness, web, payloads):
    # the widget's own pair (min_count=5); the reasons were checked against
    # pandas.crosstab counts in tests/test_suppression_labels.py
    page = harness()
    view = payloads["base"]["state"]["_pair"]
    reasons = [r for row in view["hidden_reasons"] for r in row if r]
    assert "complement" in reasons and "small" in reasons, "the demo pair needs both kinds"
    cells = page.eval_on_selector_all(
        ".isc-pair td.isc-hid", "tds => tds.map(t => [t.dataset.hidden, t.textContent, t.getAttribute('aria-label')])")
    assert [c[0] for c in cells] == reasons
    for kind, text, aria in cells:
        if kind == "small":
            assert text == "<5" and "fewer than 5 rows" in aria
        else:
            assert text == "\u00b7" and "hidden to protect a small cell" in aria and "fewer" not in aria
    note = page.text_content(".isc-pair")
    assert f"{reasons.count('complement')} more hidden to protect them" in note


def test_truncated_names_have_their_full_name(harness, web, payloads):
    page = harness()
    canvas = page.locator(".isc-grid canvas").first
    names = page.evaluate("window.__model.get('_grid_meta').names")
    off = float(canvas.get_attribute("data-offset"))
    cell = float(canvas.get_attribute("data-cell"))
    longest = max(range(len(names)), key=lambda k: len(names[k]))
    canvas.hover(position={"x": off / 2, "y": off + (longest + 0.5) * cell})  # its row label
    assert canvas.get_attribute("title") == names[longest]
    assert page.locator(".isc-tip").text_content() == "\u2068" + names[longest] + "\u2069"  # bidi-isolated
    canvas.hover(position={"x": off + (longest + 0.5) * cell, "y": off / 2})  # its column label
    assert canvas.get_attribute("title") == names[longest]
    corner = page.locator(".isc-pair .isc-corner")
    view = payloads["base"]["state"]["_pair"]
    assert corner.get_attribute("title") == f"rows: \u2068{view['a']}\u2069; columns: \u2068{view['b']}\u2069"
    assert web.page_errors == []


def test_saved_copy_controls_look_disabled_and_caution_says_negative(harness, web):
    page = harness("?offline")
    looks = page.eval_on_selector_all(
        ".isc-controls select", "ss => ss.map(s => [s.disabled, Number(getComputedStyle(s.closest('.isc-ctl')).opacity)])")
    assert looks and all(disabled and opacity < 0.6 for disabled, opacity in looks), looks
    assert "slightly negative" in page.text_content(".isc-caution")
    live = harness()
    assert all(o == 1 for o in live.eval_on_selector_all(
        ".isc-controls select", "ss => ss.map(s => Number(getComputedStyle(s.closest('.isc-ctl')).opacity))"))


def test_wide_joint_table_shows_a_scroll_cue(harness, web, payloads):
    page = harness()
    # a wide joint table (computed by the widget in the fixture) and the narrowest saved one
    assert len(payloads["wide_pair"]["cols"]) >= 30, "the demo has a wide joint table"
    narrow = min(payloads["base"]["pair_cache"], key=lambda k: len(payloads["base"]["pair_cache"][k]["cols"])).split("\u0000")
    show = """([a, b]) => { const m = window.__model; m.set('_pair', m.get('_pair_cache')[a + '\\u0000' + b]);
                            m.set('selected_pair', [a, b]); }"""
    page.evaluate("(v) => { window.__model.set('_pair', v); window.__model.set('selected_pair', [v.a, v.b]); }", payloads["wide_pair"])
    page.wait_for_function("(b) => document.querySelector('.isc-pair .isc-punit').textContent.includes(b)", arg=payloads["wide_pair"]["b"])
    page.wait_for_timeout(150)
    more = page.locator(".isc-pair .isc-more")
    assert more.is_visible() and "more columns" in more.text_content()
    assert page.locator(".isc-pair .isc-tablebox.isc-overflow").count() == 1
    page.eval_on_selector(".isc-pair .isc-tablewrap", "w => { w.scrollLeft = w.scrollWidth; }")
    # the fade goes at the end
    eventually(page, "document.querySelectorAll('.isc-pair .isc-tablebox.isc-overflow').length", 0)
    # a narrow table has no cue
    page.evaluate(show, narrow)
    page.wait_for_function("(a) => document.querySelector('.isc-pair .isc-punit').textContent.includes(a)", arg=narrow[0])
    eventually(page, "(e => !e || !(e.offsetWidth || e.offsetHeight || e.getClientRects().length))(document.querySelector('.isc-pair .isc-more'))", True,
               message="a narrow table shows no 'more columns' cue")


# colours as the page paints them: a 1 x 1 canvas turns any CSS colour (rgb, rgba,
# color-mix, color(srgb ...)) into sRGB bytes; text is composited over its background
_PAINTED = """(sel) => {
  const el = document.querySelector(sel);
  let bgEl = el, bg = 'rgba(0, 0, 0, 0)';
  while (bgEl && ((bg = getComputedStyle(bgEl).backgroundColor) === 'rgba(0, 0, 0, 0)' || bg === 'transparent')) bgEl = bgEl.parentElement;
  const c = document.createElement('canvas'); c.width = c.height = 1;
  const g = c.getContext('2d');
  g.fillStyle = '#fff'; g.fillRect(0, 0, 1, 1);
  g.fillStyle = bg; g.fillRect(0, 0, 1, 1);
  const back = [...g.getImageData(0, 0, 1, 1).data.slice(0, 3)];
  g.fillStyle = getComputedStyle(el).color; g.fillRect(0, 0, 1, 1);
  const ink = [...g.getImageData(0, 0, 1, 1).data.slice(0, 3)];
  return { back, ink };
}"""


def _contrast(a, b):
    """WCAG 2.1 contrast ratio (W3C, success criterion 1.4.3's definition)."""
    def lum(rgb):
        lin = [(c / 255) / 12.92 if c / 255 <= 0.04045 else ((c / 255 + 0.055) / 1.055) ** 2.4 for c in rgb]
        return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]
    hi, lo = sorted((lum(a), lum(b)), reverse=True)
    return (hi + 0.05) / (lo + 0.05)


@pytest.mark.parametrize("theme", ["light", "dark"])
def test_hover_and_selection_stay_readable_in_jupyterlab_themes(harness, web, artifacts, theme):
    page = harness(f"?theme={theme}")
    bg = page.evaluate("getComputedStyle(document.querySelector('.isc-root')).backgroundColor")
    assert (bg == "rgb(17, 17, 17)") == (theme == "dark"), f"the widget did not take the {theme} theme: {bg}"
    rows = page.locator(".isc-entropy .isc-erow")
    rows.nth(1).click()  # selects the column: aria-pressed=true
    page.wait_for_function("document.querySelector('.isc-entropy .isc-erow[aria-pressed=true]') !== null")
    rows.nth(3).hover()
    page.wait_for_timeout(60)
    for sel in (".isc-entropy .isc-erow[aria-pressed=true] .isc-name", ".isc-entropy .isc-erow:hover .isc-name",
                ".isc-entropy .isc-erow:not(:hover):not([aria-pressed=true]) .isc-name"):
        painted = page.evaluate(_PAINTED, sel)
        ratio = _contrast(painted["ink"], painted["back"])
        assert ratio >= 4.5, f"{theme}: {sel} text {painted['ink']} on {painted['back']} has contrast {ratio:.2f}"
    page.mouse.move(5, 5)
    web.screenshot(artifacts / f"theme-{theme}.png", full_page=True)
    assert web.outside_requests == [] and web.page_errors == []


def test_pair_view_lets_go_of_its_resize_observers(harness, web):
    page = harness()
    base = page.evaluate("window.__observed.size")
    names = page.evaluate("window.__model.get('_grid_meta').names")
    keys = page.evaluate("Object.keys(window.__model.get('_pair_cache'))")
    canvas = page.locator(".isc-grid canvas").first
    cell = float(canvas.get_attribute("data-cell"))
    off = float(canvas.get_attribute("data-offset"))
    for key in keys[:4] * 2:  # open precomputed pairs again and again: each redraws the pair view
        a, b = key.split("\u0000")
        i, j = names.index(a), names.index(b)
        canvas.click(position={"x": off + (j + 0.5) * cell, "y": off + (i + 0.5) * cell})
        page.wait_for_function("(a) => document.querySelector('.isc-pair .isc-punit').textContent.includes(a)", arg=a)
    assert page.evaluate("window.__observed.size") == base, "each pair-view redraw left a ResizeObserver watching"
    page.evaluate("window.__cleanup()")
    assert page.evaluate("window.__observed.size") == 0, "observers outlive the view"


def test_long_and_right_to_left_names_stay_in_their_place(harness, web, artifacts):
    page = harness("?payload=odd")
    eventually(page, f"({CONTAINED})()", [], message="a name ran out of its panel")
    # the full name is on hover (title) wherever a name is cut short
    titles = page.eval_on_selector_all(".isc-root bdi.isc-nm", "els => els.map(e => e.title)")
    assert LONG in titles and RTL in titles
    row = page.locator(f".isc-entropy .isc-erow[data-column='{LONG}']")
    row.hover()
    tip = page.locator(".isc-tip")
    assert tip.is_visible() and LONG[:200] in tip.text_content()
    box, view = tip.bounding_box(), page.viewport_size
    assert box["x"] >= 0 and box["x"] + box["width"] <= view["width"] and box["height"] < view["height"]
    # the override inside a name reverses nothing around it
    for sel, word in ((".isc-pair .isc-punit", "(columns)"), (".isc-pair .isc-punit", "(rows)"),
                      (".isc-relevance .isc-punit", "bits"), (".isc-controls", "Bins for")):
        assert page.evaluate(IN_ORDER, [sel, word]) == "ok", (sel, word)
    aria = page.get_attribute(f".isc-entropy .isc-erow[data-column='{RTL}']", "aria-label")
    assert aria.startswith("\u2068" + RTL + "\u2069:"), aria[:40]
    assert web.page_errors == [] and web.outside_requests == []
    web.screenshot(artifacts / "odd-names.png", full_page=True)


def _grid_cursor(page):
    return page.evaluate("JSON.parse(document.querySelector('.isc-grid canvas').dataset.cursor || 'null')")


def test_focus_scroll_and_grid_cursor_survive_updates_and_redraws(harness, web):
    page = harness()
    page.set_viewport_size({"width": 1280, "height": 600})
    canvas = page.locator(".isc-grid canvas").first
    canvas.focus()
    for key in ("ArrowDown", "ArrowDown", "ArrowRight", "ArrowRight", "ArrowRight"):
        page.keyboard.press(key)
    cursor = _grid_cursor(page)
    names = page.evaluate("window.__model.get('_grid_meta').names")
    assert cursor == [names[2], names[4]]
    # new numbers arrive in a new column order: focus stays, the cursor stays on the pair
    page.evaluate("window.__reverseOrder = true")
    page.evaluate("window.__model.set('bins', 17); window.__model.save_changes()")
    page.wait_for_function("(window.__model.get('_status')||{}).state === 'idle' && window.__model.get('_grid_meta').names[0] !== %s" % json.dumps(names[0]))
    page.wait_for_timeout(1200)  # past the hold time of the programmatic change
    page.evaluate("window.__model.set('_status', {...window.__model.get('_status')})")  # any redraw
    eventually(page, "document.activeElement && document.activeElement.dataset.keep", "grid", message="focus fell to the page")
    assert _grid_cursor(page) == cursor
    # the whole view taken down and drawn again (as a notebook re-renders an output)
    page.mouse.wheel(0, 400)
    page.evaluate("document.querySelector('.isc-pair .isc-tablewrap').scrollLeft = 120")
    page.wait_for_timeout(80)
    page.evaluate("window.__rerender()")
    eventually(page, "document.activeElement && document.activeElement.dataset.keep", "grid", message="focus fell to the page")
    assert _grid_cursor(page) is None or _grid_cursor(page) == cursor
    page.keyboard.press("ArrowRight")  # the cursor goes on from where it was
    moved = _grid_cursor(page)
    new_names = page.evaluate("window.__model.get('_grid_meta').names")
    assert moved[0] == cursor[0] and new_names.index(moved[1]) == new_names.index(cursor[1]) + 1
    assert page.evaluate("document.querySelector('.isc-pair .isc-tablewrap').scrollLeft") >= 100
    # an entropy row keeps focus when the bars are redrawn with new numbers
    row = page.locator(".isc-entropy .isc-erow[data-column='depot']")
    row.focus()
    page.evaluate("window.__reverseOrder = false; window.__model.set('bins', 8); window.__model.save_changes()")
    page.wait_for_function("window.__model.get('bins') === 8 && (window.__model.get('_status')||{}).state === 'idle'")
    eventually(page, "document.activeElement && document.activeElement.dataset.column", "depot", message="the row lost focus")
    assert web.page_errors == []


def test_grid_keeps_its_column_order_while_the_slider_moves(harness, web, artifacts):
    page = harness()
    names = page.evaluate("window.__model.get('_grid_meta').names")
    page.evaluate("window.__reverseOrder = true")
    slider = page.locator(".isc-controls input[type=range]").first
    box = slider.bounding_box()
    # a hand on the slider: the button held down on its thumb, then a key moves it one step
    thumb_x = box["x"] + 8 + (box["width"] - 16) * (16 - 2) / (64 - 2)
    page.mouse.move(thumb_x, box["y"] + box["height"] / 2)
    page.mouse.down()
    page.wait_for_timeout(50)
    page.evaluate("window.__saves.length = 0")
    page.keyboard.press("ArrowRight")
    page.wait_for_function("window.__saves.length > 0 && (window.__model.get('_status')||{}).state !== 'computing'")
    page.wait_for_timeout(1200)  # longer than the hold after a key alone: the held button keeps it
    state = page.evaluate("window.__model.get('_grid_meta').names")
    assert state != names and sorted(state) == sorted(names)
    # the slider was touched a moment ago: the grid still shows the old order, with the new numbers
    assert "order kept" in page.text_content(".isc-grid .isc-phead")
    page.locator(".isc-grid").screenshot(path=str(artifacts / "grid-order-held.png"))
    shown = lambda: json.loads(page.get_attribute(".isc-grid canvas", "data-order"))  # noqa: E731
    assert shown() == names
    # let go: the new order follows without another change
    page.mouse.up()
    page.mouse.move(2, 2)
    page.wait_for_function("!document.querySelector('.isc-grid .isc-phead').textContent.includes('order kept')", timeout=5000)
    assert shown() == state
    assert web.page_errors == []


GRID_READ = """() => {
  const c = document.querySelector('.isc-grid canvas'), m = window.__model;
  const meta = m.get('_grid_meta'), n = meta.names.length;
  const dec = (k, A) => { const dv = m.get(k); return new A(dv.buffer.slice(dv.byteOffset, dv.byteOffset + dv.byteLength)); };
  const v = dec('_grid_values', Float32Array), q = dec('_grid_q', Float32Array), r = dec('_grid_reliability', Uint8Array);
  const cell = +c.dataset.cell, off = +c.dataset.offset, dpr = window.devicePixelRatio || 1;
  const g = c.getContext('2d');
  let max = 0; for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && Number.isFinite(v[i*n+j])) max = Math.max(max, v[i*n+j]);
  const out = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    if (i === j) continue;
    // a corner of the cell (the centre may hold the dot of 'too few rows')
    const px = g.getImageData(Math.round((off + j * cell + 2) * dpr), Math.round((off + i * cell + 2) * dpr), 1, 1).data;
    const full = window.__SEQ.at(Math.sqrt(Math.max(0, v[i*n+j]) / max));
    out.push({ state: meta.reliability_states[r[i*n+j]], q: q[i*n+j], pixel: [px[0], px[1], px[2]], full });
  }
  return { cells: out, alpha: meta.alpha };
}"""


def test_grid_colours_only_findings_and_its_legend_says_so(harness, web, artifacts):
    page = harness()
    page.wait_for_timeout(150)
    got = page.evaluate(GRID_READ)
    kinds = {"finding": 0, "muted": 0, "grey": 0}
    for c in got["cells"]:
        same = all(abs(a - b) <= 2 for a, b in zip(c["pixel"], c["full"]))
        if c["state"] == "too_few":
            assert c["pixel"] == [240, 239, 235], c
            kinds["grey"] += 1
        elif c["state"] == "ok" and c["q"] < got["alpha"]:
            assert same, c
            kinds["finding"] += 1
        else:  # sparse, or not significant: never drawn in the full colour of a finding
            assert not same or all(v > 225 for v in c["full"]), c
            kinds["muted"] += 1
    assert all(kinds.values()), kinds  # the demo frame has all three
    legend = page.text_content(".isc-grid .isc-legend")
    assert "not significant" in legend and "few rows per cell" in legend and "too few rows to tell" in legend
    assert "136 pairs" in legend
    # the pair view says which test gave its p-value and how far its table can be trusted
    note = page.text_content(".isc-pair .isc-testline")
    assert "shuffles" in note or "chi-square" in note
    page.locator(".isc-grid").screenshot(path=str(artifacts / "grid-findings.png"))


def test_relevance_bars_follow_mi_above_chance_when_sent(harness, web):
    page = harness()
    # the relevance record as the intervals work sends it: 'mi_above_chance' after 'mi',
    # the interval belonging to it (here half of each MI, only to see which one is drawn)
    page.evaluate("""() => {
      const m = window.__model, d = JSON.parse(m.get('_relevance'));
      const at = d.fields.indexOf('mi');
      d.fields.splice(at + 1, 0, 'mi_above_chance');
      d.rows = d.rows.map((r) => { const c = r.slice(); c.splice(at + 1, 0, r[at] == null ? null : r[at] / 2); return c; });
      m.set('_relevance', JSON.stringify(d));
    }""")
    page.wait_for_timeout(150)
    rows = page.locator(".isc-relevance .isc-erow")
    first = rows.first
    col = first.get_attribute("data-keep").split(":", 1)[1]
    data = page.evaluate("JSON.parse(window.__model.get('_relevance'))")
    row = dict(zip(data["fields"], next(r for r in data["rows"] if r[0] == col)))
    shown = first.locator(".isc-val").text_content()
    assert abs(float(shown) - row["mi_above_chance"]) <= 0.01 * max(1e-3, abs(row["mi_above_chance"])) + 5e-4, (shown, row)
    assert "above chance" in page.text_content(".isc-relevance .isc-punit")
    first.hover()
    assert "above chance" in page.text_content(".isc-tip")
    assert web.page_errors == []


def test_drift_view_shows_a_planted_shift_beyond_chance(harness, web, payloads, artifacts):
    page = harness()
    assert not page.locator(".isc-drift").is_visible()  # no reference: no drift panel
    page = harness("?payload=drift")
    page.locator(".isc-drift").wait_for(state="visible", timeout=20_000)
    record = payloads["drift"]["state"]["_drift"]
    rows = page.locator(".isc-drift .isc-erow")
    assert rows.count() == len(record["columns"])
    first = rows.first
    assert first.get_attribute("data-keep") == "drift:distance_km"
    assert first.get_attribute("data-flag") in ("major", "moderate")
    first.hover()
    tip = page.text_content(".isc-tip")
    assert "sampling alone gives" in tip and "PSI" in tip
    stable = [r["column"] for r in record["columns"] if r["flag"] in ("stable", "within_chance")]
    assert stable, "most demo columns do not move between two seeds"
    assert page.get_attribute(f".isc-drift .isc-erow[data-keep='drift:{stable[0]}']", "data-flag") in ("stable", "within_chance")
    assert web.page_errors == [] and web.outside_requests == []
    page.locator(".isc-drift").screenshot(path=str(artifacts / "drift.png"))


def test_selection_view_in_the_profile_controls_keyboard_and_focus(harness, web, payloads, artifacts):
    # the main profile with a target shows the selection (the kernel's select() table);
    # its method and steps controls go to the kernel, a step row takes keyboard focus
    # and shows its numbers, a redraw keeps that focus, and the panel hides without a target
    page = harness()
    sel = json.loads(payloads["base"]["state"]["_selection"])
    steps = [r for r in sel["rows"] if r[0] is not None]
    assert page.locator(".isc-selection").is_visible()
    rows = page.locator(".isc-selection .isc-selrow")
    assert rows.count() == len(steps) and rows.first.get_attribute("data-keep") == "step:1"
    assert steps[0][1] in rows.first.text_content()
    page.select_option(".isc-selection select", "jmi")
    page.wait_for_function("window.__saves.some(s => s.selection_method === 'jmi')")
    # the answer for jmi has not come: the panel says its numbers are the last ones
    page.wait_for_function("document.querySelector('.isc-selection .isc-punit').textContent.includes('recomputing')")
    box = page.locator(".isc-selection input[type=number]")
    box.fill("2")
    box.press("Enter")
    box.dispatch_event("change")
    page.wait_for_function("window.__saves.some(s => s.selection_k === 2)")
    rows.nth(1).focus()
    page.wait_for_timeout(60)
    tip = page.locator(".isc-tip")
    assert tip.is_visible() and "relevance I(" in tip.text_content() and "shuffles of the target" in tip.text_content()
    page.evaluate("window.__model.set('_selection', window.__model.get('_selection') + ' ')")  # a redraw
    page.wait_for_timeout(80)
    assert page.evaluate("document.activeElement.dataset.keep") == "step:2"
    page.locator(".isc-selection").screenshot(path=str(artifacts / "profile-selection.png"))
    page.evaluate("window.__model.set('target', null)")
    page.wait_for_timeout(80)
    assert not page.locator(".isc-selection").is_visible()
    assert web.page_errors == [] and web.outside_requests == []


@pytest.mark.parametrize("theme", ["light", "dark"])
def test_selection_and_surprising_rows_readable_in_jupyterlab_themes(harness, web, artifacts, theme):
    page = harness(f"?theme={theme}")
    for sel in (".isc-selection .isc-selrow .isc-name", ".isc-selection .isc-leftout .isc-name",
                ".isc-surprising .isc-surtable td", ".isc-surprising .isc-treelist li"):
        assert page.locator(sel).count(), sel
        painted = page.evaluate(_PAINTED, sel)
        ratio = _contrast(painted["ink"], painted["back"])
        assert ratio >= 4.5, f"{theme}: {sel} text {painted['ink']} on {painted['back']} has contrast {ratio:.2f}"
    page.locator(".isc-selection").screenshot(path=str(artifacts / f"selection-{theme}.png"))
    assert web.page_errors == [] and web.outside_requests == []


def test_selection_and_surprising_rows_keep_odd_names_in_place(harness, web, payloads):
    # a right-to-left override in the target's name and in cell values reorders nothing
    page = harness("?payload=odd")
    page.wait_for_timeout(150)
    assert page.evaluate(IN_ORDER, [".isc-selection .isc-punit", "bits"]) == "ok"
    assert page.evaluate(IN_ORDER, [".isc-surprising .isc-punit", "bits"]) == "ok"
    assert page.locator(f".isc-selection bdi[title='{RTL}']").count() >= 1
    titles = page.eval_on_selector_all(".isc-surprising .isc-surcell", "els => els.map(e => e.title)")
    assert titles and all(t.startswith("\u2068") for t in titles)  # names isolated in the plain-text title
    assert web.page_errors == [] and web.outside_requests == []


def test_a_weighted_profile_says_so_and_its_selection_says_why_it_is_empty(harness, web, payloads):
    page = harness("?payload=weighted")
    meta = payloads["weighted"]["state"]["_meta"]
    caution = page.text_content(".isc-caution")
    assert "Rows weighted by" in caution and "effective sample size" in caution
    assert f"{round(meta['n_effective']):,}" in caution
    assert "does not take observation weights" in page.text_content(".isc-selection")
    assert page.locator(".isc-surprising").count() == 0  # no surprising rows part for weighted rows
    assert web.page_errors == [] and web.outside_requests == []
