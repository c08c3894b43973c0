"""Parts on the sense net, end to end on generated boards
(fixtures/make_field_parts_boards.py, invented layouts).

Each board is the plain one plus parts on TOUCH1's net. Before, Cp total was
pad + trace only: a 22 pF capacitor to ground, a sampling capacitor or a
series capacitor changed nothing. Now each is checked against circuit theory
(parallel capacitances add; series: C1 C2 / (C1 + C2)) applied to the plain
board's own solved pad and trace, which the parts do not change.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, run_audit
from auditor.model.results import PadMetrics

ROOT = Path(__file__).resolve().parents[2]
FOLDER = ROOT / "fixtures" / "field_parts"
MANIFEST = json.loads((FOLDER / "manifest.json").read_text(encoding="utf-8"))
PIN_PF = 5.0  # rules/default.toml pin_pf

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def touch1() -> dict[str, PadMetrics]:
    out = {}
    for name, case in MANIFEST["cases"].items():
        report = run_audit(FOLDER / case["board"], AuditOptions())
        metrics = {r.sensor.name: r.metrics for r in report.sensors}
        assert metrics["TOUCH1"] is not None and metrics["TOUCH2"] is not None, name
        out[name] = metrics["TOUCH1"]
        out[name + "/TOUCH2"] = metrics["TOUCH2"]
    return out


def test_plain_cp_total_is_copper_plus_pin(touch1: dict[str, PadMetrics]) -> None:
    plain = touch1["plain"]
    # Exactly zero with no parts, not the rounding of a subtraction.
    assert plain.cp_pin_pf == PIN_PF and plain.cp_parts_pf == 0.0
    assert plain.cp_total_pf == pytest.approx(plain.cp_pad_pf + plain.cp_trace_pf + PIN_PF)
    assert [(p.ref, p.connection) for p in plain.parts] == [("R1", "series-resistor")]


@pytest.mark.parametrize(("case", "added_pf"), [("cap-to-ground", 22.0),
                                                ("cap-to-supply", 470.0)])
def test_capacitor_in_parallel_adds_to_cp_not_to_delta(touch1: dict[str, PadMetrics],
                                                       case: str, added_pf: float) -> None:
    plain, new = touch1["plain"], touch1[case]
    assert new.cp_pad_pf == pytest.approx(plain.cp_pad_pf, rel=1e-6)
    assert new.cp_trace_pf == pytest.approx(plain.cp_trace_pf, rel=1e-3)
    old_without_pin = plain.cp_pad_pf + plain.cp_trace_pf  # what Cp total used to be
    assert new.cp_total_pf == pytest.approx(old_without_pin + added_pf + PIN_PF, abs=2e-3)
    assert new.cp_parts_pf == pytest.approx(added_pf)
    assert new.delta_c_pf == pytest.approx(plain.delta_c_pf, rel=1e-6)
    assert new.delta_ratio == pytest.approx(new.delta_c_pf / new.cp_total_pf)


@pytest.mark.parametrize("case", ["cap-between-pins", "cap-unreadable"])
def test_parts_not_counted_are_listed_and_said(touch1: dict[str, PadMetrics],
                                               case: str) -> None:
    plain, new = touch1["plain"], touch1[case]
    assert new.cp_total_pf == pytest.approx(plain.cp_total_pf, rel=1e-6)
    part = next(p for p in new.parts if p.ref == MANIFEST["cases"][case]["parts"][0]["ref"])
    assert part.connection == {"cap-between-pins": "between-pins",
                               "cap-unreadable": "not-read"}[case]
    assert any(part.ref in note and "not " in note for note in new.notes)


def test_series_capacitor_against_the_series_formula(touch1: dict[str, PadMetrics]) -> None:
    plain, new = touch1["plain"], touch1["series-cap"]
    series_pf = 10.0
    # The pin side keeps the short stretch from the capacitor to the pin
    # (2 mm of about 25 mm): bound the answer by putting all of the trace
    # on either side.
    pad, trace = plain.cp_pad_pf, plain.cp_trace_pf
    low = series_pf * pad / (series_pf + pad) + trace + PIN_PF
    high = series_pf * (pad + trace) / (series_pf + pad + trace) + PIN_PF
    assert min(low, high) - 1e-9 <= new.cp_total_pf <= max(low, high) + 1e-9
    assert new.cp_total_pf < plain.cp_total_pf
    # ΔC through the capacitor: the series formula's difference,
    # C_s^2 ΔC / ((C_s + C_e)(C_s + C_e + ΔC)), bounded the same way
    dc = plain.delta_c_pf
    gains = [series_pf ** 2 / ((series_pf + c) * (series_pf + c + dc)) for c in (pad, pad + trace)]
    assert min(gains) - 1e-9 <= new.delta_c_pf / dc <= max(gains) + 1e-9
    assert new.cp_parts_pf < 0


def test_other_electrode_is_untouched(touch1: dict[str, PadMetrics]) -> None:
    plain = touch1["plain/TOUCH2"]
    for case in MANIFEST["cases"]:
        assert touch1[case + "/TOUCH2"].cp_total_pf == pytest.approx(plain.cp_total_pf,
                                                                     rel=1e-6)


def test_json_lists_pin_and_parts(tmp_path: Path) -> None:
    from auditor.cli.main import main

    out = tmp_path / "report.json"
    main(["audit", str(FOLDER / "cap-to-ground.kicad_pcb"), "--format", "json",
          "--output", str(out), "--quiet"])
    metrics = json.loads(out.read_text("utf-8"))["sensors"][0]["metrics"]
    assert metrics["cp_pin_pf"] == PIN_PF and metrics["cp_parts_pf"] == 22.0
    assert {"ref": "C5", "value": "22pF", "pf": 22.0, "connection": "to-ground",
            "net": "GND"} in metrics["parts"]


def test_manifest_matches_the_generator() -> None:
    from fixtures.make_field_parts_boards import manifest

    assert json.loads(json.dumps(manifest())) == MANIFEST


def test_committed_boards_are_the_generator_output(tmp_path: Path) -> None:
    """Fresh output of the generator equals the committed boards, so the
    numbers above are those of the boards the generator describes."""
    from fixtures.make_field_parts_boards import write_all

    for path in write_all(tmp_path):
        assert path.read_bytes() == (FOLDER / path.name).read_bytes(), path.name


@pytest.mark.parametrize(("pin_pf", "flagged"), [(0.0, {"TOUCH1", "TOUCH2"}), (5.0, set())])
def test_implausible_ratio_is_raised_not_passed(tmp_path: Path, pin_pf: float,
                                                flagged: set[str]) -> None:
    """Pads with no ground in reach (the rule fixtures' ground-less board):
    with nothing but copper in Cp the quick model gives ΔC/Cp of 70-95 %,
    which used to read "ok". The guard raises model-implausible on each
    (limit 50 %, rules/default.toml); a 5 pF pin brings the ratio back
    under it."""
    from fixtures.make_rule_boards import cases, write_case

    case = next(c for c in cases() if c.name == "ground-ratio-small--bad")
    board = write_case(case, tmp_path)
    (tmp_path / "padaudit.toml").write_text(
        f'profile = "default"\n[thresholds]\npin_pf = {pin_pf}\n', encoding="utf-8")
    report = run_audit(board, AuditOptions())
    found = {d.finding.sensor for d in report.findings
             if d.finding.rule_id == "model-implausible"}
    assert found == flagged
    ratios = [r.metrics.delta_ratio for r in report.sensors if r.metrics is not None]
    assert len(ratios) == 2
    assert all(ratio > 0.5 for ratio in ratios) == bool(flagged)
