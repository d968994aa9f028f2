"""``tree()`` and ``surprising_rows()``: the structure of a table as a tree, and the rows that do not fit it.

The tree (Chow & Liu 1968) is the maximum spanning tree of the pairwise mutual
information of the columns: of all tree-shaped models of the joint distribution it
is the one closest (in KL divergence) to the data.  Its weights are the session's MI
estimates from the engine's pair tables.  Rooted at the first column kept, each other
column has one parent, and a row's probability under the tree is

.. math::

    p(\\mathrm{row}) = p(x_{\\mathrm{root}}) \\prod_{c \\ne \\mathrm{root}} p(x_c \\mid x_{\\mathrm{parent}(c)}),

so its surprisal :math:`-\\log_2 p(\\mathrm{row})` is a sum of one term per cell: the
cell's conditional surprisal given its parent's value.  The conditionals are
smoothed with a Dirichlet pseudocount ``alpha`` per cell, :math:`p(a \\mid b) = (n_{ab} +
\\alpha)/(n_b + \\alpha k)`, so a combination never seen gets a large but finite score.
A missing cell adds nothing (it is summed out); a cell whose parent is missing gets
its own marginal surprisal.  ``model="independent"`` scores every cell by its
marginal alone (the product of the margins).

Constant and ID-like columns are left out of both (an identifier makes every row
equally surprising).  Scores are computed for every row at once: one table look-up
per column, no loop over rows.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope.estimators._checks import unit_name
from infoscope.frame.results import result_frame

__all__ = ["SURPRISING_COLUMNS", "SURPRISE_MODELS", "TREE_COLUMNS", "RowScores", "row_scores",
           "surprising_rows_table", "tree_table"]

#: Columns of the ``tree()`` table: one row per edge, parent -> child.
TREE_COLUMNS = ("parent", "child", "mi", "n", "depth")
#: Columns of the ``surprising_rows()`` table (``cells``: a tuple of dicts, most surprising first).
SURPRISING_COLUMNS = ("rank", "row", "position", "surprisal", "excess", "cells", "summary")
#: Row models of ``surprising_rows``.
SURPRISE_MODELS = {
    "tree": "Chow-Liu tree: each cell given its parent column's value",
    "independent": "product of the margins: each cell on its own",
}
#: Flags that keep a column out of the tree and the row scores.
_LEFT_OUT_FLAGS = ("constant", "id_like")


def _kept_columns(session) -> tuple[list[str], dict]:
    kept, left = [], {}
    for name in session.names:
        flags = session.column(name).flags
        hit = [f for f in _LEFT_OUT_FLAGS if f in flags]
        if hit:
            left[name] = hit[0]
        else:
            kept.append(name)
    return kept, left


def _mi_matrix(session, names: list[str]) -> tuple[np.ndarray, np.ndarray]:
    """Symmetric matrices of the session's MI (in its unit) and of the rows behind each pair."""
    from infoscope.estimators.information import mutual_information_from_table

    s = session.settings
    kw = {"estimator": s["estimator"], "base": s["base"]}
    if s["estimator"] == "dirichlet" and s["alpha"] is not None:
        kw["alpha"] = s["alpha"]
    p = len(names)
    mi = np.zeros((p, p))
    n = np.zeros((p, p), dtype=np.int64)
    tables = session.engine.tables([(a, b) for i, a in enumerate(names) for b in names[i + 1:]])
    index = {name: i for i, name in enumerate(names)}
    for (a, b), t in tables.items():
        t = np.asarray(t, dtype=np.int64)
        total = int(t.sum())
        value = mutual_information_from_table(t, **kw) if total else 0.0
        i, j = index[a], index[b]
        mi[i, j] = mi[j, i] = value
        n[i, j] = n[j, i] = total
    return mi, n


