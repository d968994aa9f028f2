"""Nearest-neighbour estimators for continuous data (numpy + scipy only).

Three estimators that work on samples of real-valued variables without binning:

- :func:`differential_entropy` -- Kozachenko & Leonenko (1987), in the k-nearest
  neighbour form written down by Kraskov, Stögbauer & Grassberger (2004).
- :func:`ksg_mutual_information` -- the two mutual-information estimators of
  Kraskov, Stögbauer & Grassberger (2004), "KSG-1" and "KSG-2".
- :func:`mixed_mutual_information` -- Ross (2014), mutual information between a
  continuous variable and a discrete one.

All three compute in nats and divide by ``ln(base)`` at the end.

Conventions used throughout this module (stated once, here):

- A *radius* is the distance from a point to its k-th nearest neighbour, not
  twice that distance.  The unit-ball volume that goes with a radius is the volume
  of the ball of radius 1: ``2**d`` under the maximum norm, ``pi**(d/2) /
  Gamma(d/2 + 1)`` under the Euclidean norm.
- The point itself is never its own neighbour; counts of neighbours exclude it.
- Inputs are never modified: every transformation works on a float64 copy.
"""
from __future__ import annotations

import math
import numbers

import numpy as np
from scipy.spatial import cKDTree
from scipy.special import digamma, gammaln

from infoscope._warnings import DataQualityWarning, SmallSampleWarning, warn_user
from infoscope.estimators._checks import check_choice, check_nonnegative, check_same_length, log_base

__all__ = [
    "differential_entropy",
    "ksg_mutual_information",
    "mixed_mutual_information",
    "KNN_METRICS",
]

#: Norms accepted by :func:`differential_entropy`, with the Minkowski ``p`` of each.
KNN_METRICS = {"chebyshev": np.inf, "euclidean": 2.0}

# A column with at most this share of distinct values among its rows looks discrete:
# a kNN estimate on it is decided by how ties are broken (common practice to warn).
_DISCRETE_LOOKING_SHARE = 0.5

# Default tie-breaking noise for the MI estimators, in units of each column's
# standard deviation.  Kraskov et al. (2004, Sec. II) advise adding noise of very
# small amplitude to remove degeneracies; 1e-10 is far below any real measurement
# resolution yet far above float64 spacing near 1.
_DEFAULT_MI_JITTER = 1e-10


# ----------------------------------------------------------------------------
# Input checks
# ----------------------------------------------------------------------------
def _as_samples(values, parameter: str) -> np.ndarray:
    """Return ``values`` as a fresh float64 array of shape (n, d), or raise naming ``parameter``."""
    try:
        arr = np.asarray(values)
    except (TypeError, ValueError):  # ragged nesting: numpy cannot make one array of it
        raise TypeError(f"{parameter} must be numbers of shape (n,) or (n, d); got nested or ragged values") from None
    if arr.dtype == bool:
        raise TypeError(
            f"{parameter} is boolean; the nearest-neighbour estimators need continuous "
            "numbers (use a discrete estimator, or mixed_mutual_information for a "
            "discrete variable against a continuous one)"
        )
    if arr.dtype == object:
        try:
            arr = arr.astype(np.float64)
        except (TypeError, ValueError):
            raise TypeError(f"{parameter} must hold numbers, got values that are not numeric") from None
    if not (np.issubdtype(arr.dtype, np.integer) or np.issubdtype(arr.dtype, np.floating)):
        raise TypeError(f"{parameter} must hold real numbers, got dtype {arr.dtype}")
    if arr.ndim == 1:
        arr = arr.reshape(-1, 1)
    elif arr.ndim != 2:
        raise ValueError(
            f"{parameter} must be 1-D (n,) or 2-D (n, d) with one row per sample, got shape {arr.shape}"
        )
    if arr.shape[0] == 0:
        raise ValueError(f"{parameter} is empty: at least k + 1 samples are needed")
    if arr.shape[1] == 0:
        raise ValueError(f"{parameter} has no columns (shape {arr.shape})")
    out = np.array(arr, dtype=np.float64, copy=True, order="C")
    bad = ~np.isfinite(out)
    if bad.any():
        rows = np.flatnonzero(bad.any(axis=1))
        raise ValueError(
            f"{parameter} contains NaN or infinite values in {rows.size} row(s) "
            f"(first at row {rows[0]}); drop or impute them before estimating"
        )
    return out


