"""What the controls of a view offer, and how view settings map to session settings.

The choices come from :data:`infoscope.frame.settings.CHOICES` (the lists the
session validates against) and from the units the estimators know; the only lists
defined here are those no lower layer has (the sort keys of the entropy bars).
Nothing here re-validates what the session validates: a bad estimator, measure,
strategy or bin rule is refused by ``ProfileSession.update`` with its own message.
"""
from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from infoscope._version import __version__
from infoscope.estimators._checks import unit_name
from infoscope.frame.settings import CHOICES
from infoscope.frame.suppression import check_min_count
from infoscope.views.serialize import UNITS, scalar

__all__ = ["BASE_OF_UNIT", "SORTS", "UNITS", "control_choices", "meta", "session_settings",
           "view_settings_from_session"]

#: The ``base`` setting of each unit a view offers.
BASE_OF_UNIT = {"bits": 2, "nats": "nats", "hartleys": 10}
#: Sort keys of the entropy bars.
SORTS = ("entropy", "name", "efficiency", "missing_share")


def control_choices() -> dict[str, list[str]]:
    """The choices of every control of the live view (the front end lists these).

    Returns
    -------
    dict of str to list of str
        ``strategy`` (the binning strategies, then the bin-count rules),
        ``estimator``, ``measure``, ``unit``, ``missing``, ``order``, ``sort_by``.

    Examples
    --------
    >>> control_choices()["unit"]
    ['bits', 'nats', 'hartleys']
    """
    # "rows" (the session's default) is what the bins slider starts at, not a rule
    # to pick: a view shows its number (view_settings_from_session)
    rules = tuple(rule for rule in CHOICES["bin_rule"] if rule != "rows")
    return {"strategy": list(CHOICES["strategy"] + rules),
            "estimator": list(CHOICES["estimator"]), "measure": list(CHOICES["measure"]),
            "unit": list(UNITS), "missing": list(CHOICES["missing"]), "order": list(CHOICES["order"]),
            "sort_by": list(SORTS)}


def view_settings_from_session(settings: Mapping, rows: int | None = None) -> dict:
    """The view settings (control values) that show a session's settings.

    Parameters
    ----------
    settings : mapping
        ``ProfileSession.settings``.
    rows : int, optional
        Rows profiled; with the default ``bins="rows"`` the bins slider shows the
        number that rule gives for them
        (:func:`infoscope.encode.binning.rows_bin_count`).

    Returns
    -------
    dict
        ``strategy`` holds a bin rule when ``bins`` is one (a rule sets the bin
        count), else ``bins`` and ``strategy``; ``estimator``, ``measure``,
        ``missing``, ``target``, ``alpha`` when set; ``unit`` from ``base``.

    Examples
    --------
    >>> view_settings_from_session({"bins": "fd", "base": "nats"})
    {'strategy': 'fd', 'unit': 'nats'}
    """
    s = dict(settings)
    out: dict[str, Any] = {}
    bins, strategy = s.get("bins", 16), s.get("strategy", "quantile")
    if bins == "rows":
        from infoscope.encode.binning import rows_bin_count

        bins = rows_bin_count(int(rows)) if rows else 16
    if isinstance(bins, str):
        out["strategy"] = bins
    else:
        out["bins"] = int(bins)
        out["strategy"] = str(strategy)
    for key in ("estimator", "measure", "missing", "target"):
        if s.get(key) is not None:
            out[key] = s[key]
    if s.get("alpha") is not None:
        out["alpha"] = float(s["alpha"])
    out["unit"] = unit_name(s.get("base", 2))
    return out


