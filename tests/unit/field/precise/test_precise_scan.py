"""Slider scan and coupling table built on the Maxwell matrix."""

from __future__ import annotations

import numpy as np
import pytest
from shapely.geometry import LineString, box

from auditor.errors import UsageError
from auditor.field.precise import (
    BodyCoupling,
    Conductor,
    Finger,
    LayeredMedium,
    coupling_between,
    slider_scan,
)
from auditor.field.precise.scan import _analysed

STACK = LayeredMedium(((2.0, 3.0), (1.6, 4.4)), ground_below=True)


def three_segments(pitch_mm: float) -> list[Conductor]:
    return [Conductor(f"seg{i}", box(pitch_mm * i, 0, pitch_mm * i + 6, 10), 1)
            for i in range(3)]


@pytest.fixture(scope="module")
def symmetric_scan():
    path = LineString([(3, 5), (17, 5)])
    return slider_scan(three_segments(7.0), Finger(4.0, 0), path, 3.5, STACK, 1.0)


def test_mirror_symmetric_slider_gives_mirrored_response(symmetric_scan) -> None:
    """Mirror symmetry of the geometry about x = 10 mm (exact): segment i at s equals
    segment 2-i at L-s, and the centre position is estimated exactly."""
    deltas = np.array(symmetric_scan.delta_pf)
    assert np.allclose(deltas, deltas[::-1, ::-1], rtol=1e-4, atol=1e-7)
    middle = len(symmetric_scan.positions_mm) // 2
    assert symmetric_scan.positions_mm[middle] == pytest.approx(7.0)
    assert symmetric_scan.estimated_mm[middle] == pytest.approx(7.0, abs=1e-4)


def test_grounded_finger_only_raises_self_capacitance(symmetric_scan) -> None:
    """Adding a grounded conductor never lowers C_ii (Thomson/Dirichlet; physics.md 1.12)."""
    assert np.all(np.array(symmetric_scan.delta_pf) >= -1e-9)
    assert symmetric_scan.monotonic
    assert symmetric_scan.dead_zones_mm == ()
    assert 0.0 < symmetric_scan.linearity_mm < 3.5


def test_wide_gap_between_segments_is_a_dead_zone() -> None:
    """A small finger between segments 20 mm apart sees almost nothing (field decays over
    the stack thickness; common practice, no source for the threshold)."""
    segments = [Conductor("left", box(0, 0, 4, 10), 1), Conductor("right", box(24, 0, 28, 10), 1)]
    scan = slider_scan(segments, Finger(2.0, 0), LineString([(2, 5), (26, 5)]), 4.0, STACK, 1.0,
                       dead_fraction=0.2)
    assert scan.dead_zones_mm
    start, end = scan.dead_zones_mm[0]
    assert 2.0 <= start <= end <= 22.0


def test_analysis_of_a_response_table_by_hand() -> None:
    """Centroid interpolation, worst deviation and reversals on a made-up table
    (arithmetic check, common practice, no source)."""
    centres = np.array([0.0, 10.0])
    positions = np.array([0.0, 5.0, 10.0])
    deltas = np.array([[1.0, 0.0], [0.2, 0.8], [0.0, 1.0]])
    result = _analysed(["a", "b"], centres, positions, deltas, 0.1, [])
    assert result.estimated_mm == pytest.approx((0.0, 8.0, 10.0))
    assert result.linearity_mm == pytest.approx(3.0)
    reversing = _analysed(["a", "b"], centres, positions,
                          np.array([[0.2, 0.8], [0.9, 0.1], [0.0, 1.0]]), 0.1, [])
    assert reversing.reversals_mm == (5.0,)
    assert not reversing.monotonic


