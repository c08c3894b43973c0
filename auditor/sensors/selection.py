"""What configuration can say about which copper is a sense electrode.

:class:`SensorSelection` is the sensor stage's whole input besides the board.
Configuration files (``[tool.padaudit.sensors]``) and command-line overrides
are turned into one with :func:`selection_from_mapping`, the single place that
knows the key names, so the config loader and the CLI agree.

Distances default to values common in touch layout practice
(physics.md §4.1, common practice, no source).
"""

from __future__ import annotations

import fnmatch
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, fields, replace
from typing import Any

from auditor.errors import ConfigError

#: Part reference prefixes that usually switch current near a pad (LEDs,
#: inductors, crystals/oscillators); regulators are found by library/value.
DEFAULT_NOISY_PREFIXES: tuple[str, ...] = ("D", "LED", "L", "Y", "X", "FB")

#: Net-name globs that usually carry fast edges (common practice, no source).
DEFAULT_NOISY_NETS: tuple[str, ...] = (
    "*PWM*", "*CLK*", "*SCK*", "*SCL*", "*SDA*", "*MOSI*", "*MISO*", "*LED*",
    "*USB*", "*D+", "*D-", "*TXD*", "*RXD*", "*UART*", "*SPI*", "*I2C*", "*SW_NODE*",
)


@dataclass(frozen=True)
class SensorSelection:
    """Which copper is an electrode, and how far to look around it.

    Every glob is matched case-insensitively against the full net name and
    against its last hierarchical component (``/panel/TOUCH1`` → ``TOUCH1``).
    When none of ``nets``, ``net_classes``, ``refs``, ``lib_ids``,
    ``properties`` or ``zones`` is given, electrodes are found automatically
    (``auto``); set ``auto`` to add automatic finding to configured ones.
    """

    nets: tuple[str, ...] = ()
    net_classes: tuple[str, ...] = ()
    refs: tuple[str, ...] = ()
    lib_ids: tuple[str, ...] = ()
    properties: tuple[tuple[str, str], ...] = ()  # (property name, value glob)
    zones: tuple[str, ...] = ()
    exclude_nets: tuple[str, ...] = ()
    auto: bool | None = None  # None: automatic only when nothing is configured
    controller_ref: str = ""
    controller_min_pads: int = 6
    mutual_tx: tuple[str, ...] = ()
    mutual_rx: tuple[str, ...] = ()
    sliders: tuple[tuple[str, tuple[str, ...]], ...] = ()  # (group, net globs in order)
    wheels: tuple[tuple[str, tuple[str, ...]], ...] = ()
    proximity: tuple[str, ...] = ()  # net globs forced to kind "proximity"
    ground_nets: tuple[str, ...] = ()
    noisy_nets: tuple[str, ...] = DEFAULT_NOISY_NETS
    noisy_prefixes: tuple[str, ...] = DEFAULT_NOISY_PREFIXES
    min_area_mm2: float = 20.0  # structural cue alone (≈ 5 mm disk)
    cue_min_area_mm2: float = 4.0  # with a name / net-class / config cue
    proximity_diameter_mm: float = 25.0
    neighbour_distance_mm: float = 2.0
    gap_search_mm: float = 3.0
    ground_ring_mm: float = 3.0
    parts_radius_mm: float = 10.0
    floating_radius_mm: float = 5.0

    @property
    def configured(self) -> bool:
        """True when configuration names electrodes explicitly."""
        return bool(self.nets or self.net_classes or self.refs or self.lib_ids
                    or self.properties or self.zones or self.mutual_tx or self.mutual_rx
                    or self.sliders or self.wheels or self.proximity)

    @property
    def automatic(self) -> bool:
        """Whether automatic finding runs."""
        return (not self.configured) if self.auto is None else self.auto


def matches(name: str, patterns: Iterable[str]) -> bool:
    """Case-insensitive glob match on the full name or its leaf component.

    >>> matches("/panel/Touch1", ["TOUCH*"])
    True
    """
    full = name.upper()
    leaf = full.rsplit("/", 1)[-1]
    for pattern in patterns:
        pat = pattern.upper()
        if fnmatch.fnmatchcase(full, pat) or fnmatch.fnmatchcase(leaf, pat):
            return True
    return False


