r"""Conditional mutual information I(X; Y | Z): a bootstrap interval and a permutation test.

Both work on integer codes or count tables (numpy only), like
:mod:`infoscope.estimators.resampling`.

The permutation test of conditional independence
------------------------------------------------
Under :math:`X \perp Y \mid Z` and independent rows, the X values of the rows in one
stratum of Z are exchangeable given the Y values of those rows: every rearrangement
of X *within each stratum* is equally likely.  Shuffling X within strata keeps the
tables of (X, Z), (Y, Z) and Z, so only the joint table of (X, Y, Z) changes, and the
plug-in statistic :math:`\hat I(X;Y \mid Z) = H(X,Z) + H(Y,Z) - H(X,Y,Z) - H(Z)` is
compared with its values under many such shuffles.  With b of m shuffled statistics at
least as large as the observed one, :math:`p = (b + 1)/(m + 1)` (Phipson & Smyth 2010),
a valid test at every sample size: no chi-square approximation is involved, so a
sparse table makes the test weak, never anti-conservative.  (The calibration is
checked by simulation in ``tests/test_conditional.py``.)

All shuffles of a block are drawn at once: with few strata, one ``Generator.permuted``
call per stratum shuffles every replicate's copy of that stratum; with many strata,
one ``argsort`` of ``stratum + uniform noise`` per replicate row shuffles all strata at
once.  Either way there is no Python loop over rows or replicates.

The interval, and why it agrees with the test
---------------------------------------------
:func:`cmi_interval_from_table` gives :math:`I(X;Y \mid Z)` the interval the pair
tables give mutual information (:mod:`infoscope.estimators.intervals`), on the
conditional G statistic :math:`G = 2N\hat I(X;Y \mid Z) = \sum_z G_z`, the sum of
the strata's G-tests of independence.  Each :math:`G_z` is approximately a
noncentral chi-square with :math:`(r_z - 1)(c_z - 1)` degrees of freedom and
noncentrality :math:`2 n_z I_z`, so the sum is one with the summed degrees of
freedom and noncentrality :math:`2N I(X;Y \mid Z)`.  The chance mean used to scale G
is the one of the within-strata shuffles of the test: shuffling X within a stratum
is the hypergeometric model of that stratum's table, so
:math:`E_0[\hat I(X;Y \mid Z)] = \sum_z (n_z / N)\,E_0[\hat I_z]` with each term
from :func:`infoscope.estimators.intervals.chance_mi_nats` (exact sums for sparse
cells, the second-order term for well-filled ones, as for the pair tables).  Given the permutation
p-value, the lower end is above 0 exactly when ``p < (1 - level) / 2`` (the duality
of the pair tables); the ends come from the scaled G, which has no Monte-Carlo noise.
"""
from __future__ import annotations

import numpy as np

from infoscope.estimators._checks import check_choice, check_same_length, log_base
from infoscope.estimators.entropy import entropy_nats
from infoscope.estimators.resampling import (
    INTERVAL_METHODS,
    ConfidenceInterval,
    PermutationTestResult,
    _check_codes,
    _check_positive_int,
    _interval,
    _multinomial_blocks,
    _resampling_inputs,
    _rng,
)

__all__ = ["bootstrap_cmi_ci", "cmi_interval_from_table", "conditional_permutation_test", "cmi_of_tables_nats"]

# Work in blocks of about this many cells (replicates x rows or x table cells).
_BLOCK_CELLS = 4_000_000
# Up to this many strata are shuffled one stratum at a time (all replicates at once);
# beyond it one sort per replicate shuffles every stratum together.
_LOOP_STRATA = 256


def cmi_of_tables_nats(flat: np.ndarray, shape: tuple[int, int, int], estimator: str, alpha) -> np.ndarray:
    """H(X,Z) + H(Y,Z) - H(X,Y,Z) - H(Z) in nats for each row of flattened (B, kx*ky*kz) tables."""
    t = flat.reshape(-1, *shape)
    b = t.shape[0]
    cmi = (
        entropy_nats(t.sum(axis=2).reshape(b, -1), estimator, alpha)
        + entropy_nats(t.sum(axis=1).reshape(b, -1), estimator, alpha)
        - entropy_nats(flat.reshape(b, -1), estimator, alpha)
        - entropy_nats(t.sum(axis=(1, 2)), estimator, alpha)
    )
    if estimator == "plugin":
        cmi = np.maximum(cmi, 0.0)  # a weighted sum of KL divergences: a negative is rounding
    return cmi


