"""Drift of a table read in row batches (out of core) from an in-memory reference frame.

The same method as :mod:`infoscope.frame.drift`, with the current side's counts
gathered in one more pass over the batches instead of from its rows in memory
(:meth:`infoscope.sources.TableSession.drift` hands it the source's batches):

* a **binned** column (the reference's encoding has bin edges) codes every batch
  on the reference's edges (open outer bins) and adds the counts up, with the
  rows outside the reference's range (``new_share``, the time-axis rule);
* a column of **levels** adds up each batch's value counts; the distinct values
  are then encoded once (every level kept), which gives the labels, their order
  and the kind exactly as the whole column would, and
  :func:`infoscope.frame.drift.level_plan` maps both sides onto their shared
  alphabet (folded on the pooled counts).

The divergences, their chance level (random splits of the pooled rows, which are
a function of the two count vectors), the p-values, q-values and flags are
:func:`~infoscope.frame.drift.counts_row` / :func:`~infoscope.frame.drift.finish_drift_rows`
themselves, so the table equals the in-memory one on the same rows.  Out of core
a column whose values need reading as another type (text read as numbers) is not
compared (flag ``"type_changed"``, with a note), and a column of levels with more
than :data:`MAX_LEVELS` distinct values is left uncompared (an identifier, as
its reference flag usually says): profile a sample for those.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.frame.drift import (
    _ALL_LEVELS, NULL_METHODS, TIME_AXIS_SHARE, SharedAlphabet, _dtype_text, _encode, _outside, _quiet_encode,
    _zone_note, _zoned, check_reference_rows, column_seed, counts_row, finish_drift_rows, flagged_row, level_plan,
)

__all__ = ["batch_drift_rows", "MAX_LEVELS"]

#: Most distinct values of a column of levels whose counts are gathered out of core.
MAX_LEVELS = 1 << 20


class _Binned:
    """Counts of one binned column on the reference's edges, batch by batch."""

    def __init__(self, name, reference, settings, ref):
        from infoscope.encode.columns import MISSING_LABEL

        self.name, self.reference, self.settings, self.ref = name, reference, settings, ref
        self.edges = np.asarray(ref.edges)
        self.n_bins = len(self.edges) - 1
        self.bins = np.zeros(self.n_bins, dtype=np.int64)
        self.missing = 0
        self.outside = self.present = 0
        self.failed = False
        self._missing_label = MISSING_LABEL

    def add(self, values: pd.Series) -> None:
        if self.failed:
            return
        try:
            cur = _quiet_encode(values, self.name, self.settings, bins=self.edges)
        except (TypeError, ValueError):
            cur = None
        if cur is None or cur.edges is None:
            self.failed = True
            return
        counts = np.bincount(cur.codes, minlength=cur.k + 1)[: cur.k]
        self.bins += counts[: self.n_bins]
        self.missing += int(sum(c for label, c in zip(cur.labels[self.n_bins:], counts[self.n_bins:])
                                if label == self._missing_label))
        found = _outside(values, self.reference, self.ref.kind)
        if found is not None:
            self.outside += int(found[0].sum())
            self.present += int(found[1].sum())

    def alphabet(self, dtypes: str):
        ref, flags = self.ref, tuple(self.ref.flags)
        if self.failed:
            note = (f"column {self.name!r} is {dtypes}: out of core its values are not put on the reference's "
                    f"{ref.kind} bins, so it was not compared (flag 'type_changed'); profile a sample "
                    "(sample=) to compare it on the numbers its text reads as")
            warn_user(note, DataQualityWarning)
            return SharedAlphabet(self.name, ref.kind, (), _EMPTY, _EMPTY, None, math.nan, note, False, flags), None, None
        labels = list(ref.labels)
        if self.missing and self._missing_label not in labels:
            labels.append(self._missing_label)
        k = len(labels)
        cur = np.zeros(k, dtype=np.int64)
        cur[: self.n_bins] = self.bins
        if self.missing:
            cur[labels.index(self._missing_label)] += self.missing
        ref_counts = np.zeros(k, dtype=np.int64)
        ref_counts[: ref.k] = np.bincount(ref.codes, minlength=ref.k + 1)[: ref.k]
        new_share = self.outside / self.present if self.present else math.nan
        al = SharedAlphabet(self.name, ref.kind, tuple(labels), _EMPTY, _EMPTY, self.edges, new_share, "", True,
                            flags, reference_counts=ref_counts, current_counts=cur)
        return al, ref_counts, cur


