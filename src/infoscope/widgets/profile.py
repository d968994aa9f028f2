"""The live profile: anywidget classes that hold traits and call ``ProfileSession``.

Protocol (front end <-> kernel)
-------------------------------
The front end (``static/profile.js``) sets the *public* traits (the settings) and
calls ``save_changes``. The kernel answers by filling the ``_``-prefixed data traits.
Every settings change gets a new *generation* number; recomputes are debounced
(``debounce`` seconds, 0.15 by default; leading edge: a change while nothing is
pending starts at once, the changes made while it runs collapse into one trailing
recompute),
run on one worker thread (the kernel's
message thread stays free), report progress in ``_status`` and are applied with
``hold_sync`` so a view never shows half an update. A result whose generation is
older than the newest request is dropped: a late answer for an old setting never
replaces a newer one. The front end may send ``{"type": "cancel"}``: the running
recompute stops at its next step and the controls go back to the settings shown.
Errors go to ``_status`` (state ``"error"``, with the message) and to the
``infoscope.widgets`` logger; they are never swallowed.

Modules
-------
The widget class is put together from one part per subject: :mod:`.traits`
(the synced traits, the choices of each control and their mapping to session
settings), :mod:`.scheduler` (generations, debounce, worker thread, cancel),
:mod:`.computation` (what a recompute asks of the session), :mod:`.payload`
(the offline snapshot) and :mod:`.picture` (the static SVG beside the live
view).  This module holds the constructor and the view classes.
"""

from __future__ import annotations

import threading
import uuid
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import traitlets as t

from infoscope._docs import fill_doc
from infoscope.frame.keys import as_pandas
from infoscope.views.payload import drift_over_spec
from infoscope.widgets.computation import Computation
from infoscope.widgets.payload import Payload
from infoscope.widgets.picture import StaticPicture
from infoscope.widgets.scheduler import Cancelled, Scheduler
from infoscope.widgets.traits import ProfileTraits, _row_count, _settings_traits

_STATIC = Path(__file__).with_name("static")

#: Frames longer than this get a first view from a seeded sample of this many rows.
PREVIEW_ROWS = 200_000
#: ``first_view="auto"``: frames of at least this many cells (rows x columns) are
#: shown at once with a progress line and filled in from the worker thread; smaller
#: ones (well under a second) are computed in the constructor, so the first paint
#: already has the numbers.
BACKGROUND_FIRST_VIEW_CELLS = 2_000_000
#: Choices of ``first_view``.
FIRST_VIEWS = ("auto", "background", "now")
#: ``drafts="auto"``: frames of at least this many cells draw a bins move first from
#: fine tables summed into the new bins (exact numbers follow); smaller frames
#: recompute exactly in well under a second.
DRAFT_MIN_CELLS = 2_000_000
#: Choices of ``drafts``.
DRAFTS = ("auto", "always", "never")


