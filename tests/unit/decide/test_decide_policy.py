"""decide: levels (default < profile < config), waivers with stale ones
reported, the baseline seam, deterministic order, verdicts and ranks."""

from __future__ import annotations

import random

import pytest

from auditor.config.model import Waiver
from auditor.decide import Policy, decide, mark_baseline, sensitivity_ranks, sensor_strength
from auditor.model.results import PadMetrics
from auditor.rules.finding import Finding, Severity
from auditor.rules.registry import all_rules

RULES = all_rules()


def finding(rule_id: str, sensor: str = "TOUCH1", ref: str = "E1",
            severity: Severity = Severity.WARNING) -> Finding:
    return Finding(rule_id, severity, "m", 1.0, 2.0, "F.Cu", (sensor,), (ref,), (), sensor)


def test_default_severity_kept() -> None:
    out = decide([finding("trace-too-long")], Policy(RULES))
    assert [d.severity for d in out.findings] == [Severity.WARNING]


def test_profile_then_config_override() -> None:
    policy = Policy(RULES, profile_levels={"trace-too-long": "info"})
    assert decide([finding("trace-too-long")], policy).findings[0].severity is Severity.INFO
    policy = Policy(RULES, profile_levels={"trace-too-long": "info"},
                    overrides={"trace-too-long": "error"})
    assert decide([finding("trace-too-long")], policy).findings[0].severity is Severity.ERROR


def test_off_removes_rule_and_its_findings() -> None:
    policy = Policy(RULES, overrides={"trace-too-long": "off"})
    assert "trace-too-long" not in policy.active_rule_ids()
    assert decide([finding("trace-too-long")], policy).findings == ()
    profile_off = Policy(RULES, profile_levels={"copper-under-electrode": "off"})
    assert "copper-under-electrode" not in profile_off.active_rule_ids()
    back_on = Policy(RULES, profile_levels={"copper-under-electrode": "off"},
                     overrides={"copper-under-electrode": "warning"})
    assert "copper-under-electrode" in back_on.active_rule_ids()


def test_waiver_marks_matching_finding_and_stale_one_reported() -> None:
    used = Waiver("trace-too-long", "hinge needs the length", ref="E1", source="p.toml:4")
    stale = Waiver("trace-too-wide", "was wide once", net="TOUCH9", source="p.toml:9")
    out = decide([finding("trace-too-long"), finding("trace-too-long", "TOUCH2", "E2")],
                 Policy(RULES, waivers=(used, stale)))
    waived = {d.finding.sensor: d.waived for d in out.findings}
    assert waived == {"TOUCH1": "hinge needs the length", "TOUCH2": ""}
    assert out.stale_waivers == ("trace-too-wide at net TOUCH9: was wide once (p.toml:9)",)
    assert [d.counts_for_gate for d in out.findings] == [False, True]


def test_waiver_globs_case_insensitive() -> None:
    w = Waiver("trace-too-long", "r", net="touch*")
    assert w.matches(finding("trace-too-long", "TOUCH7"))
    assert not w.matches(finding("trace-too-wide", "TOUCH7"))


def test_order_is_deterministic() -> None:
    items = [finding(r, s, s[-1]) for r in ("trace-too-long", "no-sensors", "trace-too-wide")
             for s in ("TOUCH2", "TOUCH1")]
    shuffled = list(items)
    random.Random(4).shuffle(shuffled)
    a = decide(items, Policy(RULES)).findings
    b = decide(shuffled, Policy(RULES)).findings
    assert a == b
    # errors first (no-sensors is an error by default), then rule id, then sensor
    assert [(d.finding.rule_id, d.finding.sensor) for d in a[:3]] == [
        ("no-sensors", "TOUCH1"), ("no-sensors", "TOUCH2"), ("trace-too-long", "TOUCH1")]


def test_baseline_seam_counts_entries() -> None:
    decided = decide([finding("trace-too-long"), finding("trace-too-long")],
                     Policy(RULES)).findings
    key = decided[0].finding.key
    marked, stale = mark_baseline(decided, {key: 1, ("x", "", (), ()): 1})
    assert [d.in_baseline for d in marked] == [True, False]
    assert stale == (("x", "", (), ()),)


def pf(cp: float, dc: float) -> PadMetrics:
    return PadMetrics(cp, 0.0, cp, dc, dc / cp)


@pytest.mark.parametrize("metrics, verdict", [
    (None, "unsolved"), (pf(10, 0.05), "fail"), (pf(40, 0.5), "weak"),
    (pf(20, 0.15), "weak"), (pf(15, 0.5), "ok"),
])
def test_strengths_follow_default_limits(metrics: PadMetrics | None, verdict: str) -> None:
    limits = {"min_delta_c_pf": 0.1, "min_delta_ratio": 0.01, "controller_max_cp_pf": 30.0}
    assert sensor_strength(metrics, limits) == verdict


def test_ranks_by_ratio_ties_by_name() -> None:
    ranks = sensitivity_ranks({"B": pf(10, 1), "A": pf(10, 1), "C": pf(10, 2)})
    assert ranks == {"C": 1, "A": 2, "B": 3}
