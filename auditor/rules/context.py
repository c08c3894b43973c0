"""What a rule sees: the sensors, the run's settings, its own thresholds and
(when the field step ran) each pad's metrics.

Rules import nothing from later stages. The field metrics are described here
by the attributes rules read (:class:`PadMetricsLike`), so any record with
those attributes (``auditor.model.results.PadMetrics``) fits.
"""

from __future__ import annotations

import fnmatch
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Protocol

from auditor.model.items import ReadWarning
from auditor.model.vocabulary import TOUCH_KINDS, PowerPreset, TouchSide
from auditor.sensors.model import Sensor

ThresholdValue = float | int | bool


#: Slack on millimetre comparisons: measured gaps and lengths come from
#: polygonised arcs (a 2 mm clearance measures 2.001-2.004 mm), so a few µm,
#: far below any fabricator's tolerance, count as equal.
EPS_MM = 0.005


class PadMetricsLike(Protocol):
    """The field-solve results a rule may read, in pF (ratio unitless)."""

    @property
    def cp_pad_pf(self) -> float: ...

    @property
    def cp_total_pf(self) -> float: ...

    @property
    def delta_c_pf(self) -> float: ...

    @property
    def delta_ratio(self) -> float: ...


@dataclass(frozen=True)
class RuleSettings:
    """Facts about the product, from configuration, that rules take into account.

    ``overlay_thickness_mm`` is the physical thickness between finger and
    copper (cover plus air gap); ``overlay_electrical_mm`` is Σ tᵢ/εᵣᵢ, the
    parallel-plate equivalent thickness (physics.md §2, last paragraph).
    """

    overlay_thickness_mm: float = 2.0
    overlay_electrical_mm: float = 2.0 / 3.0
    touch_side: TouchSide = "front"
    power: PowerPreset = "battery"
    noisy_nets: tuple[str, ...] = ()
    controller_ref: str = ""
    sense_nets: tuple[str, ...] = ()  # every electrode's nets, both sides of series parts
    #: Configuration names electrodes (nets, refs, classes ...): finding none is an error.
    electrodes_configured: bool = False

    @property
    def bare(self) -> bool:
        """True when the finger touches the board itself (no cover, no air gap)."""
        return self.overlay_thickness_mm <= EPS_MM

    def is_noisy_net(self, net: str) -> bool:
        """True when ``net`` matches one of the configured noisy-net globs."""
        return any(fnmatch.fnmatchcase(net, pattern) for pattern in self.noisy_nets)


class UndeclaredThreshold(KeyError):
    """A rule read a threshold it did not declare in its registration."""


@dataclass(frozen=True)
class Limits:
    """The thresholds one rule may read; reading any other one is a bug."""

    values: Mapping[str, ThresholdValue]
    rule_id: str = ""

    def __getitem__(self, name: str) -> float:
        value = self._get(name)
        return float(value)

    def flag(self, name: str) -> bool:
        """A yes/no threshold such as ``electrode_must_be_covered``."""
        return bool(self._get(name))

    def _get(self, name: str) -> ThresholdValue:
        try:
            return self.values[name]
        except KeyError:
            raise UndeclaredThreshold(
                f"rule {self.rule_id!r} read threshold {name!r}, which it does not "
                "declare or the profile does not set") from None


@dataclass(frozen=True)
class RuleContext:
    """Everything the rules judge, for one board.

    ``metrics`` maps sensor names to field results; it is empty until the
    field step has run, and rules that need metrics then yield nothing.
    """

    sensors: tuple[Sensor, ...]
    settings: RuleSettings = field(default_factory=RuleSettings)
    copper_layers: tuple[str, ...] = ("F.Cu", "B.Cu")
    read_warnings: tuple[ReadWarning, ...] = ()
    metrics: Mapping[str, PadMetricsLike] = field(default_factory=dict)
    thresholds: Mapping[str, ThresholdValue] = field(default_factory=dict)
    #: Precise-mode results (``auditor.model.results.PreciseExtras``)
    #: or None; read by :mod:`auditor.rules.precise_rules` through protocols.
    precise: object | None = None
    #: Electrodes the field step ran for but could not solve, with the reason.
    unsolved: Mapping[str, str] = field(default_factory=dict)

    @property
    def touch_sensors(self) -> tuple[Sensor, ...]:
        """The finger-touch electrodes: every sensor but capacitive key
        switches and any other kind no touch rule applies to."""
        return tuple(s for s in self.sensors if s.kind in TOUCH_KINDS)

    def limits_for(self, rule_id: str, names: tuple[str, ...]) -> Limits:
        """The declared thresholds of one rule (missing ones left out)."""
        picked = {n: self.thresholds[n] for n in names if n in self.thresholds}
        return Limits(picked, rule_id)

    @property
    def touch_layer(self) -> str:
        """The copper layer nearest the touch surface."""
        if not self.copper_layers:
            return "F.Cu" if self.settings.touch_side == "front" else "B.Cu"
        return self.copper_layers[0 if self.settings.touch_side == "front" else -1]
