"""The entropy table of a profile: one row per column (``ProfileSession.entropy()``)."""
from __future__ import annotations

import math

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.encode.columns import MISSING_LABEL
from infoscope.estimators._checks import log_base
from infoscope.estimators.intervals import entropy_standard_error
from infoscope.estimators.resampling import bootstrap_entropy_ci
from infoscope.frame.results import (
    ENTROPY_COLUMNS,
    RARE_LEVEL_ROWS,
    RARE_LEVEL_SHARE,
    RARE_LEVELS_TOTAL,
    SPARSE_CELL_COUNT,
    result_frame,
)
from infoscope.frame.tables.estimates import _child_seed


def _z(level: float) -> float:
    """The two-sided normal quantile of a confidence level (1.96 at 95%)."""
    from scipy.stats import norm

    return float(norm.ppf((1.0 + float(level)) / 2.0))


def _alphabet_is_fixed(col) -> bool:
    """True when the encoding, not the sample, sets the alphabet (so H <= log K)."""
    return col.edges is not None or col.kind in ("boolean", "categorical")



def _has_rare_levels(col, counts: np.ndarray, missing: str) -> bool:
    """Whether a levels column has a tail of rare levels (the ``rare_levels`` flag).

    ``counts`` are the column's own symbol counts (unfolded when folded).  Binned,
    ID-like and constant columns never get the flag: their bins are the intended
    symbols, or ``id_like`` / ``constant`` already say more.
    """
    if col.edges is not None or "id_like" in col.flags or "constant" in col.flags:
        return False
    levels = np.asarray(counts, dtype=np.int64)
    if missing == "category" and col.n_missing:
        if getattr(col, "level_counts", None) is not None:
            levels = levels[:-1]  # the missing symbol was appended last
        elif MISSING_LABEL in col.labels:
            levels = np.delete(levels, col.labels.index(MISSING_LABEL))
    levels = levels[levels > 0]  # unused categories are not rare, they are absent
    total = int(levels.sum())
    if total == 0 or levels.size < 2:
        return False
    threshold = max(RARE_LEVEL_ROWS, RARE_LEVEL_SHARE * total)
    return bool(levels[levels < threshold].sum() >= RARE_LEVELS_TOTAL * total)