class _Levels:
    """Value counts of one column of levels, batch by batch (at most :data:`MAX_LEVELS` values)."""

    def __init__(self, name, reference, settings, ref):
        self.name, self.reference, self.settings, self.ref = name, reference, settings, ref
        self.parts: list[pd.Series] = []
        self.counts: pd.Series | None = None
        self.n_missing = 0
        self.dtype = None
        self.too_many = False
        self.outside = self.present = 0

    def add(self, values: pd.Series) -> None:
        if self.too_many:
            return
        if self.dtype is None:
            self.dtype = values.dtype
        self.n_missing += int(values.isna().sum())
        self.parts.append(values.value_counts(dropna=True, sort=False))
        if self.ref.kind == "datetime":
            found = _outside(values, self.reference, "datetime")
            if found is not None:
                self.outside += int(found[0].sum())
                self.present += int(found[1].sum())
        if sum(len(p) for p in self.parts) > 4 * MAX_LEVELS // 3:
            self._fold()

    def _fold(self) -> None:
        parts = self.parts if self.counts is None else [self.counts, *self.parts]
        self.counts = pd.concat(parts).groupby(level=0, sort=False).sum() if parts else None
        self.parts = []
        if self.counts is not None and len(self.counts) > MAX_LEVELS:
            self.too_many, self.counts = True, None

    def alphabet(self, dtypes: str):
        ref, flags = self.ref, tuple(self.ref.flags)
        self._fold()
        if self.too_many:
            note = (f"column {self.name!r} has more than {MAX_LEVELS:,} distinct values: out of core its drift "
                    "is not computed (an identifier drifts by construction); profile a sample (sample=) for it")
            warn_user(note, DataQualityWarning)
            return SharedAlphabet(self.name, ref.kind, (), _EMPTY, _EMPTY, None, math.nan, note, False, flags), None, None
        ref_all = _quiet_encode(self.reference, self.name, self.settings, max_categories=None,
                                categorical_threshold=_ALL_LEVELS)
        ref_level = np.bincount(ref_all.codes, minlength=ref_all.k + 1)[: ref_all.k]
        distinct = list(self.counts.index) if self.counts is not None else []
        weights = list(self.counts.to_numpy()) if self.counts is not None else []
        if self.n_missing:
            distinct.append(None)
            weights.append(self.n_missing)
        values = pd.Series(distinct, dtype=self.dtype) if self.dtype is not None else pd.Series(distinct)
        cur_all = _quiet_encode(values, self.name, self.settings, max_categories=None,
                                categorical_threshold=_ALL_LEVELS)
        cur_level = np.bincount(cur_all.codes, weights=np.asarray(weights, dtype=np.float64),
                                minlength=cur_all.k + 1)[: cur_all.k].round().astype(np.int64)
        plan = level_plan(self.name, ref.kind, ref_all.labels, ref_level, cur_all.kind, cur_all.labels, cur_level,
                          max_categories=self.settings[3], dtypes=dtypes)
        if not plan.compared:
            return SharedAlphabet(self.name, ref.kind, (), _EMPTY, _EMPTY, None, math.nan, plan.note, False,
                                  flags), None, None
        k = len(plan.labels)
        ref_counts = np.bincount(plan.reference_map, weights=ref_level, minlength=k).round().astype(np.int64)
        cur_counts = np.bincount(plan.current_map, weights=cur_level, minlength=k).round().astype(np.int64)
        al = SharedAlphabet(self.name, ref.kind, plan.labels, _EMPTY, _EMPTY, None, plan.new_share, plan.note,
                            True, flags, reference_counts=ref_counts, current_counts=cur_counts)
        return al, ref_counts, cur_counts


_EMPTY = np.zeros(0, dtype=np.int64)


