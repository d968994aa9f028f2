"""Sessions reused by content: :func:`session_for` (the accessors' session cache).

Sessions are reused by the *content* of the frame plus the settings
(:func:`infoscope.encode.cache.frame_key`, the key function of the encoder's cache
too) — not by an accessor object, which pandas caches on the frame and which would
therefore keep stale results after the frame changed in place.  Finding a cached
session hashes the column buffers (XXH3, about 15 ms for 1,000,000 x 50), a few per
cent of computing the pairs.
"""
from __future__ import annotations

from collections import OrderedDict

import pandas as pd

from infoscope.encode.cache import frame_key
from infoscope.frame.session import ProfileSession, as_pandas

__all__ = ["session_for"]

# content key -> session; small, because a session holds its frame's codes
_SESSIONS: OrderedDict = OrderedDict()
_MAX_SESSIONS = 4


def _settings_key(settings: dict):
    # (name, type, value): 1, 1.0 and True are equal and hash alike in Python, but
    # they are different settings (and a bad one must reach the session's own check)
    try:
        key = tuple(sorted((name, type(value).__qualname__, value) for name, value in settings.items()))
        hash(key)
    except TypeError:
        return None
    return key


def _eager(frame):
    """A Polars LazyFrame collected; anything else as it is."""
    if type(frame).__module__.split(".")[0] == "polars" and hasattr(frame, "collect") \
            and not hasattr(frame, "to_pandas"):
        return frame.collect()
    return frame


def session_for(frame, **settings):
    """A :class:`ProfileSession` of ``frame`` with ``settings``, reused by content.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame
        The data (never modified).
    **settings
        Settings of :class:`~infoscope.frame.session.ProfileSession`.

    Returns
    -------
    ProfileSession
        A cached session when the same content was profiled with the same
        settings (and its settings were not changed since), else a new one.
        Call ``update`` only on sessions you build yourself.

    References
    ----------
    .. [1] pandas documentation, "Extending pandas: registering custom accessors".

    Examples
    --------
    >>> import pandas as pd
    >>> df = pd.DataFrame({"a": [1, 2, 1, 2], "b": list("xyxy")})
    >>> session_for(df) is session_for(df.copy())
    True
    """
    frame = _eager(frame)
    content = None
    if isinstance(frame, pd.DataFrame) or type(frame).__module__.split(".")[0] == "polars":
        content = frame_key(frame) if frame.shape[1] else None
    skey = _settings_key(settings)
    key = None if content is None or skey is None else (content, skey)
    if key is not None and key in _SESSIONS:
        cached = _SESSIONS[key]
        if cached.settings == {**cached.settings, **settings}:
            _SESSIONS.move_to_end(key)
            return cached
    session = ProfileSession(as_pandas(frame), **settings)
    if key is not None:
        _SESSIONS[key] = session
        while len(_SESSIONS) > _MAX_SESSIONS:
            _SESSIONS.popitem(last=False)
    return session
