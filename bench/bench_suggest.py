"""Cost of the suggested fixes: ``padaudit audit`` on the demo board with and
without them, measured in one run.

Goal (issue 15): the audit with suggestions takes at most 1.5 times the
audit without (``--no-suggest``). Prints the median CPU time (user +
system, the audit's helper processes included) and wall time of each over
``--runs`` fresh processes and the ratios. CPU time is the figure to judge
on a shared machine (wall time mostly measures the other processes); the
two cases take turns so a change of load touches both alike. POSIX only
(``resource``).

Usage: ``python bench/bench_suggest.py [--runs N]`` (default 3).
"""

from __future__ import annotations

import argparse
import resource
import statistics
import subprocess
import sys
import time

GOAL_RATIO = 1.5
#: What the installed ``padaudit`` script runs.
ENTRY = "import sys; from auditor.cli.main import main; sys.exit(main())"


def _demo_board() -> str:
    out = subprocess.run([sys.executable, "-c", ENTRY, "demo", "--path"], check=True,
                         capture_output=True, text=True)
    return out.stdout.strip()


def _measure(arguments: list[str]) -> tuple[float, float]:
    """(CPU seconds, wall seconds) of one child process."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run([sys.executable, "-c", ENTRY, *arguments], stdout=subprocess.DEVNULL,
                   stderr=subprocess.DEVNULL, check=False)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime), wall


def main() -> int:
    """Measure both cases; exit 1 when the CPU ratio misses the goal."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=3, help="processes per case")
    runs = parser.parse_args().runs
    board = _demo_board()
    cases = {"without (--no-suggest)": ["audit", board, "--quiet", "--no-suggest"],
             "with suggestions": ["audit", board, "--quiet"]}
    cpu: dict[str, list[float]] = {name: [] for name in cases}
    wall: dict[str, list[float]] = {name: [] for name in cases}
    _measure(cases["with suggestions"])  # warm the file cache once
    for _ in range(runs):
        for name, arguments in cases.items():
            took_cpu, took_wall = _measure(arguments)
            cpu[name].append(took_cpu)
            wall[name].append(took_wall)
    medians = {name: (statistics.median(cpu[name]), statistics.median(wall[name]))
               for name in cases}
    for name, (c, w) in medians.items():
        print(f"{name:<24} {c:6.2f} s CPU  {w:6.2f} s wall")
    without, with_ = medians["without (--no-suggest)"], medians["with suggestions"]
    ratio = with_[0] / without[0]
    print(f"ratio with/without: {ratio:.2f} CPU, {with_[1] / without[1]:.2f} wall "
          f"(goal: at most {GOAL_RATIO} CPU); {runs} runs each")
    return 0 if ratio <= GOAL_RATIO else 1


if __name__ == "__main__":
    raise SystemExit(main())
