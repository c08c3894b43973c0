"""Every mutual pair of the audit: which model answers, and the answers.

The quick model of a pair is an inner disk and a concentric ring of the
same areas at the measured gap (:mod:`auditor.solve.mutual`). It stands for
a pair where one electrode sits in the other's opening with an even gap all
round. Interleaved (comb, spiral), side-by-side or stacked pairs (tx and rx
on different layers) are not that: the automatic mode sends them to the 3-D
solve (:mod:`auditor.solve.mutual_precise`) and says why. ``--quick`` keeps
the disk and ring, ``--precise`` solves every pair in 3-D.

Keys of a keyboard repeat one footprint: pairs of equal copper up to a
translation share one 3-D solve (as equal pads share one quick solve); the
notes name the pair that was solved. :func:`plan_pairs` decides all this
from the geometry; :mod:`auditor.solve.mutual_jobs` runs the solves.
"""

from __future__ import annotations

from dataclasses import dataclass

import shapely
from shapely.affinity import translate
from shapely.geometry import Polygon

from auditor.sensors.model import Sensor
from auditor.solve.mutual import mutual_partner
from auditor.solve.route import Method, Route, forced

#: Copper share of its outline below which the inner electrode is no plate.
MIN_SOLID_SHARE = 0.9
#: Hole area over the inner electrode grown by the gap, beyond which the gap
#: is uneven around it (common practice, no source).
MAX_HOLE_EXCESS = 0.25
#: Largest area of the shapes' difference, as a share of their area, for two
#: pairs to count as equal (polygonised arcs differ a little by position).
SAME_SHAPE_SHARE = 0.005


def _solid_share(geometry: shapely.Geometry) -> float:
    outline = sum(Polygon(p.exterior).area for p in shapely.get_parts(geometry))
    return float(geometry.area / outline) if outline > 0 else 1.0


def _hole_around(inner: Sensor, outer: Sensor) -> Polygon | None:
    """The opening of ``outer`` that holds ``inner``, if there is one."""
    for part in shapely.get_parts(outer.geometry):
        for ring in getattr(part, "interiors", ()):
            hole = Polygon(ring)
            if hole.contains(inner.geometry):
                return hole
    return None


def disk_ring_misfit(rx: Sensor, tx: Sensor) -> str:
    """Why the disk-and-ring model cannot hold this pair ("" when it can)."""
    if rx.layer != tx.layer:
        return f"tx on {tx.layer}, rx on {rx.layer} (stacked, not coplanar)"
    inner, outer = sorted((rx, tx), key=lambda s: (s.area_mm2, s.name))
    hole = _hole_around(inner, outer)
    if hole is None:
        hole = _hole_around(outer, inner)
        inner, outer = outer, inner
    if hole is None:
        return "interleaved or side by side: neither electrode lies in an opening of the other"
    if _solid_share(inner.geometry) < MIN_SOLID_SHARE:
        return f"the inner electrode {inner.name} is no plate (comb, hatched or perforated)"
    gap = inner.geometry.distance(outer.geometry)
    expected = inner.geometry.buffer(gap).area
    if hole.area > expected * (1.0 + MAX_HOLE_EXCESS):
        return f"uneven gap around {inner.name} (opening {hole.area / expected:.2f} x the " \
               "disk model's)"
    return ""


def pair_route(rx: Sensor, tx: Sensor, mode: str) -> Route:
    """The model for one pair in ``mode`` ("auto", "quick" or "precise"), and why."""
    misfit = disk_ring_misfit(rx, tx)
    route = (Route("precise", f"3-D: {misfit}") if misfit else
             Route("quick", "disk and ring model: one electrode in the other's opening, "
                            "even gap"))
    if mode == "auto":
        return route
    method: Method = "precise" if mode == "precise" else "quick"
    return forced(route, method)


def _shape_key(rx: Sensor, tx: Sensor) -> tuple[str, str, shapely.Geometry, shapely.Geometry]:
    x0, y0, _, _ = shapely.union_all([rx.geometry, tx.geometry]).bounds
    return (rx.layer, tx.layer, translate(rx.geometry, -x0, -y0),
            translate(tx.geometry, -x0, -y0))


def _same_shape(a: tuple[str, str, shapely.Geometry, shapely.Geometry],
                b: tuple[str, str, shapely.Geometry, shapely.Geometry]) -> bool:
    if a[:2] != b[:2]:
        return False
    return all(g.symmetric_difference(h).area <= SAME_SHAPE_SHARE * max(g.area, 1e-9)
               for g, h in ((a[2], b[2]), (a[3], b[3])))


@dataclass(frozen=True)
class PairPlan:
    """One receive electrode's pair, its route, and whose 3-D solve it shares.

    ``shares_with``: the receive electrode of the first pair (by name) of
    equal copper up to a translation, when this pair is routed to 3-D and is
    not that first pair; "" otherwise.
    """

    rx: Sensor
    tx: Sensor
    route: Route
    shares_with: str = ""


def plan_pairs(sensors: tuple[Sensor, ...], mode: str) -> tuple[PairPlan, ...]:
    """Every receive electrode with a partner, by name: route and sharing.

    Geometry only (no solve): what runs is decided here, before any job is
    queued, so that the 3-D solves can run beside the other 3-D jobs.
    """
    plans: list[PairPlan] = []
    solved: list[tuple[tuple[str, str, shapely.Geometry, shapely.Geometry], str]] = []
    for rx in sorted((s for s in sensors if s.kind == "mutual-rx"), key=lambda s: s.name):
        tx = mutual_partner(rx, sensors)
        if tx is None:
            continue
        route = pair_route(rx, tx, mode)
        shares_with = ""
        if route.method == "precise":
            key = _shape_key(rx, tx)
            shares_with = next((name for other, name in solved if _same_shape(key, other)), "")
            if not shares_with:
                solved.append((key, rx.name))
        plans.append(PairPlan(rx, tx, route, shares_with))
    return tuple(plans)
