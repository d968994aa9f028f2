"""The drift check as one self-contained HTML page (no script, nothing fetched): ``infoscope drift --out``.

One row per column: a PSI bar on a shared scale with the band that sampling alone
reaches at these sizes (to its 95 % point) drawn under it and the 0.10 / 0.25
common-practice rules, then the numbers and the flag; each compared column opens
(``<details>``) onto both distributions on the shared alphabet with each symbol's
share of PSI.  Relationship drift, when asked for, lists the pairs that moved.
Every name, label and value is escaped: they are data.
"""
from __future__ import annotations

import html
import math

from infoscope.frame.results import DRIFT_FLAGS
from infoscope.report._style import PALETTE

__all__ = ["drift_page"]

_COLOURS = {**PALETTE, "within_chance": "#c9d6de", "type_changed": "#d5d3cc", "": "#d5d3cc"}
_BAR_W, _BAR_H = 260, 16


def _e(value) -> str:
    return html.escape(str(value), quote=True)


def _num(value, digits: int = 3) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "–"
    if isinstance(value, float):
        return f"{value:.{digits}g}"
    return _e(value)


def _bar(psi, high, flag, scale) -> str:
    def x(v):
        return max(0.0, min(1.0, v / scale)) * _BAR_W

    parts = [f'<svg width="{_BAR_W}" height="{_BAR_H}" role="img" aria-label="PSI {_num(psi)}">']
    if high is not None and math.isfinite(high):
        parts.append(f'<rect x="0" y="0" width="{x(high):.1f}" height="{_BAR_H}" fill="#ece9e0">'
                     f"<title>chance band: 0 to {_num(high)}</title></rect>")
    if psi is not None and math.isfinite(psi):
        parts.append(f'<rect x="0" y="4" width="{x(psi):.1f}" height="{_BAR_H - 8}" '
                     f'fill="{_COLOURS.get(flag, "#8db3c7")}"/>')
    for rule in (0.10, 0.25):
        if rule <= scale:
            parts.append(f'<line x1="{x(rule):.1f}" x2="{x(rule):.1f}" y1="0" y2="{_BAR_H}" '
                         'stroke="#555" stroke-dasharray="2,2"/>')
    parts.append("</svg>")
    return "".join(parts)


def _bins_table(bins) -> str:
    if not bins:
        return ""
    rows = "".join(
        f"<tr><td>{_e(b['label'])}</td><td>{_e(b['reference'])}</td><td>{_e(b['current'])}</td>"
        f"<td>{_num(b['reference_share'])}</td><td>{_num(b['current_share'])}</td>"
        f"<td>{_num(b['contribution'])}</td></tr>" for b in bins)
    return ("<table class='bins'><tr><th>symbol</th><th>reference rows</th><th>batch rows</th>"
            "<th>reference share</th><th>batch share</th><th>share of PSI (nats)</th></tr>"
            f"{rows}</table>")


