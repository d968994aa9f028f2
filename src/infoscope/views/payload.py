"""Every view's data, built once from a session: what the widget sends and the HTML export embeds.

:func:`view_data` turns a session's result tables into the data parts of a view
(the entropy rows, the information grid, the relevance rows, one pair view); the
live widget calls it after each settings change and sends the parts as traits.
:func:`payload` calls it for every part and adds the control values, the
``_meta`` part and a cache of pair views (suppressed with the same rule), so a
page without a kernel can still open the strongest pairs: the HTML export embeds
it, the static picture is drawn from it.  No kernel, widget or front-end code is
needed here.

Payload format ``"infoscope-profile/1"``::

    {"format": "infoscope-profile/1", "view": "profile" | "entropy" | "grid" | "pair" | "relevance",
     "state": {<control values>, "_entropy", "_grid_meta", "_grid_values", "_grid_n",
               "_grid_q", "_grid_reliability", "_pair", "_relevance", "_selection", "_surprising",
               "_meta", "_status", "_view"},
     "binary": ["_grid_values", "_grid_n", "_grid_q", "_grid_reliability"],  # base64 text in "state"
     "pair_cache": {a + "\\u0000" + b: <pair view>, ...}}

The shapes of the parts are those of :mod:`infoscope.views.serialize`.
"""
from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

import numpy as np
import pandas as pd

from infoscope._warnings import collect_warnings
from infoscope.frame.suppression import check_min_count
from infoscope.views import serialize as ser
from infoscope.views.choices import check_view_settings, meta, view_settings_from_session

__all__ = ["CORE_PARTS", "FORMAT", "PARTS", "SETTINGS_TRAITS", "VIEW_TRAITS", "DATA_TRAITS", "TOP_PAIRS",
           "DRIFT_OVER_AGAINST", "draft_grid", "draft_message", "drift_data", "drift_over_data", "drift_over_spec",
           "payload", "view_data", "top_pairs"]

FORMAT = "infoscope-profile/1"
#: The data parts a view can ask for.
PARTS = ("entropy", "grid", "pair", "relevance", "selection", "surprising")
#: The parts every profile layout draws (the static picture needs no more).
CORE_PARTS = ("entropy", "grid", "pair", "relevance")
#: Control values that change numbers (they map to session settings or to a part's shape).
SETTINGS_TRAITS = ("bins", "strategy", "estimator", "alpha", "measure", "unit", "target", "missing",
                   "column_bins", "order", "min_count", "selection_method", "selection_k", "surprise_model",
                   "surprise_n")
#: Control values that change only what is drawn.
VIEW_TRAITS = ("selected_column", "selected_pair", "alpha_fdr", "sort_by")
#: The data parts as trait names (kernel -> view).
DATA_TRAITS = ("_view", "_entropy", "_grid_meta", "_grid_values", "_grid_n", "_grid_q",
               "_grid_reliability", "_pair", "_relevance", "_selection", "_surprising", "_meta", "_status",
               "_drift", "_drift_over")
#: Pair views precomputed into a payload for a page without a kernel.
TOP_PAIRS = 12
#: Control values a view starts from where the session has no setting for them.
VIEW_DEFAULTS = {"bins": 16, "strategy": "quantile", "estimator": "miller_madow", "alpha": 0.5,
                 "measure": "mi", "unit": "bits", "target": None, "missing": "drop",
                 "column_bins": {}, "order": "cluster", "min_count": 0, "selected_column": None,
                 "selected_pair": None, "alpha_fdr": 0.05, "sort_by": "entropy",
                 "selection_method": "mrmr", "selection_k": None, "surprise_model": "tree", "surprise_n": 20}
#: Shuffles per step of the selection a view computes (the table's default is 199).
SELECTION_PERMUTATIONS = 99


def _no_step(progress: float, message: str) -> None:
    return None


