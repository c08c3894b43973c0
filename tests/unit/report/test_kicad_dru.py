"""The KiCad custom-rules export (auditor/report/kicad_dru*.py): syntax read
back with padaudit's own tokenizer, golden-ish checks on the demo board and
the KiCad 6 fixture boards (fixtures/make_dru_boards.py).

Format facts checked here come from KiCad's Custom Rules help
(pcbnew ``panel_setup_rules_help.md``) and from pcbnew 6.0.11 run on probe
files (tests/support/dru_syntax.py says which). KiCad itself runs the rules
in tests/integration/test_kicad_rules_in_kicad.py.
"""

from __future__ import annotations

import fnmatch
import re
import sys
from dataclasses import replace
from pathlib import Path

import pytest
from dru_syntax import check_condition, read_dru

try:
    import tomllib
except ImportError:  # Python 3.10
    import tomli as tomllib  # type: ignore[no-redef]

from auditor.audit import AuditOptions, measuring_selection, resolve_setup
from auditor.model.board import Board
from auditor.read import read_board
from auditor.read.courtyards import courtyard_refs
from auditor.report.kicad_dru import any_of, expr_string, mm, none_of
from auditor.report.kicad_dru_build import DruExport, ExportInputs, build_rules
from auditor.rules.registry import all_rules
from auditor.sensors import find_sensors, mark_sense_neighbours, measure_each

ROOT = Path(__file__).resolve().parents[3]
DEMO = ROOT / "auditor" / "demo" / "front_panel.kicad_pcb"
DRU = ROOT / "fixtures" / "dru"
sys.path.insert(0, str(ROOT / "tests" / "unit" / "sensors"))

from sensor_boards import controller, new_board, wired_through_series  # noqa: E402


def export_of(path: Path, profile: str | None = None, **changes: object) -> DruExport:
    """The export as the command builds it (auditor/cli/cmd_kicad_rules.py)."""
    setup = resolve_setup(path, AuditOptions(profile=profile))
    board = read_board(path)
    selection = measuring_selection(setup)
    found, _ = find_sensors(board, selection)
    sensors = mark_sense_neighbours(list(measure_each(board, found, selection)))
    inputs = ExportInputs(board=board, sensors=sensors, thresholds=setup.thresholds,
                          noisy_globs=selection.noisy_nets,
                          courtyard_refs=courtyard_refs(path), profile=setup.profile.name,
                          board_label=path.name)
    return build_rules(replace(inputs, **changes))  # type: ignore[arg-type]


@pytest.fixture(scope="module")
def demo() -> tuple[Board, DruExport]:
    return read_board(DEMO), export_of(DEMO)


def _check_all(board: Board, export: DruExport, path: Path) -> None:
    rules = read_dru(export.text())
    ids = {spec.rule_id for spec in all_rules()}
    areas = {z.name for z in board.zones if z.name}
    for rule in rules:
        check_condition(rule.condition, board.nets, courtyard_refs(path), areas)
        assert rule.source in ids, rule
    assert len({r.name for r in rules}) == len(rules), "rule names repeat"


# -- pieces of the language -------------------------------------------------------------------
def test_strings_quote_what_kicad6_can_hold_and_wildcard_the_rest() -> None:
    # KiCad 6 string literals are '...' without escapes; == on strings is a
    # wildcard match, so '?' stands for the character it cannot hold.
    assert expr_string("Net-(U1-CS0)") == "'Net-(U1-CS0)'"
    assert expr_string("/sense/A") == "'/sense/A'"
    assert expr_string("it's \"x\"\\") == "'it?s ?x??'"
    assert any_of("B.NetName", ["a"]) == "B.NetName == 'a'"
    assert none_of("A.NetName", ["a", "b"]) == "A.NetName != 'a' && A.NetName != 'b'"
    with pytest.raises(ValueError):
        any_of("A.NetName", [])


def test_lengths_always_carry_a_unit() -> None:
    # KiCad's rule parser reads a bare number in internal units (nm), not mm.
    assert [mm(v) for v in (4.0, 0.25, 0.1 + 0.2, 12.0000004)] == ["4mm", "0.25mm", "0.3mm",
                                                                   "12mm"]


# -- the demo board ----------------------------------------------------------------------------
def test_demo_file_parses_and_names_only_real_nets(demo: tuple[Board, DruExport]) -> None:
    board, export = demo
    _check_all(board, export, DEMO)


