"""The pair tables of a profile: ``pairs()``, ``matrix()``, ``pair()`` and the pair cache."""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, SmallSampleWarning, warn_user
from infoscope.estimators._checks import check_choice, log_base, unit_name
from infoscope.estimators.information import (
    adjusted_mutual_information_from_table,
    benjamini_hochberg,
    GTestResult,
    pointwise_mutual_information,
    variation_of_information_from_table,
)
from infoscope.estimators.significance import (
    P_METHODS,
    RELIABILITY_STATES,
    permutation_p_values,
    table_tests,
)
from infoscope.frame.inference import FINDING_Q, pair_shuffler, pair_tests
from infoscope.frame.ordering import _cluster_order
from infoscope.frame.results import PAIRS_COLUMNS, PairTable, result_frame
from infoscope.frame.tables.intervals import interval_columns
from infoscope.frame.settings import MEASURES, ORDERS

_NORMALIZED = frozenset({"nmi", "adjusted_mi"})
_ZERO_SNAP = 1e-12


#: The numbers cached per pair, in this order.
_STATS = ("n", "mi", "nmi", "g", "dof", "p_table", "p_method", "reliability", "done", "exceed", "stage")


def _test_columns(tests: dict) -> dict:
    """The test columns of a result table, in the contract's types."""
    return {"p_method": pd.array(tests["p_method"], dtype=object),
            "n_permutations": np.asarray(tests["n_permutations"], dtype=np.int64),
            "p_error": np.asarray(tests["p_error"], dtype=float),
            "reliability": pd.array(tests["reliability"], dtype=object)}


def _zero_entropy(marginal) -> bool:
    """True when a marginal count vector has at most one non-empty cell (H = 0)."""
    return int(np.count_nonzero(np.asarray(marginal))) <= 1




