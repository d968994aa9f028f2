"""One real JupyterLab round trip: open an example notebook, run it, move the bins slider.

The widget's front end comes from anywidget's lab extension (shipped in the pip
package); the kernel is a real ipykernel. The test asserts that the information
grid was redrawn after the slider moved and that the kernel-side widget and its
session hold the new value. Outside requests are aborted and counted.
"""
from __future__ import annotations

import json
import shutil
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from _lab_harness import LabServer, copy_notebook, kernel_exec, open_notebook_and_run_all  # noqa: E402

pytestmark = [pytest.mark.jupyterlab, pytest.mark.browser, pytest.mark.timeout(420)]

NOTEBOOK = Path(__file__).resolve().parents[2] / "example_notebooks" / "screening_a_new_table.ipynb"
BINS = 'input[type=range][aria-label="Bins per numeric column"]'
GRID = ".isc-gridwrap canvas"


def test_anywidget_front_end_is_available_to_jupyterlab():
    import anywidget

    shipped = Path(sys.prefix) / "share" / "jupyter" / "labextensions" / "anywidget" / "package.json"
    assert shipped.exists(), f"anywidget {anywidget.__version__}'s lab extension is not installed at {shipped}"


@pytest.fixture(scope="module")
def lab(tmp_path_factory):
    if shutil.which("chromium") is None and not Path("/usr/bin/chromium").exists():
        pytest.skip("Debian's chromium is absent")
    root = tmp_path_factory.mktemp("lab-root")
    work = tmp_path_factory.mktemp("lab-work")
    name = copy_notebook(NOTEBOOK, root)
    with LabServer(root, work) as server:
        yield server, name, root


def test_bins_slider_round_trip(lab, web, artifacts):
    server, name, root = lab
    page = web.page
    page.set_default_timeout(120_000)
    open_notebook_and_run_all(page, server, name)
    page.wait_for_selector(f".isc-root {BINS}", timeout=60_000)
    page.wait_for_function(f"() => {{ const c = document.querySelector('{GRID}'); return c && c.width > 1; }}")
    before = page.eval_on_selector(GRID, "c => c.toDataURL()")
    assert kernel_exec(page, "print(profile.bins)").strip() == "12"
    # the static picture beside the live view is kept for shared copies, not shown twice
    pictures = page.locator(".isc-static")
    assert pictures.count() >= 1 and not any(pictures.nth(k).is_visible() for k in range(pictures.count()))
    slider = page.locator(f".isc-root {BINS}").first
    slider.scroll_into_view_if_needed()
    slider.fill("5")
    page.wait_for_function(
        "(before) => { const c = document.querySelector('" + GRID + "'); return c && c.toDataURL() !== before; }",
        arg=before, timeout=90_000, polling=200)
    seen = kernel_exec(page, "profile.wait(60); print(profile.bins, profile.session.settings['bins'])")
    assert seen.split() == ["5", "5"], seen
    # the numbers changed too, not just the pixels: entropy of a numeric column at 5 bins
    shown = kernel_exec(page, "import math\n"
                              "e = profile.session.entropy().set_index('column')\n"
                              "print(int(e.loc['distance_km', 'k']))")
    assert shown.strip() == "5"
    web.screenshot(artifacts / "jupyterlab-after-bins.png", full_page=False)
    assert (root / "screening_profile.html").exists(), "the notebook's export cell ran"
    assert web.outside_requests == []
    assert web.page_errors == [], web.page_errors
    # anywidget warns about modules that export `render` by name (its old format)
    deprecations = [w for w in web.console_warnings if "anywidget" in w and "eprecat" in w]
    assert deprecations == [], deprecations[0][:300]


NOTEBOOK_STATE = """() => {
  const nb = window.jupyterapp.shell.currentWidget.content;
  const at = nb.widgets.findIndex((c) => c.node.querySelector('.isc-root'));
  return { active: nb.activeCellIndex, mode: nb.mode, widgetCell: at,
           types: nb.widgets.map((c) => c.model.type), cells: nb.widgets.length,
           focused: document.activeElement ? (document.activeElement.getAttribute('data-keep') || document.activeElement.tagName) : null };
}"""


