"""Drift of a frame from a reference frame, column by column, on one shared alphabet.

Method (per common column):

1. **The shared alphabet.**  Encode the reference column with the profile's
   settings.  A binned column (numeric, datetime, timedelta with many values)
   keeps the reference's bin edges, with open outer bins on the current side (a
   value below the first edge counts in the first bin, above the last edge in the
   last bin — common practice for PSI on score bands, so that a shift outside the
   old range shows up as mass in the extreme bins).  A column of levels gets the
   union of the levels of **both** frames; when that union has more than
   ``max_categories`` symbols, the levels most frequent in the **pooled** rows are
   kept and the rest share one ``"(other)"`` symbol.  Choosing the kept levels
   from one side alone would bias the comparison (the reference's most frequent
   levels are, partly, the ones that sampling noise made frequent in the
   reference, so the current frame looks short of them); a choice made on the
   pooled rows is the same for every way of splitting them, which keeps the
   permutation test below exact.  A level the reference never had keeps its own
   symbol (reference count 0) when it is kept, and ``new_share`` reports the share
   of the current rows whose value the reference never had (levels) or that lie
   outside the reference's range (bins).
2. **The numbers.**  PSI and KL(current || reference) with a pseudocount (default
   0.5 per cell, Jeffreys) so that an empty cell gives a finite value, and the JS
   divergence (finite without smoothing).
3. **The chance level.**  Sampling alone makes every divergence positive, by an
   amount that grows with the number of cells and shrinks with both sample
   sizes.  :func:`infoscope.estimators.two_sample.drift_permutation_test` splits
   the pooled rows at random into a "reference" and a "current" part of the
   observed sizes (``n_perm`` times, seeded per column): ``psi_chance``,
   ``kl_chance``, ``js_chance`` are the means over the splits (what sampling alone
   gives at these sizes), ``psi_chance_high`` the 95 % point (the top of the chance
   band), ``p_value`` the share of splits with a PSI at least as large as the
   observed one, and ``q_value`` the Benjamini–Hochberg adjustment over the
   columns tested (those not flagged ``id_like`` / ``time_axis`` / ``type_changed``).
4. **The flag** (:func:`infoscope.frame.results.drift_verdict`) reads the size and
   the significance together: ``"major"`` / ``"moderate"`` when the change is
   significant (``q_value`` < 0.05) **and** the PSI beyond chance
   (``psi - psi_chance``) reaches the common-practice bands 0.25 / 0.10;
   ``"within_chance"`` when the PSI reads 0.10 or more but sampling alone explains
   it at these sizes; ``"stable"`` otherwise.  Three kinds of column are flagged
   for what they are, numbers kept where they were computed: ``"id_like"`` (an
   identifier: new values in every batch), ``"time_axis"`` (a datetime column of
   which at least half of this frame lies outside the reference's range) and
   ``"type_changed"`` (the values cannot share the reference's alphabet; numbers
   NaN).  :data:`infoscope.frame.results.DRIFT_FLAGS` holds every legend text.

Missing values follow the profile's policy: under ``missing="drop"`` they are left
out of both sides; under ``"category"`` they are a symbol like any other.
"""
from __future__ import annotations

import math
import zlib
from dataclasses import dataclass

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, collect_warnings, warn_user
from infoscope.frame.results import TEST_LEVEL, drift_verdict

__all__ = [
    "MIN_REFERENCE_ROWS",
    "TIME_AXIS_SHARE",
    "TYPE_MATCH_SHARE",
    "SharedAlphabet",
    "LevelPlan",
    "level_plan",
    "align_to_reference",
    "axis_flag",
    "NULL_METHODS",
    "check_reference_rows",
    "column_seed",
    "counts_row",
    "flagged_row",
    "drift_table",
    "finish_drift_rows",
]

#: How the chance level and the p-value are computed: ``"permutation"`` (random
#: splits of the pooled rows; exact) or ``"chi2"`` (the G-test and the first-order
#: chance level (K - 1)(1/n + 1/m); for large, well-filled tables only).
NULL_METHODS = ("permutation", "chi2")

