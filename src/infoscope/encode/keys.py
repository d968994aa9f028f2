"""Unique string keys for column labels (repeated names, numbers, MultiIndex tuples)."""
from __future__ import annotations

from collections.abc import Sequence

from infoscope._warnings import DataQualityWarning, warn_user

__all__ = ["column_keys", "key_text"]


def key_text(label) -> str:
    """The text of one column label: the one rule every layer uses to name a column.

    Parameters
    ----------
    label : object
        A column label: a string, a number, or a MultiIndex tuple.

    Returns
    -------
    str
        Strings as they are, other labels by ``str``; tuples joined with ``" / "``
        with their empty parts (``""`` or None) left out, so ``("a", "")`` — the
        label a flattened groupby-agg leaves — is ``"a"``.  A tuple of empty parts
        only is ``str(label)``.

    References
    ----------
    .. [1] pandas, ``pandas.MultiIndex`` (tuple labels; the empty level a
       groupby-agg leaves); joining the parts with a separator is common practice.

    Examples
    --------
    >>> key_text(("a", "")), key_text(("b", "x")), key_text(3)
    ('a', 'b / x', '3')
    """
    if isinstance(label, tuple):
        parts = [str(p) for p in label if not (p is None or (isinstance(p, str) and p == ""))]
        return " / ".join(parts) if parts else str(label)
    return label if isinstance(label, str) else str(label)


def column_keys(columns: Sequence, *, warn: bool = True) -> list[str]:
    """Unique string keys for column labels (duplicates, numbers, MultiIndex tuples).

    Parameters
    ----------
    columns : sequence
        Column labels, e.g. ``df.columns``.
    warn : bool, default=True
        Warn (:class:`~infoscope.DataQualityWarning`) when labels repeat.

    Returns
    -------
    list of str
        One key per label (:func:`key_text`: strings as they are, other labels by
        ``str``, tuples joined with ``" / "``, empty parts left out); a repeated key gets
        ``" (2)"``, ``" (3)"``, ... in order of appearance.

    References
    ----------
    .. [1] pandas, ``pandas.MultiIndex`` (tuple labels) — common practice for
       flattening them into one string.

    Examples
    --------
    >>> column_keys(["a", "a", 3, ("b", "x")], warn=False)
    ['a', 'a (2)', '3', 'b / x']
    """
    texts = [key_text(c) for c in columns]
    used = set(texts)
    seen: dict[str, int] = {}
    out = []
    repeated = []
    for t in texts:
        if t not in seen:
            seen[t] = 1
            out.append(t)
            continue
        seen[t] += 1
        j = seen[t]
        new = f"{t} ({j})"
        while new in used:
            j += 1
            new = f"{t} ({j})"
        seen[t] = j
        used.add(new)
        out.append(new)
        repeated.append(t)
    if repeated and warn:
        names = ", ".join(repr(t) for t in dict.fromkeys(repeated))
        warn_user(
            f"column names repeat ({names}); later ones are keyed with ' (2)', ' (3)', ...",
            DataQualityWarning,
        )
    return out
