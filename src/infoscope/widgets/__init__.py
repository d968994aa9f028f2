"""infoscope.widgets: the live profile (anywidget views over a ``ProfileSession``).

``ProfileWidget`` arranges every view on one page; ``EntropyBarsWidget``,
``InformationGridWidget``, ``PairViewWidget`` and ``RelevanceWidget`` show one view
each. The front end is one plain ESM file, ``static/profile.js`` (no build step).
"""
from infoscope.widgets.profile import (
    EntropyBarsWidget,
    InformationGridWidget,
    PairViewWidget,
    ProfileWidget,
    RelevanceWidget,
)

__all__ = ["ProfileWidget", "EntropyBarsWidget", "InformationGridWidget", "PairViewWidget",
           "RelevanceWidget"]
