r"""Resampling: bootstrap confidence intervals and a permutation test of independence.

The bootstrap here is the nonparametric bootstrap of Efron (1979) on counts: drawing
N rows with replacement from a sample is the same, in distribution, as drawing one
count vector from Multinomial(N, n / N).  So each replicate is one multinomial draw
(``rng.multinomial(N, p_hat, size=n_boot)``), and all replicates are scored at once
by the vectorised estimator kernels of :mod:`infoscope.estimators.entropy` -- the
rows of the data are never re-read.

Large alphabets (an ID-like column: tens of thousands of cells, few rows each) are
drawn by groups of equal counts instead (``_grouped_draws``): numpy's multinomial
draw costs one binomial per cell per replicate, while every entropy estimator here
is symmetric in the cells, so the cells seen c times can share one uniform draw of
the rows that fall in their group.  The distribution of the replicates is the same,
and each replicate is scored from its fingerprint (how many cells were seen j
times) by the estimator's counts-of-counts kernel, without building the K-cell vector.

Two kinds of interval (``method=``):

- ``"percentile"``: the (1 - level)/2 and (1 + level)/2 quantiles of the replicate
  estimates (Efron & Tibshirani 1993, ch. 13).  It reproduces the sampling spread of
  the estimator but is centred on the replicates, and the replicates of an entropy
  or MI estimate are biased once more by the resampling itself (a resample of N rows
  sees fewer distinct symbols than the sample did).  For a bias-corrected estimate
  near 0 or near log K the whole percentile interval can lie on one side of the
  estimate it is meant to qualify.
- ``"centred"`` (the default): the same interval translated so that the median of
  the replicates sits on the estimate, i.e. the percentile interval corrected by the
  bootstrap estimate of bias (Efron & Tibshirani 1993, ch. 10, bias correction
  ``theta_hat - (median* - theta_hat)`` applied to both ends).  It always contains
  the estimate, keeps the spread of the percentile interval, and is what the
  profile shows.

Bounds.  An entropy lies in [0, log K]; where K is the true alphabet (bins,
booleans, declared categories: ``fixed_alphabet=True``) the estimate *and every
replicate* are clipped to that range before the interval is formed, so the interval
is the one of the clipped estimator and keeps the spread below the bound: a
bias-corrected estimate of an even column lands on log K, its replicates just below
it, and the interval reads [log K - spread, log K] instead of collapsing to the point
log K (which shifting an interval that lies above the bound and then clipping it
would give).  Without a fixed alphabet only the lower bound 0 applies.

Replicates.  The two ends of an interval at level l are the (1 - l)/2 and (1 + l)/2
quantiles of the replicates, so at least one replicate must fall beyond each end:
``n_boot >= 2 / (1 - l)`` (40 at 95%, 200 at 99%), and fewer are refused
(:func:`min_replicates`).  That is a floor, not a recommendation: the ends of a
percentile interval settle at about 1,000 replicates (Efron & Tibshirani 1993,
ch. 19); the profile's default of 200 trades that for speed, and the interval moves
by a few per cent of its width from seed to seed.

Mutual information.  :func:`bootstrap_mi_ci` remains for users who want a bootstrap
of their estimator, but the profile's MI intervals come from
:mod:`infoscope.estimators.intervals`: a bootstrap of a sparse table resamples the
sample's chance dependence and adds it again, and its intervals miss the true MI.
"""
from __future__ import annotations

import math
import numbers
from typing import NamedTuple

import numpy as np

from infoscope.estimators._checks import (
    check_choice,
    check_level,
    check_observed_counts,
    check_positive_int,
    check_same_length,
    log_base,
)
from infoscope.estimators.entropy import (
    ENTROPY_ESTIMATORS,
    entropy_nats,
    fingerprint_entropy_nats,
    resolve_alpha,
    vector_entropy_nats,
)

__all__ = [
    "ConfidenceInterval",
    "INTERVAL_METHODS",
    "PermutationTestResult",
    "bootstrap_entropy_ci",
    "bootstrap_mi_ci",
    "min_replicates",
    "permutation_test_mi",
]

# Work in blocks of about this many float64 cells (replicates x cells), so that a
# large table or many replicates never need more than a few tens of MB at once.
_BLOCK_CELLS = 4_000_000


