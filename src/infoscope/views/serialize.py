"""Result tables -> the shapes every view reads: one serializer for the widget and the exports.

Nothing here estimates anything: the numbers come from ``ProfileSession`` result
tables (docs/design.md, "Result tables"); this module only reshapes them, turns
NaN/inf into ``null`` and hides small cells of a pair view (the rule is
:func:`infoscope.frame.suppression.pair_hidden_kinds`). Column names and labels
travel as JSON *values* (strings) under fixed field names, never as keys or
markup: the front end puts them into the page with ``textContent`` only, and
Vega-Lite would read dots and brackets in a field name as nested access.

Shapes of the live view and of the HTML export (the front end reads exactly these):

``entropy_json`` -> JSON text
    ``{"fields": [...ENTROPY_FIELDS], "rows": [[...], ...], "unit", "estimator",
    "sampled", "generation"}`` with one row per column in the table's order.
``grid_buffers`` -> dict
    ``meta``: ``{"names": [...ordered...], "measure", "unit", "order", "alpha",
    "size", "reliability_states", "pair_counts", "generation"}`` (``pair_counts``:
    ``{"pairs": m, "ok"/"sparse"/"too_few": ..., "chi2"/"permutation"/"none": ...}``,
    the pairs of the table by reliability and by test); ``values`` (float32, row-major ``size x size``, NaN where
    unknown, the diagonal included as given by ``matrix()``), ``n`` (int32 pairwise
    complete rows), ``q`` (float32 BH q-values, NaN on the diagonal) and
    ``reliability`` (uint8: index into ``meta["reliability_states"]`` = ``["ok",
    "sparse", "too_few"]``, 255 on the diagonal).
``pair_view`` -> dict
    ``{"a", "b", "rows", "cols", "counts" (null = hidden), "pmi" (null = hidden),
    "expected" (null when any cell is hidden), "row_totals"/"col_totals" (null when
    any cell is hidden), "n", "mi", "nmi", "p_value", "g", "dof", "unit",
    "p_method", "n_permutations", "p_error", "reliability", "min_count", "hidden_cells",
    "hidden_reasons" (null when nothing is hidden,
    else per cell null / "small" / "complement"), "generation"}``.
``relevance_json`` -> JSON text
    ``{"target", "fields": [...RELEVANCE_JSON_FIELDS], "rows": [...], "unit", "generation"}``
    (the table's fields, then ``sparse``: reliability is not "ok").
``drift_over_record`` -> dict
    ``{"time_column", "every", "reference" ("first" / "previous" / "frame"),
    "periods": [{"period", "start", "is_reference"}], "columns": [...], "cells":
    [{DRIFT_OVER_CELL_FIELDS..., "hidden"}], "flags", "level", "units",
    "min_count", "generation"}``: one cell per (period, column) of
    ``ProfileSession.drift_over``; with ``min_count`` the row counts below it (and
    those that would give them back) are null, ``hidden`` says so.

Records of the charts and the static picture (lists of flat dicts, one per row or
cell): :func:`entropy_records`, :func:`grid_records`, :func:`pair_records` (the
cells of :func:`pair_view`), :func:`relevance_records`, :func:`drift_records`.
"""
from __future__ import annotations

import base64
import json
import math
from typing import Any

import numpy as np
import pandas as pd

from infoscope.estimators._checks import UNIT_OF_BASE
from infoscope.estimators.significance import RELIABILITY_STATES
from infoscope.frame.drift_over import DRIFT_OVER_COLUMNS
from infoscope.frame.results import DRIFT_FLAGS, TEST_LEVEL
from infoscope.frame.suppression import (SMALL, check_min_count, complement_label, pair_hidden_kinds,
                                         suppressed_label, suppression_kinds)

#: The units a view can show (the names of :data:`infoscope.estimators._checks.UNIT_OF_BASE`).
UNITS = tuple(UNIT_OF_BASE.values())

