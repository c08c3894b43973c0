"""The solves of the mutual pairs, as jobs beside the audit's other 3-D jobs.

:func:`queue_pairs` puts one job per pair that needs a solve on the
audit's :class:`auditor.solve.jobs.PreciseWork`, so the pairs share the
cores with the self-capacitance 3-D jobs, longest first;
:func:`pair_metrics` builds each receive electrode's metrics from the
results after the run. What a pair's job computes
(:func:`auditor.solve.mutual_pairs.plan_pairs` decided the route):

* routed to the disk and ring: that model;
* routed to 3-D, its own solve: the 3-D solve, and with ``--precise`` the
  disk-and-ring estimate beside it. The automatic mode does not compute
  that estimate, as it would not be used (on a comb pair it cost more than
  the 3-D solve, measured); the notes and the JSON say so. When the 3-D
  solve is not possible the disk and ring answers, with the reason;
* sharing an equal pair's 3-D solve: with ``--precise`` its own
  disk-and-ring estimate, else nothing.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, replace
from functools import partial

import shapely

from auditor.config import Config
from auditor.errors import UsageError
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.sensors.model import Sensor
from auditor.solve.jobs import PreciseWork
from auditor.solve.mutual import metrics_for_mutual
from auditor.solve.mutual_pairs import PairPlan
from auditor.solve.setup import pad_setup_for


@dataclass(frozen=True)
class PairContext:
    """What every pair's solve reads: the board, all sensors, the
    configuration, the profile's thresholds and the solve mode."""

    board: Board
    sensors: tuple[Sensor, ...]
    config: Config
    limits: Mapping[str, float | int | bool]
    mode: str


def queue_pairs(plans: tuple[PairPlan, ...], work: PreciseWork, context: PairContext) -> None:
    """Queue on ``work`` the job of every pair that needs one (run by ``work.run``)."""
    for plan in plans:
        job = _job_for(plan, context)
        if job is not None:
            work.add_pair(plan.rx.name, _cells(plan), job)


def pair_metrics(plans: tuple[PairPlan, ...], results: Mapping[str, PadMetrics | None],
                 context: PairContext) -> dict[str, PadMetrics]:
    """Metrics of every receive electrode with a partner, from the jobs'
    ``results`` (by receive electrode); a pair neither model can take has none."""
    out: dict[str, PadMetrics] = {}
    for plan in plans:
        metrics = results.get(plan.rx.name)
        if plan.shares_with:
            first = results.get(plan.shares_with)
            metrics = (_shared(plan, first, metrics, context)
                       if first is not None and first.method == "precise"
                       # The first pair's 3-D solve failed: this one tries its own.
                       else precise_pair(plan, context))
        if metrics is not None:
            out[plan.rx.name] = metrics if metrics.method_reason else replace(
                metrics, method_reason=plan.route.reason)
    return out


def _job_for(plan: PairPlan, context: PairContext) -> Callable[[], PadMetrics | None] | None:
    if plan.route.method == "quick":
        return partial(quick_pair, plan, context)
    if plan.shares_with:
        return partial(quick_pair, plan, context) if context.mode == "precise" else None
    return partial(precise_pair, plan, context)


def _cells(plan: PairPlan) -> float:
    """Cells of the pair's 3-D solve (its window, and the pair alone at the
    gaps' cells): what it costs, roughly; 0 for a disk-and-ring job (short)."""
    if plan.route.method != "precise" or plan.shares_with:
        return 0.0
    # Imported here for start-up speed: the 3-D solver loads scipy.interpolate.
    from auditor.solve.mutual_precise import WINDOW_CELL_MM, pair_cell_mm
    from auditor.solve.precise import WINDOW_MARGIN_MM

    x0, y0, x1, y1 = shapely.union_all([plan.rx.geometry, plan.tx.geometry]).bounds
    frame = 2.0 * WINDOW_MARGIN_MM
    window = (x1 - x0 + frame) * (y1 - y0 + frame) / WINDOW_CELL_MM ** 2
    return float(window + (x1 - x0) * (y1 - y0) / pair_cell_mm(plan.rx, plan.tx) ** 2)


def quick_pair(plan: PairPlan, context: PairContext) -> PadMetrics | None:
    """The disk-and-ring metrics, or None when the pair cannot be mapped onto
    it (e.g. a transmit electrode larger than the ground's reach)."""
    try:
        return metrics_for_mutual(plan.rx, plan.tx, context.board, context.config,
                                  context.limits)
    except UsageError:
        return None


def precise_pair(plan: PairPlan, context: PairContext) -> PadMetrics | None:
    """The pair's own 3-D metrics; the disk and ring with the reason when
    the 3-D solve is not possible (None when neither model can take it)."""
    # Imported here for start-up speed: the 3-D solver loads scipy.interpolate.
    from auditor.solve.mutual_precise import metrics_for_mutual_precise

    tried = context.mode == "precise"
    quick = quick_pair(plan, context) if tried else None
    rx, board, config = plan.rx, context.board, context.config
    mapped = pad_setup_for(rx, board, config, context.limits)
    try:
        return metrics_for_mutual_precise(rx, plan.tx, board, config, mapped, context.sensors,
                                          quick, _no_quick(context))
    except (UsageError, KeyError) as exc:
        quick = quick if tried else quick_pair(plan, context)
        if quick is None:
            return None
        return replace(quick, notes=(f"3-D solve of the pair not possible ({exc}); disk and "
                                     "ring estimate shown", *quick.notes),
                       method_reason=f"3-D solve not possible ({exc})")


def _no_quick(context: PairContext) -> str:
    """Why a 3-D pair without a disk-and-ring estimate has none."""
    from auditor.solve.mutual_precise import NOT_COMPUTED, NOT_MAPPED  # start-up speed

    return NOT_MAPPED if context.mode == "precise" else NOT_COMPUTED


def _shared(plan: PairPlan, first: PadMetrics, quick: PadMetrics | None,
            context: PairContext) -> PadMetrics:
    """The first equal pair's 3-D metrics under this pair's names, with this
    pair's own disk-and-ring estimate (``quick``) when there is one."""
    own = f"mutual pair {plan.tx.name} -> {plan.rx.name}: " + first.notes[0].split(": ", 1)[1]
    notes = (own, f"3-D solve shared with {plan.shares_with} (same copper up to a "
                  "translation; its surroundings were solved)", *first.notes[1:3])
    missing = "" if quick else _no_quick(context)
    if missing:
        notes += (f"disk-and-ring estimate: {missing}",)
    return replace(first, notes=notes, quick_missing=missing,
                   quick_cp_pad_pf=quick.cp_pad_pf if quick else None,
                   quick_cp_total_pf=quick.cp_total_pf if quick else None,
                   quick_delta_c_pf=quick.delta_c_pf if quick else None)


__all__ = ["PairContext", "pair_metrics", "precise_pair", "queue_pairs", "quick_pair"]
