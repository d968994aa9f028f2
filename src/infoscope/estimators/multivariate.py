r"""Measures beyond pairs, on count tables and probability vectors (numpy + scipy only).

* :func:`entropy_from_probabilities` and :func:`surprisal`: Shannon's quantities of a
  *known* distribution (no estimation: the probabilities are taken as given).
* :func:`co_information_from_table`: the co-information of the variables indexing the
  axes of a count table; for three variables :math:`I(X;Y) - I(X;Y \mid Z)`.
* :func:`total_correlation_from_table`: :math:`\sum_i H(X_i) - H(X_1, \dots, X_d)`.
* Observation weights: :func:`effective_sample_size` (Kish) and
  :func:`entropy_of_weighted_table`, which the sample functions of
  :mod:`infoscope.measures` use for ``weights=``.

Sign convention of the co-information
-------------------------------------
For three variables the co-information is :math:`I(X;Y) - I(X;Y \mid Z)`: positive
when the variables share information (redundancy: knowing Z explains part of the
dependence of X and Y), negative when they are *synergistic* (X and Y tell about each
other only once Z is known): the XOR gate gives -1 bit.  Some authors call the
quantity with the opposite sign the interaction information; the sign used here is
the one of ``dit.multivariate.coinformation`` and of Bell (2003).

Weighted counts
---------------
With observation weights :math:`w_r` (survey or sampling weights), the weighted
table :math:`W_c = \sum_{r \in c} w_r` estimates the cell probabilities by
:math:`W_c / \sum W`.  The bias corrections of the count estimators depend on the
number of observations; with unequal weights the information in the sample is that
of fewer rows, Kish's effective sample size :math:`n_{\mathrm{eff}} = (\sum w)^2 /
\sum w^2`.  So the weighted table is rescaled to total :math:`n_{\mathrm{eff}}` before
the estimator sees it: ``miller_madow`` then adds :math:`(m - 1)/(2 n_{\mathrm{eff}})`.
Only the estimators whose formula makes sense for non-integer counts accept weights
(:data:`WEIGHTED_ESTIMATORS`); ``chao_shen`` (singletons), ``grassberger`` (parity of
the counts) and ``nsb`` (integer likelihood) do not.
"""
from __future__ import annotations

import itertools
import math

import numpy as np

from infoscope._docs import fill_doc
from infoscope.estimators._checks import check_choice, log_base, numeric_array

__all__ = [
    "WEIGHTED_ESTIMATORS",
    "WeightedEstimate",
    "co_information_from_table",
    "effective_sample_size",
    "entropy_from_probabilities",
    "entropy_of_weighted_table",
    "surprisal",
    "total_correlation_from_table",
]

#: Entropy estimators that accept observation weights (non-integer effective counts).
WEIGHTED_ESTIMATORS = ("plugin", "miller_madow", "james_stein", "dirichlet")


# --------------------------------------------------------------------------- known distributions
def _probabilities(p, parameter: str, *, atol: float = 1e-9) -> np.ndarray:
    arr = numeric_array(p, parameter, shape_words="an array of probabilities",
                        dtype_words="numeric probabilities").astype(np.float64)
    if arr.size == 0:
        raise ValueError(f"{parameter} is empty: pass one probability per outcome")
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{parameter} contains NaN or infinite values")
    if np.any(arr < 0) or np.any(arr > 1):
        raise ValueError(f"{parameter} must hold probabilities in [0, 1]")
    return arr


