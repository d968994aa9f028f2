"""Small-cell suppression for everything infoscope exports: the labels shown.

The masks (which cells to hide, and why) and the labels are defined in
:mod:`infoscope.frame.suppression` so that result tables and the views can use
them too (data flows frame -> views -> report); the names are re-exported here. See that module for what
is and is not guaranteed.

Two kinds of hidden cell carry two different markers, so that no label says
something false: a cell below the threshold shows ``"<10"`` (for ``min_count=10``),
a complementary cell, hidden only so that a small one cannot be worked out from
the totals, shows :data:`COMPLEMENT_LABEL`.
"""
from __future__ import annotations

from infoscope.frame.suppression import (
    COMPLEMENT_LABEL,
    COMPLEMENTARY,
    SMALL,
    SUPPRESSED_LABEL,
    VISIBLE,
    check_min_count,
    complement_label,
    suppressed_label,
    suppression_kinds,
    suppression_mask,
)

__all__ = ["check_min_count", "suppression_mask", "suppression_kinds", "suppressed_label",
           "complement_label", "SUPPRESSED_LABEL", "COMPLEMENT_LABEL", "VISIBLE", "SMALL",
           "COMPLEMENTARY"]
