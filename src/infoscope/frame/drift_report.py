"""One drift check as a record: the tables, the per-bin detail, and a JSON form with a versioned schema.

:class:`DriftReport` is what ``df.info_profile.drift_report(reference)`` and the
command ``infoscope drift REFERENCE CURRENT`` produce; ``to_dict()`` / ``to_json()``
give the same record the command writes with ``--json``.  The schema
(``"schema": "infoscope-drift"``, ``"version": 1``) is documented field by field in
``docs/drift-json.md``; column names and units are stable within a version.
"""
from __future__ import annotations

import json
import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from infoscope.frame.results import DRIFT_FLAGS, TEST_LEVEL

__all__ = ["FAIL_LEVELS", "SCHEMA", "SCHEMA_VERSION", "DriftReport", "bin_rows", "suppress_bins"]

SCHEMA = "infoscope-drift"
SCHEMA_VERSION = 1
#: ``--fail-on`` choices, each with the flags that reach it.
FAIL_LEVELS = {"major": ("major",), "moderate": ("moderate", "major")}


def bin_rows(labels, reference_counts, current_counts, *, pseudocount: float = 0.5) -> list[dict]:
    """Per symbol: both counts, both smoothed shares and the symbol's share of PSI (nats).

    Parameters
    ----------
    labels : sequence of str
        The shared alphabet.
    reference_counts, current_counts : array_like
        Counts per symbol.
    pseudocount : float, default=0.5
        As in the drift table; the contributions then sum to its PSI.

    Returns
    -------
    list of dict
        ``{"label", "reference", "current", "reference_share", "current_share",
        "contribution"}``, where ``contribution`` is :math:`(a_i - e_i)\\ln(a_i/e_i)`
        of the smoothed shares (>= 0; PSI is their sum).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI as a sum over bands).

    Examples
    --------
    >>> rows = bin_rows(["a", "b"], [50, 50], [80, 20])
    >>> round(sum(r["contribution"] for r in rows), 4)
    0.4063
    """
    r = np.asarray(reference_counts, dtype=np.float64)
    c = np.asarray(current_counts, dtype=np.float64)
    if r.sum() == 0 or c.sum() == 0:
        return [{"label": str(lab), "reference": int(a), "current": int(b), "reference_share": None,
                 "current_share": None, "contribution": None} for lab, a, b in zip(labels, r, c)]
    e = (r + pseudocount) / (r.sum() + pseudocount * r.size)
    a = (c + pseudocount) / (c.sum() + pseudocount * c.size)
    with np.errstate(divide="ignore", invalid="ignore"):
        contribution = np.where((a > 0) & (e > 0), (a - e) * np.log(a / e), np.inf)
    return [{"label": str(lab), "reference": int(x), "current": int(y), "reference_share": float(es),
             "current_share": float(cs), "contribution": float(max(v, 0.0))}
            for lab, x, y, es, cs, v in zip(labels, r, c, e, a, contribution)]


def suppress_bins(bins: list[dict], min_count: int) -> list[dict]:
    """Hide small counts of one column's bins (and the cells that would give them back).

    A count ``1 .. min_count - 1`` on either side is hidden (``None``) with its
    share and the symbol's contribution to PSI; when a side has exactly one hidden
    cell, its next smallest non-zero count is hidden too, so that the total (the
    column's ``n``) cannot give the small one back (common practice in official
    statistics: primary and complementary suppression).

    Parameters
    ----------
    bins : list of dict
        Rows of :func:`bin_rows`.
    min_count : int
        Smallest count shown.

    Returns
    -------
    list of dict
        New rows; each gains ``"hidden"``: ``None``, ``"small"`` or ``"complement"``.

    References
    ----------
    .. [1] Hundepool, A. et al. (2012). Statistical Disclosure Control. Wiley, ch. 4
       (cell suppression in tables).

    Examples
    --------
    >>> rows = suppress_bins(bin_rows(["a", "b", "c"], [50, 40, 30], [3, 40, 30]), 5)
    >>> [(r["current"], r["hidden"]) for r in rows]
    [(None, 'small'), (40, None), (None, 'complement')]
    """
    out = [dict(b, hidden=None) for b in bins]
    for side in ("reference", "current"):
        small = [i for i, b in enumerate(out) if 0 < (b[side] or 0) < min_count]
        if len(small) == 1:
            others = [i for i, b in enumerate(out) if i not in small and (b[side] or 0) > 0]
            if others:
                small.append(min(others, key=lambda i: (out[i][side], i)))
                out[small[-1]]["hidden"] = "complement"
        for i in small:
            out[i]["hidden"] = out[i]["hidden"] or "small"
            out[i][side] = None
            out[i][f"{side}_share"] = None
            out[i]["contribution"] = None
    return out


