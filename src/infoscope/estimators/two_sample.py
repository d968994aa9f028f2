r"""Two samples on one alphabet: divergences of many count pairs at once, and their chance level.

A drift number (PSI, KL, JS) computed from two finite samples is never zero, even
when both samples come from the same distribution.  How large it gets from
sampling alone depends on the number of cells K and on both sample sizes n
(reference) and m (current).  For PSI the first-order size follows from Pearson's
two-sample chi-square: PSI is Jeffreys' J divergence, which to second order in
the differences equals :math:`\sum_i (a_i - e_i)^2 / p_i`, and under equal
distributions :math:`\frac{nm}{n+m}\sum_i (a_i - e_i)^2 / p_i` is approximately
:math:`\chi^2_{K-1}`, so

.. math:: E[\mathrm{PSI}] \approx (K - 1)\left(\frac{1}{n} + \frac{1}{m}\right)

(:func:`psi_chance_approximation`).  The approximation fails where cells are
sparse (it ignores the pseudocount and the empty cells), so the number shown is
not that formula but the **permutation distribution**: pooling the two samples,
every way of splitting the pooled rows into n and m rows is equally likely when
nothing changed, and on a fixed alphabet the current side's counts of such a
split are one draw from the multivariate hypergeometric distribution of the
pooled counts.  ``numpy.random.Generator.multivariate_hypergeometric`` draws all
splits at once; each split is scored by the same vectorised divergences as the
observed pair.  The p-value is the share of splits at least as divergent as the
observed one, counted with the observed split itself (Phipson & Smyth 2010), so it
is never 0 and is exact (valid at every sample size) whenever the alphabet does
not depend on which side a row came from.

All values are in nats here; callers convert.
"""
from __future__ import annotations

import math
import numbers
from typing import NamedTuple

import numpy as np
from scipy import special, stats

__all__ = [
    "DriftTest",
    "divergence_rows",
    "drift_chi2_test",
    "drift_permutation_test",
    "psi_chance_approximation",
]

# a replicate whose divergence is within this relative distance of the observed one
# counts as "at least as large" (rounding of equal tables must not lower the p-value)
_TIE = 1e-9
# largest replicates x cells block scored at once (float64: about 32 MB)
_BLOCK_CELLS = 4_000_000


class DriftTest(NamedTuple):
    """Observed divergences of one column, their chance level and the permutation p-value (nats)."""

    psi: float
    kl: float
    js: float
    #: mean of each divergence over the permutation splits: what sampling alone gives
    psi_chance: float
    kl_chance: float
    js_chance: float
    #: the 95 % point of the permutation distribution of PSI (the top of the chance band)
    psi_chance_high: float
    p_value: float
    n_perm: int


def _check_counts_vector(v, parameter: str) -> np.ndarray:
    arr = np.asarray(v)
    if arr.ndim != 1 or arr.size == 0:
        raise ValueError(f"{parameter} must be a non-empty 1-D vector of counts, got shape {arr.shape}")
    if not np.issubdtype(arr.dtype, np.number) or np.issubdtype(arr.dtype, np.complexfloating):
        raise TypeError(f"{parameter} must hold counts (whole numbers >= 0), got dtype {arr.dtype}")
    f = arr.astype(np.float64)
    if not np.all(np.isfinite(f)) or np.any(f < 0) or np.any(f != np.round(f)):
        raise ValueError(f"{parameter} must hold counts (whole numbers >= 0)")
    return f.astype(np.int64)


def _check_pseudocount(pseudocount) -> float:
    if isinstance(pseudocount, bool) or not isinstance(pseudocount, numbers.Real):
        raise TypeError(f"pseudocount must be a number >= 0, got {type(pseudocount).__name__}")
    a = float(pseudocount)
    if not math.isfinite(a) or a < 0:
        raise ValueError(f"pseudocount={pseudocount!r} is invalid: it must be a finite number >= 0")
    return a


