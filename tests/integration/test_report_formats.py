"""Golden outputs of every report format for the invented sample report.

Regenerate after an intended change with ``PADAUDIT_UPDATE_GOLDEN=1 pytest
tests/integration/test_report_formats.py`` and review the diff. The tool
version is replaced by ``@VERSION@`` so a release does not touch them.
"""

from __future__ import annotations

import io
import json
import os
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "support"))
import sample_report as sample  # noqa: E402

from auditor import __version__  # noqa: E402
from auditor.report.render import FORMATS, render  # noqa: E402
from auditor.report.text import render_text  # noqa: E402

GOLDEN = Path(__file__).resolve().parents[1] / "golden"
SUFFIX = {"text": "txt", "json": "json", "sarif": "sarif", "junit": "junit.xml",
          "markdown": "md"}


def normalised(text: str) -> str:
    return text.replace(__version__, "@VERSION@")


def _check(name: str, text: str) -> None:
    path = GOLDEN / name
    if os.environ.get("PADAUDIT_UPDATE_GOLDEN") == "1":
        path.write_text(normalised(text), encoding="utf-8")
    assert path.is_file(), f"{path} missing: run with PADAUDIT_UPDATE_GOLDEN=1"
    assert normalised(text) == path.read_text(encoding="utf-8")


@pytest.mark.parametrize("fmt", FORMATS)
def test_golden(fmt: str) -> None:
    out = io.StringIO()
    if fmt == "text":
        render_text(sample.sample_report(), out, False, width=100)
    else:
        render(sample.sample_report(), fmt, out)
    _check(f"sample.{SUFFIX[fmt]}", out.getvalue())


@pytest.mark.parametrize("fmt", ["text", "json", "markdown"])
def test_golden_precise(fmt: str) -> None:
    """The sample report with invented precise extras (coupling table, one
    slider scan with a dead zone and a reversal, precise metrics beside the
    quick estimate)."""
    out = io.StringIO()
    if fmt == "text":
        render_text(sample.precise_report(), out, False, width=100)
    else:
        render(sample.precise_report(), fmt, out)
    _check(f"precise.{SUFFIX[fmt]}", out.getvalue())


def test_precise_json_is_valid_against_the_shipped_schema() -> None:
    import jsonschema

    from auditor.report.as_json import load_schema

    doc = json.loads((GOLDEN / "precise.json").read_text())
    jsonschema.Draft202012Validator(load_schema()).validate(doc)
    assert "precise" not in json.loads((GOLDEN / "sample.json").read_text())
    scan = doc["precise"]["scans"][0]
    assert all(len(seg["delta_pf"]) == len(scan["positions_mm"]) for seg in scan["segments"])


def test_golden_text_by_rank_clean() -> None:
    out = io.StringIO()
    render_text(sample.clean_report(), out, False, order="rank", width=100)
    _check("clean_by_rank.txt", out.getvalue())


def test_machine_formats_never_carry_colour() -> None:
    for fmt in FORMATS:
        if fmt == "text":
            continue
        out = io.StringIO()
        render(sample.sample_report(), fmt, out, colour=True)
        assert "\x1b[" not in out.getvalue(), fmt


def test_unknown_format_lists_the_choices() -> None:
    with pytest.raises(ValueError, match="text, json, sarif, junit, markdown"):
        render(sample.sample_report(), "html", io.StringIO())


def test_golden_json_is_valid_json_with_the_schema_version() -> None:
    assert json.loads((GOLDEN / "sample.json").read_text())["schema_version"] == 2


# --- end to end through `padaudit audit` on a generated fixture board -------

FIXTURE = Path(__file__).resolve().parents[2] / "fixtures" / "formats" / "v8.kicad_pcb"
SARIF_SCHEMA = Path(__file__).resolve().parents[1] / "data" / "sarif-schema-2.1.0.json"
needs_fixture = pytest.mark.skipif(not FIXTURE.is_file(), reason="fixture board not generated")


def _audit(tmp_path: Path, *argv: str) -> tuple[int, str]:
    from auditor.cli.main import main

    target = tmp_path / "out"
    code = main(["audit", str(FIXTURE), "--output", str(target), "--quiet", *argv])
    return code, target.read_text(encoding="utf-8")


@needs_fixture
def test_audit_json_is_valid_deterministic_and_matches_the_exit_code(tmp_path: Path) -> None:
    import jsonschema

    from auditor.report.as_json import load_schema

    code, first = _audit(tmp_path, "--format", "json")
    _, second = _audit(tmp_path, "--format", "json")
    assert first == second  # byte-identical for the same board and options
    doc = json.loads(first)
    jsonschema.Draft202012Validator(load_schema()).validate(doc)
    assert code == doc["summary"]["exit_code"]
    assert code == (1 if doc["summary"]["failing"] or doc["rule_errors"] else 0)
    assert doc["board"]["format_version"] == 20240108


