"""The house keeps its shape: imports point down the layers, no cycles, no private names, short functions.

What is checked, read from the source with :mod:`ast` (nothing is imported):

* **Layers** (the redesign plan, issue 13, and DESIGN.md §2): every module of ``sheetpump/`` has a
  layer in :data:`LAYERS`; a module may import only from its own layer or below. A top-level module
  missing from the table fails the test, so a new one must be placed. A package (a "room":
  ``physics/``, ``checks/``, ``workbooks/`` ...) has one layer for all its modules: how a room splits
  its topics is its own business, where it stands in the house is not.
* **Cycles** between modules, through any import: module level or inside a function (a lazy import
  still is a dependency), relative or absolute, under ``TYPE_CHECKING`` too.
* **Private names across modules**: ``from X import _name`` and ``X._name`` where ``X`` is another
  module of ours (dunders such as ``__version__`` are public).
* **Function length**: no function body over :data:`MOST_LINES` lines of code (docstring, blank and
  comment lines not counted; the ``def`` line and its signature not counted either).

How an import becomes an edge. ``from a.b import c`` depends on the module ``a.b.c`` when that is a
module, else on ``a.b`` (the name ``c`` is an attribute of it); ``import a.b`` depends on ``a.b``.
Importing ``a.b.c`` makes Python run ``a/b/__init__.py`` first, but that is the interpreter's order, not
a dependency of the importing module: the edge goes to ``a.b.c`` alone. So a package whose ``__init__``
imports (or lazily re-exports) its own submodules is *not* a cycle when those submodules import each
other or their siblings only; it is one when a submodule takes a name from the package's ``__init__``
(``from . import NAME`` with NAME not a submodule), because then ``__init__`` -> submodule -> ``__init__``
is a real loop of definitions. Imports through ``importlib`` (the catalogue's and the CLI's discovery)
are not seen; they name no module in the source.
"""

from __future__ import annotations

import ast
import importlib
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "sheetpump"

#: The layer of each module (low -> high), the target tree of the redesign plan (issue 13). A key names a
#: module or a package; a package's layer holds for every module inside it.
LAYERS: dict[str, int] = {
    # 0: every error type; the version and the safety caution
    "sheetpump": 0,
    "sheetpump.errors": 0,
    # 1: the one unit registry; atomic writes and output guards
    "sheetpump.units": 1,
    "sheetpump.files": 1,
    # 2: pure SI physics
    "sheetpump.physics": 2,
    # 3: one declaration per cell function
    "sheetpump.declarations": 3,
    "sheetpump.catalogue": 3,
    # 4: trade vocabularies and plain domain data
    "sheetpump.codes": 4,
    "sheetpump.datasheet": 4,
    "sheetpump.duty": 4,
    "sheetpump.suction": 4,
    "sheetpump.performance": 4,
    "sheetpump.evaluation": 4,
    # 5: the rating rules
    "sheetpump.checks": 5,
    # 6: decisions over many checks
    "sheetpump.comparison": 6,
    "sheetpump.selection": 6,
    # 7: reading and writing workbooks; headless recalculation
    "sheetpump.workbooks": 7,
    "sheetpump.recalc": 7,
    # 8: text, JSON, JUnit, the annotated copy, the selection's reports
    "sheetpump.reports": 8,
    # 9: read -> check -> compare -> write, for the CLI and the demo
    "sheetpump.pipeline": 9,
    "sheetpump.demo": 9,
    # 10: thin faces
    "sheetpump.cells": 10,
    "sheetpump.cli": 10,
    "sheetpump.extension": 10,
    "sheetpump.__main__": 10,
}

#: Most lines of code in one function body.
MOST_LINES = 80
#: Functions allowed to be longer, by "module:function": declaration tables only (a table read row by
#: row is clearer in one piece than split). None today.
LONG_TABLES: frozenset[str] = frozenset()


@dataclass(frozen=True)
class Import:
    """One dependency of ``source`` on ``target`` (a module of ours), at ``file:line``."""

    source: str
    target: str
    line: int
    text: str  # the import as written
    name: str | None = None  # the name taken by ``from target import name``


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


MODULES = _modules()


def _is_package(name: str) -> bool:
    return MODULES.get(name, Path()).name == "__init__.py"


def _resolve(module: str, level: int, source: str) -> str:
    """The absolute name of ``from <level dots><module> import ...`` written in ``source``."""
    if level == 0:
        return module
    base = source.split(".")
    if not _is_package(source):
        base.pop()  # a plain module's dots count from its package
    base = base[: len(base) - (level - 1)]
    return ".".join(base + ([module] if module else []))


def _ours(name: str) -> bool:
    return name == "sheetpump" or name.startswith("sheetpump.")


def _imports(source: str, tree: ast.AST) -> Iterator[Import]:
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                if _ours(alias.name):
                    yield Import(source, alias.name, node.lineno, f"import {alias.name}")
        elif isinstance(node, ast.ImportFrom):
            base = _resolve(node.module or "", node.level, source)
            if not _ours(base):
                continue
            written = "." * node.level + (node.module or "")
            for alias in node.names:
                sub = f"{base}.{alias.name}"
                text = f"from {written} import {alias.name}"
                if sub in MODULES:
                    yield Import(source, sub, node.lineno, text)
                else:
                    yield Import(source, base, node.lineno, text, alias.name)