ENTROPY_FIELDS = ("column", "kind", "k", "n", "missing", "missing_share", "entropy", "ci_low",
                  "ci_high", "max_entropy", "efficiency", "effective_categories", "flags")
PAIR_FIELDS = ("a", "b", "n", "value", "q_value")
RELEVANCE_FIELDS = ("column", "k", "n", "mi", "mi_above_chance", "ci_low", "ci_high", "nmi", "p_value", "q_value",
                    "share_of_target", "leakage", "p_method", "n_permutations", "p_error", "reliability")
#: The relevance rows also carry ``sparse`` (reliability is not "ok"), last, for views
#: written before ``reliability`` existed.
RELEVANCE_JSON_FIELDS = RELEVANCE_FIELDS + ("sparse",)
#: Codes of the grid's ``reliability`` buffer: index into this tuple; 255 = no pair
#: (the diagonal, or a pair not in the table).
GRID_RELIABILITY = RELIABILITY_STATES


def scalar(value: Any) -> Any:
    """A JSON-able scalar: numpy unwrapped, NaN/inf/NA -> None, other objects -> str."""
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    return str(value)


def dumps(obj: Any) -> str:
    """Compact JSON that refuses NaN (the front end's JSON.parse would too)."""
    return json.dumps(obj, separators=(",", ":"), allow_nan=False, ensure_ascii=False)


def require(table, fields, what: str) -> None:
    """Refuse anything but a result table holding ``fields`` (a clear error, not a KeyError)."""
    if not isinstance(table, pd.DataFrame):
        raise TypeError(f"{what} must be a pandas DataFrame (a result table), got {type(table).__name__}")
    missing = [f for f in fields if f not in table.columns]
    if missing:
        raise ValueError(f"{what} lacks the result-table column(s) {missing}; see docs/design.md, result tables")


def attrs_of(table: pd.DataFrame) -> dict:
    """The unit / estimator / sampled / measure attributes a result table carries."""
    attrs = getattr(table, "attrs", None) or {}
    return {"unit": str(attrs.get("unit", "bits")), "estimator": scalar(attrs.get("estimator")),
            "sampled": scalar(attrs.get("sampled")), "measure": scalar(attrs.get("measure")),
            "ci": scalar(attrs.get("ci"))}


def entropy_json(table: pd.DataFrame, *, generation: int = 0) -> str:
    """The entropy table as compact JSON rows (see the module docstring)."""
    require(table, ENTROPY_FIELDS, "the entropy table")
    rows = [[scalar(v) for v in row] for row in table.loc[:, list(ENTROPY_FIELDS)].itertuples(index=False)]
    for row in rows:  # the front end splits flags itself; keep "" for none
        if row[-1] is None:
            row[-1] = ""
    a = attrs_of(table)
    return dumps({"fields": list(ENTROPY_FIELDS), "rows": rows, "unit": a["unit"],
                  "estimator": a["estimator"], "sampled": a["sampled"], "ci": a["ci"],
                  "generation": int(generation)})


