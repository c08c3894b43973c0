"""Hand-built sensor records for rule tests (invented values)."""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from shapely.geometry import Point

from auditor.config.profiles import load_profile
from auditor.rules.context import RuleContext, RuleSettings
from auditor.rules.registry import RuleSpec, all_rules
from auditor.sensors.model import LayerShadow, SensePath, Sensor, Surroundings, TraceRun


def path(**changes: Any) -> SensePath:
    """A clean 30 mm, 0.15 mm wide F.Cu path through R1 to U1 pin 3."""
    base = SensePath(length_mm=30.0, runs=(TraceRun("F.Cu", 0.15, 30.0),), vias=0,
                     layers=("F.Cu",), controller_ref="U1", controller_pin="3",
                     series_ref="R1", series_to_pin_mm=3.0)
    return replace(base, **changes)


def surroundings(**changes: Any) -> Surroundings:
    """Clean surroundings: 1 mm gap, 31 % hatch under, plenty of ground."""
    base = Surroundings(
        ground_net="GND", min_gap_mm=1.0, typical_gap_mm=1.0, ground_fill_ratio=0.3,
        shadows=(LayerShadow("B.Cu", 1.5, 1.0, 0.31, "hatched", ("GND",)),),
        nearest_sensor="", nearest_sensor_mm=None, ground_area_mm2=1400.0)
    return replace(base, **changes)


def sensor(name: str = "TOUCH1", diameter_mm: float = 10.0, **changes: Any) -> Sensor:
    """A round button on F.Cu at (12, 12) with a clean path and surroundings."""
    disk = Point(12.0, 12.0).buffer(diameter_mm / 2, quad_segs=64)
    base = Sensor(name=name, kind="button", nets=(name,), refs=("E" + name[-1],),
                  layer="F.Cu", area_mm2=float(disk.area), x_mm=12.0, y_mm=12.0,
                  reason="test", geometry=disk, path=path(), surroundings=surroundings())
    return replace(base, **changes)


def context(*sensors: Sensor, profile: str = "default", **changes: Any) -> RuleContext:
    """A rule context with the profile's thresholds and 2 mm acrylic (er 2.8)."""
    settings = RuleSettings(overlay_thickness_mm=2.0, overlay_electrical_mm=2.0 / 2.8)
    base = RuleContext(sensors=tuple(sensors), settings=settings,
                       thresholds=dict(load_profile(profile).thresholds))
    return replace(base, **changes)


def get_rule(rule_id: str) -> RuleSpec:
    """One registered rule by id."""
    (spec,) = [spec for spec in all_rules() if spec.rule_id == rule_id]
    return spec
