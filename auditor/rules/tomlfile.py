"""Reading TOML files with errors that name the file, line and column."""

from __future__ import annotations

import re
import sys
from pathlib import Path
from typing import Any

from auditor.errors import ConfigError

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

_POSITION = re.compile(r"\s*\(at line (\d+), column (\d+)\)\s*$")
_AT_END = re.compile(r"\s*\(at end of document\)\s*$")


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


def key_line(text: str, key: str, table: str = "") -> int | None:
    """1-based line of ``key = ...`` (inside ``[table]`` if given), for error
    messages about values that parsed but are not acceptable."""
    current = ""
    pattern = re.compile(rf"^\s*(\"{re.escape(key)}\"|{re.escape(key)})\s*=")
    for number, raw in enumerate(text.splitlines(), start=1):
        stripped = raw.strip()
        header = re.match(r"^\[+\s*([^\]]+?)\s*\]+", stripped)
        if header:
            current = header.group(1)
            continue
        if current == table and pattern.match(raw):
            return number
    return None
