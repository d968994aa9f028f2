"""The mutual information intervals of the pair and relevance tables (one rule for both).

Every row's interval is the noncentral chi-square interval of its mean-scaled G
(:func:`infoscope.estimators.intervals.mi_intervals_from_tables`), with the sign of
its lower end decided by the p-value the row shows, so that on every row
``ci_low > 0`` exactly when ``p_value < (1 - ci) / 2``: the two-sided interval at
level ``ci`` and the one-sided test of independence read the same reference
distribution.  Rows tested against the chi-square law (with Williams' correction)
take Williams' q as the chance scale; rows tested by permutation take the exact
chance MI of their margins.  Results are cached per pair with the two encoded
columns, the p-value, the permutations behind it and the level.
"""
from __future__ import annotations

import numpy as np

from infoscope.estimators._checks import log_base
from infoscope.estimators.intervals import mi_intervals_from_tables


def interval_columns(session, pairs, p_values, p_methods, n_permutations) -> dict[str, np.ndarray]:
    """``mi_above_chance``, ``ci_low``, ``ci_high`` (session unit) for the pairs given.

    Parameters
    ----------
    session : ProfileSession
        Its engine gives the tables, its settings the level and unit; its
        ``_interval_cache`` keeps the results.
    pairs : sequence of (str, str)
        Column keys of each row (the table is ``engine.table(a, b)``).
    p_values, p_methods, n_permutations : sequence
        The row's test: its p-value, ``"chi2"`` / ``"permutation"`` / ``"none"`` and
        the permutations behind a Monte-Carlo p-value (0 otherwise).

    Returns
    -------
    dict of str to numpy.ndarray
        The three columns, NaN for rows without a test (no rows in common).
    """
    s = session._settings
    level = float(s["ci"])
    enc = session._encoded
    cache = session._interval_cache
    m = len(pairs)
    out = np.full((m, 3), np.nan)
    todo, tabs, ps, chi2_rows = [], [], [], []
    last_counted = session._engine.last_counted
    for i, (a, b) in enumerate(pairs):
        p = float(p_values[i])
        key = (p, int(n_permutations[i]), str(p_methods[i]), level)
        hit = cache.get((a, b))
        if hit is not None and hit[0] is enc[a] and hit[1] is enc[b] and hit[2] == key:
            out[i] = hit[3]
            continue
        t = np.asarray(session._engine.table(a, b))
        todo.append(i)
        tabs.append(t)
        ps.append(p)
        # chi-square rows: the reference is q chi2(dof) with Williams' q
        chi2_rows.append(p_methods[i] == "chi2")
    if todo:
        # the tables above were counted by the pass that made the p-values (cache
        # hits): leave the engine's record of its last count as that pass left it
        res = mi_intervals_from_tables(tabs, level=level, base="nats", p_values=ps, williams=chi2_rows)
        for j, i in enumerate(todo):
            a, b = pairs[i]
            row = np.array([res.estimate[j], res.low[j], res.high[j]])
            if not np.isfinite(ps[j]):
                row[:] = np.nan
            out[i] = row
            key = (ps[j], int(n_permutations[i]), str(p_methods[i]), level)
            cache[(a, b)] = (enc[a], enc[b], key, row.copy())
    session._engine.last_counted = last_counted
    out = out / log_base(s["base"])
    return {"mi_above_chance": out[:, 0], "ci_low": out[:, 1], "ci_high": out[:, 2]}