def grid_buffers(pairs: pd.DataFrame, order: list[str], *, alpha: float = 0.05,
                 diagonal: pd.Series | None = None, generation: int = 0,
                 order_name: str = "name") -> dict:
    """Square float32/int32 buffers of one pair measure, in ``order``.

    ``pairs`` is the long ``pairs(measure=...)`` table; ``diagonal`` (optional) gives
    the value on the diagonal per name (e.g. the matrix's own diagonal).
    """
    require(pairs, PAIR_FIELDS, "the pairs table")
    names = [str(x) for x in order]
    index = {name: i for i, name in enumerate(names)}
    size = len(names)
    values = np.full((size, size), np.nan, dtype=np.float32)
    n = np.zeros((size, size), dtype=np.int32)
    q = np.full((size, size), np.nan, dtype=np.float32)
    rel = np.full((size, size), 255, dtype=np.uint8)
    ia = pairs["a"].astype(str).map(index)
    ib = pairs["b"].astype(str).map(index)
    ok = ia.notna().to_numpy() & ib.notna().to_numpy()
    i = ia.to_numpy()[ok].astype(np.intp)
    j = ib.to_numpy()[ok].astype(np.intp)
    v = pd.to_numeric(pairs["value"], errors="coerce").to_numpy(dtype=np.float64)[ok]
    nn = pd.to_numeric(pairs["n"], errors="coerce").fillna(0).to_numpy(dtype=np.int64)[ok]
    qq = pd.to_numeric(pairs["q_value"], errors="coerce").to_numpy(dtype=np.float64)[ok]
    counts = {"pairs": int(ok.sum())}
    for column in ("reliability", "p_method"):
        if column in pairs.columns:
            for key, value in pairs.loc[ok, column].astype(str).value_counts().items():
                counts[str(key)] = int(value)
    if "reliability" in pairs.columns:
        code = {state: c for c, state in enumerate(GRID_RELIABILITY)}
        rr = np.array([code.get(str(x), 255) for x in pairs["reliability"].to_numpy()[ok]], dtype=np.uint8)
    else:
        rr = np.full(int(ok.sum()), 255, dtype=np.uint8)
    for a, b in ((i, j), (j, i)):
        values[a, b] = v
        n[a, b] = nn
        q[a, b] = qq
        rel[a, b] = rr
    if diagonal is not None:
        for name, val in diagonal.items():
            k = index.get(str(name))
            if k is not None:
                values[k, k] = np.float32(val) if val is not None else np.nan
    attrs = attrs_of(pairs)
    return {
        "meta": {"names": names, "measure": attrs["measure"] or "mi", "unit": attrs["unit"],
                 "order": order_name, "alpha": float(alpha), "size": size,
                 "reliability_states": list(GRID_RELIABILITY), "pair_counts": counts,
                 "generation": int(generation)},
        "values": values.tobytes(),
        "n": n.tobytes(),
        "q": q.tobytes(),
        "reliability": rel.tobytes(),
    }


def _g_parts(g_test) -> tuple[Any, Any, Any]:
    """(G, dof, p) from a g-test result: a named tuple, a dataclass or a 3-tuple."""
    if g_test is None:
        return None, None, None
    names = ("statistic", "dof", "p_value")
    if all(hasattr(g_test, x) for x in names):
        return tuple(scalar(getattr(g_test, x)) for x in names)
    try:
        g, dof, p = tuple(g_test)[:3]
    except (TypeError, ValueError):
        return None, None, None
    return scalar(g), scalar(dof), scalar(p)


