"""Benchmark of the precise (planar moment-method) field solve.

Prints, in one run: the demo board's whole ``audit --precise`` in a fresh
process with each process count of ``--jobs`` (default 1 and 2: wall, CPU of
all threads and helpers, peak RSS of the main process and of the largest
helper, peak total PSS, and the CPU of the main process alone: the wall
time on idle cores is about that or longer, and unlike the wall it hardly
moves with other sessions' load (with the kernel's autogroup scheduling, as
here, a busy machine shares the cores between sessions, not processes, so
a second process then gains little wall);
goal from issue 13: <= 8 s wall on two cores,
<= 200 MB; the wall ratio between the process counts and whether their JSON
is byte for byte the same), optionally alternated with another checkout
(``--against DIR``, e.g. a ``git worktree`` of an older commit; it must
know ``--jobs``) for a CPU ratio measured in the same run and the largest
change of Cp and ΔC per electrode; then the 30 x 30 mm window at 0.25 mm cells with three conductors
(time, peak traced memory), a 16-electrode coupling matrix, and the FFT + CG
solve against a dense direct solve of the same discretisation on growing
cases (time ratio and crossover). Goals from issue 7: <= 1.5 s and <= 150 MB,
<= 30 s on two cores. Run: ``python bench/bench_precise.py --help``.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import threading
import time
import tracemalloc
from collections.abc import Callable
from dataclasses import dataclass
from functools import partial
from pathlib import Path
from typing import TypeVar

import numpy as np
import shapely
from shapely.geometry import LineString, Point, box

from auditor.field.precise import (
    Conductor,
    Finger,
    LayeredMedium,
    slider_scan,
    solve_capacitance,
    solve_precise,
)
from auditor.field.precise.cells import grid_around
from auditor.field.precise.operator import CellOperator, cell_operator, level_kernels

T = TypeVar("T")

# Overlay 2 mm (er 3) over 1.6 mm FR-4 (er 4.4) over a solid plane (folded in).
TOUCH_STACK = LayeredMedium(((2.0, 3.0), (1.6, 4.4)), ground_below=True)


DEMO_BOARD = Path(__file__).resolve().parents[1] / "auditor" / "demo" / "front_panel.kicad_pcb"
#: Issue 13 item 6: the demo's ``audit --precise`` within 8 s wall and 200 MB.
DEMO_WALL_GOAL_S = 8.0
DEMO_RSS_GOAL_MB = 200.0


#: Runs the audit in the child and reports its own and its helpers' peak RSS and CPU.
_AUDIT_CHILD = """
import resource, sys
from auditor.cli.main import main
code = main(sys.argv[1:])
own, helpers = (resource.getrusage(w) for w in (resource.RUSAGE_SELF, resource.RUSAGE_CHILDREN))
sys.stderr.write(f"bench-rss {own.ru_maxrss} {helpers.ru_maxrss} "
                 f"{own.ru_utime + own.ru_stime} {helpers.ru_utime + helpers.ru_stime}\\n")
