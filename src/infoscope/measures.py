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
"""
from __future__ import annotations

import math
import numbers
from collections.abc import Mapping

import numpy as np

from infoscope._warnings import DataQualityWarning, SmallSampleWarning, warn_user
from infoscope.estimators import information as _info
from infoscope.estimators._checks import check_choice, check_same_length, log_base

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

#: Accepted values of ``missing=``.
MISSING_POLICIES = ("drop", "category", "error")

#: Estimators of mutual information on continuous samples (k nearest neighbours).
KNN_ESTIMATORS = {"ksg": 1, "ksg2": 2}

# Joint tables bigger than this many cells are refused (a 2**25-cell table of int64
# counts takes 256 MiB): such a table comes from ID-like columns, and the estimate on
# it would be meaningless anyway.
_MAX_TABLE_CELLS = 2**25

# Fewer rows than this per cell of a joint table, on average, make the plug-in MI
# strongly biased and the chi-square approximation of the G-test poor (common
# practice for chi-square style tables; the frame layer flags such pairs "sparse").
_SPARSE_CELL_COUNT = 5.0

# A float column with at least this share of distinct values (and at least this many
# rows) looks continuous when read as labels.
_CONTINUOUS_SHARE = 0.5
_CONTINUOUS_MIN_ROWS = 20


class _Coded:
    """Integer codes of one column: ``codes`` in 0..k-1, ``present`` False where missing."""

    __slots__ = ("name", "codes", "k", "present")

    def __init__(self, name: str, codes: np.ndarray, k: int, present: np.ndarray):
        self.name, self.codes, self.k, self.present = name, codes, k, present


def _describe(values, parameter: str) -> str:
    """``parameter`` plus the Series name if there is one, for error messages."""
    label = getattr(values, "name", None)
    if isinstance(label, str) and label and label != parameter:
        return f"{parameter} ({label!r})"
    return parameter


def _to_series(values, name: str):
    import pandas as pd

    if isinstance(values, pd.DataFrame):
        if values.shape[1] != 1:
            raise ValueError(f"{name} must be one column, got a DataFrame with {values.shape[1]} columns")
        values = values.iloc[:, 0]
    if isinstance(values, pd.Series):
        return values.reset_index(drop=True)
    if isinstance(values, (pd.Index, pd.Categorical, pd.api.extensions.ExtensionArray)):
        return pd.Series(values)
    if isinstance(values, (str, bytes)) or np.isscalar(values) or values is None:
        raise TypeError(f"{name} must be a 1-D sequence of values, got a single {type(values).__name__}")
    if isinstance(values, (set, frozenset)):
        raise TypeError(
            f"{name} must be a sequence in row order, got a {type(values).__name__} (it has no row "
            "order to pair with other columns); pass a list, an array or a Series"
        )
    if isinstance(values, Mapping):
        raise TypeError(
            f"{name} must be a sequence in row order, got a {type(values).__name__}; say whether its "
            "keys or its values are the rows: pass list(d.values()), list(d) or a Series"
        )
    if not isinstance(values, np.ndarray) and hasattr(values, "to_numpy"):  # Polars and friends
        values = values.to_numpy()
    if not isinstance(values, np.ndarray):
        try:
            cells = list(values)
        except TypeError:
            raise TypeError(f"{name} must be a 1-D sequence of values, got {type(values).__name__}") from None
        # One cell per item, whatever it holds: numpy would turn a list of tuples (or of
        # equally long lists) into a 2-D array, or fail on ragged ones.
        return pd.Series(cells, dtype=object).infer_objects()
    arr = values
    if arr.ndim == 2 and arr.shape[1] == 1:
        arr = arr[:, 0]
    if arr.ndim != 1:
        raise ValueError(f"{name} must be 1-D (one value per row), got shape {arr.shape}")
    series = pd.Series(arr)
    return series.infer_objects() if series.dtype == object else series


def _label_codes(present_values, name: str, stacklevel: int = 5) -> tuple[np.ndarray, int]:
    """Codes 0..k-1 of present label values (a Series without missing rows), and k.

    Object columns get two policies of :func:`infoscope.encode.columns.encode_column`,
    so that the functional API and the profile read a column the same way: unhashable
    cells (lists, dicts, arrays) are read by a stable text form of their contents, and
    values of different types that Python counts as equal (``1``, ``1.0``, ``True``)
    stay different labels.  Each is announced with a DataQualityWarning.
    """
    import pandas as pd

    homogeneous = ("string", "bytes", "integer", "floating", "boolean", "datetime", "date", "timedelta")
    if (
        present_values.dtype != object
        or len(present_values) == 0
        or pd.api.types.infer_dtype(present_values, skipna=False) in homogeneous  # one kind, hashable: no per-cell pass
    ):
        try:
            codes, uniques = pd.factorize(present_values, use_na_sentinel=True)
            return codes.astype(np.int64, copy=False), len(uniques)
        except (TypeError, NotImplementedError):
            # nested Arrow types (lists, structs) have no hash kernel: read their cells
            present_values = pd.Series(present_values.to_numpy(dtype=object), dtype=object)
    from infoscope.encode.columns import _hashable, _plain, _stable_text

    cells = np.frompyfunc(_plain, 1, 1)(present_values.to_numpy(dtype=object))
    types = np.frompyfunc(type, 1, 1)(cells)
    type_codes, type_list = pd.factorize(types)
    first = np.zeros(len(type_list), dtype=np.intp)
    first[type_codes[::-1]] = np.arange(len(type_codes))[::-1]  # first cell of each type
    bad_types = [i for i in range(len(type_list)) if not _hashable(cells[first[i]])]
    if bad_types:
        bad = np.isin(type_codes, bad_types)
        names = ", ".join(sorted(type_list[i].__name__ for i in bad_types))
        warn_user(
            f"{name} has {int(bad.sum())} unhashable cell(s) ({names}); they are read as labels "
            "by a stable text form of their contents",
            DataQualityWarning,
        )
        cells = cells.copy()
        # a (type, text) tuple never equals a string cell of the same text
        cells[bad] = np.frompyfunc(lambda v: (type(v).__name__, _stable_text(v)), 1, 1)(cells[bad])
    codes, uniques = pd.factorize(pd.Series(cells, dtype=object), use_na_sentinel=True)
    if len(type_list) > 1:
        pairs, pair_uniques = pd.factorize(codes.astype(np.int64) * len(type_list) + type_codes)
        if len(pair_uniques) > len(uniques):
            warn_user(
                f"{name} holds values of different types that compare equal (such as 1, 1.0 and "
                "True); they are kept apart as different labels",
                DataQualityWarning,
            )
            return pairs.astype(np.int64, copy=False), len(pair_uniques)
    return codes.astype(np.int64, copy=False), len(uniques)


def _is_numeric(series) -> bool:
    import pandas as pd

    dtype = series.dtype
    return (
        pd.api.types.is_numeric_dtype(dtype)
        and not pd.api.types.is_bool_dtype(dtype)
        and not pd.api.types.is_complex_dtype(dtype)  # complex numbers are labels: no order to bin by
        and not isinstance(dtype, pd.CategoricalDtype)
    )


def _is_binnable(series) -> bool:
    import pandas as pd

    dtype = series.dtype
    return _is_numeric(series) or pd.api.types.is_datetime64_any_dtype(dtype) or pd.api.types.is_timedelta64_dtype(dtype)


def _missing_mask(series, name: str, stacklevel: int = 5) -> np.ndarray:
    mask = np.array(series.isna(), dtype=bool)  # a writable copy
    if _is_numeric(series):
        with np.errstate(invalid="ignore"):
            inf = np.isinf(series.to_numpy(dtype=np.float64, na_value=np.nan))
        if inf.any():
            warn_user(
                f"{name} has {int(inf.sum())} infinite value(s); they are treated as missing",
                DataQualityWarning,
            )
            mask |= inf
    return mask


def _warn_if_continuous(series, present: np.ndarray, n_distinct: int, name: str) -> None:
    import pandas as pd

    n = int(present.sum())
    if n < _CONTINUOUS_MIN_ROWS or not pd.api.types.is_float_dtype(series.dtype):
        return
    values = series.to_numpy(dtype=np.float64, na_value=np.nan)[present]
    if n_distinct >= _CONTINUOUS_SHARE * n and np.any(values != np.round(values)):
        warn_user(
            f"{name} looks continuous ({n_distinct} distinct values in {n} rows) but is read as "
            "labels, so nearly every row is its own symbol; pass bins= to bin it "
            "(or estimator='ksg' for mutual information)",
            DataQualityWarning,
        )


def _code_column(series, name: str, *, bins, strategy, missing) -> _Coded:
    import pandas as pd

    if bins is not None and _is_binnable(series):
        from infoscope.encode.columns import encode_column

        # categorical_threshold=0: the caller asked for bins, so a column with few
        # distinct values is binned too (the profile reads those as categories).
        enc = encode_column(
            series, name=name, bins=bins, strategy=strategy, missing="drop", categorical_threshold=0
        )
        codes = np.asarray(enc.codes).astype(np.int64)
        present = codes < enc.k
        k = int(enc.k)
    else:
        present = ~_missing_mask(series, name)
        codes = np.zeros(len(series), dtype=np.int64)
        if present.any():
            codes[present], k = _label_codes(series[present], name)
        else:
            k = 0
        if bins is None:
            _warn_if_continuous(series, present, k, name)
    if not present.all():
        if missing == "error":
            first = int(np.flatnonzero(~present)[0])
            raise ValueError(
                f"{name} has {int((~present).sum())} missing value(s) (first at row {first}) "
                "and missing='error'; use missing='drop' or missing='category'"
            )
        if missing == "category":
            codes = codes.copy()
            codes[~present] = k  # missing becomes one more symbol
            k += 1
            present = np.ones(len(codes), dtype=bool)
    return _Coded(name, codes, k, present)


def _check_common(missing, bins, strategy) -> None:
    check_choice(missing, MISSING_POLICIES, "missing")
    check_choice(strategy, ("uniform", "quantile"), "strategy")
    if bins is not None and (isinstance(bins, bool) or (isinstance(bins, numbers.Integral) and bins < 1)):
        raise ValueError(f"bins={bins!r} is invalid: give a number of bins >= 1, a rule name or edges")


def _coded_columns(named, *, bins, strategy, missing) -> list[_Coded]:
    _check_common(missing, bins, strategy)
    described = [(_describe(v, p), p, v) for p, v in named]
    prepared = [(name, p, _to_series(v, name)) for name, p, v in described]
    n = check_same_length(**{p: series for _, p, series in prepared})
    if n == 0:
        raise ValueError(f"{' and '.join(p for p, _ in named)} {'is' if len(named) == 1 else 'are'} empty (no rows)")
    coded = []
    for name, _, series in prepared:  # a loop, not a comprehension: warning stack levels count frames
        coded.append(_code_column(series, name, bins=bins, strategy=strategy, missing=missing))
    return coded


def _table(cols: list[_Coded]) -> np.ndarray:
    """Joint count table of the coded columns over the rows where all are present."""
    shape = tuple(max(c.k, 1) for c in cols)
    cells = math.prod(shape)
    names = _join(cols)
    if cells > _MAX_TABLE_CELLS:
        sizes = ", ".join(f"{c.name}: {c.k}" for c in cols)
        raise ValueError(
            f"the joint table of {names} would have {cells:,} cells ({sizes} symbols); "
            "bin numeric columns (bins=) or fold rare levels first"
        )
    keep = np.logical_and.reduce([c.present for c in cols])
    if not keep.any():
        verb = "is present" if len(cols) == 1 else "are all present"
        raise ValueError(f"no rows left: there is no row where {names} {verb}")
    flat = np.ravel_multi_index(tuple(c.codes[keep] for c in cols), shape)
    return np.bincount(flat, minlength=cells).reshape(shape)


def _join(cols: list[_Coded]) -> str:
    names = [c.name for c in cols]
    return names[0] if len(names) == 1 else ", ".join(names[:-1]) + " and " + names[-1]


def _warn_if_sparse(table: np.ndarray, cols: list[_Coded], what: str) -> None:
    n = int(table.sum())
    if n < _SPARSE_CELL_COUNT * table.size:
        names = _join(cols)
        warn_user(
            f"the joint table of {names} has {table.size} cells for {n} rows "
            f"({n / table.size:.2g} per cell on average, fewer than 5): {what}",
            SmallSampleWarning,
        )


def _weights_for(weights, n: int) -> np.ndarray:
    """Validated observation weights of ``n`` rows (a float64 copy; the user's array is not touched)."""
    from infoscope.estimators.multivariate import check_weights

    w = check_weights(np.asarray(_to_series(weights, "weights").to_numpy(dtype=np.float64, na_value=np.nan)))
    if w.size != n:
        raise ValueError(f"weights has {w.size} values for {n} rows; give one weight per row")
    return w


def _weighted_estimate(cols: list[_Coded], w: np.ndarray, estimator: str, alpha, base, entropies, *, clip: bool):
    """A :class:`WeightedEstimate` of ``sum(sign * H(axes))`` over the weighted joint table.

    ``entropies`` lists ``(sign, axes)``: the estimate is that signed sum of the
    entropies of the margins on ``axes``, each corrected at Kish's effective sample
    size of the rows where every column is present.
    """
    from infoscope.estimators.multivariate import (
        WEIGHTED_ESTIMATORS,
        WeightedEstimate,
        entropy_of_weighted_table,
    )

    if estimator not in WEIGHTED_ESTIMATORS:
        raise ValueError(
            f"estimator={estimator!r} does not accept weights (its formula needs whole counts); "
            f"use one of: {', '.join(map(repr, WEIGHTED_ESTIMATORS))}"
        )
    shape = tuple(max(c.k, 1) for c in cols)
    if math.prod(shape) > _MAX_TABLE_CELLS:
        _table(cols)  # raises the size error
    keep = np.logical_and.reduce([c.present for c in cols]) & (w > 0)
    if not keep.any():
        raise ValueError(f"no rows left: there is no row of {_join(cols)} with a positive weight")
    wk = w[keep]
    flat = np.ravel_multi_index(tuple(c.codes[keep] for c in cols), shape)
    table = np.bincount(flat, weights=wk, minlength=math.prod(shape)).reshape(shape)
    n_eff = float(wk.sum()) ** 2 / float(np.dot(wk, wk))
    if n_eff < _SPARSE_CELL_COUNT * table.size:
        warn_user(
            f"the weighted joint table of {_join(cols)} has {table.size} cells for an effective "
            f"sample size of {n_eff:.4g} rows (Kish; {int(keep.sum())} rows): the estimate is "
            "unreliable (use fewer bins or levels)",
            SmallSampleWarning,
        )
    d = table.ndim
    nats = 0.0
    for sign, axes in entropies:
        drop = tuple(a for a in range(d) if a not in axes)
        margin = table.sum(axis=drop) if drop else table
        nats += sign * entropy_of_weighted_table(margin, n_eff, estimator=estimator, alpha=alpha)
    if clip and estimator == "plugin":
        nats = nats if nats > 0 else 0.0  # a KL divergence: a negative is rounding
    return WeightedEstimate(nats / log_base(base), n=int(keep.sum()), weight_total=float(wk.sum()),
                            n_effective=n_eff)


def _check_count_estimator(estimator) -> str:
    if estimator in KNN_ESTIMATORS:
        raise ValueError(
            f"estimator={estimator!r} works on continuous samples and is offered only by "
            "mutual_information(); use a count estimator here (e.g. 'miller_madow') with bins="
        )
    return _info._check_estimator(estimator)


# --------------------------------------------------------------------------- entropies
def entropy(values, *, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None,
            weights=None) -> float:
    """Entropy of a sample of a discrete (or binned) variable.

    Parameters
    ----------
    values : array_like of shape (n,)
        The sample: labels of any hashable type, or numbers to bin with ``bins=``.
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``.
    base : float or str, default=2
        Logarithm base or unit name ("bits", "nats", "hartleys").
    bins : int, str or sequence of float, optional
        Bin numeric values: a number of bins, a rule name (``"fd"``, ``"knuth"``, ...)
        or edges (see :func:`infoscope.bin_edges`).  ``None``: values are labels.
    missing : {"drop", "category", "error"}, default="drop"
        What to do with missing values (see the module notes).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.
    weights : array_like of float, shape (n,), optional
        Observation weights (survey or sampling weights), one per row, >= 0.  The
        cell probabilities are the weighted shares; the bias correction uses Kish's
        effective sample size :math:`(\\sum w)^2 / \\sum w^2` of the rows used.  Only
        the estimators of ``infoscope.estimators.multivariate.WEIGHTED_ESTIMATORS``
        (``plugin``, ``miller_madow``, ``james_stein``, ``dirichlet``) accept weights.

    Returns
    -------
    float
        The estimated entropy in the unit of ``base``.  With ``weights`` it is a
        :class:`~infoscope.estimators.multivariate.WeightedEstimate` (a float that
        also carries ``n``, ``weight_total`` and ``n_effective``).

    References
    ----------
    .. [1] Shannon, C. E. (1948). A mathematical theory of communication. Bell
       System Technical Journal, 27(3), 379-423.
    .. [2] Miller, G. A. (1955). Note on the bias of information estimates. In
       H. Quastler (ed.), Information Theory in Psychology, Free Press, 95-100.
    .. [3] Kish, L. (1965). Survey Sampling. Wiley, New York (effective sample size).

    Examples
    --------
    >>> entropy(["a", "b", "a", "b"], estimator="plugin")
    1.0
    >>> h = entropy(["a", "b", "b"] * 10, weights=[2.0, 1.0, 1.0] * 10, estimator="plugin")
    >>> float(h), round(h.n_effective, 4)
    (1.0, 26.6667)
    """
    estimator = _check_count_estimator(estimator)
    (col,) = _coded_columns([("values", values)], bins=bins, strategy=strategy, missing=missing)
    if weights is not None:
        w = _weights_for(weights, len(col.codes))
        return _weighted_estimate([col], w, estimator, alpha, base, [(1, (0,))], clip=False)
    return _info.joint_entropy_from_counts(_table([col]), estimator=estimator, base=base, alpha=alpha)


def joint_entropy(*columns, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None) -> float:
    """Joint entropy of several columns of the same rows.

    Parameters
    ----------
    *columns : array_like of shape (n,)
        Two or more columns (one is allowed: its entropy).
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``; estimators that
        use the alphabet size see the product of the columns' alphabet sizes.
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns (the same for each); ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy; ``"drop"`` keeps rows where every column is present.
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`H(X_1, \\dots, X_d)` in the unit of ``base``.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, ch. 2.

    Examples
    --------
    >>> joint_entropy([0, 0, 1, 1], [0, 1, 0, 1], estimator="plugin")
    2.0
    """
    if not columns:
        raise ValueError("joint_entropy needs at least one column")
    estimator = _check_count_estimator(estimator)
    named = [(f"columns[{i}]", c) for i, c in enumerate(columns)]
    cols = _coded_columns(named, bins=bins, strategy=strategy, missing=missing)
    return _info.joint_entropy_from_counts(_table(cols), estimator=estimator, base=base, alpha=alpha)


def conditional_entropy(y, given, *, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None) -> float:
    """Conditional entropy H(y | given): what is left to know about ``y`` once ``given`` is known.

    Parameters
    ----------
    y : array_like of shape (n,)
        The variable whose remaining uncertainty is measured.
    given : array_like of shape (n,)
        The conditioning variable, same rows as ``y``.
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``.
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (pairwise-complete under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`H(Y \\mid X) = H(X, Y) - H(X)` in the unit of ``base``.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, eq. 2.14.

    Examples
    --------
    >>> conditional_entropy([0, 1, 0, 1], given=["a", "b", "a", "b"], estimator="plugin")
    0.0
    """
    estimator = _check_count_estimator(estimator)
    cols = _coded_columns([("y", y), ("given", given)], bins=bins, strategy=strategy, missing=missing)
    return _info.conditional_entropy_from_table(_table(cols), given_axis=1, estimator=estimator, base=base, alpha=alpha)


# --------------------------------------------------------------------------- MI family
def _knn_mi(x, y, *, algorithm, k, base, missing, discrete, seed) -> float:
    import pandas as pd

    from infoscope.estimators import continuous

    if discrete not in (None, "x", "y", "neither"):
        raise ValueError(f"discrete={discrete!r} is not valid; choose one of: None, 'x', 'y', 'neither'")
    if missing == "category":
        raise ValueError("missing='category' cannot be used with a kNN estimator: continuous values have no missing symbol")
    name_x, name_y = _describe(x, "x"), _describe(y, "y")
    sx, sy = _to_series(x, name_x), _to_series(y, name_y)
    if check_same_length(x=sx, y=sy) == 0:
        raise ValueError("x and y are empty (no rows)")
    if discrete is None:
        dx, dy = not _is_numeric(sx), not _is_numeric(sy)
    else:
        dx, dy = discrete == "x", discrete == "y"
    if dx and dy:
        raise ValueError(
            "x and y are both discrete (non-numeric); a kNN estimator needs a continuous side: "
            "use a count estimator such as estimator='miller_madow'"
        )
    present = ~_missing_mask(sx, name_x, 4) & ~_missing_mask(sy, name_y, 4)
    if not present.all():
        if missing == "error":
            raise ValueError(
                f"x and y have {int((~present).sum())} row(s) with a missing value and missing='error'"
            )
    if not present.any():
        raise ValueError("no rows left: there is no row where x and y are both present")

    def cont(series, name):
        try:
            return series[present].to_numpy(dtype=np.float64)
        except (TypeError, ValueError):
            raise TypeError(f"{name} must be numeric for a kNN estimator; mark it discrete= if it holds labels") from None

    if dx or dy:
        if algorithm != 1:
            raise ValueError("estimator='ksg2' has no mixed discrete/continuous form; use estimator='ksg'")
        xc, yd = (cont(sy, "y"), sx[present]) if dx else (cont(sx, "x"), sy[present])
        labels, _ = _label_codes(yd, name_x if dx else name_y, stacklevel=4)
        return continuous.mixed_mutual_information(xc, labels, k=k, base=base, seed=seed)
    return continuous.ksg_mutual_information(cont(sx, "x"), cont(sy, "y"), k=k, algorithm=algorithm, base=base, seed=seed)


def mutual_information(
    x,
    y,
    *,
    estimator="miller_madow",
    base=2,
    bins=None,
    k=3,
    missing="drop",
    strategy="quantile",
    alpha=None,
    discrete=None,
    seed=0,
    weights=None,
) -> float:
    """Mutual information between two columns of samples.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples (row i of ``x`` goes with row i of ``y``).
    estimator : str, default="miller_madow"
        A count estimator (``"plugin"`` or a name in ``infoscope.ENTROPY_ESTIMATORS``)
        applied to the joint table, or ``"ksg"`` / ``"ksg2"`` for continuous samples
        (Kraskov et al. 2004, algorithm 1 / 2).  With ``"ksg"`` and one discrete side
        (non-numeric values, or as told by ``discrete``), Ross's (2014) mixed
        estimator is used instead.
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns for the count estimators; ``None``: labels.
        Not used by the kNN estimators.
    k : int, default=3
        Number of neighbours of the kNN estimators.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (pairwise-complete under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.
    discrete : {None, "x", "y", "neither"}, optional
        For ``"ksg"``: which side holds labels.  ``None`` decides by dtype
        (numbers are continuous; strings, booleans and categoricals discrete), so
        integer class labels need ``discrete="y"`` (or ``"x"``) to get the mixed
        estimator.
    seed : int, default=0
        Seed of the tie-breaking noise of the kNN estimators.
    weights : array_like of float, shape (n,), optional
        Observation weights, one per row (see :func:`entropy`): the joint table holds
        summed weights and each entropy of :math:`H(X) + H(Y) - H(X, Y)` is corrected
        at Kish's effective sample size of the rows where both are present.  Count
        estimators only.

    Returns
    -------
    float
        The estimate in the unit of ``base``.  Bias-corrected and kNN estimates can be
        slightly negative when the columns are independent; they are returned as
        computed (see :mod:`infoscope.estimators.information`).  With ``weights``
        a :class:`~infoscope.estimators.multivariate.WeightedEstimate` (a float with
        ``n``, ``weight_total`` and ``n_effective``).

    Warns
    -----
    SmallSampleWarning
        With a count estimator, when the joint table has fewer than 5 rows per cell
        on average: the estimate is then strongly biased (upwards for ``"plugin"``).
    DataQualityWarning
        When a float column read as labels looks continuous, or holds infinities.

    Notes
    -----
    Mutual information measures dependence, not cause, and it is an estimate from a
    sample: compare it with its chance level (:func:`adjusted_mutual_information`,
    :func:`g_test`) before reading much into a small value.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, sec. 2.4.
    .. [2] Kraskov, A., Stögbauer, H., & Grassberger, P. (2004). Estimating mutual
       information. Physical Review E, 69, 066138.
    .. [3] Ross, B. C. (2014). Mutual information between discrete and continuous
       data sets. PLoS ONE, 9(2), e87357.

    Examples
    --------
    >>> mutual_information(["a", "a", "b", "b"] * 5, [1, 1, 0, 0] * 5, estimator="plugin")
    1.0
    """
    check_choice(missing, MISSING_POLICIES, "missing")
    if estimator in KNN_ESTIMATORS:
        if weights is not None:
            raise ValueError(f"weights= is not supported by estimator={estimator!r}; use a count estimator with bins=")
        if bins is not None:
            raise ValueError(f"bins= is not used by estimator={estimator!r} (it works on unbinned values); drop bins=")
        log_base(base)
        return _knn_mi(x, y, algorithm=KNN_ESTIMATORS[estimator], k=k, base=base, missing=missing, discrete=discrete, seed=seed)
    estimator = _check_count_estimator(estimator)
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    if weights is not None:
        w = _weights_for(weights, len(cols[0].codes))
        return _weighted_estimate(cols, w, estimator, alpha, base, [(1, (0,)), (1, (1,)), (-1, (0, 1))], clip=True)
    table = _table(cols)
    _warn_if_sparse(table, cols, "the estimate is unreliable (use fewer bins or levels)")
    return _info.mutual_information_from_table(table, estimator=estimator, base=base, alpha=alpha)


def conditional_mutual_information(
    x, y, given, *, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None
) -> float:
    """Conditional mutual information I(x; y | given).

    Parameters
    ----------
    x, y : array_like of shape (n,)
        The two variables.
    given : array_like of shape (n,)
        The conditioning variable.
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``.
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (rows with all three present under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`I(X; Y \\mid Z)` in the unit of ``base``.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, sec. 2.5.

    Examples
    --------
    >>> x, z = [0, 1, 0, 1] * 10, [0, 0, 1, 1] * 10
    >>> round(conditional_mutual_information(x, x, z, estimator="plugin"), 12)
    1.0
    """
    estimator = _check_count_estimator(estimator)
    cols = _coded_columns([("x", x), ("y", y), ("given", given)], bins=bins, strategy=strategy, missing=missing)
    table = _table(cols)
    _warn_if_sparse(table, cols, "the estimate is unreliable (use fewer bins or levels)")
    return _info.conditional_mutual_information_from_table(table, estimator=estimator, base=base, alpha=alpha)


def co_information(x, y, z, *more, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile",
                   alpha=None) -> float:
    """Co-information of three (or more) columns: for three, I(x; y) - I(x; y | z).

    Parameters
    ----------
    x, y, z : array_like of shape (n,)
        The columns (same rows).
    *more : array_like of shape (n,)
        Further columns: the co-information of all of them (Bell 2003).
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``, applied to every
        marginal table.
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (rows where every column is present under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        Positive when the columns share information (redundancy), negative when they
        inform each other only jointly (synergy: ``z = x xor y`` gives -1 bit); see
        :func:`infoscope.estimators.multivariate.co_information_from_table`.

    Warns
    -----
    SmallSampleWarning
        When the joint table has fewer than 5 rows per cell on average.

    References
    ----------
    .. [1] McGill, W. J. (1954). Multivariate information transmission.
       Psychometrika, 19(2), 97-116.
    .. [2] Bell, A. J. (2003). The co-information lattice. Proc. ICA 2003, 921-926.

    Examples
    --------
    >>> x, y = [0, 0, 1, 1] * 20, [0, 1, 0, 1] * 20
    >>> z = [a ^ b for a, b in zip(x, y)]
    >>> round(co_information(x, y, z, estimator="plugin"), 12)
    -1.0
    """
    from infoscope.estimators.multivariate import co_information_from_table

    estimator = _check_count_estimator(estimator)
    named = [("x", x), ("y", y), ("z", z)] + [(f"more[{i}]", c) for i, c in enumerate(more)]
    cols = _coded_columns(named, bins=bins, strategy=strategy, missing=missing)
    table = _table(cols)
    _warn_if_sparse(table, cols, "the estimate is unreliable (use fewer bins or levels)")
    return co_information_from_table(table, estimator=estimator, base=base, alpha=alpha)


def total_correlation(*columns, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile",
                      alpha=None) -> float:
    """Total correlation of two or more columns: sum of their entropies minus their joint entropy.

    Parameters
    ----------
    *columns : array_like of shape (n,)
        Two or more columns of the same rows.
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``.
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (rows where every column is present under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`\\sum_i H(X_i) - H(X_1, \\dots, X_d)` in the unit of ``base``: 0 for
        independent columns; for two columns their mutual information.

    Warns
    -----
    SmallSampleWarning
        When the joint table has fewer than 5 rows per cell on average.

    References
    ----------
    .. [1] Watanabe, S. (1960). Information theoretical analysis of multivariate
       correlation. IBM Journal of Research and Development, 4(1), 66-82.

    Examples
    --------
    >>> bit = [0, 1] * 25
    >>> round(total_correlation(bit, bit, bit, estimator="plugin"), 12)
    2.0
    """
    from infoscope.estimators.multivariate import total_correlation_from_table

    if len(columns) < 2:
        raise ValueError(f"total_correlation needs at least two columns, got {len(columns)}")
    estimator = _check_count_estimator(estimator)
    named = [(f"columns[{i}]", c) for i, c in enumerate(columns)]
    cols = _coded_columns(named, bins=bins, strategy=strategy, missing=missing)
    table = _table(cols)
    _warn_if_sparse(table, cols, "the estimate is unreliable (use fewer bins or levels)")
    return total_correlation_from_table(table, estimator=estimator, base=base, alpha=alpha)


def normalized_mutual_information(
    x, y, *, normalization="arithmetic", estimator="plugin", bins=None, missing="drop", strategy="quantile", alpha=None
) -> float:
    """Normalised mutual information of two columns (unit-free, 0..1 for plug-in).

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    normalization : {"min", "geometric", "arithmetic", "max", "joint"}, default="arithmetic"
        The divisor: ``min(H(X), H(Y))``, ``sqrt(H(X) H(Y))``, ``(H(X)+H(Y))/2``,
        ``max(H(X), H(Y))`` or ``H(X, Y)``.
    estimator : str, default="plugin"
        Entropy estimator for the MI and the normalising entropies.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (pairwise-complete under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        See :func:`infoscope.estimators.information.normalized_mutual_information_from_table`
        (NaN when either column is constant: a column without entropy has no
        share to normalise, so the measure is undefined, never 1 or 0).

    References
    ----------
    .. [1] Kvålseth, T. O. (1987). Entropy and correlation: some comments. IEEE
       Transactions on Systems, Man, and Cybernetics, 17(3), 517-519.
    .. [2] Strehl, A., & Ghosh, J. (2002). Cluster ensembles - a knowledge reuse
       framework for combining multiple partitions. Journal of Machine Learning
       Research, 3, 583-617.

    Examples
    --------
    >>> round(normalized_mutual_information(["a", "a", "b", "b"], [0, 0, 1, 1]), 12)
    1.0
    """
    check_choice(normalization, _info.NORMALIZATIONS, "normalization")
    estimator = _check_count_estimator(estimator)
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    return _info.normalized_mutual_information_from_table(
        _table(cols), normalization=normalization, estimator=estimator, alpha=alpha
    )


def adjusted_mutual_information(x, y, *, normalization="arithmetic", bins=None, missing="drop", strategy="quantile") -> float:
    """Mutual information adjusted for chance (AMI) of two columns.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    normalization : {"min", "geometric", "arithmetic", "max"}, default="arithmetic"
        How the two entropies are averaged in the denominator.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (pairwise-complete under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.

    Returns
    -------
    float
        :math:`(I - E[I]) / (f(H(X), H(Y)) - E[I])`: 1 for identical partitions,
        about 0 for unrelated ones (can be negative).

    References
    ----------
    .. [1] Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic measures
       for clusterings comparison: variants, properties, normalization and
       correction for chance. Journal of Machine Learning Research, 11, 2837-2854.

    Examples
    --------
    >>> round(adjusted_mutual_information([0, 0, 1, 1, 2, 2], ["u", "u", "v", "v", "w", "w"]), 12)
    1.0
    """
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    return _info.adjusted_mutual_information_from_table(_table(cols), normalization=normalization)


def variation_of_information(x, y, *, estimator="plugin", base=2, bins=None, missing="drop", strategy="quantile", alpha=None) -> float:
    """Variation of information H(x | y) + H(y | x), a distance between partitions.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    estimator : str, default="plugin"
        Entropy estimator (the metric properties hold for ``"plugin"``).
    base : float or str, default=2
        Logarithm base or unit name.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (pairwise-complete under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`VI(X, Y) = H(X \\mid Y) + H(Y \\mid X)` in the unit of ``base``; 0 when
        each column determines the other.

    References
    ----------
    .. [1] Meilă, M. (2007). Comparing clusterings - an information based distance.
       Journal of Multivariate Analysis, 98(5), 873-895.

    Examples
    --------
    >>> variation_of_information([0, 0, 1, 1], ["b", "b", "a", "a"])
    0.0
    """
    estimator = _check_count_estimator(estimator)
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    return _info.variation_of_information_from_table(_table(cols), estimator=estimator, base=base, alpha=alpha)


def g_test(x, y, *, bins=None, missing="drop", strategy="quantile") -> _info.GTestResult:
    """G-test (likelihood-ratio test) of independence of two columns.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    bins : int, str or sequence of float, optional
        Binning of numeric columns; ``None``: labels.
    missing : {"drop", "category", "error"}, default="drop"
        Missing-value policy (pairwise-complete under ``"drop"``).
    strategy : {"quantile", "uniform"}, default="quantile"
        Equal-frequency or equal-width bins for an integer ``bins``.

    Returns
    -------
    GTestResult
        ``(statistic, dof, p_value)`` with :math:`G = 2 N \\hat I_{\\mathrm{plugin}}`
        (nats) and ``dof = (r' - 1)(c' - 1)`` over the observed symbols.  The
        chi-square approximation is poor when expected cell counts are small
        (common practice: fewer than 5 on average).

    Warns
    -----
    SmallSampleWarning
        When the table has fewer than 5 rows per cell on average.

    References
    ----------
    .. [1] Wilks, S. S. (1938). The large-sample distribution of the likelihood
       ratio for testing composite hypotheses. Annals of Mathematical Statistics,
       9(1), 60-62.

    Examples
    --------
    >>> res = g_test(["a"] * 10 + ["b"] * 10, [0] * 10 + [1] * 10)
    >>> res.dof, round(res.statistic, 4)
    (1, 27.7259)
    """
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    table = _table(cols)
    _warn_if_sparse(table, cols, "the chi-square p-value is unreliable (use fewer bins or levels, or a permutation test)")
    return _info.g_test_from_table(table)
