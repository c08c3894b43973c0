"""Configuration: discovery walking up from the board, precedence of command
line over file, and errors that name the file, line and column."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from auditor.config import (
    Config,
    Overlay,
    discover_config,
    find_config,
    load_config,
    parse_overlay_spec,
    with_overrides,
)
from auditor.errors import ConfigError, UsageError
from auditor.rules.finding import Severity


def write(path: Path, text: str) -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def test_found_walking_up_from_the_board(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml", 'profile = "strict"\n')
    board = tmp_path / "hw" / "rev2" / "panel.kicad_pcb"
    write(board, "")
    assert find_config(board) == cfg
    assert discover_config(board).profile == "strict"


def test_nearest_file_wins(tmp_path: Path) -> None:
    write(tmp_path / "padaudit.toml", 'profile = "strict"\n')
    near = write(tmp_path / "hw" / "pyproject.toml", '[tool.padaudit]\nprofile = "mutual"\n')
    board = write(tmp_path / "hw" / "b.kicad_pcb", "")
    assert find_config(board) == near
    assert discover_config(board).profile == "mutual"


def test_pyproject_without_tool_table_is_skipped(tmp_path: Path) -> None:
    top = write(tmp_path / "padaudit.toml", 'power = "usb"\n')
    write(tmp_path / "hw" / "pyproject.toml", '[project]\nname = "x"\n')
    board = write(tmp_path / "hw" / "b.kicad_pcb", "")
    assert find_config(board) == top


def test_no_file_gives_defaults(tmp_path: Path) -> None:
    board = write(tmp_path / "b.kicad_pcb", "")
    # tmp_path's parents may hold a config of their own; only the default matters here
    if find_config(board) is None:
        assert discover_config(board) == Config()
    assert load_config(None) == Config()


def test_all_keys_read(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml", """
profile = "proximity"
air_gap_mm = 0.2
touch_side = "back"
power = "mains"
controller = "U7"
noisy_nets = ["MOTOR*"]
fail_on = "warning"
overlay = { thickness_mm = 3.0, material = "polycarbonate" }

[sensors]
nets = ["PAD*"]

[severity]
trace-too-long = "error"
ground-gap-wide = "off"

[thresholds]
trace_max_vias = 1

