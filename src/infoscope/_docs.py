"""Docstring blocks written once and placed in many docstrings.

A docstring names a shared block on a line of its own: ``{name}`` at the block's
indentation, or ``.. [1] {name}`` for a numbered reference.  :func:`fill_doc` puts
the block there when the module is imported (re-indented; a reference's further
lines three spaces in, as numpydoc writes them), so ``help()``, numpydoc and doctest
read the whole text.  A name without a block raises at import: no docstring ever
shows a placeholder.  Braces elsewhere in a docstring (sets of choices, formulas)
are left alone: only a line that is nothing but the placeholder is filled.

:data:`CITATIONS` is the one copy of each published work that several docstrings
cite; a block that depends on the object it documents is a callable of that object
(for example the class name in a ``Returns`` section).
"""
from __future__ import annotations

import re
import textwrap
from collections.abc import Callable, Mapping

__all__ = ["CITATIONS", "fill_doc", "filled"]

#: Works cited by several docstrings, as their numbered entries read.
CITATIONS = {
    "wilks_1938": (
        "Wilks, S. S. (1938). The large-sample distribution of the likelihood\n"
        "ratio for testing composite hypotheses. Annals of Mathematical Statistics,\n"
        "9(1), 60-62."
    ),
    "vinh_2010": (
        "Vinh, N. X., Epps, J., & Bailey, J. (2010). Information theoretic measures\n"
        "for clusterings comparison: variants, properties, normalization and\n"
        "correction for chance. Journal of Machine Learning Research, 11, 2837-2854."
    ),
    "fayyad_irani_1993": (
        "Fayyad, U. M., & Irani, K. B. (1993). Multi-interval discretization of\n"
        "continuous-valued attributes for classification learning. Proceedings of the\n"
        "13th International Joint Conference on Artificial Intelligence, 1022-1027."
    ),
    "kvalseth_1987": (
        "Kvålseth, T. O. (1987). Entropy and correlation: some comments. IEEE\n"
        "Transactions on Systems, Man, and Cybernetics, 17(3), 517-519."
    ),
    "strehl_ghosh_2002": (
        "Strehl, A., & Ghosh, J. (2002). Cluster ensembles - a knowledge reuse\n"
        "framework for combining multiple partitions. Journal of Machine Learning\n"
        "Research, 3, 583-617."
    ),
    "meila_2007": (
        "Meilă, M. (2007). Comparing clusterings - an information based distance.\n"
        "Journal of Multivariate Analysis, 98(5), 873-895."
    ),
    "watanabe_1960": (
        "Watanabe, S. (1960). Information theoretical analysis of multivariate\n"
        "correlation. IBM Journal of Research and Development, 4(1), 66-82."
    ),
}

_PLACEHOLDER = re.compile(
    r"^(?P<indent>[ \t]*)(?P<label>\.\. \[\d+\] )?\{(?P<name>[a-z][a-z0-9_]*)\}[ \t]*$", re.MULTILINE
)


def filled(doc: str | None, blocks: Mapping[str, str | Callable[[object], str]], obj: object = None) -> str | None:
    """``doc`` with every placeholder line replaced by its block.

    Parameters
    ----------
    doc : str or None
        A docstring (None when Python runs with ``-OO``: returned as is).
    blocks : mapping of str to str or callable
        The blocks by name; a callable is called with ``obj`` and gives the text.
    obj : object, optional
        The documented object, for callable blocks.

    Returns
    -------
    str or None
        The docstring with the blocks in place.

    Raises
    ------
    KeyError
        A placeholder names no block.

    Examples
    --------
    >>> print(filled("Title.\\n\\n    {unit}\\n", {"unit": "base : float\\n    Logarithm base."}))
    Title.
    <BLANKLINE>
        base : float
            Logarithm base.
    <BLANKLINE>
    """
    if doc is None:
        return None

    def put(match: re.Match) -> str:
        name = match["name"]
        if name not in blocks:
            raise KeyError(f"docstring placeholder {{{name}}} names no block; known: {', '.join(sorted(blocks))}")
        block = blocks[name]
        text = textwrap.dedent(block(obj) if callable(block) else block).strip("\n")
        indent, label = match["indent"], match["label"] or ""
        first, *rest = text.split("\n")
        inner = indent + ("   " if label else "")  # a reference's lines go under its ".." + 3
        return "\n".join([indent + label + first] + [inner + line if line else "" for line in rest])

    return _PLACEHOLDER.sub(put, doc)


def fill_doc(blocks: Mapping[str, str | Callable[[object], str]] | None = None, **more):
    """Decorator: fill the placeholders of a function's or class's docstring.

    Parameters
    ----------
    blocks : mapping, optional
        Blocks by name (see :func:`filled`); :data:`CITATIONS` are always known.
    **more : str or callable
        Further blocks.

    Returns
    -------
    callable
        The decorator; it returns the object itself with its docstring filled.

    Examples
    --------
    >>> @fill_doc(base="base : float\\n    Logarithm base.")
    ... def f(base=2):
    ...     '''Do it.
    ...
    ...     Parameters
    ...     ----------
    ...     {base}
    ...
    ...     References
    ...     ----------
    ...     .. [1] {wilks_1938}
    ...     '''
    >>> "    base : float\\n        Logarithm base." in f.__doc__
    True
    >>> "    .. [1] Wilks, S. S. (1938)" in f.__doc__ and "       9(1), 60-62." in f.__doc__
    True
    """
    merged = {**CITATIONS, **(blocks or {}), **more}

    def decorate(obj):
        obj.__doc__ = filled(obj.__doc__, merged, obj)
        return obj

    return decorate
