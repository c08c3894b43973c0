"""Small boards for the sensor-stage tests, written with ``fixtures.kicad_writer``
and read back with padaudit's reader.

Every board is a 2-layer 1.6 mm board. Geometry is chosen so the expected
measurements can be worked out by hand; the numbers are in the tests beside
each check.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from auditor.model.board import Board
from auditor.read.reader import read_board
from fixtures.kicad_writer import Board as Writer
from fixtures.kicad_writer import Hatch, Primitive

XY = tuple[float, float]

#: Controller U1: 16 pads, pins 1-8 on x = CTRL_X - 3, pins 9-16 on x = CTRL_X + 3.
CTRL_X, CTRL_Y, CTRL_PITCH = 70.0, 10.0, 1.27


def new_board(seed: str, size: XY = (90.0, 50.0)) -> Writer:
    """An empty 2-layer board with a rectangular outline from (0, 0)."""
    board = Writer(copper_layers=2, thickness_mm=1.6, seed=seed)
    board.edge_rect((0.0, 0.0), size)
    return board


def pin_xy(pin: int) -> XY:
    """Board position of U1's pad ``pin`` (1-based)."""
    if pin <= 8:
        return CTRL_X - 3.0, CTRL_Y + (pin - 1) * CTRL_PITCH
    return CTRL_X + 3.0, CTRL_Y + (16 - pin) * CTRL_PITCH


def controller(board: Writer, nets: Sequence[str], ground: str = "GND") -> None:
    """U1 with ``nets`` on pins 1.., pin 16 on ``ground``, the rest unconnected."""
    fp = board.footprint("Test:QFN16_Controller", "U1", "TOUCHCTL", at=(CTRL_X, CTRL_Y))
    for pin in range(1, 17):
        net = nets[pin - 1] if pin <= len(nets) else (ground if pin == 16 else "")
        x, y = pin_xy(pin)
        fp.pad(str(pin), "smd", "rect", (x - CTRL_X, y - CTRL_Y), (1.5, 0.6), net=net)


def resistor(board: Writer, ref: str, at: XY, net_left: str, net_right: str) -> tuple[XY, XY]:
    """A horizontal 0402-like resistor; returns its pad centres (left, right)."""
    fp = board.footprint("Resistor_SMD:R_0402", ref, "560", at=at)
    fp.pad("1", "smd", "rect", (-0.5, 0.0), (0.6, 0.6), net=net_left)
    fp.pad("2", "smd", "rect", (0.5, 0.0), (0.6, 0.6), net=net_right)
    return (at[0] - 0.5, at[1]), (at[0] + 0.5, at[1])


def round_button(board: Writer, ref: str, at: XY, diameter_mm: float, net: str,
                 lib_id: str = "Test:Pad_Round", value: str = "electrode") -> None:
    """A one-pad footprint with a round SMD pad (mask opened, no paste)."""
    fp = board.footprint(lib_id, ref, value, at=at)
    fp.pad("1", "smd", "circle", (0.0, 0.0), (diameter_mm, diameter_mm), net=net,
           layers=("F.Cu", "F.Mask"))


def square_button(board: Writer, ref: str, at: XY, side_mm: float, net: str) -> None:
    """A one-pad footprint with a square SMD pad centred on ``at``."""
    fp = board.footprint("Test:Pad_Square", ref, "electrode", at=at)
    fp.pad("1", "smd", "rect", (0.0, 0.0), (side_mm, side_mm), net=net, layers=("F.Cu",))


def wired_through_series(board: Writer, electrode_at: XY, net: str, r_ref: str, r_at: XY,
                         pin: int, width_mm: float = 0.2) -> None:
    """Electrode centre → resistor (same y) → U1 ``pin`` with straight tracks."""
    left, right = resistor(board, r_ref, r_at, net, f"{net}_R")
    board.segment(electrode_at, left, width_mm, "F.Cu", net)
    board.route([right, (pin_xy(pin)[0] - 2.0, right[1]), (pin_xy(pin)[0] - 2.0, pin_xy(pin)[1]),
                 pin_xy(pin)], width_mm, "F.Cu", f"{net}_R")


def written(board: Writer, tmp_path: Path, name: str) -> Board:
    """Write ``board`` under ``tmp_path`` and read it back."""
    return read_board(board.write(tmp_path / f"{name}.kicad_pcb"))


def ground_via(board: Writer, at: XY) -> None:
    """A GND via, so pours on both layers keep their copper (islands are removed)."""
    board.via(at, "GND")


def hatch_standard() -> Hatch:
    """0.25 mm lines, 1.6 mm gaps: infinite-hatch fill 1 − (1.6/1.85)² = 0.25197."""
    return Hatch(0.25, 1.6)


def custom_ring(board: Writer, ref: str, at: XY, net: str, outer_mm: float,
                inner_mm: float) -> None:
    """A custom pad: small anchor circle plus a ring primitive (a proximity loop)."""
    fp = board.footprint("Test:Ring_40mm", ref, "loop", at=at)
    radius = (outer_mm + inner_mm) / 4
    width = (outer_mm - inner_mm) / 2
    fp.pad("1", "smd", "custom", (radius, 0.0), (1.0, 1.0), net=net, layers=("F.Cu",),
           primitives=[Primitive("circle", ((-radius, 0.0), (0.0, 0.0)), width, False)])
