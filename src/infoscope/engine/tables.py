"""TableEngine: the :class:`~infoscope.engine.engine.PairEngine` interface over count tables already made.

An out-of-core or cluster profile never holds the codes of its rows: it holds the
merged count table of every pair and the count of every symbol.  Everything the
result tables read from an engine (``table``, ``tables``, ``marginal``, ``n``) is
then a look-up, and the permutation null of a pair needs no codes either: shuffling
one column against the other on their complete rows makes every table with the
observed margins exactly as likely as the multivariate hypergeometric law says, so
the shuffled tables are random tables with fixed margins (Patefield 1981, drawn by
:func:`scipy.stats.random_table`).  Same null, same statistic, same sequential
stopping as :func:`infoscope.engine.permutation.shuffle_counts`; only the random
stream differs (tests/test_outofcore_session.py compares the two in distribution).
"""
from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np
from scipy import stats

from infoscope.engine.permutation import _threshold, score_lookup

__all__ = ["TableEngine", "random_table_counts"]

# random tables drawn per block (memory: block x cells int64)
_BLOCK_CELLS = 2_000_000


def random_table_counts(table: np.ndarray, threshold: float, budget: int, stop_after: int, seed: int,
                        lookup: np.ndarray) -> tuple[int, int]:
    """Random tables with the margins of ``table``: how many were drawn, how many scored at least ``threshold``.

    Parameters
    ----------
    table : numpy.ndarray
        A 2-D count table.
    threshold : float
        The observed score ``sum O ln O`` less its tolerance.
    budget : int
        Most tables to draw.
    stop_after : int
        Stop once this many reached the threshold (Besag & Clifford 1991).
    seed : int
        Seed of the draws.
    lookup : numpy.ndarray
        ``v ln v`` for ``v = 0 .. n`` (:func:`infoscope.engine.permutation.score_lookup`).

    Returns
    -------
    done, exceed : int

    References
    ----------
    .. [1] Patefield, W. M. (1981). Algorithm AS 159: An efficient method of
       generating random R x C tables with given row and column totals. Applied
       Statistics 30(1), 91-97.
    .. [2] Besag, J., & Clifford, P. (1991). Sequential Monte Carlo p-values.
       Biometrika 78(2), 301-304.

    Examples
    --------
    >>> import numpy as np
    >>> from infoscope.engine.permutation import score_lookup, table_score
    >>> t = np.array([[20, 0], [0, 20]])
    >>> lookup = score_lookup(40)
    >>> random_table_counts(t, table_score(t, lookup) - 1e-9, 99, 99, 1, lookup)
    (99, 0)
    """
    t = np.asarray(table, dtype=np.int64)
    rows, cols = t.sum(axis=1), t.sum(axis=0)
    rows, cols = rows[rows > 0], cols[cols > 0]
    done = exceed = 0
    if budget <= 0:
        return 0, 0
    if rows.size <= 1 or cols.size <= 1:
        # one row or column: every arrangement is the observed table
        return int(min(budget, stop_after)), int(min(budget, stop_after))
    dist = stats.random_table(rows, cols, seed=np.random.default_rng(seed))
    block = max(1, min(4096, _BLOCK_CELLS // (rows.size * cols.size)))
    while done < budget and exceed < stop_after:
        b = min(block, budget - done)
        draws = dist.rvs(size=b).reshape(b, -1).astype(np.int64)
        scores = lookup[draws].sum(axis=1)
        hits = np.cumsum(scores >= threshold)
        need = stop_after - exceed
        reached = np.flatnonzero(hits >= need)
        if reached.size:
            return done + int(reached[0]) + 1, exceed + need
        done += b
        exceed += int(hits[-1])
    return done, exceed


class TableEngine:
    """Pair tables and symbol counts made elsewhere (batches, partitions), behind the engine interface.

    Parameters
    ----------
    columns : sequence of EncodedColumn
        The columns (``name``, ``k``; their codes are not read).
    tables : mapping
        ``{(a, b): table}``: the pairwise-complete count table of each pair of
        column names, shape ``(k_a, k_b)`` (one orientation per pair is enough).
    marginals : mapping
        ``{name: counts}``: rows per symbol ``0 .. k-1`` of each column.
    n : int
        Rows of the source.

    Attributes
    ----------
    n : int
    sampled : None
        Always None (a sample is drawn by the source before counting).
    last_counted : tuple
        Always empty: nothing is counted here.

    Examples
    --------
    >>> import numpy as np
    >>> from types import SimpleNamespace as Col
    >>> eng = TableEngine([Col(name="a", k=2), Col(name="b", k=2)], {("a", "b"): np.array([[3, 1], [0, 4]])},
    ...                   {"a": np.array([4, 4]), "b": np.array([3, 5])}, n=8)
    >>> eng.table("b", "a").tolist()
    [[3, 0], [1, 4]]
    """

    backend = "tables"

    def __init__(self, columns: Sequence, tables: Mapping, marginals: Mapping, *, n: int):
        self._columns = {c.name: c for c in columns}
        self._tables = {}
        for (a, b), t in tables.items():
            arr = np.ascontiguousarray(t, dtype=np.int64)
            arr.flags.writeable = False
            self._tables[(a, b)] = arr
        self._marginals = {}
        for name, m in marginals.items():
            arr = np.asarray(m, dtype=np.int64).copy()
            arr.flags.writeable = False
            self._marginals[name] = arr
        self.n = int(n)
        self.sampled = None
        self.last_counted: tuple = ()
        self.passes = 0

    @property
    def names(self) -> list:
        """Column names, in order."""
        return list(self._columns)

    def column(self, name: str):
        """The column of a name."""
        self._check_name(name)
        return self._columns[name]

    def set_column(self, col) -> None:
        """Not possible: a new encoding needs another pass over the source."""
        raise ValueError(f"column {col.name!r}: this profile holds count tables only; a new encoding "
                         "needs another pass over the source (profile it again with the new settings)")

    def marginal(self, name: str) -> np.ndarray:
        """Rows per symbol of a column (int64, read-only)."""
        self._check_name(name)
        return self._marginals[name]

    def table(self, a: str, b: str) -> np.ndarray:
        """The pairwise-complete table of ``a`` (rows) and ``b`` (columns), int64, read-only."""
        self._check_name(a)
        self._check_name(b)
        if (a, b) in self._tables:
            return self._tables[(a, b)]
        if (b, a) in self._tables:
            return self._tables[(b, a)].T
        raise KeyError(f"no table of the pair ({a!r}, {b!r}) was counted")

    def tables(self, pairs=None) -> dict:
        """``{(a, b): table}`` for the pairs (all counted pairs when None)."""
        if pairs is None:
            pairs = list(self._tables)
        self.last_counted = ()
        return {(a, b): self.table(a, b) for a, b in pairs}

    def shuffle_counts(self, pairs, observed, budgets, stop_after, seeds) -> tuple[np.ndarray, np.ndarray]:
        """The permutation null of pair tables from random tables with the observed margins.

        Same arguments and results as
        :meth:`infoscope.engine.engine.PairEngine.shuffle_counts`.

        References
        ----------
        .. [1] Patefield, W. M. (1981). Algorithm AS 159. Applied Statistics 30(1), 91-97.
        """
        m = len(pairs)
        done = np.zeros(m, dtype=np.int64)
        exceed = np.zeros(m, dtype=np.int64)
        stop = np.broadcast_to(np.asarray(stop_after, dtype=np.int64), (m,))
        thresholds = _threshold(observed)
        for p, (a, b) in enumerate(pairs):
            t = self.table(a, b)
            lookup = score_lookup(int(t.sum()))
            done[p], exceed[p] = random_table_counts(t, float(thresholds[p]), int(budgets[p]), int(stop[p]),
                                                     int(seeds[p]), lookup)
        return done, exceed

    def _check_name(self, name) -> None:
        if name not in self._columns:
            raise KeyError(f"no column named {name!r} in the engine (columns: {self.names[:10]}...)")

    def __repr__(self) -> str:
        return f"TableEngine({len(self._columns)} columns, n={self.n})"
