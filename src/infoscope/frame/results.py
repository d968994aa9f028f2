"""The tidy result tables of the frame layer: their columns, attrs and one-pair table.

The column lists here are the contract of DEVELOPERS.md ("Result tables"); the
views and the exports read them, so they are defined once and every builder in
:mod:`infoscope.frame.session` uses them.
"""
from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

__all__ = [
    "DRIFT_COLUMNS",
    "DRIFT_FLAGS",
    "DRIFT_THRESHOLDS",
    "ENTROPY_COLUMNS",
    "LEAKAGE_SHARE",
    "PAIRS_COLUMNS",
    "RARE_LEVEL_ROWS",
    "RARE_LEVEL_SHARE",
    "RARE_LEVELS_TOTAL",
    "RELEVANCE_COLUMNS",
    "SPARSE_CELL_COUNT",
    "PairTable",
    "TEST_LEVEL",
    "drift_flag",
    "drift_verdict",
    "result_frame",
]

ENTROPY_COLUMNS = (
    "column", "kind", "k", "n", "missing", "missing_share", "entropy", "ci_low", "ci_high",
    "max_entropy", "efficiency", "effective_categories", "flags",
)
PAIRS_COLUMNS = (
    "a", "b", "k_a", "k_b", "n", "mi", "mi_above_chance", "ci_low", "ci_high", "nmi", "value",
    "g", "dof", "p_value", "q_value", "p_method", "n_permutations", "p_error", "reliability",
)
RELEVANCE_COLUMNS = (
    "column", "k", "n", "mi", "mi_above_chance", "ci_low", "ci_high", "nmi", "p_value", "q_value",
    "share_of_target", "leakage", "p_method", "n_permutations", "p_error", "reliability",
)
DRIFT_COLUMNS = (
    "column", "kind", "k", "n", "n_reference", "psi", "psi_chance", "psi_chance_high",
    "kl", "kl_chance", "js", "js_chance", "p_value", "q_value", "new_share", "flag",
)

#: Fewer than this many observations per cell on average marks a table as sparse
#: (common practice for chi-square style tables: expected counts of at least 5).
SPARSE_CELL_COUNT = 5.0

#: ``rare_levels``: a level is rare when it has fewer than this many rows (common
#: practice: 5 is the usual small-cell threshold of official statistics and the
#: minimum expected count of chi-square tables) ...
RARE_LEVEL_ROWS = 5
#: ... or holds under this share of the non-missing rows (common practice: the
#: usual share below which a category is grouped as rare);
RARE_LEVEL_SHARE = 0.01
#: a column is flagged when its rare levels together hold at least this share.
RARE_LEVELS_TOTAL = 0.05

#: A column whose MI with the target is at least this share of H(target) is
#: flagged as a possible leak: it nearly determines the target.
LEAKAGE_SHARE = 0.95

#: PSI thresholds (common practice in credit scoring, e.g. Siddiqi 2006):
#: below 0.10 stable, 0.10 to 0.25 moderate, 0.25 and above major.
DRIFT_THRESHOLDS = (0.10, 0.25)


#: The significance level of every flag that reads a q-value (drift flags, the
#: CLI's ``--fail-on``): a change counts when its Benjamini-Hochberg q-value is
#: below it (common practice: a 5 % false discovery rate).
TEST_LEVEL = 0.05

#: The values of the drift table's ``flag`` column and their legend text (for the
#: CLI, the widget and the exports).  The PSI bands 0.10 / 0.25 are common
#: practice in credit scoring; they are read on the PSI beyond chance.
DRIFT_FLAGS = {
    "stable": "no change beyond chance, or a significant one whose PSI beyond chance is below 0.10",
    "moderate": "significant (q < 0.05) and PSI beyond chance 0.10 to 0.25 (common-practice band): "
                "a moderate change, worth a look",
    "major": "significant (q < 0.05) and PSI beyond chance 0.25 or more (common-practice band): "
             "a major change of distribution",
    "within_chance": "PSI reads 0.10 or more, but sampling alone gives as much at these sample "
                     "sizes (q >= 0.05): more rows or fewer bins would tell",
    "id_like": "identifier: new values in every batch by construction (PSI not a change of distribution)",
    "time_axis": "time axis: the batch covers another period (PSI not a change of distribution)",
    "type_changed": "the column's type changed: its values cannot share the reference's alphabet "
                    "(not compared)",
}