def _check_k(k, n: int, what: str = "the number of samples") -> int:
    if isinstance(k, bool) or not isinstance(k, numbers.Integral):
        raise TypeError(f"k must be a positive integer, got {k!r}")
    k = int(k)
    if k < 1:
        raise ValueError(f"k={k} is invalid: k must be >= 1")
    if k >= n:
        raise ValueError(f"k={k} must be smaller than {what} n={n}: each point needs k neighbours")
    return k


def _check_jitter(jitter, *, allow_none: bool = True):
    if jitter is None and allow_none:
        return None
    return check_nonnegative(jitter, "jitter")


def _rng(seed) -> np.random.Generator:
    if isinstance(seed, np.random.Generator):
        return seed
    if seed is not None and (isinstance(seed, bool) or not isinstance(seed, numbers.Integral)):
        raise TypeError(f"seed must be an integer, a numpy Generator or None, got {seed!r}")
    return np.random.default_rng(seed)


def _column_scales(samples: np.ndarray) -> np.ndarray:
    """Population standard deviation of each column (0 for a constant column)."""
    return samples.std(axis=0)


def _standardize(samples: np.ndarray, scales: np.ndarray) -> None:
    """Divide each non-constant column by its standard deviation, in place (on our copy)."""
    nonzero = scales > 0
    samples[:, nonzero] /= scales[nonzero]


def _add_jitter(samples: np.ndarray, scales: np.ndarray, amplitude: float, rng) -> None:
    """Add Gaussian noise of sd ``amplitude * scale`` to each non-constant column, in place."""
    if amplitude == 0:
        return
    sd = np.where(scales > 0, amplitude * scales, 0.0)
    samples += rng.standard_normal(samples.shape) * sd


def _warn_if_discrete_looking(samples: np.ndarray, parameter: str) -> None:
    n = samples.shape[0]
    for j in range(samples.shape[1]):
        n_distinct = np.unique(samples[:, j]).size
        if n_distinct <= _DISCRETE_LOOKING_SHARE * n and n_distinct > 1:
            where = parameter if samples.shape[1] == 1 else f"{parameter} column {j}"
            warn_user(
                f"{where} has only {n_distinct} distinct values in {n} rows: it looks "
                "discrete, and a nearest-neighbour estimate on tied values depends on the "
                "tie-breaking noise (jitter/seed). Consider a discrete estimator (or "
                "mixed_mutual_information for a discrete variable).",
                DataQualityWarning,
            )


def _log_unit_ball_volume(d: int, metric: str) -> float:
    """ln of the volume of the d-dimensional ball of radius 1 under ``metric``."""
    if metric == "chebyshev":
        return d * math.log(2.0)
    return 0.5 * d * math.log(math.pi) - float(gammaln(0.5 * d + 1.0))


def _kth_neighbour_radius(tree: cKDTree, samples: np.ndarray, k: int, p: float):
    """Distance to, and indices of, the k nearest neighbours of each point (self excluded).

    Returns ``(radius, neighbours)`` where ``radius[i]`` is the distance to the k-th
    neighbour and ``neighbours[i]`` the k neighbour indices.  With exact duplicates
    the tree may list a duplicate before the point itself; the point is removed
    wherever it appears, and if it does not appear the (k+1)-th entry is dropped --
    the same distances either way.
    """
    dist, idx = tree.query(samples, k=k + 1, p=p)
    n = samples.shape[0]
    own = idx == np.arange(n)[:, None]
    missing_self = ~own.any(axis=1)
    own[missing_self, k] = True
    neighbours = idx[~own].reshape(n, k)
    radius = dist[~own].reshape(n, k)[:, -1]
    return radius, neighbours


