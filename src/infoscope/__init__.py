"""infoscope: how much information the columns of a table carry.

The public names are imported lazily (PEP 562), so ``import infoscope`` stays fast
and the widget stack is loaded only when a widget is asked for.
"""
from __future__ import annotations

import importlib
import sys

from infoscope._version import __version__
from infoscope._warnings import DataQualityWarning, InfoscopeWarning, SmallSampleWarning

# public name -> module that defines it
_PUBLIC = {
    # estimators on counts / probability vectors (numpy + scipy only)
    "entropy_from_counts": "infoscope.estimators.entropy",
    "ENTROPY_ESTIMATORS": "infoscope.estimators.entropy",
    "DIRICHLET_PRIORS": "infoscope.estimators.entropy",
    "entropy_of_count_rows": "infoscope.estimators.entropy",
    "count_fingerprint": "infoscope.estimators.entropy",
    "FINGERPRINT_ESTIMATORS": "infoscope.estimators.entropy",
    "nsb_posterior": "infoscope.estimators.nsb",
    "NSBPosterior": "infoscope.estimators.nsb",
    "ConfidenceInterval": "infoscope.estimators.resampling",
    "PermutationTestResult": "infoscope.estimators.resampling",
    "mutual_information_from_table": "infoscope.estimators.information",
    "conditional_mutual_information_from_table": "infoscope.estimators.information",
    "g_test_from_table": "infoscope.estimators.significance",
    "GTestResult": "infoscope.estimators.significance",
    "normalized_mutual_information_from_table": "infoscope.estimators.information",
    "adjusted_mutual_information_from_table": "infoscope.estimators.information",
    "expected_mutual_information_from_table": "infoscope.estimators.information",
    "variation_of_information_from_table": "infoscope.estimators.information",
    "conditional_entropy_from_table": "infoscope.estimators.information",
    "joint_entropy_from_counts": "infoscope.estimators.information",
    "g_test_from_tables": "infoscope.estimators.significance",
    "benjamini_hochberg": "infoscope.estimators.significance",
    "pointwise_mutual_information": "infoscope.estimators.information",
    "kl_divergence": "infoscope.estimators.divergence",
    "js_divergence": "infoscope.estimators.divergence",
    "cross_entropy": "infoscope.estimators.divergence",
    "psi": "infoscope.estimators.divergence",
    "differential_entropy": "infoscope.estimators.continuous",
    "ksg_mutual_information": "infoscope.estimators.continuous",
    "mixed_mutual_information": "infoscope.estimators.continuous",
    "bootstrap_entropy_ci": "infoscope.estimators.resampling",
    "bootstrap_mi_ci": "infoscope.estimators.resampling",
    "permutation_test_mi": "infoscope.estimators.resampling",
    "entropy_from_probabilities": "infoscope.estimators.multivariate",
    "surprisal": "infoscope.estimators.multivariate",
    "co_information_from_table": "infoscope.estimators.multivariate",
    "total_correlation_from_table": "infoscope.estimators.multivariate",
    "effective_sample_size": "infoscope.estimators.multivariate",
    "WeightedEstimate": "infoscope.estimators.multivariate",
    # functional API on samples (labels unless bins= is given)
    "entropy": "infoscope.measures",
    "joint_entropy": "infoscope.measures",
    "conditional_entropy": "infoscope.measures",
    "mutual_information": "infoscope.measures",
    "conditional_mutual_information": "infoscope.measures",
    "normalized_mutual_information": "infoscope.measures",
    "adjusted_mutual_information": "infoscope.measures",
    "variation_of_information": "infoscope.measures",
    "g_test": "infoscope.measures",
    "co_information": "infoscope.measures",
    "total_correlation": "infoscope.measures",
    # encoding
    "bin_edges": "infoscope.encode.binning",
    "encode_column": "infoscope.encode.columns",
    "EncodedColumn": "infoscope.encode.columns",
    "encode_frame": "infoscope.encode.columns",
    "encode_columns": "infoscope.encode.columns",
    "clear_cache": "infoscope.encode.cache",
    # engine
    "PairEngine": "infoscope.engine.engine",
    # frame level
    "InfoProfileAccessor": "infoscope.accessor",
    "ProfileSession": "infoscope.frame.session",
    # sources that are not an in-memory frame (out of core)
    "profile": "infoscope.sources",
    "TableSession": "infoscope.sources.session",
    "PairTable": "infoscope.frame.results",
    # live views (anywidget; imported only when asked for)
    "ProfileWidget": "infoscope.widgets.profile",
    # static outputs
    "to_html": "infoscope.report.html",
    "profile_svg": "infoscope.report.picture",
    "profile_charts": "infoscope.report.charts",
    # demo data
    "datasets": "infoscope.datasets",
}

__all__ = sorted(
    [*_PUBLIC, "InfoscopeWarning", "SmallSampleWarning", "DataQualityWarning", "__version__"]
)


def __getattr__(name: str):
    module_name = _PUBLIC.get(name)
    if module_name is None:
        raise AttributeError(f"module 'infoscope' has no attribute {name!r}")
    module = importlib.import_module(module_name)
    value = module if module_name.endswith("." + name) or name == "datasets" else getattr(module, name)
    globals()[name] = value
    return value


def __dir__():
    return __all__


def _register_accessor() -> None:
    """Register ``DataFrame.info_profile`` if pandas is importable (cheap when it is)."""
    try:
        importlib.import_module("pandas")
    except ImportError:  # pandas missing: the functional core still works
        return
    importlib.import_module("infoscope.accessor")
    if "polars" in sys.modules:  # never imports Polars itself: `import infoscope.polars` does
        try:
            importlib.import_module("infoscope.polars")
        except ImportError:  # a broken or partial Polars install: the pandas accessor still works
            pass
    if "dask.dataframe" in sys.modules:  # likewise: `import infoscope.dask` registers it later
        try:
            importlib.import_module("infoscope.dask")
        except ImportError:  # dask without its dataframe extras
            pass


_register_accessor()
