"""The traits of the profile widgets (what the front end and the user set, what the kernel sends).

Also the mapping between the traits and the settings of a
:class:`~infoscope.frame.session.ProfileSession`, and the choices each control offers.
"""
from __future__ import annotations

from typing import Any

import anywidget
import numpy as np
import traitlets as t

from infoscope import __version__
from infoscope.estimators._checks import unit_name
from infoscope.widgets import _serialize as ser

STRATEGIES = ("quantile", "uniform")
BIN_RULES = ("fd", "scott", "sturges", "doane", "rice", "sqrt", "stone", "auto", "knuth")
ESTIMATORS = ("plugin", "miller_madow", "chao_shen", "james_stein", "dirichlet", "grassberger", "nsb")
MEASURES = ("mi", "nmi", "adjusted_mi", "vi")
UNITS = ("bits", "nats", "hartleys")
_BASES = {"bits": 2, "nats": "nats", "hartleys": 10}
MISSING = ("drop", "category")
ORDERS = ("cluster", "name")
SORTS = ("entropy", "name", "efficiency", "missing_share")


def _row_count(session) -> int | None:
    """Rows of the session's frame (``n_rows`` if the session offers it)."""
    n = getattr(session, "n_rows", None)
    if n is None:  # interim: ProfileSession has no public row count yet (asked of the lead)
        n = getattr(session, "_n_rows", None)
    return int(n) if isinstance(n, (int, np.integer)) else None


#: traits that carry data to the front end (kernel -> view)
_DATA_TRAITS = ("_view", "_entropy", "_grid_meta", "_grid_values", "_grid_n", "_grid_q", "_pair",
                "_relevance", "_meta", "_status")


def _settings_traits():
    return ("bins", "strategy", "estimator", "alpha", "measure", "unit", "target", "missing",
            "column_bins", "order", "min_count")