# ----------------------------------------------------------------------------
# Differential entropy: Kozachenko & Leonenko (1987)
# ----------------------------------------------------------------------------
def differential_entropy(x, *, k=3, base=2, metric="chebyshev", jitter=None, seed=0):
    r"""Differential entropy of a continuous sample by the Kozachenko–Leonenko estimator.

    Parameters
    ----------
    x : array_like, shape (n,) or (n, d)
        Samples, one row per observation, real numbers without NaN or inf.
    k : int, default=3
        Which nearest neighbour sets the local scale; ``1 <= k < n``.
    base : float or str, default=2
        Logarithm base of the result: 2 or ``"bits"``, ``math.e`` or ``"nats"``,
        10 or ``"hartleys"``, or any number > 0 other than 1.
    metric : {"chebyshev", "euclidean"}, default="chebyshev"
        Norm for the neighbour distances (maximum norm or Euclidean).  The estimate
        is consistent under either; they differ on finite samples.
    jitter : float or None, default=None
        What to do when exact duplicates make a k-th neighbour distance zero (the
        estimate would be :math:`-\infty`).  ``None`` raises ``ValueError``.  A number
        adds Gaussian noise of standard deviation ``jitter`` times each column's
        standard deviation (seeded by ``seed``), emits a
        :class:`~infoscope.DataQualityWarning`, and estimates on the noisy copy.  The
        result then depends on ``jitter``: duplicates mean the data are (partly)
        discrete, and their differential entropy is :math:`-\infty`.  Without
        duplicates ``jitter`` is not used.
    seed : int, numpy.random.Generator or None, default=0
        Seed of the tie-breaking noise.

    Returns
    -------
    float
        The estimate, in the unit given by ``base``.  It can be negative (differential
        entropy is not bounded below).

    Raises
    ------
    ValueError
        If ``k >= n``, if ``x`` holds NaN/inf or is empty, or if duplicates make a
        neighbour distance zero and ``jitter`` is None.

    Warns
    -----
    DataQualityWarning
        When ``jitter`` was used, and when a column has at most n/2 distinct values
        (ties with fewer than k duplicates do not give -inf but shrink the radii).

    Notes
    -----
    With :math:`r_i` the distance from point :math:`i` to its k-th nearest neighbour
    (the *radius*, not the diameter) and :math:`V_d` the volume of the unit-radius ball
    of the chosen norm (:math:`2^d` for the maximum norm,
    :math:`\pi^{d/2}/\Gamma(d/2+1)` for the Euclidean norm),

    .. math::

        \hat H = \psi(N) - \psi(k) + \ln V_d + \frac{d}{N}\sum_{i=1}^N \ln r_i .

    Kraskov et al. (2004, eq. 20) write the same estimator with :math:`\epsilon_i =
    2 r_i` and :math:`c_d = V_d / 2^d` (so :math:`c_d = 1` for the maximum norm).
    Computed in nats, then divided by :math:`\ln(\text{base})`.  The data are not
    rescaled: :math:`H(aX) = H(X) + d \ln|a|`.

    References
    ----------
    .. [1] L. F. Kozachenko and N. N. Leonenko, "Sample estimate of the entropy of a
       random vector", Problemy Peredachi Informatsii 23(2):9–16, 1987.
    .. [2] A. Kraskov, H. Stögbauer and P. Grassberger, "Estimating mutual
       information", Phys. Rev. E 69:066138, 2004. doi:10.1103/PhysRevE.69.066138

    Examples
    --------
    >>> import numpy as np
    >>> from infoscope.estimators.continuous import differential_entropy
    >>> x = np.random.default_rng(1).normal(size=5000)
    >>> round(differential_entropy(x, base="nats"), 1)  # truth: 0.5*ln(2*pi*e) = 1.419
    1.4
    """
    ln_base = log_base(base)
    samples = _as_samples(x, "x")
    n, d = samples.shape
    k = _check_k(k, n)
    metric = check_choice(metric, KNN_METRICS, "metric")
    jitter = _check_jitter(jitter)
    p = KNN_METRICS[metric]

    radius, _ = _kth_neighbour_radius(cKDTree(samples), samples, k, p)
    n_zero = int(np.count_nonzero(radius == 0))
    if not n_zero:
        # Fewer than k duplicates per value still shrink the radii that ties touch.
        _warn_if_discrete_looking(samples, "x")
    else:
        if jitter is None or jitter == 0:
            raise ValueError(
                f"x has {n_zero} point(s) with at least k={k} exact duplicates, so their "
                f"k-th neighbour distance is 0 and the differential entropy estimate is "
                "-inf (the data look discrete). Use a discrete entropy estimator, or pass "
                "jitter=<small number> to break ties with seeded noise."
            )
        warn_user(
            f"x has {n_zero} point(s) with at least k={k} exact duplicates; noise of "
            f"jitter={jitter:g} x column sd was added to break ties, and the estimate "
            "depends on that choice",
            DataQualityWarning,
        )
        scales = _column_scales(samples)
        _add_jitter(samples, scales, jitter, _rng(seed))
        radius, _ = _kth_neighbour_radius(cKDTree(samples), samples, k, p)
        if np.any(radius == 0):
            raise ValueError(
                f"x still has zero k-th neighbour distances after jitter={jitter:g} "
                "(a constant column has no scale to jitter by); its differential "
                "entropy is -inf"
            )

    h = digamma(n) - digamma(k) + _log_unit_ball_volume(d, metric) + d * np.mean(np.log(radius))
    return float(h) / ln_base


