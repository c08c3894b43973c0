"""The judging fixtures (fixtures/make_judging_boards.py): one invented board
per structure that real boards contain, audited layout-only under the default
profile. fixtures/judging/manifest.json lists per board the electrode nets that
must be found, the rule ids that must and must not appear, where some findings
must sit and how many of some there must be.

What each structure must (not) raise is touch-layout practice (common
practice, no source): distances between nets count on one layer only; sense
nets and supply rails are not noise sources whatever their names; protection
diodes switch nothing; a ground, a guard or another sense line crossed
carries no signal of its own (a touch matrix crosses its rows and columns by
design); the stretch of trace several pads on one net share is one cause;
the nets on a controller's neighbouring pins cannot be kept away from its
sense pins; slider and wheel segments are close and
interleaved by design; a board without electrodes is not an error.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, run_audit
from auditor.decide.records import Report
from auditor.rules.finding import Severity

LAYOUT_ONLY = AuditOptions(solve=False)
FIXTURES = Path(__file__).resolve().parents[3] / "fixtures" / "judging"
MANIFEST = json.loads((FIXTURES / "manifest.json").read_text(encoding="utf-8"))
_REPORTS: dict[str, Report] = {}


def audited(name: str) -> Report:
    """The layout-only audit of one fixture (once per test run)."""
    if name not in _REPORTS:
        _REPORTS[name] = run_audit(FIXTURES / MANIFEST["cases"][name]["board"], LAYOUT_ONLY)
    return _REPORTS[name]


@pytest.mark.parametrize("name", sorted(MANIFEST["cases"]))
def test_fixture_gives_expected_findings(name: str) -> None:
    case, report = MANIFEST["cases"][name], audited(name)
    found = [d.finding.rule_id for d in report.findings]
    assert not report.rule_errors
    assert set(case["expect"]) <= set(found), f"missing {set(case['expect']) - set(found)}"
    assert not set(case["absent"]) & set(found), f"unexpected {set(case['absent']) & set(found)}"
    for rule_id, count in case["counts"].items():
        assert found.count(rule_id) == count


@pytest.mark.parametrize("name", sorted(MANIFEST["cases"]))
def test_fixture_electrodes_are_found(name: str) -> None:
    nets = {net for r in audited(name).sensors for net in r.sensor.nets}
    assert nets == set(MANIFEST["cases"][name]["electrode_nets"])


@pytest.mark.parametrize("name", sorted(n for n, c in MANIFEST["cases"].items() if c["placed"]))
def test_findings_sit_where_the_problem_is(name: str) -> None:
    """A crossing is marked where it crosses, not at the electrode's centroid."""
    report = audited(name)
    for rule_id, x_mm, y_mm in MANIFEST["cases"][name]["placed"]:
        spots = [(d.finding.x_mm, d.finding.y_mm) for d in report.findings
                 if d.finding.rule_id == rule_id]
        assert any(x is not None and y is not None and abs(x - x_mm) < 0.05
                   and abs(y - y_mm) < 0.05 for x, y in spots), spots


def test_one_reader_warning_class_is_one_finding_with_its_count() -> None:
    case = MANIFEST["cases"]["many-reader-warnings"]
    (finding,) = [d.finding for d in audited("many-reader-warnings").findings
                  if d.finding.rule_id == "read-incomplete"]
    assert dict(finding.measured)["count"] == case["read_warning_count"]


def test_board_without_electrodes_is_only_a_note() -> None:
    report = audited("no-electrodes-board")
    assert report.findings and all(d.severity == Severity.INFO for d in report.findings)


def test_crossing_neighbour_has_no_same_layer_distance() -> None:
    """The B.Cu nets crossing TOUCH1's F.Cu trace are crossings with no
    distance, not nets "within 0.00 mm"."""
    (touch1,) = [r.sensor for r in audited("crossings-on-other-layer").sensors
                 if r.sensor.name == "TOUCH1"]
    assert touch1.path is not None
    crossing = {n.net: n for n in touch1.path.neighbours if n.crossings}
    assert set(crossing) == {"LED_PWM", "SPI_CLK", "I2S_BCLK"}
    assert all(n.min_distance_mm is None and n.noisy for n in crossing.values())


def test_generator_output_is_committed(tmp_path: Path) -> None:
    """The committed boards and manifest are what the generator writes now."""
    from fixtures.make_judging_boards import write_all

    for path in write_all(tmp_path):
        committed = FIXTURES / path.name
        assert committed.read_text(encoding="utf-8") == path.read_text(encoding="utf-8"), \
            f"regenerate: python fixtures/make_judging_boards.py ({path.name} differs)"


@pytest.mark.parametrize(("name", "rule_id"), [
    ("no-series-resistors", "series-resistor-missing"),
    ("pasted-electrodes", "electrode-paste"),
    ("unrouted-electrodes", "trace-unfollowed"),
    ("two-sliders-side-by-side", "electrodes-too-close"),
    ("backlit-keys", "noisy-part-near"),
    ("shared-sense-trace", "trace-parallel-run"),
    ("mask-opened-electrodes", "electrode-mask-open-covered"),
])
def test_one_cause_is_one_finding_with_every_electrode(name: str, rule_id: str) -> None:
    """One cause repeated on every electrode (wired straight to one
    controller, paste on every pad, nothing routed) is one finding that
    names them all (common practice, no source)."""
    found = [d.finding for d in audited(name).findings if d.finding.rule_id == rule_id]
    assert len(found) == 1
    assert set(MANIFEST["cases"][name]["electrode_nets"]) <= set(found[0].nets)
    assert found[0].message.split()[0] in ("2", "3")
