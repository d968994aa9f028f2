"""Divergences between two distributions over the same cells: KL, JS, cross-entropy, PSI.

Every function accepts, for each of its two arguments, either a probability vector
or a vector of counts, told apart by one explicit rule (:func:`as_distribution`):

* a vector of whole numbers (0, 1, 2, ...) is read as **counts** and normalised;
* otherwise a vector that sums to 1 (within 1e-9) is read as **probabilities**;
* anything else is an error that says which argument is wrong.

A whole-number vector that sums to 1 (one cell 1, the others 0) is the same
distribution either way, so the rule is never ambiguous about the result.  The
``counts=`` keyword forces one reading (``True``: must be counts; ``False``: must be
probabilities).

Zero cells are never patched silently: ``pseudocount`` (in count units, added to
every cell of a count vector before normalising) is the explicit way to smooth, and
a divergence that is infinite (mass where the other side has none) is returned as
``inf``.
"""
from __future__ import annotations

import math

import numpy as np
from scipy import special

from infoscope.estimators._checks import check_nonnegative, log_base, numeric_array

__all__ = ["as_distribution", "cross_entropy", "js_divergence", "kl_divergence", "psi"]

_SUM_TOL = 1e-9


def as_distribution(v, *, parameter: str = "p", counts=None, pseudocount=0.0) -> np.ndarray:
    """Turn a probability or count vector into a probability vector (float64).

    Parameters
    ----------
    v : array_like of shape (K,)
        Probabilities (non-negative, summing to 1) or counts (non-negative whole numbers).
    parameter : str, default="p"
        Name of the argument, used in error messages.
    counts : bool or None, default=None
        ``None``: whole-number vectors are counts, other vectors must sum to 1.
        ``True``: ``v`` must be counts.  ``False``: ``v`` must be probabilities.
    pseudocount : float, default=0
        Added to every cell of a count vector before normalising.  Probability
        vectors cannot be smoothed this way (a pseudocount is in count units):
        a non-zero value with probabilities is an error.

    Returns
    -------
    numpy.ndarray of shape (K,)
        Probabilities summing to 1.  The input is not modified.

    References
    ----------
    .. [1] Jeffreys, H. (1946). An invariant form for the prior probability in
       estimation problems. Proceedings of the Royal Society A, 186(1007), 453-461
       (pseudocount 1/2 as a Dirichlet prior).

    Examples
    --------
    >>> as_distribution([1, 3]).tolist()
    [0.25, 0.75]
    >>> as_distribution([0.5, 0.5]).tolist()
    [0.5, 0.5]
    >>> as_distribution([0, 2], pseudocount=1).tolist()
    [0.25, 0.75]
    """
    a = check_nonnegative(pseudocount, "pseudocount")
    raw = numeric_array(v, parameter, shape_words="a flat vector of numbers", dtype_words="a numeric vector")
    if raw.ndim != 1:
        raise ValueError(f"{parameter} must be a 1-D vector, got shape {raw.shape}")
    if raw.size == 0:
        raise ValueError(f"{parameter} is empty")
    arr = raw.astype(np.float64)  # a copy: never touch the caller's array
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{parameter} contains NaN or infinite values")
    if np.any(arr < 0):
        raise ValueError(f"{parameter} contains negative values")
    whole = bool(np.all(arr == np.round(arr)))
    total = float(arr.sum())
    if counts is None:
        is_counts = whole
    elif counts is True or counts is False:
        is_counts = counts
    else:
        raise TypeError(f"counts must be True, False or None, got {counts!r}")
    if is_counts:
        if not whole:
            raise ValueError(f"{parameter} was declared as counts (counts=True) but holds non-integer values")
        arr = arr + a
        total = float(arr.sum())
        if total <= 0:
            raise ValueError(f"{parameter} has no observations (all counts are 0); a pseudocount > 0 would smooth it")
        return arr / total
    if not math.isclose(total, 1.0, abs_tol=_SUM_TOL):
        raise ValueError(
            f"{parameter} sums to {total:.6g}, not 1, and is not a vector of whole-number "
            "counts: pass probabilities that sum to 1, or counts"
        )
    if a != 0.0:
        raise ValueError(
            f"pseudocount={pseudocount!r} applies to counts, but {parameter} was given as "
            "probabilities: pass the counts, or smooth the probabilities yourself"
        )
    return arr / total


