"""The settings of a :class:`~infoscope.frame.session.ProfileSession`: defaults and checks.

One place for the choices a profile accepts (estimators, bin rules, measures,
normalisations, orders, missing policies) and for the validation of a settings
mapping; the widgets derive their controls from these lists.
"""
from __future__ import annotations

import numbers
from collections.abc import Mapping

from infoscope._warnings import InfoscopeWarning, warn_user
from infoscope.encode.binning import BIN_RULES, STRATEGIES
from infoscope.estimators._checks import check_choice, log_base
from infoscope.estimators.entropy import ENTROPY_ESTIMATORS, resolve_alpha
from infoscope.estimators.information import NORMALIZATIONS
from infoscope.estimators.multivariate import WEIGHTED_ESTIMATORS as _WEIGHTED_ESTIMATORS

__all__ = ["CHOICES", "MEASURES", "MISSING_POLICIES", "ORDERS", "NeedsRows"]

#: Pair measures: name -> what the ``value`` column of ``pairs()`` holds.
MEASURES = {
    "mi": "mutual information (the session's estimator), in the session's unit",
    "nmi": "normalised mutual information (the session's normalisation), unit-free",
    "adjusted_mi": "mutual information adjusted for chance (Vinh, Epps & Bailey 2010), unit-free",
    "vi": "variation of information H(A|B) + H(B|A) (Meila 2007), a distance in the session's unit",
}
ORDERS = ("name", "cluster")
MISSING_POLICIES = ("drop", "category")

_DEFAULTS = {
    "bins": "rows",
    "strategy": "quantile",
    "estimator": "miller_madow",
    "alpha": None,
    "base": 2,
    "missing": "drop",
    "max_categories": 64,
    "categorical_threshold": 32,
    "target": None,
    "measure": "mi",
    "normalization": "arithmetic",
    "sample": None,
    "seed": 0,
    "ci": 0.95,
    "n_boot": 200,
    "weights": None,
}
# the settings that change how a column is encoded (the rest only change numbers)
_ENCODING_SETTINGS = ("bins", "strategy", "missing", "max_categories", "categorical_threshold")

#: The named choices of each setting, in one place: the session validates against
#: these, and the views' controls list them (``infoscope.views.choices``).
CHOICES = {
    "strategy": tuple(STRATEGIES),
    "bin_rule": tuple(BIN_RULES),
    "estimator": tuple(ENTROPY_ESTIMATORS),
    "measure": tuple(MEASURES),
    "normalization": tuple(NORMALIZATIONS),
    "missing": MISSING_POLICIES,
    "order": ORDERS,
}


class NeedsRows(ValueError):
    """A view or setting of a profile of count tables (out of core) that needs the rows.

    Raised by :class:`infoscope.sources.TableSession` for a change of an encoding
    setting (another pass over the source) and for the views that read rows (a
    seeded sample, ``sample=``, has them); the live view shows its message and
    keeps the last finished settings.
    """


