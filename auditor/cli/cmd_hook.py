"""``padaudit hook``: the git pre-commit gate.

``hook install`` writes ``.git/hooks/pre-commit`` (wherever git keeps hooks);
the hook runs ``padaudit hook run``, which audits the *staged* version of
every staged ``.kicad_pcb`` file (``git show :path`` into a temporary copy,
with its staged project and configuration files), prints the report and
fails the commit on exit code 1 or 2. Given file names instead (as the
pre-commit framework passes them), ``hook run`` audits those files.

On a board adopted with findings, ``--baseline FILE`` (or the configuration's
``baseline`` key) accepts the recorded ones, and ``--new-since REV`` fails only
on findings the board did not have at ``REV``. A pass prints one line per
board; a fail, the findings that fail it (``--full`` for the whole report).
"""

from __future__ import annotations

import argparse
import functools
import os
import shlex
import stat
import sys
from collections.abc import Callable
from pathlib import Path, PurePosixPath

from auditor.cli.audit_runner import AuditFn, auditor_for, shown_as
from auditor.cli.colour import use_colour
from auditor.cli.options import add_fail_on, add_profile
from auditor.cli.outputs import replace_text, written_to_stdout
from auditor.decide.records import Report
from auditor.errors import PadauditError, UsageError
from auditor.gitrev import blob, board_at, repo_root, run_git, staged_boards
from auditor.report.brief import render_brief
from auditor.report.render import render

#: Exit code of a board that could not be audited (as main's bad input).
EXIT_BAD_INPUT = 2

