"""``polars.DataFrame.info_profile`` (and ``LazyFrame.info_profile``): the Polars namespace.

``import infoscope.polars`` registers the namespace explicitly.  It is also
registered when ``infoscope`` is imported after Polars (``import infoscope``
checks ``sys.modules``); infoscope never imports Polars itself when the user has
not, so ``import infoscope`` stays free of it.

The namespace converts the frame to pandas (``to_pandas()``; a LazyFrame is
collected first) and delegates to the same :class:`ProfileSession` as the pandas
accessor, reused by the frame's current content (hashed from its arrow buffers,
so an edit in place is seen on the next call) and settings, so
``pl_df.info_profile.entropy()`` equals ``pl_df.to_pandas().info_profile.entropy()``
except for the ``kind`` of Polars-specific dtypes.  The Polars frame is never
modified.
"""
from __future__ import annotations

import polars as pl

from infoscope.accessor import InfoProfileAccessor

__all__ = ["PolarsInfoProfile"]


class PolarsInfoProfile(InfoProfileAccessor):
    """Information profile of a Polars frame: ``pl_df.info_profile.<method>(**settings)``.

    The methods and settings are those of the pandas accessor
    (:class:`~infoscope.accessor.InfoProfileAccessor`): ``entropy``,
    ``pairs``, ``matrix``, ``pair``, ``relevance``, ``drift``, ``session`` and the
    call that returns the live profile widget.

    Parameters
    ----------
    frame : polars.DataFrame or polars.LazyFrame
        The frame the namespace is attached to (never modified; a LazyFrame is
        collected when a method is called).

    References
    ----------
    .. [1] Polars documentation, "polars.api.register_dataframe_namespace".

    Examples
    --------
    >>> import polars as pl
    >>> import infoscope.polars  # registers pl.DataFrame.info_profile
    >>> df = pl.DataFrame({"a": [1, 2, 1, 2] * 5, "b": list("xyxy") * 5})
    >>> df.info_profile.pairs(estimator="plugin")[["a", "b", "nmi"]].values.tolist()
    [['a', 'b', 1.0]]
    """

    def __init__(self, frame):
        self._source = frame

    @property
    def _frame(self):
        # Polars keeps this namespace object on the frame, and a DataFrame can change
        # in place (q[0, "a"] = 99, insert_column, drop_in_place): nothing converted
        # is kept here. Every call finds its session by the frame's current content
        # (frame_key over the arrow buffers) and converts to pandas only on a miss.
        from infoscope.frame.sessions import _eager  # the session machinery loads on first use

        return _eager(self._source)


def _register() -> None:
    for register in (pl.api.register_dataframe_namespace, pl.api.register_lazyframe_namespace):
        register("info_profile")(PolarsInfoProfile)


_register()
