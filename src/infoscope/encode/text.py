"""Text and object columns: stable texts of cells, mixed types, routing to the typed encoders."""
from __future__ import annotations


import numpy as np
import pandas as pd

from infoscope.encode.drafts import _boolean, _Levels, _Notes
from infoscope.encode.numeric import _numeric
from infoscope.encode.temporal import _temporal


def _stable_text(v) -> str:
    """A repr of a cell that does not depend on dict / set iteration order."""
    if isinstance(v, dict):
        items = sorted((_stable_text(a), _stable_text(b)) for a, b in v.items())
        return "{" + ", ".join(f"{a}: {b}" for a, b in items) + "}"
    if isinstance(v, (set, frozenset)):
        inner = ", ".join(sorted(_stable_text(a) for a in v))
        return ("frozenset({" + inner + "})") if isinstance(v, frozenset) else ("{" + inner + "}" if v else "set()")
    if isinstance(v, list):
        return "[" + ", ".join(_stable_text(a) for a in v) + "]"
    if isinstance(v, tuple):
        return "(" + ", ".join(_stable_text(a) for a in v) + ("," if len(v) == 1 else "") + ")"
    if isinstance(v, np.ndarray):
        return "array(" + _stable_text(v.tolist()) + ")"
    if isinstance(v, np.generic):
        return repr(v.item())
    return repr(v)


def _plain(v):
    return v.item() if isinstance(v, np.generic) else v


def _hashable(v) -> bool:
    try:
        hash(v)
    except TypeError:
        return False
    return True


def _cell_texts(cells: np.ndarray, notes: _Notes) -> np.ndarray:
    """Text of each (non-missing) cell; type-tagged when the cells are of several types."""
    plain = np.frompyfunc(_plain, 1, 1)(cells) if cells.size else cells
    types = np.frompyfunc(type, 1, 1)(plain) if cells.size else cells
    type_codes, type_list = pd.factorize(types)
    type_counts = np.bincount(type_codes, minlength=len(type_list)) if cells.size else np.array([], int)
    hashable_type = [_hashable(plain[int(np.argmax(type_codes == i))]) for i in range(len(type_list))]
    n_unhashable = int(sum(int(c) for c, ok in zip(type_counts, hashable_type) if not ok))
    if n_unhashable:
        names = sorted({t.__name__ for t, ok in zip(type_list, hashable_type) if not ok})
        notes.warn(
            f"{n_unhashable} cell(s) hold unhashable values ({', '.join(names)}); "
            "they are encoded by a stable text form of their contents"
        )
    mixed = len(type_list) > 1
    if mixed:
        notes.flags.add("mixed_types")
        order = np.argsort(-type_counts, kind="stable")
        listing = ", ".join(f"{type_list[i].__name__}: {int(type_counts[i])}" for i in order)
        notes.warn(
            f"values of several types ({listing}); encoded as type-tagged text so that, "
            "for example, 1 and '1' stay distinct"
        )

    def text(v):
        t = v if isinstance(v, str) else (_stable_text(v) if not _hashable(v) else str(v))
        return f"{type(v).__name__}:{t}" if mixed else t

    return np.frompyfunc(text, 1, 1)(plain) if cells.size else cells


def _factorized(series: pd.Series, kind: str) -> _Levels:
    raw, uniques = pd.factorize(series, use_na_sentinel=True)
    # one array conversion, not a Python loop over the levels: an ID column has as
    # many levels as rows, and iterating an Arrow-backed Index cell by cell is slow
    labels = uniques.to_numpy(dtype=object)
    if labels.size and pd.api.types.infer_dtype(labels, skipna=False) != "string":
        labels = np.frompyfunc(str, 1, 1)(labels).astype(object)
    return _Levels(raw.astype(np.int64, copy=False), labels, False, kind, len(uniques))


def _objects(series: pd.Series, notes: _Notes, bins, strategy, threshold):
    """Object columns: route homogeneous ones to their typed encoders, tag mixed ones."""
    inferred = pd.api.types.infer_dtype(series, skipna=True)
    if inferred in ("string", "empty"):
        return _factorized(series, "text")
    if inferred == "boolean":
        na = series.isna().to_numpy()
        x = np.zeros(len(series), dtype=bool)
        x[~na] = series.to_numpy()[~na].astype(bool)
        return _boolean(x, na)
    if inferred in ("integer", "floating", "mixed-integer-float", "decimal"):
        num = pd.to_numeric(series, errors="coerce")
        exact = not (inferred == "integer" and num.dtype.kind == "f")  # ints beyond 64 bits
        if num.dtype != object and exact and int(num.isna().sum()) == int(series.isna().sum()):
            arr = num.to_numpy()
            if inferred == "decimal":
                # Decimals are read as float64: say when that merges values that differ
                merged = int(series.nunique(dropna=True)) - int(num.nunique(dropna=True))
                if merged > 0:
                    notes.warn(f"{merged} Decimal value(s) differ from another only beyond float64 precision "
                               "(about 15 significant digits) and are counted together")
            return _numeric(arr, None, notes, bins, strategy, threshold)
    if inferred == "time":  # datetime.time cells (a Polars Time column): time since midnight
        from infoscope.encode.ordered import _time_of_day

        return _time_of_day(series, notes, bins, strategy, threshold)
    if inferred == "complex":
        notes.warn("complex numbers have no order to bin on: each distinct value is read as a label")
    if inferred in ("datetime", "datetime64", "date", "timedelta", "timedelta64"):
        try:
            # no warnings.catch_warnings here: encoding runs in threads, and that context
            # swaps process-wide state (other threads' warnings would vanish or raise)
            conv = pd.to_timedelta(series) if inferred.startswith("timedelta") else pd.to_datetime(series)
        except (TypeError, ValueError):
            conv = None
        if conv is not None and conv.dtype.kind in "mM":
            return _temporal(conv, notes, bins, strategy, threshold)
    na = series.isna().to_numpy(dtype=bool)
    cells = series.to_numpy(dtype=object)
    texts = np.empty(cells.size, dtype=object)
    texts[~na] = _cell_texts(cells[~na], notes)
    texts[na] = None
    return _factorized(pd.Series(texts, dtype=object), "text")