def divergence_rows(reference, current, *, pseudocount: float = 0.5) -> dict[str, np.ndarray]:
    """PSI, KL(current || reference) and JS of many pairs of count vectors at once (nats).

    Parameters
    ----------
    reference, current : array_like of shape (..., K)
        Counts of the reference and the current sample on the same K cells; any
        leading shape (e.g. one row per permutation split).
    pseudocount : float, default=0.5
        Added to every cell of both sides before PSI and KL (Jeffreys' 1/2: an
        empty cell then gives a finite value).  JS is computed without it (it is
        finite anyway).  0 gives the raw indices (``inf`` when a cell is empty on
        one side only).

    Returns
    -------
    dict
        ``{"psi", "kl", "js"}``, arrays of the leading shape, in nats, >= 0.  A row
        with no observations on either side is NaN.

    References
    ----------
    .. [1] Jeffreys, H. (1946). An invariant form for the prior probability in
       estimation problems. Proceedings of the Royal Society A, 186(1007), 453-461
       (PSI is the J divergence; the pseudocount 1/2).
    .. [2] Lin, J. (1991). Divergence measures based on the Shannon entropy. IEEE
       Transactions on Information Theory, 37(1), 145-151.

    Examples
    --------
    >>> out = divergence_rows([[50, 50], [50, 50]], [[50, 50], [80, 20]])
    >>> [round(float(v), 4) for v in out["psi"]]
    [0.0, 0.3934]
    """
    a = _check_pseudocount(pseudocount)
    r = np.asarray(reference, dtype=np.float64)
    c = np.asarray(current, dtype=np.float64)
    if r.shape != c.shape or r.ndim == 0:
        raise ValueError(f"reference and current must have the same shape, got {r.shape} and {c.shape}")
    k = r.shape[-1]
    nr = r.sum(axis=-1, keepdims=True)
    nc = c.sum(axis=-1, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):
        e = (r + a) / (nr + k * a)
        q = (c + a) / (nc + k * a)
        psi = np.sum(special.rel_entr(q, e) + special.rel_entr(e, q), axis=-1)
        kl = np.sum(special.rel_entr(q, e), axis=-1)
        pr, pc = r / nr, c / nc
        mid = 0.5 * (pr + pc)
        js = 0.5 * np.sum(special.rel_entr(pr, mid), axis=-1) + 0.5 * np.sum(special.rel_entr(pc, mid), axis=-1)
    empty = (nr[..., 0] == 0) | (nc[..., 0] == 0)
    out = {}
    for name, v in (("psi", psi), ("kl", kl), ("js", np.minimum(js, math.log(2.0)))):
        v = np.where(v > 0.0, v, 0.0)  # each is >= 0; a negative is rounding
        out[name] = np.where(empty, np.nan, v)
    return out


def psi_chance_approximation(k: int, n: int, m: int) -> float:
    r"""First-order expected PSI of two samples of one distribution: :math:`(K-1)(1/n + 1/m)`.

    Parameters
    ----------
    k : int
        Number of cells with mass (K).
    n, m : int
        Sizes of the two samples.

    Returns
    -------
    float
        The approximation in nats; it holds when every cell has many rows on both
        sides and overstates the chance level when cells are sparse (then the
        permutation distribution of :func:`drift_permutation_test` is the one to use).

    References
    ----------
    .. [1] Pearson, K. (1900). On the criterion that a given system of deviations
       ... Philosophical Magazine 50, 157-175 (the chi-square approximation; the
       two-sample form is the usual test of homogeneity).

    Examples
    --------
    >>> round(psi_chance_approximation(16, 2000, 100), 4)
    0.1575
    """
    return (max(int(k), 1) - 1) * (1.0 / int(n) + 1.0 / int(m))


def _rng(seed) -> np.random.Generator:
    if isinstance(seed, np.random.Generator):
        return seed
    return np.random.default_rng(seed)


