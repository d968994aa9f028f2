"""Columns -> small integer codes: the :class:`EncodedColumn` every later layer reads.

One entry point, :func:`encode_column`, takes a column of any dtype (NumPy array,
list, pandas Series of a NumPy, nullable, string, categorical, datetime or object
dtype) and returns codes ``0 .. k-1`` for its symbols and ``k`` for missing rows
(under ``missing="drop"``).  The decisions it makes on the user's behalf are named
in the docstring, flagged on the result and, where they change what the numbers
mean (infinite values, mixed types, unhashable cells, folded levels, merged
quantile edges), announced with a :class:`~infoscope.DataQualityWarning` that names
the column.  The user's data are never modified.

The code lives in one module per subject; this module keeps the import paths
``infoscope.encode.columns.EncodedColumn`` / ``encode_column`` / ... working:
:mod:`.encoded` (the column type), :mod:`.encoder` (:func:`encode_column`),
:mod:`.numeric`, :mod:`.temporal`, :mod:`.text`, :mod:`.levels` (levels and
folding), :mod:`.drafts` (drafts and the detection thresholds), :mod:`.checks`
(settings and input), :mod:`.keys` (column keys) and :mod:`.frames` (many
columns, worker threads).
"""
from __future__ import annotations

from infoscope.encode.drafts import (
    DEFAULT_CATEGORICAL_THRESHOLD,
    HEAVY_TAIL_INDEX,
    HEAVY_TAIL_MIN_ROWS,
    ID_LIKE_MIN_ROWS,
    ID_LIKE_SHARE,
    MOSTLY_MISSING_SHARE,
)
from infoscope.encode.encoded import FLAGS, KINDS, MISSING_LABEL, OTHER_LABEL, EncodedColumn, codes_dtype
from infoscope.encode.encoder import encode_column
from infoscope.encode.frames import PARALLEL_MIN_ROWS, encode_columns, encode_frame
from infoscope.encode.keys import column_keys
from infoscope.encode.numeric import tail_index
from infoscope.encode.text import _hashable, _plain, _stable_text  # noqa: F401  (used by infoscope.measures)

__all__ = [
    "EncodedColumn",
    "encode_column",
    "encode_frame",
    "column_keys",
    "codes_dtype",
    "KINDS",
    "FLAGS",
    "MISSING_LABEL",
    "OTHER_LABEL",
    "DEFAULT_CATEGORICAL_THRESHOLD",
    "ID_LIKE_SHARE",
    "ID_LIKE_MIN_ROWS",
    "MOSTLY_MISSING_SHARE",
    "HEAVY_TAIL_INDEX",
    "HEAVY_TAIL_MIN_ROWS",
    "tail_index",
    "encode_columns",
    "PARALLEL_MIN_ROWS",
]
