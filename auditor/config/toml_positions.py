"""TOML files with positions: parse errors at line and column, and the line
of a key or table header for values that parsed but are not acceptable.

``tomllib`` returns plain data without positions, so the few places that need
a line (configuration, profiles) scan the source text here, and only here.
"""

from __future__ import annotations

import re
import sys
from collections.abc import Iterator
from pathlib import Path
from typing import Any

from auditor.errors import ConfigError

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

_POSITION = re.compile(r"\s*\(at line (\d+), column (\d+)\)\s*$")
_AT_END = re.compile(r"\s*\(at end of document\)\s*$")
_HEADER = re.compile(r"^\[+\s*([^\]]+?)\s*\]+")
_KEY = re.compile(r"^\s*\"?([A-Za-z0-9_-]+)\"?\s*=")


def parse_toml(text: str, path: str | Path) -> dict[str, Any]:
    """Parse TOML text; malformed input raises :class:`ConfigError`.

    Examples
    --------
    >>> parse_toml('a = 1', 'x.toml')
    {'a': 1}
    >>> try:
    ...     parse_toml('a = 1\\nb = ', 'x.toml')
    ... except ConfigError as exc:
    ...     print(exc.line, exc.column)
    2 5
    """
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        line: int | None = getattr(exc, "lineno", None)
        column: int | None = getattr(exc, "colno", None)
        found = _POSITION.search(message)
        if found:
            line, column = int(found.group(1)), int(found.group(2))
            message = message[:found.start()]
        elif _AT_END.search(message):
            lines = text.splitlines() or [""]
            line, column = len(lines), len(lines[-1]) + 1
            message = _AT_END.sub("", message)
        raise ConfigError(path, f"malformed TOML: {message}", line, column) from None


def read_toml(path: str | Path) -> tuple[dict[str, Any], str]:
    """Read and parse a TOML file; returns the table and the text."""
    try:
        text = Path(path).read_text(encoding="utf-8")
    except OSError as exc:
        raise ConfigError(path, f"cannot read: {exc.strerror or exc}") from None
    except UnicodeDecodeError:
        raise ConfigError(path, "not UTF-8 text") from None
    return parse_toml(text, path), text


def _lines(text: str) -> Iterator[tuple[int, str, str, bool]]:
    """``(line number, raw line, table it is in, is a header)`` for each line."""
    table = ""
    for number, raw in enumerate(text.splitlines(), start=1):
        header = _HEADER.match(raw.strip())
        if header:
            table = header.group(1)
        yield number, raw, table, header is not None


def key_line(text: str, key: str, table: str = "") -> int | None:
    """1-based line of ``key = ...`` (inside ``[table]`` if given).

    Examples
    --------
    >>> key_line('a = 1\\n[t]\\nb = 2\\n', 'b', 't')
    3
    """
    for number, raw, current, is_header in _lines(text):
        found = None if is_header else _KEY.match(raw)
        if current == table and found and found.group(1) == key:
            return number
    return None


def header_lines(text: str, table: str, array_only: bool = False) -> list[int]:
    """1-based lines of the ``[table]`` / ``[[table]]`` headers (only the
    ``[[table]]`` ones when ``array_only``).

    Examples
    --------
    >>> header_lines('[[w]]\\na = 1\\n[[w]]\\n', 'w', array_only=True)
    [1, 3]
    """
    return [number for number, raw, current, is_header in _lines(text)
            if is_header and current == table
            and (not array_only or raw.strip().startswith("[["))]


def key_comments(text: str, table: str) -> dict[str, str]:
    """For each key in ``[table]``, the comment lines directly above it and a
    trailing comment on its own line, joined. A ``# ---`` line is a section
    heading, not part of the next key's note.

    Examples
    --------
    >>> key_comments('[t]\\n# why\\na = 1  # source\\n', 't')
    {'a': 'why source'}
    """
    notes: dict[str, str] = {}
    comments: list[str] = []
    for _, raw, current, is_header in _lines(text):
        stripped = raw.strip()
        found = None if is_header else _KEY.match(raw)
        if stripped.startswith("#") and not stripped.startswith("# ---"):
            comments.append(stripped.lstrip("#").strip())
            continue
        if found and current == table:
            trailing = raw.split("#", 1)[1].strip() if "#" in raw else ""
            notes[found.group(1)] = " ".join(c for c in (*comments, trailing) if c)
        comments = []
    return notes


__all__ = ["header_lines", "key_comments", "key_line", "parse_toml", "read_toml"]
