"""Rules about what surrounds an electrode: ground gap, copper under it,
floating copper, noisy parts and the size of the device ground."""

from __future__ import annotations

from collections.abc import Iterator

from auditor.model.vocabulary import TOUCH_KINDS
from auditor.rules.context import EPS_MM
from auditor.rules.finding import Finding, Severity
from auditor.rules.groups import in_one_group
from auditor.rules.registry import RuleCall, board_rule, sensor_rule
from auditor.rules.repeated import listed, one_for_all
from auditor.rules.sense_path import off_board
from auditor.sensors.model import Sensor
from auditor.sensors.noisy import is_shield_net


@sensor_rule(
    "ground-gap-tight",
    title="Ground too close around the electrode",
    fix="Widen the clearance between the electrode and the surrounding copper (about the "
        "overlay thickness, 0.5-2 mm).",
    severity=Severity.WARNING,
    thresholds=("ground_gap_min_mm", "segment_gap_min_mm"),
)
def ground_gap_tight(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Copper close around the pad's edge holds field lines that would
    otherwise reach the finger: the baseline Cp rises and the touch signal ΔC
    falls, so the relative change shrinks on both counts. Slider and wheel
    segments sit close to each other by design, so they have their own,
    smaller limit, and none at all against a segment of their own group."""
    surround = sensor.surroundings
    if surround is None:
        return
    segment = sensor.kind in ("slider", "wheel")
    checks = [(surround.min_gap_mm, "surrounding copper",
               call.limits["segment_gap_min_mm" if segment else "ground_gap_min_mm"])]
    if _nearest_is_sibling(sensor, call):  # interleaved segments: close by design
        checks = []
    if segment:  # the ground itself, measured apart from the neighbouring segments
        checks.append((surround.min_ground_gap_mm, f"ground {surround.ground_net}",
                       call.limits["ground_gap_min_mm"]))
    for gap_mm, what, limit_mm in checks:
        if gap_mm is not None and gap_mm < limit_mm - EPS_MM:
            yield call.finding(_gap_message(sensor, gap_mm, what, limit_mm), sensor,
                               (("gap_mm", gap_mm), ("min_mm", limit_mm)))
            return


def _gap_message(sensor: Sensor, gap_mm: float, what: str, limit_mm: float) -> str:
    """The gap in words. Gaps are measured on the electrode's own layer only,
    so no gap at all means other copper touches the electrode there: a
    short, not a tight clearance (often a back-side part whose pads were
    drawn on the front)."""
    if gap_mm <= EPS_MM:
        return (f"{what} touches or overlaps the electrode on {sensor.layer} (gap 0.00 mm, "
                f"limit {limit_mm:.2f} mm): two nets shorted, or a part's pads on the "
                "wrong layer")
    return f"gap to {what} is {gap_mm:.2f} mm, less than {limit_mm:.2f} mm"


def _nearest_is_sibling(sensor: Sensor, call: RuleCall) -> bool:
    """True when the closest copper around the segment is a segment of its
    own slider or wheel (so the measured gap is the interleaving)."""
    surround = sensor.surroundings
    if surround is None or surround.min_gap_mm is None or surround.nearest_sensor_mm is None:
        return False
    other = next((s for s in call.board.sensors if s.name == surround.nearest_sensor), None)
    return other is not None and in_one_group(sensor, other) \
        and surround.nearest_sensor_mm <= surround.min_gap_mm + EPS_MM


@sensor_rule(
    "ground-gap-wide",
    title="Ground too far from the electrode",
    fix="Bring the ground hatch closer (gap about the overlay thickness, at most about 2 mm) "
        "so every pad sees a similar, defined reference.",
    severity=Severity.INFO,
    thresholds=("ground_gap_max_mm",),
    kinds=("button", "slider", "wheel", "mutual-tx", "mutual-rx"),
)
def ground_gap_wide(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """A wide, uneven gap leaves the pad's baseline set by whatever happens to
    be nearby (other traces, the enclosure, water) instead of a defined ground,
    so it drifts and differs from pad to pad; no ground near the pad at all is
    the extreme case. Proximity electrodes want ground far away and are
    exempt."""
    surround = sensor.surroundings
    if surround is None:
        return
    gap_mm = (surround.typical_ground_gap_mm if surround.typical_ground_gap_mm is not None
              else surround.typical_gap_mm)
    limit_mm = call.limits["ground_gap_max_mm"]
    if gap_mm is None:
        yield call.finding("no ground copper was found close around the electrode", sensor,
                           (("max_mm", limit_mm),))
    elif gap_mm > limit_mm + EPS_MM:
        yield call.finding(
            f"typical gap to ground is {gap_mm:.2f} mm, more than {limit_mm:.2f} mm", sensor,
            (("gap_mm", gap_mm), ("max_mm", limit_mm)))


@sensor_rule(
    "copper-under-electrode",
    title="Solid or too-dense copper under the electrode",
    fix="Under the electrode use a ground hatch of at most the profile's fill ratio, or no "
        "copper at all on two-layer boards; keep other signals out from under it.",
    severity=Severity.WARNING,
    thresholds=("under_shadow_min_fraction", "under_fill_max_ratio"),
)
def copper_under_electrode(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Copper on another layer under the pad forms a parallel-plate capacitor
    with it through the board: with a 1.6 mm FR-4 board and a solid plane the
    baseline can exceed the controller's range and the relative change under a
    finger collapses. A hatch lowers that in proportion to its fill. A driven
    shield under the pad is at the pad's own potential and is exempt."""
    surround = sensor.surroundings
    if surround is None:
        return
    min_fraction = call.limits["under_shadow_min_fraction"]
    max_fill = call.limits["under_fill_max_ratio"]
    for shadow in sorted(surround.shadows, key=lambda s: s.layer):
        if shadow.fill == "none" or shadow.shadowed_fraction < min_fraction \
                or (shadow.nets and all(is_shield_net(n) for n in shadow.nets)):
            continue  # a driven shield under the pad is there to cut Cp, not add it
        if shadow.fill_ratio > max_fill + 1e-9:
            yield call.finding(
                f"{shadow.fill} copper on {shadow.layer} covers "
                f"{100 * shadow.shadowed_fraction:.0f} % of the electrode with "
                f"{100 * shadow.fill_ratio:.0f} % fill (limit {100 * max_fill:.0f} %)",
                sensor,
                (("shadowed_fraction", shadow.shadowed_fraction),
                 ("fill_ratio", shadow.fill_ratio), ("max_fill_ratio", max_fill)),
                nets=sensor.nets + shadow.nets, layer=shadow.layer)


@sensor_rule(
    "floating-copper-near",
    title="Floating copper near an electrode",
    fix="Tie the copper to ground (or to the shield) or remove it.",
    severity=Severity.WARNING,
    thresholds=("floating_copper_min_mm",),
)
def floating_copper_near(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Unconnected copper takes up a potential set by whatever couples to it;
    near a pad it couples the finger's field sideways and makes the baseline
    depend on the copper's surroundings, which shift with humidity and
    handling."""
    surround = sensor.surroundings
    if surround is None:
        return
    limit_mm = call.limits["floating_copper_min_mm"]
    for x_mm, y_mm, distance_mm in sorted(surround.floating_copper):
        if distance_mm < limit_mm - EPS_MM:
            yield call.finding(
                f"floating copper at ({x_mm:.2f}, {y_mm:.2f}) is {distance_mm:.2f} mm from "
                f"the electrode, less than {limit_mm:.2f} mm", sensor,
                (("distance_mm", distance_mm), ("min_mm", limit_mm)), x_mm=x_mm, y_mm=y_mm)


@board_rule(
    "noisy-part-near",
    title="Noisy part near an electrode",
    fix="Move LEDs, inductors, regulators and crystals (and their traces) away from the "
        "electrode, or switch them off while measuring.",
    severity=Severity.WARNING,
    thresholds=("noisy_part_min_mm",),
)
def noisy_part_near(call: RuleCall) -> Iterator[Finding]:
    """Switching parts inject charge into a nearby electrode through their
    stray capacitance; the injected charge shows up as noise, or as a false
    touch when an LED on the same key toggles. A part inside each key's
    outline (a backlight LED in a hole of every pad) is one design choice:
    one finding lists the keys."""
    limit_mm = call.limits["noisy_part_min_mm"]
    inside: list[tuple[Sensor, str]] = []
    for sensor in call.board.sensors:
        if sensor.surroundings is None or sensor.kind not in TOUCH_KINDS:
            continue
        for ref, distance_mm in sorted(sensor.surroundings.noisy_parts):
            if distance_mm <= EPS_MM:
                inside.append((sensor, ref))
            elif distance_mm < limit_mm - EPS_MM:
                yield call.finding(
                    f"{ref} is {distance_mm:.2f} mm from the electrode, less than "
                    f"{limit_mm:.2f} mm", sensor,
                    (("distance_mm", distance_mm), ("min_mm", limit_mm)),
                    refs=sensor.refs + (ref,))
    if inside:
        sensors = list({s.name: s for s, _ in inside}.values())
        yield one_for_all(
            call, sensors,
            f"{inside[0][1]} is 0.00 mm from the electrode, less than {limit_mm:.2f} mm",
            f"electrodes hold a noisy part inside their outline "
            f"({listed(sorted({r for _, r in inside}))})", extra_refs=[r for _, r in inside],
            measured=(("distance_mm", 0.0), ("min_mm", limit_mm)))


@sensor_rule(
    "ground-ratio-small",
    title="Device ground small next to the electrode",
    fix="Enlarge the ground copper of the device (pour ground on free areas of both layers) "
        "or, for a battery device, expect less signal than with a grounded product.",
    severity=Severity.WARNING,
    thresholds=("ground_to_pad_min_ratio",),
)
def ground_ratio_small(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """The finger's signal returns to the circuit through the device ground's
    coupling to the user and to earth. A battery device whose ground copper is
    not much larger than its electrodes couples weakly, so part of the signal
    is lost (physics.md §3, floating reduction). Mains products are tied to
    earth through the supply and are exempt, and so are electrodes wired to a
    connector: the device ground is then mostly on the controller's board."""
    surround = sensor.surroundings
    if surround is None or not surround.ground_net or sensor.area_mm2 <= 0:
        return
    if sensor.path is not None and off_board(sensor.path):
        return
    if call.board.settings.power == "mains":
        return
    ratio = surround.ground_area_mm2 / sensor.area_mm2
    limit = call.limits["ground_to_pad_min_ratio"]
    if ratio < limit:
        yield call.finding(
            f"ground {surround.ground_net} has {surround.ground_area_mm2:.0f} mm² of copper, "
            f"{ratio:.1f} times the electrode (want at least {limit:.1f})", sensor,
            (("ground_to_pad_ratio", ratio), ("min_ratio", limit)),
            nets=sensor.nets + (surround.ground_net,))
