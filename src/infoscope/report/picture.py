"""One compact static SVG picture of a profile.

The widget puts this picture in its ``_repr_mimebundle_`` (``image/svg+xml`` and an
``<img>`` data URI in ``text/html``), so a notebook saved without a kernel, an
untrusted notebook and nbconvert's HTML still show the profile. It is drawn by hand
(no browser, no JavaScript engine) so that it costs milliseconds, and every text in
it goes through :func:`svg_text`: column names are data.

The picture shows no counts at all (bars of entropy, cells of the information grid
and bars of relevance), so it cannot expose a small cell.
"""
from __future__ import annotations

import base64
import json
import math
import re

import numpy as np
import pandas as pd

from infoscope.frame.suppression import check_min_count
from infoscope.report._style import DEPENDENCE_CAUTION, PALETTE
from infoscope.views import serialize as ser
from infoscope.views.payload import CORE_PARTS, payload

__all__ = ["profile_svg", "profile_svg_from_payload", "profile_svg_from_tables", "svg_data_uri", "svg_text"]

# Characters XML 1.0 forbids even when escaped: a name holding one would make the
# whole picture unreadable, so they are shown as U+FFFD.
_XML_FORBIDDEN = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")
FONT = "font-family=\"DejaVu Sans, Helvetica, Arial, sans-serif\""


def svg_text(value, limit: int | None = None) -> str:
    """Escape any value for SVG/XML text or an attribute (``& < > " '``).

    Parameters
    ----------
    value : object
        Converted with ``str``.
    limit : int, optional
        Cut to this many characters, ending with an ellipsis.

    Returns
    -------
    str
        Text safe inside an element or a double- or single-quoted attribute.

    References
    ----------
    .. [1] W3C (2008). Extensible Markup Language (XML) 1.0, 5th ed., sections 2.2
       (allowed characters) and 2.4 (character data and markup).

    Examples
    --------
    >>> svg_text('<img src=x onerror="alert(1)">')
    '&lt;img src=x onerror=&quot;alert(1)&quot;&gt;'
    """
    text = _XML_FORBIDDEN.sub("\ufffd", str(value))
    if limit is not None and len(text) > limit:
        text = text[: max(limit - 1, 1)] + "\u2026"
    return (text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
            .replace('"', "&quot;").replace("'", "&#39;"))


def _mix(low: str, high: str, t: float) -> str:
    t = min(max(t, 0.0), 1.0)
    a = [int(low[i:i + 2], 16) for i in (1, 3, 5)]
    b = [int(high[i:i + 2], 16) for i in (1, 3, 5)]
    return "#" + "".join(f"{round(x + (y - x) * t):02x}" for x, y in zip(a, b))


def _fmt(value: float | None, digits: int = 2) -> str:
    return "–" if value is None else f"{value:.{digits}f}"


def _bars(items, *, x0: float, y0: float, label_w: float, bar_w: float, row_h: float,
          unit: str, title: str, colour_of, outline_key: str | None,
          value_key: str, scale_max: float) -> tuple[list[str], float]:
    """Horizontal bars with labels and CI whiskers; returns the SVG parts and the height used."""
    parts = [f'<text x="{x0:.1f}" y="{y0 + 12:.1f}" font-size="13" font-weight="bold" {FONT}>{svg_text(title)}</text>']
    top = y0 + 22
    scale = bar_w / scale_max if scale_max > 0 else 0.0
    for i, item in enumerate(items):
        y = top + i * row_h
        name = item["column"]
        parts.append(f'<g><title>{svg_text(name)}: {svg_text(_fmt(item.get(value_key), 3))} {svg_text(unit)}</title>')
        parts.append(f'<text x="{x0 + label_w - 6:.1f}" y="{y + row_h * 0.72:.1f}" font-size="10" '
                     f'text-anchor="end" {FONT}>{svg_text(name, 26)}</text>')
        bx = x0 + label_w
        if outline_key and item.get(outline_key) is not None:
            parts.append(f'<rect x="{bx:.1f}" y="{y + 2:.1f}" width="{item[outline_key] * scale:.1f}" '
                         f'height="{row_h - 4:.1f}" fill="none" stroke="{PALETTE["outline"]}" stroke-dasharray="3 2"/>')
        value = item.get(value_key)
        if value is not None:
            parts.append(f'<rect x="{bx:.1f}" y="{y + 3:.1f}" width="{max(value, 0) * scale:.1f}" '
                         f'height="{row_h - 6:.1f}" fill="{colour_of(item)}"/>')
        lo, hi = item.get("ci_low"), item.get("ci_high")
        if lo is not None and hi is not None:
            ym = y + row_h / 2
            parts.append(f'<line x1="{bx + lo * scale:.1f}" x2="{bx + hi * scale:.1f}" y1="{ym:.1f}" y2="{ym:.1f}" '
                         f'stroke="{PALETTE["whisker"]}" stroke-width="1.2"/>')
        parts.append("</g>")
    bottom = top + len(items) * row_h
    parts.append(f'<line x1="{x0 + label_w:.1f}" x2="{x0 + label_w + bar_w:.1f}" y1="{bottom + 2:.1f}" '
                 f'y2="{bottom + 2:.1f}" stroke="#888"/>')
    parts.append(f'<text x="{x0 + label_w:.1f}" y="{bottom + 14:.1f}" font-size="9" {FONT}>0</text>')
    parts.append(f'<text x="{x0 + label_w + bar_w:.1f}" y="{bottom + 14:.1f}" font-size="9" text-anchor="end" '
                 f'{FONT}>{svg_text(_fmt(scale_max))} {svg_text(unit)}</text>')
    return parts, bottom + 18 - y0