_STR_TUPLES = ("nets", "net_classes", "refs", "lib_ids", "zones", "exclude_nets",
               "mutual_tx", "mutual_rx", "proximity", "ground_nets", "noisy_nets",
               "noisy_prefixes")
_FLOATS = ("min_area_mm2", "cue_min_area_mm2", "proximity_diameter_mm",
           "neighbour_distance_mm", "gap_search_mm", "ground_ring_mm", "parts_radius_mm",
           "floating_radius_mm")
_GROUPS = ("sliders", "wheels")


def selection_from_mapping(mapping: Mapping[str, Any],
                           source: str | Callable[[str], str] = "<configuration>",
                           base: SensorSelection | None = None) -> SensorSelection:
    """Build a selection from a ``[tool.padaudit.sensors]`` style mapping.

    Keys are the field names of :class:`SensorSelection`; ``properties`` is a
    table ``{name = "glob"}``; ``sliders``/``wheels`` are tables of
    ``group = ["NET_GLOB", ...]`` (order = segment order). ``extra_noisy_nets``
    and ``extra_noisy_prefixes`` add to the defaults instead of replacing them.

    Raises
    ------
    ConfigError
        On an unknown key or a value of the wrong type, naming ``source``
        (a file name, or a function giving ``file:line`` of a key).

    Examples
    --------
    >>> selection_from_mapping({"nets": ["TOUCH*"], "controller_ref": "U1"}).nets
    ('TOUCH*',)
    """
    sel = base or SensorSelection()
    known = {f.name for f in fields(SensorSelection)} | {"extra_noisy_nets",
                                                          "extra_noisy_prefixes"}
    changes: dict[str, Any] = {}
    for key, value in mapping.items():
        where = source(key) if callable(source) else source
        if key not in known:
            valid = ", ".join(sorted(known))
            raise ConfigError(where, f"unknown sensors key {key!r}; valid keys: {valid}")
        changes[key] = _converted(key, value, where)
    for extra, target in (("extra_noisy_nets", "noisy_nets"),
                          ("extra_noisy_prefixes", "noisy_prefixes")):
        if extra in changes:
            current = changes.get(target, getattr(sel, target))
            changes[target] = tuple(current) + changes.pop(extra)
    return replace(sel, **changes)


def _converted(key: str, value: Any, source: str) -> Any:
    if key in _STR_TUPLES or key.startswith("extra_"):
        return _strings(key, value, source)
    if key in _FLOATS:
        if isinstance(value, bool) or not isinstance(value, int | float) or value < 0:
            raise ConfigError(source, f"sensors.{key} must be a non-negative number")
        return float(value)
    if key == "controller_min_pads":
        if isinstance(value, bool) or not isinstance(value, int) or value < 2:
            raise ConfigError(source, "sensors.controller_min_pads must be an integer >= 2")
        return value
    if key == "auto":
        if not isinstance(value, bool):
            raise ConfigError(source, "sensors.auto must be true or false")
        return value
    if key == "controller_ref":
        if not isinstance(value, str):
            raise ConfigError(source, "sensors.controller_ref must be a string")
        return value
    if key == "properties":
        if not isinstance(value, Mapping):
            raise ConfigError(source, "sensors.properties must be a table {name = \"glob\"}")
        return tuple(sorted((str(k), str(v)) for k, v in value.items()))
    if not isinstance(value, Mapping):  # sliders / wheels
        raise ConfigError(source, f"sensors.{key} must be a table {{group = [\"NET*\"]}}")
    return tuple((str(group), _strings(f"{key}.{group}", globs, source))
                 for group, globs in value.items())


def _strings(key: str, value: Any, source: str) -> tuple[str, ...]:
    if isinstance(value, str):
        return (value,)
    if isinstance(value, list | tuple) and all(isinstance(v, str) for v in value):
        return tuple(value)
    raise ConfigError(source, f"sensors.{key} must be a string or a list of strings")
