"""Measured sensors -> quick field model -> PadMetrics, on generated boards.

Boards come from fixtures/make_rule_boards.py (invented layout: 10 mm round
pads on F.Cu, 1 mm pour clearance, hatched GND pours 0.5 mm lines / 2.5 mm
gaps on both layers, 1.6 mm two-layer board). Sources per test.
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import pytest
from measured_boards import measured

from auditor.audit import AuditOptions, measuring_selection, resolve_setup
from auditor.config import Config
from auditor.sensors import find_sensors
from auditor.solve.dispatch import solve_sensors
from auditor.solve.setup import pad_setup_for
from fixtures.make_rule_boards import Design


@pytest.fixture(scope="module")
def boards(tmp_path_factory):  # type: ignore[no-untyped-def]
    folder = tmp_path_factory.mktemp("field_boards")
    return {name: measured(folder, name, design) for name, design in (
        ("base", Design()),
        ("tight", Design(ground_gap_mm=0.5)),
        ("solid", Design(back_hatch=None)))}


@pytest.fixture(scope="module")
def base_metrics(boards):  # type: ignore[no-untyped-def]
    board, sensors, config = boards["base"]
    return solve_sensors(board, sensors, config)


def touch1(boards, name):  # type: ignore[no-untyped-def]
    board, sensors, config = boards[name]
    return board, next(s for s in sensors if s.name == "TOUCH1"), config


def test_setup_matches_hand_computation(boards) -> None:  # type: ignore[no-untyped-def]
    """Hand computation from the fixture's design values and stackup."""
    board, sensor, config = touch1(boards, "base")
    mapped = pad_setup_for(sensor, board, config)
    setup = mapped.setup
    # a 10 mm circle as KiCad's 64-gon: (n/2) r^2 sin(2 pi/n) = 78.41 mm^2, equal-area
    # radius 4.9958 mm: within 20 µm of the 10 mm finger's edge, so moved onto it
    assert setup.pad_area_mm2 == pytest.approx(math.pi * 25)
    assert any("onto the finger's edge" in note for note in mapped.notes)
    assert setup.gap_mm == pytest.approx(1.0)
    # 1.6 mm board = 2 x 0.01 mask + 2 x 0.035 copper + 1.51 FR-4 (the writer's stackup)
    assert setup.plane_depth_mm == pytest.approx(1.51)
    # hatch 0.5 / 2.5: fill 1 - (2.5/3)^2 = 0.306, in 0.05 steps -> 0.30; pitch 3.0 mm
    assert setup.plane_fill == pytest.approx(0.30)
    assert setup.plane_hatch_pitch_mm == pytest.approx(3.0)
    # F.Mask 0.01 mm er 3.3 in series under 2 mm acrylic er 2.8:
    # 2.01 / (2/2.8 + 0.01/3.3) = 2.8021
    assert setup.overlay_mm == pytest.approx(2.01)
    assert setup.overlay_er == pytest.approx(2.802, abs=1e-3)
    assert setup.board_layers[0].thickness_mm == pytest.approx(1.51)
    assert setup.finger_diameter_mm == 10.0 and setup.power == config.power
    assert sum(run.length_mm for run in setup.traces) == pytest.approx(sensor.path.length_mm)


def test_every_self_cap_sensor_gets_quick_metrics(boards, base_metrics) -> None:  # type: ignore[no-untyped-def]
    _board, sensors, _config = boards["base"]
    assert {s.name for s in sensors} == set(base_metrics)
    for metrics in base_metrics.values():
        assert metrics.method == "quick"
        # a 10 mm pad under 2 mm plastic: Cp of a few pF, ΔC 0.1-1 pF (physics.md §4.1,
        # common practice, no source)
        assert 1.0 < metrics.cp_pad_pf < 10.0 and 0.1 < metrics.delta_c_pf < 1.0
        # Cp total = pad + trace + the profile's pin_pf (5 pF); no parts but R1
        assert metrics.cp_pin_pf == 5.0 and metrics.cp_parts_pf == pytest.approx(0.0, abs=1e-12)
        assert metrics.cp_total_pf == pytest.approx(metrics.cp_pad_pf + metrics.cp_trace_pf
                                                    + metrics.cp_pin_pf)
        assert metrics.delta_ratio == pytest.approx(metrics.delta_c_pf / metrics.cp_total_pf)
        assert any("finger 10 mm" in note for note in metrics.notes)


def test_smaller_gap_raises_cp_and_lowers_delta(boards, base_metrics) -> None:  # type: ignore[no-untyped-def]
    """Physics trend (physics.md §4.1: smaller gap raises Cp and lowers ΔC)."""
    board, sensor, config = touch1(boards, "tight")
    tight = solve_sensors(board, (sensor,), config)["TOUCH1"]
    assert pad_setup_for(sensor, board, config).setup.gap_mm == pytest.approx(0.5)
    assert tight.cp_pad_pf > base_metrics["TOUCH1"].cp_pad_pf * 1.03
    assert tight.delta_c_pf < base_metrics["TOUCH1"].delta_c_pf


