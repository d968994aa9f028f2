"""Shared input checks for the estimators (numpy only).

Every public estimator validates its arguments here, so that the error messages are
the same everywhere and name the parameter at fault.
"""
from __future__ import annotations

import math
import numbers
from collections.abc import Iterable

import numpy as np

# Accepted spellings of the logarithm base.  "bits"/"nats"/"hartleys" are the units.
_UNIT_NAMES = {"bits": 2.0, "bit": 2.0, "nats": math.e, "nat": math.e, "hartleys": 10.0, "hartley": 10.0}
UNIT_OF_BASE = {2.0: "bits", math.e: "nats", 10.0: "hartleys"}


def log_base(base) -> float:
    """Return ln(base), the divisor that turns nats into the requested unit.

    ``base`` may be a positive number other than 1, or one of the strings
    ``"bits"``, ``"nats"``, ``"hartleys"``.
    """
    if isinstance(base, str):
        key = base.strip().lower()
        if key not in _UNIT_NAMES:
            raise ValueError(
                f"base={base!r} is not a known unit; use a number > 0 other than 1, "
                "or one of 'bits', 'nats', 'hartleys'"
            )
        return math.log(_UNIT_NAMES[key])
    if isinstance(base, bool) or not isinstance(base, (int, float, np.integer, np.floating)):
        raise TypeError(f"base must be a number or a unit name, got {type(base).__name__}")
    b = float(base)
    if not math.isfinite(b) or b <= 0 or b == 1:
        raise ValueError(f"base={base!r} is invalid: the base of a logarithm must be > 0 and != 1")
    return math.log(b)


def unit_name(base) -> str:
    """A readable unit for ``base`` ("bits", "nats", "hartleys" or "log base b")."""
    b = math.exp(log_base(base))
    for known, name in UNIT_OF_BASE.items():
        if math.isclose(b, known, rel_tol=1e-12):
            return name
    return f"log base {b:g}"


def check_choice(value, valid: Iterable[str], parameter: str) -> str:
    """Return ``value`` if it is one of ``valid``; otherwise raise, listing the valid ones."""
    valid = list(valid)
    if not isinstance(value, str) or value not in valid:
        raise ValueError(f"{parameter}={value!r} is not valid; choose one of: {', '.join(map(repr, valid))}")
    return value


def numeric_array(values, parameter: str, *, shape_words: str, dtype_words: str) -> np.ndarray:
    """``np.asarray(values)`` if it is numeric (or boolean); otherwise a TypeError naming ``parameter``.

    The messages read "<parameter> must be <shape_words>; got nested or ragged values"
    and "<parameter> must be <dtype_words>, got dtype <dtype>".
    """
    try:
        arr = np.asarray(values)
    except (TypeError, ValueError):  # ragged nesting: numpy cannot make one array of it
        raise TypeError(f"{parameter} must be {shape_words}; got nested or ragged values") from None
    if arr.dtype == object or not (np.issubdtype(arr.dtype, np.number) or arr.dtype == bool):
        raise TypeError(f"{parameter} must be {dtype_words}, got dtype {arr.dtype}")
    return arr


def check_counts(counts, parameter: str = "counts", *, ndim: int | None = 1) -> np.ndarray:
    """Validate a vector (or table) of counts: finite, >= 0, whole numbers.

    Returns a float64 array (float so that huge totals do not overflow and the
    estimators can work without casting); the values are exactly integral.
    """
    arr = numeric_array(counts, parameter, shape_words="a rectangular array of counts", dtype_words="numeric counts")
    if ndim is not None and arr.ndim != ndim:
        shape = "a 1-D vector" if ndim == 1 else f"a {ndim}-D table"
        raise ValueError(f"{parameter} must be {shape}, got shape {arr.shape}")
    arr = arr.astype(np.float64, copy=False)
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{parameter} contains NaN or infinite values")
    if np.any(arr < 0):
        raise ValueError(f"{parameter} contains negative values; counts must be >= 0")
    if np.any(arr != np.round(arr)):
        raise ValueError(
            f"{parameter} contains non-integer values; pass counts (or use a probability "
            "function such as kl_divergence for probability vectors)"
        )
    return arr



