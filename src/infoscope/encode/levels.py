"""Finishing a draft: categorical levels, level order, folding rare levels, the missing symbol."""
from __future__ import annotations

import numpy as np
import pandas as pd

from infoscope.encode.drafts import _Bins, _format_numbers, _Levels, _Notes
from infoscope.encode.encoded import MISSING_LABEL, OTHER_LABEL, codes_dtype
from infoscope.encode.text import _cell_texts


def _category_labels(cats: pd.Index, notes: _Notes) -> list:
    """The labels of a Categorical's categories (in memory and out of core): numbers
    formatted as numbers, times by ``str``, other values as cell texts."""
    if cats.dtype.kind in "iuf":
        return _format_numbers(cats.to_numpy())
    if cats.dtype.kind in "mM":
        return [str(c) for c in cats]
    return list(_cell_texts(cats.to_numpy(dtype=object), notes))


def _categorical(series: pd.Series, notes: _Notes) -> _Levels:
    cats = series.cat.categories
    raw = series.cat.codes.to_numpy()  # int8 / int16 / ..., -1 missing (kept narrow)
    labels = _category_labels(cats, notes)
    used = _level_counts(raw, len(cats))
    return _Levels(raw, labels, bool(series.cat.ordered), "categorical", int(np.count_nonzero(used)), used)


def _level_counts(raw: np.ndarray, n_levels: int) -> np.ndarray:
    """Rows of each level ``0 .. n_levels-1`` of ``raw`` (``-1`` missing rows left out)."""
    if raw.dtype.kind == "i" and raw.dtype.itemsize <= 2 and n_levels <= 1 << (8 * raw.dtype.itemsize - 1):
        # narrow codes: -1 reads as the top unsigned value, so one bincount without
        # a masked copy (pandas' categorical codes are int8 up to 127 categories)
        unsigned = raw.view(np.uint8 if raw.dtype.itemsize == 1 else np.uint16)
        return np.bincount(unsigned, minlength=1 << (8 * raw.dtype.itemsize))[:n_levels]
    return np.bincount(raw[raw >= 0], minlength=n_levels)[:n_levels]


def _reserve(label: str) -> str:
    """A data label that reads like one of our symbols is quoted so the two stay apart."""
    return f'"{label}"' if label in (MISSING_LABEL, OTHER_LABEL) else label


def _distinct_labels(labels: list) -> tuple:
    seen: dict[str, int] = {}
    out = []
    for lab in labels:
        lab = str(lab)
        if lab in seen:
            seen[lab] += 1
            new = f"{lab} [{seen[lab]}]"
            while new in seen:
                seen[lab] += 1
                new = f"{lab} [{seen[lab]}]"
            seen[new] = 1
            out.append(new)
        else:
            seen[lab] = 1
            out.append(lab)
    return tuple(out)


def _finish_levels(d: _Levels, notes: _Notes, missing: str, max_categories):
    n_levels = len(d.labels)
    raw = d.raw
    if d.counts is not None and d.counts.shape == (n_levels,):
        counts = d.counts
    else:
        counts = _level_counts(raw, n_levels) if n_levels else np.zeros(0, np.int64)
    n_missing = int(raw.size - counts.sum())
    new_index, k, labels, level_counts = _level_alphabet(d.labels, counts, d.natural, n_missing, notes,
                                                         missing, max_categories)
    # every entry of new_index is set by now; gathered straight into the codes' dtype
    codes = new_index.astype(codes_dtype(k))[raw] if raw.size else raw.astype(np.int64)
    return codes, k, labels, n_missing, level_counts


def _fold_message(n_folded: int, n_levels: int, rows_folded: int, max_categories: int) -> str:
    return (f"{n_folded} of {n_levels} levels ({rows_folded} row(s)) are folded into {OTHER_LABEL!r} "
            f"to keep at most max_categories={max_categories} symbols")


def _fold_room(name: str, max_categories: int, with_missing_symbol: bool) -> int:
    """Levels kept beside ``"(other)"`` (and ``"(missing)"``) when a column is folded."""
    room = max_categories - 1 - with_missing_symbol
    if room < 1:
        raise ValueError(
            f"column {name!r}: max_categories={max_categories} leaves no room for a level "
            "beside '(other)' and '(missing)'; use max_categories >= 3 or missing='drop'"
        )
    return room


def _level_alphabet(level_labels, counts: np.ndarray, natural: bool, n_missing: int, notes: _Notes,
                    missing: str, max_categories):
    """The alphabet of a column of levels, decided from the levels and their counts only.

    The one rule of level order, folding and the missing symbol (the in-memory
    encoder and the out-of-core summaries of :mod:`infoscope.encode.summaries` both
    call it).  Returns ``(new_index, k, labels, level_counts)``: ``new_index[i]`` is
    the code of level ``i`` and ``new_index[n_levels]`` the code of a missing row.
    """
    n_levels = len(level_labels)
    with_missing_symbol = missing == "category" and n_missing > 0
    labels = np.empty(n_levels, dtype=object)  # a data label, or an array of them (vectorised)
    labels[:] = list(level_labels) if not isinstance(level_labels, np.ndarray) else level_labels
    if n_levels:
        reserved = np.flatnonzero((labels == MISSING_LABEL) | (labels == OTHER_LABEL))
        labels[reserved] = [_reserve(labels[i]) for i in reserved]
    if natural:
        order = np.arange(n_levels)
    else:
        # most frequent first; ties in label order so the result does not depend on row order
        order = np.lexsort((labels.astype(str), -counts)) if n_levels else np.arange(0)
    kept = order
    folded = False
    if max_categories is not None and n_levels + with_missing_symbol > max_categories:
        room = _fold_room(notes.name, max_categories, with_missing_symbol)
        by_count = order[np.argsort(-counts[order], kind="stable")]
        keep_set = np.zeros(n_levels, dtype=bool)
        keep_set[by_count[:room]] = True
        kept = order[keep_set[order]]
        folded = True
        notes.flags.add("levels_folded")
        notes.warn(_fold_message(n_levels - room, n_levels, int(counts[~keep_set].sum()), max_categories))
    new_index = np.full(n_levels + 1, -1, dtype=np.int64)
    new_index[kept] = np.arange(kept.size)
    out_labels = labels[kept].tolist()
    if folded:
        new_index[:n_levels][new_index[:n_levels] < 0] = len(out_labels)
        out_labels.append(OTHER_LABEL)
    if with_missing_symbol:
        out_labels.append(MISSING_LABEL)
    k = len(out_labels)
    # level -1 (a missing row) reads the last entry: the missing code
    new_index[n_levels] = k - 1 if with_missing_symbol else k
    level_counts = None
    if folded:
        # every present level, most frequent first (ties in label order, as `order`)
        present = order[counts[order] > 0]
        level_counts = np.array(counts[present[np.argsort(-counts[present], kind="stable")]], dtype=np.int64)
        level_counts.setflags(write=False)
    return new_index, k, _distinct_labels(out_labels), level_counts


def _finish_bins(d: _Bins, missing: str):
    raw = d.raw
    n_missing = int(np.count_nonzero(raw < 0))
    labels = list(d.labels)
    if missing == "category" and n_missing:
        labels.append(MISSING_LABEL)
        k = len(labels)
        codes = np.where(raw < 0, k - 1, raw)
    else:
        k = len(labels)
        codes = np.where(raw < 0, k, raw) if n_missing else raw
    return codes, k, _distinct_labels(labels), n_missing
