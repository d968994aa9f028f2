"""Drift of a frame from a reference frame, column by column, on one shared alphabet.

Method (per common column):

1. Encode the **reference** column with the profile's settings: its bins (numeric,
   datetime, timedelta) or its levels (everything else) define the alphabet.
2. Put the **current** column on that alphabet.  Binned columns use the
   reference's edges with open outer bins (a value below the first edge counts in
   the first bin, above the last edge in the last bin — common practice for PSI
   on score bands, so that a shift outside the old range shows up as mass in the
   extreme bins).  Categorical columns keep the reference's levels; a level the
   reference folded into its "(other)" symbol goes there, and a level the
   reference never had goes to an extra ``"(unseen)"`` symbol.
3. Compare the two count vectors: PSI and KL(current || reference) with a
   pseudocount (default 0.5 per cell, Jeffreys) so that an empty cell gives a
   finite value, JS divergence (finite without smoothing), and the p-value of a
   G-test of homogeneity on the 2 x K table of raw counts.  The flag reads PSI
   with the common-practice thresholds 0.10 / 0.25 ("stable" / "moderate" /
   "major"), except for two kinds of column that drift by construction, whose
   numbers are kept but whose flag says why: ``"id_like"`` (an identifier: every
   new batch brings new values) and ``"time_axis"`` (a datetime column of which
   at least half of this frame's values lie outside the reference's range: a
   later or earlier period).  :data:`infoscope.frame.results.DRIFT_FLAGS` holds
   the legend text of every flag for the views.

Missing values follow the profile's policy: under ``missing="drop"`` they are left
out of both sides; under ``"category"`` they are a symbol like any other.
"""
from __future__ import annotations

import math
import warnings

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning
from infoscope.frame.results import drift_flag

__all__ = ["TIME_AXIS_SHARE", "UNSEEN_LABEL", "align_to_reference", "drift_table"]

#: A datetime column is a time axis (drift flag ``"time_axis"``) when at least this
#: share of this frame's values lie outside the reference's range: the batch
#: covers another period, so its bins are all new by construction.
TIME_AXIS_SHARE = 0.5
#: Label of the symbol that collects levels the reference never had.
UNSEEN_LABEL = "(unseen)"
# categorical_threshold that keeps every distinct value of a column as a level
_ALL_LEVELS = 2**31 - 1
# kinds whose labels are comparable with each other
_FAMILY = {"numeric": "number", "integer_categories": "number", "categorical": "text",
           "text": "text", "boolean": "boolean", "datetime": "datetime", "timedelta": "timedelta"}


def _encode(values: pd.Series, name: str, settings: tuple, **override):
    from infoscope.encode.columns import encode_column

    bins, strategy, missing, max_categories = settings
    kw = {"bins": bins, "strategy": strategy, "missing": missing, "max_categories": max_categories}
    kw.update(override)
    return encode_column(values, name=name, **kw)


def _quiet_encode(values: pd.Series, name: str, settings: tuple, **override):
    # The alphabet helpers re-encode columns the user already heard about; the
    # data-quality warnings of the first encoding are enough.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataQualityWarning)
        return _encode(values, name, settings, **override)


def align_to_reference(current: pd.Series, reference: pd.Series, name: str, settings: tuple):
    """Counts of the reference and of the current column on the reference's alphabet.

    Parameters
    ----------
    current, reference : pandas.Series
        The column in the frame being checked and in the reference frame.
    name : str
        Column key (for messages).
    settings : tuple
        ``(bins, strategy, missing, max_categories)`` of the profile for this column.

    Returns
    -------
    labels : tuple of str
        Symbols of the shared alphabet (the reference's, plus ``"(unseen)"`` when
        the current column has levels the reference never had).
    reference_counts, current_counts : numpy.ndarray
        int64 counts per symbol (missing rows left out under ``missing="drop"``).
    kind : str
        The reference column's kind.

    Warns
    -----
    DataQualityWarning
        When the column is binned on one side and not on the other (its values
        then count as unseen).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI on the
       development sample's bands).

    Examples
    --------
    >>> import pandas as pd
    >>> labels, ref, cur, kind = align_to_reference(
    ...     pd.Series(list("abz")), pd.Series(list("aab")), "c", (16, "quantile", "drop", 64))
    >>> labels, ref.tolist(), cur.tolist()
    (('a', 'b', '(unseen)'), [2, 1, 0], [1, 1, 1])
    """
    from infoscope.encode.columns import OTHER_LABEL

    ref = _encode(reference, name, settings)
    k = int(ref.k)
    ref_counts = np.bincount(ref.codes, minlength=k + 1)[:k].astype(np.int64)
    labels = list(ref.labels)
    index = {label: i for i, label in enumerate(labels)}
    if ref.edges is not None:
        # the reference's own edges; values beyond them count in the end bins
        try:
            cur = _quiet_encode(current, name, settings, bins=np.asarray(ref.edges))
        except (TypeError, ValueError):
            cur = _quiet_encode(current, name, settings, max_categories=None)
        if cur.edges is None:
            warnings.warn(f"column {name!r} is binned ({ref.kind}) in the reference but {cur.kind} "
                          "in this frame: its values cannot share the reference's bins and count "
                          "as unseen", DataQualityWarning, stacklevel=3)
    else:
        cur = _quiet_encode(current, name, settings, max_categories=None,
                            categorical_threshold=_ALL_LEVELS)
        if "levels_folded" in ref.flags and OTHER_LABEL in index:
            # levels the reference folded into "(other)" belong there, not to "(unseen)"
            full = _quiet_encode(reference, name, settings, max_categories=None)
            for label in full.labels:
                index.setdefault(label, index[OTHER_LABEL])
        if _FAMILY.get(cur.kind) != _FAMILY.get(ref.kind) and cur.n_missing < cur.n:
            warnings.warn(f"column {name!r} is {ref.kind} in the reference but {cur.kind} in this "
                          "frame: values of another type cannot match the reference's levels and "
                          "count as unseen", DataQualityWarning, stacklevel=3)
    cur_k = int(cur.k)
    level_counts = np.bincount(cur.codes, minlength=cur_k + 1)[:cur_k]
    cur_counts = np.zeros(k + 1, dtype=np.int64)
    if ref.edges is not None and cur.edges is not None:
        # same edges, so bin i is bin i (labels may be worded differently); after
        # the bins may come the "(missing)" symbol under missing="category"
        n_bins = len(ref.edges) - 1
        targets = [i if i < n_bins else index.get(label, k) for i, label in enumerate(cur.labels)]
    else:
        targets = [index.get(label, k) for label in cur.labels]
    for target, count in zip(targets, level_counts):
        cur_counts[target] += int(count)
    if cur_counts[k] > 0:
        labels.append(UNSEEN_LABEL)
        ref_counts = np.append(ref_counts, 0)
    else:
        cur_counts = cur_counts[:k]
    return tuple(labels), ref_counts, cur_counts, ref.kind


