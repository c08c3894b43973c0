"""An invented sample report (and board) shared by the report tests.

Everything here is made up for the tests: a 60 x 40 mm front panel with two
buttons, a three-segment slider, a proximity ring and one pad the solver
could not handle. No data from real products. The numbers are plausible
orders of magnitude only; no test treats them as physics.
"""

from __future__ import annotations

import dataclasses

from shapely.geometry import LineString, Point, Polygon, box
from shapely.ops import unary_union

from auditor import __version__
from auditor.decide.records import DecidedFinding, Report, RuleInfo, RunInfo, SensorResult
from auditor.model.board import Board
from auditor.model.items import Outline, Stackup, StackupLayer, Track, Zone, ZoneFill
from auditor.model.items import Point as BoardPoint
from auditor.model.results import CouplingTable, PadMetrics, PreciseExtras, SegmentScan
from auditor.rules.finding import Finding, Severity
from auditor.sensors.model import SensePath, Sensor, Surroundings, TraceRun

BOARD_PATH = "boards/sample_panel.kicad_pcb"
MAINS_CAUTION = (
    "Mains preset: touch electrodes on mains-referenced circuits need isolation rated "
    "for it (sample text)."
)


def _slider_segment(index: int) -> Polygon:
    x0 = 118.0 + index * 9.0
    return Polygon([(x0, 126), (x0 + 7, 126), (x0 + 9, 130), (x0 + 7, 134),
                    (x0, 134), (x0 + 2, 130)])


def _sensor(name: str, kind: str, geometry: Polygon, net: str, ref: str, *,
            gap_mm: float = 0.6, trace_mm: float = 20.0, group: str = "",
            index: int = 0) -> Sensor:
    c = geometry.centroid
    path = SensePath(length_mm=trace_mm, runs=(TraceRun("F.Cu", 0.2, trace_mm),), vias=1,
                     layers=("F.Cu",), controller_ref="U1", controller_pin="7",
                     series_ref="R" + ref[1:], series_to_pin_mm=3.0)
    around = Surroundings(ground_net="GND", min_gap_mm=gap_mm, typical_gap_mm=gap_mm + 0.2,
                          ground_fill_ratio=0.6, ground_area_mm2=1450.0)
    return Sensor(name=name, kind=kind, nets=(net,), refs=(ref,), layer="F.Cu",  # type: ignore[arg-type]
                  area_mm2=round(geometry.area, 3), x_mm=round(c.x, 3), y_mm=round(c.y, 3),
                  reason="net name matches 'TOUCH*'", geometry=geometry, group=group,
                  index=index, path=path, surroundings=around)


def sample_sensors() -> tuple[Sensor, ...]:
    """The invented electrodes, in board order."""
    return (
        _sensor("SW_POWER", "button", Point(112, 114).buffer(6, quad_segs=16), "TOUCH_PWR", "E1"),
        _sensor("SW_MODE", "button", Point(130, 114).buffer(5, quad_segs=16), "TOUCH_MODE",
                "E2", gap_mm=0.2),
        *(_sensor(f"SLD_{i + 1}", "slider", _slider_segment(i), f"TOUCH_SLD{i + 1}",
                  f"E{3 + i}", group="SLD", index=i, trace_mm=30.0 + 12 * i)
          for i in range(3)),
        _sensor("PROX", "proximity", box(102, 102, 158, 138).difference(box(103, 103, 157, 137)),
                "PROX_LOOP", "E6", trace_mm=45.0),
        _sensor("SW_AUX", "button", box(146, 110, 154, 118), "TOUCH_AUX", "E7"),
    )


_METRICS = {  # name: (cp_pad, cp_trace, delta_c, strength, rank); ratio derived
    "SW_POWER": (8.2, 1.9, 0.62, "ok", 1),
    "SW_MODE": (7.9, 3.4, 0.41, "ok", 2),
    "SLD_1": (5.1, 2.2, 0.21, "ok", 3),
    "SLD_2": (5.0, 3.1, 0.17, "weak", 4),
    "SLD_3": (5.2, 4.4, 0.115, "weak", 5),
    "PROX": (21.0, 5.5, 0.2, "fail", 6),
}


