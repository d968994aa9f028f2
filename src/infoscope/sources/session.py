"""A profile session built from count tables: :class:`TableSession` and :func:`session_from_tables`.

The result tables of :mod:`infoscope.frame.tables` read an engine's pair tables and
symbol counts and each column's encoding metadata, never the rows; a
:class:`TableSession` gives them exactly that (a
:class:`~infoscope.engine.tables.TableEngine`), so ``entropy``, ``pairs``,
``matrix``, ``pair``, ``relevance``, the HTML export and the widget work on a
source that was only ever read in batches.  Estimator, unit, measure, interval and
significance settings can change (``update``); an encoding setting (bins,
strategy, missing, folding) needs another pass over the source, and so do the
views that read rows (conditional tables, feature selection, surprising rows,
drift): they raise :class:`NeedsRows`, which says to profile a sample (``sample=``).
"""
from __future__ import annotations

from collections.abc import Mapping, Sequence

from infoscope._warnings import DataQualityWarning, warn_user
from infoscope.engine.tables import TableEngine
from infoscope.frame.session import ProfileSession
from infoscope.frame.settings import NeedsRows
from infoscope.frame.settings import _DEFAULTS, _ENCODING_SETTINGS, _check_settings

__all__ = ["TableSession", "session_from_tables", "NeedsRows", "SampledSession"]


