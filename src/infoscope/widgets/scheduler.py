"""Recompute scheduling of the profile widgets: generations, debounce, worker thread, cancel.

See the protocol in :mod:`infoscope.widgets.profile`.
"""
from __future__ import annotations

import copy
import logging
import threading
import time

from infoscope.frame.settings import NeedsRows
from infoscope.widgets.traits import _settings_traits

log = logging.getLogger("infoscope.widgets")

#: Seconds a recompute runs before it reports progress steps in ``_status``.
PROGRESS_AFTER = 0.25


class Cancelled(Exception):
    """A recompute was cancelled from the front end or superseded by a newer one."""


class Scheduler:
    """Widget part: observers, requests, the worker thread, apply / revert, cancel and wait."""

    # ------------------------------------------------------------------ observers
    def _on_setting(self, change) -> None:
        if self._reverting:
            return
        name = change["name"]
        if name == "alpha" and self.estimator != "dirichlet":
            return  # the pseudocount only matters to the Dirichlet estimator
        parts = set(self._parts)
        if name == "min_count":
            parts = {"pair", "surprising"} & parts
        elif name == "order":
            parts = {"grid"} & parts
        elif name == "target":
            parts = {"relevance", "selection"} & parts
        elif name in ("selection_method", "selection_k"):
            parts = {"selection"} & parts
        elif name in ("surprise_model", "surprise_n"):
            parts = {"surprising"} & parts
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
                later = self._later_parts(parts)  # costly parts: a follow-up once the others are shown
                parts -= later
                snapshot = self._snapshot()
                self._run_started = time.monotonic()
            try:
                result, notes = self._compute(gen, parts, snapshot)
            except Cancelled:
                with self._lock:
                    latest = gen == self._requested
                    # the parts are still to do: a newer request (the worker runs one
                    # at a time, so it starts after this returns) or the next one takes them
                    self._pending_parts |= parts | later
                if latest:  # a cancel (not a newer request): controls return to what is shown
                    self._revert()
                    self._status = {"state": "idle", "generation": self._applied, "progress": None,
                                    "message": "Cancelled: the view shows the last finished settings.",
                                    "notes": []}
                return
            except NeedsRows as exc:  # a profile of count tables: this control needs another pass
                with self._lock:
                    latest = gen == self._requested
                if latest:
                    self._revert()
                    self._status = {"state": "idle", "generation": self._applied, "progress": None,
                                    "message": f"{exc}. The view shows the last finished settings.", "notes": []}
                return
            except Exception as exc:  # shown in the view, logged, never swallowed
                log.exception("infoscope profile: recompute %d failed", gen)
                with self._lock:
                    latest = gen == self._requested
                    if latest:
                        self._pending_parts |= parts | later
                if latest:
                    self._status = {"state": "error", "generation": gen, "progress": None,
                                    "message": f"{type(exc).__name__}: {exc}", "notes": []}
                return
            self._apply(gen, result, notes, snapshot)
            if later:
                with self._lock:
                    newer = gen != self._requested
                    if newer:
                        self._pending_parts |= later  # the newer request does them
                if not newer:
                    self._request(later)
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

    def _apply(self, gen: int, result: dict, notes: list[str], snap: dict) -> None:
        with self._lock:
            if gen != self._requested or gen < self._applied:
                return  # a late answer for an old setting: never replaces a newer one
            self._applied = gen
            if not hasattr(self, "_first_numbers_at"):
                self._first_numbers_at = time.time()  # wall clock: benchmarks/latency.py reads it
            self._shown_settings = snap["traits"]
            self._reverting = True
            try:
                result.pop("_top_pairs", None)
                with self.hold_sync():
                    for key, value in result.items():
                        setattr(self, key, value)
                    if self._meta.get("sampled") != self._session.sampled:
                        self._set_meta()  # a sampled first view was followed by the full data
                    self._status = {"state": "idle", "message": "", "generation": gen,
                                    "progress": None, "notes": notes}
            finally:
                self._reverting = False
            first = not getattr(self, "_picture_drawn", False)
            self._picture_drawn = True
        self._refresh_picture(now=first)  # the first numbers replace the "computing" line at once
        self._prepare_drafts_later()

    def _apply_draft(self, gen: int, result: dict, message: str) -> None:
        """Show a draft of the newest request's parts; the recompute goes on and replaces it."""
        with self._lock:
            if gen != self._requested or gen < self._applied:
                return
            self._reverting = True
            try:
                with self.hold_sync():
                    for key, value in result.items():
                        setattr(self, key, value)
                    self._status = {"state": "computing", "message": message, "generation": gen,
                                    "progress": 0.1, "notes": []}
            finally:
                self._reverting = False
            self._drafts_shown += 1

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
        .. [1] Jupyter widget message protocol, custom messages (ipywidgets documentation).

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
