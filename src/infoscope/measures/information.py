"""Mutual information and its relatives on sample columns (the MI family, G-test)."""
from __future__ import annotations

import numpy as np

from infoscope._docs import fill_doc
from infoscope.estimators import information as _info
from infoscope.estimators._checks import check_choice, check_same_length, log_base

from infoscope.measures._samples import (
    KNN_ESTIMATORS,
    MISSING_POLICIES,
    PARAMETER_DOCS,
    _UNRELIABLE_ESTIMATE,
    _check_count_estimator,
    _coded_columns,
    _describe,
    _is_numeric,
    _label_codes,
    _missing_mask,
    _table,
    _sparse_checked_table,
    _to_series,
    _warn_if_sparse,
    _weighted_estimate,
    _weights_for,
)

__all__ = ["mutual_information", "conditional_mutual_information", "co_information", "total_correlation",
           "normalized_mutual_information", "adjusted_mutual_information", "variation_of_information", "g_test"]


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
    present = ~_missing_mask(sx, name_x) & ~_missing_mask(sy, name_y)
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
        labels, _ = _label_codes(yd, name_x if dx else name_y)
        return continuous.mixed_mutual_information(xc, labels, k=k, base=base, seed=seed)
    return continuous.ksg_mutual_information(cont(sx, "x"), cont(sy, "y"), k=k, algorithm=algorithm, base=base, seed=seed)


@fill_doc(PARAMETER_DOCS)
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
    {base}
    bins : int, str or sequence of float, optional
        Binning of numeric columns for the count estimators; ``None``: labels.
        Not used by the kNN estimators.
    k : int, default=3
        Number of neighbours of the kNN estimators.
    {missing_pairwise}
    {strategy}
    {alpha}
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
    _warn_if_sparse(table, cols, _UNRELIABLE_ESTIMATE)
    return _info.mutual_information_from_table(table, estimator=estimator, base=base, alpha=alpha)


@fill_doc(PARAMETER_DOCS)
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
    {estimator_count}
    {options_every}

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
    named = [("x", x), ("y", y), ("given", given)]
    _, table = _sparse_checked_table(named, bins=bins, strategy=strategy, missing=missing)
    return _info.conditional_mutual_information_from_table(table, estimator=estimator, base=base, alpha=alpha)


@fill_doc(PARAMETER_DOCS)
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
    {options_every}

    Returns
    -------
    float
        Positive when the columns share information (redundancy), negative when they
        inform each other only jointly (synergy: ``z = x xor y`` gives -1 bit); see
        :func:`infoscope.estimators.multivariate.co_information_from_table`.

    {warns_sparse}

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
    _, table = _sparse_checked_table(named, bins=bins, strategy=strategy, missing=missing)
    return co_information_from_table(table, estimator=estimator, base=base, alpha=alpha)


@fill_doc(PARAMETER_DOCS)
def total_correlation(*columns, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile",
                      alpha=None) -> float:
    """Total correlation of two or more columns: sum of their entropies minus their joint entropy.

    Parameters
    ----------
    *columns : array_like of shape (n,)
        Two or more columns of the same rows.
    {estimator_count}
    {options_every}

    Returns
    -------
    float
        :math:`\\sum_i H(X_i) - H(X_1, \\dots, X_d)` in the unit of ``base``: 0 for
        independent columns; for two columns their mutual information.

    {warns_sparse}

    References
    ----------
    .. [1] {watanabe_1960}

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
    _, table = _sparse_checked_table(named, bins=bins, strategy=strategy, missing=missing)
    return total_correlation_from_table(table, estimator=estimator, base=base, alpha=alpha)


@fill_doc(PARAMETER_DOCS)
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
    {binning_pairwise}
    {alpha}

    Returns
    -------
    float
        See :func:`infoscope.estimators.information.normalized_mutual_information_from_table`
        (NaN when either column is constant: a column without entropy has no
        share to normalise, so the measure is undefined, never 1 or 0).

    References
    ----------
    .. [1] {kvalseth_1987}
    .. [2] {strehl_ghosh_2002}

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


@fill_doc(PARAMETER_DOCS)
def adjusted_mutual_information(x, y, *, normalization="arithmetic", bins=None, missing="drop", strategy="quantile") -> float:
    """Mutual information adjusted for chance (AMI) of two columns.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    normalization : {"min", "geometric", "arithmetic", "max"}, default="arithmetic"
        How the two entropies are averaged in the denominator.
    {binning_pairwise}

    Returns
    -------
    float
        :math:`(I - E[I]) / (f(H(X), H(Y)) - E[I])`: 1 for identical partitions,
        about 0 for unrelated ones (can be negative).

    References
    ----------
    .. [1] {vinh_2010}

    Examples
    --------
    >>> round(adjusted_mutual_information([0, 0, 1, 1, 2, 2], ["u", "u", "v", "v", "w", "w"]), 12)
    1.0
    """
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    return _info.adjusted_mutual_information_from_table(_table(cols), normalization=normalization)


@fill_doc(PARAMETER_DOCS)
def variation_of_information(x, y, *, estimator="plugin", base=2, bins=None, missing="drop", strategy="quantile", alpha=None) -> float:
    """Variation of information H(x | y) + H(y | x), a distance between partitions.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    estimator : str, default="plugin"
        Entropy estimator (the metric properties hold for ``"plugin"``).
    {options_pairwise}

    Returns
    -------
    float
        :math:`VI(X, Y) = H(X \\mid Y) + H(Y \\mid X)` in the unit of ``base``; 0 when
        each column determines the other.

    References
    ----------
    .. [1] {meila_2007}

    Examples
    --------
    >>> variation_of_information([0, 0, 1, 1], ["b", "b", "a", "a"])
    0.0
    """
    estimator = _check_count_estimator(estimator)
    cols = _coded_columns([("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing)
    return _info.variation_of_information_from_table(_table(cols), estimator=estimator, base=base, alpha=alpha)


@fill_doc(PARAMETER_DOCS)
def g_test(x, y, *, bins=None, missing="drop", strategy="quantile") -> _info.GTestResult:
    """G-test (likelihood-ratio test) of independence of two columns.

    Parameters
    ----------
    x, y : array_like of shape (n,)
        Paired samples.
    {binning_pairwise}

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
    .. [1] {wilks_1938}

    Examples
    --------
    >>> res = g_test(["a"] * 10 + ["b"] * 10, [0] * 10 + [1] * 10)
    >>> res.dof, round(res.statistic, 4)
    (1, 27.7259)
    """
    _, table = _sparse_checked_table(
        [("x", x), ("y", y)], bins=bins, strategy=strategy, missing=missing,
        what="the chi-square p-value is unreliable (use fewer bins or levels, or a permutation test)",
    )
    return _info.g_test_from_table(table)
