"""Every rule on hand-built sensor records: one record that triggers it and a
near miss that does not, under the default profile.

Limits come from rules/default.toml (physics.md §4.1 rules of thumb, common
practice, no source); the records sit just either side of them, so a rule
that compares the wrong way or reads the wrong threshold fails here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import pytest
from precise_records import precise_cases
from rule_records import context, get_rule, path, sensor, surroundings

from auditor.model.items import ReadWarning
from auditor.model.results import DRIVEN_SHIELD_NOTE, PadMetrics
from auditor.rules.context import RuleContext
from auditor.rules.registry import all_rules, run_rules
from auditor.sensors.model import LayerShadow, Neighbour, Sensor, TraceRun


def ids(ctx: RuleContext, rule_id: str) -> list[str]:
    """Rule ids of the findings of one rule (errors re-raised)."""
    return [f.rule_id for f in get_rule(rule_id).run(ctx)]


def metrics(cp: float = 15.0, dc: float = 0.5) -> PadMetrics:
    return PadMetrics(cp_pad_pf=cp - 1, cp_trace_pf=1.0, cp_total_pf=cp, delta_c_pf=dc,
                      delta_ratio=dc / cp)


def slider(areas: tuple[float, ...], lengths: tuple[float, ...]) -> RuleContext:
    segs = []
    for i, (area, length) in enumerate(zip(areas, lengths, strict=True)):
        base = sensor(f"SLIDER_{i + 1}", diameter_mm=2 * math.sqrt(area / math.pi))
        segs.append(replace(base, kind="slider", group="SLIDER", index=i,
                            path=path(length_mm=length, runs=(TraceRun("F.Cu", 0.15, length),))))
    return context(*segs)


def bare(*sensors: Sensor) -> RuleContext:
    """A context with no overlay: the finger touches the board."""
    ctx = context(*sensors)
    return replace(ctx, settings=replace(ctx.settings, overlay_thickness_mm=0.0,
                                         overlay_electrical_mm=0.0))


def configured(*sensors: Sensor) -> RuleContext:
    """A context whose configuration names electrodes."""
    ctx = context(*sensors)
    return replace(ctx, settings=replace(ctx.settings, electrodes_configured=True))


@dataclass(frozen=True)
class Pair:
    rule_id: str
    bad: RuleContext
    good: RuleContext


TWO = (sensor("TOUCH1"), sensor("TOUCH2"))

PAIRS = [
    # 2 mm acrylic (er 2.8): 0.714 mm electrical -> need max(6, 7.14) mm
    Pair("electrode-too-small", context(sensor(diameter_mm=7.0)), context(sensor(diameter_mm=7.3))),
    Pair("electrode-too-large", context(sensor(diameter_mm=20.5)),
         context(sensor(diameter_mm=19.5))),
    Pair("electrode-far-side", context(sensor(layer="B.Cu")), context(sensor())),
    # the finger on the board itself (no overlay) vs under the 2 mm cover
    Pair("electrode-mask-open", bare(sensor(exposed=True)), bare(sensor())),
    Pair("electrode-mask-open-covered", context(sensor(exposed=True)), context(sensor())),
    Pair("electrode-paste", context(sensor(pasted=True)), context(sensor())),
    Pair("electrodes-too-close",
         context(sensor("TOUCH1", surroundings=surroundings(nearest_sensor="TOUCH2",
                                                              nearest_sensor_mm=1.9))),
         context(sensor("TOUCH1", surroundings=surroundings(nearest_sensor="TOUCH2",
                                                              nearest_sensor_mm=2.1)))),
    Pair("electrodes-share-net", context(TWO[0], replace(TWO[1], nets=("TOUCH1",))),
         context(*TWO)),
    Pair("ground-gap-tight", context(sensor(surroundings=surroundings(min_gap_mm=0.45))),
         context(sensor(surroundings=surroundings(min_gap_mm=0.5)))),
    Pair("ground-gap-wide", context(sensor(surroundings=surroundings(typical_gap_mm=2.2))),
         context(sensor(surroundings=surroundings(typical_gap_mm=2.0)))),
    Pair("copper-under-electrode",
         context(sensor(surroundings=surroundings(
             shadows=(LayerShadow("B.Cu", 1.5, 0.8, 1.0, "solid", ("GND",)),)))),
         context(sensor(surroundings=surroundings(
             shadows=(LayerShadow("B.Cu", 1.5, 0.05, 1.0, "solid", ("GND",)),))))),
    Pair("floating-copper-near",
         context(sensor(surroundings=surroundings(floating_copper=((20.0, 12.0, 3.0),)))),
         context(sensor(surroundings=surroundings(floating_copper=((25.0, 12.0, 8.0),))))),
    Pair("noisy-part-near",
         context(sensor(surroundings=surroundings(noisy_parts=(("D1", 1.5),)))),
         context(sensor(surroundings=surroundings(noisy_parts=(("D1", 2.5),))))),
    # pad area 78.5 mm²: ratio 4 needs 314 mm² of ground
    Pair("ground-ratio-small", context(sensor(surroundings=surroundings(ground_area_mm2=300.0))),
         context(sensor(surroundings=surroundings(ground_area_mm2=330.0)))),
    Pair("trace-unfollowed", context(sensor(path=path(complete=False))), context(sensor())),
    Pair("trace-too-long", context(sensor(path=path(length_mm=301.0))),
         context(sensor(path=path(length_mm=299.0)))),
    # 0.5 mm for 30 mm adds about 0.3 pF over 0.25 mm (Hammerstad & Jensen
    # microstrip, h 1.5 mm); 0.3 mm for 5 mm adds about 0.01 pF
    Pair("trace-too-wide", context(sensor(path=path(runs=(TraceRun("F.Cu", 0.5, 30.0),)))),
         context(sensor(path=path(runs=(TraceRun("F.Cu", 0.3, 5.0),))))),
    Pair("trace-too-many-vias", context(sensor(path=path(vias=3))),
         context(sensor(path=path(vias=2)))),
    Pair("trace-parallel-run",
         context(sensor(path=path(neighbours=(Neighbour("VCC", parallel_mm=6.0,
                                                        min_distance_mm=0.5),)))),
         context(sensor(path=path(neighbours=(Neighbour("VCC", parallel_mm=4.0,
                                                        min_distance_mm=0.5),))))),
    Pair("trace-near-noisy-net",
         context(sensor(path=path(neighbours=(Neighbour("PWM", 1.0, 3.0, noisy=True),)))),
         context(sensor(path=path(neighbours=(Neighbour("PWM", 1.0, 4.5, noisy=True),))))),
    Pair("trace-crossings",
         context(sensor(path=path(neighbours=(Neighbour("A", crossings=2),
                                              Neighbour("B", crossings=1))))),
         context(sensor(path=path(neighbours=(Neighbour("A", crossings=2),))))),
    Pair("trace-under-electrode", context(sensor(path=path(under_electrodes=("TOUCH2",)))),
         context(sensor())),
    Pair("series-resistor-missing", context(sensor(path=path(series_ref="",
                                                             series_to_pin_mm=None))),
         context(sensor())),
    Pair("series-resistor-far", context(sensor(path=path(series_to_pin_mm=10.5))),
         context(sensor(path=path(series_to_pin_mm=9.5)))),
    Pair("segments-unequal-area", slider((60, 72, 72, 72), (30,) * 4),
         slider((70, 72, 72, 72), (30,) * 4)),
    Pair("segments-unequal-trace", slider((72,) * 4, (30, 30, 30, 51)),
         slider((72,) * 4, (30, 30, 30, 49))),
    Pair("read-incomplete", context(sensor(), read_warnings=(ReadWarning("unknown-token", "x"),)),
         context(sensor())),
    Pair("no-sensors", configured(), configured(sensor())),
    Pair("no-electrodes", context(), context(sensor())),
    Pair("cp-too-high", context(sensor(), metrics={"TOUCH1": metrics(cp=31.0)}),
         context(sensor(), metrics={"TOUCH1": metrics(cp=29.0)})),
    Pair("delta-c-low", context(sensor(), metrics={"TOUCH1": metrics(dc=0.09)}),
         context(sensor(), metrics={"TOUCH1": metrics(dc=0.11)})),
    # ratio: 0.14 / 15 = 0.93 % < 1 %; 0.16 / 15 = 1.07 %
    Pair("ratio-low", context(sensor(), metrics={"TOUCH1": metrics(dc=0.14)}),
         context(sensor(), metrics={"TOUCH1": metrics(dc=0.16)})),
]

# ratio: 5.5 / 10 = 55 % > 50 %; 4.5 / 10 = 45 % (max_plausible_ratio 0.5, rules/default.toml)
PAIRS += [Pair("model-implausible", context(sensor(), metrics={"TOUCH1": metrics(10.0, 5.5)}),
               context(sensor(), metrics={"TOUCH1": metrics(10.0, 4.5)}))]

# the field step ran but could not solve the electrode (e.g. a loop in quick mode)
PAIRS += [Pair("electrode-unsolved", context(sensor(), unsolved={"TOUCH1": "a loop"}),
               context(sensor()))]

# precise-mode rules on hand-built precise records (tests/unit/rules/precise_records.py)
PAIRS += [Pair(rule_id, context(precise=bad), context(precise=good))
          for rule_id, bad, good in precise_cases()]


def test_every_rule_has_a_record_pair() -> None:
    assert sorted(p.rule_id for p in PAIRS) == sorted(s.rule_id for s in all_rules())


@pytest.mark.parametrize("pair", PAIRS, ids=lambda p: p.rule_id)
def test_rule_triggers_on_bad_record(pair: Pair) -> None:
    assert ids(pair.bad, pair.rule_id) == [pair.rule_id]


@pytest.mark.parametrize("pair", PAIRS, ids=lambda p: p.rule_id)
def test_rule_stays_quiet_on_near_miss(pair: Pair) -> None:
    assert ids(pair.good, pair.rule_id) == []


def test_metric_rules_quiet_without_metrics() -> None:
    ctx = context(sensor())
    for rule_id in ("cp-too-high", "delta-c-low", "ratio-low"):
        assert ids(ctx, rule_id) == []


def test_slider_segments_not_too_close_to_each_other() -> None:
    a = replace(sensor("SLIDER_1"), kind="slider", group="S",
                surroundings=surroundings(nearest_sensor="SLIDER_2", nearest_sensor_mm=0.5))
    b = replace(sensor("SLIDER_2"), kind="slider", group="S",
                surroundings=surroundings(nearest_sensor="SLIDER_1", nearest_sensor_mm=0.5))
    assert ids(context(a, b), "electrodes-too-close") == []


def test_close_pair_reported_once() -> None:
    a = sensor("TOUCH1", surroundings=surroundings(nearest_sensor="TOUCH2", nearest_sensor_mm=1.0))
    b = sensor("TOUCH2", surroundings=surroundings(nearest_sensor="TOUCH1", nearest_sensor_mm=1.0))
    found = get_rule("electrodes-too-close").run(context(a, b))
    assert len(found) == 1 and found[0].refs == ("E1", "E2")


def test_spacing_grows_with_overlay_thickness() -> None:
    # 3 mm cover: spacing must be at least 3 mm (physics.md §4.1, adjacent pads)
    s = sensor(surroundings=surroundings(nearest_sensor="TOUCH2", nearest_sensor_mm=2.5))
    ctx = context(s)
    thick = replace(ctx, settings=replace(ctx.settings, overlay_thickness_mm=3.0))
    assert ids(ctx, "electrodes-too-close") == []
    assert ids(thick, "electrodes-too-close") == ["electrodes-too-close"]


def test_minimum_pad_grows_with_electrical_thickness() -> None:
    # 3 mm of er 2.2 (polypropylene) is 1.36 mm electrical: 13.6 mm needed
    s = sensor(diameter_mm=12.0)
    ctx = context(s)
    thick = replace(ctx, settings=replace(ctx.settings, overlay_electrical_mm=3.0 / 2.2))
    assert ids(ctx, "electrode-too-small") == []
    found = get_rule("electrode-too-small").run(thick)
    assert dict(found[0].measured)["min_mm"] == pytest.approx(13.636, abs=1e-3)


def test_mains_product_exempt_from_ground_ratio() -> None:
    ctx = context(sensor(surroundings=surroundings(ground_area_mm2=10.0)))
    assert ids(ctx, "ground-ratio-small") == ["ground-ratio-small"]
    mains = replace(ctx, settings=replace(ctx.settings, power="mains"))
    assert ids(mains, "ground-ratio-small") == []


def test_configured_noisy_net_counts_as_noisy() -> None:
    s = sensor(path=path(neighbours=(Neighbour("MOTOR_DRV", 1.0, 1.0),)))
    ctx = context(s)
    assert ids(ctx, "trace-near-noisy-net") == []
    noisy = replace(ctx, settings=replace(ctx.settings, noisy_nets=("MOTOR*",)))
    assert ids(noisy, "trace-near-noisy-net") == ["trace-near-noisy-net"]


def test_equivalent_diameter_of_square_pad() -> None:
    # 10 x 10 mm square: disk of equal area has d = 2 sqrt(100/pi) = 11.284 mm (arithmetic)
    s = replace(sensor(), area_mm2=100.0)
    assert s.equivalent_diameter_mm == pytest.approx(11.2838, abs=1e-4)


def test_crashing_rule_reported_by_name_and_others_still_run(
        monkeypatch: pytest.MonkeyPatch) -> None:
    spec = get_rule("trace-too-long")

    def broken(sensor: object, call: object) -> None:
        raise RuntimeError("boom")

    from auditor.rules import registry

    monkeypatch.setitem(registry._REGISTRY, spec.rule_id, replace(spec, function=broken))
    ctx = context(sensor(path=path(vias=5)))
    ran = run_rules(ctx)
    assert ran.errors == (("trace-too-long", "RuntimeError: boom"),)
    assert "trace-too-many-vias" in {f.rule_id for f in ran.findings}


def test_rule_reading_undeclared_threshold_crashes_visibly(
        monkeypatch: pytest.MonkeyPatch) -> None:
    spec = get_rule("trace-too-many-vias")
    from auditor.rules import registry

    ctx = context(sensor(path=path(vias=5)))
    monkeypatch.setitem(registry._REGISTRY, spec.rule_id, replace(spec, thresholds=()))
    ran = run_rules(ctx, [spec.rule_id])
    assert ran.errors and "trace_max_vias" in ran.errors[0][1]


def test_findings_are_located_and_sorted() -> None:
    found = get_rule("electrodes-share-net").run(
        context(sensor("TOUCH2", nets=("TOUCH1",)), sensor("TOUCH1")))
    assert found[0].nets == ("TOUCH1",) and found[0].refs == ("E1", "E2")
    assert (found[0].x_mm, found[0].y_mm, found[0].layer) == (12.0, 12.0, "F.Cu")


def test_segment_gap_has_its_own_limit() -> None:
    # segments sit about 0.5 mm apart (physics.md §4.1, sliders); 0.47 mm is fine for
    # a segment, not for a button
    seg = replace(sensor("SLIDER_1"), kind="slider", group="S",
                  surroundings=surroundings(min_gap_mm=0.47))
    assert ids(context(seg), "ground-gap-tight") == []
    assert ids(context(sensor(surroundings=surroundings(min_gap_mm=0.47))),
               "ground-gap-tight") == ["ground-gap-tight"]
    tight = replace(seg, surroundings=surroundings(min_gap_mm=0.2))
    assert ids(context(tight), "ground-gap-tight") == ["ground-gap-tight"]


def test_sense_neighbour_needs_only_two_widths() -> None:
    # two sense traces: spacing >= 2x width suffices (physics.md §4.1, spacing)
    near = sensor(path=path(neighbours=(Neighbour("TOUCH2", parallel_mm=40.0,
                                                  min_distance_mm=0.35),)))
    ctx = context(near)
    assert ids(ctx, "trace-parallel-run") == ["trace-parallel-run"]  # not known as sense
    sense = replace(ctx, settings=replace(ctx.settings, sense_nets=("TOUCH1", "TOUCH2")))
    assert ids(sense, "trace-parallel-run") == []
    closer = context(sensor(path=path(neighbours=(Neighbour("TOUCH2", 40.0, 0.25),))))
    closer = replace(closer, settings=replace(closer.settings, sense_nets=("TOUCH2",)))
    assert ids(closer, "trace-parallel-run") == ["trace-parallel-run"]


def test_polygonisation_noise_is_not_a_finding() -> None:
    # a 2 mm clearance drawn round measures a few µm more on polygonised arcs
    s = sensor(surroundings=surroundings(typical_gap_mm=2.004))
    assert ids(context(s), "ground-gap-wide") == []


def test_segment_ground_gap_measured_apart_from_neighbours() -> None:
    seg = replace(sensor("SLIDER_1"), kind="slider", group="S",
                  surroundings=surroundings(min_gap_mm=0.5, min_ground_gap_mm=0.3))
    found = get_rule("ground-gap-tight").run(context(seg))
    assert len(found) == 1 and "ground GND" in found[0].message


def test_wide_gap_prefers_ground_only_measure() -> None:
    s = sensor(surroundings=surroundings(typical_gap_mm=1.0, typical_ground_gap_mm=3.0))
    assert ids(context(s), "ground-gap-wide") == ["ground-gap-wide"]


def test_neighbour_marked_sense_by_sensor_stage() -> None:
    s = sensor(path=path(neighbours=(Neighbour("Net-(R2-2)", 40.0, 0.5, sense=True),)))
    assert ids(context(s), "trace-parallel-run") == []


def test_no_ground_near_counts_as_wide() -> None:
    s = sensor(surroundings=surroundings(typical_gap_mm=None, min_gap_mm=None))
    assert ids(context(s), "ground-gap-wide") == ["ground-gap-wide"]
    prox = replace(s, kind="proximity")
    assert ids(context(prox), "ground-gap-wide") == []


def _pad_metrics(cp_pad: float, dc: float = 0.5) -> PadMetrics:
    return PadMetrics(cp_pad_pf=cp_pad, cp_trace_pf=1.0, cp_total_pf=cp_pad + 6.0,
                      delta_c_pf=dc, delta_ratio=dc / (cp_pad + 6.0))


def test_pad_below_isolated_disk_is_implausible() -> None:
    """10 mm disk: 8 eps0 a = 0.3542 pF (Jackson 1999 sec. 3.13); the floor is
    applied 2 % low, so 0.34 pF is flagged and 0.35 pF is not."""
    for cp_pad, expect in ((0.34, ["model-implausible"]), (0.35, []), (2.0, [])):
        ctx = context(sensor(), metrics={"TOUCH1": _pad_metrics(cp_pad)})
        assert ids(ctx, "model-implausible") == expect, cp_pad


def test_driven_shield_lifts_the_isolated_disk_floor() -> None:
    """With a driven shield at the pad's potential the pad's own charge (its
    Cp) can be far below 8 eps0 a: two coaxial disks at one potential share
    the charge (Love 1949, C11 + C12 per disk below 8 eps0 a; physics.md
    1.4). The 3-D solve's shield note lifts the floor; without it, flagged."""
    low = _pad_metrics(0.05)
    shielded = replace(low, notes=(DRIVEN_SHIELD_NOTE + "SHIELD held at the electrode's "
                                   "potential",))
    assert ids(context(sensor(), metrics={"TOUCH1": low}), "model-implausible") == [
        "model-implausible"]
    assert ids(context(sensor(), metrics={"TOUCH1": shielded}), "model-implausible") == []


