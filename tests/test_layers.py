"""The layer order as code: every import of every module, deferred ones included.

Data flow one way (docs/design.md, "Layers"): estimators -> encode -> engine ->
frame -> views -> report -> widgets -> the entry points (accessor, Polars
namespace, command line and its file reader, the out-of-core sources, the package itself).  A module may import its own layer
and the layers below it, never one above; the module graph has no cycle; the
estimators import numpy, scipy and the standard library only.

The imports are read from the source with :mod:`ast` (``import``, ``from ...
import``, relative imports, ``importlib.import_module("...")`` and ``__import__``
with a literal name and the lazy ``_PUBLIC`` name tables of the packages), so an
import hidden in a function body counts like one at the top of a module; an import
of a computed name is refused outside a package's ``_PUBLIC`` lookup, since the check
could not read it.  In the team's words the data flows frame -> encode -> engine ->
estimators -> result tables -> views: the user's frame is read by encode/ and frame/,
the result tables are frame/; the estimators, which know nothing of frames, sit at
the bottom of the import order so that every layer may call them.
"""
from __future__ import annotations

import ast
import sys
from pathlib import Path


SRC = Path(__file__).resolve().parents[1] / "src"

#: rank of each layer: a module may import ranks <= its own
LAYERS = {
    "_version": 0, "_warnings": 0, "_numba": 0, "_docs": 0,
    "estimators": 1,
    "encode": 2,
    "engine": 3,
    "frame": 4, "measures": 4, "datasets": 4,
    "views": 5,
    "report": 6,
    "widgets": 7,
    "accessor": 8, "polars": 8, "dask": 8, "cli": 8, "cli_sources": 8, "reading": 8, "sources": 8, "__main__": 8, "": 8,
}
ESTIMATOR_THIRD_PARTY = {"numpy", "scipy"}
#: marks an ``import_module`` / ``__import__`` of a computed name (the check cannot read it)
DYNAMIC = "<computed name>"


