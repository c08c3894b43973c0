"""Lumped capacitance on the sense net: the controller pin and the parts.

The field solve gives the electrode's copper (pad, trace, vias). What the
controller measures also holds its own pin and every part on the sense net.
This step adds them, by circuit theory (capacitors in parallel add,
capacitors in series combine as C1 C2 / (C1 + C2)):

* **Pin**: the profile's ``pin_pf`` (default :data:`DEFAULT_PIN_PF`).
* **Capacitor to the device ground** (``to-ground``): in parallel, added.
  It does not change ΔC in pF but lowers ΔC/Cp.
* **Capacitor to another net** (``to-net``): that net is taken as AC
  ground (a supply or a driven pin is a low impedance at the sense
  frequency), so it is added like one to ground; said in the notes.
* **Capacitor to another pin of the controller** (``between-pins``): the
  sampling capacitor of a charge-transfer method integrates the electrode's
  charge rather than loading it; not added, said in the notes.
* **Series capacitor** (the sense path's series part is a capacitor): the
  electrode side (pad, its share of the trace, parts on the electrode net)
  in series with it, then the pin side in parallel. ΔC is seen through the
  series capacitor too: C_s (C_e + ΔC) / (C_s + C_e + ΔC) - C_s C_e / (C_s + C_e).
* **Resistors** (series or to another net): no effect on static
  capacitance; noted.
* Anything else (a diode, an unread or unfitted value): not added; noted.
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from dataclasses import dataclass, replace

from auditor.model.board import Board
from auditor.model.items import Footprint
from auditor.model.part_value import capacitance_pf, resistance_ohm
from auditor.model.results import LumpedPart, PadMetrics
from auditor.model.vocabulary import SELF_KINDS
from auditor.sensors.cues import is_ground_name
from auditor.sensors.model import Sensor
from auditor.sensors.roles import is_supply_name

#: The controller pin's own capacitance when the profile sets no ``pin_pf``:
#: common practice, no source. A CMOS input pin is a few pF (the buffer's
#: die capacitance, C_comp in the IBIS specification's terms, plus the
#: package); generic datasheets commonly list 5-10 pF as a maximum.
DEFAULT_PIN_PF = 5.0
PIN_ORIGIN = "typical CMOS input pin, common practice, no source"

_NOT_FITTED = re.compile(r"^(dnp|dnf|nc|n/?c|nf|nm|not fitted|do not (fit|populate))$",
                         re.IGNORECASE)
_ADDED = ("to-ground", "to-net")


@dataclass(frozen=True)
class SenseParts:
    """The parts on one electrode's sense net, split by side of the series part."""

    electrode_side: tuple[LumpedPart, ...]
    pin_side: tuple[LumpedPart, ...]
    series: LumpedPart | None


def pin_pf_of(thresholds: Mapping[str, float | int | bool]) -> tuple[float, str]:
    """The pin capacitance to use, and where it comes from."""
    if "pin_pf" in thresholds:
        return float(thresholds["pin_pf"]), "profile pin_pf"
    return DEFAULT_PIN_PF, PIN_ORIGIN


def _prefix(ref: str) -> str:
    found = re.match(r"[A-Za-z]+", ref)
    return found.group(0).upper() if found else ""


def _not_fitted(fp: Footprint) -> bool:
    return "dnp" in (a.lower() for a in fp.attributes) or bool(_NOT_FITTED.match(fp.value.strip()))


def _controller_nets(board: Board, controller_ref: str) -> set[str]:
    return {p.net for fp in board.footprints if fp.ref == controller_ref for p in fp.pads}


def classify(fp: Footprint, other_net: str, ground: str, controller_nets: set[str]) -> LumpedPart:
    """How one part with a pad on the sense net enters Cp (see module docs).

    ``other_net``: the net of its other pad; ``ground``: the device ground.
    """
    if _not_fitted(fp):
        return LumpedPart(fp.ref, fp.value, None, "not-fitted", other_net)
    prefix = _prefix(fp.ref)
    if prefix in ("R", "RN") or (not prefix and resistance_ohm(fp.value) is not None):
        return LumpedPart(fp.ref, fp.value, None, "resistor", other_net)
    if prefix != "C":
        return LumpedPart(fp.ref, fp.value, None, "other", other_net)
    pf = capacitance_pf(fp.value)
    if pf is None:
        return LumpedPart(fp.ref, fp.value, None, "not-read", other_net)
    if other_net and (other_net == ground or (not ground and is_ground_name(other_net))):
        return LumpedPart(fp.ref, fp.value, pf, "to-ground", other_net)
    if other_net and other_net in controller_nets and not is_supply_name(other_net):
        return LumpedPart(fp.ref, fp.value, pf, "between-pins", other_net)
    if not other_net:
        return LumpedPart(fp.ref, fp.value, pf, "other", other_net)
    return LumpedPart(fp.ref, fp.value, pf, "to-net", other_net)


