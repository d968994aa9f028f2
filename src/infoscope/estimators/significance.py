r"""Tests of independence that hold at every sample size, and how far a table can be trusted.

Why not always the chi-square approximation
-------------------------------------------
The G statistic :math:`G = 2 \sum O \ln(O / E) = 2 N \hat I` is chi-square distributed
with :math:`(r - 1)(c - 1)` degrees of freedom only when the table is well filled.
A 16 x 16 table of 300 rows (about one row per cell) gives G values far above the
chi-square law under independence: in our simulation about two thirds of the pairs
of independent columns came out at p < 0.05.  So:

* **chi-square, with Williams' correction** (``p_method = "chi2"``) where the table
  has at least :data:`CHI2_MIN_MEAN_COUNT` rows per non-empty cell on average.  G is
  divided by Williams' (1976) factor

  .. math:: q = 1 + \frac{(N \sum_i 1/R_i - 1)(N \sum_j 1/C_j - 1)}{6 N (r - 1)(c - 1)}

  (:func:`williams_correction`), which removes most of the remaining excess of G over
  its chi-square mean.  The 20 rows per cell were chosen by simulation, not from the
  usual "expected counts of at least 5": on null tables of 8 x 8 to 64 x 64 cells
  with uniform and uneven margins, the corrected test kept its rejection rate within
  about 1.3 times the nominal level at 0.05, 0.01 and 0.001 from 20 rows per cell
  on, while at 5-10 rows per cell large tables with uneven margins still rejected
  1.5-3 times too often (``benchmarks/calibration.py --section rule`` repeats that
  simulation).

  Also only where Williams' factor is at most :data:`WILLIAMS_MAX` (1.05).  With
  rare levels the factor grows large and the corrected test becomes very
  conservative: at 20-40 rows per cell with margins drawn from a Dirichlet(0.7) it
  rejected under a tenth of the nominal 5%, while the uncorrected G rejected up to
  1.6 times too often.  Such tables get the permutation test up to
  :data:`UNEVEN_PERMUTATION_ROWS` rows (above, the conservative corrected test:
  valid, with less power), except where that conservative test already gives p
  below :data:`CHI2_CLEAR_P` (1e-6): both tests order tables by G, so keeping it only
  keeps a resolution that a few thousand shuffles could not reach.
* **a Monte-Carlo permutation test** (``p_method = "permutation"``) everywhere else:
  the second column is shuffled against the first on the rows where both are
  present, which is the null distribution itself (the margins are kept), counted by
  the engine many shuffles per compiled pass.  With :math:`b` of :math:`L` shuffles
  reaching the observed G the p-value is :math:`(b + 1)/(L + 1)`, never below the
  nominal size (Phipson & Smyth 2010).  Shuffling stops early (Besag & Clifford
  1991) once :data:`PERMUTATION_STOP_AFTER` shuffles reached the observed G, with
  :math:`p = b / L`: a pair far from significance costs a few dozen shuffles.  The
  budget grows in stages (:data:`PERMUTATION_BUDGETS`) only for pairs whose
  p-value is at the resolution of the budget and not yet a finding under
  Benjamini-Hochberg, so that a single real dependence among many pairs can still
  reach a q-value below 0.05.  ``n_permutations`` and ``p_error`` (the Monte-Carlo
  standard error :math:`\sqrt{p(1-p)/L}`) say how precise each p-value is.
* ``p_method = "none"``: one side has a single observed level (0 degrees of
  freedom): p = 1, nothing to test; an empty table: p = NaN.

Reliability of a table (:func:`table_reliability`)
--------------------------------------------------
``"ok"``: at least 5 rows per non-empty cell on average (common practice for
chi-square style tables); ``"sparse"``: fewer; ``"too_few"``: fewer than one row
per non-empty cell, or fewer than :data:`TOO_FEW_ROWS` rows — the MI estimate is
then mostly its own bias and says little, although the permutation p-value stays
valid (a strong dependence can still be found).
"""
from __future__ import annotations

from collections.abc import Callable
from typing import NamedTuple

