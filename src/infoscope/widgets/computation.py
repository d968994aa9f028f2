"""What one recompute of a profile widget asks of the session, and the trait values it sends."""
from __future__ import annotations

import warnings
from typing import Any

import numpy as np
import pandas as pd

from infoscope.widgets import _serialize as ser

#: Pair views precomputed into ``payload()`` for an offline export.
PAYLOAD_TOP_PAIRS = 12


class Computation:
    """Widget part: :meth:`_compute` (session calls per part) and the pair view."""

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
