"""Entropy of a discrete variable from a vector of counts.

Every estimator here works on the counts ``n_1 .. n_K`` of the K possible symbols
(zeros included: for some estimators the declared alphabet size K matters) and
computes in nats; :func:`entropy_from_counts` divides by ``ln(base)`` at the end.

The kernels in :data:`ENTROPY_ESTIMATORS` take an already validated float64 array
and work along its last axis, so one call handles a single vector (shape ``(K,)``,
returns a 0-d value) or a stack of vectors over the same alphabet (shape ``(B, K)``,
returns ``(B,)``).  That is what makes the bootstrap and the all-pairs engine fast:
no Python loop over vectors or cells (NSB, which needs a 1-D integral per vector,
is the exception).
"""
from __future__ import annotations

import math
import numbers

import numpy as np
from scipy.special import digamma, xlogy

from infoscope.estimators._checks import check_choice, check_counts, check_observed_counts, log_base

__all__ = [
    "ENTROPY_ESTIMATORS",
    "FINGERPRINT_ESTIMATORS",
    "DIRICHLET_PRIORS",
    "count_fingerprint",
    "entropy_from_counts",
    "entropy_of_count_rows",
]


# ---------------------------------------------------------------------------
# kernels: validated float64 counts (..., K), every row with N > 0 -> nats (...)
# ---------------------------------------------------------------------------

def _total(n: np.ndarray) -> np.ndarray:
    return n.sum(axis=-1)


def _plugin_of_frequencies(p: np.ndarray) -> np.ndarray:
    # xlogy(0, 0) == 0: empty cells contribute nothing; p == 1 gives exactly 0
    # (the + 0.0 turns the -0.0 of a single category into 0.0).
    return -xlogy(p, p).sum(axis=-1) + 0.0


def _plugin(n: np.ndarray) -> np.ndarray:
    """Plug-in (maximum-likelihood) entropy in nats: -sum p ln p with p = n/N."""
    N = _total(n)
    return _plugin_of_frequencies(n / N[..., None])


def _miller_madow(n: np.ndarray) -> np.ndarray:
    """Miller-Madow entropy in nats: plug-in + (m - 1) / (2N), m = non-empty cells."""
    N = _total(n)
    m = np.count_nonzero(n, axis=-1)
    return _plugin(n) + (m - 1) / (2.0 * N)


def _chao_shen(n: np.ndarray) -> np.ndarray:
    """Chao-Shen coverage-adjusted Horvitz-Thompson entropy in nats."""
    N = _total(n)
    f1 = np.count_nonzero(n == 1, axis=-1).astype(np.float64)
    # Chao & Shen (2003): when every observation is a singleton the coverage
    # estimate 1 - f1/N would be 0; use f1 = N - 1 instead (as the paper does).
    f1 = np.where(f1 == N, N - 1.0, f1)
    coverage = 1.0 - f1 / N
    pa = coverage[..., None] * (n / N[..., None])
    # 1 - (1 - pa)^N, computed without cancellation for small pa.
    with np.errstate(divide="ignore", invalid="ignore"):
        inclusion = -np.expm1(N[..., None] * np.log1p(-pa))
        terms = np.where(n > 0, -xlogy(pa, pa) / inclusion, 0.0)
    return terms.sum(axis=-1)


def _james_stein(n: np.ndarray) -> np.ndarray:
    """James-Stein shrinkage entropy in nats (target 1/K, K = len(counts))."""
    K = n.shape[-1]
    N = _total(n)
    p = n / N[..., None]
    target = 1.0 / K
    misfit = ((target - p) ** 2).sum(axis=-1)
    with np.errstate(divide="ignore", invalid="ignore"):
        lam = (1.0 - (p * p).sum(axis=-1)) / ((N - 1.0) * misfit)
    # N == 1 (no variance estimate) or p already uniform (misfit 0): shrink fully,
    # as Hausser & Strimmer's own implementation does; then clip to [0, 1].
    lam = np.where((N <= 1.0) | (misfit == 0.0) | ~np.isfinite(lam), 1.0, lam)
    lam = np.clip(lam, 0.0, 1.0)
    shrunk = lam[..., None] * target + (1.0 - lam[..., None]) * p
    return _plugin_of_frequencies(shrunk)


