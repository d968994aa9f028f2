"""Small-cell suppression for everything infoscope exports: the labels shown.

The masks themselves (which cells to hide, and why) are computed in
:mod:`infoscope.frame.suppression` so that result tables can use them too (data
flows frame -> report); the names are re-exported here. See that module for what
is and is not guaranteed.

Two kinds of hidden cell carry two different markers, so that no label says
something false: a cell below the threshold shows ``"<10"`` (for ``min_count=10``),
a complementary cell, hidden only so that a small one cannot be worked out from
the totals, shows :data:`COMPLEMENT_LABEL`.
"""
from __future__ import annotations

from infoscope.frame.suppression import (COMPLEMENTARY, SMALL, VISIBLE, check_min_count,
                                         suppression_kinds, suppression_mask)

__all__ = ["check_min_count", "suppression_mask", "suppression_kinds", "suppressed_label",
           "complement_label", "SUPPRESSED_LABEL", "COMPLEMENT_LABEL", "VISIBLE", "SMALL",
           "COMPLEMENTARY"]

#: What an export shows in place of a count below the threshold (``"<10"``).
SUPPRESSED_LABEL = "<{min_count}"

#: What an export shows in place of a complementary cell (its count may be large).
COMPLEMENT_LABEL = "\u00b7"


def complement_label() -> str:
    """The text an export shows in place of a complementary hidden cell.

    Returns
    -------
    str
        A middle dot; the accompanying note and aria label say
        "hidden to protect a small cell".

    References
    ----------
    Marking secondary (complementary) suppressions apart from primary ones is
    common practice in official statistics.

    Examples
    --------
    >>> complement_label()
    '\u00b7'
    """
    return COMPLEMENT_LABEL


def suppressed_label(min_count: int) -> str:
    """The text an export shows in place of a hidden count.

    Parameters
    ----------
    min_count : int
        The threshold.

    Returns
    -------
    str
        ``"<"`` followed by the threshold.

    References
    ----------
    Showing a symbol in place of a suppressed count is common practice in official
    statistics.

    Examples
    --------
    >>> suppressed_label(10)
    '<10'
    """
    return SUPPRESSED_LABEL.format(min_count=int(min_count))