#: A datetime column is a time axis (drift flag ``"time_axis"``) when at least this
#: share of this frame's values lie outside the reference's range: the batch
#: covers another period, so its bins are all new by construction.
TIME_AXIS_SHARE = 0.5
#: A column whose type changed is compared on its printed labels (or, for a
#: binned reference, on the numbers its text reads as) only when at least this
#: share of this frame's non-missing rows land on the reference's alphabet;
#: otherwise it is flagged ``"type_changed"`` and not compared.
TYPE_MATCH_SHARE = 0.5
#: A reference needs at least this many rows: with one row there is no
#: distribution to compare with, only a value.
MIN_REFERENCE_ROWS = 2
# categorical_threshold that keeps every distinct value of a column as a level
_ALL_LEVELS = 2**31 - 1
# kinds whose labels are comparable with each other
_FAMILY = {"numeric": "number", "integer_categories": "number", "categorical": "text",
           "text": "text", "boolean": "boolean", "datetime": "datetime", "timedelta": "timedelta"}
# share of a text column that must read as numbers to share a numeric reference's bins
_NUMBER_PARSE_SHARE = 0.95


@dataclass(frozen=True)
class SharedAlphabet:
    """One column of both frames on the alphabet they are compared on.

    Attributes
    ----------
    name, kind : str
        The column key and the reference column's kind.
    labels : tuple of str
        The shared symbols (``k`` of them).
    reference_codes, current_codes : numpy.ndarray
        int64, a symbol ``0 .. k-1`` per row, or ``k`` for a row left out (missing
        under ``missing="drop"``).
    edges : numpy.ndarray or None
        The reference's bin edges for a binned column.
    new_share : float
        Share of the current non-missing rows with a value the reference never had
        (levels) or outside the reference's range (bins).
    note : str
        What was done when the column's type differs between the frames, else "".
    compared : bool
        False when the values could not share the reference's alphabet (flag
        ``"type_changed"``).
    reference_flags : tuple of str
        The encoder's flags of the reference column.
    current_new : numpy.ndarray or None
        Per current row, whether its value is one the reference never had (levels)
        or lies outside the reference's range (bins); None when not compared.
    reference_counts, current_counts : numpy.ndarray or None
        The counts per symbol when they were gathered without codes (a source
        read in batches, :mod:`infoscope.sources.drift`); :meth:`counts` reads
        them instead of the codes.
    """

    name: str
    kind: str
    labels: tuple
    reference_codes: np.ndarray
    current_codes: np.ndarray
    edges: np.ndarray | None
    new_share: float
    note: str
    compared: bool
    reference_flags: tuple
    current_new: np.ndarray | None = None
    reference_counts: np.ndarray | None = None
    current_counts: np.ndarray | None = None

    @property
    def k(self) -> int:
        return len(self.labels)

    def counts(self, side: str) -> np.ndarray:
        """Counts per symbol of one side.

        Parameters
        ----------
        side : {"reference", "current"}
            Which frame.

        Returns
        -------
        numpy.ndarray
            int64, length ``k`` (rows left out are not counted).

        Examples
        --------
        >>> import pandas as pd
        >>> al = align_to_reference(pd.Series(list("ab")), pd.Series(list("aab")), "c",
        ...                         (16, "quantile", "drop", 64))
        >>> al.counts("reference").tolist()
        [2, 1]
        """
        if side not in ("reference", "current"):
            raise ValueError(f"side={side!r} is not valid; choose 'reference' or 'current'")
        given = self.reference_counts if side == "reference" else self.current_counts
        if given is not None:
            return np.asarray(given, dtype=np.int64)
        codes = self.reference_codes if side == "reference" else self.current_codes
        return np.bincount(codes, minlength=self.k + 1)[: self.k].astype(np.int64)


def _encode(values: pd.Series, name: str, settings: tuple, **override):
    from infoscope.encode.columns import encode_column

    bins, strategy, missing, max_categories = settings
    kw = {"bins": bins, "strategy": strategy, "missing": missing, "max_categories": max_categories}
    kw.update(override)
    return encode_column(values, name=name, **kw)


def _quiet_encode(values: pd.Series, name: str, settings: tuple, **override):
    # The alphabet helpers re-encode columns the user already heard about; the
    # data-quality warnings of the first encoding are enough.
    # the warnings of this thread are gathered and dropped (collect_warnings touches
    # no process-wide state, unlike warnings.catch_warnings; this runs in the widget's worker)
    with collect_warnings():
        return _encode(values, name, settings, **override)


def _dtype_text(values) -> str:
    return str(getattr(values, "dtype", type(values).__name__))


