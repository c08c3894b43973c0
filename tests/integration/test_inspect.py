"""``padaudit inspect`` end to end: exit codes, JSON keys, determinism."""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
V8 = ROOT / "fixtures" / "formats" / "v8.kicad_pcb"


def run(*args: str, env: dict[str, str] | None = None) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "auditor", "inspect", *args],
                          capture_output=True, text=True, cwd=ROOT,
                          env={**os.environ, **(env or {})})


def test_json_document_keys_and_values() -> None:
    done = run(str(V8), "--json")
    assert done.returncode == 0, done.stderr
    doc = json.loads(done.stdout)
    for key in ("pads", "nets", "zones", "outline", "stackup", "version", "warnings"):
        assert key in doc
    assert doc["version"] == 20240108
    pad = next(p for p in doc["pads"] if p["ref"] == "U2" and p["number"] == "2")
    assert set(pad) >= {"ref", "number", "net", "layers", "x_mm", "y_mm",
                        "copper_area_mm2", "shape"}
    # hand-worked: U2 at (50, 20) rotated 90°, pad at local (-4, 0) -> (50, 24)
    assert (pad["x_mm"], pad["y_mm"], pad["copper_area_mm2"]) == (50.0, 24.0, 2.0)
    assert pad["layers"] == ["F.Cu"] and pad["shape"] == "rect" and pad["net"] == "TOUCH1"
    # 5 + 6 + 8 + quarter arc of radius 5 (5π/2); 1 via
    touch = doc["nets"]["TOUCH1"]
    assert touch["vias"] == 1
    assert touch["track_length_mm"] == pytest.approx(19 + 2.5 * math.pi, abs=1e-6)
    fills = {(z["layer"], z["fill"]) for z in doc["zones"]}
    assert {("B.Cu", "solid"), ("In1.Cu", "hatched"), ("In2.Cu", "none")} <= fills
    assert doc["outline"]["bbox_mm"] == pytest.approx([0, 0, 100, 80], abs=1e-3)
    assert [w["code"] for w in doc["warnings"]] == ["zone-unfilled"]


def test_json_is_byte_identical_across_runs() -> None:
    first, second = run(str(V8), "--json"), run(str(V8), "--json")
    assert first.stdout == second.stdout and first.stdout


def test_summary_plain_when_not_a_terminal() -> None:
    done = run(str(ROOT / "fixtures" / "formats" / "v5.kicad_pcb"))
    assert done.returncode == 0
    assert "KiCad board format 20171130" in done.stdout
    assert "no-stackup" in done.stdout and "\033[" not in done.stdout


@pytest.mark.parametrize("content", [b"", b"(kicad_pcb (version 20240108)", b"\x00\x01\x02",
                                     b"(kicad_pcb (version 20240108) (general (thickness nan)))"])
def test_bad_input_exit_2_one_line(tmp_path: Path, content: bytes) -> None:
    bad = tmp_path / "bad.kicad_pcb"
    bad.write_bytes(content)
    done = run(str(bad))
    assert done.returncode == 2
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and str(bad) in lines[0] and "Traceback" not in done.stderr


def test_missing_file_exit_2(tmp_path: Path) -> None:
    done = run(str(tmp_path / "none.kicad_pcb"))
    assert done.returncode == 2 and "no such file" in done.stderr
