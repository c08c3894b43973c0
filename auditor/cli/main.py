"""Entry point and command dispatch.

Each sub-command lives in its own module ``auditor.cli.cmd_<name>`` exposing
``register(subparsers)`` and ``run(args) -> int``. Only the module of the
command being run is imported (all of them for ``--help`` or a usage
error), so start-up stays light.

Exit codes (the contract CI and git hooks rely on):

* 0 — clean (nothing at or above ``--fail-on``),
* 1 — findings at or above ``--fail-on``,
* 2 — bad input or usage (one line on stderr, no traceback),
* 3 — internal error,
* 130 / 143 — interrupted (Ctrl-C) / terminated (SIGTERM); temporary files
  are removed first. A closed standard output (``padaudit ... | head``)
  does not change the code: the gate decides, not whether the report was read.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence
from types import ModuleType
from typing import NoReturn

from auditor import __version__
from auditor.cli.signals import EXIT_INTERRUPTED, EXIT_TERMINATED, Terminated, terminate_gracefully
from auditor.errors import PadauditError

EXIT_CLEAN = 0
EXIT_FINDINGS = 1
EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3

#: Sub-commands in the order ``--help`` lists them, with the one-line summary
#: that list shows. Kept here (a test checks each module registers the same
#: text) so ``padaudit --help`` and ``--version`` import no command module:
#: those pull in numpy, scipy and shapely, most of a second on a cold start.
SUMMARIES: dict[str, str] = {
    "audit": "check a board's touch electrodes against the layout rules",
    "demo": "audit the bundled demo board (an invented room panel)",
    "inspect": "show what was read from a board file",
    "sensors": "list the sense electrodes found and why",
    "estimate": "estimate Cp and finger ΔC for a described pad (no board needed)",
    "diff": "compare two boards or revisions pad by pad",
    "hook": "git pre-commit hook: install or run",
    "rules": "list the layout rules, or explain one",
    "kicad-rules": "write the touch limits as KiCad custom design rules",
}
COMMANDS: tuple[str, ...] = tuple(SUMMARIES)


class _Parser(argparse.ArgumentParser):
    """argparse that reports usage errors as one line and exit code 2."""

    def error(self, message: str) -> NoReturn:
        sys.stderr.write(f"padaudit: {message}\n")
        raise SystemExit(EXIT_BAD_INPUT)


def _chosen_command(argv: Sequence[str]) -> str | None:
    """The sub-command named on the command line, if it is a known one.

    The options before it (``--debug``; ``--version`` and ``--help`` stop
    at once) take no value, so it is the first word not starting with "-".
    """
    for word in argv:
        if not word.startswith("-"):
            return word if word in COMMANDS else None
    return None


def _load_commands(only: str | None = None) -> dict[str, ModuleType]:
    """The command modules: only ``only``'s when it is given (each pulls in
    its own stages, and importing all of them would cost a tenth of a
    second of every run), else all (for tests and tools that want the full
    parser; ``main`` itself never loads them all)."""
    modules: dict[str, ModuleType] = {}
    for name in (only,) if only else COMMANDS:
        module = f"auditor.cli.cmd_{name.replace('-', '_')}"
        try:
            modules[name] = importlib.import_module(module)
        except ModuleNotFoundError as exc:
            if exc.name != module:
                raise
    return modules


def build_parser(modules: dict[str, ModuleType] | None) -> argparse.ArgumentParser:
    """The argument parser with every available sub-command; with ``None``,
    the overview parser (each command by name and summary only), enough for
    ``--help``, ``--version`` and a usage error without a known command."""
    parser = _Parser(
        prog="padaudit",
        description="Audit capacitive touch electrodes on KiCad boards.",
    )
    parser.add_argument("--version", action="version", version=f"padaudit {__version__}")
    parser.add_argument("--debug", action="store_true",
                        help="show a traceback on internal errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    if modules is None:
        for name, summary in SUMMARIES.items():
            sub.add_parser(name, help=summary)
        return parser
    for module in modules.values():
        module.register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run padaudit; returns the process exit code."""
    words = list(sys.argv[1:] if argv is None else argv)
    chosen = _chosen_command(words)
    if chosen is None:  # --help, --version, nothing or a usage error: no command runs
        overview = build_parser(None)
        overview.parse_args(words)
        overview.print_help()
        return EXIT_BAD_INPUT
    modules = _load_commands(chosen)
    args = build_parser(modules).parse_args(words)
    try:
        with terminate_gracefully():
            code: int = modules[args.command].run(args)
        return code
    except PadauditError as exc:
        sys.stderr.write(f"padaudit: {exc}\n")
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        sys.stderr.write("padaudit: interrupted\n")
        return EXIT_INTERRUPTED
    except Terminated:
        sys.stderr.write("padaudit: terminated\n")
        return EXIT_TERMINATED
    except BrokenPipeError:
        # The reader went away (``padaudit ... | head``); nothing more to say.
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return EXIT_CLEAN
    except Exception as exc:  # noqa: BLE001 - last line of defence, by design
        if getattr(args, "debug", False):
            raise
        sys.stderr.write(
            f"padaudit: internal error: {type(exc).__name__}: {exc} "
            "(run with --debug for a traceback; please report it)\n")
        return EXIT_INTERNAL
