"""Regressions found by trying padaudit as a new user would.

Each test reproduces one reported problem end to end through the command
line. The expectations are the project's own contract (one-line errors that
name the file, exit code 2, advice that names real configuration keys;
README and docs/configuration.md; common practice for linters, no source).
"""

from __future__ import annotations

import shutil
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "support"))

from gitrepo import commit_file, git, new_repo  # noqa: E402

from auditor.cli.main import main  # noqa: E402
from auditor.rules.registry import all_rules  # noqa: E402
from auditor.sensors.selection import SensorSelection  # noqa: E402

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures" / "rules"
BOARD = FIXTURES / "trace-too-wide--bad.kicad_pcb"


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main([*args, "--color", "never"] if args[0] == "audit" else list(args))
    out, err = capsys.readouterr()
    return code, out, err


def test_no_electrodes_advice_names_the_real_key() -> None:
    """The fix advice once said ``netclasses``, a key the configuration rejects."""
    (rule,) = [r for r in all_rules() if r.rule_id == "no-electrodes"]
    listed = rule.fix.split("[tool.padaudit.sensors] (", 1)[1].split(")", 1)[0]
    keys = {k.strip() for k in listed.split(",")}
    assert keys <= set(SensorSelection.__dataclass_fields__), keys


def test_unknown_revision_is_refused_before_any_report(
        tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    """``--against`` with a revision that does not exist printed the whole
    report and then a message blaming the board; now one line, nothing else."""
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "panel.kicad_pcb", BOARD.read_text(), "first")
    monkeypatch.chdir(repo)
    code, out, err = run(capsys, "audit", "panel.kicad_pcb", "--no-solve",
                         "--against", "no-such-branch")
    assert code == 2
    assert out == ""
    assert err.count("\n") == 1
    assert "no such revision" in err and "panel.kicad_pcb" in err
    assert git(repo, "status", "--porcelain").stdout == ""


def test_against_outside_a_repository_names_the_board(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    loose = Path(shutil.copy(BOARD, tmp_path / "loose.kicad_pcb"))
    code, out, err = run(capsys, "audit", str(loose), "--no-solve", "--against", "HEAD")
    assert (code, out) == (2, "")
    assert err.startswith(f"padaudit: {loose}:") and err.count("\n") == 1


def test_project_folder_names_the_board_inside(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    folder = tmp_path / "panel"
    folder.mkdir()
    shutil.copy(BOARD, folder / "panel.kicad_pcb")
    (folder / "panel.kicad_pro").write_text("{}\n")
    code, out, err = run(capsys, "audit", str(folder), "--no-solve")
    assert (code, out) == (2, "")
    assert err.count("\n") == 1
    assert "is a directory" in err and str(folder / "panel.kicad_pcb") in err


@pytest.mark.parametrize("spec, says", [
    ("2:abc", "unknown material 'abc'"),
    ("2:1e400", "finite"),
])
def test_overlay_errors_name_the_option(spec: str, says: str,
                                        capsys: pytest.CaptureFixture[str]) -> None:
    code, out, err = run(capsys, "audit", str(BOARD), "--no-solve", "--overlay", spec)
    assert (code, out) == (2, "")
    assert err.startswith(f"padaudit: --overlay '{spec}': ") and says in err
    assert err.count("\n") == 1


def test_junit_carries_the_mains_caution(capsys: pytest.CaptureFixture[str]) -> None:
    """Every other format showed the mains caution; JUnit did not."""
    code, out, _ = run(capsys, "audit", str(BOARD), "--no-solve", "--power", "mains",
                       "--format", "junit")
    assert code in (0, 1)
    suite_out = [e.text or "" for s in ET.fromstring(out).iter("testsuite")
                 for e in s.findall("system-out")]
    assert any("CAUTION" in t and "IEC" in t for t in suite_out)
    code, out, _ = run(capsys, "audit", str(BOARD), "--no-solve", "--power", "battery",
                       "--format", "junit")
    assert "CAUTION" not in out


def test_default_stackup_names_its_original_source(
        capsys: pytest.CaptureFixture[str]) -> None:
    """The no-stackup warning cited only a bracketed key into a reference file."""
    v4 = FIXTURES.parent / "formats" / "v4.kicad_pcb"
    code, out, _ = run(capsys, "inspect", str(v4))
    assert code == 0
    (line,) = [ln for ln in out.splitlines() if ln.strip().startswith("no-stackup")]
    assert "stackup_predefined_prms.h" in line and "docs/reference/kicad-format.md" in line


@pytest.mark.parametrize("args, says", [
    (["--pad-diameter", "1e9"], "--pad-diameter: "),
    (["--pad-diameter", "10", "--gap", "1e9"], "--gap: "),
    (["--pad-diameter", "10", "--finger", "1e9"], "--finger: "),
    (["--pad-diameter", "10", "--overlay", "1e-9:2"], "--overlay '1e-9:2': "),
    (["--pad-diameter", "10", "--overlay", "2:abc"], "--overlay '2:abc': unknown material"),
])
def test_absurd_estimate_input_is_a_usage_error(args: list[str], says: str,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    """These once ended in exit 3 (an internal error from the mesher) or an
    error that did not name the option."""
    code = main(["estimate", *args])
    out, err = capsys.readouterr()
    assert (code, out) == (2, "")
    assert err.startswith(f"padaudit: {says}") and err.count("\n") == 1


def test_plane_closer_than_the_mesh_resolves_is_refused(
        capsys: pytest.CaptureFixture[str]) -> None:
    """A plane 1 nm below a 10 mm pad gave Cp 4.9 pF, where a parallel plate
    is eps_r eps0 A / d = 4.4 x 8.854e-12 x 78.5e-6 / 1e-12 F, about 3e6 pF
    (textbook parallel-plate formula); now refused instead of silently wrong."""
    code = main(["estimate", "--pad-diameter", "10", "--plane-below", "1e-6"])
    out, err = capsys.readouterr()
    assert (code, out) == (2, "")
    assert err.startswith("padaudit: --plane-below: ") and err.count("\n") == 1
    code = main(["estimate", "--pad-diameter", "10", "--plane-below", "0.01", "--json"])
    assert code == 0
