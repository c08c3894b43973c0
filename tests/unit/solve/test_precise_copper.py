"""The copper choices of the 3-D audit path on real-board structures.

Driven shield held at the pad's potential (checked against Love's coaxial
disks), finger at a slotted key's centre (parallel-plate bound), slivers
dropped, net-less artwork merged into the electrode, cells for narrow strips.
"""

from __future__ import annotations

from dataclasses import replace

import pytest
from scipy.constants import epsilon_0
from shapely.geometry import Point, box

from auditor.field.api import PadSetup
from auditor.field.precise import Conductor, LayeredMedium
from auditor.field.round_pad import PAD, SHIELD, pad_capacitances, solve_pair
from auditor.sensors.model import Sensor
from auditor.solve.precise import cell_for, electrode_width_mm, touch_point
from auditor.solve.precise_copper import without_slivers

RADIUS_MM = 5.0
EPS0_A_PF = epsilon_0 * RADIUS_MM * 1e-3 * 1e12


@pytest.mark.parametrize(("separation", "c11", "c12"), [(0.5, 13.19888, -8.23772),
                                                        (1.0, 10.04797, -4.51831)])
def test_driven_shield_counts_the_pads_charge_only(separation: float, c11: float,
                                                   c12: float) -> None:
    """Pad and an equal coaxial disk shield d apart, both at 1 V: the pad's
    charge is C11 + C12 (Maxwell entries from Love's equation, Love 1949;
    physics.md 1.4 table), far below C11, what a grounded shield gives.
    Measured -0.4 % at a/20 cells; tolerance 1.5 %."""
    disk = Point(0, 0).buffer(RADIUS_MM, quad_segs=64)
    medium = LayeredMedium(((separation * RADIUS_MM, 1.0),))
    conductors = [Conductor(PAD, disk, 0), Conductor(f"{SHIELD}@B", disk, 1)]
    baseline, _ = solve_pair(conductors, medium, None, 0.25)
    assert SHIELD in baseline.names
    setup = PadSetup(pad_area_mm2=78.5, finger_diameter_mm=None)
    cp, _ = pad_capacitances(baseline, None, setup)
    assert cp / EPS0_A_PF == pytest.approx(c11 + c12, rel=0.015)
    assert cp < 0.6 * baseline.entry(PAD, PAD)


def _sensor(geometry) -> Sensor:  # type: ignore[no-untyped-def]
    return Sensor("K", "button", ("K",), (), "F.Cu", float(geometry.area), 0.0, 0.0, "test",
                  geometry)


def test_finger_sits_on_a_slotted_keys_centre() -> None:
    """A 14 mm key slotted from its edge past its centre: the finger goes to
    the centroid (in the slot), not to an off-centre point on the copper."""
    key = box(0, 0, 14, 14).difference(box(6.2, 0, 7.8, 8.5))
    point = touch_point(_sensor(key))
    assert not key.contains(point)
    assert point.x == pytest.approx(7.0) and abs(point.y - 7.0) < 0.5


def test_loop_keeps_the_finger_on_its_copper() -> None:
    """A 1.5 mm wide square loop (copper under half its hull): the finger stays
    on the copper, as before."""
    loop = box(0, 0, 30, 30).difference(box(1.5, 1.5, 28.5, 28.5))
    assert loop.contains(touch_point(_sensor(loop)))


def test_narrow_strip_gets_finer_cells() -> None:
    """A 1 x 18 mm strip: 5 cells across (0.2 mm), a 10 mm pad keeps 0.5 mm."""
    strip = _sensor(box(0, 0, 1, 18))
    assert electrode_width_mm(strip) == pytest.approx(1.0, rel=0.02)
    assert cell_for(strip) == pytest.approx(0.2, rel=0.02)
    assert cell_for(_sensor(Point(0, 0).buffer(5.0))) == 0.5
    assert cell_for(strip, copper_mm2=60000 * 0.3 ** 2) == pytest.approx(0.3)


def test_slivers_are_dropped_with_a_note() -> None:
    ground = box(0, 0, 10, 10).union(box(20, 0, 20.1, 0.1))
    pad = Conductor(PAD, box(30, 0, 30.2, 0.2))
    kept, notes = without_slivers([pad, Conductor("ground@B", ground, 1)], 0.5, (PAD,))
    assert kept[0] is pad and kept[1].geometry.area == pytest.approx(100.0)
    assert len(notes) == 1 and "smaller than one 0.5 mm cell" in notes[0]
    kept, _ = without_slivers([Conductor("ground@F", box(0, 0, 0.1, 0.1))], 0.5, ())
    assert kept == []


def test_netless_copper_touching_the_electrode_joins_it(tmp_path) -> None:  # type: ignore[no-untyped-def]
    """A net-less copper patch (footprint art) touching the electrode is part
    of it (galvanic contact), transitively through a second patch; a patch
    0.5 mm away is not. Areas by construction (shapely)."""
    from auditor.read import read_board
    from auditor.solve.precise import window_around
    from auditor.solve.precise_copper import touching_artwork
    from fixtures.kicad_writer import Board as BoardWriter

    writer = BoardWriter()
    writer.edge_rect((0, 0), (40, 40))
    for corners in (((10, 10), (14, 14)), ((14, 10), (16, 12)), ((20.5, 10), (22, 12))):
        (x0, y0), (x1, y1) = corners
        writer.graphic("poly", "F.Cu", [(x0, y0), (x1, y0), (x1, y1), (x0, y1)], width_mm=0.0,
                       filled=True)
    path = writer.write(tmp_path / "art.kicad_pcb")
    electrode = box(16, 10, 20, 14)
    sensor = replace(_sensor(electrode), geometry=electrode)
    merged, added = touching_artwork(read_board(path), sensor, window_around(electrode, 10.0))
    assert added == pytest.approx(16.0 + 4.0, rel=1e-3)
    assert merged.area == pytest.approx(36.0, rel=1e-3)


def test_shield_behind_the_pad_goes_3d() -> None:
    """The disk model holds copper behind the pad at ground; a driven shield is
    not, so the automatic mode sends the electrode to 3-D."""
    from auditor.solve.route import route_for
    from auditor.solve.setup import FieldInput
    from auditor.solve.shadows import LayerCopper

    shield = LayerCopper("B.Cu", 1.6, False, ((10.0, 1.0),), 1.0, 1.0, 0.0,
                         (("signals", 1.0, ("AC_SHIELD",)),))
    signal = replace(shield, classes=(("signals", 1.0, ("SIG1",)),))
    pad = _sensor(Point(0, 0).buffer(5.0))
    route = route_for(pad, FieldInput(PadSetup(pad_area_mm2=78.5), (), (shield,)))
    assert route.method == "precise" and "driven shield AC_SHIELD" in route.reason
    assert "shield" not in route_for(pad, FieldInput(PadSetup(pad_area_mm2=78.5), (),
                                                     (signal,))).reason
