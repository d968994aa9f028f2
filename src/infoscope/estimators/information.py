"""Information measures on count tables: MI, conditional MI, NMI, AMI, VI, PMI.

The G-test of a table and the Benjamini-Hochberg q-values live with the other tests in
:mod:`infoscope.estimators.significance`; their names are importable from here too.

Everything here works on contingency tables of counts (numpy + scipy only).  A table
``T`` of shape ``(r, c)`` holds ``T[i, j]`` = number of rows with ``X = i`` and
``Y = j``.  All quantities are computed in nats and divided by ``log_base(base)`` at
the end (see :mod:`infoscope.estimators._checks`).

Estimates and signs
-------------------
The plug-in ("plugin") mutual information is a sum of non-negative KL terms, so it
is >= 0 in exact arithmetic; a value like ``-1e-17`` can only come from rounding and
is clipped to 0.  The bias-corrected estimators (Miller-Madow, Chao-Shen, ...) are
computed as ``H(X) + H(Y) - H(X, Y)`` with each entropy corrected on its own; such an
estimate is *not* clipped: a negative value is a legitimate outcome that says "no
dependence beyond what the correction expects from sampling noise", and clipping
it would bias the estimator upwards.  Callers that display estimates show them as
they are.
"""
from __future__ import annotations

import math

import numpy as np
from scipy import special

from infoscope._docs import fill_doc
from infoscope.estimators._checks import check_choice, check_table, log_base
from infoscope.estimators.significance import GTestResult, benjamini_hochberg, g_test_from_table, g_test_from_tables

__all__ = [
    "GTestResult",
    "NORMALIZATIONS",
    "adjusted_mutual_information_from_table",
    "benjamini_hochberg",
    "conditional_entropy_from_table",
    "conditional_mutual_information_from_table",
    "expected_mutual_information_from_table",
    "g_test_from_table",
    "g_test_from_tables",
    "joint_entropy_from_counts",
    "mutual_information_from_table",
    "normalized_mutual_information_from_table",
    "pointwise_mutual_information",
    "variation_of_information_from_table",
]

#: Normalisations of mutual information, name -> what the MI is divided by.
NORMALIZATIONS = {
    "min": "min(H(X), H(Y))",
    "geometric": "sqrt(H(X) H(Y))",
    "arithmetic": "(H(X) + H(Y)) / 2",
    "max": "max(H(X), H(Y))",
    "joint": "H(X, Y)",
}

# Half-width, in units of sqrt(min(a, b)), of the window of n_ij kept in the
# expected-MI sum; see `_emi_terms_nats`.
_EMI_SD_WINDOW = 20.0


# --------------------------------------------------------------------------- helpers
def _nonnegative(value: float) -> float:
    """``value`` clipped at 0, and never ``-0.0`` (``max(-0.0, 0.0)`` is ``-0.0``, shown as "-0")."""
    return value if value > 0.0 else 0.0


def _plugin_entropy_nats(counts: np.ndarray) -> float:
    """Plug-in entropy in nats of a non-negative count array (any shape)."""
    flat = counts.ravel()
    total = flat.sum()
    if total <= 0:
        return 0.0
    p = flat[flat > 0] / total
    return _nonnegative(float(-np.sum(p * np.log(p))))  # a tiny negative is rounding


def _entropy_nats(counts: np.ndarray, estimator: str, alpha) -> float:
    """Entropy in nats of ``counts`` (flattened) with the named estimator.

    The plug-in estimate is computed here (it is needed by the G-test, NMI and AMI,
    which are defined on it); every other estimator is the one of
    :func:`infoscope.estimators.entropy.entropy_from_counts`, so that all layers agree.
    """
    if estimator == "plugin":
        return _plugin_entropy_nats(counts)
    from infoscope.estimators.entropy import entropy_from_counts

    kwargs = {"estimator": estimator, "base": "nats"}
    if alpha is not None:
        kwargs["alpha"] = alpha
    return float(entropy_from_counts(counts.ravel(), **kwargs))


