"""Boards made by duplicating items: time and peak memory of ``audit --no-solve``.

Goals (issue 16, item 4), each printed as a ratio measured in this run:

* 8000 overlapping copies of one track segment: under 5 s and 400 MB;
* 240 000 copies (about 20 MB): under 60 s and 2 GB;
* one million small pads: under 120 s and 3 GB, or refused at once with
  exit code 2 and a one-line "board too large" message naming the limit.

Each case runs ``python -m auditor audit BOARD --no-solve`` in a subprocess
started by a fresh helper process, which reports the audit's wall time and
its peak resident memory from ``resource.getrusage(RUSAGE_CHILDREN)`` (the
helper waits for nothing else, so the figure is the audit's own). The load
average is printed beside the figures: on a shared machine it matters.

Usage: ``python bench/bench_scale.py [--cases small,large,pads]``.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "auditor" / "demo" / "front_panel.kicad_pcb"

#: case -> (what, copies, seconds goal, megabytes goal)
CASES: dict[str, tuple[str, int, float, float]] = {
    "small": ("segment", 8000, 5.0, 400.0),
    "large": ("segment", 240_000, 60.0, 2000.0),
    "pads": ("pad", 1_000_000, 120.0, 3000.0),
}


def _first_segment(text: str) -> str:
    start = text.index("\t(segment")
    end = text.index("\n\t)", start) + 3
    return text[start:end]


def duplicated_board(what: str, copies: int) -> str:
    """The demo board with ``copies`` extra copies of its first track, or
    with one extra footprint holding ``copies`` small pads on a grid."""
    text = DEMO.read_text(encoding="utf-8")
    body, close = text[:text.rindex(")")], ")\n"
    if what == "segment":
        return body + (_first_segment(text) + "\n") * copies + close
    pads = "".join(
        f'\t\t(pad "{i}" smd rect (at {(i % 1000) * 0.2:.1f} {(i // 1000) * 0.2:.1f}) '
        f'(size 0.1 0.1) (layers "F.Cu") (uuid "p{i}"))\n' for i in range(copies))
    footprint = f'\t(footprint "bench:many" (layer "F.Cu") (at 0 200)\n{pads}\t)\n'
    return body + footprint + close


def measure_one(board: Path) -> None:
    """Run the audit once and print ``seconds megabytes exit_code last_line``."""
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "auditor", "audit", str(board), "--no-solve",
                           "--format", "json", "--output", os.devnull, "--quiet"],
                          capture_output=True, text=True, check=False)
    seconds = time.perf_counter() - start
    peak_mb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    said = (done.stderr.strip().splitlines() or [""])[-1][:200]
    print(f"{seconds:.2f} {peak_mb:.0f} {done.returncode} {said}")


def run_case(name: str, folder: Path) -> None:
    what, copies, goal_s, goal_mb = CASES[name]
    board = folder / f"{name}.kicad_pcb"
    board.write_text(duplicated_board(what, copies), encoding="utf-8")
    size_mb = board.stat().st_size / 1e6
    load = os.getloadavg()[0]
    out = subprocess.run([sys.executable, __file__, "--measure", str(board)],
                         capture_output=True, text=True, check=True).stdout.split(" ", 3)
    seconds, peak_mb, code = float(out[0]), float(out[1]), int(out[2])
    print(f"{name}: {copies} {what} copies, {size_mb:.1f} MB file, load {load:.2f}: "
          f"{seconds:.1f} s (ratio {seconds / goal_s:.2f} of {goal_s:.0f} s), "
          f"peak {peak_mb:.0f} MB (ratio {peak_mb / goal_mb:.2f} of {goal_mb:.0f} MB), "
          f"exit {code}")
    if code not in (0, 1):
        print(f"    said: {out[3].strip()}")
    board.unlink()


def main(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", default=",".join(CASES),
                        help=f"comma-separated cases (default: all of {', '.join(CASES)})")
    parser.add_argument("--measure", metavar="BOARD", help=argparse.SUPPRESS)
    args = parser.parse_args(argv[1:])
    if args.measure:
        measure_one(Path(args.measure))
        return 0
    with tempfile.TemporaryDirectory(prefix="padaudit-bench-") as tmp:
        for name in args.cases.split(","):
            run_case(name.strip(), Path(tmp))
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv))
