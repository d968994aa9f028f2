r"""Pair tables of weighted rows: effective counts at Kish's effective sample size.

With observation weights :math:`w_r` (survey or sampling weights) a table cell holds
the summed weight :math:`W_c = \sum_{r \in c} w_r`, and the cell shares
:math:`W_c / \sum W` estimate the population's.  How much the sample says is not the
number of rows but Kish's (1965) effective sample size of the rows behind the table,
:math:`n_{\mathrm{eff}} = (\sum w)^2 / \sum w^2` (n for equal weights, fewer the more
the weights vary).  :class:`WeightedPairEngine` therefore hands out *effective
tables*: the summed weights rescaled to total :math:`n_{\mathrm{eff}}` (of the pair's
complete rows) and rounded to whole counts by largest remainders.  Every rule the
profile applies to counts (bias corrections, the chance level, the chi-square rule
and Williams' correction, the intervals, the reliability of a table) then reads the
effective sample size, and with equal weights the tables are exactly the unweighted
ones.  Rounding moves each cell by less than one effective observation.

The permutation null of an effective table: random tables with its margins
(``scipy.stats.random_table``, Patefield 1981), scored like the unweighted shuffles
(``sum O ln O`` from the same lookup), with the same sequential stop.  The test
treats the effective table as a sample of :math:`n_{\mathrm{eff}}` rows (with equal
weights the engine shuffles the rows themselves, as the unweighted one does); its
calibration under unequal weights is simulated in ``tests/test_weights.py``
(DEVELOPERS.md, "Weights").
"""
from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from infoscope.engine.engine import PairEngine

__all__ = ["WeightedPairEngine", "effective_table"]


def effective_table(weight_sums: np.ndarray, square_sums: float) -> tuple[np.ndarray, float]:
    """Summed weights rescaled to Kish's effective size and rounded by largest remainders.

    Parameters
    ----------
    weight_sums : numpy.ndarray of float
        Summed weights per cell (any shape).
    square_sums : float
        The sum of the squared weights of the same rows.

    Returns
    -------
    table : numpy.ndarray of int64
        Same shape; total ``max(1, round(n_eff))`` (0 when no weight).
    n_effective : float
        Kish's :math:`(\\sum w)^2 / \\sum w^2` of the rows (0 when no weight).

    References
    ----------
    .. [1] Kish, L. (1965). Survey Sampling. Wiley, New York (sec. 11.7).

    Examples
    --------
    >>> t, n_eff = effective_table(np.array([2.0, 2.0, 4.0]), 2 * 4.0 + 16.0)
    >>> t.tolist(), round(n_eff, 3)
    ([1, 1, 1], 2.667)
    """
    w = np.asarray(weight_sums, dtype=np.float64)
    total = float(w.sum())
    if total <= 0 or square_sums <= 0:
        return np.zeros(w.shape, dtype=np.int64), 0.0
    n_eff = total * total / float(square_sums)
    target = max(1, int(round(n_eff)))
    scaled = w.ravel() * (target / total)
    base = np.floor(scaled).astype(np.int64)
    left = target - int(base.sum())
    if left > 0:
        # the cells with the largest fractions get one more (ties: the first cells)
        order = np.argsort(-(scaled - base), kind="stable")
        base[order[:left]] += 1
    return base.reshape(w.shape), n_eff