def test_demo_rule_kinds_per_electrode(demo: tuple[Board, DruExport]) -> None:
    board, export = demo
    rules = read_dru(export.text())
    names = [r.name for r in rules]
    buttons = [f"BTN{i}" for i in range(1, 7)] + ["PROX"]
    sliders = [f"SLIDER{i}" for i in range(5)]
    for sensor in buttons + sliders:
        assert f"padaudit {sensor} sense trace width" in names
        assert f"padaudit {sensor} sense trace to noisy nets" in names
        assert f"padaudit {sensor} electrode gap" in names
    for sensor in sliders:
        assert f"padaudit {sensor} electrode gap to ground" in names
    # The demo's footprints have no courtyard: no under-electrode rule, and the file says why.
    assert not [n for n in names if "under electrode" in n]
    assert any("E1, E2" in note and "no courtyard" in note for note in export.notes)
    assert len(rules) == 3 * 12 + 5  # width, noisy, gap per electrode; ground gap per slider


def test_demo_noisy_nets_are_its_led_drives(demo: tuple[Board, DruExport]) -> None:
    # LED drive lines switch fast (common practice, no source); the demo's
    # other nets are supplies, ground and sense lines (fixtures/demo/README.md).
    board, export = demo
    expected = tuple(n for n in board.nets if fnmatch.fnmatchcase(n.upper(), "*LED*"))
    assert export.noisy_nets == expected == ("LED1", "LED2", "LED3", "LED4")
    noisy = next(r for r in read_dru(export.text()) if r.name.endswith("BTN1 sense trace to "
                                                                       "noisy nets"))
    assert all(f"B.NetName == '{n}'" in noisy.condition for n in expected)
    assert "A.Type != 'Pad'" in noisy.condition


def test_demo_limits_are_the_profiles(demo: tuple[Board, DruExport]) -> None:
    default = tomllib.loads((ROOT / "rules" / "default.toml").read_text())["thresholds"]
    by_name = {r.name: r for r in read_dru(demo[1].text())}
    assert by_name["padaudit BTN1 electrode gap"].constraint == (
        "clearance", "min", mm(default["ground_gap_min_mm"]))
    assert by_name["padaudit SLIDER2 electrode gap"].constraint == (
        "clearance", "min", mm(default["segment_gap_min_mm"]))
    assert by_name["padaudit BTN1 sense trace width"].constraint == (
        "track_width", "max", mm(default["trace_max_width_mm"]))
    assert by_name["padaudit BTN1 sense trace to noisy nets"].constraint == (
        "clearance", "min", mm(default["noisy_net_min_mm"]))


def test_another_profile_changes_the_limits() -> None:
    strict = tomllib.loads((ROOT / "rules" / "strict.toml").read_text())["thresholds"]
    rules = {r.name: r for r in read_dru(export_of(DEMO, "strict").text())}
    assert rules["padaudit BTN3 sense trace width"].constraint[-1] == mm(
        strict["trace_max_width_mm"])


def test_general_rules_come_before_specific_ones(demo: tuple[Board, DruExport]) -> None:
    # pcbnew 6.0.11 applies the last matching rule (measured: 0.3 mm then
    # 0.5 mm on the same pair reports the 0.5 mm rule, and the reverse not).
    names = [r.name for r in read_dru(demo[1].text())]
    last_segment = max(i for i, n in enumerate(names) if n.endswith("electrode gap")
                       and "SLIDER" in n)
    first_ground = min(i for i, n in enumerate(names) if n.endswith("gap to ground"))
    assert last_segment < first_ground


def test_pads_picked_by_size_exclude_the_series_resistor(demo: tuple[Board, DruExport]) -> None:
    board, export = demo
    rule = next(r for r in read_dru(export.text()) if r.name == "padaudit BTN1 electrode gap")
    threshold = float(rule.condition.rsplit("Size_X > ", 1)[1].removesuffix("mm"))
    pads = [p for p in board.pads if p.net == "BTN1"]
    assert [p.ref for p in pads if p.width_mm > threshold] == ["E1"]
    assert {p.ref for p in pads if p.width_mm <= threshold} == {"R3"}


# -- the KiCad 6 fixture boards ---------------------------------------------------------------
def test_planted_board_rules_golden() -> None:
    path = DRU / "planted.kicad_pcb"
    export = export_of(path)
    _check_all(read_board(path), export, path)
    got = {r.source: (r.condition, r.constraint) for r in read_dru(export.text())}
    assert got == {
        "ground-gap-tight": ("A.Type == 'Pad' && A.NetName == 'TOUCH1' && "
                             "A.insideCourtyard('E1')", ("clearance", "min", "0.5mm")),
        "copper-under-electrode": ("A.insideCourtyard('E1') && A.NetName != 'TOUCH1'",
                                   ("disallow", "track", "via")),
        "trace-too-wide": ("(A.NetName == 'TOUCH1' || A.NetName == 'TOUCH1_R')",
                           ("track_width", "max", "0.25mm")),
        "trace-near-noisy-net": ("A.Type != 'Pad' && (A.NetName == 'TOUCH1' || "
                                 "A.NetName == 'TOUCH1_R') && B.NetName == 'LED_PWM'",
                                 ("clearance", "min", "4mm")),
    }