def entropy_from_probabilities(p, *, base=2) -> float:
    r"""Shannon entropy of a probability distribution given as numbers.

    Parameters
    ----------
    p : array_like of float, any shape
        Probabilities of the outcomes, non-negative and summing to 1 (within 1e-9);
        a 2-D (or N-D) array is read as a joint distribution of its cells.
    base : float or str, default=2
        Logarithm base or unit name ("bits", "nats", "hartleys").

    Returns
    -------
    float
        :math:`H(p) = -\sum_i p_i \log p_i` (with :math:`0 \log 0 = 0`).  Nothing is
        estimated: for counts from a sample use ``entropy_from_counts``, which corrects
        the bias of the plug-in estimate.

    Raises
    ------
    ValueError
        If ``p`` is empty, has NaN/inf, values outside [0, 1] or does not sum to 1.

    References
    ----------
    .. [1] Shannon, C. E. (1948). A mathematical theory of communication. Bell
       System Technical Journal, 27(3), 379-423.

    Examples
    --------
    >>> entropy_from_probabilities([0.5, 0.25, 0.25])
    1.5
    """
    arr = _probabilities(p, "p")
    total = float(arr.sum())
    if not math.isclose(total, 1.0, abs_tol=1e-9):
        raise ValueError(f"p sums to {total:.6g}, not 1; normalise it (or pass counts to entropy_from_counts)")
    flat = arr.ravel()
    nz = flat[flat > 0]
    h = float(-np.sum(nz * np.log(nz)))
    return (h if h > 0 else 0.0) / log_base(base)


def surprisal(p, *, base=2):
    r"""Surprisal (self-information) of events of probability ``p``.

    Parameters
    ----------
    p : float or array_like of float
        Probabilities in [0, 1] (they need not sum to 1: each is one event's).
    base : float or str, default=2
        Logarithm base or unit name.

    Returns
    -------
    float or numpy.ndarray
        :math:`-\log p` in the unit of ``base``, the shape of ``p`` (a float for a
        scalar); ``inf`` where ``p == 0`` (an impossible event), 0 where ``p == 1``.

    References
    ----------
    .. [1] Shannon, C. E. (1948). A mathematical theory of communication. Bell
       System Technical Journal, 27(3), 379-423.
    .. [2] Tribus, M. (1961). Thermostatics and Thermodynamics. Van Nostrand (the
       name "surprisal").

    Examples
    --------
    >>> surprisal(0.25)
    2.0
    >>> surprisal([1.0, 0.5, 0.0]).tolist()
    [0.0, 1.0, inf]
    """
    arr = _probabilities(p, "p")
    with np.errstate(divide="ignore"):
        out = -np.log(arr) / log_base(base) + 0.0  # + 0.0: no -0.0 for p == 1
    return float(out) if out.ndim == 0 else out


# --------------------------------------------------------------------------- tables
def _check_nd_table(table, estimator, alpha, min_axes: int):
    from infoscope.estimators._checks import check_table
    from infoscope.estimators.information import _check_estimator

    t = check_table(table, "table", ndim=None)
    if t.ndim < min_axes:
        raise ValueError(f"table must have at least {min_axes} axes (one per variable), got shape {t.shape}")
    return t, _check_estimator(estimator, alpha)


def _subset_entropies_nats(t: np.ndarray, estimator: str, alpha) -> dict:
    """H of every non-empty subset of the axes (keyed by the tuple of kept axes), in nats."""
    from infoscope.estimators.information import _entropy_nats

    d = t.ndim
    out = {}
    for size in range(1, d + 1):
        for keep in itertools.combinations(range(d), size):
            drop = tuple(a for a in range(d) if a not in keep)
            out[keep] = _entropy_nats(t.sum(axis=drop) if drop else t, estimator, alpha)
    return out