class _ProfileBase(Scheduler, Computation, Payload, StaticPicture, ProfileTraits):
    """Traits and recompute machinery shared by every infoscope view."""

    _esm = _STATIC / "profile.js"
    _css = _STATIC / "profile.css"

    def __init__(self, session, *, debounce: float = 0.15, threaded: bool = True,
                 live_picture: bool = True, preview_rows: int | None = PREVIEW_ROWS,
                 picture_delay: float = 1.0, first_view: str = "auto", reference=None, drift_over=None,
                 drafts: str = "auto",
                 sampled_start: bool = False, **kwargs):
        if not all(hasattr(session, m) for m in ("update", "entropy", "pairs", "names", "settings")):
            raise TypeError("the profile widgets need an infoscope ProfileSession "
                            f"(infoscope.frame.session), got {type(session).__name__}")
        if debounce < 0:
            raise ValueError(f"debounce must be >= 0 seconds, got {debounce}")
        if first_view not in FIRST_VIEWS:
            raise ValueError(f"first_view={first_view!r} is not one of {', '.join(map(repr, FIRST_VIEWS))}")
        if drafts not in DRAFTS:
            raise ValueError(f"drafts={drafts!r} is not one of {', '.join(map(repr, DRAFTS))}")
        if preview_rows is not None and (isinstance(preview_rows, bool) or not isinstance(preview_rows, int)
                                         or preview_rows < 100):
            raise ValueError(f"preview_rows must be None or a number of rows >= 100, got {preview_rows!r}")
        # Large frames: the first view comes from a seeded sample (labelled as such),
        # then the full data follow on the worker thread. The user's own `sample`
        # setting, if any, is what the full view uses.
        self._user_sample = session.settings.get("sample")
        n_rows = _row_count(session)
        if sampled_start:
            # the session was built on the preview's seeded sample so that the view shows
            # sooner (df.info_profile() on a big frame): the full data are the user's ask
            if not isinstance(self._user_sample, int) or n_rows is None or n_rows <= self._user_sample:
                raise ValueError("sampled_start=True needs a session built with sample= fewer rows than "
                                 "the frame (the preview's); the full data then follow")
            preview_rows, self._user_sample = self._user_sample, None
        self._preview = (preview_rows is not None and self._user_sample is None
                         and n_rows is not None and n_rows > preview_rows)
        self._sample = preview_rows if self._preview else self._user_sample
        self._session = session
        self._drafts_on = drafts == "always" or (
            drafts == "auto" and (n_rows or 0) * len(session.names) >= DRAFT_MIN_CELLS)
        self._drafts_started = False
        self._drafts_ready = False
        self._drafted_ahead = 0                 # complete rounds of drafts made ahead
        self._drafts_shown = 0                  # drafts applied (tests and benchmarks read it)
        # a reference frame adds the drift view (drift of this frame from it), recomputed
        # when a setting that changes the encoding or the estimates changes
        self._reference = None if reference is None else as_pandas(reference, "reference")
        # drift_over=(time_column, every[, against]) adds the strip of drift over time
        self._drift_over_setting = drift_over
        self._drift_over_spec = drift_over_spec(drift_over, has_reference=self._reference is not None)
        self._drift_key = None
        self._debounce = float(debounce)
        self._threaded = bool(threaded)
        self._live_picture = bool(live_picture)
        # The static picture (its own output beside the live view) is redrawn when the
        # controls have been still for picture_delay seconds (not on every move).
        self._picture_delay = float(picture_delay)
        self._picture_timer: threading.Timer | None = None
        self._lock = threading.RLock()          # guards generation bookkeeping
        self._session_lock = threading.Lock()   # the session is not thread-safe
        self._idle = threading.Condition(self._lock)
        self._requested = 0                     # newest generation asked for
        self._applied = 0                       # generation on screen
        self._outstanding = 0                   # requests not yet finished
        self._timer: threading.Timer | None = None
        self._timer_gen: int | None = None
        self._run_started = 0.0                 # monotonic start of the running recompute
        self._cancel = threading.Event()
        self._shown_settings: dict = {}
        self._reverting = False
        self._pending_parts: set[str] = set()
        self._sent_column_bins: dict = {}
        self._executor = ThreadPoolExecutor(max_workers=1, thread_name_prefix="infoscope-widget") \
            if self._threaded else None
        self._display_id = f"infoscope-{uuid.uuid4().hex}"
        self._displayed = False
        start = self._settings_from_session(session)
        # the slider shows the number the "rows" rule gives; at that number the session keeps the rule
        self._rows_bins = start.get("bins") if session.settings["bins"] == "rows" else None
        start.update({k: v for k, v in kwargs.items() if k in _settings_traits()})
        super().__init__(**start, **{k: v for k, v in kwargs.items() if k not in start})
        self.observe(self._on_setting, names=list(_settings_traits()))
        self.observe(self._on_pair, names=["selected_pair"])
        self.on_msg(self._on_custom)
        self._set_meta()
        n_cells = (n_rows or 0) * len(session.names)
        background = self._threaded and (first_view == "background"
                                         or (first_view == "auto" and n_cells >= BACKGROUND_FIRST_VIEW_CELLS))
        if background:
            # the widget shows at once with a progress line; the first view is computed
            # on the worker thread (a sample first for a big frame, then the full data)
            self._start_first_view(set(self._parts))
        else:
            self._request(set(self._parts), immediate=True, first=True)
            if self._preview:
                self._sample = self._user_sample
                self._preview = False
                self._request(set(self._parts))
                self._status = {**self._status, "message": "First view from a seeded sample; computing the full data..."}

    def _start_first_view(self, parts: set[str]) -> None:
        with self._lock:
            self._requested += 1
            gen = self._requested
            self._pending_parts |= parts
            # one count for the first view, one held for the full data that follow a
            # sampled preview (so wait() never returns between the two)
            self._outstanding += 2 if self._preview else 1
        first = f"a seeded sample of {self._sample:,} rows, then the full data" if self._preview else "every row"
        self._status = {"state": "computing", "message": f"Computing the first view ({first})...",
                        "generation": gen, "progress": 0.0, "notes": []}
        self._executor.submit(self._first_views, gen, parts)

    def _first_views(self, gen: int, parts: set[str]) -> None:
        preview = self._preview
        try:
            self._run(gen)
        finally:
            if preview:
                try:
                    self._sample = self._user_sample
                    self._preview = False
                    if self._requested == gen:  # nothing newer was asked meanwhile
                        self._request(parts)
                        self._status = {**self._status,
                                        "message": "First view from a seeded sample; computing the full data..."}
                finally:
                    with self._idle:
                        self._outstanding -= 1
                        self._idle.notify_all()

    @property
    def session(self):
        """The ``ProfileSession`` this view reads."""
        return self._session

    @property
    def generation(self) -> int:
        """Generation number of the settings the view shows now."""
        return self._applied

    def __repr__(self) -> str:
        names = len(self._meta.get("names", [])) if isinstance(self._meta, dict) else 0
        return f"{type(self).__name__}({names} columns, generation {self._applied})"

    def close(self):
        if not hasattr(self, "_lock"):  # the constructor refused its arguments
            return super().close()
        with self._lock:
            for timer in (self._timer, self._picture_timer):
                if timer is not None:
                    timer.cancel()
            self._timer = self._picture_timer = None
        if self._executor is not None:
            self._executor.shutdown(wait=False, cancel_futures=True)
        super().close()


