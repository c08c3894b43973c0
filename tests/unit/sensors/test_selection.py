"""Configuration → SensorSelection (our own key names; no outside source)."""

from __future__ import annotations

import pytest

from auditor.errors import ConfigError
from auditor.sensors.selection import (
    DEFAULT_NOISY_NETS,
    SensorSelection,
    matches,
    selection_from_mapping,
)


def test_defaults_find_automatically() -> None:
    sel = SensorSelection()
    assert not sel.configured and sel.automatic


def test_configured_nets_turn_automatic_finding_off_unless_asked() -> None:
    sel = selection_from_mapping({"nets": "TOUCH*"})
    assert sel.nets == ("TOUCH*",) and sel.configured and not sel.automatic
    assert selection_from_mapping({"nets": ["A"], "auto": True}).automatic


def test_groups_properties_and_extras() -> None:
    sel = selection_from_mapping({
        "sliders": {"volume": ["SLD0", "SLD1"]},
        "properties": {"Sensor": "yes"},
        "extra_noisy_nets": ["MOTOR*"],
        "neighbour_distance_mm": 3,
    })
    assert sel.sliders == (("volume", ("SLD0", "SLD1")),)
    assert sel.properties == (("Sensor", "yes"),)
    assert sel.noisy_nets == DEFAULT_NOISY_NETS + ("MOTOR*",)
    assert sel.neighbour_distance_mm == 3.0


@pytest.mark.parametrize(("mapping", "fragment"), [
    ({"netz": ["A"]}, "unknown sensors key 'netz'"),
    ({"nets": [1]}, "list of strings"),
    ({"min_area_mm2": -1}, "non-negative"),
    ({"auto": "yes"}, "true or false"),
    ({"sliders": ["A"]}, "table"),
])
def test_bad_values_name_the_file(mapping: dict[str, object], fragment: str) -> None:
    with pytest.raises(ConfigError) as err:
        selection_from_mapping(mapping, "padaudit.toml")
    assert str(err.value).startswith("padaudit.toml: ") and fragment in str(err.value)


def test_globs_match_the_leaf_of_hierarchical_names_case_insensitively() -> None:
    assert matches("/front/touch_3", ["TOUCH*"])
    assert not matches("/front/LED3", ["TOUCH*"])
