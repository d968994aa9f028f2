"""The offline snapshot of a profile widget: ``payload()`` (read by the HTML export)."""
from __future__ import annotations

import copy
import warnings

from infoscope.widgets import _serialize as ser
from infoscope.widgets.computation import PAYLOAD_TOP_PAIRS
from infoscope.widgets.traits import _DATA_TRAITS, _settings_traits


class Payload:
    """Widget part: :meth:`payload`."""

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
