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

from collections.abc import Mapping
from dataclasses import replace

from auditor.config import Config
from auditor.decide.records import DecidedFinding, Report
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.model.suggestions import Predicted
from auditor.sensors.model import Sensor
from auditor.solve.suggest import SUGGESTING_RULES, electrode_for, suggestions_for
from auditor.solve.suggest_levers import Electrode
from auditor.solve.suggest_search import Predictor


def lumped_pf(solved: PadMetrics, field: Predicted) -> float:
    """What the electrode's Cp total holds besides its field model (the
    controller pin, parts on the sense net): the difference between its
    quick metrics and the solve of the same setup, 0 when there is none."""
    extra = solved.cp_total_pf - field.cp_total_pf
    return extra if extra > 1e-9 else 0.0


def with_suggestions(report: Report, board: Board, sensors: tuple[Sensor, ...],
                     config: Config, thresholds: Mapping[str, float | int | bool]) -> Report:
    """``report`` with suggestions on the findings a field change fixes."""
    predict = Predictor()
    by_name = {s.name: s for s in sensors}
    metrics = {r.sensor.name: r.metrics for r in report.sensors}
    electrodes: dict[str, Electrode | None] = {}

    def electrode(name: str, solved: PadMetrics) -> Electrode | None:
        if name not in electrodes:
            found = electrode_for(by_name[name], board, config, thresholds,
                                  disk_model=solved.method == "quick")
            if found is not None and found.disk_model:
                found = replace(found, lumped_pf=lumped_pf(solved, predict(found.setup)))
            electrodes[name] = found
        return electrodes[name]

    def suggested(decided: DecidedFinding) -> DecidedFinding:
        finding = decided.finding
        solved = metrics.get(finding.sensor)
        if (decided.waived or finding.rule_id not in SUGGESTING_RULES
                or finding.sensor not in by_name or solved is None):
            return decided
        found = electrode(finding.sensor, solved)
        if found is None:
            return decided
        made = suggestions_for(finding.rule_id, dict(finding.measured), finding.layer,
                               found, predict)
        return replace(decided, suggestions=made) if made else decided

    return replace(report, findings=tuple(suggested(d) for d in report.findings))
