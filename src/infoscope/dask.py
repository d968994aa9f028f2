"""``dask.dataframe.DataFrame.info_profile``: the accessor of Dask DataFrames.

``import infoscope.dask`` registers it (with Dask's own
``dask.dataframe.extensions.register_dataframe_accessor``).  It is also
registered when ``infoscope`` is imported after ``dask.dataframe`` (``import
infoscope`` checks ``sys.modules``); infoscope never imports Dask itself when the
user has not, so ``import infoscope`` stays free of it.  ``infoscope.profile(ddf)``
needs no registration.

The methods are those of the pandas accessor
(:class:`~infoscope.accessor.InfoProfileAccessor`) and return the same tables:
the profile is computed on the active Dask scheduler (a ``distributed.Client``,
or Dask's default local scheduler) by
:func:`infoscope.sources.dask.profile_dask`, without gathering the frame, and
equals the in-memory profile of ``ddf.compute()``.  The views that read rows
(``conditional``, ``select``, ``tree``, ``surprising_rows``, drift) raise
:class:`~infoscope.sources.session.NeedsRows`, which says how to profile a
sample instead.
"""
from __future__ import annotations

from collections import OrderedDict

import dask.dataframe as dd

from infoscope.accessor import _VIEW_SETTINGS, InfoProfileAccessor

__all__ = ["DaskInfoProfile"]

#: Options of the Dask computation itself (not session settings).
_RUN_OPTIONS = ("split_every", "progress", "backend")

# (Dask token of the frame, settings) -> session: a session holds only tables
_SESSIONS: OrderedDict = OrderedDict()
_MAX_SESSIONS = 8


