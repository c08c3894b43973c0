"""The configuration's ``baseline`` key and the ``config`` the report names."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, run_audit
from auditor.config.load import load_config
from auditor.errors import ConfigError

FIXTURE = Path(__file__).resolve().parents[3] / "fixtures" / "formats" / "v8.kicad_pcb"


def test_baseline_is_relative_to_the_configuration_file(tmp_path: Path) -> None:
    (tmp_path / "hw").mkdir()
    config = tmp_path / "hw" / "padaudit.toml"
    config.write_text('baseline = "accepted/base.json"\n', encoding="utf-8")
    assert load_config(config).baseline == str(tmp_path / "hw" / "accepted" / "base.json")
    config.write_text("baseline = 3\n", encoding="utf-8")
    with pytest.raises(ConfigError, match="baseline must be the path"):
        load_config(config)


@pytest.mark.skipif(not FIXTURE.is_file(), reason="fixture board not generated")
def test_gated_audit_uses_the_configured_baseline(tmp_path: Path,
                                                  monkeypatch: pytest.MonkeyPatch) -> None:
    board = tmp_path / "panel.kicad_pcb"
    shutil.copy(FIXTURE, board)
    accepted = run_audit(board, AuditOptions(solve=False, accept_all=True))
    assert accepted.findings, "the fixture needs findings for this test"
    from auditor.decide.baseline import Baseline, dumps

    (tmp_path / "base.json").write_text(dumps(Baseline.of(accepted.findings)))
    (tmp_path / "padaudit.toml").write_text('baseline = "base.json"\n')
    monkeypatch.chdir(tmp_path)
    gated = run_audit(board, AuditOptions(solve=False, config_baseline=True))
    assert all(d.in_baseline or d.waived for d in gated.findings)
    assert gated.exit_code == 0
    # The other side of a comparison never takes the baseline.
    plain = run_audit(board, AuditOptions(solve=False))
    assert not any(d.in_baseline for d in plain.findings)
    # The report names the configuration it read, relative to the working folder.
    assert gated.info.config_path == "padaudit.toml"
    (tmp_path / "padaudit.toml").unlink()
    assert run_audit(board, AuditOptions(solve=False)).info.config_path == ""


@pytest.mark.skipif(not FIXTURE.is_file(), reason="fixture board not generated")
def test_json_names_the_configuration(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                      capsys: pytest.CaptureFixture[str]) -> None:
    from auditor.cli.main import main

    shutil.copy(FIXTURE, tmp_path / "panel.kicad_pcb")
    (tmp_path / "padaudit.toml").write_text('fail_on = "error"\n')
    monkeypatch.chdir(tmp_path)
    main(["audit", "panel.kicad_pcb", "--no-solve", "--format", "json", "-q"])
    captured = capsys.readouterr()
    assert json.loads(captured.out)["run"]["config_path"] == "padaudit.toml"
    assert captured.err == ""  # -q: no verdict line beside a machine format
    main(["audit", "panel.kicad_pcb", "--no-solve"])
    head = capsys.readouterr().out.splitlines()[:4]
    assert "config      padaudit.toml" in head
