"""Small-cell suppression masks (pure numpy; used by frame results and by every export).

A profile of personal data can expose rare values: a joint table that shows
"3 people are in (zip 12345, age 97)" says something about those three people.
Official statistics hide such cells before publishing a table (common practice:
counts below a threshold, often 5 or 10, are replaced by a symbol). Hiding one cell
is not enough when the row or column total is known, because the total minus the
visible cells gives the hidden one back; the usual remedy (common practice, also
from official statistics) is *complementary* suppression: hide further cells until
no row or column holds exactly one hidden cell.

What this module guarantees for a suppressed table (and what the tests check):

- no count of a suppressed cell is in the output, and neither are the values that
  would give it back through one division (expected count, pointwise MI, share);
- no row or column has exactly one hidden cell, and no hidden cell is pinned down
  by the row and column totals together (every hidden cell lies on a cycle of hidden
  cells, see ``_close_bridges``), so totals minus visible cells give no count back;
- row and column totals are not shipped for a table with hidden cells.

What it does not guarantee: the pair's mutual information, G statistic and p-value
are computed from the full table and are shipped; together with the totals they are
one more equation on the hidden counts and may narrow them to a few candidates.
Hidden counts may also be bounded (e.g. "between 1 and
9", which the threshold itself says), and a determined attacker who combines several
exported tables of the same data (for instance two pair views that share a column)
with linear programming may narrow them further. For decisions about people, follow
the disclosure policy and law that apply to the data.
"""
from __future__ import annotations

import numbers

import numpy as np

__all__ = ["check_min_count", "pair_hidden_kinds", "suppression_mask", "suppression_kinds", "VISIBLE", "SMALL",
           "COMPLEMENTARY", "suppressed_label", "complement_label", "SUPPRESSED_LABEL", "COMPLEMENT_LABEL"]

#: Codes of :func:`suppression_kinds`: a shown cell, a cell below the threshold,
#: and a cell hidden only so that a small one cannot be worked out from totals.
VISIBLE, SMALL, COMPLEMENTARY = 0, 1, 2


#: What an export shows in place of a count below the threshold (``"<10"``).
SUPPRESSED_LABEL = "<{min_count}"

#: What an export shows in place of a complementary cell (its count may be large).
COMPLEMENT_LABEL = "\u00b7"


def complement_label() -> str:
    """The text an export shows in place of a complementary hidden cell.

    Returns
    -------
    str
        A middle dot; the accompanying note and aria label say
        "hidden to protect a small cell".

    Notes
    -----
    Marking secondary (complementary) suppressions apart from primary ones is
    common practice in official statistics.

    Examples
    --------
    >>> complement_label()
    '\u00b7'
    """
    return COMPLEMENT_LABEL


def suppressed_label(min_count: int) -> str:
    """The text an export shows in place of a hidden count.

    Parameters
    ----------
    min_count : int
        The threshold.

    Returns
    -------
    str
        ``"<"`` followed by the threshold.

    Notes
    -----
    Showing a symbol in place of a suppressed count is common practice in official
    statistics.

    Examples
    --------
    >>> suppressed_label(10)
    '<10'
    """
    return SUPPRESSED_LABEL.format(min_count=int(min_count))


def check_min_count(min_count) -> int | None:
    """Validate the ``min_count`` option of the exports.

    Parameters
    ----------
    min_count : int or None
        Counts ``1 .. min_count - 1`` are hidden; ``None`` (or 0, 1) hides nothing.

    Returns
    -------
    int or None
        The threshold, or ``None`` when nothing is to be hidden.

    Notes
    -----
    Hiding counts below a threshold (often 5 or 10) before publishing a table is
    common practice in official statistics.

    Examples
    --------
    >>> check_min_count(10)
    10
    >>> check_min_count(None) is None
    True
    """
    if min_count is None:
        return None
    if isinstance(min_count, bool) or not isinstance(min_count, numbers.Integral):
        raise TypeError(f"min_count must be a whole number or None, got {min_count!r}")
    if min_count < 0:
        raise ValueError(f"min_count must be >= 0, got {min_count}")
    return int(min_count) if min_count > 1 else None