def pair_view(pair, a: str | None = None, b: str | None = None, *, unit: str | None = None,
              min_count: int | None = None, generation: int = 0) -> dict:
    """One pair's joint table, with small cells hidden when ``min_count`` is set.

    Hidden cells lose their count and their pointwise MI; when any cell is hidden the
    margins and the expected counts are dropped too, so totals minus visible cells
    cannot give a hidden count back (complementary suppression from
    :mod:`infoscope.frame.suppression`).  ``a`` and ``b`` default to the pair's own.
    """
    counts = getattr(pair, "counts", None)
    if not isinstance(counts, pd.DataFrame):
        raise TypeError("a pair view needs a PairTable with a .counts DataFrame (ProfileSession.pair)")
    threshold, raw, kinds = pair_hidden_kinds(pair, min_count)
    mask = kinds != 0
    pmi_frame = getattr(pair, "pmi", None)
    pmi = pmi_frame.to_numpy(dtype=np.float64) if isinstance(pmi_frame, pd.DataFrame) else np.full_like(raw, np.nan)
    cell_counts = [[None if mask[i, j] else scalar(raw[i, j]) for j in range(raw.shape[1])]
                   for i in range(raw.shape[0])]
    # pointwise MI of an empty cell is -inf: it has no colour, the count 0 says it all
    cell_pmi = [[None if mask[i, j] else scalar(pmi[i, j]) for j in range(raw.shape[1])]
                for i in range(raw.shape[0])]
    hidden = int(mask.sum())
    reasons = hidden_reasons(kinds) if hidden else None
    # expected counts are products of the margins: with a hidden cell they would
    # give the totals (and so the hidden counts) back, so they go with the totals
    exp_frame = getattr(pair, "expected", None)
    expected = None
    if not hidden and isinstance(exp_frame, pd.DataFrame):
        expected = [[scalar(v) for v in row] for row in exp_frame.to_numpy(dtype=np.float64).tolist()]
    g, dof, p = _g_parts(getattr(pair, "g_test", None))
    return {
        "a": str(a if a is not None else _axis_name(counts.index, pair, "a")),
        "b": str(b if b is not None else _axis_name(counts.columns, pair, "b")),
        "rows": [str(x) for x in counts.index], "cols": [str(x) for x in counts.columns],
        "counts": cell_counts, "pmi": cell_pmi, "expected": expected,
        "row_totals": None if hidden else [scalar(x) for x in raw.sum(axis=1)],
        "col_totals": None if hidden else [scalar(x) for x in raw.sum(axis=0)],
        "n": scalar(getattr(pair, "n", None)), "mi": scalar(getattr(pair, "mi", None)),
        "nmi": scalar(getattr(pair, "nmi", None)), "g": g, "dof": dof, "p_value": p,
        "p_method": scalar(getattr(pair, "p_method", None)),
        "n_permutations": scalar(getattr(pair, "n_permutations", None)),
        "p_error": scalar(getattr(pair, "p_error", None)),
        "reliability": scalar(getattr(pair, "reliability", None)),
        "unit": str(unit if unit is not None else getattr(pair, "unit", None) or "bits"),
        "min_count": threshold, "hidden_cells": hidden,
        "hidden_reasons": reasons, "generation": int(generation),
    }


def _axis_name(axis, pair, side: str) -> str:
    return getattr(axis, "name", None) or getattr(pair, side, "") or ""


def hidden_reasons(kinds: np.ndarray) -> list:
    """Per cell: ``None`` (shown), ``"small"`` (below min_count) or ``"complement"``.

    A complementary cell is hidden only so that a small one cannot be worked out
    from the totals; its count may be large, so the front end must not label it
    "fewer than min_count".
    """
    return [[None if k == 0 else ("small" if k == SMALL else "complement") for k in row]
            for row in np.asarray(kinds).tolist()]


def relevance_json(table: pd.DataFrame | None, target: str | None, *, generation: int = 0) -> str:
    """The relevance table as compact JSON rows; ``{"target": null}`` when no target."""
    if table is None or target is None:
        return dumps({"target": None, "fields": list(RELEVANCE_JSON_FIELDS), "rows": [],
                      "unit": None, "generation": int(generation)})
    require(table, RELEVANCE_FIELDS, "the relevance table")
    rows = [[scalar(v) for v in row] + [str(row[-1]) != "ok"]
            for row in table.loc[:, list(RELEVANCE_FIELDS)].itertuples(index=False)]
    a = attrs_of(table)
    return dumps({"target": str(target), "fields": list(RELEVANCE_JSON_FIELDS), "rows": rows,
                  "unit": a["unit"], "ci": a["ci"], "generation": int(generation)})


def b64(data: bytes) -> str:
    """Base64 text of a binary buffer (how ``payload()`` carries the grid)."""
    return base64.b64encode(bytes(data)).decode("ascii")


# ------------------------------------------------------------------ records (charts, picture)
def _row_records(table: pd.DataFrame, fields, what: str, extra=()) -> list[dict]:
    """One record per row of a result table: ``fields`` (and the ``extra`` ones present) as
    JSON scalars, ``column`` as text."""
    require(table, fields, what)
    fields = list(fields) + [f for f in extra if f in table.columns]
    out = []
    for row in table.loc[:, fields].itertuples(index=False):
        rec = {f: scalar(v) for f, v in zip(fields, row)}
        rec["column"] = str(row.column)
        out.append(rec)
    return out