def _zoned(values) -> bool | None:
    """True for a zoned datetime column, False for a naive one, None for anything else."""
    dtype = getattr(values, "dtype", None)
    if isinstance(dtype, pd.DatetimeTZDtype):
        return True
    if dtype is not None and getattr(dtype, "kind", "") == "M":
        return False
    return None


def _zone_note(name: str, dtypes: str, zone_ref, zone_cur) -> str:
    """The warning (given here) when one side's times are naive and the other's zoned, else ""."""
    if zone_ref is None or zone_cur is None or zone_ref == zone_cur:
        return ""
    note = (f"column {name!r} is {dtypes}: naive and time-zone-aware times cannot be "
            "compared without knowing the zone of the naive ones, so it was not compared "
            "(flag 'type_changed'); localize the naive side (Series.dt.tz_localize) or "
            "drop the zone of the other (Series.dt.tz_convert(None)) to compare it")
    warn_user(note, DataQualityWarning)
    return note


def _codes(values: np.ndarray, k_in: int, mapping: np.ndarray, k_out: int) -> np.ndarray:
    """Re-code ``values`` (0 .. k_in-1, k_in = left out) through ``mapping`` onto 0 .. k_out."""
    lookup = np.append(np.asarray(mapping, dtype=np.int64), k_out)
    return lookup[np.minimum(np.asarray(values, dtype=np.int64), k_in)]


def _not_compared(name, kind, reference_flags, note) -> SharedAlphabet:
    empty = np.zeros(0, dtype=np.int64)
    return SharedAlphabet(name, kind, (), empty, empty, None, math.nan, note, False, reference_flags)


def _outside(current: pd.Series, reference: pd.Series, kind: str):
    """Per current row: outside the reference's range (bool), and which rows have a value.

    Returns ``(outside, present)`` boolean arrays, or ``None`` when the values cannot
    be compared as numbers or times.
    """
    try:
        if kind == "datetime":
            cur = pd.to_datetime(pd.Series(current), utc=True, errors="coerce")
            ref = pd.to_datetime(pd.Series(reference), utc=True, errors="coerce").dropna()
        elif kind == "timedelta":
            cur = pd.to_timedelta(pd.Series(current), errors="coerce")
            ref = pd.to_timedelta(pd.Series(reference), errors="coerce").dropna()
        else:
            cur = pd.to_numeric(pd.Series(current), errors="coerce").astype("float64")
            ref = pd.to_numeric(pd.Series(reference), errors="coerce").astype("float64")
            cur = cur.where(np.isfinite(cur))
            ref = ref[np.isfinite(ref)]
    except (TypeError, ValueError, OverflowError):
        return None
    if ref.empty:
        return None
    present = cur.notna().to_numpy()
    outside = ((cur < ref.min()) | (cur > ref.max())).to_numpy() & present
    return outside, present


def _outside_share(current: pd.Series, reference: pd.Series, kind: str) -> float:
    """Share of the current non-missing values outside the reference's range (binned columns)."""
    found = _outside(current, reference, kind)
    if found is None or not found[1].any():
        return math.nan
    return float(found[0].sum() / found[1].sum())


def align_to_reference(current: pd.Series, reference: pd.Series, name: str, settings: tuple
                       ) -> SharedAlphabet:
    """Both sides of one column on the alphabet they are compared on.

    Parameters
    ----------
    current, reference : pandas.Series
        The column in the frame being checked and in the reference frame (never modified).
    name : str
        Column key (for messages).
    settings : tuple
        ``(bins, strategy, missing, max_categories)`` of the profile for this column.

    Returns
    -------
    SharedAlphabet
        The labels, the codes of both sides, ``new_share``, and whether and how
        the column was compared (see the module docstring for the method).

    Warns
    -----
    DataQualityWarning
        When the column's type differs between the frames: the warning names both
        dtypes and says what was done (compared on printed labels, compared on the
        numbers the text reads as, or not compared: flag ``"type_changed"``).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI on the
       development sample's bands).

    Examples
    --------
    >>> import pandas as pd
    >>> al = align_to_reference(pd.Series(list("abz")), pd.Series(list("aab")), "c",
    ...                         (16, "quantile", "drop", 64))
    >>> al.labels, al.counts("reference").tolist(), al.counts("current").tolist()
    (('a', 'b', 'z'), [2, 1, 0], [1, 1, 1])
    """
    ref = _encode(reference, name, settings)
    flags = tuple(ref.flags)
    dtypes = f"{_dtype_text(reference)} in the reference, {_dtype_text(current)} in this frame"
    note = _zone_note(name, dtypes, _zoned(reference), _zoned(current))
    if note:
        return _not_compared(name, ref.kind, flags, note)
    if ref.edges is not None:
        return _align_bins(current, reference, name, settings, ref, flags, dtypes)
    return _align_levels(current, reference, name, settings, ref, flags, dtypes)


