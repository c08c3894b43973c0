"""From parsed arguments to audits: the options of ``audit`` and ``demo``, and
how ``diff``, ``hook`` and ``audit --against`` audit a board file.

Those all need "audit this path with the user's options" without knowing the
audit's option object. :func:`auditor_for` builds that callable from the
parsed arguments; tests replace :data:`AUDITOR_FACTORY` with one returning
hand-made reports.
"""

from __future__ import annotations

import argparse
import dataclasses
from collections.abc import Callable
from typing import TYPE_CHECKING

from auditor.decide.records import Report

if TYPE_CHECKING:  # the audit entry pulls in the solver; hook and diff load it when they run
    from auditor.audit import AuditOptions

AuditFn = Callable[[str], Report]


def options_from_args(args: argparse.Namespace) -> AuditOptions:
    """The audit options in parsed arguments (absent ones left unset); no
    baseline, as for the other side of a comparison."""
    from auditor.audit import AuditOptions  # start-up speed: see TYPE_CHECKING above

    return AuditOptions(
        config_path=getattr(args, "config", None), profile=getattr(args, "profile", None),
        overlay=getattr(args, "overlay", None), power=getattr(args, "power", None),
        touch_side=getattr(args, "touch_side", None), fail_on=getattr(args, "fail_on", None),
        solve=not getattr(args, "no_solve", False),
        precise=bool(getattr(args, "precise", False)),
        suggest=bool(getattr(args, "suggest", False)))


def gated_options(args: argparse.Namespace) -> AuditOptions:
    """:func:`options_from_args` with the gate's ``--baseline`` or
    ``--write-baseline`` (which accepts every current finding)."""
    return dataclasses.replace(options_from_args(args),
                               baseline=getattr(args, "baseline", None),
                               accept_all=bool(getattr(args, "write_baseline", None)))


def _board_auditor(args: argparse.Namespace) -> AuditFn:
    from auditor.audit import run_audit  # start-up speed: see TYPE_CHECKING above

    options = options_from_args(args)

    def audit(path: str) -> Report:
        return run_audit(path, options)

    return audit


#: Replaceable in tests: ``args -> (board path -> Report)``.
AUDITOR_FACTORY: Callable[[argparse.Namespace], AuditFn] = _board_auditor


def auditor_for(args: argparse.Namespace) -> AuditFn:
    """A function auditing one board path with the options in ``args``."""
    return AUDITOR_FACTORY(args)


def shown_as(report: Report, label: str) -> Report:
    """``report`` with its board path replaced by ``label`` (e.g. ``HEAD~1:a.kicad_pcb``),
    so no temporary path leaks into any output."""
    return dataclasses.replace(report, info=dataclasses.replace(report.info, board_path=label))
