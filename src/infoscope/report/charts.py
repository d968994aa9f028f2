"""Vega-Lite charts (through Altair) of the profile's views, for users who restyle.

Every chart reads the records of :mod:`infoscope.views.serialize`: column names and
labels are data values under fixed field names, so a column called ``a.b[0]`` or
``"x"`` cannot break a Vega-Lite field reference, and Vega renders every text as text.
The data are inline (``alt.Data(values=...)``): the specs load nothing from anywhere.
"""
from __future__ import annotations

import altair as alt
import pandas as pd

from infoscope.frame.suppression import COMPLEMENT_LABEL, check_min_count
from infoscope.report._style import DEPENDENCE_CAUTION, PALETTE, SAMPLE_CAUTION
from infoscope.views import serialize as rec

__all__ = [
    "PALETTE", "entropy_chart", "grid_chart", "pair_chart", "relevance_chart", "drift_chart",
    "profile_charts", "chart_to_svg", "chart_to_png",
]



def _unit(table) -> str:
    return rec.attrs_of(table)["unit"] if isinstance(table, pd.DataFrame) else "bits"


def entropy_chart(table: pd.DataFrame, *, min_count=None, width: int = 360) -> alt.LayerChart:
    """Entropy bars: one bar per column with its CI whisker and its max-H outline.

    Parameters
    ----------
    table : pandas.DataFrame
        The result of ``ProfileSession.entropy()`` (see DEVELOPERS.md, result tables).
    min_count : int, optional
        Accepted for symmetry with the other exports (the bars show no cell counts).
    width : int, default=360
        Width of the plot area in pixels.

    Returns
    -------
    altair.LayerChart
        Bars of the entropy estimate, whiskers ``ci_low .. ci_high`` and an outline
        at ``max_entropy`` (log of the number of categories).

    References
    ----------
    .. [1] Shannon, C. E. (1948). A mathematical theory of communication. *Bell System
       Technical Journal* 27, 379-423 (entropy and its maximum, log K).

    Examples
    --------
    >>> import pandas as pd
    >>> t = pd.DataFrame({"column": ["x"], "kind": ["categorical"], "k": [2], "n": [10],
    ...     "missing": [0], "missing_share": [0.0], "entropy": [1.0], "ci_low": [0.9],
    ...     "ci_high": [1.0], "max_entropy": [1.0], "efficiency": [1.0],
    ...     "effective_categories": [2.0], "flags": [""]})
    >>> entropy_chart(t).to_dict()["layer"][0]["mark"]["type"]
    'bar'
    """
    check_min_count(min_count)  # column totals, not cells: nothing to hide here
    data = alt.Data(values=rec.entropy_records(table))
    unit = _unit(table)
    order = alt.EncodingSortField(field="entropy", order="descending")
    y = alt.Y("column:N", sort=order, title=None, axis=alt.Axis(labelLimit=180))
    base = alt.Chart(data).encode(y=y)
    tooltip = [
        alt.Tooltip("column:N", title="column"),
        alt.Tooltip("kind:N", title="kind"),
        alt.Tooltip("k:Q", title="categories"),
        alt.Tooltip("n:Q", title="rows used"),
        alt.Tooltip("missing:Q", title="missing"),
        alt.Tooltip("entropy:Q", title=f"entropy ({unit})", format=".3f"),
        alt.Tooltip("ci_low:Q", title="CI low", format=".3f"),
        alt.Tooltip("ci_high:Q", title="CI high", format=".3f"),
        alt.Tooltip("max_entropy:Q", title=f"max ({unit})", format=".3f"),
        alt.Tooltip("efficiency:Q", title="efficiency", format=".2f"),
        alt.Tooltip("flags:N", title="flags"),
    ]
    outline = base.mark_bar(fill=None, stroke=PALETTE["outline"], strokeDash=[3, 2]).encode(
        x=alt.X("max_entropy:Q", title=f"entropy ({unit})"))
    bars = base.mark_bar(color=PALETTE["bar"], height={"band": 0.6}).encode(
        x="entropy:Q", tooltip=tooltip)
    whiskers = base.mark_rule(color=PALETTE["whisker"]).encode(x="ci_low:Q", x2="ci_high:Q")
    return alt.layer(outline, bars, whiskers).properties(
        width=width,
        title=alt.Title("Entropy bars", subtitle=[SAMPLE_CAUTION, "Dashed outline: maximum for the number of categories."]),
    )


