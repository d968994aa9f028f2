"""What one recompute of a profile widget does: apply the settings to the session, ask for the parts."""
from __future__ import annotations

import json
import logging
import threading
from typing import Any

from infoscope._warnings import collect_warnings
from infoscope.frame.tables.draft import NESTED_BIN_COUNTS
from infoscope.views.payload import TOP_PAIRS, draft_grid, draft_message, drift_data, drift_over_data, view_data

log = logging.getLogger("infoscope.widgets")

#: Pair views precomputed into ``payload()`` for an offline export.
PAYLOAD_TOP_PAIRS = TOP_PAIRS


#: Parts that cost seconds (the selection's permutation tests, when a target is set):
#: in a recompute with other parts they are split off and requested as a follow-up
#: generation once the others are shown, so a control move never waits for them.
DEFERRED_PARTS = frozenset({"selection"})


class Computation:
    """Widget part: :meth:`_compute` (settings to the session, then :func:`infoscope.views.view_data`)."""

    def _later_parts(self, parts: set[str]) -> set[str]:
        """The parts of ``parts`` to compute in a follow-up recompute (see :data:`DEFERRED_PARTS`)."""
        # a session of count tables only (out of core) builds no selection at all
        later = parts & DEFERRED_PARTS & set(getattr(self._session, "view_parts", DEFERRED_PARTS))
        if not later or not parts - later or self.target is None:
            return set()  # alone, or nothing to compute (without a target the part is empty)
        return set(later)

    def _compute(self, gen: int, parts: set[str], snap: dict):
        """Apply the snapshot's settings to the session and build ``parts``; returns the trait values."""
        self._check_settings()
        s = self._session
        if snap["session"].get("estimator") == "nsb" and parts & {"entropy", "grid", "relevance"}:
            # NSB integrates a posterior per table: say what it will cost before it starts
            self._status = {"state": "computing", "message": nsb_cost_message(s, parts, target=snap["session"].get("target")), "generation": gen,
                            "progress": 0.0, "notes": []}
        # collect_warnings, not warnings.catch_warnings: this runs in the worker thread,
        # and catch_warnings would swap the process-wide warning state under the user's code
        with self._session_lock, collect_warnings() as caught:
            self._draft_first(gen, parts, snap)
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
            out: dict[str, Any]
            out, _ = view_data(s, parts, order=snap["order"], alpha_fdr=snap["alpha_fdr"],
                               selected_pair=snap["selected_pair"], min_count=snap["min_count"] or None,
                               generation=gen, step=lambda progress, message: self._step(gen, progress, message),
                               selection_method=snap["traits"]["selection_method"],
                               selection_k=snap["traits"]["selection_k"],
                               surprise_model=snap["traits"]["surprise_model"],
                               surprise_n=snap["traits"]["surprise_n"])
            if self._reference is not None or self._drift_over_spec is not None:
                # the drift record depends on the session settings and the small-cell
                # threshold only: a pair click or a new order does not redo its splits
                key = (repr(sorted(snap["session"].items())), repr(sorted(snap["column_bins"].items())),
                       snap["min_count"] or None)
                if key != self._drift_key:
                    if self._reference is not None:
                        self._step(gen, 0.9, "Drift from the reference...")
                        record = drift_data(s, self._reference, min_count=snap["min_count"] or None,
                                            generation=gen)
                        out["_drift"] = json.dumps(record, allow_nan=False)
                    if self._drift_over_spec is not None:
                        self._step(gen, 0.95, "Drift over time...")
                        try:
                            over = drift_over_data(s, self._drift_over_spec, reference=self._reference,
                                                   min_count=snap["min_count"] or None, generation=gen)
                        except (KeyError, TypeError, ValueError) as exc:
                            # a bad time column or period: said in the strip, the rest of the profile shows
                            message = exc.args[0] if isinstance(exc, KeyError) and exc.args else str(exc)
                            over = {"error": f"drift over time: {message}", "generation": gen}
                        out["_drift_over"] = json.dumps(over, allow_nan=False)
                    self._drift_key = key
        notes = sorted({f"{w.category.__name__}: {w.message}" for w in caught})
        return out, notes

    # ------------------------------------------------------------------ drafts
    # When only the global bin count moved, the grid is first drawn from fine tables
    # summed into the new bins (ProfileSession.draft_pairs: exact for the bin counts
    # the fine cuts nest, close for the others), then the exact recompute replaces it.
    def _draft_first(self, gen: int, parts: set[str], snap: dict) -> None:
        """Apply a draft grid for the snapshot's bins before the exact recompute (session lock held)."""
        if not self._drafts_on or "grid" not in parts:
            return
        s = self._session
        new, old = snap["session"], s.settings
        if {k for k, v in new.items() if old.get(k) != v} != {"bins"}:
            return
        if any(self._sent_column_bins.get(n) != snap["column_bins"].get(n)
               for n in set(self._sent_column_bins) | set(snap["column_bins"])):
            return
        order = (self._grid_meta or {}).get("names") or s.names
        out = draft_grid(s, new["bins"], order=order, order_name=snap["order"], alpha_fdr=snap["alpha_fdr"],
                         generation=gen)
        if out is not None:
            self._apply_draft(gen, out, draft_message(out["_grid_meta"]["draft"]))

    def _prepare_drafts_later(self) -> None:
        """After an exact view: count the fine tables once (a thread of their own), then draft ahead."""
        if not self._drafts_on or "grid" not in self._parts or self._preview:
            return
        if self._drafts_started:
            if self._drafts_ready:
                self._draft_ahead_later()
            return
        self._drafts_started = True

        def prepare():
            try:
                self._drafts_ready = bool(self._session.prepare_drafts())
            except Exception:  # a draft is a shortcut: without it the exact path answers
                log.exception("infoscope profile: preparing draft tables failed")
                return
            if self._drafts_ready:
                self._draft_ahead_later()

        if self._threaded:
            threading.Thread(target=prepare, name="infoscope-drafts", daemon=True).start()
        else:
            prepare()

    def _draft_ahead_later(self) -> None:
        if not self._threaded:
            self._draft_ahead()
            return
        try:
            self._executor.submit(self._draft_ahead)
        except RuntimeError:  # closed
            pass

    def _draft_ahead(self) -> None:
        """Make the drafts of the nested bin counts, nearest to the current bins first, while idle.

        Runs on the worker thread between recomputes and stops as soon as a
        recompute is asked for; the session keeps the drafts for these settings, so
        a later bins move to one of them is drawn at once.
        """
        current = self._session.settings["bins"]
        here = current if isinstance(current, int) else 16
        for bins in sorted(NESTED_BIN_COUNTS, key=lambda b: (abs(b - here), b)):
            with self._lock:
                if self._outstanding > 0 or self._timer is not None:
                    return  # the user is moving a control: the recompute goes first
            try:
                with self._session_lock:
                    if self._session.draft_pairs(bins) is None:
                        return
            except Exception:
                log.exception("infoscope profile: drafting %s bins failed", bins)
                return
        self._drafted_ahead += 1  # every nested bin count is drafted for these settings


