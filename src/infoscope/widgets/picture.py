"""The static picture beside a live widget (an SVG that shows without a kernel).

Shown in a notebook, a profile makes two outputs: the live view (the widget's own
bundle, which a front end with a kernel renders), and right after it the static
picture (``image/svg+xml`` and an ``<img>`` in ``text/html``) under a display id
of its own.  Refreshing the picture updates only that second output, so the live
view is never re-rendered (focus, scroll and the grid's cursor stay).  A saved
notebook shows the picture wherever the live view cannot be drawn: an HTML export
of a notebook saved with widget state (whose widget manager would be fetched from
a CDN), without it, and renderers that show only images.  Where the live view is
drawn, a style rule in the picture's own HTML hides the picture beside it.
"""
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
        .. [1] W3C (2011). Scalable Vector Graphics (SVG) 1.1, 2nd ed.

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
                "text/html": f'<img alt="{alt}" style="max-width:100%;height:auto" '
                             f'src="data:image/svg+xml;base64,{data}">'}

    def _picture_output(self) -> dict:
        """The bundle of the picture's own output: the picture, or a line saying it follows."""
        bundle = self._picture_bundle()
        if not bundle:
            text = "infoscope profile: computing; the static picture follows when the numbers arrive."
            return {"text/plain": text, "text/html": f'<div class="{_STATIC_CLASS}">{_HIDE_BESIDE_LIVE}'
                                                     f'<p style="color:#555">{text}</p></div>'}
        return {"image/svg+xml": bundle["image/svg+xml"],
                "text/plain": "infoscope profile (static picture of the live view)",
                "text/html": f'<div class="{_STATIC_CLASS}">{_HIDE_BESIDE_LIVE}{bundle["text/html"]}</div>'}

    def _repr_mimebundle_(self, **kwargs):
        # for displays that call this directly: the live view and the picture in one bundle
        bundle = super()._repr_mimebundle_(**kwargs)
        if bundle is None:
            return None
        data, meta = (bundle if isinstance(bundle, tuple) else (bundle, {}))
        data = dict(data)
        data.update(self._picture_bundle())
        return (data, meta) if isinstance(bundle, tuple) else data

    def _view_bundle(self) -> dict:
        """The live view's own bundle (the widget view and its text), without the picture."""
        bundle = super()._repr_mimebundle_()
        return dict(bundle[0] if isinstance(bundle, tuple) else bundle)

    def _ipython_display_(self):
        from IPython.display import display
        self._displayed = True
        display(self._view_bundle(), raw=True)
        display(self._picture_output(), raw=True, display_id=self._display_id)

    def _refresh_picture(self, *, now: bool = False) -> None:
        """Keep the static picture beside a displayed view in step with it (debounced)."""
        if not (self._displayed and self._live_picture):
            return
        with self._lock:
            if self._picture_timer is not None:
                self._picture_timer.cancel()
            delay = 0.0 if now else self._picture_delay
            self._picture_timer = threading.Timer(delay, self._refresh_picture_now)
            self._picture_timer.daemon = True
            self._picture_timer.start()

    def _refresh_picture_now(self) -> None:
        with self._lock:
            self._picture_timer = None
            if self._outstanding:
                return  # a newer result is on its way; it schedules the refresh again
        try:
            from IPython.display import update_display
            # only the picture's output: the live view is not touched
            update_display(self._picture_output(), raw=True, display_id=self._display_id)
        except Exception as exc:
            log.warning("infoscope profile: could not refresh the static picture: %s", exc)


_STATIC_CLASS = "isc-static"
# Hides the picture when the output just before it holds a drawn live view (.isc-root):
# JupyterLab and Notebook 7 (.jp-OutputArea-child), nbconvert's lab template (same
# classes), the classic notebook (.output_area).  Nothing is fetched.
_HIDE_BESIDE_LIVE = (
    "<style>.jp-OutputArea-child:has(.isc-root) + .jp-OutputArea-child .isc-static,"
    ".output_area:has(.isc-root) + .output_area .isc-static{display:none}</style>"
)
