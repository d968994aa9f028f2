"""Warning classes of infoscope (the test suite turns these into errors), and :func:`warn_user`."""
from __future__ import annotations

import sys
import threading
import warnings
from contextlib import contextmanager
from pathlib import Path

_PACKAGE = str(Path(__file__).resolve().parent)
# frames that are never the user's code: infoscope itself, and the context managers
# infoscope calls through
_SKIP = (_PACKAGE, str(Path(warnings.__file__).resolve().parent / "contextlib.py"))


# per thread: the list that collect_warnings() gathers this thread's warnings into
_collecting = threading.local()


class InfoscopeWarning(UserWarning):
    """Base class of every warning infoscope emits about the user's data or options."""


class SmallSampleWarning(InfoscopeWarning):
    """The sample is too small for the number of cells: estimates are unreliable."""


class DataQualityWarning(InfoscopeWarning):
    """A column needed a policy decision (inf values, mixed types, folded levels ...)."""


def warn_user(message: str, category: type[Warning] = DataQualityWarning) -> None:
    """Issue a warning attributed to the first caller outside infoscope (the user's line or cell).

    However deep inside infoscope the warning is raised (an accessor, a session, the
    encoder), the file and line shown are those of the user's call, so a notebook
    shows the cell, not a library line.  From a thread that infoscope started (the
    widget's worker) no user frame exists: the outermost frame is used.

    Parameters
    ----------
    message : str
        The text (naming the column and the problem).
    category : type of Warning, default=DataQualityWarning

    Returns
    -------
    None

    References
    ----------
    .. [1] Python documentation, ``warnings.warn`` (``stacklevel``).

    Examples
    --------
    >>> import warnings
    >>> with warnings.catch_warnings(record=True) as caught:
    ...     warnings.simplefilter("always")
    ...     warn_user("column 'a': example")
    >>> caught[0].filename.endswith("_warnings.py")
    False
    """
    sink = getattr(_collecting, "sink", None)
    if sink is not None:  # a worker thread collects its own warnings (see collect_warnings)
        sink.append(warnings.WarningMessage(category(message), category, "", 0))
        return
    frame = sys._getframe(1)
    level = 2
    while frame is not None and frame.f_code.co_filename.startswith(_SKIP):
        frame = frame.f_back
        level += 1
    if frame is None:  # nothing outside infoscope (a worker thread): the outermost frame
        level -= 1
    warnings.warn(message, category, stacklevel=level)


@contextmanager
def collect_warnings():
    """Gather the warnings infoscope issues in this thread into a list, touching no global state.

    ``warnings.catch_warnings`` swaps the process-wide filters and ``showwarning``;
    used in a worker thread (the widget's recompute) it swallows or re-raises the
    warnings of every other thread meanwhile.  This context sends
    :func:`warn_user`'s warnings of the current thread to a list instead and leaves
    the ``warnings`` module alone.

    Yields
    ------
    list of warnings.WarningMessage
        Filled while the context is open (``.message``, ``.category``).

    Examples
    --------
    >>> with collect_warnings() as caught:
    ...     warn_user("column 'a': example")
    >>> [str(w.message) for w in caught]
    ["column 'a': example"]
    """
    previous = getattr(_collecting, "sink", None)
    sink: list = []
    _collecting.sink = sink
    try:
        yield sink
    finally:
        _collecting.sink = previous
