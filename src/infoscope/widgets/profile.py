"""The live profile: anywidget classes that hold traits and call ``ProfileSession``.

Protocol (front end <-> kernel)
-------------------------------
The front end (``static/profile.js``) sets the *public* traits (the settings) and
calls ``save_changes``. The kernel answers by filling the ``_``-prefixed data traits.
Every settings change gets a new *generation* number; recomputes are debounced
(``debounce`` seconds, 0.15 by default; leading edge: a change while nothing is
pending starts at once, the changes made while it runs collapse into one trailing
recompute),
run on one worker thread (the kernel's
message thread stays free), report progress in ``_status`` and are applied with
``hold_sync`` so a view never shows half an update. A result whose generation is
older than the newest request is dropped: a late answer for an old setting never
replaces a newer one. The front end may send ``{"type": "cancel"}``: the running
recompute stops at its next step and the controls go back to the settings shown.
Errors go to ``_status`` (state ``"error"``, with the message) and to the
``infoscope.widgets`` logger; they are never swallowed.
"""
from __future__ import annotations

import base64
import copy
import logging
import threading
import time
import uuid
import warnings
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path
from typing import Any

import anywidget
import numpy as np
import pandas as pd
import traitlets as t

from infoscope.widgets import _serialize as ser

log = logging.getLogger("infoscope.widgets")

_STATIC = Path(__file__).with_name("static")

STRATEGIES = ("quantile", "uniform")
BIN_RULES = ("fd", "scott", "sturges", "doane", "rice", "sqrt", "stone", "auto", "knuth")
ESTIMATORS = ("plugin", "miller_madow", "chao_shen", "james_stein", "dirichlet", "grassberger", "nsb")
MEASURES = ("mi", "nmi", "adjusted_mi", "vi")
UNITS = ("bits", "nats", "hartleys")
_BASES = {"bits": 2, "nats": "nats", "hartleys": 10}
MISSING = ("drop", "category")
ORDERS = ("cluster", "name")
SORTS = ("entropy", "name", "efficiency", "missing_share")

#: Frames longer than this get a first view from a seeded sample of this many rows.
PREVIEW_ROWS = 200_000

#: Seconds a recompute runs before it reports progress steps in ``_status``.
PROGRESS_AFTER = 0.25

#: Pair views precomputed into ``payload()`` for an offline export.
PAYLOAD_TOP_PAIRS = 12


def _row_count(session) -> int | None:
    """Rows of the session's frame (``n_rows`` if the session offers it)."""
    n = getattr(session, "n_rows", None)
    if n is None:  # interim: ProfileSession has no public row count yet (asked of the lead)
        n = getattr(session, "_n_rows", None)
    return int(n) if isinstance(n, (int, np.integer)) else None


class Cancelled(Exception):
    """A recompute was cancelled from the front end or superseded by a newer one."""


#: traits that carry data to the front end (kernel -> view)
_DATA_TRAITS = ("_view", "_entropy", "_grid_meta", "_grid_values", "_grid_n", "_grid_q", "_pair",
                "_relevance", "_meta", "_status")


def _settings_traits():
    return ("bins", "strategy", "estimator", "alpha", "measure", "unit", "target", "missing",
            "column_bins", "order", "min_count")


