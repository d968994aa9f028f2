"""The public names of DESIGN.md exist and are documented (numpydoc with References)."""
from __future__ import annotations

import inspect
import subprocess
import sys

import pytest

import infoscope

# DESIGN.md, "Public interface": names that must exist at the top level.
DESIGN_NAMES = [
    "entropy", "entropy_from_counts", "mutual_information", "mutual_information_from_table",
    "conditional_entropy", "joint_entropy", "conditional_mutual_information",
    "kl_divergence", "js_divergence", "cross_entropy", "psi",
    "normalized_mutual_information", "adjusted_mutual_information", "variation_of_information",
    "g_test", "g_test_from_table", "bin_edges", "differential_entropy",
    "entropy_from_probabilities", "surprisal", "co_information", "total_correlation",
]


@pytest.mark.parametrize("name", DESIGN_NAMES)
def test_design_name_exists_with_numpydoc_references(name):
    obj = getattr(infoscope, name)
    assert callable(obj)
    doc = inspect.getdoc(obj) or ""
    for section in ("Parameters", "Returns", "References", "Examples"):
        assert f"\n{section}\n---" in doc, f"{name}: docstring lacks a numpydoc {section} section"


@pytest.mark.parametrize("name", sorted(infoscope._PUBLIC))
def test_every_lazy_public_name_resolves(name):
    assert getattr(infoscope, name) is not None


def test_import_is_light():
    # `import infoscope` must not pull in the compiler or the widget stack (import time).
    code = "import sys, infoscope; print(sorted(m for m in ('numba', 'anywidget', 'altair') if m in sys.modules))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "[]"


def test_unknown_attribute_is_an_attribute_error():
    with pytest.raises(AttributeError, match="no attribute 'nope'"):
        infoscope.nope  # noqa: B018


def test_accessor_is_registered():
    import pandas as pd

    assert hasattr(pd.DataFrame({"a": [1]}), "info_profile")
