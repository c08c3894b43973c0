"""Misuse and hostile input through the command line (issue 16).

Each test reproduces one failure a reliability trial found. The expectations
are the project's own contract (README, ``auditor.cli.main``: one line and
exit 2 for bad input, never a traceback, the board file never written) and
common practice for command-line tools, no source: 128 + signal number as the
exit code after a signal (POSIX shells report a signalled child that way),
an atomic rename for outputs (what editors and build tools do).
"""

from __future__ import annotations

import os
import resource
import stat
import subprocess
import sys
import threading
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "support"))

from gitrepo import GIT_ENV, commit_file, git, new_repo  # noqa: E402

from auditor.cli.main import main  # noqa: E402

REPO_ROOT = Path(__file__).resolve().parents[2]
FIXTURES = REPO_ROOT / "fixtures" / "rules"
BAD_BOARD = FIXTURES / "trace-too-wide--bad.kicad_pcb"
#: A board whose audit fails the gate (exit 1) even without a solve.
FAILING_BOARD = FIXTURES / "electrodes-share-net--bad.kicad_pcb"


def _board(tmp_path: Path, name: str = "panel.kicad_pcb") -> Path:
    board = tmp_path / name
    board.write_bytes(BAD_BOARD.read_bytes())
    return board


def _run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def _python(code: str, *args: str, timeout: float = 60,
            env: dict[str, str] | None = None, **kwargs: object
            ) -> subprocess.CompletedProcess[str]:
    full = {**os.environ, "NO_COLOR": "1", **(env or {}),
            "PYTHONPATH": str(REPO_ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    kwargs.setdefault("stdout", subprocess.PIPE)
    return subprocess.run([sys.executable, "-c", code, *args], stderr=subprocess.PIPE,
                          text=True, timeout=timeout, env=full, check=False,
                          **kwargs)  # type: ignore[call-overload, no-any-return]


# -- item 1: outputs never overwrite an input board ---------------------------
@pytest.mark.parametrize("option", ["--output", "--svg", "--write-baseline"])
@pytest.mark.parametrize("through_link", [False, True])
def test_output_onto_the_board_is_refused(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                          option: str, through_link: bool) -> None:
    board = _board(tmp_path)
    before = board.read_bytes()
    target = board
    if through_link:
        target = tmp_path / "link.txt"
        target.symlink_to(board)
    code, out, err = _run(capsys, "audit", str(board), "--no-solve", option, str(target))
    assert code == 2
    assert err.count("\n") == 1 and "board" in err and str(target) in err
    assert board.read_bytes() == before


def test_diff_output_onto_a_board_is_refused(tmp_path: Path,
                                             capsys: pytest.CaptureFixture[str]) -> None:
    old, new = _board(tmp_path, "old.kicad_pcb"), _board(tmp_path, "new.kicad_pcb")
    before = new.read_bytes()
    code, _, err = _run(capsys, "diff", str(old), str(new), "--output", str(new))
    assert code == 2 and err.count("\n") == 1
    assert new.read_bytes() == before


def test_output_is_replaced_not_written_in_place(tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    """A second name of the old output (a hard link) keeps the old text: the
    new report went to a new file renamed over the old name."""
    board = tmp_path / "panel.kicad_pcb"
    board.write_bytes(FAILING_BOARD.read_bytes())
    out_file, other_name = tmp_path / "report.json", tmp_path / "old-report.json"
    out_file.write_text("old\n")
    os.link(out_file, other_name)
    code, _, _ = _run(capsys, "audit", str(board), "--no-solve", "--format", "json",
                      "--output", str(out_file))
    assert code == 1
    assert other_name.read_text() == "old\n"
    assert out_file.read_text().startswith("{")
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "old-report.json", "panel.kicad_pcb", "report.json"]  # no temporary left


def test_output_into_a_fifo_is_written_not_replaced(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    """Special files (a FIFO here; /dev/null, /dev/stdout alike) are written
    into: replacing one by a rename would put a plain file in its place."""
    fifo = tmp_path / "report.fifo"
    os.mkfifo(fifo)
    received: list[str] = []
    reader = threading.Thread(target=lambda: received.append(fifo.read_text()))
    reader.start()
    code, _, _ = _run(capsys, "audit", str(_board(tmp_path)), "--no-solve", "--format",
                      "json", "--output", str(fifo), "--quiet")
    reader.join(timeout=30)
    assert code == 0 and stat.S_ISFIFO(fifo.stat().st_mode)
    assert received and received[0].startswith("{")


# -- item 5: not regular files, size limit ------------------------------------
def test_fifo_board_is_refused_at_once(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe.kicad_pcb"
    os.mkfifo(fifo)
    done = _python("from auditor.cli.main import main; raise SystemExit(main())",
                   "audit", str(fifo), "--no-solve", timeout=30)
    assert done.returncode == 2
    assert done.stderr.count("\n") == 1 and "not a regular file" in done.stderr


def _limited_memory() -> None:
    # /dev/zero never ends: should it be read, the child fails fast instead of
    # taking the machine's memory.
    resource.setrlimit(resource.RLIMIT_AS, (3 << 30, 3 << 30))


def test_device_board_is_refused() -> None:
    done = _python("from auditor.cli.main import main; raise SystemExit(main())",
                   "audit", "/dev/zero", "--no-solve", timeout=30,
                   preexec_fn=_limited_memory)
    assert done.returncode == 2
    assert "/dev/zero" in done.stderr and "not a regular file" in done.stderr


def test_read_size_limit_names_the_limit(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                         monkeypatch: pytest.MonkeyPatch) -> None:
    board = _board(tmp_path)
    monkeypatch.setenv("PADAUDIT_MAX_BOARD_MB", "0.001")
    code, _, err = _run(capsys, "audit", str(board), "--no-solve")
    assert code == 2 and err.count("\n") == 1
    assert "PADAUDIT_MAX_BOARD_MB" in err and "too large" in err


# -- item 6: signals and pipes -------------------------------------------------
_SIGNAL_ITSELF = """
import os, signal, sys
from auditor.cli import audit_runner
from auditor.cli.main import main
real = audit_runner.AUDITOR_FACTORY
def factory(args):
    audit = real(args)
    def signalled(path):
        if "padaudit-rev-" in path:
            print(os.path.dirname(os.path.dirname(path)), file=sys.stderr, flush=True)
            os.kill(os.getpid(), getattr(signal, sys.argv[1]))
        return audit(path)
    return signalled
audit_runner.AUDITOR_FACTORY = factory
raise SystemExit(main(sys.argv[2:]))
"""


@pytest.mark.parametrize(("name", "code"), [("SIGINT", 130), ("SIGTERM", 143)])
def test_signal_during_against_cleans_up(tmp_path: Path, name: str, code: int) -> None:
    """The signal arrives while the old board's temporary copy exists."""
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "panel.kicad_pcb", BAD_BOARD.read_text(), "first")
    scratch = tmp_path / "tmp"
    scratch.mkdir()
    done = _python(_SIGNAL_ITSELF, name, "audit", "panel.kicad_pcb", "--no-solve",
                   "--against", "HEAD", "--output", os.devnull, "--quiet",
                   env={**GIT_ENV, "TMPDIR": str(scratch)}, cwd=repo)
    assert done.returncode == code, done.stderr
    lines = done.stderr.splitlines()
    assert len(lines) == 2 and lines[1].startswith("padaudit: "), lines
    assert ("interrupted" if name == "SIGINT" else "terminated") in lines[1]
    assert list(scratch.iterdir()) == []


def test_closed_pipe_keeps_the_exit_code() -> None:
    """``padaudit audit b --format junit | head -c1``: the reader is gone
    before the report is written; the gate still fails the run."""
    read_end, write_end = os.pipe()
    os.close(read_end)
    try:
        done = _python("from auditor.cli.main import main; raise SystemExit(main())",
                       "audit", str(FAILING_BOARD), "--no-solve", "--format", "junit",
                       stdout=write_end)
    finally:
        os.close(write_end)
    assert done.returncode == 1
    # Nothing but the run's verdict line (stdout held the document), and it
    # states the exit code the run kept.
    lines = done.stderr.splitlines()
    assert len(lines) == 1 and lines[0].startswith("FAIL") and lines[0].endswith("(exit 1)")


_HELPERS_INTERRUPTED = """
import os, signal, sys, threading
from auditor.field.api import PadSetup
from auditor.field.batch import PadBatch
batch = PadBatch(workers=3)
for k in range(120):  # seconds of solving: the signal lands while results() runs
    batch.add(PadSetup(pad_area_mm2=20.0 + 0.5 * k, gap_mm=0.5))
helpers = list(batch._fanout._helpers)
threading.Timer(0.5, os.killpg, (0, signal.SIGINT)).start()
try:
    batch.results()
except KeyboardInterrupt:
    alive = [h for h in helpers if h.is_alive()]
    sys.stderr.write(f"interrupted, {len(alive)} helper(s) left\\n")
    raise SystemExit(130) from None
"""


def test_interrupt_reaches_helpers_without_tracebacks() -> None:
    """Ctrl-C reaches the whole process group, helpers included: they must
    print nothing, and the parent stops them."""
    done = _python(_HELPERS_INTERRUPTED, start_new_session=True, timeout=120)
    assert done.returncode == 130, done.stderr
    assert done.stderr == "interrupted, 0 helper(s) left\n"  # and no worker traceback


# -- item 8: revision work ----------------------------------------------------
def _repo_with(tmp_path: Path, text: str, name: str = "hw/x.kicad_pcb") -> Path:
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, name, text, "first")
    return repo


def test_errors_in_an_old_board_name_the_revision(tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str],
                                                  monkeypatch: pytest.MonkeyPatch) -> None:
    repo = _repo_with(tmp_path, "(kicad_pcb (version 20240108)\n  (segment (start 0 0)")
    (repo / "hw/x.kicad_pcb").write_bytes(BAD_BOARD.read_bytes())
    monkeypatch.chdir(repo)
    code, _, err = _run(capsys, "diff", "HEAD:hw/x.kicad_pcb", "hw/x.kicad_pcb")
    assert code == 2 and err.startswith("padaudit: HEAD:hw/x.kicad_pcb:"), err
    assert "padaudit-rev-" not in err


def test_hook_reports_every_bad_board(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                      monkeypatch: pytest.MonkeyPatch) -> None:
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "README", "hello\n")
    for name in ("a.kicad_pcb", "b.kicad_pcb"):
        (repo / name).write_text("(kicad_pcb (version")
        git(repo, "add", name)
    monkeypatch.chdir(repo)
    code, _, err = _run(capsys, "hook", "run")
    assert code == 2
    assert "a.kicad_pcb (staged)" in err and "b.kicad_pcb (staged)" in err
    assert "padaudit-rev-" not in err
    assert err.splitlines()[-1].startswith("padaudit: commit blocked by a.kicad_pcb, b.kicad_pcb")