# ----------------------------------------------------------------------------
# Mutual information between continuous variables: KSG (2004)
# ----------------------------------------------------------------------------
def _check_noise_options(jitter, seed, standardize):
    """The checked ``jitter`` and the noise generator of the MI estimators (``standardize`` checked too)."""
    jitter = _check_jitter(jitter, allow_none=False)
    rng = _rng(seed)
    if not isinstance(standardize, (bool, np.bool_)):
        raise TypeError(f"standardize must be True or False, got {standardize!r}")
    return jitter, rng


def _in_unit(mi_nats: float, clip: bool, ln_base: float) -> float:
    """An MI estimate in nats, clipped at 0 if asked, in the unit of ``ln_base``."""
    if clip:
        mi_nats = max(mi_nats, 0.0)
    return mi_nats / ln_base


def _prepare_for_mi(samples: np.ndarray, standardize: bool, jitter: float, rng):
    scales = _column_scales(samples)
    if standardize:
        _standardize(samples, scales)
        scales = np.where(scales > 0, 1.0, 0.0)
    _add_jitter(samples, scales, jitter, rng)
    return samples


def _strict_counts(tree: cKDTree, samples: np.ndarray, radius: np.ndarray) -> np.ndarray:
    """Number of *other* points strictly closer than ``radius`` (maximum norm)."""
    shrunk = np.nextafter(radius, 0.0)
    return tree.query_ball_point(samples, shrunk, p=np.inf, return_length=True) - 1


def _inclusive_counts(tree: cKDTree, samples: np.ndarray, radius: np.ndarray) -> np.ndarray:
    """Number of *other* points at distance <= ``radius`` (maximum norm)."""
    return tree.query_ball_point(samples, radius, p=np.inf, return_length=True) - 1