def check_observed_counts(counts, parameter: str = "counts", *, ndim: int | None = 1) -> np.ndarray:
    """:func:`check_counts`, and at least one symbol and one observation (what an estimate needs)."""
    arr = check_counts(counts, parameter, ndim=ndim)
    if arr.size == 0:
        raise ValueError(f"{parameter} is empty: pass one count per possible symbol (K >= 1)")
    if arr.sum() == 0:
        raise ValueError(f"{parameter} has no observations (every count is 0): the estimate is undefined")
    return arr

def check_table(table, parameter: str = "table", ndim: int | None = 2, *, allow_empty: bool = False) -> np.ndarray:
    """Validate a count table (any number of axes with ``ndim=None``): as :func:`check_counts`, and not all 0.

    ``allow_empty=True`` lets a table with no observations through (a batch of tests
    gives it p = NaN instead of stopping).
    """
    if not isinstance(table, np.ndarray):
        try:
            table = np.asarray(table)
        except (TypeError, ValueError):  # ragged rows: numpy cannot make one array of them
            raise TypeError(f"{parameter} must be a rectangular table of counts; its rows differ in length") from None
    arr = check_counts(table, parameter, ndim=ndim)
    if ndim is None and arr.ndim < 1:
        raise ValueError(f"{parameter} must have at least one axis, got a scalar")
    if not allow_empty and arr.sum() <= 0:
        raise ValueError(f"{parameter} has no observations (all counts are 0)")
    return arr


def check_probabilities(p, parameter: str = "p", *, atol: float = 1e-9) -> np.ndarray:
    """Validate a probability vector: finite, >= 0, summing to 1 within ``atol``."""
    try:
        arr = np.asarray(p, dtype=np.float64)
    except (TypeError, ValueError):
        raise TypeError(f"{parameter} must be a flat vector of probabilities; got nested, ragged or non-numeric values") from None
    if arr.ndim != 1:
        raise ValueError(f"{parameter} must be a 1-D vector, got shape {arr.shape}")
    if not np.all(np.isfinite(arr)) or np.any(arr < 0):
        raise ValueError(f"{parameter} must hold finite, non-negative probabilities")
    total = arr.sum()
    if not math.isclose(total, 1.0, abs_tol=atol):
        raise ValueError(f"{parameter} sums to {total:.6g}, not 1; pass counts or normalise it")
    return arr


def check_same_length(**arrays) -> int:
    """Raise if the named 1-D sequences differ in length; return the common length."""
    lengths = {name: len(a) for name, a in arrays.items()}
    if len(set(lengths.values())) > 1:
        detail = ", ".join(f"{k} has {v}" for k, v in lengths.items())
        raise ValueError(f"inputs must have the same length: {detail}")
    return next(iter(lengths.values())) if lengths else 0


def check_level(level) -> float:
    """Return ``level`` as a float if it is a confidence level in (0, 1); otherwise raise."""
    if isinstance(level, bool) or not isinstance(level, numbers.Real):
        raise TypeError(f"level must be a number in (0, 1), got {type(level).__name__}")
    value = float(level)
    if not 0.0 < value < 1.0:
        raise ValueError(f"level={level!r} is invalid: the confidence level must be in (0, 1), e.g. 0.95")
    return value


def check_positive_int(value, parameter: str) -> int:
    """Return ``value`` as an int if it is a whole number >= 1 (not a bool); otherwise raise."""
    if isinstance(value, bool) or not isinstance(value, numbers.Integral):
        raise TypeError(f"{parameter} must be a whole number >= 1, got {type(value).__name__}")
    if value < 1:
        raise ValueError(f"{parameter}={value!r} is invalid: it must be >= 1")
    return int(value)


def check_nonnegative(value, parameter: str) -> float:
    """Return ``value`` as a float if it is a finite real number >= 0 (not a bool); otherwise raise."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise TypeError(f"{parameter} must be a number >= 0, got {type(value).__name__}")
    number = float(value)
    if not math.isfinite(number) or number < 0:
        raise ValueError(f"{parameter}={value!r} is invalid: it must be a finite number >= 0")
    return number