def top_pairs(pairs: pd.DataFrame, alpha: float, k: int = TOP_PAIRS) -> list[tuple[str, str]]:
    """The ``k`` pairs a view opens first: significant ones (BH q < ``alpha``) by value, then the rest.

    Parameters
    ----------
    pairs : pandas.DataFrame
        ``ProfileSession.pairs()``.
    alpha : float
        False discovery rate.
    k : int, default=12
        How many.

    Returns
    -------
    list of (str, str)

    References
    ----------
    .. [1] Benjamini, Y., & Hochberg, Y. (1995). Controlling the false discovery
       rate. JRSS B, 57(1), 289-300 (the q-values ranked here).

    Examples
    --------
    >>> t = pd.DataFrame({"a": ["x", "x"], "b": ["y", "z"], "value": [0.1, 0.9], "q_value": [0.01, 0.5]})
    >>> top_pairs(t, 0.05, 2)
    [('x', 'y'), ('x', 'z')]
    """
    if not len(pairs):
        return []
    ranked = pairs.assign(_sig=pairs["q_value"] < alpha).sort_values(
        ["_sig", "value"], ascending=[False, False], na_position="last")
    return [(str(a), str(b)) for a, b in ranked[["a", "b"]].head(k).itertuples(index=False)]


def draft_message(info: Mapping) -> str:
    """The status line of a draft grid (``attrs["draft"]`` of ``ProfileSession.draft_pairs``).

    Parameters
    ----------
    info : mapping
        ``bins``, ``exact``, ``fine_bins``.

    Returns
    -------
    str

    Examples
    --------
    >>> draft_message({"bins": 12, "exact": True, "fine_bins": 96})[:60]
    'Draft grid: 96-bin tables summed into 12 bins (the same tabl'
    """
    how = ("the same tables as a recount: exact; p-values of permutation tests follow" if info["exact"]
           else "close: each bin edge within 1/64 of the rows of its exact place")
    return (f"Draft grid: {info['fine_bins']}-bin tables summed into {info['bins']} bins ({how}). "
            "Computing the exact numbers...")


def draft_grid(session, bins, *, order, order_name: str = "cluster", alpha_fdr: float = 0.05,
               generation: int = 0) -> dict | None:
    """The grid parts of a draft at ``bins`` bins (``ProfileSession.draft_pairs``), or None.

    Parameters
    ----------
    session : ProfileSession
        With :meth:`~infoscope.frame.session.ProfileSession.prepare_drafts` done.
    bins : int
        The bin count the controls ask for.
    order : sequence of str
        The column order the grid shows now (kept while a control moves).
    order_name : str, default="cluster"
        The order's name, as in the grid's meta.
    alpha_fdr : float, default=0.05
        False discovery rate of the muted cells.
    generation : int, default=0
        Stamped on the part.

    Returns
    -------
    dict or None
        ``_grid_meta`` (with ``draft``: bins, exact, fine_bins, nested, columns),
        ``_grid_values``, ``_grid_n``, ``_grid_q``, ``_grid_reliability``; None when
        the session cannot draft these settings.

    Examples
    --------
    >>> draft_grid(session, 12, order=session.names)["_grid_meta"]["draft"]["exact"]  # doctest: +SKIP
    True
    """
    got = session.draft_pairs(bins)
    if got is None:
        return None
    pairs, diagonal = got
    keys = list(session.names)
    names = [str(x) for x in order]
    if sorted(names) != sorted(keys):
        names = keys
    grid = ser.grid_buffers(pairs, names, alpha=alpha_fdr, diagonal=diagonal, generation=generation,
                            order_name=order_name)
    meta_part = dict(grid["meta"])
    meta_part["draft"] = dict(pairs.attrs["draft"])
    return {"_grid_meta": meta_part, "_grid_values": grid["values"], "_grid_n": grid["n"],
            "_grid_q": grid["q"], "_grid_reliability": grid["reliability"]}