def _module_name(path: Path, src: Path) -> str:
    parts = list(path.relative_to(src).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _modules(src: Path) -> dict[str, Path]:
    return {_module_name(p, src): p for p in sorted((src / "infoscope").rglob("*.py"))}


def _imports(name: str, path: Path, known: set[str]) -> list[tuple[str, int]]:
    """(imported module, line) for every import in the file, at any depth."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    is_package = path.name == "__init__.py"
    out = []
    has_table = False

    def add(target: str, line: int, names=()):
        for alias in names:  # `from pkg import sub` depends on pkg.sub, not on pkg's __init__
            if f"{target}.{alias}" in known:
                out.append((f"{target}.{alias}", line))
                continue
            out.append((target, line))
        if not names:
            out.append((target, line))

    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                add(alias.name, node.lineno)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = name.split(".") if is_package else name.split(".")[:-1]
                base = base[: len(base) - (node.level - 1)]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            add(target, node.lineno, [a.name for a in node.names if a.name != "*"])
        elif (isinstance(node, ast.Call) and node.args
              and getattr(node.func, "attr", getattr(node.func, "id", "")) in ("import_module", "__import__")):
            if isinstance(node.args[0], ast.Constant) and isinstance(node.args[0].value, str):
                add(node.args[0].value, node.lineno)
            else:  # a computed name: only a package's lazy _PUBLIC table may do that (read below)
                out.append((DYNAMIC, node.lineno))
        elif isinstance(node, (ast.Assign, ast.AnnAssign)) and isinstance(node.value, ast.Dict) and any(
                getattr(t, "id", "") == "_PUBLIC" for t in (node.targets if isinstance(node, ast.Assign)
                                                            else [node.target])):
            for value in node.value.values:  # lazy name tables: name -> module
                if isinstance(value, ast.Constant) and isinstance(value.value, str):
                    add(value.value, node.lineno)
            has_table = True
    if not has_table:
        return out
    return [item for item in out if item[0] != DYNAMIC]  # the table's own lookup, its names read above


def _layer(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else ""


def layer_violations(src: Path) -> tuple[list[str], dict[str, set[str]]]:
    """Imports against the layer order, and the import graph between modules."""
    modules = _modules(src)
    known = set(modules)
    problems, graph = [], {m: set() for m in modules}
    for name, path in modules.items():
        rank = LAYERS.get(_layer(name))
        if rank is None:
            problems.append(f"{name}: its layer {_layer(name)!r} is not in the layer order")
            continue
        for target, line in _imports(name, path, known):
            if target == DYNAMIC:
                problems.append(f"{name}:{line} imports a computed module name, which this check cannot read; "
                                "import by a literal name or through the package's _PUBLIC table")
                continue
            top = target.split(".")[0]
            if top != "infoscope":
                if _layer(name) == "estimators" and top not in ESTIMATOR_THIRD_PARTY \
                        and top not in sys.stdlib_module_names:
                    problems.append(f"{name}:{line} imports {target}: estimators use numpy and scipy only")
                continue
            if target in known and target != name:
                graph[name].add(target)
            other = LAYERS.get(_layer(target))
            if other is None:
                problems.append(f"{name}:{line} imports {target}, which is in no layer")
            elif other > rank:
                problems.append(f"{name}:{line} imports {target} (layer {_layer(target) or 'infoscope'} is above "
                                f"{_layer(name) or 'infoscope'})")
    return problems, graph


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan)."""
    index, low, stack, on, out, counter = {}, {}, [], set(), [], [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in sorted(graph.get(v, ())):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_every_import_follows_the_layer_order():
    problems, _ = layer_violations(SRC)
    assert not problems, "\n".join(problems)


def test_the_module_graph_has_no_cycle():
    _, graph = layer_violations(SRC)
    found = cycles(graph)
    assert not found, "import cycles: " + "; ".join(" <-> ".join(c) for c in found)


def test_the_checker_sees_deferred_upward_imports_and_cycles(tmp_path):
    # the check must be able to fail: a tree with a deferred upward import, an
    # estimator importing pandas, a lazy name table pointing up and a cycle
    pkg = tmp_path / "infoscope"
    for sub in ("estimators", "frame", "widgets"):
        (pkg / sub).mkdir(parents=True)
        (pkg / sub / "__init__.py").write_text("")
    (pkg / "__init__.py").write_text("")
    (pkg / "estimators" / "bad.py").write_text("import pandas\n")
    (pkg / "frame" / "a.py").write_text("def f():\n    from infoscope.widgets.view import W\n    return W\n")
    (pkg / "frame" / "b.py").write_text("from infoscope.frame import c\n")
    (pkg / "frame" / "c.py").write_text("import infoscope.frame.b\n")
    (pkg / "frame" / "__init__.py").write_text('_PUBLIC = {"W": "infoscope.widgets.view"}\n')
    (pkg / "widgets" / "view.py").write_text("W = 1\n")
    # and a relative import up, the package itself from below, a computed name, __import__
    (pkg / "estimators" / "rel.py").write_text("from ..frame import a\n")
    (pkg / "estimators" / "top.py").write_text("from infoscope import entropy\n")
    (pkg / "frame" / "dyn.py").write_text("import importlib\nm = importlib.import_module('infoscope.' + 'x')\n")
    (pkg / "frame" / "old.py").write_text("w = __import__('infoscope.widgets.view')\n")
    problems, graph = layer_violations(tmp_path)
    text = "\n".join(problems)
    assert "infoscope.frame.a:2 imports infoscope.widgets.view" in text
    assert "infoscope.estimators.bad:1 imports pandas" in text
    assert "infoscope.frame:1 imports infoscope.widgets.view" in text
    assert "infoscope.estimators.rel:1 imports infoscope.frame.a" in text
    assert "infoscope.estimators.top:1 imports infoscope (layer infoscope is above estimators)" in text
    assert "infoscope.frame.dyn:2 imports a computed module name" in text
    assert "infoscope.frame.old:1 imports infoscope.widgets.view" in text
    assert cycles(graph) == [["infoscope.frame.b", "infoscope.frame.c"]]


#: "Files by subject, each readable in one sitting" (the team's rule): the longest module allowed
MAX_MODULE_LINES = 900


def test_every_module_is_readable_in_one_sitting():
    long = {str(p.relative_to(SRC)): n for p in sorted((SRC / "infoscope").rglob("*.py"))
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > MAX_MODULE_LINES}
    assert not long, f"modules over {MAX_MODULE_LINES} lines (split them by subject): {long}"


def test_the_export_path_loads_no_widget():
    import subprocess

    names = ["infoscope.views", "infoscope.views.payload", "infoscope.report.html", "infoscope.report.picture"]
    code = (f"import sys, importlib; [importlib.import_module(n) for n in {names!r}]; "
            "bad = [m for m in ('anywidget', 'traitlets', 'infoscope.widgets') if m in sys.modules]; "
            "assert not bad, bad")
    subprocess.run([sys.executable, "-c", code], check=True, timeout=120)
