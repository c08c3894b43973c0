"""Rules about the sense path from the electrode to the controller pin."""

from __future__ import annotations

from collections.abc import Iterator

from auditor.model.vocabulary import TOUCH_KINDS
from auditor.rules.context import EPS_MM
from auditor.rules.finding import Finding, Severity
from auditor.rules.groups import in_one_group
from auditor.rules.microstrip import added_pf
from auditor.rules.registry import RuleCall, board_rule, sensor_rule
from auditor.rules.repeated import listed, one_for_all, one_per_trace
from auditor.rules.sense_path import (
    at_crossing,
    at_neighbour,
    at_series_part,
    is_noisy,
    is_sense,
    nets_of,
    off_board,
    sibling_net,
)
from auditor.sensors.cues import is_ground_name
from auditor.sensors.model import Sensor
from auditor.sensors.noisy import is_shield_net


@board_rule(
    "trace-unfollowed",
    title="Sense path could not be followed to a controller pin",
    fix="Check the net is routed completely (no unrouted ratsnest, no broken track) and that "
        "the controller is a footprint on the board; set `controller` in the configuration.",
    severity=Severity.WARNING,
)
def trace_unfollowed(call: RuleCall) -> Iterator[Finding]:
    """The trace rules (length, vias, neighbours, series resistor) judge the
    followed path only. When it stops short of a controller pin, those rules
    saw part of the trace, so the sensor must not be reported as clean.
    Electrodes whose net has no track or via at all are one cause (the
    board is not routed yet) and are reported together."""
    unrouted: list[Sensor] = []
    for sensor in call.board.sensors:
        path = sensor.path
        if sensor.kind not in TOUCH_KINDS or (path is not None and path.complete):
            continue
        if path is None:
            yield call.finding("no sense path was measured for this electrode", sensor)
        elif path.length_mm <= EPS_MM and path.vias == 0:
            unrouted.append(sensor)
        else:
            yield call.finding(
                f"the sense path stops after {path.length_mm:.1f} mm before reaching a "
                "controller pin", sensor, (("length_mm", path.length_mm),))
    if unrouted:
        yield one_for_all(call, unrouted, "the sense net has no track or via: it is not "
                          "routed", "electrode nets have no track or via (not routed)")


