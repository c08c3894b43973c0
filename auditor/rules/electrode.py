"""Rules about the electrode itself: size, side, cover, spacing, nets."""

from __future__ import annotations

import math
from collections.abc import Iterator

from auditor.model.vocabulary import TOUCH_KINDS
from auditor.rules.context import EPS_MM
from auditor.rules.finding import Finding, Severity
from auditor.rules.groups import in_one_group
from auditor.rules.registry import RuleCall, board_rule, sensor_rule
from auditor.rules.repeated import one_for_all
from auditor.sensors.model import Sensor


@sensor_rule(
    "electrode-too-small",
    title="Button electrode too small for its overlay",
    fix="Grow the pad (about 10 mm across under 1-3 mm of plastic), or use a thinner or "
        "higher-permittivity cover.",
    severity=Severity.WARNING,
    thresholds=("pad_min_diameter_mm", "pad_diameter_per_electrical_mm"),
    kinds=("button",),
)
def electrode_too_small(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """The finger's added capacitance grows with the part of the pad it covers
    and falls with the cover's electrical thickness (t/εr). A small pad under
    a thick cover gives a signal too small to separate from noise, so the
    smallest sensible pad grows with the overlay's electrical thickness, and
    there is a floor below which a fingertip signal is small at any cover."""
    electrical_mm = call.board.settings.overlay_electrical_mm
    need_mm = max(call.limits["pad_min_diameter_mm"],
                  call.limits["pad_diameter_per_electrical_mm"] * electrical_mm)
    have_mm = sensor.equivalent_diameter_mm
    if have_mm < need_mm:
        yield call.finding(
            f"equivalent diameter {have_mm:.1f} mm is below {need_mm:.1f} mm for an "
            f"overlay of {electrical_mm:.2f} mm electrical thickness{_strip_note(sensor)}",
            sensor, (("diameter_mm", have_mm), ("min_mm", need_mm)))


#: Fingertip contact modelled as a 10 mm disk (physics.md §3: 8-10 mm disk
#: model, contact patch 9-11 mm).
FINGERTIP_MM = 10.0


def _strip_note(sensor: Sensor) -> str:
    """For a long narrow pad, what a fingertip covers of it: its length does
    not help, a finger on it covers its width times one fingertip."""
    box = sensor.geometry.minimum_rotated_rectangle
    corners = list(box.exterior.coords) if box.geom_type == "Polygon" else []
    if len(corners) < 4:
        return ""
    sides = sorted(math.dist(corners[i], corners[i + 1]) for i in range(2))
    width_mm, length_mm = sides
    if width_mm <= 0.0 or length_mm < 3.0 * width_mm:
        return ""
    covered = width_mm * min(length_mm, FINGERTIP_MM)
    return (f" (a {width_mm:.1f} x {length_mm:.1f} mm strip: a {FINGERTIP_MM:.0f} mm "
            f"fingertip covers at most {covered:.0f} mm² of it)")


@sensor_rule(
    "electrode-too-large",
    title="Button electrode larger than a fingertip needs",
    fix="Shrink the pad towards 10-15 mm, or hatch it; a larger pad adds baseline "
        "capacitance and noise pick-up faster than signal.",
    severity=Severity.INFO,
    thresholds=("pad_max_diameter_mm",),
    kinds=("button",),
)
def electrode_too_large(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Once the pad is wider than the finger's contact, more copper adds
    baseline capacitance (and pick-up of noise and water) but hardly any touch
    signal, so the relative change under a finger falls."""
    limit_mm = call.limits["pad_max_diameter_mm"]
    have_mm = sensor.equivalent_diameter_mm
    if have_mm > limit_mm:
        yield call.finding(
            f"equivalent diameter {have_mm:.1f} mm exceeds {limit_mm:.1f} mm",
            sensor, (("diameter_mm", have_mm), ("max_mm", limit_mm)))


@sensor_rule(
    "electrode-far-side",
    title="Electrode on the layer away from the touch surface",
    fix="Move the electrode to the copper layer that faces the cover, or set touch_side "
        "if the board is mounted the other way round.",
    severity=Severity.WARNING,
)
def electrode_far_side(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """An electrode on the far layer senses through the board's own dielectric
    as well as the cover, and any copper on the near layer screens it from the
    finger. A pad drawn on both faces is judged by its near-side copy."""
    near = call.board.touch_layer
    if sensor.layer != near and not any(
            o.layer == near and set(o.nets) == set(sensor.nets) and _overlap(o, sensor)
            for o in call.board.sensors):
        bare = (f"; its copper is bare (solder mask opened on {sensor.layer}): if it is "
                f"touched from that side, set touch_side") if sensor.exposed else ""
        yield call.finding(
            f"electrode is on {sensor.layer}; the touch surface is on the "
            f"{call.board.settings.touch_side} ({near}){bare}", sensor)


@board_rule(
    "electrode-mask-open",
    title="Bare electrode copper under the finger",
    fix="Keep the electrode under solder mask (remove the pad's mask opening or the "
        "mask-layer graphic), or put a cover over the board and set its overlay.",
    severity=Severity.WARNING,
    thresholds=("electrode_must_be_covered",),
)
def electrode_mask_open(call: RuleCall) -> Iterator[Finding]:
    """With no cover over the board the finger touches the electrode itself:
    a solder-mask opening makes that a direct contact, so the reading jumps
    with skin moisture and every touch is an ESD strike straight into the
    controller pin. The mask is the only insulation there. Every electrode
    drawn alike is one finding."""
    if call.board.settings.bare:
        yield from _mask_opened(
            call, "electrode copper is exposed through a solder-mask opening and the finger "
                  "touches the board directly (no overlay)",
            "electrodes have copper exposed through a solder-mask opening and the finger "
            "touches the board directly (no overlay)")


@board_rule(
    "electrode-mask-open-covered",
    title="Solder mask opened over an electrode under a cover",
    fix="Keep the electrode under solder mask unless the opening is meant (a spring contact "
        "or a glued-on electrode).",
    severity=Severity.INFO,
    thresholds=("electrode_must_be_covered",),
)
def electrode_mask_open_covered(call: RuleCall) -> Iterator[Finding]:
    """Under a cover the finger never reaches the copper, so an opening only
    matters a little: bare copper corrodes, and the mask's missing thickness
    leaves an air gap that changes the baseline from pad to pad. Openings
    are also drawn on purpose (a landing pad for a spring contact). Every
    electrode drawn alike is one finding."""
    if not call.board.settings.bare:
        yield from _mask_opened(
            call, "electrode copper is exposed through a solder-mask opening (under the cover)",
            "electrodes have copper exposed through a solder-mask opening (under the cover)")


def _mask_opened(call: RuleCall, single: str, many: str) -> Iterator[Finding]:
    """One finding for the touch electrodes drawn with their mask opened."""
    exposed = [s for s in call.board.sensors if s.kind in TOUCH_KINDS and s.exposed]
    if call.limits.flag("electrode_must_be_covered") and exposed:
        yield one_for_all(call, exposed, single, many)


@board_rule(
    "electrode-paste",
    title="Solder paste on an electrode",
    fix="Remove the paste layer from the electrode pad so no solder is printed on it.",
    severity=Severity.WARNING,
    thresholds=("electrode_must_be_covered",),
)
def electrode_paste(call: RuleCall) -> Iterator[Finding]:
    """Paste printed on a large pad leaves an uneven solder hump that holds
    the cover off the pad (an air gap of varying height, so varying
    sensitivity) and is a sign the pad was drawn as a component pad. Pads
    drawn alike (one footprint for every key) are one cause: one finding."""
    pasted = [s for s in call.board.sensors if s.kind in TOUCH_KINDS and s.pasted]
    if call.limits.flag("electrode_must_be_covered") and pasted:
        yield one_for_all(call, pasted, "electrode has solder paste",
                          "electrodes have solder paste")


@board_rule(
    "electrodes-too-close",
    title="Two electrodes too close to each other",
    fix="Space the electrodes further apart (and by at least the overlay thickness) with "
        "ground hatch between them.",
    severity=Severity.WARNING,
    thresholds=("electrode_min_spacing_mm",),
)
def electrodes_too_close(call: RuleCall) -> Iterator[Finding]:
    """Electrodes closer than a finger's width are touched together and couple
    to each other; the spread of the field through the cover grows with its
    thickness, so spacing must be at least the overlay thickness as well.
    Segments of one slider or wheel are meant to be close and are exempt. Two
    sliders (or wheels) laid side by side are one cause: one finding for the
    pair, listing the segments that are too close."""
    limit_mm = max(call.limits["electrode_min_spacing_mm"],
                   call.board.settings.overlay_thickness_mm)
    pairs: dict[tuple[str, str], list[tuple[Sensor, Sensor | None]]] = {}
    for sensor in call.board.sensors:
        if _too_close(sensor, call, limit_mm):
            other = _nearest(sensor, call)
            key = (sensor.group or sensor.name,
                   other.group or other.name if other else _nearest_name(sensor))
            pairs.setdefault(key, []).append((sensor, other))
    for (_, other_group), found in sorted(pairs.items()):
        spacings = [_nearest_mm(s) for s, _ in found]
        others = [o for _, o in found if o is not None]
        yield one_for_all(
            call, [s for s, _ in found],
            f"{min(spacings):.2f} mm from {_nearest_name(found[0][0])}, less than "
            f"{limit_mm:.2f} mm",
            f"electrodes are {_span(spacings)} mm from {other_group}'s segments, less than "
            f"{limit_mm:.2f} mm",
            extra_refs=[r for o in others for r in o.refs],
            extra_nets=[n for o in others for n in o.nets],
            measured=(("spacing_mm", min(spacings)), ("min_mm", limit_mm)))


def _nearest_name(sensor: Sensor) -> str:
    return sensor.surroundings.nearest_sensor if sensor.surroundings else ""


def _nearest_mm(sensor: Sensor) -> float:
    surround = sensor.surroundings
    return surround.nearest_sensor_mm or 0.0 if surround else 0.0


def _nearest(sensor: Sensor, call: RuleCall) -> Sensor | None:
    return next((s for s in call.board.sensors if s.name == _nearest_name(sensor)), None)


def _span(values: list[float]) -> str:
    low, high = f"{min(values):.2f}", f"{max(values):.2f}"
    return low if low == high else f"{low}-{high}"


def _too_close(sensor: Sensor, call: RuleCall, limit_mm: float) -> bool:
    """True when the electrode nearest to ``sensor`` is nearer than
    ``limit_mm``, counts, and has not reported this pair itself."""
    surround = sensor.surroundings
    if sensor.kind not in TOUCH_KINDS or surround is None \
            or surround.nearest_sensor_mm is None:
        return False
    other = _nearest(sensor, call)
    if other is not None and (in_one_group(sensor, other) or other.kind not in TOUCH_KINDS):
        return False
    return surround.nearest_sensor_mm < limit_mm - EPS_MM and not _reported_by(other, sensor)


@board_rule(
    "electrodes-share-net",
    title="Two electrodes joined on one net",
    fix="Give each electrode its own net and controller pin; if they are meant to act as "
        "one key, draw them as one electrode.",
    severity=Severity.ERROR,
)
def electrodes_share_net(call: RuleCall) -> Iterator[Finding]:
    """Two electrodes on one net are one sensor to the controller: a touch on
    either reads the same and the pair has the baseline of both. It is usually
    a copy-paste or a net-label mistake. Mutual-capacitance transmit and
    receive lines are shared on purpose (each key of a matrix is one transmit
    column crossing one receive row) and are exempt, as are pieces of one
    slider or wheel (split end segments) and one pad drawn on both faces."""
    by_net: dict[str, list[Sensor]] = {}
    for sensor in call.board.touch_sensors:
        if sensor.kind in ("mutual-tx", "mutual-rx"):
            continue
        for net in sensor.nets:
            if net:
                by_net.setdefault(net, []).append(sensor)
    for net in sorted(by_net):
        joined = sorted(by_net[net], key=lambda s: s.name)
        if len(joined) < 2 or _one_electrode(joined):
            continue
        names = ", ".join(s.name for s in joined)
        yield call.finding(
            f"electrodes {names} are all on net {net}", joined[0],
            (("electrodes", float(len(joined))),), nets=(net,),
            refs=tuple(r for s in joined for r in s.refs))


def _one_electrode(joined: list[Sensor]) -> bool:
    """True when the sensors on one net are by design one electrode: all
    segments of one slider or wheel, or copies of one pad on both faces
    (each overlapping the first in plan)."""
    first = joined[0]
    if all(in_one_group(first, s) for s in joined[1:]):
        return True
    return all(s.layer != first.layer and _overlap(first, s) for s in joined[1:])


def _overlap(a: Sensor, b: Sensor) -> bool:
    """True when ``a`` and ``b`` cover mostly the same place (in plan)."""
    smaller = min(a.area_mm2, b.area_mm2)
    return smaller > 0 and float(a.geometry.intersection(b.geometry).area) > 0.5 * smaller


def _reported_by(other: Sensor | None, sensor: Sensor) -> bool:
    """True when ``other`` reports the same pair (so one finding per pair)."""
    if other is None or other.surroundings is None:
        return False
    return other.surroundings.nearest_sensor == sensor.name and other.name < sensor.name
