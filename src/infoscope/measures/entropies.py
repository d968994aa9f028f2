"""Entropy of sample columns: ``entropy``, ``joint_entropy``, ``conditional_entropy``."""
from __future__ import annotations

from infoscope._docs import fill_doc
from infoscope.estimators import information as _info

from infoscope.measures._samples import (
    PARAMETER_DOCS,
    _check_count_estimator,
    _coded_columns,
    _table,
    _weighted_estimate,
    _weights_for,
)

__all__ = ["entropy", "joint_entropy", "conditional_entropy"]


@fill_doc(PARAMETER_DOCS)
def entropy(values, *, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None,
            weights=None) -> float:
    """Entropy of a sample of a discrete (or binned) variable.

    Parameters
    ----------
    values : array_like of shape (n,)
        The sample: labels of any hashable type, or numbers to bin with ``bins=``.
    {estimator_count}
    {base}
    bins : int, str or sequence of float, optional
        Bin numeric values: a number of bins, a rule name (``"fd"``, ``"knuth"``, ...)
        or edges (see :func:`infoscope.bin_edges`).  ``None``: values are labels.
    missing : {"drop", "category", "error"}, default="drop"
        What to do with missing values (see the module notes).
    {strategy}
    {alpha}
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


@fill_doc(PARAMETER_DOCS)
def joint_entropy(*columns, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None) -> float:
    """Joint entropy of several columns of the same rows.

    Parameters
    ----------
    *columns : array_like of shape (n,)
        Two or more columns (one is allowed: its entropy).
    estimator : str, default="miller_madow"
        ``"plugin"`` or any name in ``infoscope.ENTROPY_ESTIMATORS``; estimators that
        use the alphabet size see the product of the columns' alphabet sizes.
    {base}
    bins : int, str or sequence of float, optional
        Binning of numeric columns (the same for each); ``None``: labels.
    {missing_every}
    {strategy}
    {alpha}

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


@fill_doc(PARAMETER_DOCS)
def conditional_entropy(y, given, *, estimator="miller_madow", base=2, bins=None, missing="drop", strategy="quantile", alpha=None) -> float:
    """Conditional entropy H(y | given): what is left to know about ``y`` once ``given`` is known.

    Parameters
    ----------
    y : array_like of shape (n,)
        The variable whose remaining uncertainty is measured.
    given : array_like of shape (n,)
        The conditioning variable, same rows as ``y``.
    {estimator_count}
    {options_pairwise}

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