def drift_flag(psi_value: float) -> str:
    """The drift verdict of a PSI value.

    Parameters
    ----------
    psi_value : float
        Population stability index (nats).

    Returns
    -------
    str
        ``"stable"`` below 0.10, ``"moderate"`` from 0.10 to below 0.25,
        ``"major"`` from 0.25 (infinity included); ``""`` for NaN (nothing was
        compared), so that no view shows a verdict that was not computed.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (the thresholds;
       common practice in credit scoring).

    Examples
    --------
    >>> drift_flag(0.05), drift_flag(0.1), drift_flag(0.3), drift_flag(float("nan"))
    ('stable', 'moderate', 'major', '')
    """
    if np.isnan(psi_value):
        return ""
    low, high = DRIFT_THRESHOLDS
    if psi_value < low:
        return "stable"
    if psi_value < high:
        return "moderate"
    return "major"


def drift_verdict(psi_value: float, psi_chance: float, q_value: float, *, level: float = TEST_LEVEL) -> str:
    """The drift flag of a column from its size and its significance together.

    Parameters
    ----------
    psi_value : float
        Observed population stability index (nats).
    psi_chance : float
        PSI expected from sampling alone at the same sample sizes (the mean of
        the permutation splits).
    q_value : float
        The column's Benjamini-Hochberg q-value.
    level : float, default=0.05
        Significance level.

    Returns
    -------
    str
        ``"major"`` / ``"moderate"`` when ``q_value < level`` and the PSI beyond
        chance (``psi_value - psi_chance``) reaches 0.25 / 0.10; ``"within_chance"``
        when the PSI itself reads 0.10 or more but the change is not significant;
        ``"stable"`` otherwise; ``""`` when nothing was compared (NaN).

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (the PSI bands;
       common practice in credit scoring).
    .. [2] Benjamini, Y., & Hochberg, Y. (1995). Journal of the Royal Statistical
       Society B, 57(1), 289-300.

    Examples
    --------
    >>> drift_verdict(0.30, 0.01, 0.001), drift_verdict(0.30, 0.2, 0.4), drift_verdict(0.02, 0.0, 0.001)
    ('major', 'within_chance', 'stable')
    """
    if np.isnan(psi_value) or np.isnan(q_value):
        return ""
    if q_value < level:
        excess = psi_value - (0.0 if np.isnan(psi_chance) else psi_chance)
        return drift_flag(max(excess, 0.0))
    return "within_chance" if psi_value >= DRIFT_THRESHOLDS[0] else "stable"


def result_frame(rows: list[dict], columns: tuple[str, ...], **attrs) -> pd.DataFrame:
    """A result table: exactly ``columns``, in order, with ``attrs`` set.

    Parameters
    ----------
    rows : list of dict
        One dict per row.
    columns : tuple of str
        The table's columns (one of the ``*_COLUMNS`` tuples).
    **attrs
        Stored in ``DataFrame.attrs`` (unit, estimator, sampled, ...).

    Returns
    -------
    pandas.DataFrame

    Examples
    --------
    >>> result_frame([{"a": 1, "b": 2}], ("b", "a"), unit="bits").attrs
    {'unit': 'bits'}
    """
    frame = pd.DataFrame(rows, columns=list(columns))
    if not rows:
        frame = pd.DataFrame({c: pd.Series(dtype=object) for c in columns})
    frame.attrs.update(attrs)
    return frame


