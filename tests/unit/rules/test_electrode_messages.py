"""What the electrode rules tell a designer about strips and bare far-side pads.

A fingertip is modelled as a 10 mm disk (physics.md §3: 8-10 mm disk model,
contact patch 9-11 mm); on a strip narrower than that it covers the strip's
width times one fingertip, however long the strip (common practice, no
source). A far-side electrode whose mask is opened may be touched from that
side, which only the configuration can say (common practice, no source).
"""

from __future__ import annotations

from dataclasses import replace

from rule_records import context, get_rule, sensor
from shapely.geometry import LineString

from auditor.sensors.model import Sensor


def strip(width_mm: float, length_mm: float) -> Sensor:
    """An oval pad (a stadium) lying along x, as KiCad draws an oval pad."""
    shape = LineString([(12.0 - (length_mm - width_mm) / 2, 12.0),
                        (12.0 + (length_mm - width_mm) / 2, 12.0)]).buffer(width_mm / 2)
    return replace(sensor(), geometry=shape, area_mm2=float(shape.area))


def messages(rule_id: str, electrode: Sensor) -> list[str]:
    return [f.message for f in get_rule(rule_id).run(context(electrode))]


def test_small_strip_says_what_a_fingertip_covers() -> None:
    # 1 x 18 mm oval: 17.8 mm², equivalent diameter 4.8 mm; a 10 mm fingertip
    # covers 1 x 10 = 10 mm² of it
    (message,) = messages("electrode-too-small", strip(1.0, 18.0))
    assert message.startswith("equivalent diameter 4.8 mm is below 7.1 mm")
    assert "(a 1.0 x 18.0 mm strip: a 10 mm fingertip covers at most 10 mm² of it)" in message


def test_small_round_pad_has_no_strip_note() -> None:
    (message,) = messages("electrode-too-small", sensor(diameter_mm=6.0))
    assert "strip" not in message


def test_bare_far_side_pad_points_at_touch_side() -> None:
    (bare,) = messages("electrode-far-side", replace(sensor(layer="B.Cu"), exposed=True))
    (covered,) = messages("electrode-far-side", sensor(layer="B.Cu"))
    assert "solder mask opened on B.Cu" in bare and "touch_side" in bare
    assert "solder mask" not in covered