class ProfileWidget(_ProfileBase):
    """The live profile: controls, entropy bars, information grid, pair view, relevance.

    One page: the controls strip on top, the entropy bars and the information grid
    side by side, the pair view and the relevance bars below. Moving a control
    re-encodes only the affected columns and recounts only the pairs that touch them
    (``ProfileSession.update``); the view keeps showing the last finished numbers
    with a progress line until the new ones arrive.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    debounce : float, default=0.15
        Rapid changes collapse into one recompute: a change while nothing is
        pending recomputes at once; changes made while a recompute runs (or waits)
        wait until the controls have been still this many seconds.
    preview_rows : int or None, default=200_000
        A frame with more rows gets its first view from a seeded sample of this many
        rows (labelled "sampled"), then the full data; None always uses every row.
    picture_delay : float, default=1.0
        Seconds of still controls before the static picture beside a displayed view
        is redrawn (its own output: the live view is not re-rendered).
    threaded : bool, default=True
        Recompute on a worker thread (the kernel stays responsive). ``False``
        recomputes synchronously in the thread that changed a setting.
    first_view : {"auto", "background", "now"}, default="auto"
        "background": the constructor returns at once and the widget shows a
        progress line until the worker thread has the first numbers (a seeded
        sample first for a frame longer than ``preview_rows``); "now": the first
        view is computed in the constructor; "auto": "background" for frames of at
        least :data:`BACKGROUND_FIRST_VIEW_CELLS` cells (with ``threaded=True``).
    live_picture : bool, default=True
        Refresh the static picture beside a displayed view after each recompute.
    sampled_start : bool, default=False
        The session was built with ``sample=`` a preview's rows only so that the
        view can show sooner (``df.info_profile()`` does so for frames of more than
        ``preview_rows`` rows): its first view is that sample's, labelled "sampled",
        and the full data follow on the worker thread as for ``preview_rows``.
    drafts : {"auto", "always", "never"}, default="auto"
        When only the bins control moves, draw the grid first from fine tables summed
        into the new bins (:meth:`ProfileSession.draft_pairs
        <infoscope.frame.session.ProfileSession.draft_pairs>`: the exact tables for 2
        to 16 and 32 bins, close ones elsewhere, said in the status line), then the
        exact numbers. The fine tables are counted once on a thread of their own
        after the first view. "auto": for frames of at least
        :data:`DRAFT_MIN_CELLS` cells.
    reference : pandas.DataFrame or polars.DataFrame, optional
        A reference frame: adds the drift panel (each column's PSI against chance,
        its bins on click, the pairs whose dependence moved), recomputed when a
        setting that changes the encoding or the estimates changes.
    drift_over : str or tuple, optional
        ``(time_column, every)`` such as ``("dispatched_at", "1W")``, or
        ``(time_column, every, against)`` with ``against`` in ``"reference"``
        (the default with a reference frame), ``"first"`` (the default without)
        or ``"previous"``; a name alone means periods of ``"1W"``. Adds the strip
        of drift over time to the drift panel (``session.drift_over``; the column
        and the period are checked when it is computed).
    **traits
        Initial values of the public traits (``bins``, ``estimator``, ``target`` ...).

    Returns
    -------
    ProfileWidget
        An anywidget; display it in a notebook.

    References
    ----------
    .. [1] Benjamini, Y. & Hochberg, Y. (1995). Controlling the false discovery rate.
       J. R. Stat. Soc. B 57(1), 289-300 (the q-values that mute grid cells).

    Examples
    --------
    >>> from infoscope.frame.session import ProfileSession   # doctest: +SKIP
    >>> w = ProfileWidget(ProfileSession(df), target="churned")  # doctest: +SKIP
    >>> w.bins = 8; w.wait()                                 # doctest: +SKIP
    """

    _view = t.Unicode("profile").tag(sync=True)
    #: the selection (with a target) comes as a follow-up recompute (computation.DEFERRED_PARTS)
    _parts = ("entropy", "grid", "pair", "relevance", "selection")

    def to_html(self, path=None, *, min_count=None):
        """Write the profile as one self-contained HTML file that works offline.

        A thin call of :func:`infoscope.report.html.to_html` with this view: the
        file carries the numbers of the current settings, with every column name
        and value escaped, and no script or style from the network.

        Parameters
        ----------
        path : str or os.PathLike, optional
            File to write. Without it the HTML text is returned.
        min_count : int, optional
            Small-cell threshold of every pair view in the file: cells with 1 ..
            ``min_count - 1`` rows are hidden (small counts can identify people).
            None keeps the report's default.

        Returns
        -------
        pathlib.Path or str
            The path written, or the HTML text when ``path`` is None.

        References
        ----------
        .. [1] W3C (2016). Content Security Policy Level 2. Small-cell suppression:
           common practice in official statistics.

        Examples
        --------
        >>> w = ProfileWidget(ProfileSession(df))          # doctest: +SKIP
        >>> w.to_html("profile.html", min_count=10)        # doctest: +SKIP
        PosixPath('profile.html')
        """
        from infoscope.report.html import to_html
        return to_html(self, path, min_count=min_count)

    def charts(self, **kw):
        """The views of this profile as Altair charts, keyed by view name.

        A thin call of :func:`infoscope.report.charts.profile_charts` on this
        view's session (its current settings).

        Parameters
        ----------
        **kw
            Passed on: ``reference`` (a frame: adds the drift chart), ``pair``
            (the pair of the pair view), ``min_count`` (small-cell threshold).

        Returns
        -------
        dict of str to altair chart
            ``"entropy"``, ``"grid"``, ``"pair"``, ``"relevance"`` (with a
            target) and ``"drift"`` (with a reference), as ``profile_charts`` gives.

        References
        ----------
        .. [1] Satyanarayan, A., Moritz, D., Wongsuphasawat, K. & Heer, J. (2017).
           Vega-Lite: A grammar of interactive graphics. IEEE TVCG 23(1), 341-350.

        Examples
        --------
        >>> charts = ProfileWidget(ProfileSession(df)).charts()   # doctest: +SKIP
        >>> charts["grid"].save("grid.svg")                      # doctest: +SKIP
        """
        from infoscope.report.charts import profile_charts
        with self._session_lock:
            return profile_charts(self.session, **kw)