def drift_permutation_test(reference, current, *, pseudocount: float = 0.5, n_perm: int = 999,
                           seed=0) -> DriftTest:
    """Divergences of a current sample from a reference, with their chance level and p-value.

    Parameters
    ----------
    reference, current : array_like of shape (K,)
        Counts of the two samples on one alphabet.
    pseudocount : float, default=0.5
        As in :func:`divergence_rows`.
    n_perm : int, default=999
        Number of random splits of the pooled rows.  The smallest p-value possible
        is ``1 / (n_perm + 1)``.
    seed : int, numpy.random.Generator or None, default=0
        Seed of the splits.

    Returns
    -------
    DriftTest
        The observed PSI, KL(current || reference) and JS; their means over the
        splits (``*_chance``: the value expected from sampling alone at these
        sizes); the 95 % point of the split distribution of PSI; the p-value
        ``(1 + #{splits with PSI >= observed}) / (n_perm + 1)``.  All in nats.
        NaN everywhere when a side has no observations.

    References
    ----------
    .. [1] Good, P. (2005). Permutation, Parametric and Bootstrap Tests of
       Hypotheses, 3rd ed. Springer (two-sample permutation tests).
    .. [2] Phipson, B., & Smyth, G. K. (2010). Permutation p-values should never be
       zero. Statistical Applications in Genetics and Molecular Biology, 9(1), 39.

    Examples
    --------
    >>> t = drift_permutation_test([500, 500], [50, 50], seed=1)
    >>> t.psi, t.p_value
    (0.0, 1.0)
    >>> drift_permutation_test([500, 500], [90, 10], seed=1).p_value < 0.01
    True
    """
    r = _check_counts_vector(reference, "reference")
    c = _check_counts_vector(current, "current")
    if r.shape != c.shape:
        raise ValueError(f"reference and current must have the same number of cells: {r.size} and {c.size}")
    if isinstance(n_perm, bool) or not isinstance(n_perm, numbers.Integral) or n_perm < 1:
        raise ValueError(f"n_perm={n_perm!r} is invalid: it must be an integer >= 1")
    n_perm = int(n_perm)
    obs = divergence_rows(r, c, pseudocount=pseudocount)
    psi, kl, js = (float(obs[name]) for name in ("psi", "kl", "js"))
    if math.isnan(psi):  # a side without observations: nothing to compare
        nan = math.nan
        return DriftTest(nan, nan, nan, nan, nan, nan, nan, nan, n_perm)
    pooled = r + c
    live = pooled > 0  # cells empty on both sides contribute nothing to any divergence ...
    m = int(c.sum())
    rng = _rng(seed)
    sums = {"psi": 0.0, "kl": 0.0, "js": 0.0}
    psi_splits = np.empty(n_perm)
    k_live = int(live.sum())
    # ... except through the pseudocount's share, so keep the empty cells as one
    # zero column per row of the block: same K, far fewer hypergeometric draws
    n_empty = pooled.size - k_live
    block = max(1, _BLOCK_CELLS // max(pooled.size, 1))
    done = 0
    while done < n_perm:
        size = min(block, n_perm - done)
        if k_live <= 1:
            cur = np.tile(c[live], (size, 1))
        else:
            cur = rng.multivariate_hypergeometric(pooled[live], m, size=size)
        ref = pooled[live][None, :] - cur
        if n_empty:
            zeros = np.zeros((size, n_empty), dtype=cur.dtype)
            cur, ref = np.hstack([cur, zeros]), np.hstack([ref, zeros])
        rows = divergence_rows(ref, cur, pseudocount=pseudocount)
        psi_splits[done:done + size] = rows["psi"]
        for name in sums:
            sums[name] += float(np.sum(rows[name]))
        done += size
    tol = _TIE * max(1.0, abs(psi)) if math.isfinite(psi) else 0.0
    exceed = int(np.count_nonzero(psi_splits >= psi - tol))
    p = (1 + exceed) / (n_perm + 1)
    return DriftTest(
        psi, kl, js,
        sums["psi"] / n_perm, sums["kl"] / n_perm, sums["js"] / n_perm,
        float(np.quantile(psi_splits, 0.95)), float(p), n_perm,
    )


def drift_chi2_test(reference, current, *, pseudocount: float = 0.5) -> DriftTest:
    r"""The large-sample form of :func:`drift_permutation_test`: G-test and first-order chance levels.

    Parameters
    ----------
    reference, current : array_like of shape (K,)
        Counts of the two samples on one alphabet.
    pseudocount : float, default=0.5
        As in :func:`divergence_rows` (for the observed divergences).

    Returns
    -------
    DriftTest
        The observed divergences; chance levels from the chi-square
        approximation with K the cells that have rows and :math:`s = 1/n + 1/m`:
        ``psi_chance`` = :math:`(K-1)s`, ``kl_chance`` half of it and ``js_chance``
        an eighth (to second order KL is half and JS an eighth of the chi-square
        distance that PSI approximates), ``psi_chance_high`` =
        :math:`\chi^2_{K-1}(0.95)\,s`; ``p_value`` of the G-test of homogeneity
        of the 2 x K table, :math:`G = 2\sum O \ln(O/E) \sim \chi^2_{K-1}`.
        Valid when every cell has many rows on both sides; with sparse cells it is
        off (see the calibration tests), which is why the permutation form is the
        default.  ``n_perm`` is 0.

    References
    ----------
    .. [1] Wilks, S. S. (1938). The large-sample distribution of the likelihood
       ratio for testing composite hypotheses. Annals of Mathematical Statistics,
       9(1), 60-62.
    .. [2] Pearson, K. (1900). Philosophical Magazine 50, 157-175.

    Examples
    --------
    >>> t = drift_chi2_test([500, 500], [50, 50])
    >>> round(t.psi_chance, 4), t.p_value
    (0.011, 1.0)
    """
    r = _check_counts_vector(reference, "reference")
    c = _check_counts_vector(current, "current")
    if r.shape != c.shape:
        raise ValueError(f"reference and current must have the same number of cells: {r.size} and {c.size}")
    obs = divergence_rows(r, c, pseudocount=pseudocount)
    psi, kl, js = (float(obs[name]) for name in ("psi", "kl", "js"))
    n, m = int(r.sum()), int(c.sum())
    if math.isnan(psi):
        nan = math.nan
        return DriftTest(nan, nan, nan, nan, nan, nan, nan, nan, 0)
    table = np.vstack([r, c]).astype(np.float64)
    table = table[:, table.sum(axis=0) > 0]
    dof = table.shape[1] - 1
    s = 1.0 / n + 1.0 / m
    if dof < 1:
        return DriftTest(psi, kl, js, 0.0, 0.0, 0.0, 0.0, 1.0, 0)
    expected = table.sum(axis=1, keepdims=True) * table.sum(axis=0, keepdims=True) / table.sum()
    g = 2.0 * float(np.sum(special.xlogy(table, table / expected)))
    p = float(stats.chi2.sf(max(g, 0.0), dof))
    chance = dof * s
    return DriftTest(psi, kl, js, chance, chance / 2.0, chance / 8.0,
                     float(stats.chi2.ppf(0.95, dof)) * s, p, 0)