@sensor_rule(
    "trace-too-long",
    title="Sense trace too long",
    fix="Place the controller closer to the electrode or route the trace more directly.",
    severity=Severity.WARNING,
    thresholds=("trace_max_length_mm",),
)
def trace_too_long(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Every millimetre of trace adds baseline capacitance (about
    0.04-0.06 pF/mm over ground) and picks up noise, while adding no signal."""
    path = sensor.path
    if path is None:
        return
    limit_mm = call.limits["trace_max_length_mm"]
    if path.length_mm > limit_mm + EPS_MM:
        yield call.finding(
            f"sense trace is {path.length_mm:.1f} mm long, more than {limit_mm:.1f} mm",
            sensor, (("length_mm", path.length_mm), ("max_mm", limit_mm)),
            item=path.runs[0].place if path.runs else None)


@sensor_rule(
    "trace-too-wide",
    title="Sense trace wider than needed",
    fix="Route the sense trace as thin as the fabricator allows (0.1-0.2 mm).",
    severity=Severity.WARNING,
    thresholds=("trace_max_width_mm", "trace_wide_max_added_pf"),
)
def trace_too_wide(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """The trace's capacitance to ground grows with its width; a sense trace
    carries no current, so width buys nothing. What width costs is baseline
    capacitance, so the stretches wider than the limit are judged by the
    capacitance they add over the same stretches at the limit width (a
    microstrip over a solid plane at the nearest copper layer, Hammerstad &
    Jensen 1980, physics.md §1.8: an upper bound). A short wide stretch, a
    neck into a pad, adds a few thousandths of a pF and passes."""
    path = sensor.path
    if path is None or not path.runs:
        return
    limit_mm = call.limits["trace_max_width_mm"]
    widest = max(path.runs, key=lambda run: (run.width_mm, run.layer))
    if widest.width_mm <= limit_mm + EPS_MM:
        return
    wide = tuple(r for r in path.runs if r.width_mm > limit_mm + EPS_MM)
    added = added_pf(sensor, wide, limit_mm)
    max_added = call.limits["trace_wide_max_added_pf"]
    if added > max_added:
        wide_mm = sum(r.length_mm for r in wide)
        yield call.finding(
            f"{wide_mm:.1f} mm of the sense trace is wider than {limit_mm:.2f} mm (widest "
            f"{widest.width_mm:.2f} mm on {widest.layer}), adding about {added:.2f} pF to Cp, "
            f"more than {max_added:.2f} pF", sensor,
            (("width_mm", widest.width_mm), ("max_mm", limit_mm), ("wide_length_mm", wide_mm),
             ("added_pf", added), ("max_added_pf", max_added)),
            layer=widest.layer, item=widest.place)


@sensor_rule(
    "trace-too-many-vias",
    title="Too many vias on the sense trace",
    fix="Route the sense trace on one layer where possible; at most the profile's number of "
        "vias.",
    severity=Severity.WARNING,
    thresholds=("trace_max_vias",),
)
def trace_too_many_vias(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Each via passing ground planes adds about 0.3-0.5 pF (Johnson & Graham,
    High-Speed Digital Design, 1993, via capacitance formula) and a layer
    change exposes the trace to both layers' neighbours."""
    path = sensor.path
    if path is None:
        return
    limit = call.limits["trace_max_vias"]
    if path.vias > limit:
        yield call.finding(
            f"sense trace has {path.vias} vias, more than {limit:.0f}", sensor,
            (("vias", float(path.vias)), ("max", limit)))


@board_rule(
    "trace-parallel-run",
    title="Sense trace runs beside another net",
    fix="Separate the sense trace from the other net (2 mm or more, or a ground hatch between) "
        "and avoid running them side by side; two sense traces need a spacing of at least "
        "twice their width.",
    severity=Severity.WARNING,
    thresholds=("parallel_max_mm", "sense_spacing_widths"),
)
def trace_parallel_run(call: RuleCall) -> Iterator[Finding]:
    """Mutual capacitance between two parallel traces grows with the length
    they run together; a signal on the other net then couples straight into
    the measurement. Two sense lines (another electrode's trace, before or
    after its series resistor) are quiet neighbours: they only need a spacing
    of a few trace widths. A ground beside the trace (any ground net, a
    second or a connector's return too) carries no signal: it shields, and
    what it costs is baseline capacitance, which the Cp rules judge. The
    stretch that electrodes on one sense net share is one finding."""
    yield from one_per_trace(call, _parallel_runs)


def _parallel_runs(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    path = sensor.path
    if path is None:
        return
    limit_mm = call.limits["parallel_max_mm"]
    width_mm = max((r.width_mm for r in path.runs), default=0.0)
    sense_gap_mm = call.limits["sense_spacing_widths"] * width_mm
    for neighbour in sorted(path.neighbours, key=lambda n: n.net):
        if neighbour.min_distance_mm is None or is_shield_net(neighbour.net) \
                or is_ground_name(neighbour.net) or sibling_net(sensor, neighbour.net, call):
            continue  # crossings only, a shield, a ground, or a segment of its own slider
        if is_sense(neighbour, call) and neighbour.min_distance_mm >= sense_gap_mm - EPS_MM:
            continue
        if neighbour.parallel_mm > limit_mm + EPS_MM:
            yield call.finding(
                f"runs {neighbour.parallel_mm:.1f} mm beside net {neighbour.net}, more than "
                f"{limit_mm:.1f} mm", sensor,
                (("parallel_mm", neighbour.parallel_mm), ("max_mm", limit_mm)),
                nets=sensor.nets + (neighbour.net,), **at_neighbour(neighbour))


@board_rule(
    "trace-near-noisy-net",
    title="Sense trace close to a noisy net",
    fix="Keep switching, PWM and communication nets well away from the sense trace; cross "
        "them only at right angles on another layer.",
    severity=Severity.ERROR,
    thresholds=("noisy_net_min_mm",),
)
def trace_near_noisy_net(call: RuleCall) -> Iterator[Finding]:
    """Fast edges on a nearby net inject charge through even a small mutual
    capacitance; the controller integrates it as signal. Distances are taken
    on one layer (a net on another layer that the trace crosses is the
    crossings rule's business) and away from the controller's own pins,
    where the nets on neighbouring pins cannot be avoided. The stretch that
    electrodes on one sense net share is one finding."""
    yield from one_per_trace(call, _noisy_nets_near)


def _noisy_nets_near(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    path = sensor.path
    if path is None:
        return
    limit_mm = call.limits["noisy_net_min_mm"]
    for neighbour in sorted(path.neighbours, key=lambda n: n.net):
        if neighbour.min_distance_mm is None or not is_noisy(neighbour, call):
            continue
        if neighbour.min_distance_mm < limit_mm - EPS_MM:
            yield call.finding(
                f"noisy net {neighbour.net} comes within {neighbour.min_distance_mm:.2f} mm, "
                f"less than {limit_mm:.2f} mm", sensor,
                (("distance_mm", neighbour.min_distance_mm), ("min_mm", limit_mm)),
                nets=sensor.nets + (neighbour.net,), **at_neighbour(neighbour))


@board_rule(
    "trace-crossings",
    title="Sense trace crosses many other nets",
    fix="Reduce the crossings; where the sense trace must cross, do it at right angles.",
    severity=Severity.INFO,
    thresholds=("trace_max_crossings",),
)
def trace_crossings(call: RuleCall) -> Iterator[Finding]:
    """A crossing on an adjacent layer is a small capacitor to the other net;
    one or two at right angles are normal, many add up to coupling and Cp.
    Only nets that carry a signal of their own count: a ground or a driven
    shield crossed shields (what it costs is Cp, which the Cp rules judge),
    and another sense line is a quiet neighbour (as for trace-parallel-run);
    the rows and columns of a touch matrix cross each other by design. The
    stretch that electrodes on one sense net share is one finding."""
    yield from one_per_trace(call, _crossings)


def _crossings(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    path = sensor.path
    if path is None:
        return
    crossed = sorted((n for n in path.neighbours if n.crossings > 0
                      and not _quiet(n.net, neighbour_sense=is_sense(n, call), sensor=sensor,
                                     call=call)), key=lambda n: n.net)
    total = sum(n.crossings for n in crossed)
    limit = call.limits["trace_max_crossings"]
    if total > limit:
        most = max(crossed, key=lambda n: (n.crossings, n.net))
        yield call.finding(
            f"sense trace crosses other nets {total} times, more than {limit:.0f} (most "
            f"often {most.net}, {most.crossings} times)", sensor,
            (("crossings", float(total)), ("max", limit)),
            nets=sensor.nets + tuple(n.net for n in crossed), **at_crossing(most))


def _quiet(net: str, *, neighbour_sense: bool, sensor: Sensor, call: RuleCall) -> bool:
    """A net with no signal of its own to couple in: a ground, a driven
    shield, another sense line or a segment of the sensor's own slider."""
    return neighbour_sense or is_shield_net(net) or is_ground_name(net) \
        or sibling_net(sensor, net, call)


@sensor_rule(
    "trace-under-electrode",
    title="Sense trace passes under or beside another electrode",
    fix="Route the trace around other electrodes, not under or beside them.",
    severity=Severity.WARNING,
)
def trace_under_electrode(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """A sense trace under another electrode is itself touched through it: a
    finger on the other key shows up on this one too. One trace is one
    finding, naming every electrode it passes."""
    path = sensor.path
    if path is None:
        return
    by_name = {s.name: s for s in call.board.sensors}
    # a segment's trace beside its own slider's segments is by design
    others = [o for o in sorted(set(path.under_electrodes)) if o not in by_name or not (
        in_one_group(sensor, by_name[o]) or by_name[o].kind not in TOUCH_KINDS)]
    if not others:
        return
    named = (f"electrode {others[0]}" if len(others) == 1
             else f"{len(others)} electrodes: {listed(others)}")
    yield call.finding(f"sense trace passes under or beside {named}", sensor,
                       nets=sensor.nets + tuple(n for o in others for n in nets_of(o, call)),
                       item=dict(path.under_places).get(others[0]))


@board_rule(
    "series-resistor-missing",
    title="No series resistor on the sense line",
    fix="Add a series resistor (typically 470 Ω - 2.2 kΩ) close to the controller pin.",
    severity=Severity.WARNING,
)
def series_resistor_missing(call: RuleCall) -> Iterator[Finding]:
    """A series resistor at the controller pin limits ESD current into it and,
    with the pin's capacitance, filters radio-frequency noise picked up by the
    electrode and trace. When the path ends on a connector to an off-board
    controller, the resistor belongs on the controller's board. One cause, one
    finding: the electrodes wired straight to one controller are reported
    together (their nets and references all in the finding)."""
    by_controller: dict[str, list[Sensor]] = {}
    for sensor in call.board.sensors:
        path = sensor.path
        if sensor.kind in TOUCH_KINDS and path is not None and path.complete \
                and not path.series_ref and not off_board(path):
            by_controller.setdefault(path.controller_ref, []).append(sensor)
    for controller, sensors in sorted(by_controller.items()):
        where = controller or "the controller"
        yield one_for_all(call, sensors, f"the path reaches {where} without a series part",
                          f"electrodes reach {where} without a series part",
                          (controller,) if controller else ())


@sensor_rule(
    "series-resistor-far",
    title="Series resistor far from the controller pin",
    fix="Place the series resistor right next to the controller pin.",
    severity=Severity.WARNING,
    thresholds=("series_max_to_pin_mm",),
)
def series_resistor_far(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Trace between the resistor and the pin is unfiltered: noise and ESD
    picked up there reach the pin without the resistor's protection."""
    path = sensor.path
    if path is None or not path.series_ref or path.series_to_pin_mm is None \
            or off_board(path):
        return
    limit_mm = call.limits["series_max_to_pin_mm"]
    if path.series_to_pin_mm > limit_mm + EPS_MM:
        yield call.finding(
            f"{path.series_ref} is {path.series_to_pin_mm:.1f} mm of trace from the controller "
            f"pin, more than {limit_mm:.1f} mm", sensor,
            (("distance_mm", path.series_to_pin_mm), ("max_mm", limit_mm)),
            refs=sensor.refs + (path.series_ref,), **at_series_part(path))