def _align_bins(current, reference, name, settings, ref, flags, dtypes) -> SharedAlphabet:
    from infoscope.encode.columns import MISSING_LABEL

    edges = np.asarray(ref.edges)
    note = ""
    values = current
    try:
        cur = _quiet_encode(values, name, settings, bins=edges)
    except (TypeError, ValueError):
        cur = None
    if (cur is None or cur.edges is None) and ref.kind == "numeric":
        present = pd.Series(current).notna()
        parsed = pd.to_numeric(pd.Series(current), errors="coerce")
        share = float(parsed[present].notna().mean()) if present.any() else 0.0
        if share >= _NUMBER_PARSE_SHARE:
            values = parsed
            cur = _quiet_encode(values, name, settings, bins=edges)
            note = (f"column {name!r} is {dtypes}: compared on the numbers its text reads as "
                    f"({share:.1%} of the non-missing values parsed; the rest count as missing)")
    if cur is None or cur.edges is None:
        note = (f"column {name!r} is {dtypes}: its values cannot be put on the reference's "
                f"{ref.kind} bins, so it was not compared (flag 'type_changed')")
        warn_user(note, DataQualityWarning)
        return _not_compared(name, ref.kind, flags, note)
    if note:
        warn_user(note, DataQualityWarning)
    n_bins = len(edges) - 1
    labels = list(ref.labels)
    if MISSING_LABEL in cur.labels[n_bins:] and MISSING_LABEL not in labels:
        labels.append(MISSING_LABEL)
    k = len(labels)
    ref_codes = _codes(ref.codes, ref.k, np.arange(ref.k), k)
    cur_map = [i if i < n_bins else labels.index(label) for i, label in enumerate(cur.labels)]
    cur_codes = _codes(cur.codes, cur.k, cur_map, k)
    found = _outside(values, reference, ref.kind)
    new_share, new_rows = math.nan, None
    if found is not None:
        new_rows = found[0]
        new_share = float(found[0].sum() / found[1].sum()) if found[1].any() else math.nan
    return SharedAlphabet(name, ref.kind, tuple(labels), ref_codes, cur_codes, edges,
                          new_share, note, True, flags, new_rows)


def _align_levels(current, reference, name, settings, ref, flags, dtypes) -> SharedAlphabet:
    ref_all = _quiet_encode(reference, name, settings, max_categories=None,
                            categorical_threshold=_ALL_LEVELS)
    cur_all = _quiet_encode(current, name, settings, max_categories=None,
                            categorical_threshold=_ALL_LEVELS)
    plan = level_plan(name, ref.kind, ref_all.labels, _level_counts(ref_all), cur_all.kind, cur_all.labels,
                      _level_counts(cur_all), max_categories=settings[3], dtypes=dtypes)
    if not plan.compared:
        return _not_compared(name, ref.kind, flags, plan.note)
    k = len(plan.labels)
    ref_codes = _codes(ref_all.codes, ref_all.k, plan.reference_map, k)
    cur_codes = _codes(cur_all.codes, cur_all.k, plan.current_map, k)
    level_is_new = np.append(plan.current_new, False)
    new_rows = level_is_new[np.minimum(np.asarray(cur_all.codes, dtype=np.int64), cur_all.k)]
    return SharedAlphabet(name, ref.kind, plan.labels, ref_codes, cur_codes, None, plan.new_share,
                          plan.note, True, flags, new_rows)


def _level_counts(encoded) -> np.ndarray:
    return np.bincount(encoded.codes, minlength=encoded.k + 1)[: encoded.k].astype(np.int64)


