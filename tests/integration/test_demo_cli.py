"""``padaudit demo`` end to end: the acceptance of the first five minutes.

The planted problems are listed by the demo generator itself
(fixtures/demo/planted.json, invented scenario). The ranking checks are
physics trends, each with its origin beside it.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.cli.main import main

ROOT = Path(__file__).resolve().parents[2]
PLANTED = json.loads((ROOT / "fixtures" / "demo" / "planted.json").read_text("utf-8"))


@pytest.fixture(scope="module")
def demo_json(tmp_path_factory: pytest.TempPathFactory) -> dict:  # type: ignore[type-arg]
    out = tmp_path_factory.mktemp("demo") / "demo.json"
    code = main(["demo", "--format", "json", "--output", str(out), "--quiet"])
    # The demo shows its planted problems and still exits 0: it is not a gate.
    assert code == 0
    return json.loads(out.read_text("utf-8"))  # type: ignore[no-any-return]


def test_demo_text_run_exits_0_and_says_it_is_a_demo(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["demo", "--color", "never"]) == 0
    out = capsys.readouterr().out
    assert "planted on purpose" in out
    assert "\x1b[" not in out
    # The verdict line is the run's last, after the demo's own closing words.
    assert out.rstrip("\n").splitlines()[-1].startswith("FAIL ")
    assert out.rstrip("\n").splitlines()[-1].endswith("(demo: exit 0; an audit would exit 1)")
    # The README's sample is this run, trimmed: every line it shows must be
    # a line the demo prints today (common practice, no source).
    readme = (ROOT / "README.md").read_text("utf-8")
    sample = readme.split("`padaudit demo --color never`, trimmed", 1)[1]
    sample = sample.split("```text\n", 1)[1].split("```", 1)[0]
    printed = set(out.splitlines())
    stale = [line for line in sample.splitlines() if line.strip() != "…" and line not in printed]
    assert not stale, f"README sample lines the demo no longer prints: {stale}"
    # and the "Fix it" sample: a finding with its suggested change
    fix_it = readme.split("`padaudit demo --color never`, one finding with its suggestion", 1)[1]
    fix_it = fix_it.split("```text\n", 1)[1].split("```", 1)[0]
    stale = [line for line in fix_it.splitlines() if line not in printed]
    assert not stale, f"README fix-it lines the demo no longer prints: {stale}"


@pytest.mark.parametrize("planted", PLANTED["planted"], ids=lambda p: p["problem"])
def test_every_planted_problem_is_found(demo_json: dict, planted: dict) -> None:  # type: ignore[type-arg]
    found = {(f["rule_id"], net) for f in demo_json["findings"] for net in f["nets"]}
    for rule_id in planted["rule_ids"]:
        assert (rule_id, planted["net"]) in found, f"{rule_id} on {planted['net']} not found"


def _ratio(demo_json: dict, name: str) -> float:  # type: ignore[type-arg]
    sensor = next(s for s in demo_json["sensors"] if s["name"] == name)
    return float(sensor["metrics"]["delta_ratio"])


def test_too_small_button_ranks_weakest(demo_json: dict) -> None:  # type: ignore[type-arg]
    # Bigger pads give a larger relative change up to about finger size
    # (physics.md §4.1, common practice, no source): the 6 mm button under
    # 2 mm acrylic must be the weakest of the buttons and sliders.
    solved = [s for s in demo_json["sensors"] if s["metrics"] and s["kind"] != "proximity"]
    weakest = min(solved, key=lambda s: s["metrics"]["delta_ratio"])
    assert weakest["name"] == "BTN1"


def test_solid_pour_costs_ratio(demo_json: dict) -> None:  # type: ignore[type-arg]
    # BTN3 and BTN4 are both 10 mm; BTN4 has a solid pour under it. Solid
    # copper under a pad raises Cp and lowers ΔC/Cp (physics.md §4.1, common
    # practice, no source).
    assert _ratio(demo_json, "BTN4") < _ratio(demo_json, "BTN3")


def test_weak_buttons_rank_last(demo_json: dict) -> None:  # type: ignore[type-arg]
    # Among the touch electrodes: the proximity loop (solved in 3-D by the
    # automatic mode) senses a hand at a distance, its touch ΔC is not
    # comparable with a button's.
    ranks = {s["name"]: s["rank"] for s in demo_json["sensors"]
             if s["rank"] and s["kind"] != "proximity"}
    worst_two = sorted(ranks, key=lambda n: ranks[n])[-2:]
    assert set(worst_two) == {"BTN1", "BTN2"}


def test_trace_findings_point_at_the_offending_place(demo_json: dict) -> None:  # type: ignore[type-arg]
    # Where each problem was planted is recorded by the generator
    # (fixtures/demo/planted.json); a finding must lead the user there, on the
    # right layer, not to the electrode it belongs to.
    planted = {p["problem"]: p for p in PLANTED["planted"]}
    found = {f["rule_id"]: f for f in demo_json["findings"]}
    resistor, beside = planted["series-resistor-far"], planted["sense-beside-led-line"]
    far = found["series-resistor-far"]
    assert far["layer"] == resistor["layer"]
    assert abs(far["x_mm"] - resistor["x_mm"]) < 2 and abs(far["y_mm"] - resistor["y_mm"]) < 2
    run = found["trace-parallel-run"]
    assert run["layer"] == beside["layer"]
    # The closest approach lies on the planted 22 mm stretch centred on x = 92.
    assert abs(run["x_mm"] - beside["x_mm"]) <= 11.5 and abs(run["y_mm"] - beside["y_mm"]) < 1
