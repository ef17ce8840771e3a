"""Start-up cost of `joulebook solve` on a sample against building a pint registry.

Target: ratio <= 1.5. Prints both times (best of N runs, each a fresh process)
and the ratio measured in this one run. Not a test: machines here are noisy.

    python benchmarks/bench_startup.py [N]
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "samples" / "n2-buffer-into-receiver.toml"


def best_of(cmd: list[str], n: int) -> float:
    best = float("inf")
    for _ in range(n):
        t0 = time.perf_counter()
        subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, cwd=ROOT)
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    py = sys.executable
    baseline = best_of([py, "-c", "import pint; pint.UnitRegistry()"], n)
    solve = best_of([py, "-m", "tui.cli", "solve", str(SAMPLE)], n)
    print(f"pint.UnitRegistry() process : {baseline * 1e3:8.1f} ms (best of {n})")
    print(f"joulebook solve {SAMPLE.name}: {solve * 1e3:8.1f} ms (best of {n})")
    print(f"ratio solve / pint          : {solve / baseline:8.2f}x  (target <= 1.5x)")


if __name__ == "__main__":
    main()