def entropy_records(table: pd.DataFrame) -> list[dict]:
    """One record per column of an ``entropy()`` table (``ENTROPY_FIELDS``, ``flags`` as text)."""
    out = _row_records(table, ENTROPY_FIELDS, "the entropy table")
    for rec, flags in zip(out, table["flags"]):
        rec["flags"] = str(flags or "")
    return out


def grid_records(matrix: pd.DataFrame) -> tuple[list[str], list[dict]]:
    """The order of names and one record per off-diagonal cell of a ``matrix()``."""
    if not isinstance(matrix, pd.DataFrame):
        raise TypeError(f"the matrix must be a pandas DataFrame, got {type(matrix).__name__}")
    names = [str(c) for c in matrix.columns]
    if names != [str(i) for i in matrix.index]:
        raise ValueError("the matrix must be square with the same names on both axes")
    values = matrix.to_numpy(dtype=np.float64, na_value=np.nan)
    return names, [{"a": a, "b": b, "value": scalar(values[i, j])}
                   for i, a in enumerate(names) for j, b in enumerate(names) if i != j]


def pair_records(pair, *, min_count=None) -> dict:
    """The cells of one :func:`pair_view` as flat records (the shape Vega-Lite reads).

    Each cell: ``row, col, count, expected, pmi, shown, hidden, reason``.  Hidden
    cells carry no count, expected count or pointwise MI; their ``shown`` text is
    ``"<10"`` (for ``min_count=10``) only for a cell below the threshold, a
    complementary cell shows :func:`~infoscope.frame.suppression.complement_label`.
    ``row_totals`` / ``col_totals`` are present only when nothing is hidden.
    """
    view = pair_view(pair, min_count=min_count)
    threshold = view["min_count"]
    reasons = view["hidden_reasons"]
    small, other = (suppressed_label(threshold) if threshold else None), complement_label()
    cells = []
    for i, r in enumerate(view["rows"]):
        for j, c in enumerate(view["cols"]):
            reason = reasons[i][j] if reasons else None
            count = view["counts"][i][j]
            cells.append({
                "row": r, "col": c, "count": count,
                "expected": view["expected"][i][j] if view["expected"] is not None else None,
                "pmi": view["pmi"][i][j],
                "shown": (small if reason == "small" else other) if reason else f"{int(count):d}",
                "hidden": reason is not None, "reason": reason,
            })
    rec = {key: view[key] for key in ("a", "b", "rows", "cols", "n", "mi", "nmi", "hidden_cells", "min_count")}
    rec["cells"] = cells
    if not view["hidden_cells"]:
        rec["row_totals"], rec["col_totals"] = view["row_totals"], view["col_totals"]
    return rec


def relevance_records(table: pd.DataFrame) -> list[dict]:
    """One record per column of a ``relevance(target)`` table (``RELEVANCE_FIELDS``)."""
    return _row_records(table, RELEVANCE_FIELDS, "the relevance table")


DRIFT_FIELDS = ("column", "kind", "k", "n", "n_reference", "psi", "kl", "js", "p_value", "flag")


#: Chance-level fields of a drift table, carried when present (tables made before them lack them).
DRIFT_CHANCE_FIELDS = ("psi_chance", "psi_chance_high", "q_value", "new_share")


def drift_records(table: pd.DataFrame) -> list[dict]:
    """One record per column of a ``drift(reference)`` table (``DRIFT_FIELDS``, plus ``DRIFT_CHANCE_FIELDS``)."""
    return _row_records(table, DRIFT_FIELDS, "the drift table", extra=DRIFT_CHANCE_FIELDS)


#: Fields of one cell of the drift-over-time strip (columns of ``drift_over()``).
DRIFT_OVER_CELL_FIELDS = ("period", "column", "reference", "n", "n_reference", "psi", "psi_chance",
                          "psi_chance_high", "kl", "js", "p_value", "q_value", "flag")