def profile_svg_from_tables(entropy: pd.DataFrame, matrix: pd.DataFrame | None = None,
                            relevance: pd.DataFrame | None = None, *, target: str | None = None,
                            max_columns: int = 40, min_count=None) -> str:
    """Draw the profile picture from result tables already computed.

    Parameters
    ----------
    entropy : pandas.DataFrame
        ``ProfileSession.entropy()``.
    matrix : pandas.DataFrame, optional
        ``ProfileSession.matrix()`` (the information grid).
    relevance : pandas.DataFrame, optional
        ``ProfileSession.relevance(target)``.
    target : str, optional
        Name of the target, for the relevance title.
    max_columns : int, default=40
        Draw at most this many columns in the bars (highest entropy first) and the
        grid (its first ``max_columns`` names); a note says how many were left out.
    min_count : int, optional
        Accepted for symmetry with the other exports; the picture shows no counts.

    Returns
    -------
    str
        A standalone SVG document.

    References
    ----------
    .. [1] W3C (2011). Scalable Vector Graphics (SVG) 1.1, 2nd ed.

    Examples
    --------
    >>> import pandas as pd
    >>> t = pd.DataFrame({"column": ["<b>"], "kind": ["categorical"], "k": [2], "n": [10],
    ...     "missing": [0], "missing_share": [0.0], "entropy": [1.0], "ci_low": [0.9],
    ...     "ci_high": [1.0], "max_entropy": [1.0], "efficiency": [1.0],
    ...     "effective_categories": [2.0], "flags": [""]})
    >>> svg = profile_svg_from_tables(t)
    >>> svg.startswith("<svg") and "&lt;b&gt;" in svg and "<b>" not in svg
    True
    """
    check_min_count(min_count)
    attrs = ser.attrs_of(entropy)
    grid = None
    if matrix is not None and len(matrix.columns) >= 2:
        grid = (*ser.grid_records(matrix), ser.attrs_of(matrix)["measure"] or "mi")
    items = ser.relevance_records(relevance) if relevance is not None and len(relevance) else None
    return _draw(ser.entropy_records(entropy), grid, items, unit=attrs["unit"], estimator=attrs["estimator"],
                 sampled=attrs["sampled"], target=target, max_columns=max_columns)