def _check_settings(settings: Mapping, previous: Mapping | None = None) -> dict:
    """Validate a full settings mapping; every bad value is named in one clear error.

    ``previous`` (the settings before an update) only decides whether the note
    that ``alpha`` is unused is new.
    """
    unknown = sorted(set(settings) - set(_DEFAULTS))
    if unknown:
        raise TypeError(
            f"unknown setting(s) {', '.join(map(repr, unknown))}; valid settings: "
            f"{', '.join(_DEFAULTS)}"
        )
    s = dict(settings)
    check_choice(s["estimator"], ENTROPY_ESTIMATORS, "estimator")
    log_base(s["base"])
    check_choice(s["missing"], MISSING_POLICIES, "missing")
    check_choice(s["measure"], MEASURES, "measure")
    check_choice(s["normalization"], NORMALIZATIONS, "normalization")
    _check_bins(s["bins"], "bins")
    if s["bins"] == "mdlp" and s["target"] is None:
        raise ValueError("bins='mdlp' cuts numeric columns against the target: set target= as well")
    if not isinstance(s["strategy"], str):
        raise TypeError(f"strategy must be a string such as 'quantile', got {s['strategy']!r}")
    check_choice(s["strategy"], STRATEGIES, "strategy")
    mc = s["max_categories"]
    if isinstance(mc, bool) or not isinstance(mc, numbers.Integral) or mc < 2:
        raise ValueError(f"max_categories={mc!r} must be an integer >= 2")
    ci = s["ci"]
    if isinstance(ci, bool) or not isinstance(ci, numbers.Real) or not 0.0 < float(ci) < 1.0:
        raise ValueError(f"ci={ci!r} must be a confidence level strictly between 0 and 1")
    ct = s["categorical_threshold"]
    if isinstance(ct, bool) or not isinstance(ct, numbers.Integral) or ct < 0:
        raise ValueError(f"categorical_threshold={ct!r} must be an integer >= 0 (0 bins every number)")
    nb = s["n_boot"]
    if isinstance(nb, bool) or not isinstance(nb, numbers.Integral) or nb < 0:
        raise ValueError(f"n_boot={nb!r} must be an integer >= 0 (0 skips the bootstrap intervals)")
    if nb:
        from infoscope.estimators.resampling import min_replicates

        need = min_replicates(float(ci))
        if nb < need:
            raise ValueError(
                f"n_boot={nb} is too few bootstrap replicates for a {float(ci):.0%} interval: use at "
                f"least {need} (2 / (1 - ci), so that a replicate lies beyond each end; about 1,000 "
                "make the ends stable), or 0 to skip the bootstrap intervals"
            )
    sample = s["sample"]
    if sample is not None and (isinstance(sample, bool) or not isinstance(sample, numbers.Integral)
                               or sample < 1):
        raise ValueError(f"sample={sample!r} must be None or a number of rows >= 1")
    seed = s["seed"]
    if seed is not None and (isinstance(seed, bool) or not isinstance(seed, numbers.Integral)):
        raise TypeError(f"seed={seed!r} must be an integer or None")
    if seed is not None and seed < 0:
        raise ValueError(f"seed={seed!r} must be an integer >= 0 or None (None: a fresh random seed)")
    _check_alpha(s, previous)
    target = s["target"]
    if target is not None and (isinstance(target, bool) or not isinstance(target, (str, tuple, numbers.Integral))):
        raise TypeError(f"target must be a column key (a string, or a MultiIndex tuple) or None, got {target!r}")
    weights = s["weights"]
    if weights is not None and (isinstance(weights, bool) or not isinstance(weights, (str, tuple, numbers.Integral))):
        raise TypeError(f"weights must be the key of the column of observation weights (a string, or a MultiIndex "
                        f"tuple) or None, got {type(weights).__name__}")
    if weights is not None and s["bins"] == "mdlp":
        raise ValueError("bins='mdlp' cuts columns on unweighted rows: it does not take weights= (use a bin number "
                         "or rule)")
    if weights is not None and s["estimator"] not in _WEIGHTED_ESTIMATORS:
        raise ValueError(f"estimator={s['estimator']!r} does not take observation weights (its formula needs the "
                         f"rows' own counts); with weights= use one of: {', '.join(map(repr, _WEIGHTED_ESTIMATORS))}")
    return s


def _check_alpha(s: Mapping, previous: Mapping | None) -> None:
    """``alpha`` is checked whatever the estimator; set but unused, it is said (once)."""
    alpha = s["alpha"]
    if alpha is None:
        return
    resolve_alpha("dirichlet", alpha)  # the one rule for a pseudocount: errors name alpha
    if s["estimator"] == "dirichlet":
        return
    if previous is not None and previous.get("alpha") == alpha and previous.get("estimator") == s["estimator"]:
        return  # said when it was set
    warn_user(f"alpha={alpha!r} is not used: only estimator='dirichlet' takes a pseudocount, and the "
              f"estimator is {s['estimator']!r}", InfoscopeWarning)


def _check_bins(bins, parameter: str):
    if isinstance(bins, str) and bins == "mdlp":
        return bins  # supervised cuts against the target (frame/supervised.py)
    if isinstance(bins, str):
        # checked here too: a rule change reaches the encoder only for binned columns
        return check_choice(bins, BIN_RULES, parameter)
    if isinstance(bins, bool) or not isinstance(bins, numbers.Integral) or bins < 1:
        raise ValueError(f"{parameter}={bins!r} must be a number of bins >= 1 or a rule name such as 'fd'")
    return int(bins)
