"""``padaudit diff`` and ``padaudit hook`` end to end through the entry point,
in temporary git repositories. The pipeline is replaced by a stand-in that
reads an invented one-line "board" (``ratio 0.05``), so these tests check the
commands, git handling and exit codes, not the audit itself."""

from __future__ import annotations

import dataclasses
import os
import subprocess
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "support"))
import sample_report as sample  # noqa: E402
from gitrepo import GIT_ENV, commit_file, git, new_repo  # noqa: E402

from auditor.cli import audit_runner  # noqa: E402
from auditor.cli.cmd_hook import HOOK_MARKER  # noqa: E402
from auditor.cli.main import EXIT_BAD_INPUT, EXIT_CLEAN, EXIT_FINDINGS, main  # noqa: E402
from auditor.decide.records import Report  # noqa: E402

REPO_ROOT = Path(__file__).resolve().parents[2]


def fake_audit(path: str) -> Report:
    """SW_POWER's ratio from the file's text; a 'gap' word adds the gap finding."""
    words = Path(path).read_text().split()
    report = sample.sample_report(info=sample.sample_info(board_path=path))
    first = report.sensors[0]
    assert first.metrics is not None
    metrics = dataclasses.replace(first.metrics, delta_ratio=float(words[1]))
    findings = report.findings[:1] if "gap" in words else ()
    return dataclasses.replace(report, findings=findings,
                               sensors=(dataclasses.replace(first, metrics=metrics),
                                        *report.sensors[1:]))


@pytest.fixture
def stand_in(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(audit_runner, "AUDITOR_FACTORY", lambda args: fake_audit)
    monkeypatch.setenv("GIT_CONFIG_GLOBAL", os.devnull)
    monkeypatch.setenv("NO_COLOR", "1")


def test_diff_two_files(tmp_path: Path, stand_in: None,
                        capsys: pytest.CaptureFixture[str]) -> None:
    old, new = tmp_path / "old.kicad_pcb", tmp_path / "new.kicad_pcb"
    old.write_text("ratio 0.05\n")
    new.write_text("ratio 0.035\n")
    assert main(["diff", str(old), str(new)]) == EXIT_FINDINGS  # -30 % > 20 %
    out = capsys.readouterr().out
    assert "5.00% → 3.50%" in out and "-30.0 %" in out  # (0.035 - 0.05) / 0.05
    assert main(["diff", str(old), str(new), "--max-ratio-loss", "0.35"]) == EXIT_CLEAN
    assert main(["diff", str(new), str(old)]) == EXIT_CLEAN  # a gain never fails


def test_diff_new_failing_finding_fails(tmp_path: Path, stand_in: None,
                                        capsys: pytest.CaptureFixture[str]) -> None:
    old, new = tmp_path / "old.kicad_pcb", tmp_path / "new.kicad_pcb"
    old.write_text("ratio 0.05\n")
    new.write_text("ratio 0.05 gap\n")
    assert main(["diff", str(old), str(new), "--format", "json"]) == EXIT_FINDINGS
    assert '"rule_id": "ground-gap-tight"' in capsys.readouterr().out
    assert main(["diff", str(new), str(old)]) == EXIT_CLEAN  # fixed, not new


def test_diff_bad_input_is_exit_2(tmp_path: Path, stand_in: None,
                                  capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["diff", str(tmp_path / "none.kicad_pcb"), str(tmp_path / "x")]) == 2
    err = capsys.readouterr().err
    assert err.startswith("padaudit: ") and err.count("\n") == 1
    with pytest.raises(SystemExit) as exc:
        main(["diff", "a", "b", "--max-ratio-loss", "2"])
    assert exc.value.code == EXIT_BAD_INPUT


def test_diff_against_a_git_revision(tmp_path: Path, stand_in: None,
                                     monkeypatch: pytest.MonkeyPatch,
                                     capsys: pytest.CaptureFixture[str]) -> None:
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "panel.kicad_pcb", "ratio 0.06\n")
    commit_file(repo, "panel.kicad_pcb", "ratio 0.04\n")
    monkeypatch.chdir(repo)
    assert main(["diff", "HEAD~1:panel.kicad_pcb", "panel.kicad_pcb"]) == EXIT_FINDINGS
    out = capsys.readouterr().out
    assert "HEAD~1:panel.kicad_pcb → panel.kicad_pcb" in out
    assert "-33.3 %" in out  # (0.04 - 0.06) / 0.06
    assert main(["diff", "nosuchrev:panel.kicad_pcb", "panel.kicad_pcb"]) == EXIT_BAD_INPUT


