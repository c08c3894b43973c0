"""Start-up time of ``padaudit --version`` and ``padaudit --help`` against a
bare interpreter, measured in one run.

Goal (issue 14): each takes at most 0.15 s more than ``python -c pass`` on
the same machine. Prints the median CPU time (user + system) of each over
``--runs`` fresh processes, the excess over the bare interpreter and the
ratio. CPU time, not wall time: on a shared machine the wall clock mostly
measures the other processes. POSIX only (``resource``).

Usage: ``python bench/bench_startup.py [--runs N]`` (default 15).
"""

from __future__ import annotations

import argparse
import resource
import statistics
import subprocess
import sys

GOAL_EXCESS_S = 0.15
#: What the installed ``padaudit`` script runs (``python -m`` would add runpy).
ENTRY = "import sys; from auditor.cli.main import main; sys.exit(main())"
CASES: dict[str, list[str]] = {
    "python -c pass": ["-c", "pass"],
    "padaudit --version": ["-c", ENTRY, "--version"],
    "padaudit --help": ["-c", ENTRY, "--help"],
}


def _seconds(arguments: list[str]) -> float:
    """CPU seconds (user + system) the child used: on a shared machine wall
    time mostly measures the other processes."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run([sys.executable, *arguments], stdout=subprocess.DEVNULL,
                   stderr=subprocess.DEVNULL, check=False)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def median_seconds(runs: int) -> dict[str, float]:
    """Median CPU time of each case over ``runs`` rounds of fresh processes;
    the cases take turns within a round, so a change of load on a shared
    machine touches them alike."""
    times: dict[str, list[float]] = {name: [] for name in CASES}
    for _ in range(runs):
        for name, arguments in CASES.items():
            times[name].append(_seconds(arguments))
    return {name: statistics.median(values) for name, values in times.items()}


def main() -> int:
    """Measure, print one line per case; exit 1 when a case misses the goal."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=15, help="processes per case")
    runs = parser.parse_args().runs
    median_seconds(1)  # warm the file cache once
    medians = median_seconds(runs)
    bare = medians["python -c pass"]
    print(f"python -c pass       {bare * 1000:7.1f} ms CPU")
    missed = False
    for name in list(CASES)[1:]:
        took = medians[name]
        excess = took - bare
        missed |= excess > GOAL_EXCESS_S
        print(f"{name:<20} {took * 1000:7.1f} ms CPU  +{excess * 1000:6.1f} ms over bare, "
              f"ratio {took / bare:4.2f}  (goal: at most +{GOAL_EXCESS_S * 1000:.0f} ms)")
    return 1 if missed else 0


if __name__ == "__main__":
    raise SystemExit(main())