def test_negative_change_is_implausible_and_measured() -> None:
    ctx = context(sensor(), metrics={"TOUCH1": _pad_metrics(3.0, dc=-0.01)})
    (finding,) = get_rule("model-implausible").run(ctx)
    assert "negative" in finding.message and dict(finding.measured)["delta_c_pf"] == -0.01
    zero = context(sensor(), metrics={"TOUCH1": _pad_metrics(3.0, dc=0.0)})
    assert ids(zero, "model-implausible") == []


def test_implausible_not_judged_on_mutual_pairs() -> None:
    rx = sensor(kind="mutual-rx")
    ctx = context(rx, metrics={"TOUCH1": _pad_metrics(0.1, dc=-0.05)})
    assert ids(ctx, "model-implausible") == []


def test_no_gap_at_all_is_said_as_touching_copper() -> None:
    # gaps are taken on the electrode's own layer, so 0 mm means copper of
    # another net touches it there: a short, not a tight clearance
    found = get_rule("ground-gap-tight").run(
        context(sensor(surroundings=surroundings(min_gap_mm=0.0))))
    assert len(found) == 1
    assert "touches or overlaps the electrode on F.Cu" in found[0].message
    assert "gap to" not in found[0].message
    tight = get_rule("ground-gap-tight").run(
        context(sensor(surroundings=surroundings(min_gap_mm=0.2))))
    assert tight[0].message.startswith("gap to surrounding copper is 0.20 mm")


