"""``conditional(x, y, given=[...])``: what X tells about Y once the given columns are known.

One result row: the conditional mutual information :math:`I(X;Y \\mid Z)` (Z = the
combination of the given columns, one stratum per observed combination) with a
permutation p-value that shuffles X within the strata of Z and an interval that
agrees with it (:mod:`infoscope.estimators.conditional`), next to the unconditional
:math:`I(X;Y)` on the same rows and their difference, the co-information.

The interval follows the rule of the pair tables: it belongs to ``cmi_above_chance``
(the plug-in CMI less what the within-strata shuffles give by chance), and
``ci_low > 0`` exactly when ``p_value < (1 - ci) / 2``.

The codes come from the session's encoded columns (its bins, missing policy and
folded levels), so the numbers agree with the pair tables.  Rows where any of the
columns is missing are left out (under ``missing="drop"``).

Strata multiply cells: with ``k_x * k_y`` cells per stratum and many strata, the
three-way table quickly has fewer than 5 rows per cell.  The row says so
(``reliability`` and ``note``): ``cmi`` is then biased upwards (the chance level that
``cmi_above_chance`` takes out is large), the interval rests on a chi-square
approximation that sparse strata strain, and the permutation p-value stays valid
(it is only less powerful).
"""
from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import pandas as pd

from infoscope.estimators._checks import unit_name
from infoscope.frame.results import SPARSE_CELL_COUNT, result_frame

__all__ = ["CONDITIONAL_COLUMNS", "conditional_table", "joint_codes", "present_rows"]

#: Columns of the ``conditional()`` result row (DEVELOPERS.md, "Result tables").
CONDITIONAL_COLUMNS = (
    "x", "y", "given", "n", "k_x", "k_y", "strata", "mi", "cmi", "cmi_above_chance", "ci_low", "ci_high", "p_value",
    "null_mean", "co_information", "rows_per_cell", "reliability", "note",
)


def present_rows(columns) -> np.ndarray:
    """Boolean mask of the rows where every encoded column has a symbol (code < k)."""
    keep = np.ones(columns[0].codes.shape[0], dtype=bool)
    for col in columns:
        keep &= np.asarray(col.codes) < col.k
    return keep


def joint_codes(code_arrays: Sequence[np.ndarray]) -> tuple[np.ndarray, int]:
    """One compact code per observed combination of several code arrays, and their number.

    An empty sequence gives one stratum (every row the same code 0).
    """
    if not code_arrays:
        return np.zeros(0, dtype=np.int64), 1
    n = code_arrays[0].shape[0]
    combined = np.zeros(n, dtype=np.int64)
    k = 1
    for codes in code_arrays:
        codes = np.asarray(codes, dtype=np.int64)
        width = int(codes.max()) + 1 if codes.size else 1
        uniques, combined = np.unique(combined * width + codes, return_inverse=True)
        combined = combined.astype(np.int64).reshape(-1)
        k = int(uniques.size)
    return combined, k


def _given_list(given) -> list:
    if given is None:
        return []
    if isinstance(given, str):
        return [given]
    try:
        return list(given)
    except TypeError:
        raise TypeError(f"given must be a column key or a list of column keys, got {type(given).__name__}") from None


def sparse_note(what: str, cells: int, n: int) -> str:
    """The caution text for a table with fewer than 5 rows per cell on average ("" otherwise)."""
    if n >= SPARSE_CELL_COUNT * cells:
        return ""
    return (
        f"the joint table of {what} has {cells:,} cells for {n:,} rows ({n / max(cells, 1):.2g} per cell, "
        "fewer than 5): cmi is biased upwards (read cmi_above_chance), the interval is approximate; "
        "the permutation p-value stays valid but has little power"
    )


