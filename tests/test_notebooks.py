"""Every example notebook runs top to bottom in a real kernel (nbclient, no browser).

Also checks what a shared notebook shows: the profile cell's outputs are the
widget view and, right after it, the static SVG picture (``image/svg+xml`` plus an
``<img>`` data URI in ``text/html``), and the stored notebooks hold no outputs or
widget state.
"""
from __future__ import annotations

import base64
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

NOTEBOOKS = sorted((Path(__file__).resolve().parents[1] / "example_notebooks").glob("*.ipynb"))
WIDGET_MIME = "application/vnd.jupyter.widget-view+json"


def test_there_are_example_notebooks():
    assert len(NOTEBOOKS) >= 2


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_stored_notebook_has_no_outputs_or_widget_state(path):
    nb = nbformat.read(path, as_version=4)
    nbformat.validate(nb)
    assert "widgets" not in nb.metadata, "widget state would carry the whole ESM text"
    for cell in nb.cells:
        if cell.cell_type == "code":
            assert cell.outputs == [] and cell.execution_count is None


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_notebook_runs_and_shows_widget_and_picture(path, tmp_path):
    nb = nbformat.read(path, as_version=4)
    client = NotebookClient(nb, timeout=180, kernel_name="python3",
                            resources={"metadata": {"path": str(tmp_path)}})
    client.execute()
    errors = [o for c in nb.cells if c.cell_type == "code" for o in c.outputs if o.output_type == "error"]
    assert errors == [], errors and "\n".join(errors[0].get("traceback", []))[-2000:]
    bundles = [o.get("data", {}) for c in nb.cells if c.cell_type == "code" for o in c.outputs
               if o.output_type in ("display_data", "execute_result")]
    views = [i for i, b in enumerate(bundles) if WIDGET_MIME in b]
    assert views, "the profile cell displays a live widget"
    # right after the live view, its static picture as an output of its own (refreshed
    # through its display id, so the live view is never re-rendered)
    picture = bundles[views[0] + 1]
    assert WIDGET_MIME not in picture
    svg = picture.get("image/svg+xml")
    assert svg, "beside the widget: a static SVG picture for saved / untrusted notebooks"
    ET.fromstring(svg if isinstance(svg, str) else "".join(svg))  # well-formed
    img = re.search(r'<img [^>]*src="data:image/svg\+xml;base64,([^"]+)"', picture.get("text/html", ""))
    assert img and base64.b64decode(img.group(1)).decode("utf-8").startswith("<svg")
    pages = list(tmp_path.glob("*.html"))
    assert pages, "the notebook ends with an offline export"
    assert 'id="isc-payload"' in pages[0].read_text(encoding="utf-8")
