"""MI, NMI and the G-test of many count tables at once (vectorised across tables).

Shared by the pair tables and the relevance table of a
:class:`~infoscope.frame.session.ProfileSession`.
"""
from __future__ import annotations

import numpy as np

from infoscope.estimators._checks import log_base
from infoscope.estimators.entropy import entropy_of_count_rows

# entropy estimators whose value does not change when empty cells are added
# (a property their own tests check), so tables of any shape can share a stack
_ZERO_CELLS_IGNORED = frozenset({"plugin", "miller_madow", "chao_shen", "grassberger"})
# largest stack of padded cells handed to the estimators at once (float64: 32 MB)
_STACK_CELLS = 4_000_000


def _stacks(tabs: list[np.ndarray], live: list[int], *, pad: bool) -> list[list[int]]:
    """Groups of table indices computed together: same shape, or (``pad``) similar size."""
    if not pad:
        groups: dict[tuple, list[int]] = {}
        for i in live:
            groups.setdefault(tabs[i].shape, []).append(i)
        return list(groups.values())
    order = sorted(live, key=lambda i: tabs[i].shape)
    out: list[list[int]] = []
    batch: list[int] = []
    r = c = 0
    for i in order:
        nr, nc = max(r, tabs[i].shape[0]), max(c, tabs[i].shape[1])
        if batch and (len(batch) + 1) * nr * nc > _STACK_CELLS:
            out.append(batch)
            batch, nr, nc = [], tabs[i].shape[0], tabs[i].shape[1]
        batch.append(i)
        r, c = nr, nc
    if batch:
        out.append(batch)
    return out



def _child_seed(seed, i: int):
    """A per-column seed derived from the session seed (None stays random)."""
    if seed is None:
        return None
    return int(np.random.SeedSequence([int(seed), int(i)]).generate_state(1)[0])


def _normaliser(hx, hy, hxy, normalization: str):
    """The NMI denominators of Kvalseth (1987) / Vinh et al. (2010), vectorised."""
    if normalization == "min":
        return np.minimum(hx, hy)
    if normalization == "geometric":
        return np.sqrt(np.maximum(hx, 0.0) * np.maximum(hy, 0.0))
    if normalization == "arithmetic":
        return (hx + hy) / 2.0
    if normalization == "max":
        return np.maximum(hx, hy)
    return hxy



class TableMeasures:
    """Session part: :meth:`_table_measures` (see :mod:`infoscope.frame.tables`)."""

    def _table_measures(self, tabs: list[np.ndarray], *, nats: bool = False) -> dict[str, np.ndarray]:
        """MI, NMI and the G statistic of many tables at once (vectorised across tables).

        ``mi`` / ``nmi`` follow the definitions and degenerate-case conventions of
        ``mutual_information_from_table`` and ``normalized_mutual_information_from_table``
        with the session's estimator; ``g`` / ``dof`` those of ``g_test_from_table``:
        :math:`G = 2 N I_{plugin}` in nats (Wilks 1938; Kullback 1959), ``dof``
        counting non-empty rows and columns.  The tests compare every estimator with
        the per-table functions.  Empty tables give NaN (G 0, dof 0).  p-values are
        not made here: :mod:`infoscope.estimators.significance` is the one place for
        them (the chi-square law only where it holds).

        Tables go through the entropy estimators in stacks: for estimators that
        ignore empty cells (plug-in, Miller-Madow, Chao-Shen, Grassberger) tables of
        different shapes are zero-padded into one stack; for the others, whose value
        depends on the alphabet size K (James-Stein, Dirichlet, NSB), only tables of
        the same shape share a stack.
        """
        s = self._settings
        kw = self._kw()
        kw["base"] = "nats"
        divisor = 1.0 if nats else log_base(s["base"])
        m = len(tabs)
        out = {"mi": np.full(m, np.nan), "nmi": np.full(m, np.nan), "g": np.zeros(m),
               "dof": np.zeros(m, dtype=np.int64)}
        live = [i for i, t in enumerate(tabs) if t.sum() > 0]
        for index in _stacks(tabs, live, pad=s["estimator"] in _ZERO_CELLS_IGNORED):
            r = max(tabs[i].shape[0] for i in index)
            c = max(tabs[i].shape[1] for i in index)
            stack = np.zeros((len(index), r, c))
            for j, i in enumerate(index):
                t = tabs[i]
                stack[j, : t.shape[0], : t.shape[1]] = t
            rows, cols, flat = stack.sum(axis=2), stack.sum(axis=1), stack.reshape(len(index), r * c)
            hx = entropy_of_count_rows(rows, **kw)
            hy = entropy_of_count_rows(cols, **kw)
            hxy = entropy_of_count_rows(flat, **kw)
            mi = hx + hy - hxy
            if s["estimator"] == "plugin":
                # plug-in MI is a KL divergence, >= 0; a tiny negative is rounding
                mi = np.maximum(mi, 0.0)
            norm = _normaliser(hx, hy, hxy, s["normalization"])
            r_used, c_used = np.count_nonzero(rows, axis=1), np.count_nonzero(cols, axis=1)
            with np.errstate(divide="ignore", invalid="ignore"):
                v = np.where(norm > 0, mi / np.where(norm > 0, norm, 1.0), 0.0)
            v = np.where(mi == 0.0, 0.0, v)
            # a constant side has no entropy to share: undefined, never 1 or 0
            # (normalized_mutual_information_from_table, issue 10)
            v = np.where((r_used <= 1) | (c_used <= 1), np.nan, v)
            if kw["estimator"] == "plugin":
                plugin = hx + hy - hxy  # the same three calls as just made
            else:
                plugin = (entropy_of_count_rows(rows, estimator="plugin", base="nats")
                          + entropy_of_count_rows(cols, estimator="plugin", base="nats")
                          - entropy_of_count_rows(flat, estimator="plugin", base="nats"))
            n = flat.sum(axis=1)
            dof = np.maximum((r_used - 1) * (c_used - 1), 0)
            g = np.where(dof > 0, 2.0 * n * np.maximum(plugin, 0.0), 0.0)
            out["mi"][index] = mi / divisor
            out["nmi"][index] = v
            out["g"][index] = g
            out["dof"][index] = dof
        return out
