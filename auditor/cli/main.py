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

#: Sub-commands in the order ``--help`` lists them.
COMMANDS: tuple[str, ...] = (
    "audit", "demo", "inspect", "sensors", "estimate", "diff", "hook", "rules",
)


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
    second of every run), else all, for ``--help`` and for usage errors."""
    modules: dict[str, ModuleType] = {}
    for name in (only,) if only else COMMANDS:
        try:
            modules[name] = importlib.import_module(f"auditor.cli.cmd_{name}")
        except ModuleNotFoundError as exc:
            if exc.name != f"auditor.cli.cmd_{name}":
                raise
    return modules


def build_parser(modules: dict[str, ModuleType]) -> argparse.ArgumentParser:
    """The full argument parser with every available sub-command."""
    parser = _Parser(
        prog="padaudit",
        description="Audit capacitive touch electrodes on KiCad boards.",
    )
    parser.add_argument("--version", action="version", version=f"padaudit {__version__}")
    parser.add_argument("--debug", action="store_true",
                        help="show a traceback on internal errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for module in modules.values():
        module.register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run padaudit; returns the process exit code."""
    words = list(sys.argv[1:] if argv is None else argv)
    modules = _load_commands(_chosen_command(words))
    parser = build_parser(modules)
    args = parser.parse_args(words)
    if args.command is None:
        parser.print_help()
        return EXIT_BAD_INPUT
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
