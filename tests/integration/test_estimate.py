"""``padaudit estimate`` end to end: exit codes, JSON contract, determinism."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
from scipy.constants import epsilon_0

from auditor.cli.main import main
from auditor.field.pad_model import field_matrices


def _run(argv: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    code = main(["estimate", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_json_has_the_contract_keys(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = _run(["--json"], capsys)
    assert code == 0
    data = json.loads(out)
    for key in ("cp_pf", "delta_c_pf", "delta_ratio", "matrix", "matrix_with_finger"):
        assert key in data
    assert data["matrix"]["conductors"] == ["pad", "ground"]
    assert data["matrix_with_finger"]["conductors"] == ["pad", "ground", "finger"]
    assert data["delta_ratio"] == pytest.approx(data["delta_c_pf"] / data["cp_pf"], rel=1e-4)


def test_json_is_byte_identical_across_runs(capsys: pytest.CaptureFixture[str]) -> None:
    argv = ["--json", "--plane-below", "1.6", "--overlay", "3:glass"]
    first = _run(argv, capsys)[1]
    field_matrices.cache_clear()  # recompute, do not replay the cached solve
    second = _run(argv, capsys)[1]
    assert first == second
    assert list(json.loads(first)) == sorted(json.loads(first))


def test_no_ring_no_plane_gives_the_electrode_alone(capsys: pytest.CaptureFixture[str]) -> None:
    # 8 eps0 a for a 12 mm disk in vacuum (Jackson 1999 sec. 3.13).
    code, out, _ = _run(["--json", "--pad-diameter", "12", "--gap", "none", "--plane-below",
                         "none", "--overlay", "none", "--board-er", "1", "--finger", "none"],
                        capsys)
    assert code == 0
    assert json.loads(out)["cp_pf"] == pytest.approx(8 * epsilon_0 * 6e-3 * 1e12, rel=0.005)


def test_sweep_prints_a_table(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = _run(["--pad-diameter", "8:12:2"], capsys)
    assert code == 0
    rows = [line.split() for line in out.splitlines() if line.strip()[:2] in ("8 ", "10", "12")]
    assert [r[0] for r in rows] == ["8", "10", "12"]
    code, out, _ = _run(["--pad-diameter", "8:12:2", "--json"], capsys)
    assert [rec["pad_diameter_mm"] for rec in json.loads(out)["sweep"]] == [8.0, 10.0, 12.0]


def test_mains_prints_the_safety_caution(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = _run(["--power", "mains"], capsys)
    assert code == 0
    assert "IEC 62368-1" in out and "licensed practice" in out
    code, out, err = _run(["--power", "mains", "--json"], capsys)
    assert "IEC 60335-1" in err
    assert json.loads(out)["cautions"]


@pytest.mark.parametrize("argv", [
    ["--pad-diameter", "abc"], ["--pad-diameter", "16:8:2"], ["--gap", "-1"],
    ["--plane-fill", "2"], ["--overlay", "2:unobtainium"], ["--overlay", "thick"],
    ["--power", "solar"], ["--plane-below", "3"], ["--finger", "0"],
    ["--board-er", "0.5"], ["--pad-diameter", "1:1000:1"], ["--ground-fill", "0"],
    ["--ground-fill", "1.2"],
])
def test_bad_values_exit_2_with_one_line(argv: list[str],
                                         capsys: pytest.CaptureFixture[str]) -> None:
    code, out, err = _run(argv, capsys)
    assert code == 2
    assert out == ""
    assert err.startswith("padaudit: ") and err.count("\n") == 1


def test_entry_point_as_a_process() -> None:
    done = subprocess.run([sys.executable, "-m", "auditor", "estimate", "--gap", "bad"],
                          capture_output=True, text=True, check=False)
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