class TableSession(ProfileSession):
    """A :class:`~infoscope.frame.session.ProfileSession` whose engine holds count tables, not codes.

    Parameters
    ----------
    alphabets : sequence of Alphabet
        Each column's alphabet (:class:`infoscope.encode.summaries.Alphabet`), in column order.
    tables : mapping
        ``{(a, b): table}``: the pairwise-complete table of every pair of column keys.
    marginals : mapping
        ``{name: counts}``: rows per symbol of every column.
    n_rows : int
        Rows of the source.
    source : str, default=""
        What was profiled (a path, a glob, ``"DuckDB relation"``), in ``attrs["source"]``.
    **settings
        Settings of :class:`~infoscope.frame.session.ProfileSession`; the encoding
        ones must be those the alphabets were made with.

    Attributes
    ----------
    source : str
        What was profiled.

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.sources import profile
    >>> s = profile(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}).to_records(index=False))
    Traceback (most recent call last):
    ...
    TypeError: profile: cannot read a numpy.recarray; give a path, glob or folder of Parquet or CSV files, a pyarrow Dataset, a DuckDB relation, a Polars LazyFrame or DataFrame, a Dask DataFrame or a pandas DataFrame
    """

    #: The view parts (:data:`infoscope.views.payload.PARTS`) a session of tables can build.
    view_parts = ("entropy", "grid", "pair", "relevance")

    def __init__(self, alphabets: Sequence, tables: Mapping, marginals: Mapping, *, n_rows: int,
                 source: str = "", **settings):
        merged = {**_DEFAULTS, **settings}
        self._settings = _check_settings(merged)
        if self._settings["weights"] is not None:
            raise ValueError("weights= is not taken by a profile of tables from a file or cluster source yet: "
                             "load the frame (pandas or Polars) to weight its rows")
        alphabets = list(alphabets)
        if not alphabets:
            raise ValueError("the source has no columns: there is nothing to profile")
        if n_rows == 0:
            raise ValueError(f"the source {source or ''} has no rows: there is nothing to profile".replace("  ", " "))
        self._names = [a.name for a in alphabets]
        self._n_rows = int(n_rows)
        self._rows = None
        self._series = dict.fromkeys(self._names)
        self._label_keys = {}  # a source's column labels are its keys
        self._bins_override: dict = {}
        self._encoded = {a.name: a.column() for a in alphabets}
        self._alphabets = {a.name: a for a in alphabets}
        self._pair_cache: dict = {}
        self._measure_cache: dict = {}
        self._entropy_cache: dict = {}
        self._relevance_cache: dict = {}
        self._interval_cache: dict = {}
        self._pairs_memo: dict = {}
        self._pairs_estimated: list = []
        self.source = str(source)
        self._engine = TableEngine(list(self._encoded.values()), tables, marginals, n=n_rows)
        self._settings["target"] = self._check_target(self._settings["target"], "target")

    def __repr__(self) -> str:
        return f"TableSession({self._n_rows} rows x {len(self._names)} columns, source={self.source!r})"

    def _attrs(self, **extra) -> dict:
        attrs = super()._attrs(**extra)
        attrs["source"] = self.source
        return attrs

    # ------------------------------------------------------------ what needs rows
    def _needs_rows(self, what: str):
        raise NeedsRows(
            f"{what} reads the rows, and this profile of {self.source or 'the source'} holds count tables "
            "only; profile a seeded sample with infoscope.profile(source, sample=100_000) for it")

    def _encode(self, keys) -> set:
        keys = list(keys)
        if keys:
            changed = ", ".join(repr(k) for k in keys[:5]) + (" ..." if len(keys) > 5 else "")
            raise NeedsRows(
                f"re-encoding column(s) {changed} (a change of {', '.join(_ENCODING_SETTINGS)}) needs another "
                f"pass over {self.source or 'the source'}: call infoscope.profile(source, ...) with the new "
                "settings")
        return set()

    def update(self, **settings) -> set:
        """Change settings that need no new encoding (estimator, unit, measure, intervals, target).

        Parameters
        ----------
        **settings
            Settings of :class:`~infoscope.frame.session.ProfileSession`.

        Returns
        -------
        set
            Always empty (nothing is re-encoded).

        Raises
        ------
        NeedsRows
            An encoding setting or ``sample`` changed: that needs another pass over the source.
        """
        if "sample" in settings and settings["sample"] != self._settings["sample"]:
            self._needs_rows("sample=")
        before = self._settings
        try:
            return super().update(**settings)
        except NeedsRows:
            self._settings = before  # nothing was re-encoded: the settings stay those of the tables
            raise

    def set_column_bins(self, name: str, bins) -> None:
        """Not available: new bins need another pass over the source (raises :class:`NeedsRows`)."""
        self._needs_rows("set_column_bins")

    def _values(self, key: str):
        self._needs_rows("this view")

    def reads(self, source, *, batch_rows: int, progress="auto") -> None:
        """Keep the source the tables were counted from, for the views that read it again (drift).

        Parameters
        ----------
        source : infoscope.sources.readers.Source
            The source of :func:`infoscope.sources.profile`.
        batch_rows : int
            Rows per batch of its passes.
        progress : {"auto", True, False}, default="auto"
            A progress bar over the batches of a further pass.

        Returns
        -------
        None
        """
        self._source, self._batch_rows, self._progress = source, int(batch_rows), progress

    def drift(self, reference, *, pseudocount: float = 0.5, n_perm: int = 999, null: str = "permutation",
              _alphabets: dict | None = None, _sides: list | None = None):
        """Per-column drift of the source from an in-memory reference frame, in one more pass over the source.

        The method and the table of :meth:`infoscope.frame.session.ProfileSession.drift`
        (:mod:`infoscope.frame.drift_batches` gathers the source's counts batch by
        batch); the numbers equal the in-memory ones on the same rows.  A column
        of text that would be read as numbers, or of levels with more than
        :data:`infoscope.frame.drift_batches.MAX_LEVELS` distinct values, is not
        compared out of core (a note says so; a sample compares it).

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with; at least 2 rows.
        pseudocount, n_perm, null
            As in :meth:`~infoscope.frame.session.ProfileSession.drift`.

        Returns
        -------
        pandas.DataFrame
            As :meth:`~infoscope.frame.session.ProfileSession.drift`.

        Raises
        ------
        NeedsRows
            A profile counted on a Dask cluster keeps no source to read again.

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).
        """
        from infoscope.frame.drift_batches import batch_drift_rows
        from infoscope.sources.passes import progress_bar

        src = getattr(self, "_source", None)
        if src is None:
            self._needs_rows("drift()")
        common, ref_series = self._reference_columns(reference, sides=_sides)
        s = self._settings
        bar = progress_bar(self._progress, src.n_rows, "drift")

        def batches():
            for batch in src.batches(common, self._batch_rows):
                if bar is not None:
                    bar.update(len(batch))
                yield batch

        try:
            rows = batch_drift_rows(batches(), {k: ref_series[k] for k in common}, src.dtypes(),
                                    encoding={k: self._encoding_settings(k, s) for k in common},
                                    pseudocount=pseudocount, base=s["base"], n_perm=n_perm, seed=s["seed"],
                                    null=null, alphabets_out=_alphabets)
        finally:
            if bar is not None:
                bar.close()
        return self._drift_frame(rows, pseudocount=pseudocount, null=null, n_perm=n_perm)

    def pair_drift(self, reference, **settings):
        """Not available out of core: reads the rows (raises :class:`NeedsRows`)."""
        self._needs_rows("pair_drift()")

    def drift_over(self, time_column, **settings):
        """Not available out of core: reads the rows (raises :class:`NeedsRows`)."""
        self._needs_rows("drift_over()")

    def drift_report(self, reference, *, pairs: bool = False, **settings):
        """The drift record of the source against a reference (:meth:`drift`; no relationship drift).

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with.
        pairs : bool, default=False
            Relationship drift reads the rows: out of core it is left out (the
            record's notes say so).
        **settings
            As in :meth:`~infoscope.frame.session.ProfileSession.drift_report`.

        Returns
        -------
        infoscope.frame.drift_report.DriftReport
        """
        report = super().drift_report(reference, pairs=False, **settings)
        if pairs:
            report.notes.append("relationship drift (pairs) reads the rows: out of core it is not computed; "
                                "profile a sample (sample=) for it")
        return report

    def conditional(self, *args, **kwargs):
        """Not available out of core: conditional tables read the rows (raises :class:`NeedsRows`)."""
        self._needs_rows("conditional()")

    def select(self, *args, **kwargs):
        """Not available out of core: the selection's permutation tests read the rows (raises :class:`NeedsRows`)."""
        self._needs_rows("select()")

    def surprising_rows(self, *args, **kwargs):
        """Not available out of core: surprising rows are rows (raises :class:`NeedsRows`)."""
        self._needs_rows("surprising_rows()")

    def tree(self, *args, **kwargs):
        """Not available out of core: reads the rows (raises :class:`NeedsRows`)."""
        self._needs_rows("tree()")

    # ------------------------------------------------------------ outputs
    def to_html(self, path=None, *, min_count=None, title: str | None = None):
        """The profile as one self-contained HTML file (see :func:`infoscope.report.html.to_html`).

        Parameters
        ----------
        path : str or os.PathLike, optional
            Where to write it; without it the HTML text is returned.
        min_count : int, optional
            Small-cell threshold of the pair views.
        title : str, optional
            Page title.

        Returns
        -------
        str or None
        """
        from infoscope.report.html import to_html

        return to_html(self, path, min_count=min_count, title=title)

    def widget(self, *, reference=None):
        """The live profile view of this session (:class:`infoscope.widgets.profile.ProfileWidget`).

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame, optional
            Adds the drift view (the source against this frame; one more pass over the source).

        Returns
        -------
        infoscope.widgets.profile.ProfileWidget
        """
        from infoscope.widgets.profile import ProfileWidget

        return ProfileWidget(self, reference=reference)