def _axis(al: SharedAlphabet, part) -> str:
    """:func:`infoscope.frame.drift.axis_flag` from the counts gathered."""
    if "id_like" in al.reference_flags:
        return "id_like"
    if al.kind != "datetime":
        return ""
    share = al.new_share if al.edges is not None else (part.outside / part.present if part.present else math.nan)
    return "time_axis" if share == share and share >= TIME_AXIS_SHARE else ""


def batch_drift_rows(batches, reference: dict, dtypes: dict, *, encoding: dict, pseudocount: float = 0.5,
                     base=2, n_perm: int = 999, seed=0, null: str = "permutation",
                     alphabets_out: dict | None = None) -> list[dict]:
    """Rows of the drift table of row batches against in-memory reference columns (one pass).

    Parameters
    ----------
    batches : iterable of pandas.DataFrame
        The current side, batch by batch, with (at least) the reference's columns.
    reference : dict of str -> pandas.Series
        The reference's columns, by key (the common columns).
    dtypes : dict of str -> dtype
        The source's column types (for the messages of a type change).
    encoding : dict of str -> tuple
        ``(bins, strategy, missing, max_categories)`` per key.
    pseudocount, base, n_perm, seed, null
        As in :func:`infoscope.frame.drift.drift_table`.
    alphabets_out : dict, optional
        When given, receives the :class:`~infoscope.frame.drift.SharedAlphabet` of
        every column by key (with its counts).

    Returns
    -------
    list of dict
        One row per column with the keys of ``DRIFT_COLUMNS``.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI on the
       development sample's bands).

    Examples
    --------
    >>> import pandas as pd
    >>> batches = (pd.DataFrame({"c": list("ab") * 5}) for _ in range(10))
    >>> rows = batch_drift_rows(batches, {"c": pd.Series(list("ab") * 50)}, {"c": "object"},
    ...                         encoding={"c": (16, "quantile", "drop", 64)})
    >>> rows[0]["flag"], rows[0]["psi"]
    ('stable', 0.0)
    """
    from infoscope.estimators._checks import check_choice, log_base

    check_choice(null, NULL_METHODS, "null")
    check_reference_rows(reference)
    parts, rows, texts = {}, {}, {}
    for key, ref_values in reference.items():
        texts[key] = f"{_dtype_text(ref_values)} in the reference, {dtypes.get(key, '?')} in this frame"
        ref = _encode(ref_values, key, encoding[key])
        zone_cur = _zoned(pd.Series([], dtype=dtypes[key])) if key in dtypes else None
        note = _zone_note(key, texts[key], _zoned(ref_values), zone_cur)
        if note:
            rows[key] = SharedAlphabet(key, ref.kind, (), _EMPTY, _EMPTY, None, math.nan, note, False,
                                       tuple(ref.flags))
            continue
        cls = _Binned if ref.edges is not None else _Levels
        parts[key] = cls(key, ref_values, encoding[key], ref)
    if parts:
        for batch in batches:
            for key, part in parts.items():
                part.add(batch[key])
    ln_base = log_base(base)
    out = []
    for key in reference:
        if key in rows:  # not compared before the pass
            out.append(_uncompared_row(rows[key], pseudocount, ln_base, n_perm, column_seed(seed, key), null))
            if alphabets_out is not None:
                alphabets_out[key] = rows[key]
            continue
        al, ref_counts, cur_counts = parts[key].alphabet(texts[key])
        if alphabets_out is not None:
            alphabets_out[key] = al
        seed_k = column_seed(seed, key)
        if not al.compared:
            out.append(_uncompared_row(al, pseudocount, ln_base, n_perm, seed_k, null))
            continue
        out.append(flagged_row(al, ref_counts, cur_counts, _axis(al, parts[key]), pseudocount=pseudocount,
                               ln_base=ln_base, n_perm=n_perm, seed=seed_k, null=null))
    finish_drift_rows(out)
    return out


def _uncompared_row(al, pseudocount, ln_base, n_perm, seed, null) -> dict:
    return counts_row(al, None, None, new_share=al.new_share, pseudocount=pseudocount, ln_base=ln_base,
                      n_perm=n_perm, seed=seed, null=null)
