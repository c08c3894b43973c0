"""Checking single configuration values, with errors located in the file."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from auditor.config.limits import LIMITS
from auditor.config.model import Overlay, Waiver
from auditor.config.toml_positions import header_lines, key_line
from auditor.errors import ConfigError, UsageError
from auditor.rules.registry import all_rules

OVERLAY_KEYS = ("epsilon_r", "material", "thickness_mm")
WAIVER_KEYS = ("net", "reason", "ref", "rule", "sensor")


@dataclass(frozen=True)
class ConfigText:
    """A configuration file's path and text, and the table being read
    (``tool.padaudit``, ``tool.padaudit.overlay`` ... or ``""`` for the top)."""

    path: Path
    text: str
    section: str = ""

    def line_of(self, key: str) -> int | None:
        """Line of ``key = ...`` in this table (or of the table's header)."""
        found = key_line(self.text, key, self.section)
        return found if found is not None else self.header_line(key)

    def header_line(self, name: str) -> int | None:
        """Line of a ``[section.name]`` or ``[[section.name]]`` header."""
        full = f"{self.section}.{name}" if self.section else name
        found = header_lines(self.text, full)
        return found[0] if found else None

    def error(self, message: str, key: str = "") -> ConfigError:
        """A :class:`ConfigError` at ``key``'s line (when found)."""
        return ConfigError(self.path, message, self.line_of(key) if key else None)

    def sub(self, table: str) -> ConfigText:
        """The same file, reading a sub-table."""
        return ConfigText(self.path, self.text,
                          f"{self.section}.{table}" if self.section else table)

    def located(self, key: str) -> str:
        """``file:line`` of ``key`` for messages from other modules."""
        line = self.line_of(key)
        return f"{self.path}:{line}" if line else str(self.path)


def choice(value: Any, choices: Sequence[str], key: str, where: ConfigText) -> str:
    """A string that must be one of ``choices`` (case-insensitive)."""
    if not isinstance(value, str) or value.strip().lower() not in choices:
        raise where.error(f"{key} must be one of: {', '.join(choices)} (got {value!r})", key)
    return value.strip().lower()


def limited(value: Any, key: str, where: ConfigText, name: str | None = None) -> Any:
    """``value`` checked against :data:`~auditor.config.limits.LIMITS` entry
    ``name`` (default ``key``); the error names ``key``'s line."""
    problem = LIMITS[name or key].problem(value)
    if problem is not None:
        raise where.error(f"{key} {problem}", key)
    return value


def number(value: Any, key: str, where: ConfigText, name: str | None = None) -> float:
    """A number within the range of ``LIMITS[name or key]``, as a float."""
    return float(limited(value, key, where, name))


def strings(value: Any, key: str, where: ConfigText, single: bool = False) -> tuple[str, ...]:
    """A string or (unless ``single``) a list of strings, none of them empty."""
    found: tuple[str, ...] | None = None
    if isinstance(value, str):
        found = (value,)
    elif not single and isinstance(value, list) and all(isinstance(v, str) for v in value):
        found = tuple(value)
    if found is None:
        kind = "a string" if single else "a string or a list of strings"
        raise where.error(f"{key} must be {kind}", key)
    if any(not text.strip() for text in found):
        raise where.error(f"{key} must not be empty (or blank)", key)
    return found


def overlay_from_table(value: Any, where: ConfigText) -> Overlay:
    """``overlay = {thickness_mm = 2, material = "acrylic"}`` or with ``epsilon_r``."""
    if not isinstance(value, dict):
        raise where.error("overlay must be a table with thickness_mm and material or "
                          "epsilon_r", "overlay")
    sub = where.sub("overlay")
    for key in value:
        if key not in OVERLAY_KEYS:
            raise sub.error(f"unknown overlay key {key!r}; valid keys: "
                            + ", ".join(OVERLAY_KEYS), key)
    thickness = number(value.get("thickness_mm", Overlay().thickness_mm), "thickness_mm",
                       sub, "overlay.thickness_mm")
    if "epsilon_r" in value:
        if "material" in value:
            raise sub.error("give either material or epsilon_r, not both", "epsilon_r")
        epsilon_r = number(value["epsilon_r"], "epsilon_r", sub, "overlay.epsilon_r")
        return Overlay(thickness, epsilon_r, "")
    name = strings(value.get("material", Overlay().material), "material", sub, True)[0]
    return overlay_of_material(thickness, name, sub)


def overlay_of_material(thickness_mm: float, name: str,
                        where: ConfigText | None = None) -> Overlay:
    """An overlay of a named material from the built-in table."""
    from auditor.field.materials import material

    try:
        found = material(name)
    except UsageError as exc:
        if where is None:
            raise
        raise where.error(str(exc), "material") from None
    return Overlay(thickness_mm, found.er, found.name)


def waivers_from(value: Any, where: ConfigText) -> tuple[Waiver, ...]:
    """``[[tool.padaudit.waivers]]`` entries; each needs a rule, a place and a reason."""
    if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
        raise where.error("waivers must be a list of tables ([[waivers]] entries)", "waivers")
    full = f"{where.section}.waivers" if where.section else "waivers"
    lines = header_lines(where.text, full, array_only=True)
    return tuple(_waiver(entry, where, lines[i] if i < len(lines) else where.line_of("waivers"))
                 for i, entry in enumerate(value))


def _waiver(entry: dict[str, Any], where: ConfigText, line: int | None) -> Waiver:
    def fail(message: str) -> ConfigError:
        return ConfigError(where.path, message, line)

    for key in entry:
        if key not in WAIVER_KEYS:
            raise fail(f"unknown waiver key {key!r}; valid keys: {', '.join(WAIVER_KEYS)}")
    rule_id = entry.get("rule")
    ids = [spec.rule_id for spec in all_rules()]
    if rule_id not in ids:
        raise fail(f"waiver rule {rule_id!r} is not a rule; valid rules: {', '.join(ids)}")
    reason = entry.get("reason")
    if not isinstance(reason, str) or not reason.strip():
        raise fail(f"waiver of {rule_id} needs a reason (reason = \"why this is accepted\")")
    places = {k: entry.get(k, "") for k in ("ref", "net", "sensor")}
    if not any(places.values()) or not all(isinstance(v, str) for v in places.values()):
        raise fail(f"waiver of {rule_id} must name a ref, net or sensor (strings)")
    source = f"{where.path.name}:{line}" if line else where.path.name
    return Waiver(str(rule_id), reason.strip(), places["ref"], places["net"], places["sensor"],
                  source)
