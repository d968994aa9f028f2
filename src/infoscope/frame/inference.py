"""Significance of pair tables for the frame layer: the estimators' tests with the engine's shuffles.

:func:`pair_tests` runs :func:`infoscope.estimators.significance.independence_tests`
on the tables of a family of pairs (all pairs of ``pairs()``, or the target's pairs of
``relevance()``), lending it a shuffler that asks the ``PairEngine`` to permute the
codes of the pairs that need a permutation test.  Each pair's random stream is seeded
from the session seed, the two column keys and the budget stage, so a pair's p-value
does not depend on which other pairs were tested with it, only on how far its budget
went (see the estimators' module notes).
"""
from __future__ import annotations

import zlib
from collections.abc import Sequence

import numpy as np

from infoscope.estimators.significance import IndependenceTests, independence_tests

__all__ = ["FINDING_Q", "pair_seed", "pair_shuffler", "pair_tests"]

#: The q-value below which the views show a pair as a finding (and below which a
#: pair's shuffle budget need not grow further).
FINDING_Q = 0.05


def pair_seed(seed, a: str, b: str, stage: int) -> int:
    """A 64-bit seed for the shuffles of pair ``(a, b)`` at budget stage ``stage``.

    Parameters
    ----------
    seed : int or None
        The session seed (None is taken as 0: the profile is reproducible).
    a, b : str
        The column keys of the pair, in table order.
    stage : int
        The budget stage.

    Returns
    -------
    int
        A seed drawn by ``numpy.random.SeedSequence`` from these four numbers.

    Examples
    --------
    >>> pair_seed(0, "x", "y", 0) == pair_seed(0, "x", "y", 0) != pair_seed(0, "x", "y", 1)
    True
    """
    entropy = [int(seed or 0) & 0xFFFFFFFF, zlib.crc32(a.encode("utf-8")), zlib.crc32(b.encode("utf-8")),
               int(stage)]
    return int(np.random.SeedSequence(entropy).generate_state(1, np.uint64)[0])


def pair_shuffler(engine, pairs: Sequence[tuple[str, str]], tables: Sequence, *, seed=0):
    """The shuffler :func:`~infoscope.estimators.significance.permutation_p_values` asks for.

    Parameters
    ----------
    engine : PairEngine
        Holds the pairs' codes.
    pairs : sequence of (str, str)
        The family's pairs.
    tables : sequence of numpy.ndarray or None
        Their count tables (None for pairs that will not be shuffled).
    seed : int, optional
        The session seed.

    Returns
    -------
    callable
        ``shuffle(index, budgets, stop_after, stage) -> (done, exceed)``.

    Examples
    --------
    >>> import numpy as np
    >>> from types import SimpleNamespace as Col
    >>> from infoscope.engine import PairEngine
    >>> codes = np.repeat(np.array([0, 1], np.uint8), 20)
    >>> eng = PairEngine([Col(name="a", codes=codes, k=2), Col(name="b", codes=codes, k=2)], progress=False)
    >>> shuffle = pair_shuffler(eng, [("a", "b")], [eng.table("a", "b")])
    >>> [int(v[0]) for v in shuffle(np.array([0]), np.array([99]), np.array([20]), 0)]
    [99, 0]
    """
    from infoscope.engine.permutation import score_lookup, table_score

    pairs = list(pairs)
    lookup = score_lookup(max((int(np.asarray(t).sum()) for t in tables if t is not None), default=0))
    observed: dict[int, float] = {}

    def shuffle(index, budgets, stop_after, stage):
        chosen = [pairs[i] for i in index]
        obs = []
        for i in index:
            if i not in observed:
                observed[i] = table_score(tables[i], lookup)
            obs.append(observed[i])
        seeds = [pair_seed(seed, a, b, stage) for a, b in chosen]
        return engine.shuffle_counts(chosen, obs, budgets, stop_after, seeds)

    return shuffle


def pair_tests(engine, pairs: Sequence[tuple[str, str]], tables: Sequence[np.ndarray], *, seed=0,
               alpha: float = FINDING_Q, state=None) -> IndependenceTests:
    """Independence tests of ``pairs`` (their ``tables`` from ``engine``), one family.

    Parameters
    ----------
    engine : PairEngine
        Holds the pairs' codes.
    pairs : sequence of (str, str)
        The pairs, each ``(a, b)`` with ``tables[i]`` of shape ``(k_a, k_b)``.
    tables : sequence of numpy.ndarray
        Their pairwise-complete count tables.
    seed : int, optional
        The session seed.
    alpha : float, default=0.05
        The views' false-discovery level (see ``independence_tests``).
    state : tuple of arrays, optional
        Shuffles already made per pair ``(done, exceed, stage)``.

    Returns
    -------
    IndependenceTests

    Examples
    --------
    >>> import numpy as np
    >>> from types import SimpleNamespace as Col
    >>> from infoscope.engine import PairEngine
    >>> rng = np.random.default_rng(0)
    >>> cols = [Col(name=c, codes=rng.integers(0, 4, 60).astype(np.uint8), k=4) for c in "xy"]
    >>> eng = PairEngine(cols, progress=False)
    >>> res = pair_tests(eng, [("x", "y")], [eng.table("x", "y")])
    >>> res.p_method.tolist(), bool(0 < res.p_value[0] <= 1)
    (['permutation'], True)
    """
    shuffle = pair_shuffler(engine, pairs, tables, seed=seed)
    return independence_tests(tables, shuffle, alpha=alpha, state=state)