def bootstrap_cmi_ci(
    table3d, *, estimator="miller_madow", base=2, alpha=None, level=0.95, n_boot=200, seed=None,
    method="centred",
) -> ConfidenceInterval:
    r"""Bootstrap confidence interval of the conditional mutual information of a 3-D table.

    Each replicate draws the cells of the table jointly from
    :math:`\mathrm{Multinomial}(N, T/N)` (the rows resampled with replacement) and
    scores :math:`\hat H(X,Z) + \hat H(Y,Z) - \hat H(X,Y,Z) - \hat H(Z)` with the
    chosen entropy estimator.

    Parameters
    ----------
    table3d : array_like of shape (k_x, k_y, k_z)
        Joint counts; ``table3d[i, j, l]`` = rows with ``X = i, Y = j, Z = l``.
    estimator : str, default="miller_madow"
        A name of :data:`infoscope.estimators.entropy.ENTROPY_ESTIMATORS`.
    base : float or str, default=2
        Logarithm base or unit name.
    alpha : float or str, optional
        Pseudocount for ``estimator="dirichlet"`` only.
    level : float, default=0.95
        Confidence level, in (0, 1).
    n_boot : int, default=200
        Number of bootstrap replicates.
    seed : None, int or numpy.random.Generator, optional
        Source of randomness.
    method : {"centred", "percentile"}, default="centred"
        As in :func:`infoscope.estimators.resampling.bootstrap_entropy_ci`.

    Returns
    -------
    ConfidenceInterval
        ``(low, high)`` in the unit of ``base``.

    Notes
    -----
    On a sparse table (few rows per cell of X x Y within the strata) the replicates
    share the estimate's upward bias and the interval is too narrow: judge
    dependence by :func:`conditional_permutation_test` instead.

    References
    ----------
    .. [1] B. Efron, R. J. Tibshirani, An Introduction to the Bootstrap, Chapman &
       Hall (1993), ch. 10 and 13.

    Examples
    --------
    >>> t = [[[30, 10], [10, 30]], [[10, 30], [30, 10]]]
    >>> low, high = bootstrap_cmi_ci(t, seed=0, n_boot=100)
    >>> bool(0.05 < low < high < 0.5)
    True
    """
    t, total, estimator, a, divisor, level, n_boot, rng = _resampling_inputs(
        table3d, "table3d", 3, estimator, alpha, base, level, n_boot, seed
    )
    method = check_choice(method, INTERVAL_METHODS, "method")
    shape = t.shape
    p = (t / total).ravel()
    values = np.concatenate(
        [cmi_of_tables_nats(block, shape, estimator, a) for block in _multinomial_blocks(rng, total, p, n_boot)]
    )
    estimate = float(cmi_of_tables_nats(t.ravel()[None, :], shape, estimator, a)[0]) / divisor
    return _interval(values / divisor, level, method, estimate)


