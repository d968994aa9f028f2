"""The session side of drift: ``ProfileSession.drift()`` (the method is :mod:`infoscope.frame.drift`)."""
from __future__ import annotations

import warnings

import numpy as np
import pandas as pd

from infoscope._warnings import DataQualityWarning, collect_warnings, warn_user
from infoscope.estimators._checks import unit_name
from infoscope.frame.drift import align_to_reference, axis_flag, check_reference_rows, drift_table
from infoscope.frame.keys import as_pandas, column_keys
from infoscope.frame.pair_drift import PAIR_DRIFT_COLUMNS, pair_drift_table
from infoscope.frame.results import DRIFT_COLUMNS, result_frame


class DriftTable:
    """Session part: :meth:`drift`, :meth:`pair_drift`, :meth:`drift_over`, :meth:`drift_report`.

    A mixin of :class:`~infoscope.frame.session.ProfileSession` (see
    :mod:`infoscope.frame.tables`); the methods live in :mod:`infoscope.frame.drift`,
    :mod:`infoscope.frame.pair_drift` and :mod:`infoscope.frame.drift_over`.

    References
    ----------
    .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession
    >>> issubclass(ProfileSession, DriftTable)
    True
    """

    def _reference_columns(self, reference, *, sides: list | None = None) -> tuple[list[str], dict]:
        """The common column keys and the reference's columns; warns about the others.

        ``sides``, when given, receives ``[only in this frame, only in the reference]``.
        """
        ref = as_pandas(reference, "reference")
        if ref.shape[1] == 0 or ref.shape[0] == 0:
            raise ValueError("reference has no rows or no columns: there is nothing to compare with")
        ref_keys = column_keys(ref.columns)
        ref_series = {key: ref.iloc[:, i] for i, key in enumerate(ref_keys)}
        only_here = [k for k in self._names if k not in ref_series]
        only_there = [k for k in ref_keys if k not in self._series]
        common = [k for k in self._names if k in ref_series]
        if sides is not None:
            sides[:] = [only_here, only_there]
        if not common:
            raise ValueError("the frame and the reference have no column in common: nothing to compare")
        if only_here or only_there:
            parts = []
            if only_here:
                parts.append("only in this frame: " + ", ".join(map(repr, only_here)))
            if only_there:
                parts.append("only in the reference: " + ", ".join(map(repr, only_there)))
            warn_user("drift compares the common columns; " + "; ".join(parts),
                          DataQualityWarning)
        return common, ref_series

    def drift(self, reference, *, pseudocount: float = 0.5, n_perm: int = 999,
              null: str = "permutation", _alphabets: dict | None = None,
              _sides: list | None = None) -> pd.DataFrame:
        """Per-column divergence of this frame from a reference frame, against chance.

        See :mod:`infoscope.frame.drift` for the method; this session's encoding
        settings (bins, strategy, missing, max_categories, per-column overrides)
        define the alphabet, and its ``seed`` seeds the permutation splits.

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with (e.g. the training data); at least 2 rows.
        pseudocount : float, default=0.5
            Added to every cell of both count vectors before PSI and KL (so that a
            symbol absent from one side gives a finite value).
        n_perm : int, default=999
            Random splits of the pooled rows per column (chance level, p-value);
            p-values below 0.05 get 9,000 more splits.
        null : {"permutation", "chi2"}, default="permutation"
            ``"chi2"``: the G-test and the first-order chance level
            (K - 1)(1/n + 1/m) instead of the splits; only for large, well-filled
            tables (with sparse cells it is off).

        Returns
        -------
        pandas.DataFrame
            ``column, kind, k, n, n_reference, psi, psi_chance, psi_chance_high,
            kl, kl_chance, js, js_chance, p_value, q_value, new_share, flag``.
            ``*_chance`` is what sampling alone gives at these sizes (mean over
            the splits), ``psi_chance_high`` the 95 % point, ``q_value`` the
            Benjamini-Hochberg adjustment over the columns tested, ``new_share``
            the share of this frame's rows with a value the reference never had
            (levels) or outside its range (bins).  ``flag``: ``"major"`` /
            ``"moderate"`` (q < 0.05 and PSI beyond chance >= 0.25 / 0.10, the
            common-practice bands), ``"within_chance"`` (PSI >= 0.10 that chance
            explains), ``"stable"``, or ``"id_like"`` / ``"time_axis"`` (drift by
            construction, numbers kept) / ``"type_changed"`` (not compared);
            ``""`` when nothing was compared.  Legend texts:
            ``infoscope.frame.results.DRIFT_FLAGS``.

            **Units.**  ``psi`` is always in nats (natural logarithm: the
            0.10 / 0.25 thresholds assume it); ``kl`` and ``js`` are in the
            session's unit.  ``attrs["units"]`` says so per column.

        Raises
        ------
        ValueError
            A reference with no rows or columns, fewer than 2 rows, or no column
            in common.

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI and its
           0.10 / 0.25 rules of thumb).
        .. [2] Lin, J. (1991). Divergence measures based on the Shannon entropy.
           IEEE Transactions on Information Theory, 37(1), 145-151.
        .. [3] Benjamini, Y., & Hochberg, Y. (1995). Journal of the Royal
           Statistical Society B, 57(1), 289-300.

        Examples
        --------
        >>> from infoscope.frame.session import ProfileSession
        >>> from infoscope.datasets import make_deliveries, make_deliveries_batch
        >>> columns = ["depot", "booking_channel", "weight_kg"]
        >>> s = ProfileSession(make_deliveries_batch(2_000)[columns])
        >>> d = s.drift(make_deliveries(4_000)[columns])
        >>> d.set_index("column").loc["booking_channel", "flag"]
        'moderate'
        """
        self._refuse_weights("drift()")
        common, ref_series = self._reference_columns(reference, sides=_sides)
        s = self._settings
        rows = drift_table(
            {k: self._values(k) for k in common}, {k: ref_series[k] for k in common},
            encoding={k: self._encoding_settings(k, s) for k in common},
            pseudocount=pseudocount, base=s["base"], n_perm=n_perm, seed=s["seed"], null=null,
            alphabets_out=_alphabets,
        )
        return self._drift_frame(rows, pseudocount=pseudocount, null=null, n_perm=n_perm)

    def _drift_frame(self, rows: list[dict], *, pseudocount: float, null: str, n_perm: int) -> pd.DataFrame:
        """The drift table of finished rows, with its settings and units in ``attrs``."""
        unit = unit_name(self._settings["base"])
        return result_frame(rows, DRIFT_COLUMNS, **self._attrs(
            pseudocount=pseudocount, null=null, n_perm=n_perm,
            units={"psi": "nats", "psi_chance": "nats", "psi_chance_high": "nats",
                   "kl": unit, "kl_chance": unit, "js": unit, "js_chance": unit,
                   "new_share": "share of rows"}))

    def pair_drift(self, reference, *, n_perm: int = 499) -> pd.DataFrame:
        """Pairs of columns whose dependence changed from a reference frame to this one.

        See :mod:`infoscope.frame.pair_drift` for the method: both frames on each
        column's shared alphabet (as in :meth:`drift`), the joint tables of every
        pair counted by the engine, the MI of each pair in both frames (the
        session's estimator and unit), the change with a bootstrap interval
        (``n_boot``, ``ci``) and the change sampling alone gives (random splits of
        the pooled rows).

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with; at least 2 rows.
        n_perm : int, default=499
            Random splits of the pooled rows per pair (p-values below 0.05 get
            4,500 more: the smallest p-value is 2e-4).

        Returns
        -------
        pandas.DataFrame
            One row per pair: ``a, b, k_a, k_b, n, n_reference, mi_reference, mi,
            change, ci_low, ci_high, change_chance, chance_low, chance_high,
            p_value, q_value, flag`` (``"stronger"`` / ``"weaker"`` at q < 0.05,
            else ``"unchanged"``; legend ``infoscope.frame.pair_drift.PAIR_DRIFT_FLAGS``),
            sorted by p-value, most changed first.  MI columns in the session's unit.

        Raises
        ------
        ValueError
            A reference that is too small, or fewer than two comparable columns.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information
           Theory, 2nd ed. Wiley, ch. 2.

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> from infoscope.frame.session import ProfileSession
        >>> rng = np.random.default_rng(0)
        >>> x = rng.integers(0, 2, 400)
        >>> ref = pd.DataFrame({"x": x, "y": x})                          # y copies x
        >>> cur = pd.DataFrame({"x": x[:300], "y": rng.integers(0, 2, 300)})  # y no longer does
        >>> ProfileSession(cur, n_boot=50).pair_drift(ref).loc[0, "flag"]
        'weaker'
        """
        self._refuse_weights("pair_drift()")
        common, ref_series = self._reference_columns(reference)
        check_reference_rows({k: ref_series[k] for k in common})
        s = self._settings
        alphabets, flags = [], {}
        for k in common:
            al = align_to_reference(self._values(k), ref_series[k], k, self._encoding_settings(k, s))
            alphabets.append(al)
            flags[k] = axis_flag(al, self._values(k), ref_series[k]) if al.compared else "type_changed"
        rows = pair_drift_table(alphabets, flags, estimator=s["estimator"], alpha=s["alpha"],
                                base=s["base"], n_perm=n_perm, n_boot=s["n_boot"], ci=s["ci"],
                                seed=s["seed"])
        return result_frame(rows, PAIR_DRIFT_COLUMNS, **self._attrs(n_perm=n_perm))

    def drift_over(self, time_column, *, every: str = "1W", reference="first",
                   pseudocount: float = 0.5, n_perm: int = 999) -> pd.DataFrame:
        """Drift of every column period by period: one row per (period, column).

        See :mod:`infoscope.frame.drift_over` for the method: one shared alphabet
        per column for all periods, the (period x symbol) tables of every column
        counted in one pass of the engine, and per (period, column) the numbers
        and flags of :meth:`drift`, with q-values within each period.

        Parameters
        ----------
        time_column : str
            Key of a ``datetime64`` column (naive or zoned; zoned times are cut on
            their local calendar).  Rows without a time are left out (a warning
            says how many).
        every : str, default="1W"
            A pandas period frequency: ``"1D"``, ``"1W"`` (weeks ending Sunday),
            ``"1M"``, ``"1Q"``, ``"1Y"``, ...
        reference : {"first", "previous"} or DataFrame, default="first"
            Compare each period with the first period, with the one before (the
            last with rows), or with a reference frame.
        pseudocount : float, default=0.5
            As in :meth:`drift`.
        n_perm : int, default=999
            Random splits per (period, column).

        Returns
        -------
        pandas.DataFrame
            ``period, start, reference`` (the period compared with, or
            ``"frame"``), then the columns of :meth:`drift`.  The reference period
            itself gets no rows; an empty period gets NaN rows with an empty flag
            (and a warning).

        Raises
        ------
        KeyError
            ``time_column`` is not a column.
        TypeError
            ``time_column`` is not a datetime column.
        ValueError
            A bad ``every`` or ``reference``, or fewer than two periods with rows.

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).

        Examples
        --------
        >>> import numpy as np, pandas as pd
        >>> from infoscope.frame.session import ProfileSession
        >>> df = pd.DataFrame({"t": pd.date_range("2026-01-05", periods=56, freq="D"),
        ...                    "c": list("ab") * 14 + list("aaab") * 7})
        >>> ProfileSession(df).drift_over("t", every="1W")[["period", "flag"]].shape
        (7, 2)
        """
        self._refuse_weights("drift_over()")
        from infoscope.frame.drift_over import (DRIFT_OVER_COLUMNS, REFERENCE_MODES, assign_periods,
                                                drift_over_table)

        key = self._check_name(time_column, "time_column")
        times = self._values(key)
        codes, labels, starts = assign_periods(times, every, key)
        valid = codes >= 0
        if not valid.all():
            warn_user(f"time column {key!r}: {int((~valid).sum())} row(s) without a time are left "
                          "out of drift_over", DataQualityWarning)
        if np.count_nonzero(np.bincount(codes[valid], minlength=len(labels))) < 2 and \
                isinstance(reference, str):
            raise ValueError(f"time column {key!r} has rows in only one period of every={every!r}: "
                             "there is nothing to compare it with (a shorter period, or a reference frame)")
        s = self._settings
        keys = [k for k in self._names if k != key]
        if isinstance(reference, str):
            if reference not in REFERENCE_MODES:
                raise ValueError(f"reference={reference!r} is not valid; choose 'first', 'previous' "
                                 "or pass a reference frame")
            ref = reference
        else:
            common, ref_series = self._reference_columns(reference)
            check_reference_rows({k: ref_series[k] for k in common})
            keys = [k for k in common if k != key]
            ref = {k: ref_series[k] for k in keys}
        if not keys:
            raise ValueError("drift_over needs at least one column besides the time column")
        columns = {k: self._values(k)[valid].reset_index(drop=True) for k in keys}
        rows = drift_over_table(columns, codes[valid], labels, starts, reference=ref,
                                encoding={k: self._encoding_settings(k, s) for k in keys},
                                pseudocount=pseudocount, base=s["base"], n_perm=n_perm, seed=s["seed"])
        unit = unit_name(s["base"])
        return result_frame(rows, DRIFT_OVER_COLUMNS, **self._attrs(
            pseudocount=pseudocount, n_perm=n_perm, time_column=key, every=every,
            reference=ref if isinstance(ref, str) else "frame",
            units={"psi": "nats", "psi_chance": "nats", "psi_chance_high": "nats",
                   "kl": unit, "kl_chance": unit, "js": unit, "js_chance": unit,
                   "new_share": "share of rows"}))

    def drift_report(self, reference, *, pairs: bool = False, pseudocount: float = 0.5,
                     n_perm: int = 999, null: str = "permutation", reference_name: str = "reference",
                     current_name: str = "current"):
        """The drift check as one record: tables, per-bin detail, JSON (what ``infoscope drift`` writes).

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with.
        pairs : bool, default=False
            Also run :meth:`pair_drift` (slower: every pair of columns).
        pseudocount, n_perm, null
            As in :meth:`drift`.
        reference_name, current_name : str
            What the two frames are (shown in the record, e.g. file names).

        Returns
        -------
        infoscope.frame.drift_report.DriftReport
            ``.columns`` (the drift table), ``.pairs``, ``.bins``,
            ``.missing_columns`` / ``.extra_columns``, ``.notes`` (the warnings,
            which are also issued), ``.reaching(level)``, ``.worst``,
            ``.to_dict()`` / ``.to_json()``.

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).

        Examples
        --------
        >>> import pandas as pd
        >>> from infoscope.frame.session import ProfileSession
        >>> ref = pd.DataFrame({"c": list("ab") * 100})
        >>> r = ProfileSession(pd.DataFrame({"c": list("a" * 160 + "b" * 40)})).drift_report(ref)
        >>> r.worst, r.reaching("moderate"), r.to_dict()["version"]
        ('major', ['c'], 1)
        """
        self._refuse_weights("drift_report()")
        from infoscope.frame.drift_report import DriftReport, bin_rows
        from infoscope.frame.keys import as_pandas

        alphabets: dict = {}
        sides: list = [[], []]
        # collect_warnings (per thread), not catch_warnings: a widget's worker builds this too
        with collect_warnings() as caught:
            table = self.drift(reference, pseudocount=pseudocount, n_perm=n_perm, null=null,
                               _alphabets=alphabets, _sides=sides)
            pair_table = self.pair_drift(reference) if pairs else None
        notes = []
        for w in caught:  # given back to the caller as they came, and kept in the record
            warn_user(str(w.message), w.category)
            if issubclass(w.category, DataQualityWarning) and str(w.message) not in notes:
                notes.append(str(w.message))
        bins = {key: bin_rows(al.labels, al.counts("reference"), al.counts("current"),
                              pseudocount=pseudocount)
                for key, al in alphabets.items() if al.compared}
        s = self._settings
        settings = {k: s[k] for k in ("bins", "strategy", "missing", "max_categories", "base", "seed",
                                      "estimator")}
        settings.update(pseudocount=pseudocount, n_perm=n_perm, null=null, level=0.05,
                        sample=s["sample"])
        ref = as_pandas(reference, "reference")
        return DriftReport(
            columns=table, pairs=pair_table, bins=bins, missing_columns=list(sides[1]),
            extra_columns=list(sides[0]), notes=notes, settings=settings,
            reference_rows=len(ref), current_rows=self._n_rows,
            reference_name=reference_name, current_name=current_name,
            units=dict(table.attrs.get("units", {})),
        )