def _reads_as_counts(v, counts) -> bool:
    """Whether :func:`as_distribution` would read ``v`` as counts (errors are left to it)."""
    if counts is not None:
        return bool(counts)
    try:
        arr = np.asarray(v, dtype=np.float64)
    except (TypeError, ValueError):
        return False
    return bool(np.all(np.isfinite(arr)) and np.all(arr == np.round(arr)))


def _pair(p, q, names, counts, pseudocount):
    pp = as_distribution(p, parameter=names[0], counts=counts, pseudocount=pseudocount)
    qq = as_distribution(q, parameter=names[1], counts=counts, pseudocount=pseudocount)
    if pp.shape != qq.shape:
        raise ValueError(
            f"{names[0]} and {names[1]} must have the same number of cells: "
            f"{names[0]} has {pp.size}, {names[1]} has {qq.size}"
        )
    return pp, qq


def kl_divergence(p, q, *, base=2, pseudocount=0.0, counts=None) -> float:
    """Kullback-Leibler divergence KL(p || q).

    Parameters
    ----------
    p, q : array_like of shape (K,)
        Probability vectors or count vectors over the same K cells (see
        :func:`as_distribution` for how they are told apart).
    base : float or str, default=2
        Logarithm base or unit name ("bits", "nats", "hartleys").
    pseudocount : float, default=0
        Added to every cell of count vectors before normalising (e.g. 0.5, Jeffreys).
    counts : bool or None, default=None
        Force the reading of both vectors as counts (True) or probabilities (False).

    Returns
    -------
    float
        :math:`\\sum_i p_i \\log(p_i / q_i)`, >= 0; ``inf`` when some cell has
        :math:`p_i > 0` and :math:`q_i = 0` (q cannot explain an outcome that p
        produces).  Cells with :math:`p_i = 0` contribute 0.

    References
    ----------
    .. [1] Kullback, S., & Leibler, R. A. (1951). On information and sufficiency.
       Annals of Mathematical Statistics, 22(1), 79-86.

    Examples
    --------
    >>> round(kl_divergence([0.5, 0.5], [0.25, 0.75]), 6)
    0.207519
    >>> kl_divergence([1, 1], [0, 4])
    inf
    """
    pp, qq = _pair(p, q, ("p", "q"), counts, pseudocount)
    kl = float(np.sum(special.rel_entr(pp, qq)))
    return (kl if kl > 0.0 else 0.0) / log_base(base)  # >= 0 by Gibbs' inequality; a negative is rounding


def cross_entropy(p, q, *, base=2, pseudocount=0.0, counts=None) -> float:
    """Cross-entropy H(p, q) = H(p) + KL(p || q).

    Parameters
    ----------
    p, q : array_like of shape (K,)
        Probability vectors or count vectors over the same K cells; ``p`` is the
        distribution of the outcomes, ``q`` the one used to code (predict) them.
    base : float or str, default=2
        Logarithm base or unit name.
    pseudocount : float, default=0
        Added to every cell of count vectors before normalising.
    counts : bool or None, default=None
        Force the reading of both vectors as counts (True) or probabilities (False).

    Returns
    -------
    float
        :math:`-\\sum_i p_i \\log q_i`; ``inf`` when some :math:`p_i > 0` has
        :math:`q_i = 0`.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, sec. 5.4 (the cost of coding with the wrong distribution).

    Examples
    --------
    >>> cross_entropy([0.5, 0.5], [0.5, 0.5])
    1.0
    """
    pp, qq = _pair(p, q, ("p", "q"), counts, pseudocount)
    with np.errstate(divide="ignore"):
        h = float(-np.sum(special.xlogy(pp, qq))) + 0.0  # + 0.0 turns -0.0 into 0.0
    return h / log_base(base)


