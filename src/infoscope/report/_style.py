"""Colours and caution lines shared by the charts, the picture and the page.

Kept apart from :mod:`infoscope.report.charts` so that the static picture (drawn on
every notebook display) does not import Altair.
"""

#: Our colours. Blue against orange is told apart under the common colour-vision
#: deficiencies (common practice); sequential ramps vary in lightness, not just hue.
PALETTE = {
    "bar": "#3b6e8f",           # entropy / relevance bars
    "whisker": "#1d2b36",       # confidence-interval whiskers
    "outline": "#9aa7b1",       # max-entropy outline
    "leak": "#c4622d",          # relevance share >= 0.95 (possible leakage)
    "grid_low": "#f3f1ea",      # information grid, no information
    "grid_high": "#17445e",     # information grid, most information
    "pmi_neg": "#b5541c",       # pair view: fewer than expected
    "pmi_mid": "#f6f5f0",       # pair view: as expected
    "pmi_pos": "#245f80",       # pair view: more than expected
    "hidden": "#d5d3cc",        # suppressed cell
    "stable": "#8db3c7",
    "moderate": "#e0a43a",
    "major": "#a8401a",
    "id_like": "#b9b4a8",       # drift by construction (identifiers), neutral
    "time_axis": "#cfc9bb",     # drift by construction (another period), neutral
    "within_chance": "#c9d6de", # PSI in a band, but chance explains it
    "type_changed": "#d5d3cc",  # not compared
    "chance": "#e6e2d6",        # the band sampling alone reaches (drift)
}

SAMPLE_CAUTION = "Estimates from a sample; whiskers are confidence intervals."
DEPENDENCE_CAUTION = "Mutual information measures dependence, not cause."
