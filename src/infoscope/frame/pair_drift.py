"""Relationship drift: pairs of columns whose dependence changed between a reference and a batch.

A change that every single column hides — the marginals stay, the joint moves —
shows in the mutual information of the pair.  Per pair of common columns:

1. both frames are put on the shared alphabet of each column
   (:func:`infoscope.frame.drift.align_to_reference`: the reference's bins, the
   pooled levels), and the engine counts the joint table of every pair in each
   frame (:func:`infoscope.engine.counting.count_chunk`, one pass per frame);
2. :func:`infoscope.estimators.two_sample.mi_change_test` gives the MI in the
   reference and in the batch (the session's estimator), the change with a
   bootstrap interval, the change expected from sampling alone (random splits of
   the pooled rows: the two sample sizes bias MI differently, and the splits carry
   that), and a two-sided p-value; ``q_value`` is Benjamini–Hochberg over the pairs.

Columns that drift by construction (``id_like``, ``time_axis``), columns that
were not compared (``type_changed``) and columns with one symbol are left out.
The splits test equal joint distributions, so a pair whose marginals moved while
its dependence stayed can read as changed: read the pair table beside the column
drift.  Dependence is not cause.
"""
from __future__ import annotations

import math

import numpy as np

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.frame.results import TEST_LEVEL

__all__ = ["PAIR_DRIFT_COLUMNS", "PAIR_DRIFT_FLAGS", "pair_drift_table"]

PAIR_DRIFT_COLUMNS = (
    "a", "b", "k_a", "k_b", "n", "n_reference", "mi_reference", "mi", "change", "ci_low", "ci_high",
    "change_chance", "chance_low", "chance_high", "p_value", "q_value", "flag",
)

#: The values of the pair drift table's ``flag`` column and their legend text.
PAIR_DRIFT_FLAGS = {
    "stronger": "the pair depends more on each other in this frame (q < 0.05)",
    "weaker": "the pair depends less on each other in this frame (q < 0.05)",
    "unchanged": "no change of dependence beyond chance at these sample sizes",
}


def _engine_tables(codes: list[np.ndarray], ks: list[int], pairs: list[tuple[int, int]]) -> dict:
    from infoscope.encode.encoded import codes_dtype
    from infoscope.engine.counting import count_chunk, finalize

    if not pairs:
        return {}
    block = [np.ascontiguousarray(c, dtype=codes_dtype(k)) for c, k in zip(codes, ks)]
    return finalize(count_chunk(block, ks, pairs))


def pair_drift_table(alphabets: list, flags: dict, *, estimator: str = "miller_madow", alpha=None,
                     base=2, n_perm: int = 499, n_boot: int = 200, ci: float = 0.95, seed=0,
                     level: float = TEST_LEVEL) -> list[dict]:
    """Rows of the relationship drift table (see :meth:`ProfileSession.pair_drift`).

    Parameters
    ----------
    alphabets : list of SharedAlphabet
        The common columns on their shared alphabets, in column order.
    flags : dict of str -> str
        The column drift flag of each key (columns flagged ``id_like``,
        ``time_axis`` or ``type_changed`` are left out).
    estimator : str, default="miller_madow"
        Entropy estimator of the MI.
    alpha : float, str or None, default=None
        Pseudocount of the ``dirichlet`` estimator.
    base : float or str, default=2
        Unit of the MI columns.
    n_perm : int, default=499
        Random splits of the pooled rows per pair (p-values below 0.05 get 4,500 more).
    n_boot : int, default=200
        Bootstrap replicates per frame for the interval of the change.
    ci : float, default=0.95
        Level of the interval.
    seed : int or None, default=0
        Seed (each pair gets its own stream).
    level : float, default=0.05
        q-value below which a change is flagged.

    Returns
    -------
    list of dict
        One dict per pair with the keys of :data:`PAIR_DRIFT_COLUMNS`, sorted by
        p-value, then by the size of the change.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed. Wiley, ch. 2 (mutual information).
    .. [2] Benjamini, Y., & Hochberg, Y. (1995). Journal of the Royal Statistical
       Society B, 57(1), 289-300.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.drift import align_to_reference
    >>> x = pd.Series(list("ab") * 100); y_ref = x.copy(); y_cur = pd.Series(list("ab") * 50 + list("ba") * 50)
    >>> al = [align_to_reference(x, x, "x", (16, "quantile", "drop", 64)),
    ...       align_to_reference(y_cur, y_ref, "y", (16, "quantile", "drop", 64))]
    >>> rows = pair_drift_table(al, {}, n_boot=0)
    >>> rows[0]["flag"], rows[0]["change"] < 0
    ('weaker', True)
    """
    from infoscope.estimators._checks import log_base
    from infoscope.estimators.information import benjamini_hochberg
    from infoscope.estimators.two_sample import mi_change_test
    from infoscope.frame.drift import column_seed

    skip = {"id_like", "time_axis", "type_changed"}
    used = [al for al in alphabets if al.compared and flags.get(al.name, "") not in skip and al.k >= 2]
    left_out = [al.name for al in alphabets if al not in used]
    if left_out and len(used) >= 2:
        warn_user("pair drift leaves out " + ", ".join(map(repr, left_out)) +
                      " (identifiers, time axes, columns not compared or with one symbol)", DataQualityWarning)
    if len(used) < 2:
        raise ValueError("pair drift needs at least two common columns that can be compared "
                         f"(usable: {[al.name for al in used]!r}; left out: {left_out!r})")
    ks = [al.k for al in used]
    pairs = [(i, j) for i in range(len(used)) for j in range(i + 1, len(used))]
    ref_tables = _engine_tables([al.reference_codes for al in used], ks, pairs)
    cur_tables = _engine_tables([al.current_codes for al in used], ks, pairs)
    ln = log_base(base)
    rows = []
    for i, j in pairs:
        a, b = used[i], used[j]
        R, C = ref_tables[(i, j)], cur_tables[(i, j)]
        t = mi_change_test(R, C, estimator=estimator, alpha=alpha, n_perm=n_perm, n_boot=n_boot,
                           level=ci, seed=column_seed(seed, f"{a.name}\x1f{b.name}"))
        rows.append({
            "a": a.name, "b": b.name, "k_a": a.k, "k_b": b.k, "n": int(C.sum()),
            "n_reference": int(R.sum()), "mi_reference": t.mi_reference / ln, "mi": t.mi / ln,
            "change": t.change / ln, "ci_low": t.ci_low / ln, "ci_high": t.ci_high / ln,
            "change_chance": t.change_chance / ln, "chance_low": t.chance_low / ln,
            "chance_high": t.chance_high / ln, "p_value": t.p_value, "q_value": math.nan, "flag": "",
        })
    q = benjamini_hochberg(np.array([r["p_value"] for r in rows], dtype=float))
    for r, qv in zip(rows, q):
        r["q_value"] = float(qv)
        if qv == qv:
            r["flag"] = ("stronger" if r["change"] > 0 else "weaker") if qv < level else "unchanged"
    rows.sort(key=lambda r: (r["p_value"] if r["p_value"] == r["p_value"] else 2.0,
                             -abs(r["change"]) if r["change"] == r["change"] else 0.0))
    return rows