#: Named pseudocounts of the Dirichlet estimator: name -> function (N, K) -> alpha.
DIRICHLET_PRIORS = {
    "jeffreys": lambda N, K: 0.5 + 0.0 * N,
    "laplace": lambda N, K: 1.0 + 0.0 * N,
    "perks": lambda N, K: 1.0 / K + 0.0 * N,
    "minimax": lambda N, K: np.sqrt(N) / K,
}
DEFAULT_DIRICHLET_PRIOR = "jeffreys"


def _dirichlet(n: np.ndarray, alpha=DEFAULT_DIRICHLET_PRIOR) -> np.ndarray:
    """Entropy in nats of the posterior-mean frequencies (n_i + a) / (N + K a)."""
    K = n.shape[-1]
    N = _total(n)
    if isinstance(alpha, str):
        a = np.asarray(DIRICHLET_PRIORS[alpha](N, K), dtype=np.float64)
    else:
        a = np.broadcast_to(np.float64(alpha), N.shape)
    p = (n + a[..., None]) / (N + K * a)[..., None]
    return _plugin_of_frequencies(p)


def _grassberger_g(n: np.ndarray) -> np.ndarray:
    """G(n) = psi(n) + 1/2 (-1)^n [psi((n+1)/2) - psi(n/2)] for n >= 1 (0 for n == 0)."""
    safe = np.where(n > 0, n, 1.0)
    sign = np.where(np.fmod(safe, 2.0) == 0.0, 1.0, -1.0)
    g = digamma(safe) + 0.5 * sign * (digamma((safe + 1.0) / 2.0) - digamma(safe / 2.0))
    return np.where(n > 0, g, 0.0)


def _grassberger(n: np.ndarray) -> np.ndarray:
    """Grassberger (2003, eq. 35) entropy in nats, with ln N as in the paper."""
    N = _total(n)
    return np.log(N) - (n * _grassberger_g(n)).sum(axis=-1) / N