class ConfidenceInterval(NamedTuple):
    """A two-sided interval ``(low, high)`` in the unit of the estimate."""

    low: float
    high: float


class PermutationTestResult(NamedTuple):
    """Outcome of :func:`permutation_test_mi`.

    ``statistic`` is the observed plug-in mutual information, ``p_value`` the
    permutation p-value (b + 1) / (m + 1), ``null_mean`` the mean mutual information
    over the permuted samples (what independence alone produces at this sample size).
    """

    statistic: float
    p_value: float
    null_mean: float


# --------------------------------------------------------------------------- checks

# conditional.py still imports the old name (it moves to _checks.check_positive_int
# once that module's current rewrite has landed).
_check_positive_int = check_positive_int


def min_replicates(level: float) -> int:
    """The fewest bootstrap replicates for a two-sided interval at ``level``.

    Parameters
    ----------
    level : float
        Confidence level, in (0, 1).

    Returns
    -------
    int
        ``ceil(2 / (1 - level))``: with fewer, no replicate lies beyond one end of
        the interval and the quantile there is only the extreme replicate (1 replicate
        gives a zero-width interval).

    References
    ----------
    .. [1] B. Efron, R. J. Tibshirani, An Introduction to the Bootstrap, Chapman &
       Hall (1993), ch. 13 and 19 (percentile intervals; number of replicates).

    Examples
    --------
    >>> min_replicates(0.95), min_replicates(0.99), min_replicates(0.9)
    (40, 200, 20)
    """
    level = check_level(level)
    return int(math.ceil(2.0 / (1.0 - level) - 1e-9))


def _check_n_boot(n_boot, level: float) -> int:
    n_boot = check_positive_int(n_boot, "n_boot")
    need = min_replicates(level)
    if n_boot < need:
        raise ValueError(
            f"n_boot={n_boot} is too few replicates for a {level:.0%} interval: at least {need} "
            f"are needed (2 / (1 - level)) so that a replicate lies beyond each end; "
            "about 1,000 make the ends stable"
        )
    return n_boot


def _rng(seed) -> np.random.Generator:
    if isinstance(seed, np.random.Generator):
        return seed
    if seed is None or (isinstance(seed, numbers.Integral) and not isinstance(seed, bool)):
        if seed is not None and seed < 0:
            raise ValueError(f"seed={seed!r} is invalid: use None, an integer >= 0 or a numpy Generator")
        return np.random.default_rng(seed)
    raise TypeError(f"seed must be None, an integer >= 0 or a numpy Generator, got {type(seed).__name__}")


def _check_codes(codes, parameter: str) -> np.ndarray:
    arr = np.asarray(codes)
    if arr.ndim != 1:
        raise ValueError(f"{parameter} must be a 1-D array of codes, got shape {arr.shape}")
    if arr.dtype == bool:
        arr = arr.astype(np.int64)
    if not np.issubdtype(arr.dtype, np.integer):
        raise TypeError(
            f"{parameter} must hold integer codes (got dtype {arr.dtype}); encode the "
            "values first (one integer per symbol, missing rows dropped)"
        )
    if arr.size and arr.min() < 0:
        raise ValueError(f"{parameter} contains negative codes; codes must be >= 0")
    return arr


INTERVAL_METHODS = ("centred", "percentile")


def _interval(values: np.ndarray, level: float, method: str, estimate: float,
              lower: float = -math.inf, upper: float = math.inf) -> ConfidenceInterval:
    """The interval of the replicates ``values`` for ``estimate``, within [lower, upper].

    The estimate and the replicates are clipped to the bounds first (the interval of
    the clipped estimator), and the ends are clipped again after the centring shift.
    """
    values = np.clip(values, lower, upper)
    estimate = min(max(estimate, lower), upper)
    lo, med, hi = np.quantile(values, [(1.0 - level) / 2.0, 0.5, (1.0 + level) / 2.0])
    if method == "centred":
        # shift by the bootstrap bias (median of the replicates minus the estimate)
        shift = med - estimate
        lo, hi = lo - shift, hi - shift
    lo, hi = min(max(lo, lower), upper), min(max(hi, lower), upper)
    return ConfidenceInterval(float(lo), float(hi))


