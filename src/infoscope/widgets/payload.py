"""The offline snapshot of a profile widget: ``payload()``, built by :func:`infoscope.views.payload`."""
from __future__ import annotations

from infoscope.views.payload import TOP_PAIRS, payload


class Payload:
    """Widget part: :meth:`payload`."""

    def payload(self, *, top_pairs: int = TOP_PAIRS, min_count=None) -> dict:
        """A JSON-able snapshot of everything the view shows, for an offline export.

        Parameters
        ----------
        top_pairs : int, default=12
            How many pair views to precompute (the strongest significant pairs first),
            so that a page without a kernel can still open them.
        min_count : int, optional
            Small-cell threshold of every pair view (the larger of this and the
            view's ``min_count`` applies).

        Returns
        -------
        dict
            :func:`infoscope.views.payload` of this view's session and control
            values: ``{"format": "infoscope-profile/1", "view", "state", "binary",
            "pair_cache"}``.  ``modelFromPayload(payload)`` of the front-end module
            turns it into the small model ``render({model, el})`` expects.

        References
        ----------
        .. [1] The model interface (get/set/on/off/save_changes/send) is anywidget's
           front-end model API (anywidget documentation, "AFM").

        Examples
        --------
        >>> w = ProfileWidget(session)            # doctest: +SKIP
        >>> json.dumps(w.payload())               # doctest: +SKIP
        """
        self.wait()
        with self._session_lock:
            return payload(self._session, self._view_values(), min_count=min_count, top_pairs=top_pairs,
                           view=self._view, generation=self._applied, status=self._status,
                           reference=self._reference, drift_over=self._drift_over_setting)
