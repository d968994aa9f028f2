r"""Intervals of mutual information that carry the estimator's chance level.

Why not a bootstrap of the mutual information
---------------------------------------------
A bootstrap of a count table resamples from the *sample's* table, whose plug-in
mutual information already holds the chance dependence of a finite sample (about
``dof / (2N)`` nats, more in a sparse table).  Every replicate adds that chance
level again, and a bias correction fitted to the replicates (Miller-Madow, or the
centred interval of :mod:`infoscope.estimators.resampling`) removes only part of it
in sparse tables.  Simulated tables of known MI (``benchmarks/calibration.py``)
show the result: on a 16 x 16 table of 100 rows the centred bootstrap interval of
the Miller-Madow MI never covered the true MI, and independent columns got intervals
far from 0 while the test of independence said "nothing here".

The interval used instead
-------------------------
The G statistic :math:`G = 2 N \hat I` (plug-in MI in nats) is, for a table with
``dof = (r - 1)(c - 1)`` degrees of freedom, approximately a noncentral chi-square
with noncentrality :math:`\lambda = 2 N I` (Mitra 1958; the same approximation gives
the classical interval of a noncentrality parameter, Steiger & Lind 1980).  In a
sparse table the chance mean of G is not ``dof``; its exact value is
:math:`2 N\,E_0[\hat I]`, where :math:`E_0[\hat I]` is the expected plug-in MI when
the rows are paired at random with the margins fixed (the "EMI" of Vinh, Epps &
Bailey 2010).  So G is first scaled to that exact chance mean,
:math:`G' = G / q` with :math:`q = 2 N E_0[\hat I] / \mathrm{dof}` (the idea of
Williams' 1976 correction, with the exact mean in place of its series), then the
noncentrality is bracketed by inverting the noncentral chi-square distribution
function:

.. math::

    F_{\chi'^2}(G';\,\mathrm{dof},\lambda_{lo}) = \tfrac{1 + \ell}{2}, \qquad
    F_{\chi'^2}(G';\,\mathrm{dof},\lambda_{hi}) = \tfrac{1 - \ell}{2},

(:math:`\lambda_{lo} = 0` when even :math:`\lambda = 0` gives less), and the MI
interval is :math:`[\lambda_{lo}, \lambda_{hi}]\, q / (2N)`.  Its point estimate is
the chance-corrected MI :math:`\max(\hat I - E_0[\hat I], 0)` (the value at
:math:`\lambda = G' - \mathrm{dof}`).  Two consequences:

- the interval agrees with the test by construction: its lower end is above 0 exactly
  when the mean-scaled G-test rejects independence at level ``(1 - level) / 2``; given
  the p-values the profile shows (chi-square with Williams' correction, q = Williams'
  q, or a permutation test, q from the exact EMI), the shown test decides that sign,
  so on every row ``ci_low > 0`` exactly when ``p < (1 - level) / 2``;
- at true independence it covers 0 with probability ``(1 + level) / 2`` (97.5% for a
  95% interval), since the lower end cannot go below 0: a bounded parameter.

Measured coverage of the 95% interval is in ``benchmarks/calibration.py`` and
DEVELOPERS.md ("Intervals").
"""
from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np
from scipy import special, stats

from infoscope.estimators._checks import check_counts, check_level, log_base
from infoscope.estimators.information import _emi_terms_nats, margin_pairs

__all__ = [
    "MIInterval",
    "MIN_EXPECTED_EXACT",
    "chance_mi_nats",
    "entropy_standard_error",
    "intervals_from_statistics",
    "mi_interval_from_table",
    "mi_intervals_from_tables",
]

#: A cell whose expected count under independence is below this is given its exact
#: hypergeometric term of the chance MI; larger cells their second-order term (see
#: :func:`chance_mi_nats`).
MIN_EXPECTED_EXACT = 50.0

# bisection steps of the noncentrality search: 2**-40 of a bracket of 20 standard
# deviations is far below what any displayed MI resolves
_BISECTION_STEPS = 40


