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


def _reference_sections():
    """(where, body) of every References section of every docstring in the package."""
    import ast

    src = Path(infoscope.__file__).resolve().parent
    for path in sorted(src.rglob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if not isinstance(node, (ast.Module, ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
                continue
            doc = ast.get_docstring(node)
            if not doc or "\nReferences\n---" not in doc:
                continue
            body = doc.split("\nReferences\n", 1)[1].split("\n", 1)[1]
            body = re.split(r"\n\S[^\n]*\n-{3,}\n", body, maxsplit=1)[0].strip()  # up to the next section
            yield f"{path.relative_to(src)}:{getattr(node, 'name', '<module>')}", body


def test_references_are_numbered_and_name_a_source():
    # a References section only where a published source or a standard is followed:
    # numbered entries (``.. [1] ...``), none of which is our own documentation
    problems = []
    for where, body in _reference_sections():
        entries = [line for line in body.splitlines() if line and not line.startswith(" ")]
        if not entries or not all(re.match(r"\.\. \[\d+\] ", line) for line in entries):
            problems.append(f"{where}: entries not numbered: {body[:60]!r}")
        own = [e for e in entries if re.match(r"\.\. \[\d+\] (DEVELOPERS\.md|docs/|None\b|No published)", e)]
        if own:
            problems.append(f"{where}: cites no published source: {own[0][:60]!r}")
    assert not problems, "\n".join(problems)


def test_every_docstring_placeholder_is_filled_at_import():
    # Shared docstring blocks (infoscope/_docs.py) are written as a line "{name}" or
    # ".. [1] {name}": every docstring in the source that has one must reach Python
    # filled (the object is decorated with fill_doc), so help() never shows a
    # placeholder.  Read from the source (ast) and from the imported object.
    import ast
    import importlib

    from infoscope._docs import _PLACEHOLDER

    src = Path(infoscope.__file__).resolve().parent
    found, unfilled = 0, []
    for path in sorted(src.rglob("*.py")):
        module_name = ".".join(("infoscope", *path.relative_to(src).with_suffix("").parts)).removesuffix(".__init__")
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in tree.body:
            members = [node] + [m for m in getattr(node, "body", []) if isinstance(node, ast.ClassDef)]
            for item in members:
                if not isinstance(item, (ast.FunctionDef, ast.ClassDef)):
                    continue
                doc = ast.get_docstring(item, clean=False)
                if not doc or not _PLACEHOLDER.search(doc):
                    continue
                found += 1
                owner = importlib.import_module(module_name)
                obj = getattr(owner, item.name) if item is node else getattr(getattr(owner, node.name), item.name)
                if obj.__doc__ is None or _PLACEHOLDER.search(obj.__doc__):
                    unfilled.append(f"{module_name}.{item.name}")
    assert found > 0 and unfilled == []


def test_fill_doc_places_blocks_and_refuses_an_unknown_name():
    from infoscope._docs import CITATIONS, fill_doc, filled

    def f():
        """Title.

        Parameters
        ----------
        {unit}
        choices : {"a", "b"}
            Braces inside a line are text, not placeholders.

        References
        ----------
        .. [1] {wilks_1938}
        """

    fill_doc(unit="base : float\n    Logarithm base.")(f)
    assert "\n        base : float\n            Logarithm base.\n" in f.__doc__
    assert 'choices : {"a", "b"}' in f.__doc__
    first, *rest = CITATIONS["wilks_1938"].split("\n")
    assert f"\n        .. [1] {first}\n" + "".join(f"           {line}\n" for line in rest) in f.__doc__
    with pytest.raises(KeyError, match="names no block"):
        filled("Title.\n\n    {nowhere}\n", {})
    assert filled(None, {}) is None  # python -OO strips docstrings
