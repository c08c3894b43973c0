"""Every format version of the same design reads to the same model.

Expected numbers are worked out by hand from the constants in
fixtures/make_format_boards.py (comments give the arithmetic).
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import pytest
from conftest import FORMATS, ROOT, VERSION_KEYS, gen

from auditor.model.board import Board
from auditor.model.items import Point
from auditor.read import read_board_text
from auditor.read.stackup import COPPER_MM, FR4_EPSILON_R, MASK_EPSILON_R

LEGACY = ("v4", "v5")


def test_committed_fixtures_match_the_generator(tmp_path: Path) -> None:
    subprocess.run([sys.executable, str(ROOT / "fixtures" / "make_format_boards.py"),
                    str(tmp_path)], check=True)
    for key in VERSION_KEYS:
        name = f"{key}.kicad_pcb"
        assert (tmp_path / name).read_bytes() == (FORMATS / name).read_bytes(), name


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_header_layers_and_counts(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    assert board.version == gen.VERSIONS[key]
    # KiCad 9 ordinals differ (F.Cu 0, In1 4, In2 6, B.Cu 2): order comes from type + file order
    assert board.copper_layers == gen.COPPER
    assert len(board.footprints) == 9
    assert [w.code for w in board.warnings if w.code == "unknown-token"] == []


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_nets_by_name_every_version(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    expected = {"GND", "TOUCH1", "TOUCH2"}
    assert expected <= set(board.nets)
    if key != "v10":  # KiCad 10 has no net table, unused nets vanish
        assert "/sense/SLIDER{slash}A" in board.nets
    assert {t.net for t in board.tracks} == {"TOUCH1"}
    assert {v.net for v in board.vias} == {"TOUCH1", "TOUCH2", "GND"}


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_track_lengths_are_exact_sums(boards: dict[str, Board], key: str) -> None:
    graph = boards[key].track_graph("TOUCH1")
    # 3-4-5 triangle (5) + 6 straight + 8 on B.Cu (+ quarter arc r = 5: 5π/2, 6+)
    expected = 19.0 + (0.0 if key in LEGACY else 2.5 * math.pi)
    assert graph.total_length_mm == pytest.approx(expected, abs=1e-6)
    far = Point(31, 70) if key in LEGACY else Point(36, 75)
    assert graph.path_length(Point(20, 60), far) == pytest.approx(expected, abs=1e-6)
    # half-way point: F.Cu part only, up to the via (5 + 6)
    assert graph.path_length(Point(20, 60), Point(23, 70), "F.Cu", "F.Cu") == \
        pytest.approx(11.0, abs=1e-9)
    assert graph.via_count == 1


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_via_spans(boards: dict[str, Board], key: str) -> None:
    spans = {(v.x_mm, v.kind): v.layers for v in boards[key].vias}
    assert spans == {
        (23.0, "through"): gen.COPPER,
        (40.0, "blind"): ("F.Cu", "In1.Cu"),
        (42.0, "micro"): ("In2.Cu", "B.Cu"),
        (44.0, "buried"): ("In1.Cu", "In2.Cu"),  # ≤ 9 writes "blind" for buried
    }


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_zones(boards: dict[str, Board], key: str) -> None:
    zones = boards[key].zones
    solid = zones[0]
    assert (solid.net, solid.layers, solid.fill) == ("GND", ("B.Cu",), "solid")  # (hatch edge) ≠ hatched
    area = solid.fill_on("B.Cu").area  # type: ignore[union-attr]
    if key in LEGACY:
        # stroked fill grown by r = min_thickness/2 = 0.125: the 10×10 square minus the
        # 4×4 hole again, outer corners rounded: 84 − (4 − π)·r²
        r = gen.LEGACY_ZONE_MIN_THICKNESS / 2
        assert area == pytest.approx(84 - (4 - math.pi) * r * r, rel=1e-4)
    else:
        assert area == pytest.approx(84.0, abs=1e-9)  # fractured ring with a slit, cleaned
    unfilled = zones[1]
    assert unfilled.fill == "none" and unfilled.fills == ()
    keepout = zones[2]
    assert keepout.is_rule_area and keepout.net == ""
    assert keepout.keepouts == ("copperpour", "tracks", "vias")
    if key in LEGACY:
        return
    hatched = zones[3]
    assert hatched.fill == "hatched" and hatched.hatch is not None
    assert (hatched.hatch.thickness_mm, hatched.hatch.gap_mm) == (0.5, 1.0)
    assert hatched.fill_on("In1.Cu").area == pytest.approx(10 + 10 - 1)  # type: ignore[union-attr]
    multi = zones[4]
    assert multi.layers == ("F.Cu", "B.Cu")
    assert multi.fill_on("F.Cu").area == pytest.approx(40 + 4)  # type: ignore[union-attr]
    assert multi.fill_on("B.Cu").area == pytest.approx(100)  # type: ignore[union-attr]
    assert [f.islands for f in multi.fills] == [1, 0]


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_warnings_say_what_is_unknown(boards: dict[str, Board], key: str) -> None:
    codes = [w.code for w in boards[key].warnings]
    assert "zone-unfilled" in codes
    assert ("no-stackup" in codes) == (key not in ("v6", "v8", "v9"))
    unfilled = next(w for w in boards[key].warnings if w.code == "zone-unfilled")
    text = (FORMATS / f"{key}.kicad_pcb").read_text().splitlines()
    assert text[unfilled.line - 1].lstrip().startswith("(zone")  # type: ignore[operator]


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_outline_chained_with_tolerance(boards: dict[str, Board], key: str) -> None:
    outline = boards[key].outline
    assert outline.bbox_mm == pytest.approx((0.0, 0.0, 100.0, 80.0), abs=1e-3)
    # 100×80 minus a corner rounded to r = 5 (25 − 25π/4) minus a Ø4 cut-out (4π)
    # minus U7's slot (4 × 1 plus two half discs of r 0.5: 4 + π/4);
    # a 0.5 µm gap at (0, 80) is closed by the endpoint tolerance
    exact = 8000 - 25 + 25 * math.pi / 4 - 4 * math.pi - (4 + math.pi / 4)
    assert outline.polygon is not None
    assert outline.polygon.area == pytest.approx(exact, rel=1e-4)
    assert len(outline.cutouts) == 2 and outline.open_ends == 0
    # the slot is footprint-local: U7 at (80, 35) turned 90° maps local (x, y) to
    # (80 + y, 35 - x), so local x -2.5..2.5, y -0.5..0.5 -> x 79.5..80.5, y 32.5..37.5
    slot = min(outline.cutouts, key=lambda g: g.area)
    assert slot.bounds == pytest.approx((79.5, 32.5, 80.5, 37.5), abs=1e-6)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_copper_graphics(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    poly = next(g for g in board.graphics if g.kind == "poly")
    assert poly.geometry.area == pytest.approx(25.0)
    # board-level shapes carry nets from 20230730 on (kicad-format.md §2)
    assert poly.net == ("TOUCH2" if board.version >= 20230730 else "")
    line = next(g for g in board.graphics if g.kind == "line")
    assert line.geometry.area == pytest.approx(10 * 0.5 + math.pi * 0.25 ** 2, rel=2e-3)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_stackup(boards: dict[str, Board], key: str) -> None:
    st = boards[key].stackup
    assert st.copper_names() == gen.COPPER
    assert st.board_thickness_mm == pytest.approx(1.6)
    if key in ("v6", "v8", "v9"):
        assert st.from_file
        sub = [(s.thickness_mm, s.epsilon_r) for s in st.layers if s.name == "dielectric 1"]
        assert sub == [(0.2, 4.4), (0.1, 3.9)]  # addsublayer keeps both parts
        assert st.layers[0].epsilon_r == MASK_EPSILON_R  # mask without εr -> 3.3 [S11]
        assert st.depth_of("In1.Cu") == pytest.approx(0.035 + 0.3)
    else:
        assert not st.from_file and "[S11]" in st.origin
        dielectrics = [s for s in st.layers if s.kind == "dielectric"]
        assert len(dielectrics) == 3
        assert all(d.epsilon_r == FR4_EPSILON_R for d in dielectrics)
        assert sum(d.thickness_mm for d in dielectrics) + 4 * COPPER_MM == pytest.approx(1.6)


def test_kicad5_inline_net_classes(boards: dict[str, Board]) -> None:
    (default,) = boards["v5"].netclasses
    assert default.name == "Default" and "TOUCH1" in default.nets


def test_newer_version_is_read_with_a_warning() -> None:
    text = (FORMATS / "v10.kicad_pcb").read_text().replace("(version 20260206)",
                                                           "(version 20991231)")
    board = read_board_text(text, "new.kicad_pcb")
    assert "newer-version" in [w.code for w in board.warnings]
    assert len(board.pads) == len(read_board_text((FORMATS / "v10.kicad_pcb").read_text()).pads)


def test_unknown_tokens_are_reported_once_per_kind() -> None:
    text = (FORMATS / "v8.kicad_pcb").read_text()
    text = text.replace("(paper", "(frobnicate 1) (frobnicate 2) (paper", 1)
    text = text.replace("(attr smd)", "(attr smd) (wobble)", 1)
    warnings = [w for w in read_board_text(text).warnings if w.code == "unknown-token"]
    assert [w.message for w in warnings] == [
        "skipped unknown 'wobble' in footprint",
        "skipped unknown 'frobnicate' in kicad_pcb (2 times)"]
    assert all(w.line is not None for w in warnings)


def test_header_after_items_is_still_read() -> None:
    """Section order is not guaranteed (kicad-format.md §3): nets after items."""
    text = (FORMATS / "v8.kicad_pcb").read_text()
    lines = text.splitlines(keepends=True)
    nets = [ln for ln in lines if ln.lstrip().startswith("(net ") and ln.startswith("\t(")]
    body = [ln for ln in lines if ln not in nets]
    moved = "".join(body[:-1] + nets + body[-1:])
    board = read_board_text(moved)
    assert {t.net for t in board.tracks} == {"TOUCH1"}
    assert len(board.pads) == len(read_board_text(text).pads)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_footprint_fields_every_version(boards: dict[str, Board], key: str) -> None:
    # fp_text reference/value up to 7, property "Reference"/"Value" from 8 (§7)
    fp = boards[key].footprint("U5")
    assert (fp.ref, fp.value, fp.lib_id) == ("U5", "All_Pad_Shapes", "Touch:All_Pad_Shapes")
    assert fp.property("reference") == "U5" and fp.property("Value") == "All_Pad_Shapes"
    assert (fp.x_mm, fp.y_mm, fp.angle_deg, fp.side) == (50.0, 50.0, 33.0, "front")
    assert fp.attributes == ("smd",)


def test_kicad6_fill_without_thickness_flag_is_grown() -> None:
    """A KiCad 6 board converted from 5 and not refilled has no
    (filled_areas_thickness no): its fills are stroked (kicad-format.md §0.6).
    Growing the fractured 10×10 square with a 4×4 hole by r = 0.125 gives
    100 + 4·10·r + π·r² outside, and the hole shrinks to a sharp (4 − 2r)² square."""
    text = (FORMATS / "v6.kicad_pcb").read_text().replace("(filled_areas_thickness no)", "")
    board = read_board_text(text)
    r = 0.125
    area = board.zones[0].fill_on("B.Cu").area  # type: ignore[union-attr]
    assert area == pytest.approx(100 + 40 * r + math.pi * r * r - (4 - 2 * r) ** 2, rel=1e-4)
    assert "zone-stroked-fill" in [w.code for w in board.warnings]


def test_unknown_net_code_is_a_warning() -> None:
    text = (FORMATS / "v8.kicad_pcb").read_text().replace(
        '(layer "F.Cu") (net 2)', '(layer "F.Cu") (net 99)', 1)
    board = read_board_text(text)
    assert [t.net for t in board.tracks][0] == ""
    assert "unknown-net-code" in [w.code for w in board.warnings]
