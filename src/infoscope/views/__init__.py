"""infoscope.views: every view's data, built once from a session, for the widget and the exports.

- :func:`payload` — the whole profile as one JSON-able dict (the HTML export embeds
  it, the static picture draws from it, the widget's ``payload()`` returns it);
- :func:`view_data` — the data parts of a view (what the live widget sends);
- :mod:`infoscope.views.serialize` — the one serializer of result tables;
- :mod:`infoscope.views.choices` — the choices of each control, derived from the
  session's own lists, and the mapping between view and session settings.

This layer sits between :mod:`infoscope.frame` and the outputs
(:mod:`infoscope.report`, :mod:`infoscope.widgets`); it imports neither.
"""
from infoscope.views.payload import payload, view_data

__all__ = ["payload", "view_data"]