def ksg_mutual_information(
    x, y, *, k=3, algorithm=1, base=2, standardize=True, jitter=_DEFAULT_MI_JITTER, seed=0, clip=False
):
    r"""Mutual information between continuous variables by the KSG estimators.

    Parameters
    ----------
    x, y : array_like, shape (n,) or (n, d_x) / (n, d_y)
        Paired samples (row i of ``x`` goes with row i of ``y``), real numbers without
        NaN or inf.  Either may be multivariate.
    k : int, default=3
        Number of neighbours in the joint space; ``1 <= k < n``.  Kraskov et al.
        suggest k = 2–4 for small bias; larger k lowers the variance.
    algorithm : {1, 2}, default=1
        ``1``: :math:`I^{(1)}` (counts strictly inside the joint k-th neighbour
        distance).  ``2``: :math:`I^{(2)}` (counts inside the per-variable extents of
        the k-neighbour box, boundary included).
    base : float or str, default=2
        Logarithm base of the result (2/"bits", e/"nats", 10/"hartleys", ...).
    standardize : bool, default=True
        Divide each column of ``x`` and ``y`` by its standard deviation first (columns
        are not centred: distances do not depend on location).  With the maximum norm
        in the joint space the k-th neighbour depends on the relative scales of the
        columns, so without this the finite-sample estimate changes when a column is
        rescaled (the true MI does not).  With it the estimate is invariant to
        rescaling any column by a positive factor and to shifting it.
    jitter : float, default=1e-10
        Standard deviation of the Gaussian noise added to each column, in units of
        that column's standard deviation, to break ties (Kraskov et al. 2004 advise
        low-amplitude noise).  ``0`` adds none; then exact duplicates in the joint
        space raise ``ValueError``.
    seed : int, numpy.random.Generator or None, default=0
        Seed of the noise, so that results are reproducible.
    clip : bool, default=False
        Return ``max(estimate, 0)``.  The raw estimate can be slightly negative for
        independent variables (sampling error, not a rounding artefact), so it is
        returned unclipped unless asked.

    Returns
    -------
    float
        The estimate in the unit given by ``base``.

    Raises
    ------
    ValueError
        If ``k >= n``, lengths differ, an input holds NaN/inf, ``algorithm`` is not 1
        or 2, or (with ``jitter=0``) duplicates make a joint distance zero.

    Warns
    -----
    DataQualityWarning
        When a column has at most n/2 distinct values: it looks discrete and the
        estimate depends on how ties are broken.

    Notes
    -----
    All distances use the maximum norm.  With :math:`\epsilon_i` the distance from
    point :math:`i` to its k-th neighbour in the joint space :math:`(x, y)`,
    :math:`n_{x,i}` (:math:`n_{y,i}`) the number of other points whose ``x``
    (``y``) lies strictly within :math:`\epsilon_i`,

    .. math::

        I^{(1)} = \psi(k) + \psi(N) - \langle \psi(n_x + 1) + \psi(n_y + 1) \rangle .

    For algorithm 2, :math:`\epsilon_{x,i}` (:math:`\epsilon_{y,i}`) is the largest
    ``x`` (``y``) distance among the k joint neighbours, :math:`n_{x,i}` counts the
    other points with ``x`` distance :math:`\le \epsilon_{x,i}`, and

    .. math::

        I^{(2)} = \psi(k) - 1/k + \psi(N) - \langle \psi(n_x) + \psi(n_y) \rangle .

    (Kraskov et al. state these with :math:`\epsilon` as twice the distance and
    counts within :math:`\epsilon/2`: the same thing.)  The strict inequality uses
    the radius shrunk to the next smaller float.  Computed in nats, divided by
    :math:`\ln(\text{base})`.  MI is symmetric; :math:`I^{(1)}` is exactly symmetric
    in ``x`` and ``y`` for the same noise.  If every column of ``x`` (or of ``y``) is
    constant the result is 0.  MI measures dependence, not cause.

    References
    ----------
    .. [1] A. Kraskov, H. Stögbauer and P. Grassberger, "Estimating mutual
       information", Phys. Rev. E 69:066138, 2004. doi:10.1103/PhysRevE.69.066138

    Examples
    --------
    >>> import numpy as np
    >>> from infoscope.estimators.continuous import ksg_mutual_information
    >>> rng = np.random.default_rng(7)
    >>> x = rng.normal(size=4000)
    >>> y = 0.6 * x + 0.8 * rng.normal(size=4000)  # correlation 0.6
    >>> truth = -0.5 * np.log(1 - 0.6**2)  # 0.223 nats
    >>> bool(abs(ksg_mutual_information(x, y, base="nats") - truth) < 0.02)
    True
    """
    ln_base = log_base(base)
    xs = _as_samples(x, "x")
    ys = _as_samples(y, "y")
    n = check_same_length(x=xs, y=ys)
    k = _check_k(k, n)
    if isinstance(algorithm, bool) or algorithm not in (1, 2):
        raise ValueError(f"algorithm={algorithm!r} is not valid; choose 1 or 2 (KSG I(1) or I(2))")
    jitter, rng = _check_noise_options(jitter, seed, standardize)

    if np.all(np.ptp(xs, axis=0) == 0) or np.all(np.ptp(ys, axis=0) == 0):
        return 0.0  # a constant variable shares no information with anything
    _warn_if_discrete_looking(xs, "x")
    _warn_if_discrete_looking(ys, "y")

    # x's noise is drawn before y's, so swapping the arguments swaps the draws; with
    # jitter=0 the estimate of I(1) for (x, y) and (y, x) is identical.
    xs = _prepare_for_mi(xs, bool(standardize), jitter, rng)
    ys = _prepare_for_mi(ys, bool(standardize), jitter, rng)
    joint = np.hstack([xs, ys])

    radius, neighbours = _kth_neighbour_radius(cKDTree(joint), joint, k, np.inf)
    n_zero = int(np.count_nonzero(radius == 0))
    if n_zero:
        raise ValueError(
            f"{n_zero} point(s) have at least k={k} exact duplicates in the joint (x, y) "
            "space, so their k-th neighbour distance is 0; pass jitter > 0 (default 1e-10) "
            "to break ties, or use a discrete estimator"
        )
    tree_x, tree_y = cKDTree(xs), cKDTree(ys)
    if algorithm == 1:
        nx = _strict_counts(tree_x, xs, radius)
        ny = _strict_counts(tree_y, ys, radius)
        mi = digamma(k) + digamma(n) - np.mean(digamma(nx + 1.0) + digamma(ny + 1.0))
    else:
        eps_x = np.abs(xs[neighbours] - xs[:, None, :]).max(axis=(1, 2))
        eps_y = np.abs(ys[neighbours] - ys[:, None, :]).max(axis=(1, 2))
        nx = _inclusive_counts(tree_x, xs, eps_x)
        ny = _inclusive_counts(tree_y, ys, eps_y)
        mi = digamma(k) - 1.0 / k + digamma(n) - np.mean(digamma(nx.astype(float)) + digamma(ny.astype(float)))
    return _in_unit(float(mi), clip, ln_base)


