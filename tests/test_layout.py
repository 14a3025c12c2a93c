"""The package layout: imports run from a later stage to an earlier one, never back.

The stages and their order are the architecture note of DEVELOPERS.md; this test keeps
the code and the note in step.
"""

from __future__ import annotations

import ast
from pathlib import Path

import plumbrod

PACKAGE = Path(plumbrod.__file__).resolve().parent

STAGES = (
    "errors",
    "design",
    "geometry",
    "kinematics",
    "mechanics",
    "clearance",
    "verdict",
    "outputs",
    "revise",
    "cli",
)
"""Stage order: a module may import its own stage and earlier ones."""

FACADE = {"plumbrod", "plumbrod.__main__"}
"""The package root re-exports the public API and may import any stage."""


def _module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _imports(path: Path) -> set[str]:
    """Every plumbrod module named by an import in the file, at any depth."""
    found: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            found.update(a.name for a in node.names if a.name.startswith("plumbrod"))
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            if node.module.startswith("plumbrod"):
                found.add(node.module)
    return found


def _stage(module: str) -> int:
    parts = module.split(".")
    if len(parts) < 2:
        return -1
    return STAGES.index(parts[1])


MODULES = {_module_name(p): _imports(p) for p in PACKAGE.rglob("*.py")}


def test_every_module_belongs_to_a_stage() -> None:
    strays = [m for m in MODULES if m not in FACADE and m.split(".")[1] not in STAGES]
    assert strays == []


def test_imports_never_point_to_a_later_stage() -> None:
    backwards = [
        f"{module} -> {target}"
        for module, targets in MODULES.items()
        if module not in FACADE
        for target in targets
        if target != "plumbrod" and _stage(target) > _stage(module)
    ]
    assert backwards == []


def test_module_imports_have_no_cycle() -> None:
    graph = {m: {t for t in ts if t in MODULES and t != m} for m, ts in MODULES.items()}
    state: dict[str, int] = {}
    cycle: list[str] = []

    def visit(node: str, trail: list[str]) -> bool:
        state[node] = 1
        for nxt in graph[node]:
            if state.get(nxt) == 1:
                cycle.extend([*trail, node, nxt])
                return True
            if nxt not in state and visit(nxt, [*trail, node]):
                return True
        state[node] = 2
        return False

    for module in graph:
        if module not in state and visit(module, []):
            break
    assert cycle == []


def test_every_stage_package_says_what_it_holds() -> None:
    for stage in STAGES[1:]:
        doc = ast.get_docstring(ast.parse((PACKAGE / stage / "__init__.py").read_text()))
        assert doc and "Imports" in doc, stage