def _check_estimator(estimator, alpha=None) -> str:
    """Validate ``estimator`` (and ``alpha``: only ``"dirichlet"`` takes one, as in entropy_from_counts)."""
    from infoscope.estimators.entropy import ENTROPY_ESTIMATORS, resolve_alpha

    if estimator != "plugin":
        check_choice(estimator, list(ENTROPY_ESTIMATORS), "estimator")
    resolve_alpha(estimator, alpha)  # raises, naming alpha, when it does not apply or is invalid
    return estimator


def _plugin_mi_nats(t: np.ndarray) -> float:
    """Plug-in MI in nats: sum_ij p_ij ln(p_ij / (p_i p_j)), computed cell-wise."""
    n = t.sum()
    rows = t.sum(axis=1, keepdims=True)
    cols = t.sum(axis=0, keepdims=True)
    nz = t > 0
    # When one variable is a function of the other, I equals that variable's entropy
    # exactly; return the entropy itself so that identical partitions give NMI = AMI = 1
    # to the last bit (the cell-wise sum differs from it by rounding).
    if np.all(nz.sum(axis=1) <= 1):  # every row has one non-empty cell: Y = f(X)
        return _plugin_entropy_nats(cols)
    if np.all(nz.sum(axis=0) <= 1):  # X = f(Y)
        return _plugin_entropy_nats(rows)
    expected = (rows * cols)[nz] / n
    mi = float(np.sum(t[nz] * np.log(t[nz] / expected)) / n)
    # Exactly >= 0 in real arithmetic (a KL divergence); a tiny negative is rounding.
    return _nonnegative(mi)


def _mi_nats(t: np.ndarray, estimator: str, alpha) -> float:
    if estimator == "plugin":
        return _plugin_mi_nats(t)
    return (
        _entropy_nats(t.sum(axis=1), estimator, alpha)
        + _entropy_nats(t.sum(axis=0), estimator, alpha)
        - _entropy_nats(t, estimator, alpha)
    )


def _n_nonempty(vector: np.ndarray) -> int:
    return int(np.count_nonzero(vector))


# --------------------------------------------------------------------------- entropies
def joint_entropy_from_counts(counts, *, estimator: str = "miller_madow", base=2, alpha=None) -> float:
    """Joint entropy of the variables that index the axes of a count array.

    Parameters
    ----------
    counts : array_like of shape (k_1, ..., k_d)
        Joint counts of ``d >= 1`` variables; ``counts[i1, ..., id]`` is the number
        of rows with ``X1 = i1, ..., Xd = id``.
    estimator : str, default="miller_madow"
        Entropy estimator applied to the flattened cells (see
        ``infoscope.ENTROPY_ESTIMATORS``; ``"plugin"`` is the maximum-likelihood one).
        Estimators that depend on the alphabet size see ``k_1 * ... * k_d`` cells.
    base : float or str, default=2
        Logarithm base or unit name ("bits", "nats", "hartleys").
    alpha : float, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`H(X_1, \\dots, X_d) = -\\sum p \\log p` (estimated) in the unit of ``base``.

    References
    ----------
    .. [1] Shannon, C. E. (1948). A mathematical theory of communication.
       Bell System Technical Journal, 27(3), 379-423.
    .. [2] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, ch. 2 (joint entropy).

    Examples
    --------
    >>> joint_entropy_from_counts([[1, 1], [1, 1]], estimator="plugin")
    2.0
    """
    arr = check_table(counts, "counts", ndim=None)
    estimator = _check_estimator(estimator, alpha)
    return _entropy_nats(arr, estimator, alpha) / log_base(base)


