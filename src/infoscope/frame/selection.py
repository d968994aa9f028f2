"""``select(target, k=None, method=...)``: a set of columns for a target, one step at a time.

Greedy forward selection by an information criterion, on the session's encoded
columns (its bins, missing policy and folded levels).  With S the columns chosen so
far, each step takes the candidate X with the largest criterion:

``mrmr``  (Peng, Long & Ding 2005, the difference form "MID")
    :math:`I(X;Y) - \\frac{1}{|S|} \\sum_{j \\in S} I(X;X_j)`: relevance less the mean
    redundancy with the chosen columns.
``jmi``   (Yang & Moody 1999, joint mutual information)
    :math:`\\sum_{j \\in S} I(X, X_j; Y)`: what the pair (X, X_j) tells about Y, summed
    over the chosen columns.
``cmim``  (Fleuret 2004, conditional mutual information maximisation)
    :math:`\\min_{j \\in S} I(X; Y \\mid X_j)`: the information X still adds given the
    chosen column that explains most of it.

The first step of each takes the most relevant column (largest :math:`I(X;Y)`).  All
information values use the session's estimator on the rows where the columns
involved are present.

What each step reports
----------------------
Beside the criterion, each step reports its *gain* :math:`I(X;Y \\mid S)`, what the
column adds given everything chosen before it (estimated on the joint table of X, Y
and the strata of S; not shown when that table has fewer than 5 rows per cell), and
whether the gain is significant.  The test asks "does any remaining candidate tell
about Y once S is known?": Y is shuffled within the strata of S (which keeps every
candidate's relation to S and to the other candidates), the largest gain over all
remaining candidates is recorded for each shuffle, and the chosen column's gain is
compared with that distribution of maxima, so the p-value accounts for the choice of
the best of many candidates (a max-statistic permutation test; p = (b + 1)/(m + 1)).
Shuffling stops early once the step cannot be significant (the sequential p-value of
Besag & Clifford 1991, h / shuffles done).
The statistic of each candidate is its conditional G statistic :math:`2N\\hat I` turned
into a chi-square tail on a log scale, so that candidates with many symbols do not
dominate the maximum; the permutation distribution, not the chi-square one, decides.
The p-values of the steps are adjusted by Benjamini–Hochberg across the steps
computed; with ``k=None`` the selection stops before the first step whose q-value
exceeds ``fdr``, and that step is shown as the stop point.

Columns that leak the target (their MI is at least 95% of H(target), the relevance
table's leakage rule) are listed and left out unless ``include_leaks=True``; constant
and ID-like columns are listed and left out too.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope.estimators._checks import check_choice, log_base, unit_name
from infoscope.frame.conditional import joint_codes
from infoscope.frame.results import LEAKAGE_SHARE, result_frame

__all__ = ["SELECTION_COLUMNS", "SELECTION_METHODS", "SELECTION_STATUS", "select_table"]

#: Selection criteria: name -> what the criterion of a candidate X is (S = chosen set).
SELECTION_METHODS = {
    "mrmr": "I(X;Y) - mean over S of I(X;Xj) (Peng, Long & Ding 2005, difference form)",
    "jmi": "sum over S of I(X,Xj;Y) (Yang & Moody 1999)",
    "cmim": "min over S of I(X;Y|Xj) (Fleuret 2004)",
}

#: Columns of the ``select()`` table (DEVELOPERS.md, "Result tables").
SELECTION_COLUMNS = (
    "step", "column", "relevance", "criterion", "gain", "gain_supported", "redundancy",
    "p_value", "q_value", "significant", "status", "note",
)

#: Values of the ``status`` column and what they mean.
SELECTION_STATUS = {
    "selected": "chosen at this step; its gain is significant",
    "stop": "the best next column: its gain is not significant, so the selection stops before it",
    "past_stop": "chosen because k asked for it, after the stop point",
    "leakage": "left out: it nearly determines the target (check whether it is known before the outcome)",
    "constant": "left out: one value only",
    "id_like": "left out: an identifier (nearly one value per row)",
}

# Blocks of about this many counters (replicates x table cells) in the permutation test,
# and at most this many shuffles per block (the sequential stop looks after each block).
_BLOCK_CELLS = 4_000_000
_SHUFFLE_BLOCK = 40
# select() tables a session keeps (the views ask again when a control goes back)
_CACHED_TABLES = 8
# counting kernel of the shuffled tables (infoscope.engine.strata.table_scores): the
# compiled one once numba is loaded; tests compare the two
_BACKEND = "auto"


class _Columns:
    """Integer codes and presence of the session's columns, fetched once."""

    def __init__(self, session, names):
        self.codes, self.present, self.k = {}, {}, {}
        for name in names:
            col = session.column(name)
            codes = np.asarray(col.codes)
            self.present[name] = codes < col.k
            self.codes[name] = codes.astype(np.int64)
            self.k[name] = int(col.k)


