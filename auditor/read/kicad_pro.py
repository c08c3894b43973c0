"""Net classes from the KiCad 6+ project file (``.kicad_pro``) beside a board.

From KiCad 6 on, net classes live in the project file, not the board
(kicad-format.md §5). The JSON holds them under ``net_settings``:

* ``classes``: ``[{"name": "Touch", ..., "nets": [...]}]`` (``nets`` only in
  KiCad 6 project files);
* ``netclass_assignments``: ``{"NET": "Class"}`` (7/8) or
  ``{"NET": ["Class", ...]}`` (9+, several classes per net);
* ``netclass_patterns``: ``[{"netclass": "Touch", "pattern": "TOUCH*"}]``.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from auditor.errors import ConfigError
from auditor.model.board import Board
from auditor.model.items import NetClass


@dataclass(frozen=True)
class ProjectNetClasses:
    """What the project file says about net classes.

    ``found`` is False when there is no ``.kicad_pro`` beside the board;
    ``path`` is the file looked for either way.
    """

    path: str
    found: bool
    classes: tuple[NetClass, ...] = ()


def project_path_for(board_path: str | Path) -> Path:
    """The project file KiCad pairs with ``board_path`` (same stem)."""
    return Path(board_path).with_suffix(".kicad_pro")


def read_project_netclasses(board_path: str | Path) -> ProjectNetClasses:
    """Read the net classes from the project file beside ``board_path``.

    Raises
    ------
    ConfigError
        When the file exists but is not valid JSON (with line and column) or
        its ``net_settings`` has the wrong shape.
    """
    path = project_path_for(board_path)
    if not path.is_file():
        return ProjectNetClasses(str(path), False)
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise ConfigError(path, f"cannot read project file: {exc}") from None
    return ProjectNetClasses(str(path), True, parse_project_netclasses(text, str(path)))


def with_project_netclasses(board: Board) -> Board:
    """``board`` with the net classes of the project file beside it added (and
    ``project_file`` set), so no later stage reads the disk; unchanged when
    there is no project file.

    Raises
    ------
    ConfigError
        As :func:`read_project_netclasses`.
    """
    project = read_project_netclasses(board.path)
    if not project.found:
        return board
    return replace(board, netclasses=tuple(board.netclasses) + project.classes,
                   project_file=project.path)


def parse_project_netclasses(text: str, source: str) -> tuple[NetClass, ...]:
    """Net classes from the text of a ``.kicad_pro`` file, sorted by name."""
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        raise ConfigError(source, f"invalid JSON: {exc.msg}", exc.lineno, exc.colno) from None
    settings = data.get("net_settings", {}) if isinstance(data, dict) else None
    if not isinstance(settings, dict):
        raise ConfigError(source, "net_settings is not a JSON object")
    nets: dict[str, set[str]] = {}
    patterns: dict[str, list[str]] = {}
    for entry in _list(settings.get("classes"), "net_settings.classes", source):
        if not isinstance(entry, dict) or not isinstance(entry.get("name"), str):
            raise ConfigError(source, "net_settings.classes entry without a name")
        nets.setdefault(entry["name"], set()).update(
            str(n) for n in _list(entry.get("nets"), "classes[].nets", source))
    for net, classes in _assignments(settings.get("netclass_assignments"), source):
        for cls in classes:
            nets.setdefault(cls, set()).add(net)
    for entry in _list(settings.get("netclass_patterns"), "net_settings.netclass_patterns",
                       source):
        target = entry.get("netclass") if isinstance(entry, dict) else None
        pattern = entry.get("pattern") if isinstance(entry, dict) else None
        if not isinstance(target, str) or not isinstance(pattern, str):
            raise ConfigError(source, "netclass_patterns entry needs netclass and pattern")
        nets.setdefault(target, set())
        patterns.setdefault(target, []).append(pattern)
    return tuple(NetClass(name, tuple(sorted(members)), tuple(patterns.get(name, ())))
                 for name, members in sorted(nets.items()))


def _list(value: Any, what: str, source: str) -> list[Any]:
    if value is None:
        return []
    if not isinstance(value, list):
        raise ConfigError(source, f"{what} is not a JSON list")
    return value


def _assignments(value: Any, source: str) -> list[tuple[str, tuple[str, ...]]]:
    if value is None:
        return []
    if not isinstance(value, dict):
        raise ConfigError(source, "net_settings.netclass_assignments is not a JSON object")
    out: list[tuple[str, tuple[str, ...]]] = []
    for net, classes in value.items():
        if isinstance(classes, str):
            out.append((net, (classes,)))
        elif isinstance(classes, list) and all(isinstance(c, str) for c in classes):
            out.append((net, tuple(classes)))
        elif classes is not None:
            raise ConfigError(source, f"netclass_assignments[{net!r}] is not a class name")
    return out