def view_data(session, parts, *, order: str = "cluster", alpha_fdr: float = 0.05,
              selected_pair=None, min_count=None, generation: int = 0,
              step: Callable[[float, str], None] | None = None, selection_method: str = "mrmr",
              selection_k=None, surprise_model: str = "tree", surprise_n: int = 20) -> tuple[dict, dict]:
    """The data parts of a view, from the session as it stands.

    Parameters
    ----------
    session : ProfileSession
        The profile; its settings (measure, target, unit) decide the numbers.
    parts : iterable of str
        Any of :data:`PARTS`.
    order : {"cluster", "name"}, default="cluster"
        Order of the information grid.
    alpha_fdr : float, default=0.05
        False discovery rate: grid cells with q >= ``alpha_fdr`` are muted, and
        significant pairs are opened first.
    selected_pair : (str, str), optional
        The pair of the pair view (default: the first of :func:`top_pairs` when the
        grid is computed too).
    min_count : int, optional
        Small-cell threshold of the pair view.
    generation : int, default=0
        Stamped on every part (the live view drops stale answers by it).
    step : callable, optional
        ``step(progress, message)`` before each stage (the widget reports progress
        and cancels through it).
    selection_method, selection_k : str, int or None
        Method and number of steps of the ``selection`` part (``select()``; needs a
        target).
    surprise_model, surprise_n : str, int
        Model and number of rows of the ``surprising`` part (``surprising_rows()``,
        with the values hidden when ``min_count`` is set, and ``tree()``).

    Returns
    -------
    (dict, dict)
        The trait values (``_entropy``, ``_grid_meta``, ``_grid_values``, ``_grid_n``,
        ``_grid_q``, ``_relevance``, ``_pair``, and ``selected_pair`` when it was
        chosen here; ``_top_pairs`` with the grid) and the result tables used
        (``entropy``, ``pairs``, ``matrix``, ``relevance``).

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession
    >>> s = ProfileSession(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}), n_boot=0)
    >>> sorted(view_data(s, ["entropy"])[0])
    ['_entropy']
    """
    step = step or _no_step
    parts = set(parts)
    unknown = parts - set(PARTS)
    if unknown:
        raise ValueError(f"unknown view part(s) {sorted(unknown)}; the parts are {', '.join(PARTS)}")
    # a session of count tables only (out of core) cannot build the parts that read rows
    parts &= set(getattr(session, "view_parts", PARTS))
    settings = session.settings
    unit = view_settings_from_session(settings)["unit"]
    out: dict[str, Any] = {}
    tables: dict[str, Any] = {}
    if "entropy" in parts:
        step(0.15, "Entropy of each column...")
        tables["entropy"] = session.entropy()
        out["_entropy"] = ser.entropy_json(tables["entropy"], generation=generation)
    if "grid" in parts:
        step(0.35, "Counting all pairs...")
        pairs = session.pairs()
        step(0.6, "Ordering the grid...")
        matrix = session.matrix(order=order)
        tables["pairs"], tables["matrix"] = pairs, matrix
        diag = pd.Series(np.diag(matrix.to_numpy(dtype=float)), index=matrix.index)
        grid = ser.grid_buffers(pairs, [str(x) for x in matrix.index], alpha=alpha_fdr,
                                diagonal=diag, generation=generation, order_name=order)
        out["_grid_meta"] = grid["meta"]
        out["_grid_values"], out["_grid_n"], out["_grid_q"] = grid["values"], grid["n"], grid["q"]
        out["_grid_reliability"] = grid["reliability"]
        out["_top_pairs"] = top_pairs(pairs, alpha_fdr)
    if "relevance" in parts:
        step(0.75, "Relevance to the target...")
        target = settings.get("target")
        table = session.relevance(target=target) if target is not None else None
        tables["relevance"] = table
        out["_relevance"] = ser.relevance_json(table, target, generation=generation)
    if "selection" in parts:
        from infoscope.frame.selection import select_table

        step(0.8, "Choosing columns for the target...")
        target = settings.get("target")
        table = None
        note = None
        if target is not None and getattr(session, "weighted", False):
            note = "select() works on the rows themselves and does not take observation weights yet"
        elif target is not None:
            # the step callback between blocks of shuffles: progress, and the widget's cancel
            table = select_table(session, target, k=selection_k, method=selection_method,
                                 n_permutations=SELECTION_PERMUTATIONS, fdr=alpha_fdr,
                                 progress=lambda fraction, message: step(0.8 + 0.05 * fraction, message))
        tables["selection"] = table
        out["_selection"] = ser.selection_json(table, target, generation=generation, note=note)
    if "surprising" in parts and getattr(session, "weighted", False):
        parts = parts - {"surprising"}  # row surprisal needs unweighted rows: no part (the view stays hidden)
    if "surprising" in parts:
        from infoscope.frame.tree import surprising_rows_table, tree_table

        step(0.85, "Scoring the rows...")
        tables["tree"] = tree_table(session)
        tables["surprising"] = surprising_rows_table(session, int(surprise_n), model=surprise_model,
                                                     min_count=min_count or None)
        out["_surprising"] = ser.surprising_json(tables["surprising"], tables["tree"], generation=generation)
    if "pair" in parts:
        pair = list(selected_pair) if selected_pair else None
        if pair is None and out.get("_top_pairs"):
            pair = list(out["_top_pairs"][0])
            out["selected_pair"] = pair
        if pair is not None:
            step(0.9, "Joint table of the pair...")
            out["_pair"] = _pair_view(session, pair[0], pair[1], unit, min_count, generation)
        else:
            out["_pair"] = {}
    step(1.0, "Drawing...")
    return out, tables