def _graph() -> list[Import]:
    edges = []
    for name, path in MODULES.items():
        edges.extend(i for i in _imports(name, ast.parse(path.read_text(encoding="utf-8"))) if i.target != name)
    return edges


EDGES = _graph()


def _where(i: Import) -> str:
    return f"{MODULES[i.source].relative_to(ROOT)}:{i.line}"


def layer_of(module: str) -> int | None:
    """The layer of ``module``: its own entry, else its nearest package's (not the top package's)."""
    parts = module.split(".")
    while len(parts) > 1:
        name = ".".join(parts)
        if name in LAYERS:
            return LAYERS[name]
        parts.pop()
    return LAYERS.get(module)


def test_every_module_has_a_layer() -> None:
    missing = sorted(m for m in MODULES if layer_of(m) is None)
    assert not missing, "modules without a layer in tests/test_structure.py LAYERS (place them):\n  " + \
        "\n  ".join(f"{MODULES[m].relative_to(ROOT)}" for m in missing)


def test_imports_point_down_the_layers() -> None:
    up = []
    for i in EDGES:
        low, high = layer_of(i.source), layer_of(i.target)
        if low is not None and high is not None and high > low:
            up.append(f"{_where(i)}: {i.text}  ({i.source} layer {low} -> {i.target} layer {high})")
    assert not up, "imports from a lower layer to a higher one:\n  " + "\n  ".join(up)


def _cycles(edges: list[Import]) -> list[list[str]]:
    """The strongly connected components of more than one module (Tarjan's algorithm)."""
    graph: dict[str, set[str]] = {m: set() for m in MODULES}
    for i in edges:
        graph[i.source].add(i.target)
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    found: list[list[str]] = []

    def visit(v: str) -> None:
        index[v] = low[v] = len(index)
        stack.append(v)
        on_stack.add(v)
        for w in sorted(graph[v]):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            component = []
            while True:
                w = stack.pop()
                on_stack.discard(w)
                component.append(w)
                if w == v:
                    break
            if len(component) > 1:
                found.append(sorted(component))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return found


def test_no_import_cycle() -> None:
    lines = []
    for component in _cycles(EDGES):
        members = set(component)
        lines.append("cycle: " + ", ".join(component))
        lines += [f"    {_where(i)}: {i.text}" for i in EDGES if i.source in members and i.target in members]
    assert not lines, "import cycles between modules:\n  " + "\n  ".join(lines)


def _private(name: str) -> bool:
    return name.startswith("_") and not (name.startswith("__") and name.endswith("__"))


def _private_uses(source: str, tree: ast.AST) -> Iterator[str]:
    where = MODULES[source].relative_to(ROOT)
    modules: dict[str, str] = {}  # local name -> module of ours it is bound to
    for i in _imports(source, tree):
        if i.name is not None and _private(i.name):
            yield f"{where}:{i.line}: {i.text}"
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                if _ours(alias.name):
                    modules[alias.asname or alias.name.split(".")[0]] = alias.name
        elif isinstance(node, ast.ImportFrom):
            base = _resolve(node.module or "", node.level, source)
            for alias in node.names:
                if f"{base}.{alias.name}" in MODULES:
                    modules[alias.asname or alias.name] = f"{base}.{alias.name}"
    for node in ast.walk(tree):
        if isinstance(node, ast.Attribute) and _private(node.attr):
            chain, value = [node.attr], node.value
            while isinstance(value, ast.Attribute):
                chain.append(value.attr)
                value = value.value
            if isinstance(value, ast.Name) and value.id in modules and modules[value.id] != source:
                text = ".".join([value.id, *reversed(chain)])
                yield f"{where}:{node.lineno}: {text}  ({modules[value.id]})"
        elif (isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id in ("getattr", "hasattr")
              and len(node.args) >= 2 and isinstance(node.args[0], ast.Name) and node.args[0].id in modules
              and modules[node.args[0].id] != source and isinstance(node.args[1], ast.Constant)
              and isinstance(node.args[1].value, str) and _private(node.args[1].value)):
            # the same private name reached by getattr(module, "_name")
            yield f"{where}:{node.lineno}: {node.func.id}({node.args[0].id}, {node.args[1].value!r})" \
                  f"  ({modules[node.args[0].id]})"


def test_no_private_name_taken_from_another_module() -> None:
    uses = [u for name, path in MODULES.items()
            for u in _private_uses(name, ast.parse(path.read_text(encoding="utf-8")))]
    assert not uses, "private names used across modules:\n  " + "\n  ".join(uses)


def _docstring_lines(tree: ast.AST) -> set[int]:
    lines: set[int] = set()
    for node in ast.walk(tree):
        body = getattr(node, "body", None)
        if (isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef)) and body
                and isinstance(body[0], ast.Expr) and isinstance(body[0].value, ast.Constant)
                and isinstance(body[0].value.value, str)):
            lines.update(range(body[0].lineno, body[0].end_lineno + 1))
    return lines