def sample_results() -> tuple[SensorResult, ...]:
    """Sensors with invented metrics; SW_AUX is unsolved."""
    out = []
    for sensor in sample_sensors():
        if sensor.name not in _METRICS:
            out.append(SensorResult(sensor, None, 7, "unsolved"))
            continue
        pad, trace, delta, strength, rank = _METRICS[sensor.name]
        total = pad + trace
        metrics = PadMetrics(pad, trace, total, delta, delta / total,
                             method_reason="disk model (sample text)")
        out.append(SensorResult(sensor, metrics, rank, strength))
    return tuple(out)


RULES = (
    RuleInfo("ground-gap-tight", "Ground pour too close to an electrode",
             "A narrow gap adds fixed capacitance to ground and takes sensitivity away.",
             "Widen the clearance between the electrode and the pour.", Severity.ERROR),
    RuleInfo("ratio-low", "Finger change too small against the baseline",
             "The controller resolves a relative change; a small one is lost in noise.",
             "Make the electrode larger or remove copper under it.", Severity.ERROR),
    RuleInfo("noisy-part-near", "Switching part close to an electrode",
             "Edges couple into the sense line.", "Move the part away.", Severity.WARNING),
    RuleInfo("copper-under-electrode", "Solid copper under an electrode",
             "A plane right under the pad raises the baseline.",
             "Hatch or remove the copper under the pad.", Severity.WARNING),
    RuleInfo("sense-trace-long", "Sense trace long",
             "Each millimetre adds capacitance and picks up noise.",
             "Move the controller closer or shorten the route.", Severity.WARNING),
    RuleInfo("series-resistor-missing", "No series resistor on the sense line",
             "A resistor near the pin limits injected current and emissions.",
             "Add a resistor next to the controller pin.", Severity.INFO),
    RuleInfo("electrode-spacing", "Electrodes too close together",
             "Neighbouring pads respond to the same finger.",
             "Increase the spacing between pads.", Severity.WARNING),
)


def sample_findings() -> tuple[DecidedFinding, ...]:
    """Invented findings covering every presentation case (override, waiver, baseline)."""
    gap = Finding("ground-gap-tight", Severity.ERROR,
                  "ground gap 0.20 mm is below the 0.50 mm minimum", 124.8, 114.0, "F.Cu",
                  ("GND", "TOUCH_MODE"), ("E2",), (("gap_mm", 0.2), ("min_mm", 0.5)), "SW_MODE")
    ratio = Finding("ratio-low", Severity.ERROR,
                    "finger change 0.75 % of the baseline is below the 1.5 % minimum",
                    130.0, 102.5, "F.Cu", ("PROX_LOOP",), ("E6",),
                    (("ratio", 0.0075), ("min_ratio", 0.015)), "PROX")
    noisy = Finding("noisy-part-near", Severity.WARNING,
                    "inductor L2 is 4.1 mm from the electrode (minimum 10 mm)",
                    121.0, 136.5, "F.Cu", ("TOUCH_SLD1",), ("E3", "L2"),
                    (("distance_mm", 4.1), ("min_mm", 10.0)), "SLD_1")
    under = Finding("copper-under-electrode", Severity.WARNING,
                    "92 % of the electrode is over solid copper on B.Cu (maximum 30 %)",
                    112.0, 114.0, "B.Cu", ("GND", "TOUCH_PWR"), ("E1",),
                    (("shadowed_fraction", 0.92), ("max_fraction", 0.3)), "SW_POWER")
    long_trace = Finding("sense-trace-long", Severity.WARNING,
                         "sense trace 54.0 mm is longer than 50 mm", 140.0, 131.0, "F.Cu",
                         ("TOUCH_SLD3",), ("E5",), (("length_mm", 54.0), ("max_mm", 50.0)),
                         "SLD_3")
    resistor = Finding("series-resistor-missing", Severity.INFO,
                       "no series resistor between E7 and U1 pin 9", 150.0, 114.0, "F.Cu",
                       ("TOUCH_AUX",), ("E7", "U1"), (), "SW_AUX")
    return (
        DecidedFinding(gap, Severity.ERROR),
        DecidedFinding(noisy, Severity.ERROR),  # raised from warning by a severity override
        DecidedFinding(ratio, Severity.ERROR),
        DecidedFinding(under, Severity.WARNING, waived="plane needed under the LED; "
                       "checked on the first prototype"),
        DecidedFinding(long_trace, Severity.WARNING),
        DecidedFinding(resistor, Severity.INFO, in_baseline=True),
    )


