"""The static picture beside a live widget (an SVG that shows without a kernel)."""
from __future__ import annotations

import base64
import logging
import threading

from infoscope.report.picture import profile_svg_from_payload

log = logging.getLogger("infoscope.widgets")


class StaticPicture:
    """Widget part: the SVG picture, the display bundle and its debounced refresh."""

    # ------------------------------------------------------------------ sharing
    def picture_svg(self) -> str | None:
        """A static SVG of what the view shows, drawn from the data it was sent.

        Returns
        -------
        str or None
            An SVG document (:func:`infoscope.report.picture.profile_svg_from_payload`
            of the view's data traits), or None before the first numbers arrived.

        References
        ----------
        W3C (2011). Scalable Vector Graphics (SVG) 1.1, 2nd ed.

        Examples
        --------
        >>> svg = ProfileWidget(session).picture_svg()   # doctest: +SKIP
        """
        if not self._entropy:
            return None
        state = {name: getattr(self, name) for name in ("_entropy", "_grid_meta", "_grid_values", "_relevance")}
        return profile_svg_from_payload(state)

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
