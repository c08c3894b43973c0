"""The smallest change of one parameter that clears a limit, in few solves.

A parameter is searched on a grid of its resolution (0.1 mm of pad
diameter, 0.05 mm of gap...), so every value reported is one that was
solved, and the reported prediction is that very solve. The search first
solves the end of the sensible range; only when that clears does it close
in, by interpolating the margin between the last failing and the first
clearing grid point (regula falsi), falling back to halving when an
interpolation gains little. Typically 3-5 solves per parameter, each one
cached (:class:`Predictor`).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass

from auditor.errors import UsageError
from auditor.field.api import PadSetup, solve_pad
from auditor.field.batch import PadBatch
from auditor.model.suggestions import Predicted

#: A setup's predicted numbers (:meth:`Predictor.shifted`).
Predict = Callable[[PadSetup], Predicted]


class Predictor:
    """Solves setups with the quick model, each distinct setup once."""

    def __init__(self, known: Mapping[PadSetup, Predicted] | None = None) -> None:
        #: ``known``: setups already solved elsewhere (the audit's own solves)
        self._solved: dict[PadSetup, Predicted] = dict(known or {})

    def __call__(self, setup: PadSetup) -> Predicted:
        known = self._solved.get(setup)
        if known is None:
            solve = solve_pad(setup)
            known = Predicted(solve.cp_total_pf, solve.delta_c_pf, solve.delta_ratio)
            self._solved[setup] = known
        return known

    def shifted(self, lumped_pf: float) -> Predict:
        """Predictions with ``lumped_pf`` outside the field model (controller
        pin, parts on the sense net) added to Cp total, as the electrode's
        own Cp total has it; ΔC is unchanged, ΔC/Cp follows."""
        if lumped_pf == 0.0:
            return self

        def predict(setup: PadSetup) -> Predicted:
            raw = self(setup)
            total = raw.cp_total_pf + lumped_pf
            return Predicted(total, raw.delta_c_pf, raw.delta_c_pf / total)

        return predict

    @property
    def solves(self) -> int:
        """How many distinct setups were solved."""
        return len(self._solved)

    def prefetch(self, setups: Iterable[PadSetup], workers: int | None = None) -> None:
        """Solve ``setups`` ahead, over helper processes when a core is free
        (:class:`PadBatch`: the same bits as solving them here)."""
        batch = PadBatch(workers)
        for setup in setups:
            if setup not in self._solved:
                try:
                    batch.add(setup)
                except UsageError:  # left for the search, which says so
                    continue
        for setup, solve in batch.results().items():
            self._solved[setup] = Predicted(solve.cp_total_pf, solve.delta_c_pf,
                                            solve.delta_ratio)


class Recorder(Predictor):
    """A stand-in that solves nothing: it notes every setup asked for and
    answers "no signal" (Cp 1 pF, no ΔC), so a dry run of the suggestions
    notes the setups any run asks first (each lever's end of range, the
    discrete changes, the unchanged setup) for :meth:`Predictor.prefetch`."""

    def __init__(self) -> None:
        super().__init__()
        self.asked: dict[PadSetup, None] = {}

    def __call__(self, setup: PadSetup) -> Predicted:
        self.asked[setup] = None
        return Predicted(1.0, 0.0, 0.0)


@dataclass(frozen=True)
class Found:
    """Where a search ended: the value, its prediction, whether it clears."""

    value: float
    predicted: Predicted
    clears: bool


def grid_values(start: float, bound: float, step: float) -> tuple[float, ...]:
    """Grid points of ``step`` strictly beyond ``start`` up to ``bound``
    (included, even off the grid), in order away from ``start``.

    >>> grid_values(6.04, 6.3, 0.1)
    (6.1, 6.2, 6.3)
    >>> grid_values(2.0, 1.75, 0.1)
    (1.9, 1.8, 1.75)
    """
    up = bound > start
    first = (math.floor(start / step + 1e-9) + 1 if up
             else math.ceil(start / step - 1e-9) - 1)
    direction = 1 if up else -1
    values: list[float] = []
    k = first
    while (k * step < bound - 1e-9) if up else (k * step > bound + 1e-9):
        values.append(round(k * step, 6))
        k += direction
    return (*values, round(bound, 6))


def smallest_clearing(evaluate: Callable[[float], Predicted],
                      margin: Callable[[float, Predicted], float],
                      start: float, start_margin: float, bound: float, step: float,
                      probes: Sequence[float] = ()) -> Found | None:
    """The grid value nearest ``start`` whose margin is >= 0 (the limit cleared).

    ``margin(value, predicted)`` is negative while the limit fails; at
    ``start`` it is ``start_margin``. ``probes``: values inside the range to
    try when ``bound`` does not clear (where a peak is expected). Returns the
    best value tried, ``clears`` False, when nothing clears; None when the
    range is empty.
    """
    values = grid_values(start, bound, step) if abs(bound - start) > 1e-9 else ()
    if not values:
        return None
    hi = _first_clearing(evaluate, margin, values, probes)
    if isinstance(hi, Found):
        return hi
    lo, lo_margin = -1, start_margin
    hi_margin = margin(values[hi], evaluate(values[hi]))
    halve = False
    while hi - lo > 1:
        if halve or hi_margin == lo_margin:
            mid = (lo + hi) // 2
        else:
            mid = lo + round((hi - lo) * (-lo_margin) / (hi_margin - lo_margin))
        mid = min(max(mid, lo + 1), hi - 1)
        got = margin(values[mid], evaluate(values[mid]))
        width = hi - lo
        if got >= 0:
            hi, hi_margin = mid, got
        else:
            lo, lo_margin = mid, got
        halve = (hi - lo) > width // 2
    return Found(values[hi], evaluate(values[hi]), True)


def _first_clearing(evaluate: Callable[[float], Predicted],
                    margin: Callable[[float, Predicted], float],
                    values: tuple[float, ...], probes: Sequence[float]) -> int | Found:
    """Index of a clearing grid value (the bound, else the first clearing
    probe), or the best value tried when none clears."""
    candidates = [len(values) - 1] + [_nearest_index(values, p) for p in probes]
    tried: list[tuple[float, int]] = []
    for index in candidates:
        got = margin(values[index], evaluate(values[index]))
        if got >= 0:
            return index
        tried.append((got, index))
    best = max(tried)[1]
    return Found(values[best], evaluate(values[best]), False)


def _nearest_index(values: tuple[float, ...], wanted: float) -> int:
    return min(range(len(values)), key=lambda i: (abs(values[i] - wanted), i))