def test_keys_in_the_widget_never_reach_the_notebook(lab, web, artifacts):
    # JupyterLab's command-mode shortcuts (ArrowUp/Down move between cells, m makes a
    # Markdown cell, a/b insert cells) match any focused element inside a notebook;
    # the widget root carries data-lm-suppress-shortcuts, which Lumino's keymap honours
    server, name, root = lab
    page = web.page
    page.set_default_timeout(120_000)
    open_notebook_and_run_all(page, server, name)
    page.wait_for_selector(f".isc-root {BINS}", timeout=60_000)
    slider = page.locator(f".isc-root {BINS}").first
    slider.scroll_into_view_if_needed()
    slider.click()  # as a person does: the notebook goes to command mode, the slider has focus
    page.wait_for_timeout(300)
    before = page.evaluate(NOTEBOOK_STATE)
    assert before["widgetCell"] >= 0 and before["mode"] == "command", before
    value = int(slider.input_value())
    page.keyboard.press("ArrowUp")
    page.keyboard.press("ArrowUp")
    page.keyboard.press("ArrowDown")
    page.wait_for_timeout(300)
    after = page.evaluate(NOTEBOOK_STATE)
    assert int(slider.input_value()) == value + 1, ("the arrow keys did not move the slider", before, after)
    assert after["active"] == before["active"] and after["cells"] == before["cells"], (before, after)
    assert after["focused"] == "ctl:bins", after
    # letters typed into the estimator dropdown: no cell becomes Markdown, none is added
    estimator = page.locator(".isc-root select[aria-label=Estimator]").first
    estimator.focus()
    for key in ("m", "a", "b", "y"):
        page.keyboard.press(key)
    page.wait_for_timeout(300)
    typed = page.evaluate(NOTEBOOK_STATE)
    assert typed["types"] == before["types"] and typed["cells"] == before["cells"], (before, typed)
    assert page.locator(".isc-root").count() >= 1, "the widget's output disappeared"
    # the kernel saw the slider move (and nothing else broke)
    seen = kernel_exec(page, "profile.wait(60); print(profile.bins)")
    assert seen.strip() == str(value + 1)
    web.screenshot(artifacts / "jupyterlab-keys.png", full_page=False)
    assert web.page_errors == [], web.page_errors


def test_focus_and_grid_cursor_survive_a_kernel_side_update(lab, web):
    server, name, root = lab
    page = web.page
    page.set_default_timeout(120_000)
    open_notebook_and_run_all(page, server, name)
    page.wait_for_function(f"() => {{ const c = document.querySelector('{GRID}'); return c && c.width > 1; }}")
    canvas = page.locator(GRID).first
    canvas.scroll_into_view_if_needed()
    canvas.focus()
    for key in ("ArrowDown", "ArrowRight", "ArrowRight"):
        page.keyboard.press(key)
    cursor = page.evaluate(f"JSON.parse(document.querySelector('{GRID}').dataset.cursor)")
    scroll = page.evaluate("document.querySelector('.jp-WindowedPanel-outer, .jp-Notebook').scrollTop")
    before = canvas.evaluate("c => c.toDataURL()")
    kernel_exec(page, "profile.bins = 6\nprofile.wait(60)")
    page.wait_for_function("(b) => { const c = document.querySelector('" + GRID + "'); return c && c.toDataURL() !== b; }",
                           arg=before, timeout=90_000, polling=200)
    page.wait_for_timeout(4000)  # past the static picture's refresh beside the view
    assert page.evaluate("document.activeElement && document.activeElement.getAttribute('data-keep')") == "grid"
    assert page.evaluate(f"JSON.parse(document.querySelector('{GRID}').dataset.cursor || 'null')") in (cursor, None)
    page.keyboard.press("ArrowLeft")
    moved = page.evaluate(f"JSON.parse(document.querySelector('{GRID}').dataset.cursor)")
    assert moved[0] == cursor[0], (cursor, moved)
    after = page.evaluate("document.querySelector('.jp-WindowedPanel-outer, .jp-Notebook').scrollTop")
    assert abs(after - scroll) < 40, f"the notebook scrolled from {scroll} to {after}"
    assert web.page_errors == [], web.page_errors