def sample_board() -> Board:
    """A tiny invented board: outline, a front ground pour around the pads, a
    hatched back pour and the sense traces."""
    outline = box(100, 100, 160, 140)
    pads = unary_union([s.geometry for s in sample_sensors()])
    front_pour = outline.buffer(-0.5).difference(pads.buffer(0.8))
    back_pour = outline.buffer(-0.5).difference(Point(130, 114).buffer(6))
    traces = [((112, 120), (112, 124), (128, 124)), ((130, 119), (130, 122), (140, 122))]
    tracks = []
    for pts in traces:
        for (x0, y0), (x1, y1) in zip(pts, pts[1:], strict=False):
            line = LineString([(x0, y0), (x1, y1)])
            tracks.append(Track(BoardPoint(x0, y0), BoardPoint(x1, y1), 0.25, "F.Cu",
                                "TOUCH_PWR", line.length, line.buffer(0.125)))
    stack = Stackup((StackupLayer("F.Cu", "copper", 0.035),
                     StackupLayer("core", "dielectric", 1.51, "FR4", 4.5),
                     StackupLayer("B.Cu", "copper", 0.035)), 1.6, True)
    zones = (
        Zone("GND", ("F.Cu",), outline, (ZoneFill("F.Cu", front_pour),), "solid"),
        Zone("GND", ("B.Cu",), outline, (ZoneFill("B.Cu", back_pour),), "hatched"),
    )
    return Board(path=BOARD_PATH, version=20240108, generator="pcbnew",
                 copper_layers=("F.Cu", "B.Cu"), stackup=stack,
                 nets=("", "GND", "PROX_LOOP", "TOUCH_AUX", "TOUCH_MODE", "TOUCH_PWR"),
                 footprints=(), tracks=tuple(tracks), vias=(), zones=zones, graphics=(),
                 outline=Outline(outline))


def sample_info(**changes: object) -> RunInfo:
    info = RunInfo(board_path=BOARD_PATH, board_version=20240108, tool_version=__version__,
                   profile="default", overlay="2.0 mm acrylic (er 2.6)", touch_side="front",
                   power="mains", fail_on=Severity.ERROR)
    return dataclasses.replace(info, **changes)  # type: ignore[arg-type]


def sample_report(*, with_board: bool = False, **changes: object) -> Report:
    """The full invented report; keyword arguments replace Report fields."""
    report = Report(
        info=sample_info(), sensors=sample_results(), findings=sample_findings(), rules=RULES,
        read_warnings=("line 812: zone 'GND' on In1.Cu has no filled polygons; its copper "
                       "is unknown and was left out",),
        stale_waivers=("floating-copper-near on E9: no finding matched this waiver",),
        cautions=(MAINS_CAUTION,),
        skipped_rules=(("crosstalk-high", "judges 3-D results only: runs with --precise"),
                       ("trace-crossings", "switched off by the profile or the configuration")),
        board=sample_board() if with_board else None,
    )
    return dataclasses.replace(report, **changes)  # type: ignore[arg-type]


def clean_report() -> Report:
    """Same board with no gate-relevant findings: only the baselined info."""
    findings = tuple(d for d in sample_findings() if not d.counts_for_gate)
    return sample_report(findings=findings, stale_waivers=(), read_warnings=())


# --- precise mode (invented numbers, shapes only plausible) -----------------

_COUPLED = ("PROX", "SLD_1", "SLD_2", "SLD_3", "SW_MODE", "SW_POWER")
#: Upper triangle of the invented crosstalk in pF (row/column order of _COUPLED).
_CROSSTALK_PF = {
    ("PROX", "SLD_1"): 0.21, ("PROX", "SLD_2"): 0.18, ("PROX", "SLD_3"): 0.24,
    ("PROX", "SW_MODE"): 0.09, ("PROX", "SW_POWER"): 0.12,
    ("SLD_1", "SLD_2"): 0.46, ("SLD_1", "SLD_3"): 0.031, ("SLD_1", "SW_MODE"): 0.018,
    ("SLD_1", "SW_POWER"): 0.052, ("SLD_2", "SLD_3"): 0.43, ("SLD_2", "SW_MODE"): 0.027,
    ("SLD_2", "SW_POWER"): 0.011, ("SLD_3", "SW_MODE"): 0.004, ("SLD_3", "SW_POWER"): 0.002,
    ("SW_MODE", "SW_POWER"): 0.075,
}