def session_settings(view: Mapping, *, sample=None, rows_bins: int | None = None) -> dict:
    """The ``ProfileSession.update`` keywords of a view's control values.

    Parameters
    ----------
    view : mapping
        ``bins``, ``strategy`` (a strategy or a bin rule), ``estimator``, ``alpha``,
        ``unit``, ``missing``, ``target``, ``measure``.
    sample : int, optional
        The ``sample`` setting to pass on.
    rows_bins : int, optional
        The number the bins slider showed for a session on the ``"rows"`` rule
        (:func:`view_settings_from_session`).  While the slider stays at it the
        session keeps the rule, which gives a column with missing values the count
        of its own values; another number is a fixed count for every column.

    Returns
    -------
    dict
        Keywords for ``ProfileSession.update``.

    Raises
    ------
    ValueError
        For a unit the views do not offer (the session takes any base; the
        controls show three).

    Examples
    --------
    >>> view = {"bins": 8, "strategy": "fd", "estimator": "plugin", "alpha": 0.5,
    ...         "unit": "nats", "missing": "drop", "target": None, "measure": "mi"}
    >>> session_settings(view)["bins"]
    'fd'
    >>> session_settings({**view, "strategy": "quantile"}, rows_bins=8)["bins"]
    'rows'
    """
    unit = view["unit"]
    if unit not in BASE_OF_UNIT:
        raise ValueError(f"unit={unit!r} is not valid; choose one of: {', '.join(map(repr, UNITS))}")
    if view["strategy"] in CHOICES["bin_rule"]:
        bins, strategy = view["strategy"], "uniform"
    else:
        bins, strategy = int(view["bins"]), view["strategy"]
        if rows_bins is not None and bins == int(rows_bins):
            bins = "rows"
    return {
        "bins": bins, "strategy": strategy, "estimator": view["estimator"],
        "alpha": float(view["alpha"]) if view["estimator"] == "dirichlet" else None,
        "base": BASE_OF_UNIT[unit], "missing": view["missing"],
        "target": view["target"], "measure": view["measure"], "sample": sample,
    }


def check_view_settings(view: Mapping, names) -> None:
    """Check the view settings that no session method checks (a clear error, naming the setting).

    ``selected_pair``, ``target`` and ``column_bins`` must name columns of the
    profile; ``min_count`` follows :func:`infoscope.frame.suppression.check_min_count`;
    ``alpha_fdr`` is a level in (0, 1); ``sort_by`` one of :data:`SORTS`.
    """
    names = set(names)
    target = view.get("target")
    if target is not None and target not in names:
        raise ValueError(f"target {target!r} is not a column of this profile")
    for name in dict(view.get("column_bins") or {}):
        if name not in names:
            raise ValueError(f"column_bins names {name!r}, which is not a column of this profile")
    pair = view.get("selected_pair")
    for x in pair or ():
        if x not in names:
            raise ValueError(f"selected_pair names {x!r}, which is not a column of this profile")
    check_min_count(view.get("min_count") or None)
    alpha = view.get("alpha_fdr", 0.05)
    if not 0.0 < float(alpha) < 1.0:
        raise ValueError(f"alpha_fdr={alpha!r} must be a false discovery rate strictly between 0 and 1")
    sort_by = view.get("sort_by", "entropy")
    if sort_by not in SORTS:
        raise ValueError(f"sort_by={sort_by!r} is not valid; choose one of: {', '.join(map(repr, SORTS))}")


def meta(session, n_rows: int | None = None) -> dict:
    """The ``_meta`` part of a view: column names, row count, sample, control choices, version.

    Parameters
    ----------
    session : ProfileSession
        The profile.
    n_rows : int, optional
        Rows of the frame (default ``session.n_rows``).

    Returns
    -------
    dict
        ``names``, ``n_rows``, ``sampled``, ``choices`` (:func:`control_choices`),
        ``bin_rules``, ``version``, ``weights`` (the weight column or None) and
        ``n_effective`` (Kish's effective sample size of a weighted profile).

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> meta(ProfileSession(pd.DataFrame({"a": [1, 2, 3]})))["names"]
    ['a']
    """
    out = {
        "names": [str(x) for x in session.names],
        "n_rows": int(session.n_rows if n_rows is None else n_rows),
        "sampled": scalar(session.sampled),
        "choices": control_choices(),
        "bin_rules": list(CHOICES["bin_rule"]),
        "version": __version__,
        # observation weights: the column and Kish's effective sample size of the rows
        "weights": None, "n_effective": None,
    }
    if getattr(session, "weighted", False):
        out["weights"] = str(session.settings["weights"])
        out["n_effective"] = scalar(session.engine.n_effective)
    return out
