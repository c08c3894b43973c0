"""The longer fuzz run: many seeded mutants of every format board, each
audited end to end (``audit --no-solve``) in a subprocess with a time and
memory limit. Prints how many were read, refused (exit 2) or failed
otherwise (exit 3, a traceback, a hang, a memory blow-up), and the slowest
mutant's time as a ratio of the per-mutant limit. The bounded version runs
in the test suite (tests/unit/read/test_read_mutants.py).

Usage: ``python bench/bench_fuzz.py [--count N] [--seed S]``.
"""

from __future__ import annotations

import argparse
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from fixtures.mutants import mutants  # noqa: E402

#: Per mutant (common practice, no source: a small board is audited in about a second).
LIMIT_S = 30.0
LIMIT_BYTES = 3 << 30


def _limited() -> None:
    resource.setrlimit(resource.RLIMIT_AS, (LIMIT_BYTES, LIMIT_BYTES))


def audit_once(board: Path) -> tuple[str, float, str]:
    """(outcome, seconds, last stderr line) of one audit."""
    start = time.perf_counter()
    try:
        done = subprocess.run([sys.executable, "-m", "auditor", "audit", str(board),
                               "--no-solve", "--format", "json", "--quiet", "--output",
                               str(board.with_suffix(".json"))],
                              capture_output=True, text=True, timeout=LIMIT_S, check=False,
                              preexec_fn=_limited, cwd=ROOT)
    except subprocess.TimeoutExpired:
        return "hang", LIMIT_S, ""
    seconds = time.perf_counter() - start
    last = (done.stderr.strip().splitlines() or [""])[-1]
    one_line = done.stderr.count("\n") <= 1 and "Traceback" not in done.stderr
    outcome = {0: "read", 1: "read", 2: "refused"}.get(done.returncode, "failed")
    return (outcome if one_line else "failed"), seconds, last


def main(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--count", type=int, default=200, help="mutants per format board")
    parser.add_argument("--seed", type=int, default=2016)
    args = parser.parse_args(argv[1:])
    counts = {"read": 0, "refused": 0, "failed": 0, "hang": 0}
    slowest = 0.0
    with tempfile.TemporaryDirectory(prefix="padaudit-fuzz-") as tmp:
        board = Path(tmp) / "mutant.kicad_pcb"
        for source in sorted((ROOT / "fixtures" / "formats").glob("*.kicad_pcb")):
            text = source.read_text(encoding="utf-8")
            for k, mutant in enumerate(mutants(text, args.count, args.seed)):
                board.write_text(mutant, encoding="utf-8", errors="surrogatepass")
                outcome, seconds, last = audit_once(board)
                counts[outcome] += 1
                slowest = max(slowest, seconds)
                if outcome in ("failed", "hang"):
                    print(f"{source.name} mutant {k} (seed {args.seed}): {outcome}: {last}")
    total = sum(counts.values())
    print(f"{total} mutants: " + ", ".join(f"{n} {k}" for k, n in counts.items()))
    print(f"slowest mutant: {slowest:.1f} s (ratio {slowest / LIMIT_S:.2f} of {LIMIT_S:.0f} s)")
    return 1 if counts["failed"] or counts["hang"] else 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv))