def test_append_only_text_joins_an_existing_file() -> None:
    export = export_of(DRU / "clean.kicad_pcb")
    tail = export.text(header=False)
    assert "(version 1)" not in tail
    assert len(read_dru(tail, header=False)) == len(export.rules)
    theirs = '(version 1)\n(rule "mine"\n  (condition "A.NetName == \'GND\'")\n' \
             "  (constraint clearance (min 0.2mm)))\n"
    joined = read_dru(theirs.replace("(rule", "# from padaudit rule x: y\n(rule") + tail)
    assert [r.name for r in joined][0] == "mine" and len(joined) == len(export.rules) + 1


def test_no_noisy_nets_no_noisy_rule_and_a_note() -> None:
    export = export_of(DRU / "clean.kicad_pcb", noisy_globs=())
    assert not [r for r in export.rules if r.source_rule == "trace-near-noisy-net"]
    assert any("No noisy nets" in n for n in export.notes)


def test_missing_threshold_is_said_not_hidden() -> None:
    export = export_of(DRU / "clean.kicad_pcb", thresholds={"ground_gap_min_mm": 0.5})
    assert [r.source_rule for r in export.rules] == ["ground-gap-tight",
                                                     "copper-under-electrode"]
    assert any("no trace_max_width_mm" in n for n in export.notes)
    assert any("no noisy_net_min_mm" in n for n in export.notes)


def test_read_warnings_head_the_file() -> None:
    export = export_of(DRU / "clean.kicad_pcb", read_notes=("unknown-token: foo (line 3)",))
    assert ("# Reader warning (these rules cover only what padaudit could read): "
            "unknown-token: foo (line 3)") in export.text()


# -- electrodes that are zones ----------------------------------------------------------------
@pytest.mark.parametrize("zone_name", ["", "KEY 1"])
def test_zone_electrode(tmp_path: Path, zone_name: str) -> None:
    board = new_board("dru-zone")
    board.zone("TOUCH1", "F.Cu", [(10.0, 15.0), (20.0, 15.0), (20.0, 25.0), (10.0, 25.0)],
               name=zone_name)
    wired_through_series(board, (15.0, 20.0), "TOUCH1", "R1", (40.0, 20.0), pin=1)
    controller(board, ["TOUCH1_R"])
    path = board.write(tmp_path / "zone.kicad_pcb")
    export = export_of(path)
    rules = {r.source: r for r in read_dru(export.text())}
    assert rules["ground-gap-tight"].condition == "A.Type == 'Zone' && A.NetName == 'TOUCH1'"
    if zone_name:
        assert rules["copper-under-electrode"].condition == (
            "A.insideArea('KEY 1') && A.NetName != 'TOUCH1'")
    else:
        assert "copper-under-electrode" not in rules
        assert any("zone without a name" in n for n in export.notes)


# -- the checker above catches what KiCad 6 rejects -------------------------------------------
@pytest.mark.parametrize("bad, fault", [
    ('(version 1)\n# from padaudit rule a: b\n(rule "x"  # late\n  (condition "A.NetName == \'N\'")'
     "\n  (constraint clearance (min 1mm)))\n", "comment after a token"),
    ('(version 1)\n# from padaudit rule a: b\n(rule "x"\n  (condition "A.NetName == \'N\'")'
     "\n  (constraint clearance (min 1)))\n", "no unit"),
    ('# from padaudit rule a: b\n(rule "x"\n  (condition "A.NetName == \'N\'")'
     "\n  (constraint clearance (min 1mm)))\n", "(version 1)"),
    ('(version 1)\n(rule "x"\n  (condition "A.NetName == \'N\'")'
     "\n  (constraint clearance (min 1mm)))\n", "padaudit rule"),
])
def test_syntax_checker_rejects(bad: str, fault: str) -> None:
    with pytest.raises(AssertionError, match=re.escape(fault)):
        read_dru(bad)


@pytest.mark.parametrize("condition, fault", [
    ("A.memberOfFootprint('E1')", "not a KiCad 6 function"),
    ("A.NetName == 'NOPE'", "not on the board"),
    ("(A.NetName == 'N'", "unbalanced parenthesis"),
    ("A.insideCourtyard('E9')", "has no courtyard"),
    ("A.Size_X > 3", "no unit"),
])
def test_condition_checker_rejects(condition: str, fault: str) -> None:
    with pytest.raises(AssertionError, match=re.escape(fault)):
        check_condition(condition, {"N"}, {"E1"})
