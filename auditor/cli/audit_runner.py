"""How ``diff``, ``hook`` and ``audit --against`` run an audit of a board file.

They all need "audit this path with the user's options" without knowing the
pipeline's option object. :func:`auditor_for` builds that callable from the
parsed arguments; tests replace :data:`AUDITOR_FACTORY` with one returning
hand-made reports.
"""

from __future__ import annotations

import argparse
import dataclasses
import importlib
from collections.abc import Callable

from auditor.errors import UsageError
from auditor.report.model import Report

AuditFn = Callable[[str], Report]


def _pipeline_auditor(args: argparse.Namespace) -> AuditFn:
    try:
        pipeline = importlib.import_module("auditor.pipeline")
    except ModuleNotFoundError as exc:
        if exc.name != "auditor.pipeline":
            raise
        raise UsageError("this build of padaudit has no audit pipeline yet") from None
    build = getattr(pipeline, "options_from_args", None)
    options = build(args) if build is not None else None

    def audit(path: str) -> Report:
        report: Report = pipeline.run_audit(path, options)
        return report

    return audit


#: Replaceable in tests: ``args -> (board path -> Report)``.
AUDITOR_FACTORY: Callable[[argparse.Namespace], AuditFn] = _pipeline_auditor


def auditor_for(args: argparse.Namespace) -> AuditFn:
    """A function auditing one board path with the options in ``args``."""
    return AUDITOR_FACTORY(args)


def shown_as(report: Report, label: str) -> Report:
    """``report`` with its board path replaced by ``label`` (e.g. ``HEAD~1:a.kicad_pcb``),
    so no temporary path leaks into any output."""
    return dataclasses.replace(report, info=dataclasses.replace(report.info, board_path=label))