def grid_chart(matrix: pd.DataFrame, *, measure: str | None = None, unit: str | None = None,
               cell: int = 18) -> alt.Chart:
    """Information grid: a heatmap of one measure over every pair of columns.

    Parameters
    ----------
    matrix : pandas.DataFrame
        The square result of ``ProfileSession.matrix()``; its row order is kept.
    measure : str, optional
        Name of the measure for the legend (default: ``matrix.attrs["measure"]`` or "mi").
    unit : str, optional
        Unit for the legend (default: ``matrix.attrs["unit"]``).
    cell : int, default=18
        Side of one cell in pixels.

    Returns
    -------
    altair.Chart
        A ``rect`` heatmap, darker for more information.

    References
    ----------
    .. [1] Cover, T. M. & Thomas, J. A. (2006). *Elements of Information Theory*, 2nd ed.,
       Wiley, ch. 2 (mutual information).

    Examples
    --------
    >>> import pandas as pd
    >>> m = pd.DataFrame([[1.0, 0.2], [0.2, 1.0]], index=["x", "y"], columns=["x", "y"])
    >>> grid_chart(m).to_dict()["mark"]["type"]
    'rect'
    """
    names, cells = rec.grid_records(matrix)
    attrs = rec.attrs_of(matrix)
    measure = measure or attrs["measure"] or "mi"
    unit = unit or attrs["unit"]
    legend = f"{measure} ({unit})" if measure in ("mi", "vi") else measure
    size = max(cell * len(names), 60)
    return alt.Chart(alt.Data(values=cells)).mark_rect().encode(
        x=alt.X("b:N", sort=names, title=None, axis=alt.Axis(labelAngle=-45, labelLimit=140)),
        y=alt.Y("a:N", sort=names, title=None, axis=alt.Axis(labelLimit=140)),
        color=alt.Color("value:Q", title=legend,
                        scale=alt.Scale(range=[PALETTE["grid_low"], PALETTE["grid_high"]], zero=True)),
        tooltip=[alt.Tooltip("a:N", title="column"), alt.Tooltip("b:N", title="with"),
                 alt.Tooltip("value:Q", title=legend, format=".3f")],
    ).properties(width=size, height=size,
                 title=alt.Title("Information grid", subtitle=[DEPENDENCE_CAUTION]))


