"""Writing outputs safely: never onto a board, never half-written, and
standard output that may go away.

Every file padaudit writes (report, picture, baseline, comparison) goes
through :func:`write_output`: refused when it names one of the run's input
boards (by any route: the same path, a symlink, a hard link), else written
to a temporary file in the same folder and renamed over the target, so a
reader never sees half a report and an interrupted run leaves the old file.
"""

from __future__ import annotations

import contextlib
import os
import sys
import tempfile
from collections.abc import Callable, Iterable, Iterator
from pathlib import Path

from auditor.errors import UsageError


def require_value(option: str, value: str | None) -> None:
    """Refuse an option given an empty value (``--output ''`` once meant
    stdout, ``--against ''`` skipped the comparison)."""
    if value is not None and not value.strip():
        raise UsageError(f"{option} needs a value (got an empty one)")


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:  # one of them does not exist (yet)
        return a.resolve() == b.resolve()


def refuse_inputs(option: str, target: str, inputs: Iterable[str]) -> None:
    """Raise when ``target`` resolves (symlinks followed) to an input board."""
    for board in inputs:
        if board and _same_file(Path(target), Path(board)):
            raise UsageError(f"{option} {target}: that is the input board {board}; "
                             "padaudit never writes to a board, choose another file")


def write_output(option: str, target: str, text: str, inputs: Iterable[str]) -> None:
    """Write ``text`` to ``target`` atomically, after :func:`refuse_inputs`.

    Raises
    ------
    UsageError
        For an input board or a file that cannot be written.
    """
    require_value(option, target)
    refuse_inputs(option, target, inputs)
    path = Path(target)
    try:
        if path.is_dir():
            raise IsADirectoryError(21, "is a directory")
        if path.exists() and not path.is_file():
            # /dev/null, a FIFO, /dev/stdout: written into, never replaced
            with open(path, "w", encoding="utf-8", newline="") as stream:
                stream.write(text)
            return
        replace_text(path, text)
    except OSError as exc:
        raise UsageError(f"{target}: cannot write: {exc.strerror or exc}") from None


def replace_text(path: Path, text: str) -> None:
    """Write ``text`` to a new file beside ``path`` and rename it over ``path``."""
    # A symlinked output is followed (the link keeps pointing at the new
    # file); the temporary lives beside the real file so the rename is atomic.
    real = path.resolve() if path.is_symlink() else path
    handle, temporary = tempfile.mkstemp(prefix=f".{real.name}.", suffix=".tmp",
                                         dir=real.parent)
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="") as stream:
            stream.write(text)
        if real.exists():
            os.chmod(temporary, real.stat().st_mode & 0o7777)
        else:
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(temporary, 0o666 & ~umask)
        os.replace(temporary, real)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise


def silence_stdout() -> None:
    """Point standard output at the null device: its reader went away
    (``padaudit ... | head``), and nothing more should be said there."""
    with contextlib.suppress(OSError):
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())


@contextlib.contextmanager
def stdout_may_close() -> Iterator[None]:
    """Run a write to standard output; a closed pipe ends the writing but not
    the run, so the exit code is still the gate's."""
    try:
        yield
    except BrokenPipeError:
        silence_stdout()


def written_to_stdout(write: Callable[[], object]) -> None:
    """Call ``write`` under :func:`stdout_may_close`."""
    with stdout_may_close():
        write()
