"""KiCad custom design rules (``.kicad_dru``, ``(version 1)``) as text.

This module only renders: :mod:`auditor.report.kicad_dru_build` decides
which rules a board gets. The text follows the format KiCad 6 reads and
later versions still accept: ``(rule "name" (condition "...") (constraint
...))``, comments on lines of their own starting with ``#`` (KiCad 6 rejects
a comment after a token on the same line), lengths with a unit (``0.5mm``).

Conditions are KiCad expressions inside an s-expression string. Their string
literals are single-quoted and KiCad 6 has no escape for a quote inside
them; ``==`` on strings is a wildcard match (``*``, ``?``), so a character
that cannot be written (``'``, ``"``, ``\\``) becomes ``?``, which matches it.

Examples
--------
>>> rule = DruRule("padaudit T1 trace width", "trace-too-wide", "limit 0.25 mm",
...                "A.NetName == 'T1'", "track_width (max 0.25mm)")
>>> print(render_rules((rule,), ("demo",), header=True))
(version 1)
# demo
<BLANKLINE>
# from padaudit rule trace-too-wide: limit 0.25 mm
(rule "padaudit T1 trace width"
  (condition "A.NetName == 'T1'")
  (constraint track_width (max 0.25mm)))
<BLANKLINE>
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

#: Characters a KiCad 6 expression string literal cannot hold.
_UNQUOTABLE = re.compile(r"['\"\\\n\r\t]")
#: Characters a rule name keeps; others become "_".
_NAME_UNSAFE = re.compile(r"[^A-Za-z0-9 _.+:/()-]")


@dataclass(frozen=True)
class DruRule:
    """One KiCad custom rule and the padaudit rule it comes from.

    ``constraint`` is the text inside ``(constraint ...)``, e.g.
    ``clearance (min 4mm)``; ``note`` says which limit it encodes.
    """

    name: str
    source_rule: str
    note: str
    condition: str
    constraint: str


def expr_string(text: str) -> str:
    """``text`` as a single-quoted string literal of KiCad's expression language.

    >>> expr_string("Net-(U1-CS0)")
    "'Net-(U1-CS0)'"
    >>> expr_string("it's")
    "'it?s'"
    """
    return "'" + _UNQUOTABLE.sub("?", text) + "'"


def rule_name(text: str) -> str:
    """A rule name that needs no escaping in the s-expression."""
    return _NAME_UNSAFE.sub("_", text)


def mm(value: float) -> str:
    """A length with its unit, as KiCad's rule parser reads it.

    >>> mm(4.0), mm(0.25), mm(0.1 + 0.2)
    ('4mm', '0.25mm', '0.3mm')
    """
    text = f"{round(value, 6):.6f}".rstrip("0").rstrip(".")
    return f"{text}mm"


def any_of(field: str, values: Iterable[str]) -> str:
    """``field == 'a' || field == 'b'`` in parentheses when there are several.

    >>> any_of("A.NetName", ["X", "Y"])
    "(A.NetName == 'X' || A.NetName == 'Y')"
    """
    parts = [f"{field} == {expr_string(v)}" for v in values]
    if not parts:
        raise ValueError(f"no values for {field}")
    return parts[0] if len(parts) == 1 else "(" + " || ".join(parts) + ")"


def none_of(field: str, values: Iterable[str]) -> str:
    """``field != 'a' && field != 'b'``.

    >>> none_of("A.NetName", ["X"])
    "A.NetName != 'X'"
    """
    return " && ".join(f"{field} != {expr_string(v)}" for v in values)


def _condition_string(condition: str) -> str:
    # The expression sits in an s-expression string: its own text never
    # holds '"' or '\\' (expr_string replaced them), so it needs no escape.
    return '"' + condition + '"'


def render_rule(rule: DruRule) -> str:
    """One rule with its comment line, ending in a newline."""
    return (f"# from padaudit rule {rule.source_rule}: {_one_line(rule.note)}\n"
            f'(rule "{rule_name(rule.name)}"\n'
            f"  (condition {_condition_string(rule.condition)})\n"
            f"  (constraint {rule.constraint}))\n")


def render_rules(rules: Sequence[DruRule], notes: Sequence[str], *, header: bool) -> str:
    """The whole file (``header``) or only the rules to append to one.

    ``notes`` become comment lines at the top; every rule is preceded by a
    comment naming the padaudit rule and limit it encodes.
    """
    lines = ["(version 1)\n"] if header else []
    lines += [f"# {_one_line(n)}\n" if n else "#\n" for n in notes]
    for rule in rules:
        lines.append("\n" + render_rule(rule))
    return "".join(lines)


def _one_line(text: str) -> str:
    return " ".join(text.split())


__all__ = ["DruRule", "any_of", "expr_string", "mm", "none_of", "render_rule", "render_rules",
           "rule_name"]
