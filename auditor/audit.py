"""One audit, end to end: read → sensors → solve → rules → decide → Report.

The field step runs before the rules so the rules on Cp and ΔC see the
metrics; every other rule judges only the board and the sensor records.
Everything is ordered deterministically (sensors by name, findings by
:func:`auditor.decide.finding_order`, rules by id), so the same board and
options give the same report.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, replace
from pathlib import Path
from typing import TYPE_CHECKING

from auditor import __version__
from auditor.audit_suggest import with_suggestions
from auditor.config import Config, discover_config, with_overrides
from auditor.config.profiles import Profile, load_profile
from auditor.decide import Policy, decide, sensitivity_ranks, sensor_strength
from auditor.decide.baseline import Baseline, apply_baseline, load_baseline
from auditor.decide.cautions import cautions_for
from auditor.decide.records import Report, RuleInfo, RunInfo, SensorResult
from auditor.model.board import Board
from auditor.model.items import ReadWarning
from auditor.model.results import PadMetrics
from auditor.read import read_board
from auditor.rules.context import RuleContext, RuleSettings, ThresholdValue
from auditor.rules.registry import RuleSpec, all_rules, run_rules
from auditor.sensors import find_sensors, mark_sense_neighbours, measure_each
from auditor.sensors.model import Sensor, name_order
from auditor.sensors.selection import SensorSelection
from auditor.solve.dispatch import Mode, PreciseWork, QuickSolves, unsolved_reasons
from auditor.solve.dispatch import solve_sensors as field_solve

if TYPE_CHECKING:  # the precise solver pulls in scipy.interpolate: load it only when used
    from auditor.model.results import PreciseExtras


@dataclass(frozen=True)
class AuditOptions:
    """Command-line values that override the configuration file."""

    config_path: str | None = None
    profile: str | None = None
    overlay: str | None = None
    power: str | None = None
    touch_side: str | None = None
    fail_on: str | None = None
    solve: bool = True  # False: layout rules only, every sensor "unsolved"
    precise: bool = False  # True: 3-D solve of the real copper shapes, every electrode
    quick: bool = False  # True: the disk model for every electrode (neither: automatic)
    #: Called as ``progress(sensor_name, done, total)`` after each solve.
    progress: Callable[[str, int, int], None] | None = None
    #: Baseline file whose findings are accepted (shown, never failing).
    baseline: str | None = None
    #: Accept every current finding (what ``--write-baseline`` records).
    accept_all: bool = False
    #: Without ``baseline``, use the configuration's ``baseline`` key (the
    #: gated commands; never the other side of a comparison).
    config_baseline: bool = False
    #: Attach predicted fixes to the findings (:mod:`auditor.audit_suggest`).
    suggest: bool = False
    #: Processes for the field solves, this one included (None: automatic,
    #: one per idle core; see :func:`auditor.field.fanout.process_count`).
    workers: int | None = None


@dataclass(frozen=True)
class AuditSetup:
    """The resolved configuration, profile and thresholds of one run."""

    config: Config
    profile: Profile
    thresholds: Mapping[str, ThresholdValue]


def resolve_setup(board_path: str | Path, options: AuditOptions | None = None) -> AuditSetup:
    """Configuration (file walked up from the board, then flags) and profile."""
    opts = options or AuditOptions()
    config = with_overrides(discover_config(board_path, opts.config_path),
                            profile=opts.profile, overlay=opts.overlay, power=opts.power,
                            touch_side=opts.touch_side, fail_on=opts.fail_on)
    profile = load_profile(config.profile, config.base_dir)
    return AuditSetup(config, profile, {**profile.thresholds, **config.thresholds})


def measuring_selection(setup: AuditSetup) -> SensorSelection:
    """The sensor selection with the profile's measuring distances, unless the
    user set those under ``[sensors]``."""
    sel, given, limits = setup.config.selection, setup.config.selection_keys, setup.thresholds

    def pick(field_name: str, threshold: str, current: float) -> float:
        if field_name in given or threshold not in limits:
            return current
        return float(limits[threshold])

    return replace(
        sel,
        neighbour_distance_mm=pick("neighbour_distance_mm", "parallel_distance_mm",
                                   sel.neighbour_distance_mm),
        parts_radius_mm=pick("parts_radius_mm", "nearby_radius_mm", sel.parts_radius_mm),
        floating_radius_mm=max(sel.floating_radius_mm,
                               pick("floating_radius_mm", "floating_copper_min_mm",
                                    sel.floating_radius_mm)))


def solve_sensors(board: Board, sensors: tuple[Sensor, ...], setup: AuditSetup,
                  options: AuditOptions, quick: QuickSolves | None = None,
                  work: PreciseWork | None = None) -> dict[str, PadMetrics]:
    """Field metrics per sensor name, each from the model the solve mode
    picks (:func:`solve_mode`); sensors the solver cannot map get no entry
    and are reported ``unsolved`` (no number is made up). ``quick``: the
    quick solves already started by :func:`_measured`; ``work``: 3-D jobs
    to run together with the electrodes' (:func:`_precise_work`)."""
    return field_solve(board, sensors, setup.config, mode=solve_mode(options),
                       progress=options.progress, thresholds=setup.thresholds, quick=quick,
                       workers=options.workers, work=work)


