"""What one recompute of a profile widget does: apply the settings to the session, ask for the parts."""
from __future__ import annotations

import warnings
from typing import Any

from infoscope.views.payload import TOP_PAIRS, view_data

#: Pair views precomputed into ``payload()`` for an offline export.
PAYLOAD_TOP_PAIRS = TOP_PAIRS


class Computation:
    """Widget part: :meth:`_compute` (settings to the session, then :func:`infoscope.views.view_data`)."""

    def _compute(self, gen: int, parts: set[str], snap: dict):
        """Apply the snapshot's settings to the session and build ``parts``; returns the trait values."""
        self._check_settings()
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
            out: dict[str, Any]
            out, _ = view_data(s, parts, order=snap["order"], alpha_fdr=snap["alpha_fdr"],
                               selected_pair=snap["selected_pair"], min_count=snap["min_count"] or None,
                               generation=gen, step=lambda progress, message: self._step(gen, progress, message))
        notes = sorted({f"{w.category.__name__}: {w.message}" for w in caught})
        return out, notes