def _pair_view(session, a: str, b: str, unit: str, min_count, generation: int) -> dict:
    names = set(session.names)
    for x in (a, b):
        if x not in names:
            raise ValueError(f"selected_pair names {x!r}, which is not a column of this profile")
    return ser.pair_view(session.pair(a, b), a, b, unit=unit, min_count=min_count or None,
                         generation=generation)


def drift_data(session, reference, *, min_count=None, pairs: bool = True, generation: int = 0) -> dict:
    """The drift part of a view: the record of ``session.drift_report(reference)``.

    Parameters
    ----------
    session : ProfileSession
        The profile (the batch).
    reference : DataFrame
        The frame it is compared with.
    min_count : int, optional
        Per-symbol counts below this are hidden in the bins (with the ones that
        would give them back).
    pairs : bool, default=True
        Include relationship drift (every pair of comparable columns).
    generation : int, default=0
        Stamped on the part.

    Returns
    -------
    dict
        The ``infoscope-drift`` record (``docs/drift-json.md``) plus ``"generation"``:
        one bar per column (``psi``, chance band up to ``psi_chance_high``), its
        ``bins`` (both distributions and each symbol's share of PSI), the pairs
        that moved, the flags' legend.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI bands, common practice).

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession
    >>> s = ProfileSession(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}), n_boot=0)
    >>> d = drift_data(s, pd.DataFrame({"a": list("xy") * 30, "b": list("yx") * 30}))
    >>> d["schema"], [c["flag"] for c in d["columns"]]
    ('infoscope-drift', ['stable', 'stable'])
    """
    report = session.drift_report(reference, pairs=pairs)
    return {**report.to_dict(min_count=min_count or None), "generation": int(generation)}


#: What each period of ``drift_over=`` is compared with (the third item of the setting).
DRIFT_OVER_AGAINST = ("reference", "first", "previous")


