"""Rules about slider and wheel segments taken together."""

from __future__ import annotations

from collections.abc import Iterator

from auditor.rules.context import EPS_MM
from auditor.rules.finding import Finding, Severity
from auditor.rules.registry import RuleCall, board_rule
from auditor.sensors.model import Sensor


def segment_groups(sensors: tuple[Sensor, ...]) -> dict[str, tuple[Sensor, ...]]:
    """Slider and wheel segments by group name, each group in segment order."""
    groups: dict[str, list[Sensor]] = {}
    for sensor in sensors:
        if sensor.kind in ("slider", "wheel") and sensor.group:
            groups.setdefault(sensor.group, []).append(sensor)
    return {name: tuple(sorted(members, key=lambda s: (s.index, s.name)))
            for name, members in sorted(groups.items()) if len(members) >= 2}


def in_one_group(a: Sensor, b: Sensor) -> bool:
    """True when ``a`` and ``b`` are segments of one slider or wheel: their
    closeness, interleaving and coupling are by design. (Reads the sensor
    record's ``group``; the one place to change if grouping moves.)"""
    return bool(a.group) and a.group == b.group and a.name != b.name


#: Share of a segment's copper inside a sibling's convex hull above which
#: the two are interleaved (teeth or chevrons; value chosen by padaudit).
INTERLEAVED_SHARE = 0.05


def interleaved(members: tuple[Sensor, ...]) -> bool:
    """True when neighbouring segments reach into each other's outline
    (interleaved teeth or chevrons), as opposed to plain side-by-side pads."""
    for a, b in zip(members, members[1:], strict=False):
        if a.layer != b.layer or a.geometry.intersection(b.geometry).area > 1e-6:
            continue  # not two separate pieces of copper side by side
        for one, other in ((a, b), (b, a)):
            reach = float(one.geometry.convex_hull.intersection(other.geometry).area)
            if other.area_mm2 > 0 and reach > INTERLEAVED_SHARE * other.area_mm2:
                return True
    return False


def _area_by_net(members: tuple[Sensor, ...]) -> dict[str, float]:
    """Copper area per segment net. Two end pads on one net (split ends) are
    one channel drawn either as two halves or as two whole segments; each
    such net counts as whichever reading (sum or one piece) lies nearer to
    the single-piece segments' median, so both designs compare fairly."""
    pieces: dict[str, list[float]] = {}
    for s in members:
        pieces.setdefault(s.nets[0] if s.nets else s.name, []).append(s.area_mm2)
    singles = sorted(a[0] for a in pieces.values() if len(a) == 1)
    median = singles[len(singles) // 2] if singles else None
    areas: dict[str, float] = {}
    for net, found in pieces.items():
        readings = (sum(found), sum(found) / len(found))
        areas[net] = (readings[0] if median is None
                      else min(readings, key=lambda a: abs(a - median)))
    return areas


def _nets(members: tuple[Sensor, ...]) -> tuple[str, ...]:
    return tuple(n for s in members for n in s.nets)


def _refs(members: tuple[Sensor, ...]) -> tuple[str, ...]:
    return tuple(r for s in members for r in s.refs)


@board_rule(
    "segments-unequal-area",
    title="Slider or wheel segments differ in area",
    fix="Draw every segment with the same copper area (end segments included).",
    severity=Severity.WARNING,
    thresholds=("segment_area_max_spread",),
)
def segments_unequal_area(call: RuleCall) -> Iterator[Finding]:
    """The position of a finger on a slider is interpolated from the segments'
    signals; segments of unequal area give unequal signals for the same
    overlap, which bends the position curve. Interleaved segments (teeth,
    chevrons) share the finger by their interleaving, and their areas differ
    by design (the middle segment of three is cut on both sides), so they
    are exempt; pieces of one segment on one net (split ends) count as one."""
    limit = call.limits["segment_area_max_spread"]
    for group, members in segment_groups(call.board.sensors).items():
        if interleaved(members):
            continue
        areas = list(_area_by_net(members).values())
        mean = sum(areas) / len(areas)
        spread = (max(areas) - min(areas)) / mean if mean > 0 else 0.0
        if spread > limit + 1e-9:
            smallest = min(members, key=lambda s: (s.area_mm2, s.name))
            yield call.finding(
                f"segments of {group} range from {min(areas):.1f} to {max(areas):.1f} mm² "
                f"({100 * spread:.0f} % of the mean, limit {100 * limit:.0f} %)", smallest,
                (("spread", spread), ("max_spread", limit)), nets=_nets(members), refs=_refs(members))


@board_rule(
    "segments-unequal-trace",
    title="Slider or wheel segment traces differ in length",
    fix="Route the segment traces with similar lengths (and similar surroundings).",
    severity=Severity.WARNING,
    thresholds=("segment_trace_max_spread_mm",),
)
def segments_unequal_trace(call: RuleCall) -> Iterator[Finding]:
    """Each segment's trace adds to its baseline (about 0.04-0.06 pF/mm over
    ground); very different lengths give segments different baselines and
    different relative sensitivity. When the field solve ran, the message
    gives the segments' Cp, the difference the lengths make."""
    limit_mm = call.limits["segment_trace_max_spread_mm"]
    for group, members in segment_groups(call.board.sensors).items():
        routed = [s for s in members if s.path is not None]
        if len(routed) < 2:
            continue
        lengths = [s.path.length_mm for s in routed if s.path is not None]
        spread_mm = max(lengths) - min(lengths)
        if spread_mm > limit_mm + EPS_MM:
            longest = max(routed, key=lambda s: (s.path.length_mm if s.path else 0.0, s.name))
            cps = [m.cp_total_pf for s in routed if (m := call.board.metrics.get(s.name))]
            solved = (f"; solved Cp {min(cps):.1f} to {max(cps):.1f} pF"
                      if len(cps) == len(routed) else "")
            yield call.finding(
                f"segment traces of {group} range from {min(lengths):.1f} to "
                f"{max(lengths):.1f} mm (spread {spread_mm:.1f} mm, limit {limit_mm:.1f} mm"
                f"{solved})",
                longest, (("spread_mm", spread_mm), ("max_mm", limit_mm)),
                nets=_nets(members), refs=_refs(members))