def sense_parts(board: Board, sensor: Sensor) -> SenseParts:
    """The parts on the electrode net and, past the series part, on the pin's net."""
    path = sensor.path
    electrode_nets = set(sensor.nets) - {""}
    series_fp = next((fp for fp in board.footprints
                      if path is not None and path.series_ref and fp.ref == path.series_ref), None)
    pin_nets = {p.net for p in series_fp.pads} - electrode_nets - {""} if series_fp else set()
    ground = sensor.surroundings.ground_net if sensor.surroundings else ""
    ctrl_ref = path.controller_ref if path is not None else ""
    ctrl_nets = _controller_nets(board, ctrl_ref) - electrode_nets - pin_nets if ctrl_ref else set()
    skip = set(sensor.footprint_uids)
    sides: dict[str, list[LumpedPart]] = {"electrode": [], "pin": []}
    for fp in sorted(board.footprints, key=lambda f: f.ref):
        if fp.uid in skip or fp.ref == ctrl_ref or fp is series_fp:
            continue
        on = [p for p in fp.pads if p.net in electrode_nets | pin_nets]
        if not on:
            continue
        others = sorted({p.net for p in fp.pads} - electrode_nets - pin_nets)
        other = others[0] if len(others) == 1 else ""
        part = classify(fp, other, ground, ctrl_nets)
        sides["electrode" if on[0].net in electrode_nets else "pin"].append(part)
    return SenseParts(tuple(sides["electrode"]), tuple(sides["pin"]),
                      _series_part(series_fp) if series_fp else None)


def _series_part(fp: Footprint) -> LumpedPart:
    if _prefix(fp.ref) == "C" and not _not_fitted(fp):
        pf = capacitance_pf(fp.value)
        return LumpedPart(fp.ref, fp.value, pf, "series" if pf else "not-read")
    return LumpedPart(fp.ref, fp.value, None, "series-resistor" if _prefix(fp.ref) == "R"
                      else "other")


def series_combined_pf(first: float, second: float) -> float:
    """Two capacitors in series: C1 C2 / (C1 + C2) (0 when either is 0).

    >>> series_combined_pf(10.0, 10.0)
    5.0
    """
    return first * second / (first + second) if first > 0 and second > 0 else 0.0


def _added_pf(parts: tuple[LumpedPart, ...]) -> float:
    return sum(p.pf or 0.0 for p in parts if p.connection in _ADDED)


def seen_by_pin(cp_pad_pf: float, cp_trace_pf: float, delta_c_pf: float, pin_pf: float,
                parts: SenseParts, pin_share: float = 0.0) -> tuple[float, float]:
    """``(Cp total, ΔC)`` at the controller pin.

    ``pin_share`` is the share of the trace between a series capacitor and
    the pin (it then sits on the pin's side of that capacitor).
    """
    pin_side = pin_share * cp_trace_pf + pin_pf + _added_pf(parts.pin_side)
    electrode = cp_pad_pf + (1.0 - pin_share) * cp_trace_pf + _added_pf(parts.electrode_side)
    series = parts.series
    if series is None or series.connection != "series" or not series.pf:
        return electrode + pin_side, delta_c_pf
    base = series_combined_pf(series.pf, electrode)
    return base + pin_side, series_combined_pf(series.pf, electrode + delta_c_pf) - base


def _pin_share(sensor: Sensor, parts: SenseParts) -> float:
    path = sensor.path
    if (parts.series is None or parts.series.connection != "series" or path is None
            or path.series_to_pin_mm is None or path.length_mm <= 0):
        return 0.0
    return min(max(path.series_to_pin_mm / path.length_mm, 0.0), 1.0)


