"""The house rules of DEVELOPERS.md ("Import rules"), checked on the import graph.

Every module of ``auditor`` is parsed with :mod:`ast`; every import counts,
wherever it sits (module level, inside a function, under ``TYPE_CHECKING``),
so a loop cannot hide behind a late import. Common practice, no source: the
layering checks of import-linter and of flake8's own package layout, written
out here with the standard library only.
"""

from __future__ import annotations

import ast
from collections import defaultdict
from collections.abc import Iterator
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[2] / "auditor"

#: stage -> stages it must never import (DEVELOPERS.md, "Import rules").
FORBIDDEN: dict[str, set[str]] = {
    "field": {"read"},
    "rules": {"report", "cli"},
    "read": {"sensors", "solve", "field", "rules", "decide", "report", "audit", "cli"},
    "sensors": {"solve", "rules", "decide", "report", "audit", "cli"},
    "decide": {"report", "cli"},
}

#: Only ``cli`` touches the command line, the exit code and the terminal.
TERMINAL_ATTRIBUTES = {("sys", "argv"), ("sys", "exit"), ("sys", "stdout"), ("sys", "stderr"),
                       ("sys", "stdin"), ("os", "_exit")}
TERMINAL_CALLS = {"print", "input", "exit", "quit"}


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _modules() -> dict[str, ast.Module]:
    return {_module_name(p): ast.parse(p.read_text(encoding="utf-8"), str(p))
            for p in sorted(PACKAGE.rglob("*.py"))}


MODULES = _modules()


def stage_of(module: str) -> str:
    """``auditor.solve.setup`` -> ``solve``; the package's root -> ``auditor``."""
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "auditor"


def _resolved(module: str, node: ast.ImportFrom) -> str:
    if not node.level:
        return node.module or ""
    base = module.split(".")
    is_package = (PACKAGE.parent / Path(*base) / "__init__.py").is_file()
    keep = len(base) - node.level + (1 if is_package else 0)
    return ".".join(base[:keep] + ([node.module] if node.module else []))


def imports_of(module: str, tree: ast.Module) -> Iterator[str]:
    """Every ``auditor`` module that ``module`` imports, anywhere in it."""
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            source = _resolved(module, node)
            names = [source] + [f"{source}.{alias.name}" for alias in node.names]
        else:
            continue
        yield from (name for name in names if name in MODULES)


def stage_graph() -> dict[str, set[str]]:
    """stage -> the other stages it imports."""
    graph: dict[str, set[str]] = defaultdict(set)
    for module, tree in MODULES.items():
        for target in imports_of(module, tree):
            if stage_of(target) != stage_of(module):
                graph[stage_of(module)].add(stage_of(target))
    return graph


def find_cycle(graph: dict[str, set[str]]) -> list[str]:
    """One cycle of ``graph`` as a path (first node repeated at the end), or []."""
    state: dict[str, int] = {}  # 1: on the current path, 2: done

    def visit(node: str, path: list[str]) -> list[str]:
        state[node] = 1
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return path[path.index(nxt):] + [node, nxt] if nxt in path else [node, nxt]
            if nxt not in state:
                found = visit(nxt, path + [node])
                if found:
                    return found
        state[node] = 2
        return []

    for start in sorted(graph):
        if start not in state:
            found = visit(start, [])
            if found:
                return found
    return []


def test_the_graph_sees_late_and_type_checking_imports() -> None:
    """The parser must see what a module-level scan would miss, or the rules
    below could pass on a loop hidden in a function."""
    assert "auditor.solve.precise" in set(imports_of(
        "auditor.solve.dispatch", MODULES["auditor.solve.dispatch"]))  # function level
    assert "auditor.model.results" in set(imports_of(
        "auditor.audit", MODULES["auditor.audit"]))  # also under TYPE_CHECKING
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}}) == ["a", "b", "c", "a"]
    assert find_cycle({"a": {"b"}, "b": set()}) == []


@pytest.mark.parametrize("stage", sorted(FORBIDDEN))
def test_stage_imports_nothing_forbidden(stage: str) -> None:
    bad = sorted(f"{module} imports {target}"
                 for module, tree in MODULES.items() if stage_of(module) == stage
                 for target in imports_of(module, tree)
                 if stage_of(target) in FORBIDDEN[stage])
    assert not bad, "\n".join(bad)


def test_no_import_cycle_between_stages() -> None:
    cycle = find_cycle(stage_graph())
    assert not cycle, " -> ".join(cycle)


#: Imports that close a loop on purpose: the registry loads the rule modules
#: (which register themselves with it) when first asked for the rules.
REGISTRATION_IMPORTS = {("auditor.rules.registry", "auditor.rules.builtin")}

#: Loops not yet untangled, each with its reason; strict xfail, so the test
#: fails once the loop is gone and the entry must be removed.
KNOWN_LOOPS: dict[str, str] = {}


def module_graph(stage: str) -> dict[str, set[str]]:
    """module -> modules of the same stage it imports (a package's own
    ``__init__`` re-exporting its modules is not a loop)."""
    graph: dict[str, set[str]] = defaultdict(set)
    for module, tree in MODULES.items():
        if stage_of(module) != stage:
            continue
        for target in imports_of(module, tree):
            if (stage_of(target) == stage and (module, target) not in REGISTRATION_IMPORTS
                    and not module.startswith(target + ".")
                    and not target.startswith(module + ".") and target != module):
                graph[module].add(target)
    return graph


@pytest.mark.parametrize("stage", [
    pytest.param(s, marks=pytest.mark.xfail(strict=True, reason=KNOWN_LOOPS[s]))
    if s in KNOWN_LOOPS else s
    for s in sorted({stage_of(m) for m in MODULES})])
def test_no_import_cycle_between_modules_of_a_stage(stage: str) -> None:
    cycle = find_cycle(module_graph(stage))
    assert not cycle, " -> ".join(cycle)


def _terminal_uses(tree: ast.Module) -> Iterator[tuple[int, str]]:
    for node in ast.walk(tree):
        if isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name) \
                and (node.value.id, node.attr) in TERMINAL_ATTRIBUTES:
            yield node.lineno, f"{node.value.id}.{node.attr}"
        elif isinstance(node, ast.Call) and isinstance(node.func, ast.Name) \
                and node.func.id in TERMINAL_CALLS:
            yield node.lineno, f"{node.func.id}()"
        elif isinstance(node, ast.Raise) and isinstance(node.exc, ast.Call | ast.Name) \
                and "SystemExit" in ast.unparse(node.exc):
            yield node.lineno, "raise SystemExit"
        elif isinstance(node, ast.Import | ast.ImportFrom):
            names = [a.name for a in node.names] + [getattr(node, "module", None) or ""]
            if "argparse" in names:
                yield node.lineno, "import argparse"


def test_only_cli_touches_argv_exit_codes_and_the_terminal() -> None:
    bad = sorted(f"{module}:{line}: {what}" for module, tree in MODULES.items()
                 if stage_of(module) not in ("cli", "__main__")
                 for line, what in _terminal_uses(tree))
    assert not bad, "\n".join(bad)


def test_the_checks_would_catch_a_violation() -> None:
    """A made-up module breaking each kind of rule is caught."""
    tree = ast.parse("import sys\nimport argparse\n\ndef f() -> None:\n"
                     "    print(sys.argv)\n    sys.exit(1)\n")
    assert {what for _, what in _terminal_uses(tree)} == {
        "print()", "sys.argv", "sys.exit", "import argparse"}
    late = ast.parse("def f() -> None:\n    from auditor.report.render import render\n")
    assert "auditor.report.render" in set(imports_of("auditor.decide.policy", late))
