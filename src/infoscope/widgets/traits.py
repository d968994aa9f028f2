"""The traits of the profile widgets (what the front end and the user set, what the kernel sends).

Also the mapping between the traits and the settings of a
:class:`~infoscope.frame.session.ProfileSession`, and the choices each control offers.
"""
from __future__ import annotations

import anywidget
import numpy as np
import traitlets as t

from infoscope.views.choices import check_view_settings, meta, session_settings, view_settings_from_session
from infoscope.views.payload import DATA_TRAITS, SETTINGS_TRAITS

def _row_count(session) -> int | None:
    """Rows of the session's frame (``n_rows`` if the session offers it)."""
    n = getattr(session, "n_rows", None)
    if n is None:  # interim: ProfileSession has no public row count yet (asked of the lead)
        n = getattr(session, "_n_rows", None)
    return int(n) if isinstance(n, (int, np.integer)) else None


#: traits that carry data to the front end (kernel -> view)
_DATA_TRAITS = DATA_TRAITS


def _settings_traits():
    return SETTINGS_TRAITS


class ProfileTraits(anywidget.AnyWidget):
    """The synced traits of every infoscope view and their mapping to session settings."""


    # ---- which view the front end draws ------------------------------------------------
    #: str, "profile" | "entropy" | "grid" | "pair" | "relevance": the layout drawn.
    _view = t.Unicode("profile").tag(sync=True)

    # ---- settings (public: the front end and the user set these) -------------------------
    #: int, 16: number of bins of a numeric column (quantile / uniform strategy).
    bins = t.Int(16).tag(sync=True)
    #: str, "quantile": binning strategy; "quantile", "uniform" or a bin-count rule name
    #: (the one list: ``infoscope.frame.settings.CHOICES["bin_rule"]``).
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
    #: str, "mrmr": criterion of the selection view ("mrmr", "jmi", "cmim"; see ``select()``).
    selection_method = t.Unicode("mrmr").tag(sync=True)
    #: int or None, None: steps of the selection view (None: stop when the next gain is not significant).
    selection_k = t.Int(None, allow_none=True).tag(sync=True)
    #: str, "tree": row model of the surprising-rows view ("tree" or "independent").
    surprise_model = t.Unicode("tree").tag(sync=True)
    #: int, 20: rows listed by the surprising-rows view.
    surprise_n = t.Int(20).tag(sync=True)

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
    #: bytes: uint8 reliability of each grid cell, an index into
    #: ``_grid_meta["reliability_states"]`` (["ok", "sparse", "too_few"]); 255 on the diagonal.
    _grid_reliability = t.Bytes(b"").tag(sync=True)
    #: dict: the selected pair's view, see ``_serialize.pair_view`` ({} when none).
    _pair = t.Dict({}).tag(sync=True)
    #: str (JSON): relevance rows about ``target``, see ``_serialize.relevance_json``.
    _relevance = t.Unicode("").tag(sync=True)
    #: str (JSON): the selection steps for ``target``, see ``views.serialize.selection_json``.
    _selection = t.Unicode("").tag(sync=True)
    #: str (JSON): the surprising rows and the tree, see ``views.serialize.surprising_json``.
    _surprising = t.Unicode("").tag(sync=True)
    #: JSON text: the drift record (``infoscope-drift``, docs/drift-json.md) of this frame against
    #: the widget's ``reference`` frame; "" without a reference (the drift view then stays hidden)
    _drift = t.Unicode("").tag(sync=True)
    #: JSON text: drift over time (``views.serialize.drift_over_record``: one cell per column and
    #: period of ``session.drift_over``) when the widget has ``drift_over=``; "" without it
    _drift_over = t.Unicode("").tag(sync=True)
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
        return view_settings_from_session(session.settings, int(session.sampled or session.n_rows))

    def _view_values(self) -> dict:
        """The control values (settings and view traits) as a plain dict."""
        return {name: getattr(self, name) for name in SETTINGS_TRAITS
                + ("selected_column", "selected_pair", "alpha_fdr", "sort_by")}

    def _session_settings(self) -> dict:
        """The traits as ``ProfileSession.update`` keywords."""
        return session_settings(self._view_values(), sample=self._sample,
                                rows_bins=getattr(self, "_rows_bins", None))

    def _check_settings(self) -> None:
        # only what no session method checks: the estimator, measure, strategy, bin
        # rule, bins and alpha are refused by ProfileSession.update with its own message
        check_view_settings(self._view_values(), self._session.names)

    def _set_meta(self) -> None:
        self._meta = meta(self._session, n_rows=_row_count(self._session))