def test_hook_install_refuses_a_foreign_hook(tmp_path: Path, stand_in: None,
                                             monkeypatch: pytest.MonkeyPatch) -> None:
    repo = new_repo(tmp_path / "repo")
    monkeypatch.chdir(repo)
    hook = repo / ".git" / "hooks" / "pre-commit"
    hook.write_text("#!/bin/sh\necho theirs\n")
    assert main(["hook", "install"]) == EXIT_BAD_INPUT
    assert hook.read_text() == "#!/bin/sh\necho theirs\n"
    assert main(["hook", "install", "--force"]) == EXIT_CLEAN
    assert HOOK_MARKER in hook.read_text() and os.access(hook, os.X_OK)
    assert main(["hook", "install"]) == EXIT_CLEAN  # our own hook may be rewritten


def test_hook_run_audits_the_staged_version(tmp_path: Path, stand_in: None,
                                            monkeypatch: pytest.MonkeyPatch,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "hw/panel.kicad_pcb", "ratio 0.05\n")
    monkeypatch.chdir(repo / "hw")
    assert main(["hook", "run"]) == EXIT_CLEAN
    assert "no staged .kicad_pcb files" in capsys.readouterr().out
    (repo / "hw/panel.kicad_pcb").write_text("ratio 0.05 gap\n")
    git(repo, "add", "hw/panel.kicad_pcb")
    (repo / "hw/panel.kicad_pcb").write_text("ratio 0.05\n")  # fixed on disk, not staged
    assert main(["hook", "run"]) == EXIT_FINDINGS
    captured = capsys.readouterr()
    assert "hw/panel.kicad_pcb (staged)" in captured.out and "ground-gap-tight" in captured.out
    assert "commit blocked by hw/panel.kicad_pcb" in captured.err
    assert main(["hook", "run", "panel.kicad_pcb"]) == EXIT_CLEAN  # the file on disk