def drift_over_spec(value, *, has_reference: bool) -> dict | None:
    """Read the ``drift_over=`` setting of a profile: which time column, how long a period, against what.

    Parameters
    ----------
    value : None, str or tuple
        ``None`` (no strip); a time column's key (periods of ``"1W"``); a tuple
        ``(time_column, every)`` or ``(time_column, every, against)`` where
        ``every`` is a pandas period frequency (``"1D"``, ``"1W"``, ``"2W"``,
        ``"1M"``, ...) and ``against`` is ``"reference"`` (the profile's reference
        frame), ``"first"`` (the first period) or ``"previous"`` (the period
        before).
    has_reference : bool
        Whether the profile has a reference frame (then ``against`` defaults to
        ``"reference"``, else to ``"first"``).

    Returns
    -------
    dict or None
        ``{"time_column", "every", "against"}``; the session checks the column and
        the frequency when it computes.

    Raises
    ------
    TypeError, ValueError
        A value of another shape, or ``against="reference"`` without a reference.

    Examples
    --------
    >>> drift_over_spec(("dispatched_at", "1W"), has_reference=True)
    {'time_column': 'dispatched_at', 'every': '1W', 'against': 'reference'}
    >>> drift_over_spec("dispatched_at", has_reference=False)["against"]
    'first'
    """
    if value is None:
        return None
    items = (value,) if isinstance(value, str) else value
    if not isinstance(items, (tuple, list)) or not 1 <= len(items) <= 3:
        raise TypeError("drift_over must be a time column's name or a tuple (time_column, every[, against]), "
                        f"e.g. ('dispatched_at', '1W'); got {value!r}")
    time_column = items[0]
    every = items[1] if len(items) > 1 else "1W"
    against = items[2] if len(items) > 2 else ("reference" if has_reference else "first")
    if not isinstance(every, str):
        raise TypeError(f"drift_over: every must be a pandas period frequency such as '1W', got {every!r}")
    if against not in DRIFT_OVER_AGAINST:
        raise ValueError(f"drift_over: against={against!r} is not one of "
                         f"{', '.join(map(repr, DRIFT_OVER_AGAINST))}")
    if against == "reference" and not has_reference:
        raise ValueError("drift_over: against='reference' needs a reference frame (reference=...); "
                         "or compare each period with 'first' or 'previous'")
    return {"time_column": time_column, "every": every, "against": against}


def drift_over_data(session, spec: Mapping, *, reference=None, min_count=None, generation: int = 0) -> dict:
    """The drift-over-time part of a view: ``session.drift_over(...)`` as a column x period strip.

    Parameters
    ----------
    session : ProfileSession
        The profile.
    spec : mapping
        :func:`drift_over_spec` of the setting.
    reference : DataFrame, optional
        The profile's reference frame (used when ``spec["against"]`` is ``"reference"``).
    min_count : int, optional
        Row counts below this (and those that would give them back) are hidden.
    generation : int, default=0
        Stamped on the part.

    Returns
    -------
    dict
        :func:`infoscope.views.serialize.drift_over_record` of the table.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI bands, common practice).

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession
    >>> df = pd.DataFrame({"t": pd.date_range("2026-01-05", periods=28, freq="D"), "c": list("ab") * 14})
    >>> d = drift_over_data(ProfileSession(df, n_boot=0), drift_over_spec("t", has_reference=False))
    >>> d["reference"], len(d["periods"]), d["columns"]
    ('first', 4, ['c'])
    """
    against = reference if spec["against"] == "reference" else spec["against"]
    table = session.drift_over(spec["time_column"], every=spec["every"], reference=against)
    return ser.drift_over_record(table, min_count=min_count, generation=generation)