class MIInterval(NamedTuple):
    """Chance-corrected mutual information with its interval, in the unit asked for.

    ``estimate`` is :math:`\\max(\\hat I - E_0[\\hat I], 0)`, ``low`` and ``high`` the
    ends of the interval, ``chance`` the expected plug-in MI under independence
    (:math:`E_0[\\hat I]`) and ``dof`` the degrees of freedom of the table.  Arrays
    for :func:`mi_intervals_from_tables`, floats for :func:`mi_interval_from_table`.
    """

    estimate: object
    low: object
    high: object
    chance: object
    dof: object


def chance_mi_nats(table) -> float:
    r"""Expected plug-in MI (nats) of a table whose rows are paired at random.

    The margins are held fixed and each cell count is hypergeometric (Vinh, Epps &
    Bailey 2010, eq. 24-25).  Cells with an expected count :math:`ab/N` below
    :data:`MIN_EXPECTED_EXACT` get their exact hypergeometric sum (the sparse cells,
    where the chi-square series fails); larger cells get the second-order term

    .. math::

        E\left[\tfrac{n}{N}\ln\tfrac{N n}{a b}\right] \approx
        \frac{(N - a)(N - b)}{2 N^2 (N - 1)},

    (the delta method on :math:`x \ln x` with the hypergeometric variance), whose sum
    over a table with every cell large is :math:`(r - 1)(c - 1) / (2 (N - 1))`, the
    familiar chi-square mean.  The relative error of that term is of the order of
    :math:`1 / (ab/N)`, below 2% of a cell's term here, and the exact sum would cost
    :math:`\sqrt{\min(a, b)}` terms per cell (seconds for large categorical tables).

    Parameters
    ----------
    table : array_like of shape (r, c)
        Counts; only the margins matter.

    Returns
    -------
    float
        :math:`E_0[\hat I]` in nats (0 for an empty table).

    References
    ----------
    .. [1] Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic
       measures for clusterings comparison. JMLR 11, 2837-2854.

    Examples
    --------
    >>> round(chance_mi_nats([[1, 1], [1, 1]]), 6)   # exact: every cell is small
    0.231049
    """
    return _chance_mi_nats(check_counts(table, "table", ndim=2))


def _chance_mi_nats(t: np.ndarray) -> float:
    n = float(t.sum())
    if n <= 1:
        return 0.0
    a, b, w = margin_pairs(t)
    small = a * b / n < MIN_EXPECTED_EXACT
    total = 0.0
    if small.any():
        total += _emi_terms_nats(a[small], b[small], w[small], n)
    large = ~small
    if large.any():
        total += float(np.sum(w[large] * (n - a[large]) * (n - b[large]))) / (2.0 * n * n * (n - 1.0))
    return total


def _ncx2_cdf(x: np.ndarray, dof: np.ndarray, nc: np.ndarray) -> np.ndarray:
    # scipy's noncentral chi-square (Boost); the bisection never asks at nc = 0
    return stats.ncx2.cdf(x, dof, np.maximum(nc, 1e-300))


def _solve_noncentrality(g: np.ndarray, dof: np.ndarray, target: float, positive=None) -> np.ndarray:
    """lambda >= 0 with F(g; dof, lambda) = target (0 where F(g; dof, 0) <= target).

    F decreases in lambda, so a bisection on [0, upper] finds every root; ``upper``
    is far beyond the mean g - dof (the distribution's standard deviation is
    sqrt(2 (dof + 2 lambda))).  ``positive`` (a mask) overrides which roots are above
    0: the decision of the test the caller shows, so that a p-value on the boundary
    cannot fall on the other side by rounding.  The answer is that of
    :data:`_BISECTION_STEPS` bisection steps from the bracket below, computed with
    far fewer evaluations of F (:func:`_replayed_bisection`).
    """
    # bracket from the normal approximation of the noncentral chi-square (mean
    # dof + lambda, variance 2 (dof + 2 lambda)): 10 standard deviations either side
    spread = 10.0 * np.sqrt(2.0 * (dof + 2.0 * g)) + 10.0
    lo = np.maximum(g - dof - spread, 0.0)
    hi = np.maximum(g - dof, 0.0) + spread
    if positive is None:
        positive = stats.chi2.cdf(g, dof) > target
    positive = np.asarray(positive, dtype=bool)
    out = np.zeros(np.shape(g))
    rows = np.flatnonzero(positive)  # the others are 0 whatever the bisection says
    if rows.size:
        lam = _replayed_bisection(g[rows], dof[rows], target, lo[rows], hi[rows])
        out[rows] = np.maximum(lam, np.finfo(np.float64).tiny)
    return out