def suppression_mask(counts, min_count) -> np.ndarray:
    """Which cells of a count table an export must hide.

    Primary cells are the counts with ``0 < count < min_count``. Complementary
    cells are then added, smallest first, until no row and no column holds exactly
    one hidden cell and no hidden cell is determined by the row and column totals
    together (so that totals minus the visible cells never yield a hidden count).

    Parameters
    ----------
    counts : array_like of int, shape (r, c) or (k,)
        Non-negative counts. A 1-D vector is treated as a single row.
    min_count : int or None
        The threshold (see :func:`check_min_count`).

    Returns
    -------
    numpy.ndarray of bool, same shape as ``counts``
        ``True`` where the cell must be hidden.

    Notes
    -----
    Threshold rules with complementary (secondary) suppression are common practice
    in official statistics for tables of counts.

    Examples
    --------
    >>> suppression_mask([[50, 3], [40, 60]], 10).astype(int).tolist()
    [[1, 1], [1, 1]]
    >>> bool(suppression_mask([[50, 30], [40, 60]], 10).any())
    False
    """
    threshold = check_min_count(min_count)
    table = np.asarray(counts)
    if table.dtype.kind not in "iuf":
        raise TypeError(f"counts must be numeric, got dtype {table.dtype}")
    shape = table.shape
    grid = np.atleast_2d(table).astype(np.float64)
    if grid.ndim != 2:
        raise ValueError(f"counts must be 1-D or 2-D, got shape {shape}")
    if threshold is None or grid.size == 0:
        return np.zeros(shape, dtype=bool)
    mask = (grid > 0) & (grid < threshold)
    if not mask.any():
        return mask.reshape(shape)

    def complement(line_mask: np.ndarray, values: np.ndarray) -> int | None:
        # Hide the smallest visible cell of the line: least information lost.
        # Positive cells first: hiding a zero protects as well, but a reader who
        # knows structural zeros could undo it.
        candidates = np.flatnonzero(~line_mask)
        if candidates.size == 0:
            return None
        positive = candidates[values[candidates] > 0]
        pool = positive if positive.size else candidates
        return int(pool[np.argmin(values[pool])])

    changed = True
    while changed:
        changed = False
        for i in range(grid.shape[0]):
            if mask[i].sum() == 1:
                j = complement(mask[i], grid[i])
                if j is not None:
                    mask[i, j] = True
                    changed = True
        if table.ndim == 1:
            # a vector has one known total: two hidden cells are enough
            continue
        for j in range(grid.shape[1]):
            if mask[:, j].sum() == 1:
                i = complement(mask[:, j], grid[:, j])
                if i is not None:
                    mask[i, j] = True
                    changed = True
        if not changed:
            changed = _close_bridges(mask, grid)
    return mask.reshape(shape)


def _hidden_graph_component(mask: np.ndarray, start: tuple[str, int], skip: tuple[int, int]) -> set:
    """Rows ("r", i) and columns ("c", j) joined to ``start`` by hidden cells, without ``skip``."""
    seen = {start}
    todo = [start]
    while todo:
        side, k = todo.pop()
        if side == "r":
            nxt = [("c", j) for j in np.flatnonzero(mask[k]) if (k, j) != skip]
        else:
            nxt = [("r", i) for i in np.flatnonzero(mask[:, k]) if (i, k) != skip]
        for node in nxt:
            if node not in seen:
                seen.add(node)
                todo.append(node)
    return seen