class EntropyTable:
    """Session part: :meth:`entropy` (see :mod:`infoscope.frame.tables`)."""

    def entropy(self) -> pd.DataFrame:
        """One row per column: entropy with a bootstrap interval, max H and flags.

        Returns
        -------
        pandas.DataFrame
            Columns ``column, kind, k, n, missing, missing_share, entropy, ci_low,
            ci_high, max_entropy, efficiency, effective_categories, flags``:
            ``n`` rows profiled, ``missing`` of them missing; ``entropy`` of the
            non-missing values (missing included as a symbol under
            ``missing="category"``) with the session's estimator, its bootstrap
            interval at level ``ci`` (seeded multinomial resampling of the counts; the centred
            interval of :func:`infoscope.estimators.resampling.bootstrap_entropy_ci`:
            the percentile interval shifted by the bootstrap estimate of bias, so
            it always contains the estimate); ``max_entropy = log K``;
            ``efficiency = entropy / max_entropy``; ``effective_categories =
            base ** entropy`` (the number of equally likely symbols with the same
            entropy; the same number in every unit); ``flags`` comma-separated,
            from the encoder plus ``sparse_cells`` (fewer than 5 observations per
            symbol on average), ``rare_levels`` (see below), ``exceeds_log_k``
            (see below) and ``one_bin`` (a binned column with more than one
            value that its bin rule put into a single bin: entropy 0 by the
            binning, and every normalised measure of its pairs undefined).
            ``attrs``: unit,
            estimator, sampled, and ``folded_in_pairs``: ``{column: k}`` for the
            columns whose levels were folded.

            **Folded columns.**  When ``max_categories`` folds rare levels into
            ``"(other)"`` (flag ``levels_folded``), the pair tables, the
            information grid and :meth:`matrix` use the folded alphabet (``k`` of
            :meth:`pairs`, ``attrs["folded_in_pairs"]``), but this table estimates
            the column's own entropy, interval, ``k`` (= distinct non-missing
            values, plus the missing symbol under ``missing="category"``), max H,
            efficiency and effective categories from the counts of every level
            before folding: an identifier of 50,000 distinct values reads about
            15.6 bits, not the 0.02 bits of its folded codes.

            **Rare levels.**  A column kept as levels (not binned, not ID-like) is
            flagged ``rare_levels`` when its rare levels (each fewer than 5 rows or
            under 1% of the non-missing rows, whichever is more) together hold at
            least 5% of the non-missing rows: such a tail spreads rows over many
            thin cells in every pair table and its small counts can identify
            people (common practice: 5 as the small-cell threshold of official
            statistics and of chi-square tables, 1% as the usual share below
            which a category is grouped as rare).

            **Above log K.**  A bias correction can carry an estimate past log K.
            Where the encoding fixes the alphabet (binned numeric, datetime and
            duration columns, booleans, pandas Categoricals with their declared
            categories) the entropy cannot exceed log K: the estimate is clipped
            to log K, and so is every bootstrap replicate, so the interval is that
            of the clipped estimator and keeps its spread below log K (a column
            in equal quantile bins reads log K with an interval just below it,
            not the point [log K, log K]).  Where K is only the number of levels
            seen (text, integer levels), flag ``exceeds_log_k`` when the estimate
            is above log K of the observed levels by more than ``z`` of its
            standard errors (``z`` = 1.96 at ``ci=0.95``; second-order standard
            error, :func:`infoscope.estimators.intervals.entropy_standard_error`):
            the bias correction credits levels the sample has not seen, and K is
            a lower bound of the true alphabet.  A smaller excess is sampling
            noise of a near-even column (a balanced 0/1 column reads
            log 2 + 1 / (2N) nats under Miller-Madow) and is not flagged.  Those
            numbers are kept as computed, so ``efficiency``
            is then above 1 and ``effective_categories`` above ``k`` (an
            all-distinct identifier under Miller-Madow reads
            log K + (K - 1) / (2 n) nats).

        References
        ----------
        .. [1] Shannon, C. E. (1948). A mathematical theory of communication. Bell
           System Technical Journal, 27, 379-423, 623-656.
        .. [2] Efron, B., & Tibshirani, R. J. (1993). An Introduction to the
           Bootstrap. Chapman & Hall, ch. 10 (bias correction) and ch. 13
           (percentile intervals).

        Examples
        --------
        >>> from infoscope.frame.session import ProfileSession
        >>> import pandas as pd
        >>> s = ProfileSession(pd.DataFrame({"c": list("aabb") * 10}), estimator="plugin", n_boot=0)
        >>> float(s.entropy().loc[0, "entropy"])
        1.0
        """
        s = self._settings
        divisor = log_base(s["base"])
        rows = []
        folded_in_pairs: dict[str, int] = {}
        settings_key = (s["estimator"], s["alpha"] if s["estimator"] == "dirichlet" else None,
                        s["base"], s["missing"], s["ci"], s["n_boot"], s["seed"])
        for i, key in enumerate(self._names):
            col = self._encoded[key]
            if getattr(col, "level_counts", None) is not None:
                folded_in_pairs[key] = int(col.k)
            # the live views ask for this table after every control change: a row
            # depends only on the encoded column, its position (the bootstrap seed)
            # and these settings, so unchanged columns are served from the cache
            hit = self._entropy_cache.get(key)
            if hit is not None and hit[0] is col and hit[1] == (i, settings_key):
                if hit[3]:  # no observed value: the warning of a fresh computation
                    warn_user(f"column {key!r} has no non-missing values: its entropy is "
                                  "undefined (NaN)", DataQualityWarning)
                rows.append(dict(hit[2]))
                continue
            marginal = np.asarray(self._engine.marginal(key), dtype=np.int64)
            counts, k = self._symbol_counts(col, marginal)
            observed = int(counts.sum())
            flags = list(col.flags)
            h = self._entropy(counts)
            low = high = math.nan
            if observed == 0:
                warn_user(f"column {key!r} has no non-missing values: its entropy is undefined (NaN)",
                              DataQualityWarning)
            elif s["n_boot"] > 0 and np.count_nonzero(counts) > 1:
                # clipped to [0, log K] replicate by replicate where the encoding
                # fixes the alphabet (resampling module notes, "Bounds")
                low, high = bootstrap_entropy_ci(counts, level=s["ci"], n_boot=s["n_boot"],
                                                 seed=_child_seed(s["seed"], i),
                                                 fixed_alphabet=_alphabet_is_fixed(col), **self._kw())
            elif s["n_boot"] > 0:
                low = high = h  # one symbol: every resample is the same
            if observed and observed / k < SPARSE_CELL_COUNT and "sparse_cells" not in flags:
                flags.append("sparse_cells")
            if _has_rare_levels(col, counts, s["missing"]):
                flags.append("rare_levels")
            max_h = math.log(k) / divisor if k >= 1 else math.nan
            # a bias correction adds to the plug-in estimate and can carry it past
            # log K (tolerance: float rounding of a uniform plug-in).  Where the
            # encoding fixes the alphabet (bins, booleans, declared categories) the
            # entropy cannot exceed log K, so the estimate and its interval are
            # clipped there; where K is only the number of levels seen (text,
            # integer levels) K is a lower bound of the true alphabet, the number
            # is kept as computed and the row says so.
            if (not math.isnan(h) and not math.isnan(max_h)
                    and h > max_h + 1e-12 * max(1.0, abs(max_h))):
                if _alphabet_is_fixed(col):
                    h = max_h
                elif h - max_h > _z(s["ci"]) * entropy_standard_error(counts, base=s["base"]):
                    # only an excess beyond the estimate's own sampling noise is a
                    # finding: a balanced 0/1 column reads log 2 + 1 / (2 N) under
                    # Miller-Madow, inside its standard error
                    flags.append("exceeds_log_k")
            if _alphabet_is_fixed(col) and not math.isnan(max_h):
                low, high = min(low, max_h), min(high, max_h)
            if col.edges is not None and k == 1 and col.n_distinct > 1:
                # the binning, not the data, left no entropy (a rule such as
                # "knuth" can give a uniform sample one bin): say so; the pair
                # views then have nothing to normalise by (NMI is NaN)
                flags.append("one_bin")
            rows.append({
                "column": key, "kind": col.kind, "k": int(k), "n": int(col.n),
                "missing": int(col.n_missing),
                "missing_share": col.n_missing / col.n if col.n else math.nan,
                "entropy": h, "ci_low": float(low), "ci_high": float(high),
                "max_entropy": max_h,
                "efficiency": h / max_h if max_h > 0 and not math.isnan(h) else math.nan,
                "effective_categories": math.exp(h * divisor) if not math.isnan(h) else math.nan,
                "flags": ",".join(flags),
            })
            self._entropy_cache[key] = (col, (i, settings_key), dict(rows[-1]), observed == 0)
        return result_frame(rows, ENTROPY_COLUMNS, **self._attrs(folded_in_pairs=folded_in_pairs))

    def _symbol_counts(self, col, marginal: np.ndarray) -> tuple[np.ndarray, int]:
        """The counts and alphabet size a column's own entropy is estimated from.

        When levels were folded into ``"(other)"`` (``col.level_counts`` is set),
        the unfolded counts of every level (plus the missing symbol under
        ``missing="category"``) and ``K = n_distinct`` (+ 1); otherwise the
        engine's marginal (the pair tables' alphabet) and ``col.k``.
        """
        level_counts = getattr(col, "level_counts", None)
        if level_counts is None:
            return marginal, int(col.k)
        counts = np.asarray(level_counts, dtype=np.int64)
        k = int(col.n_distinct)
        if self._settings["missing"] == "category" and col.n_missing:
            counts = np.append(counts, np.int64(col.n_missing))
            k += 1
        return counts, k