import numpy as np
from scipy import special, stats

from infoscope._docs import fill_doc
from infoscope.estimators._checks import check_table

__all__ = [
    "CHI2_CLEAR_P",
    "CHI2_MIN_MEAN_COUNT",
    "PERMUTATION_BUDGETS",
    "PERMUTATION_MIN_SHUFFLES",
    "PERMUTATION_ROW_BUDGET",
    "PERMUTATION_STOP_AFTER",
    "RELIABILITY_STATES",
    "SPARSE_MEAN_COUNT",
    "TOO_FEW_ROWS",
    "UNEVEN_PERMUTATION_ROWS",
    "WILLIAMS_MAX",
    "GTestResult",
    "IndependenceTests",
    "P_METHODS",
    "TableTests",
    "benjamini_hochberg",
    "g_statistics",
    "g_test_from_table",
    "g_test_from_tables",
    "independence_tests",
    "monte_carlo_p_value",
    "permutation_p_values",
    "table_tests",
    "table_reliability",
    "williams_correction",
]

#: The chi-square approximation (with Williams' correction) is used when a table has
#: at least this many rows per non-empty cell on average (chosen by simulation).
CHI2_MIN_MEAN_COUNT = 20.0
#: ... and where Williams' factor is at most this (near 1, the correction is small);
WILLIAMS_MAX = 1.05
#: a table with a larger factor (very uneven margins: rare levels) is tested by
#: permutation up to this many rows, and above it by the (then conservative)
#: corrected chi-square test.
UNEVEN_PERMUTATION_ROWS = 20_000
#: An uneven table whose corrected (conservative) chi-square p-value is below this
#: keeps it: a permutation test could only say "below 1 / (shuffles + 1)".
CHI2_CLEAR_P = 1e-6
#: Fewer rows per non-empty cell than this on average: the table is "sparse"
#: (common practice: expected counts of at least 5).
SPARSE_MEAN_COUNT = 5.0
#: Fewer rows than this (or under one row per non-empty cell): "too_few".
TOO_FEW_ROWS = 10
#: The reliability states, best first (one vocabulary for every view).
RELIABILITY_STATES = ("ok", "sparse", "too_few")
#: Sequential stopping: a pair stops once this many shuffles reached its observed G.
PERMUTATION_STOP_AFTER = 20
#: Shuffle budgets per pair, in stages (see the module notes).
PERMUTATION_BUDGETS = (999, 9_999, 99_999)
#: No pair is given more shuffles than this many rows shuffled in all (a pair of
#: 50,000 rows gets at most 4,000 shuffles); ``n_permutations`` then says the
#: resolution of its p-value.
PERMUTATION_ROW_BUDGET = 200_000_000
#: ... but never fewer than this many shuffles (p-values down to 0.01).
PERMUTATION_MIN_SHUFFLES = 99


class IndependenceTests(NamedTuple):
    """Per-table results of :func:`independence_tests` (arrays of one length)."""

    statistic: np.ndarray  #: G = 2 N I (plug-in, nats), not corrected
    dof: np.ndarray  #: (r' - 1)(c' - 1) over non-empty rows and columns
    p_value: np.ndarray
    p_method: np.ndarray  #: "chi2", "permutation" or "none"
    n_permutations: np.ndarray  #: shuffles made (0 unless permutation)
    exceed: np.ndarray  #: shuffles that reached the observed G
    p_error: np.ndarray  #: Monte-Carlo standard error of p (0 unless permutation)
    reliability: np.ndarray  #: "ok", "sparse" or "too_few"


def _as_tables(tables) -> list[np.ndarray]:
    if isinstance(tables, np.ndarray) and tables.ndim == 3:
        return [np.asarray(t, dtype=np.float64) for t in tables]
    out = []
    for i, t in enumerate(tables):
        arr = np.asarray(t)
        if arr.ndim != 2:
            raise ValueError(f"tables[{i}] must be a 2-D table of counts, got shape {arr.shape}")
        if arr.dtype.kind not in "iu":  # integer counts (the engine's) need no check for NaN
            arr = arr.astype(np.float64)
            if arr.size and (not np.all(np.isfinite(arr)) or arr.min() < 0):
                raise ValueError(f"tables[{i}] must hold finite non-negative counts")
        elif arr.size and arr.min() < 0:
            raise ValueError(f"tables[{i}] must hold non-negative counts")
        out.append(arr)
    return out


