"""Rule profiles: named TOML files of thresholds and rule levels.

A profile file has ``description``, optionally ``extends`` (a built-in name
or a path relative to the file), a ``[thresholds]`` table and a ``[rules]``
table mapping rule ids to ``error``/``warning``/``info``/``off``. Each
threshold in a built-in profile carries a comment naming its origin
("published: ...", "common practice, no source" or "from memory") on the
lines directly above it.

Built-in profiles live in the repository's top-level ``rules/`` folder and
ship inside the wheel as ``auditor/_profiles``; :func:`profile_dirs` finds
them in either place.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from auditor.config.limits import order_problems, threshold_problem
from auditor.config.toml_positions import key_comments, key_line, read_toml
from auditor.errors import ConfigError
from auditor.rules.context import ThresholdValue
from auditor.rules.finding import Severity
from auditor.rules.registry import all_rules

#: Every threshold comment in a built-in profile contains one of these.

#: Thresholds read by the measuring stage or the revision comparison rather
#: than by a rule.
MEASUREMENT_THRESHOLDS: Mapping[str, str] = {
    "parallel_distance_mm": "distance within which a neighbouring net counts as running "
                            "beside the sense trace",
    "nearby_radius_mm": "radius around an electrode within which parts and floating copper "
                        "are listed",
    "max_ratio_loss": "largest loss of a pad's dC/Cp between two revisions, as a fraction "
                      "(padaudit diff, audit --against)",
    "pin_pf": "the controller pin's own capacitance in pF, added to every "
              "self-capacitance electrode's Cp total",
}

LEVELS = ("error", "warning", "info", "off")

#: Rules that keep a partly read or empty audit from passing silently: their
#: level may change, but turning them off needs a waiver with a reason.
CANNOT_BE_OFF = ("no-sensors", "read-incomplete")
_PROFILE_KEYS = ("description", "extends", "thresholds", "rules")


@dataclass(frozen=True)
class Profile:
    """A resolved profile (its ``extends`` chain already merged)."""

    name: str
    description: str
    thresholds: Mapping[str, ThresholdValue]
    levels: Mapping[str, str] = field(default_factory=dict)  # rule id -> level or "off"
    origins: Mapping[str, str] = field(default_factory=dict)  # threshold -> origin note
    chain: tuple[str, ...] = ()  # names/paths from this profile to its root

    def level_of(self, rule_id: str) -> str | None:
        """The profile's level for a rule, or ``None`` to keep its default."""
        return self.levels.get(rule_id)


def profile_dirs(package: Path | None = None) -> tuple[Path, ...]:
    """Folders holding built-in profiles, in search order: the source tree's
    ``rules/`` beside the ``auditor`` package, then the wheel's
    ``auditor/_profiles`` (``package`` defaults to this ``auditor`` folder)."""
    package = package or Path(__file__).resolve().parent.parent
    candidates = (package.parent / "rules", package / "_profiles")
    return tuple(d for d in candidates if d.is_dir() and any(d.glob("*.toml")))


def builtin_profile_names() -> tuple[str, ...]:
    """Names of the built-in profiles, sorted."""
    return tuple(sorted({p.stem for d in profile_dirs() for p in d.glob("*.toml")}))


def builtin_profile_path(name: str) -> Path:
    """The file of a built-in profile.

    Raises
    ------
    ConfigError
        When there is no such profile (the valid names listed).
    """
    for folder in profile_dirs():
        candidate = folder / f"{name}.toml"
        if candidate.is_file():
            return candidate
    choices = ", ".join(builtin_profile_names()) or "(none installed)"
    raise ConfigError(name, f"unknown profile {name!r}; choose one of: {choices}, or a path "
                            "to a .toml profile")


def known_thresholds() -> dict[str, tuple[str, ...]]:
    """Every threshold name, with the rules that read it."""
    names: dict[str, list[str]] = {n: [] for n in MEASUREMENT_THRESHOLDS}
    for spec in all_rules():
        for threshold in spec.thresholds:
            names.setdefault(threshold, []).append(spec.rule_id)
    return {k: tuple(v) for k, v in sorted(names.items())}


def load_profile(name_or_path: str, base_dir: Path | None = None) -> Profile:
    """Load a built-in profile by name, or a profile file by path.

    A value containing ``/`` or ending in ``.toml`` is a path (relative to
    ``base_dir``); anything else is a built-in name. A profile without
    ``extends`` extends the built-in ``default`` (only ``default`` itself is a
    root), so every threshold a rule reads has a value.
    """
    return _load(resolve_profile(name_or_path, base_dir), ())


def resolve_profile(name_or_path: str, base_dir: Path | None = None) -> Path:
    """The file of a profile name or path.

    Raises
    ------
    ConfigError
        When there is no such file or built-in profile; the error's path is
        the name as given, for callers to place at their own line.
    """
    if "/" in name_or_path or "\\" in name_or_path or name_or_path.endswith(".toml"):
        path = Path(name_or_path)
        if not path.is_absolute() and base_dir is not None:
            path = base_dir / path
        if not path.is_file():
            raise ConfigError(name_or_path, f"profile file {str(path)!r} not found")
        return path
    return builtin_profile_path(name_or_path)