class _ProfileBase(anywidget.AnyWidget):
    """Traits and recompute machinery shared by every infoscope view."""

    _esm = _STATIC / "profile.js"

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

    def __init__(self, session, *, debounce: float = 0.15, threaded: bool = True,
                 live_picture: bool = True, preview_rows: int | None = PREVIEW_ROWS,
                 picture_delay: float = 2.0, **kwargs):
        if not all(hasattr(session, m) for m in ("update", "entropy", "pairs", "names", "settings")):
            raise TypeError("the profile widgets need an infoscope ProfileSession "
                            f"(infoscope.frame.session), got {type(session).__name__}")
        if debounce < 0:
            raise ValueError(f"debounce must be >= 0 seconds, got {debounce}")
        if preview_rows is not None and (isinstance(preview_rows, bool) or not isinstance(preview_rows, int)
                                         or preview_rows < 100):
            raise ValueError(f"preview_rows must be None or a number of rows >= 100, got {preview_rows!r}")
        # Large frames: the first view comes from a seeded sample (labelled as such),
        # then the full data follow on the worker thread. The user's own `sample`
        # setting, if any, is what the full view uses.
        self._user_sample = session.settings.get("sample")
        n_rows = _row_count(session)
        self._preview = (preview_rows is not None and self._user_sample is None
                         and n_rows is not None and n_rows > preview_rows)
        self._sample = preview_rows if self._preview else self._user_sample
        self._session = session
        self._debounce = float(debounce)
        self._threaded = bool(threaded)
        self._live_picture = bool(live_picture)
        # Refreshing the picture re-sends the whole output (the live view re-renders),
        # so it waits until the controls have been still for picture_delay seconds.
        self._picture_delay = float(picture_delay)
        self._picture_timer: threading.Timer | None = None
        self._lock = threading.RLock()          # guards generation bookkeeping
        self._session_lock = threading.Lock()   # the session is not thread-safe
        self._idle = threading.Condition(self._lock)
        self._requested = 0                     # newest generation asked for
        self._applied = 0                       # generation on screen
        self._outstanding = 0                   # requests not yet finished
        self._timer: threading.Timer | None = None
        self._timer_gen: int | None = None
        self._run_started = 0.0                 # monotonic start of the running recompute
        self._cancel = threading.Event()
        self._shown_settings: dict = {}
        self._reverting = False
        self._pending_parts: set[str] = set()
        self._sent_column_bins: dict = {}
        self._top: list = []
        self._tables: dict = {}
        self._executor = ThreadPoolExecutor(max_workers=1, thread_name_prefix="infoscope-widget") \
            if self._threaded else None
        self._display_id = f"infoscope-{uuid.uuid4().hex}"
        self._displayed = False
        start = self._settings_from_session(session)
        start.update({k: v for k, v in kwargs.items() if k in _settings_traits()})
        super().__init__(**start, **{k: v for k, v in kwargs.items() if k not in start})
        self.observe(self._on_setting, names=list(_settings_traits()))
        self.observe(self._on_pair, names=["selected_pair"])
        self.on_msg(self._on_custom)
        self._set_meta()
        # first view: computed now, in the caller's thread, so that a widget shown right
        # after construction is never empty (errors still land in _status)
        self._request(set(self._parts), immediate=True, first=True)
        if self._preview:
            self._sample = self._user_sample
            self._preview = False
            self._request(set(self._parts))
            self._status = {**self._status, "message": "First view from a seeded sample; computing the full data..."}

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
        from infoscope.estimators._checks import unit_name
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
        from infoscope import __version__
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

    # ------------------------------------------------------------------ observers
    def _on_setting(self, change) -> None:
        if self._reverting:
            return
        name = change["name"]
        if name == "alpha" and self.estimator != "dirichlet":
            return  # the pseudocount only matters to the Dirichlet estimator
        parts = set(self._parts)
        if name == "min_count":
            parts = {"pair"} & parts
        elif name == "order":
            parts = {"grid"} & parts
        elif name == "target":
            parts = {"relevance"} & parts
        elif name == "measure":
            parts = {"grid"} & parts
        self._request(parts)

    def _on_pair(self, change) -> None:
        if not self._reverting and "pair" in self._parts:
            self._request({"pair"})

    def _on_custom(self, _widget, content, _buffers) -> None:
        if isinstance(content, dict) and content.get("type") == "cancel":
            self.cancel()

    # ------------------------------------------------------------------ requests
    def _request(self, parts: set[str], *, immediate: bool = False, first: bool = False) -> int:
        """Ask for a recompute of ``parts``; returns its generation number.

        Each request counts once in ``_outstanding`` until it has run (or was
        superseded while it waited in the debounce timer, which releases its count).
        """
        with self._lock:
            # Leading edge: a change while nothing is pending (no timer waiting, no
            # recompute queued or running) starts at once; the changes that follow it
            # while it runs collapse into one trailing recompute after `debounce`.
            quiet = self._timer is None and self._outstanding == 0
            self._requested += 1
            gen = self._requested
            self._pending_parts |= parts
            self._drop_timer()
            self._outstanding += 1
            self._cancel.clear()
            deferred = self._threaded and not immediate and self._debounce > 0 and not quiet
            if deferred:
                self._timer = threading.Timer(self._debounce, self._submit, args=(gen,))
                self._timer_gen = gen
                self._timer.daemon = True
                self._timer.start()
        self._status = {"state": "computing", "message": "Recomputing...", "generation": gen,
                        "progress": 0.0, "notes": []}
        if immediate or not self._threaded:
            self._run(gen)
        elif not deferred:
            self._submit(gen, from_timer=False)
        return gen

    def _drop_timer(self) -> bool:
        """Cancel a waiting debounce timer (lock held); True if one was waiting."""
        if self._timer is None:
            return False
        self._timer.cancel()
        self._timer = None
        self._timer_gen = None
        self._outstanding -= 1
        self._idle.notify_all()
        return True

    def _submit(self, gen: int, from_timer: bool = True) -> None:
        with self._lock:
            if from_timer:
                if self._timer_gen != gen:
                    return  # superseded while waiting: its count was released then
                self._timer = None
                self._timer_gen = None
        try:
            self._executor.submit(self._run, gen)
        except RuntimeError:  # the widget was closed
            with self._idle:
                self._outstanding -= 1
                self._idle.notify_all()

    def _run(self, gen: int) -> None:
        try:
            with self._lock:
                if gen != self._requested:
                    return  # superseded before it started
                parts = set(self._pending_parts)
                self._pending_parts = set()
                snapshot = self._snapshot()
                self._run_started = time.monotonic()
            try:
                result, notes = self._compute(gen, parts, snapshot)
            except Cancelled:
                with self._lock:
                    latest = gen == self._requested
                    if latest:
                        # a cancel (not a newer request): controls return to what is shown
                        self._pending_parts |= parts
                if latest:
                    self._revert()
                    self._status = {"state": "idle", "generation": self._applied, "progress": None,
                                    "message": "Cancelled: the view shows the last finished settings.",
                                    "notes": []}
                return
            except Exception as exc:  # shown in the view, logged, never swallowed
                log.exception("infoscope profile: recompute %d failed", gen)
                with self._lock:
                    latest = gen == self._requested
                    if latest:
                        self._pending_parts |= parts
                if latest:
                    self._status = {"state": "error", "generation": gen, "progress": None,
                                    "message": f"{type(exc).__name__}: {exc}", "notes": []}
                return
            self._apply(gen, result, notes, snapshot)
        finally:
            with self._idle:
                self._outstanding -= 1
                self._idle.notify_all()

    def _snapshot(self) -> dict:
        return {
            "session": self._session_settings(), "column_bins": dict(self.column_bins),
            "selected_pair": list(self.selected_pair) if self.selected_pair else None,
            "min_count": int(self.min_count), "order": self.order, "alpha_fdr": float(self.alpha_fdr),
            "traits": {k: copy.deepcopy(getattr(self, k)) for k in _settings_traits()},
        }

    def _step(self, gen: int, progress: float, message: str) -> None:
        if self._cancel.is_set() or gen != self._requested:
            raise Cancelled()
        # A quick recompute sends no progress lines (each is one more comm message
        # and one more redraw before the numbers arrive); a slow one reports them.
        if time.monotonic() - self._run_started >= PROGRESS_AFTER:
            self._status = {"state": "computing", "message": message, "generation": gen,
                            "progress": progress, "notes": []}

    def _compute(self, gen: int, parts: set[str], snap: dict):
        """Call the session for ``parts``; returns the trait values to set."""
        self._check_settings()
        out: dict[str, Any] = {}
        s = self._session
        with self._session_lock, warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            self._step(gen, 0.05, "Encoding columns...")
            s.update(**snap["session"])
            for name in set(self._sent_column_bins) | set(snap["column_bins"]):
                want = snap["column_bins"].get(name)
                if self._sent_column_bins.get(name) != want:
                    s.set_column_bins(name, want)
                    if want is None:
                        self._sent_column_bins.pop(name, None)
                    else:
                        self._sent_column_bins[name] = want
            unit = snap["traits"]["unit"]
            tables: dict[str, Any] = {}
            if "entropy" in parts:
                self._step(gen, 0.15, "Entropy of each column...")
                tables["entropy"] = s.entropy()
                out["_entropy"] = ser.entropy_json(tables["entropy"], generation=gen)
            if "grid" in parts:
                self._step(gen, 0.35, "Counting all pairs...")
                pairs = s.pairs(measure=snap["session"]["measure"])
                self._step(gen, 0.6, "Ordering the grid...")
                matrix = s.matrix(measure=snap["session"]["measure"], order=snap["order"])
                tables["matrix"] = matrix
                diag = pd.Series(np.diag(matrix.to_numpy(dtype=float)), index=matrix.index)
                grid = ser.grid_buffers(pairs, [str(x) for x in matrix.index], alpha=snap["alpha_fdr"],
                                        diagonal=diag, generation=gen, order_name=snap["order"])
                out["_grid_meta"] = grid["meta"]
                out["_grid_values"], out["_grid_n"], out["_grid_q"] = grid["values"], grid["n"], grid["q"]
                out["_top_pairs"] = self._top_pairs(pairs, snap["alpha_fdr"])
            if "relevance" in parts:
                self._step(gen, 0.75, "Relevance to the target...")
                target = snap["session"]["target"]
                table = s.relevance(target=target) if target is not None else None
                tables["relevance"] = table
                out["_relevance"] = ser.relevance_json(table, target, generation=gen)
            if "pair" in parts:
                pair = snap["selected_pair"]
                if pair is None and "_top_pairs" in out and out["_top_pairs"]:
                    pair = list(out["_top_pairs"][0])
                    out["selected_pair"] = pair
                if pair is not None:
                    self._step(gen, 0.9, "Joint table of the pair...")
                    out["_pair"] = self._pair_view(pair[0], pair[1], unit, snap["min_count"], gen)
                else:
                    out["_pair"] = {}
            self._step(gen, 1.0, "Drawing...")
        notes = sorted({f"{w.category.__name__}: {w.message}" for w in caught})
        out["_tables"] = tables
        return out, notes

    def _pair_view(self, a: str, b: str, unit: str, min_count: int, gen: int) -> dict:
        names = set(self._session.names)
        for x in (a, b):
            if x not in names:
                raise ValueError(f"selected_pair names {x!r}, which is not a column of this profile")
        return ser.pair_view(self._session.pair(a, b), a, b, unit=unit, min_count=min_count or None,
                             generation=gen)

    @staticmethod
    def _top_pairs(pairs, alpha: float, k: int = PAYLOAD_TOP_PAIRS) -> list[tuple[str, str]]:
        if not len(pairs):
            return []
        ranked = pairs.assign(_sig=pairs["q_value"] < alpha).sort_values(
            ["_sig", "value"], ascending=[False, False], na_position="last")
        return [(str(a), str(b)) for a, b in ranked[["a", "b"]].head(k).itertuples(index=False)]

    def _apply(self, gen: int, result: dict, notes: list[str], snap: dict) -> None:
        with self._lock:
            if gen != self._requested or gen < self._applied:
                return  # a late answer for an old setting: never replaces a newer one
            self._applied = gen
            self._shown_settings = snap["traits"]
            self._reverting = True
            try:
                top = result.pop("_top_pairs", None)
                if top is not None:
                    self._top = top
                self._tables.update(result.pop("_tables", {}))
                with self.hold_sync():
                    for key, value in result.items():
                        setattr(self, key, value)
                    self._status = {"state": "idle", "message": "", "generation": gen,
                                    "progress": None, "notes": notes}
            finally:
                self._reverting = False
        self._refresh_picture()

    def _revert(self) -> None:
        with self._lock:
            self._reverting = True
            try:
                with self.hold_sync():
                    for key, value in self._shown_settings.items():
                        if getattr(self, key) != value:
                            setattr(self, key, value)
            finally:
                self._reverting = False

    # ------------------------------------------------------------------ public methods
    def cancel(self) -> None:
        """Stop the running recompute at its next step; the view keeps what it shows.

        The settings traits return to the values of the numbers on screen. The
        front end's Cancel button sends ``{"type": "cancel"}``, which calls this.

        Returns
        -------
        None

        References
        ----------
        Jupyter widget message protocol, custom messages (ipywidgets documentation).

        Examples
        --------
        >>> w.bins = 64; w.cancel()   # doctest: +SKIP
        """
        with self._lock:
            pending = self._drop_timer()
            self._cancel.set()
        if pending:
            self._revert()
            self._status = {"state": "idle", "generation": self._applied, "progress": None,
                            "message": "Cancelled: the view shows the last finished settings.", "notes": []}

    def wait(self, timeout: float = 30.0) -> bool:
        """Block until every requested recompute has finished.

        Parameters
        ----------
        timeout : float, default=30.0
            Seconds to wait at most.

        Returns
        -------
        bool
            True when nothing is pending, False when ``timeout`` passed first.

        References
        ----------
        Python documentation, ``threading.Condition.wait``.

        Examples
        --------
        >>> w.bins = 8; w.wait()   # doctest: +SKIP
        True
        """
        deadline = time.monotonic() + timeout
        with self._idle:
            while self._outstanding > 0:
                left = deadline - time.monotonic()
                if left <= 0:
                    return False
                self._idle.wait(left)
        return True

    @property
    def session(self):
        """The ``ProfileSession`` this view reads."""
        return self._session

    @property
    def generation(self) -> int:
        """Generation number of the settings the view shows now."""
        return self._applied

    # ------------------------------------------------------------------ sharing
    def picture_svg(self) -> str | None:
        """A static SVG of what the view shows (``infoscope.report.picture``), or None.

        Returns
        -------
        str or None
            An SVG document, or None when the report layer is not available.

        References
        ----------
        W3C (2011). Scalable Vector Graphics (SVG) 1.1, 2nd ed.

        Examples
        --------
        >>> svg = ProfileWidget(session).picture_svg()   # doctest: +SKIP
        """
        try:
            from infoscope.report import picture
        except ImportError:
            return None
        tables = dict(self._tables)
        if "entropy" in tables and hasattr(picture, "profile_svg_from_tables"):
            return picture.profile_svg_from_tables(
                tables["entropy"], tables.get("matrix"), tables.get("relevance"),
                target=self.target, min_count=int(self.min_count) or None)
        if not hasattr(picture, "profile_svg"):
            return None
        with self._session_lock, warnings.catch_warnings(record=True):
            warnings.simplefilter("always")
            return picture.profile_svg(self._session)

    def _picture_bundle(self) -> dict:
        try:
            svg = self.picture_svg()
        except Exception as exc:  # the live view still works; say why the picture is missing
            log.warning("infoscope profile: static picture failed: %s", exc)
            svg = None
        if not svg:
            return {}
        data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
        alt = "infoscope profile (static picture of the live view)"
        return {"image/svg+xml": svg,
                "text/html": f'<img alt="{alt}" src="data:image/svg+xml;base64,{data}">'}

    def _repr_mimebundle_(self, **kwargs):
        bundle = super()._repr_mimebundle_(**kwargs)
        if bundle is None:
            return None
        data, meta = (bundle if isinstance(bundle, tuple) else (bundle, {}))
        data = dict(data)
        data.update(self._picture_bundle())
        return (data, meta) if isinstance(bundle, tuple) else data

    def _ipython_display_(self):
        from IPython.display import display
        bundle = self._repr_mimebundle_()
        data = bundle[0] if isinstance(bundle, tuple) else bundle
        self._displayed = True
        display(data, raw=True, display_id=self._display_id)

    def _refresh_picture(self) -> None:
        """Keep the static picture beside a displayed view in step with it (debounced)."""
        if not (self._displayed and self._live_picture):
            return
        with self._lock:
            if self._picture_timer is not None:
                self._picture_timer.cancel()
            self._picture_timer = threading.Timer(self._picture_delay, self._refresh_picture_now)
            self._picture_timer.daemon = True
            self._picture_timer.start()

    def _refresh_picture_now(self) -> None:
        with self._lock:
            self._picture_timer = None
            if self._outstanding:
                return  # a newer result is on its way; it schedules the refresh again
        try:
            from IPython.display import update_display
            data = self._repr_mimebundle_()
            data = dict(data[0] if isinstance(data, tuple) else data)
            update_display(data, raw=True, display_id=self._display_id)
        except Exception as exc:
            log.warning("infoscope profile: could not refresh the static picture: %s", exc)

    def payload(self, *, top_pairs: int = PAYLOAD_TOP_PAIRS) -> dict:
        """A JSON-able snapshot of everything the view shows, for an offline export.

        Parameters
        ----------
        top_pairs : int, default=12
            How many pair views to precompute (the strongest significant pairs first),
            so that a page without a kernel can still open them.

        Returns
        -------
        dict
            ``{"format": "infoscope-profile/1", "view", "state", "binary", "pair_cache"}``.
            ``state`` maps every synced trait to its value; the binary traits listed in
            ``binary`` hold base64 text. ``pair_cache`` maps ``a + "\\u0000" + b`` to a
            pair view. ``modelFromPayload(payload)`` in ``static/profile.js`` turns it
            into the small model ``render({model, el})`` expects.

        References
        ----------
        The model interface (get/set/on/off/save_changes/send) is anywidget's
        front-end model API (anywidget documentation, "AFM").

        Examples
        --------
        >>> w = ProfileWidget(session)            # doctest: +SKIP
        >>> json.dumps(w.payload())               # doctest: +SKIP
        """
        self.wait()
        state = {}
        binary = []
        for name in _settings_traits() + ("selected_column", "selected_pair", "alpha_fdr", "sort_by") + _DATA_TRAITS:
            value = getattr(self, name)
            if isinstance(value, (bytes, bytearray, memoryview)):
                state[name] = ser.b64(value)
                binary.append(name)
            else:
                state[name] = copy.deepcopy(value)
        cache = {}
        pairs = list(getattr(self, "_top", []))[:top_pairs]
        if self.selected_pair:
            pairs.insert(0, tuple(self.selected_pair))
        unit = self.unit
        with self._session_lock, warnings.catch_warnings(record=True):
            warnings.simplefilter("always")  # a sparse pair still exports; its note is in the view
            for a, b in dict.fromkeys(pairs):
                view = self._pair_view(a, b, unit, int(self.min_count), self._applied)
                cache[a + "\u0000" + b] = view
        return {"format": "infoscope-profile/1", "view": self._view, "state": state,
                "binary": binary, "pair_cache": cache}

    def __repr__(self) -> str:
        names = len(self._meta.get("names", [])) if isinstance(self._meta, dict) else 0
        return f"{type(self).__name__}({names} columns, generation {self._applied})"

    def close(self):
        if not hasattr(self, "_lock"):  # the constructor refused its arguments
            return super().close()
        with self._lock:
            for timer in (self._timer, self._picture_timer):
                if timer is not None:
                    timer.cancel()
            self._timer = self._picture_timer = None
        if self._executor is not None:
            self._executor.shutdown(wait=False, cancel_futures=True)
        super().close()


