"""``ProfileSession``: the state a profile view holds, and the tidy result tables.

A session holds one frame (never modified), its unique column keys, the settings,
per-column bins overrides, the encoded columns and one :class:`PairEngine`.  The
methods turn the engine's count tables into the result tables of DEVELOPERS.md
("Result tables"); ``update`` re-encodes only the columns whose effective
settings changed, so the engine recounts only the pairs that touch them.

This module holds the session core (state, settings changes, encoding, caches);
each result table lives in its own module of :mod:`infoscope.frame.tables`
(entropy, pairs / matrix / pair, relevance, drift), the settings and their
checks in :mod:`infoscope.frame.settings`, frames and column keys in
:mod:`infoscope.frame.keys`.

Data flow: frame -> :mod:`infoscope.encode` -> :mod:`infoscope.engine` ->
:mod:`infoscope.estimators` -> the tables built here.
"""
from __future__ import annotations

import math
import numbers
from collections.abc import Mapping

import numpy as np
import pandas as pd

from infoscope.encode.columns import encode_columns
from infoscope.engine.engine import PairEngine
from infoscope.engine.sampling import sample_rows
from infoscope.estimators._checks import unit_name
from infoscope.estimators.entropy import entropy_from_counts
from infoscope.frame.keys import as_pandas, column_keys, key_text
from infoscope.frame.supervised import FALLBACK_BINS, supervised_edges
from infoscope.frame.supervised import _applies as _supervised_applies
from infoscope.frame.settings import (
    _DEFAULTS,
    MEASURES,
    ORDERS,
    _check_bins,
    _check_settings,
)
from infoscope.frame.tables.draft import DraftTables
from infoscope.frame.tables.drift import DriftTable
from infoscope.frame.tables.entropy import EntropyTable
from infoscope.frame.tables.estimates import TableMeasures
from infoscope.frame.tables.pairs import PairTables
from infoscope.frame.tables.relevance import RelevanceTable

__all__ = ["MEASURES", "ORDERS", "ProfileSession", "as_pandas", "column_keys"]


