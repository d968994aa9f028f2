"""A column's first encoding (a draft) and the rules that name what a column looks like.

A draft is the column as level indices (:class:`_Levels`) or bin indices
(:class:`_Bins`), ``-1`` for missing rows, before the levels are ordered and
folded and the missing policy is applied (:mod:`infoscope.encode.levels`).
:class:`_Notes` collects the warnings and flags of one column while it is encoded.
"""
from __future__ import annotations

import dataclasses
import re

import numpy as np

from infoscope.encode import binning

__all__ = [
    "DEFAULT_CATEGORICAL_THRESHOLD", "ID_LIKE_SHARE", "ID_LIKE_MIN_ROWS", "MOSTLY_MISSING_SHARE",
    "HEAVY_TAIL_INDEX", "HEAVY_TAIL_MIN_ROWS",
]


#: Whole-number columns (integers, or floats whose values are all whole, such as
#: integers stored as float because of missing values) and datetime / duration
#: columns with at most this many distinct values are kept as categories rather
#: than binned; floats with fractional values are always binned (a measurement
#: with few distinct values is still a measurement: convert it to a pandas
#: Categorical to keep its values as levels).  The profile's setting
#: ``categorical_threshold`` changes it.  32 keeps the usual small codes whole:
#: flags (0/1), rating scales (5, 7, 10 or 11 points), months (12), hours (24) and
#: days of the month (31); binning such a column into 16 bins would split or merge
#: values arbitrarily (16 bins on a 0/1 column), while with more than 32 distinct
#: values the default 16 bins already merge neighbours.  Pass
#: ``categorical_threshold=0`` to always bin.
DEFAULT_CATEGORICAL_THRESHOLD = 32
#: A text / categorical / integer column is ID-like when at least this share of its
#: non-missing values are distinct ...
ID_LIKE_SHARE = 0.95
#: ... and it has at least this many non-missing values (below that, all-distinct
#: values happen by chance in any column).
ID_LIKE_MIN_ROWS = 20
#: ``mostly_missing`` when at least this share of the rows is missing (incl. ±inf).
MOSTLY_MISSING_SHARE = 0.5
#: ``heavy_tail`` when the tail index max(q999 - q50, q50 - q001) / (q75 - q25) of a
#: binned numeric column exceeds this.  Population values (scipy.stats ``ppf``):
#: normal 2.3, Student t with 3 dof 6.7, exponential 5.7, lognormal(sigma=1) 14.5,
#: Student t with 2 dof 13.7, Cauchy 159.  8 sits above the exponential, the usual
#: boundary between light and heavy tails.  Equal-width bins on such a column put
#: nearly every row into one bin.
HEAVY_TAIL_INDEX = 8.0
#: The tail index is only computed from this many finite values on.
HEAVY_TAIL_MIN_ROWS = 50
_ID_NAME_CAMEL = re.compile(r"[a-z0-9](Id|ID|Key|UUID)$")
_ID_NAME_PLAIN = re.compile(r"(^|[_\s.\-])(id|key|uuid|guid)$", re.IGNORECASE)


@dataclasses.dataclass
class _Levels:
    """Values as level indices (``-1`` missing) before ordering, folding and the missing policy."""

    raw: np.ndarray
    labels: list
    natural: bool  # keep the given order (ordered values) instead of most-frequent-first
    kind: str
    n_distinct: int
    counts: np.ndarray | None = None  # rows per level, when the draft counted them already


@dataclasses.dataclass
class _Bins:
    raw: np.ndarray
    labels: list
    edges: np.ndarray
    kind: str
    n_distinct: int


class _Notes:
    """Warnings and flags collected while encoding one column."""

    def __init__(self, name: str) -> None:
        self.name = name
        self.flags: set[str] = set()
        self.messages: list[str] = []

    def warn(self, message: str) -> None:
        self.messages.append(f"column {self.name!r}: {message}")


def _format_numbers(values: np.ndarray) -> list[str]:
    if values.dtype.kind in "iu":
        return [str(int(v)) for v in values]
    return binning.format_edges(values)


def _sorted_distinct(s: np.ndarray) -> np.ndarray:
    if s.size == 0:
        return s
    keep = np.empty(s.size, dtype=bool)
    keep[0] = True
    np.not_equal(s[1:], s[:-1], out=keep[1:])
    return s[keep]


def _is_id_name(name: str) -> bool:
    return bool(_ID_NAME_PLAIN.search(name) or _ID_NAME_CAMEL.search(name))


def _boolean(x: np.ndarray, na: np.ndarray | None) -> _Levels:
    raw = x.astype(np.int64)
    if na is not None:
        raw[na] = -1
    present = np.bincount(raw[raw >= 0], minlength=2)
    # a boolean's alphabet is {False, True} whatever the sample shows
    return _Levels(raw, ["False", "True"], True, "boolean", int(np.count_nonzero(present)))