def _view_returns_doc(cls) -> str:
    """The ``Returns`` section of a widget class's docstring (its own name)."""
    return f"""Returns
-------
{cls.__name__}
    An anywidget; display it in a notebook."""


def _single_view_doc(cls) -> str:
    """``Parameters`` and ``Returns`` of a single-view widget (its controls live in Python)."""
    return """Parameters
----------
session : infoscope.frame.session.ProfileSession
    The state the view shows; settings start from ``session.settings``.
**options
    As :class:`ProfileWidget` (``debounce``, ``threaded``, ``preview_rows``,
    ``picture_delay``, initial trait values). Settings are changed from Python
    (``w.bins = 8``): a single view has no controls strip.

""" + _view_returns_doc(cls)


@fill_doc(single_view=_single_view_doc)
class EntropyBarsWidget(_ProfileBase):
    """Entropy bars alone: one bar per column with its CI and maximum log K.

    {single_view}

    Examples
    --------
    >>> EntropyBarsWidget(session, sort_by="efficiency")  # doctest: +SKIP
    """

    _view = t.Unicode("entropy").tag(sync=True)
    _parts = ("entropy",)


@fill_doc(single_view=_single_view_doc)
class InformationGridWidget(_ProfileBase):
    """The information grid alone: every column pair, coloured by the pair measure.

    {single_view}

    Examples
    --------
    >>> InformationGridWidget(session, measure="nmi", order="name")  # doctest: +SKIP
    """

    _view = t.Unicode("grid").tag(sync=True)
    _parts = ("grid",)