DRIFT_CELLS = [
    "from infoscope.datasets import make_deliveries\n"
    "reference = make_deliveries(800, seed=3)\n"
    "batch = make_deliveries(800, seed=4)\n"
    "batch['distance_km'] = batch['distance_km'] * 1.6  # a planted drift",
    "drift_profile = batch.info_profile(reference=reference, drift_over=('dispatched_at', '4W'), n_boot=0)\n"
    "drift_profile",
]


def test_drift_panel_shows_for_a_profile_with_a_reference(lab, web, artifacts):
    # batch.info_profile(reference=ref, drift_over=...) in a real notebook: the drift panel,
    # Enter on a row opens its bins (the key stays in the widget), the strip is drawn, and a
    # kernel-side change redraws the panel keeping the sort and the open column
    import nbformat

    server, _, root = lab
    nb = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(c) for c in DRIFT_CELLS])
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    nbformat.write(nb, str(root / "drift_panel.ipynb"))
    page = web.page
    page.set_default_timeout(120_000)
    open_notebook_and_run_all(page, server, "drift_panel.ipynb")
    row = page.locator(".isc-root .isc-drift .isc-drow[data-column='distance_km']").first
    row.wait_for(state="visible", timeout=120_000)
    assert row.get_attribute("data-flag") in ("major", "moderate")
    cells = int(kernel_exec(page, "import json\nd = json.loads(drift_profile._drift_over)\n"
                                  "print(len(d['columns']) * len(d['periods']))").strip())
    assert page.locator(".isc-root .isc-dstrip .isc-dgrid .isc-dcell").count() == cells
    row.scroll_into_view_if_needed()
    row.click()  # opens the bins; the notebook goes to command mode
    page.locator(".isc-root .isc-ddetail[data-column='distance_km']").wait_for(state="visible")
    page.keyboard.press("Escape")
    page.wait_for_function("document.querySelectorAll('.isc-root .isc-ddetail').length === 0")
    before = page.evaluate(NOTEBOOK_STATE)
    row.focus()
    page.keyboard.press("Enter")  # in command mode Enter would edit the cell: it must stay in the widget
    page.locator(".isc-root .isc-ddetail[data-column='distance_km']").wait_for(state="visible")
    after = page.evaluate(NOTEBOOK_STATE)
    assert after["mode"] == before["mode"] == "command" and after["active"] == before["active"], (before, after)
    # sort by name with the keyboard, then new numbers from the kernel: sort and detail stay
    page.locator(".isc-root .isc-dsortbtn[aria-checked=true]").first.focus()
    page.keyboard.press("End")
    assert page.get_attribute(".isc-root .isc-dsortbtn[aria-checked=true]", "data-sort") == "name"
    generation = json.loads(kernel_exec(page, "print(json.loads(drift_profile._drift)['generation'])"))
    kernel_exec(page, "drift_profile.bins = 6\ndrift_profile.wait(120)", timeout_ms=150_000)
    seen = json.loads(kernel_exec(page, "print(json.loads(drift_profile._drift)['generation'])"))
    assert seen > generation
    page.wait_for_function("(g) => { const r = document.querySelector('.isc-root .isc-drift'); "
                           "return r && r.dataset.generation === String(g); }", arg=seen, timeout=60_000)
    assert page.get_attribute(".isc-root .isc-dsortbtn[aria-checked=true]", "data-sort") == "name"
    assert page.locator(".isc-root .isc-ddetail[data-column='distance_km']").count() == 1
    names = page.eval_on_selector_all(".isc-root .isc-drift .isc-drow", "rs => rs.map(r => r.dataset.column)")
    assert names == page.evaluate("(n) => [...n].sort((a, b) => a.localeCompare(b))", names)
    page.locator(".isc-root .isc-drift").first.screenshot(path=str(artifacts / "jupyterlab-drift.png"))
    assert web.outside_requests == []
    assert web.page_errors == [], web.page_errors
