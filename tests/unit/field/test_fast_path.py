"""The audit's fast solve path against slower ways of computing the same thing.

Reference throughout: the same solver on a refined mesh (or the plain,
unshortened computation). That the refined solver itself matches published
results (8 eps0 a, Kirchhoff, Love, images, Hammerstad-Jensen, conformal
mapping) is checked in test_axisym.py and test_crosssection.py.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest

from auditor.field import fem
from auditor.field.api import BoardLayer, PadSetup, TraceRunSpec, solve_pad
from auditor.field.axisym import (
    AxisymModel,
    DielectricSlab,
    Sheet,
    _cell_permittivity,
    _conductor_nodes,
    _far_field_terms,
    build_mesh,
    solve_axisym_pair,
)
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
    left_out_films,
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


@pytest.mark.slow
def test_default_mesh_within_one_percent_of_refined_solve() -> None:
    # Reference: eta 0.05 (3x finer in each direction than the default 0.15).
    solve = solve_pad(BUTTON)
    cp_ref, delta_ref = _cp_and_delta(BUTTON, 0.05)
    assert solve.cp_pad_pf == pytest.approx(cp_ref, rel=0.01)
    assert solve.delta_c_pf == pytest.approx(delta_ref, rel=0.01)


@pytest.mark.parametrize("eta", [0.15, 0.3])  # a large and a small mesh
def test_one_factorisation_pair_equals_two_separate_solves(eta: float) -> None:
    # Exact algebra on the same mesh (common practice, no source): imposing
    # the finger's potential through the Schur complement of the factors'
    # trailing block must give what a second factorisation with the finger's
    # nodes fixed gives, to rounding.
    model = AxisymModel((Sheet("pad", 0.0, 5.0), Sheet("ground", 0.0, 12.0, 6.0),
                         Sheet("ground", -1.6, 12.0)), (DielectricSlab(-1.6, 0.0, 4.4),
                                                        DielectricSlab(0.0, 2.0, 2.8)))
    finger = Sheet("finger", 2.0, 5.0)
    hinted = AxisymModel(model.sheets, model.layers, (finger,))
    mesh = build_mesh(hinted, eta, 30.0)
    eps = _cell_permittivity(hinted, mesh)
    stiffness = fem.assemble(mesh, eps, _far_field_terms(hinted, mesh, eps))
    nodes = _conductor_nodes(hinted, mesh)
    extra = fem.nodes_on_segment(mesh, 2.0, 0.0, 5.0)
    base, touched = fem.capacitance_pair(stiffness, nodes, extra, mesh.shape)
    assert touched is not None
    separate_base = fem.capacitance_matrix(stiffness, nodes)  # SuperLU's own order
    separate_touched = fem.capacitance_matrix(stiffness, (*nodes, extra))
    np.testing.assert_allclose(base, separate_base, rtol=1e-9, atol=1e-12 * abs(base).max())
    np.testing.assert_allclose(touched, separate_touched, rtol=1e-9,
                               atol=1e-12 * abs(touched).max())
    assert touched[0, 0] > base[0, 0]  # the finger adds capacitance to the pad


def test_pair_falls_back_to_two_factorisations_without_grid_order() -> None:
    # Without the grid's order SuperLU may move the finger's nodes; the pair
    # is then two plain solves, equal to the ordered path (common practice,
    # no source).
    model = AxisymModel((Sheet("pad", 0.0, 5.0), Sheet("ground", -1.6, 12.0)),
                        (DielectricSlab(-1.6, 0.0, 4.4),), (Sheet("finger", 2.0, 5.0),))
    mesh = build_mesh(model, 0.3, 30.0)
    eps = _cell_permittivity(model, mesh)
    stiffness = fem.assemble(mesh, eps, _far_field_terms(model, mesh, eps))
    nodes = _conductor_nodes(model, mesh)
    extra = fem.nodes_on_segment(mesh, 2.0, 0.0, 5.0)
    ordered = fem.capacitance_pair(stiffness, nodes, extra, mesh.shape)
    unordered = fem.capacitance_pair(stiffness, nodes, extra, None)
    for a, b in zip(ordered, unordered, strict=True):
        assert a is not None and b is not None
        np.testing.assert_allclose(a, b, rtol=1e-9, atol=1e-12 * abs(a).max())


@pytest.mark.slow
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


def test_thin_film_far_behind_the_pad_is_left_out_with_a_small_change() -> None:
    # Self-consistency (common practice, no source): the quick model leaves
    # out a 10 µm film under a 1.51 mm board (the far side's mask), which
    # changes Cp by under 0.5 % and ΔC by under 0.1 % against the same pad
    # with the film meshed.
    with_film = BUTTON
    assert left_out_films(with_film) == (1,)
    assert len(dielectrics(with_film)[0]) == 2  # board and overlay, no film
    kept = solve_pad(with_film)
    assert any("thin film" in note for note in kept.notes)
    # The same film put 0.5 mm behind the pad is in the model.
    near = replace(BUTTON, board_layers=(BoardLayer(0.5, 4.5), BoardLayer(0.01, 3.3),
                                         BoardLayer(1.0, 4.5)))
    assert left_out_films(near) == ()
    # No film at all gives the very same numbers as a film left out.
    bare = solve_pad(replace(BUTTON, board_layers=BUTTON.board_layers[:1]))
    assert kept.cp_pad_pf == bare.cp_pad_pf and kept.delta_c_pf == bare.delta_c_pf
    # Against the film meshed (threshold raised so it is kept).
    import auditor.field.pad_model as pad_model

    original = pad_model.FAR_FILM_MM
    try:
        pad_model.FAR_FILM_MM = 10.0  # keep every film
        pad_model.field_matrices.cache_clear()
        meshed = solve_pad(with_film)
    finally:
        pad_model.FAR_FILM_MM = original
        pad_model.field_matrices.cache_clear()
    assert kept.cp_pad_pf == pytest.approx(meshed.cp_pad_pf, rel=0.005)
    assert kept.delta_c_pf == pytest.approx(meshed.delta_c_pf, rel=0.001)
    # A pad on the far side has every board layer between it and the finger.
    assert left_out_films(replace(BUTTON, pad_side="far")) == ()


def test_work_a_helper_fails_on_is_done_here(monkeypatch: pytest.MonkeyPatch) -> None:
    # A helper process that fails (or dies) must not lose a pad: what it did
    # not deliver is solved in this process (common practice, no source).
    import os

    from auditor.field import batch

    parent = os.getpid()

    def failing_in_helpers(setup: PadSetup):  # type: ignore[no-untyped-def]
        if os.getpid() != parent:
            raise RuntimeError("helper failure")
        return solve_pad(setup)

    monkeypatch.setattr(batch, "solve_pad", failing_in_helpers)
    setups = [BUTTON, PadSetup(pad_area_mm2=50.0, gap_mm=0.5),
              PadSetup(pad_area_mm2=80.0, gap_mm=1.0)]
    assert solve_pads(setups, workers=2) == tuple(solve_pad(s) for s in setups)