def maximum_spanning_tree(weights: np.ndarray) -> np.ndarray:
    """Parent of each node in a maximum spanning tree of a dense symmetric weight matrix (Prim).

    Parameters
    ----------
    weights : numpy.ndarray of shape (p, p)
        Symmetric weights (any sign); the diagonal is ignored.

    Returns
    -------
    numpy.ndarray of int, shape (p,)
        ``parent[i]`` (-1 for the root, node 0).  Ties go to the lower index.

    References
    ----------
    .. [1] Prim, R. C. (1957). Shortest connection networks and some
       generalizations. Bell System Technical Journal, 36(6), 1389-1401.

    Examples
    --------
    >>> w = np.array([[0, 3, 1], [3, 0, 2], [1, 2, 0]], dtype=float)
    >>> maximum_spanning_tree(w).tolist()
    [-1, 0, 1]
    """
    p = weights.shape[0]
    parent = np.full(p, -1, dtype=np.int64)
    if p == 0:
        return parent
    in_tree = np.zeros(p, dtype=bool)
    in_tree[0] = True
    best = weights[0].astype(np.float64).copy()
    best_from = np.zeros(p, dtype=np.int64)
    for _ in range(p - 1):
        candidates = np.where(in_tree, -np.inf, best)
        v = int(np.argmax(candidates))
        in_tree[v] = True
        parent[v] = best_from[v]
        better = ~in_tree & (weights[v] > best)
        best[better] = weights[v][better]
        best_from[better] = v
    return parent


def _tree(session):
    names, left = _kept_columns(session)
    mi, n = _mi_matrix(session, names)
    parent = maximum_spanning_tree(mi)
    return names, left, mi, n, parent


def _depths(parent: np.ndarray) -> np.ndarray:
    depth = np.full(parent.size, -1, dtype=np.int64)
    for i in range(parent.size):
        chain, j = [], i
        while j >= 0 and depth[j] < 0:
            chain.append(j)
            j = parent[j]
        d = depth[j] if j >= 0 else -1
        for node in reversed(chain):
            d += 1
            depth[node] = d
    return depth


def tree_table(session) -> pd.DataFrame:
    """The Chow–Liu tree of a profile's columns: one row per edge.

    Parameters
    ----------
    session : ProfileSession
        The profile (its encoded columns, engine and estimator).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`TREE_COLUMNS`: ``parent`` -> ``child``, ``mi`` (the edge's
        mutual information in the session's unit, its estimator), ``n`` (rows behind
        the pair) and ``depth`` of the child (the root, ``attrs["root"]``, has depth 0).
        Rows in the order the tree was grown (strongest links first from the root).
        ``attrs``: unit, estimator, sampled, root, left_out ({column: flag}),
        total_mi (the sum of the edge MI: the information the tree captures).

    Notes
    -----
    The tree keeps the strongest links, not causes: an edge says two columns share
    information, not which one drives the other.

    References
    ----------
    .. [1] Chow, C. K., & Liu, C. N. (1968). Approximating discrete probability
       distributions with dependence trees. IEEE Transactions on Information Theory,
       14(3), 462-467.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> rng = np.random.default_rng(0)
    >>> a = rng.integers(0, 3, 500)
    >>> b = (a + (rng.random(500) < 0.1)) % 3
    >>> c = (a == 0) ^ (rng.random(500) < 0.05)      # tells about a more than about b
    >>> tree_table(ProfileSession(pd.DataFrame({"a": a, "b": b, "c": c})))[["parent", "child"]].values.tolist()
    [['a', 'b'], ['a', 'c']]
    """
    names, left, mi, n, parent = _tree(session)
    s = session.settings
    depth = _depths(parent)
    order = []  # growth order of Prim: reconstruct by depth then weight
    rows = []
    for i in range(1, len(names)) if names else []:
        order.append(i)
    for i in sorted(order, key=lambda c: (depth[c], -mi[c, parent[c]])):
        rows.append({"parent": names[parent[i]], "child": names[i], "mi": float(mi[i, parent[i]]),
                     "n": int(n[i, parent[i]]), "depth": int(depth[i])})
    out = result_frame(rows, TREE_COLUMNS, unit=unit_name(s["base"]), estimator=s["estimator"],
                       sampled=session.sampled, root=names[0] if names else None, left_out=dict(left),
                       total_mi=float(sum(r["mi"] for r in rows)))
    return out


class RowScores:
    """Per-cell surprisal (bits) of every row under a model; see :func:`row_scores`."""

    def __init__(self, names, parent, cells, total, codes):
        self.names, self.parent, self.cells, self.total, self.codes = names, parent, cells, total, codes


def _check_alpha(alpha) -> float:
    if isinstance(alpha, bool) or not isinstance(alpha, (int, float)) or not (alpha > 0 and math.isfinite(alpha)):
        raise ValueError(f"alpha={alpha!r} must be a finite pseudocount > 0 (e.g. 0.5)")
    return float(alpha)


