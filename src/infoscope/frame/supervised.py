"""The profile setting ``bins="mdlp"``: numeric columns cut to tell the most about the target.

With ``bins="mdlp"`` and a ``target`` setting, every binned numeric column (other
than the target) is cut by Fayyad & Irani's MDLP against the target's symbols
(:mod:`infoscope.encode.mdlp`); the target itself and datetime or duration columns
keep the unsupervised rule :data:`FALLBACK_BINS`.

Cuts chosen on the target make that column's information about the same target
optimistic: they sit where this sample's classes change.  So the relevance table of
such a profile says so (``attrs["binning_note"]``) and shows an honest figure beside
the optimistic one: ``attrs["held_out_mi"]`` = {column: MI measured on a seeded half
of the rows with cuts chosen on the other half}.
"""
from __future__ import annotations

import math

import numpy as np

__all__ = ["FALLBACK_BINS", "SUPERVISED_RULE", "held_out_relevance", "supervised_attrs", "supervised_edges"]

#: The bins setting that asks for supervised cuts.
SUPERVISED_RULE = "mdlp"
#: What the target and the columns MDLP does not apply to are binned with.
FALLBACK_BINS = 16

BINNING_NOTE = (
    "numeric columns are cut by MDLP on the target (Fayyad & Irani 1993): their information about the "
    "target is optimistic, since the cuts sit where this sample's classes change; held_out_mi gives each "
    "one measured on half of the rows with cuts chosen on the other half"
)


def _target_labels(session, target: str) -> np.ndarray:
    col = session.column(target)
    codes = np.asarray(col.codes).astype(np.float64)
    codes[codes >= col.k] = np.nan  # the missing code
    return codes


def _applies(session, key: str, target: str) -> bool:
    col = session.column(key)
    return key != target and col.edges is not None and col.kind == "numeric"


def supervised_edges(session, key: str, target: str) -> np.ndarray:
    """MDLP edges of one numeric column against the target's symbols, spanning all its finite values.

    Parameters
    ----------
    session : ProfileSession
        The profile (the target must be encoded already).
    key, target : str
        Column keys.

    Returns
    -------
    numpy.ndarray of float64
        Increasing edges; the outer ones are the column's finite minimum and maximum
        (rows without a target label included), so no value falls outside.

    References
    ----------
    .. [1] Fayyad, U. M., & Irani, K. B. (1993). Proc. 13th IJCAI, 1022-1027.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> df = pd.DataFrame({"x": np.arange(200.0), "y": np.arange(200) >= 120})
    >>> supervised_edges(ProfileSession(df, n_boot=0), "x", "y").tolist()
    [0.0, 119.5, 199.0]
    """
    from infoscope.encode.mdlp import mdlp_edges

    values = session._values(key).to_numpy(dtype=np.float64, na_value=np.nan)
    edges = mdlp_edges(values, _target_labels(session, target))
    finite = values[np.isfinite(values)]
    if edges.size > 2 or finite.min() < finite.max():
        edges = edges.copy()
        edges[0], edges[-1] = min(edges[0], finite.min()), max(edges[-1], finite.max())
        if edges.size == 2 and edges[0] == edges[1]:
            edges = np.array([edges[0] - 0.5, edges[0] + 0.5])
    return edges


def held_out_relevance(session, target: str, columns) -> dict:
    """MI of each column with the target on a seeded half of the rows, cut by MDLP on the other half.

    Parameters
    ----------
    session : ProfileSession
        The profile (its estimator and seed).
    target : str
        The target key.
    columns : iterable of str
        Numeric column keys.

    Returns
    -------
    dict
        ``{column: MI in the session's unit}`` (NaN when a half has no row).

    References
    ----------
    .. [1] Fayyad, U. M., & Irani, K. B. (1993). Proc. 13th IJCAI, 1022-1027.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> rng = np.random.default_rng(0)
    >>> df = pd.DataFrame({"x": rng.normal(size=2000), "y": rng.integers(0, 2, 2000)})
    >>> abs(held_out_relevance(ProfileSession(df, n_boot=0), "y", ["x"])["x"]) < 0.01
    True
    """
    from infoscope.encode.binning import assign_bins
    from infoscope.encode.mdlp import mdlp_edges
    from infoscope.estimators.information import mutual_information_from_table

    s = session.settings
    kw = {"estimator": s["estimator"], "base": s["base"]}
    if s["estimator"] == "dirichlet" and s["alpha"] is not None:
        kw["alpha"] = s["alpha"]
    labels = _target_labels(session, target)
    k_target = int(session.column(target).k)
    rng = np.random.default_rng(s["seed"])
    out = {}
    for key in columns:
        values = session._values(key).to_numpy(dtype=np.float64, na_value=np.nan)
        rows = np.flatnonzero(np.isfinite(values) & np.isfinite(labels))
        if rows.size < 4:
            out[key] = math.nan
            continue
        rows = rng.permutation(rows)
        fit, measure = rows[: rows.size // 2], rows[rows.size // 2:]
        edges = mdlp_edges(values[fit], labels[fit])
        codes = assign_bins(values[measure], edges).astype(np.int64)
        table = np.zeros((edges.size - 1, k_target), dtype=np.int64)
        np.add.at(table, (codes, labels[measure].astype(np.int64)), 1)
        out[key] = float(mutual_information_from_table(table, **kw))
    return out


def supervised_attrs(session, target: str) -> dict:
    """The relevance attrs of a ``bins="mdlp"`` profile ({} for any other binning).

    Parameters
    ----------
    session : ProfileSession
        The profile.
    target : str
        The target of the relevance table.

    Returns
    -------
    dict
        ``{"binning": "mdlp", "binning_note": text, "held_out_mi": {column: MI}}``
        for the columns cut by MDLP.

    References
    ----------
    .. [1] Fayyad, U. M., & Irani, K. B. (1993). Proc. 13th IJCAI, 1022-1027.

    Examples
    --------
    >>> import pandas as pd
    >>> from infoscope.frame.session import ProfileSession
    >>> supervised_attrs(ProfileSession(pd.DataFrame({"a": [1, 2] * 5, "y": [0, 1] * 5})), "y")
    {}
    """
    s = session.settings
    if s["bins"] != SUPERVISED_RULE or s["target"] != target:
        return {}
    columns = [k for k in session.names if _applies(session, k, target)]
    return {"binning": SUPERVISED_RULE, "binning_note": BINNING_NOTE,
            "held_out_mi": held_out_relevance(session, target, columns)}