# ----------------------------------------------------------------------------
# Mutual information between a continuous and a discrete variable: Ross (2014)
# ----------------------------------------------------------------------------
def _plain(value):
    """A numpy scalar as the Python value it holds (for readable messages)."""
    return value.item() if isinstance(value, np.generic) else value


def _as_labels(values, parameter: str) -> np.ndarray:
    """Integer codes 0..m-1 of a 1-D sequence of discrete labels, or raise naming ``parameter``."""
    try:
        arr = np.asarray(values)
    except (TypeError, ValueError):  # ragged nesting: numpy cannot make one array of it
        raise TypeError(f"{parameter} must be a 1-D sequence of labels; got nested or ragged values") from None
    if arr.ndim == 2 and arr.shape[1] == 1:
        arr = arr[:, 0]
    if arr.ndim != 1:
        raise ValueError(f"{parameter} must be 1-D (one label per sample), got shape {arr.shape}")
    if arr.size == 0:
        raise ValueError(f"{parameter} is empty")
    if np.issubdtype(arr.dtype, np.floating):
        bad = ~np.isfinite(arr)
        if bad.any():
            raise ValueError(
                f"{parameter} contains NaN or infinite labels in {int(bad.sum())} row(s) "
                f"(first at row {int(np.flatnonzero(bad)[0])}); drop them or make missing a label of its own"
            )
    elif arr.dtype == object:
        missing = np.array([v is None or (isinstance(v, float) and not math.isfinite(v)) for v in arr])
        if missing.any():
            raise ValueError(
                f"{parameter} contains missing labels (None/NaN) in {int(missing.sum())} row(s) "
                f"(first at row {int(np.flatnonzero(missing)[0])}); drop them or make missing a label of its own"
            )
    elif np.issubdtype(arr.dtype, np.complexfloating):
        raise TypeError(f"{parameter} must hold labels (integers, strings, ...), got complex numbers")
    try:
        _, codes = np.unique(arr, return_inverse=True)
    except TypeError:
        raise TypeError(
            f"{parameter} mixes label types that cannot be compared (e.g. numbers and strings); "
            "convert them to one type"
        ) from None
    return codes.reshape(-1)


