"""The words padaudit's options, configuration and records share, spelled once.

Each closed set is a ``Literal`` type for the type checker; the tuple of its
choices (for ``argparse``, configuration checks and error messages) is
derived from it, so the two cannot drift apart.

>>> POWER_PRESETS
('battery', 'usb', 'mains')
>>> SEVERITY_NAMES
('error', 'warning', 'info')
"""

from __future__ import annotations

from typing import Literal, get_args

#: How the device ground reaches earth (sets the ground-to-earth model).
PowerPreset = Literal["battery", "usb", "mains"]
#: Which side of the board faces the finger.
TouchSide = Literal["front", "back"]
#: Where a pad's copper sits in a described stack: on the touch side or the far side.
PadSide = Literal["touch", "far"]
#: What an electrode is for.
#: (``keyswitch``: one pad of an electro-capacitive key switch, a sensor that
#: no finger touches directly, so no touch rule judges it.)
SensorKind = Literal["button", "slider", "wheel", "proximity", "mutual-tx", "mutual-rx",
                     "keyswitch"]
#: Severity names, worst first (the order ``--fail-on`` lists them).
SeverityName = Literal["error", "warning", "info"]
#: How a part on the sense net enters Cp total (``auditor.model.results.LumpedPart``).
PartConnection = Literal["to-ground", "to-net", "series", "between-pins", "series-resistor",
                         "resistor", "not-read", "not-fitted", "other"]

POWER_PRESETS: tuple[PowerPreset, ...] = get_args(PowerPreset)
TOUCH_SIDES: tuple[TouchSide, ...] = get_args(TouchSide)
PAD_SIDES: tuple[PadSide, ...] = get_args(PadSide)
SENSOR_KINDS: tuple[SensorKind, ...] = get_args(SensorKind)
SEVERITY_NAMES: tuple[SeverityName, ...] = get_args(SeverityName)
PART_CONNECTIONS: tuple[PartConnection, ...] = get_args(PartConnection)
#: Self-capacitance kinds (the rest are the two sides of a mutual pair).
SELF_KINDS: tuple[SensorKind, ...] = ("button", "slider", "wheel", "proximity")
#: Kinds a finger touches; the touch rules judge these only.
TOUCH_KINDS: tuple[SensorKind, ...] = SELF_KINDS + ("mutual-tx", "mutual-rx")

#: A finding's identity that survives re-saves of the board: rule id, sensor,
#: nets, references (no uuids, no coordinates, no float noise).
FindingKey = tuple[str, str, tuple[str, ...], tuple[str, ...]]

__all__ = ["PAD_SIDES", "PART_CONNECTIONS", "POWER_PRESETS", "SELF_KINDS", "SENSOR_KINDS", "SEVERITY_NAMES",
           "TOUCH_KINDS", "TOUCH_SIDES", "FindingKey", "PadSide", "PartConnection", "PowerPreset", "SensorKind",
           "SeverityName", "TouchSide"]
