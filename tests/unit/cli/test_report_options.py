"""The shared report options and emit(): outputs, colour, baseline, --against."""

from __future__ import annotations

import argparse
import dataclasses
import io
import json
from pathlib import Path

import pytest
import sample_report as sample
from gitrepo import commit_file, new_repo

from auditor.audit import AuditOptions, with_baseline
from auditor.cli.report_options import add_report_options, emit
from auditor.decide.cautions import MAINS_CAUTION, cautions_for
from auditor.decide.records import Report
from auditor.errors import UsageError


def _args(*argv: str) -> argparse.Namespace:
    parser = argparse.ArgumentParser()
    add_report_options(parser)
    return parser.parse_args(list(argv))


def _emit(report: Report, *argv: str, env: dict[str, str] | None = None) -> tuple[int, str]:
    out = io.StringIO()
    code = emit(report, _args(*argv), stdout=out, env=env or {})
    return code, out.getvalue()


def test_output_file_is_written_even_when_the_run_fails(tmp_path: Path) -> None:
    target = tmp_path / "r.json"
    code, out = _emit(sample.sample_report(), "--format", "json", "--output", str(target))
    assert code == 1
    assert json.loads(target.read_text())["summary"]["exit_code"] == 1
    # The verdict line states the exit code (common practice, no source).
    assert out == ("FAIL  3 errors, 1 warning, 1 waived, 1 baselined, 1 stale; 3 findings at "
                   "or above error; INCOMPLETE: 1 item(s) skipped or guessed while reading "
                   "(exit 1)\n")
    code, out = _emit(sample.sample_report(), "--output", str(tmp_path / "r.txt"), "--quiet")
    assert out == "" and "\x1b[" not in (tmp_path / "r.txt").read_text()


