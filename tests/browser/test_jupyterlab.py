"""One real JupyterLab round trip: open an example notebook, run it, move the bins slider.

The widget's front end comes from anywidget's lab extension (shipped in the pip
package); the kernel is a real ipykernel. The test asserts that the information
grid was redrawn after the slider moved and that the kernel-side widget and its
session hold the new value. Outside requests are aborted and counted.
"""
from __future__ import annotations

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
