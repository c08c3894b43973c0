"""Built-in profiles: they load, extend, carry origins, and reject bad input
with the file and line."""

from __future__ import annotations

from pathlib import Path

import pytest
from origins import has_origin

from auditor.config.profiles import (
    builtin_profile_names,
    known_thresholds,
    load_profile,
    profile_dirs,
)
from auditor.config.toml_positions import key_comments
from auditor.errors import ConfigError


def test_the_four_profiles_ship() -> None:
    assert {"default", "proximity", "mutual", "strict"} <= set(builtin_profile_names())


@pytest.mark.parametrize("name", ["default", "proximity", "mutual", "strict"])
def test_every_threshold_in_every_profile_has_an_origin(name: str) -> None:
    text = next(d / f"{name}.toml" for d in profile_dirs()
                if (d / f"{name}.toml").is_file()).read_text(encoding="utf-8")
    notes = key_comments(text, "thresholds")
    assert notes
    missing = [k for k, v in notes.items() if not has_origin(v)]
    assert missing == []


def test_default_sets_every_known_threshold() -> None:
    assert set(load_profile("default").thresholds) == set(known_thresholds())


def test_extends_merges_and_overrides() -> None:
    default, strict = load_profile("default"), load_profile("strict")
    assert strict.chain == ("strict", "default")
    assert strict.thresholds["trace_max_length_mm"] < default.thresholds["trace_max_length_mm"]
    assert strict.thresholds["ground_gap_min_mm"] == default.thresholds["ground_gap_min_mm"]
    assert strict.level_of("ground-gap-wide") == "warning"
    assert load_profile("mutual").level_of("copper-under-electrode") == "off"


def test_user_profile_extends_builtin(tmp_path: Path) -> None:
    own = tmp_path / "mine.toml"
    own.write_text('extends = "strict"\n[thresholds]\ntrace_max_vias = 0\n', encoding="utf-8")
    profile = load_profile("mine.toml", tmp_path)
    assert profile.thresholds["trace_max_vias"] == 0
    assert profile.thresholds["trace_max_length_mm"] == 100.0  # from strict
    assert profile.chain == ("mine", "strict", "default")


def test_unknown_threshold_names_line(tmp_path: Path) -> None:
    own = tmp_path / "bad.toml"
    own.write_text('extends = "default"\n\n[thresholds]\ntrace_max_viaz = 1\n', encoding="utf-8")
    with pytest.raises(ConfigError) as exc:
        load_profile(str(own))
    assert exc.value.line == 4 and "trace_max_vias" in str(exc.value)


def test_cycle_detected(tmp_path: Path) -> None:
    (tmp_path / "a.toml").write_text('extends = "b.toml"\n', encoding="utf-8")
    (tmp_path / "b.toml").write_text('extends = "a.toml"\n', encoding="utf-8")
    with pytest.raises(ConfigError, match="cycle"):
        load_profile("a.toml", tmp_path)


def test_unknown_profile_lists_choices() -> None:
    with pytest.raises(ConfigError, match="default, mutual, proximity, strict"):
        load_profile("nosuch")


def test_bad_level_rejected(tmp_path: Path) -> None:
    own = tmp_path / "lv.toml"
    own.write_text('[rules]\ntrace-too-long = "fatal"\n', encoding="utf-8")
    with pytest.raises(ConfigError) as exc:
        load_profile(str(own))
    assert exc.value.line == 2 and "error, warning, info, off" in str(exc.value)


def test_profiles_found_inside_an_installed_package(tmp_path: Path) -> None:
    # the wheel force-includes rules/ as auditor/_profiles (pyproject.toml)
    installed = tmp_path / "site-packages" / "auditor"
    (installed / "_profiles").mkdir(parents=True)
    (installed / "_profiles" / "default.toml").write_text("", encoding="utf-8")
    assert profile_dirs(installed) == (installed / "_profiles",)
    source = tmp_path / "src" / "auditor"
    source.mkdir(parents=True)
    (source.parent / "rules").mkdir()
    (source.parent / "rules" / "default.toml").write_text("", encoding="utf-8")
    assert profile_dirs(source) == (source.parent / "rules",)
