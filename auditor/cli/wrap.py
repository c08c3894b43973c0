"""Plain-text output wrapped to the terminal at words, never inside one.

The listings of ``rules``, ``sensors`` and ``estimate`` are lines of columns
and prose. On a terminal narrower than a line, the terminal itself would cut
it anywhere, numbers and names included; here a long line is broken at
spaces and its continuation is indented under the line's last column (or
under a bullet's text), so the columns stay readable. Files and pipes get
the lines unchanged: they are for tools, and grep wants one line per item.
"""

from __future__ import annotations

import re
import shutil
import textwrap
from collections.abc import Iterable
from typing import TextIO

#: A column gap: two or more spaces between words.
_COLUMN_GAP = re.compile(r"\S( {2,})(?=\S)")


def terminal_width(stream: TextIO) -> int | None:
    """The terminal's columns when ``stream`` is a terminal, else None."""
    isatty = getattr(stream, "isatty", None)
    if isatty is None or not isatty():
        return None
    return shutil.get_terminal_size((100, 24)).columns


def hanging_indent(line: str, width: int) -> int:
    """Where a continuation of ``line`` starts: under a bullet's text, under
    the last column that starts in the first 60 % of the width, or under the
    line's own indent plus two.

    Examples
    --------
    >>> hanging_indent("  - a note", 80), hanging_indent("rule-id   warning  Title", 80)
    (4, 19)
    """
    stripped = line.lstrip(" ")
    indent = len(line) - len(stripped)
    if stripped.startswith(("- ", "• ")):
        return indent + 2
    columns = [m.end() for m in _COLUMN_GAP.finditer(line) if m.end() <= 0.6 * width]
    if columns:
        return columns[-1]
    return indent + 2 if indent else 0


def wrap_line(line: str, width: int) -> list[str]:
    """``line`` broken at spaces into lines of at most ``width`` columns (a
    single word longer than that stays whole on its own line)."""
    if len(line) <= width:
        return [line]
    return textwrap.wrap(line, width, subsequent_indent=" " * hanging_indent(line, width),
                         break_long_words=False, break_on_hyphens=False) or [line]


def write_lines(stream: TextIO, lines: Iterable[str], width: int | None = None) -> None:
    """Write ``lines`` to ``stream``, wrapped to ``width`` (default: the
    terminal's width; unwrapped when ``stream`` is not a terminal)."""
    if width is None:
        width = terminal_width(stream)
    for line in lines:
        for part in wrap_line(line, width) if width else [line]:
            stream.write(part + "\n")