def cmi_interval_from_table(table3d, *, level=0.95, base=2, p_value=None):
    r"""Conditional MI above chance with its interval, from a (k_x, k_y, k_z) table.

    See the module notes: G summed over the strata, scaled to its chance mean
    under within-strata shuffles, and the noncentral chi-square inverted at both ends
    (:func:`infoscope.estimators.intervals.intervals_from_statistics`).

    Parameters
    ----------
    table3d : array_like of shape (k_x, k_y, k_z)
        Joint counts; ``table3d[i, j, l]`` = rows with ``X = i, Y = j, Z = l``.
    level : float, default=0.95
        Two-sided confidence level, in (0, 1).
    base : float or str, default=2
        Logarithm base or unit name of the results.
    p_value : float, optional
        The p-value of the test of conditional independence shown beside the
        interval (:func:`conditional_permutation_test`).  When given, ``low > 0``
        exactly when ``p_value < (1 - level) / 2``; NaN gives NaN.

    Returns
    -------
    MIInterval
        Floats ``estimate`` = :math:`\max(\hat I(X;Y \mid Z) - E_0[\hat I], 0)`
        (plug-in, above what chance gives at these strata and margins), ``low``,
        ``high``, ``chance`` = :math:`E_0[\hat I(X;Y \mid Z)]` and the int ``dof``
        (summed over strata, on the symbols present in each).

    References
    ----------
    .. [1] Mitra, S. K. (1958). On the limiting power function of the frequency
       chi-square test. Annals of Mathematical Statistics, 29(4), 1221-1233.
    .. [2] Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic
       measures for clusterings comparison. JMLR 11, 2837-2854 (the exact chance MI).

    Examples
    --------
    >>> t = [[[30, 10], [10, 30]], [[10, 30], [30, 10]]]
    >>> r = cmi_interval_from_table(t, p_value=0.001)
    >>> bool(0 < r.low < r.estimate < r.high), r.dof
    (True, 2)
    """
    from infoscope.estimators._checks import check_counts
    from infoscope.estimators.intervals import MIInterval, chance_mi_nats, intervals_from_statistics
    from infoscope.estimators.significance import g_statistics

    t = check_counts(table3d, "table3d", ndim=3)
    divisor = log_base(base)
    strata = [t[:, :, z] for z in range(t.shape[2]) if t[:, :, z].sum() > 0]
    total = float(t.sum())
    if not strata:
        nan = float("nan")
        return MIInterval(nan, nan, nan, nan, 0)
    g_z, dof_z, n_z, _, _, _ = g_statistics(strata)
    chance = sum(float(n) / total * chance_mi_nats(tz) for tz, n, d in zip(strata, n_z, dof_z) if d > 0)
    pv = None if p_value is None else [float(p_value)]
    est, low, high = intervals_from_statistics([float(g_z.sum())], [int(dof_z.sum())], [total], [chance],
                                               level=level, p_values=pv)
    return MIInterval(float(est[0]) / divisor, float(low[0]) / divisor, float(high[0]) / divisor,
                      chance / divisor, int(dof_z.sum()))


def _compact(codes: np.ndarray) -> tuple[np.ndarray, int]:
    uniques, inverse = np.unique(codes, return_inverse=True)
    return inverse.astype(np.int64).reshape(-1), int(uniques.size)


def _sum_nlogn(counts: np.ndarray) -> np.ndarray:
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(counts > 0, counts * np.log(np.where(counts > 0, counts, 1.0)), 0.0).sum(axis=-1)


def _shuffle_within(rng, xs: np.ndarray, zs: np.ndarray, starts: np.ndarray, ends: np.ndarray, b: int) -> np.ndarray:
    """``b`` copies of ``xs`` (rows sorted by stratum ``zs``), each shuffled within every stratum."""
    if starts.size <= _LOOP_STRATA:
        out = np.empty((b, xs.size), dtype=xs.dtype)
        for s, e in zip(starts.tolist(), ends.tolist()):
            if e - s == 1:
                out[:, s] = xs[s]
            else:
                out[:, s:e] = rng.permuted(np.broadcast_to(xs[s:e], (b, e - s)), axis=1)
        return out
    keys = zs[None, :] + rng.random((b, xs.size))  # strata stay in place: their codes differ by >= 1
    return xs[np.argsort(keys, axis=1, kind="stable")]


