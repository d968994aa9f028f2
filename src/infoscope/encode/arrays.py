"""The numeric arrays the binning rules read (one check for every caller, with clear errors)."""
from __future__ import annotations

import numpy as np


def _numeric_array(values, parameter: str = "values") -> np.ndarray:
    """Return a 1-D numeric NumPy array of ``values`` (a view where possible, never modified)."""
    if hasattr(values, "dtype") and hasattr(values, "to_numpy") and not isinstance(values, np.ndarray):
        # pandas Series / Index (nullable dtypes: NA becomes NaN)
        dtype = values.dtype
        kind = getattr(dtype, "kind", "O")
        if kind in "iu" and not values.isna().any():
            arr = values.to_numpy(dtype=np.dtype(kind + str(dtype.itemsize)) if hasattr(dtype, "itemsize") else None)
        elif kind in "iufb":
            arr = values.to_numpy(dtype=np.float64, na_value=np.nan)
        else:
            arr = values.to_numpy()
    else:
        try:
            arr = np.asarray(values)
        except (TypeError, ValueError):  # ragged nesting: numpy cannot make one array of it
            raise TypeError(f"{parameter} must be a 1-D sequence of numbers; got nested or ragged values") from None
    if arr.ndim == 0:
        arr = arr.reshape(1)
    if arr.ndim != 1:
        raise ValueError(f"{parameter} must be one-dimensional, got shape {arr.shape}")
    if arr.dtype == bool:
        arr = arr.astype(np.int8)
    if arr.dtype.kind == "c":
        raise TypeError(f"{parameter} holds complex numbers; bin edges need real numbers (complex values have no order)")
    if arr.dtype.kind in "mM":
        raise TypeError(
            f"{parameter} holds {arr.dtype} values; bin_edges works on numbers. "
            "Use infoscope.encode_column, which bins datetimes and durations on their time axis"
        )
    if arr.dtype.kind not in "iuf":
        try:
            arr = arr.astype(np.float64)
        except (TypeError, ValueError):
            raise TypeError(f"{parameter} must be numeric, got dtype {arr.dtype}") from None
    return arr
