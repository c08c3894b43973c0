"""Boards as they are at a git revision or in the index (staged).

git runs with argument lists, never through a shell. A board at a revision
is written into a private temporary folder that mirrors the repository
layout, together with what the audit reads beside it at that revision (the
``.kicad_pro`` project file of the same name, ``padaudit.toml`` and
``pyproject.toml`` in its folder and every folder above it), so that the
old board is judged with the old configuration. The working tree and git's
state are never touched.
"""

from __future__ import annotations

import contextlib
import subprocess
import tempfile
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path, PurePosixPath

from auditor.errors import LocatedError, UsageError

#: Files beside or above a board that change how it is audited.
CONFIG_NAMES: tuple[str, ...] = ("padaudit.toml", "pyproject.toml")


#: Name prefix of the temporary folders holding copies at a revision.
_MIRROR_PREFIX = "padaudit-rev-"


def run_git(args: Sequence[str], cwd: str | Path) -> bytes:
    """Run ``git *args`` in ``cwd`` and return its stdout.

    Raises
    ------
    UsageError
        When git is missing or fails; carries git's first line of complaint.
    """
    try:
        done = subprocess.run(["git", *args], cwd=cwd, capture_output=True, check=False)
    except FileNotFoundError:
        raise UsageError("git is not installed or not on PATH") from None
    if done.returncode != 0:
        lines = done.stderr.decode("utf-8", "replace").strip().splitlines()
        reason = lines[0] if lines else f"exit code {done.returncode}"
        raise UsageError(f"git {' '.join(args[:1])}: {reason}")
    return done.stdout


def check_revision(rev: str) -> str:
    """Refuse revisions git could take for options or that hold a path."""
    if not rev or rev.startswith("-") or ":" in rev or any(c.isspace() for c in rev):
        raise UsageError(f"not a usable git revision: {rev!r}")
    return rev


def revision_exists(root: Path, rev: str) -> bool:
    """Whether ``rev`` names a commit in the repository at ``root``."""
    done = subprocess.run(["git", "rev-parse", "--verify", "--quiet", f"{rev}^{{commit}}"],
                          cwd=root, capture_output=True, check=False)
    return done.returncode == 0


@dataclass(frozen=True)
class RepoPath:
    """A file inside a repository: its root and its path from there (posix)."""

    root: Path
    path: PurePosixPath


def locate(file: str | Path) -> RepoPath:
    """The repository holding ``file`` and the file's path inside it."""
    absolute = Path(file).resolve()
    folder = absolute.parent
    while not folder.is_dir():  # the file's folder was renamed or removed since
        folder = folder.parent
    try:
        top = run_git(["rev-parse", "--show-toplevel"], folder).decode().strip()
    except UsageError as exc:
        raise UsageError(f"{file}: {exc}") from None
    root = Path(top).resolve()
    try:
        relative = absolute.relative_to(root)
    except ValueError:
        raise UsageError(f"{file}: not inside the git repository at {root}") from None
    return RepoPath(root, PurePosixPath(relative.as_posix()))


def blob(root: Path, rev: str, path: PurePosixPath) -> bytes | None:
    """Contents of ``path`` at ``rev`` (``""`` = the index), ``None`` if absent."""
    spec = f"{rev}:{path}" if rev else f":{path}"
    done = subprocess.run(["git", "cat-file", "-e", spec], cwd=root, capture_output=True,
                          check=False)
    if done.returncode != 0:
        return None
    return run_git(["show", spec], root)


def companions(path: PurePosixPath) -> list[PurePosixPath]:
    """Files read beside a board: its project file and configuration above it."""
    out = [path.with_suffix(".kicad_pro")]
    folder = path.parent
    while True:
        out += [folder / name for name in CONFIG_NAMES]
        if folder == folder.parent:
            return out
        folder = folder.parent


@contextlib.contextmanager
def board_at(file: str | Path, rev: str) -> Iterator[Path]:
    """Yield a temporary copy of board ``file`` at ``rev`` (``""``: staged).

    Raises
    ------
    UsageError
        When the board does not exist at that revision.
    """
    where, content = _board_blob(file, rev)
    with tempfile.TemporaryDirectory(prefix=_MIRROR_PREFIX) as tmp:
        mirror = Path(tmp)
        for extra in companions(where.path):
            data = blob(where.root, rev, extra)
            if data is not None:
                _write(mirror, extra, data)
        try:
            yield _write(mirror, where.path, content)
        except LocatedError as exc:
            raise relabelled(exc, mirror, rev) from None


def label(rev: str, path: PurePosixPath) -> str:
    """How people name a file at a revision: ``REV:path`` or ``path (staged)``."""
    return f"{rev}:{path}" if rev else f"{path} (staged)"


def relabelled(exc: LocatedError, mirror: Path, rev: str) -> LocatedError:
    """``exc`` naming ``REV:path`` instead of the file's temporary copy."""
    try:
        inside = Path(exc.path).resolve().relative_to(mirror.resolve())
    except ValueError:
        return exc
    copy = type(exc)(label(rev, PurePosixPath(inside.as_posix())), exc.message, exc.line,
                     exc.column)
    return copy


def mirror_root(copy: Path) -> Path:
    """The temporary folder holding a copy made by :func:`board_at` (the
    repository's top folder in the copy)."""
    for folder in copy.parents:
        if folder.name.startswith(_MIRROR_PREFIX):
            return folder
    return copy.parent


def fetch_companion(root: Path, copy: Path, wanted: Path, rev: str) -> bool:
    """Write into the temporary folder of ``copy`` the file ``wanted`` (a path
    inside that folder) as it is at ``rev`` (``""``: staged) in the
    repository at ``root``, for files a configuration names (its baseline).
    False when git has no such file."""
    mirror = mirror_root(copy)
    relative = PurePosixPath(wanted.relative_to(mirror).as_posix())
    data = blob(root, rev, relative)
    if data is None:
        return False
    _write(mirror, relative, data)
    return True


def check_board_at(file: str | Path, rev: str) -> None:
    """Raise the error :func:`board_at` would, without copying anything; lets
    a command refuse a bad revision before it prints a report."""
    _board_blob(file, rev)


def _board_blob(file: str | Path, rev: str) -> tuple[RepoPath, bytes]:
    if rev:
        check_revision(rev)
    where = locate(file)
    if rev and not revision_exists(where.root, rev):
        raise UsageError(f"{where.path}: not found at revision {rev} (no such revision in "
                         f"the repository at {where.root})")
    content = blob(where.root, rev, where.path)
    if content is None:
        shown = f"revision {rev}" if rev else "the index (not staged)"
        raise UsageError(f"{where.path}: not found at {shown}")
    return where, content


def _write(mirror: Path, path: PurePosixPath, data: bytes) -> Path:
    target = mirror.joinpath(*path.parts)
    target.parent.mkdir(parents=True, exist_ok=True)
    target.write_bytes(data)
    return target


def staged_boards(cwd: str | Path) -> tuple[PurePosixPath, ...]:
    """``.kicad_pcb`` files added, copied, modified or renamed in the index."""
    out = run_git(["diff", "--cached", "--name-only", "--diff-filter=ACMR", "-z"], cwd)
    names = [n for n in out.decode("utf-8", "surrogateescape").split("\0") if n]
    return tuple(PurePosixPath(n) for n in sorted(names) if n.endswith(".kicad_pcb"))


def repo_root(cwd: str | Path) -> Path:
    """Top folder of the repository containing ``cwd``."""
    return Path(run_git(["rev-parse", "--show-toplevel"], cwd).decode().strip())