def test_solid_plane_raises_cp_over_hatched(boards, base_metrics) -> None:  # type: ignore[no-untyped-def]
    """Trend, physics.md §4.1 (common practice: solid ground under a pad raises Cp)."""
    board, sensor, config = touch1(boards, "solid")
    setup = pad_setup_for(sensor, board, config).setup
    assert setup.plane_fill == 1.0
    solid = solve_sensors(board, (sensor,), config)["TOUCH1"]
    assert solid.cp_pad_pf > base_metrics["TOUCH1"].cp_pad_pf * 1.05


def test_touch_from_back_moves_pad_to_far_side(boards) -> None:  # type: ignore[no-untyped-def]
    board, sensor, _config = touch1(boards, "base")
    mapped = pad_setup_for(sensor, board, replace(Config(), touch_side="back"))
    assert mapped.setup.pad_side == "far" and mapped.setup.plane_depth_mm is None
    # the F.Mask is now between the finger side and ... the far-side pad's own face:
    # listed from the touch side (B.Mask first), the pad's own mask left out
    assert [layer.thickness_mm for layer in mapped.setup.board_layers] == [0.01, 1.51]
    # the copper now between electrode and finger is modelled in front of the pad
    assert mapped.setup.front_depth_mm is not None and mapped.setup.front_profile
    assert any("in front of the pad" in note for note in mapped.notes)


def test_mutual_pair_maps_to_disk_and_ring(boards, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    """Two pads recast as a mutual pair (no solve run: the solver is checked in
    tests/unit/field). Hand computation: 10 mm pads 16 mm apart -> inner disk
    d 10 mm, gap 6 mm, ring of the same 78.41 mm^2 from r = 11 mm:
    width sqrt(11^2 + 78.41/pi) - 11 = 1.081 mm. The receiver gets Cm, the
    transmitter no entry. Side by side, the automatic mode would solve the
    pair in 3-D (tests/unit/solve/test_mutual_pairs.py): ``--quick`` here."""
    import auditor.solve.mutual as pf
    from auditor.field.api import MutualSolve
    from auditor.field.matrix import CapacitanceMatrix

    seen = []

    def fake(setup):  # type: ignore[no-untyped-def]
        seen.append(setup)
        return MutualSolve(1.5, 1.2, 0.3, 0.2, CapacitanceMatrix((), ()), None)

    monkeypatch.setattr(pf, "solve_mutual", fake)
    board, sensors, config = boards["base"]
    tx, rx = (replace(s, kind=kind) for s, kind in zip(sensors, ("mutual-tx", "mutual-rx"),
                                                         strict=True))
    result = solve_sensors(board, (tx, rx), config, mode="quick")
    assert set(result) == {rx.name}
    assert "the automatic mode would use 3-D: interleaved or side by side" in (
        result[rx.name].method_reason)
    (setup,) = seen
    assert setup.inner_diameter_mm == pytest.approx(10.0, rel=2e-3)
    assert setup.electrode_gap_mm == pytest.approx(6.0, abs=0.02)
    assert setup.outer_width_mm == pytest.approx(1.081, abs=0.01)
    cm = result[rx.name]
    assert (cm.cp_pad_pf, cm.delta_c_pf, cm.delta_ratio) == (1.5, 0.3, 0.2)
    assert "Cm" in cm.notes[0] and math.isfinite(cm.delta_ratio)


def test_unsupported_sensor_is_skipped_not_faked(boards) -> None:  # type: ignore[no-untyped-def]
    board, sensors, config = boards["base"]
    lone_tx = replace(sensors[0], kind="mutual-tx")
    assert solve_sensors(board, (lone_tx,), config) == {}


def test_progress_is_reported(boards) -> None:  # type: ignore[no-untyped-def]
    board, sensors, config = boards["base"]
    seen: list[tuple[str, int, int]] = []
    solve_sensors(board, sensors, config, progress=lambda *a: seen.append(a))
    assert seen == [(s.name, i + 1, len(sensors)) for i, s in enumerate(sensors)]


def test_solves_started_while_measuring_equal_solves_after(boards) -> None:  # type: ignore[no-untyped-def]
    # The audit queues each pad's solve as soon as its sensor is measured
    # (before the neighbour marks of all sensors are known); the numbers
    # must be exactly those of solving the finished sensors (common
    # practice, no source: the same computation in another order).
    from auditor.audit import _measured

    board, sensors, config = boards["base"]
    setup = resolve_setup(Path(board.path), AuditOptions())
    selection = measuring_selection(setup)
    found, _ = find_sensors(board, selection)
    streamed, quick = _measured(board, found, selection, setup, AuditOptions())
    assert quick is not None
    assert [s.name for s in streamed] == [s.name for s in sensors]
    started = solve_sensors(board, streamed, config, quick=quick)
    after = solve_sensors(board, streamed, config)
    assert started == after
    assert set(started) >= {"TOUCH1"}