def test_files_written_are_confirmed_on_stderr_unless_quiet(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    report = with_baseline(sample.sample_report(), AuditOptions(accept_all=True))
    base, svg = tmp_path / "baseline.json", tmp_path / "panel.svg"
    _emit(report, "--write-baseline", str(base), "--format", "json",
          "--output", str(tmp_path / "r.json"))
    entries = len(json.loads(base.read_text())["entries"])
    err = capsys.readouterr().err.splitlines()
    assert err[:2] == [f"wrote {base}: {entries} entries", f"wrote {tmp_path / 'r.json'}"]
    _emit(sample.sample_report(with_board=True), "--svg", str(svg), "-q")
    assert svg.is_file() and capsys.readouterr().err == ""


def test_against_and_audit_end_with_one_verdict_line(tmp_path: Path) -> None:
    """A text run ends with exactly one PASS/FAIL line, and it matches the code."""
    code, out = _emit(sample.sample_report())
    verdicts = [line for line in out.splitlines() if line.startswith(("PASS", "FAIL"))]
    assert verdicts == [out.splitlines()[-1]] and verdicts[0].endswith(f"(exit {code})")


def test_unwritable_output_is_a_usage_error(tmp_path: Path) -> None:
    with pytest.raises(UsageError, match="cannot write"):
        _emit(sample.sample_report(), "--output", str(tmp_path / "no" / "dir" / "r.txt"))


@pytest.mark.parametrize(("argv", "env", "escapes"), [
    (("--color", "never"), {}, False),
    (("--color", "always"), {}, True),
    (("--color", "always", "--format", "json"), {}, False),
    ((), {"NO_COLOR": "1"}, False),
    ((), {}, False),  # a StringIO is not a terminal
])
def test_colour(argv: tuple[str, ...], env: dict[str, str], escapes: bool) -> None:
    _, out = _emit(sample.sample_report(), *argv, env=env)
    assert ("\x1b[" in out) is escapes


def test_write_baseline_then_use_it(tmp_path: Path) -> None:
    """The audit entry applies the baseline (:func:`with_baseline`); emit
    writes the file and gates on what the audit decided."""
    path = tmp_path / "baseline.json"
    accepted = with_baseline(sample.sample_report(), AuditOptions(accept_all=True))
    code, _ = _emit(accepted, "--write-baseline", str(path), "--quiet")
    assert code == 0 and path.is_file()
    using = AuditOptions(baseline=str(path))
    code, out = _emit(with_baseline(sample.sample_report(), using), "--baseline", str(path))
    assert code == 0 and "PASS" in out
    report = sample.sample_report()
    extra = dataclasses.replace(report.findings[0], finding=dataclasses.replace(
        report.findings[0].finding, sensor="SW_POWER", refs=("E1",)))
    changed = dataclasses.replace(report, findings=(extra, *report.findings[1:]))
    code, out = _emit(with_baseline(changed, using), "--baseline", str(path))
    assert code == 1
    assert "ground-gap-tight on SW_MODE (nets GND, TOUCH_MODE; refs E2)" in out


def test_svg_option(tmp_path: Path) -> None:
    _emit(sample.sample_report(with_board=True), "--svg", str(tmp_path / "b.svg"))
    assert (tmp_path / "b.svg").read_text().startswith("<?xml")


def test_mains_caution_is_shown() -> None:
    assert cautions_for("mains") == (MAINS_CAUTION,)
    assert cautions_for("battery") == ()
    _, out = _emit(sample.sample_report(cautions=cautions_for("mains")))
    assert "IEC 62368-1" in out and "IEC 60335-1" in out


def test_against_a_revision(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("GIT_CONFIG_GLOBAL", "/dev/null")
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "hw/panel.kicad_pcb", "ratio 0.0614\n")
    commit_file(repo, "hw/panel.kicad_pcb", "ratio 0.03\n")
    board = repo / "hw/panel.kicad_pcb"

    def fake_audit(path: str) -> Report:
        """Stands in for the pipeline: the file's text sets SW_POWER's ratio."""
        ratio = float(Path(path).read_text().split()[1])
        report = sample.sample_report(info=sample.sample_info(board_path=path))
        first = report.sensors[0]
        assert first.metrics is not None
        metrics = dataclasses.replace(first.metrics, delta_ratio=ratio)
        return dataclasses.replace(report, sensors=(dataclasses.replace(first, metrics=metrics),
                                                    *report.sensors[1:]))

    out = io.StringIO()
    current = fake_audit(str(board))
    code = emit(dataclasses.replace(current, findings=()), _args("--against", "HEAD~1"),
                audit=fake_audit, stdout=out, env={})
    text = out.getvalue()
    assert code == 1  # 0.0614 -> 0.03 loses 51 % of the ratio (> 20 %)
    assert "HEAD~1:hw/panel.kicad_pcb" in text
    assert "lost 51.1 % (> 20 %)" in text  # (0.0614 - 0.03) / 0.0614 = 0.5114
    assert "padaudit-rev-" not in text  # no temporary path leaks into the output
    # One verdict for the whole run, the comparison's folded in: the audit
    # alone passes (no findings), the comparison fails, and so does the line.
    verdicts = [line for line in text.splitlines() if line.startswith(("PASS", "FAIL"))]
    assert verdicts == [text.splitlines()[-1]]
    assert verdicts[0].startswith("FAIL  0 errors") and verdicts[0].endswith("(exit 1)")
    assert "SW_POWER lost more than 20 % of ΔC/Cp" in verdicts[0]


def test_json_summary_counts_are_the_verdict_lines(tmp_path: Path) -> None:
    target = tmp_path / "r.json"
    code, line = _emit(sample.sample_report(), "--format", "json", "--output", str(target))
    summary = json.loads(target.read_text())["summary"]
    assert summary["exit_code"] == code
    counts = (f"{summary['findings']['error']} errors", f"{summary['waived']} waived",
              f"{summary['baselined']} baselined", f"{summary['stale']} stale")
    assert all(part in line for part in counts), (counts, line)
    assert (summary["waived"], summary["baselined"], summary["stale"]) == (1, 1, 1)