[[waivers]]
rule = "trace-too-long"
net = "PAD3"
reason = "long on purpose: lid hinge"
""")
    config = load_config(cfg)
    assert config.profile == "proximity" and config.touch_side == "back"
    assert config.power == "mains" and config.fail_on is Severity.WARNING
    # polycarbonate er 2.9 (physics.md §2 table, compilation 2.9-3.2)
    assert config.overlay.epsilon_r == pytest.approx(2.9)
    # electrical thickness t/er + air: 3/2.9 + 0.2 = 1.2345 mm (physics.md §2)
    assert config.overlay_electrical_mm == pytest.approx(3 / 2.9 + 0.2)
    assert config.selection.nets == ("PAD*",)
    assert config.selection.controller_ref == "U7"
    assert "MOTOR*" in config.selection.noisy_nets
    assert config.severity == {"ground-gap-wide": "off", "trace-too-long": "error"}
    assert config.thresholds == {"trace_max_vias": 1}
    assert config.waivers[0].reason == "long on purpose: lid hinge"
    assert config.waivers[0].source == "padaudit.toml:21"


def test_tool_table_in_pyproject(tmp_path: Path) -> None:
    cfg = write(tmp_path / "pyproject.toml",
                '[project]\nname = "x"\n\n[tool.padaudit]\npower = "usb"\n')
    assert load_config(cfg).power == "usb"


def test_command_line_overrides_file(tmp_path: Path) -> None:
    write(tmp_path / "padaudit.toml", 'power = "usb"\nprofile = "strict"\nfail_on = "info"\n')
    board = write(tmp_path / "b.kicad_pcb", "")
    config = with_overrides(discover_config(board), power="mains", overlay="1.5:3.1",
                            fail_on="error")
    assert config.power == "mains" and config.profile == "strict"
    assert config.fail_on is Severity.ERROR
    assert (config.overlay.thickness_mm, config.overlay.epsilon_r) == (1.5, 3.1)


def test_explicit_config_beats_discovery(tmp_path: Path) -> None:
    write(tmp_path / "padaudit.toml", 'power = "usb"\n')
    other = write(tmp_path / "elsewhere" / "x.toml", 'power = "mains"\n')
    board = write(tmp_path / "b.kicad_pcb", "")
    assert discover_config(board, other).power == "mains"


@pytest.mark.parametrize("text, line, column", [
    ('profile = "x"\npower = \n', 2, 9),  # column as tomllib counts it
    ('[severity\n', 1, 10),
])
def test_malformed_toml_has_line_and_column(tmp_path: Path, text: str, line: int,
                                            column: int) -> None:
    cfg = write(tmp_path / "padaudit.toml", text)
    with pytest.raises(ConfigError) as exc:
        load_config(cfg)
    assert (exc.value.line, exc.value.column) == (line, column)
    assert str(exc.value).startswith(f"{cfg}:{line}:{column}: malformed TOML")


def test_unknown_key_lists_valid_ones(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml", 'profile = "default"\noverlay_mm = 2\n')
    with pytest.raises(ConfigError) as exc:
        load_config(cfg)
    assert exc.value.line == 2
    assert "valid keys: air_gap_mm, baseline, controller, fail_on" in str(exc.value)


@pytest.mark.parametrize("text, fragment", [
    ('power = "solar"\n', "battery, usb, mains"),
    ('touch_side = "top"\n', "front, back"),
    ('fail_on = "fatal"\n', "error, warning, info"),
    ('overlay = { thickness_mm = 2, material = "unobtainium" }\n', "acrylic"),
    ('overlay = { thickness_mm = 2, material = "abs", epsilon_r = 3 }\n', "not both"),
    ('[severity]\nno-such-rule = "off"\n', "valid rules"),
    ('[thresholds]\nfoo_mm = 1\n', "valid thresholds"),
    ('[sensors]\nnetz = ["A"]\n', "valid keys"),
    ('air_gap_mm = -1\n', "at least 0"),
])
def test_bad_values_list_the_choices(tmp_path: Path, text: str, fragment: str) -> None:
    cfg = write(tmp_path / "padaudit.toml", text)
    with pytest.raises(ConfigError, match=fragment):
        load_config(cfg)


def test_waiver_without_reason_rejected(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml",
                'power = "usb"\n\n[[waivers]]\nrule = "trace-too-long"\nref = "E1"\n')
    with pytest.raises(ConfigError) as exc:
        load_config(cfg)
    assert exc.value.line == 3 and "needs a reason" in str(exc.value)


def test_waiver_needs_a_place(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml",
                '[[waivers]]\nrule = "trace-too-long"\nreason = "ok"\n')
    with pytest.raises(ConfigError, match="ref, net or sensor"):
        load_config(cfg)


@pytest.mark.parametrize("spec, er", [("2:acrylic", 2.8), ("1.5:3.1", 3.1), ("3:glass", 7.0)])
def test_overlay_spec(spec: str, er: float) -> None:
    assert parse_overlay_spec(spec).epsilon_r == er


@pytest.mark.parametrize("spec", ["2", "x:acrylic", "2:", "-1:3", "2:0.5", "2:kryptonite",
                                  "0:acrylic", "1e-9:2", "2000:2"])
def test_bad_overlay_spec(spec: str) -> None:
    with pytest.raises(UsageError, match=f"^--overlay '{spec}': "):
        parse_overlay_spec(spec)


def test_overlay_none_is_no_cover() -> None:
    assert parse_overlay_spec(" None ") == Overlay(0.0, 1.0, "")
    assert Config(overlay=Overlay(0.0, 1.0, ""), air_gap_mm=1.0).describe_overlay() == \
        "none + 1 mm air"


def test_bad_flag_choice_rejected() -> None:
    with pytest.raises(UsageError, match="battery, usb, mains"):
        with_overrides(Config(), power="solar")


def test_documented_example_loads(tmp_path: Path) -> None:
    doc = (Path(__file__).resolve().parents[3] / "docs" / "configuration.md").read_text(
        encoding="utf-8")
    example = doc.split("```toml\n", 1)[1].split("```", 1)[0]
    config = load_config(write(tmp_path / "padaudit.toml", example))
    assert config.severity["trace-crossings"] == "off"
    assert config.waivers[0].net == "BTN7"


def test_demo_configuration_loads() -> None:
    demo = Path(__file__).resolve().parents[3] / "auditor" / "demo" / "padaudit.toml"
    if not demo.is_file():
        pytest.skip("demo configuration not written yet")
    assert load_config(demo).source == str(demo)


@pytest.mark.parametrize("rule_id", ["read-incomplete", "no-sensors"])
def test_safety_net_rules_cannot_be_turned_off(tmp_path: Path, rule_id: str) -> None:
    cfg = write(tmp_path / "padaudit.toml", f'[severity]\n{rule_id} = "off"\n')
    with pytest.raises(ConfigError, match="cannot be turned off") as exc:
        load_config(cfg)
    assert exc.value.line == 2
    write(tmp_path / "padaudit.toml", f'[severity]\n{rule_id} = "info"\n')
    assert load_config(cfg).severity == {rule_id: "info"}


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=20))
def test_overlay_spec_never_crashes(text: str) -> None:
    # robustness: any text is an overlay or a UsageError, nothing else
    try:
        overlay = parse_overlay_spec(text)
    except UsageError:
        return
    assert overlay.thickness_mm >= 0 and overlay.epsilon_r >= 1


@settings(max_examples=100, deadline=None)
@given(st.text(max_size=60))
def test_arbitrary_config_text_is_config_or_config_error(text: str) -> None:
    import tempfile

    with tempfile.TemporaryDirectory() as folder:
        cfg = write(Path(folder) / "padaudit.toml", text)
        try:
            load_config(cfg)
        except ConfigError as exc:
            assert str(exc).startswith(str(cfg))


@pytest.mark.parametrize("spec", ["nan:3", "inf:3", "2:nan", "2:inf"])
def test_overlay_spec_rejects_non_finite(spec: str) -> None:
    with pytest.raises(UsageError):
        parse_overlay_spec(spec)


def test_non_finite_number_in_config_rejected(tmp_path: Path) -> None:
    cfg = write(tmp_path / "padaudit.toml", "air_gap_mm = nan\n")
    with pytest.raises(ConfigError, match="finite"):
        load_config(cfg)


@pytest.mark.parametrize("text, line", [
    ('[sensors]\nnets = ["TOUCH*"]\n\nnetz = ["A"]\n', 4),
    ('[sensors]\nnets = ["TOUCH*"]\nmin_area_mm2 = -3\n', 3),
    ('[tool.padaudit]\nprofile = "default"\n[tool.padaudit.sensors]\nnets = ["T*"]\nbogus = 1\n', 5),
])
def test_sensor_key_errors_point_at_the_key(tmp_path: Path, text: str, line: int) -> None:
    # The line to edit is the key's, not the table header's (common practice,
    # no source).
    name = "pyproject.toml" if text.startswith("[tool.") else "padaudit.toml"
    cfg = write(tmp_path / name, text)
    with pytest.raises(ConfigError) as exc:
        load_config(cfg)
    assert str(exc.value).startswith(f"{cfg}:{line}: ")
