"""Each structure real boards contain, on its invented fixture board
(fixtures/make_structure_boards.py), gives the electrodes, kinds, groups and
path ends its manifest lists.

What counts as one electrode, slider, wheel or pair is common touch-layout
practice (physics.md §4.1; common practice, no source); the manifest is
written by hand, apart from padaudit.
"""

from __future__ import annotations

import io
import json
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path
from typing import Any

import pytest

from auditor.cli.main import main

FIXTURES = Path(__file__).resolve().parents[3] / "fixtures" / "structures"
MANIFEST: dict[str, Any] = json.loads((FIXTURES / "manifest.json").read_text(encoding="utf-8"))
CASES = sorted(MANIFEST["cases"])


def sensors_json(board: Path) -> tuple[int, dict[str, Any], str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main(["sensors", str(board), "--json"])
    return code, json.loads(out.getvalue()), err.getvalue()


@pytest.fixture(scope="module")
def found() -> dict[str, tuple[int, dict[str, Any], str]]:
    return {name: sensors_json(FIXTURES / MANIFEST["cases"][name]["board"]) for name in CASES}


@pytest.mark.parametrize("name", CASES)
def test_electrodes_and_kinds(name: str, found: dict[str, tuple[int, dict[str, Any], str]]
                              ) -> None:
    want = MANIFEST["cases"][name]
    code, doc, _ = found[name]
    by_name = {s["name"]: s for s in doc["sensors"]}
    assert sorted(by_name) == sorted(want["electrodes"])
    assert {n: s["kind"] for n, s in by_name.items()} == want["kinds"]
    assert all(s["reason"] for s in doc["sensors"])
    assert code == (0 if want["electrodes"] else 1)


@pytest.mark.parametrize("name", CASES)
def test_groups(name: str, found: dict[str, tuple[int, dict[str, Any], str]]) -> None:
    want = MANIFEST["cases"][name]
    groups: dict[str, set[str]] = {}
    for s in found[name][1]["sensors"]:
        if s["group"]:
            groups.setdefault(s["group"], set()).add(s["name"])
    assert sorted(sorted(g) for g in groups.values()) == sorted(sorted(g) for g in want["groups"])


@pytest.mark.parametrize("name", [n for n in CASES if MANIFEST["cases"][n]["paths"]])
def test_path_ends(name: str, found: dict[str, tuple[int, dict[str, Any], str]]) -> None:
    by_name = {s["name"]: s for s in found[name][1]["sensors"]}
    for sensor, want in MANIFEST["cases"][name]["paths"].items():
        path = by_name[sensor]["path"]
        assert path["controller_ref"] == want["controller_ref"]
        assert path["controller"].split(".")[0] == want["controller_ref"]
        assert path["off_board"] is want["off_board"]
        if "complete" in want:
            assert path["complete"] is want["complete"]


@pytest.mark.parametrize("name", [n for n in CASES if MANIFEST["cases"][n]["rejected_refs"]])
def test_candidates_are_never_silence(name: str,
                                      found: dict[str, tuple[int, dict[str, Any], str]]) -> None:
    want = MANIFEST["cases"][name]
    _, doc, err = found[name]
    refs = {ref for r in doc["rejected"] for ref in r["refs"]}
    assert set(want["rejected_refs"]) <= refs
    assert doc.get("suggested_config", []) == want["suggested_config"]
    for line in want["suggested_config"]:
        assert f"  {line}\n" in err


def test_netless_copper_says_so(found: dict[str, tuple[int, dict[str, Any], str]]) -> None:
    rejected = found["netless-footprint"][1]["rejected"]
    assert any("without a net" in r["why"] for r in rejected)


@pytest.mark.parametrize("name", [n for n in CASES if MANIFEST["cases"][n]["absent_findings"]])
def test_findings_not_raised(name: str) -> None:
    from auditor.audit import AuditOptions, run_audit

    report = run_audit(FIXTURES / MANIFEST["cases"][name]["board"], AuditOptions(solve=False))
    ids = {d.finding.rule_id for d in report.findings}
    assert not ids & set(MANIFEST["cases"][name]["absent_findings"])


def test_committed_boards_are_current(tmp_path: Path) -> None:
    """The generator's output today is byte for byte what is committed."""
    from fixtures.make_structure_boards import write_all

    for path in write_all(tmp_path):
        committed = FIXTURES / path.name
        assert committed.read_bytes() == path.read_bytes(), f"{path.name} is stale: run " \
            "python fixtures/make_structure_boards.py"


def test_key_switches_get_one_note(found: dict[str, tuple[int, dict[str, Any], str]]) -> None:
    notes = found["keyswitch-matrix"][1]["notes"]
    assert sum("key switch" in n for n in notes) == 1
    assert not any("key switch" in n for n in found["mutual-xy"][1]["notes"])