def _close_bridges(mask: np.ndarray, grid: np.ndarray) -> bool:
    """Hide one more cell for the first hidden cell that row and column totals pin down.

    See the hidden cells as edges between their row and their column. With all
    totals known, a hidden cell's count is determined exactly when its edge is on no
    cycle (a bridge); on a cycle, adding and subtracting alternately around it keeps
    every total, so the count stays unknown. For a bridge, hide the smallest visible
    cell that joins its two sides, which puts it on a cycle. Returns True if a cell
    was added.
    """
    for i, j in zip(*np.nonzero(mask)):
        side_a = _hidden_graph_component(mask, ("r", int(i)), (int(i), int(j)))
        if ("c", int(j)) in side_a:
            continue  # on a cycle
        side_b = _hidden_graph_component(mask, ("c", int(j)), (int(i), int(j)))
        rows_a = [k for s, k in side_a if s == "r"]
        cols_a = [k for s, k in side_a if s == "c"]
        rows_b = [k for s, k in side_b if s == "r"]
        cols_b = [k for s, k in side_b if s == "c"]
        pool = [(r, c) for r in rows_a for c in cols_b] + [(r, c) for r in rows_b for c in cols_a]
        pool = [cell for cell in pool if not mask[cell]]
        if not pool:
            continue
        positive = [cell for cell in pool if grid[cell] > 0]
        best = min(positive or pool, key=lambda cell: grid[cell])
        mask[best] = True
        return True
    return False


def suppression_kinds(counts, min_count, previous=None) -> np.ndarray:
    """Why each cell of a count table is hidden: shown, small, or complementary.

    Parameters
    ----------
    counts : array_like of int, shape (r, c) or (k,)
        Non-negative counts (see :func:`suppression_mask`).
    min_count : int or None
        The threshold (see :func:`check_min_count`).
    previous : array_like of int, optional
        Kinds from an earlier suppression of the same table; NaN counts (cells
        hidden then) keep their kind. Without it a NaN cell counts as small.

    Returns
    -------
    numpy.ndarray of int8, same shape as ``counts``
        ``VISIBLE`` (0) for a shown cell, ``SMALL`` (1) for ``0 < count < min_count``
        and ``COMPLEMENTARY`` (2) for a cell hidden only to protect a small one.

    Notes
    -----
    Primary and complementary (secondary) suppression of tables of counts is
    common practice in official statistics.

    Examples
    --------
    >>> suppression_kinds([[50, 3], [40, 60]], 10).tolist()
    [[2, 1], [2, 2]]
    """
    table = np.asarray(counts)
    if table.dtype.kind not in "iuf":
        raise TypeError(f"counts must be numeric, got dtype {table.dtype}")
    table = table.astype(np.float64)
    # a NaN is a cell hidden before (a suppressed PairTable): it stays hidden and
    # takes part in the complementary suppression like a small cell
    before = np.isnan(table)
    mask = suppression_mask(np.where(before, 1.0, table), min_count)
    kinds = np.where(mask, COMPLEMENTARY, VISIBLE).astype(np.int8)
    threshold = check_min_count(min_count)
    if threshold is not None and mask.any():
        kinds[mask & (table > 0) & (table < threshold)] = SMALL
    if previous is not None:
        old = np.asarray(previous, dtype=np.int8)
        if old.shape != kinds.shape:
            raise ValueError(f"previous kinds have shape {old.shape}, the counts {kinds.shape}")
        kinds[before] = np.where(old[before] == VISIBLE, SMALL, old[before])
    else:
        kinds[before] = SMALL
    return kinds


def pair_hidden_kinds(pair, min_count):
    """Threshold, counts and hidden-cell kinds of one pair view (a ``PairTable``).

    The one place where a view or an export decides what to hide: the threshold is
    the larger of ``min_count`` and that of an already suppressed table
    (``pair.hidden``), whose hidden cells (NA in ``pair.counts``) keep their kinds.

    Returns
    -------
    (int or None, numpy.ndarray, numpy.ndarray)
        The threshold in force, the counts as float64 (NaN where already hidden) and
        :func:`suppression_kinds` of them.
    """
    threshold = check_min_count(min_count)
    hidden = getattr(pair, "hidden", None) or {}
    threshold = max(threshold or 0, int(hidden.get("min_count") or 0)) or None
    raw = pair.counts.to_numpy(dtype=np.float64, na_value=np.nan)  # NA: hidden by PairTable.suppressed
    return threshold, raw, suppression_kinds(raw, threshold, previous=hidden.get("kinds"))
