"""Thresholds two rules set on one quantity from either side must stay
ordered (auditor.config.limits.ORDERED_THRESHOLDS): out of order, every
electrode fails one rule or the other whatever its layout. The error names
the file and line that broke the order, as every configuration error does
(the exit-code contract: bad input is one line, exit 2)."""

from __future__ import annotations

from pathlib import Path

import pytest

from auditor.config import discover_config, load_config, with_overrides
from auditor.config.limits import ORDERED_THRESHOLDS, order_problems
from auditor.config.profiles import load_profile
from auditor.errors import ConfigError


def write(path: Path, text: str) -> Path:
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("lower, upper, rules", ORDERED_THRESHOLDS)
def test_every_builtin_profile_keeps_the_order(lower: str, upper: str, rules: str) -> None:
    for name in ("default", "strict", "proximity", "mutual"):
        values = load_profile(name).thresholds
        assert values[lower] <= values[upper], (name, rules)


def test_equal_limits_pass_and_reversed_ones_do_not() -> None:
    assert order_problems({"ground_gap_min_mm": 2.0, "ground_gap_max_mm": 2.0}) == ()
    (problem,) = order_problems({"ground_gap_min_mm": 2.5, "ground_gap_max_mm": 2.0})
    assert (problem.lower, problem.upper) == ("ground_gap_min_mm", "ground_gap_max_mm")
    assert order_problems({"ground_gap_min_mm": 2.5}) == ()  # the other one missing


def test_profile_file_out_of_order_names_its_line(tmp_path: Path) -> None:
    own = write(tmp_path / "own.toml", 'extends = "default"\n[thresholds]\n'
                                       "trace_max_vias = 1\npad_max_diameter_mm = 4.0\n")
    with pytest.raises(ConfigError) as exc:
        load_profile("own.toml", tmp_path)
    assert str(exc.value).startswith(f"{own}:4: threshold pad_min_diameter_mm = 6 is more "
                                     "than pad_max_diameter_mm = 4")


def test_configuration_over_its_profile_names_its_line(tmp_path: Path) -> None:
    cfg = write(tmp_path / "pyproject.toml", '[tool.padaudit]\nprofile = "strict"\n\n'
                                             "[tool.padaudit.thresholds]\n"
                                             "trace_max_vias = 1\nground_gap_min_mm = 2.5\n")
    config = load_config(cfg)
    with pytest.raises(ConfigError) as exc:
        with_overrides(config)
    assert str(exc.value).startswith(f"{cfg}:6: threshold ground_gap_min_mm = 2.5 is more "
                                     "than ground_gap_max_mm = 2")


def test_flag_profile_against_configuration(tmp_path: Path) -> None:
    write(tmp_path / "low.toml", '[thresholds]\nmax_plausible_ratio = 0.05\n')
    cfg = write(tmp_path / "padaudit.toml", "[thresholds]\nmin_delta_ratio = 0.1\n")
    config = discover_config(tmp_path / "b.kicad_pcb")
    assert with_overrides(config).thresholds["min_delta_ratio"] == 0.1  # default: fine
    with pytest.raises(ConfigError) as exc:
        with_overrides(config, profile=str(tmp_path / "low.toml"))
    assert str(exc.value).startswith(f"{cfg}:2: threshold min_delta_ratio = 0.1 is more than "
                                     "max_plausible_ratio = 0.05")