class ProfileWidget(_ProfileBase):
    """The live profile: controls, entropy bars, information grid, pair view, relevance.

    One page: the controls strip on top, the entropy bars and the information grid
    side by side, the pair view and the relevance bars below. Moving a control
    re-encodes only the affected columns and recounts only the pairs that touch them
    (``ProfileSession.update``); the view keeps showing the last finished numbers
    with a progress line until the new ones arrive.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    debounce : float, default=0.15
        Rapid changes collapse into one recompute: a change while nothing is
        pending recomputes at once; changes made while a recompute runs (or waits)
        wait until the controls have been still this many seconds.
    preview_rows : int or None, default=200_000
        A frame with more rows gets its first view from a seeded sample of this many
        rows (labelled "sampled"), then the full data; None always uses every row.
    picture_delay : float, default=2.0
        Seconds of still controls before the static picture beside a displayed view
        is refreshed (a refresh re-renders the output).
    threaded : bool, default=True
        Recompute on a worker thread (the kernel stays responsive). ``False``
        recomputes synchronously in the thread that changed a setting.
    live_picture : bool, default=True
        Refresh the static picture beside a displayed view after each recompute.
    **traits
        Initial values of the public traits (``bins``, ``estimator``, ``target`` ...).

    Returns
    -------
    ProfileWidget
        An anywidget; display it in a notebook.

    References
    ----------
    Benjamini, Y. & Hochberg, Y. (1995). Controlling the false discovery rate.
    J. R. Stat. Soc. B 57(1), 289-300 (the q-values that mute grid cells).

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession   # doctest: +SKIP
    >>> w = ProfileWidget(ProfileSession(df), target="churned")  # doctest: +SKIP
    >>> w.bins = 8; w.wait()                                 # doctest: +SKIP
    """

    _view = t.Unicode("profile").tag(sync=True)

    def to_html(self, path=None, *, min_count=None):
        """Write the profile as one self-contained HTML file that works offline.

        A thin call of :func:`infoscope.report.html.to_html` with this view: the
        file carries the numbers of the current settings, with every column name
        and value escaped, and no script or style from the network.

        Parameters
        ----------
        path : str or os.PathLike, optional
            File to write. Without it the HTML text is returned.
        min_count : int, optional
            Small-cell threshold of every pair view in the file: cells with 1 ..
            ``min_count - 1`` rows are hidden (small counts can identify people).
            None keeps the report's default.

        Returns
        -------
        pathlib.Path or str
            The path written, or the HTML text when ``path`` is None.

        References
        ----------
        W3C (2016). Content Security Policy Level 2. Small-cell suppression:
        common practice in official statistics.

        Examples
        --------
        >>> w = ProfileWidget(ProfileSession(df))          # doctest: +SKIP
        >>> w.to_html("profile.html", min_count=10)        # doctest: +SKIP
        PosixPath('profile.html')
        """
        from infoscope.report.html import to_html
        return to_html(self, path, min_count=min_count)

    def charts(self, **kw):
        """The views of this profile as Altair charts, keyed by view name.

        A thin call of :func:`infoscope.report.charts.profile_charts` on this
        view's session (its current settings).

        Parameters
        ----------
        **kw
            Passed on: ``reference`` (a frame: adds the drift chart), ``pair``
            (the pair of the pair view), ``min_count`` (small-cell threshold).

        Returns
        -------
        dict of str to altair chart
            ``"entropy"``, ``"grid"``, ``"pair"``, ``"relevance"`` (with a
            target) and ``"drift"`` (with a reference), as ``profile_charts`` gives.

        References
        ----------
        Satyanarayan, A., Moritz, D., Wongsuphasawat, K. & Heer, J. (2017).
        Vega-Lite: A grammar of interactive graphics. IEEE TVCG 23(1), 341-350.

        Examples
        --------
        >>> charts = ProfileWidget(ProfileSession(df)).charts()   # doctest: +SKIP
        >>> charts["grid"].save("grid.svg")                      # doctest: +SKIP
        """
        from infoscope.report.charts import profile_charts
        with self._session_lock:
            return profile_charts(self.session, **kw)


