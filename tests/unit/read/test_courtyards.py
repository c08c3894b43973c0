"""Which footprints have a courtyard (auditor/read/courtyards.py), in the
footprint forms of KiCad 5 (``module``, bare ``fp_text``), 6-7 (``footprint``,
``fp_text``) and 8+ (``property "Reference"``) (kicad-format.md §2)."""

from __future__ import annotations

from pathlib import Path

import pytest

from auditor.errors import BoardFileError
from auditor.read.courtyards import courtyard_refs, courtyard_refs_in

ROOT = Path(__file__).resolve().parents[3]


def test_each_footprint_form() -> None:
    text = """(kicad_pcb (version 20240108)
      (module "L:A" (fp_text reference E1 (at 0 0)) (fp_circle (center 0 0) (end 5 0) (layer B.CrtYd)))
      (footprint "L:B" (fp_text reference "E2") (fp_rect (start 0 0) (end 1 1) (layer "F.CrtYd")))
      (footprint "L:C" (property "Reference" "E3") (fp_poly (pts (xy 0 0)) (layer "F.CrtYd")))
      (footprint "L:D" (property "Reference" "R1") (fp_line (start 0 0) (end 1 1) (layer "F.SilkS")))
      (footprint "L:E" (property "Reference" "R2") (pad "1" smd rect (layer "F.CrtYd")))
      (gr_line (start 0 0) (end 1 1) (layer "F.CrtYd")))"""
    # A pad or a board graphic on a courtyard layer is not a footprint's courtyard.
    assert courtyard_refs_in(text) == {"E1", "E2", "E3"}


def test_fixture_boards() -> None:
    dru = ROOT / "fixtures" / "dru"
    assert courtyard_refs(dru / "planted.kicad_pcb") == {"E1", "R1", "U1"}
    assert courtyard_refs(dru / "planted-no-courtyard.kicad_pcb") == {"R1", "U1"}
    assert courtyard_refs(ROOT / "auditor" / "demo" / "front_panel.kicad_pcb") == set()


def test_bad_text_is_a_located_error(tmp_path: Path) -> None:
    with pytest.raises(BoardFileError, match="x.kicad_pcb:1:27: unterminated string"):
        courtyard_refs_in('(kicad_pcb (footprint "A" "unterminated)', "x.kicad_pcb")
    with pytest.raises(BoardFileError, match="cannot read"):
        courtyard_refs(tmp_path / "missing.kicad_pcb")