def solve_mode(options: AuditOptions) -> Mode:
    """"precise" or "quick" when forced, else "auto" (the model per electrode)."""
    return "precise" if options.precise else "quick" if options.quick else "auto"


def _measured(board: Board, found: tuple[Sensor, ...], selection: SensorSelection,
              setup: AuditSetup, options: AuditOptions,
              ) -> tuple[tuple[Sensor, ...], QuickSolves | None]:
    """The found sensors measured and sorted by name, and (for a quick
    audit) their quick solves, each queued as soon as its sensor is
    measured so that solving overlaps measuring."""
    quick = None
    if options.solve and not options.precise:
        nets = frozenset(net for sensor in found for net in sensor.nets)
        quick = QuickSolves(board, setup.config, setup.thresholds, options.workers,
                            electrode_nets=nets)
    measured = []
    for sensor in measure_each(board, found, selection):
        measured.append(sensor)
        if quick is not None:
            quick.add(sensor)
    sensors = tuple(sorted(mark_sense_neighbours(measured), key=lambda s: name_order(s.name)))
    return sensors, quick


def sense_nets(board: Board, sensors: tuple[Sensor, ...]) -> tuple[str, ...]:
    """Every electrode's nets and the nets of its series part's pads (the
    stretch from the resistor to the controller pin), sorted."""
    nets = {net for s in sensors for net in (*s.nets, *(s.path.nets if s.path else ()))}
    series = {s.path.series_ref for s in sensors if s.path and s.path.series_ref}
    for fp in board.footprints:
        if fp.ref in series:
            nets.update(pad.net for pad in fp.pads)
    nets.discard("")
    return tuple(sorted(nets))


def rule_settings(config: Config, nets_of_sensors: tuple[str, ...] = ()) -> RuleSettings:
    """What the rules need to know about the product."""
    return RuleSettings(
        sense_nets=nets_of_sensors,
        overlay_thickness_mm=config.overlay_thickness_mm,
        overlay_electrical_mm=config.overlay_electrical_mm,
        touch_side=config.touch_side, power=config.power,
        noisy_nets=config.noisy_nets,
        controller_ref=config.controller or config.selection.controller_ref,
        electrodes_configured=config.selection.configured)


def describe_warning(warning: ReadWarning) -> str:
    """A reader warning as one line: ``code: message (line L:C)``."""
    where = ""
    if warning.line is not None:
        where = f" (line {warning.line}" + (f":{warning.column}" if warning.column else "") + ")"
    return f"{warning.code}: {warning.message}{where}"


def run_audit(board_path: str | Path, options: AuditOptions | None = None) -> Report:
    """Audit one board file.

    Raises
    ------
    BoardFileError, ConfigError, UsageError
        On bad input (the command line turns these into exit code 2).
    """
    opts = options or AuditOptions()
    setup = resolve_setup(board_path, opts)
    board = read_board(board_path)
    selection = measuring_selection(setup)
    found, _rejects = find_sensors(board, selection)
    sensors, quick = _measured(board, found, selection, setup, opts)
    work = _precise_work(board, sensors, setup, opts)
    metrics, broken = _without_unfollowed(
        sensors, solve_sensors(board, sensors, setup, opts, quick, work) if opts.solve else {})
    extras = work.extras() if work is not None else None
    unsolved = {**_unsolved(sensors, metrics, opts), **broken} if opts.solve else {}
    report = build_report(board, sensors, metrics, setup, extras, unsolved)
    if opts.solve and opts.suggest:
        report = with_suggestions(report, board, sensors, setup.config, setup.thresholds)
    if opts.config_baseline and not opts.baseline and setup.config.baseline:
        opts = replace(opts, baseline=setup.config.baseline)
    return with_baseline(report, opts)


def configured_baseline(board_path: str | Path, config_path: str | None = None) -> str:
    """The baseline file the configuration for ``board_path`` names, or ``""``."""
    return discover_config(board_path, config_path).baseline


def with_baseline(report: Report, options: AuditOptions) -> Report:
    """``report`` with the baseline of ``options`` applied: every current
    finding accepted (``accept_all``), or those the ``baseline`` file holds.

    Raises
    ------
    ConfigError
        When the baseline file cannot be read or is not a baseline.
    """
    if options.accept_all:
        return apply_baseline(report, Baseline.of(report.findings))
    if options.baseline:
        return apply_baseline(report, load_baseline(options.baseline))
    return report


def _unsolved(sensors: tuple[Sensor, ...], metrics: Mapping[str, PadMetrics],
              options: AuditOptions) -> dict[str, str]:
    return unsolved_reasons(sensors, metrics, mode=solve_mode(options))


