"""Imports run one way: geo below planner, and inside planner
common <- fuels <- ship <- flushing <- uncertainty <- voyage, calibration <- procedure
<- journal, charts <- documents <- cli. No module imports a higher layer, no
import cycle exists (lazy imports inside functions count; imports under
``if TYPE_CHECKING:`` do not), and the computing layers never import the
terminal, drawing or PDF libraries. DEVELOPERS.md explains the layers.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]

LAYERS: dict[str, int] = {
    "geo": 0,
    "planner.common": 1,
    "planner.fuels": 2,
    "planner.ship": 3,
    "planner.flushing": 4,
    "planner.uncertainty": 5,
    "planner.voyage": 6,
    "planner.calibration": 6,  # beside voyage: neither imports the other
    "planner.procedure": 7,
    "planner.journal": 8,
    "planner.charts": 8,
    "planner.documents": 9,
    "planner.cli": 10,
    "planner.__main__": 11,
    "planner": 11,  # planner/__init__.py: the version only
}
PRESENTATION = ("rich", "matplotlib", "reportlab", "typer")
# packages that may use them, only inside functions (imported lazily)
LAZY_PRESENTATION = ("planner.charts", "planner.documents", "planner.cli")


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    found = {}
    for top in ("geo", "planner"):
        for path in sorted((ROOT / top).rglob("*.py")):
            found[_module_name(path)] = path
    return found


MODULES = _modules()


def _is_type_checking(node: ast.If) -> bool:
    t = node.test
    return (isinstance(t, ast.Name) and t.id == "TYPE_CHECKING") or (
        isinstance(t, ast.Attribute) and t.attr == "TYPE_CHECKING")


def _imports(path: Path) -> list[tuple[str, bool]]:
    """(imported module, at module level) for every import outside TYPE_CHECKING blocks."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out: list[tuple[str, bool]] = []

    def visit(node: ast.AST, top: bool) -> None:
        for child in ast.iter_child_nodes(node):
            if isinstance(child, ast.If) and _is_type_checking(child):
                for sub in child.orelse:
                    visit(sub, top)
                continue
            if isinstance(child, ast.Import):
                out.extend((a.name, top) for a in child.names)
            elif isinstance(child, ast.ImportFrom) and child.module and child.level == 0:
                for a in child.names:
                    full = f"{child.module}.{a.name}"
                    out.append((full if full in MODULES else child.module, top))
            elif isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda)):
                visit(child, False)
            else:
                visit(child, top)

    visit(tree, True)
    return out


def _layer(module: str) -> tuple[str, int] | None:
    best = None
    for prefix, rank in LAYERS.items():
        if module == prefix or module.startswith(prefix + "."):
            if best is None or len(prefix) > len(best[0]):
                best = (prefix, rank)
    return best


GRAPH = {m: sorted({i for i, _ in _imports(p) if i in MODULES}) for m, p in MODULES.items()}


def test_every_module_has_a_layer():
    missing = [m for m in MODULES if _layer(m) is None]
    assert not missing, f"add these to LAYERS and to DEVELOPERS.md: {missing}"


@pytest.mark.parametrize("module", sorted(MODULES))
def test_no_import_from_a_higher_layer(module):
    here, rank = _layer(module)
    wrong = []
    for target in GRAPH[module]:
        there, other = _layer(target)
        if other > rank or (other == rank and there != here):
            wrong.append(target)
    assert not wrong, f"{module} (layer {here}) must not import {wrong}"


def test_no_import_cycle():
    state: dict[str, int] = {}
    stack: list[str] = []

    def walk(m: str) -> list[str] | None:
        state[m] = 1
        stack.append(m)
        for n in GRAPH[m]:
            if state.get(n) == 1:
                return stack[stack.index(n):] + [n]
            if n not in state:
                found = walk(n)
                if found:
                    return found
        stack.pop()
        state[m] = 2
        return None

    for m in sorted(GRAPH):
        if m not in state:
            cycle = walk(m)
            assert cycle is None, "import cycle: " + " -> ".join(cycle)


@pytest.mark.parametrize("module", sorted(MODULES))
def test_presentation_libraries_only_where_they_belong(module):
    lazy_ok = any(module == p or module.startswith(p + ".") for p in LAZY_PRESENTATION)
    for name, top in _imports(MODULES[module]):
        lib = name.split(".")[0]
        if lib not in PRESENTATION:
            continue
        if module.startswith("planner.cli") and lib == "typer":
            continue  # the command line is built with typer at import
        assert lazy_ok, f"{module} is computation and must not import {name}"
        assert not top, f"{module} imports {name} at module level: import it inside the function"

