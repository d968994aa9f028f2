"""The functional API on samples: entropy, mutual information and relatives of columns.

Each function takes one or more columns of samples (lists, NumPy arrays, pandas or
Polars Series), turns them into a count table and hands the table to the
estimators in :mod:`infoscope.estimators`.

How values are read
-------------------
* Values are **labels** unless ``bins=`` is given: ``[1.5, 1.5, 2.0]`` has two
  symbols, whatever their distance.  A float column in which almost every value is
  distinct is almost surely continuous; reading it as labels makes every row its own
  symbol, so a :class:`~infoscope.DataQualityWarning` says so (pass ``bins=``, or
  ``estimator="ksg"`` for mutual information).
* With ``bins=``, numeric, datetime and duration columns are binned by
  :func:`infoscope.encode.columns.encode_column` (the binning the profile uses;
  a column with few distinct values is binned too, since bins were asked for);
  text, categorical and boolean columns stay labels.
* Missing values (None, NaN, NA, NaT; ±inf too, with a warning) follow ``missing``:
  ``"drop"`` keeps the rows where every column involved is present
  (pairwise-complete), ``"category"`` makes missing a symbol of its own, and
  ``"error"`` raises if any value is missing.
* The alphabet of a label column is the set of its distinct present values (so the
  estimators that use the alphabet size K, such as ``james_stein``, see that K); a
  binned column has one symbol per bin.

Columns are paired by position (row i with row i); the index of a pandas Series
is ignored.  The user's data are never modified.

The code: :mod:`._samples` (values -> codes -> count tables), :mod:`.entropies`,
:mod:`.information` (the MI family and the G-test).
"""
from __future__ import annotations

from infoscope.measures._samples import KNN_ESTIMATORS, MISSING_POLICIES  # noqa: F401
from infoscope.measures.entropies import conditional_entropy, entropy, joint_entropy
from infoscope.measures.information import (
    adjusted_mutual_information,
    co_information,
    conditional_mutual_information,
    g_test,
    mutual_information,
    normalized_mutual_information,
    total_correlation,
    variation_of_information,
)

__all__ = [
    "MISSING_POLICIES",
    "adjusted_mutual_information",
    "co_information",
    "conditional_entropy",
    "conditional_mutual_information",
    "entropy",
    "g_test",
    "joint_entropy",
    "mutual_information",
    "normalized_mutual_information",
    "total_correlation",
    "variation_of_information",
]
