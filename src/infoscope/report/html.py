"""One self-contained HTML file of a profile that works offline.

The file holds everything the live view needs and nothing it would fetch:

- the package's front-end module (the file the live widget loads), base64-encoded
  and imported from a ``blob:`` URL, so no character of it can end a ``<script>``
  element;
- the view data (:func:`infoscope.views.payload`) as JSON in a
  ``<script type="application/json">`` with ``<``, ``>``, ``&`` and the JavaScript
  line separators written as ``\\uXXXX`` escapes, so no column name or value can
  close the element or become markup;
- a small model (``modelFromPayload`` of the module) in place of the kernel: hover,
  sorting and the precomputed pair views keep working;
- the static SVG picture in ``<noscript>`` for readers with scripts off;
- a Content-Security-Policy that forbids every network request, so the page stays
  offline even if some code tried to load something.

Small-cell suppression (``min_count``) is applied to every pair view when the
payload is built (the same rule as the live view); see
:mod:`infoscope.frame.suppression`.  No widget is created: the export reads the
session (or, for a live view, its session and control values).
"""
from __future__ import annotations

import base64
import html as _html
import json
import os
from pathlib import Path

from infoscope._version import __version__
from infoscope.frame.suppression import check_min_count
from infoscope.report.picture import profile_svg_from_payload, svg_data_uri
from infoscope.views.payload import payload as build_payload

__all__ = ["to_html", "profile_html", "CONTENT_SECURITY_POLICY"]

#: The front-end files of the package (written by the JS build, loaded by the live widget).
STATIC = Path(__file__).resolve().parent.parent / "widgets" / "static"

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


def _static_text(name: str) -> str:
    path = STATIC / name
    return path.read_text(encoding="utf-8") if path.is_file() else ""


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


def _pairs_note(meta: dict) -> str | None:
    """How many pairs of the profile rest on thin tables, and which test gave their p-values.

    From the grid's meta (``pair_counts``, :func:`infoscope.views.serialize.grid_buffers`).
    """
    counts = (meta or {}).get("pair_counts")
    if not counts or not counts.get("pairs"):
        return None
    text = (f"Pairs: {counts.get('sparse', 0)} of {counts['pairs']} rest on sparse tables (under 5 rows "
            f"per cell on average: uncertain estimates) and {counts.get('too_few', 0)} have too few rows "
            "to tell anything (under one row per cell).")
    text += (f" p-values: the chi-square law (G with Williams' correction) for {counts.get('chi2', 0)} "
             f"pairs with at least 20 rows per cell, a permutation test for {counts.get('permutation', 0)}; "
             "findings are read by the Benjamini-Hochberg q-value.")
    return text


def _payload_of(source, *, settings=None, min_count=None, reference=None, drift_over=None) -> dict:
    """The payload of a live view (its own ``payload``) or of a session (:func:`infoscope.views.payload`)."""
    if callable(getattr(source, "payload", None)) and hasattr(source, "session"):
        if settings or reference is not None or drift_over is not None:
            raise TypeError("settings=, reference= and drift_over= apply to a session; a live view exports "
                            "its own control values, reference and drift over time")
        return source.payload(min_count=min_count)
    if not all(hasattr(source, m) for m in ("entropy", "pairs", "pair", "names", "settings")):
        raise TypeError("to_html needs an infoscope ProfileSession (or a live profile view), "
                        f"got {type(source).__name__}")
    return build_payload(source, settings, min_count=min_count, reference=reference, drift_over=drift_over)