def conditional_entropy_from_table(
    table, *, given_axis=1, estimator: str = "miller_madow", base=2, alpha=None
) -> float:
    """Conditional entropy H(rest | given) from a joint count table.

    Parameters
    ----------
    table : array_like of shape (k_1, ..., k_d)
        Joint counts, ``d >= 2``.
    given_axis : int or tuple of int, default=1
        Axis (axes) of the conditioning variable(s).  For a 2-D table with rows
        ``Y`` and columns ``X`` the default gives :math:`H(Y \\mid X)`.
    estimator : str, default="miller_madow"
        Entropy estimator (``"plugin"`` or a name of ``infoscope.ENTROPY_ESTIMATORS``).
    base : float or str, default=2
        Logarithm base or unit name.
    alpha : float, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`H(\\text{rest} \\mid \\text{given}) = H(\\text{all}) - H(\\text{given})`.
        For ``"plugin"`` it is >= 0 (tiny rounding negatives clipped); a
        bias-corrected estimate is returned as computed.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, eq. 2.14 (chain rule H(X, Y) = H(X) + H(Y | X)).

    Examples
    --------
    >>> # Y is a copy of X: nothing is left to know about Y once X is known.
    >>> conditional_entropy_from_table([[5, 0], [0, 5]], estimator="plugin")
    0.0
    """
    arr = check_table(table, "table", ndim=None)
    if arr.ndim < 2:
        raise ValueError(f"table must have at least 2 axes, got shape {arr.shape}")
    requested = (given_axis,) if isinstance(given_axis, (int, np.integer)) else given_axis
    try:
        requested = [int(a) for a in requested]
    except (TypeError, ValueError):
        raise TypeError(f"given_axis must be an int or a tuple of ints, got {given_axis!r}") from None
    axes = sorted({a % arr.ndim for a in requested if -arr.ndim <= a < arr.ndim})
    if len(axes) != len(requested) or not axes or len(axes) == arr.ndim:
        raise ValueError(
            f"given_axis={given_axis!r} is invalid for a table of shape {arr.shape}: "
            f"name between 1 and {arr.ndim - 1} distinct axes in range(-{arr.ndim}, {arr.ndim})"
        )
    estimator = _check_estimator(estimator, alpha)
    other = tuple(a for a in range(arr.ndim) if a not in axes)
    h = _entropy_nats(arr, estimator, alpha) - _entropy_nats(arr.sum(axis=other), estimator, alpha)
    if estimator == "plugin":
        h = _nonnegative(h)  # H(all) >= H(given) exactly; a negative is rounding
    return h / log_base(base)


# --------------------------------------------------------------------------- MI family
def mutual_information_from_table(table, *, estimator: str = "miller_madow", base=2, alpha=None) -> float:
    """Mutual information of the row and column variables of a count table.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts; ``table[i, j]`` = number of rows with ``X = i`` and ``Y = j``.
    estimator : str, default="miller_madow"
        ``"plugin"`` gives :math:`\\sum p_{ij} \\ln(p_{ij} / (p_i p_j))` (tiny rounding
        negatives clipped to 0).  Any other name of ``infoscope.ENTROPY_ESTIMATORS``
        gives :math:`\\hat H(X) + \\hat H(Y) - \\hat H(X, Y)` with that estimator on the
        two margins and on the flattened joint (``r * c`` cells); such an estimate
        can be slightly negative when there is no dependence and is *not* clipped.
    base : float or str, default=2
        Logarithm base or unit name ("bits", "nats", "hartleys").
    alpha : float, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        The estimated mutual information in the unit of ``base``.

    References
    ----------
    .. [1] Shannon, C. E. (1948). A mathematical theory of communication.
       Bell System Technical Journal, 27(3), 379-423.
    .. [2] Miller, G. A. (1955). Note on the bias of information estimates. In
       H. Quastler (ed.), Information Theory in Psychology, Free Press, 95-100.
    .. [3] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, eq. 2.45 (I(X; Y) = H(X) + H(Y) - H(X, Y)).

    Examples
    --------
    >>> mutual_information_from_table([[5, 0], [0, 5]], estimator="plugin")
    1.0
    """
    t = check_table(table)
    estimator = _check_estimator(estimator, alpha)
    return _mi_nats(t, estimator, alpha) / log_base(base)


