"""Check a ``.kicad_dru`` text the way KiCad 6 reads it, with padaudit's own
s-expression tokenizer (auditor/read/sexpr.py).

Grammar from KiCad's Custom Rules help (pcbnew ``panel_setup_rules_help.md``:
``(version 1)``, ``(rule <name> (constraint <type> ...) (condition
"<expression>"))``, ``#`` comments, lengths with units) and from what
pcbnew 6.0.11 did with probe files (measured: a ``#`` after a token on the
same line makes KiCad 6 reject the whole file; an unknown function such as
KiCad 7's ``memberOfFootprint`` silently evaluates false).
"""

from __future__ import annotations

import re
from collections.abc import Collection
from dataclasses import dataclass

from auditor.read.sexpr import Node, parse

#: The KiCad 6 functions and properties padaudit's rules may use (KiCad 6
#: help lists the functions; ``Size_X`` is the pad's "Size X" property).
KICAD6_FUNCTIONS = frozenset({"insideCourtyard", "insideArea"})
KICAD6_PROPERTIES = frozenset({"NetName", "Type", "Size_X"})
#: Constraint types of KiCad 6's help that the export uses.
CONSTRAINTS = frozenset({"clearance", "track_width", "disallow"})
_LENGTH = re.compile(r"^\d+(\.\d+)?mm$")
_MEMBER = re.compile(r"\b([AB])\.(\w+)\s*(\()?")
_STRING = re.compile(r"'[^']*'")
_NET_TEST = re.compile(r"[AB]\.NetName\s*[!=]=\s*'([^']*)'")
_SOURCE = re.compile(r"^# from padaudit rule ([a-z0-9-]+): ")


@dataclass(frozen=True)
class ParsedRule:
    """One rule as read back: name, condition, constraint, padaudit source."""

    name: str
    condition: str
    constraint: tuple[str, ...]  # flattened atoms: ("clearance", "min", "0.5mm")
    source: str
    line: int


def read_dru(text: str, *, header: bool = True) -> list[ParsedRule]:
    """Parse and check the structure; raises AssertionError naming the fault."""
    lines = text.splitlines()
    for number, line in enumerate(lines, 1):
        if not line.lstrip().startswith("#"):
            code = re.sub(r'"[^"]*"', '""', line)
            assert "#" not in code, f"line {number}: comment after a token"
    stripped = "\n".join("" if ln.lstrip().startswith("#") else ln for ln in lines)
    root = parse("(kicad_dru\n" + stripped + "\n)", "<rules>")
    items = [c for c in root[1:] if isinstance(c, Node)]
    assert len(items) == len(root) - 1, "bare atom at top level"
    if header:
        assert items and list(items[0]) == ["version", "1"], "first item is not (version 1)"
        items = items[1:]
    sources = _sources(lines)
    rules = [_rule(node, sources, index) for index, node in enumerate(items)]
    assert len(sources) == len(rules), "every rule needs one '# from padaudit rule' comment"
    return rules


def _sources(lines: list[str]) -> list[tuple[str, int]]:
    found = []
    for number, line in enumerate(lines, 1):
        match = _SOURCE.match(line)
        if match:
            assert lines[number].startswith("(rule "), f"line {number}: comment not before a rule"
            found.append((match.group(1), number + 1))
    return found


def _rule(node: Node, sources: list[tuple[str, int]], index: int) -> ParsedRule:
    assert node.head == "rule", f"top-level item {node.head!r} is not a rule"
    assert isinstance(node[1], str) and node[1], "rule without a name"
    clauses = {c.head: c for c in node[2:] if isinstance(c, Node)}
    assert set(clauses) == {"condition", "constraint"}, f"{node[1]}: clauses {sorted(clauses)}"
    condition = clauses["condition"]
    assert len(condition) == 2 and isinstance(condition[1], str), f"{node[1]}: bad condition"
    constraint = tuple(_atoms(clauses["constraint"]))[1:]
    assert constraint[0] in CONSTRAINTS, f"{node[1]}: constraint {constraint[0]}"
    for limit in ("min", "max"):
        if limit in constraint:
            value = constraint[constraint.index(limit) + 1]
            assert _LENGTH.match(value), f"{node[1]}: {limit} {value!r} has no unit"
    source, line = sources[index] if index < len(sources) else ("", 0)
    return ParsedRule(str(node[1]), str(condition[1]), constraint, source, line)


def _atoms(node: Node) -> list[str]:
    out: list[str] = []
    for child in node:
        out.extend(_atoms(child) if isinstance(child, Node) else [str(child)])
    return out


def check_condition(condition: str, nets: Collection[str], courtyards: Collection[str] = (),
                    areas: Collection[str] = ()) -> None:
    """Only KiCad 6 names; balanced parentheses; every net, part and area exists."""
    outside = _STRING.sub("''", condition)
    assert outside.count("'") % 2 == 0, f"unbalanced quote in {condition!r}"
    depth = 0
    for char in outside:
        depth += {"(": 1, ")": -1}.get(char, 0)
        assert depth >= 0, f"unbalanced parenthesis in {condition!r}"
    assert depth == 0, f"unbalanced parenthesis in {condition!r}"
    for _side, name, call in _MEMBER.findall(outside):
        allowed = KICAD6_FUNCTIONS if call else KICAD6_PROPERTIES
        assert name in allowed, f"{name} is not a KiCad 6 {'function' if call else 'property'}"
    for net in _NET_TEST.findall(condition):
        assert net in nets, f"net {net!r} is not on the board"
    for ref in re.findall(r"insideCourtyard\('([^']*)'\)", condition):
        assert ref in courtyards, f"{ref} has no courtyard"
    for area in re.findall(r"insideArea\('([^']*)'\)", condition):
        assert area in areas, f"no zone named {area!r}"
    for size in re.findall(r"Size_X\s*[<>]=?\s*(\S+)", outside):
        assert _LENGTH.match(size), f"Size_X compared with {size!r}, no unit"
