"""The width cost trace-too-wide judges: microstrip capacitance per length
and the capacitance a wide stretch adds (auditor/rules/microstrip.py)."""

from __future__ import annotations

from dataclasses import replace

import pytest
from rule_records import context, get_rule, path, sensor, surroundings

from auditor.field.crosssection import TraceSection, trace_pf_per_mm
from auditor.rules.microstrip import added_pf, microstrip_pf_per_mm, plane_height_mm
from auditor.sensors.model import LayerShadow, TraceRun


@pytest.mark.parametrize(("u", "er", "pf_per_m"), [
    (0.1, 1.0, 12.6947), (1.0, 1.0, 26.3846), (5.0, 1.0, 67.5670),
    (0.1, 4.4, 36.9823), (1.0, 4.4, 83.5817), (5.0, 4.4, 245.712), (1.0, 10.0, 176.915)])
def test_matches_the_hammerstad_jensen_table(u: float, er: float, pf_per_m: float) -> None:
    # physics.md §1.8, HJ column (Hammerstad & Jensen, IEEE MTT-S Digest 1980)
    assert microstrip_pf_per_mm(u, 1.0, er) * 1000 == pytest.approx(pf_per_m, rel=2e-4)


@pytest.mark.parametrize(("w", "h", "pf_per_mm"), [
    (0.2, 1.6, 0.0392), (0.15, 1.6, 0.0364), (0.2, 1.0, 0.0446), (0.2, 0.2, 0.0836)])
def test_matches_the_moment_method_values(w: float, h: float, pf_per_mm: float) -> None:
    # physics.md §1.8, sense trace over solid ground, FR-4 er 4.4 (2-D MoM)
    assert microstrip_pf_per_mm(w, h) == pytest.approx(pf_per_mm, rel=5e-3)


@pytest.mark.parametrize("w", [0.15, 0.3, 1.0])
def test_agrees_with_the_cross_section_solver(w: float) -> None:
    # an independent check: the package's own 2-D field solve of the section
    solved = trace_pf_per_mm(TraceSection(w, 1.6, None))
    assert microstrip_pf_per_mm(w, 1.6) == pytest.approx(solved, rel=0.01)


def test_plane_height_from_the_measured_depths() -> None:
    four = surroundings(shadows=(LayerShadow("In1.Cu", 0.2, 1.0, 1.0, "solid"),
                                 LayerShadow("In2.Cu", 1.4, 1.0, 1.0, "solid"),
                                 LayerShadow("B.Cu", 1.6, 0.0, 0.0, "none")))
    s = sensor(surroundings=four)
    assert plane_height_mm(s, "F.Cu") == pytest.approx(0.2)
    assert plane_height_mm(s, "B.Cu") == pytest.approx(0.2)
    assert plane_height_mm(s, "In2.Cu") == pytest.approx(0.2)
    assert plane_height_mm(sensor(surroundings=surroundings(shadows=())), "F.Cu") == 1.6


def test_a_neck_adds_next_to_nothing_a_long_wide_run_adds_more() -> None:
    s = sensor()  # over a plane 1.5 mm below (rule_records)
    neck = added_pf(s, (TraceRun("F.Cu", 0.30, 1.0),), 0.25)
    # hand check: 1 mm x (C'(0.30) - C'(0.25)) at h = 1.5 mm, about 2.3 fF
    assert 0.001 < neck < 0.004
    long_run = added_pf(s, (TraceRun("F.Cu", 0.5, 26.0),), 0.25)
    assert long_run == pytest.approx(26 * (microstrip_pf_per_mm(0.5, 1.5)
                                           - microstrip_pf_per_mm(0.25, 1.5)))
    assert long_run > 0.1


def test_rule_passes_a_neck_and_flags_a_wide_trace() -> None:
    rule = get_rule("trace-too-wide")
    neck = sensor(path=path(runs=(TraceRun("F.Cu", 0.30, 0.3), TraceRun("F.Cu", 0.15, 30.0))))
    assert rule.run(context(neck)) == []
    wide = replace(neck, path=path(runs=(TraceRun("F.Cu", 0.5, 30.0),)))
    (found,) = rule.run(context(wide))
    assert dict(found.measured)["added_pf"] > dict(found.measured)["max_added_pf"]