def _replayed_bisection(g, dof, target, lo, hi) -> np.ndarray:
    """The result of :func:`_plain_bisection`, bit for bit, from a few evaluations of F.

    Each bisection step only asks whether F(mid) > target.  Points ``a < b`` where F
    was evaluated, F(a) > target >= F(b), answer that question without evaluating F
    wherever mid <= a or mid >= b (F decreases in lambda); only the mids between
    them are evaluated, and they narrow the pair.  The pair comes from
    Chandrupatla's method (scipy's ``optimize.elementwise.find_root``) started from a
    bracket of 1.5 standard deviations around the normal approximation's root
    (the full bracket where that one does not hold the root), and the root's two
    neighbours at a quarter of the bisection's last step.  So about ten evaluations
    replace forty, and the steps, and so the result, are those of the plain
    bisection (tested against it bit for bit).
    """
    from scipy.optimize import elementwise

    # the normal approximation: g - dof - lambda = z sqrt(2 (dof + 2 lambda))
    z = special.ndtri(target)
    lam = np.maximum(g - dof, 0.0)
    for _ in range(4):
        lam = np.maximum(g - dof - z * np.sqrt(2.0 * (dof + 2.0 * lam)), 0.0)
    sd = np.sqrt(2.0 * (dof + 2.0 * lam))
    left = np.clip(lam - 1.5 * sd, lo, hi)
    right = np.clip(lam + 1.5 * sd, lo, hi)
    f_left = _ncx2_cdf(g, dof, left) - target
    f_right = _ncx2_cdf(g, dof, right) - target
    wide = ~((f_left > 0) & (f_right <= 0) & (left < right))
    if wide.any():
        left[wide], right[wide] = lo[wide], hi[wide]
        f_left[wide] = _ncx2_cdf(g[wide], dof[wide], lo[wide]) - target
        f_right[wide] = _ncx2_cdf(g[wide], dof[wide], hi[wide]) - target
    # evaluated points: the largest with F > target, the smallest with F <= target
    a = np.full(g.shape, -np.inf)
    b = np.full(g.shape, np.inf)

    def learn(x, fx):
        ok = np.isfinite(x) & np.isfinite(fx)
        a[...] = np.where(ok & (fx > 0), np.maximum(a, x), a)
        b[...] = np.where(ok & (fx <= 0), np.minimum(b, x), b)

    learn(left, f_left)
    learn(right, f_right)
    search = (f_left > 0) & (f_right <= 0) & (left < right)
    if search.any():
        at = np.flatnonzero(search)
        width = right[at] - left[at]

        def excess(t, g_, dof_, lo_, width_):
            # > 0 exactly when F > target; lambda = lo + t width, so that one
            # tolerance on t is the same share of every row's bracket
            return _ncx2_cdf(g_, dof_, lo_ + t * width_) - target

        res = elementwise.find_root(excess, (np.zeros(at.size), np.ones(at.size)),
                                    args=(g[at], dof[at], left[at], width),
                                    tolerances={"xatol": 2.0 ** -(_BISECTION_STEPS - 4), "xrtol": 0.0},
                                    maxiter=80)
        sub_a, sub_b = a[at], b[at]
        for t, ft in ((res.bracket[0], res.f_bracket[0]), (res.bracket[1], res.f_bracket[1])):
            x = left[at] + t * width
            ok = np.isfinite(x) & np.isfinite(ft)
            sub_a = np.where(ok & (ft > 0), np.maximum(sub_a, x), sub_a)
            sub_b = np.where(ok & (ft <= 0), np.minimum(sub_b, x), sub_b)
        # the root's neighbours at a quarter of the bisection's last step close the
        # pair from both sides (the method's own bracket can stay wide on one side)
        step = (hi[at] - lo[at]) * 2.0 ** -(_BISECTION_STEPS + 2)
        root = left[at] + res.x * width
        for x in (root - step, root + step):
            fx = _ncx2_cdf(g[at], dof[at], x) - target
            ok = np.isfinite(x) & np.isfinite(fx)
            sub_a = np.where(ok & (fx > 0), np.maximum(sub_a, x), sub_a)
            sub_b = np.where(ok & (fx <= 0), np.minimum(sub_b, x), sub_b)
        a[at], b[at] = sub_a, sub_b
    for _ in range(_BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        above = mid <= a
        unknown = ~above & (mid < b)
        if unknown.any():
            at = np.flatnonzero(unknown)
            seen = _ncx2_cdf(g[at], dof[at], mid[at]) > target
            above[at] = seen
            a[at] = np.where(seen, mid[at], a[at])
            b[at] = np.where(seen, b[at], mid[at])
        lo = np.where(above, mid, lo)
        hi = np.where(above, hi, mid)
    return 0.5 * (lo + hi)


def mi_intervals_from_tables(tables, *, level=0.95, base=2, p_values=None, williams=None) -> MIInterval:
    r"""Chance-corrected mutual information and its interval for many tables at once.

    See the module notes for the method: the G statistic is scaled to its exact chance
    mean and the noncentrality of a noncentral chi-square is bracketed at the two
    ends; the result is divided by ``2N`` and by ``log_base(base)``.

    Parameters
    ----------
    tables : sequence of array_like of shape (r_t, c_t)
        Contingency tables of counts (shapes may differ).
    level : float, default=0.95
        Two-sided confidence level, in (0, 1).
    base : float or str, default=2
        Logarithm base of the results (2, ``math.e``, 10, "bits", "nats", "hartleys").
    p_values : array_like of shape (T,), optional
        The p-values of the tests of independence shown beside the intervals (a
        chi-square or a permutation test).  When given, the test decides whether
        the lower end is above 0: ``low > 0`` exactly when ``p < (1 - level) / 2``,
        so that the interval and the test never disagree on a row.  The ends
        themselves come from the mean-scaled G (the statistic has no Monte-Carlo
        noise; a permutation p-value that stopped after a few hundred shuffles is
        coarse, and inverting it moved the ends by its noise: simulated coverage
        fell to 90% at 1,000 rows in 10 x 10 tables).
    williams : array_like of bool, shape (T,), optional
        True for the rows whose p-value comes from the chi-square law with
        Williams' (1976) correction: their reference distribution is
        :math:`q\,\chi^2_{\mathrm{dof}}` with Williams' q, so their chance mean of
        G is ``q dof`` (and the exact sum, which would cost seconds on large
        categorical tables, is not needed).  Other rows use the exact chance MI.

    Returns
    -------
    MIInterval
        Arrays of length T: ``estimate`` (chance-corrected MI, >= 0), ``low``,
        ``high``, ``chance`` (expected plug-in MI under independence) and ``dof``.
        A table with no observations gives NaN; one with ``dof = 0`` (a column
        constant on the pair's rows) gives 0 for every number.

    Notes
    -----
    The lower end is 0 exactly when the scaled G statistic is below the
    ``(1 + level) / 2`` quantile of the central chi-square, i.e. when the
    mean-scaled G-test does not reject independence at ``(1 - level) / 2``.  When
    G' is below the median of the central chi-square (a table more even than
    chance usually makes), the upper end is the one the median would give: the
    plain inversion would shrink it to the point 0 for very even tables, a
    certainty the data do not carry.

    References
    ----------
    .. [1] Mitra, S. K. (1958). On the limiting power function of the frequency
       chi-square test. Annals of Mathematical Statistics, 29(4), 1221-1233.
    .. [2] Steiger, J. H., & Lind, J. C. (1980). Statistically based tests for the
       number of common factors. Annual meeting of the Psychometric Society, Iowa
       City (the noncentrality interval).
    .. [3] Williams, D. A. (1976). Improved likelihood ratio tests for complete
       contingency tables. Biometrika, 63(1), 33-37.
    .. [4] Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic
       measures for clusterings comparison. JMLR 11, 2837-2854.

    Examples
    --------
    >>> res = mi_intervals_from_tables([[[40, 10], [10, 40]], [[25, 25], [25, 25]]])
    >>> bool(0 < res.low[0] < res.estimate[0] < res.high[0]), float(res.low[1]), float(res.estimate[1])
    (True, 0.0, 0.0)
    """
    from infoscope.estimators.significance import g_statistics

    level = check_level(level)
    divisor = log_base(base)
    items = [_counts_table(t, f"tables[{i}]") for i, t in enumerate(tables)]
    m = len(items)
    g, dof, n, _, _, q_williams = g_statistics(items) if m else (np.zeros(0),) * 6
    dof = dof.astype(np.float64)
    use_williams = _per_table(williams, m, "williams")
    chance = np.zeros(m)
    for i, t in enumerate(items):
        if n[i] == 0 or dof[i] == 0:
            continue
        if use_williams is not None and use_williams[i]:
            chance[i] = q_williams[i] * dof[i] / (2.0 * n[i])
        else:
            chance[i] = _chance_mi_nats(t)
    pv = _per_table(p_values, m, "p_values")
    estimate, low, high = intervals_from_statistics(g, dof, n, chance, level=level, p_values=pv)
    chance = np.where(n > 0, chance, np.nan)
    return MIInterval(estimate / divisor, low / divisor, high / divisor, chance / divisor, dof.astype(np.int64))


def intervals_from_statistics(g, dof, n, chance, *, level=0.95, p_values=None):
    r"""Chance-corrected estimate and interval (nats) from G statistics: the rule of the module notes.

    The one place where a G statistic, its degrees of freedom, the number of rows and
    the exact chance mean of the plug-in estimate become ``estimate``, ``low`` and
    ``high``: :func:`mi_intervals_from_tables` (two-way tables) and the conditional
    mutual information of :mod:`infoscope.estimators.conditional` (three-way tables,
    G summed over the strata) both call it.

    Parameters
    ----------
    g, dof, n, chance : array_like of shape (T,)
        :math:`G = 2N\hat I` (plug-in, nats), its degrees of freedom, the rows N
        and :math:`E_0[\hat I]` in nats (0 where unknown: then the scale is 1).
    level : float, default=0.95
        Two-sided confidence level.
    p_values : array_like of shape (T,), optional
        The p-values shown beside the intervals: ``low > 0`` exactly where
        ``p < (1 - level) / 2``; rows with a NaN p-value get NaN.

    Returns
    -------
    estimate, low, high : numpy.ndarray
        In nats; NaN where ``n`` is 0, 0 where ``dof`` is 0.

    References
    ----------
    .. [1] Mitra, S. K. (1958). On the limiting power function of the frequency
       chi-square test. Annals of Mathematical Statistics, 29(4), 1221-1233.
    .. [2] Steiger, J. H., & Lind, J. C. (1980). Statistically based tests for the
       number of common factors. Annual meeting of the Psychometric Society, Iowa
       City (the noncentrality interval).

    Examples
    --------
    >>> est, low, high = intervals_from_statistics([20.0], [1], [100], [0.005], p_values=[1e-5])
    >>> bool(0 < low[0] < est[0] < high[0])
    True
    """
    level = check_level(level)
    g = np.asarray(g, dtype=np.float64).reshape(-1)
    dof = np.asarray(dof, dtype=np.float64).reshape(-1)
    n = np.asarray(n, dtype=np.float64).reshape(-1)
    chance = np.asarray(chance, dtype=np.float64).reshape(-1)
    pv = _per_table(p_values, g.size, "p_values")
    live = (n > 0) & (dof > 0)
    if pv is not None:
        live &= np.isfinite(pv)
    estimate = np.where(n > 0, 0.0, np.nan)
    low, high = estimate.copy(), estimate.copy()
    if live.any():
        nl, dl, gl = n[live], dof[live], g[live]
        # q: the exact chance mean of G over dof (about 1 in a well-filled table)
        q = np.where(chance[live] > 0, 2.0 * nl * chance[live] / dl, 1.0)
        scaled = gl / q
        # with the shown p-values, the test decides whether the lower end is above 0
        rejects = None if pv is None else np.clip(pv[live], 0.0, 1.0) < (1.0 - level) / 2.0
        lam_lo = _solve_noncentrality(scaled, dl, (1.0 + level) / 2.0, rejects)
        # a table more even than chance usually makes (G' below the chance median)
        # says no more than an average chance table: its upper end is that of the
        # median, not the point 0 the inversion would give
        lam_hi = _solve_noncentrality(np.maximum(scaled, stats.chi2.median(dl)), dl, (1.0 - level) / 2.0)
        estimate[live] = np.maximum(gl / (2.0 * nl) - chance[live], 0.0)
        low[live] = lam_lo * q / (2.0 * nl)
        high[live] = np.maximum(lam_hi * q / (2.0 * nl), estimate[live])
        # the interval holds its estimate; when the two reference distributions
        # differ (a permutation p-value against the mean-scaled G) that can move the
        # lower end, but never across 0: the sign follows the test
        held = np.minimum(low[live], estimate[live])
        low[live] = np.where(low[live] > 0, np.maximum(held, np.finfo(np.float64).tiny), held)
    return estimate, low, high


def _counts_table(table, parameter: str) -> np.ndarray:
    arr = np.asarray(table)
    if arr.ndim == 2 and arr.dtype.kind in "iu" and (arr.size == 0 or arr.min() >= 0):
        return arr.astype(np.float64)  # integer counts (the engine's): nothing else to check
    return check_counts(arr, parameter, ndim=2)


def _per_table(values, m: int, parameter: str):
    if values is None:
        return None
    arr = np.asarray(values, dtype=np.float64).reshape(-1)
    if arr.size != m:
        raise ValueError(f"{parameter} has {arr.size} entries for {m} tables")
    return arr


def mi_interval_from_table(table, *, level=0.95, base=2) -> MIInterval:
    r"""Chance-corrected mutual information of one table and its interval.

    The one-table form of :func:`mi_intervals_from_tables` (see there and the
    module notes for the method).

    Parameters
    ----------
    table : array_like of shape (r, c)
        Contingency table of counts.
    level : float, default=0.95
        Two-sided confidence level, in (0, 1).
    base : float or str, default=2
        Logarithm base of the results.

    Returns
    -------
    MIInterval
        Floats ``estimate, low, high, chance`` and the int ``dof``.

    References
    ----------
    .. [1] Mitra, S. K. (1958). On the limiting power function of the frequency
       chi-square test. Annals of Mathematical Statistics, 29(4), 1221-1233.
    .. [2] Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic
       measures for clusterings comparison. JMLR 11, 2837-2854.

    Examples
    --------
    >>> r = mi_interval_from_table([[30, 5], [5, 30]])
    >>> bool(r.low < r.estimate < r.high), r.dof
    (True, 1)
    """
    res = mi_intervals_from_tables([table], level=level, base=base)
    return MIInterval(float(res.estimate[0]), float(res.low[0]), float(res.high[0]),
                      float(res.chance[0]), int(res.dof[0]))


def entropy_standard_error(counts, *, base=2) -> float:
    r"""Standard error of an entropy estimate from counts, to second order.

    .. math::

        \mathrm{SE}^2 = \frac{\sum_i \hat p_i \ln^2 \hat p_i - \hat H^2}{N}
                        + \frac{m - 1}{2 N^2},

    the delta-method variance of the plug-in entropy (Basharin 1959) plus the
    second-order term that dominates near the uniform distribution, where the first
    term vanishes: there :math:`2N(\ln K - \hat H)` is chi-square with
    :math:`m - 1` degrees of freedom (m non-empty cells), whose variance is
    :math:`2(m - 1)`.

    Parameters
    ----------
    counts : array_like of shape (K,)
        Non-negative whole-number counts.
    base : float or str, default=2
        Unit of the result.

    Returns
    -------
    float
        The standard error in the unit of ``base``; NaN for no observations.

    References
    ----------
    .. [1] Basharin, G. P. (1959). On a statistical estimate for the entropy of a
       sequence of independent random variables. Theory of Probability and its
       Applications, 4(3), 333-336.

    Examples
    --------
    >>> round(entropy_standard_error([50, 50], base="nats"), 6)   # sqrt(1 / (2 * 100**2))
    0.007071
    """
    c = check_counts(counts, "counts")
    n = float(c.sum())
    if n == 0:
        return math.nan
    p = c[c > 0] / n
    lnp = np.log(p)
    h = -float(np.sum(p * lnp))
    first = max(float(np.sum(p * lnp * lnp)) - h * h, 0.0) / n
    second = (p.size - 1) / (2.0 * n * n)
    return math.sqrt(first + second) / log_base(base)
