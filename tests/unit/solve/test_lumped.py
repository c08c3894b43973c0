"""The controller pin and the parts on the sense net in Cp total and ΔC.

Independent answers: circuit theory (capacitors in parallel add; in series
1/C = 1/C1 + 1/C2, so C = C1 C2 / (C1 + C2); the small-signal change seen
through a series capacitor is dC_seen/dC = C_s^2 / (C_s + C)^2, the
derivative of that formula). Parts and metrics are invented.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from auditor.config import load_config
from auditor.config.profiles import load_profile
from auditor.errors import ConfigError
from auditor.model.items import Footprint
from auditor.model.results import LumpedPart
from auditor.solve.lumped import (
    DEFAULT_PIN_PF,
    SenseParts,
    classify,
    part_note,
    pin_pf_of,
    seen_by_pin,
    series_combined_pf,
)

NONE = SenseParts((), (), None)


def fp(ref: str, value: str, attributes: tuple[str, ...] = ()) -> Footprint:
    return Footprint(uid=ref, ref=ref, value=value, lib_id="x:y", x_mm=0.0, y_mm=0.0,
                     angle_deg=0.0, side="front", attributes=attributes)


def cap(pf: float, connection: str = "to-ground", net: str = "GND") -> LumpedPart:
    return LumpedPart("C1", f"{pf}p", pf, connection, net)


def test_series_combination_is_the_reciprocal_sum() -> None:
    for first, second in ((10.0, 10.0), (22.0, 4.7), (1000.0, 3.3)):
        assert series_combined_pf(first, second) == pytest.approx(
            1.0 / (1.0 / first + 1.0 / second), rel=1e-12)
    assert series_combined_pf(0.0, 5.0) == 0.0


def test_pin_and_capacitor_to_ground_add_and_leave_delta_alone() -> None:
    total, delta = seen_by_pin(3.0, 1.0, 0.5, 5.0, SenseParts((cap(22.0),), (), None))
    assert total == pytest.approx(3.0 + 1.0 + 5.0 + 22.0)
    assert delta == 0.5


def test_capacitors_on_either_side_add_without_a_series_capacitor() -> None:
    parts = SenseParts((cap(22.0),), (cap(10.0, "to-net", "VCC"),), None)
    total, _ = seen_by_pin(3.0, 1.0, 0.5, 5.0, parts, pin_share=0.3)
    assert total == pytest.approx(41.0)


@pytest.mark.parametrize("connection", ["between-pins", "not-read", "other", "not-fitted"])
def test_parts_not_counted_leave_cp_alone(connection: str) -> None:
    parts = SenseParts((cap(22.0, connection, "X"),), (), None)
    assert seen_by_pin(3.0, 1.0, 0.5, 5.0, parts) == pytest.approx((9.0, 0.5))


def test_series_capacitor_divides_the_electrode_side() -> None:
    series = LumpedPart("C9", "10p", 10.0, "series")
    parts = SenseParts((cap(2.0),), (cap(1.0),), series)
    electrode = 3.0 + 0.75 * 2.0 + 2.0  # pad + trace before the capacitor + part
    pin_side = 0.25 * 2.0 + 5.0 + 1.0
    total, delta = seen_by_pin(3.0, 2.0, 0.01, 5.0, parts, pin_share=0.25)
    assert total == pytest.approx(10.0 * electrode / (10.0 + electrode) + pin_side, rel=1e-12)
    # small change: the derivative of the series formula
    assert delta == pytest.approx(0.01 * 10.0 ** 2 / (10.0 + electrode) ** 2, rel=2e-3)


@pytest.mark.parametrize(("ref", "value", "net", "connection", "pf"), [
    ("C5", "22pF", "GND", "to-ground", 22.0),
    ("C6", "470p", "VCC", "to-net", 470.0),  # supply pin of the controller: AC ground
    ("C7", "10n", "SNS_B", "between-pins", 1e4),
    ("C8", "TBD", "GND", "not-read", None),
    ("C9", "22pF", "GND", "not-fitted", None),
    ("R3", "1M", "GND", "resistor", None),
    ("D2", "ESD", "GND", "other", None),
])
def test_each_connection_is_classified(ref: str, value: str, net: str, connection: str,
                                       pf: float | None) -> None:
    attributes = ("smd", "dnp") if ref == "C9" else ("smd",)
    part = classify(fp(ref, value, attributes), net, "GND", {"VCC", "SNS_B"})
    assert (part.connection, part.pf) == (connection, pf)
    assert part.ref in part_note(part)


def test_ground_by_name_when_the_device_ground_is_not_known() -> None:
    assert classify(fp("C1", "22p"), "AGND", "", set()).connection == "to-ground"
    assert classify(fp("C1", "22p"), "SENSE_REF", "", set()).connection == "to-net"


def test_pin_capacitance_default_and_profile(tmp_path: Path) -> None:
    assert pin_pf_of({}) == (DEFAULT_PIN_PF, pin_pf_of({})[1])
    assert "no source" in pin_pf_of({})[1]
    assert pin_pf_of({"pin_pf": 7.5})[0] == 7.5
    assert load_profile("default").thresholds["pin_pf"] == DEFAULT_PIN_PF


@pytest.mark.parametrize("value", ["-1.0", "80", "true"])
def test_pin_capacitance_out_of_range_is_a_located_error(tmp_path: Path, value: str) -> None:
    path = tmp_path / "padaudit.toml"
    path.write_text(f'profile = "default"\n[thresholds]\npin_pf = {value}\n', encoding="utf-8")
    with pytest.raises(ConfigError) as caught:
        load_config(path)
    assert "pin_pf" in str(caught.value) and ":3" in str(caught.value)
    profile = tmp_path / "mine.toml"
    profile.write_text(f'description = "x"\n[thresholds]\npin_pf = {value}\n', encoding="utf-8")
    with pytest.raises(ConfigError):
        load_profile(str(profile))


def test_in_range_pin_capacitance_is_read(tmp_path: Path) -> None:
    path = tmp_path / "padaudit.toml"
    path.write_text("[thresholds]\npin_pf = 0\n", encoding="utf-8")
    assert load_config(path).thresholds["pin_pf"] == 0


def test_schema_lists_every_connection() -> None:
    from auditor.model.vocabulary import PART_CONNECTIONS
    from auditor.report.as_json import load_schema

    schema = load_schema()
    metrics = schema["properties"]["sensors"]["items"]["properties"]["metrics"]["oneOf"][1]
    enum = metrics["properties"]["parts"]["items"]["properties"]["connection"]["enum"]
    assert tuple(enum) == PART_CONNECTIONS