def sample_coupling() -> CouplingTable:
    """Six coupled electrodes (15 pairs, so the text table's cap shows)."""
    cp = {name: _METRICS[name][0] for name in _COUPLED}
    rows, shares = [], []
    for a in _COUPLED:
        row = [0.0 if a == b else _CROSSTALK_PF.get((a, b), _CROSSTALK_PF.get((b, a), 0.0))
               for b in _COUPLED]
        rows.append(tuple(row))
        shares.append(tuple(value / cp[a] for value in row))
    return CouplingTable(_COUPLED, tuple(rows), tuple(shares), 0.5)


#: Invented slider response: (position mm, ΔC of SLD_1, SLD_2, SLD_3, estimate mm).
#: A dip between 18 and 21 mm (dead zone) and one step back at 12 mm.
_SCAN = (
    (0.0, 0.080, 0.010, 0.001, 4.5), (3.0, 0.150, 0.030, 0.002, 5.1),
    (6.0, 0.190, 0.070, 0.004, 7.0), (9.0, 0.120, 0.120, 0.010, 10.2),
    (12.0, 0.060, 0.160, 0.030, 9.8), (15.0, 0.020, 0.140, 0.070, 15.6),
    (18.0, 0.004, 0.012, 0.009, float("nan")), (21.0, 0.002, 0.010, 0.011, float("nan")),
    (24.0, 0.001, 0.040, 0.110, 22.3), (27.0, 0.001, 0.012, 0.085, 22.5),
)


def sample_scan() -> SegmentScan:
    """The three-segment slider scanned in 3 mm steps (10 positions)."""
    return SegmentScan(
        group="SLD", kind="slider", segment_names=("SLD_1", "SLD_2", "SLD_3"),
        segment_centres_mm=(4.5, 13.5, 22.5), positions_mm=tuple(p[0] for p in _SCAN),
        delta_pf=tuple(p[1:4] for p in _SCAN), estimated_mm=tuple(p[4] for p in _SCAN),
        linearity_mm=2.85, dead_zones_mm=((18.0, 21.0),), reversals_mm=(12.0,), step_mm=3.0,
        cell_mm=0.75, x_mm=131.0, y_mm=130.0)


def sample_extras() -> PreciseExtras:
    return PreciseExtras(sample_coupling(), (sample_scan(),),
                         ("coupling: 0.5 mm cells (sample text)",
                          "scans: grounded 10 mm finger (sample text)"))


#: Invented quick estimates beside the precise results: (Cp pad, ΔC).
_QUICK = {"SW_POWER": (8.0, 0.6), "SW_MODE": (8.1, 0.43), "SLD_1": (4.6, 0.2),
          "SLD_2": (4.7, 0.16), "SLD_3": (4.9, 0.12)}


def precise_results() -> tuple[SensorResult, ...]:
    """:func:`sample_results` with the buttons and slider marked precise."""
    out = []
    for r in sample_results():
        if r.metrics is None or r.sensor.name not in _QUICK:
            out.append(r)
            continue
        pad, delta = _QUICK[r.sensor.name]
        metrics = dataclasses.replace(
            r.metrics, method="precise", notes=("precise: real copper (sample text)",),
            method_reason="3-D: forced (sample text)",
            quick_cp_pad_pf=pad, quick_cp_total_pf=pad + r.metrics.cp_trace_pf,
            quick_delta_c_pf=delta)
        out.append(dataclasses.replace(r, metrics=metrics))
    return tuple(out)


def precise_report(*, with_board: bool = False) -> Report:
    """The sample report as a ``--precise`` run would give it."""
    return sample_report(with_board=with_board, sensors=precise_results(),
                         precise=sample_extras())
