"""``--jobs`` and the 3-D jobs shared with forked helper processes, end to end.

Expectations are the project's own contract (``auditor.cli.main``: one line
and exit 2 for bad input; 128 + signal number after a signal, no traceback)
and common practice for command-line tools, no source: a signal leaves no
process of the run behind.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from auditor.cli.main import main
from fixtures.make_rule_boards import Design, board_text

REPO_ROOT = Path(__file__).resolve().parents[2]
BOARD = REPO_ROOT / "fixtures" / "rules" / "trace-too-wide--bad.kicad_pcb"


@pytest.mark.parametrize("value", ["0", "-1", "two", "1.5"])
def test_a_bad_process_count_is_a_usage_error(value: str,
                                              capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as stop:
        main(["audit", str(BOARD), "--no-solve", "--jobs", value])
    assert stop.value.code == 2
    err = capsys.readouterr().err
    assert "--jobs" in err and "Traceback" not in err


def test_the_environment_sets_the_default(monkeypatch: pytest.MonkeyPatch,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    monkeypatch.setenv("PADAUDIT_JOBS", "many")
    with pytest.raises(SystemExit) as stop:
        main(["audit", str(BOARD), "--no-solve"])
    assert stop.value.code == 2 and "PADAUDIT_JOBS" in capsys.readouterr().err
    monkeypatch.setenv("PADAUDIT_JOBS", "1")
    assert main(["audit", str(BOARD), "--no-solve", "--quiet", "--format", "json",
                 "--output", os.devnull]) in (0, 1)


def _children(pid: int) -> list[int]:
    try:
        return [int(p) for p in Path(f"/proc/{pid}/task/{pid}/children").read_text().split()]
    except OSError:
        return []


def _group_alive(group: int) -> bool:
    try:
        os.killpg(group, 0)
    except ProcessLookupError:
        return False
    return True


@pytest.mark.slow
@pytest.mark.skipif(not Path(f"/proc/{os.getpid()}/task/{os.getpid()}/children").exists(),
                    reason="needs Linux /proc child lists")
@pytest.mark.parametrize(("name", "code", "to_group"),
                         [("SIGINT", 130, True), ("SIGTERM", 143, False)])
def test_signal_while_helpers_run_3d_jobs(tmp_path: Path, name: str, code: int,
                                          to_group: bool) -> None:
    """Ctrl-C reaches the whole group, helpers included; SIGTERM (a CI
    runner, ``timeout``) only the main process. Either way: the exit code,
    one line, no helper traceback, nothing left running."""
    board = tmp_path / "slider.kicad_pcb"
    board.write_text(board_text(Design(buttons=(), slider=(6.0, 6.0, 6.0)), "slider"),
                     encoding="utf-8")
    env = {**os.environ, "PYTHONPATH": str(REPO_ROOT), "NO_COLOR": "1"}
    run = subprocess.Popen([sys.executable, "-m", "auditor", "audit", str(board), "--precise",
                            "--jobs", "2", "--quiet", "--format", "json", "--output",
                            str(tmp_path / "out.json")], stdout=subprocess.DEVNULL,
                           stderr=subprocess.PIPE, text=True, env=env, start_new_session=True)
    deadline = time.monotonic() + 60
    while not _children(run.pid) and run.poll() is None and time.monotonic() < deadline:
        time.sleep(0.01)
    assert _children(run.pid), "no helper was forked"
    time.sleep(0.3)  # the helper is inside a 3-D solve
    sent = getattr(signal, name)
    os.killpg(run.pid, sent) if to_group else os.kill(run.pid, sent)
    _, err = run.communicate(timeout=60)
    assert run.returncode == code, err
    assert err.splitlines() == [f"padaudit: {'interrupted' if to_group else 'terminated'}"]
    for _ in range(100):
        if not _group_alive(run.pid):
            break
        time.sleep(0.02)
    assert not _group_alive(run.pid), "a helper outlived the run"


@pytest.mark.slow
def test_estimate_sweep_gives_the_same_bytes_with_two_processes(
        capsys: pytest.CaptureFixture[str]) -> None:
    """A ``--precise`` sweep shared with a helper prints what one process does."""
    outputs = []
    for jobs in ("1", "2"):
        assert main(["estimate", "--pad-diameter", "8:10:2", "--precise", "--cell", "0.5",
                     "--json", "--jobs", jobs]) == 0
        outputs.append(capsys.readouterr().out)
    assert outputs[0] == outputs[1] and '"precise"' in outputs[0]
