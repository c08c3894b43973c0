"""Numbered electrode names sort by number (common practice, no source:
people read TOUCH2 before TOUCH10)."""

from auditor.sensors.model import name_order


def test_numbers_sort_by_value() -> None:
    names = ["TOUCH2#10", "TOUCH2#2", "TOUCH2#1", "BTN", "SLIDER11", "SLIDER9"]
    assert sorted(names, key=name_order) == [
        "BTN", "SLIDER9", "SLIDER11", "TOUCH2#1", "TOUCH2#2", "TOUCH2#10"]