def js_divergence(p, q, *, base=2, pseudocount=0.0, counts=None) -> float:
    """Jensen-Shannon divergence (the divergence, not its square root).

    Parameters
    ----------
    p, q : array_like of shape (K,)
        Probability vectors or count vectors over the same K cells.
    base : float or str, default=2
        Logarithm base or unit name; in bits the value lies in [0, 1].
    pseudocount : float, default=0
        Added to every cell of count vectors before normalising (not needed for
        finiteness: JS is always finite).
    counts : bool or None, default=None
        Force the reading of both vectors as counts (True) or probabilities (False).

    Returns
    -------
    float
        :math:`\\tfrac12 KL(p \\| m) + \\tfrac12 KL(q \\| m)` with :math:`m = (p + q)/2`;
        0 for equal distributions, :math:`\\log 2` (1 bit) for disjoint supports.
        ``scipy.spatial.distance.jensenshannon`` returns the square root of this.

    References
    ----------
    .. [1] Lin, J. (1991). Divergence measures based on the Shannon entropy. IEEE
       Transactions on Information Theory, 37(1), 145-151.

    Examples
    --------
    >>> js_divergence([1, 0], [0, 1])
    1.0
    """
    pp, qq = _pair(p, q, ("p", "q"), counts, pseudocount)
    m = 0.5 * (pp + qq)
    js = 0.5 * float(np.sum(special.rel_entr(pp, m))) + 0.5 * float(np.sum(special.rel_entr(qq, m)))
    js = min(js if js > 0.0 else 0.0, math.log(2.0))  # bounded by ln 2 exactly; outside is rounding
    return js / log_base(base)


def psi(expected, actual, *, pseudocount=None, counts=None) -> float:
    """Population stability index of ``actual`` against ``expected`` (natural log).

    Parameters
    ----------
    expected : array_like of shape (K,)
        The reference distribution (e.g. training data) per bin, as counts or shares.
    actual : array_like of shape (K,)
        The distribution being checked (e.g. a new batch) over the same bins.
    pseudocount : float or None, default=None
        Added to every bin of count vectors before normalising (a vector of all
        zeros is an error either way: it has no distribution).  ``None`` means
        0.5 for count vectors (the Jeffreys pseudocount, so that one empty bin does
        not make the index infinite) and 0 for probability vectors, which cannot be
        smoothed in count units.  Pass 0 to see the raw index, which is ``inf``
        when a bin is empty on one side only.
    counts : bool or None, default=None
        Force the reading of both vectors as counts (True) or probabilities (False).

    Returns
    -------
    float
        :math:`\\mathrm{PSI} = \\sum_i (a_i - e_i) \\ln(a_i / e_i)`, which equals
        :math:`KL(a \\| e) + KL(e \\| a)` (Jeffreys' J divergence), in nats as is
        the practice: the usual reading is < 0.10 stable, 0.10-0.25 moderate shift,
        > 0.25 major shift (common practice in credit scoring, not a test).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards: Developing and Implementing
       Intelligent Credit Scoring. Wiley.
    .. [2] Yurdakul, B. (2018). Statistical properties of population stability index.
       PhD dissertation, Western Michigan University.
    .. [3] Jeffreys, H. (1946). An invariant form for the prior probability in
       estimation problems. Proceedings of the Royal Society A, 186(1007), 453-461.

    Examples
    --------
    >>> round(psi([0.25, 0.25, 0.5], [0.2, 0.3, 0.5]), 6)
    0.020273
    >>> psi([10, 0], [5, 5], pseudocount=0)
    inf
    """
    if pseudocount is not None:
        check_nonnegative(pseudocount, "pseudocount")
    def prepare(v, name):
        # A side with no observations has no distribution to compare: smoothing it
        # (the default pseudocount) would make it uniform and give a made-up index.
        try:
            unsmoothed = as_distribution(v, parameter=name, counts=counts, pseudocount=0.0)
        except ValueError as err:
            if "no observations" not in str(err):
                raise
            raise ValueError(
                f"{name} has no observations (all counts are 0): the index compares two "
                "distributions, and smoothing an empty one would only make it uniform"
            ) from None
        a = pseudocount
        if a is None:  # the default: 0.5 for counts, 0 for probabilities
            a = 0.5 if _reads_as_counts(v, counts) else 0.0
        if a == 0:
            return unsmoothed  # the same call as above: no need to read v again
        return as_distribution(v, parameter=name, counts=counts, pseudocount=a)

    e = prepare(expected, "expected")
    a = prepare(actual, "actual")
    if e.shape != a.shape:
        raise ValueError(
            f"expected and actual must have the same number of bins: expected has {e.size}, actual has {a.size}"
        )
    # PSI = KL(a||e) + KL(e||a): each is >= 0 and inf when the supports differ.
    value = float(np.sum(special.rel_entr(a, e)) + np.sum(special.rel_entr(e, a)))
    return value if value > 0.0 else 0.0  # never -0.0