class EntropyBarsWidget(_ProfileBase):
    """Entropy bars alone: one bar per column with its CI and maximum log K.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    **options
        As :class:`ProfileWidget` (``debounce``, ``threaded``, ``preview_rows``,
        ``picture_delay``, initial trait values). Settings are changed from Python
        (``w.bins = 8``): a single view has no controls strip.

    Returns
    -------
    EntropyBarsWidget
        An anywidget; display it in a notebook.

    References
    ----------
    Shannon, C. E. (1948). A mathematical theory of communication. Bell Syst. Tech. J. 27.

    Examples
    --------
    >>> EntropyBarsWidget(session, sort_by="efficiency")  # doctest: +SKIP
    """

    _view = t.Unicode("entropy").tag(sync=True)
    _parts = ("entropy",)


class InformationGridWidget(_ProfileBase):
    """The information grid alone: every column pair, coloured by the pair measure.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    **options
        As :class:`ProfileWidget` (``debounce``, ``threaded``, ``preview_rows``,
        ``picture_delay``, initial trait values). Settings are changed from Python
        (``w.bins = 8``): a single view has no controls strip.

    Returns
    -------
    InformationGridWidget
        An anywidget; display it in a notebook.

    References
    ----------
    Benjamini, Y. & Hochberg, Y. (1995). J. R. Stat. Soc. B 57(1), 289-300.

    Examples
    --------
    >>> InformationGridWidget(session, measure="nmi", order="name")  # doctest: +SKIP
    """

    _view = t.Unicode("grid").tag(sync=True)
    _parts = ("grid",)