def session_from_tables(alphabets: Sequence, tables: Mapping, marginals: Mapping, *, n_rows: int,
                        source: str = "", warn: bool = True, **settings) -> TableSession:
    """A :class:`TableSession` from pass 1's alphabets and pass 2's merged tables.

    Parameters
    ----------
    alphabets : sequence of Alphabet
        From :meth:`infoscope.encode.summaries.Pass1.alphabets`, in column order.
    tables : mapping
        ``{(a, b): table}`` of every pair of column keys, finalised
        (:func:`infoscope.engine.counting.finalize`: no missing row / column).
    marginals : mapping
        ``{name: counts}`` of every column (rows per symbol ``0 .. k-1``).
    n_rows : int
        Rows of the source.
    source : str, default=""
        What was profiled (shown in ``attrs["source"]``).
    warn : bool, default=True
        Give each column's encoding warnings (as the in-memory encoder does), in column order.
    **settings
        Session settings; the encoding ones are those of the alphabets.

    Returns
    -------
    TableSession

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.encode.summaries import Pass1, column_specs, encode_batch, summarize
    >>> from infoscope.engine.counting import count_chunk, finalize
    >>> frame = pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10})
    >>> p = Pass1(column_specs(frame.dtypes)); p.absorb(summarize(frame, p.request()))
    >>> al = list(p.alphabets().values())
    >>> codes = encode_batch(frame, al)
    >>> t = finalize(count_chunk(codes, [a.k for a in al], [(0, 1)]))
    >>> s = session_from_tables(al, {("a", "b"): t[(0, 1)]},
    ...                         {a.name: np.bincount(c, minlength=a.k + 1)[:a.k] for a, c in zip(al, codes)},
    ...                         n_rows=40, n_boot=0)
    >>> s.pairs()[["a", "b", "n"]].values.tolist()
    [['a', 'b', 40]]
    """
    alphabets = list(alphabets)
    if warn:
        for a in alphabets:
            for message in a.messages:
                warn_user(message, DataQualityWarning)
    return TableSession(alphabets, tables, marginals, n_rows=n_rows, source=source, **settings)


class SampledSession(ProfileSession):
    """A ProfileSession of a sample read from a source: ``sampled`` and ``n_rows`` speak of the source."""

    def __init__(self, frame, *, of_rows: int, **settings):
        super().__init__(frame, **settings)
        self._of_rows = int(of_rows)
        self._n_sampled = int(len(frame))

    @property
    def sampled(self):
        """Rows of the sample (the profile's every number rests on them)."""
        return self._n_sampled if self._n_sampled < self._of_rows else None

    @property
    def n_rows(self) -> int:
        """Rows of the source (before the sample)."""
        return self._of_rows
