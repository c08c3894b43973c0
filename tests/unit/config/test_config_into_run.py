"""How configuration and profile reach the measuring stage and the rules."""

from __future__ import annotations

from pathlib import Path

from auditor.audit import AuditOptions, measuring_selection, resolve_setup, rule_settings


def setup_for(tmp_path: Path, text: str, **flags: str):  # type: ignore[no-untyped-def]
    (tmp_path / "padaudit.toml").write_text(text, encoding="utf-8")
    board = tmp_path / "b.kicad_pcb"
    board.write_text("", encoding="utf-8")
    return resolve_setup(board, AuditOptions(**flags))  # type: ignore[arg-type]


def test_profile_distances_reach_the_selection(tmp_path: Path) -> None:
    setup = setup_for(tmp_path, 'profile = "proximity"\n')
    sel = measuring_selection(setup)
    assert sel.parts_radius_mm == 20.0  # rules/proximity.toml nearby_radius_mm
    assert sel.neighbour_distance_mm == 2.0  # rules/default.toml parallel_distance_mm


def test_user_sensor_distances_are_kept(tmp_path: Path) -> None:
    setup = setup_for(tmp_path, '[sensors]\nparts_radius_mm = 7.0\n')
    assert measuring_selection(setup).parts_radius_mm == 7.0


def test_inline_thresholds_win_over_profile(tmp_path: Path) -> None:
    setup = setup_for(tmp_path, 'profile = "strict"\n[thresholds]\ntrace_max_vias = 5\n')
    assert setup.thresholds["trace_max_vias"] == 5
    assert setup.thresholds["trace_max_length_mm"] == 100.0  # strict's own value


def test_flags_win_over_file(tmp_path: Path) -> None:
    setup = setup_for(tmp_path, 'profile = "strict"\npower = "usb"\n', profile="mutual",
                      power="mains", overlay="3:glass")
    assert setup.profile.name == "mutual" and setup.config.power == "mains"
    settings = rule_settings(setup.config)
    # 3 mm soda-lime glass, er 7.0 (physics.md §2): t/er = 0.4286 mm
    assert abs(settings.overlay_electrical_mm - 3.0 / 7.0) < 1e-12
    assert settings.power == "mains"