def _is_root(path: Path) -> bool:
    """True for the built-in ``default`` profile, the one profile extending none."""
    return any((folder / "default.toml").resolve() == path.resolve()
               for folder in profile_dirs())


def _load(path: Path, seen: tuple[Path, ...]) -> Profile:
    resolved = path.resolve()
    if resolved in seen:
        raise ConfigError(path, "profile extends itself (cycle: "
                                + " -> ".join(p.name for p in (*seen, resolved)) + ")")
    table, text = read_toml(path)
    _check_keys(table, text, path)
    own_thresholds = _thresholds(table.get("thresholds", {}), text, path)
    own_levels = _levels(table.get("rules", {}), text, path)
    comments = key_comments(text, "thresholds")
    origins = {k: comments.get(k, "") for k in own_thresholds}
    description = table.get("description")
    if description is not None and not isinstance(description, str):
        raise ConfigError(path, "description must be a string", key_line(text, "description"))
    if _is_root(path):
        profile = Profile(path.stem, description or "", own_thresholds, own_levels, origins,
                          (path.stem,))
    else:
        parent = _load(_parent_path(table.get("extends", "default"), path, text),
                       (*seen, resolved))
        profile = Profile(
            path.stem, description if description is not None else parent.description,
            {**parent.thresholds, **own_thresholds}, {**parent.levels, **own_levels},
            {**parent.origins, **origins}, (path.stem, *parent.chain))
    check_order(profile.thresholds, own_thresholds, path, text, "thresholds")
    return profile


def check_order(merged: Mapping[str, Any], own: Mapping[str, Any], path: str | Path,
                text: str, table: str) -> None:
    """Raise at the line of the file that put two ordered thresholds out of
    order (:data:`auditor.config.limits.ORDERED_THRESHOLDS`): of the pair,
    the one this file sets (the upper when it sets both)."""
    for problem in order_problems(merged):
        key = problem.upper if problem.upper in own else problem.lower
        if key in own:
            raise ConfigError(path, f"threshold {problem.message}",
                              key_line(text, key, table))


def _parent_path(parent_name: Any, path: Path, text: str) -> Path:
    line = key_line(text, "extends")
    if not isinstance(parent_name, str) or not parent_name.strip():
        raise ConfigError(path, "extends must be a profile name or path", line)
    try:
        return resolve_profile(parent_name.strip(), path.parent)
    except ConfigError as exc:
        raise ConfigError(path, f"extends: {exc.message}", line) from None


def _check_keys(table: Mapping[str, Any], text: str, path: Path) -> None:
    for key in table:
        if key not in _PROFILE_KEYS:
            raise ConfigError(path, f"unknown profile key {key!r}; valid keys: "
                              + ", ".join(_PROFILE_KEYS), key_line(text, key))


def _thresholds(raw: Any, text: str, path: Path) -> dict[str, ThresholdValue]:
    if not isinstance(raw, dict):
        raise ConfigError(path, "[thresholds] must be a table", key_line(text, "thresholds"))
    for key, value in raw.items():
        check_threshold(key, value, path, key_line(text, key, "thresholds"))
    return dict(raw)


def check_threshold(name: str, value: Any, path: str | Path, line: int | None) -> None:
    """Validate one threshold: a known name, a value of its type within its
    range (:mod:`auditor.config.limits`). Used by profiles and the config."""
    known = known_thresholds()
    if name not in known:
        raise ConfigError(path, f"unknown threshold {name!r}; valid thresholds: "
                          + ", ".join(known), line)
    problem = threshold_problem(name, value)
    if problem is not None:
        raise ConfigError(path, f"threshold {name} {problem}", line)


def _levels(raw: Any, text: str, path: Path) -> dict[str, str]:
    if not isinstance(raw, dict):
        raise ConfigError(path, "[rules] must be a table", key_line(text, "rules"))
    return {rule_id: check_level(rule_id, level, path, key_line(text, rule_id, "rules"))
            for rule_id, level in raw.items()}


def check_level(rule_id: str, level: Any, path: str | Path, line: int | None) -> str:
    """Validate one ``rule id -> level`` entry (used by profiles and config)."""
    ids = [spec.rule_id for spec in all_rules()]
    if rule_id not in ids:
        raise ConfigError(path, f"unknown rule {rule_id!r}; valid rules: {', '.join(ids)}",
                          line)
    if not isinstance(level, str) or level.strip().lower() not in LEVELS:
        raise ConfigError(path, f"level of {rule_id!r} must be one of: {', '.join(LEVELS)}",
                          line)
    if level.strip().lower() == "off" and rule_id in CANNOT_BE_OFF:
        raise ConfigError(path, f"{rule_id} cannot be turned off (it keeps an incomplete "
                                "audit from passing); waive it with a reason instead", line)
    return level.strip().lower()


def severity_of_level(level: str) -> Severity | None:
    """``None`` for ``off``, else the severity."""
    return None if level == "off" else Severity.parse(level)