def conditional_mutual_information_from_table(
    table3d, *, estimator: str = "miller_madow", base=2, alpha=None
) -> float:
    """Conditional mutual information I(X; Y | Z) from a 3-D count table.

    Parameters
    ----------
    table3d : array_like of shape (k_x, k_y, k_z)
        Joint counts; ``table3d[i, j, l]`` = rows with ``X = i, Y = j, Z = l``.
    estimator : str, default="miller_madow"
        Entropy estimator; the estimate is
        :math:`\\hat H(X,Z) + \\hat H(Y,Z) - \\hat H(X,Y,Z) - \\hat H(Z)`.
        For ``"plugin"`` this equals :math:`\\sum_z p(z) I(X; Y \\mid Z = z)` and is
        clipped at 0 against rounding; other estimates are not clipped.
    base : float or str, default=2
        Logarithm base or unit name.
    alpha : float, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        The estimated conditional mutual information in the unit of ``base``.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, sec. 2.5 (conditional mutual information).
    .. [2] Wyner, A. D. (1978). A definition of conditional mutual information for
       arbitrary ensembles. Information and Control, 38(1), 51-59.

    Examples
    --------
    >>> # X and Y are copies of each other within each stratum of Z.
    >>> t = [[[4, 2], [0, 0]], [[0, 0], [4, 2]]]
    >>> round(conditional_mutual_information_from_table(t, estimator="plugin"), 12)
    1.0
    """
    t = check_table(table3d, "table3d", ndim=3)
    estimator = _check_estimator(estimator, alpha)
    h = lambda a: _entropy_nats(a, estimator, alpha)  # noqa: E731
    cmi = h(t.sum(axis=1)) + h(t.sum(axis=0)) - h(t) - h(t.sum(axis=(0, 1)))
    if estimator == "plugin":
        cmi = _nonnegative(cmi)  # a weighted sum of plug-in MIs; a negative is rounding
    return cmi / log_base(base)


def _normaliser(hx: float, hy: float, hxy: float, normalization: str) -> float:
    if normalization == "min":
        return min(hx, hy)
    if normalization == "geometric":
        return math.sqrt(max(hx, 0.0) * max(hy, 0.0))
    if normalization == "arithmetic":
        return (hx + hy) / 2.0
    if normalization == "max":
        return max(hx, hy)
    return hxy  # "joint"


@fill_doc()
def normalized_mutual_information_from_table(
    table, *, normalization: str = "arithmetic", estimator: str = "plugin", alpha=None
) -> float:
    """Normalised mutual information of a count table (unit-free).

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts.
    normalization : {"min", "geometric", "arithmetic", "max", "joint"}, default="arithmetic"
        What the MI is divided by: ``min(H(X), H(Y))``, ``sqrt(H(X) H(Y))``,
        ``(H(X) + H(Y)) / 2``, ``max(H(X), H(Y))`` or ``H(X, Y)``.  "arithmetic" is
        also known as the symmetric uncertainty.
    estimator : str, default="plugin"
        Entropy estimator used for the MI and for the normalising entropies.  The
        default matches the published definitions (and scikit-learn / pyitlib); a
        bias-corrected estimator may give values slightly outside [0, 1], which are
        returned as computed.
    alpha : float, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        The normalised MI, in [0, 1] for ``"plugin"``.  NaN when either variable
        is constant (one non-empty row or column): the share of information of a
        variable that has none is undefined, 0/0 for ``"min"`` and ``"geometric"``,
        and a value of 1 (two constants) or 0 would read as "identical" or
        "unrelated".  scikit-learn's ``normalized_mutual_info_score`` returns 1.0
        and 0.0 there; infoscope departs from it on purpose.  Otherwise an MI of 0
        gives 0.0.

    References
    ----------
    .. [1] {kvalseth_1987}
    .. [2] {strehl_ghosh_2002}
    .. [3] Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic measures
       for clusterings comparison. Journal of Machine Learning Research, 11,
       2837-2854 (the normalisations compared).

    Examples
    --------
    >>> round(normalized_mutual_information_from_table([[5, 0], [0, 5]]), 12)
    1.0
    """
    t = check_table(table)
    normalization = check_choice(normalization, NORMALIZATIONS, "normalization")
    estimator = _check_estimator(estimator, alpha)
    rows, cols = t.sum(axis=1), t.sum(axis=0)
    if _n_nonempty(rows) <= 1 or _n_nonempty(cols) <= 1:
        return math.nan  # a constant side has no entropy to share: undefined, not 1 or 0
    if estimator == "plugin":
        mi = _plugin_mi_nats(t)
        if mi == 0.0:
            return 0.0
        hx, hy = _plugin_entropy_nats(rows), _plugin_entropy_nats(cols)
        hxy = _plugin_entropy_nats(t) if normalization == "joint" else math.nan
    else:
        # The corrected MI is made of the very entropies the normaliser needs: each
        # is estimated once (the estimators with a bootstrap or an integral are slow).
        hx, hy = _entropy_nats(rows, estimator, alpha), _entropy_nats(cols, estimator, alpha)
        hxy = _entropy_nats(t, estimator, alpha)
        mi = hx + hy - hxy
        if mi == 0.0:
            return 0.0
    denominator = _normaliser(hx, hy, hxy, normalization)
    if denominator <= 0.0:
        # Only reachable with a constant side (normaliser 0) and a bias-corrected MI
        # that is not exactly 0: there is no information to share.
        return 0.0
    return mi / denominator