def drift_page(report, *, title: str | None = None, min_count: int | None = None) -> str:
    """The page of one drift check.

    Parameters
    ----------
    report : infoscope.frame.drift_report.DriftReport
        The check (``df.info_profile.drift_report(reference)``).
    title : str, optional
        The page title (default names both frames).
    min_count : int, optional
        Hide per-symbol counts below this (and the ones that would give them back).

    Returns
    -------
    str
        One HTML document; no script, no external resource.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (the PSI bands, common practice).

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> r = ProfileSession(pd.DataFrame({"c": list("ab") * 50})).drift_report(
    ...     pd.DataFrame({"c": list("ab") * 60}))
    >>> page = drift_page(r); page.startswith("<!DOCTYPE html>") and "<script" not in page
    True
    """
    record = report.to_dict(min_count=min_count)
    columns = record["columns"]
    finite = [v for c in columns for v in (c["psi"], c["psi_chance_high"]) if v is not None]
    scale = max([0.3] + [min(v, 3.0) for v in finite])
    title = title or f"Drift of {record['current']['name']} from {record['reference']['name']}"
    summary = record["summary"]
    head = (f"<p>{_e(record['current']['name'])}: {_e(record['current']['rows'])} rows, against "
            f"{_e(record['reference']['name'])}: {_e(record['reference']['rows'])} rows. "
            f"Strongest change flagged: <b>{_e(summary['worst'])}</b>.</p>")
    for key, words in (("missing_columns", "Only in the reference"), ("extra_columns", "Only in the batch")):
        if summary[key]:
            head += f"<p>{words}: " + ", ".join(_e(c) for c in summary[key]) + "</p>"
    rows = []
    for c in columns:
        detail = _bins_table(c.get("bins"))
        name = _e(c["column"])
        cell = f"<details><summary>{name}</summary>{detail}</details>" if detail else name
        rows.append(
            f"<tr><td>{cell}</td><td>{_e(c['kind'])}</td><td>{_e(c['k'])}</td><td>{_e(c['n'])}</td>"
            f"<td>{_bar(c['psi'], c['psi_chance_high'], c['flag'], scale)}</td>"
            f"<td>{_num(c['psi'])}</td><td>{_num(c['psi_chance'])}</td><td>{_num(c['q_value'])}</td>"
            f"<td>{_num(c['new_share'])}</td><td class='flag'>{_e(c['flag'])}</td></tr>")
    legend = "".join(f"<li><b>{_e(k)}</b>: {_e(v)}</li>" for k, v in DRIFT_FLAGS.items())
    pairs = ""
    if record["pairs"] is not None:
        moved = [p for p in record["pairs"] if p["flag"] in ("stronger", "weaker")]
        if moved:
            body = "".join(
                f"<tr><td>{_e(p['a'])}</td><td>{_e(p['b'])}</td><td>{_num(p['mi_reference'])}</td>"
                f"<td>{_num(p['mi'])}</td><td>{_num(p['change'])} [{_num(p['ci_low'])}, "
                f"{_num(p['ci_high'])}]</td><td>{_num(p['q_value'])}</td><td>{_e(p['flag'])}</td></tr>"
                for p in moved)
            pairs = ("<h2>Pairs whose dependence changed</h2><table><tr><th>a</th><th>b</th>"
                     f"<th>MI reference ({_e(record['units'].get('kl', ''))})</th><th>MI batch</th>"
                     f"<th>change [interval]</th><th>q</th><th>flag</th></tr>{body}</table>")
        else:
            pairs = "<h2>Pairs whose dependence changed</h2><p>None beyond chance.</p>"
    notes = "".join(f"<li>{_e(n)}</li>" for n in record["notes"])
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>{_e(title)}</title>
<style>
body {{ font: 14px/1.4 system-ui, sans-serif; margin: 24px; color: #1d2b36; }}
table {{ border-collapse: collapse; }} td, th {{ padding: 3px 8px; text-align: left; border-bottom: 1px solid #e4e1d8; }}
th {{ font-weight: 600; }} .flag {{ font-weight: 600; }} table.bins {{ margin: 6px 0 10px 12px; font-size: 12px; }}
.caution {{ color: #5b5446; }}
</style></head><body>
<h1>{_e(title)}</h1>
{head}
<p class="caution">Every drift number from samples is above zero by chance; the grey band is what
sampling alone gives at these sizes (to its 95 % point). A flag needs a significant change
(q &lt; {_e(record['level'])}, Benjamini–Hochberg over the columns) and a PSI beyond chance in the
common-practice bands (dashed: 0.10 and 0.25, PSI in nats). Identifiers and time axes drift by construction.</p>
<table><tr><th>column</th><th>kind</th><th>k</th><th>rows</th><th>PSI and chance band</th><th>PSI</th>
<th>chance</th><th>q</th><th>new values</th><th>flag</th></tr>
{''.join(rows)}
</table>
<h2>Flags</h2><ul>{legend}</ul>
{pairs}
{"<h2>Notes on the data</h2><ul>" + notes + "</ul>" if notes else ""}
<p class="caution">Estimates from samples; dependence is not cause. Schema of the JSON record:
{_e(record['schema'])} version {_e(record['version'])}, infoscope {_e(record['infoscope_version'])}.</p>
</body></html>
"""
