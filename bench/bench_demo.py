"""Time of ``padaudit demo`` by stage, in one run (prints figures, asserts nothing).

Run: ``python bench/bench_demo.py [--repeat N] [--no-cli]``.

Stages, as :func:`auditor.audit.run_audit` and the ``demo`` command run
them on the bundled board (cold caches: a fresh process per repeat):

* read: ``read_board`` (parse + board model);
* sensors: ``find_sensors`` + ``measure``;
* field: mapping each electrode to its pad model and the quick solves
  (CPU time includes the solve worker processes, when used);
* rules+report: rules, decision, report object and the text rendering.

Then the whole command, ``padaudit demo`` in a fresh interpreter (start-up
and imports included), the figure a user sees.

Goals (design issues): the demo's audit under 3 s of wall time; a
20-electrode board's solves within 2 s in all (measured on bench_field's
20 distinct electrodes through the audit's batch solve); a full pad (both
matrices, with and without the finger, circuit step) within 60 ms. The printed ratios are
measured / goal (below 1 meets the goal). The machine is shared: the load
average (1-minute) is printed before and after, CPU time is the fairer
figure, and the best of ``--repeat`` runs is reported.
"""

from __future__ import annotations

import argparse
import io
import json
import os
import subprocess
import sys
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[1]
DEMO_WALL_GOAL_S = 3.0
BOARD20_SOLVE_GOAL_S = 2.0
PAD_GOAL_MS = 60.0


def _cpu_s() -> float:
    """CPU time of this process and of its finished children (solve workers)."""
    now = os.times()
    return now.user + now.system + now.children_user + now.children_system


def _timed(action: Callable[[], Any]) -> tuple[Any, float, float]:
    wall, cpu = time.perf_counter(), _cpu_s()
    result = action()
    return result, time.perf_counter() - wall, _cpu_s() - cpu


def stages_once() -> dict[str, Any]:
    """One cold run of the demo's stages in this process (called in a child)."""
    import argparse as ap

    from auditor.audit import (
        AuditOptions,
        _measured,
        build_report,
        measuring_selection,
        resolve_setup,
        solve_sensors,
    )
    from auditor.cli.report_options import emit
    from auditor.demo import demo_board_path, demo_config_path
    from auditor.field import crosssection, pad_model
    from auditor.read import read_board
    from auditor.sensors import find_sensors, measure
    from auditor.solve.setup import SELF_KINDS

    board_path = demo_board_path()
    options = AuditOptions(config_path=str(demo_config_path()))
    out: dict[str, Any] = {}
    setup, *_ = _timed(lambda: resolve_setup(board_path, options))
    board, out["read_wall"], out["read_cpu"] = _timed(lambda: read_board(board_path))
    selection = measuring_selection(setup)

    def sensing() -> tuple[Any, ...]:
        found, _ = find_sensors(board, selection)
        return tuple(sorted(measure(board, found, selection), key=lambda s: s.name))
    sensors, out["sensors_wall"], out["sensors_cpu"] = _timed(sensing)
    metrics, out["field_wall"], out["field_cpu"] = _timed(
        lambda: solve_sensors(board, sensors, setup, options))
    crosssection.trace_pf_per_mm.cache_clear()
    pad_model.field_matrices.cache_clear()

    def overlapped() -> dict[str, Any]:
        # As run_audit does it: each pad's solve queued as soon as it is measured.
        found, _ = find_sensors(board, selection)
        measured, quick = _measured(board, found, selection, setup, options)
        return solve_sensors(board, measured, setup, options, quick)
    _, out["overlap_wall"], out["overlap_cpu"] = _timed(overlapped)

    def reporting() -> None:
        report = build_report(board, sensors, metrics, setup)
        args = ap.Namespace(format="text", order="weakest", color="never", quiet=True)
        emit(report, args, stdout=io.StringIO(), env={})
    _, out["report_wall"], out["report_cpu"] = _timed(reporting)
    out["electrodes"] = sum(1 for s in sensors if s.kind in SELF_KINDS)
    out["solved"] = len(metrics)
    out["metrics"] = {name: [m.cp_pad_pf, m.cp_trace_pf, m.delta_c_pf]
                      for name, m in sorted(metrics.items())}
    return out


def full_pad_ms() -> float:
    """Best CPU time of one full pad (both matrices + circuit step), cold cache."""
    import math

    from auditor.field import api, pad_model

    setup = api.PadSetup(pad_area_mm2=math.pi * 25, gap_mm=1.0, plane_depth_mm=1.6)
    times = []
    for _ in range(5):
        pad_model.field_matrices.cache_clear()
        start = time.process_time()
        api.solve_pad(setup)
        times.append(time.process_time() - start)
    return 1000.0 * min(times)