def test_diff_across_a_folder_rename(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                     monkeypatch: pytest.MonkeyPatch) -> None:
    repo = _repo_with(tmp_path, BAD_BOARD.read_text(), "old/x.kicad_pcb")
    git(repo, "mv", "old", "new")
    git(repo, "commit", "-q", "--no-verify", "-m", "rename")
    monkeypatch.chdir(repo)
    code, out, err = _run(capsys, "diff", "HEAD~1:old/x.kicad_pcb", "new/x.kicad_pcb",
                          "--color=never")
    assert code in (0, 1), err
    assert "not installed" not in err
    assert "HEAD~1:old/x.kicad_pcb" in out


@pytest.mark.parametrize("option", ["--against", "--output", "--svg", "--write-baseline",
                                    "--baseline"])
def test_empty_option_values_are_usage_errors(tmp_path: Path, option: str,
                                              capsys: pytest.CaptureFixture[str]) -> None:
    board = _board(tmp_path)
    code, out, err = _run(capsys, "audit", str(board), "--no-solve", option, "")
    assert code == 2, (out, err)
    assert out == "" and err.count("\n") == 1 and option in err


def test_empty_diff_sides_are_usage_errors(capsys: pytest.CaptureFixture[str]) -> None:
    code, _, err = _run(capsys, "diff", "", str(BAD_BOARD))
    assert code == 2 and err.count("\n") == 1


