"""Out-of-core column specs: what pass 1 knows of a column before reading it, and its values in a batch.

A :class:`ColumnSpec` holds a column's family (from the pandas dtype its batches
will have) and its checked encoding settings; the helpers below read one batch's
values of a column under its spec (numbers, instants, the order-preserving
integer keys the selection rounds count).  The two-pass design is described in
:mod:`infoscope.encode.summaries`.
"""
from __future__ import annotations

import dataclasses
from collections.abc import Mapping

import numpy as np
import pandas as pd

from infoscope.encode import binning
from infoscope.encode.checks import _check_settings
from infoscope.encode.drafts import DEFAULT_CATEGORICAL_THRESHOLD
from infoscope.encode.order_stats import _keys as _float_keys

__all__ = ["LEVEL_CAP", "FAMILIES", "OutOfCoreError", "family_of", "ColumnSpec", "column_specs"]

#: Exact value counts are kept per column up to this many distinct values.
LEVEL_CAP = 1 << 15
#: The kinds of column a batch can hold, from its pandas dtype.
FAMILIES = ("boolean", "integer", "float", "text", "datetime", "timedelta", "categorical")
_RULES_IN_MEMORY = tuple(r for r in binning.BIN_RULES if r != "rows")


class OutOfCoreError(ValueError):
    """A source or a setting that the out-of-core path cannot handle; the message names the column."""


# ----------------------------------------------------------------------------- specs
def family_of(dtype) -> str | None:
    """The column family of a pandas dtype (None: not supported out of core)."""
    if isinstance(dtype, pd.CategoricalDtype):
        return "categorical"
    if isinstance(dtype, pd.BooleanDtype) or dtype == bool:
        return "boolean"
    if isinstance(dtype, pd.ArrowDtype):
        return None
    kind = getattr(dtype, "kind", None)
    if kind in "iu" and kind:
        return "integer"
    if kind == "f":
        return "float"
    if kind == "M":
        return "datetime"
    if kind == "m":
        return "timedelta"
    if isinstance(dtype, pd.StringDtype) or dtype == object:
        return "text"
    return None


@dataclasses.dataclass(frozen=True)
class ColumnSpec:
    """What pass 1 needs to know of one column before reading it: its family and encoding settings."""

    name: str
    family: str
    dtype: object  # integer: the numpy value dtype; datetime / timedelta: the pandas dtype
    bins: object
    strategy: str
    missing: str
    max_categories: int | None
    threshold: int
    settings: tuple
    categories: object = None  # categorical: the pandas CategoricalDtype

    @property
    def cap(self) -> int:
        """Distinct values kept exactly: at least :data:`LEVEL_CAP`, past the threshold, bins and folding."""
        extra = [self.threshold + 1, (self.max_categories or 0) + 1]
        if isinstance(self.bins, (int, np.integer)):
            extra.append(int(self.bins) + 1)
        return max(LEVEL_CAP, *extra)


def column_specs(dtypes: Mapping, *, bins="rows", strategy: str = "quantile", missing: str = "drop",
                 max_categories: int | None = 64, categorical_threshold: int | None = DEFAULT_CATEGORICAL_THRESHOLD,
                 column_bins: Mapping | None = None) -> dict:
    """The :class:`ColumnSpec` of every column, from the pandas dtypes its batches will have.

    Parameters
    ----------
    dtypes : mapping of str to dtype
        Column key -> pandas dtype of its batches (e.g. ``batch.dtypes`` of the first batch).
    bins, strategy, missing, max_categories, categorical_threshold
        As for :func:`~infoscope.encode_column`; ``bins`` must be an integer,
        ``"rows"`` or explicit edges (the width rules read every value at once).
    column_bins : mapping, optional
        Per-column ``bins`` overrides.

    Returns
    -------
    dict of str to ColumnSpec

    Raises
    ------
    OutOfCoreError
        A dtype that cannot be summarised, or a rule that needs all values in memory;
        the message names the column.

    Examples
    --------
    >>> import pandas as pd
    >>> specs = column_specs({"x": pd.Series([1.5]).dtype, "c": pd.Series(["a"]).dtype})
    >>> specs["x"].family, specs["c"].family
    ('float', 'text')
    """
    column_bins = dict(column_bins or {})
    out = {}
    for name, dtype in dtypes.items():
        family = family_of(dtype)
        if family is None:
            raise OutOfCoreError(
                f"column {name!r}: dtype {dtype} cannot be profiled out of core; cast it to a number, "
                "text or time type in the source, or profile a sample (sample=)")
        col_bins = column_bins.get(name, bins)
        if isinstance(col_bins, str) and col_bins.strip().lower() in (*_RULES_IN_MEMORY, "mdlp"):
            raise OutOfCoreError(
                f"column {name!r}: bins={col_bins!r} needs every value of the column in memory at once; "
                "out of core use a number of bins, 'rows' or explicit edges, or profile a sample (sample=)")
        b, s, m, mc, thr, settings = _check_settings(col_bins, strategy, missing, max_categories,
                                                     categorical_threshold)
        value_dtype = dtype
        if family == "integer":
            value_dtype = np.dtype(dtype.numpy_dtype if not isinstance(dtype, np.dtype) else dtype)
        out[name] = ColumnSpec(name, family, value_dtype, b, s, m, mc, thr, settings,
                               dtype if family == "categorical" else None)
    return out


