"""The configuration records: what the user told padaudit about the product."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

from auditor.model.vocabulary import PowerPreset, TouchSide
from auditor.rules.context import ThresholdValue
from auditor.rules.finding import Finding, Severity
from auditor.sensors.selection import SensorSelection, matches


@dataclass(frozen=True)
class Overlay:
    """The cover between finger and copper: one layer of one material.

    ``material`` is a name from :mod:`auditor.field.materials`, or ``""``
    when the user gave ``epsilon_r`` directly.
    """

    thickness_mm: float = 2.0
    epsilon_r: float = 2.8
    material: str = "acrylic"

    def describe(self) -> str:
        """E.g. ``2.0 mm acrylic (er 2.8)``, or ``none`` for no cover."""
        if self.thickness_mm == 0.0:
            return "none"
        name = f"{self.material} " if self.material else ""
        return f"{self.thickness_mm:g} mm {name}(er {self.epsilon_r:g})"


@dataclass(frozen=True)
class Waiver:
    """An accepted finding: a rule at a reference, net or sensor, with why."""

    rule_id: str
    reason: str
    ref: str = ""
    net: str = ""
    sensor: str = ""
    source: str = ""  # "file:line" where the waiver was written

    def matches(self, finding: Finding) -> bool:
        """True when this waiver covers ``finding`` (globs, case-insensitive)."""
        if finding.rule_id != self.rule_id:
            return False
        if self.ref and not any(matches(r, [self.ref]) for r in finding.refs):
            return False
        if self.net and not any(matches(n, [self.net]) for n in finding.nets):
            return False
        return not (self.sensor and not matches(finding.sensor, [self.sensor]))

    def describe(self) -> str:
        """One line naming the waiver, for the stale-waiver list."""
        where = ", ".join(f"{k} {v}" for k, v in (("ref", self.ref), ("net", self.net),
                                                  ("sensor", self.sensor)) if v)
        origin = f" ({self.source})" if self.source else ""
        return f"{self.rule_id} at {where}: {self.reason}{origin}"


@dataclass(frozen=True)
class Config:
    """Everything configurable, after file and command line are merged.

    ``source`` is the file it came from (``""`` for built-in defaults);
    ``base_dir`` is where relative paths in it (a profile file) are resolved.
    """

    source: str = ""
    base_dir: Path | None = None
    profile: str = "default"
    overlay: Overlay = field(default_factory=Overlay)
    air_gap_mm: float = 0.0
    touch_side: TouchSide = "front"
    power: PowerPreset = "battery"
    selection: SensorSelection = field(default_factory=SensorSelection)
    selection_keys: tuple[str, ...] = ()  # keys the user set under [sensors]
    controller: str = ""
    noisy_nets: tuple[str, ...] = ()
    severity: Mapping[str, str] = field(default_factory=dict)  # rule id -> level / off
    waivers: tuple[Waiver, ...] = ()
    fail_on: Severity = Severity.ERROR
    thresholds: Mapping[str, ThresholdValue] = field(default_factory=dict)
    #: Baseline file whose findings are accepted (``baseline = "path"``,
    #: resolved against the configuration file's folder); ``""`` for none.
    baseline: str = ""

    @property
    def overlay_thickness_mm(self) -> float:
        """Physical distance from the touch surface to the copper."""
        return self.overlay.thickness_mm + self.air_gap_mm

    @property
    def overlay_electrical_mm(self) -> float:
        """Σ tᵢ/εᵣᵢ over cover and air gap (physics.md §2, parallel-plate view)."""
        return self.overlay.thickness_mm / self.overlay.epsilon_r + self.air_gap_mm

    def describe_overlay(self) -> str:
        """The overlay as the report header shows it."""
        text = self.overlay.describe()
        return text + (f" + {self.air_gap_mm:g} mm air" if self.air_gap_mm else "")