def _nsb(n: np.ndarray) -> np.ndarray:
    """NSB posterior-mean entropy in nats (one 1-D integral per vector, a stack at a time).

    A stack of vectors (bootstrap replicates, pair tables of one shape) is integrated
    together (:func:`~infoscope.estimators.nsb.nsb_counts_nats`: one vectorised
    evaluation per step for the whole batch, arrays of batch x 480 x K); equal to the
    one-vector path up to rounding (tested to 1e-12).  Long alphabets go one vector at
    a time (their fingerprint is the cheaper form).
    """
    from infoscope.estimators.nsb import nsb_counts_nats, nsb_posterior_nats

    K = n.shape[-1]
    flat = n.reshape(-1, K)
    if flat.shape[0] == 1 or K == 1 or K > _NSB_STACK_K:
        out = np.array([nsb_posterior_nats(row, with_std=False)[0] for row in flat])
        return out.reshape(n.shape[:-1])
    out = np.empty(flat.shape[0])
    step = max(1, _NSB_BATCH_CELLS // (480 * K))
    for lo in range(0, flat.shape[0], step):
        out[lo:lo + step] = nsb_counts_nats(flat[lo:lo + step])
    return out.reshape(n.shape[:-1])


#: Alphabets up to this size are integrated a stack at a time (beyond it, the one-vector
#: fingerprint path was faster in a timing of 60-200 vectors at K = 64 and 256).
_NSB_STACK_K = 32
#: Cells of the largest array one NSB batch builds (float64: 32 MB).
_NSB_BATCH_CELLS = 4_000_000


#: Estimator name -> kernel: validated float64 counts (..., K) -> entropy in nats (...).
ENTROPY_ESTIMATORS = {
    "plugin": _plugin,
    "miller_madow": _miller_madow,
    "chao_shen": _chao_shen,
    "james_stein": _james_stein,
    "dirichlet": _dirichlet,
    "grassberger": _grassberger,
    "nsb": _nsb,
}


# ---------------------------------------------------------------------------
# fingerprint kernels: the same estimators from counts-of-counts
# ---------------------------------------------------------------------------
#
# Every estimator above is symmetric in the cells, so it depends on the counts only
# through their fingerprint: the distinct count values j (0 included when there are
# empty cells) and the number m_j of cells holding each, with K = sum m_j and
# N = sum j m_j.  The kernels below take
#
#   values (..., V)  distinct counts j (float64; a shared (V,) vector broadcasts)
#   mult   (..., V)  multiplicities m_j (float64; m_j == 0 is allowed and ignored)
#   K                the declared alphabet size (int, the same for every row)
#   N      (...)     total counts, > 0
#
# and return nats (...).  Each is the per-cell kernel with every sum over cells
# written as a sum over j of m_j times the term of one cell with count j: an
# ID-like column with 100,000 singletons costs one term instead of 100,000.

def _fp_plugin_of_frequencies(p: np.ndarray, mult: np.ndarray) -> np.ndarray:
    return -(mult * xlogy(p, p)).sum(axis=-1) + 0.0


def _fp_plugin(values, mult, K, N):
    """Plug-in entropy in nats from a fingerprint."""
    N = np.asarray(N, dtype=np.float64)
    return _fp_plugin_of_frequencies(values / N[..., None], mult)


def _fp_miller_madow(values, mult, K, N):
    """Miller-Madow entropy in nats from a fingerprint (m = cells with j > 0)."""
    N = np.asarray(N, dtype=np.float64)
    m = (mult * (values > 0)).sum(axis=-1)
    return _fp_plugin(values, mult, K, N) + (m - 1) / (2.0 * N)


def _fp_chao_shen(values, mult, K, N):
    """Chao-Shen entropy in nats from a fingerprint (f1 = m_1)."""
    N = np.asarray(N, dtype=np.float64)
    f1 = (mult * (values == 1)).sum(axis=-1)
    f1 = np.where(f1 == N, N - 1.0, f1)
    coverage = 1.0 - f1 / N
    pa = coverage[..., None] * (values / N[..., None])
    with np.errstate(divide="ignore", invalid="ignore"):
        inclusion = -np.expm1(N[..., None] * np.log1p(-pa))
        terms = np.where((values > 0) & (mult > 0), -xlogy(pa, pa) / inclusion, 0.0)
    return (mult * terms).sum(axis=-1)


def _fp_james_stein(values, mult, K, N):
    """James-Stein shrinkage entropy in nats from a fingerprint (target 1/K)."""
    N = np.asarray(N, dtype=np.float64)
    p = values / N[..., None]
    target = 1.0 / K
    misfit = (mult * (target - p) ** 2).sum(axis=-1)
    with np.errstate(divide="ignore", invalid="ignore"):
        lam = (1.0 - (mult * (p * p)).sum(axis=-1)) / ((N - 1.0) * misfit)
    lam = np.where((N <= 1.0) | (misfit == 0.0) | ~np.isfinite(lam), 1.0, lam)
    lam = np.clip(lam, 0.0, 1.0)
    shrunk = lam[..., None] * target + (1.0 - lam[..., None]) * p
    return _fp_plugin_of_frequencies(shrunk, mult)


def _fp_dirichlet(values, mult, K, N, alpha=DEFAULT_DIRICHLET_PRIOR):
    """Entropy in nats of the posterior-mean frequencies, from a fingerprint."""
    N = np.asarray(N, dtype=np.float64)
    if isinstance(alpha, str):
        a = np.asarray(DIRICHLET_PRIORS[alpha](N, K), dtype=np.float64)
    else:
        a = np.broadcast_to(np.float64(alpha), N.shape)
    p = (values + a[..., None]) / (N + K * a)[..., None]
    return _fp_plugin_of_frequencies(p, mult)


def _fp_grassberger(values, mult, K, N):
    """Grassberger (2003, eq. 35) entropy in nats from a fingerprint."""
    N = np.asarray(N, dtype=np.float64)
    return np.log(N) - (mult * (values * _grassberger_g(values))).sum(axis=-1) / N


def _fp_nsb(values, mult, K, N):
    """NSB posterior-mean entropy in nats from a fingerprint (all rows in one batch)."""
    from infoscope.estimators.nsb import nsb_fingerprint_nats, nsb_fingerprints_nats

    N = np.asarray(N, dtype=np.float64)
    values, mult = np.broadcast_arrays(np.asarray(values, dtype=np.float64), np.asarray(mult, dtype=np.float64))
    shape = np.broadcast_shapes(values.shape[:-1], N.shape)
    if values.ndim == 1:
        # one vector: the path of the per-cell kernel (zero multiplicities dropped)
        keep = mult > 0
        return np.asarray(nsb_fingerprint_nats(values[keep], mult[keep], K, float(N), with_std=False)[0])
    flat_m = np.broadcast_to(mult, (*shape, mult.shape[-1])).reshape(-1, mult.shape[-1])
    flat_v = np.broadcast_to(values, (*shape, values.shape[-1])).reshape(-1, values.shape[-1])
    if not (flat_v == flat_v[:1]).all():
        raise ValueError("the NSB fingerprint kernel needs the same values in every row")
    flat_n = np.broadcast_to(N, shape).reshape(-1)
    out = np.empty(flat_n.size)
    for lo in range(0, flat_n.size, _NSB_BATCH):   # bounded memory: (batch, 480, V) arrays
        out[lo:lo + _NSB_BATCH] = nsb_fingerprints_nats(
            flat_v[0], flat_m[lo:lo + _NSB_BATCH], K, flat_n[lo:lo + _NSB_BATCH])
    return out.reshape(shape)


_NSB_BATCH = 64


#: Estimator name -> fingerprint kernel: (values, mult, K, N) -> entropy in nats,
#: equal (to rounding) to the kernel of the same name in :data:`ENTROPY_ESTIMATORS`.
FINGERPRINT_ESTIMATORS = {
    "plugin": _fp_plugin,
    "miller_madow": _fp_miller_madow,
    "chao_shen": _fp_chao_shen,
    "james_stein": _fp_james_stein,
    "dirichlet": _fp_dirichlet,
    "grassberger": _fp_grassberger,
    "nsb": _fp_nsb,
}


def count_fingerprint(counts) -> tuple[np.ndarray, np.ndarray]:
    r"""Counts-of-counts of a count vector: its distinct values and their multiplicities.

    Parameters
    ----------
    counts : array_like of shape (K,)
        Non-negative whole-number counts, one per possible symbol (zeros included).

    Returns
    -------
    values : numpy.ndarray of float64, shape (V,)
        The distinct counts j in increasing order (0 first when some cell is empty).
    mult : numpy.ndarray of float64, shape (V,)
        :math:`m_j`, how many cells hold count j; ``mult.sum() == K`` and
        ``(values * mult).sum() == N``.

    Raises
    ------
    ValueError
        If ``counts`` is not 1-D, is negative, non-integral or NaN/inf.

    Notes
    -----
    Every estimator of :data:`ENTROPY_ESTIMATORS` is symmetric in the cells, so it
    is a function of (values, mult) alone; the kernels of
    :data:`FINGERPRINT_ESTIMATORS` compute it from them.  The fingerprint is also
    called the "profile" of the sample in the estimation literature (Orlitsky et al.
    2004) -- common practice; from memory.

    References
    ----------
    .. [1] A. Orlitsky, N. P. Santhanam, K. Viswanathan, J. Zhang, "On modeling
       profiles instead of values", Proceedings of the 20th Conference on Uncertainty
       in Artificial Intelligence (2004) 426-435.

    Examples
    --------
    >>> from infoscope.estimators.entropy import count_fingerprint
    >>> values, mult = count_fingerprint([1, 1, 3, 0, 1])
    >>> values.tolist(), mult.tolist()
    ([0.0, 1.0, 3.0], [1.0, 3.0, 1.0])
    """
    return _fingerprint(check_counts(counts, "counts"))


def _fingerprint(n: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(values, mult) of a validated 1-D float64 count vector."""
    if n.size and n.max() <= 4.0 * n.size + 1024.0:
        # small counts: one bincount (O(K)) instead of a sort
        freq = np.bincount(n.astype(np.int64))
        values = np.flatnonzero(freq)
        return values.astype(np.float64), freq[values].astype(np.float64)
    values, mult = np.unique(n, return_counts=True)
    return values.astype(np.float64), mult.astype(np.float64)


def fingerprint_entropy_nats(values, mult, K: int, N, estimator: str, alpha) -> np.ndarray:
    """Dispatch a fingerprint to its kernel; K == 1 gives exactly 0."""
    N = np.asarray(N, dtype=np.float64)
    if K == 1:
        return np.zeros(np.broadcast_shapes(np.shape(mult)[:-1], N.shape))
    kernel = FINGERPRINT_ESTIMATORS[estimator]
    if estimator == "dirichlet":
        return kernel(values, mult, K, N, alpha)
    return kernel(values, mult, K, N)


# A vector with at least this many cells and at most one distinct count per
# _FINGERPRINT_RATIO cells is scored from its fingerprint.
_FINGERPRINT_MIN_CELLS = 1024
_FINGERPRINT_RATIO = 8


def vector_entropy_nats(n: np.ndarray, estimator: str, alpha) -> float:
    """Entropy (nats) of one validated count vector with N > 0, by the cheaper kernel."""
    if n.size >= _FINGERPRINT_MIN_CELLS:
        values, mult = _fingerprint(n)
        if values.size * _FINGERPRINT_RATIO <= n.size:
            return float(fingerprint_entropy_nats(values, mult, n.size, n.sum(), estimator, alpha))
    return float(entropy_nats(n, estimator, alpha))


# ---------------------------------------------------------------------------
# option checks shared with resampling.py
# ---------------------------------------------------------------------------

def resolve_alpha(estimator: str, alpha):
    """Check ``alpha`` against ``estimator``; return the value the kernel gets.

    ``None`` for every estimator but ``dirichlet``; for ``dirichlet`` a prior name
    from :data:`DIRICHLET_PRIORS` or a finite number > 0 (default ``"jeffreys"``).
    """
    if estimator != "dirichlet":
        if alpha is not None:
            raise ValueError(
                f"alpha={alpha!r} applies only to estimator='dirichlet', not estimator={estimator!r}; "
                "leave alpha=None"
            )
        return None
    if alpha is None:
        return DEFAULT_DIRICHLET_PRIOR
    if isinstance(alpha, str):
        return check_choice(alpha.strip().lower(), DIRICHLET_PRIORS, "alpha")
    if isinstance(alpha, bool) or not isinstance(alpha, numbers.Real):
        raise TypeError(
            f"alpha must be a number > 0 or one of {', '.join(map(repr, DIRICHLET_PRIORS))}, "
            f"got {type(alpha).__name__}"
        )
    a = float(alpha)
    if not math.isfinite(a) or a <= 0:
        raise ValueError(
            f"alpha={alpha!r} is invalid: the Dirichlet pseudocount must be a finite number > 0 "
            "(alpha=0 is the plug-in estimator: use estimator='plugin')"
        )
    return a


def entropy_nats(n: np.ndarray, estimator: str, alpha) -> np.ndarray:
    """Dispatch validated counts (..., K) to a kernel; K == 1 gives exactly 0."""
    if n.shape[-1] == 1:
        # One possible symbol: the entropy is 0 by definition and no correction applies.
        return np.zeros(n.shape[:-1])
    kernel = ENTROPY_ESTIMATORS[estimator]
    if estimator == "dirichlet":
        return kernel(n, alpha)
    return kernel(n)


# ---------------------------------------------------------------------------
# public functions
# ---------------------------------------------------------------------------

def entropy_from_counts(counts, *, estimator="miller_madow", base=2, alpha=None) -> float:
    r"""Entropy of a discrete variable estimated from the counts of its symbols.

    Parameters
    ----------
    counts : array_like of shape (K,)
        Non-negative whole-number counts, one per possible symbol.  Zeros count:
        ``K = len(counts)`` is the declared alphabet size, which the
        ``james_stein``, ``dirichlet`` and ``nsb`` estimators use.
    estimator : str, default="miller_madow"
        One of the keys of :data:`ENTROPY_ESTIMATORS`:

        ``plugin``
            :math:`\hat H = -\sum_i \hat p_i \ln \hat p_i`, :math:`\hat p_i = n_i/N`.
        ``miller_madow``
            :math:`\hat H_{\mathrm{plugin}} + (m - 1)/(2N)`, m = number of non-empty cells.
        ``chao_shen``
            :math:`-\sum_i \tilde p_i \ln \tilde p_i / (1 - (1-\tilde p_i)^N)`,
            :math:`\tilde p_i = C \hat p_i`, :math:`C = 1 - f_1/N` (f1 = singletons;
            when ``f1 == N`` it uses ``N - 1``).
        ``james_stein``
            plug-in of :math:`\lambda/K + (1-\lambda)\hat p_i` with
            :math:`\lambda = (1-\sum\hat p_i^2)/((N-1)\sum(1/K-\hat p_i)^2)` clipped to
            [0, 1] (1 when N = 1 or :math:`\hat p` is uniform).
        ``dirichlet``
            plug-in of :math:`(n_i + a)/(N + K a)`, a = ``alpha``.
        ``grassberger``
            :math:`\ln N - \frac1N \sum_i n_i G(n_i)`,
            :math:`G(n) = \psi(n) + \frac12 (-1)^n [\psi(\frac{n+1}2) - \psi(\frac n2)]`.
            This is eq. 35 of Grassberger (2003) with :math:`\ln N`; some libraries
            (``dit.inference.entropy_2``) put :math:`\psi(N)` in its place, which is
            smaller by about :math:`1/(2N)`.
        ``nsb``
            the posterior mean of H under the Nemenman-Shafee-Bialek mixture of
            symmetric Dirichlet priors (see :func:`infoscope.estimators.nsb.nsb_posterior`).
    base : float or str, default=2
        Logarithm base of the result: 2 (bits), ``math.e`` (nats), 10 (hartleys), any
        number > 0 other than 1, or ``"bits"``, ``"nats"``, ``"hartleys"``.
    alpha : float or str, optional
        Only for ``estimator="dirichlet"`` (an error otherwise): the pseudocount a > 0,
        or ``"jeffreys"`` (0.5), ``"laplace"`` (1), ``"perks"`` (1/K), ``"minimax"``
        (:math:`\sqrt N / K`).  Default (None): ``"jeffreys"``.

    Returns
    -------
    float
        The estimate in the unit of ``base``.  ``K == 1`` gives exactly 0 for every
        estimator.  Bias corrections can exceed :math:`\log K`.

    Raises
    ------
    ValueError
        If ``counts`` is empty or all zero ("no observations"), not 1-D, negative,
        non-integral, NaN/inf; if ``estimator``, ``base`` or ``alpha`` is invalid.

    Notes
    -----
    With one observed category among K > 1, ``plugin``, ``miller_madow`` and
    ``chao_shen`` give 0, while the estimators that spread mass over unseen cells
    (``james_stein``, ``dirichlet``, ``nsb``) and ``grassberger`` give a positive value.

    Every estimator is symmetric in the cells.  A vector of at least 1,024 cells with
    at most one distinct count per 8 cells (an ID-like column) is scored from its
    fingerprint (:func:`count_fingerprint`, :data:`FINGERPRINT_ESTIMATORS`): the same
    value up to rounding (about 1e-15 relative), at the cost of the distinct counts.

    References
    ----------
    .. [1] C. E. Shannon, "A mathematical theory of communication", Bell System
       Technical Journal 27 (1948) 379-423.
    .. [2] G. A. Miller, "Note on the bias of information estimates", in H. Quastler
       (ed.), Information Theory in Psychology, Free Press (1955) 95-100.
    .. [3] A. Chao, T.-J. Shen, "Nonparametric estimation of Shannon's index of
       diversity when there are unseen species in sample", Environmental and
       Ecological Statistics 10 (2003) 429-443.
    .. [4] J. Hausser, K. Strimmer, "Entropy inference and the James-Stein estimator,
       with application to nonlinear gene association networks", Journal of Machine
       Learning Research 10 (2009) 1469-1484.
    .. [5] P. Grassberger, "Entropy estimates from insufficient samplings",
       arXiv:physics/0307138 (2003).
    .. [6] I. Nemenman, F. Shafee, W. Bialek, "Entropy and inference, revisited",
       Advances in Neural Information Processing Systems 14 (2002).

    Examples
    --------
    >>> from infoscope.estimators.entropy import entropy_from_counts
    >>> entropy_from_counts([5, 5], estimator="plugin")
    1.0
    >>> round(entropy_from_counts([5, 5, 0, 0], estimator="miller_madow", base="nats"), 4)
    0.7431
    >>> round(entropy_from_counts([3, 1, 0], estimator="dirichlet", alpha="laplace"), 4)
    1.3788
    """
    estimator = check_choice(estimator, ENTROPY_ESTIMATORS, "estimator")
    divisor = log_base(base)
    a = resolve_alpha(estimator, alpha)
    n = check_observed_counts(counts, "counts")
    return vector_entropy_nats(n, estimator, a) / divisor


def entropy_of_count_rows(counts, *, estimator="miller_madow", base=2, alpha=None) -> np.ndarray:
    r"""Entropy of many count vectors over the same alphabet, one per row, in one call.

    The same estimators and options as :func:`entropy_from_counts`, vectorised over
    rows (NSB loops over rows: it needs one integral per vector).

    Parameters
    ----------
    counts : array_like of shape (B, K)
        Each row holds the counts of the K symbols of one sample.
    estimator : str, default="miller_madow"
        A key of :data:`ENTROPY_ESTIMATORS`.
    base : float or str, default=2
        Logarithm base of the result (see :func:`entropy_from_counts`).
    alpha : float or str, optional
        Pseudocount for ``estimator="dirichlet"`` only.

    Returns
    -------
    numpy.ndarray of shape (B,)
        :math:`\hat H` of each row in the unit of ``base``.

    Raises
    ------
    ValueError
        As :func:`entropy_from_counts`; a row without observations is an error that
        names the row.

    References
    ----------
    .. [1] See :func:`entropy_from_counts` for the estimators' sources.

    Examples
    --------
    >>> from infoscope.estimators.entropy import entropy_of_count_rows
    >>> entropy_of_count_rows([[5, 5], [10, 0]], estimator="plugin").tolist()
    [1.0, 0.0]
    """
    estimator = check_choice(estimator, ENTROPY_ESTIMATORS, "estimator")
    divisor = log_base(base)
    a = resolve_alpha(estimator, alpha)
    n = check_counts(counts, "counts", ndim=2)
    if n.shape[1] == 0:
        raise ValueError("counts has no columns: pass one count per possible symbol (K >= 1)")
    empty = np.flatnonzero(n.sum(axis=1) == 0)
    if empty.size:
        shown = ", ".join(map(str, empty[:5].tolist())) + (" ..." if empty.size > 5 else "")
        raise ValueError(f"counts rows {shown} have no observations (every count is 0)")
    return entropy_nats(n, estimator, a) / divisor