@dataclass(frozen=True)
class LevelPlan:
    """How the levels of both sides of a column map onto their shared alphabet (:func:`level_plan`).

    Attributes
    ----------
    labels : tuple of str
        The shared symbols.
    reference_map, current_map : numpy.ndarray
        int64: the shared code of each reference / current level.
    current_new : numpy.ndarray
        bool: per current level, whether the reference never had it.
    new_share : float
        Share of the current non-missing rows on a level the reference never had.
    note : str
        What was done when the kinds differ ("" otherwise).
    compared : bool
        False when too few current rows match a reference level (``"type_changed"``).
    """

    labels: tuple
    reference_map: np.ndarray
    current_map: np.ndarray
    current_new: np.ndarray
    new_share: float
    note: str
    compared: bool


def level_plan(name: str, reference_kind: str, reference_labels, reference_counts, current_kind: str,
               current_labels, current_counts, *, max_categories, dtypes: str) -> LevelPlan:
    """The shared alphabet of a column of levels from the level counts of both sides.

    The union of both sides' levels; above ``max_categories`` symbols the levels
    most frequent in the **pooled** counts are kept (ties by label) and the rest
    share ``"(other)"``, so the alphabet does not depend on which side a row is
    on (see the module docstring).  Only counts are read, so the same rule serves
    rows in memory and counts gathered batch by batch.

    Parameters
    ----------
    name : str
        Column key (for messages).
    reference_kind, current_kind : str
        The encoder's kinds of both sides (a different family means a type change).
    reference_labels, current_labels : sequence of str
        Every level of each side (no folding).
    reference_counts, current_counts : array_like of int
        Rows per level, in the order of the labels.
    max_categories : int or None
        Most symbols of the shared alphabet.
    dtypes : str
        Both dtypes, for the type-change message.

    Returns
    -------
    LevelPlan

    Warns
    -----
    DataQualityWarning
        When the kinds differ: compared on the printed values, or not compared.

    Examples
    --------
    >>> plan = level_plan("c", "text", ["a", "b"], [3, 1], "text", ["b", "z"], [2, 2],
    ...                   max_categories=64, dtypes="")
    >>> plan.labels, plan.current_map.tolist(), plan.new_share
    (('a', 'b', 'z'), [1, 2], 0.5)
    """
    from infoscope.encode.columns import MISSING_LABEL, OTHER_LABEL

    union = list(reference_labels)
    index = {label: i for i, label in enumerate(union)}
    for label in current_labels:
        if label not in index:
            index[label] = len(union)
            union.append(label)
    cur_to_union = np.array([index[label] for label in current_labels], dtype=np.int64)
    ref_u = np.zeros(len(union), dtype=np.int64)
    ref_u[: len(reference_labels)] = np.asarray(reference_counts, dtype=np.int64)
    cur_u = np.zeros(len(union), dtype=np.int64)
    np.add.at(cur_u, cur_to_union, np.asarray(current_counts, dtype=np.int64))
    is_missing = np.array([label == MISSING_LABEL for label in union], dtype=bool)  # bool when empty
    seen = (ref_u > 0) & ~is_missing
    present = cur_u[~is_missing].sum()
    new_share = float(cur_u[~seen & ~is_missing].sum() / present) if present else math.nan
    empty = np.zeros(0, dtype=np.int64)

    note = ""
    if _FAMILY.get(current_kind) != _FAMILY.get(reference_kind) and present:
        matched = 1.0 - new_share
        if matched < TYPE_MATCH_SHARE:
            note = (f"column {name!r} is {dtypes} ({reference_kind} against {current_kind}): only "
                    f"{matched:.1%} of this frame's values match a reference level, so it was not "
                    "compared (flag 'type_changed')")
            warn_user(note, DataQualityWarning)
            return LevelPlan((), empty, empty, np.zeros(0, dtype=bool), math.nan, note, False)
        note = (f"column {name!r} is {dtypes} ({reference_kind} against {current_kind}): compared on the "
                f"printed values, on which {matched:.1%} of this frame's rows match a reference level")
        warn_user(note, DataQualityWarning)

    # fold on the pooled counts, so that the alphabet does not depend on the side
    mapping = np.arange(len(union))
    labels = list(union)
    n_missing_symbols = int(is_missing.sum())
    if max_categories is not None and len(union) > max_categories:
        pooled = ref_u + cur_u
        candidates = [i for i in range(len(union)) if not is_missing[i]]
        keep_n = max(max_categories - 1 - n_missing_symbols, 0)
        # ties broken by the label, never by which side a level was first seen on
        kept = set(sorted(candidates, key=lambda i: (-int(pooled[i]), union[i]))[:keep_n])
        order = [i for i in candidates if i in kept]
        labels = [union[i] for i in order] + [OTHER_LABEL]
        new_index = {old: new for new, old in enumerate(order)}
        other = len(order)
        mapping = np.array([new_index.get(i, other) for i in range(len(union))], dtype=np.int64)
        for i in np.flatnonzero(is_missing):
            mapping[i] = len(labels)
            labels.append(MISSING_LABEL)
    current_new = ~seen[cur_to_union] & ~is_missing[cur_to_union]
    return LevelPlan(tuple(labels), np.asarray(mapping[: len(reference_labels)], dtype=np.int64),
                     np.asarray(mapping[cur_to_union], dtype=np.int64), current_new, new_share, note, True)


