"""``ProfileSession``: the state a profile view holds, and the tidy result tables.

A session holds one frame (never modified), its unique column keys, the settings,
per-column bins overrides, the encoded columns and one :class:`PairEngine`.  The
methods turn the engine's count tables into the result tables of DEVELOPERS.md
("Result tables"); ``update`` re-encodes only the columns whose effective
settings changed, so the engine recounts only the pairs that touch them.

Data flow: frame -> :mod:`infoscope.encode` -> :mod:`infoscope.engine` ->
:mod:`infoscope.estimators` -> the tables built here.
"""
from __future__ import annotations

import math
import numbers
import warnings
from collections.abc import Mapping

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, SmallSampleWarning
from infoscope.estimators._checks import check_choice, log_base, unit_name
from infoscope.frame.results import (
    DRIFT_COLUMNS,
    ENTROPY_COLUMNS,
    LEAKAGE_SHARE,
    PAIRS_COLUMNS,
    RARE_LEVEL_ROWS,
    RARE_LEVEL_SHARE,
    RARE_LEVELS_TOTAL,
    RELEVANCE_COLUMNS,
    SPARSE_CELL_COUNT,
    PairTable,
    result_frame,
)

__all__ = ["MEASURES", "ORDERS", "ProfileSession", "as_pandas", "column_keys"]

#: Pair measures: name -> what the ``value`` column of ``pairs()`` holds.
MEASURES = {
    "mi": "mutual information (the session's estimator), in the session's unit",
    "nmi": "normalised mutual information (the session's normalisation), unit-free",
    "adjusted_mi": "mutual information adjusted for chance (Vinh, Epps & Bailey 2010), unit-free",
    "vi": "variation of information H(A|B) + H(B|A) (Meila 2007), a distance in the session's unit",
}
ORDERS = ("name", "cluster")
_MISSING_POLICIES = ("drop", "category")

_DEFAULTS = {
    "bins": 16,
    "strategy": "quantile",
    "estimator": "miller_madow",
    "alpha": None,
    "base": 2,
    "missing": "drop",
    "max_categories": 64,
    "target": None,
    "measure": "mi",
    "normalization": "arithmetic",
    "sample": None,
    "seed": 0,
    "ci": 0.95,
    "n_boot": 200,
}
# the settings that change how a column is encoded (the rest only change numbers)
_ENCODING_SETTINGS = ("bins", "strategy", "missing", "max_categories")


# ------------------------------------------------------------------ frames and keys
def as_pandas(frame, parameter: str = "frame") -> pd.DataFrame:
    """Return ``frame`` as a pandas DataFrame without modifying it.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame or polars.LazyFrame
        The data.
    parameter : str, default="frame"
        Name used in the error message.

    Returns
    -------
    pandas.DataFrame
        pandas frames are shallow-copied (with copy-on-write, pandas 3, this costs
        nothing and later edits of the user's frame do not reach the copy); Polars
        frames (eager or lazy) are converted with ``to_pandas()``.

    Raises
    ------
    TypeError
        For anything else, naming ``parameter``.

    References
    ----------
    .. [1] pandas documentation, "Copy-on-Write (CoW)".

    Examples
    --------
    >>> import pandas as pd
    >>> df = pd.DataFrame({"a": [1, 2]})
    >>> as_pandas(df) is df, as_pandas(df).equals(df)
    (False, True)
    """
    if isinstance(frame, pd.DataFrame):
        return frame.copy(deep=False)
    module = type(frame).__module__.split(".")[0]
    if module == "polars":
        if hasattr(frame, "collect") and not hasattr(frame, "to_pandas"):
            frame = frame.collect()  # a LazyFrame
        return frame.to_pandas()
    raise TypeError(
        f"{parameter} must be a pandas or Polars DataFrame, got {type(frame).__name__}"
    )


def _name_text(name) -> str:
    if isinstance(name, tuple):
        return " / ".join(_name_text(part) for part in name)
    return name if isinstance(name, str) else str(name)


def column_keys(columns, *, warn: bool = True) -> list[str]:
    """Unique string keys for column labels (``infoscope.encode.columns.column_keys``).

    Parameters
    ----------
    columns : sequence
        Column labels, e.g. ``df.columns``.
    warn : bool, default=True
        Warn (:class:`DataQualityWarning`) when labels repeat.

    Returns
    -------
    list of str
        Non-string labels become ``str(label)``, MultiIndex tuples are joined with
        ``" / "``, and repeated keys get ``" (2)"``, ``" (3)"``, ... in order of
        appearance.

    References
    ----------
    .. [1] DEVELOPERS.md, "ProfileSession" (``names``).

    Examples
    --------
    >>> column_keys(["a", "a", 3], warn=False)
    ['a', 'a (2)', '3']
    """
    from infoscope.encode.columns import column_keys as encode_keys

    return encode_keys(list(columns), warn=warn)


# ------------------------------------------------------------------ settings checks
def _check_settings(settings: Mapping) -> dict:
    from infoscope.estimators.entropy import ENTROPY_ESTIMATORS
    from infoscope.estimators.information import NORMALIZATIONS

    unknown = sorted(set(settings) - set(_DEFAULTS))
    if unknown:
        raise TypeError(
            f"unknown setting(s) {', '.join(map(repr, unknown))}; valid settings: "
            f"{', '.join(_DEFAULTS)}"
        )
    s = dict(settings)
    check_choice(s["estimator"], ENTROPY_ESTIMATORS, "estimator")
    log_base(s["base"])
    check_choice(s["missing"], _MISSING_POLICIES, "missing")
    check_choice(s["measure"], MEASURES, "measure")
    check_choice(s["normalization"], NORMALIZATIONS, "normalization")
    _check_bins(s["bins"], "bins")
    if not isinstance(s["strategy"], str):
        raise TypeError(f"strategy must be a string such as 'quantile', got {s['strategy']!r}")
    mc = s["max_categories"]
    if isinstance(mc, bool) or not isinstance(mc, numbers.Integral) or mc < 2:
        raise ValueError(f"max_categories={mc!r} must be an integer >= 2")
    ci = s["ci"]
    if isinstance(ci, bool) or not isinstance(ci, numbers.Real) or not 0.0 < float(ci) < 1.0:
        raise ValueError(f"ci={ci!r} must be a confidence level strictly between 0 and 1")
    nb = s["n_boot"]
    if isinstance(nb, bool) or not isinstance(nb, numbers.Integral) or nb < 0:
        raise ValueError(f"n_boot={nb!r} must be an integer >= 0 (0 skips the intervals)")
    sample = s["sample"]
    if sample is not None and (isinstance(sample, bool) or not isinstance(sample, numbers.Integral)
                               or sample < 1):
        raise ValueError(f"sample={sample!r} must be None or a number of rows >= 1")
    seed = s["seed"]
    if seed is not None and (isinstance(seed, bool) or not isinstance(seed, numbers.Integral)):
        raise TypeError(f"seed={seed!r} must be an integer or None")
    if s["target"] is not None and not isinstance(s["target"], str):
        raise TypeError(f"target must be a column key (a string) or None, got {s['target']!r}")
    return s


