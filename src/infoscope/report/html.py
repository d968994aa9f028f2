"""One self-contained HTML file of a profile that works offline.

The file holds everything the live view needs and nothing it would fetch:

- the widget's own front-end module (the file ``ProfileWidget._esm`` points at),
  base64-encoded and imported from a ``blob:`` URL, so no character of it can end
  a ``<script>`` element;
- the view data (``ProfileWidget.payload()``) as JSON in a
  ``<script type="application/json">`` with ``<``, ``>``, ``&`` and the JavaScript
  line separators written as ``\\uXXXX`` escapes, so no column name or value can
  close the element or become markup;
- a small model (``modelFromPayload`` of the module) in place of the kernel: hover,
  sorting and the precomputed pair views keep working;
- the static SVG picture in ``<noscript>`` for readers with scripts off;
- a Content-Security-Policy that forbids every network request, so the page stays
  offline even if some code tried to load something.

Small-cell suppression (``min_count``) is applied to every pair view in the file
before it is written; see :mod:`infoscope.report.suppression`.
"""
from __future__ import annotations

import base64
import html as _html
import json
import os
from pathlib import Path

from infoscope.report.suppression import SMALL, check_min_count, suppression_kinds

__all__ = ["to_html", "profile_html", "suppress_payload", "CONTENT_SECURITY_POLICY"]

#: Scripts only from this page (inline, or blob: URLs made from it); no fetch,
#: no images or fonts from anywhere but data: URIs.
CONTENT_SECURITY_POLICY = ("default-src 'none'; script-src 'unsafe-inline' blob:; "
                           "style-src 'unsafe-inline'; img-src data: blob:; font-src data:; "
                           "connect-src 'none'; base-uri 'none'; form-action 'none'")

_JSON_ESCAPES = {"<": "\\u003c", ">": "\\u003e", "&": "\\u0026", "\u2028": "\\u2028", "\u2029": "\\u2029"}


def _script_json(obj) -> str:
    """JSON safe inside ``<script type="application/json">`` (no ``</``, no markup)."""
    text = json.dumps(obj, ensure_ascii=False, allow_nan=False, separators=(",", ":"))
    for raw, escaped in _JSON_ESCAPES.items():
        text = text.replace(raw, escaped)
    return text


def _style_text(css: str) -> str:
    """The widget's own stylesheet, checked to be inert inside ``<style>``."""
    if "</" in css or "<!--" in css:
        raise ValueError("the widget stylesheet contains markup; it cannot be inlined in <style>")
    return css


def _suppress_view(view: dict, threshold: int) -> dict:
    """A pair view (the widget's shape) with cells below ``threshold`` hidden."""
    counts = view.get("counts")
    if not isinstance(counts, list) or not counts:
        return view
    import numpy as np

    # A cell the widget already hid is fed in as a count of 1: it stays hidden and
    # takes part in the complementary suppression like any other small cell.
    raw = np.array([[1 if c is None else c for c in row] for row in counts], dtype=np.float64)
    kinds = suppression_kinds(raw, threshold)
    mask = kinds != 0
    n_rows, n_cols = raw.shape
    before = view.get("hidden_reasons")
    reasons = []
    for i in range(n_rows):
        line = []
        for j in range(n_cols):
            if counts[i][j] is None:  # hidden by the widget already: keep its reason
                old = before[i][j] if isinstance(before, list) else None
                line.append(old if old in ("small", "complement") else "small")
            elif mask[i, j]:
                line.append("small" if kinds[i, j] == SMALL else "complement")
            else:
                line.append(None)
        reasons.append(line)

    def hide(grid: list) -> list:
        return [[None if mask[i, j] else grid[i][j] for j in range(n_cols)] for i in range(n_rows)]

    out = dict(view)
    out["counts"] = hide(counts)
    for key in ("pmi", "expected"):  # per-cell numbers that would give a hidden count back
        if isinstance(view.get(key), list):
            out[key] = hide(view[key])
    hidden = int(mask.sum())
    if hidden:
        out["row_totals"] = None
        out["col_totals"] = None
    out["hidden_cells"] = hidden
    out["hidden_reasons"] = reasons if hidden else None
    out["min_count"] = max(int(view.get("min_count") or 0), threshold)
    return out


