"""Which model answers for an electrode in the automatic mode, and why.

The quick model is a disk with concentric ground (:mod:`auditor.field.api`);
it holds for a plate of moderate aspect whose surroundings are nearly the
same in every direction. The 3-D solve (:mod:`auditor.solve.precise`) takes
the electrodes where that is not so. Each test below names what it guards
against; the limits were set on the demo board, the field fixtures
(``fixtures/make_field_boards.py``) and the development corpus of real
boards (``tests/integration/test_corpus_field.py``), where the quick model
differs from the 3-D one by more than 10 % past them (measured,
``bench/bench_modes.py``).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

from shapely.geometry import Polygon

from auditor.sensors.model import Sensor
from auditor.sensors.noisy import is_shield_net
from auditor.solve.setup import FieldInput, quick_unfit_reason
from auditor.solve.shadows import LayerCopper

Method = Literal["quick", "precise"]

#: Another electrode closer than this many cover thicknesses (overlay, mask
#: and air gap) shares the finger's field: the demo's slider segments, 0.47 mm
#: apart under 2 mm of acrylic, differ by 7-11 % in ΔC between the models;
#: the field fixtures' buttons 4 mm apart under 2 mm by less than 2 %.
NEIGHBOUR_COVERS = 1.0
#: Floor of the cover thickness for that test (a bare board still spreads
#: the field over about the board's thickness; common practice, no source).
MIN_COVER_MM = 0.5
#: Copper share of its outline below which an electrode is hatched or
#: perforated (the disk model fills it).
MIN_SOLID_SHARE = 0.9
#: Long side over short side of the smallest enclosing rectangle beyond which
#: the equal-area disk misstates the perimeter too much (a square is 1.15 %
#: low in Cp; docs/physics-model.md).
MAX_ASPECT = 3.0
#: Outline perimeter over the equal-area circle's beyond which the outline is
#: notched, slotted or branched: the disk misses the extra edge. A 3:1
#: rectangle is 1.30, a 4:1 one 1.41 (those the aspect test takes); the
#: plates of the corpus and fixtures that agree within 10 % are 1.00-1.27,
#: real 13 mm keys with a slot to a centre LED hole are 1.91 (measured: quick
#: Cp 10-12 % under the 3-D solve at 0.5 and 0.25 mm cells).
MAX_PERIMETER_RATIO = 1.4
#: Signals or a driven shield on the electrode's layer with a typical gap
#: under this share of the modelled ground gap (or with no ground gap) and
#: around at least :data:`MIN_COPLANAR_SHARE` of the outline: the disk
#: leaves them out, the 3-D solve holds them (measured, real 17.5 x 7 mm
#: pads ringed by a shield pour 0.25 mm away: quick Cp 19 % under the 3-D
#: solve, ΔC 47-56 % over).
COPLANAR_GAP_SHARE = 0.5
MIN_COPLANAR_SHARE = 0.25
#: Copper in front of the electrode over at least this share of it.
MIN_FRONT_COVER = 0.05
#: A shadow over this range of the pad's share is uneven around the pad (a
#: patch on one side, strips across it): the ring profile spreads it all
#: round, as closed rings that couple more than strips of the same area
#: (measured, 14 mm button: a ground patch under one quarter, quick Cp 40 %
#: over the 3-D solve; two 1 mm traces across it, 22 %). Less is a small
#: correction, more a plane with openings, both within the profile's reach.
PARTIAL_COVER = (0.05, 0.8)


@dataclass(frozen=True)
class Route:
    """The model for one electrode and why (one sentence for the report)."""

    method: Method
    reason: str


def _solid_share(sensor: Sensor) -> float:
    parts = getattr(sensor.geometry, "geoms", [sensor.geometry])
    outline = sum(Polygon(p.exterior).area for p in parts if getattr(p, "exterior", None))
    return float(sensor.area_mm2 / outline) if outline > 0 else 1.0


def _perimeter_ratio(sensor: Sensor) -> float:
    parts = getattr(sensor.geometry, "geoms", [sensor.geometry])
    outline = sum(p.exterior.length for p in parts if getattr(p, "exterior", None))
    circle = 2.0 * math.sqrt(math.pi * sensor.area_mm2) if sensor.area_mm2 > 0 else 0.0
    return float(outline / circle) if circle > 0 else 1.0


def _coplanar(mapped: FieldInput, cover_mm: float) -> str:
    near = mapped.coplanar
    gap = mapped.setup.gap_mm
    if near is None or near.outline_share < MIN_COPLANAR_SHARE:
        return ""
    if gap is not None and near.typical_gap_mm >= COPLANAR_GAP_SHARE * gap:
        return ""
    if near.typical_gap_mm >= max(cover_mm, MIN_COVER_MM):
        return ""
    shield = [n for n in near.nets if is_shield_net(n)]
    what = f"driven shield {shield[0]}" if shield else f"signal copper {near.nets[0]}"
    return (f"{what} {near.typical_gap_mm:.2f} mm beside {near.outline_share:.0%} of the "
            "outline (not in the disk model; held at ground in 3-D)")


def _aspect(sensor: Sensor) -> float:
    box = sensor.geometry.minimum_rotated_rectangle
    xs, ys = box.exterior.coords.xy if hasattr(box, "exterior") else ([0.0], [0.0])
    sides = [((xs[k + 1] - xs[k]) ** 2 + (ys[k + 1] - ys[k]) ** 2) ** 0.5
             for k in range(min(2, len(xs) - 1))]
    return max(sides) / min(sides) if len(sides) == 2 and min(sides) > 0 else 1.0


def _front(coppers: tuple[LayerCopper, ...]) -> str:
    front = [c for c in coppers if c.in_front and c.pad_cover >= MIN_FRONT_COVER]
    if not front:
        return ""
    return (f"copper on {front[0].layer} between the finger and the electrode over "
            f"{front[0].pad_cover:.0%} of it")


def _partial(coppers: tuple[LayerCopper, ...]) -> str:
    low, high = PARTIAL_COVER
    for copper in coppers:
        if not copper.in_front and low <= copper.pad_cover <= high:
            return (f"copper on {copper.layer} under {copper.pad_cover:.0%} of the electrode "
                    f"(uneven shadow, its centre {copper.offset:.2f} radii off the pad's)")
    return ""


def _neighbour(sensor: Sensor, cover_mm: float) -> str:
    surround = sensor.surroundings
    distance = surround.nearest_sensor_mm if surround else None
    limit = NEIGHBOUR_COVERS * max(cover_mm, MIN_COVER_MM)
    if distance is None or distance >= limit:
        return ""
    return (f"another electrode {distance:.2f} mm away, closer than {NEIGHBOUR_COVERS:g} x "
            f"the {cover_mm:g} mm cover")


def _checks(sensor: Sensor, mapped: FieldInput) -> tuple[Callable[[], str], ...]:
    setup = mapped.setup
    cover = setup.overlay_mm + setup.air_gap_mm
    share, aspect = _solid_share(sensor), _aspect(sensor)
    perimeter = _perimeter_ratio(sensor)
    return (
        lambda: quick_unfit_reason(sensor).split(":")[0],
        lambda: (f"copper fills {share:.0%} of its outline (hatched or perforated)"
                 if share < MIN_SOLID_SHARE else ""),
        lambda: _front(mapped.coppers),
        lambda: _neighbour(sensor, cover),
        lambda: f"elongated ({aspect:.1f}:1)" if aspect > MAX_ASPECT else "",
        lambda: (f"notched or slotted outline (perimeter {perimeter:.2f} x the equal-area "
                 "disk's)" if perimeter > MAX_PERIMETER_RATIO else ""),
        lambda: _coplanar(mapped, cover),
        lambda: _partial(mapped.coppers),
    )


def route_for(sensor: Sensor, mapped: FieldInput) -> Route:
    """The automatic mode's choice for one self-capacitance electrode."""
    for check in _checks(sensor, mapped):
        reason = check()
        if reason:
            return Route("precise", f"3-D: {reason}")
    return Route("quick", "disk model: a plate with even surroundings (no close neighbour, "
                          "no uneven shadow, nothing in front)")


def forced(route: Route, method: Method) -> Route:
    """The route when ``--quick`` or ``--precise`` overrides the automatic choice."""
    if method == "precise":
        return Route("precise", "3-D: forced (--precise)")
    if route.method == "quick":
        return Route("quick", f"forced (--quick); {route.reason}")
    return Route("quick", f"forced (--quick); the automatic mode would use {route.reason}")
