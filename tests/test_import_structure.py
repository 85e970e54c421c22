"""Import structure of the package: no two modules import each other.

Every module under ``src/pathcast`` is parsed with :mod:`ast` (nothing is imported). An import anywhere in a module
counts -- at module level or inside a function -- except inside an ``if TYPE_CHECKING:`` block, which only type
checkers read. A loop of two modules means one of them holds a helper that belongs in the other (or in a third
module both can import).
"""

from __future__ import annotations

import ast
from pathlib import Path

import pathcast

PACKAGE_DIR = Path(pathcast.__file__).resolve().parent


def _module_names(package_dir: Path) -> dict[str, Path]:
    """Dotted module name -> source file, for every module of the package (a package is its ``__init__.py``)."""
    names: dict[str, Path] = {}
    for path in sorted(package_dir.rglob("*.py")):
        parts = list(path.relative_to(package_dir.parent).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        names[".".join(parts)] = path
    return names


def _is_type_checking_block(node: ast.AST) -> bool:
    if not isinstance(node, ast.If):
        return False
    test = node.test
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING"
    )


def _import_nodes(tree: ast.AST) -> list[ast.Import | ast.ImportFrom]:
    """Every import statement in the tree, at any depth, leaving out ``if TYPE_CHECKING:`` bodies (their ``else``
    branch still counts)."""
    found: list[ast.Import | ast.ImportFrom] = []

    def visit(node: ast.AST) -> None:
        if isinstance(node, ast.Import | ast.ImportFrom):
            found.append(node)
        if _is_type_checking_block(node):
            assert isinstance(node, ast.If)
            children: list[ast.AST] = list(node.orelse)
        else:
            children = list(ast.iter_child_nodes(node))
        for child in children:
            visit(child)

    visit(tree)
    return found


def _imported_modules(module: str, path: Path, known: set[str]) -> set[str]:
    """The package's own modules that ``module`` imports (``from X import Y`` counts X, and X.Y when Y is a
    module)."""
    is_package = path.name == "__init__.py"
    package_parts = module.split(".") if is_package else module.split(".")[:-1]
    targets: set[str] = set()
    for node in _import_nodes(ast.parse(path.read_text(encoding="utf-8"), filename=str(path))):
        if isinstance(node, ast.Import):
            candidates = [alias.name for alias in node.names]
        else:
            if node.level:
                base_parts = package_parts[: len(package_parts) - (node.level - 1)]
                base = ".".join(base_parts + ([node.module] if node.module else []))
            else:
                base = node.module or ""
            candidates = [base] + [f"{base}.{alias.name}" for alias in node.names]
        for candidate in candidates:
            if candidate in known and candidate != module:
                targets.add(candidate)
    return targets


def import_graph(package_dir: Path = PACKAGE_DIR) -> dict[str, set[str]]:
    """Module -> the package's modules it imports anywhere outside ``if TYPE_CHECKING:``."""
    names = _module_names(package_dir)
    known = set(names)
    return {module: _imported_modules(module, path, known) for module, path in names.items()}


def two_module_loops(graph: dict[str, set[str]]) -> list[tuple[str, str]]:
    """Pairs (a, b), a < b, where a imports b and b imports a."""
    return sorted(
        (a, b) for a, targets in graph.items() for b in targets if a < b and a in graph.get(b, set())
    )


def test_graph_sees_the_package_imports() -> None:
    # common practice, no source: spot checks that the parser resolves relative, function-level and
    # TYPE_CHECKING imports the way Python does
    graph = import_graph()
    assert "pathcast.errors" in graph["pathcast.scenario.loader"]  # from ..errors import ...
    assert "pathcast.scenario.inputs" in graph["pathcast.ensemble.spec"]  # inside check_base()
    assert "pathcast.pipeline" not in graph["pathcast"]  # only under `if TYPE_CHECKING:` (and importlib)


def test_loop_finder_finds_a_loop(tmp_path: Path) -> None:
    package = tmp_path / "demo"
    package.mkdir()
    (package / "__init__.py").write_text("")
    (package / "a.py").write_text("from .b import thing\n")
    (package / "b.py").write_text("def f():\n    from . import a\n    return a\n")
    (package / "c.py").write_text(
        "from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from .a import x\nimport demo.b\n"
    )
    (package / "d.py").write_text("import typing\nif typing.TYPE_CHECKING:\n    from .c import y\n")
    (package / "e.py").write_text("from . import d\n")
    graph = import_graph(package)
    assert graph["demo.c"] == {"demo.b"}
    assert graph["demo.d"] == set()
    assert graph["demo.e"] == {"demo", "demo.d"}
    assert two_module_loops(graph) == [("demo.a", "demo.b")]


def test_no_two_modules_import_each_other() -> None:
    loops = two_module_loops(import_graph())
    assert loops == [], (
        f"modules that import each other (move the helper to the module it belongs in): {loops}"
    )
