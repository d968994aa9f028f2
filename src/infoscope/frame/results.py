"""The tidy result tables of the frame layer: their columns, attrs and one-pair table.

The column lists here are the contract of DEVELOPERS.md ("Result tables"); the
views and the exports read them, so they are defined once and every builder in
:mod:`infoscope.frame.session` uses them.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

__all__ = [
    "DRIFT_COLUMNS",
    "DRIFT_THRESHOLDS",
    "ENTROPY_COLUMNS",
    "LEAKAGE_SHARE",
    "PAIRS_COLUMNS",
    "RELEVANCE_COLUMNS",
    "SPARSE_CELL_COUNT",
    "PairTable",
    "drift_flag",
    "result_frame",
]

ENTROPY_COLUMNS = (
    "column", "kind", "k", "n", "missing", "missing_share", "entropy", "ci_low", "ci_high",
    "max_entropy", "efficiency", "effective_categories", "flags",
)
PAIRS_COLUMNS = (
    "a", "b", "k_a", "k_b", "n", "mi", "nmi", "value", "g", "dof", "p_value", "q_value", "sparse",
)
RELEVANCE_COLUMNS = (
    "column", "k", "n", "mi", "ci_low", "ci_high", "nmi", "p_value", "q_value",
    "share_of_target", "leakage", "sparse",
)
DRIFT_COLUMNS = ("column", "kind", "k", "n", "n_reference", "psi", "kl", "js", "p_value", "flag")

#: Fewer than this many observations per cell on average marks a table as sparse
#: (common practice for chi-square style tables: expected counts of at least 5).
SPARSE_CELL_COUNT = 5.0

#: A column whose MI with the target is at least this share of H(target) is
#: flagged as a possible leak: it nearly determines the target.
LEAKAGE_SHARE = 0.95

#: PSI thresholds (common practice in credit scoring, e.g. Siddiqi 2006):
#: below 0.10 stable, 0.10 to 0.25 moderate, 0.25 and above major.
DRIFT_THRESHOLDS = (0.10, 0.25)


def drift_flag(psi_value: float) -> str:
    """"stable" / "moderate" / "major" for a PSI value (NaN -> "stable" is not assumed).

    A NaN PSI (nothing to compare) is reported as "" so that no view shows a
    verdict that was not computed.
    """
    if not np.isfinite(psi_value) and not np.isinf(psi_value):
        return ""
    low, high = DRIFT_THRESHOLDS
    if psi_value < low:
        return "stable"
    if psi_value < high:
        return "moderate"
    return "major"


def result_frame(rows: list[dict], columns: tuple[str, ...], **attrs) -> pd.DataFrame:
    """A DataFrame with exactly ``columns`` in order and ``attrs`` set."""
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
        ``(statistic, dof, p_value)`` of the G-test of independence.
    n : int
        Number of rows where both columns are present.
    unit : str
        Unit of ``mi`` and ``pmi``.
    sparse : bool
        Fewer than 5 observations per cell on average.
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

    def __repr__(self) -> str:
        shape = f"{self.counts.shape[0]} x {self.counts.shape[1]}"
        return (f"PairTable({self.a!r} x {self.b!r}: {shape} cells, n={self.n}, "
                f"mi={self.mi:.4g} {self.unit}, nmi={self.nmi:.3g}, p={self.g_test[2]:.3g})")
