"""``padaudit audit`` and ``padaudit rules`` end to end: exact exit codes
(0 clean, 1 findings at or above --fail-on, 2 bad input), configuration
beside the board, waivers, and byte-identical JSON.

Boards are the generated rule fixtures (fixtures/rules/, invented layouts).
The exit-code contract is the project's own (README; common practice for
linters, no source).
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from auditor.cli.main import main
from auditor.rules.registry import all_rules

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures" / "rules"
CLEAN = FIXTURES / "electrode-paste--good.kicad_pcb"
ERROR_BOARD = FIXTURES / "electrodes-share-net--bad.kicad_pcb"  # an error-level finding
WARNING_BOARD = FIXTURES / "trace-too-wide--bad.kicad_pcb"  # one warning only


def audit(capsys: pytest.CaptureFixture[str], *args: str,
          solve: bool = False) -> tuple[int, str, str]:
    """Run ``padaudit audit``; layout rules only unless ``solve`` (the solver has
    its own tests; here the gate and the configuration are under test)."""
    extra = [] if solve else ["--no-solve"]
    code = main(["audit", *args, *extra, "--color", "never"])
    out, err = capsys.readouterr()
    return code, out, err


def copy_board(src: Path, folder: Path) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    return Path(shutil.copy(src, folder / src.name))


def test_clean_board_exits_0(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(CLEAN), solve=True)
    assert code == 0
    assert "TOUCH1" in out and "TOUCH2" in out


def test_no_solve_marks_every_sensor_unsolved(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(CLEAN), "--format", "json")
    doc = json.loads(out)
    assert code == 0 and {s["verdict"] for s in doc["sensors"]} == {"unsolved"}


def test_error_finding_exits_1(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(ERROR_BOARD))
    assert code == 1
    assert "electrodes-share-net" in out


def test_fail_on_threshold(capsys: pytest.CaptureFixture[str]) -> None:
    assert audit(capsys, str(WARNING_BOARD))[0] == 0
    assert audit(capsys, str(WARNING_BOARD), "--fail-on", "warning")[0] == 1
    assert audit(capsys, str(WARNING_BOARD), "--fail-on", "info")[0] == 1


def test_profile_flag_changes_result(capsys: pytest.CaptureFixture[str]) -> None:
    # 0.5 mm trace: a warning in default and in strict; the header names the profile
    code, out, _ = audit(capsys, str(WARNING_BOARD), "--profile", "strict", "--fail-on",
                         "warning")
    assert code == 1 and "profile     strict" in out


def test_missing_board_exits_2_one_line(capsys: pytest.CaptureFixture[str],
                                        tmp_path: Path) -> None:
    code, _, err = audit(capsys, str(tmp_path / "none.kicad_pcb"))
    assert code == 2
    assert err.startswith("padaudit: ") and err.count("\n") == 1


def test_malformed_board_exits_2(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    bad = tmp_path / "bad.kicad_pcb"
    bad.write_text("(kicad_pcb (version 20240108)\n  (net 0 \"\")\n", encoding="utf-8")
    code, _, err = audit(capsys, str(bad))
    assert code == 2 and str(bad) in err and "Traceback" not in err


def test_malformed_config_exits_2_with_position(capsys: pytest.CaptureFixture[str],
                                                tmp_path: Path) -> None:
    board = copy_board(CLEAN, tmp_path / "hw")
    (tmp_path / "padaudit.toml").write_text('profile = "default"\npower = mains\n',
                                            encoding="utf-8")
    code, _, err = audit(capsys, str(board))
    assert code == 2
    assert f"{tmp_path / 'padaudit.toml'}:2:9: malformed TOML" in err


@pytest.mark.parametrize("args, fragment", [
    (("--profile", "nosuch"), "choose one of: default, mutual, proximity, strict"),
    (("--overlay", "2:kryptonite"), "known materials"),
    (("--overlay", "two"), "MM:MATERIAL"),
])
def test_bad_options_exit_2(capsys: pytest.CaptureFixture[str], args: tuple[str, ...],
                            fragment: str) -> None:
    code, _, err = audit(capsys, str(CLEAN), *args)
    assert code == 2 and fragment in err


def test_bad_choice_exits_2(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["audit", str(CLEAN), "--power", "solar"])
    assert exc.value.code == 2


def test_config_beside_board_waives_and_reports_stale(capsys: pytest.CaptureFixture[str],
                                                      tmp_path: Path) -> None:
    board = copy_board(ERROR_BOARD, tmp_path / "hw")
    (tmp_path / "pyproject.toml").write_text("""
[tool.padaudit]
fail_on = "error"

[[tool.padaudit.waivers]]
rule = "electrodes-share-net"
net = "TOUCH1"
reason = "two halves of one key, joined on purpose"