class PairTables:
    """Session part: :meth:`pairs`, :meth:`matrix`, :meth:`pair` (see :mod:`infoscope.frame.tables`)."""

    def _pair_list(self, columns=None) -> list[tuple[str, str]]:
        keys = self._names if columns is None else [self._check_name(c, "columns") for c in columns]
        return [(a, b) for i, a in enumerate(keys) for b in keys[i + 1:]]

    def pairs(self, measure: str | None = None, *, columns=None) -> pd.DataFrame:
        """One row per unordered pair of columns: MI, NMI, the chosen measure, G-test.

        Parameters
        ----------
        measure : {"mi", "nmi", "adjusted_mi", "vi"}, optional
            What the ``value`` column holds (default: the session's ``measure``).
        columns : list of str, optional
            Restrict to the pairs among these column keys.

        Returns
        -------
        pandas.DataFrame
            Columns ``a, b, k_a, k_b, n, mi, nmi, value, g, dof, p_value, q_value,
            p_method, n_permutations, p_error, reliability``, in column order:
            ``n`` rows where both are present, ``mi`` with the session's
            estimator, ``nmi`` with the session's normalisation (same estimator),
            ``g`` / ``dof`` the G statistic of independence and its degrees of
            freedom, ``p_value`` from the chi-square law with Williams' correction
            where the table has at least 20 rows per non-empty cell
            (``p_method="chi2"``) and from a seeded Monte-Carlo permutation test
            elsewhere (``"permutation"``, with ``n_permutations`` shuffles and the
            Monte-Carlo standard error ``p_error``); ``q_value``
            Benjamini-Hochberg over all pairs of the table; ``reliability``
            ``"ok"`` / ``"sparse"`` (under 5 rows per non-empty cell) /
            ``"too_few"`` (under one row per cell or under 10 rows: the MI says
            little). See :mod:`infoscope.estimators.significance`.
            ``attrs``: unit, estimator, sampled, measure, normalization.

        References
        ----------
        .. [1] Wilks, S. S. (1938). Annals of Mathematical Statistics, 9(1), 60-62
           (the G-test).
        .. [2] Williams, D. A. (1976). Biometrika, 63(1), 33-37.
        .. [3] Besag, J., & Clifford, P. (1991). Biometrika, 78(2), 301-304
           (sequential Monte-Carlo p-values).
        .. [4] Benjamini, Y., & Hochberg, Y. (1995). JRSS B, 57(1), 289-300.
        .. [5] Vinh, N. X., Epps, J., & Bailey, J. (2010). JMLR 11, 2837-2854
           (NMI normalisations, AMI).

        Examples
        --------
        >>> from infoscope.frame.session import ProfileSession
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": list("abab") * 10, "y": list("abab") * 10, "z": list("aabb") * 10})
        >>> s = ProfileSession(df, estimator="plugin")
        >>> s.pairs("nmi")[["a", "b", "value"]].round(3).values.tolist()
        [['x', 'y', 1.0], ['x', 'z', 0.0], ['y', 'z', 0.0]]
        """
        s = self._settings
        measure = check_choice(measure if measure is not None else s["measure"], MEASURES, "measure")
        memo_key = self._pairs_memo_key(measure) if columns is None else None
        memo = self._pairs_memo.get(measure)
        if memo_key is not None and memo is not None and memo[0] == memo_key:
            self._pairs_estimated = []
            return memo[1].copy()
        pair_list = self._pair_list(columns)
        stats = self._pair_stats(pair_list)
        tests = self._pair_p_values(pair_list, stats)
        m = len(pair_list)
        divisor = log_base(s["base"])
        n = stats[:, 0].astype(np.int64)
        mi = stats[:, 1] / divisor
        nmi = stats[:, 2]
        p_value = tests["p_value"]
        if measure == "mi":
            value = mi
        elif measure == "nmi":
            value = nmi
        else:
            value = self._pair_measure_values(pair_list, measure)
            if measure == "vi":
                value = value / divisor
        q = benjamini_hochberg(p_value) if m else np.zeros(0)
        enc = self._encoded
        out = pd.DataFrame({
            "a": [a for a, _ in pair_list],
            "b": [b for _, b in pair_list],
            "k_a": np.array([enc[a].k for a, _ in pair_list], dtype=np.int64),
            "k_b": np.array([enc[b].k for _, b in pair_list], dtype=np.int64),
            "n": n, "mi": mi, "nmi": nmi, "value": np.asarray(value, dtype=float),
            "g": stats[:, 3], "dof": stats[:, 4].astype(np.int64), "p_value": p_value,
            "q_value": np.asarray(q, dtype=float), **_test_columns(tests),
            **interval_columns(self, pair_list, p_value, tests["p_method"], tests["n_permutations"]),
        }, columns=list(PAIRS_COLUMNS))
        if not m:
            out = result_frame([], PAIRS_COLUMNS)
        out.attrs.update(self._attrs(measure=measure, normalization=s["normalization"]))
        if memo_key is not None:
            self._pairs_memo[measure] = (memo_key, out.copy())
        return out

    # ---------------------------------------------------------- the pair cache
    # The live views call pairs() and matrix() after every control change.  The
    # numbers of one pair depend only on the two encoded columns (their codes fix
    # the joint table) and on the estimator settings, so they are cached per pair
    # with the two EncodedColumn objects (compared by identity: a re-encoded
    # column is a new object) and the settings they were computed with; after
    # update() / set_column_bins() only the pairs touching a re-encoded column miss.
    # Values are kept in nats, so a change of unit re-estimates nothing.
    def _estimator_key(self) -> tuple:
        s = self._settings
        return (s["estimator"], s["alpha"] if s["estimator"] == "dirichlet" else None,
                s["normalization"], s["seed"])  # the seed: of the permutation tests

    def _pairs_memo_key(self, measure: str) -> tuple:
        s = self._settings
        return (measure, self._estimator_key(), s["base"], self.sampled,
                tuple(self._encoded[k] for k in self._names))

    def _pair_stats(self, pair_list: list[tuple[str, str]]) -> np.ndarray:
        """Numbers per pair, from the cache or estimated (columns: :data:`_STATS`).

        The last three (shuffles made, reaching the observed G, budget stage) are
        filled in by :meth:`_pair_p_values`, which writes them back to the cache.
        """
        est = self._estimator_key()
        enc = self._encoded
        cache = self._pair_cache
        out = np.empty((len(pair_list), len(_STATS)))
        todo: list[int] = []
        for i, (a, b) in enumerate(pair_list):
            hit = cache.get((a, b))
            if hit is not None and hit[0] is enc[a] and hit[1] is enc[b] and hit[2] == est:
                out[i] = hit[3]
            else:
                todo.append(i)
        self._pairs_estimated = [pair_list[i] for i in todo]
        if todo:
            wanted = [pair_list[i] for i in todo]
            tables = self._engine.tables(wanted)
            tabs = [np.asarray(tables[p], dtype=np.int64) for p in wanted]
            tm = self._table_measures(tabs, nats=True)
            tt = table_tests(tabs)
            for j, i in enumerate(todo):
                row = np.array([tt.n[j], tm["mi"][j], tm["nmi"][j], tt.statistic[j], tt.dof[j],
                                tt.p_value[j], P_METHODS.index(tt.p_method[j]),
                                RELIABILITY_STATES.index(tt.reliability[j]), 0, 0, -1], dtype=float)
                out[i] = row
                a, b = pair_list[i]
                cache[(a, b)] = (enc[a], enc[b], est, row)
        return out

    def _pair_p_values(self, pair_list: list[tuple[str, str]], stats: np.ndarray) -> dict[str, np.ndarray]:
        """p-values of one family of pairs: permutation tests where the rule asks for them.

        Shuffle counts are continued from the pair cache and written back to it, so
        a pair is never shuffled twice for the same budget.
        """
        method = np.array([P_METHODS[int(c)] for c in stats[:, 6]], dtype=object)
        p = stats[:, 5].copy()
        done, exceed, stage = (stats[:, j].astype(np.int64) for j in (8, 9, 10))
        p_error = np.zeros(len(pair_list))
        permute = method == "permutation"
        if permute.any():
            tables = self._engine.tables([pair_list[i] for i in np.flatnonzero(permute)])
            tabs = [np.asarray(tables[pair]) if k else None
                    for pair, k in zip(pair_list, permute)]
            shuffle = pair_shuffler(self._engine, pair_list, tabs, seed=self._settings["seed"])
            p, p_error, done, exceed, stage = permutation_p_values(
                p, method, stats[:, 0], shuffle, alpha=FINDING_Q, done=done, exceed=exceed, stage=stage)
            cache = self._pair_cache
            for i in np.flatnonzero(permute):
                hit = cache.get(pair_list[i])
                if hit is not None:
                    hit[3][8:11] = (done[i], exceed[i], stage[i])
        return {"p_value": p, "p_method": method, "n_permutations": np.where(permute, done, 0),
                "p_error": p_error,
                "reliability": np.array([RELIABILITY_STATES[int(c)] for c in stats[:, 7]], dtype=object)}

    def _one_pair_test(self, a: str, b: str, t: np.ndarray):
        """The test of one pair, in the orientation of ``pairs()`` (G is symmetric), with
        the shuffles ``pairs()`` made when that pair is cached: the pair view shows the
        p-value of the grid, never a coarser one."""
        enc, est = self._encoded, self._estimator_key()
        key = (a, b) if (a, b) in self._pair_cache else (b, a)
        hit = self._pair_cache.get(key)
        state = None
        if hit is not None and hit[0] is enc[key[0]] and hit[1] is enc[key[1]] and hit[2] == est:
            row = hit[3]
            if P_METHODS[int(row[6])] == "permutation" and row[8] > 0:
                state = (np.array([row[8]], dtype=np.int64), np.array([row[9]], dtype=np.int64),
                         np.array([row[10]], dtype=np.int64))
        return pair_tests(self._engine, [key], [t if key == (a, b) else t.T], seed=self._settings["seed"],
                          state=state)

    def _pair_measure_values(self, pair_list: list[tuple[str, str]], measure: str) -> np.ndarray:
        """AMI (unit-free) or VI (nats) per pair, cached like :meth:`_pair_stats`."""
        s = self._settings
        key = (measure, self._estimator_key())
        enc = self._encoded
        cache = self._measure_cache
        out = np.empty(len(pair_list))
        for i, (a, b) in enumerate(pair_list):
            hit = cache.get((measure, a, b))
            if hit is not None and hit[0] is enc[a] and hit[1] is enc[b] and hit[2] == key:
                out[i] = hit[3]
                continue
            t = np.asarray(self._engine.table(a, b), dtype=np.int64)
            if t.sum() == 0:
                value = math.nan
            elif measure == "adjusted_mi":
                value = adjusted_mutual_information_from_table(t, normalization=s["normalization"])
            else:
                value = variation_of_information_from_table(t, **{**self._kw(), "base": "nats"})
            out[i] = float(value)
            cache[(measure, a, b)] = (enc[a], enc[b], key, float(value))
        return out

    # ---------------------------------------------------------- matrix
    def matrix(self, measure: str | None = None, order: str = "name") -> pd.DataFrame:
        """The pair measure as a square table, index = columns = column keys.

        Parameters
        ----------
        measure : {"mi", "nmi", "adjusted_mi", "vi"}, optional
            Default: the session's ``measure``.
        order : {"name", "cluster"}, default="name"
            ``"name"``: frame order; ``"cluster"``: leaf order of an average-linkage
            hierarchical clustering on the distance ``1 - NMI`` (clipped to [0, 1])
            with optimal leaf ordering, so that related columns sit together.

        Returns
        -------
        pandas.DataFrame
            Symmetric.  Diagonal: the column's entropy for ``"mi"`` (I(X;X) = H(X)),
            1 for ``"nmi"`` and ``"adjusted_mi"`` (a column shares everything with
            itself) except NaN for a column of zero entropy (one observed
            symbol: I(X;X) / H(X) is 0/0, undefined), 0 for ``"vi"``.  Under the
            plug-in estimator, ``"nmi"`` and ``"adjusted_mi"`` values within
            1e-12 of 0 are set to exactly 0 (float rounding of an exact zero).
            ``attrs``: unit, estimator, sampled, measure, order.

        References
        ----------
        .. [1] Bar-Joseph, Z., Gifford, D. K., & Jaakkola, T. S. (2001). Fast optimal
           leaf ordering for hierarchical clustering. Bioinformatics, 17(S1), S22-S29
           (``scipy.cluster.hierarchy.optimal_leaf_ordering``).

        Examples
        --------
        >>> from infoscope.frame.session import ProfileSession
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": list("abab") * 10, "z": list("aabb") * 10, "y": list("abab") * 10})
        >>> ProfileSession(df, estimator="plugin").matrix("nmi", order="cluster").index.tolist()
        ['z', 'y', 'x']
        """
        order = check_choice(order, ORDERS, "order")
        table = self.pairs(measure)
        measure = table.attrs["measure"]
        keys = self._names
        position = {k: i for i, k in enumerate(keys)}
        values = table["value"].to_numpy(dtype=float)
        ia = [position[a] for a in table["a"]]
        ib = [position[b] for b in table["b"]]
        arr = np.full((len(keys), len(keys)), np.nan)
        if measure in _NORMALIZED and self._settings["estimator"] == "plugin":
            # float noise of an exact zero (4e-16, -3e-16) would read as a sign
            values = np.where(np.abs(values) < _ZERO_SNAP, 0.0, values)
        arr[ia, ib] = values
        arr[ib, ia] = values
        if measure == "mi":
            diag = [self._entropy(self._engine.marginal(k)) for k in keys]
        elif measure == "vi":
            diag = [0.0] * len(keys)
        else:
            # H(X) = 0: I(X;X) / H(X) is 0/0, undefined, not 1
            diag = [math.nan if _zero_entropy(self._engine.marginal(k)) else 1.0 for k in keys]
        arr[np.arange(len(keys)), np.arange(len(keys))] = diag
        square = pd.DataFrame(arr, index=pd.Index(keys), columns=pd.Index(keys))
        if order == "cluster" and len(keys) > 2:
            nmi = np.eye(len(keys))
            nv = table["nmi"].to_numpy(dtype=float)
            nmi[ia, ib] = nv
            nmi[ib, ia] = nv
            leaves = _cluster_order(nmi)
            square = square.iloc[leaves, leaves]
        square.attrs.update(self._attrs(measure=measure, order=order))
        return square

    # ---------------------------------------------------------- one pair
    def pair(self, a: str, b: str) -> PairTable:
        """The joint table of two columns with expected counts and pointwise MI.

        Parameters
        ----------
        a, b : str
            Column keys (``a`` labels the rows).

        Returns
        -------
        PairTable
            ``counts``, ``expected``, ``pmi`` (DataFrames labelled with the symbols),
            ``mi``, ``nmi``, ``g_test``, ``n``.

        References
        ----------
        .. [1] Church, K. W., & Hanks, P. (1990). Word association norms, mutual
           information, and lexicography. Computational Linguistics, 16(1), 22-29
           (pointwise mutual information).

        Examples
        --------
        >>> from infoscope.frame.session import ProfileSession
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": list("abab") * 10, "y": list("abba") * 10})
        >>> pt = ProfileSession(df, estimator="plugin").pair("x", "y")
        >>> pt.counts.to_numpy().tolist(), pt.n
        ([[10, 10], [10, 10]], 40)
        """
        a = self._check_name(a, "a")
        b = self._check_name(b, "b")
        if a == b:
            raise ValueError(f"a and b are the same column ({a!r}); pass two different columns")
        t = np.asarray(self._engine.table(a, b), dtype=np.int64)
        ca, cb = self._encoded[a], self._encoded[b]
        index = pd.Index(list(ca.labels), name=a)
        columns = pd.Index(list(cb.labels), name=b)
        n = int(t.sum())
        counts = pd.DataFrame(t, index=index, columns=columns)
        if n == 0:
            warn_user(f"columns {a!r} and {b!r} are never present in the same row: "
                          "their joint table is empty", DataQualityWarning)
            nan_frame = pd.DataFrame(np.nan, index=index, columns=columns)
            return PairTable(a, b, counts, nan_frame, nan_frame.copy(), math.nan, math.nan,
                             (math.nan, 0, math.nan), 0, unit_name(self._settings["base"]), True,
                             self._attrs(), p_method="none", reliability="too_few")
        expected = np.outer(t.sum(axis=1), t.sum(axis=0)) / n
        pmi = pointwise_mutual_information(t, base=self._settings["base"])
        tm = self._table_measures([t])
        tests = self._one_pair_test(a, b, t)
        reliability = str(tests.reliability[0])
        sparse = reliability != "ok"
        if sparse:
            what = ("too few rows to tell anything from the estimates" if reliability == "too_few"
                    else "the estimates are unreliable")
            warn_user(f"the joint table of {a!r} and {b!r} has {t.size} cells for {n} rows "
                      f"(fewer than 5 per cell on average): {what}",
                      SmallSampleWarning)
        g_test = GTestResult(float(tests.statistic[0]), int(tests.dof[0]), float(tests.p_value[0]))
        return PairTable(a, b, counts, pd.DataFrame(expected, index=index, columns=columns),
                         pd.DataFrame(pmi, index=index, columns=columns), float(tm["mi"][0]),
                         float(tm["nmi"][0]), g_test, n,
                         unit_name(self._settings["base"]), sparse, self._attrs(),
                         p_method=str(tests.p_method[0]), n_permutations=int(tests.n_permutations[0]),
                         p_error=float(tests.p_error[0]), reliability=reliability)
