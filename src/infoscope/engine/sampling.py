"""A seeded subset of rows, for counting pairs of very long frames quickly."""
from __future__ import annotations

import numbers

import numpy as np

__all__ = ["sample_rows"]


def sample_rows(n: int, rows: int, *, seed=0) -> np.ndarray | None:
    """Pick ``rows`` distinct row positions out of ``n``, reproducibly.

    Parameters
    ----------
    n : int
        Number of rows of the data.
    rows : int
        Number of rows to keep (simple random sample without replacement).
    seed : int or numpy.random.Generator, default=0
        Seed of the choice; the same seed gives the same rows.

    Returns
    -------
    numpy.ndarray or None
        Sorted int64 row positions, or None when ``rows >= n`` (every row is used,
        nothing is sampled).

    Notes
    -----
    Rows are kept in their original order so that the sampled codes stream through
    the counting kernels as the full codes do.

    References
    ----------
    .. [1] Cochran, W. G. (1977). *Sampling Techniques*, 3rd ed., Wiley, ch. 2
       (simple random sampling without replacement).

    Examples
    --------
    >>> sample_rows(10, 3, seed=1).tolist() == sample_rows(10, 3, seed=1).tolist()
    True
    >>> sample_rows(10, 20) is None
    True
    """
    if isinstance(rows, bool) or not isinstance(rows, numbers.Integral) or rows < 1:
        raise ValueError(f"sample: expected a positive number of rows, got {rows!r}")
    if isinstance(n, bool) or not isinstance(n, numbers.Integral) or n < 0:
        raise ValueError(f"n: expected a non-negative number of rows, got {n!r}")
    if rows >= n:
        return None
    rng = np.random.default_rng(seed)
    picked = rng.choice(int(n), size=int(rows), replace=False)
    picked.sort()
    return picked.astype(np.int64)
