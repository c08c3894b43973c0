"""Every configuration and profile value has a type, a unit and a range,
checked when read, with ``file:line`` on error (issue 16, item 2).

The failures listed in the issue are each one case below; the ranges come
from :mod:`auditor.config.limits` (origins there: common practice, no source).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from auditor.config import load_config
from auditor.config.profiles import load_profile
from auditor.errors import ConfigError

HUGE = "1" + "0" * 399  # a 400-digit integer: once an OverflowError (exit 3)


def write(path: Path, text: str) -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def located_error(cfg: Path, line: int) -> str:
    """Load ``cfg``, expect a ConfigError at ``line``, return its message."""
    with pytest.raises(ConfigError) as exc:
        load_config(cfg)
    assert str(exc.value).startswith(f"{cfg}:{line}: "), str(exc.value)
    assert exc.value.line == line
    return exc.value.message


@pytest.mark.parametrize("text, line, fragment", [
    ('power = "usb"\nair_gap_mm = 1e300\n', 2, "at most 100 mm"),            # grew to 21 GB
    (f"air_gap_mm = {HUGE}\n", 1, "400 digits"),                  # OverflowError, exit 3
    ("air_gap_mm = inf\n", 1, "finite"),
    ("air_gap_mm = -1\n", 1, "0"),
    ("air_gap_mm = true\n", 1, "number"),
    ("[overlay]\nthickness_mm = 1e9\nmaterial = \"abs\"\n", 2, "at most 100 mm"),  # 87 s, 4.5 GB
    (f"[overlay]\nthickness_mm = {HUGE}\n", 2, "400 digits"),
    ("[overlay]\nthickness_mm = 0.0001\n", 2, "0.001"),
    (f"[overlay]\nthickness_mm = 2\nepsilon_r = {HUGE}\n", 3, "400 digits"),
    ("[overlay]\nthickness_mm = 2\nepsilon_r = 1e6\n", 3, "at most 100 "),
    ('controller = ""\n', 1, "empty"),                             # accepted silently
    ('controller = "   "\n', 1, "empty"),
    ('noisy_nets = ["MOTOR*", ""]\n', 1, "empty"),
    ("[thresholds]\ntrace_max_length_mm = true\n", 2, "number"),  # accepted silently
    ("[thresholds]\n\ntrace_max_length_mm = -150\n", 3, "at least 0"),  # accepted silently
    ("[thresholds]\ntrace_max_vias = 2.5\n", 2, "whole number"),  # accepted silently
    (f"[thresholds]\ntrace_max_vias = {HUGE}\n", 2, "400 digits"),
    (f"[thresholds]\ntrace_max_length_mm = {HUGE}\n", 2, "400 digits"),
    ("[thresholds]\nmin_delta_ratio = 1.5\n", 2, "at most"),
    ("[thresholds]\nelectrode_must_be_covered = 1\n", 2, "true or false"),
    ("[sensors]\nmin_area_mm2 = inf\n", 2, "finite"),
    (f"[sensors]\nparts_radius_mm = {HUGE}\n", 2, "400 digits"),
    (f"[sensors]\ncontroller_min_pads = {HUGE}\n", 2, "400 digits"),
])
def test_out_of_range_values_name_the_line(tmp_path: Path, text: str, line: int,
                                           fragment: str) -> None:
    message = located_error(write(tmp_path / "padaudit.toml", text), line)
    assert fragment in message


def test_pyproject_table_errors_name_the_line(tmp_path: Path) -> None:
    cfg = write(tmp_path / "pyproject.toml",
                '[project]\nname = "x"\n\n[tool.padaudit]\nair_gap_mm = 1e300\n')
    assert "air_gap_mm" in located_error(cfg, 5)


def test_valid_values_at_the_range_ends_load(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml",
                'air_gap_mm = 0\ncontroller = "U1"\n[overlay]\nthickness_mm = 100\n'
                'epsilon_r = 1\n[thresholds]\ntrace_max_vias = 0\nmin_delta_ratio = 1\n'
                "trace_max_length_mm = 150\n")
    config = load_config(cfg)
    assert config.overlay.thickness_mm == 100.0 and config.air_gap_mm == 0.0
    assert config.thresholds["trace_max_vias"] == 0
    # A whole number stays as written (rules print it as given).
    assert isinstance(config.thresholds["trace_max_length_mm"], int)


def test_zero_overlay_is_no_cover(tmp_path: Path) -> None:
    config = load_config(write(tmp_path / "padaudit.toml", "[overlay]\nthickness_mm = 0\n"))
    assert config.overlay.describe() == "none"


@pytest.mark.parametrize("text, line, fragment", [
    ('extends = "default"\n[thresholds]\ntrace_max_length_mm = -150\n', 3, "at least 0"),
    ('extends = "default"\n[thresholds]\ntrace_max_vias = 2.5\n', 3, "whole number"),
    (f'extends = "default"\n[thresholds]\n\ntrace_max_vias = {HUGE}\n', 4, "400 digits"),
    ('extends = "default"\n[thresholds]\nnearby_radius_mm = nan\n', 3, "finite"),
    ('extends = "nonesuch"\n', 1, "unknown profile 'nonesuch'"),
    ('description = 3\n', 1, "description"),
])
def test_profile_values_name_file_and_line(tmp_path: Path, text: str, line: int,
                                           fragment: str) -> None:
    own = write(tmp_path / "own.toml", text)
    with pytest.raises(ConfigError) as exc:
        load_profile("own.toml", tmp_path)
    assert str(exc.value).startswith(f"{own}:{line}: "), str(exc.value)
    assert fragment in exc.value.message


def test_profile_without_extends_extends_the_default(tmp_path: Path) -> None:
    # Once crashed 21 rules: the thresholds they read were missing.
    write(tmp_path / "bare.toml", '[thresholds]\ntrace_max_length_mm = 120\n')
    profile = load_profile("bare.toml", tmp_path)
    default = load_profile("default")
    assert profile.chain == ("bare", "default")
    assert set(profile.thresholds) == set(default.thresholds)
    assert profile.thresholds["trace_max_length_mm"] == 120
    assert profile.thresholds["trace_max_vias"] == default.thresholds["trace_max_vias"]
    assert default.chain == ("default",)


def test_unknown_profile_in_config_names_file_and_line(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml", 'power = "usb"\n\nprofile = "nonesuch"\n')
    message = located_error(cfg, 3)
    assert "unknown profile 'nonesuch'" in message and "default" in message


def test_missing_profile_file_in_config_names_file_and_line(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml", 'profile = "profiles/ours.toml"\n')
    message = located_error(cfg, 1)
    assert "ours.toml" in message and "not found" in message