def _draw(bars: list, grid, relevance: list | None, *, unit: str, estimator, sampled, target,
          max_columns: int) -> str:
    """The picture from records: entropy bars, (names, cells, measure) of the grid, relevance."""
    if isinstance(max_columns, bool) or not isinstance(max_columns, int) or max_columns < 1:
        raise ValueError(f"max_columns must be a positive whole number, got {max_columns!r}")
    n_columns = len(bars)
    bars = sorted(bars, key=lambda r: -(r["entropy"] or 0.0))
    dropped = max(len(bars) - max_columns, 0)
    bars = bars[:max_columns]
    row_h = 14.0
    parts: list[str] = []
    x = 10.0
    scale_max = max([b["max_entropy"] or 0.0 for b in bars] + [b["ci_high"] or 0.0 for b in bars] + [1e-9])
    body, h_bars = _bars(bars, x0=x, y0=28, label_w=150, bar_w=170, row_h=row_h, unit=unit,
                         title="Entropy bars", colour_of=lambda _: PALETTE["bar"],
                         outline_key="max_entropy", value_key="entropy", scale_max=scale_max)
    parts += body
    width = x + 150 + 170 + 20
    height = 28 + h_bars

    if grid is not None:
        names, cells, measure = grid
        shown = names[:max_columns]
        index = {n: i for i, n in enumerate(shown)}
        n = len(shown)
        size = max(min(14.0, 280.0 / n), 3.0)
        gx = width + 110
        gy = 28 + 22
        values = [c["value"] for c in cells if c["value"] is not None and c["a"] in index and c["b"] in index]
        top = max([v for v in values if v > 0] + [1e-12])
        parts.append(f'<text x="{gx - 100:.1f}" y="40" font-size="13" font-weight="bold" {FONT}>'
                     f'Information grid ({svg_text(measure)})</text>')
        for i in range(n):  # a column with itself: not a pair
            parts.append(f'<rect x="{gx + i * size:.1f}" y="{gy + i * size:.1f}" width="{size:.1f}" '
                         f'height="{size:.1f}" fill="#e6e3da"/>')
        for c in cells:
            i, j = index.get(c["a"]), index.get(c["b"])
            if i is None or j is None:
                continue
            v = c["value"]
            fill = PALETTE["hidden"] if v is None else _mix(PALETTE["grid_low"], PALETTE["grid_high"], math.sqrt(max(v, 0.0) / top))
            parts.append(f'<rect x="{gx + j * size:.1f}" y="{gy + i * size:.1f}" width="{size:.1f}" '
                         f'height="{size:.1f}" fill="{fill}"><title>{svg_text(c["a"])} × {svg_text(c["b"])}: '
                         f'{svg_text(_fmt(v, 3))}</title></rect>')
        if size >= 7:
            for i, name in enumerate(shown):
                parts.append(f'<text x="{gx - 4:.1f}" y="{gy + (i + 0.8) * size:.1f}" font-size="{min(size - 1, 10):.0f}" '
                             f'text-anchor="end" {FONT}>{svg_text(name, 16)}</text>')
        caption = f"darker: more shared information (square-root scale, max {_fmt(top, 3)})"
        parts.append(f'<text x="{gx:.1f}" y="{gy + n * size + 12:.1f}" font-size="9" {FONT}>'
                     f'{svg_text(caption)}</text>')
        width = max(gx + n * size + 20, _text_right(gx, caption, 9))
        height = max(height, gy + n * size + 20)

    if relevance:
        items = sorted(relevance, key=lambda r: -(r["mi"] or 0.0))[:max_columns]
        ry = height + 10
        top = max([r["ci_high"] or 0.0 for r in items] + [r["mi"] or 0.0 for r in items] + [1e-9])
        title = f"Relevance to {target}" if target else "Relevance"
        body, h_rel = _bars(items, x0=x, y0=ry, label_w=150, bar_w=170, row_h=row_h, unit=unit, title=title,
                            colour_of=lambda r: PALETTE["leak"] if r["leakage"] else PALETTE["bar"],
                            outline_key=None, value_key="mi", scale_max=top)
        parts += body
        if any(r["leakage"] for r in items):
            leak = "orange: tells >= 95 % of the target (possible leakage)"
            parts.append(f'<text x="{x + 330:.1f}" y="{ry + 34:.1f}" font-size="10" fill="{PALETTE["leak"]}" {FONT}>'
                         f"{svg_text(leak)}</text>")
            width = max(width, _text_right(x + 330, leak, 10))
        height = ry + h_rel

    notes = [f"Estimator {estimator or '?'}; unit {unit}; whiskers: confidence intervals.",
             DEPENDENCE_CAUTION]
    if sampled:
        notes.insert(0, f"Computed on a sample of {sampled:,} rows.")
    if dropped:
        notes.append(f"{dropped} more columns not drawn.")
    for k, note in enumerate(notes):
        parts.append(f'<text x="10" y="{height + 14 + 13 * k:.1f}" font-size="10" fill="#444" {FONT}>'
                     f"{svg_text(note)}</text>")
        width = max(width, _text_right(10, note, 10))
    height += 14 + 13 * len(notes)
    head = (f'<text x="10" y="16" font-size="14" font-weight="bold" {FONT}>infoscope profile</text>'
            f'<text x="150" y="16" font-size="10" fill="#444" {FONT}>{n_columns} columns</text>')
    w, h = math.ceil(width), math.ceil(height)
    return (f'<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" '
            f'role="img" aria-label="infoscope profile"><rect width="{w}" height="{h}" fill="#ffffff"/>'
            + head + "".join(parts) + "</svg>")


