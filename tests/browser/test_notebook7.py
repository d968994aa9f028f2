"""The live profile in Notebook 7 (the ``notebook`` package): the bins slider round trip.

A real Notebook 7 server on 127.0.0.1 (``_lab_harness.LabServer(app="notebook")``)
opens the example notebook in headless Chromium, runs every cell, moves the bins
slider, and checks that the kernel got the setting and recomputed (the entropy table
of a numeric column now has that many bins), that the static picture is an output of
its own after the live view and is hidden beside it, and that the page fetched
nothing from the network.
"""
from __future__ import annotations

import shutil
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _lab_harness import LabServer, copy_notebook, kernel_exec, open_notebook_and_run_all  # noqa: E402

import notebook  # noqa: E402  (Notebook 7 comes with the test extra: a missing one is a failure, not a skip)

assert int(notebook.__version__.split(".")[0]) >= 7, f"Notebook 7 is needed, found {notebook.__version__}"
pytestmark = [pytest.mark.jupyterlab, pytest.mark.browser, pytest.mark.timeout(420)]

NOTEBOOK = Path(__file__).resolve().parents[2] / "example_notebooks" / "screening_a_new_table.ipynb"
BINS = 'input[type=range][aria-label="Bins per numeric column"]'
GRID = ".isc-gridwrap canvas"


@pytest.fixture(scope="module")
def nb7(tmp_path_factory):
    if shutil.which("chromium") is None and not Path("/usr/bin/chromium").exists():
        pytest.skip("Debian's chromium is absent")
    root = tmp_path_factory.mktemp("nb7-root")
    work = tmp_path_factory.mktemp("nb7-work")
    name = copy_notebook(NOTEBOOK, root)
    with LabServer(root, work, app="notebook") as server:
        yield server, name, root


def test_notebook7_bins_slider_round_trip(nb7, web, artifacts):
    server, name, root = nb7
    page = web.page
    page.set_default_timeout(120_000)
    stacks = []
    page.on("pageerror", lambda err: stacks.append(getattr(err, "stack", "") or str(err)))
    open_notebook_and_run_all(page, server, name)
    page.wait_for_selector(f".isc-root {BINS}", timeout=60_000)
    page.wait_for_function(f"() => {{ const c = document.querySelector('{GRID}'); return c && c.width > 1; }}")
    assert kernel_exec(page, "print(profile.bins)").strip() == "12"
    before = page.eval_on_selector(GRID, "c => c.toDataURL()")
    slider = page.locator(f".isc-root {BINS}").first
    slider.scroll_into_view_if_needed()
    slider.fill("5")
    page.wait_for_function(
        "(before) => { const c = document.querySelector('" + GRID + "'); return c && c.toDataURL() !== before; }",
        arg=before, timeout=90_000, polling=200)
    seen = kernel_exec(page, "profile.wait(60); print(profile.bins, profile.session.settings['bins'])")
    assert seen.split() == ["5", "5"], seen
    shown = kernel_exec(page, "e = profile.session.entropy().set_index('column')\n"
                              "print(int(e.loc['distance_km', 'k']))")
    assert shown.strip() == "5"
    # the static picture: its own output right after the live view, not shown beside it
    state = page.evaluate("""() => {
      const root = document.querySelector('.isc-root');
      const child = root.closest('.jp-OutputArea-child');
      const next = child && child.nextElementSibling;
      const pic = next && next.querySelector('.isc-static');
      return { picture: !!pic, hidden: !!pic && getComputedStyle(pic).display === 'none' };
    }""")
    assert state == {"picture": True, "hidden": True}, state
    web.screenshot(artifacts / "notebook7-after-bins.png", full_page=False)
    assert web.outside_requests == []
    # Notebook 7.6 itself throws one error while it loads (also with an empty notebook:
    # "reading 'schema'", from its own bundle); no error may come from anything else
    def first_frame(stack: str) -> str:
        lines = [line for line in stack.splitlines() if line.strip().startswith("at ")]
        return lines[0] if lines else stack

    ours = [s for s in stacks if "/static/notebook/" not in first_frame(s)]
    assert ours == [], ours
