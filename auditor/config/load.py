"""Finding and reading the configuration.

padaudit looks for ``padaudit.toml`` (keys at the top level, or under
``[tool.padaudit]``) or a ``pyproject.toml`` with a ``[tool.padaudit]`` table,
in the board's folder and then in each parent folder; the first one found is
used. Every problem raises :class:`~auditor.errors.ConfigError` naming the
file and, where possible, the line.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import replace
from pathlib import Path
from typing import Any, cast

# The module, not its names: profiles read TOML through this package, and whichever
# of the two is imported first finds the other half-initialised.
from auditor.config import profiles
from auditor.config.limits import GENERIC_THRESHOLD, LIMITS, order_problems
from auditor.config.model import Config, Overlay
from auditor.config.toml_positions import read_toml
from auditor.config.values import (
    ConfigText,
    choice,
    limited,
    number,
    overlay_from_table,
    strings,
    waivers_from,
)
from auditor.errors import ConfigError
from auditor.model.vocabulary import (
    POWER_PRESETS,
    SEVERITY_NAMES,
    TOUCH_SIDES,
    PowerPreset,
    TouchSide,
)
from auditor.rules.finding import Severity
from auditor.sensors.selection import selection_from_mapping

CONFIG_NAMES = ("padaudit.toml", "pyproject.toml")

VALID_KEYS = ("air_gap_mm", "baseline", "controller", "fail_on", "noisy_nets", "overlay",
              "power", "profile", "sensors", "severity", "thresholds", "touch_side", "waivers")


def find_config(start: str | Path) -> Path | None:
    """The configuration file for a board in ``start`` (a folder or a file),
    walking up to the file-system root; ``None`` when there is none."""
    folder = Path(start).resolve()
    if not folder.is_dir():
        folder = folder.parent
    for candidate_dir in (folder, *folder.parents):
        own = candidate_dir / "padaudit.toml"
        if own.is_file():
            return own
        project = candidate_dir / "pyproject.toml"
        if project.is_file() and _has_tool_table(project):
            return project
    return None


def _has_tool_table(path: Path) -> bool:
    try:
        table, _ = read_toml(path)
    except ConfigError:
        return True  # a broken pyproject.toml is reported, not skipped
    tool = table.get("tool")
    return isinstance(tool, dict) and "padaudit" in tool


def load_config(path: str | Path | None) -> Config:
    """Read one configuration file (``None``: the built-in defaults)."""
    if path is None:
        return Config()
    file = Path(path)
    if not file.is_file():
        raise ConfigError(file, "configuration file not found")
    table, text = read_toml(file)
    section = "tool.padaudit"
    raw = table.get("tool", {}).get("padaudit") if isinstance(table.get("tool"), dict) else None
    if raw is None:
        if file.name == "pyproject.toml":
            return replace(Config(), source=str(file), base_dir=file.parent)
        raw, section = table, ""
    if not isinstance(raw, dict):
        raise ConfigError(file, "[tool.padaudit] must be a table")
    return config_from_mapping(raw, ConfigText(file, text, section))


def config_from_mapping(raw: Mapping[str, Any], where: ConfigText) -> Config:
    """Validate one ``[tool.padaudit]`` table into a :class:`Config`."""
    for key in raw:
        if key not in VALID_KEYS:
            raise where.error(f"unknown configuration key {key!r}; valid keys: "
                              + ", ".join(VALID_KEYS), key)
    config = Config(source=str(where.path), base_dir=where.path.parent)
    changes: dict[str, Any] = {}
    for key, value in raw.items():
        changes[key if key != "sensors" else "selection"] = _READERS[key](value, where)
    if "noisy_nets" in changes or "controller" in changes:
        changes["selection"] = _merged_selection(changes, raw, where)
    if isinstance(raw.get("sensors"), dict):
        changes["selection_keys"] = tuple(sorted(raw["sensors"]))
    return replace(config, **changes)


def _merged_selection(changes: dict[str, Any], raw: Mapping[str, Any],
                      where: ConfigText) -> Any:
    extra: dict[str, Any] = {}
    if changes.get("noisy_nets"):
        extra["extra_noisy_nets"] = list(changes["noisy_nets"])
    sensors = raw.get("sensors", {})
    if changes.get("controller") and "controller_ref" not in sensors:
        extra["controller_ref"] = changes["controller"]
    base = changes.get("selection")
    return selection_from_mapping(extra, where.located("sensors"), base)


def _profile(value: Any, where: ConfigText) -> str:
    if not isinstance(value, str) or not value.strip():
        raise where.error("profile must be a profile name or a path to a .toml file",
                          "profile")
    try:  # here, so that a wrong name is reported at this file's line
        profiles.resolve_profile(value.strip(), where.path.parent)
    except ConfigError as exc:
        raise where.error(exc.message, "profile") from None
    return value.strip()


def _overlay(value: Any, where: ConfigText) -> Overlay:
    return overlay_from_table(value, where)


def _sensors(value: Any, where: ConfigText) -> Any:
    if not isinstance(value, dict):
        raise where.error("sensors must be a table", "sensors")
    sub = where.sub("sensors")
    for key, item in value.items():
        if f"sensors.{key}" in LIMITS:
            limited(item, key, sub, f"sensors.{key}")
        elif isinstance(item, int | float) and not isinstance(item, bool):
            # A numeric key without a row yet: finite, from 0, within float.
            problem = GENERIC_THRESHOLD.problem(item)
            if problem is not None:
                raise sub.error(f"{key} {problem}", key)
    return selection_from_mapping(value, sub.located)


def _severity(value: Any, where: ConfigText) -> dict[str, str]:
    if not isinstance(value, dict):
        raise where.error("severity must be a table of rule id = level", "severity")
    sub = where.sub("severity")
    return {rule_id: profiles.check_level(rule_id, level, where.path, sub.line_of(rule_id))
            for rule_id, level in sorted(value.items())}


def _thresholds(value: Any, where: ConfigText) -> dict[str, Any]:
    if not isinstance(value, dict):
        raise where.error("thresholds must be a table of name = number", "thresholds")
    sub = where.sub("thresholds")
    for key, item in value.items():
        profiles.check_threshold(key, item, where.path, sub.line_of(key))
    return dict(sorted(value.items()))


def _baseline(value: Any, where: ConfigText) -> str:
    """The baseline file, relative to the configuration file's folder."""
    if not isinstance(value, str) or not value.strip():
        raise where.error("baseline must be the path of a baseline file (written by "
                          "--write-baseline), relative to this file", "baseline")
    return str(where.path.parent / value.strip())


