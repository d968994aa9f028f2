"""The widget's front end as shipped: the bundle, its sources, its unit tests.

The front end's sources are ES modules in ``js/src``; esbuild (pinned in
``js/package.json``) bundles them into ``src/infoscope/widgets/static/profile.js``
and ``profile.css``, which are committed so that ``pip install .`` needs no Node.
Where Node.js is present these tests rebuild the bundle and fail when the committed
files differ, and run the JavaScript unit tests (``node --test js/test``, Node's
built-in runner). Where Node is absent they say so plainly; ``.ci/run`` sets
``INFOSCOPE_REQUIRE_NODE=1`` so that in CI a missing Node is a failure, not a skip.
"""
from __future__ import annotations

import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from infoscope.widgets import ProfileWidget
from infoscope.widgets import profile as widget_module

ROOT = Path(__file__).resolve().parents[1]
JS = ROOT / "js"
STATIC = widget_module._STATIC
BUNDLE = STATIC / "profile.js"
CSS = STATIC / "profile.css"


def _node() -> str:
    """The node executable, or a plain failure / skip when it is absent."""
    node = shutil.which("node")
    if node is None:
        message = ("Node.js is not installed: the bundle check and the JavaScript unit tests "
                   "did not run (install Node >= 18 and run `npm ci` in js/)")
        if os.environ.get("INFOSCOPE_REQUIRE_NODE") == "1":
            pytest.fail(message)
        pytest.skip(message)
    return node


def _esbuild_installed() -> None:
    if not (JS / "node_modules" / "esbuild" / "package.json").exists():
        message = "esbuild is not installed in js/node_modules: run `npm ci` in js/ (the bundle check did not run)"
        if os.environ.get("INFOSCOPE_REQUIRE_NODE") == "1":
            pytest.fail(message)
        pytest.skip(message)


def test_committed_bundle_equals_a_fresh_build():
    node = _node()
    _esbuild_installed()
    done = subprocess.run([node, "build.mjs", "--check"], cwd=JS, capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr or done.stdout


def test_javascript_unit_tests_pass():
    node = _node()
    done = subprocess.run([node, "--test", "test/"], cwd=JS, capture_output=True, text=True, timeout=300)
    summary = "\n".join(line for line in done.stdout.splitlines() if line.startswith(("# pass", "# fail", "not ok")))
    assert done.returncode == 0, summary + "\n" + done.stdout[-4000:] + done.stderr[-2000:]
    assert re.search(r"^# pass [1-9]", done.stdout, re.M), "no JavaScript test ran"


def test_esbuild_is_pinned_exactly():
    import json

    pkg = json.loads((JS / "package.json").read_text(encoding="utf-8"))
    pin = pkg["devDependencies"]["esbuild"]
    assert re.fullmatch(r"\d+\.\d+\.\d+", pin), f"esbuild must be pinned to one version, not {pin!r}"
    lock = json.loads((JS / "package-lock.json").read_text(encoding="utf-8"))
    assert lock["packages"]["node_modules/esbuild"]["version"] == pin


def test_widget_loads_the_bundle_and_its_stylesheet():
    # anywidget reads these files (and watches them in development); the offline
    # export inlines the same two files, so _esm and _css must stay file paths
    assert str(ProfileWidget._esm) == BUNDLE.read_text(encoding="utf-8")
    assert str(ProfileWidget._css) == CSS.read_text(encoding="utf-8")
    assert ".isc-root" in CSS.read_text(encoding="utf-8")
    assert "const CSS" not in BUNDLE.read_text(encoding="utf-8"), "styles travel through _css, not the module"


def test_bundle_version_matches_the_package():
    import infoscope

    for text in (BUNDLE.read_text(encoding="utf-8"), (JS / "src" / "version.js").read_text(encoding="utf-8")):
        m = re.search(r'VERSION = "([^"]+)"', text)
        assert m and m.group(1) == infoscope.__version__


def test_module_uses_anywidgets_current_format():
    # anywidget warns ("Direct export of a 'render' will likely be deprecated") when a
    # module exports `render` by name; the current format is the default export only
    text = BUNDLE.read_text(encoding="utf-8")
    exports = re.search(r"export \{([^}]*)\};?\s*$", text)
    assert exports, "the bundle ends with one export list"
    names = {part.strip().split(" as ")[-1] for part in exports.group(1).split(",") if part.strip()}
    assert "default" in names and "modelFromPayload" in names
    assert "render" not in names, "a named `render` export makes anywidget log a deprecation warning"


def _sources():
    return [BUNDLE, CSS, *sorted((JS / "src").rglob("*.js")), *sorted((JS / "src").rglob("*.css"))]


def test_front_end_never_parses_markup_or_reaches_the_network():
    for path in _sources():
        text = path.read_text(encoding="utf-8")
        code = re.sub(r"//[^\n]*|/\*.*?\*/", "", text, flags=re.S)  # comments may name what is banned
        for banned in ("innerHTML", "outerHTML", "insertAdjacentHTML", "document.write", "eval(",
                       "new Function", "fetch(", "XMLHttpRequest", "import(", "@import", "url("):
            assert banned not in code, f"{path.name}: {banned}"
        assert not re.search(r"https?://", text), f"{path.name}: no URL may appear in the front end"


def test_every_source_module_is_small_enough_to_read():
    for path in (JS / "src").rglob("*.js"):
        lines = path.read_text(encoding="utf-8").count("\n")
        assert lines <= 400, f"{path.relative_to(ROOT)} has {lines} lines; split it by subject"