#: Marks a hook file as ours, so ``install`` may replace it without --force.
HOOK_MARKER = "# padaudit-managed-hook"
#: The name a replaced foreign hook is kept under, beside the new one.
BACKUP_NAME = "pre-commit.padaudit-backup"


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``hook`` sub-command with ``install`` and ``run``."""
    parser = subparsers.add_parser(
        "hook", help="git pre-commit hook: install or run",
        description="'hook install' writes a git pre-commit hook that runs 'hook run': it "
                    "audits the staged version of every staged .kicad_pcb file and blocks "
                    "the commit on findings at or above --fail-on or on bad input. Given "
                    "file names (as the pre-commit framework passes them), 'hook run' "
                    "audits those files as they are on disk.")
    actions = parser.add_subparsers(dest="hook_action", metavar="ACTION", required=True)
    install = actions.add_parser("install", help="write the git pre-commit hook")
    install.add_argument("--force", action="store_true",
                         help="replace a pre-commit hook that padaudit did not write")
    add_fail_on(install, "severity that blocks a commit (default: the configuration's)")
    add_gate_options(install, "baked into the hook")
    check = actions.add_parser("run", help="audit staged boards (or the given files)")
    check.add_argument("files", nargs="*", metavar="FILE",
                       help="boards to audit as they are on disk (default: staged boards)")
    add_fail_on(check, "lowest severity that fails (default: the configuration's)")
    add_profile(check)
    check.add_argument("--config", metavar="FILE", help="configuration file to use")
    add_gate_options(check)
    check.add_argument("--full", action="store_true",
                       help="print the whole report of every board, not only what fails")


def add_gate_options(parser: argparse.ArgumentParser, note: str = "") -> None:
    """``--baseline`` and ``--new-since``: gating a board adopted with findings."""
    suffix = f" ({note})" if note else ""
    parser.add_argument("--baseline", metavar="FILE",
                        help="accept the findings recorded in FILE (written by 'audit "
                             "--write-baseline'); only new ones fail. Default: the "
                             "configuration's baseline key" + suffix)
    parser.add_argument("--new-since", metavar="REV",
                        help="fail only on findings the board did not have at git revision "
                             "REV (e.g. origin/main); a board new since REV counts in full"
                             + suffix)


def hook_script(python: str, fail_on: str | None = None, baseline: str | None = None,
                new_since: str | None = None) -> str:
    """The pre-commit hook's text: our interpreter if it still exists, else
    whatever ``padaudit`` is on PATH."""
    py = shlex.quote(python)
    flags = "".join(f" {flag} {shlex.quote(value)}" for flag, value in (
        ("--fail-on", fail_on), ("--baseline", baseline), ("--new-since", new_since)) if value)
    return (
        "#!/bin/sh\n"
        f"{HOOK_MARKER} (written by 'padaudit hook install'; delete this file to remove it)\n"
        "# Audits the staged version of every staged .kicad_pcb file.\n"
        f"if [ -x {py} ]; then\n"
        f"    exec {py} -m auditor hook run{flags}\n"
        "fi\n"
        f"exec padaudit hook run{flags}\n"
    )


def hooks_dir(cwd: Path) -> Path:
    """Where git looks for hooks (honours ``core.hooksPath``)."""
    raw = run_git(["rev-parse", "--git-path", "hooks"], cwd).decode().strip()
    path = Path(raw)
    return path if path.is_absolute() else cwd / path


def _foreign(target: Path) -> bool:
    """Whether a hook exists that padaudit did not write (a symlink always
    counts as foreign: its target may be a tracked script)."""
    if target.is_symlink():
        return True
    return target.exists() and HOOK_MARKER not in target.read_text(errors="replace")


def install(cwd: Path, force: bool, fail_on: str | None = None, baseline: str | None = None,
            new_since: str | None = None) -> Path:
    """Write the hook; refuse to replace a foreign one unless ``force``, and
    then keep it as ``pre-commit.padaudit-backup`` (a symlink is moved
    itself; what it points at is never written)."""
    target = hooks_dir(cwd) / "pre-commit"
    foreign = _foreign(target)
    if foreign and not force:
        raise UsageError(f"{target}: a pre-commit hook not written by padaudit exists; "
                         "use --force to replace it (it is kept as "
                         f"{BACKUP_NAME})")
    target.parent.mkdir(parents=True, exist_ok=True)
    if foreign:
        os.replace(target, target.with_name(BACKUP_NAME))
    replace_text(target, hook_script(sys.executable, fail_on, baseline, new_since))
    target.chmod(target.stat().st_mode | stat.S_IXUSR | stat.S_IXGRP | stat.S_IXOTH)
    return target


def _gated(report: Report, args: argparse.Namespace, audit: AuditFn, board: Path,
           copy: Path | None = None) -> Report:
    """The report with the gate's baseline and ``--new-since`` applied.

    ``board``: the board in the working tree (for its revision); ``copy``:
    the staged copy that was audited, whose configuration names the
    baseline (its staged version is fetched beside it).
    """
    # Imported when a board is audited: a commit without boards must stay
    # instant, and the audit entry pulls in the solver.
    from auditor.audit import AuditOptions, with_baseline
    from auditor.decide.baseline import accepted_since

    baseline = args.baseline or _configured(copy or board, args.config, copy)
    if baseline:
        report = with_baseline(report, AuditOptions(baseline=baseline))
    if args.new_since:
        earlier = _earlier(audit, board, args.new_since)
        if earlier is not None:
            report = accepted_since(report, earlier)
    return report


def _configured(board: Path, config: str | None, copy: Path | None) -> str:
    """The configuration's baseline; for a staged copy, its staged version
    (or the working tree's, when it is not in the index)."""
    from auditor.audit import configured_baseline  # late: see _gated

    path = configured_baseline(board, config)
    if not path or copy is None or Path(path).exists():
        return path
    from auditor.gitrev import fetch_companion, mirror_root

    root = repo_root(Path.cwd())
    if fetch_companion(root, copy, Path(path), ""):
        return path
    return str(root / Path(path).relative_to(mirror_root(copy)))


def _earlier(audit: AuditFn, board: Path, rev: str) -> Report | None:
    """The board audited at ``rev``; ``None`` when it did not exist then."""
    from auditor.gitrev import check_revision, locate, revision_exists

    check_revision(rev)
    where = locate(board)
    if not revision_exists(where.root, rev):
        raise UsageError(f"--new-since {rev}: no such revision in the repository at "
                         f"{where.root}")
    if blob(where.root, rev, where.path) is None:
        return None
    with board_at(board, rev) as copy:
        return audit(str(copy))


def _audit_staged(args: argparse.Namespace, cwd: Path) -> list[tuple[str, int]]:
    root = repo_root(cwd)
    boards = staged_boards(root)
    if not boards:
        return []
    audit = auditor_for(args)

    def staged(path: PurePosixPath) -> int:
        board = root / Path(*path.parts)
        with board_at(board, "") as copy:
            report = shown_as(audit(str(copy)), f"{path} (staged)", copy, "{} (staged)")
            return _show(_gated(report, args, audit, board, copy), args.full)

    return [_guarded(str(path), functools.partial(staged, path)) for path in boards]


def _guarded(name: str, check: Callable[[], int]) -> tuple[str, int]:
    """``(name, exit code)`` of one board; bad input is reported in one line
    and the other boards are still audited."""
    try:
        return name, check()
    except PadauditError as exc:
        sys.stderr.write(f"padaudit: {exc}\n")
        return name, EXIT_BAD_INPUT


def _audit_file(audit: AuditFn, path: str, args: argparse.Namespace) -> int:
    return _show(_gated(audit(path), args, audit, Path(path)), args.full)


def _show(report: Report, full: bool) -> int:
    from auditor.decide.summary import summarize  # late: see _gated

    summary = summarize(report)
    if full:
        colour = use_colour("auto", sys.stdout, os.environ)
        written_to_stdout(lambda: render(report, "text", sys.stdout, colour, closing=False))
        written_to_stdout(lambda: sys.stdout.write("\n"))
    written_to_stdout(lambda: render_brief(report, summary, sys.stdout))
    return summary.exit_code


def run(args: argparse.Namespace) -> int:
    """Run ``padaudit hook install`` or ``padaudit hook run``."""
    cwd = Path.cwd()
    if args.hook_action == "install":
        target = install(cwd, args.force, args.fail_on, args.baseline, args.new_since)
        sys.stdout.write(f"padaudit: pre-commit hook written to {target}\n")
        return 0
    if args.files:
        audit = auditor_for(args)
        results = [_guarded(f, functools.partial(_audit_file, audit, f, args))
                   for f in args.files]
    else:
        results = _audit_staged(args, cwd)
    if not results:
        sys.stdout.write("padaudit: no staged .kicad_pcb files; nothing to audit\n")
        return 0
    worst = max(code for _, code in results)
    if worst:
        failed = ", ".join(name for name, code in results if code)
        sys.stderr.write(f"padaudit: commit blocked by {failed} "
                         "(fix, waive with a reason, or commit with --no-verify)\n")
    return worst