class ProfileSession(EntropyTable, PairTables, RelevanceTable, DriftTable, DraftTables, TableMeasures):
    """The information profile of one frame: settings, encoded columns, one engine.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame
        The data.  It is never modified; a later change of the user's frame does
        not reach the session (pandas copy-on-write).
    bins : int or str, default="rows"
        Number of bins for numeric, datetime and timedelta columns, or a binning
        rule name (``"fd"``, ``"scott"``, ``"sturges"``, ``"doane"``, ``"rice"``,
        ``"sqrt"``, ``"stone"``, ``"auto"``, ``"knuth"``, ``"rows"``).  The default
        ``"rows"`` gives each column floor(sqrt(n / 10)) bins
        within [2, 16] for its n non-missing values, so that a pair of numeric
        columns has about 10 rows per cell (3 bins at 100 rows, 5 at 300, 10 at
        1,000, 16 from 2,560; :func:`infoscope.encode.binning.rows_bin_count`
        gives the reasoning).  A number (``bins=16``) or another rule overrides
        it, and :meth:`set_column_bins` overrides both for one column.
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
    categorical_threshold : int, default=32
        Whole-number columns (and datetimes, durations) with at most this many
        distinct values are kept as levels (kind ``integer_categories``), not
        binned; 0 bins every number.  Floats with fractional values are always
        binned, however few their values (a column with no more distinct values
        than bins gets one bin per value).
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
        Level of the two-sided intervals (entropy and mutual information).
    n_boot : int, default=200
        Bootstrap replicates of the entropy intervals: 0 skips them (NaN), else at
        least ``2 / (1 - ci)`` (40 at 95%).  The mutual information intervals need
        no bootstrap (:mod:`infoscope.estimators.intervals`).
    weights : str, optional
        Key of a column of observation weights (survey or sampling weights: finite,
        >= 0, not all 0).  That column is not profiled; every count table holds
        *effective counts*: the summed weights rescaled to Kish's effective sample
        size of its rows and rounded (:mod:`infoscope.engine.weighted`), so the
        bias corrections, intervals and tests read the effective sample size.
        Tables say so in ``attrs["weights"]`` and ``attrs["n_effective"]``; ``n``
        of the pair and relevance tables is then the pair's effective rows.  Only
        the estimators of ``infoscope.estimators.multivariate.WEIGHTED_ESTIMATORS``
        take weights, and the tables built on rows rather than counts (``select``,
        ``conditional``, ``tree``, ``surprising_rows``, drift) refuse them.  Set
        when the session is made.

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
    ...                    n_boot=40)
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
        # a label that is not text (a MultiIndex tuple, a number) names its own column's key,
        # also where its text repeats another's: ('', 'a') is 'a (2)' beside ('a', '')
        self._label_keys = {}
        for label, key in zip(pdf.columns, self._names):
            if not isinstance(label, (str, bool)):
                try:
                    self._label_keys.setdefault(label, key)
                except TypeError:  # an unhashable label: reached by its key only
                    pass
        self._weight_key = None
        if self._settings["weights"] is not None:
            # the weight column is a setting, not a profiled column
            self._weight_key = self._check_name(self._settings["weights"], "weights")
            self._settings["weights"] = self._weight_key
            self._names = [k for k in self._names if k != self._weight_key]
            if not self._names:
                raise ValueError(f"the frame has only the weight column {self._weight_key!r}: there is nothing to profile")
        self._bins_override: dict[str, object] = {}
        self._encoded: dict[str, object] = {}
        self._engine = None
        # pair key -> (column a, column b, estimator key, numbers): see _pair_stats
        self._pair_cache: dict = {}
        self._measure_cache: dict = {}
        self._entropy_cache: dict = {}  # column key -> (column, settings, row): see entropy()
        self._relevance_cache: dict = {}  # (column, target) -> (columns, settings, row)
        # (a, b) -> (columns, test and level, MI interval in nats): tables/intervals.py
        self._interval_cache: dict = {}
        # select() tables by their arguments and the encoded columns: frame/selection.py
        self._selection_cache: dict = {}
        # measure -> (memo key, the last full pairs() table): matrix() reuses it
        self._pairs_memo: dict = {}
        self._pairs_estimated: list[tuple[str, str]] = []
        self._settings["target"] = self._check_target(self._settings["target"], "target")
        self._encode(self._names)

    # ---------------------------------------------------------- weights
    def _row_weights(self) -> np.ndarray:
        """The weights of the profiled rows (after any sample), validated: the column is named in every error."""
        from infoscope.frame.weights import row_weights

        return row_weights(self._values(self._weight_key), self._weight_key)

    @property
    def weighted(self) -> bool:
        """Whether the rows carry observation weights (the ``weights`` setting)."""
        return getattr(self, "_weight_key", None) is not None

    def _refuse_weights(self, what: str) -> None:
        """A clear error for a table that works on rows and cannot take weights yet."""
        if self.weighted:
            raise ValueError(
                f"{what} works on the rows themselves and does not take observation weights yet; this profile "
                f"is weighted by {self._weight_key!r}: make a session without weights= for it")

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

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> s = ProfileSession(pd.DataFrame({"x": np.linspace(0, 1, 40), "c": list("ab") * 20}))
        >>> s.update(bins=2)
        {'x'}
        >>> s.update(estimator="plugin")
        set()
        """
        old = self._settings
        if "weights" in settings and settings["weights"] is not None and self.weighted:
            settings = {**settings, "weights": self._check_name(settings["weights"], "weights")}
        if "weights" in settings and settings["weights"] != old["weights"]:
            raise ValueError(f"weights={settings['weights']!r}: the weight column is fixed when the session is made "
                             f"(it is {old['weights']!r}); make a new session")
        merged = _check_settings({**old, **settings}, old)
        merged["target"] = self._check_target(merged["target"], "target")
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
        names = ("bins", "strategy", "missing", "max_categories", "categorical_threshold")
        before = dict(zip(names, (*self._encoding_settings(key, old), old["categorical_threshold"])))
        after = dict(zip(names, (*self._encoding_settings(key, new), new["categorical_threshold"])))
        changed = {name for name in names if before[name] != after[name]}
        col = self._encoded[key]
        relevant = {"bins", "strategy"} if col.edges is not None else {"max_categories"}
        if col.kind in ("numeric", "integer_categories", "datetime", "timedelta"):
            relevant.add("categorical_threshold")  # may turn levels into bins or back
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
        sample = self._settings["sample"]
        if sample is None:
            return None
        return sample_rows(n_rows, sample, seed=self._settings["seed"])

    def _encoding_settings(self, key: str, settings: Mapping) -> tuple:
        bins = self._bins_override.get(key, settings["bins"])
        if bins == "mdlp":
            # supervised cuts depend on the target too (frame/supervised.py); the
            # target itself keeps an unsupervised rule
            bins = ("mdlp", settings["target"]) if key != settings["target"] else ("mdlp", None)
        return (bins, settings["strategy"], settings["missing"], settings["max_categories"])

    def _values(self, key: str) -> pd.Series:
        series = self._series[key]
        if self._rows is not None:
            series = series.iloc[self._rows]
        return series

    def _encode(self, keys) -> set[str]:
        keys = list(keys)
        jobs = []
        supervised = []
        for key in keys:
            bins, strategy, missing, max_categories = self._encoding_settings(key, self._settings)
            if isinstance(bins, tuple):  # ("mdlp", target): first the fallback rule, cut below
                if bins[1] is not None:
                    supervised.append(key)
                bins = FALLBACK_BINS
            threshold = self._settings["categorical_threshold"]
            jobs.append((key, self._values(key), {"bins": bins, "strategy": strategy,
                                                  "missing": missing, "max_categories": max_categories,
                                                  "categorical_threshold": threshold}))
        done: set[str] = set()
        # columns are encoded side by side in worker threads (numpy's sort and search
        # release the GIL); warnings still come from here, in column order
        for key, encoded in zip(keys, encode_columns(jobs)):
            self._encoded[key] = encoded
            done.add(key)
            if self._engine is not None:
                self._engine.set_column(encoded)
        if supervised:
            self._encode_supervised(supervised)
        if done:
            self._prune_caches()
        if self._engine is None:
            columns = [self._encoded[k] for k in self._names]
            if self.weighted:
                from infoscope.engine.weighted import WeightedPairEngine

                self._engine = WeightedPairEngine(columns, weights=self._row_weights(), progress=False)
            else:
                self._engine = PairEngine(columns, progress=False)
        return done

    def _encode_supervised(self, keys) -> None:
        """Re-encode binned numeric columns with MDLP edges against the target (``bins="mdlp"``)."""
        target = self._settings["target"]
        jobs = []
        for key in keys:
            if _supervised_applies(self, key, target):
                _, strategy, missing, max_categories = self._encoding_settings(key, self._settings)
                edges = supervised_edges(self, key, target)
                jobs.append((key, self._values(key), {"bins": edges, "strategy": strategy,
                                                      "missing": missing, "max_categories": max_categories}))
        for (key, _, _), encoded in zip(jobs, encode_columns(jobs)):
            self._encoded[key] = encoded
            if self._engine is not None:
                self._engine.set_column(encoded)

    def _prune_caches(self) -> None:
        """Drop cached numbers of replaced encodings (they would keep old codes alive)."""
        enc = self._encoded
        for cache, width in ((self._pair_cache, 2), (self._measure_cache, 2),
                             (self._relevance_cache, 2), (self._interval_cache, 2),
                             (self._entropy_cache, 1)):
            stale = []
            for key, entry in cache.items():
                names = key[-2:] if width == 2 else (key,)
                if any(enc.get(name) is not entry[j] for j, name in enumerate(names)):
                    stale.append(key)
            for key in stale:
                del cache[key]

    # ---------------------------------------------------------- helpers
    def _check_name(self, name, parameter: str) -> str:
        key = self._find_name(name)
        if key is not None and key == getattr(self, "_weight_key", None) and parameter != "weights":
            raise KeyError(f"{parameter}={name!r} is the column of observation weights (weights=): it is not "
                           "profiled")
        if key is not None:
            return key
        shown = ", ".join(repr(k) for k in self._names[:12]) + (" ..." if len(self._names) > 12 else "")
        raise KeyError(f"{parameter}={name!r} is not a column of the profile; the columns are: {shown}")

    def _find_name(self, name) -> str | None:
        if isinstance(name, str) and name in self._series:
            return name
        if not isinstance(name, (str, bool)):
            try:
                key = self._label_keys.get(name)
            except TypeError:  # unhashable: not a label
                key = None
            if key is not None:
                return key
        # a MultiIndex tuple or a number names the column whose key it gives (column_keys)
        label = key_text(name) if isinstance(name, (tuple, numbers.Integral)) and not isinstance(name, bool) else name
        if isinstance(label, str) and label in self._series:
            return label
        return None

    def _check_target(self, target, parameter: str) -> str | None:
        """The target's column key (a tuple or number label becomes the key), or None."""
        return None if target is None else self._check_name(target, parameter)

    def _attrs(self, **extra) -> dict:
        s = self._settings
        attrs = {"unit": unit_name(s["base"]), "estimator": s["estimator"], "sampled": self.sampled,
                 "ci": float(s["ci"])}
        if self.weighted:
            eng = self._engine
            attrs.update(weights=self._weight_key, weight_total=float(eng.weights.sum()),
                         n_effective=float(eng.n_effective),
                         n_effective_columns={k: eng.column_n_effective(k) for k in self._names})
        attrs.update(extra)
        return attrs

    def _kw(self) -> dict:
        s = self._settings
        kw = {"estimator": s["estimator"], "base": s["base"]}
        if s["estimator"] == "dirichlet" and s["alpha"] is not None:
            kw["alpha"] = s["alpha"]
        return kw

    def _entropy(self, counts) -> float:
        counts = np.asarray(counts)
        if counts.sum() == 0:
            return math.nan
        return float(entropy_from_counts(counts, **self._kw()))