def _fail_on(value: Any, where: ConfigText) -> Severity:
    return Severity.parse(choice(value, SEVERITY_NAMES, "fail_on", where))


_READERS: dict[str, Callable[[Any, ConfigText], Any]] = {
    "profile": _profile,
    "overlay": _overlay,
    "air_gap_mm": lambda v, w: number(v, "air_gap_mm", w),
    "touch_side": lambda v, w: cast(TouchSide, choice(v, TOUCH_SIDES, "touch_side", w)),
    "power": lambda v, w: cast(PowerPreset, choice(v, POWER_PRESETS, "power", w)),
    "sensors": _sensors,
    "controller": lambda v, w: strings(v, "controller", w, single=True)[0],
    "noisy_nets": lambda v, w: strings(v, "noisy_nets", w),
    "severity": _severity,
    "waivers": waivers_from,
    "fail_on": _fail_on,
    "baseline": _baseline,
    "thresholds": _thresholds,
}


def check_threshold_order(config: Config) -> None:
    """Check the configuration's thresholds keep the ordered pairs ordered
    once laid over its profile (the profile alone was checked when loaded).

    Raises
    ------
    ConfigError
        At the configuration file's line of the threshold out of order.
    """
    if not config.thresholds or not config.source:
        return
    merged = {**profiles.load_profile(config.profile, config.base_dir).thresholds,
              **config.thresholds}
    if not order_problems(merged):
        return
    table, text = read_toml(config.source)
    tool = table.get("tool")
    inside_tool = isinstance(tool, dict) and "padaudit" in tool
    profiles.check_order(merged, config.thresholds, config.source, text,
                         "tool.padaudit.thresholds" if inside_tool else "thresholds")


def discover_config(board_path: str | Path, explicit: str | Path | None = None) -> Config:
    """The configuration for a board: ``explicit`` if given, else the first
    file found walking up from the board's folder, else the defaults."""
    if explicit is not None:
        return load_config(explicit)
    return load_config(find_config(Path(board_path).parent if Path(board_path).suffix
                                   else board_path))