def williams_correction(rows, cols) -> np.ndarray:
    r"""Williams' (1976) correction factor q of the G-test of independence.

    Parameters
    ----------
    rows, cols : array_like, shape (..., r) and (..., c)
        Row and column totals of one table or of a stack of tables.  Zero totals
        (empty rows or columns) are left out, as they carry no observation.

    Returns
    -------
    numpy.ndarray
        :math:`q = 1 + (N \sum_i 1/R_i - 1)(N \sum_j 1/C_j - 1) / (6 N (r'-1)(c'-1))`,
        ``r'`` and ``c'`` the non-empty rows and columns; the corrected statistic is
        ``G / q``.  1 where the degrees of freedom are 0.

    References
    ----------
    .. [1] Williams, D. A. (1976). Improved likelihood ratio tests for complete
       contingency tables. Biometrika, 63(1), 33-37.
    .. [2] Sokal, R. R., & Rohlf, F. J. (1995). Biometry, 3rd ed., Freeman (the
       correction applied to the G-test of independence).

    Examples
    --------
    >>> float(williams_correction([10, 10], [10, 10]).round(6))
    1.075
    """
    rows = np.asarray(rows, dtype=np.float64)
    cols = np.asarray(cols, dtype=np.float64)
    n = rows.sum(axis=-1)
    with np.errstate(divide="ignore"):
        inv_r = np.where(rows > 0, 1.0 / np.where(rows > 0, rows, 1.0), 0.0).sum(axis=-1)
        inv_c = np.where(cols > 0, 1.0 / np.where(cols > 0, cols, 1.0), 0.0).sum(axis=-1)
    dof = (np.count_nonzero(rows, axis=-1) - 1) * (np.count_nonzero(cols, axis=-1) - 1)
    safe = np.where((dof > 0) & (n > 0), 6.0 * n * np.maximum(dof, 1), 1.0)
    q = 1.0 + (n * inv_r - 1.0) * (n * inv_c - 1.0) / safe
    return np.where(dof > 0, q, 1.0)


@fill_doc()
def g_statistics(tables) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """G, degrees of freedom, N, non-empty rows and columns, and Williams' q of each table.

    Parameters
    ----------
    tables : sequence of array_like of shape (r_t, c_t)
        Count tables (shapes may differ; tables of one shape are computed together).

    Returns
    -------
    g, dof, n, r_used, c_used, williams : numpy.ndarray
        :math:`G = 2 \\sum O \\ln(O / E)` (0 when ``dof`` is 0), the degrees of
        freedom over non-empty rows and columns, the total, those row and column
        numbers, and :func:`williams_correction`.

    References
    ----------
    .. [1] {wilks_1938}

    Examples
    --------
    >>> g, dof, n, r, c, q = g_statistics([[[10, 0], [0, 10]]])
    >>> round(float(g[0]), 4), int(dof[0])
    (27.7259, 1)
    """
    tabs = _as_tables(tables)
    m = len(tabs)
    g = np.zeros(m)
    n = np.zeros(m)
    r_used = np.zeros(m, dtype=np.int64)
    c_used = np.zeros(m, dtype=np.int64)
    williams = np.ones(m)
    # Empty cells, rows and columns change none of these numbers, so tables are
    # zero-padded to shapes rounded up to powers of two and computed a stack at a time
    # (an all-pairs profile has a few such shapes, however many tables).
    groups: dict[tuple, list[int]] = {}
    for i, t in enumerate(tabs):
        if t.size:
            groups.setdefault(tuple(1 << max(int(d) - 1, 0).bit_length() for d in t.shape), []).append(i)
    for shape, index in groups.items():
        stack = np.zeros((len(index), *shape))
        for j, i in enumerate(index):
            stack[j, : tabs[i].shape[0], : tabs[i].shape[1]] = tabs[i]
        rows, cols = stack.sum(axis=2), stack.sum(axis=1)
        total = rows.sum(axis=1)
        # G = 2 (sum O ln O - sum R ln R - sum C ln C + N ln N)
        value = 2.0 * (special.xlogy(stack, stack).sum(axis=(1, 2)) - special.xlogy(rows, rows).sum(axis=1)
                       - special.xlogy(cols, cols).sum(axis=1) + special.xlogy(total, total))
        g[index] = np.maximum(value, 0.0)  # 2 N times a KL divergence: >= 0 up to rounding
        n[index] = total
        r_used[index] = np.count_nonzero(rows, axis=1)
        c_used[index] = np.count_nonzero(cols, axis=1)
        williams[index] = williams_correction(rows, cols)
    dof = np.maximum(r_used - 1, 0) * np.maximum(c_used - 1, 0)
    g = np.where(dof > 0, g, 0.0)
    return g, dof, n, r_used, c_used, williams


