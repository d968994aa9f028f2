"""Result tables -> plain JSON-able records that every export shares.

One place decides what leaves the kernel: the charts, the SVG picture and the HTML
export all read these records, so small-cell suppression applied here holds for all
of them. Column names and labels travel as *values* under fixed, safe field names
(``column``, ``a``, ``b``, ``row``, ``col`` ...), never as field names: Vega-Lite
reads dots and brackets in a field name as nested access, and a name is data.
"""
from __future__ import annotations

import math
from typing import Any

import numpy as np
import pandas as pd

from infoscope.frame.suppression import pair_hidden_kinds
from infoscope.report.suppression import SMALL, check_min_count, complement_label, suppressed_label

UNITS = {"bits", "nats", "hartleys"}


def clean(value: Any) -> Any:
    """A JSON-able Python scalar: numpy scalars unwrapped, NaN/inf -> None."""
    if value is None:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    if value is pd.NA or value is pd.NaT:
        return None
    return str(value)


def attrs_of(table: pd.DataFrame) -> dict:
    """The unit / estimator / sampled attributes a result table carries."""
    attrs = getattr(table, "attrs", {}) or {}
    return {
        "unit": str(attrs.get("unit", "bits")),
        "estimator": clean(attrs.get("estimator")),
        "sampled": clean(attrs.get("sampled")),
        "measure": clean(attrs.get("measure")),
    }


def _require(table: pd.DataFrame, columns: tuple[str, ...], what: str) -> None:
    if not isinstance(table, pd.DataFrame):
        raise TypeError(f"{what} must be a pandas DataFrame (a result table), got {type(table).__name__}")
    missing = [c for c in columns if c not in table.columns]
    if missing:
        raise ValueError(f"{what} lacks the result-table column(s) {missing}; see DEVELOPERS.md, result tables")


def _row_records(table: pd.DataFrame, fields: tuple[str, ...], what: str) -> list[tuple[Any, dict]]:
    """(row, record) for each row of a result table: ``fields`` cleaned, ``column`` as text."""
    _require(table, fields, what)
    out = []
    for row in table.itertuples(index=False):
        rec = {f: clean(getattr(row, f)) for f in fields}
        rec["column"] = str(row.column)
        out.append((row, rec))
    return out


ENTROPY_FIELDS = ("column", "kind", "k", "n", "missing", "entropy", "ci_low", "ci_high",
                  "max_entropy", "efficiency", "flags")


def entropy_records(table: pd.DataFrame, *, min_count=None) -> list[dict]:
    """One record per column of an ``entropy()`` table.

    ``min_count`` is accepted for symmetry: these are column totals (rows used,
    rows missing), not cells of a joint table, and the number of rows used gives the
    missing count back anyway, so nothing is hidden here.
    """
    rows = _row_records(table, ENTROPY_FIELDS, "the entropy table")
    check_min_count(min_count)
    out = []
    for row, rec in rows:
        rec["flags"] = str(row.flags or "")
        share = getattr(row, "missing_share", None)
        rec["missing_share"] = clean(share)
        rec["effective_categories"] = clean(getattr(row, "effective_categories", None))
        out.append(rec)
    return out


def grid_records(matrix: pd.DataFrame) -> tuple[list[str], list[dict]]:
    """The order of names and one record per off-diagonal cell of a ``matrix()``."""
    if not isinstance(matrix, pd.DataFrame):
        raise TypeError(f"the matrix must be a pandas DataFrame, got {type(matrix).__name__}")
    names = [str(c) for c in matrix.columns]
    index = [str(i) for i in matrix.index]
    if names != index:
        raise ValueError("the matrix must be square with the same names on both axes")
    values = matrix.to_numpy(dtype=np.float64, na_value=np.nan)
    out = []
    for i, a in enumerate(names):
        for j, b in enumerate(names):
            if i == j:
                continue
            out.append({"a": a, "b": b, "value": clean(values[i, j])})
    return names, out


def pair_records(pair, *, min_count=None) -> dict:
    """Cells of one pair view (counts, expected counts, pointwise MI) as records.

    Hidden cells (see :func:`~infoscope.report.suppression.suppression_mask`) carry
    no count, no expected count and no pointwise MI, and the table then carries no
    row or column totals, so the hidden counts cannot be read back. Their ``shown``
    text is ``"<10"`` only for cells below the threshold; complementary cells show
    :data:`~infoscope.report.suppression.COMPLEMENT_LABEL` and ``reason`` says which.
    """
    counts = getattr(pair, "counts", None)
    if not isinstance(counts, pd.DataFrame):
        raise TypeError("a pair view needs a PairTable with a .counts DataFrame (ProfileSession.pair)")
    threshold, raw, kinds = pair_hidden_kinds(pair, min_count)
    mask = kinds != 0
    expected = getattr(pair, "expected", None)
    pmi = getattr(pair, "pmi", None)
    exp = expected.to_numpy(dtype=np.float64) if isinstance(expected, pd.DataFrame) else None
    pm = pmi.to_numpy(dtype=np.float64) if isinstance(pmi, pd.DataFrame) else None
    rows = [str(x) for x in counts.index]
    cols = [str(x) for x in counts.columns]
    label = suppressed_label(threshold) if threshold else None
    other = complement_label()
    cells = []
    for i, r in enumerate(rows):
        for j, c in enumerate(cols):
            hidden = bool(mask[i, j])
            cells.append({
                "row": r,
                "col": c,
                "count": None if hidden else clean(raw[i, j]),
                "expected": None if (hidden or exp is None) else clean(exp[i, j]),
                "pmi": None if (hidden or pm is None) else clean(pm[i, j]),
                "shown": (label if kinds[i, j] == SMALL else other) if hidden else f"{int(raw[i, j]):d}",
                "hidden": hidden,
                # why: "small" (below min_count) or "complement" (hidden to protect a small cell)
                "reason": None if not hidden else ("small" if kinds[i, j] == SMALL else "complement"),
            })
    n_hidden = int(mask.sum())
    rec = {
        "a": str(getattr(counts.index, "name", None) or getattr(pair, "a", "") or ""),
        "b": str(getattr(counts.columns, "name", None) or getattr(pair, "b", "") or ""),
        "rows": rows,
        "cols": cols,
        "cells": cells,
        "n": clean(getattr(pair, "n", None)),
        "mi": clean(getattr(pair, "mi", None)),
        "nmi": clean(getattr(pair, "nmi", None)),
        "hidden_cells": n_hidden,
        "min_count": threshold,
    }
    if n_hidden == 0:
        rec["row_totals"] = [clean(v) for v in raw.sum(axis=1)]
        rec["col_totals"] = [clean(v) for v in raw.sum(axis=0)]
    return rec


RELEVANCE_FIELDS = ("column", "k", "n", "mi", "ci_low", "ci_high", "nmi", "p_value", "q_value",
                    "share_of_target", "leakage", "sparse")


def relevance_records(table: pd.DataFrame) -> list[dict]:
    """One record per column of a ``relevance(target)`` table."""
    out = []
    for row, rec in _row_records(table, RELEVANCE_FIELDS, "the relevance table"):
        rec["leakage"] = bool(row.leakage)
        rec["sparse"] = bool(row.sparse)
        out.append(rec)
    return out


DRIFT_FIELDS = ("column", "kind", "k", "n", "n_reference", "psi", "kl", "js", "p_value", "flag")


def drift_records(table: pd.DataFrame) -> list[dict]:
    """One record per column of a ``drift(reference)`` table."""
    return [rec for _, rec in _row_records(table, DRIFT_FIELDS, "the drift table")]