def test_coupling_table_is_minus_off_diagonal_over_self(symmetric_scan) -> None:
    """Crosstalk = -C_ij and its share of C_ii (Maxwell coefficients, Smythe 1968 ch. 2)."""
    matrix = symmetric_scan.matrices[0]
    coupling = coupling_between(matrix, ["seg0", "seg1"])
    c = matrix.array()
    assert coupling.crosstalk_pf[0][1] == pytest.approx(-c[0, 1])
    assert coupling.fraction_of_cp[1][0] == pytest.approx(-c[1, 0] / c[1, 1])
    assert coupling.crosstalk_pf[0][0] == 0.0


def test_wheel_of_four_quadrants_estimates_the_angle() -> None:
    """Four 90-degree sectors under a finger moving round the centre circle: four-fold
    symmetry (exact) puts the estimate on the true position at every sector centre
    and boundary, and the response repeats every quarter turn."""
    import shapely
    from shapely.geometry import Point

    ring = Point(0, 0).buffer(12, quad_segs=64).difference(Point(0, 0).buffer(4, quad_segs=64))
    sectors = []
    for quarter in range(4):
        start = np.pi / 2 * quarter + 0.05
        angles = np.linspace(start, start + np.pi / 2 - 0.1, 24)
        wedge = shapely.Polygon([(0, 0)] + [(20 * np.cos(t), 20 * np.sin(t)) for t in angles])
        sectors.append(Conductor(f"q{quarter}", ring.intersection(wedge), 1))
    circle = Point(0, 0).buffer(8, quad_segs=64).exterior
    circle = shapely.LineString(np.asarray(circle.coords)[::-1])  # start on +x, counter-clockwise
    scan = slider_scan(sectors, Finger(4.0, 0), circle, circle.length / 16, STACK, 1.0)
    assert len(scan.positions_mm) == 16
    quarter_turn = circle.length / 4
    for position, estimate in zip(scan.positions_mm, scan.estimated_mm, strict=True):
        if np.isclose((position / (quarter_turn / 2)) % 1.0, 0.0):
            gap = (estimate - position + circle.length / 2) % circle.length - circle.length / 2
            assert abs(gap) < 0.05 * quarter_turn
    deltas = np.array(scan.delta_pf)
    assert np.allclose(np.roll(deltas[4:8], 1, axis=1), deltas[8:12], rtol=0.02, atol=1e-4)
    assert scan.monotonic


def test_floating_finger_sees_less_and_tends_to_grounded() -> None:
    """Floating finger: dC_eff = dC_grounded - C_pf^2/(C_ff + C_ret) <= dC_grounded, and
    the grounded value as the body-to-earth capacitance grows (physics.md 1.12, exact
    algebra of the Schur complement)."""
    path = LineString([(3, 5), (10, 5)])
    grounded = slider_scan(three_segments(7.0), Finger(4.0, 0), path, 7.0, STACK, 1.0)
    weak = slider_scan(three_segments(7.0), Finger(4.0, 0), path, 7.0, STACK, 1.0,
                       body=BodyCoupling(device_to_earth_pf=1e9, body_to_earth_pf=2.0))
    strong = slider_scan(three_segments(7.0), Finger(4.0, 0), path, 7.0, STACK, 1.0,
                         body=BodyCoupling(device_to_earth_pf=1e9, body_to_earth_pf=1e9))
    grounded_delta, weak_delta = np.array(grounded.delta_pf), np.array(weak.delta_pf)
    assert np.all(weak_delta[:, :2] < grounded_delta[:, :2])
    assert np.all(weak_delta[:, :2] > 0)
    # Floor of 1e-6 of the largest change: the scans solve at the audits'
    # tolerance with single-precision transforms (operator error ~1e-7), so
    # the far segment's 5e-5 pF is known to a few 1e-8 pF only.
    assert np.allclose(strong.delta_pf, grounded.delta_pf, rtol=1e-4,
                       atol=1e-6 * grounded_delta.max())


def test_bad_scan_step_is_a_usage_error() -> None:
    with pytest.raises(UsageError, match="step"):
        slider_scan(three_segments(7.0), Finger(4.0, 0), LineString([(3, 5), (17, 5)]), 0.0,
                    STACK, 1.0)