def lines_of_code(text: str, function: ast.FunctionDef | ast.AsyncFunctionDef, docstrings: set[int]) -> int:
    """Lines of code of ``function``'s body: not its signature, docstrings, blank or comment lines."""
    lines = text.splitlines()
    first, last = function.body[0].lineno, function.end_lineno or function.lineno
    return sum(1 for n in range(first, last + 1)
               if n not in docstrings and lines[n - 1].strip() and not lines[n - 1].strip().startswith("#"))


@pytest.mark.parametrize("source", ["def f(\n    a,\n):\n    '''doc\n\n    more'''\n    # note\n\n    x = 1\n"
                                    "    return (\n        x)\n"])
def test_lines_of_code_leave_out_signature_docstring_blanks_and_comments(source: str) -> None:
    tree = ast.parse(source)
    function = tree.body[0]
    assert isinstance(function, ast.FunctionDef)
    assert lines_of_code(source, function, _docstring_lines(tree)) == 3  # x = 1; return (; x)


def test_no_function_over_the_limit() -> None:
    long = []
    for name, path in MODULES.items():
        text = path.read_text(encoding="utf-8")
        tree = ast.parse(text)
        docstrings = _docstring_lines(tree)
        for node in ast.walk(tree):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and f"{name}:{node.name}" not in LONG_TABLES:
                n = lines_of_code(text, node, docstrings)
                if n > MOST_LINES:
                    long.append(f"{path.relative_to(ROOT)}:{node.lineno}: {node.name} has {n} lines of code")
    assert not long, f"functions over {MOST_LINES} lines of code:\n  " + "\n  ".join(long)


def test_the_checks_see_what_they_should() -> None:
    # self-consistency of the walker on our own tree: a known relative import, a known absolute one
    assert any(i.source == "sheetpump.workbooks.writer" and i.target == "sheetpump.files" for i in EDGES)
    assert any(i.source == "sheetpump.workbooks.comparison_book" and i.target == "sheetpump.workbooks.writer"
               for i in EDGES)
    assert _resolve("", 1, "sheetpump.workbooks") == "sheetpump.workbooks"
    assert _resolve("errors", 2, "sheetpump.workbooks.safe") == "sheetpump.errors"
    assert _cycles([Import("sheetpump.units", "sheetpump.files", 1, ""),
                    Import("sheetpump.files", "sheetpump.units", 1, "")]) == [["sheetpump.files", "sheetpump.units"]]
    probe = ast.parse("from sheetpump import units\nfrom sheetpump.files import _hidden\nunits._a\n"
                      "getattr(units, '_b')\nunits.to_si\n")
    found = list(_private_uses("sheetpump.demo", probe))
    assert [u.split(": ", 1)[1].split("  ")[0] for u in found] == [
        "from sheetpump.files import _hidden", "units._a", "getattr(units, '_b')"]


def test_every_lazy_name_of_workbooks_resolves() -> None:
    # the package re-exports names lazily by module name (a string ast cannot follow): a renamed module
    # must not leave a name pointing at the old one
    import importlib

    import sheetpump.workbooks as workbooks

    for name, module in workbooks._LAZY.items():
        assert getattr(workbooks, name) is getattr(importlib.import_module(f"sheetpump.workbooks.{module}"), name)


def test_physics_reexports_every_public_name_of_its_modules() -> None:
    # sheetpump.physics re-exports on first use: each module's __all__, from that module, and no module
    # of the package left out of the list (a new module must be added to MODULES)
    import importlib

    import sheetpump.physics as physics

    on_disk = {p.stem for p in (PACKAGE / "physics").glob("*.py") if p.stem != "__init__"}
    assert set(physics.MODULES) == on_disk
    for module in physics.MODULES:
        found = importlib.import_module(f"sheetpump.physics.{module}")
        for name in found.__all__:
            assert getattr(physics, name) is getattr(found, name), f"{module}.{name}"
    with pytest.raises(AttributeError):
        physics.no_such_function  # noqa: B018


def test_every_cell_function_reaches_its_formula_in_one_hop() -> None:
    # the declaration points at a written-out function of sheetpump.physics (no lambda, partial or
    # factory-made closure) whose docstring states the formula, so `grep "def <name>"` finds the formula
    # behind any cell function
    import inspect

    from sheetpump.catalogue import CATALOGUE

    for name, calc in CATALOGUE.items():
        func = calc.func
        assert inspect.isfunction(func), f"{name}: {func!r} is not a plain function"
        assert func.__module__.startswith("sheetpump.physics."), f"{name}: {func.__module__}"
        assert func.__qualname__ == func.__name__ != "<lambda>", f"{name}: {func.__qualname__}"
        module = importlib.import_module(func.__module__)
        assert getattr(module, func.__name__) is func, f"{name}: not the module's {func.__name__}"
        assert f"def {func.__name__}(" in inspect.getsource(module), name
        assert ".. math::" in (func.__doc__ or ""), f"{name}: {func.__name__}'s docstring states no formula"