def _emi_terms_nats(a: np.ndarray, b: np.ndarray, weight: np.ndarray, n: float) -> float:
    """sum over pairs (a_k, b_k) of weight_k * E[n_ij / N ln(N n_ij / (a b))] (hypergeometric)."""
    # Window of n_ij around its mean a b / N.  Hoeffding (1963) bounds the
    # hypergeometric tail by exp(-2 d^2 / min(a, b)); beyond d = 20 sqrt(min(a, b))
    # each term is below exp(-800), which underflows to 0 in double precision, so the
    # truncated sum is the exact sum as far as floating point can tell.
    lo_support = np.maximum(1.0, a + b - n)
    hi_support = np.minimum(a, b)
    mean = a * b / n
    half = np.ceil(_EMI_SD_WINDOW * np.sqrt(np.minimum(a, b))) + 1.0
    lo = np.maximum(lo_support, np.floor(mean - half))
    hi = np.minimum(hi_support, np.ceil(mean + half))
    length = np.maximum(hi - lo + 1.0, 0.0).astype(np.int64)
    keep = length > 0
    a, b, weight, lo, length = a[keep], b[keep], weight[keep], lo[keep], length[keep]
    if a.size == 0:
        return 0.0
    gl = special.gammaln
    const = gl(a + 1) + gl(b + 1) + gl(n - a + 1) + gl(n - b + 1) - gl(n + 1)
    total = 0.0
    # Chunk the flattened (pair, n_ij) grid so memory stays bounded (~2**20 floats).
    chunk = 1 << 20
    starts = np.concatenate(([0], np.cumsum(length)))
    i = 0
    while i < a.size:
        j = int(np.searchsorted(starts, starts[i] + chunk, side="right")) - 1
        j = max(j, i + 1)
        seg_len = length[i:j]
        idx = np.repeat(np.arange(i, j), seg_len)
        offset = np.arange(int(seg_len.sum())) - np.repeat(starts[i:j] - starts[i], seg_len)
        nij = lo[idx] + offset
        aa, bb = a[idx], b[idx]
        log_p = const[idx] - gl(nij + 1) - gl(aa - nij + 1) - gl(bb - nij + 1) - gl(n - aa - bb + nij + 1)
        term = nij / n * (np.log(n) + np.log(nij) - np.log(aa) - np.log(bb)) * np.exp(log_p)
        total += float(np.sum(term * weight[idx]))
        i = j
    return total


@fill_doc()
def expected_mutual_information_from_table(table, *, base=2) -> float:
    """Expected plug-in MI under random relabelling with the table's margins fixed.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts; only the margins matter.
    base : float or str, default=2
        Logarithm base or unit name.

    Returns
    -------
    float
        :math:`E[I]` under the hypergeometric (permutation) model of Vinh et al.
        (2010), in the unit of ``base``.

    Notes
    -----
    Margin values that repeat are grouped, and for each pair of margins ``(a, b)``
    the sum over ``n_ij`` is restricted to ``|n_ij - ab/N| <= 20 sqrt(min(a, b))``:
    by Hoeffding's (1963) bound the left-out probabilities are below ``exp(-800)``,
    which is 0 in double precision, so the result is exact in floating point.  The
    cost is about ``sum over margin pairs of 40 sqrt(min(a, b))`` evaluations of
    ``gammaln`` — e.g. about 3e7 for a 64 x 64 table of a million rows (a few
    seconds); a plain sum would cost ``N * min(r, c)``.

    References
    ----------
    .. [1] {vinh_2010}
    .. [2] Hoeffding, W. (1963). Probability inequalities for sums of bounded random
       variables. Journal of the American Statistical Association, 58(301), 13-30.

    Examples
    --------
    >>> round(expected_mutual_information_from_table([[1, 1], [1, 1]], base="nats"), 6)
    0.231049
    """
    t = check_table(table)
    return _emi_nats(t) / log_base(base)


