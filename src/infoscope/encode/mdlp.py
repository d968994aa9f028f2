r"""Supervised bins: Fayyad & Irani's (1993) entropy cuts with the MDL stopping rule.

The cut points of a numeric column are chosen to tell the most about a class label
(the target): recursively, the cut T that minimises the class entropy of the two
sides,

.. math::

    E(T; S) = \frac{|S_1|}{N} \mathrm{Ent}(S_1) + \frac{|S_2|}{N} \mathrm{Ent}(S_2),

is accepted when its information gain :math:`\mathrm{Gain} = \mathrm{Ent}(S) - E(T;S)`
pays for the cost of describing it (the minimum description length principle):

.. math::

    \mathrm{Gain} > \frac{\log_2(N - 1)}{N} + \frac{\Delta(T; S)}{N}, \qquad
    \Delta = \log_2(3^k - 2) - [k\,\mathrm{Ent}(S) - k_1 \mathrm{Ent}(S_1) - k_2 \mathrm{Ent}(S_2)],

with k, k1, k2 the numbers of classes present in S, S1, S2 and entropies in bits.
Candidate cuts are the midpoints between consecutive distinct values (the optimum
lies on one of them; Fayyad & Irani show it lies on a boundary between classes).

Bins chosen on the target make that column's information about the same target
optimistic: the cuts were placed where the sample's classes change.  Estimate the
relevance on rows the cuts were not chosen on (see
:func:`infoscope.frame.supervised.held_out_relevance`) or read it as an upper value.
"""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope._docs import fill_doc
from infoscope.encode.arrays import _numeric_array

__all__ = ["mdlp_accepts", "mdlp_cut_points", "mdlp_edges"]


def _entropy_bits(counts: np.ndarray) -> np.ndarray:
    """Plug-in entropy in bits along the last axis (rows of class counts)."""
    n = counts.sum(axis=-1, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):
        p = np.where(n > 0, counts / np.where(n > 0, n, 1), 0.0)
        terms = np.where(p > 0, p * np.log2(np.where(p > 0, p, 1.0)), 0.0)
    return -terms.sum(axis=-1)


def _log2_3k_minus_2(k: int) -> float:
    return k * math.log2(3.0) + math.log2(1.0 - 2.0 * 3.0 ** (-k))


@fill_doc()
def mdlp_accepts(whole: np.ndarray, left: np.ndarray, right: np.ndarray) -> tuple[bool, float, float]:
    """The MDL test of one cut: (accepted, gain, threshold), from the class counts of S, S1, S2.

    Parameters
    ----------
    whole, left, right : numpy.ndarray of shape (k,)
        Class counts of the set and of its two sides.

    Returns
    -------
    tuple
        ``(gain > threshold, gain, threshold)`` in bits per example.

    References
    ----------
    .. [1] {fayyad_irani_1993}

    Examples
    --------
    >>> mdlp_accepts(np.array([50, 50]), np.array([50, 0]), np.array([0, 50]))[0]
    True
    """
    n = float(whole.sum())
    ent, ent1, ent2 = (float(_entropy_bits(c.astype(np.float64))) for c in (whole, left, right))
    n1, n2 = float(left.sum()), float(right.sum())
    gain = ent - (n1 * ent1 + n2 * ent2) / n
    k, k1, k2 = (int(np.count_nonzero(c)) for c in (whole, left, right))
    delta = _log2_3k_minus_2(k) - (k * ent - k1 * ent1 - k2 * ent2)
    threshold = (math.log2(n - 1.0) + delta) / n
    return bool(gain > threshold), gain, threshold


@fill_doc()
def mdlp_cut_points(values: np.ndarray, classes: np.ndarray) -> np.ndarray:
    """Cut points of Fayyad & Irani's MDLP on finite ``values`` with integer ``classes``.

    Parameters
    ----------
    values : numpy.ndarray of float, shape (n,)
        Finite numbers.
    classes : numpy.ndarray of int, shape (n,)
        Class codes ``0 .. k-1`` of the same rows.

    Returns
    -------
    numpy.ndarray of float
        The accepted cuts in increasing order (midpoints between consecutive distinct
        values); empty when no cut pays for itself.

    References
    ----------
    .. [1] {fayyad_irani_1993}

    Examples
    --------
    >>> mdlp_cut_points(np.array([1.0, 2.0, 3.0, 4.0] * 10), np.array([0, 0, 1, 1] * 10)).tolist()
    [2.5]
    """
    distinct, inverse = np.unique(values, return_inverse=True)
    k = int(classes.max()) + 1 if classes.size else 1
    counts = np.zeros((distinct.size, k), dtype=np.int64)
    np.add.at(counts, (inverse.reshape(-1), classes), 1)
    cuts: list[float] = []
    stack = [(0, distinct.size)]
    while stack:
        lo, hi = stack.pop()
        if hi - lo < 2:
            continue
        seg = counts[lo:hi].astype(np.float64)
        whole = seg.sum(axis=0)
        if np.count_nonzero(whole) < 2:
            continue  # one class: nothing to separate
        left = np.cumsum(seg, axis=0)[:-1]
        right = whole[None, :] - left
        n = whole.sum()
        n1 = left.sum(axis=1)
        e = (n1 * _entropy_bits(left) + (n - n1) * _entropy_bits(right)) / n
        i = int(np.argmin(e))  # the first of equal minima
        accepted, _, _ = mdlp_accepts(whole, left[i], right[i])
        if accepted:
            cuts.append(float((distinct[lo + i] + distinct[lo + i + 1]) / 2.0))
            stack.append((lo, lo + i + 1))
            stack.append((lo + i + 1, hi))
    return np.array(sorted(cuts), dtype=np.float64)


@fill_doc()
def mdlp_edges(values, target) -> np.ndarray:
    """Bin edges of ``values`` chosen by MDLP against the class labels ``target``.

    Parameters
    ----------
    values : array-like of numbers, shape (n,)
        The numeric column (NaN / infinite values are left out, with their rows).
    target : array-like, shape (n,)
        Class labels of the same rows (any hashable values; missing labels leave
        their rows out).  A numeric target with many values is read as labels: bin
        it first.

    Returns
    -------
    numpy.ndarray of float64
        ``[min, cut_1, ..., cut_m, max]`` of the rows used: m + 1 bins.  No accepted
        cut gives one bin ``[min, max]`` (``[v - 0.5, v + 0.5]`` for a constant).

    Raises
    ------
    ValueError
        Lengths differ, or no row has both a finite value and a label.

    References
    ----------
    .. [1] {fayyad_irani_1993}

    Examples
    --------
    >>> mdlp_edges([1.0, 2.0, 3.0, 4.0] * 10, ["a", "a", "b", "b"] * 10).tolist()
    [1.0, 2.5, 4.0]
    """
    x = _numeric_array(values).astype(np.float64)
    labels = pd.Series(target.to_numpy() if hasattr(target, "to_numpy") else list(target)
                       if not isinstance(target, np.ndarray) else target)
    if labels.size != x.size:
        raise ValueError(f"target has {labels.size} values for {x.size} values; give one label per value")
    codes, _ = pd.factorize(labels, use_na_sentinel=True)
    keep = np.isfinite(x) & (codes >= 0)
    if not keep.any():
        raise ValueError("values: no row has both a finite value and a target label")
    xs, ys = x[keep], codes[keep].astype(np.int64)
    lo, hi = float(xs.min()), float(xs.max())
    if lo == hi:
        return np.array([lo - 0.5, lo + 0.5])
    cuts = mdlp_cut_points(xs, ys)
    return np.concatenate([[lo], cuts, [hi]])
