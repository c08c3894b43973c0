"""``padaudit audit`` end to end on the mutual-pair fixtures
(fixtures/make_mutual_boards.py): the pairs' solves run among the 3-D jobs
shared with a forked helper, so the JSON must be the same bytes with one
process and with two, and validate against the shipped schema (the
project's own contract, docs/report-json.md; common practice, no source).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.cli.main import main

MUTUAL = Path(__file__).resolve().parents[2] / "fixtures" / "mutual"

#: Every test here runs 3-D solves (seconds each): not in the quick loop.
pytestmark = pytest.mark.slow


def _json(tmp_path: Path, case: str, jobs: int, *flags: str) -> str:
    out = tmp_path / f"{case}-{jobs}.json"
    main(["audit", str(MUTUAL / f"{case}.kicad_pcb"), *flags, "--jobs", str(jobs), "--quiet",
          "--format", "json", "--output", str(out)])
    return out.read_text(encoding="utf-8")


@pytest.mark.parametrize(("case", "flags"), [
    ("comb-keys", ("--precise",)),  # a 3-D pair, two disk-and-ring estimates, the coupling
    ("ring-keys", ()),              # two disk-and-ring pairs
])
def test_json_is_the_same_bytes_with_one_process_or_two(tmp_path: Path, case: str,
                                                        flags: tuple[str, ...]) -> None:
    one = _json(tmp_path, case, 1, *flags)
    assert _json(tmp_path, case, 2, *flags) == one
    metrics = [s["metrics"] for s in json.loads(one)["sensors"] if s["kind"] == "mutual-rx"]
    assert metrics and all(m is not None for m in metrics)


def test_a_3d_pair_without_its_estimate_validates(tmp_path: Path) -> None:
    import jsonschema

    from auditor.report.as_json import load_schema

    doc = json.loads(_json(tmp_path, "comb-keys", 1))
    jsonschema.Draft202012Validator(load_schema()).validate(doc)
    metrics = [s["metrics"] for s in doc["sensors"] if s["kind"] == "mutual-rx"]
    assert len(metrics) == 3
    for m in metrics:
        assert m["method"] == "precise" and "quick" not in m
        assert m["quick_missing"].startswith("not computed")
