"""A guard on the field solve's own answers: numbers no pad can give.

Three bounds, each independent of the model that answered:

* ΔC/Cp above ``max_plausible_ratio`` (profile): a finger on an overlay
  changes a self-capacitance pad by a few % to a few tens of %.
* Cp of the pad below the free-space capacitance of the isolated disk of
  the same area, 8 ε0 a (Jackson, *Classical Electrodynamics*, 3rd ed.
  1999, sec. 3.13; Smythe 1968). Among plane plates of one area the disk
  has the least capacitance (Pólya & Szegő, *Isoperimetric Inequalities in
  Mathematical Physics*, 1951; from memory), and a board's dielectric or
  any nearby conductor only raises it, so a pad on a real board has more.
  :data:`FLOOR_ALLOWANCE` leaves room for the 3-D solve's discretisation.
  The floor assumes every other conductor is at a lower potential; a
  driven shield at the pad's own potential takes charge off the pad, so an
  electrode solved with one (its note says so) is not held to it.
* A negative ΔC: a finger (a conductor, grounded or not) never lowers a
  self-capacitance pad's capacitance to the device ground.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

from auditor.model.results import DRIVEN_SHIELD_NOTE
from auditor.model.vocabulary import SELF_KINDS
from auditor.rules.finding import Finding, Severity
from auditor.rules.registry import RuleCall, sensor_rule
from auditor.sensors.model import Sensor

#: Vacuum permittivity in pF/mm (CODATA 2018: 8.8541878128e-12 F/m).
EPS0_PF_PER_MM = 8.8541878128e-3
#: The floor is applied 2 % low: the 3-D solve at 0.5 mm cells was measured
#: 1.9 % below a closed form (docs/audit-field.md, disk on grounded FR-4).
FLOOR_ALLOWANCE = 0.02


def isolated_disk_pf(area_mm2: float) -> float:
    """8 ε0 a of the disk with area ``area_mm2``, in pF.

    >>> round(isolated_disk_pf(math.pi * 25.0), 4)  # 10 mm disk: 0.3542 pF
    0.3542
    """
    return 8.0 * EPS0_PF_PER_MM * math.sqrt(max(area_mm2, 0.0) / math.pi)


def _problems(sensor: Sensor, call: RuleCall) -> Iterator[tuple[str, tuple[str, float]]]:
    metrics = call.board.metrics.get(sensor.name)
    if metrics is None:
        return
    most = call.limits["max_plausible_ratio"]
    if metrics.delta_ratio > most + 1e-12:
        yield (f"ΔC/Cp {100 * metrics.delta_ratio:.1f} % is above {100 * most:.0f} %",
               ("delta_ratio", metrics.delta_ratio))
    floor = isolated_disk_pf(sensor.area_mm2)
    shielded = any(note.startswith(DRIVEN_SHIELD_NOTE)
                   for note in getattr(metrics, "notes", ()))
    if not shielded and metrics.cp_pad_pf < (1.0 - FLOOR_ALLOWANCE) * floor:
        yield (f"Cp of the pad {metrics.cp_pad_pf:.3f} pF is below the isolated disk of the "
               f"same area ({floor:.3f} pF)", ("cp_pad_pf", metrics.cp_pad_pf))
    if metrics.delta_c_pf < 0:
        yield (f"ΔC {metrics.delta_c_pf:.3f} pF is negative", ("delta_c_pf", metrics.delta_c_pf))


@sensor_rule(
    "model-implausible",
    title="Field result no real pad can give",
    fix="Do not trust this electrode's numbers: run with --precise (the 3-D solve of the "
        "real copper) and check the overlay, the stackup and the copper around and in front "
        "of the pad.",
    severity=Severity.WARNING,
    thresholds=("max_plausible_ratio",),
    kinds=SELF_KINDS,
)
def model_implausible(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """A model answers outside what it represents without knowing it: a
    ratio above half the baseline, a pad capacitance below the free-space
    value of an isolated disk of the same area (the least any plate of that
    area has), or a finger that lowers the capacitance. Such numbers rank
    and judge the electrode on nothing, so they are never passed silently."""
    found = list(_problems(sensor, call))
    if not found:
        return
    measured = [value for _, value in found]
    measured += [("max_ratio", call.limits["max_plausible_ratio"]),
                 ("disk_floor_pf", isolated_disk_pf(sensor.area_mm2))]
    yield call.finding("model implausible: " + "; ".join(text for text, _ in found),
                       sensor, measured)