raise SystemExit(code)
"""


@dataclass(frozen=True)
class DemoRun:
    """One demo audit: wall and CPU seconds (helpers included), CPU seconds
    of the main process alone, peak RSS of the main process and of its
    largest helper, peak total PSS (MB)."""

    wall_s: float
    cpu_s: float
    main_cpu_s: float
    parent_mb: float
    helper_mb: float
    pss_mb: float


def _descendants(pid: int) -> list[int]:
    found, todo = [], [pid]
    while todo:
        current = todo.pop()
        found.append(current)
        try:
            text = Path(f"/proc/{current}/task/{current}/children").read_text()
        except OSError:
            continue
        todo.extend(int(child) for child in text.split())
    return found


def _pss_kb(pid: int) -> int:
    try:
        for line in Path(f"/proc/{pid}/smaps_rollup").read_text().splitlines():
            if line.startswith("Pss:"):
                return int(line.split()[1])
    except OSError:
        pass
    return 0


def _sample_pss(pid: int, peak: list[int], done: threading.Event) -> None:
    """Peak of the summed PSS of ``pid`` and its descendants (every 20 ms):
    shared pages counted once, unlike the sum of RSS."""
    while not done.wait(0.02):
        peak[0] = max(peak[0], sum(_pss_kb(p) for p in _descendants(pid)))


def run_demo_audit(tree: Path, output: Path, jobs: int) -> DemoRun:
    """``python -m auditor audit DEMO --precise --jobs N`` with ``tree`` first
    on the path, in a fresh process (CPU from ``os.wait4``: helpers included)."""
    env = dict(os.environ, PYTHONPATH=str(tree))
    env.pop("PADAUDIT_JOBS", None)
    command = [sys.executable, "-c", _AUDIT_CHILD, "audit", str(DEMO_BOARD), "--precise",
               "--format", "json", "--quiet", "--output", str(output), "--jobs", str(jobs)]
    start = time.perf_counter()
    child = subprocess.Popen(command, env=env, cwd=tree, stdout=subprocess.DEVNULL,
                             stderr=subprocess.PIPE, text=True)
    peak, done = [0], threading.Event()
    sampler = threading.Thread(target=_sample_pss, args=(child.pid, peak, done))
    sampler.start()
    assert child.stderr is not None
    stderr = child.stderr.read()
    _, status, usage = os.wait4(child.pid, 0)
    wall = time.perf_counter() - start
    done.set()
    sampler.join()
    code = os.waitstatus_to_exitcode(status)
    rss = [line.split()[1:] for line in stderr.splitlines() if line.startswith("bench-rss")]
    if code not in (0, 1) or not rss:
        raise SystemExit(f"demo audit under {tree} exited with {code}: {stderr[-500:]}")
    own_kb, helper_kb, main_cpu = int(rss[-1][0]), int(rss[-1][1]), float(rss[-1][2])
    return DemoRun(wall, usage.ru_utime + usage.ru_stime, main_cpu, own_kb / 1024.0,
                   helper_kb / 1024.0, peak[0] / 1024.0)


def electrode_values(path: Path) -> dict[str, tuple[float, float]]:
    """Cp of the pad and ΔC per electrode from an audit's JSON."""
    doc = json.loads(path.read_text(encoding="utf-8"))
    return {s["name"]: (s["metrics"]["cp_pad_pf"], s["metrics"]["delta_c_pf"])
            for s in doc["sensors"] if s.get("metrics")}


def demo_audit(repeat: int, against: Path | None, job_counts: list[int]) -> None:
    """Time the demo's precise audit with each process count; with
    ``against``, alternate with that checkout (the same process counts)."""
    here = Path(__file__).resolve().parents[1]
    trees = [("this tree", here)] + ([("against", against)] if against else [])
    cases = [(name, tree, jobs) for jobs in job_counts for name, tree in trees]
    runs: dict[tuple[str, int], list[DemoRun]] = {(n, j): [] for n, _, j in cases}
    with tempfile.TemporaryDirectory() as folder:
        outputs = {(n, j): Path(folder) / f"{k}.json" for k, (n, _, j) in enumerate(cases)}
        for _ in range(repeat):
            for name, tree, jobs in cases:
                runs[name, jobs].append(run_demo_audit(tree, outputs[name, jobs], jobs))
        print(f"demo audit --precise ({DEMO_BOARD.name}), best of {repeat}, load average "
              f"now {os.getloadavg()[0]:.2f}:")
        for name, _, jobs in cases:
            _print_demo_run(name, jobs, runs[name, jobs])
        _print_process_ratios(runs, trees[0][0], job_counts)
        texts = {k: path.read_bytes() for k, path in outputs.items()}
        same = len({texts[trees[0][0], j] for j in job_counts}) == 1
        print(f"  JSON byte for byte the same with {', '.join(map(str, job_counts))} "
              f"processes: {'yes' if same else 'NO'}")
        if against is None:
            return
        _print_against(runs, job_counts[0])
        _print_changes(electrode_values(outputs["this tree", job_counts[0]]),
                       electrode_values(outputs["against", job_counts[0]]))


