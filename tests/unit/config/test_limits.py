"""The one table of value limits: its own consistency, the shipped profiles
inside it, the configuration and ``estimate`` reading the same rows, and
docs/configuration.md generated from it."""

from __future__ import annotations

import argparse
from pathlib import Path

import pytest

from auditor.cli.main import main
from auditor.config.limits import GENERIC_THRESHOLD, LIMITS, threshold_problem
from auditor.config.limits_doc import limits_markdown, with_limits_table
from auditor.config.overrides import MAX_OVERLAY_MM, MIN_OVERLAY_MM, parse_overlay_spec
from auditor.config.profiles import builtin_profile_names, known_thresholds, load_profile
from auditor.errors import UsageError

DOC = Path(__file__).resolve().parents[3] / "docs" / "configuration.md"
HUGE = 10 ** 399  # 400 digits


def test_every_row_has_a_unit_kind_range_and_reason() -> None:
    for key, limit in LIMITS.items():
        assert limit.why, key
        assert limit.kind == "flag" or limit.minimum < limit.maximum, key


def test_threshold_rows_name_real_thresholds() -> None:
    known = set(known_thresholds())
    rows = {k.removeprefix("thresholds.") for k in LIMITS if k.startswith("thresholds.")}
    assert rows <= known, rows - known


@pytest.mark.parametrize("name", ["default", "proximity", "mutual", "strict"])
def test_shipped_profiles_lie_inside_the_table(name: str) -> None:
    assert name in builtin_profile_names()
    for key, value in load_profile(name).thresholds.items():
        assert threshold_problem(key, value) is None, (name, key, value)


def test_unknown_thresholds_get_the_generic_check() -> None:
    assert threshold_problem("some_future_threshold_mm", 3.0) is None
    assert threshold_problem("some_future_threshold_mm", True) is None
    assert "at least 0" in (threshold_problem("some_future_threshold_mm", -1) or "")
    assert "finite" in (threshold_problem("some_future_threshold_mm", float("inf")) or "")
    assert "400 digits" in (threshold_problem("some_future_threshold_mm", HUGE) or "")
    assert GENERIC_THRESHOLD.minimum == 0.0


@pytest.mark.parametrize("value", [HUGE, -HUGE, float("nan"), float("inf"), True, "3", None])
def test_no_value_crashes_a_check(value: object) -> None:
    for limit in LIMITS.values():
        problem = limit.problem(value)
        assert problem is None or problem.startswith("must be")


def test_command_line_cover_uses_the_configuration_row() -> None:
    row = LIMITS["overlay.thickness_mm"]
    assert (row.minimum, row.maximum) == (MIN_OVERLAY_MM, MAX_OVERLAY_MM)
    assert parse_overlay_spec(f"{row.maximum:g}:acrylic").thickness_mm == row.maximum
    with pytest.raises(UsageError, match="to 100 mm"):
        parse_overlay_spec("1e9:acrylic")
    with pytest.raises(UsageError, match="at most 100 "):
        parse_overlay_spec("2:1e6")


@pytest.mark.parametrize("argv, row", [
    (["--air-gap", "1e300"], "air_gap_mm"),
    (["--air-gap", "1" + "0" * 399], "air_gap_mm"),
    (["--pad-diameter", "1001"], "estimate.pad_diameter_mm"),
    (["--body-pf", "0"], "estimate.body_to_earth_pf"),
])
def test_estimate_refuses_with_the_table_range(argv: list[str], row: str,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["estimate", *argv]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith(f"padaudit: {argv[0]}: must be")
    assert LIMITS[row].option.split()[0] in (argv[0], "--overlay")


def test_every_estimate_option_with_a_row_exists() -> None:
    from auditor.cli.cmd_estimate import register

    subparsers = argparse.ArgumentParser().add_subparsers()
    register(subparsers)
    help_text = subparsers.choices["estimate"].format_help()
    for key, limit in LIMITS.items():
        if key.startswith("estimate."):
            assert f"{limit.option} " in help_text, key


def test_configuration_doc_is_current() -> None:
    text = DOC.read_text(encoding="utf-8")
    assert limits_markdown() in text, (
        "regenerate: python -m auditor.cli.limits_doc docs/configuration.md")
    assert with_limits_table(text) == text


def test_doc_lists_every_row() -> None:
    table = limits_markdown()
    for key in LIMITS:
        prefix, _, rest = key.partition(".")
        shown = rest if prefix in ("sensors", "thresholds", "estimate") else key
        assert f"| `{shown}` |" in table, key


def test_every_numeric_sensors_key_has_a_row() -> None:
    from dataclasses import fields

    from auditor.sensors.selection import SensorSelection

    numeric = [f.name for f in fields(SensorSelection) if f.type in ("float", "int")]
    assert numeric
    assert [n for n in numeric if f"sensors.{n}" not in LIMITS] == []