def _text_right(x: float, text: str, size: float) -> float:
    """Right end of a line of sans-serif text, generously estimated (0.62 em a character), plus a margin.

    The picture's width must hold every caption: a viewer clips what lies beyond
    the SVG's width.
    """
    return x + 0.62 * size * len(text) + 10


def profile_svg(session, *, max_columns: int = 40, min_count=None) -> str:
    """One compact static SVG of a profile: entropy bars, information grid, relevance.

    Parameters
    ----------
    session : ProfileSession
        The profile (a widget is accepted too: its ``session`` attribute is used).
    max_columns : int, default=40
        Most columns drawn (see :func:`profile_svg_from_tables`).
    min_count : int, optional
        Accepted for symmetry with the other exports; the picture shows no counts.

    Returns
    -------
    str
        A standalone SVG document (``image/svg+xml``).

    References
    ----------
    .. [1] W3C (2011). Scalable Vector Graphics (SVG) 1.1, 2nd ed.

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession  # doctest: +SKIP
    >>> from infoscope.datasets import make_deliveries  # doctest: +SKIP
    >>> svg = profile_svg(ProfileSession(make_deliveries(), target="late"))  # doctest: +SKIP
    """
    session = getattr(session, "session", session)
    check_min_count(min_count)
    return profile_svg_from_payload(payload(session, top_pairs=0, parts=CORE_PARTS), max_columns=max_columns)


def _buffer(value, dtype) -> np.ndarray:
    """A grid buffer of a payload: bytes (a live view's trait) or base64 text (a payload)."""
    if isinstance(value, str):
        value = base64.b64decode(value.encode("ascii"))
    return np.frombuffer(bytes(value or b""), dtype=dtype)


def profile_svg_from_payload(data: dict, *, max_columns: int = 40) -> str:
    """Draw the profile picture from a view payload (:func:`infoscope.views.payload`).

    Parameters
    ----------
    data : dict
        A payload, or its ``state`` alone (a live widget passes its traits: the
        grid buffers may then be bytes rather than base64 text).
    max_columns : int, default=40
        Draw at most this many columns (see :func:`profile_svg_from_tables`).

    Returns
    -------
    str
        A standalone SVG document.

    References
    ----------
    .. [1] W3C (2011). Scalable Vector Graphics (SVG) 1.1, 2nd ed.

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> from infoscope.views import payload
    >>> s = ProfileSession(pd.DataFrame({"<a>": list("xyxy") * 10, "b": list("xxyy") * 10}), n_boot=0)
    >>> svg = profile_svg_from_payload(payload(s, top_pairs=0))
    >>> svg.startswith("<svg") and "&lt;a&gt;" in svg
    True
    """
    state = data.get("state", data) if isinstance(data, dict) else None
    if not isinstance(state, dict) or not state.get("_entropy"):
        raise ValueError("a payload (infoscope.views.payload) with an entropy part is needed to draw the picture")
    entropy = json.loads(state["_entropy"])
    bars = [dict(zip(entropy["fields"], row)) for row in entropy["rows"]]
    grid = None
    meta = state.get("_grid_meta") or {}
    names = [str(x) for x in meta.get("names") or []]
    if len(names) >= 2:
        values = _buffer(state.get("_grid_values"), np.float32).astype(np.float64)
        size = len(names)
        if values.size == size * size:
            square = values.reshape(size, size)
            cells = [{"a": a, "b": b, "value": ser.scalar(square[i, j])}
                     for i, a in enumerate(names) for j, b in enumerate(names) if i != j]
            grid = (names, cells, meta.get("measure") or "mi")
    relevance, target = None, None
    if state.get("_relevance"):
        rel = json.loads(state["_relevance"])
        target = rel.get("target")
        relevance = [dict(zip(rel["fields"], row)) for row in rel.get("rows") or []] or None
    return _draw(bars, grid, relevance, unit=str(entropy.get("unit") or "bits"),
                 estimator=entropy.get("estimator"), sampled=entropy.get("sampled"), target=target,
                 max_columns=max_columns)


def svg_data_uri(svg: str) -> str:
    """``data:image/svg+xml;base64,...`` of an SVG, for an ``<img src=...>``.

    Parameters
    ----------
    svg : str
        An SVG document.

    Returns
    -------
    str
        The data URI (base64, so no character of the SVG can end the attribute).

    References
    ----------
    .. [1] Masinter, L. (1998). RFC 2397: The "data" URL scheme. IETF.

    Examples
    --------
    >>> svg_data_uri("<svg/>")
    'data:image/svg+xml;base64,PHN2Zy8+'
    """
    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode("utf-8")).decode("ascii")
