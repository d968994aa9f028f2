"""Frames and column keys: the user's frame as pandas, and unique string keys for its labels."""
from __future__ import annotations

import pandas as pd

# one rule for the text of a label: the encoder's (re-exported here for the session)
from infoscope.encode.keys import column_keys, key_text

__all__ = ["as_pandas", "column_keys", "key_text"]


def as_pandas(frame, parameter: str = "frame") -> pd.DataFrame:
    """Return ``frame`` as a pandas DataFrame without modifying it.

    Parameters
    ----------
    frame : pandas.DataFrame or polars.DataFrame or polars.LazyFrame
        The data.
    parameter : str, default="frame"
        Name used in the error message.

    Returns
    -------
    pandas.DataFrame
        pandas frames are shallow-copied (with copy-on-write, pandas 3, this costs
        nothing and later edits of the user's frame do not reach the copy); Polars
        frames (eager or lazy) are converted with ``to_pandas()``, except that
        integer columns with nulls become pandas' nullable integers (not floats,
        which round integers beyond 2**53).

    Raises
    ------
    TypeError
        For anything else, naming ``parameter``.

    References
    ----------
    .. [1] pandas documentation, "Copy-on-Write (CoW)".

    Examples
    --------
    >>> import pandas as pd
    >>> df = pd.DataFrame({"a": [1, 2]})
    >>> as_pandas(df) is df, as_pandas(df).equals(df)
    (False, True)
    """
    if isinstance(frame, pd.DataFrame):
        return frame.copy(deep=False)
    module = type(frame).__module__.split(".")[0]
    if module == "polars":
        from infoscope.encode.checks import _polars_to_pandas

        if hasattr(frame, "collect") and not hasattr(frame, "to_pandas"):
            frame = frame.collect()  # a LazyFrame
        return _polars_to_pandas(frame)
    raise TypeError(
        f"{parameter} must be a pandas or Polars DataFrame, got {type(frame).__name__}"
    )
