"""Draft pair tables: the pairs at a new bin count, from fine tables merged, before any re-encoding.

When the global bin count changes, every binned column is re-encoded and nearly
every pair recounted: seconds on a million rows.  A draft answers first.  Once
(:meth:`DraftTables.prepare_drafts`, slow, meant for a background thread after the
first view) the float columns binned by quantiles get a fine encoding
(:mod:`infoscope.encode.fine`: about 96 bins cut at every quantile the bin counts
2..16 and 32 ask for) and every pair that touches one is counted at that resolution.
Then :meth:`DraftTables.draft_pairs` sums those tables into the bins asked for
(:mod:`infoscope.engine.coarsen`) and estimates them with the session's own
vectorised estimators and per-table tests.  For bin counts in
:data:`~infoscope.encode.fine.NESTED_BIN_COUNTS` the merged tables *are* the
tables the re-encoded columns give, so the draft's MI, NMI, G and chi-square
p-values equal the exact ones; elsewhere each bin edge sits at the nearest fine
cut (at most 1/64 of the rows away): close, and labelled so.  A draft never
replaces the exact table: the live view shows it until the exact numbers of the
same settings arrive.  What a draft leaves out: permutation tests (their rows keep
p = NaN), intervals, and the measures other than ``mi`` and ``nmi``.
"""
from __future__ import annotations

import math
import threading

import numpy as np
import pandas as pd

from infoscope._warnings import collect_warnings
from infoscope.encode.fine import NESTED_BIN_COUNTS, coarse_map, fine_column
from infoscope.engine.engine import PairEngine
from infoscope.engine.coarsen import group_starts
from infoscope.estimators._checks import log_base
from infoscope.estimators.information import benjamini_hochberg
from infoscope.estimators.significance import table_tests

#: The measures a draft can give.
DRAFT_MEASURES = ("mi", "nmi")
#: Drafts kept per session (the bin counts a slider visits).
_KEEP_DRAFTS = 64
#: The estimators a draft uses (closed forms, vectorised over tables; NSB integrates per table).
DRAFT_ESTIMATORS = ("plugin", "miller_madow", "chao_shen", "grassberger", "james_stein", "dirichlet")


class _FineState:
    """Fine encodings and their engine, with what they were built from."""

    def __init__(self, key, fine: dict, others: dict, engine: PairEngine):
        self.key, self.fine, self.others, self.engine = key, fine, others, engine
        self.drafts: dict = {}  # settings key -> (pairs, diagonal): drafts already made