def row_scores(session, *, model: str = "tree", alpha: float = 0.5) -> RowScores:
    """Surprisal in bits of every cell of every row under the tree or the independence model.

    Parameters
    ----------
    session : ProfileSession
        The profile.
    model : {"tree", "independent"}, default="tree"
        See :data:`SURPRISE_MODELS`.
    alpha : float, default=0.5
        Dirichlet pseudocount per cell of each conditional (and marginal) table.

    Returns
    -------
    RowScores
        ``names`` (columns scored), ``parent`` (index into ``names``, -1 for the root
        or for every column under ``"independent"``), ``cells`` (float32, rows x
        columns, bits), ``total`` (float64, rows: the row's surprisal) and ``codes``.

    References
    ----------
    .. [1] Chow, C. K., & Liu, C. N. (1968). IEEE Transactions on Information Theory,
       14(3), 462-467.

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> df = pd.DataFrame({"a": ["x", "y"] * 50, "b": ["u", "v"] * 50})
    >>> scores = row_scores(ProfileSession(df), model="independent")
    >>> float(scores.total[0])        # (50 + 0.5) / (100 + 2 * 0.5) = 1/2 for each of two cells
    2.0
    """
    session._refuse_weights("surprising_rows()")
    from infoscope.estimators._checks import check_choice

    check_choice(model, SURPRISE_MODELS, "model")
    alpha = _check_alpha(alpha)
    names, _ = _kept_columns(session)
    if not names:
        raise ValueError("no column to score: every column is constant or ID-like")
    if model == "tree":
        mi, _ = _mi_matrix(session, names)
        parent = maximum_spanning_tree(mi)
    else:
        parent = np.full(len(names), -1, dtype=np.int64)
    engine = session.engine
    cols = [session.column(c) for c in names]
    n_rows = cols[0].codes.shape[0]
    cells = np.empty((n_rows, len(names)), dtype=np.float32)
    ln2 = math.log(2.0)
    for j, col in enumerate(cols):
        k = int(col.k)
        marginal = np.asarray(engine.marginal(names[j]), dtype=np.float64)
        own = -np.log((marginal + alpha) / (marginal.sum() + alpha * k)) / ln2
        own = np.append(own, 0.0)  # code k: missing, summed out
        codes = np.asarray(col.codes)
        if parent[j] < 0:
            cells[:, j] = own[codes]
            continue
        pcol = cols[parent[j]]
        kp = int(pcol.k)
        t = np.asarray(engine.table(names[parent[j]], names[j]), dtype=np.float64)  # (kp, k)
        cond = -np.log((t + alpha) / (t.sum(axis=1, keepdims=True) + alpha * k)) / ln2
        lookup = np.zeros((kp + 1, k + 1))
        lookup[:kp, :k] = cond
        lookup[kp, :] = own  # parent missing: the cell's own margin
        # child missing (column k): 0, summed out
        cells[:, j] = lookup[np.asarray(pcol.codes), codes]
    total = cells.sum(axis=1, dtype=np.float64)
    return RowScores(names, parent, cells, total, [np.asarray(c.codes) for c in cols])