def conditional_table(session, x, y, given=(), *, n_permutations: int = 999) -> pd.DataFrame:
    """I(X; Y | given) of two columns of a session, with an interval and a permutation p-value.

    Parameters
    ----------
    session : ProfileSession
        The profile whose encoded columns and settings (estimator, base, ci, n_boot,
        seed) are used.
    x, y : str
        Column keys.
    given : str or sequence of str, default=()
        The conditioning columns (a list or tuple of keys; a MultiIndex label goes
        inside a list); their observed combinations are the strata.  An
        empty list gives the unconditional MI with an ordinary permutation test.
    n_permutations : int, default=999
        Shuffles of X within the strata for the p-value (0 skips the test: NaN).

    Returns
    -------
    pandas.DataFrame
        One row with the columns :data:`CONDITIONAL_COLUMNS`: ``given`` (tuple of
        keys), ``n`` rows where all columns are present, ``k_x``/``k_y`` observed
        symbols, ``strata`` (observed combinations of ``given``), ``mi`` = I(X;Y) and
        ``cmi`` = I(X;Y|given) with the session's estimator on those rows,
        ``cmi_above_chance`` = the plug-in CMI less its chance level under the
        within-strata shuffles (>= 0) with its interval ``ci_low``/``ci_high`` at the
        session's ``ci`` (the noncentral chi-square of the conditional G, the rule
        of the pair tables: ``ci_low > 0`` exactly when ``p_value < (1 - ci) / 2``),
        ``p_value`` (permutation of X within strata), ``null_mean`` (the mean
        plug-in CMI under the shuffles, a Monte-Carlo view of the chance level), ``co_information`` = mi - cmi (positive: the given columns
        explain part of the dependence; negative: they reveal dependence),
        ``rows_per_cell`` = n / (k_x k_y strata), ``reliability`` ("ok", "sparse":
        fewer than 5 rows per cell, "too_few": under 1 or too few rows; the rule of
        ``infoscope.estimators.significance.table_reliability``) and a ``note`` that
        says what sparsity does to the numbers.  ``attrs``: unit,
        estimator, sampled, n_permutations, ci.  With ``n_permutations=0`` there is
        no p-value and the sign of the lower end comes from the chi-square law of
        the scaled G.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, sec. 2.5.
    .. [2] McGill, W. J. (1954). Multivariate information transmission.
       Psychometrika, 19(2), 97-116.
    .. [3] B. Phipson, G. K. Smyth (2010), Statistical Applications in Genetics and
       Molecular Biology 9, Article 39 (permutation p-values).
    .. [4] Mitra, S. K. (1958). On the limiting power function of the frequency
       chi-square test. Annals of Mathematical Statistics, 29(4), 1221-1233.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> rng = np.random.default_rng(0)
    >>> z = rng.integers(0, 2, 2000)
    >>> df = pd.DataFrame({"x": z ^ (rng.random(2000) < 0.1), "y": z ^ (rng.random(2000) < 0.1), "z": z})
    >>> row = conditional_table(ProfileSession(df), "x", "y", given=["z"], n_permutations=199)
    >>> bool(row["mi"][0] > 0.2), bool(row["p_value"][0] > 0.05), float(row["ci_low"][0])
    (True, True, 0.0)
    """
    from infoscope.estimators.conditional import cmi_interval_from_table, conditional_permutation_test
    from infoscope.estimators.information import (
        conditional_mutual_information_from_table,
        mutual_information_from_table,
    )
    from infoscope.estimators.significance import table_reliability

    session._refuse_weights("conditional()")
    given = _given_list(given)
    names = [x, y, *given]
    cols = [session.column(name) for name in names]  # KeyError names an unknown column
    keys = [c.name for c in cols]
    if len(set(keys)) < len(keys):
        raise ValueError(f"x, y and given must be different columns, got {keys}")
    if not isinstance(n_permutations, (int, np.integer)) or isinstance(n_permutations, bool) or n_permutations < 0:
        raise ValueError(f"n_permutations={n_permutations!r} must be a whole number >= 0")
    s = session.settings
    keep = present_rows(cols)
    n = int(keep.sum())
    attrs = {"unit": unit_name(s["base"]), "estimator": s["estimator"], "sampled": session.sampled,
             "n_permutations": int(n_permutations), "ci": float(s["ci"])}
    row = dict.fromkeys(CONDITIONAL_COLUMNS, math.nan)
    row.update(x=keys[0], y=keys[1], given=tuple(keys[2:]), n=n, reliability="ok", note="")
    if n < 2:
        row.update(k_x=0, k_y=0, strata=0, reliability="too_few",
                   note=f"{n} row(s) where {', '.join(map(repr, keys))} are all present: nothing to estimate")
        return result_frame([row], CONDITIONAL_COLUMNS, **attrs)
    xc, kx = joint_codes([np.asarray(cols[0].codes)[keep]])
    yc, ky = joint_codes([np.asarray(cols[1].codes)[keep]])
    zc, kz = joint_codes([np.asarray(c.codes)[keep] for c in cols[2:]])
    if not given:
        zc = np.zeros(n, dtype=np.int64)
    table = np.bincount((xc * ky + yc) * kz + zc, minlength=kx * ky * kz).reshape(kx, ky, kz)
    kw = {"estimator": s["estimator"], "base": s["base"]}
    if s["estimator"] == "dirichlet" and s["alpha"] is not None:
        kw["alpha"] = s["alpha"]
    cmi = conditional_mutual_information_from_table(table, **kw)
    mi = mutual_information_from_table(table.sum(axis=2), **kw)
    p_value = null_mean = math.nan
    if n_permutations > 0:
        test = conditional_permutation_test(xc, yc, zc, n_permutations=int(n_permutations), seed=s["seed"],
                                            base=s["base"])
        p_value, null_mean = test.p_value, test.null_mean
    # the interval of the pair tables' rule; the shown p-value decides its lower end's sign
    interval = cmi_interval_from_table(table, level=float(s["ci"]), base=s["base"],
                                       p_value=p_value if n_permutations > 0 else None)
    cells = kx * ky * kz
    what = f"{keys[0]!r}, {keys[1]!r}" + (f" and the {kz:,} strata of {', '.join(map(repr, keys[2:]))}"
                                          if given else "")
    row.update(k_x=kx, k_y=ky, strata=kz, mi=float(mi), cmi=float(cmi),
               cmi_above_chance=float(interval.estimate), ci_low=float(interval.low), ci_high=float(interval.high), p_value=float(p_value), null_mean=float(null_mean),
               co_information=float(mi - cmi), rows_per_cell=n / cells,
               reliability=str(table_reliability([n], [kx * ky], [kz])[0]), note=sparse_note(what, cells, n))
    return result_frame([row], CONDITIONAL_COLUMNS, **attrs)