class DraftTables:
    """Session part: :meth:`prepare_drafts`, :meth:`draft_pairs` (see :mod:`infoscope.frame.tables`)."""

    def _fine_fits(self, state) -> bool:
        """Whether fine state was built from this session's rows and missing policy."""
        return state is not None and state.key[0] is self._rows and state.key[1] == self._settings["missing"]

    def _draftable(self, key: str) -> bool:
        """Whether a column's bins follow the global quantile bin count (the columns a draft re-cuts)."""
        col = self._encoded[key]
        return (col.edges is not None and col.kind == "numeric" and key not in self._bins_override
                and self._settings["strategy"] == "quantile")

    def prepare_drafts(self, *, progress=False) -> bool:
        """Encode the float columns at the fine resolution and count their pair tables (once).

        Slow (about one full profile's encoding and counting); later calls return at
        once while the frame, its rows and the missing policy stay the same.  It
        reads the frame and a snapshot of the encodings, so a widget may run it on a
        thread of its own while the session answers other calls; the state it
        builds is only used while it still fits the session.

        Parameters
        ----------
        progress : bool or callable, default=False
            The engine's progress option while it counts.

        Returns
        -------
        bool
            True when drafts can be made now (at least one column to re-cut).

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> from infoscope.frame.session import ProfileSession
        >>> rng = np.random.default_rng(0)
        >>> s = ProfileSession(pd.DataFrame({"x": rng.normal(size=3000), "y": rng.normal(size=3000)}), bins=8)
        >>> s.prepare_drafts()
        True
        """
        state = getattr(self, "_fine_state", None)
        if self._fine_fits(state):
            return bool(state.fine)
        lock = self.__dict__.setdefault("_fine_lock", threading.Lock())
        with lock:
            state = getattr(self, "_fine_state", None)
            if self._fine_fits(state):
                return bool(state.fine)
            key = (self._rows, self._settings["missing"])
            encoded = dict(self._encoded)
            missing = self._settings["missing"]
            fine, others = {}, {}
            # the fine encodings repeat what the session's encoding already said about
            # each column (infinite values, ...): those warnings are dropped here
            with collect_warnings():
                for name in self._names:
                    col = encoded[name]
                    fc = None
                    if col.edges is not None and col.kind == "numeric":
                        fc = fine_column(self._values(name), name, missing=missing)
                    if fc is not None:
                        fine[name] = fc
                    else:
                        others[name] = col
            columns = [fine[n].column if n in fine else others[n] for n in self._names]
            engine = PairEngine(columns, progress=progress)
            wanted = [(a, b) for i, a in enumerate(self._names) for b in self._names[i + 1:]
                      if a in fine or b in fine]
            if wanted:
                engine.tables(wanted)
            self._fine_state = _FineState(key, fine, others, engine)
            return bool(fine)

    def draft_pairs(self, bins: int, measure: str | None = None):
        """The pair table at ``bins`` quantile bins, from the fine tables, or None.

        Parameters
        ----------
        bins : int
            The global bin count to draft.
        measure : {"mi", "nmi"}, optional
            What the ``value`` column holds (default: the session's measure).

        Returns
        -------
        (pandas.DataFrame, pandas.Series) or None
            The draft pairs table (columns ``a, b, k_a, k_b, n, mi, nmi, value, g,
            dof, p_value, q_value, p_method, reliability``; ``attrs["draft"]`` says
            the bins, the fine resolution and whether the numbers are exact) and the
            grid's diagonal per column key.  None when no draft fits: not prepared
            for these rows, a measure or estimator setting a draft does not cover, a
            re-cut column with no more distinct values than ``bins``, or a binned
            column (a date, a per-column override) whose bins no fine table holds.

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> from infoscope.frame.session import ProfileSession
        >>> rng = np.random.default_rng(0)
        >>> x = rng.normal(size=3000)
        >>> s = ProfileSession(pd.DataFrame({"x": x, "y": x + rng.normal(size=3000)}), bins=8)
        >>> _ = s.prepare_drafts()
        >>> table, _ = s.draft_pairs(4)
        >>> table.attrs["draft"]["exact"], int(table["k_a"][0])
        (True, 4)
        """
        s = self._settings
        measure = s["measure"] if measure is None else measure
        state = getattr(self, "_fine_state", None)
        if (not self._fine_fits(state) or measure not in DRAFT_MEASURES
                or isinstance(bins, bool) or not isinstance(bins, (int, np.integer)) or bins < 2
                or s["strategy"] != "quantile" or s["estimator"] not in DRAFT_ESTIMATORS):
            return None
        bins = int(bins)
        others = tuple(self._encoded[n] for n in self._names if n not in state.fine)
        key = (bins, measure, self._estimator_key(), s["base"], others, tuple(sorted(self._bins_override)))
        hit = state.drafts.get(key)
        if hit is not None:
            return hit[0].copy(), hit[1].copy()
        maps: dict[str, tuple[np.ndarray, int, np.ndarray]] = {}
        exact = True
        for name in self._names:
            if name in state.fine and self._draftable(name):
                fc = state.fine[name]
                if fc.n_distinct <= bins:
                    return None  # one bin per value: the encoder's own rule
                mapping, k, nested = coarse_map(fc, bins)
                maps[name] = (mapping, k, group_starts(mapping, k))
                exact &= nested
            elif self._draftable(name) or (name in state.others and state.others[name] is not self._encoded[name]):
                return None  # re-cut by the new bins without a fine table, or encoded since
            elif name in state.fine:
                return None  # a fine column whose current bins are not the global ones
        if not maps:
            return None
        pair_list = self._pair_list()
        eng = state.engine
        tabs = []
        for a, b in pair_list:
            if a in maps or b in maps:
                # sum the fine table's rows and columns into the coarse symbols
                t = np.asarray(eng.table(a, b))
                if a in maps:
                    t = np.add.reduceat(t, maps[a][2], axis=0)
                if b in maps:
                    t = np.add.reduceat(t, maps[b][2], axis=1)
                tabs.append(np.asarray(t, dtype=np.int64))
            else:
                tabs.append(np.asarray(self._engine.table(a, b), dtype=np.int64))
        tm = self._table_measures(tabs, nats=True)
        tt = table_tests(tabs)
        divisor = log_base(s["base"])
        mi = tm["mi"] / divisor
        value = mi if measure == "mi" else tm["nmi"]
        p = np.asarray(tt.p_value, dtype=float)
        q = np.full(p.size, np.nan)
        tested = np.isfinite(p)
        if tested.any():
            q[tested] = benjamini_hochberg(p[tested])

        def k_of(name):
            return maps[name][1] if name in maps else self._encoded[name].k

        out = pd.DataFrame({
            "a": [a for a, _ in pair_list], "b": [b for _, b in pair_list],
            "k_a": np.array([k_of(a) for a, _ in pair_list], dtype=np.int64),
            "k_b": np.array([k_of(b) for _, b in pair_list], dtype=np.int64),
            "n": np.asarray(tt.n, dtype=np.int64), "mi": mi, "nmi": tm["nmi"], "value": value,
            "g": tt.statistic, "dof": np.asarray(tt.dof, dtype=np.int64), "p_value": p, "q_value": q,
            "p_method": pd.array(tt.p_method, dtype=object), "reliability": pd.array(tt.reliability, dtype=object),
        })
        fine_bins = max(state.fine[name].edges.size - 1 for name in maps)
        info = {"bins": bins, "exact": bool(exact), "fine_bins": int(fine_bins),
                "nested": list(NESTED_BIN_COUNTS), "columns": sorted(maps)}
        out.attrs.update(self._attrs(measure=measure, normalization=s["normalization"], draft=info))
        diag = {}
        for name in self._names:
            marg = (np.add.reduceat(np.asarray(eng.marginal(name), dtype=np.int64), maps[name][2]) if name in maps
                    else np.asarray(self._engine.marginal(name)))
            if measure == "mi":
                diag[name] = self._entropy(marg)
            else:
                diag[name] = math.nan if np.count_nonzero(marg) <= 1 else 1.0
        diagonal = pd.Series(diag, dtype=float)
        if len(state.drafts) >= _KEEP_DRAFTS:
            state.drafts.pop(next(iter(state.drafts)))
        state.drafts[key] = (out, diagonal)
        return out.copy(), diagonal.copy()