def test_unsolved_electrodes_one_finding_per_reason() -> None:
    # 64 keys of an unrouted board left unsolved for one reason: one cause,
    # one finding, every electrode in its nets and refs
    keys = [sensor(f"K{i}") for i in range(1, 5)]
    unsolved = {s.name: "sense path not followed" for s in keys[:3]} | {"K4": "a loop"}
    found = get_rule("electrode-unsolved").run(context(*keys, unsolved=unsolved))
    assert len(found) == 2
    many = next(f for f in found if "sense path" in f.message)
    assert many.message.startswith("3 electrodes have no field result (sense path not followed)")
    assert many.nets == ("K1", "K2", "K3")


def test_paired_transmitter_has_no_result_by_design() -> None:
    tx = replace(sensor("TX1"), kind="mutual-tx", group="KEY1")
    rx = replace(sensor("RX1"), kind="mutual-rx", group="KEY1")
    why = {"TX1": "transmit electrode: its pair's receive electrode carries Cm"}
    assert ids(context(tx, rx, unsolved=why), "electrode-unsolved") == []
    lone = replace(tx, group="")  # no receive side to carry it: still reported
    assert ids(context(lone, unsolved=why), "electrode-unsolved") == ["electrode-unsolved"]


def test_trace_under_several_electrodes_is_one_finding() -> None:
    """One trace passing three other keys is one cause (common practice, no
    source): one finding naming them all, with their nets."""
    keys = [sensor(f"TOUCH{i}") for i in (2, 3, 4)]
    under = sensor("TOUCH1", path=path(under_electrodes=("TOUCH4", "TOUCH2", "TOUCH3")))
    (found,) = get_rule("trace-under-electrode").run(context(under, *keys))
    assert found.message == ("sense trace passes under or beside 3 electrodes: "
                             "TOUCH2, TOUCH3, TOUCH4")
    assert set(found.nets) == {"TOUCH1", "TOUCH2", "TOUCH3", "TOUCH4"}


def test_unequal_segment_traces_give_the_solved_cp_when_known() -> None:
    """Each segment's trace adds to its baseline (physics.md §1.8, about
    0.04-0.06 pF/mm over ground); the solved Cp says how much the lengths
    matter, so the message carries it when every segment was solved."""
    ctx = slider((72,) * 4, (30, 30, 30, 51))
    solved = replace(ctx, metrics={f"SLIDER_{i}": metrics(cp=cp) for i, cp in
                                   ((1, 12.0), (2, 12.1), (3, 12.2), (4, 13.0))})
    (plain,) = get_rule("segments-unequal-trace").run(ctx)
    (with_cp,) = get_rule("segments-unequal-trace").run(solved)
    assert "solved" not in plain.message
    assert with_cp.message.endswith("limit 20.0 mm; solved Cp 12.0 to 13.0 pF)")
