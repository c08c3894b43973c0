"""Options several commands share, declared once.

Each builder adds one option to a parser; the choices come from the
vocabulary (:mod:`auditor.model.vocabulary`), so a new power preset or
severity reaches every command that takes it.
"""

from __future__ import annotations

import argparse
import os

from auditor.model.vocabulary import POWER_PRESETS, SEVERITY_NAMES, TOUCH_SIDES

# argparse groups and parsers share this method; the type names neither.
_Adder = argparse.ArgumentParser | argparse._ArgumentGroup

PROFILE_HELP = "rule profile: default, proximity, mutual, strict, or a .toml file"


def add_profile(parser: _Adder, help: str = PROFILE_HELP) -> None:
    """``--profile NAME``: a built-in rule profile or a profile file."""
    parser.add_argument("--profile", metavar="NAME", help=help)


def add_fail_on(parser: _Adder, help: str) -> None:
    """``--fail-on`` with the severity names as choices, worst first."""
    parser.add_argument("--fail-on", dest="fail_on", choices=SEVERITY_NAMES, help=help)


def add_overlay(parser: _Adder, default: str | None = None) -> None:
    """``--overlay MM:MATERIAL|MM:ER|none`` (parsed by
    :func:`auditor.config.overrides.parse_overlay_spec`)."""
    after = f" (default {default})" if default else ""
    parser.add_argument("--overlay", default=default, metavar="MM:MATERIAL|MM:ER|none",
                        help=f"cover over the electrodes, e.g. 2:acrylic or 1.5:3.1, or none"
                             f"{after}")


def add_power(parser: _Adder, default: str | None = None,
              help: str = "how the product is powered (sets the ground-to-earth model)") -> None:
    """``--power`` with the power presets as choices."""
    parser.add_argument("--power", choices=POWER_PRESETS, default=default, help=help)


def add_touch_side(parser: _Adder) -> None:
    """``--touch-side``: which side of the board faces the finger."""
    parser.add_argument("--touch-side", choices=TOUCH_SIDES,
                        help="which side of the board faces the finger")


def add_solve_mode(parser: argparse.ArgumentParser, precise_help: str = "") -> None:
    """``--precise`` / ``--quick``: force one field model for every electrode
    (neither: the automatic mode picks one per electrode)."""
    method = parser.add_mutually_exclusive_group()
    method.add_argument("--precise", action="store_true",
                        help="solve every electrode's real copper in 3-D (slower)"
                             + precise_help)
    method.add_argument("--quick", action="store_true",
                        help="solve every electrode with the disk model (fastest); by default "
                             "each electrode gets the disk model or the 3-D solve as its "
                             "shape and surroundings need")


def add_no_suggest(parser: _Adder) -> None:
    """``--no-suggest``: findings without the predicted fixes (faster)."""
    parser.add_argument("--no-suggest", dest="suggest", action="store_false",
                        help="leave out the suggested changes and their predicted effect "
                             "(saves the extra field solves)")


def add_selection(parser: _Adder) -> None:
    """``--net``, ``--ref`` and ``--controller``: name the electrodes and the
    controller on the command line instead of in the configuration."""
    parser.add_argument("--net", action="append", default=[], metavar="GLOB",
                        help="treat nets matching GLOB as electrodes (repeatable)")
    parser.add_argument("--ref", action="append", default=[], metavar="REF",
                        help="treat footprint REF (glob) as an electrode (repeatable)")
    parser.add_argument("--controller", default="", metavar="REF",
                        help="the touch controller's reference")


#: Environment variable holding the default of ``--jobs`` (a CI job can set
#: it once for every command).
JOBS_VARIABLE = "PADAUDIT_JOBS"


def _job_count(text: str) -> int | None:
    if text == "auto":
        return None
    if text.isdigit() and int(text) >= 1:
        return int(text)
    raise argparse.ArgumentTypeError(f"expected a number of processes, 1 or more, or auto "
                                     f"(got {text!r}; also read from {JOBS_VARIABLE})")


def add_jobs(parser: _Adder) -> None:
    """``--jobs N|auto``: processes for the field solves (``args.jobs``: an
    int, or None for automatic); the default comes from ``PADAUDIT_JOBS``."""
    parser.add_argument("--jobs", type=_job_count, metavar="N|auto",
                        default=os.environ.get(JOBS_VARIABLE) or "auto",
                        help="processes for the field solves, this one included (default "
                             f"auto: one per idle core, on Linux; also set by {JOBS_VARIABLE})")


__all__ = ["JOBS_VARIABLE", "PROFILE_HELP", "add_fail_on", "add_jobs", "add_no_suggest",
           "add_overlay", "add_power", "add_profile", "add_selection", "add_solve_mode",
           "add_touch_side"]