_NSB_SECONDS: dict = {}


def _nsb_seconds_per_table(n_rows: int) -> float:
    """Seconds one NSB posterior integral takes here, timed once per process on a 16 x 16 table."""
    import time

    import numpy as np

    from infoscope.estimators.nsb import nsb_posterior_nats

    size = int(min(max(n_rows, 10), 10**7))
    key = int(np.log2(size))
    if key not in _NSB_SECONDS:
        counts = np.random.default_rng(0).multinomial(size, np.full(256, 1 / 256))
        start = time.perf_counter()
        nsb_posterior_nats(counts.astype(float), with_std=False)
        _NSB_SECONDS[key] = time.perf_counter() - start
    return _NSB_SECONDS[key]


def nsb_cost_message(session, parts: set[str], target=None) -> str:
    """What an NSB recompute of ``parts`` will cost, said before it starts.

    One posterior integral per column (entropy bars), per pair table plus the
    columns' own (grid), per column against the target (relevance); results the
    session cached for these settings come back at once, so it is an upper bound.

    Parameters
    ----------
    session : ProfileSession
    parts : set of str
    target : str, optional
        The target the recompute uses (relevance is computed only with one).

    Returns
    -------
    str

    References
    ----------
    .. [1] Nemenman, I., Shafee, F. & Bialek, W. (2002). Entropy and inference,
       revisited. NIPS 14 (one integral over the Dirichlet concentration per table).

    Examples
    --------
    >>> nsb_cost_message(session, {"grid"})   # doctest: +SKIP
    'NSB estimator: up to about 40 s ...'
    """
    p = len(session.names)
    n_rows = int(getattr(session, "n_rows", 0) or 0) or 1000
    sample = session.settings.get("sample")
    if sample:
        n_rows = min(n_rows, int(sample))
    integrals = 0
    if "entropy" in parts:
        integrals += p
    if "grid" in parts:
        integrals += p * (p - 1) // 2 + p
    if "relevance" in parts and target is not None:
        integrals += 2 * (p - 1) + 1
    seconds = integrals * _nsb_seconds_per_table(n_rows)
    cost = f"about {seconds:.0f} s" if seconds >= 1.5 else "about a second"
    return (f"NSB estimator: up to {cost} here ({integrals:,} posterior integrals, one per "
            "table; cached results return at once). The other estimators take well under a second.")