@fill_doc(single_view=_single_view_doc)
class PairViewWidget(_ProfileBase):
    """The pair view alone: one pair's joint counts with pointwise MI per cell.

    {single_view}

    Examples
    --------
    >>> PairViewWidget(session, selected_pair=["depot", "region"], min_count=5)  # doctest: +SKIP
    """

    _view = t.Unicode("pair").tag(sync=True)
    _parts = ("grid", "pair")


@fill_doc(single_view=_single_view_doc)
class RelevanceWidget(_ProfileBase):
    """Relevance alone: the information each column gives about ``target``.

    {single_view}

    Examples
    --------
    >>> RelevanceWidget(session, target="late")  # doctest: +SKIP
    """

    _view = t.Unicode("relevance").tag(sync=True)
    _parts = ("relevance",)


@fill_doc(view_returns=_view_returns_doc)
class SelectionWidget(_ProfileBase):
    """The selection view alone: columns chosen for ``target`` step by step (``select()``).

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows; settings start from ``session.settings``.
    **options
        As :class:`ProfileWidget`; ``selection_method`` ("mrmr", "jmi", "cmim") and
        ``selection_k`` (None: stop when the next gain is not significant) are set
        from the view's controls or from Python, and recompute in the kernel.

    {view_returns}

    References
    ----------
    .. [1] Peng, H., Long, F. & Ding, C. (2005). Feature selection based on mutual
       information. IEEE TPAMI 27(8), 1226-1238 (mRMR).
    .. [2] Yang, H. H. & Moody, J. (1999). Data visualization and feature selection.
       NIPS 12 (JMI).
    .. [3] Fleuret, F. (2004). Fast binary feature selection with conditional mutual
       information. JMLR 5, 1531-1555 (CMIM).

    Examples
    --------
    >>> SelectionWidget(session, target="late", selection_method="jmi")  # doctest: +SKIP
    """

    _view = t.Unicode("selection").tag(sync=True)
    _parts = ("selection",)


@fill_doc(view_returns=_view_returns_doc)
class SurprisingRowsWidget(_ProfileBase):
    """The surprising-rows view alone: the rows least likely under the Chow-Liu tree.

    Parameters
    ----------
    session : infoscope.frame.session.ProfileSession
        The state the view shows.
    **options
        As :class:`ProfileWidget`; ``surprise_model`` ("tree", "independent") and
        ``surprise_n`` (rows listed); ``min_count`` hides the listed values.

    {view_returns}

    References
    ----------
    .. [1] Chow, C. K., & Liu, C. N. (1968). Approximating discrete probability
       distributions with dependence trees. IEEE Transactions on Information
       Theory, 14(3), 462-467.

    Examples
    --------
    >>> SurprisingRowsWidget(session)  # doctest: +SKIP
    """

    _view = t.Unicode("surprising").tag(sync=True)
    _parts = ("surprising",)


__all__ = ["ProfileWidget", "EntropyBarsWidget", "InformationGridWidget", "PairViewWidget",
           "RelevanceWidget", "SelectionWidget", "SurprisingRowsWidget", "Cancelled"]