def _entropy_nats_fn(settings):
    from infoscope.estimators.information import _entropy_nats

    estimator = settings["estimator"]
    alpha = settings["alpha"] if estimator == "dirichlet" else None
    return lambda counts: _entropy_nats(np.asarray(counts, dtype=np.float64), estimator, alpha) if counts.sum() else 0.0


def _mi_nats(h, t: np.ndarray) -> float:
    """I of the first axis with the second of a 2-D table, from the estimator's entropies."""
    if t.sum() == 0:
        return math.nan
    return h(t.sum(axis=1)) + h(t.sum(axis=0)) - h(t)


def _cmi_nats(h, t: np.ndarray) -> float:
    """I(X;Y|Z) of a (k_x, k_y, k_z) table."""
    if t.sum() == 0:
        return math.nan
    return h(t.sum(axis=1)) + h(t.sum(axis=0)) - h(t) - h(t.sum(axis=(0, 1)))


def _count(index_parts, shape, keep) -> np.ndarray:
    flat = np.ravel_multi_index(tuple(p[keep] for p in index_parts), shape)
    return np.bincount(flat, minlength=math.prod(shape)).reshape(shape)


def select_table(session, target, *, k=None, method: str = "mrmr", include_leaks: bool = False,
                 n_permutations: int = 199, fdr: float = 0.05, progress=None) -> pd.DataFrame:
    """Greedy information-based selection of columns for a target (see the module notes).

    Parameters
    ----------
    session : ProfileSession
        The profile (encoded columns, estimator, base, seed).
    target : str
        The target column key.
    k : int, optional
        Number of steps.  ``None``: continue while the next gain is significant
        (Benjamini–Hochberg q-value at most ``fdr``) and show the first step that is
        not as the stop point.
    method : {"mrmr", "jmi", "cmim"}, default="mrmr"
        The criterion (:data:`SELECTION_METHODS`).
    include_leaks : bool, default=False
        Keep columns flagged as leaking the target among the candidates.
    n_permutations : int, default=199
        Shuffles of the target within the strata of the chosen columns, per step.
    fdr : float, default=0.05
        False discovery rate of the steps' significance.
    progress : callable, optional
        Called as ``progress(fraction, message)`` before each step and between
        blocks of shuffles (the live profile reports and cancels through it: an
        exception it raises stops the selection).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`SELECTION_COLUMNS`, one row per step (``step`` 1, 2, ...)
        and then one row per column left out (``step`` missing): ``relevance`` =
        I(X;Y); ``criterion`` the method's value at that step; ``gain`` =
        I(X;Y | chosen so far) when ``gain_supported`` (at least 5 rows per cell of
        that joint table), else NaN with a ``note``; ``redundancy`` = the mean
        I(X;Xj) over the columns chosen before (NaN at step 1); ``p_value`` and
        ``q_value`` of the gain (max-statistic permutation test, BH across steps);
        ``significant`` = q <= fdr; ``status`` from :data:`SELECTION_STATUS`.
        ``attrs``: unit, estimator, sampled, target, method, k, fdr,
        n_permutations, stop_step (the step shown as the stop point, or None).

    Notes
    -----
    The session keeps the last tables (by these arguments, its estimator settings,
    seed and the encoded columns), so asking again, as a view does when its method
    control goes back, costs nothing; a copy is returned.

    Information does not say why: a chosen column may only stand in for a cause.
    Selection on the same rows makes the gains of later steps optimistic; the
    permutation test accounts for the choice within a step, not for the whole path.

    References
    ----------
    .. [1] Peng, H., Long, F., & Ding, C. (2005). Feature selection based on mutual
       information: criteria of max-dependency, max-relevance, and min-redundancy.
       IEEE Transactions on Pattern Analysis and Machine Intelligence, 27(8), 1226-1238.
    .. [2] Yang, H. H., & Moody, J. (1999). Data visualization and feature selection:
       new algorithms for nongaussian data. Advances in Neural Information
       Processing Systems 12, 687-693.
    .. [3] Fleuret, F. (2004). Fast binary feature selection with conditional mutual
       information. Journal of Machine Learning Research, 5, 1531-1555.
    .. [4] Westfall, P. H., & Young, S. S. (1993). Resampling-Based Multiple Testing.
       Wiley (max-statistic permutation tests).
    .. [5] Benjamini, Y., & Hochberg, Y. (1995). JRSS B, 57(1), 289-300.
    .. [6] Besag, J., & Clifford, P. (1991). Sequential Monte Carlo p-values.
       Biometrika, 78(2), 301-304.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> rng = np.random.default_rng(0)
    >>> a, b = rng.integers(0, 2, 3000), rng.integers(0, 2, 3000)
    >>> y = a ^ (rng.random(3000) < 0.1)
    >>> df = pd.DataFrame({"a": a, "copy_of_a": a, "b": b, "y": y})
    >>> out = select_table(ProfileSession(df), "y", n_permutations=99)
    >>> out["column"].tolist(), out["status"].tolist()   # the copy adds nothing: b is tried, and stops
    (['a', 'b'], ['selected', 'stop'])
    """
    method = check_choice(method, SELECTION_METHODS, "method")
    if k is not None and (isinstance(k, bool) or not isinstance(k, (int, np.integer)) or k < 1):
        raise ValueError(f"k={k!r} must be None or a whole number >= 1")
    if isinstance(n_permutations, bool) or not isinstance(n_permutations, (int, np.integer)) or n_permutations < 1:
        raise ValueError(f"n_permutations={n_permutations!r} must be a whole number >= 1")
    if not (isinstance(fdr, (int, float)) and 0 < fdr < 1):
        raise ValueError(f"fdr={fdr!r} must be a number in (0, 1)")
    session._refuse_weights("select()")
    s = session.settings
    target = session.column(target).name
    key = (target, k, method, bool(include_leaks), int(n_permutations), float(fdr), s["estimator"], s["alpha"],
           s["base"], s["seed"])
    columns = tuple(session.column(name) for name in session.names)
    cache = session._selection_cache
    hit = cache.get(key)
    if hit is not None and len(hit[0]) == len(columns) and all(a is b for a, b in zip(hit[0], columns)):
        return _copy(hit[1])
    out = _select(session, target, k, method, include_leaks, int(n_permutations), float(fdr), progress)
    if s["seed"] is None:
        return out  # a fresh random seed each call: nothing to keep
    # keep only tables of the current encodings (an old one holds old codes alive)
    for stale in [key_ for key_, (cols_, _) in cache.items() if not all(a is b for a, b in zip(cols_, columns))]:
        del cache[stale]
    if len(cache) >= _CACHED_TABLES:
        cache.pop(next(iter(cache)))  # the oldest
    cache[key] = (columns, _copy(out))
    return out


