"""What an encoder accepts: the checks of its settings and of the values of one column."""
from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pandas as pd

from infoscope.encode import binning
from infoscope.encode.drafts import DEFAULT_CATEGORICAL_THRESHOLD


def _time_edges(bins):
    """Datetime-like edges (Timestamps, DatetimeIndex, zoned or not) as datetime64 (zoned: UTC)."""
    if isinstance(bins, (str, int, np.integer, float)) or (isinstance(bins, np.ndarray) and bins.dtype != object):
        return bins
    try:
        idx = pd.Index(bins)
    except (TypeError, ValueError):
        return bins
    if isinstance(idx.dtype, pd.DatetimeTZDtype):
        return idx.tz_convert("UTC").tz_localize(None).to_numpy()
    if idx.dtype.kind in "mM":
        return idx.to_numpy()
    return bins


def _check_settings(bins, strategy, missing, max_categories, categorical_threshold):
    bins = binning._check_bins(_time_edges(bins))
    strategy = binning._check_strategy(strategy)
    if not isinstance(missing, str) or missing not in ("drop", "category"):
        raise ValueError(f"missing={missing!r} is not valid; choose one of: 'drop', 'category'")
    if max_categories is not None:
        if isinstance(max_categories, bool) or not isinstance(max_categories, (int, np.integer)):
            raise TypeError(f"max_categories must be an integer or None, got {type(max_categories).__name__}")
        if max_categories < 2:
            raise ValueError(f"max_categories={max_categories} is invalid: it must be >= 2 (or None for no folding)")
        max_categories = int(max_categories)
    if categorical_threshold is None:
        categorical_threshold = DEFAULT_CATEGORICAL_THRESHOLD
    if isinstance(categorical_threshold, bool) or not isinstance(categorical_threshold, (int, np.integer)):
        raise TypeError(f"categorical_threshold must be an integer, got {type(categorical_threshold).__name__}")
    if categorical_threshold < 0:
        raise ValueError(f"categorical_threshold={categorical_threshold} is invalid: it must be >= 0")
    if isinstance(bins, np.ndarray):
        bins_key = ("edges", str(bins.dtype), tuple(bins.tolist()))
    else:
        bins_key = bins
    settings = (
        ("bins", bins_key),
        ("strategy", strategy),
        ("missing", missing),
        ("max_categories", max_categories),
        ("categorical_threshold", int(categorical_threshold)),
    )
    return bins, strategy, missing, max_categories, int(categorical_threshold), settings


def _nullable_integer(dtype):
    """pyarrow integer type -> pandas nullable integer dtype (``types_mapper`` of ``to_pandas``)."""
    import pyarrow as pa

    if pa.types.is_integer(dtype):
        return pd.api.types.pandas_dtype(str(dtype).replace("int", "Int").replace("uInt", "UInt"))
    return None


def _polars_to_pandas(obj):
    """A Polars DataFrame / Series as pandas, integers with missing values kept exact.

    ``to_pandas()`` turns a Polars integer column with nulls into float64, which
    rounds integers beyond 2**53 (``2**60 + 1`` becomes ``2**60``); such columns
    are converted to pandas' nullable integers instead.  Everything else is
    Polars' own conversion.
    """
    import polars as pl

    if isinstance(obj, pl.Series):
        if obj.dtype.is_integer() and obj.null_count():
            return obj.to_pandas(types_mapper=_nullable_integer)
        return obj.to_pandas()
    out = obj.to_pandas()
    for i, (name, dtype) in enumerate(obj.schema.items()):
        column = obj.get_column(name)
        if dtype.is_integer() and column.null_count():
            out.isetitem(i, column.to_pandas(types_mapper=_nullable_integer).array)
    return out


def _as_series(values, name: str) -> pd.Series:
    """A pandas Series over ``values`` without copying NumPy data (never written to)."""
    if isinstance(values, pd.Series):
        return values
    if isinstance(values, pd.DataFrame):
        raise ValueError(f"column {name!r}: expected one column, got a DataFrame with {values.shape[1]} columns")
    if isinstance(values, (pd.Index, pd.api.extensions.ExtensionArray)):
        return pd.Series(values, copy=False)
    if not isinstance(values, np.ndarray) and hasattr(values, "to_pandas"):
        # Polars Series, pyarrow (Chunked)Array
        polars = type(values).__module__.split(".")[0] == "polars"
        converted = _polars_to_pandas(values) if polars else values.to_pandas()
        if isinstance(converted, pd.DataFrame):
            raise ValueError(f"column {name!r}: expected one column, got a table")
        return pd.Series(converted, copy=False)
    if isinstance(values, (str, bytes)) or np.isscalar(values) or values is None:
        raise TypeError(f"column {name!r}: expected a sequence of values, got a scalar {type(values).__name__}")
    if isinstance(values, (set, frozenset)):
        raise TypeError(
            f"column {name!r}: expected a sequence in row order, got a {type(values).__name__} "
            "(it has no row order); pass a list, an array or a Series"
        )
    if isinstance(values, Mapping):
        raise TypeError(
            f"column {name!r}: expected a sequence in row order, got a {type(values).__name__}; say "
            "whether its keys or its values are the rows: pass list(d.values()), list(d) or a Series"
        )
    if not isinstance(values, np.ndarray):
        # pandas infers a list's dtype cell by cell (numpy would turn [1, "1"] into
        # two equal strings, and nested lists into a 2-D array)
        try:
            return pd.Series(list(values), dtype=None)
        except TypeError:
            raise TypeError(f"column {name!r}: expected a sequence of values, got {type(values).__name__}") from None
    arr = values
    if arr.ndim != 1:
        raise ValueError(f"column {name!r}: expected a 1-D column, got shape {arr.shape}")
    if arr.dtype.kind in "US":
        arr = arr.astype(object)
    return pd.Series(arr, copy=False)
