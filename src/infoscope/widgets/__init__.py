"""infoscope.widgets: the live profile (anywidget views over a ``ProfileSession``).

``ProfileWidget`` arranges every view on one page; ``EntropyBarsWidget``,
``InformationGridWidget``, ``PairViewWidget``, ``RelevanceWidget``, ``SelectionWidget``
and ``SurprisingRowsWidget`` show one view each. The front end is one plain ESM file, ``static/profile.js`` (no build step).
"""
from infoscope.widgets.profile import (
    EntropyBarsWidget,
    InformationGridWidget,
    PairViewWidget,
    ProfileWidget,
    RelevanceWidget,
    SelectionWidget,
    SurprisingRowsWidget,
)

__all__ = ["ProfileWidget", "EntropyBarsWidget", "InformationGridWidget", "PairViewWidget",
           "RelevanceWidget", "SelectionWidget", "SurprisingRowsWidget"]
