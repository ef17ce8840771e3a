"""Start-up cost of `joulebook solve` on a cubic sample against building a pint registry.

Each round runs both commands once as fresh processes, interleaved; the
figure is the median over rounds of each round's own ratio (best to best
beside it), so a noisy neighbour slows both sides of a round alike. As an
installed package has, the bytecode of ``balance`` and ``tui`` is compiled
first (pip does that on install; pint's is), whatever
PYTHONDONTWRITEBYTECODE says. Not a test: machines here are noisy.

Target (issue 8): ratio <= 1.0.

    python benchmarks/bench_startup.py [rounds]
"""

from __future__ import annotations

import compileall
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "samples" / "n2-buffer-into-receiver.toml"
TARGET = 1.0


def run(cmd: list[str], env: dict) -> float:
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, cwd=ROOT, env=env)
    return time.perf_counter() - t0


def main() -> None:
    rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 11
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    for package in ("balance", "tui"):
        compileall.compile_dir(ROOT / package, quiet=1)
    py = sys.executable
    base_cmd = [py, "-c", "import pint; pint.UnitRegistry()"]
    solve_cmd = [py, "-m", "tui.cli", "solve", str(SAMPLE)]
    run(base_cmd, env), run(solve_cmd, env)  # warm the file cache
    base, solve, ratios = [], [], []
    for _ in range(rounds):
        b, s = run(base_cmd, env), run(solve_cmd, env)
        base.append(b)
        solve.append(s)
        ratios.append(s / b)
    r = statistics.median(ratios)
    print(f"pint.UnitRegistry() process      : best {min(base) * 1e3:7.1f} ms, median {statistics.median(base) * 1e3:7.1f} ms")
    print(f"joulebook solve {SAMPLE.name}: best {min(solve) * 1e3:7.1f} ms, median {statistics.median(solve) * 1e3:7.1f} ms")
    print(f"ratio solve / pint: median of {rounds} rounds {r:.2f}x (best to best {min(solve) / min(base):.2f}x); "
          f"target <= {TARGET:g}x: {'met' if r <= TARGET else 'NOT met'}")


if __name__ == "__main__":
    main()
