"""The draft grid in a real JupyterLab: a bins move is drawn first from fine tables, then exactly.

The kernel profiles a seeded frame of float columns with ``drafts="always"``; the
exact recompute is held at a gate (a wrapper around the session's ``update``) so
the draft stays on screen while the test reads it: the arrow key moves the slider,
the grid is redrawn and the status line says "Draft grid: ... exact ...", while the
session still holds the old bins.  After the gate opens, the exact numbers replace
the draft without a click and equal a fresh session's.
"""
from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from _lab_harness import LabServer, kernel_exec, open_notebook_and_run_all  # noqa: E402

pytestmark = [pytest.mark.jupyterlab, pytest.mark.browser, pytest.mark.timeout(420)]

BINS = 'input[type=range][aria-label="Bins per numeric column"]'
GRID = ".isc-gridwrap canvas"
STATUS = ".isc-root .isc-status span"

SETUP = """
import threading
import numpy as np, pandas as pd
from infoscope.frame.session import ProfileSession
from infoscope.widgets.profile import ProfileWidget
rng = np.random.default_rng(7)
n = 30_000
x = rng.normal(size=n)
frame = pd.DataFrame({"x": x, "y": x + rng.normal(size=n), "z": rng.lognormal(size=n),
                      "w": np.sin(x) + rng.normal(scale=0.3, size=n), "c": rng.choice(list("abcd"), n)})
profile = ProfileWidget(ProfileSession(frame, bins=12, n_boot=40), drafts="always")
gate = threading.Event()
gate.set()
exact_update = profile.session.update
def held_update(**settings):  # the exact recompute waits here while the gate is closed
    gate.wait(300)
    return exact_update(**settings)
profile.session.update = held_update
"""


def _notebook() -> dict:
    cells = [{"cell_type": "code", "execution_count": None, "id": f"draft-{i}", "metadata": {}, "outputs": [],
              "source": src} for i, src in enumerate((SETUP, "profile"))]
    return {"cells": cells, "metadata": {"kernelspec": {"name": "python3", "display_name": "Python 3",
                                                        "language": "python"}},
            "nbformat": 4, "nbformat_minor": 5}


@pytest.fixture(scope="module")
def lab(tmp_path_factory):
    root = tmp_path_factory.mktemp("draft-root")
    work = tmp_path_factory.mktemp("draft-work")
    (root / "draft.ipynb").write_text(json.dumps(_notebook()), encoding="utf-8")
    with LabServer(root, work) as server:
        yield server


def test_a_bins_move_shows_the_draft_grid_then_the_exact_one(lab, web, artifacts):
    page = web.page
    page.set_default_timeout(120_000)
    open_notebook_and_run_all(page, lab, "draft.ipynb")
    page.wait_for_selector(f".isc-root {BINS}", timeout=60_000)
    page.wait_for_function(f"() => {{ const c = document.querySelector('{GRID}'); return c && c.width > 1; }}")
    # the fine tables are counted after the first view; the nested bin counts drafted ahead
    ready = kernel_exec(page, "import time\nt = time.time()\n"
                              "while profile._drafted_ahead < 1 and time.time() - t < 240: time.sleep(0.05)\n"
                              "print(profile._drafted_ahead >= 1, profile.wait(120))", timeout_ms=260_000)
    assert ready.split() == ["True", "True"], ready
    before = page.eval_on_selector(GRID, "c => c.toDataURL()")
    kernel_exec(page, "gate.clear()")
    slider = page.locator(f".isc-root {BINS}").first
    slider.scroll_into_view_if_needed()
    slider.focus()
    start = int(slider.input_value())
    page.keyboard.press("ArrowRight")  # a key, as a person moves the slider
    assert int(slider.input_value()) == start + 1
    page.wait_for_function(
        "(before) => { const c = document.querySelector('" + GRID + "'); return c && c.toDataURL() !== before; }",
        arg=before, timeout=90_000, polling=100)
    page.wait_for_function("(s) => { const el = document.querySelector(s); "
                           "return el && el.textContent.startsWith('Draft grid: '); }",
                           arg=STATUS, timeout=60_000, polling=100)
    status = page.eval_on_selector(STATUS, "el => el.textContent")
    assert f"summed into {start + 1} bins" in status and "exact" in status, status
    web.screenshot(artifacts / "jupyterlab-draft-grid.png", full_page=False)
    # the session still holds the old bins: what is on screen is the draft
    held = kernel_exec(page, "print(profile.session.settings['bins'], profile._drafts_shown)")
    assert held.split() == [str(start), "1"], held
    kernel_exec(page, "gate.set()")
    page.wait_for_function("(s) => { const el = document.querySelector(s); "
                           "return el && !el.textContent.startsWith('Draft grid') "
                           "&& !el.textContent.startsWith('Recomputing') "
                           "&& !el.textContent.startsWith('Computing'); }",
                           arg=STATUS, timeout=120_000, polling=100)
    exact = kernel_exec(page, f"""
profile.wait(120)
fresh = ProfileSession(frame, bins={start + 1}, n_boot=40).pairs()
mine = profile.session.pairs()
same = all((fresh[c].to_numpy() == mine[c].to_numpy()).all() for c in ("mi", "nmi", "n", "g"))
print(profile.session.settings['bins'], same, profile._status['state'])
""")
    assert exact.split() == [str(start + 1), "True", "idle"], exact
    assert web.outside_requests == []
    assert web.page_errors == [], web.page_errors
