"""The public names of docs/design.md exist and are documented (numpydoc with References)."""
from __future__ import annotations

import inspect
import re
import subprocess
import sys
from pathlib import Path

import pytest

import infoscope

DESIGN = Path(__file__).resolve().parents[1] / "docs" / "design.md"


def _design_names() -> list[str]:
    """The functional names the "Public interface" section of docs/design.md lists."""
    text = DESIGN.read_text(encoding="utf-8")
    section = text.split("## Public interface", 1)[1].split("\n## ", 1)[0]
    core = section.split("Frame level", 1)[0]
    return sorted(set(re.findall(r"`infoscope\.(\w+)\(", core)))


DESIGN_NAMES = _design_names()


def test_the_design_page_lists_the_functional_core():
    # the page is the list: these names were the interface from the start
    assert {"entropy", "mutual_information", "kl_divergence", "psi", "g_test_from_table",
            "bin_edges", "differential_entropy", "total_correlation"} <= set(DESIGN_NAMES)
    assert len(DESIGN_NAMES) >= 22


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
