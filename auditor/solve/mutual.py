"""Mutual-capacitance pairs of the audit: a tx/rx pair onto the quick model.

Each receive electrode is paired with the nearest transmit electrode (same
group first); the pair becomes the axisymmetric model's inner disk and
concentric ring of the same areas at the measured gap (stated approximation
for interleaved or side-by-side electrodes).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import replace

from auditor.config import Config
from auditor.field.api import MutualSetup, solve_mutual
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.sensors.model import Sensor
from auditor.solve.setup import pad_setup_for, significant


def mutual_partner(sensor: Sensor, sensors: tuple[Sensor, ...]) -> Sensor | None:
    """The nearest electrode of the opposite mutual role (same group first)."""
    want = "mutual-tx" if sensor.kind == "mutual-rx" else "mutual-rx"
    partners = [s for s in sensors if s.kind == want]
    if not partners:
        return None
    return min(partners, key=lambda s: (s.group != sensor.group or not s.group,
                                        sensor.geometry.distance(s.geometry), s.name))


def metrics_for_mutual(rx: Sensor, tx: Sensor, board: Board, config: Config,
                       thresholds: Mapping[str, float | int | bool]) -> PadMetrics:
    """Cm and its drop under the finger for a tx/rx pair, in the PadMetrics slots.

    The pair becomes the solver's inner disk and concentric ring (the
    smaller electrode inside); ``cp_pad_pf`` carries Cm and ``delta_c_pf``
    the drop of Cm under the finger, as the notes say.
    """
    inner, outer = sorted((rx, tx), key=lambda s: (s.area_mm2, s.name))
    stack = pad_setup_for(inner, board, config, thresholds)
    gap = max(round(inner.geometry.distance(outer.geometry), 2), 0.05)
    inner_r = math.sqrt(inner.area_mm2 / math.pi)
    ring_in = inner_r + gap
    width = math.sqrt(ring_in ** 2 + outer.area_mm2 / math.pi) - ring_in
    setup = MutualSetup(significant(2 * inner_r), gap, significant(width),
                        "rx" if inner is rx else "tx", replace(stack.setup, traces=(), vias=0))
    solve = solve_mutual(setup)
    notes = (f"mutual pair {tx.name} -> {rx.name}: cp_pad_pf is Cm, delta_c_pf the drop of "
             "Cm under the finger",
             "pair modelled as a disk and a concentric ring of the same areas") + stack.notes
    return PadMetrics(solve.cm_pf, 0.0, solve.cm_pf, solve.delta_cm_pf, solve.delta_ratio,
                      "quick", notes)