def mixed_mutual_information(
    x_continuous,
    y_discrete,
    *,
    k=3,
    base=2,
    small_classes="shrink",
    standardize=True,
    jitter=_DEFAULT_MI_JITTER,
    seed=0,
    clip=False,
):
    r"""Mutual information between a continuous and a discrete variable (Ross 2014).

    Parameters
    ----------
    x_continuous : array_like, shape (n,) or (n, d)
        Continuous samples, real numbers without NaN or inf.
    y_discrete : array_like, shape (n,)
        Discrete labels (integers, strings, ...), one per row of ``x_continuous``,
        without missing values.
    k : int, default=3
        Number of neighbours within the class of each point; ``1 <= k < n``.
    base : float or str, default=2
        Logarithm base of the result (2/"bits", e/"nats", 10/"hartleys", ...).
    small_classes : {"shrink", "error"}, default="shrink"
        Classes with fewer than ``k + 1`` members cannot supply k neighbours.
        ``"shrink"`` follows scikit-learn's ``mutual_info_classif``: such a class
        uses ``k_c = size - 1`` neighbours, and points whose class has a single member are
        left out of the estimate (N shrinks accordingly); a
        :class:`~infoscope.SmallSampleWarning` names the classes.  ``"error"`` raises
        ``ValueError`` instead.
    standardize : bool, default=True
        Divide each continuous column by its standard deviation first.  It matters
        only when ``x_continuous`` has several columns (the maximum norm then depends
        on their relative scales); for one column the estimate is scale-free anyway.
    jitter : float, default=1e-10
        Standard deviation of the tie-breaking Gaussian noise, in units of each
        column's standard deviation.  ``0`` adds none; then a zero within-class
        neighbour distance raises ``ValueError``.
    seed : int, numpy.random.Generator or None, default=0
        Seed of the noise.
    clip : bool, default=False
        Return ``max(estimate, 0)`` (the raw estimate can be slightly negative).

    Returns
    -------
    float
        The estimate in the unit given by ``base``.

    Raises
    ------
    ValueError
        If ``k >= n``, lengths differ, inputs hold NaN/inf or missing labels, fewer
        than two points remain after dropping single-member classes, or
        ``small_classes="error"`` and some class has ``k`` or fewer members.

    Notes
    -----
    For point :math:`i` in class :math:`c` with :math:`N_c` members, let :math:`d_i` be
    the distance (maximum norm) to its :math:`k_c`-th nearest neighbour *within the
    class*, and :math:`m_i` the number of points of the *whole* sample closer than
    :math:`d_i`, counting point :math:`i` itself.  Then

    .. math::

        \hat I = \psi(N) + \langle \psi(k_c) \rangle - \langle \psi(N_c) \rangle
                 - \langle \psi(m_i) \rangle .

    Ross (2014) counts the neighbours within :math:`d_i` including the k-th one; with
    no ties at distance :math:`d_i` that is the same number as the strict count
    including the point itself used here (and by scikit-learn).  Computed in nats,
    divided by :math:`\ln(\text{base})`.  A single class gives 0.  MI measures
    dependence, not cause.

    References
    ----------
    .. [1] B. C. Ross, "Mutual information between discrete and continuous data
       sets", PLoS ONE 9(2):e87357, 2014. doi:10.1371/journal.pone.0087357
    .. [2] A. Kraskov, H. Stögbauer and P. Grassberger, "Estimating mutual
       information", Phys. Rev. E 69:066138, 2004. doi:10.1103/PhysRevE.69.066138

    Examples
    --------
    >>> import numpy as np
    >>> from infoscope.estimators.continuous import mixed_mutual_information
    >>> rng = np.random.default_rng(3)
    >>> label = rng.integers(0, 2, size=4000)
    >>> x = rng.normal(size=4000) + 10.0 * label   # the classes do not overlap
    >>> round(mixed_mutual_information(x, label, base="bits"), 2)  # truth: H(label) = 1 bit
    1.0
    """
    ln_base = log_base(base)
    xs = _as_samples(x_continuous, "x_continuous")
    codes = _as_labels(y_discrete, "y_discrete")
    n = check_same_length(x_continuous=xs, y_discrete=codes)
    k = _check_k(k, n)
    small_classes = check_choice(small_classes, ("shrink", "error"), "small_classes")
    jitter, rng = _check_noise_options(jitter, seed, standardize)

    class_sizes = np.bincount(codes)
    small = np.flatnonzero(class_sizes <= k)
    if small.size:
        labels = np.unique(np.asarray(y_discrete).reshape(-1))
        detail = ", ".join(f"{_plain(labels[c])!r} ({class_sizes[c]})" for c in small[:5])
        more = f" and {small.size - 5} more" if small.size > 5 else ""
        if small_classes == "error":
            raise ValueError(
                f"k={k} needs classes of at least k + 1 = {k + 1} members; y_discrete has "
                f"{small.size} smaller class(es): {detail}{more}"
            )
        warn_user(
            f"y_discrete has {small.size} class(es) with k={k} or fewer members: {detail}{more}; "
            "they use fewer neighbours and single-member classes are left out",
            SmallSampleWarning,
        )

    keep = class_sizes[codes] > 1
    if keep.sum() < 2:
        raise ValueError(
            "y_discrete has no class with two or more members, so no within-class "
            "neighbour exists; mutual information cannot be estimated"
        )
    xs = xs[keep]
    codes = codes[keep]
    n_used = xs.shape[0]
    if np.all(np.ptp(xs, axis=0) == 0):
        return 0.0  # a constant variable shares no information with anything
    _warn_if_discrete_looking(xs, "x_continuous")
    xs = _prepare_for_mi(xs, bool(standardize), jitter, rng)

    radius = np.empty(n_used)
    k_used = np.empty(n_used)
    order = np.argsort(codes, kind="stable")
    bounds = np.flatnonzero(np.diff(codes[order])) + 1
    for members in np.split(order, bounds):
        k_c = min(k, members.size - 1)
        pts = xs[members]
        radius[members], _ = _kth_neighbour_radius(cKDTree(pts), pts, k_c, np.inf)
        k_used[members] = k_c
    n_zero = int(np.count_nonzero(radius == 0))
    if n_zero:
        raise ValueError(
            f"{n_zero} point(s) of x_continuous have at least k exact duplicates within "
            "their class, so their neighbour distance is 0; pass jitter > 0 (default "
            "1e-10) to break ties, or use a discrete estimator"
        )
    # Points of the whole sample strictly closer than the radius, the point itself included.
    m = _strict_counts(cKDTree(xs), xs, radius) + 1
    sizes_used = np.bincount(codes)[codes].astype(float)
    mi = digamma(n_used) + np.mean(digamma(k_used)) - np.mean(digamma(sizes_used)) - np.mean(digamma(m.astype(float)))
    return _in_unit(float(mi), clip, ln_base)
