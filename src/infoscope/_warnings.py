"""Warning classes of infoscope (the test suite turns these into errors), and :func:`warn_user`."""
from __future__ import annotations

import sys
import warnings
from pathlib import Path

_PACKAGE = str(Path(__file__).resolve().parent)
# frames that are never the user's code: infoscope itself, and the context managers
# infoscope calls through
_SKIP = (_PACKAGE, str(Path(warnings.__file__).resolve().parent / "contextlib.py"))


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
    frame = sys._getframe(1)
    level = 2
    while frame is not None and frame.f_code.co_filename.startswith(_SKIP):
        frame = frame.f_back
        level += 1
    if frame is None:  # nothing outside infoscope (a worker thread): the outermost frame
        level -= 1
    warnings.warn(message, category, stacklevel=level)
