"""From columns of samples to count tables: reading values, codes, missing rows, weights."""
from __future__ import annotations

import math
import numbers
from collections.abc import Mapping

import numpy as np

from infoscope._docs import CITATIONS
from infoscope._warnings import DataQualityWarning, SmallSampleWarning, warn_user
from infoscope.estimators import information as _info
from infoscope.estimators._checks import check_choice, check_same_length, log_base



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
# What the sparse-table warning says of an estimate (the G-test says its own).
_UNRELIABLE_ESTIMATE = "the estimate is unreliable (use fewer bins or levels)"

#: Parameter descriptions shared by the column functions of :mod:`infoscope.measures`
#: (their docstrings name them as ``{base}``, ``{bins}`` ...; see :mod:`infoscope._docs`).
PARAMETER_DOCS = {
    **CITATIONS,
    "estimator_count": """estimator : str, default="miller_madow"
    ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``.""",
    "base": """base : float or str, default=2
    Logarithm base or unit name ("bits", "nats", "hartleys").""",
    "bins": """bins : int, str or sequence of float, optional
    Binning of numeric columns; ``None``: labels.""",
    "missing_pairwise": """missing : {"drop", "category", "error"}, default="drop"
    Missing-value policy (pairwise-complete under ``"drop"``).""",
    "missing_every": """missing : {"drop", "category", "error"}, default="drop"
    Missing-value policy (rows where every column is present under ``"drop"``).""",
    "strategy": """strategy : {"quantile", "uniform"}, default="quantile"
    Equal-frequency or equal-width bins for an integer ``bins``.""",
    "alpha": """alpha : float or str, optional
    Pseudocount of the ``"dirichlet"`` estimator.""",
}
PARAMETER_DOCS["warns_sparse"] = """Warns
-----
SmallSampleWarning
    When the joint table has fewer than 5 rows per cell on average."""
# The option sets that most column functions share, in their order of the signature.
PARAMETER_DOCS["binning_pairwise"] = "\n".join(PARAMETER_DOCS[k] for k in ("bins", "missing_pairwise", "strategy"))
PARAMETER_DOCS["options_pairwise"] = "\n".join(PARAMETER_DOCS[k] for k in ("base", "binning_pairwise", "alpha"))
PARAMETER_DOCS["options_every"] = "\n".join(PARAMETER_DOCS[k] for k in ("base", "bins", "missing_every", "strategy", "alpha"))


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


def _label_codes(present_values, name: str) -> tuple[np.ndarray, int]:
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


def _missing_mask(series, name: str) -> np.ndarray:
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


def _sparse_checked_table(named, *, bins, strategy, missing, what: str = _UNRELIABLE_ESTIMATE):
    """The coded columns and their joint count table, with a warning when the table is sparse."""
    cols = _coded_columns(named, bins=bins, strategy=strategy, missing=missing)
    table = _table(cols)
    _warn_if_sparse(table, cols, what)
    return cols, table


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