def pair_chart(pair, *, min_count=None, unit: str = "bits", cell: int = 28) -> alt.LayerChart:
    """Pair view: one pair's joint counts, coloured by pointwise mutual information.

    Parameters
    ----------
    pair : PairTable
        The result of ``ProfileSession.pair(a, b)`` (``.counts``, ``.expected``, ``.pmi``).
    min_count : int, optional
        Hide counts ``1 .. min_count - 1`` (with complementary cells, see
        :mod:`infoscope.report.suppression`); hidden cells are grey and show ``"<10"`` (below the
        threshold) or ``"\u00b7"`` (hidden to protect a small cell).
    unit : str, default="bits"
        Unit of the pointwise MI in the legend.
    cell : int, default=28
        Side of one cell in pixels.

    Returns
    -------
    altair.LayerChart
        Grey base cells, coloured cells (diverging around 0: more or fewer than
        expected under independence) and the counts as text.

    References
    ----------
    .. [1] Church, K. W. & Hanks, P. (1990). Word association norms, mutual information,
       and lexicography. *Computational Linguistics* 16(1), 22-29 (pointwise MI).

    Examples
    --------
    >>> import pandas as pd
    >>> from types import SimpleNamespace
    >>> c = pd.DataFrame([[30, 2], [5, 40]], index=["p", "q"], columns=["u", "v"])
    >>> p = SimpleNamespace(counts=c, expected=None, pmi=None, n=77, mi=0.4, nmi=0.4)
    >>> len(pair_chart(p, min_count=10).to_dict()["layer"])
    3
    """
    data = rec.pair_records(pair, min_count=min_count)
    threshold = data["min_count"]  # min_count as checked by pair_records
    values = alt.Data(values=data["cells"])
    x = alt.X("col:N", sort=data["cols"], title=data["b"] or None,
              axis=alt.Axis(labelAngle=-45, labelLimit=120, orient="top"))
    y = alt.Y("row:N", sort=data["rows"], title=data["a"] or None, axis=alt.Axis(labelLimit=120))
    base = alt.Chart(values).encode(x=x, y=y)
    tooltip = [alt.Tooltip("row:N", title=data["a"] or "row"), alt.Tooltip("col:N", title=data["b"] or "column"),
               alt.Tooltip("shown:N", title="count"), alt.Tooltip("expected:Q", title="expected", format=".1f"),
               alt.Tooltip("pmi:Q", title=f"pointwise MI ({unit})", format=".2f")]
    ground = base.mark_rect(color=PALETTE["hidden"]).encode(tooltip=tooltip)
    coloured = base.mark_rect().encode(
        color=alt.Color("pmi:Q", title=f"pointwise MI ({unit})",
                        scale=alt.Scale(range=[PALETTE["pmi_neg"], PALETTE["pmi_mid"], PALETTE["pmi_pos"]],
                                        domainMid=0)),
        tooltip=tooltip,
    ).transform_filter("isValid(datum.pmi)")
    text = base.mark_text(fontSize=10, color=PALETTE["whisker"]).encode(text="shown:N")
    subtitle = ["Colour: more (blue) or fewer (orange) rows than independence predicts.", DEPENDENCE_CAUTION]
    if data["hidden_cells"]:
        small = sum(1 for c in data["cells"] if c.get("reason") == "small")
        other = data["hidden_cells"] - small
        note = f"{small} cells with counts below {threshold} hidden (\u201c<{threshold}\u201d)"
        if other:
            note += f"; {other} more hidden to protect them (\u201c{COMPLEMENT_LABEL}\u201d, any size)"
        subtitle.append(note + ".")
    title = f"Pair view: {data['a']} × {data['b']}" if data["a"] or data["b"] else "Pair view"
    return alt.layer(ground, coloured, text).properties(
        width=max(cell * len(data["cols"]), 60), height=max(cell * len(data["rows"]), 60),
        title=alt.Title(title, subtitle=subtitle))


def relevance_chart(table: pd.DataFrame, *, target: str | None = None, width: int = 360) -> alt.LayerChart:
    """Relevance bars: mutual information of every column with the target.

    Parameters
    ----------
    table : pandas.DataFrame
        The result of ``ProfileSession.relevance(target)``.
    target : str, optional
        Name of the target for the title.
    width : int, default=360
        Width of the plot area in pixels.

    Returns
    -------
    altair.LayerChart
        Bars with CI whiskers; a column whose information covers >= 95 % of the
        target's entropy (``leakage``) is drawn in orange.

    References
    ----------
    .. [1] Cover, T. M. & Thomas, J. A. (2006). *Elements of Information Theory*, 2nd ed.,
       Wiley, ch. 2 (I(X;Y) <= H(Y)).

    Examples
    --------
    >>> import pandas as pd
    >>> t = pd.DataFrame({"column": ["x"], "k": [2], "n": [10], "mi": [0.5], "ci_low": [0.4],
    ...     "ci_high": [0.6], "nmi": [0.5], "p_value": [0.01], "q_value": [0.01],
    ...     "share_of_target": [0.5], "leakage": [False], "reliability": ["ok"]})
    >>> relevance_chart(t, target="y").to_dict()["layer"][0]["mark"]["type"]
    'bar'
    """
    unit = _unit(table)
    data = alt.Data(values=rec.relevance_records(table))
    y = alt.Y("column:N", sort=alt.EncodingSortField(field="mi", order="descending"), title=None,
              axis=alt.Axis(labelLimit=180))
    base = alt.Chart(data).encode(y=y)
    tooltip = [alt.Tooltip("column:N", title="column"),
               alt.Tooltip("mi:Q", title=f"MI ({unit})", format=".3f"),
               alt.Tooltip("ci_low:Q", title="CI low", format=".3f"),
               alt.Tooltip("ci_high:Q", title="CI high", format=".3f"),
               alt.Tooltip("share_of_target:Q", title="share of target entropy", format=".0%"),
               alt.Tooltip("q_value:Q", title="q (BH)", format=".3g"),
               alt.Tooltip("leakage:N", title="possible leakage")]
    bars = base.mark_bar(height={"band": 0.6}).encode(
        x=alt.X("mi:Q", title=f"mutual information with the target ({unit})"),
        color=alt.Color("leakage:N", title="possible leakage",
                        scale=alt.Scale(domain=[False, True], range=[PALETTE["bar"], PALETTE["leak"]])),
        tooltip=tooltip)
    whiskers = base.mark_rule(color=PALETTE["whisker"]).encode(x="ci_low:Q", x2="ci_high:Q")
    name = f"Relevance to {target}" if target else "Relevance"
    return alt.layer(bars, whiskers).properties(
        width=width, title=alt.Title(name, subtitle=[SAMPLE_CAUTION, DEPENDENCE_CAUTION]))