class PairViewWidget(_ProfileBase):
    """The pair view alone: one pair's joint counts with pointwise MI per cell.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    **options
        As :class:`ProfileWidget` (``debounce``, ``threaded``, ``preview_rows``,
        ``picture_delay``, initial trait values). Settings are changed from Python
        (``w.bins = 8``): a single view has no controls strip.

    Returns
    -------
    PairViewWidget
        An anywidget; display it in a notebook.

    References
    ----------
    Church, K. W. & Hanks, P. (1990). Word association norms, mutual information,
    and lexicography. Computational Linguistics 16(1), 22-29 (pointwise MI).

    Examples
    --------
    >>> PairViewWidget(session, selected_pair=["depot", "region"], min_count=5)  # doctest: +SKIP
    """

    _view = t.Unicode("pair").tag(sync=True)
    _parts = ("grid", "pair")


class RelevanceWidget(_ProfileBase):
    """Relevance alone: the information each column gives about ``target``.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    **options
        As :class:`ProfileWidget` (``debounce``, ``threaded``, ``preview_rows``,
        ``picture_delay``, initial trait values). Settings are changed from Python
        (``w.bins = 8``): a single view has no controls strip.

    Returns
    -------
    RelevanceWidget
        An anywidget; display it in a notebook.

    References
    ----------
    Shannon, C. E. (1948). Bell Syst. Tech. J. 27 (mutual information).

    Examples
    --------
    >>> RelevanceWidget(session, target="late")  # doctest: +SKIP
    """

    _view = t.Unicode("relevance").tag(sync=True)
    _parts = ("relevance",)


__all__ = ["ProfileWidget", "EntropyBarsWidget", "InformationGridWidget", "PairViewWidget",
           "RelevanceWidget", "Cancelled"]