@dd.extensions.register_dataframe_accessor("info_profile")
class DaskInfoProfile(InfoProfileAccessor):
    """Information profile of a Dask DataFrame: ``ddf.info_profile.<method>(**settings)``.

    Every method takes the session's settings as keywords (``bins``,
    ``estimator``, ``target``, ...) and the options of the Dask run:
    ``split_every`` (inputs per node of the reduction trees), ``progress``
    (Dask's progress display; ``"auto"``, True or False) and ``backend`` (the
    counting kernel on the workers).  Sessions are reused while the frame's Dask
    graph and the settings are the same (``dask.base.tokenize`` of the frame),
    so ``.entropy()`` then ``.pairs()`` reads the data once; ``.session()``
    always makes a new one (after the files behind the frame changed, say).

    Parameters
    ----------
    frame : dask.dataframe.DataFrame
        The frame the accessor is attached to (never modified, never gathered).

    References
    ----------
    .. [1] Dask documentation, "Extend: register custom accessors"
       (``dask.dataframe.extensions.register_dataframe_accessor``).

    Examples
    --------
    >>> import pandas as pd, dask.dataframe as dd
    >>> import infoscope.dask  # registers the accessor
    >>> ddf = dd.from_pandas(pd.DataFrame({"a": [1, 2] * 50, "b": list("xy") * 50}), npartitions=4)
    >>> ddf.info_profile.pairs(estimator="plugin", progress=False)[["a", "b", "nmi"]].values.tolist()
    [['a', 'b', 1.0]]
    """

    def _checked_frame(self):
        frame = self._frame
        if len(frame.columns) == 0:
            raise ValueError("the Dask DataFrame has no columns: there is nothing to profile")
        return frame

    def _session(self, settings: dict):
        from dask.base import tokenize

        from infoscope.frame.sessions import _settings_key

        frame = self._checked_frame()
        skey = _settings_key(settings)
        key = None if skey is None else (tokenize(frame), skey)
        if key is not None and key in _SESSIONS:
            cached = _SESSIONS[key]
            session_settings = {k: v for k, v in settings.items() if k not in _RUN_OPTIONS}
            if cached.settings == {**cached.settings, **session_settings}:
                _SESSIONS.move_to_end(key)
                return cached
        session = self.session(**settings)
        if key is not None:
            _SESSIONS[key] = session
            while len(_SESSIONS) > _MAX_SESSIONS:
                _SESSIONS.popitem(last=False)
        return session

    def session(self, **settings):
        """A new profile session of this frame, computed on the active Dask scheduler.

        Parameters
        ----------
        **settings
            Settings of the session, and ``split_every``, ``progress``, ``backend``.

        Returns
        -------
        TableSession
            See :func:`infoscope.sources.dask.profile_dask`.

        References
        ----------
        .. [1] Dask documentation, "Dask DataFrame".

        Examples
        --------
        >>> import pandas as pd, dask.dataframe as dd
        >>> ddf = dd.from_pandas(pd.DataFrame({"a": [1, 2, 1]}), npartitions=2)
        >>> ddf.info_profile.session(progress=False).names
        ['a']
        """
        from infoscope.sources.dask import profile_dask

        return profile_dask(self._checked_frame(), **settings)

    # the views that read rows: the session's own clear refusal (NeedsRows)
    def conditional(self, x: str, y: str, given=(), *, n_permutations: int = 999, **settings):
        """Not available on a Dask frame: conditional tables read the rows (raises ``NeedsRows``).

        Parameters
        ----------
        x, y : str
            Column keys.
        given : str or list of str, default=()
            Conditioning columns.
        n_permutations : int, default=999
            Shuffles for the p-value.
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            Never: profile a sample (``ddf.sample(...).compute().info_profile``).

        References
        ----------
        .. [1] Cover, T. M., & Thomas, J. A. (2006). Elements of Information Theory,
           2nd ed., Wiley, sec. 2.5.

        Examples
        --------
        >>> # ddf.info_profile.conditional("x", "y")  raises NeedsRows
        """
        return self._session(settings).conditional(x, y, given, n_permutations=n_permutations)

    def select(self, target: str | None = None, k=None, method: str = "mrmr", **settings):
        """Not available on a Dask frame: the selection's tests read the rows (raises ``NeedsRows``).

        Parameters
        ----------
        target : str, optional
            The target column key.
        k : int, optional
            Number of steps.
        method : {"mrmr", "jmi", "cmim"}, default="mrmr"
            Selection rule.
        **settings
            Settings of the session (and of the selection).

        Returns
        -------
        pandas.DataFrame
            Never: profile a sample.

        References
        ----------
        .. [1] Peng, H., Long, F., & Ding, C. (2005). IEEE TPAMI, 27(8), 1226-1238.

        Examples
        --------
        >>> # ddf.info_profile.select("y")  raises NeedsRows
        """
        options = {name: settings.pop(name) for name in ("include_leaks", "n_permutations", "fdr")
                   if name in settings}
        return self._session(settings).select(target, k=k, method=method, **options)

    def tree(self, **settings):
        """Not available on a Dask frame: reads the rows (raises ``NeedsRows``).

        Parameters
        ----------
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            Never: profile a sample.

        References
        ----------
        .. [1] Chow, C. K., & Liu, C. N. (1968). IEEE Transactions on Information
           Theory, 14(3), 462-467.

        Examples
        --------
        >>> # ddf.info_profile.tree()  raises NeedsRows
        """
        return self._session(settings).tree()

    def surprising_rows(self, n: int = 20, model: str = "tree", **settings):
        """Not available on a Dask frame: surprising rows are rows (raises ``NeedsRows``).

        Parameters
        ----------
        n : int, default=20
            Number of rows.
        model : {"tree", "independent"}, default="tree"
            Model of the table.
        **settings
            Settings of the session.

        Returns
        -------
        pandas.DataFrame
            Never: profile a sample.

        References
        ----------
        .. [1] Chow, C. K., & Liu, C. N. (1968). IEEE Transactions on Information
           Theory, 14(3), 462-467.

        Examples
        --------
        >>> # ddf.info_profile.surprising_rows()  raises NeedsRows
        """
        return self._session(settings).surprising_rows(n, model=model)

    def to_html(self, path=None, *, min_count=None, title: str | None = None, reference=None, **settings):
        """The profile as one self-contained HTML file that works offline.

        Parameters
        ----------
        path : str or os.PathLike, optional
            File to write.  Without it the HTML text is returned.
        min_count : int, optional
            Hide counts ``1 .. min_count - 1`` in every pair view of the file.
        title : str, optional
            Title of the page.
        reference : optional
            Not available on a Dask frame (drift reads the rows; raises ``NeedsRows``).
        **settings
            Settings of the session, the Dask run and the views (``order``,
            ``alpha_fdr``, ``selected_pair``, ``sort_by``).

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
        >>> import pandas as pd, dask.dataframe as dd
        >>> ddf = dd.from_pandas(pd.DataFrame({"a": list("xyxy") * 10, "b": list("xxyy") * 10}), npartitions=2)
        >>> ddf.info_profile.to_html(n_boot=0, progress=False).startswith("<!DOCTYPE html>")
        True
        """
        from infoscope.report.html import to_html

        view = {k: settings.pop(k) for k in list(settings) if k in _VIEW_SETTINGS}
        session = self._session(settings)
        if reference is not None:
            session.drift(reference)  # NeedsRows, with its message
        return to_html(session, path, min_count=min_count, title=title, settings=view)

    def __call__(self, *, reference=None, **settings):
        """The live profile widget of this frame (needs the widget extra).

        Parameters
        ----------
        reference : optional
            Not available on a Dask frame (drift reads the rows; raises ``NeedsRows``).
        **settings
            Initial settings of the profile, and the options of the Dask run.

        Returns
        -------
        infoscope.widgets.profile.ProfileWidget
            Its controls that need a new encoding say that another pass is needed.

        References
        ----------
        .. [1] Jupyter widget protocol (ipywidgets / anywidget documentation).

        Examples
        --------
        >>> w = ddf.info_profile()  # doctest: +SKIP
        """
        session = self.session(**settings)
        if reference is not None:
            session.drift(reference)
        return session.widget()