# -- item 9: hook install --force ----------------------------------------------
def test_hook_force_replaces_a_symlink_and_keeps_a_backup(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture[str]) -> None:
    repo = new_repo(tmp_path / "repo")
    tracked = repo / "tools" / "check.sh"
    tracked.parent.mkdir()
    tracked.write_text("#!/bin/sh\necho tracked\n")
    hook = repo / ".git" / "hooks" / "pre-commit"
    hook.symlink_to(tracked)
    monkeypatch.chdir(repo)
    code, _, _ = _run(capsys, "hook", "install", "--force")
    assert code == 0
    assert tracked.read_text() == "#!/bin/sh\necho tracked\n"
    assert not hook.is_symlink() and "padaudit" in hook.read_text()
    backup = hook.with_name("pre-commit.padaudit-backup")
    assert backup.is_symlink() and backup.resolve() == tracked.resolve()


def test_hook_force_backs_up_a_foreign_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    repo = new_repo(tmp_path / "repo")
    hook = repo / ".git" / "hooks" / "pre-commit"
    hook.write_text("#!/bin/sh\necho theirs\n")
    monkeypatch.chdir(repo)
    assert _run(capsys, "hook", "install", "--force")[0] == 0
    assert hook.with_name("pre-commit.padaudit-backup").read_text() == \
        "#!/bin/sh\necho theirs\n"


# -- item 4: a clear limit for boards too large to audit in minutes ----------
def test_item_limit_names_the_limit_and_how_to_raise_it(
        tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    board = _board(tmp_path)
    monkeypatch.setenv("PADAUDIT_MAX_BOARD_ITEMS", "5")
    code, out, err = _run(capsys, "audit", str(board), "--no-solve")
    assert code == 2 and out == "" and err.count("\n") == 1
    assert "board too large" in err and "PADAUDIT_MAX_BOARD_ITEMS" in err and "5" in err
    monkeypatch.setenv("PADAUDIT_MAX_BOARD_ITEMS", "5000")
    assert _run(capsys, "audit", str(board), "--no-solve")[0] == 0
