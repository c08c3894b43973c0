"""The value-field parser against the letter and digit code of IEC 60062
(*Marking codes for resistors and capacitors*): a multiplier letter may stand
for the decimal point (4u7 = 4.7 µF, 1n0 = 1.0 nF, 4K7 = 4.7 kΩ, R47 =
0.47 Ω); capacitance letters p n µ m, resistance letters R K M G. The
suffixes after the value (voltage, tolerance, dielectric, package) are the
usual way schematic values are written (common practice, no source)."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from auditor.model.part_value import capacitance_pf, resistance_ohm

CAPACITANCE = [
    ("22pF", 22.0), ("22 pF", 22.0), ("22p", 22.0), ("470p", 470.0), ("0.1u", 1e5),
    ("0.1uF", 1e5), ("0.1µF", 1e5), ("0.1μF", 1e5), ("10n", 1e4), ("10nF", 1e4),
    ("100N", 1e5), ("1n0", 1e3), ("4n7", 4.7e3), ("2p2", 2.2), ("4u7", 4.7e6),
    ("p47", 0.47), ("100nF/50V", 1e5), ("100n 50V X7R", 1e5), ("15pF_C0G", 15.0),
    ("C0G 22pF", 22.0), ("10nF 0402", 1e4), ("4,7uF", 4.7e6), ("1F", 1e12), ("1m", 1e9),
]
NO_CAPACITANCE = ["22", "104", "TBD", "DNP", "50V", "0402", "4.7u7", "", "p", "nF", "X7R"]
RESISTANCE = [
    ("560", 560.0), ("560R", 560.0), ("560Ω", 560.0), ("4K7", 4700.0), ("4k7", 4700.0),
    ("R47", 0.47), ("1R0", 1.0), ("0R", 0.0), ("10k", 1e4), ("2.2k", 2200.0),
    ("10 kΩ", 1e4), ("1M", 1e6), ("1M0", 1e6), ("4k7/0402", 4700.0), ("100 ohm", 100.0),
]
NO_RESISTANCE = ["R", "k", "DNP", "TBD", "5RΩ"]


@pytest.mark.parametrize(("text", "pf"), CAPACITANCE)
def test_capacitance_codes(text: str, pf: float) -> None:
    assert capacitance_pf(text) == pytest.approx(pf, rel=1e-12)


@pytest.mark.parametrize("text", NO_CAPACITANCE)
def test_values_without_a_capacitance_give_none(text: str) -> None:
    assert capacitance_pf(text) is None


@pytest.mark.parametrize(("text", "ohm"), RESISTANCE)
def test_resistance_codes(text: str, ohm: float) -> None:
    assert resistance_ohm(text) == pytest.approx(ohm, rel=1e-12)


@pytest.mark.parametrize("text", NO_RESISTANCE)
def test_values_without_a_resistance_give_none(text: str) -> None:
    assert resistance_ohm(text) is None


@given(st.text(max_size=30))
def test_any_text_reads_or_gives_none(text: str) -> None:
    """A value field never crashes the parser (unparseable: a note, not a crash)."""
    for parse in (capacitance_pf, resistance_ohm):
        value = parse(text)
        assert value is None or value >= 0.0