def co_information_from_table(table, *, estimator: str = "miller_madow", base=2, alpha=None) -> float:
    r"""Co-information of the variables that index the axes of a count table.

    Parameters
    ----------
    table : array_like of shape (k_1, ..., k_d), d >= 2
        Joint counts; ``table[i, j, l]`` = rows with ``X = i, Y = j, Z = l``.
    estimator : str, default="miller_madow"
        Entropy estimator applied to every marginal table (``"plugin"`` or a name of
        ``infoscope.ENTROPY_ESTIMATORS``).
    base : float or str, default=2
        Logarithm base or unit name.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`I(X_1; \dots; X_d) = -\sum_{T \subseteq \{1..d\}, T \ne \emptyset}
        (-1)^{|T|} H(X_T)`.  For two variables this is their mutual information, for
        three :math:`I(X;Y) - I(X;Y \mid Z)`: negative for synergy (XOR: -1 bit),
        positive for redundancy (three copies of a fair bit: +1 bit).  Not clipped:
        it can have either sign.

    References
    ----------
    .. [1] McGill, W. J. (1954). Multivariate information transmission.
       Psychometrika, 19(2), 97-116.
    .. [2] Bell, A. J. (2003). The co-information lattice. Proceedings of the 4th
       International Symposium on Independent Component Analysis and Blind Signal
       Separation (ICA 2003), 921-926.

    Examples
    --------
    >>> xor = [[[1, 0], [0, 1]], [[0, 1], [1, 0]]]   # Z = X xor Y, each row once
    >>> round(co_information_from_table(xor, estimator="plugin"), 12)
    -1.0
    """
    t, estimator = _check_nd_table(table, estimator, alpha, 2)
    h = _subset_entropies_nats(t, estimator, alpha)
    value = -sum((-1) ** len(keep) * hk for keep, hk in h.items())
    return float(value) / log_base(base)


@fill_doc()
def total_correlation_from_table(table, *, estimator: str = "miller_madow", base=2, alpha=None) -> float:
    r"""Total correlation (multi-information) of the variables of a count table.

    Parameters
    ----------
    table : array_like of shape (k_1, ..., k_d), d >= 2
        Joint counts.
    estimator : str, default="miller_madow"
        Entropy estimator for the d margins and the joint table.
    base : float or str, default=2
        Logarithm base or unit name.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.

    Returns
    -------
    float
        :math:`C(X_1, \dots, X_d) = \sum_i H(X_i) - H(X_1, \dots, X_d)`: 0 when the
        variables are independent, the sum of the margins' entropies less one when all
        are copies of each other.  For ``"plugin"`` it is >= 0 (a KL divergence of the
        joint from the product of its margins; rounding negatives clipped); a
        bias-corrected estimate is returned as computed.

    References
    ----------
    .. [1] {watanabe_1960}

    Examples
    --------
    >>> copies = [[[5, 0], [0, 0]], [[0, 0], [0, 5]]]   # three copies of a fair bit
    >>> round(total_correlation_from_table(copies, estimator="plugin"), 12)
    2.0
    """
    from infoscope.estimators.information import _entropy_nats

    t, estimator = _check_nd_table(table, estimator, alpha, 2)
    d = t.ndim
    margins = sum(_entropy_nats(t.sum(axis=tuple(a for a in range(d) if a != i)), estimator, alpha)
                  for i in range(d))
    value = margins - _entropy_nats(t, estimator, alpha)
    if estimator == "plugin":
        value = value if value > 0 else 0.0
    return float(value) / log_base(base)


# --------------------------------------------------------------------------- weights
class WeightedEstimate(float):
    """A float estimate that also says which sample size it rests on.

    It is an ordinary ``float`` (arithmetic, comparisons and formatting are those of
    the number); the attributes say how many rows were used (``n``), their total
    weight (``weight_total``) and Kish's effective sample size (``n_effective``) that
    the bias correction used.
    """

    n: int
    weight_total: float
    n_effective: float

    def __new__(cls, value: float, *, n: int, weight_total: float, n_effective: float):
        obj = super().__new__(cls, value)
        obj.n, obj.weight_total, obj.n_effective = int(n), float(weight_total), float(n_effective)
        return obj

    def __repr__(self) -> str:
        return f"{float(self)!r} (n={self.n}, n_effective={self.n_effective:.6g})"

    def __reduce__(self):
        return (_weighted_estimate, (float(self), self.n, self.weight_total, self.n_effective))


