"""What width costs a sense trace: its capacitance per length over a plane.

Hammerstad & Jensen's closed form for a zero-thickness microstrip (E.
Hammerstad & O. Jensen, "Accurate models for microstrip computer-aided
design", IEEE MTT-S Int. Microwave Symp. Digest 1980, 407-409; physics.md
§1.8) gives C' to about 0.2 % for 0.01 <= w/h <= 100. Over a solid plane
the width matters most: a hatched plane or none at all (a coplanar pour
only) gives less, so the capacitance a wide stretch adds, estimated here,
is an upper bound for the board.

Examples
--------
>>> round(microstrip_pf_per_mm(0.2, 1.6, 4.4), 4)  # physics.md §1.8, 2-D MoM: 0.0392
0.0391
"""

from __future__ import annotations

import math

from auditor.sensors.model import Sensor, TraceRun

#: Impedance of free space mu0 c (ohm) and the speed of light (m/s), CODATA.
ETA0_OHM = 376.730313668
LIGHT_M_PER_S = 299_792_458.0
#: FR-4, the usual board material (physics.md §2: 4.2-4.8 at 1 MHz; middle).
BOARD_ER = 4.4
#: The plane's distance when the stack-up shows no other copper layer: the
#: standard 1.6 mm board (common practice, no source).
DEFAULT_HEIGHT_MM = 1.6


def microstrip_pf_per_mm(width_mm: float, height_mm: float, er: float = BOARD_ER) -> float:
    """Capacitance per length (pF/mm) of a strip ``width_mm`` wide at
    ``height_mm`` over a ground plane, in a board of permittivity ``er``."""
    u = width_mm / height_mm
    f = 6.0 + (2.0 * math.pi - 6.0) * math.exp(-((30.666 / u) ** 0.7528))
    z01 = ETA0_OHM / (2.0 * math.pi) * math.log(f / u + math.sqrt(1.0 + (2.0 / u) ** 2))
    a = (1.0 + math.log((u ** 4 + (u / 52.0) ** 2) / (u ** 4 + 0.432)) / 49.0
         + math.log(1.0 + (u / 18.1) ** 3) / 18.7)
    b = 0.564 * ((er - 0.9) / (er + 3.0)) ** 0.053
    eps_eff = (er + 1.0) / 2.0 + (er - 1.0) / 2.0 * (1.0 + 10.0 / u) ** (-a * b)
    return float(eps_eff / (LIGHT_M_PER_S * z01) * 1e12 / 1000.0)


def plane_height_mm(sensor: Sensor, layer: str) -> float:
    """Distance from ``layer`` to the nearest other copper layer, from the
    depths the sensor stage measured under the electrode; the standard
    board's thickness when there is none (a one-layer board)."""
    surround = sensor.surroundings
    depths = {sensor.layer: 0.0}
    if surround is not None:
        depths.update({s.layer: s.depth_mm for s in surround.shadows})
    if layer not in depths:
        return DEFAULT_HEIGHT_MM
    gaps = [abs(depth - depths[layer]) for name, depth in depths.items() if name != layer]
    return min((g for g in gaps if g > 0), default=DEFAULT_HEIGHT_MM)


def added_pf(sensor: Sensor, runs: tuple[TraceRun, ...], width_limit_mm: float) -> float:
    """Capacitance the stretches of ``runs`` wider than ``width_limit_mm`` add
    over the same stretches at that width (pF, over a solid plane)."""
    total = 0.0
    for run in runs:
        if run.width_mm > width_limit_mm and width_limit_mm > 0:
            height = plane_height_mm(sensor, run.layer)
            total += run.length_mm * (microstrip_pf_per_mm(run.width_mm, height)
                                      - microstrip_pf_per_mm(width_limit_mm, height))
    return total