@dataclass(frozen=True)
class PairTable:
    """The joint table of one pair of columns (the *pair view*).

    Attributes
    ----------
    a, b : str
        Column keys: ``a`` labels the rows, ``b`` the columns.
    counts : pandas.DataFrame
        Pairwise-complete joint counts, index = labels of ``a``, columns = labels of ``b``.
    expected : pandas.DataFrame
        Counts expected under independence, ``row total * column total / n``.
    pmi : pandas.DataFrame
        Pointwise mutual information of each cell in the profile's unit (plug-in;
        ``-inf`` for an empty cell whose row and column are not empty, NaN for a cell
        of an empty row or column).
    mi : float
        Mutual information with the profile's estimator.
    nmi : float
        Normalised mutual information (the profile's normalisation).
    g_test : GTestResult
        ``(statistic, dof, p_value)`` of the test of independence: G, its degrees
        of freedom and the p-value of ``p_method`` (as in ``pairs()``).
    n : int
        Number of rows where both columns are present.
    unit : str
        Unit of ``mi`` and ``pmi``.
    sparse : bool
        Fewer than 5 observations per non-empty cell on average (``reliability`` is
        not ``"ok"``).
    p_method, n_permutations, p_error, reliability
        As the columns of ``pairs()``: how the p-value was found, with how many
        shuffles and what Monte-Carlo error; ``"ok"`` / ``"sparse"`` / ``"too_few"``.
    hidden : dict or None
        Set by :meth:`suppressed` only: ``{"min_count", "small", "complementary",
        "kinds"}`` (see there); ``None`` for a table with nothing hidden.
    """

    a: str
    b: str
    counts: pd.DataFrame
    expected: pd.DataFrame
    pmi: pd.DataFrame
    mi: float
    nmi: float
    g_test: tuple
    n: int
    unit: str = "bits"
    sparse: bool = False
    attrs: dict = field(default_factory=dict)
    hidden: dict | None = None
    p_method: str = "chi2"
    n_permutations: int = 0
    p_error: float = 0.0
    reliability: str = "ok"

    def suppressed(self, min_count) -> "PairTable":
        """A copy with small cells, and the cells that would give them away, hidden.

        Cells with ``0 < count < min_count`` are *small*; further cells are hidden
        (*complementary*) until no row or column total, nor both together, gives a
        hidden count back (:func:`infoscope.frame.suppression.suppression_mask`).
        Hidden cells hold ``pandas.NA`` in ``counts`` (nullable ``Int64``) and NaN in
        ``expected`` and ``pmi``. The mutual information, G-test and ``n`` are kept:
        they come from the full table and narrow the hidden counts only as far as
        the module documentation of :mod:`infoscope.frame.suppression` says.

        Parameters
        ----------
        min_count : int or None
            The threshold; ``None``, 0 or 1 hide nothing (a copy is returned).

        Returns
        -------
        PairTable
            With ``hidden = {"min_count": int, "small": [(row, col), ...],
            "complementary": [(row, col), ...], "kinds": ndarray}`` (labels of
            ``a`` and ``b``; ``kinds`` holds 0 shown, 1 small, 2 complementary),
            or ``hidden=None`` when no cell is hidden.

        Notes
        -----
        Threshold rules with complementary (secondary) suppression are common
        practice in official statistics for tables of counts.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": list("xxxxxxxxxxxxy") * 2, "b": list("pqpqpqpqpqpqq") * 2})
        >>> hidden = df.info_profile.pair("a", "b", estimator="plugin").suppressed(5).hidden
        >>> hidden["small"], len(hidden["complementary"])
        ([('y', 'q')], 3)
        """
        from infoscope.frame.suppression import COMPLEMENTARY, SMALL, check_min_count, suppression_kinds

        threshold = check_min_count(min_count)
        previous = (self.hidden or {}).get("kinds")
        raw = self.counts.to_numpy(dtype=np.float64, na_value=np.nan)
        kinds = suppression_kinds(raw, threshold, previous=previous)
        mask = kinds != 0
        if not mask.any():
            return replace(self, hidden=None)
        keep = pd.DataFrame(~mask, index=self.counts.index, columns=self.counts.columns)
        rows, cols = list(self.counts.index), list(self.counts.columns)

        def cells(kind):
            return [(rows[i], cols[j]) for i, j in zip(*np.nonzero(kinds == kind))]

        old = (self.hidden or {}).get("min_count") or 0
        hidden = {"min_count": max(int(old), threshold or 0), "small": cells(SMALL),
                  "complementary": cells(COMPLEMENTARY), "kinds": kinds}
        return replace(self, counts=self.counts.astype("Int64").where(keep, pd.NA),
                       expected=self.expected.where(keep), pmi=self.pmi.where(keep),
                       hidden=hidden)

    def __repr__(self) -> str:
        shape = f"{self.counts.shape[0]} x {self.counts.shape[1]}"
        return (f"PairTable({self.a!r} x {self.b!r}: {shape} cells, n={self.n}, "
                f"mi={self.mi:.4g} {self.unit}, nmi={self.nmi:.3g}, p={self.g_test[2]:.3g})")