def profile_html(source, *, min_count=None, title: str | None = None, settings=None, reference=None,
                 drift_over=None) -> str:
    """The text of a self-contained offline HTML page of a profile.

    Parameters
    ----------
    source : ProfileSession or ProfileWidget
        A session (exported with its current settings) or a live view (its
        session and its current control values).
    min_count : int, optional
        Hide counts ``1 .. min_count - 1`` in every pair view of the file (and the
        cells that would give them away); a note in the page says so. A live view's
        own ``min_count`` applies too; the larger one wins.
    title : str, optional
        Title of the page (default: "infoscope profile").
    settings : mapping, optional
        View settings of a session's export (``order``, ``alpha_fdr``,
        ``selected_pair``, ``sort_by``, ...; see :func:`infoscope.views.payload`).
    reference : DataFrame, optional
        A reference frame for a session's export: adds the drift view (drift of the
        session's frame from it; a live view exports its own reference).
    drift_over : str or tuple, optional
        ``(time_column, every[, against])`` for a session's export: adds the strip of
        drift over time to the drift view (:func:`infoscope.views.payload.drift_over_spec`).

    Returns
    -------
    str
        The HTML document.

    References
    ----------
    .. [1] W3C (2016). Content Security Policy Level 2 (the policy that keeps the
       page offline).

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> s = ProfileSession(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}), n_boot=0)
    >>> profile_html(s, min_count=5).startswith("<!DOCTYPE html>")
    True
    """
    check_min_count(min_count)
    data = _payload_of(source, settings=settings, min_count=min_count, reference=reference,
                       drift_over=drift_over)
    effective = data["state"].get("min_count") or None
    svg = profile_svg_from_payload(data)
    picture = f'<img alt="infoscope profile (static picture)" src="{svg_data_uri(svg)}">'
    esm = _static_text("profile.js")
    if not esm.strip():
        raise FileNotFoundError(f"the front-end module {STATIC / 'profile.js'} is missing from the package")

    notes = ["Saved copy: the numbers are those of the notebook at export time; controls that need "
             "the kernel are off, the pair views saved with the export still open."]
    # (the caution about slightly negative estimates is the views' own caution
    # line, shown once on the page)
    pairs_note = _pairs_note(data["state"].get("_grid_meta"))
    if pairs_note:
        notes.append(pairs_note)
    cells, views = _count_hidden(data)
    if effective:
        notes.append(f"Small-cell suppression: counts below {effective} are hidden in every pair view "
                     f"of this file (shown as \u201c<{effective}\u201d), with the cells and totals that "
                     f"would give them away (shown as \u201c\u00b7\u201d, hidden to protect a small cell; "
                     f"their counts can be of any size) ({cells} cells hidden in {views} saved pair views).")
    page_title = title or "infoscope profile"
    return _PAGE.format(
        csp=_html.escape(CONTENT_SECURITY_POLICY, quote=True),
        version=_html.escape(__version__),
        title=_html.escape(page_title),
        css=_style_text(_static_text("profile.css")),
        picture=picture,
        notes="".join(f"<li>{_html.escape(n)}</li>" for n in notes),
        payload=_script_json(data),
        esm=base64.b64encode(esm.encode("utf-8")).decode("ascii"),
        boot=_BOOT,
    )


def to_html(source, path=None, *, min_count=None, title: str | None = None, settings=None, reference=None,
            drift_over=None):
    """Write one self-contained HTML file of a profile that works offline.

    Parameters
    ----------
    source : ProfileSession or ProfileWidget
        What to export (see :func:`profile_html`).
    path : str or os.PathLike, optional
        Where to write the file. Without it the HTML text is returned.
    min_count : int, optional
        Small-cell threshold for every pair view in the file (see
        :func:`profile_html`).
    title : str, optional
        Title of the page.
    settings : mapping, optional
        View settings of a session's export (see :func:`profile_html`).
    reference : DataFrame, optional
        A reference frame: adds the drift view (see :func:`profile_html`).
    drift_over : str or tuple, optional
        Adds the strip of drift over time (see :func:`profile_html`).

    Returns
    -------
    pathlib.Path or str
        The path written, or the HTML text when ``path`` is None.

    References
    ----------
    .. [1] W3C (2016). Content Security Policy Level 2.

    Examples
    --------
    >>> import infoscope.report as report  # doctest: +SKIP
    >>> report.to_html(session, "profile.html", min_count=10)  # doctest: +SKIP
    PosixPath('profile.html')
    """
    text = profile_html(source, min_count=min_count, title=title, settings=settings, reference=reference,
                        drift_over=drift_over)
    if path is None:
        return text
    target = Path(os.fspath(path))
    if target.is_dir():
        raise IsADirectoryError(f"path {str(target)!r} is a directory; give a file name such as profile.html")
    if not target.parent.exists():
        raise FileNotFoundError(f"the folder of path {str(target)!r} does not exist")
    target.write_text(text, encoding="utf-8")
    return target