def _print_demo_run(name: str, jobs: int, runs: list[DemoRun]) -> None:
    best = DemoRun(*(min(getattr(r, f) for r in runs) for f in DemoRun.__dataclass_fields__))
    print(f"  {name:9s} --jobs {jobs}: wall {best.wall_s:6.2f} s (goal {DEMO_WALL_GOAL_S:g} s, "
          f"ratio {best.wall_s / DEMO_WALL_GOAL_S:.2f}), CPU {best.cpu_s:6.2f} s, of which "
          f"the main process {best.main_cpu_s:5.2f} s (ratio to the goal "
          f"{best.main_cpu_s / DEMO_WALL_GOAL_S:.2f})")
    print(f"      peak RSS main {best.parent_mb:5.0f} MB (goal {DEMO_RSS_GOAL_MB:g} MB, ratio "
          f"{best.parent_mb / DEMO_RSS_GOAL_MB:.2f}), largest helper {best.helper_mb:5.0f} MB, "
          f"peak total PSS {best.pss_mb:5.0f} MB (ratio {best.pss_mb / DEMO_RSS_GOAL_MB:.2f})")


def _print_process_ratios(runs: dict[tuple[str, int], list[DemoRun]], name: str,
                          job_counts: list[int]) -> None:
    if len(job_counts) < 2:
        return
    first = min(r.wall_s for r in runs[name, job_counts[0]])
    for jobs in job_counts[1:]:
        wall = min(r.wall_s for r in runs[name, jobs])
        # The counts ran back to back in each repetition, so one pair shares
        # its load; their spread shows how far the load moved.
        pairs = sorted(b.wall_s / a.wall_s for a, b in zip(runs[name, job_counts[0]],
                                                            runs[name, jobs], strict=True))
        print(f"  wall ratio --jobs {jobs} / --jobs {job_counts[0]}: {wall / first:.3f} (best "
              f"of each); per back-to-back pair: {', '.join(f'{r:.3f}' for r in pairs)}")


def _print_against(runs: dict[tuple[str, int], list[DemoRun]], jobs: int) -> None:
    this, other = runs["this tree", jobs], runs["against", jobs]
    new, old = (min(r.cpu_s for r in rs) for rs in (this, other))
    print(f"  --jobs {jobs}: CPU ratio this/against {new / old:.3f}; wall ratio "
          f"{min(r.wall_s for r in this) / min(r.wall_s for r in other):.3f}")
    # Each repetition ran the two trees back to back, so the ratio of one
    # pair shares its load; their spread shows how far the load moved.
    pairs = sorted(a.cpu_s / b.cpu_s for a, b in zip(this, other, strict=True))
    print("  CPU ratio per back-to-back pair: " + ", ".join(f"{r:.3f}" for r in pairs))


def _print_changes(new: dict[str, tuple[float, float]], old: dict[str, tuple[float, float]]
                   ) -> None:
    worst_cp, worst_delta = ("", 0.0), ("", 0.0)
    for name in sorted(set(new) & set(old)):
        cp = new[name][0] / old[name][0] - 1.0
        delta = new[name][1] / old[name][1] - 1.0
        print(f"    {name:10s} Cp {new[name][0]:8.4f} pF ({cp:+.3%})  "
              f"ΔC {new[name][1]:7.4f} pF ({delta:+.3%})")
        worst_cp = max(worst_cp, (name, cp), key=lambda item: abs(item[1]))
        worst_delta = max(worst_delta, (name, delta), key=lambda item: abs(item[1]))
    print(f"  largest change vs against: Cp {worst_cp[1]:+.3%} ({worst_cp[0]}), "
          f"ΔC {worst_delta[1]:+.3%} ({worst_delta[0]})")


def window_case() -> None:
    """Pad, surrounding pour and finger in a 30 x 30 mm window."""
    pad = Point(15, 15).buffer(6.0, quad_segs=64)
    pour = box(0, 0, 30, 30).difference(Point(15, 15).buffer(7.0, quad_segs=64))
    conductors = [Conductor("pad", pad, 1), Conductor("pour", pour, 1),
                  Conductor("finger", Point(15, 15).buffer(5.0, quad_segs=64), 0)]
    level_kernels.cache_clear()
    rss_before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    tracemalloc.start()
    start, cpu_start = time.perf_counter(), time.process_time()
    solve = solve_precise(conductors, TOUCH_STACK, 0.25)
    matrix = solve.matrix
    elapsed, cpu = time.perf_counter() - start, time.process_time() - cpu_start
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss_growth = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss - rss_before
    warm = []
    for _ in range(3):
        start = time.perf_counter()
        solve_precise(conductors, TOUCH_STACK, 0.25)
        warm.append(time.perf_counter() - start)
    print("30x30 mm window, 0.25 mm cells, 3 conductors (cold: tables + kernels + solve)")
    print(f"  {solve.unknowns} unknowns, {solve.iterations} CG iterations")
    print(f"  wall {elapsed:.2f} s (goal 1.5 s, ratio {elapsed / 1.5:.2f}), process CPU {cpu:.2f} s;"
          f" warm (kernels cached) best of 3: {min(warm):.2f} s")
    print(f"  peak traced memory {peak / 2**20:.1f} MB (goal 150 MB, ratio {peak / 2**20 / 150:.2f});"
          f" max RSS growth {rss_growth / 1024:.1f} MB")
    print("  C [pF]:", np.array2string(matrix.array(), precision=4))