def suppress_payload(payload: dict, min_count) -> dict:
    """Hide small cells in every pair view of a widget payload (a new dict).

    Parameters
    ----------
    payload : dict
        ``ProfileWidget.payload()``: ``{"format", "view", "state", "binary", "pair_cache"}``.
    min_count : int or None
        Counts ``1 .. min_count - 1`` are hidden, with complementary cells, in
        ``state["_pair"]`` and in every view of ``pair_cache``; row and column
        totals of a table with hidden cells are dropped.

    Returns
    -------
    dict
        A copy of the payload; the input is not changed.

    References
    ----------
    Threshold rules with complementary suppression are common practice in official
    statistics for tables of counts.

    Examples
    --------
    >>> view = {"counts": [[50, 3], [40, 60]], "pmi": [[0.1, -1], [0.2, 0.0]], "min_count": 0}
    >>> out = suppress_payload({"state": {"_pair": view}, "pair_cache": {}}, 10)
    >>> out["state"]["_pair"]["counts"]
    [[None, None], [None, None]]
    """
    threshold = check_min_count(min_count)
    if not isinstance(payload, dict):
        raise TypeError(f"payload must be the dict of ProfileWidget.payload(), got {type(payload).__name__}")
    out = dict(payload)
    state = dict(payload.get("state") or {})
    if threshold is None:
        out["state"] = state
        return out
    if isinstance(state.get("_pair"), dict):
        state["_pair"] = _suppress_view(state["_pair"], threshold)
    state["min_count"] = max(int(state.get("min_count") or 0), threshold)
    out["state"] = state
    out["pair_cache"] = {key: _suppress_view(view, threshold) if isinstance(view, dict) else view
                         for key, view in (payload.get("pair_cache") or {}).items()}
    return out


def _front_end_text(widget, key: str) -> str:
    """The widget's ``_esm`` or ``_css`` source: a path, anywidget's file contents or text."""
    value = getattr(widget, key, None)
    if value is None or not isinstance(value, (str, os.PathLike)) and not hasattr(value, "_path"):
        value = getattr(type(widget), key, value)
    path = getattr(value, "_path", None)  # anywidget's FileContents wrapper of a file
    if path is not None:
        return Path(path).read_text(encoding="utf-8")
    if isinstance(value, os.PathLike):
        return Path(value).read_text(encoding="utf-8")
    if not isinstance(value, str) or not value.strip():
        if key == "_css":
            return ""
        raise TypeError(f"{type(widget).__name__} has no {key} front-end module to inline")
    if "\n" not in value and len(value) < 4096 and os.path.isfile(value):
        return Path(value).read_text(encoding="utf-8")
    return value


def _esm_text(widget) -> str:
    """The front-end module's source: the widget's ``_esm`` (a path, file contents or text)."""
    return _front_end_text(widget, "_esm")


def _css_text(widget) -> str:
    """The front end's stylesheet: the widget's ``_css`` ("" when it has none)."""
    return _front_end_text(widget, "_css")


_BOOT = """
(async () => {
  const status = document.getElementById("isc-export-status");
  try {
    const data = document.getElementById("isc-payload").textContent;
    const payload = JSON.parse(data);
    const b64 = document.getElementById("isc-esm").textContent.trim();
    const bytes = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
    const url = URL.createObjectURL(new Blob([bytes], { type: "text/javascript" }));
    const mod = await import(url);
    // anywidget's front-end module: a default export that is { render } or a
    // function returning it (called once per model)
    const def = typeof mod.default === "function" ? await mod.default() : mod.default;
    const render = def && def.render;
    if (typeof mod.modelFromPayload !== "function" || typeof render !== "function") {
      throw new Error("the inlined module lacks render or modelFromPayload");
    }
    const model = mod.modelFromPayload(payload);
    window.__infoscopeModel = model;
    await render({ model, el: document.getElementById("isc-view") });
    status.textContent = "";
    document.body.dataset.rendered = "yes";
  } catch (err) {
    status.textContent = "The interactive view could not start: " + String(err && err.message || err);
    document.body.dataset.rendered = "failed";
  }
})();
"""

_PAGE = """<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="{csp}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="infoscope {version}">
<title>{title}</title>
<style>
body{{margin:16px 20px;background:#fff;color:#1f2328;font-family:system-ui,-apple-system,"Segoe UI",Roboto,Arial,sans-serif}}
.isc-export-head{{font-size:12px;color:#57606a;margin:0 0 10px}}
.isc-export-notes{{font-size:12px;color:#57606a;margin:14px 0 0;padding:8px 10px;border-top:1px solid #e4e1d8;max-width:1100px}}
.isc-export-notes li{{margin:2px 0}}
#isc-export-status{{font-size:12px;color:#7a2419}}
</style>
<style id="isc-widget-css">{css}</style>
</head>
<body>
<div id="isc-export-status">Starting the view&#8230;</div>
<div id="isc-view"></div>
<noscript>{picture}</noscript>
<ul class="isc-export-notes">{notes}</ul>
<script type="application/json" id="isc-payload">{payload}</script>
<script type="text/plain" id="isc-esm">{esm}</script>
<script type="module">{boot}</script>
</body>
</html>
"""