def _check_bins(bins, parameter: str):
    if isinstance(bins, str):
        from infoscope.encode.binning import BIN_RULES

        # checked here too: a rule change reaches the encoder only for binned columns
        return check_choice(bins, BIN_RULES, parameter)
    if isinstance(bins, bool) or not isinstance(bins, numbers.Integral) or bins < 1:
        raise ValueError(f"{parameter}={bins!r} must be a number of bins >= 1 or a rule name such as 'fd'")
    return int(bins)


# ------------------------------------------------------------------ the session

def _alphabet_is_fixed(col) -> bool:
    """True when the encoding, not the sample, sets the alphabet (so H <= log K)."""
    return col.edges is not None or col.kind in ("boolean", "categorical")


class ProfileSession:
    """The information profile of one frame: settings, encoded columns, one engine.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame
        The data.  It is never modified; a later change of the user's frame does
        not reach the session (pandas copy-on-write).
    bins : int or str, default=16
        Number of bins for numeric, datetime and timedelta columns, or a binning
        rule name (``"fd"``, ``"scott"``, ``"sturges"``, ``"doane"``, ``"rice"``,
        ``"sqrt"``, ``"stone"``, ``"auto"``, ``"knuth"``).
    strategy : str, default="quantile"
        ``"quantile"`` (equal frequency) or ``"uniform"`` (equal width) when ``bins``
        is a number.
    estimator : str, default="miller_madow"
        Entropy estimator (a key of ``infoscope.ENTROPY_ESTIMATORS``), used for every
        entropy and mutual information.
    alpha : float or str, optional
        Pseudocount of the ``"dirichlet"`` estimator.
    base : {2, e, 10, "bits", "nats", "hartleys"}, default=2
        Unit of the results.
    missing : {"drop", "category"}, default="drop"
        ``"drop"``: a row missing in a column is left out of that column's counts
        (pairwise-complete cases for pairs); ``"category"``: missing is a symbol.
    max_categories : int, default=64
        Categorical columns keep at most this many symbols in the pair tables;
        rarer levels are folded into one (flag ``levels_folded``).  The entropy
        table still counts every level (see :meth:`entropy`).
    target : str, optional
        Column key used by :meth:`relevance` when no target is passed.
    measure : {"mi", "nmi", "adjusted_mi", "vi"}, default="mi"
        The pair measure of the ``value`` column of :meth:`pairs` and of :meth:`matrix`.
    normalization : {"arithmetic", "min", "geometric", "max", "joint"}, default="arithmetic"
        Normalisation of NMI (and of AMI).
    sample : int, optional
        Profile a seeded random sample of this many rows (all rows when the frame
        is not longer); every table then says so in ``attrs["sampled"]``.
    seed : int, default=0
        Seed of the row sample and of the bootstrap.
    ci : float, default=0.95
        Level of the bootstrap confidence intervals.
    n_boot : int, default=200
        Bootstrap replicates (0 skips the intervals: they are NaN).

    Attributes
    ----------
    names : list of str
        Unique column keys, in frame order.
    settings : dict
        The current settings (a copy).
    n_rows : int
        Rows of the frame (before any sample).
    last_estimated : tuple of (str, str)
        The pairs the last :meth:`pairs` / :meth:`matrix` call estimated; the
        others came from the session's cache (per pair: the two encoded columns
        and the estimator settings), so after :meth:`update` or
        :meth:`set_column_bins` only the pairs touching a re-encoded column are
        re-estimated.  Entropy and relevance rows are cached the same way.

    References
    ----------
    .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
       2nd ed. Wiley (entropy, mutual information, divergences).
    .. [2] Miller, G. A. (1955). Note on the bias of information estimates. In
       H. Quastler (ed.), Information Theory in Psychology, Free Press, 95-100.

    Examples
    --------
    >>> from infoscope.datasets import make_deliveries
    >>> from infoscope.frame.session import ProfileSession
    >>> s = ProfileSession(make_deliveries(2_000)[["depot", "weight_kg", "late"]], target="late",
    ...                    n_boot=20)
    >>> s.entropy().columns[:4].tolist()
    ['column', 'kind', 'k', 'n']
    >>> sorted(s.update(bins=8)) == sorted(s.numeric_keys())
    True
    """

    def __init__(self, frame, **settings):
        merged = {**_DEFAULTS, **settings}
        self._settings = _check_settings(merged)
        pdf = as_pandas(frame)
        if pdf.shape[1] == 0:
            raise ValueError("the frame has no columns: there is nothing to profile")
        if pdf.shape[0] == 0:
            raise ValueError("the frame has no rows: there is nothing to profile")
        self._names = column_keys(pdf.columns)
        self._n_rows = int(pdf.shape[0])
        self._rows = self._sample_rows(self._n_rows)
        # one Series per key, positional (safe with repeated or odd column labels)
        self._series = {key: pdf.iloc[:, i] for i, key in enumerate(self._names)}
        self._bins_override: dict[str, object] = {}
        self._encoded: dict[str, object] = {}
        self._engine = None
        # pair key -> (column a, column b, estimator key, numbers): see _pair_stats
        self._pair_cache: dict = {}
        self._measure_cache: dict = {}
        self._entropy_cache: dict = {}  # column key -> (column, settings, row): see entropy()
        self._relevance_cache: dict = {}  # (column, target) -> (columns, settings, row)
        # measure -> (memo key, the last full pairs() table): matrix() reuses it
        self._pairs_memo: dict = {}
        self._pairs_estimated: list[tuple[str, str]] = []
        self._check_target(self._settings["target"], "target")
        self._encode(self._names)

    # ---------------------------------------------------------- state
    @property
    def names(self) -> list[str]:
        """The unique column keys, in frame order."""
        return list(self._names)

    @property
    def settings(self) -> dict:
        """A copy of the current settings."""
        return dict(self._settings)

    @property
    def n_rows(self) -> int:
        """Number of rows of the frame (before any sample)."""
        return self._n_rows

    @property
    def last_estimated(self) -> tuple:
        """The pairs whose numbers the last :meth:`pairs` / :meth:`matrix` call estimated.

        The others came from the session's pair cache (their two encoded columns
        and the estimator settings were unchanged); a call answered from the last
        table of the same settings estimates none.
        """
        return tuple(self._pairs_estimated)

    @property
    def column_bins(self) -> dict:
        """The per-column bins overrides (a copy)."""
        return dict(self._bins_override)

    @property
    def sampled(self) -> int | None:
        """Number of rows sampled, or None when every row is profiled."""
        return None if self._rows is None else int(self._rows.size)

    @property
    def engine(self):
        """The :class:`~infoscope.engine.engine.PairEngine` holding the codes."""
        return self._engine

    def column(self, name: str):
        """The encoded column of a column key.

        Parameters
        ----------
        name : str
            Column key (or the original label, e.g. a MultiIndex tuple).

        Returns
        -------
        EncodedColumn
            Codes, alphabet size, labels, kind, flags (DEVELOPERS.md, contracts).

        References
        ----------
        .. [1] DEVELOPERS.md, "EncodedColumn".

        Examples
        --------
        >>> import pandas as pd
        >>> ProfileSession(pd.DataFrame({"c": list("abca")})).column("c").labels
        ('a', 'b', 'c')
        """
        return self._encoded[self._check_name(name, "name")]

    def numeric_keys(self) -> list[str]:
        """Keys of the binned columns (numbers, datetimes, durations with bin edges).

        Returns
        -------
        list of str
            In frame order.

        References
        ----------
        .. [1] DEVELOPERS.md, "EncodedColumn" (``edges``).

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> ProfileSession(pd.DataFrame({"x": np.arange(100.0), "c": ["a"] * 100})).numeric_keys()
        ['x']
        """
        return [k for k in self._names if self._encoded[k].edges is not None]

    def __repr__(self) -> str:
        sampled = f", sampled {self.sampled} rows" if self.sampled else ""
        return f"ProfileSession({self._n_rows} rows x {len(self._names)} columns{sampled})"

    def update(self, **settings) -> set[str]:
        """Change settings; re-encode only the columns whose encoding changed.

        Parameters
        ----------
        **settings
            Any of the constructor's keyword settings.

        Returns
        -------
        set of str
            Keys of the columns that were re-encoded (their pairs are recounted).

        References
        ----------
        .. [1] DEVELOPERS.md, "ProfileSession" (the incremental path).

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> s = ProfileSession(pd.DataFrame({"x": np.linspace(0, 1, 40), "c": list("ab") * 20}))
        >>> s.update(bins=2)
        {'x'}
        >>> s.update(estimator="plugin")
        set()
        """
        merged = _check_settings({**self._settings, **settings})
        old = self._settings
        self._check_target(merged["target"], "target")
        resample = merged["sample"] != old["sample"] or (
            merged["sample"] is not None and merged["seed"] != old["seed"])
        self._settings = merged
        if resample:
            self._rows = self._sample_rows(self._n_rows)
            self._engine = None
            self._encoded.clear()
            return self._encode(self._names)
        changed = [k for k in self._names if self._needs_encoding(k, old, merged)]
        return self._encode(changed)

    def _needs_encoding(self, key: str, old: Mapping, new: Mapping) -> bool:
        """Whether a settings change can change this column's codes.

        Bins and strategy matter only to binned columns (whether a number is binned
        at all depends on its distinct values, not on ``bins``); ``max_categories``
        only to columns kept as levels; ``missing`` only to columns with missing rows.
        """
        names = ("bins", "strategy", "missing", "max_categories")
        before = dict(zip(names, self._encoding_settings(key, old)))
        after = dict(zip(names, self._encoding_settings(key, new)))
        changed = {name for name in names if before[name] != after[name]}
        col = self._encoded[key]
        relevant = {"bins", "strategy"} if col.edges is not None else {"max_categories"}
        if col.n_missing:
            relevant.add("missing")
        return bool(changed & relevant)

    def set_column_bins(self, name: str, bins) -> None:
        """Override the bins of one column (``None`` clears the override).

        Parameters
        ----------
        name : str
            Column key.
        bins : int or str or None
            Number of bins or a rule name for this column only.

        Returns
        -------
        None

        References
        ----------
        .. [1] DEVELOPERS.md, "ProfileSession" (``set_column_bins``).

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> s = ProfileSession(pd.DataFrame({"x": np.linspace(0, 1, 40)}))
        >>> s.set_column_bins("x", 2); s.column("x").k
        2
        """
        key = self._check_name(name, "name")
        if bins is None:
            self._bins_override.pop(key, None)
        else:
            self._bins_override[key] = _check_bins(bins, "bins")
        self._encode([key])

    # ---------------------------------------------------------- encoding
    def _sample_rows(self, n_rows: int):
        # The session samples before encoding (with the engine's row sampler), so
        # that the bins, the entropy table and the pair tables all rest on the
        # same rows; the engine then counts every row it is given.
        from infoscope.engine.sampling import sample_rows

        sample = self._settings["sample"]
        if sample is None:
            return None
        return sample_rows(n_rows, sample, seed=self._settings["seed"])

    def _encoding_settings(self, key: str, settings: Mapping) -> tuple:
        return (self._bins_override.get(key, settings["bins"]), settings["strategy"],
                settings["missing"], settings["max_categories"])

    def _values(self, key: str) -> pd.Series:
        series = self._series[key]
        if self._rows is not None:
            series = series.iloc[self._rows]
        return series

    def _encode(self, keys) -> set[str]:
        from infoscope.encode.columns import encode_columns

        keys = list(keys)
        jobs = []
        for key in keys:
            bins, strategy, missing, max_categories = self._encoding_settings(key, self._settings)
            jobs.append((key, self._values(key), {"bins": bins, "strategy": strategy,
                                                  "missing": missing, "max_categories": max_categories}))
        done: set[str] = set()
        # columns are encoded side by side in worker threads (numpy's sort and search
        # release the GIL); warnings still come from here, in column order
        for key, encoded in zip(keys, encode_columns(jobs)):
            self._encoded[key] = encoded
            done.add(key)
            if self._engine is not None:
                self._engine.set_column(encoded)
        if done:
            self._prune_caches()
        if self._engine is None:
            from infoscope.engine.engine import PairEngine

            self._engine = PairEngine([self._encoded[k] for k in self._names], progress=False)
        return done

    def _prune_caches(self) -> None:
        """Drop cached numbers of replaced encodings (they would keep old codes alive)."""
        enc = self._encoded
        for cache, width in ((self._pair_cache, 2), (self._measure_cache, 2),
                             (self._relevance_cache, 2), (self._entropy_cache, 1)):
            stale = []
            for key, entry in cache.items():
                names = key[-2:] if width == 2 else (key,)
                if any(enc.get(name) is not entry[j] for j, name in enumerate(names)):
                    stale.append(key)
            for key in stale:
                del cache[key]

    # ---------------------------------------------------------- helpers
    def _check_name(self, name, parameter: str) -> str:
        if isinstance(name, str) and name in self._series:
            return name
        label = _name_text(name) if isinstance(name, tuple) else name
        if isinstance(label, str) and label in self._series:
            return label
        shown = ", ".join(repr(k) for k in self._names[:12]) + (" ..." if len(self._names) > 12 else "")
        raise KeyError(f"{parameter}={name!r} is not a column of the profile; the columns are: {shown}")

    def _check_target(self, target, parameter: str) -> None:
        if target is not None:
            self._check_name(target, parameter)

    def _attrs(self, **extra) -> dict:
        s = self._settings
        attrs = {"unit": unit_name(s["base"]), "estimator": s["estimator"], "sampled": self.sampled}
        attrs.update(extra)
        return attrs

    def _kw(self) -> dict:
        s = self._settings
        kw = {"estimator": s["estimator"], "base": s["base"]}
        if s["estimator"] == "dirichlet" and s["alpha"] is not None:
            kw["alpha"] = s["alpha"]
        return kw

    def _entropy(self, counts) -> float:
        from infoscope.estimators.entropy import entropy_from_counts

        counts = np.asarray(counts)
        if counts.sum() == 0:
            return math.nan
        return float(entropy_from_counts(counts, **self._kw()))

    # ---------------------------------------------------------- entropy
    def entropy(self) -> pd.DataFrame:
        """One row per column: entropy with a bootstrap interval, max H and flags.

        Returns
        -------
        pandas.DataFrame
            Columns ``column, kind, k, n, missing, missing_share, entropy, ci_low,
            ci_high, max_entropy, efficiency, effective_categories, flags``:
            ``n`` rows profiled, ``missing`` of them missing; ``entropy`` of the
            non-missing values (missing included as a symbol under
            ``missing="category"``) with the session's estimator, its percentile
            bootstrap interval (seeded); ``max_entropy = log K``;
            ``efficiency = entropy / max_entropy``; ``effective_categories =
            base ** entropy`` (the number of equally likely symbols with the same
            entropy; the same number in every unit); ``flags`` comma-separated,
            from the encoder plus ``sparse_cells`` (fewer than 5 observations per
            symbol on average), ``rare_levels`` (see below) and ``exceeds_log_k``
            (see below).  ``attrs``: unit,
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
            categories) the entropy cannot exceed log K, and the estimate and its
            interval are clipped to log K.  Where K is only the number of levels
            seen (text, integer levels), flag ``exceeds_log_k``: the estimate is
            above log K of the observed levels because the bias correction
            credits levels the sample has not seen; K is a lower bound of the
            true alphabet.  Those numbers are kept as computed, so ``efficiency``
            is then above 1 and ``effective_categories`` above ``k`` (an
            all-distinct identifier under Miller-Madow reads
            log K + (K - 1) / (2 n) nats).

        References
        ----------
        .. [1] Shannon, C. E. (1948). A mathematical theory of communication. Bell
           System Technical Journal, 27, 379-423, 623-656.
        .. [2] Efron, B., & Tibshirani, R. J. (1993). An Introduction to the
           Bootstrap. Chapman & Hall (percentile intervals).

        Examples
        --------
        >>> import pandas as pd
        >>> s = ProfileSession(pd.DataFrame({"c": list("aabb") * 10}), estimator="plugin", n_boot=0)
        >>> float(s.entropy().loc[0, "entropy"])
        1.0
        """
        s = self._settings
        if s["n_boot"] > 0:
            from infoscope.estimators.resampling import bootstrap_entropy_ci
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
                    warnings.warn(f"column {key!r} has no non-missing values: its entropy is "
                                  "undefined (NaN)", DataQualityWarning, stacklevel=2)
                rows.append(dict(hit[2]))
                continue
            marginal = np.asarray(self._engine.marginal(key), dtype=np.int64)
            counts, k = self._symbol_counts(col, marginal)
            observed = int(counts.sum())
            flags = list(col.flags)
            h = self._entropy(counts)
            low = high = math.nan
            if observed == 0:
                warnings.warn(f"column {key!r} has no non-missing values: its entropy is undefined (NaN)",
                              DataQualityWarning, stacklevel=2)
            elif s["n_boot"] > 0 and np.count_nonzero(counts) > 1:
                low, high = bootstrap_entropy_ci(counts, level=s["ci"], n_boot=s["n_boot"],
                                                 seed=_child_seed(s["seed"], i), **self._kw())
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
                    low, high = min(low, max_h), min(high, max_h)
                else:
                    flags.append("exceeds_log_k")
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

    # ---------------------------------------------------------- pairs
    def _pair_list(self, columns=None) -> list[tuple[str, str]]:
        keys = self._names if columns is None else [self._check_name(c, "columns") for c in columns]
        return [(a, b) for i, a in enumerate(keys) for b in keys[i + 1:]]

    def pairs(self, measure: str | None = None, *, columns=None) -> pd.DataFrame:
        """One row per unordered pair of columns: MI, NMI, the chosen measure, G-test.

        Parameters
        ----------
        measure : {"mi", "nmi", "adjusted_mi", "vi"}, optional
            What the ``value`` column holds (default: the session's ``measure``).
        columns : list of str, optional
            Restrict to the pairs among these column keys.

        Returns
        -------
        pandas.DataFrame
            Columns ``a, b, k_a, k_b, n, mi, nmi, value, g, dof, p_value, q_value,
            sparse``, in column order: ``n`` rows where both are present, ``mi``
            with the session's estimator, ``nmi`` with the session's
            normalisation (same estimator), ``g`` / ``dof`` / ``p_value`` of the
            G-test of independence, ``q_value`` Benjamini-Hochberg over all pairs
            of the table, ``sparse`` fewer than 5 rows per cell on average.
            ``attrs``: unit, estimator, sampled, measure, normalization.

        References
        ----------
        .. [1] Wilks, S. S. (1938). Annals of Mathematical Statistics, 9(1), 60-62
           (the G-test).
        .. [2] Benjamini, Y., & Hochberg, Y. (1995). JRSS B, 57(1), 289-300.
        .. [3] Vinh, N. X., Epps, J., & Bailey, J. (2010). JMLR 11, 2837-2854
           (NMI normalisations, AMI).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": list("abab") * 10, "y": list("abab") * 10, "z": list("aabb") * 10})
        >>> s = ProfileSession(df, estimator="plugin")
        >>> s.pairs("nmi")[["a", "b", "value"]].round(3).values.tolist()
        [['x', 'y', 1.0], ['x', 'z', 0.0], ['y', 'z', 0.0]]
        """
        from infoscope.estimators.information import benjamini_hochberg

        s = self._settings
        measure = check_choice(measure if measure is not None else s["measure"], MEASURES, "measure")
        memo_key = self._pairs_memo_key(measure) if columns is None else None
        memo = self._pairs_memo.get(measure)
        if memo_key is not None and memo is not None and memo[0] == memo_key:
            self._pairs_estimated = []
            return memo[1].copy()
        pair_list = self._pair_list(columns)
        stats = self._pair_stats(pair_list)
        m = len(pair_list)
        divisor = log_base(s["base"])
        n = stats[:, 0].astype(np.int64)
        mi = stats[:, 1] / divisor
        nmi = stats[:, 2]
        p_value = stats[:, 5]
        if measure == "mi":
            value = mi
        elif measure == "nmi":
            value = nmi
        else:
            value = self._pair_measure_values(pair_list, measure)
            if measure == "vi":
                value = value / divisor
        q = benjamini_hochberg(p_value) if m else np.zeros(0)
        enc = self._encoded
        out = pd.DataFrame({
            "a": [a for a, _ in pair_list],
            "b": [b for _, b in pair_list],
            "k_a": np.array([enc[a].k for a, _ in pair_list], dtype=np.int64),
            "k_b": np.array([enc[b].k for _, b in pair_list], dtype=np.int64),
            "n": n, "mi": mi, "nmi": nmi, "value": np.asarray(value, dtype=float),
            "g": stats[:, 3], "dof": stats[:, 4].astype(np.int64), "p_value": p_value,
            "q_value": np.asarray(q, dtype=float), "sparse": stats[:, 6].astype(bool),
        }, columns=list(PAIRS_COLUMNS))
        if not m:
            out = result_frame([], PAIRS_COLUMNS)
        out.attrs.update(self._attrs(measure=measure, normalization=s["normalization"]))
        if memo_key is not None:
            self._pairs_memo[measure] = (memo_key, out.copy())
        return out

    # ---------------------------------------------------------- the pair cache
    # The live views call pairs() and matrix() after every control change.  The
    # numbers of one pair depend only on the two encoded columns (their codes fix
    # the joint table) and on the estimator settings, so they are cached per pair
    # with the two EncodedColumn objects (compared by identity: a re-encoded
    # column is a new object) and the settings they were computed with; after
    # update() / set_column_bins() only the pairs touching a re-encoded column miss.
    # Values are kept in nats, so a change of unit re-estimates nothing.
    def _estimator_key(self) -> tuple:
        s = self._settings
        return (s["estimator"], s["alpha"] if s["estimator"] == "dirichlet" else None,
                s["normalization"])

    def _pairs_memo_key(self, measure: str) -> tuple:
        s = self._settings
        return (measure, self._estimator_key(), s["base"], self.sampled,
                tuple(self._encoded[k] for k in self._names))

    def _pair_stats(self, pair_list: list[tuple[str, str]]) -> np.ndarray:
        """``(n, mi [nats], nmi, g, dof, p_value, sparse)`` per pair, from the cache or estimated."""
        est = self._estimator_key()
        enc = self._encoded
        cache = self._pair_cache
        out = np.empty((len(pair_list), 7))
        todo: list[int] = []
        for i, (a, b) in enumerate(pair_list):
            hit = cache.get((a, b))
            if hit is not None and hit[0] is enc[a] and hit[1] is enc[b] and hit[2] == est:
                out[i] = hit[3]
            else:
                todo.append(i)
        self._pairs_estimated = [pair_list[i] for i in todo]
        if todo:
            wanted = [pair_list[i] for i in todo]
            tables = self._engine.tables(wanted)
            tabs = [np.asarray(tables[p], dtype=np.int64) for p in wanted]
            tm = self._table_measures(tabs, nats=True)
            for j, i in enumerate(todo):
                t = tabs[j]
                n = int(t.sum())
                row = np.array([n, tm["mi"][j], tm["nmi"][j], tm["g"][j], tm["dof"][j],
                                tm["p_value"][j], n / max(t.size, 1) < SPARSE_CELL_COUNT], dtype=float)
                out[i] = row
                a, b = pair_list[i]
                cache[(a, b)] = (enc[a], enc[b], est, row)
        return out

    def _pair_measure_values(self, pair_list: list[tuple[str, str]], measure: str) -> np.ndarray:
        """AMI (unit-free) or VI (nats) per pair, cached like :meth:`_pair_stats`."""
        from infoscope.estimators.information import (
            adjusted_mutual_information_from_table,
            variation_of_information_from_table,
        )

        s = self._settings
        key = (measure, self._estimator_key())
        enc = self._encoded
        cache = self._measure_cache
        out = np.empty(len(pair_list))
        for i, (a, b) in enumerate(pair_list):
            hit = cache.get((measure, a, b))
            if hit is not None and hit[0] is enc[a] and hit[1] is enc[b] and hit[2] == key:
                out[i] = hit[3]
                continue
            t = np.asarray(self._engine.table(a, b), dtype=np.int64)
            if t.sum() == 0:
                value = math.nan
            elif measure == "adjusted_mi":
                value = adjusted_mutual_information_from_table(t, normalization=s["normalization"])
            else:
                value = variation_of_information_from_table(t, **{**self._kw(), "base": "nats"})
            out[i] = float(value)
            cache[(measure, a, b)] = (enc[a], enc[b], key, float(value))
        return out

    def _table_measures(self, tabs: list[np.ndarray], *, nats: bool = False) -> dict[str, np.ndarray]:
        """MI, NMI and the G-test of many tables at once (vectorised across tables).

        ``mi`` / ``nmi`` follow the definitions and degenerate-case conventions of
        ``mutual_information_from_table`` and ``normalized_mutual_information_from_table``
        with the session's estimator; the G-test those of ``g_test_from_table``:
        :math:`G = 2 N I_{plugin}` in nats (Wilks 1938; Kullback 1959), ``dof``
        counting non-empty rows and columns, p = 1 when ``dof == 0``.  The tests
        compare every estimator with the per-table functions and the G-test with
        ``scipy.stats.chi2_contingency``.  Empty tables give NaN (G 0, dof 0).

        Tables go through the entropy estimators in stacks: for estimators that
        ignore empty cells (plug-in, Miller-Madow, Chao-Shen, Grassberger) tables of
        different shapes are zero-padded into one stack; for the others, whose value
        depends on the alphabet size K (James-Stein, Dirichlet, NSB), only tables of
        the same shape share a stack.
        """
        from scipy.stats import chi2

        from infoscope.estimators.entropy import entropy_of_count_rows

        s = self._settings
        kw = self._kw()
        kw["base"] = "nats"
        divisor = 1.0 if nats else log_base(s["base"])
        m = len(tabs)
        out = {"mi": np.full(m, np.nan), "nmi": np.full(m, np.nan), "g": np.zeros(m),
               "dof": np.zeros(m, dtype=np.int64), "p_value": np.full(m, np.nan)}
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
            v = np.where((r_used == 1) & (c_used == 1), 1.0, v)  # both constant: a perfect match
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
            out["p_value"][index] = np.where(dof > 0, chi2.sf(g, np.maximum(dof, 1)), 1.0)
        return out

    # ---------------------------------------------------------- matrix
    def matrix(self, measure: str | None = None, order: str = "name") -> pd.DataFrame:
        """The pair measure as a square table, index = columns = column keys.

        Parameters
        ----------
        measure : {"mi", "nmi", "adjusted_mi", "vi"}, optional
            Default: the session's ``measure``.
        order : {"name", "cluster"}, default="name"
            ``"name"``: frame order; ``"cluster"``: leaf order of an average-linkage
            hierarchical clustering on the distance ``1 - NMI`` (clipped to [0, 1])
            with optimal leaf ordering, so that related columns sit together.

        Returns
        -------
        pandas.DataFrame
            Symmetric.  Diagonal: the column's entropy for ``"mi"`` (I(X;X) = H(X)),
            1 for ``"nmi"`` and ``"adjusted_mi"`` (a column shares everything with
            itself) except NaN for a column of zero entropy (one observed
            symbol: I(X;X) / H(X) is 0/0, undefined), 0 for ``"vi"``.  Under the
            plug-in estimator, ``"nmi"`` and ``"adjusted_mi"`` values within
            1e-12 of 0 are set to exactly 0 (float rounding of an exact zero).
            ``attrs``: unit, estimator, sampled, measure, order.

        References
        ----------
        .. [1] Bar-Joseph, Z., Gifford, D. K., & Jaakkola, T. S. (2001). Fast optimal
           leaf ordering for hierarchical clustering. Bioinformatics, 17(S1), S22-S29
           (``scipy.cluster.hierarchy.optimal_leaf_ordering``).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": list("abab") * 10, "z": list("aabb") * 10, "y": list("abab") * 10})
        >>> ProfileSession(df, estimator="plugin").matrix("nmi", order="cluster").index.tolist()
        ['z', 'y', 'x']
        """
        order = check_choice(order, ORDERS, "order")
        table = self.pairs(measure)
        measure = table.attrs["measure"]
        keys = self._names
        position = {k: i for i, k in enumerate(keys)}
        values = table["value"].to_numpy(dtype=float)
        ia = [position[a] for a in table["a"]]
        ib = [position[b] for b in table["b"]]
        arr = np.full((len(keys), len(keys)), np.nan)
        if measure in _NORMALIZED and self._settings["estimator"] == "plugin":
            # float noise of an exact zero (4e-16, -3e-16) would read as a sign
            values = np.where(np.abs(values) < _ZERO_SNAP, 0.0, values)
        arr[ia, ib] = values
        arr[ib, ia] = values
        if measure == "mi":
            diag = [self._entropy(self._engine.marginal(k)) for k in keys]
        elif measure == "vi":
            diag = [0.0] * len(keys)
        else:
            # H(X) = 0: I(X;X) / H(X) is 0/0, undefined, not 1
            diag = [math.nan if _zero_entropy(self._engine.marginal(k)) else 1.0 for k in keys]
        arr[np.arange(len(keys)), np.arange(len(keys))] = diag
        square = pd.DataFrame(arr, index=pd.Index(keys), columns=pd.Index(keys))
        if order == "cluster" and len(keys) > 2:
            nmi = np.eye(len(keys))
            nv = table["nmi"].to_numpy(dtype=float)
            nmi[ia, ib] = nv
            nmi[ib, ia] = nv
            leaves = _cluster_order(nmi)
            square = square.iloc[leaves, leaves]
        square.attrs.update(self._attrs(measure=measure, order=order))
        return square

    # ---------------------------------------------------------- one pair
    def pair(self, a: str, b: str) -> PairTable:
        """The joint table of two columns with expected counts and pointwise MI.

        Parameters
        ----------
        a, b : str
            Column keys (``a`` labels the rows).

        Returns
        -------
        PairTable
            ``counts``, ``expected``, ``pmi`` (DataFrames labelled with the symbols),
            ``mi``, ``nmi``, ``g_test``, ``n``.

        References
        ----------
        .. [1] Church, K. W., & Hanks, P. (1990). Word association norms, mutual
           information, and lexicography. Computational Linguistics, 16(1), 22-29
           (pointwise mutual information).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": list("abab") * 10, "y": list("abba") * 10})
        >>> pt = ProfileSession(df, estimator="plugin").pair("x", "y")
        >>> pt.counts.to_numpy().tolist(), pt.n
        ([[10, 10], [10, 10]], 40)
        """
        from infoscope.estimators.information import g_test_from_table, pointwise_mutual_information

        a = self._check_name(a, "a")
        b = self._check_name(b, "b")
        if a == b:
            raise ValueError(f"a and b are the same column ({a!r}); pass two different columns")
        t = np.asarray(self._engine.table(a, b), dtype=np.int64)
        ca, cb = self._encoded[a], self._encoded[b]
        index = pd.Index(list(ca.labels), name=a)
        columns = pd.Index(list(cb.labels), name=b)
        n = int(t.sum())
        counts = pd.DataFrame(t, index=index, columns=columns)
        if n == 0:
            warnings.warn(f"columns {a!r} and {b!r} are never present in the same row: "
                          "their joint table is empty", DataQualityWarning, stacklevel=2)
            nan_frame = pd.DataFrame(np.nan, index=index, columns=columns)
            return PairTable(a, b, counts, nan_frame, nan_frame.copy(), math.nan, math.nan,
                             (math.nan, 0, math.nan), 0, unit_name(self._settings["base"]), True,
                             self._attrs())
        expected = np.outer(t.sum(axis=1), t.sum(axis=0)) / n
        pmi = pointwise_mutual_information(t, base=self._settings["base"])
        tm = self._table_measures([t])
        sparse = bool(n / t.size < SPARSE_CELL_COUNT)
        if sparse:
            warnings.warn(f"the joint table of {a!r} and {b!r} has {t.size} cells for {n} rows "
                          "(fewer than 5 per cell on average): the estimates are unreliable",
                          SmallSampleWarning, stacklevel=2)
        return PairTable(a, b, counts, pd.DataFrame(expected, index=index, columns=columns),
                         pd.DataFrame(pmi, index=index, columns=columns), float(tm["mi"][0]),
                         float(tm["nmi"][0]), g_test_from_table(t), n,
                         unit_name(self._settings["base"]), sparse, self._attrs())

    # ---------------------------------------------------------- relevance
    def relevance(self, target: str | None = None) -> pd.DataFrame:
        """Information each other column gives about a target column.

        Parameters
        ----------
        target : str, optional
            Column key (default: the session's ``target`` setting).

        Returns
        -------
        pandas.DataFrame
            One row per other column, largest MI first: ``column, k, n, mi, ci_low,
            ci_high, nmi, p_value, q_value, share_of_target, leakage, sparse`` where
            ``share_of_target = mi / H(target)`` (both on the rows where the two are
            present), ``leakage`` is True when that share is at least 0.95 (the
            column nearly determines the target: check whether it is known before
            the outcome), the interval is a seeded multinomial bootstrap of the
            joint table and q-values are Benjamini-Hochberg over the table.
            ``attrs``: unit, estimator, sampled, target.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
           2nd ed., Wiley, section 2.4 (I(X;Y) <= H(Y)).
        .. [2] Kaufman, S., Rosset, S., Perlich, C., & Stitelman, O. (2012).
           Leakage in data mining: formulation, detection, and avoidance. ACM
           TKDD, 6(4), 15.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"y": [0, 1] * 20, "copy": ["n", "y"] * 20, "noise": [0, 0, 1, 1] * 10})
        >>> r = ProfileSession(df, n_boot=0).relevance("y")
        >>> r[["column", "leakage"]].values.tolist()
        [['copy', True], ['noise', False]]
        """
        from infoscope.estimators.information import benjamini_hochberg

        s = self._settings
        if s["n_boot"] > 0:
            from infoscope.estimators.resampling import bootstrap_mi_ci
        if target is None:
            target = s["target"]
        if target is None:
            raise ValueError("relevance needs a target: pass target= or set the session's target")
        target = self._check_name(target, "target")
        others = [k for k in self._names if k != target]
        if not others:
            raise ValueError(f"the profile has only the target column {target!r}: nothing to relate to it")
        if np.count_nonzero(self._engine.marginal(target)) <= 1:
            warnings.warn(f"target {target!r} has at most one value: no column can inform it",
                          DataQualityWarning, stacklevel=2)
        # rows cached like the pairs (see _pair_stats): a row depends on the column,
        # the target, its position (the bootstrap seed) and these settings
        enc = self._encoded
        settings_key = (self._estimator_key(), s["base"], s["ci"], s["n_boot"], s["seed"])
        rows: list = [None] * len(others)
        todo = []
        for i, key in enumerate(others):
            hit = self._relevance_cache.get((key, target))
            if (hit is not None and hit[0] is enc[key] and hit[1] is enc[target]
                    and hit[2] == (i, settings_key)):
                rows[i] = dict(hit[3])
            else:
                todo.append(i)
        tabs = [np.asarray(self._engine.table(others[i], target), dtype=np.int64) for i in todo]
        tm = self._table_measures(tabs)
        mi, nmi = tm["mi"], tm["nmi"]
        for j, i in enumerate(todo):
            key = others[i]
            t = tabs[j]
            n = int(t.sum())
            h_target = self._entropy(t.sum(axis=0)) if n else math.nan
            low = high = math.nan
            if n and s["n_boot"] > 0:
                low, high = bootstrap_mi_ci(t, level=s["ci"], n_boot=s["n_boot"],
                                            seed=_child_seed(s["seed"], i), **self._kw())
            share = mi[j] / h_target if h_target and h_target > 0 else math.nan
            rows[i] = {
                "column": key, "k": int(enc[key].k), "n": n, "mi": mi[j],
                "ci_low": float(low), "ci_high": float(high), "nmi": nmi[j],
                "p_value": float(tm["p_value"][j]), "q_value": math.nan,
                "share_of_target": share, "leakage": bool(share >= LEAKAGE_SHARE),
                "sparse": bool(n / max(t.size, 1) < SPARSE_CELL_COUNT),
            }
            self._relevance_cache[(key, target)] = (enc[key], enc[target], (i, settings_key),
                                                    dict(rows[i]))
        q = benjamini_hochberg(np.array([r["p_value"] for r in rows], dtype=float))
        for r, qv in zip(rows, q):
            r["q_value"] = float(qv)
        out = result_frame(rows, RELEVANCE_COLUMNS, **self._attrs(target=target))
        out = out.sort_values("mi", ascending=False, na_position="last", kind="stable")
        out = out.reset_index(drop=True)
        out.attrs.update(self._attrs(target=target))
        return out

    # ---------------------------------------------------------- drift
    def drift(self, reference, *, pseudocount: float = 0.5) -> pd.DataFrame:
        """Per-column divergence of this frame from a reference frame.

        See :func:`infoscope.frame.drift.drift_table` for the method; this session's
        encoding settings (bins, strategy, missing, max_categories, per-column
        overrides) define the reference's alphabet.

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with (e.g. the training data).
        pseudocount : float, default=0.5
            Added to every cell of both count vectors before PSI and KL (so that a
            symbol absent from one side gives a finite value).

        Returns
        -------
        pandas.DataFrame
            ``column, kind, k, n, n_reference, psi, kl, js, p_value, flag``;
            ``flag`` is ``"stable"`` (PSI < 0.10), ``"moderate"`` (0.10 to 0.25)
            or ``"major"`` (>= 0.25), except ``"id_like"`` for an identifier (new
            values in every batch by construction) and ``"time_axis"`` for a
            datetime column of which at least half of this frame lies outside the
            reference's range (another period); for those two the numbers are
            kept but do not mean a change of distribution.  ``""`` when nothing
            was compared.  Legend texts: ``infoscope.frame.results.DRIFT_FLAGS``.

            **Units.**  ``psi`` is always in nats (natural logarithm: the
            0.10 / 0.25 thresholds assume it); ``kl`` and ``js`` are in the
            session's unit.  ``attrs["units"]`` says so per column:
            ``{"psi": "nats", "kl": unit, "js": unit}``; ``attrs["unit"]`` is
            the session's unit (of ``kl`` and ``js`` only).

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI and its
           0.10 / 0.25 rules of thumb).
        .. [2] Lin, J. (1991). Divergence measures based on the Shannon entropy.
           IEEE Transactions on Information Theory, 37(1), 145-151.

        Examples
        --------
        >>> from infoscope.datasets import make_deliveries, make_deliveries_batch
        >>> columns = ["depot", "booking_channel", "weight_kg"]
        >>> s = ProfileSession(make_deliveries_batch(2_000)[columns])
        >>> d = s.drift(make_deliveries(4_000)[columns])
        >>> d.set_index("column").loc["booking_channel", "flag"]
        'moderate'
        """
        from infoscope.frame.drift import drift_table

        ref = as_pandas(reference, "reference")
        if ref.shape[1] == 0 or ref.shape[0] == 0:
            raise ValueError("reference has no rows or no columns: there is nothing to compare with")
        ref_keys = column_keys(ref.columns)
        ref_series = {key: ref.iloc[:, i] for i, key in enumerate(ref_keys)}
        only_here = [k for k in self._names if k not in ref_series]
        only_there = [k for k in ref_keys if k not in self._series]
        common = [k for k in self._names if k in ref_series]
        if not common:
            raise ValueError("the frame and the reference have no column in common: nothing to compare")
        if only_here or only_there:
            parts = []
            if only_here:
                parts.append("only in this frame: " + ", ".join(map(repr, only_here)))
            if only_there:
                parts.append("only in the reference: " + ", ".join(map(repr, only_there)))
            warnings.warn("drift compares the common columns; " + "; ".join(parts),
                          DataQualityWarning, stacklevel=2)
        s = self._settings
        rows = drift_table(
            {k: self._values(k) for k in common}, {k: ref_series[k] for k in common},
            encoding={k: self._encoding_settings(k, s) for k in common},
            pseudocount=pseudocount, base=s["base"],
        )
        unit = unit_name(s["base"])
        return result_frame(rows, DRIFT_COLUMNS, **self._attrs(
            pseudocount=pseudocount, units={"psi": "nats", "kl": unit, "js": unit}))


# ------------------------------------------------------------------ module helpers
_NORMALIZED = frozenset({"nmi", "adjusted_mi"})
_ZERO_SNAP = 1e-12


def _zero_entropy(marginal) -> bool:
    """True when a marginal count vector has at most one non-empty cell (H = 0)."""
    return int(np.count_nonzero(np.asarray(marginal))) <= 1


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
        from infoscope.encode.columns import MISSING_LABEL

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


def _cluster_order(nmi: np.ndarray) -> list[int]:
    """Leaf order of average linkage on 1 - NMI with optimal leaf ordering (scipy)."""
    from scipy.cluster.hierarchy import leaves_list, linkage
    from scipy.spatial.distance import squareform

    distance = 1.0 - np.clip(np.nan_to_num(nmi, nan=0.0), 0.0, 1.0)
    distance = (distance + distance.T) / 2.0
    np.fill_diagonal(distance, 0.0)
    tree = linkage(squareform(distance, checks=False), method="average", optimal_ordering=True)
    return leaves_list(tree).tolist()