#: Why a sensor whose sense path was not followed gets no field result.
UNFOLLOWED_REASON = ("sense path not followed to a controller pin, so the trace's "
                     "capacitance is unknown and Cp and ΔC/Cp would be wrong")


def _without_unfollowed(sensors: tuple[Sensor, ...], metrics: dict[str, PadMetrics]
                        ) -> tuple[dict[str, PadMetrics], dict[str, str]]:
    """Drop the results of sensors with a broken sense path: without the
    trace, Cp is too low and the ratio too high, and a broken route would
    look like an improvement in ``diff``."""
    broken = {s.name for s in sensors if s.path is not None and not s.path.complete}
    kept = {name: m for name, m in metrics.items() if name not in broken}
    return kept, {name: UNFOLLOWED_REASON for name in sorted(broken & set(metrics))}


def _precise_work(board: Board, sensors: tuple[Sensor, ...], setup: AuditSetup,
                  options: AuditOptions) -> PreciseWork | None:
    """With ``--precise``, the 3-D jobs with the pad-to-pad coupling and the
    slider/wheel response queued (each costs several 3-D solves); they run
    together with the electrodes' own, longest first."""
    if not (options.solve and options.precise):
        return None
    work = PreciseWork(options.workers)
    work.add_extras(board, sensors, setup.config)
    return work


def shown_path(path: str) -> str:
    """``path`` relative to the working folder when inside it, else as it is
    (a configuration found by walking up is known by its absolute path)."""
    if not path or not Path(path).is_absolute():
        return path
    try:
        relative = Path(path).relative_to(Path.cwd())
    except ValueError:
        return path
    return relative.as_posix()


def build_report(board: Board, sensors: tuple[Sensor, ...], metrics: Mapping[str, PadMetrics],
                 setup: AuditSetup, extras: PreciseExtras | None = None,
                 unsolved: Mapping[str, str] | None = None) -> Report:
    """Run the rules, decide, and assemble the report (no file access)."""
    config = setup.config
    specs = all_rules()
    policy = Policy(specs, setup.profile.levels, config.severity, config.waivers)
    ctx = RuleContext(sensors, rule_settings(config, sense_nets(board, sensors)),
                      board.copper_layers, board.warnings,
                      metrics, setup.thresholds, precise=extras, unsolved=unsolved or {})
    ran = run_rules(ctx, policy.active_rule_ids())
    decision = decide(ran.findings, policy)
    active = set(policy.active_rule_ids())
    return Report(
        info=RunInfo(board_path=str(board.path), board_version=board.version,
                     tool_version=__version__, profile=setup.profile.name,
                     overlay=config.describe_overlay(), touch_side=config.touch_side,
                     power=config.power, fail_on=config.fail_on,
                     max_ratio_loss=float(setup.thresholds.get("max_ratio_loss", 0.2)),
                     config_path=shown_path(config.source)),
        sensors=_sensor_results(sensors, metrics, setup.thresholds),
        findings=decision.findings,
        rules=tuple(RuleInfo(s.rule_id, s.title, s.rationale, s.fix, s.severity)
                    for s in specs if s.rule_id in active),
        read_warnings=tuple(describe_warning(w) for w in board.warnings),
        stale_waivers=decision.stale_waivers,
        rule_errors=tuple(sorted(ran.errors)),
        cautions=_cautions(config.power),
        skipped_rules=skipped_rules(specs, active, precise=extras is not None),
        board=board,
        precise=extras,
    )


#: The module of the rules that judge 3-D results only (``--precise``).
PRECISE_RULES_MODULE = "auditor.rules.precise_rules"
SKIPPED_OFF = "switched off by the profile or the configuration"
SKIPPED_QUICK = "judges 3-D results only: runs with --precise"


def skipped_rules(specs: tuple[RuleSpec, ...], active: set[str],
                  precise: bool) -> tuple[tuple[str, str], ...]:
    """``(rule id, why)`` for each rule that did not judge this run, by id."""
    skipped = []
    for spec in specs:
        if spec.rule_id not in active:
            skipped.append((spec.rule_id, SKIPPED_OFF))
        elif spec.module == PRECISE_RULES_MODULE and not precise:
            skipped.append((spec.rule_id, SKIPPED_QUICK))
    return tuple(sorted(skipped))


def _sensor_results(sensors: tuple[Sensor, ...], metrics: Mapping[str, PadMetrics],
                    thresholds: Mapping[str, ThresholdValue]) -> tuple[SensorResult, ...]:
    ranks = sensitivity_ranks(metrics)
    return tuple(SensorResult(s, metrics.get(s.name), ranks.get(s.name, 0),
                              sensor_strength(metrics.get(s.name), thresholds,
                                              s.equivalent_diameter_mm))
                 for s in sensors)


def _cautions(power: str) -> tuple[str, ...]:
    return cautions_for(power)
