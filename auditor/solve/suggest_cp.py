"""Suggestions for a baseline Cp above the controller's range.

Says which part of Cp dominates (pad, trace, vias) and what the two usual
remedies gain: a shorter sense trace (its capacitance is per unit length,
so the length that clears follows directly) and a hatched or cleared plane
under the pad.
"""

from __future__ import annotations

from dataclasses import replace

from auditor.field.api import PadSetup
from auditor.field.traces import traces_pf
from auditor.model.suggestions import Suggestion
from auditor.solve.suggest_levers import Electrode, clear_lever, hatch_lever
from auditor.solve.suggest_search import Predict

#: Shortest sense trace suggested (mm): common practice, no source; value
#: chosen by padaudit (a controller pin is rarely closer than this to a pad).
MIN_TRACE_MM = 5.0


def contributors(setup: PadSetup, cp_total_pf: float, lumped_pf: float = 0.0
                 ) -> dict[str, float]:
    """Cp split into pad, trace, vias and (when there is any) the pin and parts (pF)."""
    trace, _ = traces_pf(setup.traces, 0, setup.board_layers, setup.plane_depth_mm)
    vias, _ = traces_pf((), setup.vias, setup.board_layers, setup.plane_depth_mm)
    parts = {"pad": cp_total_pf - trace - vias - lumped_pf, "trace": trace, "vias": vias}
    return {**parts, "pin and parts": lumped_pf} if lumped_pf else parts


def shortened(setup: PadSetup, length_mm: float) -> PadSetup:
    """Every trace run scaled so the runs add up to ``length_mm``."""
    total = sum(run.length_mm for run in setup.traces)
    scale = length_mm / total
    return replace(setup, traces=tuple(replace(run, length_mm=round(run.length_mm * scale, 3))
                                       for run in setup.traces))


def cp_suggestions(target_pf: float, electrode: Electrode,
                   predict: Predict) -> tuple[Suggestion, ...]:
    """Shorter trace and hatched/cleared plane, most effective first; the
    first says which contributor dominates."""
    setup = electrode.setup
    before = predict(setup)
    parts = contributors(setup, before.cp_total_pf, electrode.lumped_pf)
    out = [s for s in (_shorter_trace(target_pf, electrode, predict, parts["trace"]),
                       *_plane_changes(target_pf, electrode, predict)) if s is not None]
    out.sort(key=lambda s: (s.predicted.cp_total_pf, s.parameter))
    if out:
        name = max(parts, key=lambda k: (parts[k], k))
        lead = (f"largest share of Cp: {name} ({parts[name]:.1f} of {before.cp_total_pf:.1f} pF; "
                + ", ".join(f"{k} {v:.1f}" for k, v in parts.items()) + "): ")
        out[0] = replace(out[0], change=lead + out[0].change)
    return tuple(out)


def _shorter_trace(target_pf: float, electrode: Electrode, predict: Predict,
                   trace_pf: float) -> Suggestion | None:
    setup = electrode.setup
    length = sum(run.length_mm for run in setup.traces)
    if length <= MIN_TRACE_MM or trace_pf <= 0:
        return None
    before = predict(setup)
    per_mm = trace_pf / length
    wanted = length - (before.cp_total_pf - target_pf) / per_mm
    to = max(MIN_TRACE_MM, float(int(wanted)))  # whole mm, down
    clears = wanted >= MIN_TRACE_MM
    words = f"shorten the sense trace from {length:.0f} to {to:.0f} mm"
    if not clears:
        words = f"not enough on its own: {words}"
    return Suggestion(words, "trace_length_mm", round(length, 4), to, before,
                      predict(shortened(setup, to)), clears)


def _plane_changes(target_pf: float, electrode: Electrode,
                   predict: Predict) -> list[Suggestion]:
    out = []
    for lever in (hatch_lever(electrode), clear_lever(electrode)):
        if lever is None:
            continue
        after = predict(lever.apply(lever.bound))
        clears = after.cp_total_pf <= target_pf
        words = lever.words(lever.bound)
        out.append(Suggestion(words if clears else f"not enough on its own: {words}",
                              lever.parameter, round(lever.start, 4), lever.bound,
                              predict(electrode.setup), after, clears))
    return out