def check_reference_rows(reference: dict) -> int:
    """The reference's number of rows; an error when it is too small to compare with.

    Parameters
    ----------
    reference : dict of str -> pandas.Series
        The reference's columns.

    Returns
    -------
    int
        Its number of rows.

    Raises
    ------
    ValueError
        When the reference has fewer than :data:`MIN_REFERENCE_ROWS` rows.

    Examples
    --------
    >>> import pandas as pd
    >>> check_reference_rows({"a": pd.Series([1, 2, 3])})
    3
    """
    n_rows = max((len(s) for s in reference.values()), default=0)
    if n_rows < MIN_REFERENCE_ROWS:
        raise ValueError(
            f"the reference has {n_rows} row(s): too small to compare with (a drift check "
            f"needs at least {MIN_REFERENCE_ROWS} rows, and hundreds for a change to be told "
            "from chance)")
    return n_rows


def column_seed(seed, key: str):
    """The seed of one column's permutation splits: the same for a column whatever its position.

    Parameters
    ----------
    seed : int or None
        The session's seed (None: fresh entropy, not reproducible).
    key : str
        The column key.

    Returns
    -------
    numpy.random.SeedSequence or None

    References
    ----------
    .. [1] numpy documentation, ``numpy.random.SeedSequence``.

    Examples
    --------
    >>> column_seed(0, "a").entropy == column_seed(0, "b").entropy
    True
    """
    if seed is None:
        return None
    if isinstance(seed, np.random.Generator):
        seed = int(seed.integers(2**63))
    return np.random.SeedSequence(int(seed), spawn_key=(zlib.crc32(str(key).encode("utf-8")),))