def _count_hidden(payload: dict) -> tuple[int, int]:
    """Hidden cells and number of pair views saved in ``pair_cache``."""
    views = [v for v in (payload.get("pair_cache") or {}).values() if isinstance(v, dict)]
    return sum(int(v.get("hidden_cells") or 0) for v in views), len(views)


def profile_html(widget, *, min_count=None, title: str | None = None) -> str:
    """The text of a self-contained offline HTML page of a profile view.

    Parameters
    ----------
    widget : ProfileWidget or ProfileSession
        A live view (its current settings are exported) or a session (exported with
        a view of its current settings).
    min_count : int, optional
        Hide counts ``1 .. min_count - 1`` in every pair view of the file (and the
        cells that would give them away); a note in the page says so. The widget's
        own ``min_count`` applies too; the larger one wins.
    title : str, optional
        Title of the page (default: "infoscope profile").

    Returns
    -------
    str
        The HTML document.

    References
    ----------
    W3C (2016). Content Security Policy Level 2 (the policy that keeps the page
    offline). Small-cell suppression: common practice in official statistics.

    Examples
    --------
    >>> from infoscope.report.html import profile_html  # doctest: +SKIP
    >>> text = profile_html(ProfileWidget(session), min_count=10)  # doctest: +SKIP
    """
    import infoscope

    threshold = check_min_count(min_count)
    owned = False
    if not hasattr(widget, "payload"):
        from infoscope.widgets.profile import ProfileWidget

        widget = ProfileWidget(widget, threaded=False)
        owned = True
    try:
        if hasattr(widget, "wait"):
            widget.wait()
        own = check_min_count(int(getattr(widget, "min_count", 0) or 0))
        effective = max([t for t in (threshold, own) if t is not None], default=None)
        payload = suppress_payload(widget.payload(), effective)
        session = getattr(widget, "session", None)
        picture = ""
        if session is not None:
            from infoscope.report.picture import profile_svg, svg_data_uri

            svg = profile_svg(session, min_count=effective)
            picture = f'<img alt="infoscope profile (static picture)" src="{svg_data_uri(svg)}">'
        esm = _esm_text(widget)
        css = _css_text(widget)
    finally:
        if owned:
            widget.close()

    notes = ["Saved copy: the numbers are those of the notebook at export time; controls that need "
             "the kernel are off, the pair views saved with the export still open.",
             "Bias-corrected estimates near 0 can be slightly negative: read them as no "
             "detectable information, not as an error."]
    cells, views = _count_hidden(payload)
    if effective:
        notes.append(f"Small-cell suppression: counts below {effective} are hidden in every pair view "
                     f"of this file (shown as \u201c<{effective}\u201d), with the cells and totals that "
                     f"would give them away (shown as \u201c\u00b7\u201d, hidden to protect a small cell; "
                     f"their counts can be of any size) ({cells} cells hidden in {views} saved pair views).")
    page_title = title or "infoscope profile"
    return _PAGE.format(
        csp=_html.escape(CONTENT_SECURITY_POLICY, quote=True),
        version=_html.escape(str(infoscope.__version__)),
        title=_html.escape(page_title),
        picture=picture,
        notes="".join(f"<li>{_html.escape(n)}</li>" for n in notes),
        payload=_script_json(payload),
        css=_style_text(css),
        esm=base64.b64encode(esm.encode("utf-8")).decode("ascii"),
        boot=_BOOT,
    )


def to_html(widget, path=None, *, min_count=None, title: str | None = None):
    """Write one self-contained HTML file of a profile that works offline.

    Parameters
    ----------
    widget : ProfileWidget or ProfileSession
        The view to export (a session is exported with a view of its settings).
    path : str or os.PathLike, optional
        Where to write the file. Without it the HTML text is returned.
    min_count : int, optional
        Small-cell threshold for every pair view in the file (see
        :func:`profile_html`).
    title : str, optional
        Title of the page.

    Returns
    -------
    pathlib.Path or str
        The path written, or the HTML text when ``path`` is None.

    References
    ----------
    W3C (2016). Content Security Policy Level 2. Small-cell suppression: common
    practice in official statistics.

    Examples
    --------
    >>> import infoscope.report as report  # doctest: +SKIP
    >>> report.to_html(widget, "profile.html", min_count=10)  # doctest: +SKIP
    PosixPath('profile.html')
    """
    text = profile_html(widget, min_count=min_count, title=title)
    if path is None:
        return text
    target = Path(os.fspath(path))
    if target.is_dir():
        raise IsADirectoryError(f"path {str(target)!r} is a directory; give a file name such as profile.html")
    if not target.parent.exists():
        raise FileNotFoundError(f"the folder of path {str(target)!r} does not exist")
    target.write_text(text, encoding="utf-8")
    return target