@needs_fixture
def test_audit_sarif_is_valid_against_the_official_schema(tmp_path: Path) -> None:
    import jsonschema

    _, text = _audit(tmp_path, "--format", "sarif")
    jsonschema.Draft4Validator(json.loads(SARIF_SCHEMA.read_text())).validate(json.loads(text))


@needs_fixture
@pytest.mark.parametrize("fmt", ["text", "junit", "markdown"])
def test_audit_other_formats_write_the_file_even_when_failing(tmp_path: Path, fmt: str) -> None:
    code, text = _audit(tmp_path, "--format", fmt, "--color", "always")
    assert code in (0, 1) and text
    assert "\x1b[" not in text  # files never get colour


@needs_fixture
def test_audit_no_color_stdout_has_no_escape_codes(capsys: pytest.CaptureFixture[str],
                                                    monkeypatch: pytest.MonkeyPatch) -> None:
    from auditor.cli.main import main

    monkeypatch.setenv("NO_COLOR", "1")
    main(["audit", str(FIXTURE)])
    main(["audit", str(FIXTURE), "--color", "never"])
    out = capsys.readouterr().out
    assert "padaudit" in out and "\x1b[" not in out


@needs_fixture
def test_audit_baseline_round_trip_end_to_end(tmp_path: Path) -> None:
    from auditor.cli.main import main

    baseline = tmp_path / "baseline.json"
    assert main(["audit", str(FIXTURE), "--write-baseline", str(baseline), "--quiet",
                 "--output", str(tmp_path / "r.txt")]) == 0
    assert main(["audit", str(FIXTURE), "--baseline", str(baseline), "--format", "json",
                 "--output", str(tmp_path / "r.json")]) == 0
    doc = json.loads((tmp_path / "r.json").read_text())
    assert doc["stale_baseline"] == [] and not any(f["failing"] for f in doc["findings"])


@needs_fixture
def test_audit_against_a_revision_end_to_end(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                             capsys: pytest.CaptureFixture[str]) -> None:
    from gitrepo import commit_file, new_repo

    from auditor.cli.main import main

    monkeypatch.setenv("GIT_CONFIG_GLOBAL", os.devnull)
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "hw/board.kicad_pcb", FIXTURE.read_text())
    monkeypatch.chdir(repo)
    code = main(["audit", "hw/board.kicad_pcb", "--against", "HEAD", "--color", "never"])
    out = capsys.readouterr().out
    assert "padaudit diff: HEAD:hw/board.kicad_pcb → hw/board.kicad_pcb" in out
    assert "New findings (0)" in out and "Fixed findings (0)" in out
    assert code in (0, 1)
    assert main(["audit", "hw/board.kicad_pcb", "--against", "no-such-rev"]) == 2


@needs_fixture
def test_audit_svg_has_the_board_outline_and_copper(tmp_path: Path) -> None:
    import xml.etree.ElementTree as ET

    from auditor.cli.main import main

    picture = tmp_path / "board.svg"
    main(["audit", str(FIXTURE), "--svg", str(picture), "--quiet",
          "--output", str(tmp_path / "r.txt")])
    ids = {g.get("id") for g in ET.parse(picture).getroot().iter("{http://www.w3.org/2000/svg}g")}
    assert {"outline", "copper", "electrodes", "findings", "legend"} <= ids


@needs_fixture
def test_junit_marks_rules_that_did_not_run_as_skipped(tmp_path: Path) -> None:
    """A quick run does not judge 3-D results, and a rule switched off in the
    configuration does not run: both are skipped with the reason, never passed."""
    import xml.etree.ElementTree as ET

    config = tmp_path / "padaudit.toml"
    config.write_text('[severity]\n"trace-crossings" = "off"\n', encoding="utf-8")
    _, text = _audit(tmp_path, "--format", "junit", "--config", str(config))
    root = ET.fromstring(text)
    skipped = {case.get("name"): case.find("skipped").get("message")  # type: ignore[union-attr]
               for case in root.iter("testcase") if case.find("skipped") is not None}
    assert skipped["crosstalk-high"] == "judges 3-D results only: runs with --precise"
    assert skipped["slider-dead-zone"] == "judges 3-D results only: runs with --precise"
    assert skipped["trace-crossings"] == "switched off by the profile or the configuration"
    rules = next(s for s in root.iter("testsuite") if s.get("name") == "padaudit.rules")
    assert rules.get("skipped") == str(len(skipped))
    assert root.get("skipped") == str(len(skipped))
