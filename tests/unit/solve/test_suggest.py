"""Suggested fixes: each predicted value is a direct solve of the changed setup.

Every test builds the changed setup itself with :func:`dataclasses.replace`
and solves it with :func:`auditor.field.api.solve_pad`; the suggestion must
carry exactly those numbers (same model, same bits) and the change must be
the smallest on its grid that clears the limit. The trends the searches
rely on (a bigger pad or a thinner cover gives a larger ΔC, a wider gap or
less copper under the pad a smaller Cp) are physics.md §4.1 (common
practice, no source) and are asserted where a search depends on them.
"""

from __future__ import annotations

import math
from dataclasses import replace

import pytest

from auditor.config import Config
from auditor.field.api import BoardLayer, PadSetup, TraceRunSpec, solve_pad
from auditor.model.suggestions import Predicted
from auditor.solve.suggest import MARGIN, suggestions_for
from auditor.solve.suggest_levers import Electrode
from auditor.solve.suggest_search import Predictor, Recorder, grid_values, smallest_clearing

LIMITS = {"pad_min_diameter_mm": 6.0, "pad_diameter_per_electrical_mm": 10.0,
          "pad_max_diameter_mm": 20.0, "ground_gap_max_mm": 2.0, "under_fill_max_ratio": 0.5}
SETUP = PadSetup(pad_area_mm2=math.pi * 3.0 ** 2, gap_mm=0.5, plane_depth_mm=1.6,
                 board_layers=(BoardLayer(1.6, 4.4),), overlay_mm=2.0, overlay_er=2.8)


def electrode(setup: PadSetup = SETUP, **limits: float) -> Electrode:
    return Electrode(setup, Config(), None, {**LIMITS, **limits}, "B.Cu", 1.0)


def solved(setup: PadSetup) -> Predicted:
    s = solve_pad(setup)
    return Predicted(s.cp_total_pf, s.delta_c_pf, s.delta_ratio)


def disk(diameter_mm: float) -> float:
    return math.pi * (0.5 * diameter_mm) ** 2


def test_grid_values_run_from_the_start_to_the_bound() -> None:
    assert grid_values(6.0, 6.35, 0.1) == (6.1, 6.2, 6.3, 6.35)
    assert grid_values(0.2, 0.35, 0.05) == (0.25, 0.3, 0.35)


def test_search_finds_the_first_clearing_grid_value_in_few_solves() -> None:
    # A linear margin crossing zero at 13.37: the first grid value past it is
    # 13.4 (hand computation); interpolation needs far fewer solves than the
    # 140 grid points.
    calls: list[float] = []

    def evaluate(value: float) -> Predicted:
        calls.append(value)
        return Predicted(0.0, value - 13.37, 0.0)

    found = smallest_clearing(evaluate, lambda _v, p: p.delta_c_pf, 6.0, -7.37, 20.0, 0.1)
    assert found is not None and found.clears and found.value == pytest.approx(13.4)
    assert len(set(calls)) <= 5


def test_electrode_too_small_pad_diameter_is_the_rule_s_own_limit() -> None:
    predict = Predictor()
    out = suggestions_for("electrode-too-small", {"diameter_mm": 5.9, "min_mm": 7.14}, "F.Cu",
                          electrode(), predict)
    pad = out[0]
    assert (pad.parameter, pad.from_value, pad.to_value, pad.clears) == (
        "pad_diameter_mm", 6.0, 7.2, True)
    assert pad.before == solved(SETUP)
    assert pad.predicted == solved(replace(SETUP, pad_area_mm2=disk(7.2)))
    # 5.9 mm is under the 6 mm floor: no cover alone can clear it
    assert len(out) == 1


def test_electrode_too_small_best_cover_change() -> None:
    # 6.5 mm needs an electrical thickness of at most 0.65 mm: 1.8 mm of
    # er 2.8 (0.643) or 2 mm of er 3.1 (0.645), hand computation.
    out = suggestions_for("electrode-too-small", {"diameter_mm": 6.5, "min_mm": 7.14}, "F.Cu",
                          electrode(replace(SETUP, pad_area_mm2=disk(6.5))), Predictor())
    cover = out[1]
    base = replace(SETUP, pad_area_mm2=disk(6.5))
    thinner = solved(replace(base, overlay_mm=1.8))
    denser = solved(replace(base, overlay_er=3.1))
    assert cover.parameter in ("overlay_mm", "overlay_er")
    expected = {"overlay_mm": (1.8, thinner), "overlay_er": (3.1, denser)}[cover.parameter]
    assert (cover.to_value, cover.predicted) == expected
    assert cover.predicted.delta_c_pf == max(thinner.delta_c_pf, denser.delta_c_pf)


@pytest.mark.parametrize("rule_id, key, metric", [
    ("delta-c-low", "min_pf", "delta_c_pf"), ("ratio-low", "min_ratio", "delta_ratio")])
def test_signal_low_pad_is_the_smallest_that_clears(rule_id: str, key: str, metric: str) -> None:
    before = solved(SETUP)
    limit = 1.3 * getattr(before, metric)
    out = suggestions_for(rule_id, {key: limit}, "F.Cu", electrode(), Predictor())
    pad = next(s for s in out if s.parameter == "pad_diameter_mm")
    assert pad.clears
    at = solved(replace(SETUP, pad_area_mm2=disk(pad.to_value)))
    below = solved(replace(SETUP, pad_area_mm2=disk(round(pad.to_value - 0.1, 4))))
    assert pad.predicted == at
    assert getattr(at, metric) >= limit * (1 + MARGIN) > getattr(below, metric)


