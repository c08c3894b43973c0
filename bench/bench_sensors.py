"""Sensor-stage speed on the demo board, as ratios measured in one run.

Goal (issue 3): finding and measuring every electrode of the demo board takes
well under a second, and less CPU time than reading the board does. Printed:
CPU seconds of read, find and measure, and the ratio (find + measure) / read.

Usage: ``python bench/bench_sensors.py [BOARD]`` (default: the demo board,
``auditor/demo/front_panel.kicad_pcb``, generated into a temporary folder when
it is not there yet).
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "auditor" / "demo" / "front_panel.kicad_pcb"


def _board_path(argv: list[str], scratch: Path) -> Path:
    if argv:
        return Path(argv[0])
    if DEMO.is_file():
        return DEMO
    sys.path.insert(0, str(ROOT))
    from fixtures.make_demo_board import build_demo

    target = scratch / "front_panel.kicad_pcb"
    build_demo().board.write(target)
    return target


def main(argv: list[str]) -> int:
    from auditor.read import read_board
    from auditor.sensors import find_sensors, measure

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("board", nargs="?", help="board file (default: the demo board)")
    board_arg = parser.parse_args(argv).board
    with tempfile.TemporaryDirectory() as scratch:
        path = _board_path([board_arg] if board_arg else [], Path(scratch))
        start = time.process_time()
        board = read_board(path)
        read_s = time.process_time() - start
        start = time.process_time()
        sensors, rejects = find_sensors(board)
        find_s = time.process_time() - start
        start = time.process_time()
        measure(board, sensors)
        measure_s = time.process_time() - start
    print(f"{path.name}: {len(sensors)} sensors, {len(rejects)} rejects")
    print(f"cpu s: read {read_s:.3f}  find {find_s:.3f}  measure {measure_s:.3f}")
    print(f"ratio (find + measure) / read: {(find_s + measure_s) / read_s:.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
