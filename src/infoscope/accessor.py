"""``DataFrame.info_profile``: the pandas accessor, an entry point like the command line.

A thin layer: every method builds (or reuses, :func:`infoscope.frame.sessions.session_for`)
a :class:`ProfileSession` and calls the method of the same name; ``to_html`` writes
the offline report (:mod:`infoscope.report.html`) and the call returns the live
widget.  It sits on top of the layers (estimators -> encode -> engine -> frame ->
views -> report -> widgets), beside the CLI.

Importing this module is cheap (``import infoscope`` registers it): the session,
the encoder, the engine (numba), the report and the widget are imported on the
first call that needs them.
"""
from __future__ import annotations

import pandas as pd

__all__ = ["InfoProfileAccessor"]

#: Settings of ``to_html`` that shape the views rather than the numbers.
_VIEW_SETTINGS = ("order", "alpha_fdr", "selected_pair", "selected_column", "sort_by")


@pd.api.extensions.register_dataframe_accessor("info_profile")
class InfoProfileAccessor:
    """Information profile of a DataFrame: ``df.info_profile.<method>(**settings)``.

    ``df.info_profile()`` returns the live profile widget; the methods return the
    tidy result tables of :class:`~infoscope.frame.session.ProfileSession` (each
    accepts the session's settings as keywords: ``bins``, ``strategy``,
    ``estimator``, ``alpha``, ``base``, ``missing``, ``max_categories``, ``target``,
    ``measure``, ``normalization``, ``sample``, ``seed``, ``ci``, ``n_boot``).

    Parameters
    ----------
    frame : pandas.DataFrame
        The frame the accessor is attached to (never modified).

    References
    ----------
    .. [1] pandas documentation, "Extending pandas: registering custom accessors".

    Examples
    --------
    >>> import pandas as pd
    >>> import infoscope  # registers the accessor
    >>> df = pd.DataFrame({"a": [1, 2, 1, 2] * 5, "b": list("xyxy") * 5})
    >>> df.info_profile.pairs(estimator="plugin")[["a", "b", "nmi"]].values.tolist()
    [['a', 'b', 1.0]]
    """

    def __init__(self, frame: pd.DataFrame):
        self._frame = frame

    def _checked_frame(self):
        frame = self._frame
        if frame.shape[1] == 0:
            raise ValueError("the DataFrame has no columns: there is nothing to profile")
        if frame.shape[0] == 0:
            raise ValueError("the DataFrame has no rows: there is nothing to profile")
        return frame

    def _session(self, settings: dict):
        from infoscope.frame.sessions import session_for

        return session_for(self._checked_frame(), **settings)

    def session(self, **settings):
        """A new :class:`ProfileSession` of this frame (yours to ``update``).

        Parameters
        ----------
        **settings
            Settings of the session.

        Returns
        -------
        ProfileSession

        Examples
        --------
        >>> import pandas as pd
        >>> pd.DataFrame({"a": [1, 2, 1]}).info_profile.session().names
        ['a']
        """
        from infoscope.frame.session import ProfileSession

        # the checks of the other methods, without hashing the frame for a cached session
        return ProfileSession(self._checked_frame(), **settings)

    def entropy(self, **settings) -> pd.DataFrame:
        """Entropy of every column: see :meth:`ProfileSession.entropy`.

        Parameters
        ----------
        **settings
            Settings of the session (``bins``, ``estimator``, ``base`` ...).

        Returns
        -------
        pandas.DataFrame
            One row per column.

        References
        ----------
        .. [1] Shannon, C. E. (1948). Bell System Technical Journal, 27, 379-423.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"c": list("aabb") * 5})
        >>> float(df.info_profile.entropy(estimator="plugin", n_boot=0)["entropy"][0])
        1.0
        """
        return self._session(settings).entropy()

    def pairs(self, measure: str | None = None, **settings) -> pd.DataFrame:
        """Every pair of columns: see :meth:`ProfileSession.pairs`.

        Parameters
        ----------
        measure : {"mi", "nmi", "adjusted_mi", "vi"}, optional
            The measure of the ``value`` column.
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            One row per unordered pair.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory, Wiley.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": [1, 2] * 10, "b": [1, 2] * 10})
        >>> round(float(df.info_profile.pairs("nmi", estimator="plugin")["value"][0]), 6)
        1.0
        """
        return self._session(settings).pairs(measure)

    def matrix(self, measure: str | None = None, order: str = "name", **settings) -> pd.DataFrame:
        """The pair measure as a square table: see :meth:`ProfileSession.matrix`.

        Parameters
        ----------
        measure : {"mi", "nmi", "adjusted_mi", "vi"}, optional
            The measure.
        order : {"name", "cluster"}, default="name"
            Column order.
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            Square, index = columns = column keys.

        References
        ----------
        .. [1] scipy.cluster.hierarchy.linkage (average linkage, optimal ordering).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": [1, 2] * 10, "b": [1, 2] * 10})
        >>> df.info_profile.matrix("nmi").shape
        (2, 2)
        """
        return self._session(settings).matrix(measure, order=order)

    def pair(self, a: str, b: str, min_count=None, **settings):
        """One pair's joint table: see :meth:`ProfileSession.pair`.

        Parameters
        ----------
        a, b : str
            Column keys.
        min_count : int, optional
            Hide counts ``1 .. min_count - 1`` and the cells that would give them
            away (small-cell suppression, :meth:`PairTable.suppressed`).
        **settings
            Settings of the session.

        Returns
        -------
        PairTable
            With hidden cells as NA/NaN and ``.hidden`` listing them when
            ``min_count`` hid something.

        References
        ----------
        .. [1] Church, K. W., & Hanks, P. (1990). Computational Linguistics, 16(1), 22-29.
        .. [2] Small-cell suppression with complementary cells: common practice in
           official statistics.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": [1, 2] * 10, "b": [1, 2] * 10})
        >>> df.info_profile.pair("a", "b").n
        20
        >>> df.info_profile.pair("a", "b", min_count=20).hidden["small"]
        [('1', '1'), ('2', '2')]
        """
        from infoscope.frame.suppression import check_min_count

        threshold = check_min_count(min_count)  # a clear error before any work
        table = self._session(settings).pair(a, b)
        return table if threshold is None else table.suppressed(threshold)

    def relevance(self, target: str | None = None, **settings) -> pd.DataFrame:
        """Information about a target column: see :meth:`ProfileSession.relevance`.

        Parameters
        ----------
        target : str
            The target column key.
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            One row per other column.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory, Wiley.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"y": [0, 1] * 10, "x": [5, 6] * 10})
        >>> bool(df.info_profile.relevance("y", n_boot=0)["leakage"][0])
        True
        """
        if target is not None:
            settings = {**settings, "target": target}
        return self._session(settings).relevance()

    def conditional(self, x: str, y: str, given=(), *, n_permutations: int = 999, **settings) -> pd.DataFrame:
        """What ``x`` tells about ``y`` once ``given`` is known: see :func:`infoscope.frame.conditional.conditional_table`.

        Parameters
        ----------
        x, y : str
            Column keys.
        given : str or list of str, default=()
            Conditioning columns (their observed combinations are the strata).
        n_permutations : int, default=999
            Shuffles of ``x`` within the strata for the p-value (0 skips it).
        **settings
            Settings of the session (``bins``, ``estimator``, ``n_boot``, ``seed`` ...).

        Returns
        -------
        pandas.DataFrame
            One row: ``mi``, ``cmi`` with ``ci_low``/``ci_high``, ``p_value``,
            ``co_information``, ``strata``, ``sparse`` and a ``note``.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
           2nd ed., Wiley, sec. 2.5 (conditional mutual information).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"x": [0, 1] * 50, "y": [0, 1] * 50, "z": [0, 0, 1, 1] * 25})
        >>> row = df.info_profile.conditional("x", "y", given="z", n_boot=0, n_permutations=99)
        >>> round(float(row["cmi"][0]), 2), float(row["p_value"][0])
        (1.01, 0.01)
        """
        from infoscope.frame.conditional import conditional_table

        return conditional_table(self._session(settings), x, y, given, n_permutations=n_permutations)

    def select(self, target: str | None = None, k=None, method: str = "mrmr", *, include_leaks: bool = False,
               n_permutations: int = 199, fdr: float = 0.05, **settings) -> pd.DataFrame:
        """Columns for a target, chosen step by step: see :func:`infoscope.frame.selection.select_table`.

        Parameters
        ----------
        target : str, optional
            The target column key (default: the ``target`` setting).
        k : int, optional
            Number of steps; ``None`` stops when the next gain is not significant.
        method : {"mrmr", "jmi", "cmim"}, default="mrmr"
            Peng, Long & Ding (2005) difference form; Yang & Moody (1999); Fleuret (2004).
        include_leaks : bool, default=False
            Keep columns that nearly determine the target among the candidates.
        n_permutations : int, default=199
            Shuffles per step for the significance of the gain.
        fdr : float, default=0.05
            False discovery rate (Benjamini-Hochberg across steps).
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            One row per step, then the columns left out (see ``SELECTION_COLUMNS``).

        References
        ----------
        .. [1] Peng, H., Long, F., & Ding, C. (2005). IEEE TPAMI, 27(8), 1226-1238.
        .. [2] Yang, H. H., & Moody, J. (1999). NIPS 12, 687-693.
        .. [3] Fleuret, F. (2004). JMLR, 5, 1531-1555.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"y": [0, 1] * 100, "x": [0, 1] * 100, "z": [0, 0, 1, 1] * 50})
        >>> df.info_profile.select("y", n_permutations=99, include_leaks=True)["column"].tolist()
        ['x', 'z']
        """
        from infoscope.frame.selection import select_table

        if target is None:
            target = settings.get("target")
        if target is None:
            raise ValueError("select needs a target: pass target= or the target setting")
        return select_table(self._session(settings), target, k=k, method=method, include_leaks=include_leaks,
                            n_permutations=n_permutations, fdr=fdr)

    def tree(self, **settings) -> pd.DataFrame:
        """The Chow-Liu tree of the columns: see :func:`infoscope.frame.tree.tree_table`.

        Parameters
        ----------
        **settings
            Settings of the session (``bins``, ``estimator`` ...).

        Returns
        -------
        pandas.DataFrame
            One row per edge: ``parent, child, mi, n, depth``.

        References
        ----------
        .. [1] Chow, C. K., & Liu, C. N. (1968). IEEE Transactions on Information
           Theory, 14(3), 462-467.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": [0, 1] * 50, "b": [0, 1] * 50, "c": [0, 0, 1, 1] * 25})
        >>> df.info_profile.tree()[["parent", "child"]].values.tolist()
        [['a', 'b'], ['a', 'c']]
        """
        from infoscope.frame.tree import tree_table

        return tree_table(self._session(settings))

    def surprising_rows(self, n: int = 20, model: str = "tree", *, alpha: float = 0.5, top_cells: int = 3,
                        min_count=None, **settings) -> pd.DataFrame:
        """The rows that fit the table's structure least: see :func:`infoscope.frame.tree.surprising_rows_table`.

        Parameters
        ----------
        n : int, default=20
            Number of rows.
        model : {"tree", "independent"}, default="tree"
            Chow-Liu tree or product of the margins.
        alpha : float, default=0.5
            Dirichlet pseudocount of the conditional tables.
        top_cells : int, default=3
            Contributing cells listed per row.
        min_count : int, optional
            Hide the listed cells' values (for sharing personal data); scores stay.
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            ``rank, row, position, surprisal, excess, cells, summary``.

        References
        ----------
        .. [1] Chow, C. K., & Liu, C. N. (1968). IEEE Transactions on Information
           Theory, 14(3), 462-467.

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": list("xy") * 50, "b": list("xy") * 49 + ["y", "x"]})
        >>> df.info_profile.surprising_rows(n=2)["position"].tolist()
        [98, 99]
        """
        from infoscope.frame.tree import surprising_rows_table

        return surprising_rows_table(self._session(settings), n, model=model, alpha=alpha, top_cells=top_cells,
                                     min_count=min_count)

    def drift(self, reference, **settings) -> pd.DataFrame:
        """Divergence of this frame from a reference frame: see :meth:`ProfileSession.drift`.

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with.
        **settings
            Settings of the session (``pseudocount``, ``n_perm`` and ``null`` are
            passed to ``drift``).

        Returns
        -------
        pandas.DataFrame
            One row per common column.

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).

        Examples
        --------
        >>> import pandas as pd
        >>> ref = pd.DataFrame({"c": list("ab") * 100})
        >>> pd.DataFrame({"c": list("a" * 140 + "b" * 60)}).info_profile.drift(ref)["flag"].tolist()
        ['moderate']
        """
        options = {k: settings.pop(k) for k in ("pseudocount", "n_perm", "null") if k in settings}
        return self._session(settings).drift(reference, **options)

    def to_html(self, path=None, *, min_count=None, title: str | None = None, reference=None, drift_over=None,
                **settings):
        """The profile as one self-contained HTML file that works offline.

        The file holds the live view's front end and every view's data
        (:func:`infoscope.views.payload`): hover, sorting and the strongest pair
        views work without a kernel; names and values are escaped and nothing
        loads from the network (:func:`infoscope.report.html.to_html`).

        Parameters
        ----------
        path : str or os.PathLike, optional
            File to write.  Without it the HTML text is returned.
        min_count : int, optional
            Hide counts ``1 .. min_count - 1`` in every pair view of the file, with
            the cells and totals that would give them away (small counts of
            personal data can identify people).
        title : str, optional
            Title of the page.
        reference : pandas.DataFrame or polars.DataFrame, optional
            A reference frame: the page adds the drift view (this frame against it).
        drift_over : str or tuple, optional
            ``(time_column, every[, against])``: the drift view adds a strip of each
            column's drift period by period (see ``__call__``).
        **settings
            Settings of the session (``bins``, ``estimator``, ``target`` ...) and
            view settings (``order``, ``alpha_fdr``, ``selected_pair``, ``sort_by``).

        Returns
        -------
        pathlib.Path or str
            The path written, or the HTML text when ``path`` is None.

        References
        ----------
        .. [1] W3C (2016). Content Security Policy Level 2 (the policy that keeps
           the page offline).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10})
        >>> df.info_profile.to_html(min_count=5, n_boot=0).startswith("<!DOCTYPE html>")
        True
        """
        from infoscope.report.html import to_html

        view = {k: settings.pop(k) for k in list(settings) if k in _VIEW_SETTINGS}
        return to_html(self._session(settings), path, min_count=min_count, title=title, settings=view,
                       reference=reference, drift_over=drift_over)

    def pair_drift(self, reference, **settings) -> pd.DataFrame:
        """Pairs whose dependence changed from a reference frame: see :meth:`ProfileSession.pair_drift`.

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with.
        **settings
            Settings of the session (``n_perm`` is passed to ``pair_drift``).

        Returns
        -------
        pandas.DataFrame
            One row per pair of comparable common columns.

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory, Wiley.

        Examples
        --------
        >>> import pandas as pd
        >>> ref = pd.DataFrame({"x": list("ab") * 100, "y": list("ab") * 100})
        >>> cur = pd.DataFrame({"x": list("ab") * 100, "y": list("ab") * 50 + list("ba") * 50})
        >>> cur.info_profile.pair_drift(ref, n_boot=0)["flag"].tolist()
        ['weaker']
        """
        options = {k: settings.pop(k) for k in ("n_perm",) if k in settings}
        return self._session(settings).pair_drift(reference, **options)

    def drift_over(self, time_column, *, every: str = "1W", reference="first", **settings) -> pd.DataFrame:
        """Drift of every column period by period: see :meth:`ProfileSession.drift_over`.

        Parameters
        ----------
        time_column : str
            A datetime column.
        every : str, default="1W"
            A pandas period frequency ("1D", "1W", "1M", ...).
        reference : {"first", "previous"} or DataFrame, default="first"
            What each period is compared with.
        **settings
            Settings of the session (``pseudocount`` and ``n_perm`` are passed on).

        Returns
        -------
        pandas.DataFrame
            One row per (period, column).

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).

        Examples
        --------
        >>> import pandas as pd
        >>> df = pd.DataFrame({"t": pd.date_range("2026-01-05", periods=28, freq="D"), "c": list("ab") * 14})
        >>> df.info_profile.drift_over("t", every="1W")["flag"].tolist()
        ['stable', 'stable', 'stable']
        """
        options = {k: settings.pop(k) for k in ("pseudocount", "n_perm") if k in settings}
        return self._session(settings).drift_over(time_column, every=every, reference=reference, **options)

    def drift_report(self, reference, *, pairs: bool = False, **settings):
        """The drift check as one record with ``to_dict()`` / ``to_json()``: see :meth:`ProfileSession.drift_report`.

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame
            The frame to compare with.
        pairs : bool, default=False
            Include the relationship drift of every pair.
        **settings
            Settings of the session (``pseudocount``, ``n_perm``, ``null``,
            ``reference_name`` and ``current_name`` are passed on).

        Returns
        -------
        infoscope.frame.drift_report.DriftReport
            The same record ``infoscope drift REFERENCE CURRENT --json`` writes.

        References
        ----------
        .. [1] Siddiqi, N. (2006). Credit Risk Scorecards. Wiley (PSI).

        Examples
        --------
        >>> import pandas as pd
        >>> ref = pd.DataFrame({"c": list("ab") * 100})
        >>> pd.DataFrame({"c": list("ab") * 60}).info_profile.drift_report(ref).worst
        'stable'
        """
        names = ("pseudocount", "n_perm", "null", "reference_name", "current_name")
        options = {k: settings.pop(k) for k in names if k in settings}
        return self._session(settings).drift_report(reference, pairs=pairs, **options)

    def __call__(self, *, reference=None, drift_over=None, **settings):
        """The live profile widget of this frame (needs the widget extra).

        Parameters
        ----------
        reference : pandas.DataFrame or polars.DataFrame, optional
            A reference frame (e.g. the training data): the profile adds the drift
            view, each column's drift of this frame from it against the drift that
            sampling alone gives (:meth:`drift_report`), recomputed with the controls.
        drift_over : str or tuple, optional
            Drift over time in the drift view: ``(time_column, every)`` such as
            ``("dispatched_at", "1W")``, or ``(time_column, every, against)`` with
            ``against`` one of ``"reference"`` (the reference frame; the default
            when one is given), ``"first"`` (the first period; the default without
            a reference) or ``"previous"``; a name alone means periods of ``"1W"``.
            Adds a strip, one row per column and one cell per period, coloured
            where the period moved beyond chance (:meth:`drift_over`).
        **settings
            Initial settings of the profile.

        Returns
        -------
        infoscope.widgets.profile.ProfileWidget

        References
        ----------
        .. [1] Jupyter widget protocol (ipywidgets / anywidget documentation).

        Examples
        --------
        >>> import pandas as pd
        >>> w = pd.DataFrame({"a": [1, 2, 1]}).info_profile()  # doctest: +SKIP
        """
        try:
            from infoscope.widgets.profile import ProfileWidget
        except ImportError as error:
            raise ImportError(
                "df.info_profile() needs the live profile widget "
                "(infoscope.widgets.profile.ProfileWidget), which could not be imported: "
                f"{error}. The tables work without it: df.info_profile.entropy(), .pairs(), ..."
            ) from error
        from infoscope.widgets.profile import BACKGROUND_FIRST_VIEW_CELLS, PREVIEW_ROWS

        frame = self._checked_frame()
        if (settings.get("sample") is None and frame.shape[0] > PREVIEW_ROWS
                and frame.shape[0] * frame.shape[1] >= BACKGROUND_FIRST_VIEW_CELLS):
            # a big frame: the session starts on the preview's seeded sample, so the
            # widget shows in a second or two; the full data follow on its worker thread
            start = self.session(**{**settings, "sample": PREVIEW_ROWS})
            return ProfileWidget(start, reference=reference, drift_over=drift_over, sampled_start=True)
        return ProfileWidget(self.session(**settings), reference=reference, drift_over=drift_over)
