"""infoscope.report: static outputs of a profile.

- :func:`to_html` — one self-contained HTML file that works offline (``report.html``);
- :func:`profile_svg` — one compact static SVG picture (``report.picture``);
- :func:`profile_charts` — Altair / Vega-Lite charts of every view (``report.charts``);
- :func:`suppression_mask` — small-cell suppression used by all of them.

Names are imported lazily so that ``import infoscope.report`` does not load Altair.
"""
from __future__ import annotations

import importlib

_PUBLIC = {
    "to_html": "infoscope.report.html",
    "profile_html": "infoscope.report.html",
    "profile_svg": "infoscope.report.picture",
    "profile_svg_from_tables": "infoscope.report.picture",
    "profile_svg_from_payload": "infoscope.report.picture",
    "svg_data_uri": "infoscope.report.picture",
    "profile_charts": "infoscope.report.charts",
    "chart_to_svg": "infoscope.report.charts",
    "chart_to_png": "infoscope.report.charts",
    "suppression_mask": "infoscope.report.suppression",
    "check_min_count": "infoscope.report.suppression",
}

__all__ = sorted(_PUBLIC)


def __getattr__(name: str):
    module = _PUBLIC.get(name)
    if module is None:
        raise AttributeError(f"module 'infoscope.report' has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def __dir__():
    return __all__