def conditional_permutation_test(x_codes, y_codes, z_codes, *, n_permutations=999, seed=None,
                                 base=2) -> PermutationTestResult:
    r"""Permutation test of conditional independence X ⊥ Y | Z by conditional mutual information.

    Parameters
    ----------
    x_codes, y_codes, z_codes : array_like of int, shape (n,)
        Integer codes of the three variables on the same rows, missing rows already
        dropped.  Z may be the combined code of several columns (one code per
        observed combination).  Only equality of codes matters.
    n_permutations : int, default=999
        Number m of shuffles of X within the strata of Z.
    seed : None, int or numpy.random.Generator, optional
        Source of randomness.
    base : float or str, default=2
        Logarithm base of ``statistic`` and ``null_mean``.

    Returns
    -------
    PermutationTestResult
        ``statistic`` (the observed plug-in :math:`\hat I(X;Y \mid Z)`), ``p_value`` =
        (b + 1)/(m + 1) in [1/(m+1), 1], ``null_mean`` (the mean shuffled statistic:
        what conditional independence alone gives at this sample size, which is
        large on sparse tables).

    Notes
    -----
    See the module notes: the shuffles keep every table but the three-way one, so
    the p-value is valid at every sample size and sparsity (checked by simulation
    in the test suite).  Strata with one row cannot be shuffled and carry no
    evidence.  A small p-value says X and Y are dependent within the strata of Z in
    this sample; it does not say why.

    References
    ----------
    .. [1] B. Phipson, G. K. Smyth, "Permutation p-values should never be zero:
       calculating exact p-values when permutations are randomly drawn",
       Statistical Applications in Genetics and Molecular Biology 9 (2010) Article 39.
    .. [2] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed., Wiley, sec. 2.5 (conditional mutual information).

    Examples
    --------
    >>> import numpy as np
    >>> z = np.repeat([0, 1], 50)
    >>> x = np.tile([0, 1], 50)
    >>> res = conditional_permutation_test(x, x, z, n_permutations=199, seed=0)
    >>> round(res.statistic, 3), res.p_value
    (1.0, 0.005)
    """
    divisor = log_base(base)
    m = _check_positive_int(n_permutations, "n_permutations")
    rng = _rng(seed)
    x = _check_codes(x_codes, "x_codes")
    y = _check_codes(y_codes, "y_codes")
    z = _check_codes(z_codes, "z_codes")
    n = check_same_length(x_codes=x, y_codes=y, z_codes=z)
    if n < 2:
        raise ValueError(f"x_codes, y_codes and z_codes have {n} rows; a permutation test needs at least 2")
    x, kx = _compact(x)
    z, kz = _compact(z)
    yz, kyz = _compact(y.astype(np.int64) * kz + z)  # the observed (y, z) combinations
    order = np.argsort(z, kind="stable")
    xs, zs, yzs = x[order], z[order], yz[order]
    cuts = np.flatnonzero(np.diff(zs)) + 1
    starts, ends = np.r_[0, cuts], np.r_[cuts, n]
    cells = kx * kyz
    xz, _ = _compact(x * kz + z)
    h_xz = np.log(n) - _sum_nlogn(np.bincount(xz).astype(float)) / n
    h_yz = np.log(n) - _sum_nlogn(np.bincount(yz).astype(float)) / n
    h_z = np.log(n) - _sum_nlogn(np.bincount(z).astype(float)) / n

    def cmi_of(joint: np.ndarray) -> np.ndarray:
        h_xyz = np.log(n) - _sum_nlogn(joint) / n
        return np.maximum(h_xz + h_yz - h_xyz - h_z, 0.0)

    observed = float(cmi_of(np.bincount(xs * kyz + yzs, minlength=cells).astype(float)))
    null = np.empty(m)
    per_block = max(1, _BLOCK_CELLS // max(n, cells))
    done = 0
    while done < m:
        b = min(per_block, m - done)
        shuffled = _shuffle_within(rng, xs, zs, starts, ends, b)
        index = shuffled * kyz + yzs[None, :] + (np.arange(b, dtype=np.int64) * cells)[:, None]
        joint = np.bincount(index.ravel(), minlength=b * cells).reshape(b, cells).astype(float)
        null[done:done + b] = cmi_of(joint)
        done += b
    tolerance = 1e-12 * (1.0 + observed)  # rearranged tables can differ by rounding
    exceed = int(np.count_nonzero(null >= observed - tolerance))
    return PermutationTestResult(observed / divisor, (exceed + 1) / (m + 1), float(null.mean()) / divisor)
