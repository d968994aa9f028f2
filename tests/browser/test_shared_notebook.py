"""A notebook with a live profile, saved and exported with ``jupyter nbconvert --to html``, opened offline.

The notebook runs in a real kernel (nbclient), once saving the widget state into
the notebook's metadata (as JupyterLab's "save widget state" does) and once
without; each is exported with nbconvert's HTML exporter and opened in headless
Chromium with every non-loopback request aborted and recorded (the ``web``
fixture).  In both the static picture must show, whole (not clipped at the right
edge), and every outside request the page makes must be one of nbconvert's own
template scripts: nothing from infoscope's outputs.
"""
from __future__ import annotations

import re
from urllib.parse import urlsplit

import nbformat
import pytest

import nbconvert  # noqa: E402  (installed with jupyterlab, in the test extra)
from nbclient import NotebookClient  # noqa: E402

WIDGET_STATE = "application/vnd.jupyter.widget-state+json"

CELLS = [
    "import time, warnings\n"
    "warnings.simplefilter('ignore')\n"
    "from infoscope.datasets import make_deliveries\n"
    "from infoscope.frame.session import ProfileSession\n"
    "from infoscope.widgets.profile import ProfileWidget\n"
    "frame = make_deliveries(3_000, seed=2)\n"
    "profile = ProfileWidget(ProfileSession(frame, target='late', n_boot=0), picture_delay=0.2)\n"
    "profile",
    # a change after the display: the picture's own output is refreshed (update_display)
    "profile.bins = 6\nprofile.wait()\ntime.sleep(1.5)\nprofile.generation",
]


def _notebook(tmp_path, store_widget_state: bool):
    nb = nbformat.v4.new_notebook()
    nb.cells = [nbformat.v4.new_code_cell(src) for src in CELLS]
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    NotebookClient(nb, timeout=300, kernel_name="python3", store_widget_state=store_widget_state,
                   resources={"metadata": {"path": str(tmp_path)}}).execute()
    return nb


@pytest.fixture(scope="module")
def exports(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("shared")
    out = {}
    for state in (True, False):
        nb = _notebook(tmp, state)
        assert (WIDGET_STATE in nb.metadata.get("widgets", {})) == state
        html, _ = nbconvert.HTMLExporter().from_notebook_node(nb)
        out[state] = (nb, html)
    return out


def _picture_outputs(nb):
    return [o for c in nb.cells for o in c.get("outputs", [])
            if o.get("output_type") == "display_data" and "image/svg+xml" in o.get("data", {})]


@pytest.mark.parametrize("state", [True, False], ids=["with-widget-state", "without-widget-state"])
def test_exported_notebook_shows_the_picture_offline(exports, state, served, web):
    nb, html = exports[state]
    pictures = _picture_outputs(nb)
    assert len(pictures) == 1, "one picture output, refreshed in place"
    ours = pictures[0]["data"]["text/html"]
    assert not re.search(r"(?i)\b(https?:)?//", ours), "the picture's HTML names nothing on the network"
    url = served.put(f"/shared/{'state' if state else 'plain'}.html", html)
    web.goto(url, wait_until="load")
    img = web.page.locator(".isc-static img")
    img.wait_for(state="visible", timeout=20_000)
    box = img.bounding_box()
    loaded = web.page.evaluate("() => { const i = document.querySelector('.isc-static img');"
                               " return [i.complete, i.naturalWidth, i.naturalHeight]; }")
    assert loaded[0] and loaded[1] > 100 and loaded[2] > 100, loaded
    # whole: the image is not wider than the page's output column (it scales down, max-width 100%)
    column = web.page.evaluate("() => document.querySelector('.isc-static').getBoundingClientRect().right")
    assert box["width"] > 100 and box["x"] + box["width"] <= column + 1
    # every outside request is one nbconvert's template names (require.js, the widget
    # manager): our outputs name no URL (checked above), so a URL in the page is the template's
    template = html
    for output in (o for c in nb.cells for o in c.get("outputs", [])):
        for value in output.get("data", {}).values():
            if isinstance(value, str) and len(value) > 40:
                template = template.replace(value, "")
    for request in web.outside_requests:
        parts = urlsplit(request)
        assert f"{parts.netloc}{parts.path}" in template, request


def test_the_saved_picture_is_the_refreshed_one(exports):
    # the second cell moved the bins after the display: the saved picture is the
    # refreshed view's (update_display of the picture's own output), not the first one
    import warnings

    from infoscope.datasets import make_deliveries
    from infoscope.frame.session import ProfileSession
    from infoscope.widgets.profile import ProfileWidget

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        w = ProfileWidget(ProfileSession(make_deliveries(3_000, seed=2), target="late", n_boot=0), threaded=False)
        first_svg = w.picture_svg()
        w.bins = 6
        moved_svg = w.picture_svg()
        moved_generation = w.generation  # the bins move and any follow-up it asked for (the selection)
        w.close()
    assert first_svg != moved_svg
    for state in (True, False):
        nb, _ = exports[state]
        # the generation on screen is the one after the bins move and its follow-ups
        assert nb.cells[1].outputs[-1]["data"]["text/plain"] == str(moved_generation)
        assert _picture_outputs(nb)[0]["data"]["image/svg+xml"] == moved_svg
