"""Time of the audit's field step on the demo board, quick and precise (prints, asserts nothing).

Run: ``python bench/bench_audit_field.py [--precise-pads N] [--extras]``.
Reports wall and CPU time (the machine is shared: the load average is
printed, and CPU time is the fairer figure) of

* the quick step cold (empty solve caches) and warm (same board again),
  with how many distinct axisymmetric geometries the rounding left;
* precise per-pad solves on the first N self-capacitance electrodes
  (default 3; 0 = all), with the precise / quick ratio of Cp and ΔC;
* with ``--extras``, the coupling table and slider scans.

Goal from the design issue: the demo board's quick solves well under 2 s.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from dataclasses import replace
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from auditor.audit import AuditOptions, measuring_selection, resolve_setup  # noqa: E402
from auditor.field.pad_model import field_matrices  # noqa: E402
from auditor.read import read_board  # noqa: E402
from auditor.sensors import find_sensors, measure  # noqa: E402
from auditor.solve.dispatch import solve_sensors  # noqa: E402
from auditor.solve.extras import precise_extras  # noqa: E402
from auditor.solve.setup import SELF_KINDS, pad_setup_for  # noqa: E402

DEMO = Path(__file__).resolve().parents[1] / "auditor" / "demo" / "front_panel.kicad_pcb"


def timed(action):  # type: ignore[no-untyped-def]
    wall, cpu = time.perf_counter(), time.process_time()
    result = action()
    return result, time.perf_counter() - wall, time.process_time() - cpu


def main() -> int:
    parser = argparse.ArgumentParser()
    parser.add_argument("--precise-pads", type=int, default=3)
    parser.add_argument("--extras", action="store_true")
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    board = read_board(DEMO)
    setup = resolve_setup(DEMO, AuditOptions())
    selection = measuring_selection(setup)
    sensors = tuple(sorted(measure(board, find_sensors(board, selection)[0], selection),
                           key=lambda s: s.name))
    config = setup.config
    pads = [s for s in sensors if s.kind in SELF_KINDS]
    distinct = {replace(pad_setup_for(s, board, config).setup, traces=(), vias=0) for s in pads}
    print(f"{len(sensors)} sensors, {len(pads)} self-cap, {len(distinct)} distinct pad "
          "geometries after rounding (traces apart)")
    field_matrices.cache_clear() if hasattr(field_matrices, "cache_clear") else None
    quick, wall, cpu = timed(lambda: solve_sensors(board, sensors, config))
    print(f"quick cold: {wall:.2f} s wall, {cpu:.2f} s CPU (goal well under 2 s)")
    _again, wall2, cpu2 = timed(lambda: solve_sensors(board, sensors, config))
    print(f"quick warm: {wall2:.2f} s wall, {cpu2:.2f} s CPU; cold/warm CPU ratio "
          f"{cpu / max(cpu2, 1e-9):.1f}")
    chosen = tuple(pads if args.precise_pads == 0 else pads[:args.precise_pads])
    if chosen:
        precise, wall, cpu = timed(lambda: solve_sensors(board, chosen, config, precise=True))
        print(f"precise, {len(chosen)} pads: {wall:.2f} s wall, {cpu:.2f} s CPU "
              f"({cpu / len(chosen):.2f} s CPU per pad)")
        for name, metrics in precise.items():
            q = quick[name]
            print(f"  {name:8s} Cp precise/quick {metrics.cp_pad_pf / q.cp_pad_pf:.3f}  "
                  f"dC precise/quick {metrics.delta_c_pf / q.delta_c_pf:.3f}")
    if args.extras:
        extras, wall, cpu = timed(lambda: precise_extras(board, sensors, config))
        print(f"extras: {wall:.2f} s wall, {cpu:.2f} s CPU")
        for scan in extras.scans:
            print(f"  {scan.kind} {scan.group}: linearity {scan.linearity_mm:.2f} mm, "
                  f"dead zones {scan.dead_zones_mm}, monotonic {scan.monotonic}")
        if extras.coupling is not None:
            worst = max(extras.coupling.pairs(), key=lambda p: p.worst_fraction)
            print(f"  worst pair {worst.first}-{worst.second}: {worst.crosstalk_pf:.3f} pF, "
                  f"{100 * worst.worst_fraction:.1f} % of Cp")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
