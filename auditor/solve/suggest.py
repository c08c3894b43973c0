"""Changes that fix a finding, with the effect the field solve predicts.

:func:`suggestions_for` takes a rule id, the finding's measured values and
the electrode (:func:`electrode_for`: its own quick-model setup) and returns
:class:`~auditor.model.suggestions.Suggestion` records: the smallest change
of each useful parameter that clears the rule's limit, solved on the
electrode's setup with that one parameter changed. Rules without a field
effect (routing, parts, crossings) get none; their fix text stands.

Limits on field results are cleared with a margin of :data:`MARGIN`: the
mapping of a real board rounds areas to 3 figures and fills to steps of
0.05, and polygonised arcs lose area, so a board drawn exactly at the
threshold could land just under it (measured on generated boards: up to
about 1 %).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

from auditor.config import Config
from auditor.model.board import Board
from auditor.model.suggestions import Predicted, Suggestion
from auditor.model.vocabulary import SELF_KINDS
from auditor.sensors.model import Sensor
from auditor.solve.setup import pad_setup_for, quick_unfit_reason
from auditor.solve.stack import touch_mask
from auditor.solve.suggest_cp import cp_suggestions
from auditor.solve.suggest_levers import (
    Electrode,
    Lever,
    clear_lever,
    gap_lever,
    hatch_lever,
    pad_lever,
    permittivity_lever,
    thickness_lever,
    with_gap,
)
from auditor.solve.suggest_search import Predict, Predictor, smallest_clearing

#: Share by which a predicted result clears a limit on Cp, ΔC or ΔC/Cp
#: (value chosen by padaudit, see the module docstring).
MARGIN = 0.02

Metric = Callable[[Predicted], float]
METRICS: dict[str, tuple[Metric, str]] = {
    "delta-c-low": (lambda p: p.delta_c_pf, "min_pf"),
    "ratio-low": (lambda p: p.delta_ratio, "min_ratio"),
}
#: The rules whose findings a change of geometry or material clears.
SUGGESTING_RULES = frozenset({"electrode-too-small", "delta-c-low", "ratio-low",
                              "ground-gap-tight", "copper-under-electrode", "cp-too-high"})


def electrode_for(sensor: Sensor, board: Board, config: Config,
                  thresholds: Mapping[str, float | int | bool],
                  disk_model: bool = True) -> Electrode | None:
    """The electrode's quick-model setup and what the levers need, or None
    when the disk model does not fit it (mutual pairs, loops, no area)."""
    if sensor.kind not in SELF_KINDS or sensor.area_mm2 <= 0 or quick_unfit_reason(sensor):
        return None
    setup = pad_setup_for(sensor, board, config, thresholds).setup
    shadows = sorted((s for s in (sensor.surroundings.shadows if sensor.surroundings else ())
                      if s.fill != "none"), key=lambda s: (s.depth_mm, s.layer))
    plane = shadows[0] if shadows and setup.plane_depth_mm is not None else None
    mask = touch_mask(board, config) if setup.pad_side == "touch" else None
    return Electrode(setup, config, mask, thresholds,
                     plane.layer if plane else "", plane.fill_ratio if plane else 0.0,
                     disk_model)


def suggestions_for(rule_id: str, measured: Mapping[str, float], layer: str,
                    electrode: Electrode, solves: Predictor) -> tuple[Suggestion, ...]:
    """The suggestions for one finding (empty for rules with no field effect)."""
    predict = solves.shifted(electrode.lumped_pf)
    if rule_id == "electrode-too-small":
        return _too_small(measured, electrode, predict)
    if rule_id in METRICS:
        return _signal_low(rule_id, measured, electrode, predict)
    if rule_id == "ground-gap-tight":
        return _gap_tight(measured, electrode, predict)
    if rule_id == "copper-under-electrode" and layer == electrode.plane_layer:
        return tuple(_one(lever, lever.start, electrode, predict)
                     for lever in (hatch_lever(electrode), clear_lever(electrode))
                     if lever is not None)
    if rule_id == "cp-too-high":
        return cp_suggestions(measured["max_pf"] * (1 - MARGIN), electrode, predict)
    return ()


def _one(lever: Lever, value: float, electrode: Electrode, predict: Predict,
         clears: bool = True, words: str = "") -> Suggestion:
    to = lever.bound if lever.step == 0 else value
    return Suggestion(_said(words or lever.words(value), electrode, clears), lever.parameter,
                      round(lever.start, 4), round(to, 4), predict(electrode.setup),
                      predict(lever.apply(value)), clears)


def _said(text: str, electrode: Electrode, clears: bool) -> str:
    if not clears:
        text = f"not enough on its own: {text}"
    if not electrode.disk_model:
        text += " (predicted with the disk model; this electrode's own figures are 3-D)"
    if electrode.caveat:
        text += f" ({electrode.caveat})"
    return text


def _too_small(measured: Mapping[str, float], electrode: Electrode,
               predict: Predict) -> tuple[Suggestion, ...]:
    """The rule is geometric: the diameter it wants, or a cover that asks
    for no more than the pad has (closed form), each solved for its effect."""
    have, need = measured["diameter_mm"], measured["min_mm"]
    out = []
    pad = pad_lever(electrode)
    if pad is not None:
        to = round(pad.step * -(-(need + 0.01) // pad.step), 4)  # up to the grid
        out.append(_one(pad, min(to, pad.bound), electrode, predict, to <= pad.bound + 1e-9))
    if have >= electrode.limit("pad_min_diameter_mm", 0.0):
        alternatives = [s for s in (_cover_for(have, electrode, predict)) if s is not None]
        if alternatives:
            out.append(max(alternatives, key=lambda s: (s.predicted.delta_c_pf, s.parameter)))
    return tuple(out)


def _cover_for(have_mm: float, electrode: Electrode,
               predict: Predict) -> list[Suggestion | None]:
    """Thinner or higher-permittivity cover for which ``have_mm`` is enough."""
    per_mm = electrode.limit("pad_diameter_per_electrical_mm", 10.0)
    electrical = have_mm / per_mm - electrode.config.air_gap_mm  # the cover's share
    cover = electrode.config.overlay
    out: list[Suggestion | None] = []
    thin = thickness_lever(electrode)
    if thin is not None and electrical > 0:
        to = round(thin.step * ((electrical * cover.epsilon_r - 1e-6) // thin.step), 4)
        out.append(_one(thin, to, electrode, predict) if to >= thin.bound - 1e-9 else None)
    denser = permittivity_lever(electrode)
    if denser is not None and electrical > 0:
        to = round(denser.step * -(-(cover.thickness_mm / electrical + 1e-6) // denser.step), 4)
        out.append(_one(denser, to, electrode, predict) if to <= denser.bound + 1e-9 else None)
    return out


@dataclass(frozen=True)
class _Goal:
    """A limit on a field result: the metric, the value to reach (margin
    included) and how far the electrode is from it now (negative)."""

    metric: Metric
    target: float
    start_margin: float

    def margin(self, _value: float, predicted: Predicted) -> float:
        return self.metric(predicted) - self.target


def _signal_low(rule_id: str, measured: Mapping[str, float], electrode: Electrode,
                predict: Predict) -> tuple[Suggestion, ...]:
    """Pad diameter that clears, and the single best other change."""
    metric, key = METRICS[rule_id]
    target = measured[key] * (1 + MARGIN)
    goal = _Goal(metric, target, metric(predict(electrode.setup)) - target)
    pad = pad_lever(electrode)
    finger = electrode.setup.finger_diameter_mm
    # ΔC/Cp against pad size peaks near the finger's size (physics-model.md)
    probes = (finger,) if pad and finger and pad.start < finger < pad.bound else ()
    made = [_searched(pad, probes, goal, electrode, predict) if pad else None,
            _best_other(goal, electrode, predict)]
    return tuple(s for s in made if s is not None)


def _searched(lever: Lever, probes: tuple[float, ...], goal: _Goal, electrode: Electrode,
              predict: Predict) -> Suggestion | None:
    """The smallest change of ``lever`` that reaches ``goal`` (or its best try)."""
    found = smallest_clearing(lambda v: predict(lever.apply(v)), goal.margin, lever.start,
                              goal.start_margin, lever.bound, lever.step, probes)
    if found is None:
        return None
    return _one(lever, found.value, electrode, predict, found.clears)


def _best_other(goal: _Goal, electrode: Electrode, predict: Predict) -> Suggestion | None:
    """Of cover, copper under the pad and gap: the lever that gains most at
    the end of its range, searched for its smallest clearing change."""
    levers = [lever for lever in (thickness_lever(electrode), permittivity_lever(electrode),
                                  hatch_lever(electrode), clear_lever(electrode),
                                  gap_lever(electrode)) if lever is not None]
    if not levers:
        return None
    best = max(levers, key=lambda lv: (goal.metric(predict(lv.apply(lv.bound))), lv.parameter))
    if best.step == 0:
        reached = goal.margin(best.bound, predict(best.apply(best.bound))) >= 0
        return _one(best, best.bound, electrode, predict, reached)
    return _searched(best, (), goal, electrode, predict)


def _gap_tight(measured: Mapping[str, float], electrode: Electrode,
               predict: Predict) -> tuple[Suggestion, ...]:
    """The gap the rule asks for, and its effect in the model (which holds
    the typical gap: a local pinch wider than that changes nothing there)."""
    have, need = measured["gap_mm"], measured["min_mm"]
    setup = electrode.setup
    if setup.gap_mm is None:
        return ()
    modelled = max(setup.gap_mm, need)
    lever = Lever("ground_gap_mm", have, need, 0.0, lambda _: with_gap(setup, modelled),
                  lambda _: "")
    words = f"widen the narrowest gap to the surrounding copper from {have:.2f} to {need:.2f} mm"
    if setup.gap_mm >= need:
        words += (f" (the model's typical gap is already {setup.gap_mm:.2f} mm, so the "
                  "predicted figures stay)")
    return (_one(lever, need, electrode, predict, words=words),)
