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

from infoscope.estimators._checks import check_nonnegative

__all__ = [
    "DriftTest",
    "MIChangeTest",
    "REFINE_BELOW",
    "REFINE_SPLITS",
    "divergence_rows",
    "drift_chi2_test",
    "drift_permutation_test",
    "mi_change_test",
    "psi_chance_approximation",
]

# a replicate whose divergence is within this relative distance of the observed one
# counts as "at least as large" (rounding of equal tables must not lower the p-value)
_TIE = 1e-9
# largest replicates x cells block scored at once (float64: about 32 MB)
_BLOCK_CELLS = 4_000_000


class DriftTest(NamedTuple):
    """Observed divergences of one column, their chance level and the permutation p-value (nats).

    Attributes
    ----------
    psi, kl, js : float
        Observed PSI, KL(current || reference) and JS divergence.
    psi_chance, kl_chance, js_chance : float
        Their means over the splits: what sampling alone gives at these sizes.
    psi_chance_high : float
        The 95 % point of PSI over the splits (the top of the chance band).
    p_value : float
        Share of splits with PSI at least the observed one, counted with it.
    n_perm : int
        Splits the p-value rests on (0 for the chi-square form).
    """

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
    #: splits the p-value rests on (``n_perm``, plus the refinement when it ran; 0 for chi2)
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
    [0.0, 0.4063]
    """
    a = check_nonnegative(pseudocount, "pseudocount")
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
        if a > 0:  # every smoothed share is > 0: one log serves PSI and KL
            log_ratio = np.log(q) - np.log(e)
            psi = np.sum((q - e) * log_ratio, axis=-1)
            kl = np.sum(q * log_ratio, axis=-1)
        else:
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


#: A p-value from the first ``n_perm`` splits below this gets ``REFINE_SPLITS``
#: more splits, so that a small p-value is resolved finely enough for a
#: Benjamini-Hochberg adjustment over many columns or pairs (a two-stage Monte
#: Carlo p-value; each stage's p-value is valid on its own, so the combination
#: is too: Besag & Clifford 1991).
REFINE_BELOW = 0.05
REFINE_SPLITS = 9000


def _split_tables(rng, pooled: np.ndarray, m: int, size: int):
    """``size`` random splits of the pooled counts: (current, reference) count rows."""
    live = pooled > 0
    cur = np.zeros((size, pooled.size), dtype=np.int64)
    if int(live.sum()) <= 1:
        cur[:, live] = m
    else:
        cur[:, live] = rng.multivariate_hypergeometric(pooled[live], m, size=size)
    return cur, pooled[None, :] - cur


def _blocks(total: int, cells: int):
    block = max(1, _BLOCK_CELLS // max(cells, 1))
    done = 0
    while done < total:
        size = min(block, total - done)
        yield size
        done += size


def drift_permutation_test(reference, current, *, pseudocount: float = 0.5, n_perm: int = 999,
                           seed=0, refine: bool = True) -> DriftTest:
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
    refine : bool, default=True
        When the p-value of the first ``n_perm`` splits is below
        :data:`REFINE_BELOW`, add :data:`REFINE_SPLITS` more splits (the smallest
        p-value is then about 1e-4).

    Returns
    -------
    DriftTest
        The observed PSI, KL(current || reference) and JS; their means over the
        splits (``*_chance``: the value expected from sampling alone at these
        sizes); the 95 % point of the split distribution of PSI; the p-value
        ``(1 + #{splits with PSI >= observed}) / (splits + 1)``.  All in nats.
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
    m = int(c.sum())
    rng = _rng(seed)
    tol = _TIE * max(1.0, abs(psi)) if math.isfinite(psi) else 0.0
    sums = {"psi": 0.0, "kl": 0.0, "js": 0.0}
    splits: list[np.ndarray] = []
    exceed, total = 0, 0
    stages = [n_perm, REFINE_SPLITS] if refine else [n_perm]
    for stage, count in enumerate(stages):
        if stage and (1 + exceed) / (total + 1) >= REFINE_BELOW:
            break
        for size in _blocks(count, pooled.size):
            cur, ref = _split_tables(rng, pooled, m, size)
            rows = divergence_rows(ref, cur, pseudocount=pseudocount)
            if stage == 0:  # the chance levels come from the first stage only
                splits.append(rows["psi"])
                for name in sums:
                    sums[name] += float(np.sum(rows[name]))
            exceed += int(np.count_nonzero(rows["psi"] >= psi - tol))
            total += size
    psi_splits = np.concatenate(splits)
    p = (1 + exceed) / (total + 1)
    return DriftTest(
        psi, kl, js,
        sums["psi"] / n_perm, sums["kl"] / n_perm, sums["js"] / n_perm,
        float(np.quantile(psi_splits, 0.95)), float(p), total,
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


class MIChangeTest(NamedTuple):
    """How the mutual information of one pair changed between two samples (nats).

    Attributes
    ----------
    mi_reference, mi : float
        MI of the pair in the reference and in the current sample.
    change : float
        ``mi - mi_reference``.
    ci_low, ci_high : float
        Bootstrap interval of the change.
    change_chance, chance_low, chance_high : float
        Mean and 2.5 % / 97.5 % points of the change over random splits of the pooled rows.
    p_value : float
        Two-sided permutation p-value.
    n_perm : int
        Splits the p-value rests on.
    """

    mi_reference: float
    mi: float
    #: ``mi - mi_reference``
    change: float
    #: bootstrap interval of the change (both samples resampled, centred on the estimate)
    ci_low: float
    ci_high: float
    #: mean and 2.5 % / 97.5 % points of the change over random splits of the pooled rows
    change_chance: float
    chance_low: float
    chance_high: float
    p_value: float
    n_perm: int


def _mi_rows_nats(flat: np.ndarray, shape: tuple[int, int], estimator: str, alpha) -> np.ndarray:
    from infoscope.estimators.entropy import entropy_nats

    tables = flat.reshape(-1, *shape).astype(np.float64)
    mi = (entropy_nats(tables.sum(axis=2), estimator, alpha)
          + entropy_nats(tables.sum(axis=1), estimator, alpha)
          - entropy_nats(tables.reshape(len(tables), -1), estimator, alpha))
    return np.maximum(mi, 0.0) if estimator == "plugin" else mi


def mi_change_test(reference, current, *, estimator: str = "miller_madow", alpha=None,
                   n_perm: int = 499, n_boot: int = 200, level: float = 0.95, seed=0,
                   refine_splits: int = 4500) -> MIChangeTest:
    r"""Did the dependence of a pair change?  MI in both samples, the change, its interval and chance level.

    Parameters
    ----------
    reference, current : array_like of shape (r, c)
        Joint counts of the pair in the two samples, on the same alphabets.
    estimator : str, default="miller_madow"
        Entropy estimator of the MI, :math:`\hat I = \hat H(X) + \hat H(Y) - \hat H(X, Y)`
        (a name of ``infoscope.ENTROPY_ESTIMATORS``).
    alpha : float, str or None, default=None
        Pseudocount of the ``dirichlet`` estimator.
    n_perm : int, default=499
        Random splits of the pooled rows for the chance level and the p-value.
    n_boot : int, default=200
        Bootstrap replicates of each sample for the interval (0: no interval).
    level : float, default=0.95
        Level of the interval.
    seed : int, numpy.random.Generator or None, default=0
        Seed of the splits and the replicates.
    refine_splits : int, default=4500
        Splits added when the first p-value is below :data:`REFINE_BELOW` (0: none);
        the smallest p-value is then ``1 / (n_perm + refine_splits + 1)``.

    Returns
    -------
    MIChangeTest
        ``mi_reference``, ``mi``, ``change``; ``ci_low``/``ci_high`` from
        multinomial resampling of both tables (the percentile interval of the
        replicate changes moved so that their median sits on the estimate, the
        project's "centred" interval); ``change_chance`` with ``chance_low`` /
        ``chance_high``, the mean and 95 % band of the change when the rows are
        split at random (which also carries the different bias of the two sample
        sizes); the two-sided p-value
        ``(1 + #{|split - mean| >= |change - mean|}) / (splits + 1)``.  The splits
        test equal joint distributions, so a pair whose marginals moved while its
        dependence stayed can read as changed; compare with the column drift.

    References
    ----------
    .. [1] Good, P. (2005). Permutation, Parametric and Bootstrap Tests of
       Hypotheses, 3rd ed. Springer.
    .. [2] Efron, B., & Tibshirani, R. J. (1993). An Introduction to the
       Bootstrap. Chapman & Hall, ch. 10 and 13.
    .. [3] Miller, G. A. (1955). Note on the bias of information estimates. In
       Quastler (ed.), Information Theory in Psychology, Free Press, 95-100.

    Examples
    --------
    >>> same = mi_change_test([[40, 10], [10, 40]], [[40, 10], [10, 40]], n_boot=0)
    >>> round(same.change, 6), same.p_value > 0.5
    (0.0, True)
    >>> mi_change_test([[40, 10], [10, 40]], [[25, 25], [25, 25]], n_boot=0).p_value < 0.01
    True
    """
    from infoscope.estimators.entropy import resolve_alpha

    a = resolve_alpha(estimator, alpha)
    R = np.asarray(reference, dtype=np.int64)
    C = np.asarray(current, dtype=np.int64)
    if R.ndim != 2 or R.shape != C.shape:
        raise ValueError(f"reference and current must be tables of one shape, got {R.shape} and {C.shape}")
    if np.any(R < 0) or np.any(C < 0):
        raise ValueError("tables must hold counts >= 0")
    shape = R.shape
    n, m = int(R.sum()), int(C.sum())
    if n == 0 or m == 0:
        nan = math.nan
        return MIChangeTest(nan, nan, nan, nan, nan, nan, nan, nan, nan, 0)
    rng = _rng(seed)
    mi_r, mi_c = (float(v) for v in _mi_rows_nats(np.vstack([R.ravel(), C.ravel()]), shape, estimator, a))
    change = mi_c - mi_r
    pooled = (R + C).ravel()
    # first stage: the chance distribution of the change
    parts = []
    for size in _blocks(n_perm, pooled.size):
        cur, ref = _split_tables(rng, pooled, m, size)
        parts.append(_mi_rows_nats(cur, shape, estimator, a) - _mi_rows_nats(ref, shape, estimator, a))
    null = np.concatenate(parts)
    centre = float(np.mean(null))
    distance = abs(change - centre)
    tol = _TIE * max(1.0, distance)
    exceed = int(np.count_nonzero(np.abs(null - centre) >= distance - tol))
    total = n_perm
    if refine_splits and (1 + exceed) / (total + 1) < REFINE_BELOW:
        for size in _blocks(int(refine_splits), pooled.size):
            cur, ref = _split_tables(rng, pooled, m, size)
            more = _mi_rows_nats(cur, shape, estimator, a) - _mi_rows_nats(ref, shape, estimator, a)
            exceed += int(np.count_nonzero(np.abs(more - centre) >= distance - tol))
            total += size
    low = high = math.nan
    if n_boot:
        boot = []
        for size in _blocks(n_boot, pooled.size):
            br = rng.multinomial(n, R.ravel() / n, size=size)
            bc = rng.multinomial(m, C.ravel() / m, size=size)
            boot.append(_mi_rows_nats(bc, shape, estimator, a) - _mi_rows_nats(br, shape, estimator, a))
        reps = np.concatenate(boot)
        shift = change - float(np.median(reps))
        q_lo, q_hi = np.quantile(reps, [(1 - level) / 2, (1 + level) / 2])
        low, high = float(q_lo + shift), float(q_hi + shift)
    c_lo, c_hi = np.quantile(null, [0.025, 0.975])
    return MIChangeTest(mi_r, mi_c, change, low, high, centre, float(c_lo), float(c_hi),
                        (1 + exceed) / (total + 1), total)
