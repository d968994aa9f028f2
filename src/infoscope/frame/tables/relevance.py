"""The relevance table of a profile: what each column tells about a target (``relevance()``)."""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.estimators.information import benjamini_hochberg
from infoscope.estimators.significance import permutation_p_values, table_tests
from infoscope.frame.inference import FINDING_Q, pair_shuffler
from infoscope.frame.results import LEAKAGE_SHARE, RELEVANCE_COLUMNS, result_frame
from infoscope.frame.supervised import supervised_attrs
from infoscope.frame.tables.intervals import interval_columns


class RelevanceTable:
    """Session part: :meth:`relevance` (see :mod:`infoscope.frame.tables`)."""

    def _relevance_p_values(self, others: list[str], target: str, rows: list[dict]) -> None:
        """Permutation p-values of the target's family, continued from the row cache."""
        method = np.array([r["p_method"] for r in rows], dtype=object)
        permute = method == "permutation"
        if not permute.any():
            return
        pairs = [(key, target) for key in others]
        tables = self._engine.tables([pairs[i] for i in np.flatnonzero(permute)])
        tabs = [np.asarray(tables[pair]) if k else None for pair, k in zip(pairs, permute)]
        state = np.array([r["_shuffles"] for r in rows], dtype=np.int64).reshape(len(rows), 3)
        p, p_error, done, exceed, stage = permutation_p_values(
            np.array([r["p_value"] for r in rows], dtype=float), method,
            np.array([r["n"] for r in rows], dtype=float),
            pair_shuffler(self._engine, pairs, tabs, seed=self._settings["seed"]),
            alpha=FINDING_Q, done=state[:, 0], exceed=state[:, 1], stage=state[:, 2])
        enc = self._encoded
        for i in np.flatnonzero(permute):
            r = rows[i]
            r["p_value"], r["p_error"] = float(p[i]), float(p_error[i])
            r["n_permutations"] = int(done[i])
            r["_shuffles"] = (int(done[i]), int(exceed[i]), int(stage[i]))
            hit = self._relevance_cache.get((others[i], target))
            if hit is not None and hit[0] is enc[others[i]]:
                hit[3].update(r)

    def relevance(self, target: str | None = None) -> pd.DataFrame:
        """Information each other column gives about a target column.

        Parameters
        ----------
        target : str, optional
            Column key (default: the session's ``target`` setting).

        Returns
        -------
        pandas.DataFrame
            One row per other column, largest MI first: ``column, k, n, mi, ci_low,
            ci_high, nmi, p_value, q_value, share_of_target, leakage, p_method,
            n_permutations, p_error, reliability`` where
            ``share_of_target = mi / H(target)`` (both on the rows where the two are
            present), ``leakage`` is True when that share is at least 0.95 (the
            column nearly determines the target: check whether it is known before
            the outcome), the interval is a seeded multinomial bootstrap of the
            joint table and q-values are Benjamini-Hochberg over the table; the
            p-values and the last four columns as in ``pairs()`` (chi-square with
            Williams' correction where the table is well filled, a seeded
            permutation test elsewhere; see :mod:`infoscope.estimators.significance`).
            ``attrs``: unit, estimator, sampled, target.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
           2nd ed., Wiley, section 2.4 (I(X;Y) <= H(Y)).
        .. [2] Kaufman, S., Rosset, S., Perlich, C., & Stitelman, O. (2012).
           Leakage in data mining: formulation, detection, and avoidance. ACM
           TKDD, 6(4), 15.

        Examples
        --------
        >>> from infoscope.frame.session import ProfileSession
        >>> import pandas as pd
        >>> df = pd.DataFrame({"y": [0, 1] * 20, "copy": ["n", "y"] * 20, "noise": [0, 0, 1, 1] * 10})
        >>> r = ProfileSession(df, n_boot=0).relevance("y")
        >>> r[["column", "leakage"]].values.tolist()
        [['copy', True], ['noise', False]]
        """
        s = self._settings
        if target is None:
            target = s["target"]
        if target is None:
            raise ValueError("relevance needs a target: pass target= or set the session's target")
        target = self._check_name(target, "target")
        others = [k for k in self._names if k != target]
        if not others:
            raise ValueError(f"the profile has only the target column {target!r}: nothing to relate to it")
        if np.count_nonzero(self._engine.marginal(target)) <= 1:
            warn_user(f"target {target!r} has at most one value: no column can inform it",
                          DataQualityWarning)
        # rows cached like the pairs (see _pair_stats): a row depends on the column,
        # the target, its position (the bootstrap seed) and these settings
        enc = self._encoded
        settings_key = (self._estimator_key(), s["base"], s["ci"], s["n_boot"], s["seed"])
        rows: list = [None] * len(others)
        todo = []
        for i, key in enumerate(others):
            hit = self._relevance_cache.get((key, target))
            if (hit is not None and hit[0] is enc[key] and hit[1] is enc[target]
                    and hit[2] == (i, settings_key)):
                rows[i] = dict(hit[3])
            else:
                todo.append(i)
        tabs = [np.asarray(self._engine.table(others[i], target), dtype=np.int64) for i in todo]
        tm = self._table_measures(tabs)
        tt = table_tests(tabs)
        mi, nmi = tm["mi"], tm["nmi"]
        for j, i in enumerate(todo):
            key = others[i]
            t = tabs[j]
            n = int(t.sum())
            h_target = self._entropy(t.sum(axis=0)) if n else math.nan
            share = mi[j] / h_target if h_target and h_target > 0 else math.nan
            rows[i] = {
                "column": key, "k": int(enc[key].k), "n": n, "mi": mi[j],
                "mi_above_chance": math.nan, "ci_low": math.nan, "ci_high": math.nan, "nmi": nmi[j],
                "p_value": float(tt.p_value[j]), "q_value": math.nan,
                "share_of_target": share, "leakage": bool(share >= LEAKAGE_SHARE),
                "p_method": tt.p_method[j], "n_permutations": 0, "p_error": 0.0,
                "reliability": tt.reliability[j], "_shuffles": (0, 0, -1),
            }
            self._relevance_cache[(key, target)] = (enc[key], enc[target], (i, settings_key),
                                                    dict(rows[i]))
        self._relevance_p_values(others, target, rows)
        # the intervals follow the final p-values (tables/intervals.py: one rule
        # for the pair and relevance tables)
        ivals = interval_columns(self, [(key, target) for key in others],
                                 [r["p_value"] for r in rows], [r["p_method"] for r in rows],
                                 [r["n_permutations"] for r in rows])
        for i, r in enumerate(rows):
            for name, column in ivals.items():
                r[name] = float(column[i])
        q = benjamini_hochberg(np.array([r["p_value"] for r in rows], dtype=float))
        for r, qv in zip(rows, q):
            r["q_value"] = float(qv)
        out = result_frame([{k: v for k, v in r.items() if k != "_shuffles"} for r in rows],
                           RELEVANCE_COLUMNS, **self._attrs(target=target))
        out = out.sort_values("mi", ascending=False, na_position="last", kind="stable")
        out = out.reset_index(drop=True)
        out.attrs.update(self._attrs(target=target))
        out.attrs.update(supervised_attrs(self, target))  # bins="mdlp": the note and held-out MI
        return out