class WeightedPairEngine(PairEngine):
    """A :class:`~infoscope.engine.engine.PairEngine` whose tables are effective counts of weighted rows.

    Parameters
    ----------
    columns : sequence of EncodedColumn
        As for ``PairEngine``.
    weights : numpy.ndarray of float, shape (rows,)
        One finite weight >= 0 per row (the caller validates them).
    **options
        ``PairEngine``'s other keywords (``progress``, ``cache_bytes``, ...).

    Examples
    --------
    >>> from types import SimpleNamespace as Col
    >>> a = Col(name="a", codes=np.array([0, 0, 1, 1], np.uint8), k=2)
    >>> b = Col(name="b", codes=np.array([0, 1, 1, 1], np.uint8), k=2)
    >>> eng = WeightedPairEngine([a, b], weights=np.array([1.0, 1.0, 1.0, 1.0]), progress=False)
    >>> eng.table("a", "b").tolist()   # equal weights: the row counts
    [[1, 1], [0, 2]]
    """

    def __init__(self, columns: Sequence = (), *, weights: np.ndarray, **options):
        self._weights = np.asarray(weights, dtype=np.float64)
        self._squares = self._weights * self._weights
        self._n_eff_pairs: dict[tuple, float] = {}
        self._n_eff_columns: dict[str, float] = {}
        super().__init__(columns, **options)
        self._equal = bool(self._weights.size) and bool(np.all(self._weights == self._weights[0]))

    @property
    def weights(self) -> np.ndarray:
        """The row weights (read-only view)."""
        view = self._weights.view()
        view.flags.writeable = False
        return view

    @property
    def n_effective(self) -> float:
        """Kish's effective sample size of all rows."""
        s2 = float(self._squares.sum())
        return float(self._weights.sum()) ** 2 / s2 if s2 > 0 else 0.0

    def column_n_effective(self, name: str) -> float:
        """Kish's effective sample size of the rows where ``name`` is present."""
        self.marginal(name)
        return self._n_eff_columns[self._keys[name]]

    def pair_n_effective(self, a: str, b: str) -> float:
        """Kish's effective sample size of the rows where ``a`` and ``b`` are both present."""
        self.table(a, b)
        key = (self._keys[a], self._keys[b])
        return self._n_eff_pairs[key] if key in self._n_eff_pairs else self._n_eff_pairs[key[::-1]]

    def marginal(self, name: str) -> np.ndarray:  # noqa: D102 - PairEngine.marginal, effective counts
        self._check_name(name)
        if name not in self._marginals:
            k = self._keys[name][1]
            codes = self._codes[name]
            sums = np.bincount(codes, weights=self._weights, minlength=k + 1)[:k]
            squares = float(np.bincount(codes, weights=self._squares, minlength=k + 1)[:k].sum())
            counts, n_eff = effective_table(sums, squares)
            counts.flags.writeable = False
            self._marginals[name] = counts
            self._n_eff_columns[self._keys[name]] = n_eff
        return self._marginals[name]

    def _count(self, pairs: list[tuple[str, str]]) -> dict:
        """Weighted tables of ``pairs`` (``numpy.bincount`` with weights), as effective counts."""
        tables = {}
        for a, b in pairs:
            ka, kb = self._keys[a][1], self._keys[b][1]
            flat = self._codes[a].astype(np.int64) * (kb + 1) + self._codes[b]
            cells = (ka + 1) * (kb + 1)
            sums = np.bincount(flat, weights=self._weights, minlength=cells).reshape(ka + 1, kb + 1)[:-1, :-1]
            squares = np.bincount(flat, weights=self._squares, minlength=cells).reshape(ka + 1, kb + 1)[:-1, :-1]
            table, n_eff = effective_table(sums, float(squares.sum()))
            table = np.ascontiguousarray(table)
            table.flags.writeable = False
            tables[(a, b)] = table
            self._n_eff_pairs[(self._keys[a], self._keys[b])] = n_eff
        self.passes += 1
        return tables

    def shuffle_counts(self, pairs, observed, budgets, stop_after, seeds):
        """Permutation null of effective tables: random tables with their margins (Patefield 1981).

        Parameters
        ----------
        pairs, observed, budgets, stop_after, seeds
            As :meth:`PairEngine.shuffle_counts`; ``observed`` is the score
            ``sum O ln O`` of the effective table.

        Returns
        -------
        done, exceed : numpy.ndarray of int64

        References
        ----------
        .. [1] Patefield, W. M. (1981). Algorithm AS 159: An efficient method of
           generating random R x C tables with given row and column totals.
           Applied Statistics, 30(1), 91-97.

        Examples
        --------
        >>> from types import SimpleNamespace as Col
        >>> from infoscope.engine.permutation import score_lookup, table_score
        >>> codes = np.repeat(np.array([0, 1], np.uint8), 20)
        >>> eng = WeightedPairEngine([Col(name="a", codes=codes, k=2), Col(name="b", codes=codes, k=2)],
        ...                          weights=np.ones(40), progress=False)
        >>> obs = table_score(eng.table("a", "b"), score_lookup(40))
        >>> [int(v[0]) for v in eng.shuffle_counts([("a", "b")], [obs], [99], 10, [3])]
        [99, 0]
        """
        from scipy import stats

        from infoscope.engine.permutation import SCORE_TOLERANCE, score_lookup

        if self._equal:
            # equal weights: the effective tables are the row counts, and so are the
            # shuffles (the unweighted engine's, with its seeds): the same p-values
            return super().shuffle_counts(pairs, observed, budgets, stop_after, seeds)
        m = len(pairs)
        done = np.zeros(m, dtype=np.int64)
        exceed = np.zeros(m, dtype=np.int64)
        stops = np.broadcast_to(np.asarray(stop_after, dtype=np.int64), (m,))
        for i, (a, b) in enumerate(pairs):
            t = np.asarray(self.table(a, b))
            rows, cols = t.sum(axis=1), t.sum(axis=0)
            rows, cols = rows[rows > 0], cols[cols > 0]
            budget = int(budgets[i])
            if rows.size < 2 or cols.size < 2 or budget <= 0:
                done[i] = budget
                exceed[i] = budget  # one row or column: every table is the observed one
                continue
            lookup = score_lookup(int(t.sum()))
            threshold = float(observed[i]) - SCORE_TOLERANCE * max(1.0, abs(float(observed[i])))
            sampler = stats.random_table(rows, cols, seed=np.random.default_rng(int(seeds[i]) & (2**63 - 1)))
            while done[i] < budget and exceed[i] < stops[i]:
                block = min(budget - int(done[i]), 500)
                draws = sampler.rvs(size=block).reshape(block, -1).astype(np.int64)
                scores = lookup[draws].sum(axis=1)
                hits = np.flatnonzero(scores >= threshold)
                if exceed[i] + hits.size >= stops[i]:
                    # stop at the shuffle that reached the count, as the unweighted engine does
                    last = int(hits[stops[i] - exceed[i] - 1]) + 1
                    done[i] += last
                    exceed[i] = stops[i]
                    break
                exceed[i] += hits.size
                done[i] += block
        return done, exceed
