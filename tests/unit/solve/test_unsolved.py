"""Electrodes the quick disk model cannot represent are left unsolved, with a
reason, instead of being given numbers.

Source of the limit: our own precise (3-D moment-method) solve of the demo's
proximity loop gives ΔC/Cp 2.6 % where an equal-area disk gives 48.6 %; the
3-D solver itself is checked against published plate and disk results in
tests/unit/field/precise.
"""

from __future__ import annotations

import pytest
from shapely.geometry import Point

from auditor.model.results import PadMetrics
from auditor.sensors.model import Sensor
from auditor.solve.dispatch import unsolved_reasons
from auditor.solve.setup import quick_unfit_reason


def _sensor(name: str, geometry: object, kind: str = "button") -> Sensor:
    area = float(geometry.area)  # type: ignore[attr-defined]
    return Sensor(name=name, kind=kind, nets=(name,), refs=(), layer="F.Cu",  # type: ignore[arg-type]
                  area_mm2=area, x_mm=0.0, y_mm=0.0, reason="test", geometry=geometry)  # type: ignore[arg-type]


def test_plate_is_fit_for_the_disk_model() -> None:
    # A filled disk fills 100 % of its outline (hand computation).
    assert quick_unfit_reason(_sensor("BTN", Point(0, 0).buffer(5))) == ""


def test_loop_is_not() -> None:
    # Ring of radii 20 and 18.5 mm: (20² - 18.5²) / 20² = 14 % of its outline
    # (hand computation), far below one half.
    ring = Point(0, 0).buffer(20).difference(Point(0, 0).buffer(18.5))
    reason = quick_unfit_reason(_sensor("PROX", ring, "proximity"))
    assert "14%" in reason and "--precise" in reason


def test_reasons_only_for_unsolved_electrodes() -> None:
    ring = Point(0, 0).buffer(20).difference(Point(0, 0).buffer(18.5))
    plate = Point(50, 0).buffer(5)
    sensors = (_sensor("BTN", plate), _sensor("PROX", ring, "proximity"))
    solved = {"BTN": PadMetrics(1.0, 0.5, 1.5, 0.2, 0.13)}
    reasons = unsolved_reasons(sensors, solved, mode="quick")
    assert set(reasons) == {"PROX"}
    assert "loop or comb" in reasons["PROX"]
    # In precise mode the shape is solved as drawn: a missing result is not
    # blamed on the disk model.
    assert "loop" not in unsolved_reasons(sensors, solved, precise=True)["PROX"]
    assert "loop" not in unsolved_reasons(sensors, solved, mode="auto")["PROX"]


@pytest.mark.slow
def test_broken_sense_path_gives_no_numbers(tmp_path) -> None:  # type: ignore[no-untyped-def]
    # Shrinking BTN2's pad (line 1050 of the demo) detaches it from its trace.
    # Without the trace its Cp would be too low and its ratio too high, so a
    # broken route would look like an improvement: it must be unsolved instead.
    from auditor.audit import UNFOLLOWED_REASON, AuditOptions, run_audit
    from auditor.demo import demo_board_path, demo_config_path

    lines = demo_board_path().read_text("utf-8").splitlines(keepends=True)
    assert "(size 8 8)" in lines[1049]
    lines[1049] = lines[1049].replace("(size 8 8)", "(size 6.5 6.5)")
    board = tmp_path / "broken.kicad_pcb"
    board.write_text("".join(lines), "utf-8")
    report = run_audit(board, AuditOptions(config_path=str(demo_config_path())))
    btn2 = next(r for r in report.sensors if r.sensor.name == "BTN2")
    assert btn2.metrics is None and btn2.strength == "unsolved"
    unsolved = [f.finding for f in report.findings if f.finding.rule_id == "electrode-unsolved"]
    assert any(f.sensor == "BTN2" and UNFOLLOWED_REASON in f.message for f in unsolved)