def drift_chart(table: pd.DataFrame, *, width: int = 360) -> alt.LayerChart:
    """Drift bars: PSI of every column of a batch against its reference.

    Parameters
    ----------
    table : pandas.DataFrame
        The result of ``ProfileSession.drift(reference)``.
    width : int, default=360
        Width of the plot area in pixels.

    Returns
    -------
    altair.LayerChart
        Bars of PSI coloured by the drift flag, with rules at 0.10 and 0.25 and,
        when the table has it, the chance band (``psi_chance_high``) behind each bar.

    References
    ----------
    .. [1] Siddiqi, N. (2006). *Credit Risk Scorecards*. Wiley (population stability index;
       the 0.10 / 0.25 thresholds are practitioners' folklore, from memory).

    Examples
    --------
    >>> import pandas as pd
    >>> t = pd.DataFrame({"column": ["x"], "kind": ["numeric"], "k": [4], "n": [100],
    ...     "n_reference": [100], "psi": [0.3], "kl": [0.1], "js": [0.05], "p_value": [0.01],
    ...     "flag": ["major"]})
    >>> drift_chart(t).to_dict()["layer"][0]["mark"]["type"]
    'bar'
    """
    from infoscope.frame.results import DRIFT_FLAGS

    records = rec.drift_records(table)
    data = alt.Data(values=records)
    base = alt.Chart(data)
    flags = list(DRIFT_FLAGS)
    layers = []
    if records and "psi_chance_high" in records[0]:
        # the band sampling alone reaches at these sizes (its 95 % point), behind the bar
        layers.append(base.mark_bar(height={"band": 0.9}, color=PALETTE["chance"]).encode(
            y=alt.Y("column:N", sort=alt.EncodingSortField(field="psi", order="descending"), title=None),
            x=alt.X("psi_chance_high:Q", title="PSI"),
            tooltip=[alt.Tooltip("psi_chance_high:Q", format=".3f", title="chance (95 %)")]))
    bars = base.mark_bar(height={"band": 0.6}).encode(
        y=alt.Y("column:N", sort=alt.EncodingSortField(field="psi", order="descending"), title=None,
                axis=alt.Axis(labelLimit=180)),
        x=alt.X("psi:Q", title="PSI"),
        color=alt.Color("flag:N", title="drift",
                        scale=alt.Scale(domain=flags, range=[PALETTE[f] for f in flags])),
        tooltip=[alt.Tooltip("column:N", title="column"), alt.Tooltip("psi:Q", format=".3f", title="PSI"),
                 alt.Tooltip("kl:Q", format=".3f", title="KL"), alt.Tooltip("js:Q", format=".3f", title="JS"),
                 alt.Tooltip("p_value:Q", format=".3g", title="p"), alt.Tooltip("flag:N", title="drift")])
    marks = alt.Chart(alt.Data(values=[{"psi": 0.10}, {"psi": 0.25}])).mark_rule(
        strokeDash=[4, 3], color=PALETTE["outline"]).encode(x="psi:Q")
    subtitle = ["Dashed rules: PSI 0.10 and 0.25 (rules of thumb)."]
    if layers:
        subtitle.append("Grey: the PSI sampling alone reaches at these sizes (95 %).")
    return alt.layer(*layers, bars, marks).properties(
        width=width, title=alt.Title("Drift", subtitle=subtitle))