def _multinomial_blocks(rng, n_total: int, p: np.ndarray, n_boot: int):
    """Yield (b, cells) blocks of multinomial replicates, n_boot rows in all."""
    per_block = max(1, _BLOCK_CELLS // max(p.size, 1))
    done = 0
    while done < n_boot:
        b = min(per_block, n_boot - done)
        yield rng.multinomial(n_total, p, size=b).astype(np.float64)
        done += b


def _table_interval(t: np.ndarray, total: float, score, divisor: float, level: float, method: str,
                    n_boot: int, rng) -> ConfidenceInterval:
    """The bootstrap interval of a statistic of the count table ``t`` (N = ``total``).

    ``score`` maps a (B, cells) block of flattened tables to B values in nats.  Each
    replicate draws every cell jointly from Multinomial(N, t / N); the interval is
    :func:`_interval` of the replicates around the score of ``t`` itself, in the unit
    of ``divisor`` (ln of the base).
    """
    method = check_choice(method, INTERVAL_METHODS, "method")
    p = (t / total).ravel()
    values = np.concatenate([score(block) for block in _multinomial_blocks(rng, total, p, n_boot)])
    estimate = float(score(t.ravel()[None, :])[0]) / divisor
    return _interval(values / divisor, level, method, estimate)


# A count vector with at least this many non-empty cells, and no more than
# _ROWS_PER_CELL rows per non-empty cell, is resampled by groups of equal counts
# (see _grouped_blocks); smaller or denser tables keep the multinomial draw.
_GROUPED_MIN_CELLS = 2_000
_ROWS_PER_CELL = 4


def _use_grouped(n: np.ndarray, n_total: int) -> bool:
    occupied = int(np.count_nonzero(n))
    return occupied >= _GROUPED_MIN_CELLS and n_total <= _ROWS_PER_CELL * occupied


def _grouped_draws(rng, n: np.ndarray, n_total: int, n_boot: int):
    """Yield, for each of n_boot replicates, the per-group bootstrap counts.

    Exact in distribution for estimators that are symmetric in the cells (every
    estimator of ``ENTROPY_ESTIMATORS`` is: it depends on the multiset of counts
    and on K only).  The m_c cells observed c times each have probability c/N, so a
    Multinomial(N, n/N) draw is: the rows falling in each group,
    ``T ~ Multinomial(N, m_c c / N)`` (a handful of groups), then, within a group,
    T_c rows spread uniformly over its m_c cells (``integers`` + ``bincount``,
    O(T_c + m_c) instead of one binomial per cell).  Each item is a list of int
    arrays, one per group (sizes m_c, in the order of the distinct counts);
    never-observed cells are not included (they stay 0 in every replicate).
    """
    values, sizes = np.unique(n[n > 0], return_counts=True)
    group_p = values * sizes / n_total
    group_p = group_p / group_p.sum()
    totals = rng.multinomial(n_total, group_p, size=n_boot)
    for r in range(n_boot):
        out = []
        for g in range(values.size):
            m, t = int(sizes[g]), int(totals[r, g])
            # intp draws: np.bincount would otherwise copy them to intp first
            draws = rng.integers(0, m, size=t, dtype=np.intp)
            out.append(np.bincount(draws, minlength=m))
        yield out


def _grouped_blocks(rng, n: np.ndarray, n_total: int, n_boot: int):
    """Yield (b, K) float blocks of bootstrap count vectors from ``_grouped_draws``.

    The cells of a replicate are laid out group by group, then the never-observed
    cells as zeros: a symmetric estimator does not see the order.
    """
    k = n.size
    per_block = max(1, _BLOCK_CELLS // max(k, 1))
    block, row = None, 0
    left = n_boot
    for groups in _grouped_draws(rng, n, n_total, n_boot):
        if block is None:
            block, row = np.zeros((min(per_block, left), k), dtype=np.float64), 0
        lo = 0
        for counts in groups:
            block[row, lo:lo + counts.size] = counts
            lo += counts.size
        row += 1
        if row == block.shape[0]:
            left -= row
            yield block
            block = None


def _grouped_fingerprints(rng, n: np.ndarray, n_total: int, n_boot: int) -> np.ndarray:
    """(n_boot, J) fingerprints of grouped replicates: F[r, j] cells of replicate r seen j times.

    Column 0 counts every cell of the declared alphabet left empty, the
    never-observed ones included, so that each row sums to K = ``n.size``.
    """
    rows = []
    for groups in _grouped_draws(rng, n, n_total, n_boot):
        fps = [np.bincount(counts) for counts in groups]
        fp = np.zeros(max(f.size for f in fps), dtype=np.int64)
        for f in fps:
            fp[:f.size] += f
        rows.append(fp)
    out = np.zeros((n_boot, max(f.size for f in rows)), dtype=np.float64)
    for r, fp in enumerate(rows):
        out[r, :fp.size] = fp
    out[:, 0] = n.size - out[:, 1:].sum(axis=1)
    return out


def _fingerprint_entropy_nats(rng, n: np.ndarray, n_total: int, n_boot: int, estimator: str,
                              alpha=None) -> np.ndarray:
    r"""Entropy (nats) of n_boot grouped replicates, each scored from its fingerprint.

    A replicate of N rows over K cells with :math:`F_j` cells seen j times is scored
    by the estimator's kernel in :data:`infoscope.estimators.entropy.FINGERPRINT_ESTIMATORS`
    (values j = 0, 1, ..., multiplicities :math:`F_j`), which equals the per-cell
    kernel on the K-cell vector; the vector itself is never built.  For the plug-in
    estimate this is :math:`\ln N - \sum_j F_j\, j \ln j / N`.
    """
    fps = _grouped_fingerprints(rng, n, n_total, n_boot)
    values = np.arange(fps.shape[1], dtype=np.float64)
    return fingerprint_entropy_nats(values, fps, n.size, np.full(n_boot, float(n_total)), estimator, alpha)


def _resampling_inputs(counts, parameter, ndim, estimator, alpha, base, level, n_boot, seed):
    estimator = check_choice(estimator, ENTROPY_ESTIMATORS, "estimator")
    a = resolve_alpha(estimator, alpha)
    divisor = log_base(base)
    level = check_level(level)
    n_boot = _check_n_boot(n_boot, level)
    rng = _rng(seed)
    n = check_observed_counts(counts, parameter, ndim=ndim)
    total = n.sum()
    if total > np.iinfo(np.int64).max:
        raise ValueError(f"{parameter} sums to {total:.3g}, too many observations to resample")
    return n, int(total), estimator, a, divisor, level, n_boot, rng


# --------------------------------------------------------------------------- public

def bootstrap_entropy_ci(
    counts, *, estimator="miller_madow", base=2, alpha=None, level=0.95, n_boot=200, seed=None,
    method="centred", fixed_alphabet=False,
) -> ConfidenceInterval:
    r"""Bootstrap confidence interval of an entropy estimate from counts.

    Each replicate draws a count vector :math:`n^* \sim \mathrm{Multinomial}(N, n/N)`
    (equivalent to resampling the N rows with replacement) and applies the same
    estimator; the interval is

    .. math::

        \bigl[\hat H^*_{((1-\ell)/2)},\ \hat H^*_{((1+\ell)/2)}\bigr],
        \qquad \ell = \text{level}.

    Parameters
    ----------
    counts : array_like of shape (K,)
        Non-negative whole-number counts of the K possible symbols (zeros included).
    estimator : str, default="miller_madow"
        A name of :data:`infoscope.estimators.entropy.ENTROPY_ESTIMATORS`.
    base : float or str, default=2
        Logarithm base (2, ``math.e``, 10, or "bits"/"nats"/"hartleys").
    alpha : float or str, optional
        Pseudocount for ``estimator="dirichlet"`` only (see ``entropy_from_counts``).
    level : float, default=0.95
        Confidence level, in (0, 1).
    n_boot : int, default=200
        Number of bootstrap replicates, at least :func:`min_replicates` of ``level``
        (40 at 95%).  ``nsb`` costs one integral per replicate
        (a few milliseconds each; on large alphabets all replicates share one batched
        integration); the other estimators are vectorised.
    seed : None, int or numpy.random.Generator, optional
        Source of randomness; an integer makes the interval reproducible.
    method : {"centred", "percentile"}, default="centred"
        ``"percentile"`` is the textbook percentile interval shown above;
        ``"centred"`` translates it so the replicates' median sits on the estimate
        (see the module notes), so the interval always contains the estimate.
    fixed_alphabet : bool, default=False
        True when the K entries of ``counts`` are the whole alphabet (bins, a
        boolean, declared categories), so the entropy cannot exceed log K: the
        estimate and the replicates are clipped to [0, log K] (module notes,
        "Bounds").  False: only the bound 0 applies.

    Returns
    -------
    ConfidenceInterval
        ``(low, high)`` in the unit of ``base``, within [0, log K] when
        ``fixed_alphabet``, within [0, inf) otherwise.

    Raises
    ------
    ValueError
        For ``n_boot`` below :func:`min_replicates` (e.g. ``n_boot=1``), a level
        outside (0, 1), or counts with no observation.

    Notes
    -----
    A percentile interval is centred on the estimator's own sampling distribution:
    for a biased estimator it is centred near the biased estimate, not near the
    true entropy; for the plug-in estimate on undersampled data the replicates are
    biased once more, and the interval can lie wholly below the estimate.  With cells that were never observed, the replicates cannot
    observe them either, so the interval reflects only the observed support.

    With at least 2,000 occupied cells and at most 4 rows per occupied cell, the
    replicates are drawn by groups of cells with equal counts (the same
    multinomial distribution, by the symmetry of every estimator in its cells;
    see the module notes), and each replicate is scored from its counts-of-counts
    by :data:`infoscope.estimators.entropy.FINGERPRINT_ESTIMATORS` (equal to the
    per-cell estimate up to rounding): 100,000 singletons take a fraction of a
    second for every estimator instead of seconds.  The random stream differs from the per-cell draw, so a seeded
    interval of such counts is not the one earlier versions gave.

    References
    ----------
    .. [1] B. Efron, "Bootstrap methods: another look at the jackknife", Annals of
       Statistics 7 (1979) 1-26.
    .. [2] B. Efron, R. J. Tibshirani, An Introduction to the Bootstrap, Chapman &
       Hall (1993), ch. 13 (percentile intervals).

    Examples
    --------
    >>> from infoscope.estimators.resampling import bootstrap_entropy_ci
    >>> low, high = bootstrap_entropy_ci([50, 30, 20], seed=1)
    >>> bool(1.3 < low < high < 1.7)
    True
    """
    n, total, estimator, a, divisor, level, n_boot, rng = _resampling_inputs(
        counts, "counts", 1, estimator, alpha, base, level, n_boot, seed
    )
    method = check_choice(method, INTERVAL_METHODS, "method")
    if not isinstance(fixed_alphabet, (bool, np.bool_)):
        raise TypeError(f"fixed_alphabet must be True or False, got {type(fixed_alphabet).__name__}")
    if _use_grouped(n, total):
        values = _fingerprint_entropy_nats(rng, n, total, n_boot, estimator, a)
    else:
        blocks = _multinomial_blocks(rng, total, n / total, n_boot)
        values = np.concatenate([entropy_nats(block, estimator, a) for block in blocks])
    estimate = vector_entropy_nats(n, estimator, a) / divisor
    upper = math.log(n.size) / divisor if fixed_alphabet else math.inf
    return _interval(values / divisor, level, method, estimate, 0.0, upper)


def _mi_of_tables_nats(flat: np.ndarray, shape: tuple[int, int], estimator: str, a) -> np.ndarray:
    """H(X) + H(Y) - H(X, Y) in nats for each row of flattened (B, r*c) tables."""
    tables = flat.reshape(-1, *shape)
    mi = (
        entropy_nats(tables.sum(axis=2), estimator, a)
        + entropy_nats(tables.sum(axis=1), estimator, a)
        - entropy_nats(flat, estimator, a)
    )
    if estimator == "plugin":
        # The plug-in MI is a KL divergence, >= 0 in exact arithmetic: a tiny negative
        # value is rounding.  Corrected estimates may be negative and are kept.
        mi = np.maximum(mi, 0.0)
    return mi


def bootstrap_mi_ci(
    table, *, estimator="miller_madow", base=2, alpha=None, level=0.95, n_boot=200, seed=None,
    method="centred",
) -> ConfidenceInterval:
    r"""Bootstrap confidence interval of mutual information from a table.

    Each replicate draws the r x c cells jointly from
    :math:`\mathrm{Multinomial}(N, T/N)` and scores

    .. math::

        \hat I = \hat H(X) + \hat H(Y) - \hat H(X, Y)

    with the chosen entropy estimator (margins over r and c cells, the joint over
    r c cells), as ``infoscope.estimators.information.mutual_information_from_table``
    does.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Contingency table of counts (X along rows, Y along columns).
    estimator : str, default="miller_madow"
        A name of :data:`infoscope.estimators.entropy.ENTROPY_ESTIMATORS`.
    base : float or str, default=2
        Logarithm base (2, ``math.e``, 10, or "bits"/"nats"/"hartleys").
    alpha : float or str, optional
        Pseudocount for ``estimator="dirichlet"`` only.
    level : float, default=0.95
        Confidence level, in (0, 1).
    n_boot : int, default=200
        Number of bootstrap replicates.
    seed : None, int or numpy.random.Generator, optional
        Source of randomness.
    method : {"centred", "percentile"}, default="centred"
        As in :func:`bootstrap_entropy_ci`.

    Returns
    -------
    ConfidenceInterval
        ``(low, high)`` in the unit of ``base``.  The plug-in MI is clipped at 0
        (rounding); bias-corrected MI can be negative and is not clipped.

    Notes
    -----
    The percentile interval inherits the estimator's bias (see
    :func:`bootstrap_entropy_ci`).  Near independence the plug-in MI is bounded
    below by 0 and its interval does not cover 0 even when X and Y are independent:
    use :func:`permutation_test_mi` or a G-test to judge dependence.  In sparse
    tables every bootstrap interval of MI misses the true value more often than its
    level says (the replicates resample the sample's chance dependence); the
    profile's intervals come from
    :func:`infoscope.estimators.intervals.mi_intervals_from_tables`, which carry the
    chance level and agree with the test of independence.

    References
    ----------
    .. [1] B. Efron, "Bootstrap methods: another look at the jackknife", Annals of
       Statistics 7 (1979) 1-26.
    .. [2] B. Efron, R. J. Tibshirani, An Introduction to the Bootstrap, Chapman &
       Hall (1993), ch. 13.

    Examples
    --------
    >>> from infoscope.estimators.resampling import bootstrap_mi_ci
    >>> low, high = bootstrap_mi_ci([[40, 10], [10, 40]], seed=1)
    >>> bool(0.1 < low < high < 0.5)
    True
    """
    t, total, estimator, a, divisor, level, n_boot, rng = _resampling_inputs(
        table, "table", 2, estimator, alpha, base, level, n_boot, seed
    )
    shape = t.shape
    return _table_interval(t, total, lambda flat: _mi_of_tables_nats(flat, shape, estimator, a),
                           divisor, level, method, n_boot, rng)


def _plugin_entropy_of_rows_nats(counts: np.ndarray, total: float) -> np.ndarray:
    # -sum (n/N) ln(n/N) = ln N - sum n ln n / N; only the n ln n sum varies by row.
    with np.errstate(divide="ignore", invalid="ignore"):
        nlogn = np.where(counts > 0, counts * np.log(np.where(counts > 0, counts, 1.0)), 0.0)
    return np.log(total) - nlogn.sum(axis=-1) / total


def permutation_test_mi(x_codes, y_codes, *, n_permutations=999, seed=None, base=2) -> PermutationTestResult:
    r"""Permutation test of independence of two coded columns, by mutual information.

    The statistic is the plug-in mutual information of the joint table of
    ``(x_codes, y_codes)``.  Under independence every pairing of the x values with
    the y values is equally likely, so the null distribution is sampled by shuffling
    ``y_codes`` (the margins stay fixed, and the plug-in MI is then equivalent to the
    G statistic :math:`G = 2 N \hat I` in nats).  With b of the m permuted
    statistics at least as large as the observed one,

    .. math::

        p = \frac{b + 1}{m + 1},

    which is exact as a test (never below the nominal size) because the observed
    sample counts as one of the arrangements (Phipson & Smyth 2010).

    Parameters
    ----------
    x_codes, y_codes : array_like of int, shape (n,)
        Integer codes of the two columns on the same rows, missing rows already
        dropped (for example the ``codes`` of two encoded columns restricted to rows
        where neither is missing).  Only equality of codes matters.
    n_permutations : int, default=999
        Number m of random permutations.  The cost is about m times one pass over
        the n rows.
    seed : None, int or numpy.random.Generator, optional
        Source of randomness; an integer makes the p-value reproducible.
    base : float or str, default=2
        Logarithm base of ``statistic`` and ``null_mean``.

    Returns
    -------
    PermutationTestResult
        ``statistic`` (observed plug-in MI), ``p_value`` in [1/(m+1), 1],
        ``null_mean`` (mean permuted MI, the chance level at this sample size).

    Notes
    -----
    A small p-value says the columns are dependent in this sample; mutual
    information measures dependence, not cause.  Permuted statistics that equal
    the observed one up to rounding (within about 1e-12 nats) count as "at least as large".

    References
    ----------
    .. [1] B. Phipson, G. K. Smyth, "Permutation p-values should never be zero:
       calculating exact p-values when permutations are randomly drawn",
       Statistical Applications in Genetics and Molecular Biology 9 (2010) Article 39.
    .. [2] S. Kullback, Information Theory and Statistics, Wiley (1959).

    Examples
    --------
    >>> import numpy as np
    >>> from infoscope.estimators.resampling import permutation_test_mi
    >>> x = np.repeat([0, 1], 50)
    >>> res = permutation_test_mi(x, x, n_permutations=199, seed=0)
    >>> round(res.statistic, 3), res.p_value
    (1.0, 0.005)
    """
    divisor, m, rng, (x, y), n = _permutation_inputs(n_permutations, seed, base, x_codes=x_codes, y_codes=y_codes)
    # compact codes 0..k-1 so that the joint table is only as large as what occurs
    _, x = np.unique(x, return_inverse=True)
    _, y = np.unique(y, return_inverse=True)
    kx, ky = int(x.max()) + 1, int(y.max()) + 1
    cells = kx * ky
    h_x = _plugin_entropy_of_rows_nats(np.bincount(x, minlength=kx).astype(float), float(n))
    h_y = _plugin_entropy_of_rows_nats(np.bincount(y, minlength=ky).astype(float), float(n))
    base_index = x.astype(np.int64) * ky

    def mi_of(joint: np.ndarray) -> np.ndarray:
        mi = h_x + h_y - _plugin_entropy_of_rows_nats(joint, float(n))
        return np.maximum(mi, 0.0)  # a KL divergence: a tiny negative is rounding

    observed = float(mi_of(np.bincount(base_index + y, minlength=cells).astype(float)))
    null = _shuffled_statistics(
        m, n, cells, lambda b: base_index[None, :] + rng.permuted(np.tile(y, (b, 1)), axis=1), mi_of
    )
    return _permutation_result(observed, null, divisor)


def _permutation_inputs(n_permutations, seed, base, **codes):
    """Checked inputs of a permutation test: ln(base), m, the generator, the code arrays, their length."""
    divisor = log_base(base)
    m = check_positive_int(n_permutations, "n_permutations")
    rng = _rng(seed)
    arrays = {name: _check_codes(values, name) for name, values in codes.items()}
    n = check_same_length(**arrays)
    if n < 2:
        names = list(codes)
        listed = f"{', '.join(names[:-1])} and {names[-1]}"
        raise ValueError(f"{listed} have {n} rows; a permutation test needs at least 2")
    return divisor, m, rng, tuple(arrays.values()), n


def _shuffled_statistics(m: int, n: int, cells: int, cell_codes, statistic) -> np.ndarray:
    """The statistic of m shuffled joint tables, drawn in blocks of bounded size.

    ``cell_codes(b)`` gives the (b, n) cell index in ``range(cells)`` of every row
    in b fresh shuffles; ``statistic`` maps a (b, cells) block of counts to b values.
    """
    null = np.empty(m)
    per_block = max(1, _BLOCK_CELLS // max(n, cells))
    done = 0
    while done < m:
        b = min(per_block, m - done)
        index = cell_codes(b) + (np.arange(b, dtype=np.int64) * cells)[:, None]
        joint = np.bincount(index.ravel(), minlength=b * cells).reshape(b, cells).astype(float)
        null[done:done + b] = statistic(joint)
        done += b
    return null


def _permutation_result(observed: float, null: np.ndarray, divisor: float) -> PermutationTestResult:
    """p = (b + 1) / (m + 1) over the m shuffled statistics ``null`` (nats), in the unit of ``divisor``."""
    # Equal tables give bit-identical statistics; tables that are rearrangements of
    # each other can differ by rounding, so "at least as large" allows 1e-12 nats.
    tolerance = 1e-12 * (1.0 + observed)
    exceed = int(np.count_nonzero(null >= observed - tolerance))
    m = null.size
    return PermutationTestResult(observed / divisor, (exceed + 1) / (m + 1), float(null.mean()) / divisor)