# ----------------------------------------------------------------------------- values of a batch
def _same_family(series: pd.Series, spec: ColumnSpec) -> None:
    family = family_of(series.dtype)
    if spec.family == "text" and family == "categorical":
        return  # dictionary-encoded text (arrow) arrives as a Categorical: read as its values
    ok = family == spec.family
    if ok and spec.family == "integer":
        dt = series.dtype
        ok = np.dtype(dt.numpy_dtype if not isinstance(dt, np.dtype) else dt) == spec.dtype
    if ok and spec.family in ("datetime", "timedelta"):
        ok = series.dtype == spec.dtype
    if ok and spec.family == "categorical":
        ok = series.dtype == spec.categories
    if not ok:
        raise OutOfCoreError(
            f"column {spec.name!r}: a batch has dtype {series.dtype} but the column was planned as "
            f"{spec.dtype if spec.family != 'categorical' else spec.categories} ({spec.family}); "
            "the parts of the source disagree on its type")


def _numbers(series: pd.Series, spec: ColumnSpec):
    """``(values in the column's numeric domain, missing mask, n +inf, n -inf)`` of a number column."""
    dtype = series.dtype
    if spec.family == "integer":
        if isinstance(dtype, np.dtype):
            return series.to_numpy(), np.zeros(len(series), dtype=bool), 0, 0
        na = series.isna().to_numpy(dtype=bool)
        return series.to_numpy(dtype=spec.dtype, na_value=0), na, 0, 0
    if isinstance(dtype, np.dtype):
        x = series.to_numpy()
        if x.dtype != np.float64:
            x = x.astype(np.float64)
        missing = np.isnan(x)
    else:
        x = series.to_numpy(dtype=np.float64, na_value=np.nan)
        missing = np.isnan(x)
    inf = np.isinf(x)
    n_pos = n_neg = 0
    if inf.any():
        n_pos = int(np.count_nonzero(inf & (x > 0)))
        n_neg = int(np.count_nonzero(inf)) - n_pos
        missing = missing | inf
    return x, missing, n_pos, n_neg


def _instants(series: pd.Series) -> tuple[np.ndarray, np.ndarray]:
    """int64 instants (UTC for zoned datetimes) or durations, and the missing mask."""
    if getattr(series.dtype, "tz", None) is not None:
        series = series.dt.tz_convert("UTC").dt.tz_localize(None)
    arr = series.to_numpy()
    return arr.view(np.int64), np.isnat(arr)


def _time_unit(spec: ColumnSpec) -> str:
    dtype = spec.dtype
    if getattr(dtype, "tz", None) is not None:
        return dtype.unit
    return np.datetime_data(np.dtype(dtype))[0]


def _keys(v: np.ndarray) -> np.ndarray:
    """Order-preserving uint64 keys of numbers (floats by their bits, signed ints by a flipped sign bit)."""
    if v.dtype.kind == "f":
        return _float_keys(v)
    if v.dtype.kind == "u":
        return v.astype(np.uint64)
    return v.astype(np.int64).view(np.uint64) ^ np.uint64(1 << 63)


def _from_keys(keys: np.ndarray, like: np.dtype) -> np.ndarray:
    keys = np.asarray(keys, dtype=np.uint64)
    if like.kind == "f":
        negative = (keys >> np.uint64(63)) == 0
        bits = np.where(negative, ~keys, keys & np.uint64((1 << 63) - 1))
        return bits.view(np.float64)
    if like.kind == "u":
        return keys.astype(like)
    return (keys ^ np.uint64(1 << 63)).view(np.int64).astype(like)