def drift_over_record(table: pd.DataFrame, *, min_count=None, generation: int = 0) -> dict:
    """The ``_drift_over`` part: a ``drift_over()`` table as periods, columns and cells.

    With ``min_count``, the row counts of the (column x period) table, the
    reference period's included, go through the one small-cell rule of the
    exports (:func:`infoscope.frame.suppression.suppression_kinds`: counts below
    ``min_count`` and the ones that would give them back through a column's
    total); since the columns of one period often share its row count, a period
    with a hidden count has every count hidden.  A hidden count is null in ``n``
    or ``n_reference`` and the cell's ``hidden`` is ``"small"`` (its own count is
    small) or ``"complement"``.  The divergences are shipped.
    """
    require(table, DRIFT_OVER_COLUMNS, "the drift_over table")
    attrs = getattr(table, "attrs", None) or {}
    mode = str(attrs.get("reference", "frame"))
    columns = list(dict.fromkeys(str(c) for c in table["column"]))
    labels = list(dict.fromkeys(str(p) for p in table["period"]))
    starts = {str(p): t for p, t in zip(table["period"], table["start"])}
    first = None
    if mode == "first" and len(table):
        first = str(table["reference"].iloc[0])
        labels.insert(0, first)
    cells = [{f: scalar(row[f]) for f in DRIFT_OVER_CELL_FIELDS} for row in table.to_dict(orient="records")]
    for c in cells:
        c["period"], c["column"], c["hidden"] = str(c["period"]), str(c["column"]), None
    threshold = check_min_count(min_count)
    if threshold:
        at = {(c["column"], c["period"]): c for c in cells}
        col_i = {c: i for i, c in enumerate(columns)}
        per_i = {p: j for j, p in enumerate(labels)}
        counts = np.zeros((len(columns), len(labels)))
        for c in cells:
            counts[col_i[c["column"]], per_i[c["period"]]] = c["n"] or 0
            if first is not None:
                counts[col_i[c["column"]], 0] = c["n_reference"] or 0
        kinds = suppression_kinds(counts, threshold)
        # the columns of one period often share its row count (no missing values), so a
        # period with any hidden count hides every count of that period
        gone = kinds.any(axis=0)
        for c in cells:
            i, j = col_i[c["column"]], per_i[c["period"]]
            ref = c["reference"]
            ref_gone = (0 < (c["n_reference"] or 0) < threshold) if mode == "frame" else \
                bool(ref in per_i and gone[per_i[ref]])
            if gone[j]:
                c["n"] = None
            if ref_gone:
                c["n_reference"] = None
            if gone[j] or ref_gone:
                c["hidden"] = "small" if kinds[i, j] == SMALL else "complement"

    def start_of(p):
        t = starts.get(p)
        return None if t is None or pd.isna(t) else pd.Timestamp(t).isoformat()
    periods = [{"period": p, "start": start_of(p), "is_reference": p == first} for p in labels]
    return {"time_column": scalar(attrs.get("time_column")), "every": scalar(attrs.get("every")),
            "reference": mode, "periods": periods, "columns": columns, "cells": cells,
            "flags": dict(DRIFT_FLAGS), "level": float(TEST_LEVEL), "units": dict(attrs.get("units", {})),
            "min_count": threshold, "generation": int(generation)}


# ------------------------------------------------------------------ selection and surprising rows
#: Fields of the ``_selection`` rows (the ``select()`` table's columns).
SELECTION_FIELDS = ("step", "column", "relevance", "criterion", "gain", "gain_supported", "redundancy",
                    "p_value", "q_value", "significant", "status", "note")
#: Fields of the ``_surprising`` rows (``cells`` travel beside them, one list per row).
SURPRISING_FIELDS = ("rank", "row", "position", "surprisal", "excess", "summary")
#: Keys of one contributing cell of a surprising row.
SURPRISING_CELL_KEYS = ("column", "value", "symbol", "bits", "parent", "parent_value", "parent_symbol")


