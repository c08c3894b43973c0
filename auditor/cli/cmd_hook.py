"""``padaudit hook``: the git pre-commit gate.

``hook install`` writes ``.git/hooks/pre-commit`` (wherever git keeps hooks);
the hook runs ``padaudit hook run``, which audits the *staged* version of
every staged ``.kicad_pcb`` file (``git show :path`` into a temporary copy,
with its staged project and configuration files), prints the report and
fails the commit on exit code 1 or 2. Given file names instead (as the
pre-commit framework passes them), ``hook run`` audits those files.
"""

from __future__ import annotations

import argparse
import os
import shlex
import stat
import sys
from pathlib import Path

from auditor.cli.audit_runner import auditor_for, shown_as
from auditor.cli.colour import use_colour
from auditor.cli.options import add_fail_on, add_profile
from auditor.decide.records import Report
from auditor.errors import UsageError
from auditor.gitrev import board_at, repo_root, run_git, staged_boards
from auditor.report.render import render

#: Marks a hook file as ours, so ``install`` may replace it without --force.
HOOK_MARKER = "# padaudit-managed-hook"


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
    check = actions.add_parser("run", help="audit staged boards (or the given files)")
    check.add_argument("files", nargs="*", metavar="FILE",
                       help="boards to audit as they are on disk (default: staged boards)")
    add_fail_on(check, "lowest severity that fails (default: the configuration's)")
    add_profile(check)
    check.add_argument("--config", metavar="FILE", help="configuration file to use")


def hook_script(python: str, fail_on: str | None = None) -> str:
    """The pre-commit hook's text: our interpreter if it still exists, else
    whatever ``padaudit`` is on PATH."""
    py = shlex.quote(python)
    flags = f" --fail-on {fail_on}" if fail_on else ""
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


def install(cwd: Path, force: bool, fail_on: str | None = None) -> Path:
    """Write the hook; refuse to replace a foreign one unless ``force``."""
    target = hooks_dir(cwd) / "pre-commit"
    if target.exists() and not force and HOOK_MARKER not in target.read_text(errors="replace"):
        raise UsageError(f"{target}: a pre-commit hook not written by padaudit exists; "
                         "use --force to replace it")
    target.parent.mkdir(parents=True, exist_ok=True)
    target.write_text(hook_script(sys.executable, fail_on), encoding="utf-8")
    target.chmod(target.stat().st_mode | stat.S_IXUSR | stat.S_IXGRP | stat.S_IXOTH)
    return target


def _audit_staged(args: argparse.Namespace, cwd: Path) -> list[tuple[str, int]]:
    root = repo_root(cwd)
    boards = staged_boards(root)
    if not boards:
        return []
    audit = auditor_for(args)
    results = []
    for path in boards:
        with board_at(root / Path(*path.parts), "") as copy:
            report = shown_as(audit(str(copy)), f"{path} (staged)", copy, "{} (staged)")
        results.append((str(path), _show(report)))
    return results


def _show(report: Report) -> int:
    render(report, "text", sys.stdout, use_colour("auto", sys.stdout, os.environ))
    return report.exit_code


def run(args: argparse.Namespace) -> int:
    """Run ``padaudit hook install`` or ``padaudit hook run``."""
    cwd = Path.cwd()
    if args.hook_action == "install":
        target = install(cwd, args.force, args.fail_on)
        sys.stdout.write(f"padaudit: pre-commit hook written to {target}\n")
        return 0
    if args.files:
        audit = auditor_for(args)
        results = [(f, _show(audit(f))) for f in args.files]
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