def _weighted_estimate(value, n, weight_total, n_effective):
    return WeightedEstimate(value, n=n, weight_total=weight_total, n_effective=n_effective)


def check_weights(weights, parameter: str = "weights") -> np.ndarray:
    """Validate observation weights: 1-D, finite, >= 0, not all 0; float64 copy."""
    arr = numeric_array(weights, parameter, shape_words="a 1-D array of weights",
                        dtype_words="numeric weights")
    if arr.ndim != 1:
        raise ValueError(f"{parameter} must be 1-D (one weight per row), got shape {arr.shape}")
    arr = arr.astype(np.float64)
    bad = ~np.isfinite(arr)
    if bad.any():
        raise ValueError(f"{parameter} has {int(bad.sum())} NaN or infinite value(s) (first at row "
                         f"{int(np.flatnonzero(bad)[0])}); give every row a finite weight >= 0")
    if np.any(arr < 0):
        raise ValueError(f"{parameter} has negative values (first at row {int(np.flatnonzero(arr < 0)[0])}); "
                         "weights must be >= 0")
    return arr


def effective_sample_size(weights) -> float:
    r"""Kish's effective sample size of a set of observation weights.

    Parameters
    ----------
    weights : array_like of float, shape (n,)
        Non-negative, finite weights, not all 0.

    Returns
    -------
    float
        :math:`n_{\mathrm{eff}} = (\sum_r w_r)^2 / \sum_r w_r^2`: ``n`` for equal
        weights, close to 1 when one weight dominates.

    References
    ----------
    .. [1] Kish, L. (1965). Survey Sampling. Wiley, New York (the design effect of
       unequal weights, sec. 11.7).

    Examples
    --------
    >>> effective_sample_size([1.0, 1.0, 1.0, 1.0])
    4.0
    >>> effective_sample_size([3.0, 1.0])
    1.6
    """
    w = check_weights(weights)
    s2 = float(np.dot(w, w))
    if s2 == 0.0:
        raise ValueError("weights are all 0: there is no observation left")
    return float(w.sum()) ** 2 / s2


def entropy_of_weighted_table(table, n_effective: float, *, estimator: str = "miller_madow",
                              alpha=None) -> float:
    """Entropy in nats of a table of summed weights, its bias correction at ``n_effective``.

    Parameters
    ----------
    table : array_like of float, any shape
        Summed weights per cell (non-negative, not all 0).
    n_effective : float
        Kish's effective sample size of the rows behind the table (> 0).
    estimator : str, default="miller_madow"
        One of :data:`WEIGHTED_ESTIMATORS`.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator (per effective observation).

    Returns
    -------
    float
        The estimator applied to the table rescaled to total ``n_effective`` (nats).

    References
    ----------
    .. [1] Kish, L. (1965). Survey Sampling. Wiley, New York.
    .. [2] Miller, G. A. (1955). Note on the bias of information estimates. In
       H. Quastler (ed.), Information Theory in Psychology, Free Press, 95-100.

    Examples
    --------
    >>> round(entropy_of_weighted_table([2.0, 2.0], 4.0, estimator="plugin"), 6)
    0.693147
    """
    from infoscope.estimators.entropy import entropy_nats, resolve_alpha

    estimator = check_choice(estimator, WEIGHTED_ESTIMATORS, "estimator")
    a = resolve_alpha(estimator, alpha)
    t = np.asarray(table, dtype=np.float64).ravel()
    total = t.sum()
    if not np.all(np.isfinite(t)) or np.any(t < 0) or total <= 0:
        raise ValueError("table must hold finite, non-negative summed weights, not all 0")
    if not (math.isfinite(n_effective) and n_effective > 0):
        raise ValueError(f"n_effective={n_effective!r} must be a finite number > 0")
    scaled = t * (n_effective / total)
    return float(entropy_nats(scaled, estimator, a))