def selection_json(table: pd.DataFrame | None, target: str | None, *, generation: int = 0,
                   note: str | None = None) -> str:
    """The ``select()`` table as compact JSON rows; ``{"target": null, ...}`` when there is no target.

    ``{"target", "method", "k", "fdr", "stop_step", "n_permutations", "unit", "fields", "rows",
    "statuses" (legend text per status), "generation"}``: one row per step in order, then
    one per column left out (``step`` null).  With a ``note`` (why there is no
    selection for this target, e.g. a weighted profile) the record is
    ``{"target", "note", "rows": [], ...}``.
    """
    from infoscope.frame.selection import SELECTION_STATUS

    if note is not None and target is not None:
        return dumps({"target": str(target), "note": str(note), "fields": list(SELECTION_FIELDS), "rows": [],
                      "unit": None, "statuses": dict(SELECTION_STATUS), "generation": int(generation)})
    if table is None or target is None:
        return dumps({"target": None, "fields": list(SELECTION_FIELDS), "rows": [], "unit": None,
                      "statuses": dict(SELECTION_STATUS), "generation": int(generation)})
    require(table, SELECTION_FIELDS, "the selection table")
    attrs = getattr(table, "attrs", None) or {}
    rows = [[scalar(v) for v in row] for row in table.loc[:, list(SELECTION_FIELDS)].itertuples(index=False)]
    return dumps({"target": str(target), "method": scalar(attrs.get("method")), "k": scalar(attrs.get("k")),
                  "fdr": scalar(attrs.get("fdr")), "stop_step": scalar(attrs.get("stop_step")),
                  "n_permutations": scalar(attrs.get("n_permutations")), "unit": attrs_of(table)["unit"],
                  "fields": list(SELECTION_FIELDS), "rows": rows, "statuses": dict(SELECTION_STATUS),
                  "generation": int(generation)})


def surprising_json(table: pd.DataFrame, tree: pd.DataFrame, *, generation: int = 0) -> str:
    """The ``surprising_rows()`` table and the ``tree()`` edges as compact JSON.

    ``{"model", "unit", "alpha", "mean_surprisal", "hidden_values", "min_count", "fields",
    "rows", "cells" (per row, a list of dicts with :data:`SURPRISING_CELL_KEYS`), "tree":
    {"root", "edges": [[parent, child, mi, depth], ...], "unit", "left_out"}, "generation"}``.
    ``row`` (the frame's index label) travels as text; with ``hidden_values`` every
    value and symbol of the cells is null (the scores stay).
    """
    require(table, SURPRISING_FIELDS + ("cells",), "the surprising-rows table")
    require(tree, ("parent", "child", "mi", "depth"), "the tree table")
    attrs = getattr(table, "attrs", None) or {}
    hidden = bool(attrs.get("hidden_values"))
    rows, cells = [], []
    for rec in table.itertuples(index=False):
        rows.append([scalar(getattr(rec, f)) if f != "row" else str(rec.row) for f in SURPRISING_FIELDS])
        listed = []
        for cell in rec.cells:
            item = {key: scalar(cell.get(key)) for key in SURPRISING_CELL_KEYS}
            if hidden:  # never send a hidden value, whatever the table holds
                item.update(value=None, symbol=None, parent_value=None, parent_symbol=None)
            listed.append(item)
        cells.append(listed)
    tattrs = getattr(tree, "attrs", None) or {}
    edges = [[str(r.parent), str(r.child), scalar(r.mi), scalar(r.depth)] for r in tree.itertuples(index=False)]
    return dumps({"model": scalar(attrs.get("model")), "unit": "bits", "alpha": scalar(attrs.get("alpha")),
                  "mean_surprisal": scalar(attrs.get("mean_surprisal")), "hidden_values": hidden,
                  "min_count": scalar(attrs.get("min_count")), "fields": list(SURPRISING_FIELDS),
                  "rows": rows, "cells": cells,
                  "tree": {"root": scalar(tattrs.get("root")), "edges": edges, "unit": attrs_of(tree)["unit"],
                           "left_out": {str(k): str(v) for k, v in dict(tattrs.get("left_out") or {}).items()}},
                  "generation": int(generation)})