def drift_table(current: dict, reference: dict, *, encoding: dict, pseudocount: float = 0.5,
                base=2, n_perm: int = 999, seed=0, level: float = TEST_LEVEL,
                null: str = "permutation", alphabets_out: dict | None = None) -> list[dict]:
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
    n_perm : int, default=999
        Random splits of the pooled rows per column for the chance level and the
        p-value (smallest p-value ``1 / (n_perm + 1)``).
    seed : int or None, default=0
        Seed of the splits (each column gets its own stream, see :func:`column_seed`).
    level : float, default=0.05
        The q-value below which a change counts as significant in the flag.
    null : {"permutation", "chi2"}, default="permutation"
        How the chance level and the p-value are computed (:data:`NULL_METHODS`).
    alphabets_out : dict, optional
        When given, receives the :class:`SharedAlphabet` of every column by key.

    Returns
    -------
    list of dict
        One dict per column with the keys of ``DRIFT_COLUMNS``.

    Raises
    ------
    ValueError
        When the reference has fewer than :data:`MIN_REFERENCE_ROWS` rows.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley.
    .. [2] Lin, J. (1991). Divergence measures based on the Shannon entropy. IEEE
       Transactions on Information Theory, 37(1), 145-151.
    .. [3] Benjamini, Y., & Hochberg, Y. (1995). Controlling the false discovery
       rate. Journal of the Royal Statistical Society B, 57(1), 289-300.

    Examples
    --------
    >>> import pandas as pd
    >>> rows = drift_table({"c": pd.Series(list("ab") * 50)}, {"c": pd.Series(list("ab") * 50)},
    ...                    encoding={"c": (16, "quantile", "drop", 64)})
    >>> rows[0]["flag"], rows[0]["psi"], rows[0]["p_value"]
    ('stable', 0.0, 1.0)
    """
    from infoscope.estimators._checks import log_base

    from infoscope.estimators._checks import check_choice

    check_choice(null, NULL_METHODS, "null")
    check_reference_rows(reference)
    ln_base = log_base(base)
    rows = []
    for key, values in current.items():
        al = align_to_reference(values, reference[key], key, encoding[key])
        if alphabets_out is not None:
            alphabets_out[key] = al
        rows.append(_drift_row(al, values, reference[key], pseudocount=pseudocount, ln_base=ln_base,
                               n_perm=n_perm, seed=column_seed(seed, key), null=null))
    finish_drift_rows(rows, level=level)
    return rows


def counts_row(al: SharedAlphabet, ref_counts, cur_counts, *, new_share: float, pseudocount: float,
               ln_base: float, n_perm: int, seed, null: str = "permutation", refine: bool = True) -> dict:
    """One drift row from the counts of both sides on a column's shared alphabet.

    ``flag`` is left ``""`` for :func:`finish_drift_rows` (or ``"type_changed"``
    when the column was not compared); the caller sets ``id_like`` / ``time_axis``.

    Parameters
    ----------
    al : SharedAlphabet
        The column (name, kind, labels, whether it was compared).
    ref_counts, cur_counts : numpy.ndarray
        Counts per symbol of the reference and of the current rows.
    new_share : float
        The ``new_share`` to report.
    pseudocount, ln_base, n_perm, seed, null
        As in :func:`drift_table` (``ln_base``: natural log of the unit's base).
    refine : bool, default=True
        Refine a small p-value with more splits (off for columns that drift by
        construction: their p-value is not a finding and stays out of the q-values).

    Returns
    -------
    dict
        The keys of ``DRIFT_COLUMNS``; numbers NaN when a side has no rows.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> al = align_to_reference(pd.Series(list("ab")), pd.Series(list("ab")), "c",
    ...                         (16, "quantile", "drop", 64))
    >>> counts_row(al, np.array([5, 5]), np.array([5, 5]), new_share=0.0, pseudocount=0.5,
    ...            ln_base=1.0, n_perm=99, seed=0)["p_value"]
    1.0
    """
    from infoscope.estimators.two_sample import drift_chi2_test, drift_permutation_test

    row = {"column": al.name, "kind": al.kind, "k": al.k, "n": 0, "n_reference": 0,
           "psi": math.nan, "psi_chance": math.nan, "psi_chance_high": math.nan,
           "kl": math.nan, "kl_chance": math.nan, "js": math.nan, "js_chance": math.nan,
           "p_value": math.nan, "q_value": math.nan, "new_share": new_share,
           "flag": "" if al.compared else "type_changed"}
    if not al.compared:
        return row
    n, n_ref = int(np.sum(cur_counts)), int(np.sum(ref_counts))
    row.update(n=n, n_reference=n_ref)
    if n == 0 or n_ref == 0:
        return row
    if null == "chi2":
        t = drift_chi2_test(ref_counts, cur_counts, pseudocount=pseudocount)
    else:
        t = drift_permutation_test(ref_counts, cur_counts, pseudocount=pseudocount, n_perm=n_perm,
                                   seed=seed, refine=refine)
    row.update(psi=t.psi, psi_chance=t.psi_chance, psi_chance_high=t.psi_chance_high,
               kl=t.kl / ln_base, kl_chance=t.kl_chance / ln_base,
               js=t.js / ln_base, js_chance=t.js_chance / ln_base, p_value=t.p_value)
    return row


def _drift_row(al: SharedAlphabet, current, reference, *, pseudocount, ln_base, n_perm, seed,
               null: str = "permutation") -> dict:
    if not al.compared:
        return counts_row(al, None, None, new_share=al.new_share, pseudocount=pseudocount,
                          ln_base=ln_base, n_perm=n_perm, seed=seed, null=null)
    return flagged_row(al, al.counts("reference"), al.counts("current"), axis_flag(al, current, reference),
                       pseudocount=pseudocount, ln_base=ln_base, n_perm=n_perm, seed=seed, null=null)


def flagged_row(al: SharedAlphabet, ref_counts, cur_counts, axis: str, *, pseudocount, ln_base, n_perm, seed,
                null: str = "permutation") -> dict:
    """:func:`counts_row` of a compared column, with its axis flag and the empty-side warning.

    Parameters
    ----------
    al : SharedAlphabet
        The column (its codes are not read: only ``name``, ``kind``, ``k``, ``compared``).
    ref_counts, cur_counts : numpy.ndarray
        Counts per shared symbol of both sides.
    axis : str
        ``"id_like"``, ``"time_axis"`` or ``""`` (:func:`axis_flag`).
    pseudocount, ln_base, n_perm, seed, null
        As in :func:`counts_row`.

    Returns
    -------
    dict
        The row; ``flag`` is ``axis`` (``""`` until :func:`finish_drift_rows`).

    Warns
    -----
    DataQualityWarning
        When a side has no non-missing values (the numbers are NaN).

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> al = align_to_reference(pd.Series(list("ab")), pd.Series(list("ab")), "c",
    ...                         (16, "quantile", "drop", 64))
    >>> flagged_row(al, np.array([5, 5]), np.array([5, 5]), "", pseudocount=0.5, ln_base=1.0,
    ...             n_perm=99, seed=0)["psi"]
    0.0
    """
    row = counts_row(al, ref_counts, cur_counts, new_share=al.new_share,
                     pseudocount=pseudocount, ln_base=ln_base, n_perm=n_perm, seed=seed, null=null,
                     refine=not axis)
    if row["n"] == 0 or row["n_reference"] == 0:
        side = "this frame" if row["n"] == 0 else "the reference"
        warn_user(f"column {al.name!r} has no non-missing values in {side}: its drift is "
                  "undefined (NaN)", DataQualityWarning)
        return row
    row["flag"] = axis
    return row


def finish_drift_rows(rows: list[dict], *, level: float = TEST_LEVEL) -> None:
    """Fill ``q_value`` (BH over the columns tested) and the size-and-significance flags, in place.

    Columns flagged for what they are (``id_like``, ``time_axis``, ``type_changed``)
    are not hypotheses about a change of distribution and stay out of the
    adjustment (``q_value`` NaN).

    Parameters
    ----------
    rows : list of dict
        Rows of one comparison (one batch against its reference).
    level : float, default=0.05
        The significance level of the flags.

    Returns
    -------
    None

    References
    ----------
    .. [1] Benjamini, Y., & Hochberg, Y. (1995). Journal of the Royal Statistical
       Society B, 57(1), 289-300.

    Examples
    --------
    >>> rows = [{"p_value": 0.01, "psi": 0.3, "psi_chance": 0.01, "flag": ""}]
    >>> finish_drift_rows(rows); rows[0]["flag"], rows[0]["q_value"]
    ('major', 0.01)
    """
    from infoscope.estimators.information import benjamini_hochberg

    tested = [i for i, r in enumerate(rows)
              if r["flag"] == "" and r["p_value"] == r["p_value"]]
    q = benjamini_hochberg(np.array([rows[i]["p_value"] for i in tested], dtype=float))
    for i, qv in zip(tested, q):
        rows[i]["q_value"] = float(qv)
        rows[i]["flag"] = drift_verdict(rows[i]["psi"], rows[i]["psi_chance"], float(qv), level=level)


def axis_flag(al: SharedAlphabet, current: pd.Series, reference: pd.Series) -> str:
    """``"id_like"`` or ``"time_axis"`` when a column drifts by construction, else ``""``.

    An identifier (the encoder's ``id_like`` flag on the reference) has new values
    in every new batch; a datetime column of which at least half of this frame's
    values lie outside the reference's range (:data:`TIME_AXIS_SHARE`) is a time
    axis of another period.  Both show a large PSI that says nothing about a
    change of distribution; the numbers are kept, the flag says why.

    Parameters
    ----------
    al : SharedAlphabet
        The column on its shared alphabet.
    current, reference : pandas.Series
        The column's values in both frames.

    Returns
    -------
    str
        ``"id_like"``, ``"time_axis"`` or ``""``.

    Examples
    --------
    >>> import pandas as pd
    >>> t = pd.Series(pd.date_range("2026-01-01", periods=100, freq="D"))
    >>> al = align_to_reference(t + pd.Timedelta(days=200), t, "t", (16, "quantile", "drop", 64))
    >>> axis_flag(al, t + pd.Timedelta(days=200), t)
    'time_axis'
    """
    if "id_like" in al.reference_flags:
        return "id_like"
    if al.kind != "datetime":
        return ""
    share = al.new_share if al.edges is not None else _outside_share(current, reference, "datetime")
    return "time_axis" if share == share and share >= TIME_AXIS_SHARE else ""