def with_lumped(metrics: PadMetrics, sensor: Sensor, board: Board,
                thresholds: Mapping[str, float | int | bool]) -> PadMetrics:
    """``metrics`` with the pin and the sense net's parts in Cp total, ΔC and
    ΔC/Cp (also in the quick estimate shown beside a precise result)."""
    pin_pf, origin = pin_pf_of(thresholds)
    parts = sense_parts(board, sensor)
    share = _pin_share(sensor, parts)
    total, delta = seen_by_pin(metrics.cp_pad_pf, metrics.cp_trace_pf, metrics.delta_c_pf,
                               pin_pf, parts, share)
    listed = (*parts.electrode_side, *((parts.series,) if parts.series else ()), *parts.pin_side)
    parts_pf = total - metrics.cp_pad_pf - metrics.cp_trace_pf - pin_pf
    # The parts' share is what is left of the total; with no part that adds
    # capacitance it is zero, not the subtraction's rounding (-8.9e-16 was
    # in the JSON).
    if abs(parts_pf) <= 1e-12 * max(total, 1.0):
        parts_pf = 0.0
    quick: dict[str, float] = {}
    if (metrics.quick_cp_pad_pf is not None and metrics.quick_cp_total_pf is not None
            and metrics.quick_delta_c_pf is not None):
        quick_total, quick_delta = seen_by_pin(
            metrics.quick_cp_pad_pf, metrics.quick_cp_total_pf - metrics.quick_cp_pad_pf,
            metrics.quick_delta_c_pf, pin_pf, parts, share)
        quick = {"total": quick_total, "delta": quick_delta}
    head = (f"Cp total = pad {metrics.cp_pad_pf:.3g} + trace {metrics.cp_trace_pf:.3g} + pin "
            f"{pin_pf:g} ({origin}) + parts {parts_pf:.3g} pF")
    lumped = replace(metrics, cp_total_pf=total, delta_c_pf=delta,
                     delta_ratio=delta / total if total > 0 else 0.0, cp_pin_pf=pin_pf,
                     cp_parts_pf=parts_pf, parts=listed,
                     notes=(*metrics.notes, head, *(part_note(p) for p in listed)))
    return replace(lumped, quick_cp_total_pf=quick.get("total", metrics.quick_cp_total_pf),
                   quick_delta_c_pf=quick.get("delta", metrics.quick_delta_c_pf))


_NOTE = {
    "to-ground": "{ref} {value} to {net}: in parallel, added to Cp (ΔC in pF unchanged, "
                 "ΔC/Cp lower)",
    "to-net": "{ref} {value} to {net}: {net} taken as AC ground (a supply or driven pin), "
              "added to Cp",
    "between-pins": "{ref} {value} to {net}, another controller pin: taken as a "
                    "charge-transfer sampling capacitor, not added to Cp",
    "series": "{ref} {value} in series with the electrode: Cp and ΔC seen through it "
              "(C1 C2 / (C1 + C2))",
    "series-resistor": "{ref} {value} in series: no effect on static capacitance (it sets "
                       "the RC time constant with Cp)",
    "resistor": "{ref} {value} to {net}: a resistor, no effect on static capacitance",
    "not-read": "{ref}: value {value!r} not read as a capacitance (IEC 60062 codes such as "
                "22p, 4n7, 0.1uF are): not counted (in series it is taken as a short)",
    "not-fitted": "{ref} ({value}) marked not fitted: not added",
    "other": "{ref} ({value}) on the sense net: its capacitance is not known, not added "
             "(an ESD diode adds a few pF)",
}


def part_note(part: LumpedPart) -> str:
    """One note saying how ``part`` entered Cp."""
    return _NOTE[part.connection].format(ref=part.ref, value=part.value or "no value",
                                         net=part.net or "no net")


def with_lumped_parts(metrics: Mapping[str, PadMetrics], sensors: tuple[Sensor, ...],
                      board: Board, thresholds: Mapping[str, float | int | bool],
                      ) -> dict[str, PadMetrics]:
    """Every self-capacitance electrode's metrics with its pin and parts
    (:func:`with_lumped`), in sensor order. A mutual pair's Cm is left as it
    is: the receive pin is held at a fixed potential, so its own capacitance
    and the parts to ground do not enter Cm."""
    return {s.name: with_lumped(metrics[s.name], s, board, thresholds)
            if s.kind in SELF_KINDS else metrics[s.name]
            for s in sensors if s.name in metrics}