class ProfileTraits(anywidget.AnyWidget):
    """The synced traits of every infoscope view and their mapping to session settings."""


    # ---- which view the front end draws ------------------------------------------------
    #: str, "profile" | "entropy" | "grid" | "pair" | "relevance": the layout drawn.
    _view = t.Unicode("profile").tag(sync=True)

    # ---- settings (public: the front end and the user set these) -------------------------
    #: int, 16: number of bins of a numeric column (quantile / uniform strategy).
    bins = t.Int(16).tag(sync=True)
    #: str, "quantile": binning strategy; "quantile", "uniform" or a rule name
    #: (fd, scott, sturges, doane, rice, sqrt, stone, auto, knuth) that sets the bin count.
    strategy = t.Unicode("quantile").tag(sync=True)
    #: str, "miller_madow": entropy / MI estimator (see infoscope.ENTROPY_ESTIMATORS).
    estimator = t.Unicode("miller_madow").tag(sync=True)
    #: float, 0.5: Dirichlet pseudocount per cell, used when estimator == "dirichlet".
    alpha = t.Float(0.5).tag(sync=True)
    #: str, "mi": pair measure of the information grid ("mi", "nmi", "adjusted_mi", "vi").
    measure = t.Unicode("mi").tag(sync=True)
    #: str, "bits": unit of every number shown ("bits", "nats" or "hartleys").
    unit = t.Unicode("bits").tag(sync=True)
    #: str or None, None: target column of the relevance view.
    target = t.Unicode(None, allow_none=True).tag(sync=True)
    #: str, "drop": missing policy ("drop" = pairwise complete, "category" = own symbol).
    missing = t.Unicode("drop").tag(sync=True)
    #: str or None, None: the column picked in the entropy bars (per-column bins apply to it).
    selected_column = t.Unicode(None, allow_none=True).tag(sync=True)
    #: dict name -> int, {}: per-column bin counts that override ``bins``.
    column_bins = t.Dict({}).tag(sync=True)
    #: list [a, b] or None, None: the pair shown in the pair view.
    selected_pair = t.List(None, allow_none=True).tag(sync=True)
    #: int, 0: pair-view cells with 1 .. min_count-1 rows are hidden (0 or 1 hides nothing).
    min_count = t.Int(0).tag(sync=True)
    #: float, 0.05: false discovery rate; grid cells with BH q >= alpha_fdr are muted.
    alpha_fdr = t.Float(0.05).tag(sync=True)
    #: str, "cluster": row/column order of the information grid ("cluster" or "name").
    order = t.Unicode("cluster").tag(sync=True)
    #: str, "entropy": sort key of the entropy bars (entropy, name, efficiency, missing_share).
    sort_by = t.Unicode("entropy").tag(sync=True)

    # ---- data for the front end (kernel -> view) -----------------------------------------
    #: str (JSON): entropy rows, see ``_serialize.entropy_json``.
    _entropy = t.Unicode("").tag(sync=True)
    #: dict: names (grid order), measure, unit, order, alpha, size, generation.
    _grid_meta = t.Dict({}).tag(sync=True)
    #: bytes: float32 row-major size x size values of the grid.
    _grid_values = t.Bytes(b"").tag(sync=True)
    #: bytes: int32 pairwise-complete row counts of the grid.
    _grid_n = t.Bytes(b"").tag(sync=True)
    #: bytes: float32 Benjamini-Hochberg q-values of the grid (NaN on the diagonal).
    _grid_q = t.Bytes(b"").tag(sync=True)
    #: dict: the selected pair's view, see ``_serialize.pair_view`` ({} when none).
    _pair = t.Dict({}).tag(sync=True)
    #: str (JSON): relevance rows about ``target``, see ``_serialize.relevance_json``.
    _relevance = t.Unicode("").tag(sync=True)
    #: dict: names, kinds, n_rows, sampled, choices of every control, version.
    _meta = t.Dict({}).tag(sync=True)
    #: dict: {state: "idle"|"computing"|"error", message, generation, progress, notes}.
    _status = t.Dict({"state": "idle", "message": "", "generation": 0, "progress": None,
                      "notes": []}).tag(sync=True)

    #: which data this view needs (entropy, grid, pair, relevance)
    _parts = ("entropy", "grid", "pair", "relevance")

    # ------------------------------------------------------------------ settings mapping
    @staticmethod
    def _settings_from_session(session) -> dict:
        s = dict(session.settings)
        out: dict[str, Any] = {}
        bins, strategy = s.get("bins", 16), s.get("strategy", "quantile")
        if isinstance(bins, str):
            out["strategy"] = bins
        else:
            out["bins"] = int(bins)
            out["strategy"] = str(strategy)
        for key in ("estimator", "measure", "missing", "target"):
            if s.get(key) is not None:
                out[key] = s[key]
        if s.get("alpha") is not None:
            out["alpha"] = float(s["alpha"])
        out["unit"] = unit_name(s.get("base", 2))
        return out

    def _session_settings(self) -> dict:
        """The traits as ``ProfileSession.update`` keywords."""
        if self.strategy in BIN_RULES:
            bins, strategy = self.strategy, "uniform"
        else:
            bins, strategy = int(self.bins), self.strategy
        return {
            "bins": bins, "strategy": strategy, "estimator": self.estimator,
            "alpha": float(self.alpha) if self.estimator == "dirichlet" else None,
            "base": _BASES.get(self.unit, 2), "missing": self.missing,
            "target": self.target, "measure": self.measure, "sample": self._sample,
        }

    def _check_settings(self) -> None:
        checks = (("strategy", self.strategy, STRATEGIES + BIN_RULES), ("estimator", self.estimator, ESTIMATORS),
                  ("measure", self.measure, MEASURES), ("unit", self.unit, UNITS),
                  ("missing", self.missing, MISSING), ("order", self.order, ORDERS))
        for name, value, valid in checks:
            if value not in valid:
                raise ValueError(f"{name} must be one of {', '.join(valid)}; got {value!r}")
        if self.bins < 2:
            raise ValueError(f"bins must be at least 2, got {self.bins}")
        if self.estimator == "dirichlet" and not self.alpha > 0:
            raise ValueError(f"alpha (the Dirichlet pseudocount) must be > 0, got {self.alpha}")
        names = set(self._session.names)
        if self.target is not None and self.target not in names:
            raise ValueError(f"target {self.target!r} is not a column of this profile")
        for name, b in self.column_bins.items():
            if name not in names:
                raise ValueError(f"column_bins names {name!r}, which is not a column of this profile")
            if b is not None and (isinstance(b, bool) or not isinstance(b, int) or b < 2):
                raise ValueError(f"column_bins[{name!r}] must be a whole number >= 2 or None, got {b!r}")
        if self.min_count < 0:
            raise ValueError(f"min_count must be >= 0, got {self.min_count}")

    def _set_meta(self) -> None:
        s = self._session
        names = [str(x) for x in s.names]
        self._meta = {
            "names": names,
            "n_rows": _row_count(s),
            "sampled": ser.scalar(getattr(s, "sampled", None)),
            "choices": {"strategy": list(STRATEGIES + BIN_RULES), "estimator": list(ESTIMATORS),
                        "measure": list(MEASURES), "unit": list(UNITS), "missing": list(MISSING),
                        "order": list(ORDERS), "sort_by": list(SORTS)},
            "bin_rules": list(BIN_RULES),
            "version": __version__,
        }
