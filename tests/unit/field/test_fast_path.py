"""The audit's fast solve path against slower ways of computing the same thing.

Reference throughout: the same solver on a refined mesh (or the plain,
unshortened computation). That the refined solver itself matches published
results (8 eps0 a, Kirchhoff, Love, images, Hammerstad-Jensen, conformal
mapping) is checked in test_axisym.py and test_crosssection.py.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from auditor.field import fem
from auditor.field.api import BoardLayer, PadSetup, TraceRunSpec, solve_pad
from auditor.field.axisym import AxisymModel, Layer, Sheet, solve_axisym_pair
from auditor.field.batch import solve_pads
from auditor.field.crosssection import (
    CrossSection,
    Strip,
    TraceSection,
    _single_solve,
    _trace_geometry,
    is_mirror_symmetric,
)
from auditor.field.pad_model import (
    dielectrics,
    finger_sheet,
    ground_sheets,
    reduced_network,
)

#: A demo-like button (invented): 10 mm pad, 2 mm gap to a 35 % hatched pour,
#: a 35 % hatched plane on the far side of 1.51 mm FR-4 plus mask, 2 mm
#: acrylic, a 10 mm finger.
BUTTON = PadSetup(pad_area_mm2=math.pi * 25, gap_mm=2.0, plane_depth_mm=1.51,
                  plane_fill=0.35, plane_hatch_pitch_mm=2.0, ground_fill=0.35,
                  board_layers=(BoardLayer(1.51, 4.5), BoardLayer(0.01, 3.3)),
                  overlay_mm=2.01, overlay_er=2.8)


def _cp_and_delta(setup: PadSetup, eta: float) -> tuple[float, float]:
    """Cp and ΔC as solve_pad computes them, at a chosen mesh size."""
    layers, surface = dielectrics(setup)
    radius = setup.pad_radius_mm
    sheets = (Sheet("pad", 0.0, radius), *ground_sheets(setup, radius + (setup.gap_mm or 0)))
    finger = finger_sheet(setup, surface)
    assert finger is not None
    plain, touched = solve_axisym_pair(AxisymModel(sheets, layers), finger, eta=eta)
    cp = reduced_network(plain.matrix, ["pad"], setup, with_finger=False).values_pf[0][0]
    cp_touched = reduced_network(touched.matrix, ["pad"], setup,
                                 with_finger=True).values_pf[0][0]
    return cp, cp_touched - cp


def test_default_mesh_within_one_percent_of_refined_solve() -> None:
    # Reference: eta 0.05 (3x finer in each direction than the default 0.15).
    solve = solve_pad(BUTTON)
    cp_ref, delta_ref = _cp_and_delta(BUTTON, 0.05)
    assert solve.cp_pad_pf == pytest.approx(cp_ref, rel=0.01)
    assert solve.delta_c_pf == pytest.approx(delta_ref, rel=0.01)


def test_factorisation_update_equals_second_factorisation(monkeypatch:
                                                          pytest.MonkeyPatch) -> None:
    # Both paths of capacitance_pair are exact algebra on the same mesh.
    model = AxisymModel((Sheet("pad", 0.0, 5.0), Sheet("ground", 0.0, 12.0, 6.0),
                         Sheet("ground", -1.6, 12.0)), (Layer(-1.6, 0.0, 4.4),
                                                        Layer(0.0, 2.0, 2.8)))
    finger = Sheet("finger", 2.0, 5.0)
    monkeypatch.setattr(fem, "UPDATE_MAX_NODES", 10 ** 6)
    updated = solve_axisym_pair(model, finger)  # SuperLU's order, update
    monkeypatch.setattr(fem, "LARGE_GRID_NODES", 0)
    dissected = solve_axisym_pair(model, finger)  # nested dissection, update
    monkeypatch.setattr(fem, "UPDATE_MAX_NODES", 0)
    refactored = solve_axisym_pair(model, finger)  # nested dissection, two LUs
    for other in (dissected, refactored):
        for a, b in zip(updated, other, strict=True):
            assert a.matrix.array() == pytest.approx(b.matrix.array(), rel=1e-9)


def test_parallel_batch_gives_the_same_bits_as_serial() -> None:
    setups = [BUTTON, PadSetup(pad_area_mm2=50.0, gap_mm=0.5),
              PadSetup(pad_area_mm2=80.0, gap_mm=1.0, plane_depth_mm=1.6,
                       traces=(TraceRunSpec(0.2, 30.0, None, 0.5),)), BUTTON]
    done: list[PadSetup] = []
    parallel = solve_pads(setups, workers=2, on_solved=done.append)
    serial = solve_pads(setups, workers=1)
    assert parallel == serial
    assert parallel[0] is parallel[3]  # equal setups share one solve
    assert sorted(map(id, done)) == sorted(map(id, dict.fromkeys(setups)))
    assert serial[1] == solve_pad(setups[1])


def test_mirrored_trace_section_equals_full_domain_solve() -> None:
    for key in (TraceSection(0.15, None, 0.5), TraceSection(0.15, 1.51, 0.79),
                TraceSection(1.0, 0.2, 0.3), TraceSection(0.2, 1.6, None)):
        section = _trace_geometry(key)
        assert is_mirror_symmetric(section)
        full = _single_solve(section, 0.1, 30.0, mirror=False)
        half = _single_solve(section, 0.1, 30.0, mirror=True)
        # Different meshes near x = 0 (inside the trace): agreement to 0.05 %.
        np.testing.assert_allclose(half, full, rtol=5e-4)


def test_asymmetric_sections_are_not_mirrored() -> None:
    strips = CrossSection((Strip("a", -1.5, -0.5, 0.0), Strip("b", 0.5, 1.5, 0.0)), "b")
    assert not is_mirror_symmetric(strips)
    offset = CrossSection((Strip("a", 0.0, 1.0, 0.0), Strip("g", -np.inf, np.inf, -1.0)), "g")
    assert not is_mirror_symmetric(offset)


def test_nested_dissection_orders_every_node_once_separators_last() -> None:
    # George 1973: the first separator (the middle grid line of the longer
    # side) is eliminated last.
    for shape in ((1, 1), (2, 7), (37, 5), (64, 81)):
        order = fem.nested_dissection(shape)
        assert sorted(order.tolist()) == list(range(shape[0] * shape[1]))
    nx, ny = 64, 81
    last_line = fem.nested_dissection((nx, ny))[-nx:]
    assert sorted(last_line.tolist()) == [ix * ny + ny // 2 for ix in range(nx)]