def board20_s() -> tuple[float, float, int]:
    """Wall and CPU time (helpers included) of bench_field's 20 distinct
    electrodes through :func:`auditor.field.batch.solve_pads`, cold caches,
    and the process count it chose (this one included)."""
    import math

    from auditor.field import api, batch, crosssection, pad_model

    setups = []
    for i in range(20):  # the same board as bench_field.bench_board
        diameter = 8.0 + 0.4 * i
        setups.append(api.PadSetup(
            pad_area_mm2=math.pi * (diameter / 2) ** 2, gap_mm=0.5 + 0.05 * i,
            plane_depth_mm=1.6 if i % 2 else None, plane_fill=1.0 if i % 4 == 1 else 0.5,
            traces=(api.TraceRunSpec(0.2, 20.0 + i, 1.6 if i % 2 else None, 0.5),),
            vias=i % 3))
    pad_model.field_matrices.cache_clear()
    crosssection.trace_pf_per_mm.cache_clear()
    workers = batch.process_count(None)
    _, wall, cpu = _timed(lambda: batch.solve_pads(setups))
    return wall, cpu, workers


def _child(mode: str) -> Any:
    here = str(Path(__file__).parent)
    code = (f"import json, sys; sys.path.insert(0, {here!r}); import bench_demo as b; "
            f"print(json.dumps(b.{mode}()))")
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True, env=env)
    return json.loads(done.stdout.strip().splitlines()[-1])


def cli_wall_s() -> tuple[float, float]:
    """Wall and child CPU time of ``padaudit demo`` in a fresh interpreter."""
    before = os.times()
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "auditor", "demo", "--quiet"], check=True,
                   stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                   env={**os.environ, "PYTHONPATH": str(ROOT), "NO_COLOR": "1"})
    wall = time.perf_counter() - start
    after = os.times()
    cpu = (after.children_user - before.children_user
           + after.children_system - before.children_system)
    return wall, cpu


def _best(runs: list[dict[str, Any]], key: str) -> float:
    return min(float(r[key]) for r in runs)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=2, help="runs per figure (best kept)")
    parser.add_argument("--no-cli", action="store_true", help="skip the whole-command run")
    parser.add_argument("--metrics", type=Path, help="write per-pad Cp/ΔC as JSON here")
    args = parser.parse_args()
    load_before = os.getloadavg()[0]
    print(f"load average {load_before:.2f} (1 min) on {os.cpu_count()} cores")
    runs = [_child("stages_once") for _ in range(args.repeat)]
    count = int(runs[0]["electrodes"])
    solved = int(runs[0]["solved"])
    print(f"demo board, {count} self-capacitance electrodes, {solved} solved by the quick "
          f"model; best of {args.repeat} cold runs")
    print(f"{'stage':14s} {'wall s':>7s} {'CPU s':>7s}")
    total_wall = total_cpu = 0.0
    for stage in ("read", "sensors", "field", "report"):
        wall, cpu = _best(runs, f"{stage}_wall"), _best(runs, f"{stage}_cpu")
        total_wall, total_cpu = total_wall + wall, total_cpu + cpu
        label = "rules+report" if stage == "report" else stage
        print(f"{label:14s} {wall:7.2f} {cpu:7.2f}")
    print(f"{'stages total':14s} {total_wall:7.2f} {total_cpu:7.2f}")
    overlap_wall, overlap_cpu = _best(runs, "overlap_wall"), _best(runs, "overlap_cpu")
    apart = _best(runs, "sensors_wall") + _best(runs, "field_wall")
    print(f"sensors+field as the audit runs them (solves queued while measuring): "
          f"{overlap_wall:.2f} s wall, {overlap_cpu:.2f} s CPU; "
          f"ratio to the two stages apart: {overlap_wall / apart:.2f}")
    field_cpu = _best(runs, "field_cpu")
    per_pad_ms = 1000.0 * field_cpu / max(solved, 1)
    board20 = 20.0 * field_cpu / max(solved, 1)
    pad_ms = float(_child("full_pad_ms"))
    print(f"field stage per electrode (demo, mapping and traces included): "
          f"{per_pad_ms:.0f} ms CPU; x 20 = {board20:.2f} s")
    wall20, cpu20, workers20 = _child("board20_s")
    print(f"ratio 20 distinct electrodes (bench_field's board: {wall20:.2f} s wall, "
          f"{cpu20:.2f} s CPU, {workers20} worker process(es)) / "
          f"{BOARD20_SOLVE_GOAL_S:g} s goal: {wall20 / BOARD20_SOLVE_GOAL_S:.2f}")
    print(f"ratio full pad (round pad, ring, plane, overlay, finger: {pad_ms:.1f} ms CPU) / "
          f"{PAD_GOAL_MS:g} ms goal: {pad_ms / PAD_GOAL_MS:.2f}")
    if not args.no_cli:
        walls = sorted(cli_wall_s() for _ in range(max(args.repeat, 3)))
        wall, cpu = walls[0]
        median, slowest = walls[len(walls) // 2][0], walls[-1][0]
        print(f"padaudit demo, whole command, {len(walls)} runs: best {wall:.2f} s wall "
              f"({cpu:.2f} s CPU), median {median:.2f} s, slowest {slowest:.2f} s")
        print(f"ratio demo wall / {DEMO_WALL_GOAL_S:g} s goal: best {wall / DEMO_WALL_GOAL_S:.2f}, "
              f"median {median / DEMO_WALL_GOAL_S:.2f}")
    print(f"load average after {os.getloadavg()[0]:.2f}")
    if args.metrics:
        args.metrics.write_text(json.dumps(runs[0]["metrics"], indent=1, sort_keys=True))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