def margin_pairs(t: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Every pair of a non-empty row total and a column total of ``t``, grouped.

    Parameters
    ----------
    t : numpy.ndarray of shape (r, c)
        A checked count table.

    Returns
    -------
    a, b, weight : numpy.ndarray
        For each pair of distinct non-zero values ``(a, b)`` of the row and column
        totals, how many (row, column) cells have those totals (``weight``).  A sum
        over the cells of a term that depends on the margins only is
        ``sum(weight * term(a, b))``: margins that repeat are computed once.

    Examples
    --------
    >>> a, b, w = margin_pairs(np.array([[1.0, 1.0], [1.0, 1.0]]))
    >>> a.tolist(), b.tolist(), w.tolist()
    ([2.0], [2.0], [4.0])
    """
    rows, cols = t.sum(axis=1), t.sum(axis=0)
    ra, rw = np.unique(rows[rows > 0], return_counts=True)
    ca, cw = np.unique(cols[cols > 0], return_counts=True)
    a = np.repeat(ra, ca.size)
    b = np.tile(ca, ra.size)
    weight = np.repeat(rw, ca.size).astype(np.float64) * np.tile(cw, ra.size)
    return a, b, weight


def _emi_nats(t: np.ndarray) -> float:
    return _emi_terms_nats(*margin_pairs(t), float(t.sum()))


_AMI_NORMALIZATIONS = ("min", "geometric", "arithmetic", "max")


@fill_doc()
def adjusted_mutual_information_from_table(table, *, normalization: str = "arithmetic") -> float:
    """Mutual information adjusted for chance (AMI) of a count table.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts.
    normalization : {"min", "geometric", "arithmetic", "max"}, default="arithmetic"
        How :math:`H(X)` and :math:`H(Y)` are averaged in the denominator.  ("joint"
        is not offered: its adjusted form needs :math:`E[H(X, Y)]`, which is not
        the same model.)

    Returns
    -------
    float
        :math:`(I - E[I]) / (f(H(X), H(Y)) - E[I])` with plug-in quantities and the
        exact expected MI under the permutation model.  1 for identical partitions,
        about 0 for independent ones, can be negative.  NaN when either variable
        is constant (undefined, as for the normalised MI; scikit-learn's
        ``adjusted_mutual_info_score`` returns 1.0 and 0.0 there, infoscope
        departs from it on purpose).  When one side puts every row in a class
        of its own (an ID-like column), every relabelling gives the same MI, so
        :math:`I = E[I]`: the result is 0.0 (1.0 if both sides do: identical
        partitions), where the formula would be 0/0 for some normalisations.

    Notes
    -----
    See :func:`expected_mutual_information_from_table` for the cost of the expected
    MI on large tables.

    References
    ----------
    .. [1] {vinh_2010}

    Examples
    --------
    >>> round(adjusted_mutual_information_from_table([[3, 0], [0, 3]]), 12)
    1.0
    """
    t = check_table(table)
    if not isinstance(normalization, str) or normalization not in _AMI_NORMALIZATIONS:
        raise ValueError(
            f"normalization={normalization!r} is not valid for the adjusted MI; choose one of: "
            + ", ".join(map(repr, _AMI_NORMALIZATIONS))
        )
    rows, cols = t.sum(axis=1), t.sum(axis=0)
    nr, nc = _n_nonempty(rows), _n_nonempty(cols)
    if nr <= 1 or nc <= 1:
        return math.nan  # a constant side: undefined (see normalized_mutual_information_from_table)
    rows_singletons = bool(np.all(rows[rows > 0] == 1))
    cols_singletons = bool(np.all(cols[cols > 0] == 1))
    if rows_singletons or cols_singletons:
        # Every row of the sample is a class of its own on one side (an ID-like
        # column): each relabelling gives the same table up to the order of its
        # rows, so I = E[I] exactly and, for the normalisations where f = I (such as
        # "min"), the index is 0/0; its floating-point value is rounding noise
        # (scikit-learn returns 1, -1 or 0.98 for such tables).  The observed MI is
        # exactly what chance gives: 0, unless both sides are singletons, which is
        # two identical partitions: 1 (scikit-learn's value for identical labels).
        return 1.0 if rows_singletons and cols_singletons else 0.0
    mi = _plugin_mi_nats(t)
    emi = _emi_nats(t)
    hx, hy = _plugin_entropy_nats(rows), _plugin_entropy_nats(cols)
    denominator = _normaliser(hx, hy, math.nan, normalization) - emi
    # The normaliser is >= E[I] in exact arithmetic, and equal only in the singleton
    # case handled above; keep the sign and stay one ulp away from 0 against
    # rounding (as scikit-learn's adjusted_mutual_info_score does).
    eps = np.finfo(np.float64).eps
    denominator = min(denominator, -eps) if denominator < 0 else max(denominator, eps)
    return float((mi - emi) / denominator)


@fill_doc()
def variation_of_information_from_table(table, *, estimator: str = "plugin", base=2, alpha=None) -> float:
    """Variation of information between the row and column variables of a table.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts.
    estimator : str, default="plugin"
        Entropy estimator; the estimate is :math:`2\\hat H(X,Y) - \\hat H(X) - \\hat H(Y)`.
        With ``"plugin"`` it is a metric on partitions (clipped at 0 against rounding).
    base : float or str, default=2
        Logarithm base or unit name.
    alpha : float, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`VI = H(X \\mid Y) + H(Y \\mid X)` in the unit of ``base``.

    References
    ----------
    .. [1] {meila_2007}

    Examples
    --------
    >>> round(variation_of_information_from_table([[1, 1], [1, 1]]), 12)
    2.0
    """
    t = check_table(table)
    estimator = _check_estimator(estimator, alpha)
    h = lambda a: _entropy_nats(a, estimator, alpha)  # noqa: E731
    vi = 2.0 * h(t) - h(t.sum(axis=1)) - h(t.sum(axis=0))
    if estimator == "plugin":
        vi = _nonnegative(vi)  # sum of two conditional entropies; a negative is rounding
    return vi / log_base(base)


def pointwise_mutual_information(table, base=2) -> np.ndarray:
    """Pointwise mutual information of every cell of a count table.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts.
    base : float or str, default=2
        Logarithm base or unit name.

    Returns
    -------
    numpy.ndarray of shape (r, c)
        :math:`\\mathrm{pmi}_{ij} = \\log \\frac{p_{ij}}{p_i p_j} = \\log \\frac{n_{ij} N}{n_i n_j}`
        (plug-in).  Positive: the pair occurs more often than under independence;
        negative: less often.  An empty cell whose row and column are not empty gets
        ``-inf`` (the pair never occurs although both values do); a cell in an empty
        row or column gets ``nan`` (0/0: one of the values never occurs).  The
        average :math:`\\sum p_{ij} \\mathrm{pmi}_{ij}` over non-empty cells is the
        plug-in MI.

    References
    ----------
    .. [1] Fano, R. M. (1961). Transmission of Information. MIT Press / Wiley.
    .. [2] Church, K. W., & Hanks, P. (1990). Word association norms, mutual
       information, and lexicography. Computational Linguistics, 16(1), 22-29.

    Examples
    --------
    >>> pointwise_mutual_information([[2, 0], [1, 1]]).round(3).tolist()
    [[0.415, -inf], [-0.585, 1.0]]
    """
    t = check_table(table)
    n = t.sum()
    expected = t.sum(axis=1, keepdims=True) * t.sum(axis=0, keepdims=True) / n
    with np.errstate(divide="ignore", invalid="ignore"):
        pmi = np.log(t) - np.log(expected)
    pmi[expected == 0] = np.nan
    pmi[(t == 0) & (expected > 0)] = -np.inf
    return pmi / log_base(base)