[[tool.padaudit.waivers]]
rule = "trace-too-long"
ref = "E9"
reason = "left over from rev 1"
""", encoding="utf-8")
    code, out, _ = audit(capsys, str(board))
    assert code == 0
    assert "two halves of one key" in out
    assert "left over from rev 1" in out  # the stale waiver is listed


def test_severity_override_from_config(capsys: pytest.CaptureFixture[str],
                                       tmp_path: Path) -> None:
    board = Path(shutil.copy(WARNING_BOARD, tmp_path / "panel.kicad_pcb"))
    (tmp_path / "padaudit.toml").write_text('[severity]\ntrace-too-wide = "error"\n',
                                            encoding="utf-8")
    assert audit(capsys, str(board))[0] == 1
    (tmp_path / "padaudit.toml").write_text('[severity]\ntrace-too-wide = "off"\n',
                                            encoding="utf-8")
    code, out, _ = audit(capsys, str(board), "--fail-on", "info")
    assert code == 0 and "trace-too-wide" not in out


def test_json_is_byte_identical(capsys: pytest.CaptureFixture[str]) -> None:
    first = audit(capsys, str(ERROR_BOARD), "--format", "json")[1]
    second = audit(capsys, str(ERROR_BOARD), "--format", "json")[1]
    assert first == second and '"electrodes-share-net"' in first


def test_partly_read_board_is_not_clean(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(FIXTURES / "read-incomplete--bad.kicad_pcb"),
                         "--fail-on", "warning")
    assert code == 1 and "read-incomplete" in out and "padaudit_fixture_unknown" in out


def test_configured_electrodes_not_found_fails(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(FIXTURES / "configured" / "no-sensors--bad.kicad_pcb"))
    assert code == 1 and "no-sensors" in out


def test_board_without_electrodes_is_a_calm_note(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(FIXTURES / "no-electrodes--bad.kicad_pcb"))
    assert code == 0 and "no touch electrodes found" in out and "no-sensors" not in out


def test_rules_lists_every_rule(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules"]) == 0
    out = capsys.readouterr().out
    lines = out.strip().splitlines()
    assert len(lines) == len(all_rules())
    assert all(line.split()[0] == spec.rule_id for line, spec in zip(lines, all_rules(),
                                                                    strict=True))


def test_rules_explains_one_with_origins(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules", "ground-gap-tight"]) == 0
    out = capsys.readouterr().out
    assert "ground_gap_min_mm = 0.5" in out and "common practice, no source" in out
    assert "Fix:" in out


def test_rules_unknown_id_exits_2(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules", "no-such-rule"]) == 2


def test_mutual_profile_tolerates_solid_ground(capsys: pytest.CaptureFixture[str]) -> None:
    # solid ground below is tolerated for mutual capacitance (physics.md §4.1, ground)
    board = str(FIXTURES / "copper-under-electrode--bad.kicad_pcb")

    def rule_ids(*args: str) -> set[str]:
        doc = json.loads(audit(capsys, board, "--format", "json", *args)[1])
        return {f["rule_id"] for f in doc["findings"]}

    assert "copper-under-electrode" in rule_ids()
    assert "copper-under-electrode" not in rule_ids("--profile", "mutual")


def test_user_profile_from_config_extends_builtin(capsys: pytest.CaptureFixture[str],
                                                  tmp_path: Path) -> None:
    board = copy_board(CLEAN, tmp_path / "hw")
    (tmp_path / "profiles").mkdir()
    (tmp_path / "profiles" / "ours.toml").write_text(
        'extends = "default"\n[thresholds]\ntrace_max_length_mm = 10.0\n', encoding="utf-8")
    (tmp_path / "padaudit.toml").write_text('profile = "profiles/ours.toml"\n',
                                            encoding="utf-8")
    code, out, _ = audit(capsys, str(board), "--fail-on", "warning")
    assert code == 1 and "trace-too-long" in out and "profile     ours" in out


def test_crashing_rule_named_and_others_still_reported(
        capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    from dataclasses import replace

    from auditor.rules import registry

    (spec,) = [s for s in registry.all_rules() if s.rule_id == "electrode-paste"]

    def broken(sensor: object, call: object) -> None:
        raise ZeroDivisionError("planted")

    monkeypatch.setitem(registry._REGISTRY, spec.rule_id, replace(spec, function=broken))
    code, out, _ = audit(capsys, str(ERROR_BOARD), "--format", "json")
    doc = json.loads(out)
    assert code == 1
    assert "electrode-paste" in json.dumps(doc["rule_errors"])
    assert "electrodes-share-net" in {f["rule_id"] for f in doc["findings"]}


def test_mains_power_shows_the_caution_once(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = audit(capsys, str(CLEAN), "--power", "mains")
    assert code == 0 and out.count("CAUTION") == 1 and "IEC 62368-1" in out
    assert "CAUTION" not in audit(capsys, str(CLEAN), "--power", "battery")[1]
