"""The audit entry's last field step: a predicted fix for each finding that a
change of geometry or material clears.

Runs after the rules and the decision (rules never solve): for each decided
finding of a rule in :data:`auditor.solve.suggest.SUGGESTING_RULES` on an
electrode the disk model holds, the solve stage computes the suggestions on
that electrode's own setup, and they are attached to the finding. Waived
findings get none (the waiver says the finding is accepted); nor do
electrodes without field results.
"""

from __future__ import annotations

import contextlib
from collections.abc import Mapping
from dataclasses import replace

from auditor.config import Config
from auditor.decide.records import Report
from auditor.errors import UsageError
from auditor.field.api import PadSetup
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.model.suggestions import Predicted
from auditor.sensors.model import Sensor
from auditor.solve.suggest import SUGGESTING_RULES, electrode_for, suggestions_for
from auditor.solve.suggest_levers import Electrode
from auditor.solve.suggest_search import Predictor, Recorder

#: A series capacitor divides ΔC (auditor.solve.lumped); the predictions add
#: the lumped capacitance to Cp only.
SERIES_CAVEAT = "a series capacitor's division of ΔC is left out"


def _series(solved: PadMetrics) -> bool:
    return any(part.connection == "series" for part in solved.parts)


def lumped_pf(solved: PadMetrics) -> float:
    """What the electrode's Cp total holds besides the field model's pad and
    trace (the controller pin, parts on the sense net), 0 when nothing."""
    extra = solved.cp_total_pf - (solved.cp_pad_pf + solved.cp_trace_pf)
    return extra if extra > 1e-9 else 0.0


def field_part(solved: PadMetrics) -> Predicted:
    """The quick metrics of an electrode as the solve of its own setup gave
    them (pad and trace; the lumped rest is added back by the predictor)."""
    field = solved.cp_pad_pf + solved.cp_trace_pf
    return Predicted(field, solved.delta_c_pf, solved.delta_c_pf / field)


def with_suggestions(report: Report, board: Board, sensors: tuple[Sensor, ...],
                     config: Config, thresholds: Mapping[str, float | int | bool]) -> Report:
    """``report`` with suggestions on the findings a field change fixes.

    A dry run first notes the setups every search starts from; they are
    solved together (in helper processes when a core is free), then the
    searches run on those solves.
    """
    by_name = {s.name: s for s in sensors}
    metrics = {r.sensor.name: r.metrics for r in report.sensors}
    electrodes: dict[str, Electrode | None] = {}
    wanted: list[tuple[int, Electrode]] = []
    for index, decided in enumerate(report.findings):
        finding = decided.finding
        solved = metrics.get(finding.sensor)
        if (decided.waived or finding.rule_id not in SUGGESTING_RULES
                or finding.sensor not in by_name or solved is None):
            continue
        if finding.sensor not in electrodes:
            found = electrode_for(by_name[finding.sensor], board, config, thresholds,
                                  disk_model=solved.method == "quick")
            electrodes[finding.sensor] = (replace(found, lumped_pf=lumped_pf(solved),
                                                  caveat=SERIES_CAVEAT if _series(solved) else "")
                                          if found is not None else None)
        found = electrodes[finding.sensor]
        if found is not None:
            wanted.append((index, found))
    known = {e.setup: field_part(m) for name, e in electrodes.items()
             if e is not None and e.disk_model and (m := metrics[name]) is not None
             and not _series(m)}
    predict = _prefetched(report, wanted, known)
    findings = list(report.findings)
    for index, found in wanted:
        finding = findings[index].finding
        try:
            made = suggestions_for(finding.rule_id, dict(finding.measured), finding.layer,
                                   found, predict)
        except UsageError:  # a changed setup the model cannot take: no suggestion
            made = ()
        if made:
            findings[index] = replace(findings[index], suggestions=made)
    return replace(report, findings=tuple(findings))


def _prefetched(report: Report, wanted: list[tuple[int, Electrode]],
                known: Mapping[PadSetup, Predicted]) -> Predictor:
    """A predictor holding the solves every suggestion search starts from;
    ``known``: the electrodes' own setups, already solved by the audit."""
    recorder = Recorder()
    for index, found in wanted:
        finding = report.findings[index].finding
        with contextlib.suppress(UsageError):  # the real run skips it too
            suggestions_for(finding.rule_id, dict(finding.measured), finding.layer, found,
                            recorder)
    predict = Predictor(known)
    predict.prefetch(recorder.asked)
    return predict
