"""Permittivity table (values and origins from the physics reference, section 2)."""

from __future__ import annotations

import pytest

from auditor.errors import UsageError
from auditor.field.materials import MATERIALS, material


def test_every_entry_has_an_origin_and_a_value_inside_its_range() -> None:
    for entry in MATERIALS.values():
        assert entry.origin
        low, high = entry.er_range
        assert low <= entry.er <= high


def test_known_anchor_values() -> None:
    # Physics reference sec. 2: FR-4 4.2-4.8 at 1 MHz, soda-lime glass 6.5-7.6, air 1.0.
    assert 4.2 <= material("FR4").er <= 4.8
    assert 6.5 <= material("glass").er <= 7.6
    assert material("air").er == 1.0


def test_unknown_material_lists_valid_names() -> None:
    with pytest.raises(UsageError, match="known materials: abs, acrylic"):
        material("unobtainium")