def surprising_rows_table(session, n: int = 20, *, model: str = "tree", alpha: float = 0.5, top_cells: int = 3,
                          min_count=None) -> pd.DataFrame:
    """The rows that fit the table's structure least, with the cells that make them surprising.

    Parameters
    ----------
    session : ProfileSession
        The profile.
    n : int, default=20
        Number of rows to return (the highest surprisal first).
    model : {"tree", "independent"}, default="tree"
        The row model (:data:`SURPRISE_MODELS`).
    alpha : float, default=0.5
        Dirichlet pseudocount of the conditional tables.
    top_cells : int, default=3
        How many contributing cells to list per row.
    min_count : int, optional
        Small-cell suppression for exports of personal data: the values of the
        listed cells (``value`` and ``parent_value``) are hidden (None) and the
        scores kept; ``attrs["hidden_values"]`` says so.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`SURPRISING_COLUMNS`: ``rank`` 1..n, ``row`` (the frame's index
        label), ``position`` (0-based row number in the frame), ``surprisal`` (bits),
        ``excess`` (surprisal minus the mean over all rows), ``cells`` (a tuple of
        dicts ``{column, value, symbol, bits, parent, parent_value, parent_symbol}``
        for the ``top_cells`` cells with the largest conditional surprisal; ``value``
        is the raw value as text, ``symbol`` its bin or level) and a one-line
        ``summary``.  ``attrs``: unit ("bits"), model, alpha, mean_surprisal,
        sampled, left_out, min_count, hidden_values.

    Notes
    -----
    A surprising row is one the model finds unlikely: an error, a rare but real
    case, or a sign that the model misses structure.  Look before removing it.  The
    rows of a profile of personal data are exactly what small-cell suppression
    protects: pass ``min_count`` before sharing the table.

    References
    ----------
    .. [1] Chow, C. K., & Liu, C. N. (1968). Approximating discrete probability
       distributions with dependence trees. IEEE Transactions on Information Theory,
       14(3), 462-467.
    .. [2] Shannon, C. E. (1948). Bell System Technical Journal, 27, 379-423
       (surprisal -log p).

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> a = np.repeat(["x", "y"], 50)
    >>> b = a.copy(); b[7] = "y"          # one row breaks the copy
    >>> out = surprising_rows_table(ProfileSession(pd.DataFrame({"a": a, "b": b})), n=1)
    >>> int(out["position"][0]), out["cells"][0][0]["column"]
    (7, 'b')
    """
    session._refuse_weights("surprising_rows()")
    from infoscope.frame.suppression import check_min_count

    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or n < 1:
        raise ValueError(f"n={n!r} must be a whole number >= 1")
    if isinstance(top_cells, bool) or not isinstance(top_cells, (int, np.integer)) or top_cells < 1:
        raise ValueError(f"top_cells={top_cells!r} must be a whole number >= 1")
    threshold = check_min_count(min_count)
    scores = row_scores(session, model=model, alpha=alpha)
    total = scores.total
    n_rows = total.size
    m = min(int(n), n_rows)
    top = np.argpartition(-total, m - 1)[:m] if m < n_rows else np.arange(n_rows)
    top = top[np.lexsort((top, -total[top]))]  # highest first, ties by position
    mean = float(total.mean())
    cell_block = scores.cells[top]
    n_cells = min(int(top_cells), len(scores.names))
    order = np.argsort(-cell_block, axis=1, kind="stable")[:, :n_cells]
    first = session._values(scores.names[0])
    labels_cache = {name: session.column(name).labels for name in scores.names}
    rows = []
    for r, pos in enumerate(top.tolist()):
        listed = []
        for j in order[r].tolist():
            name = scores.names[j]
            code = int(scores.codes[j][pos])
            labels = labels_cache[name]
            entry = {"column": name, "value": _raw(session, name, pos), "symbol": labels[code] if code < len(labels)
                     else None, "bits": float(cell_block[r, j]), "parent": None, "parent_value": None,
                     "parent_symbol": None}
            pj = int(scores.parent[j])
            if pj >= 0:
                pname = scores.names[pj]
                pcode = int(scores.codes[pj][pos])
                plabels = labels_cache[pname]
                entry.update(parent=pname, parent_value=_raw(session, pname, pos),
                             parent_symbol=plabels[pcode] if pcode < len(plabels) else None)
            if threshold is not None:
                entry.update(value=None, symbol=None, parent_value=None, parent_symbol=None)
            listed.append(entry)
        rows.append({"rank": r + 1, "row": first.index[pos], "position": int(_position(session, pos)),
                     "surprisal": float(total[pos]), "excess": float(total[pos] - mean),
                     "cells": tuple(listed), "summary": _summary(listed)})
    _, left = _kept_columns(session)
    return result_frame(rows, SURPRISING_COLUMNS, unit="bits", model=model, alpha=float(alpha),
                        mean_surprisal=mean, sampled=session.sampled, left_out=dict(left),
                        min_count=threshold, hidden_values=threshold is not None)


def _position(session, pos: int) -> int:
    rows = getattr(session, "_rows", None)
    return int(rows[pos]) if rows is not None else pos


def _raw(session, name: str, pos: int):
    value = session._values(name).iloc[pos]
    try:
        if pd.isna(value):
            return None
    except (TypeError, ValueError):
        pass
    return str(value)


def _summary(cells) -> str:
    parts = []
    for c in cells:
        shown = "(hidden)" if c["value"] is None and c["symbol"] is None else c["value"]
        text = f"{c['column']}={shown}"
        if c["parent"] is not None:
            pshown = "(hidden)" if c["parent_value"] is None and c["parent_symbol"] is None else c["parent_value"]
            text += f" given {c['parent']}={pshown}"
        parts.append(f"{text}: {c['bits']:.1f} bits")
    return "; ".join(parts)
