"""The session side of drift: ``ProfileSession.drift()`` (the method is :mod:`infoscope.frame.drift`)."""
from __future__ import annotations

import warnings

import pandas as pd

from infoscope._warnings import DataQualityWarning
from infoscope.estimators._checks import unit_name
from infoscope.frame.drift import drift_table
from infoscope.frame.keys import as_pandas, column_keys
from infoscope.frame.results import DRIFT_COLUMNS, result_frame


class DriftTable:
    """Session part: :meth:`drift` (see :mod:`infoscope.frame.tables`)."""

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
        >>> from infoscope.frame.session import ProfileSession
        >>> from infoscope.datasets import make_deliveries, make_deliveries_batch
        >>> columns = ["depot", "booking_channel", "weight_kg"]
        >>> s = ProfileSession(make_deliveries_batch(2_000)[columns])
        >>> d = s.drift(make_deliveries(4_000)[columns])
        >>> d.set_index("column").loc["booking_channel", "flag"]
        'moderate'
        """
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