#: A long slider row, as on real boards: 32 strips of 15 x 42 mm at 17 mm
#: pitch, no plane under them, 2 mm overlay. The goal (a --precise audit of
#: such a board in a few minutes on one core, < 300 MB) is the scan's share.
ROW_STACK = LayeredMedium(((2.0, 3.0), (1.6, 4.4)))
ROW_GOAL_CPU_S = 120.0


def long_row(strips: int = 32) -> None:
    """The finger scanned along the row in neighbour windows (0.75 mm cells,
    10 mm finger, 3 steps per pitch), and on a 12-strip row the windows
    against the whole solve: CPU ratio and the largest change of ΔC."""
    def row(count: int) -> tuple[list[Conductor], LineString]:
        return ([Conductor(f"s{i:02d}", box(17.0 * i, 0, 17.0 * i + 15, 42), 1)
                 for i in range(count)], LineString([(-1.0, 21), (17.0 * count - 1, 21)]))

    segments, path = row(strips)
    tracemalloc.start()
    start = time.process_time()
    scan = slider_scan(segments, Finger(5.0, 0), path, 17.0 / 3, ROW_STACK, 0.75)
    cpu = time.process_time() - start
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    print(f"{strips}-strip row scan in windows: {len(scan.positions_mm)} finger positions, "
          f"CPU {cpu:.1f} s (goal {ROW_GOAL_CPU_S:g} s, ratio {cpu / ROW_GOAL_CPU_S:.2f}), "
          f"peak traced memory {peak / 2**20:.0f} MB")
    short, short_path = row(12)
    timed_whole, whole = _cpu(lambda: slider_scan(short, Finger(5.0, 0), short_path, 17.0 / 3,
                                                  ROW_STACK, 0.75, budget=10**12))
    timed_split, split = _cpu(lambda: slider_scan(short, Finger(5.0, 0), short_path,
                                                  17.0 / 3, ROW_STACK, 0.75, budget=0))
    largest = max(max(abs(a - b) for a, b in zip(w, p, strict=True))
                  for w, p in zip(whole.delta_pf, split.delta_pf, strict=True))
    peak_delta = max(max(w) for w in whole.delta_pf)
    print(f"12-strip row: whole CPU {timed_whole:.1f} s, windows {timed_split:.1f} s "
          f"(ratio {timed_split / timed_whole:.2f}); largest change of ΔC "
          f"{100 * largest / peak_delta:.3f} % of the largest ΔC")


def _cpu(run: Callable[[], T]) -> tuple[float, T]:
    start = time.process_time()
    result = run()
    return time.process_time() - start, result


def sixteen_electrodes() -> None:
    """4 x 4 pads 8 mm square at 10 mm pitch inside a pour, 44 x 44 mm, 0.25 mm cells."""
    pads = [box(2 + 10 * i, 2 + 10 * j, 10 + 10 * i, 10 + 10 * j)
            for i in range(4) for j in range(4)]
    clearance = shapely.union_all([p.buffer(1.0, join_style="mitre") for p in pads])
    pour = box(-2, -2, 42, 42).difference(clearance)
    conductors = [Conductor(f"pad{n:02d}", p, 1) for n, p in enumerate(pads)]
    conductors.append(Conductor("pour", pour, 1))
    level_kernels.cache_clear()
    start, cpu_start = time.perf_counter(), time.process_time()
    solve = solve_precise(conductors, TOUCH_STACK, 0.25)
    matrix = solve.matrix
    elapsed, cpu = time.perf_counter() - start, time.process_time() - cpu_start
    values = matrix.array()
    print(f"16 electrodes + pour, 44 x 44 mm, 0.25 mm cells, full Maxwell matrix, "
          f"{solve.unknowns} unknowns")
    print(f"  wall {elapsed:.2f} s (goal 30 s, ratio {elapsed / 30:.3f}), process CPU {cpu:.2f} s, "
          f"{solve.iterations} CG iterations")
    print(f"  Cp of a corner pad {values[0, 0]:.4f} pF, neighbour coupling "
          f"{-values[0, 1]:.4f} pF ({-values[0, 1] / values[0, 0]:.1%} of Cp), "
          f"raw asymmetry max |C-C^T|/max|C| {solve.asymmetry:.1e}")