def _plain(value):
    """A JSON-safe value: NaN/inf -> None, numpy -> Python, timestamps -> ISO text."""
    if value is None or isinstance(value, (bool, str)):
        return value
    if isinstance(value, (np.bool_,)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        v = float(value)
        return v if math.isfinite(v) else None
    if isinstance(value, (pd.Timestamp,)):
        return None if pd.isna(value) else value.isoformat()
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if value is pd.NaT or (not isinstance(value, (list, dict)) and pd.isna(value)):
        return None
    return str(value)


def _records(table: pd.DataFrame | None) -> list[dict] | None:
    if table is None:
        return None
    return [{k: _plain(v) for k, v in row.items()} for row in table.to_dict(orient="records")]


@dataclass
class DriftReport:
    """One drift check of a frame against a reference, ready for people and for pipelines.

    Attributes
    ----------
    columns : pandas.DataFrame
        The drift table (``ProfileSession.drift``).
    pairs : pandas.DataFrame or None
        The relationship drift table (``ProfileSession.pair_drift``), when asked for.
    bins : dict
        Per compared column: the rows of :func:`bin_rows` (both distributions on
        the shared alphabet and each symbol's share of PSI).
    missing_columns, extra_columns : list of str
        Columns only in the reference / only in the current frame.
    notes : list of str
        The warnings the check gave (type changes, empty columns, ...).
    settings : dict
        The settings of the check (encoding, pseudocount, n_perm, null, seed, level).
    reference_rows, current_rows : int
        Number of rows of each frame.
    reference_name, current_name : str
        What the frames are (file names on the command line).
    units : dict
        The unit of every number column.
    """

    columns: pd.DataFrame
    pairs: pd.DataFrame | None = None
    bins: dict = field(default_factory=dict)
    missing_columns: list = field(default_factory=list)
    extra_columns: list = field(default_factory=list)
    notes: list = field(default_factory=list)
    settings: dict = field(default_factory=dict)
    reference_rows: int = 0
    current_rows: int = 0
    reference_name: str = "reference"
    current_name: str = "current"
    units: dict = field(default_factory=dict)

    def reaching(self, level: str) -> list[str]:
        """The columns whose flag reaches ``level``.

        Parameters
        ----------
        level : {"major", "moderate"}
            ``"moderate"`` counts moderate and major columns.

        Returns
        -------
        list of str
            Column keys, in table order.

        Examples
        --------
        >>> r = DriftReport(pd.DataFrame({"column": ["a", "b"], "flag": ["moderate", "stable"]}))
        >>> r.reaching("moderate"), r.reaching("major")
        (['a'], [])
        """
        if level not in FAIL_LEVELS:
            raise ValueError(f"level={level!r} is not valid; choose one of: 'major', 'moderate'")
        hit = self.columns["flag"].isin(FAIL_LEVELS[level])
        return self.columns.loc[hit, "column"].astype(str).tolist()

    @property
    def worst(self) -> str:
        """``"major"``, ``"moderate"`` or ``"stable"``: the strongest change flagged."""
        flags = set(self.columns["flag"])
        return "major" if "major" in flags else "moderate" if "moderate" in flags else "stable"

    def to_dict(self, *, min_count: int | None = None) -> dict:
        """The record as plain Python (the JSON schema ``infoscope-drift`` version 1).

        Parameters
        ----------
        min_count : int, optional
            Hide per-symbol counts below this in ``bins`` (:func:`suppress_bins`);
            the record says so in ``settings["min_count"]``.

        Returns
        -------
        dict
            See ``docs/drift-json.md``; NaN is ``None``.

        Examples
        --------
        >>> r = DriftReport(pd.DataFrame({"column": ["a"], "flag": ["stable"]}))
        >>> d = r.to_dict(); d["schema"], d["version"], d["summary"]["worst"]
        ('infoscope-drift', 1, 'stable')
        """
        from infoscope._version import __version__

        columns = _records(self.columns) or []
        for row in columns:
            bins = self.bins.get(row["column"])
            if bins is not None and min_count:
                bins = suppress_bins(bins, int(min_count))
            row["bins"] = bins
        by_flag = {flag: self.columns.loc[self.columns["flag"] == flag, "column"].astype(str).tolist()
                   for flag in DRIFT_FLAGS}
        return {
            "schema": SCHEMA,
            "version": SCHEMA_VERSION,
            "infoscope_version": __version__,
            "reference": {"name": self.reference_name, "rows": int(self.reference_rows)},
            "current": {"name": self.current_name, "rows": int(self.current_rows)},
            "settings": _plain({**self.settings, "min_count": min_count}),
            "units": dict(self.units),
            "level": float(self.settings.get("level", TEST_LEVEL)),
            "flags": dict(DRIFT_FLAGS),
            "summary": {"worst": self.worst, "by_flag": by_flag,
                        "missing_columns": list(self.missing_columns),
                        "extra_columns": list(self.extra_columns)},
            "columns": columns,
            "pairs": _records(self.pairs),
            "notes": list(self.notes),
        }

    def to_json(self, *, indent: int | None = 2, min_count: int | None = None) -> str:
        """The record as JSON text (strict JSON: no NaN, no Infinity).

        Parameters
        ----------
        indent : int or None, default=2
            Indentation (None: one line).
        min_count : int, optional
            As in :meth:`to_dict`.

        Returns
        -------
        str

        References
        ----------
        .. [1] Bray, T. (2017). The JavaScript Object Notation (JSON) Data
           Interchange Format. RFC 8259.

        Examples
        --------
        >>> DriftReport(pd.DataFrame({"column": ["a"], "flag": ["stable"]})).to_json(indent=None)[:40]
        '{"schema": "infoscope-drift", "version":'
        """
        return json.dumps(self.to_dict(min_count=min_count), indent=indent, allow_nan=False,
                          ensure_ascii=False)
