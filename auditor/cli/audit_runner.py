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
from pathlib import Path
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
        quick=bool(getattr(args, "quick", False)),
        suggest=bool(getattr(args, "suggest", False)), workers=getattr(args, "jobs", None))


def gated_options(args: argparse.Namespace) -> AuditOptions:
    """:func:`options_from_args` with the gate's ``--baseline`` (else the
    configuration's ``baseline``) or ``--write-baseline`` (which accepts
    every current finding)."""
    return dataclasses.replace(options_from_args(args),
                               baseline=getattr(args, "baseline", None),
                               accept_all=bool(getattr(args, "write_baseline", None)),
                               config_baseline=True)


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


def shown_as(report: Report, label: str, copy: Path | None = None,
             config_label: str = "{}") -> Report:
    """``report`` with its board path replaced by ``label`` (e.g. ``HEAD~1:a.kicad_pcb``),
    so no temporary path leaks into any output.

    ``copy``: the temporary copy the report was made from
    (:func:`auditor.gitrev.board_at`); a configuration read from beside it is
    then shown by its path in the repository, formatted into ``config_label``
    (e.g. ``"HEAD~1:{}"``).
    """
    info = dataclasses.replace(report.info, board_path=label)
    if copy is not None and info.config_path:
        from auditor.gitrev import mirror_root  # only copies at a revision need it

        mirror = mirror_root(copy)
        config = Path(info.config_path)
        if config.is_absolute() and config.is_relative_to(mirror):
            shown = config.relative_to(mirror).as_posix()
            info = dataclasses.replace(info, config_path=config_label.format(shown))
    return dataclasses.replace(report, info=info)