def payload(session, settings: Mapping | None = None, *, min_count=None, top_pairs: int = TOP_PAIRS,
            view: str = "profile", generation: int = 0, status: Mapping | None = None,
            parts=PARTS, reference=None, drift_over=None) -> dict:
    """Every view's data of a profile as one JSON-able dict (see the module docstring).

    Parameters
    ----------
    session : ProfileSession
        The profile.  Its settings decide the numbers; the session is not changed.
    settings : mapping, optional
        Control values to show (any of :data:`SETTINGS_TRAITS` and
        :data:`VIEW_TRAITS`): ``order``, ``alpha_fdr``, ``selected_pair``,
        ``min_count``, ``sort_by`` shape the views; the rest default to what shows
        the session's settings.
    min_count : int, optional
        Small-cell threshold of every pair view in the payload (the larger of this
        and ``settings["min_count"]`` applies): counts ``1 .. min_count - 1`` and the
        cells that would give them away are hidden, with the totals.
    top_pairs : int, default=12
        How many pair views to precompute (the strongest significant pairs first),
        so that a page without a kernel can still open them.
    view : str, default="profile"
        Which layout the front end draws.
    generation : int, default=0
        Stamped on every part.
    status : mapping, optional
        The ``_status`` part (default: idle, no notes).
    parts : iterable of str, default=PARTS
        The data parts to build (the static picture needs only :data:`CORE_PARTS`;
        ``selection`` runs permutation tests and costs seconds on a large frame).
    reference : DataFrame, optional
        A reference frame: adds the ``_drift`` part (:func:`drift_data`; None without one).
    drift_over : str or tuple, optional
        Adds the ``_drift_over`` part, the column x period strip (:func:`drift_over_data`
        of :func:`drift_over_spec`; None without it).

    Returns
    -------
    dict
        ``{"format", "view", "state", "binary", "pair_cache"}``; ``modelFromPayload``
        of the front-end module turns it into the model ``render({model, el})`` reads.

    Examples
    --------
    >>> import json
    >>> from infoscope.frame.session import ProfileSession
    >>> s = ProfileSession(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}), n_boot=0)
    >>> p = payload(s, min_count=5)
    >>> p["format"], sorted(p["pair_cache"]), len(json.dumps(p)) > 0
    ('infoscope-profile/1', ['a\\x00b'], True)
    """
    if isinstance(top_pairs, bool) or not isinstance(top_pairs, int) or top_pairs < 0:
        raise ValueError(f"top_pairs must be a whole number >= 0, got {top_pairs!r}")
    unknown = set(settings or {}) - set(SETTINGS_TRAITS) - set(VIEW_TRAITS)
    if unknown:
        raise TypeError(f"unknown view setting(s) {sorted(unknown)}; the view settings are "
                        f"{', '.join(SETTINGS_TRAITS + VIEW_TRAITS)}")
    shown = view_settings_from_session(session.settings, _profiled_rows(session))
    given = dict(settings or {})
    differ = sorted(k for k in given if k in shown and given[k] != shown[k])
    if differ:
        raise ValueError(f"view setting(s) {', '.join(f'{k}={given[k]!r}' for k in differ)} differ from the "
                         "session's settings; the numbers come from the session: update it first")
    state: dict[str, Any] = {**VIEW_DEFAULTS, **shown, **given}
    check_view_settings(state, session.names)
    over_spec = drift_over_spec(drift_over, has_reference=reference is not None)
    threshold = max(check_min_count(min_count) or 0, check_min_count(state["min_count"] or None) or 0)
    state["min_count"] = threshold
    # a sparse pair still exports; its note is in the status.  collect_warnings, not
    # warnings.catch_warnings: an export can run beside the widget's worker thread
    with collect_warnings() as caught:
        data, _ = view_data(session, parts, order=state["order"], alpha_fdr=float(state["alpha_fdr"]),
                            selected_pair=state["selected_pair"], min_count=threshold or None,
                            generation=generation, selection_method=state["selection_method"],
                            selection_k=state["selection_k"], surprise_model=state["surprise_model"],
                            surprise_n=state["surprise_n"])
        ranked = data.pop("_top_pairs", [])
        if "selected_pair" in data:
            state["selected_pair"] = data.pop("selected_pair")
        unit = state["unit"]
        wanted = list(ranked[:top_pairs])
        if state["selected_pair"]:
            wanted.insert(0, tuple(state["selected_pair"]))
        cache = {}
        for a, b in dict.fromkeys(tuple(p) for p in wanted):
            cache[a + "\u0000" + b] = _pair_view(session, a, b, unit, threshold or None, generation)
        drift = None if reference is None else drift_data(session, reference, min_count=threshold or None,
                                                          generation=generation)
        over = None if over_spec is None else drift_over_data(session, over_spec, reference=reference,
                                                             min_count=threshold or None, generation=generation)
    notes = sorted({f"{w.category.__name__}: {w.message}" for w in caught})
    state.update(data)
    state["_drift"] = drift
    state["_drift_over"] = over
    state["_view"] = view
    state["_meta"] = meta(session)
    state["_status"] = dict(status) if status is not None else {
        "state": "idle", "message": "", "generation": int(generation), "progress": None, "notes": notes}
    binary = [name for name in DATA_TRAITS if isinstance(state.get(name), (bytes, bytearray, memoryview))]
    for name in binary:
        state[name] = ser.b64(state[name])
    return {"format": FORMAT, "view": view, "state": state, "binary": binary, "pair_cache": cache}


def _profiled_rows(session) -> int:
    """Rows a session profiles (its sample when it has one)."""
    return int(session.sampled or session.n_rows)