def dense_against_fft() -> None:
    """Same discretisation solved both ways: square plate on the touch stack.

    Both timings (best of three) start from the same cached kernels; dense
    includes assembling the matrix, FFT + CG includes meshing and the
    preconditioner.
    """
    print("dense numpy.linalg.solve vs FFT + preconditioned CG, plate on the touch stack")
    print("  unknowns  dense_s  fft_cg_s  dense/fft  C_dense/C_fft-1")
    sizes, ratios = [], []
    for cells_per_side in (3, 5, 8, 12, 20, 32, 48, 64):
        cell_mm = 10.0 / cells_per_side
        plate = [Conductor("plate", box(0, 0, 10, 10), 1)]
        kernels = level_kernels(TOUCH_STACK, grid_around([plate[0].geometry], cell_mm), (1,))
        operator = cell_operator(kernels, (np.arange(cells_per_side ** 2, dtype=np.int64),))
        fft_s, fft_matrix = _best_of_three(partial(
            solve_capacitance, plate, TOUCH_STACK, cell_mm, edge_correction=False))
        dense_s, dense_charge = _best_of_three(partial(_dense_solve, operator))
        dense_pf = dense_charge.sum() * cell_mm ** 2 * _pf_per_unit()
        sizes.append(operator.size)
        ratios.append(dense_s / fft_s)
        print(f"  {operator.size:8d}  {dense_s:7.3f}  {fft_s:8.3f}  {ratios[-1]:9.2f}  "
              f"{dense_pf / fft_matrix.values_pf[0][0] - 1:+.1e}")
    slower = [n for n, r in zip(sizes, ratios, strict=True) if r <= 1.0]
    after = [n for n in sizes if not slower or n > max(slower)]
    print(f"  FFT + CG faster at every size from {after[0]} unknowns up"
          f" (dense faster at {slower[-1] if slower else 'none'})" if after
          else "  dense faster at every size tried")


def _dense_solve(operator: CellOperator) -> np.ndarray:
    return np.linalg.solve(operator.dense(), np.ones(operator.size))


def _best_of_three(run: Callable[[], T]) -> tuple[float, T]:
    best, result = np.inf, None
    for _ in range(3):
        start = time.perf_counter()
        result = run()
        best = min(best, time.perf_counter() - start)
    assert result is not None
    return best, result


def _pf_per_unit() -> float:
    from auditor.field.precise.solve import _PF_PER_KERNEL_UNIT
    return float(_PF_PER_KERNEL_UNIT)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=1,
                        help="demo audits per checkout (best is shown), default 1")
    parser.add_argument("--against", type=Path,
                        help="another checkout to time the demo audit against, alternately")
    parser.add_argument("--demo-only", action="store_true", help="only the demo audit")
    parser.add_argument("--row-only", action="store_true",
                        help="only the long slider row (no demo audit)")
    parser.add_argument("--jobs", default="1,2", metavar="N,N",
                        help="process counts to time the demo audit with (default 1,2)")
    args = parser.parse_args()
    if args.row_only:
        long_row()
        return
    print(f"load average before the run: {os.getloadavg()[0]:.2f} on {os.cpu_count()} CPUs "
          "(other work on the machine inflates wall times; CPU times are steadier)")
    demo_audit(args.repeat, args.against, [int(n) for n in args.jobs.split(",")])
    print(f"load average after the demo audits: {os.getloadavg()[0]:.2f}")
    if args.demo_only:
        return
    window_case()
    long_row()
    sixteen_electrodes()
    dense_against_fft()


if __name__ == "__main__":
    main()