def _strongest_pair(session) -> tuple[str, str] | None:
    table = session.pairs()
    if not len(table):
        return None
    best = table.sort_values("value", ascending=False, kind="stable").iloc[0]
    return str(best["a"]), str(best["b"])


def profile_charts(session, *, reference=None, pair: tuple[str, str] | None = None,
                   min_count=None) -> dict[str, alt.TopLevelMixin]:
    """All views of a profile as Altair charts, keyed by view name.

    Parameters
    ----------
    session : ProfileSession
        The profile (``infoscope.frame.session.ProfileSession``); a widget is
        accepted too (its ``session`` attribute is used).
    reference : DataFrame, optional
        A reference frame: adds the ``"drift"`` chart.
    pair : (str, str), optional
        The pair shown in the pair view (default: the pair with the largest value
        of the current measure).
    min_count : int, optional
        Small-cell threshold applied to the pair view (see :mod:`infoscope.report.suppression`).

    Returns
    -------
    dict of str to altair chart
        ``"entropy"``, ``"grid"``, ``"pair"`` (when the profile has two or more
        columns), ``"relevance"`` (when a target is set) and ``"drift"``.

    References
    ----------
    .. [1] Satyanarayan, A., Moritz, D., Wongsuphasawat, K. & Heer, J. (2017). Vega-Lite:
       A grammar of interactive graphics. *IEEE TVCG* 23(1), 341-350.

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession  # doctest: +SKIP
    >>> charts = profile_charts(ProfileSession(frame, target="y"))  # doctest: +SKIP
    >>> charts["grid"].save("grid.svg")  # doctest: +SKIP
    """
    session = getattr(session, "session", session)
    check_min_count(min_count)
    out: dict[str, alt.TopLevelMixin] = {}
    entropy = session.entropy()
    unit = rec.attrs_of(entropy)["unit"]
    out["entropy"] = entropy_chart(entropy, min_count=min_count)
    if len(session.names) >= 2:
        out["grid"] = grid_chart(session.matrix(order="cluster"))
        chosen = pair or _strongest_pair(session)
        if chosen is not None:
            out["pair"] = pair_chart(session.pair(*chosen), min_count=min_count, unit=unit)
    target = session.settings.get("target")
    if target is not None:
        out["relevance"] = relevance_chart(session.relevance(target), target=str(target))
    if reference is not None:
        out["drift"] = drift_chart(session.drift(reference))
    return out


def chart_to_svg(chart) -> str:
    """Render a chart to SVG text with ``vl_convert`` (offline, no browser).

    Parameters
    ----------
    chart : altair chart or dict
        A chart of this module or a Vega-Lite spec.

    Returns
    -------
    str
        The SVG document.

    References
    ----------
    .. [1] vl-convert (the ``vl_convert`` Python package): Vega-Lite to SVG/PNG without a browser.

    Examples
    --------
    >>> import pandas as pd
    >>> m = pd.DataFrame([[1.0, 0.2], [0.2, 1.0]], index=["x", "y"], columns=["x", "y"])
    >>> chart_to_svg(grid_chart(m)).startswith("<svg")
    True
    """
    import vl_convert

    spec = chart.to_dict() if hasattr(chart, "to_dict") else chart
    return vl_convert.vegalite_to_svg(spec)


def chart_to_png(chart, *, scale: float = 2.0) -> bytes:
    """Render a chart to PNG bytes with ``vl_convert`` (offline, no browser).

    Parameters
    ----------
    chart : altair chart or dict
        A chart of this module or a Vega-Lite spec.
    scale : float, default=2.0
        Pixel density.

    Returns
    -------
    bytes
        The PNG file.

    References
    ----------
    .. [1] vl-convert (the ``vl_convert`` Python package): Vega-Lite to SVG/PNG without a browser.

    Examples
    --------
    >>> import pandas as pd
    >>> m = pd.DataFrame([[1.0, 0.2], [0.2, 1.0]], index=["x", "y"], columns=["x", "y"])
    >>> chart_to_png(grid_chart(m))[:4] == b"\\x89PNG"
    True
    """
    import vl_convert

    spec = chart.to_dict() if hasattr(chart, "to_dict") else chart
    return vl_convert.vegalite_to_png(spec, scale=scale)