def _copy(table: pd.DataFrame) -> pd.DataFrame:
    out = table.copy()
    out.attrs = dict(table.attrs)
    return out


def _select(session, target, k, method, include_leaks, n_permutations, fdr, progress) -> pd.DataFrame:
    """The selection itself (see :func:`select_table`): arguments checked, ``target`` a key."""
    from infoscope.estimators.information import benjamini_hochberg
    from infoscope.estimators.resampling import _rng

    s = session.settings
    report = progress if progress is not None else (lambda fraction, message: None)
    divisor = log_base(s["base"])
    h = _entropy_nats_fn(s)
    names = [n for n in session.names if n != target]
    if not names:
        raise ValueError(f"the profile has only the target column {target!r}: nothing to select")
    cols = _Columns(session, [*names, target])
    engine = session.engine

    relevance, share, left_out = {}, {}, {}
    for name in names:
        t = np.asarray(engine.table(name, target), dtype=np.int64)
        mi = _mi_nats(h, t)
        relevance[name] = mi
        ht = h(t.sum(axis=0)) if t.sum() else 0.0
        share[name] = mi / ht if ht > 0 else math.nan
        flags = session.column(name).flags
        if "constant" in flags:
            left_out[name] = "constant"
        elif "id_like" in flags:
            left_out[name] = "id_like"
        elif share[name] >= LEAKAGE_SHARE and not include_leaks:
            left_out[name] = "leakage"
    candidates = [n for n in names if n not in left_out and not math.isnan(relevance[n])]

    rng = _rng(s["seed"])
    redundancy_sum = dict.fromkeys(candidates, 0.0)  # sum over S of I(X; Xj)
    jmi_sum = dict.fromkeys(candidates, 0.0)
    cmim_min = dict.fromkeys(candidates, math.inf)
    chosen: list[str] = []
    steps: list[dict] = []
    limit = len(candidates) if k is None else min(int(k), len(candidates))
    y_codes, ky, y_present = cols.codes[target], cols.k[target], cols.present[target]

    while len(steps) < limit:
        remaining = [c for c in candidates if c not in chosen]
        if not chosen:
            scores = {c: relevance[c] for c in remaining}
        elif method == "mrmr":
            scores = {c: relevance[c] - redundancy_sum[c] / len(chosen) for c in remaining}
        elif method == "jmi":
            scores = {c: jmi_sum[c] for c in remaining}
        else:
            scores = {c: cmim_min[c] for c in remaining}
        best = max(remaining, key=lambda c: (scores[c], relevance[c]))  # ties: the more relevant
        step_no = len(steps) + 1
        report(len(steps) / max(limit, 1), f"Selection: testing step {step_no} ({best!r})...")
        gain, supported, p_value, note = _step_test(cols, best, remaining, chosen, target, h, n_permutations, rng, fdr,
                                                    _BACKEND, lambda: report(len(steps) / max(limit, 1),
                                                                             f"Selection: testing step {step_no}..."))
        steps.append({
            "column": best, "relevance": relevance[best] / divisor, "criterion": scores[best] / divisor,
            "gain": gain / divisor if supported else math.nan, "gain_supported": supported,
            "redundancy": redundancy_sum[best] / len(chosen) / divisor if chosen else math.nan,
            "p_value": p_value, "note": note,
        })
        chosen.append(best)
        if k is None and p_value > fdr:
            break  # its q-value is at least its p-value: this is the stop point
        # update the running sums with the newly chosen column
        j = best
        for c in candidates:
            if c in chosen:
                continue
            redundancy_sum[c] += _mi_nats(h, np.asarray(engine.table(c, j), dtype=np.int64))
            if method != "mrmr":
                keep = cols.present[c] & cols.present[j] & y_present
                if method == "jmi":
                    t = _count((cols.codes[c], cols.codes[j], y_codes), (cols.k[c], cols.k[j], ky), keep)
                    jmi_sum[c] += _mi_nats(h, t.reshape(-1, ky))
                else:
                    t = _count((cols.codes[c], y_codes, cols.codes[j]), (cols.k[c], ky, cols.k[j]), keep)
                    cmim_min[c] = min(cmim_min[c], _cmi_nats(h, t))

    q = benjamini_hochberg(np.array([r["p_value"] for r in steps], dtype=float)) if steps else np.zeros(0)
    stop_step = None
    for i, (row, qv) in enumerate(zip(steps, q)):
        row["step"] = i + 1
        row["q_value"] = float(qv)
        row["significant"] = bool(qv <= fdr)
        if stop_step is None and not row["significant"]:
            stop_step = i + 1
    if k is None and stop_step is not None:
        steps = steps[:stop_step]
    for row in steps:
        if stop_step is None or row["step"] < stop_step:
            row["status"] = "selected"
        elif k is None:
            row["status"] = "stop"
        else:
            row["status"] = "past_stop"
    for name, reason in left_out.items():
        detail = {"leakage": f"MI is {share[name]:.0%} of H(target)", "constant": "one value",
                  "id_like": "nearly one value per row"}[reason]
        steps.append({
            "step": pd.NA, "column": name, "relevance": relevance[name] / divisor if not math.isnan(relevance[name])
            else math.nan, "criterion": math.nan, "gain": math.nan, "gain_supported": False,
            "redundancy": math.nan, "p_value": math.nan, "q_value": math.nan, "significant": False,
            "status": reason, "note": f"left out ({detail}); pass include_leaks=True to keep leaks"
            if reason == "leakage" else f"left out ({detail})",
        })
    out = result_frame(steps, SELECTION_COLUMNS, unit=unit_name(s["base"]), estimator=s["estimator"],
                       sampled=session.sampled, target=target, method=method, k=k, fdr=float(fdr),
                       n_permutations=int(n_permutations), stop_step=stop_step)
    out["step"] = out["step"].astype("Int64")
    return out