@pytest.mark.slow
def test_real_commit_through_the_installed_hook(tmp_path: Path) -> None:
    """git itself runs the hook: a commit without boards passes; a staged file
    padaudit cannot audit blocks the commit (exit 2, whatever the pipeline)."""
    repo = new_repo(tmp_path / "repo")
    env = {**os.environ, **GIT_ENV, "NO_COLOR": "1",
           "PYTHONPATH": str(REPO_ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    subprocess.run([sys.executable, "-m", "auditor", "hook", "install"], cwd=repo, env=env,
                   check=True, capture_output=True)
    (repo / "README").write_text("hello\n")
    git(repo, "add", "README")
    done = subprocess.run(["git", "commit", "-m", "docs"], cwd=repo, env=env,
                          capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    assert "no staged .kicad_pcb files" in done.stdout + done.stderr
    (repo / "broken.kicad_pcb").write_text("(kicad_pcb (version")
    git(repo, "add", "broken.kicad_pcb")
    done = subprocess.run(["git", "commit", "-m", "board"], cwd=repo, env=env,
                          capture_output=True, text=True)
    assert done.returncode != 0
    assert "padaudit: " in done.stderr
    assert git(repo, "rev-list", "--count", "HEAD").stdout.strip() == "1"


def test_pre_commit_framework_manifest() -> None:
    """.pre-commit-hooks.yaml (format: https://pre-commit.com/#new-hooks); read
    line by line since no YAML library is a dependency."""
    import re

    lines = (REPO_ROOT / ".pre-commit-hooks.yaml").read_text().splitlines()
    fields = dict(line.lstrip("- ").split(": ", 1) for line in lines
                  if line and not line.startswith("#") and ": " in line)
    assert fields["id"] == "padaudit" and fields["language"] == "python"
    pattern = re.compile(fields["files"].strip("'"))
    assert pattern.search("hw/panel.kicad_pcb") and not pattern.search("panel.kicad_pro")
    entry = fields["entry"].split()
    assert entry[0] == "padaudit"
    from auditor.cli.main import _load_commands, build_parser

    args = build_parser(_load_commands()).parse_args([*entry[1:], "a.kicad_pcb"])
    assert args.command == "hook" and args.files == ["a.kicad_pcb"]


def _baseline_of_the_gap(path: Path) -> None:
    """A baseline accepting the stand-in's one finding (ground-gap-tight)."""
    from auditor.decide.baseline import Baseline, dumps

    path.write_text(dumps(Baseline.of(sample.sample_report().findings[:1])), encoding="utf-8")


def test_hook_honours_the_configured_baseline(tmp_path: Path, stand_in: None,
                                              monkeypatch: pytest.MonkeyPatch,
                                              capsys: pytest.CaptureFixture[str]) -> None:
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "hw/panel.kicad_pcb", "ratio 0.05 gap\n")
    monkeypatch.chdir(repo)
    (repo / "hw/panel.kicad_pcb").write_text("ratio 0.06 gap\n")
    git(repo, "add", "hw/panel.kicad_pcb")
    assert main(["hook", "run"]) == EXIT_FINDINGS  # no baseline yet: the old finding blocks
    out = capsys.readouterr().out.splitlines()
    # On a fail: what fails, then the verdict line (not the whole report).
    assert out == [
        "hw/panel.kicad_pcb (staged): what fails the gate (1):",
        "  error ground-gap-tight SW_MODE: ground gap 0.20 mm is below the 0.50 mm minimum "
        "(x 124.80 mm, y 114.00 mm, F.Cu)",
        "hw/panel.kicad_pcb (staged): FAIL  1 error, 0 warnings, 0 waived, 0 baselined, "
        "1 stale; 1 finding at or above error; INCOMPLETE: 1 item(s) skipped or guessed "
        "while reading (exit 1)"]
    _baseline_of_the_gap(repo / "hw/accepted.json")
    (repo / "padaudit.toml").write_text('baseline = "hw/accepted.json"\n')
    git(repo, "add", "padaudit.toml", "hw/accepted.json")
    assert main(["hook", "run"]) == EXIT_CLEAN
    # On a pass: one line, and it says what the baseline accepted.
    assert capsys.readouterr().out == (
        "hw/panel.kicad_pcb (staged): PASS  0 errors, 0 warnings, 0 waived, 1 baselined, "
        "1 stale; nothing at or above error; INCOMPLETE: 1 item(s) skipped or guessed while "
        "reading (exit 0)\n")


def test_hook_baseline_flag_on_given_files(tmp_path: Path, stand_in: None,
                                           monkeypatch: pytest.MonkeyPatch,
                                           capsys: pytest.CaptureFixture[str]) -> None:
    monkeypatch.chdir(tmp_path)
    (tmp_path / "panel.kicad_pcb").write_text("ratio 0.05 gap\n")
    _baseline_of_the_gap(tmp_path / "base.json")
    assert main(["hook", "run", "panel.kicad_pcb"]) == EXIT_FINDINGS
    assert main(["hook", "run", "--baseline", "base.json", "panel.kicad_pcb"]) == EXIT_CLEAN
    assert "1 baselined" in capsys.readouterr().out.splitlines()[-1]
    assert main(["hook", "run", "--baseline", "missing.json", "panel.kicad_pcb"]) \
        == EXIT_BAD_INPUT


def test_hook_new_since_fails_only_on_new_findings(tmp_path: Path, stand_in: None,
                                                   monkeypatch: pytest.MonkeyPatch,
                                                   capsys: pytest.CaptureFixture[str]) -> None:
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "panel.kicad_pcb", "ratio 0.05\n")
    monkeypatch.chdir(repo)
    (repo / "panel.kicad_pcb").write_text("ratio 0.05 gap\n")
    git(repo, "add", "panel.kicad_pcb")
    assert main(["hook", "run", "--new-since", "HEAD"]) == EXIT_FINDINGS  # the gap is new
    commit_file(repo, "panel.kicad_pcb", "ratio 0.05 gap\n")
    (repo / "panel.kicad_pcb").write_text("ratio 0.06 gap\n")
    git(repo, "add", "panel.kicad_pcb")
    capsys.readouterr()
    assert main(["hook", "run", "--new-since", "HEAD"]) == EXIT_CLEAN  # it was there at HEAD
    assert "1 baselined" in capsys.readouterr().out
    assert main(["hook", "run", "--new-since", "HEAD~1"]) == EXIT_FINDINGS
    (repo / "second.kicad_pcb").write_text("ratio 0.05 gap\n")  # new since HEAD: counts in full
    git(repo, "add", "second.kicad_pcb")
    assert main(["hook", "run", "--new-since", "HEAD"]) == EXIT_FINDINGS
    assert main(["hook", "run", "--new-since", "no-such-rev"]) == EXIT_BAD_INPUT


def test_hook_install_bakes_the_gate_options_in(tmp_path: Path, stand_in: None,
                                                monkeypatch: pytest.MonkeyPatch) -> None:
    repo = new_repo(tmp_path / "repo")
    monkeypatch.chdir(repo)
    assert main(["hook", "install", "--new-since", "origin/main", "--baseline", "b.json"]) == 0
    text = (repo / ".git" / "hooks" / "pre-commit").read_text()
    assert "hook run --baseline b.json --new-since origin/main" in text
