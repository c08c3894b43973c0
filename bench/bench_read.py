"""Reader speed and memory on a panelised ~10 MB board, as ratios of one run.

Goal (issue 2): reading *and* modelling take at most 1.5× the time
``sexpdata.loads`` (a pure-Python reference parser from PyPI) needs merely to
parse the same text, and peak memory stays under 15× the file size.

Usage: ``python bench/bench_read.py [TARGET_MB]`` (default 10).
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

import sexpdata

from auditor.read import read_board_text
from auditor.read.sexpr import Node, parse

ROOT = Path(__file__).resolve().parents[1]
SOURCE = ROOT / "fixtures" / "formats" / "v8.kicad_pcb"
#: Board-coordinate keywords moved when a cell is copied.
_POINTS = frozenset({"at", "start", "end", "mid", "center", "xy"})


def _fmt(item: object) -> str:
    if isinstance(item, Node | list):
        return "(" + " ".join(_fmt(x) for x in item) + ")"
    text = str(item)
    if text and all(c.isalnum() or c in "._-+*:" for c in text):
        return text
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


def _shifted(node: list[object], dx: float, dy: float, local: bool = False) -> list[object]:
    out: list[object] = []
    for item in node:
        if isinstance(item, list):
            head = item[0] if item else ""
            if head in _POINTS and not local and len(item) >= 3:
                moved = [head, f"{float(item[1]) + dx:.6f}", f"{float(item[2]) + dy:.6f}",
                         *item[3:]]
                out.append(moved)
            else:
                # footprint children are local, except zones (board coordinates)
                inner_local = (local or head in ("footprint", "pad") or
                               str(head).startswith("fp_")) and head != "zone"
                out.append(_shifted(item, dx, dy, inner_local and head != "footprint"))
        else:
            out.append(item)
    if node and node[0] == "footprint":
        out = [_shifted_at(x, dx, dy) if isinstance(x, list) and x and x[0] == "at" else x
               for x in out]
    return out


def _shifted_at(at: list[object], dx: float, dy: float) -> list[object]:
    return ["at", f"{float(at[1]) + dx:.6f}", f"{float(at[2]) + dy:.6f}", *at[3:]]


def _routing(dx: float, dy: float) -> list[str]:
    """A dense meander: what makes real boards big."""
    out = []
    for i in range(300):
        x0, y0 = dx + (i % 30) * 3.0, dy + (i // 30) * 6.0
        out.append(f'(segment (start {x0:.4f} {y0:.4f}) (end {x0 + 3:.4f} {y0 + 1.5:.4f}) '
                   f'(width 0.25) (layer "F.Cu") (net 2) (uuid "0-{i}"))')
    for i in range(40):
        out.append(f'(via (at {dx + i * 2.5:.4f} {dy + 70:.4f}) (size 0.6) (drill 0.3) '
                   f'(layers "F.Cu" "B.Cu") (net 1) (uuid "v-{i}"))')
    return out


def panelised(target_bytes: int) -> str:
    """The v8 fixture repeated on a grid (with extra routing) up to the size."""
    tree = parse(SOURCE.read_text(encoding="utf-8"))
    header = [x for x in tree[1:] if isinstance(x, list) and x[0] in
              ("version", "generator", "generator_version", "general", "layers", "setup",
               "net")]
    items = [x for x in tree[1:] if isinstance(x, list) and x not in header]
    parts = ["(kicad_pcb"] + ["  " + _fmt(h) for h in header]
    size, cell = sum(len(p) for p in parts), 0
    while size < target_bytes:
        dx, dy = (cell % 10) * 110.0, (cell // 10) * 90.0
        chunk = ["  " + _fmt(_shifted(it, dx, dy)) for it in items if it[0] != "gr_line"
                 or cell == 0] + ["  " + r for r in _routing(dx, dy)]
        parts.extend(chunk)
        size += sum(len(c) + 1 for c in chunk)
        cell += 1
    return "\n".join(parts) + "\n)\n"


def _timed(fn: object, *args: object) -> tuple[float, object]:
    start = time.perf_counter()
    result = fn(*args)  # type: ignore[operator]
    return time.perf_counter() - start, result


_RSS_CHILD = """
import sys
from pathlib import Path
from auditor.read import read_board_text
text = Path(sys.argv[1]).read_text(encoding="utf-8")
def status_kb(key):
    with open("/proc/self/status") as f:
        return next(int(l.split()[1]) for l in f if l.startswith(key))
before = status_kb("VmRSS")
read_board_text(text, "panel.kicad_pcb")
print(status_kb("VmHWM") - before)
"""  # VmHWM, not ru_maxrss: Linux carries ru_maxrss over from the parent across exec


def _rss_growth_bytes(text: str) -> int:
    """Peak resident-set growth of a fresh process while it reads the text
    (counts GEOS's C allocations too, which tracemalloc cannot see)."""
    with tempfile.TemporaryDirectory() as tmp:
        board = Path(tmp) / "panel.kicad_pcb"
        board.write_text(text, encoding="utf-8")
        out = subprocess.run([sys.executable, "-c", _RSS_CHILD, str(board)], check=True,
                             capture_output=True, text=True).stdout
    return int(out.strip()) * 1024


def main(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("target_mb", nargs="?", type=float, default=10.0,
                        help="size of the panelised board in MB (default 10)")
    target_mb = parser.parse_args(argv[1:]).target_mb
    text = panelised(int(target_mb * 1e6))
    size = len(text.encode("utf-8"))
    t_ref, _ = _timed(sexpdata.loads, text)
    t_tok, _ = _timed(parse, text)
    t_read, board = _timed(read_board_text, text, "panel.kicad_pcb")
    tracemalloc.start()
    read_board_text(text, "panel.kicad_pcb")
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    print(f"board: {size / 1e6:.2f} MB, {len(board.footprints)} footprints, "  # type: ignore[attr-defined]
          f"{len(board.pads)} pads, {len(board.tracks)} tracks, "  # type: ignore[attr-defined]
          f"{len(board.vias)} vias, {len(board.zones)} zones")  # type: ignore[attr-defined]
    print(f"sexpdata.loads (parse only): {t_ref:7.2f} s")
    print(f"our tokenizer + tree       : {t_tok:7.2f} s  ratio {t_tok / t_ref:.3f}")
    print(f"read_board (parse + model) : {t_read:7.2f} s  ratio {t_read / t_ref:.3f} "
          f"(goal <= 1.5)")
    rss = _rss_growth_bytes(text)
    print(f"peak Python memory (tracemalloc): {peak / 1e6:7.1f} MB = {peak / size:.1f}x file")
    print(f"peak RSS growth while reading   : {rss / 1e6:7.1f} MB = {rss / size:.1f}x file "
          f"(goal < 15)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv))