def _sum_nlogn(counts: np.ndarray) -> np.ndarray:
    """sum of n ln n along the last axis (0 ln 0 = 0)."""
    from scipy.special import xlogy

    return xlogy(counts, counts).sum(axis=-1)


class _Candidate:
    """A candidate's fixed part under shuffles of Y within strata: its rows, (X, Z) cells and dof.

    Rows are in the order of the strata (the order the shuffles come in), so a
    shuffled target is counted as it is drawn, without putting it back in row order
    (the counts do not depend on the order of the rows).
    """

    def __init__(self, x: np.ndarray, present: np.ndarray, z: np.ndarray, kz: int, y: np.ndarray, ky: int):
        self.rows = None if present.all() else np.flatnonzero(present)
        self.z = z if self.rows is None else z[self.rows]
        self.n = int(self.z.size)
        xz_raw = (x if self.rows is None else x[self.rows]) * kz + self.z
        xz_codes, xz_index = np.unique(xz_raw, return_inverse=True)
        self.xz = xz_index.astype(np.int64).reshape(-1)
        self.kxz = int(xz_codes.size)
        self.kz, self.ky = kz, ky
        self.xz_base = self.xz * ky
        self.z_base = self.z * ky
        self.s_xz = float(_sum_nlogn(np.bincount(self.xz).astype(np.float64)))
        self.s_z = float(_sum_nlogn(np.bincount(self.z, minlength=kz).astype(np.float64)))
        # dof of the conditional G-test: sum over strata of (distinct x - 1)(distinct y - 1)
        rx = np.bincount(xz_codes % kz, minlength=kz)
        yy = y if self.rows is None else y[self.rows]
        ry = np.bincount(np.unique(self.z * ky + yy) // ky, minlength=kz)
        self.dof = int(np.sum(np.maximum(rx - 1, 0) * np.maximum(ry - 1, 0)))
        # with every row present the (Y, Z) table is the same in every shuffle
        self.s_yz_fixed = None if self.rows is not None else float(
            _sum_nlogn(np.bincount(self.z * ky + yy, minlength=kz * ky).astype(np.float64)))
        from scipy.special import xlogy

        j = np.arange(self.n + 1, dtype=np.float64)
        self._lut = xlogy(j, j)  # j ln j for every count a cell can hold

    def g_statistics(self, y_rows: np.ndarray, backend: str = "auto") -> np.ndarray:
        """G = 2 n I_plugin(X;Y|Z) for each row of ``y_rows`` (b, rows): 2 (S_xyz + S_z - S_xz - S_yz)."""
        from infoscope.engine.strata import table_scores

        s_xyz = table_scores(y_rows, self.xz_base, self.kxz * self.ky, self._lut, rows=self.rows,
                             backend=backend)
        if self.s_yz_fixed is not None:
            s_yz = self.s_yz_fixed
        else:
            s_yz = table_scores(y_rows, self.z_base, self.kz * self.ky, self._lut, rows=self.rows,
                                backend=backend)
        return np.maximum(2.0 * (s_xyz + self.s_z - self.s_xz - s_yz), 0.0)

    def statistic(self, y_rows: np.ndarray, backend: str = "auto") -> np.ndarray:
        """-log of the chi-square tail of G: one scale for candidates with many and few symbols."""
        from scipy.stats import chi2

        if self.dof <= 0:
            return np.zeros(y_rows.shape[0])
        return -chi2.logsf(self.g_statistics(y_rows, backend), self.dof)


def _step_test(cols: _Columns, best: str, remaining: list[str], chosen: list[str], target: str, h,
               n_permutations: int, rng, fdr: float, backend: str = "auto",
               between=None) -> tuple[float, bool, float, str]:
    """The gain I(best; Y | chosen) (nats), whether it is supported, its max-statistic p-value, a note.

    The statistic of a candidate is its conditional G-test's chi-square tail on a log
    scale (so candidates with many and few symbols are on one scale); the permutation
    distribution of the largest statistic over the remaining candidates, not the
    chi-square distribution, decides the p-value.  Shuffling Y within the strata
    keeps the (X, Z) and (Y, Z) tables, so each shuffle only recounts (X, Y, Z) on
    the observed (X, Z) cells.
    """
    from infoscope.estimators.conditional import _shuffle_within
    from infoscope.estimators.significance import table_reliability

    base_keep = present_rows_codes(cols, [target, *chosen])
    rows = np.flatnonzero(base_keep)
    n_rows = rows.size
    z_all, kz = joint_codes([cols.codes[c][base_keep] for c in chosen])
    if not chosen:
        z_all = np.zeros(n_rows, dtype=np.int64)
    y = cols.codes[target][rows]
    ky = cols.k[target]
    present_best = cols.present[best][rows]
    kx = cols.k[best]
    table = np.bincount((cols.codes[best][rows][present_best] * ky + y[present_best]) * kz + z_all[present_best],
                        minlength=kx * ky * kz).reshape(kx, ky, kz)
    n_best = int(table.sum())
    gain = _cmi_nats(h, table) if n_best else math.nan
    cells = int(np.count_nonzero(table.sum(axis=(1, 2)))) * int(np.count_nonzero(table.sum(axis=(0, 2)))) \
        * int(np.count_nonzero(table.sum(axis=(0, 1))))
    supported = table_reliability([n_best], [cells], [1])[0] == "ok"  # the rule of the pair tables
    note = "" if supported else (
        f"gain not estimated: the joint table of {best!r}, {target!r} and the strata of the chosen columns has "
        f"{cells:,} cells for {n_best:,} rows (fewer than 5 per cell); the p-value stays valid")
    if n_rows < 2 or n_best < 2:
        return gain, False, 1.0, note or "too few rows to test"
    # rows in the order of the strata: the shuffles are drawn in that order and counted as drawn
    order = np.argsort(z_all, kind="stable")
    zs = z_all[order]
    ys = y[order]
    sorted_rows = rows[order]
    cands = {c: _Candidate(cols.codes[c][sorted_rows], cols.present[c][sorted_rows], zs, kz, ys, ky)
             for c in remaining}
    observed = float(cands[best].statistic(ys[None, :], backend)[0])
    # null: shuffle the target within the strata of the chosen columns; record the
    # largest statistic over every remaining candidate for each shuffle
    cuts = np.flatnonzero(np.diff(zs)) + 1
    starts, ends = np.r_[0, cuts], np.r_[cuts, n_rows]
    largest = max(c.kxz * ky for c in cands.values())
    per_block = max(1, min(_SHUFFLE_BLOCK, _BLOCK_CELLS // max(n_rows, largest)))
    tolerance = 1e-9 * (1.0 + abs(observed))
    # Besag & Clifford (1991): stop shuffling once h shuffles reach the observed
    # statistic, h the count that makes p exceed fdr for sure; p = h / (shuffles done)
    h_stop = math.floor(fdr * (n_permutations + 1)) + 1
    done = exceed = 0
    while done < n_permutations:
        if between is not None and done:
            between()
        b = min(per_block, n_permutations - done)
        shuffled = _shuffle_within(rng, ys, zs, starts, ends, b)  # (b, rows) in strata order
        null_max = np.zeros(b)  # every statistic is >= 0 (a candidate with dof 0 scores 0)
        for cand in cands.values():
            if cand.dof > 0:
                np.maximum(null_max, cand.statistic(shuffled, backend), out=null_max)
        hits = np.flatnonzero(null_max >= observed - tolerance)
        if exceed + hits.size >= h_stop:
            last = done + int(hits[h_stop - exceed - 1]) + 1  # the shuffle that made h
            return gain, supported, h_stop / last, note
        exceed += hits.size
        done += b
    return gain, supported, (exceed + 1) / (n_permutations + 1), note


def present_rows_codes(cols: _Columns, names) -> np.ndarray:
    keep = np.ones(next(iter(cols.present.values())).shape[0], dtype=bool)
    for name in names:
        keep &= cols.present[name]
    return keep