def table_reliability(n, r_used, c_used) -> np.ndarray:
    """How far a pair table can be trusted: ``"ok"``, ``"sparse"`` or ``"too_few"``.

    Parameters
    ----------
    n, r_used, c_used : array_like
        Rows of the table, and its non-empty rows and columns.

    Returns
    -------
    numpy.ndarray of str
        ``"too_few"`` under :data:`TOO_FEW_ROWS` rows or under one row per non-empty
        cell; ``"sparse"`` under :data:`SPARSE_MEAN_COUNT` rows per non-empty cell
        (common practice for chi-square style tables); ``"ok"`` otherwise.

    Examples
    --------
    >>> table_reliability([300, 300, 5000], [16, 4, 16], [16, 4, 16]).tolist()
    ['sparse', 'ok', 'ok']
    """
    n = np.asarray(n, dtype=np.float64)
    cells = np.maximum(np.asarray(r_used, dtype=np.float64) * np.asarray(c_used, dtype=np.float64), 1.0)
    mean = n / cells
    out = np.where(mean < SPARSE_MEAN_COUNT, "sparse", "ok").astype(object)
    out[(n < TOO_FEW_ROWS) | (mean < 1.0)] = "too_few"
    return out


def monte_carlo_p_value(exceed, done, stop_after: int = PERMUTATION_STOP_AFTER) -> tuple[np.ndarray, np.ndarray]:
    r"""p-value and its Monte-Carlo standard error from shuffle counts.

    Parameters
    ----------
    exceed, done : array_like of int
        Shuffles that reached the observed statistic, and shuffles made.
    stop_after : int
        The sequential stopping count used.

    Returns
    -------
    p_value, p_error : numpy.ndarray
        :math:`b / L` where shuffling stopped early (``b == stop_after``, Besag &
        Clifford 1991), else :math:`(b + 1)/(L + 1)` (Phipson & Smyth 2010); and
        :math:`\sqrt{p (1 - p) / L}`.  NaN where no shuffle was made.

    References
    ----------
    .. [1] Besag, J., & Clifford, P. (1991). Sequential Monte Carlo p-values.
       Biometrika, 78(2), 301-304.
    .. [2] Phipson, B., & Smyth, G. K. (2010). Permutation p-values should never be
       zero. Statistical Applications in Genetics and Molecular Biology, 9(1), 39.

    Examples
    --------
    >>> p, se = monte_carlo_p_value([0, 20], [999, 40])
    >>> p.tolist()
    [0.001, 0.5]
    """
    b = np.asarray(exceed, dtype=np.float64)
    L = np.asarray(done, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        p = np.where(b >= stop_after, b / np.where(L > 0, L, 1.0), (b + 1.0) / (L + 1.0))
        p = np.where(L > 0, np.minimum(p, 1.0), np.nan)
        se = np.sqrt(p * (1.0 - p) / np.where(L > 0, L, np.nan))
    return p, se


#: ``shuffle(index, budgets, stop_after, stage) -> (done, exceed)``: the caller's
#: permutation counter (the engine), for the tables at positions ``index``.
Shuffler = Callable[[np.ndarray, np.ndarray, np.ndarray, int], tuple[np.ndarray, np.ndarray]]

#: Codes of the methods, for caches that hold numbers only.
P_METHODS = ("none", "chi2", "permutation")


class TableTests(NamedTuple):
    """The per-table part of :func:`independence_tests` (arrays of one length)."""

    statistic: np.ndarray  #: G (not corrected)
    dof: np.ndarray
    n: np.ndarray
    p_value: np.ndarray  #: chi-square p (Williams) where used, 1 for dof 0, NaN pending or empty
    p_method: np.ndarray  #: "chi2", "permutation" or "none"
    reliability: np.ndarray  #: "ok", "sparse" or "too_few"


def table_tests(tables) -> TableTests:
    """The part of the tests that each table decides alone: G, the rule, chi-square p.

    Parameters
    ----------
    tables : sequence of array_like of shape (r_t, c_t)

    Returns
    -------
    TableTests
        ``p_method`` is ``"chi2"`` where the table has at least
        :data:`CHI2_MIN_MEAN_COUNT` rows per non-empty cell (p from G / q, q Williams'
        factor), ``"permutation"`` where a shuffle test must decide (p NaN until
        :func:`permutation_p_values` fills it), ``"none"`` with 0 degrees of freedom
        (p = 1) or no rows (p = NaN).

    References
    ----------
    .. [1] Williams, D. A. (1976). Improved likelihood ratio tests for complete
       contingency tables. Biometrika, 63(1), 33-37.

    Examples
    --------
    >>> table_tests([[[30, 10], [10, 30]], [[3, 1], [1, 3]]]).p_method.tolist()
    ['chi2', 'permutation']
    """
    g, dof, n, r_used, c_used, williams = g_statistics(tables)
    reliability = table_reliability(n, r_used, c_used)
    mean = n / np.maximum(r_used * c_used, 1)
    filled = (dof > 0) & (mean >= CHI2_MIN_MEAN_COUNT)
    p_w = np.full(len(g), np.nan)
    if filled.any():
        p_w[filled] = stats.chi2.sf(g[filled] / williams[filled], dof[filled])
    # Williams' factor well above 1 (very uneven margins) over-corrects: such tables
    # are tested by permutation where that is affordable, unless the (conservative)
    # corrected test already puts them far beyond any false-discovery threshold
    # (see the module notes).
    uneven = filled & (williams > WILLIAMS_MAX) & (n <= UNEVEN_PERMUTATION_ROWS)
    chi2 = filled & ~(uneven & ~(p_w < CHI2_CLEAR_P))
    permute = (dof > 0) & ~chi2
    method = np.where(chi2, "chi2", np.where(permute, "permutation", "none")).astype(object)
    p = np.where(n > 0, 1.0, np.nan)
    p[permute] = np.nan
    p[chi2] = p_w[chi2]
    return TableTests(g, dof, n, p, method, reliability)


def permutation_p_values(p_value, p_method, n, shuffle: Shuffler, *, alpha: float = 0.05, done=None,
                         exceed=None, stage=None):
    """Fill in the permutation p-values of one family of tests, in budget stages.

    Parameters
    ----------
    p_value, p_method, n : array_like
        From :func:`table_tests` (the family: Benjamini-Hochberg runs over it).
    shuffle : callable
        ``shuffle(index, budgets, stop_after, stage) -> (done, exceed)``.
    alpha : float, default=0.05
        A pair's budget grows to the next stage only while its p-value is at the
        resolution of its budget and its q-value is not below ``alpha``.
    done, exceed, stage : array_like of int, optional
        Shuffles already made per table (a cache), continued rather than repeated;
        ``stage`` is the last budget stage run (-1: none).

    Returns
    -------
    p_value, p_error, done, exceed, stage : numpy.ndarray

    References
    ----------
    .. [1] Besag, J., & Clifford, P. (1991). Biometrika, 78(2), 301-304.
    .. [2] Benjamini, Y., & Hochberg, Y. (1995). JRSS B, 57(1), 289-300.

    Examples
    --------
    >>> import numpy as np
    >>> shuffle = lambda index, budgets, stop, s: (np.minimum(budgets, 40), np.minimum(stop, 20))
    >>> p, se, done, exceed, stage = permutation_p_values([np.nan], ["permutation"], [60], shuffle)
    >>> p.tolist(), done.tolist()
    ([0.5], [40])
    """
    p = np.array(p_value, dtype=np.float64)
    m = p.size
    permute = np.asarray(p_method, dtype=object) == "permutation"
    n = np.asarray(n, dtype=np.float64)
    done = np.zeros(m, dtype=np.int64) if done is None else np.array(done, dtype=np.int64)
    exceed = np.zeros(m, dtype=np.int64) if exceed is None else np.array(exceed, dtype=np.int64)
    stage = np.full(m, -1, dtype=np.int64) if stage is None else np.array(stage, dtype=np.int64)
    h = PERMUTATION_STOP_AFTER
    cap = np.maximum(np.minimum(PERMUTATION_BUDGETS[-1], PERMUTATION_ROW_BUDGET // np.maximum(n, 1)),
                     PERMUTATION_MIN_SHUFFLES).astype(np.int64)
    for s, budget in enumerate(PERMUTATION_BUDGETS):
        limit = np.minimum(np.int64(budget), cap)
        want = permute & (stage < s) & (exceed < h) & (done < limit)
        if s > 0 and want.any():
            cur = p.copy()
            cur[permute] = monte_carlo_p_value(exceed, done, h)[0][permute]
            want &= ~(benjamini_hochberg(cur) < alpha)  # a finding already: more would not change it
        idx = np.flatnonzero(want)
        if idx.size:
            d, e = shuffle(idx, (limit[idx] - done[idx]).astype(np.int64), (h - exceed[idx]).astype(np.int64), s)
            done[idx] += np.asarray(d, dtype=np.int64)
            exceed[idx] += np.asarray(e, dtype=np.int64)
            stage[idx] = s
    pp, se = monte_carlo_p_value(exceed, done, h)
    p[permute] = pp[permute]
    p_error = np.where(permute, se, 0.0)
    return p, p_error, done, exceed, stage


def independence_tests(tables, shuffle: Shuffler | None = None, *, alpha: float = 0.05,
                       state=None) -> IndependenceTests:
    """Test independence in every table, with a p-value that is valid at its size.

    Parameters
    ----------
    tables : sequence of array_like of shape (r_t, c_t)
        The pair tables of one family of tests (Benjamini-Hochberg runs over them).
    shuffle : callable, optional
        ``shuffle(index, budgets, stop_after, stage) -> (done, exceed)`` makes up to
        ``budgets[j]`` more shuffles of table ``index[j]`` (stopping once
        ``stop_after[j]`` more reached its observed G) with the random stream of
        ``stage``; the engine's ``PairEngine.shuffle_counts`` behind it.  Without
        one, tables outside the chi-square rule get NaN p-values and method "none".
    alpha : float, default=0.05
        The false-discovery level of the views (see :func:`permutation_p_values`).
    state : tuple of arrays (done, exceed, stage), optional
        Shuffle counts already made (a cache); they are continued, not repeated.

    Returns
    -------
    IndependenceTests
        Per table: G, dof, p-value, method, shuffles, Monte-Carlo error, reliability.

    References
    ----------
    .. [1] Williams, D. A. (1976). Biometrika, 63(1), 33-37.
    .. [2] Besag, J., & Clifford, P. (1991). Biometrika, 78(2), 301-304.
    .. [3] Phipson, B., & Smyth, G. K. (2010). Stat. Appl. Genet. Mol. Biol. 9(1), 39.
    .. [4] Benjamini, Y., & Hochberg, Y. (1995). JRSS B, 57(1), 289-300.

    Examples
    --------
    >>> res = independence_tests([[[500, 10], [10, 500]]])
    >>> res.p_method.tolist(), bool(res.p_value[0] < 1e-100)
    (['chi2'], True)
    """
    tt = table_tests(tables)
    method = tt.p_method.copy()
    m = len(method)
    done = np.zeros(m, dtype=np.int64)
    exceed = np.zeros(m, dtype=np.int64)
    p, p_error = tt.p_value.copy(), np.zeros(m)
    if shuffle is None:
        method[method == "permutation"] = "none"
    elif (method == "permutation").any():
        kw = {} if state is None else {"done": state[0], "exceed": state[1], "stage": state[2]}
        p, p_error, done, exceed, _ = permutation_p_values(tt.p_value, method, tt.n, shuffle, alpha=alpha, **kw)
    permuted = method == "permutation"
    return IndependenceTests(tt.statistic, tt.dof, p, method, np.where(permuted, done, 0),
                             np.where(permuted, exceed, 0), p_error, tt.reliability)


# --------------------------------------------------------------------------- G-test of a table, FDR
class GTestResult(NamedTuple):
    """Result of a G-test of independence.

    ``statistic`` is G = 2 N I (I the plug-in MI in nats), ``dof`` the degrees of
    freedom and ``p_value`` the upper tail of the chi-square distribution at G.
    """

    statistic: float
    dof: int
    p_value: float


@fill_doc()
def g_test_from_table(table) -> GTestResult:
    """G-test (likelihood-ratio test) of independence of a count table.

    Parameters
    ----------
    table : array_like of shape (r, c)
        Joint counts.

    Returns
    -------
    GTestResult
        ``(statistic, dof, p_value)``: :math:`G = 2 \\sum O \\ln(O / E) = 2 N \\hat I`
        (nats), ``dof = (r' - 1)(c' - 1)`` where ``r'`` and ``c'`` count only the
        non-empty rows and columns (an empty row or column carries no observation
        and no parameter), and the chi-square upper-tail p-value.  With
        ``dof == 0`` (one variable constant) G is 0 and the p-value is 1.0, as in
        ``scipy.stats.chi2_contingency``.

    References
    ----------
    .. [1] {wilks_1938}
    .. [2] Kullback, S. (1959). Information Theory and Statistics. Wiley (the
       statistic 2 N I).
    .. [3] Sokal, R. R., & Rohlf, F. J. (1995). Biometry, 3rd ed., Freeman
       (the G-test of independence).

    Examples
    --------
    >>> res = g_test_from_table([[10, 0], [0, 10]])
    >>> res.dof, round(res.statistic, 4)
    (1, 27.7259)
    """
    res = _g_tests([check_table(table)])
    return GTestResult(float(res.statistic[0]), int(res.dof[0]), float(res.p_value[0]))


@fill_doc()
def g_test_from_tables(tables) -> GTestResult:
    """G-tests of independence for many count tables at once.

    Parameters
    ----------
    tables : sequence of array_like of shape (r_t, c_t), or array of shape (T, r, c)
        The tables; shapes may differ.  Tables of the same shape are computed
        together in one vectorised pass (an engine's output has few distinct shapes).

    Returns
    -------
    GTestResult
        Arrays of length T: ``statistic`` (float), ``dof`` (int) and ``p_value``
        (float), with the conventions of :func:`g_test_from_table`.  A table with no
        observations gets ``statistic = 0``, ``dof = 0`` and ``p_value = nan``
        (nothing was tested) instead of an error, so that one empty pair does not
        stop a batch.

    References
    ----------
    .. [1] {wilks_1938}

    Examples
    --------
    >>> res = g_test_from_tables([[[10, 0], [0, 10]], [[5, 5], [5, 5]]])
    >>> res.dof.tolist(), res.statistic.round(4).tolist()
    ([1, 1], [27.7259, 0.0])
    """
    if isinstance(tables, np.ndarray) and tables.ndim == 3:
        items = [tables[i] for i in range(tables.shape[0])]
    else:
        items = list(tables)
    return _g_tests([check_table(t, f"tables[{i}]", allow_empty=True) for i, t in enumerate(items)])


def _g_tests(checked: list[np.ndarray]) -> GTestResult:
    """The G-tests of :func:`g_test_from_tables` on tables already checked."""
    m = len(checked)
    stat = np.zeros(m)
    dof = np.zeros(m, dtype=np.int64)
    groups: dict[tuple[int, int], list[int]] = {}
    for i, t in enumerate(checked):
        groups.setdefault(t.shape, []).append(i)
    for shape, index in groups.items():
        if 0 in shape:
            continue
        stack = np.stack([checked[i] for i in index])  # (T, r, c)
        n = stack.sum(axis=(1, 2))
        rows = stack.sum(axis=2)
        cols = stack.sum(axis=1)
        safe_n = np.where(n > 0, n, 1.0)
        expected = rows[:, :, None] * cols[:, None, :] / safe_n[:, None, None]
        ratio = np.divide(stack, expected, out=np.ones_like(stack), where=stack > 0)
        g = 2.0 * np.sum(special.xlogy(stack, ratio), axis=(1, 2))
        stat[index] = np.maximum(g, 0.0)  # 2 N times a KL divergence: >= 0 up to rounding
        d_rows = np.maximum(np.count_nonzero(rows, axis=1) - 1, 0)
        d_cols = np.maximum(np.count_nonzero(cols, axis=1) - 1, 0)
        dof[index] = d_rows * d_cols
    totals = np.array([t.sum() for t in checked]) if m else np.zeros(0)
    with np.errstate(invalid="ignore"):
        p = np.where(dof > 0, stats.chi2.sf(stat, np.maximum(dof, 1)), 1.0)
    p = np.where(totals > 0, p, np.nan)
    stat = np.where(dof > 0, stat, 0.0)
    return GTestResult(stat, dof, p)


def benjamini_hochberg(p_values) -> np.ndarray:
    """Benjamini-Hochberg adjusted p-values (q-values) controlling the FDR.

    Parameters
    ----------
    p_values : array_like
        p-values in [0, 1], any shape.  NaN entries (tests that were not run) are
        left out of the count of tests and stay NaN in the result.

    Returns
    -------
    numpy.ndarray
        q-values of the same shape: :math:`q_{(i)} = \\min_{j \\ge i} \\min(1, m p_{(j)} / j)`
        over the sorted p-values, ``m`` the number of non-NaN p-values.  Rejecting
        every hypothesis with ``q <= alpha`` controls the false discovery rate at
        ``alpha`` for independent (or positively dependent) tests.

    References
    ----------
    .. [1] Benjamini, Y., & Hochberg, Y. (1995). Controlling the false discovery
       rate: a practical and powerful approach to multiple testing. Journal of the
       Royal Statistical Society B, 57(1), 289-300.

    Examples
    --------
    >>> benjamini_hochberg([0.01, 0.04, 0.03]).round(3).tolist()
    [0.03, 0.04, 0.04]
    """
    p = np.asarray(p_values)
    if p.dtype == object and p.size:
        try:  # a list mixing None-free numbers is fine; anything else is named below
            p = p.astype(np.float64)
        except (TypeError, ValueError):
            pass
    if p.dtype == object or not (np.issubdtype(p.dtype, np.number) or p.dtype == bool):
        raise TypeError(f"p_values must be numeric, got dtype {p.dtype}")
    p = p.astype(np.float64, copy=False)
    flat = p.ravel()
    ok = ~np.isnan(flat)
    if np.any((flat[ok] < 0) | (flat[ok] > 1)):
        raise ValueError("p_values must lie in [0, 1] (NaN marks a test that was not run)")
    q = np.full(flat.shape, np.nan)
    vals = flat[ok]
    m = vals.size
    if m:
        order = np.argsort(vals, kind="stable")
        scaled = vals[order] * m / np.arange(1, m + 1)
        adjusted = np.minimum(np.minimum.accumulate(scaled[::-1])[::-1], 1.0)
        out = np.empty(m)
        out[order] = adjusted
        q[ok] = out
    return q.reshape(p.shape)