def drift_table(current: dict, reference: dict, *, encoding: dict, pseudocount: float = 0.5,
                base=2) -> list[dict]:
    """Rows of the drift table (see :meth:`ProfileSession.drift`).

    Parameters
    ----------
    current, reference : dict of str -> pandas.Series
        The common columns, by key, in this frame and in the reference.
    encoding : dict of str -> tuple
        ``(bins, strategy, missing, max_categories)`` per key.
    pseudocount : float, default=0.5
        Added to every cell of both count vectors before PSI and KL.
    base : float or str, default=2
        Unit of KL and JS (PSI is in nats, as is the practice its thresholds assume).

    Returns
    -------
    list of dict
        One dict per column with the keys of ``DRIFT_COLUMNS``.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley.
    .. [2] Lin, J. (1991). Divergence measures based on the Shannon entropy. IEEE
       Transactions on Information Theory, 37(1), 145-151.
    .. [3] Wilks, S. S. (1938). Annals of Mathematical Statistics, 9(1), 60-62.

    Examples
    --------
    >>> import pandas as pd
    >>> rows = drift_table({"c": pd.Series(list("ab") * 50)}, {"c": pd.Series(list("ab") * 50)},
    ...                    encoding={"c": (16, "quantile", "drop", 64)})
    >>> rows[0]["flag"], rows[0]["psi"]
    ('stable', 0.0)
    """
    from infoscope.estimators.divergence import js_divergence, kl_divergence, psi
    from infoscope.estimators.information import g_test_from_table

    rows = []
    for key, values in current.items():
        labels, ref_counts, cur_counts, kind = align_to_reference(values, reference[key], key,
                                                                  encoding[key])
        n, n_ref = int(cur_counts.sum()), int(ref_counts.sum())
        row = {"column": key, "kind": kind, "k": len(labels), "n": n, "n_reference": n_ref,
               "psi": math.nan, "kl": math.nan, "js": math.nan, "p_value": math.nan, "flag": ""}
        if n == 0 or n_ref == 0:
            side = "this frame" if n == 0 else "the reference"
            warnings.warn(f"column {key!r} has no non-missing values in {side}: its drift is "
                          "undefined (NaN)", DataQualityWarning, stacklevel=3)
            rows.append(row)
            continue
        value = psi(ref_counts, cur_counts, pseudocount=pseudocount, counts=True)
        row["psi"] = value
        row["kl"] = kl_divergence(cur_counts, ref_counts, base=base, pseudocount=pseudocount,
                                  counts=True)
        row["js"] = js_divergence(cur_counts, ref_counts, base=base, counts=True)
        row["p_value"] = float(g_test_from_table(np.vstack([ref_counts, cur_counts])).p_value)
        row["flag"] = _axis_flag(values, reference[key], key, encoding[key], kind) or drift_flag(value)
        rows.append(row)
    return rows


def _axis_flag(current: pd.Series, reference: pd.Series, name: str, settings: tuple, kind: str) -> str:
    """``"id_like"`` or ``"time_axis"`` when a column drifts by construction, else ``""``.

    An identifier (the encoder's ``id_like`` flag on the reference) has new values
    in every new batch; a datetime column of which at least half of this frame's
    values lie outside the reference's range (:data:`TIME_AXIS_SHARE`) is a time
    axis of another period.  Both show a large PSI that says nothing about a
    change of distribution; the numbers are kept, the flag says why.
    """
    ref = _quiet_encode(reference, name, settings)
    if "id_like" in ref.flags:
        return "id_like"
    if kind != "datetime":
        return ""
    try:
        ref_time = pd.to_datetime(pd.Series(reference), utc=True, errors="coerce").dropna()
        cur_time = pd.to_datetime(pd.Series(current), utc=True, errors="coerce").dropna()
    except (TypeError, ValueError, OverflowError):
        return ""
    if ref_time.empty or cur_time.empty:
        return ""
    outside = (cur_time < ref_time.min()) | (cur_time > ref_time.max())
    return "time_axis" if float(outside.mean()) >= TIME_AXIS_SHARE else ""
