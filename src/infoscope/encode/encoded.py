"""The contract every later layer reads: :class:`EncodedColumn`, its kinds, flags and labels."""
from __future__ import annotations

import dataclasses

import numpy as np

__all__ = ["EncodedColumn", "codes_dtype", "KINDS", "FLAGS", "MISSING_LABEL", "OTHER_LABEL"]


KINDS = ("numeric", "integer_categories", "categorical", "boolean", "datetime", "timedelta", "text")
FLAGS = (
    "constant", "id_like", "mostly_missing", "sparse_cells", "heavy_tail",
    "levels_folded", "mixed_types", "infinite_values", "rare_levels", "exceeds_log_k", "one_bin",
)
MISSING_LABEL = "(missing)"
OTHER_LABEL = "(other)"


def codes_dtype(k: int) -> np.dtype:
    """Smallest unsigned dtype holding codes ``0 .. k`` (``k`` is the missing code).

    Parameters
    ----------
    k : int
        Alphabet size.

    Returns
    -------
    numpy.dtype
        ``uint8`` when ``k + 1 <= 256``, else ``uint16`` when ``k + 1 <= 65536``,
        else ``uint32``.

    Examples
    --------
    >>> codes_dtype(255), codes_dtype(256)
    (dtype('uint8'), dtype('uint16'))
    """
    if k + 1 <= 2**8:
        return np.dtype(np.uint8)
    if k + 1 <= 2**16:
        return np.dtype(np.uint16)
    return np.dtype(np.uint32)


@dataclasses.dataclass(frozen=True, eq=False)
class EncodedColumn:
    """One column as small integer codes (the contract in DEVELOPERS.md).

    Attributes
    ----------
    name : str
        The key of the column (unique within a profile).
    codes : numpy.ndarray
        1-D ``uint8`` / ``uint16`` / ``uint32`` (smallest holding ``k``), C-contiguous
        and read-only.  ``0 .. k-1`` are symbols; ``k`` marks a missing row (only
        under ``missing="drop"``).
    k : int
        Alphabet size (unused categories and the missing symbol included).
    labels : tuple of str
        Length ``k``; bins read ``"[a, b)"`` (the last ``"[a, b]"``).
    kind : str
        One of :data:`KINDS`.
    n, n_missing : int
        Rows, and rows missing (NaN, None, NA, NaT, ±inf).
    edges : numpy.ndarray or None
        Bin edges of a binned column (float64; ``datetime64``/``timedelta64`` in the
        column's unit, UTC for zoned datetimes), else None.
    flags : tuple of str
        Names from :data:`FLAGS` that encoding can tell.
    settings : tuple
        The hashable encoding settings (``(content_key, settings)`` keys the cache).
    n_distinct : int
        Distinct non-missing values before binning or folding.
    level_counts : numpy.ndarray or None, default=None
        Only when levels were folded into ``"(other)"`` (flag ``levels_folded``):
        the rows of every distinct non-missing level *before* folding, int64,
        most frequent first (ties in the order the labels are kept), read-only; its length is
        ``n_distinct`` and its sum ``n - n_missing``.  An entropy computed from the
        folded codes undercounts a long-tailed or ID-like column (50,000 distinct
        IDs folded to 64 symbols read about 0.02 bits instead of about 15.6);
        these counts give the unfolded entropy.  None when nothing was folded and
        for binned columns (their codes are the intended symbols).  It is derived
        from the content and settings, so it is not part of ``settings``; the
        class compares by identity (``eq=False``), so it does not affect caching.
    """

    name: str
    codes: np.ndarray
    k: int
    labels: tuple
    kind: str
    n: int
    n_missing: int
    edges: np.ndarray | None
    flags: tuple
    settings: tuple
    n_distinct: int
    level_counts: np.ndarray | None = None

    @property
    def missing_code(self) -> int | None:
        """The code of a missing row: ``k`` under ``missing="drop"``, else the missing symbol or None."""
        if dict(self.settings).get("missing") == "drop":
            return self.k
        try:
            return self.labels.index(MISSING_LABEL)
        except ValueError:
            return None

    def counts(self) -> np.ndarray:
        """Rows per symbol, int64 of length ``k`` (missing rows under "drop" not counted)."""
        return np.bincount(self.codes, minlength=self.k + 1)[: self.k].astype(np.int64)

    def __repr__(self) -> str:
        flags = ", ".join(self.flags) or "none"
        return (
            f"EncodedColumn(name={self.name!r}, kind={self.kind!r}, k={self.k}, n={self.n}, "
            f"n_missing={self.n_missing}, n_distinct={self.n_distinct}, flags=[{flags}])"
        )