def test_signal_low_best_alternative_is_a_direct_solve() -> None:
    before = solved(SETUP)
    out = suggestions_for("ratio-low", {"min_ratio": 1.2 * before.delta_ratio}, "F.Cu",
                          electrode(), Predictor())
    other = out[1]
    changed = {"overlay_mm": replace(SETUP, overlay_mm=other.to_value),
               "overlay_er": replace(SETUP, overlay_er=other.to_value),
               "ground_gap_mm": replace(SETUP, gap_mm=other.to_value),
               }.get(other.parameter)
    if other.parameter == "plane_fill":
        changed = (replace(SETUP, plane_fill=other.to_value) if other.to_value
                   else replace(SETUP, plane_depth_mm=None))
    assert changed is not None
    assert other.predicted == solved(changed)
    assert other.clears and other.predicted.delta_ratio >= 1.2 * before.delta_ratio


def test_no_change_in_range_says_so() -> None:
    out = suggestions_for("delta-c-low", {"min_pf": 5.0}, "F.Cu", electrode(), Predictor())
    pad = out[0]
    assert not pad.clears and pad.to_value == 20.0
    assert pad.change.startswith("not enough on its own")
    assert pad.predicted == solved(replace(SETUP, pad_area_mm2=disk(20.0)))


def test_ground_gap_tight_is_solved_at_the_rule_s_gap() -> None:
    setup = replace(SETUP, gap_mm=0.2)
    (gap,) = suggestions_for("ground-gap-tight", {"gap_mm": 0.2, "min_mm": 0.5}, "F.Cu",
                             electrode(setup), Predictor())
    assert (gap.parameter, gap.from_value, gap.to_value) == ("ground_gap_mm", 0.2, 0.5)
    assert gap.predicted == solved(replace(setup, gap_mm=0.5))
    # a wider gap lowers Cp and raises ΔC (physics.md §4.1)
    assert gap.predicted.cp_total_pf < gap.before.cp_total_pf
    assert gap.predicted.delta_c_pf > gap.before.delta_c_pf


def test_copper_under_electrode_hatch_and_clear() -> None:
    hatch, clear = suggestions_for("copper-under-electrode", {}, "B.Cu", electrode(),
                                   Predictor())
    assert (hatch.to_value, clear.to_value) == (0.5, 0.0)
    assert hatch.predicted == solved(replace(SETUP, plane_fill=0.5))
    assert clear.predicted == solved(replace(SETUP, plane_depth_mm=None))
    assert clear.predicted.cp_total_pf < hatch.predicted.cp_total_pf < hatch.before.cp_total_pf
    # copper on another layer than the modelled plane: no prediction
    assert suggestions_for("copper-under-electrode", {}, "In1.Cu", electrode(),
                           Predictor()) == ()


def test_cp_too_high_names_the_trace_and_shortens_it() -> None:
    setup = replace(SETUP, traces=(TraceRunSpec(0.15, 300.0, 1.6, None),))
    before = solved(setup)
    limit = before.cp_total_pf - 2.0
    out = suggestions_for("cp-too-high", {"max_pf": limit}, "F.Cu", electrode(setup),
                          Predictor())
    trace = next(s for s in out if s.parameter == "trace_length_mm")
    assert trace.from_value == 300.0 and trace.clears
    short = solved(replace(setup, traces=(TraceRunSpec(0.15, trace.to_value, 1.6, None),)))
    longer = solved(replace(setup, traces=(TraceRunSpec(0.15, trace.to_value + 1, 1.6, None),)))
    assert trace.predicted == short
    assert short.cp_total_pf <= limit * (1 - MARGIN) < longer.cp_total_pf
    assert out[0].change.startswith("largest share of Cp: trace")
    clear = next(s for s in out if s.to_value == 0.0 and s.parameter == "plane_fill")
    assert clear.predicted == solved(replace(setup, plane_depth_mm=None))


def test_rules_without_a_field_effect_get_none() -> None:
    for rule_id in ("series-resistor-far", "trace-crossings", "trace-near-noisy-net"):
        assert suggestions_for(rule_id, {}, "F.Cu", electrode(), Predictor()) == ()


def test_capacitance_outside_the_field_model_is_kept_in_cp_total() -> None:
    # A controller pin of 5 pF adds to Cp in parallel (capacitors in
    # parallel add, circuit theory); ΔC is unchanged and ΔC/Cp follows.
    lumped = replace(electrode(), lumped_pf=5.0)
    hatch, clear = suggestions_for("copper-under-electrode", {}, "B.Cu", lumped, Predictor())
    field = solved(replace(SETUP, plane_depth_mm=None))
    assert clear.predicted.cp_total_pf == field.cp_total_pf + 5.0
    assert clear.predicted.delta_c_pf == field.delta_c_pf
    assert clear.predicted.delta_ratio == field.delta_c_pf / (field.cp_total_pf + 5.0)
    out = suggestions_for("cp-too-high", {"max_pf": 6.0}, "F.Cu", lumped, Predictor())
    assert "pin and parts 5.0" in out[0].change


def test_dry_run_notes_the_first_setups_and_prefetch_gives_the_same_numbers() -> None:
    # The dry run asks for the unchanged setup and each discrete change; the
    # prefetched solves (helper processes allowed) equal direct solves.
    recorder = Recorder()
    suggestions_for("copper-under-electrode", {}, "B.Cu", electrode(), recorder)
    hatched, cleared = replace(SETUP, plane_fill=0.5), replace(SETUP, plane_depth_mm=None)
    assert set(recorder.asked) == {SETUP, hatched, cleared}
    predict = Predictor()
    predict.prefetch(recorder.asked, workers=2)
    assert predict.solves == 3
    assert [predict(s) for s in (SETUP, hatched, cleared)] == [
        solved(SETUP), solved(hatched), solved(cleared)]
