"""Observation weights of a profile: the one check of a weight column.

``ProfileSession(frame, weights="w")`` reads the column ``w`` as one weight per row
(survey or sampling weights) and leaves it out of the profiled columns.  The weights
must be numbers, finite, >= 0 and not all 0; every error names the column.  What the
weights do to the tables is in :mod:`infoscope.engine.weighted`.
"""
from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = ["row_weights"]


def row_weights(values: pd.Series, name: str) -> np.ndarray:
    """The weights of a column as float64 (a copy), or a clear error naming the column.

    Parameters
    ----------
    values : pandas.Series
        The weight column (the profiled rows).
    name : str
        Its key, for the messages.

    Returns
    -------
    numpy.ndarray of float64

    Examples
    --------
    >>> row_weights(pd.Series([1, 2.5, 0]), "w").tolist()
    [1.0, 2.5, 0.0]
    """
    dtype = values.dtype
    if pd.api.types.is_bool_dtype(dtype) or not (pd.api.types.is_numeric_dtype(dtype)):
        raise TypeError(f"weights column {name!r} holds {dtype} values: observation weights must be numbers")
    w = pd.to_numeric(values, errors="coerce").to_numpy(dtype=np.float64, na_value=np.nan)
    bad = ~np.isfinite(w)
    if bad.any():
        first = values.index[int(np.flatnonzero(bad)[0])]
        raise ValueError(f"weights column {name!r} has {int(bad.sum())} missing or infinite value(s) (first at "
                         f"row {first!r}): give every row a finite weight >= 0 (0 leaves a row out)")
    negative = w < 0
    if negative.any():
        first = values.index[int(np.flatnonzero(negative)[0])]
        raise ValueError(f"weights column {name!r} has {int(negative.sum())} negative value(s) (first at row "
                         f"{first!r}): observation weights must be >= 0")
    if not (w > 0).any():
        raise ValueError(f"weights column {name!r} is 0 on every row: no row would count")
    return w.copy()
