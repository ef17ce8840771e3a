"""The uncertainty of a result: the first-order budget and a Monte Carlo run, against their budgets.

Prints, for the bundled closed Peng-Robinson sample with four uncertain inputs
(n2-sample-cylinder-bath-uncertain.toml: 2 × 4 solves at xᵢ ± h, the nominal result given):

* the first-order budget of its main results through the façade (``api.uncertainty``), best
  and median of R rounds, and the median's ratio to the 20 ms budget (ratio <= 1 meets it);
* a Monte Carlo run of N samples (default 10,000) on 2 processes, its wall time (the pool's
  start included) and the ratio to the 10 s budget; then that the pooled numbers equal the
  serial ones on a short run, and the serial rate for comparison.

Not a test: machines here are shared and noisy.

    python benchmarks/bench_uncertainty.py [N] [R]    (default 10000 samples, 7 rounds)
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

SAMPLE = "n2-sample-cylinder-bath-uncertain.toml"
FIRST_ORDER_BUDGET = 0.020
"""seconds: the first-order uncertainty of a closed PR case with 4 uncertain inputs"""
MONTE_CARLO_BUDGET = 10.0
"""seconds: a 10⁴-sample Monte Carlo run on 2 processes"""
JOBS = 2


def main() -> None:
    samples = int(sys.argv[1]) if len(sys.argv) > 1 else 10_000
    rounds = int(sys.argv[2]) if len(sys.argv) > 2 else 7
    from balance import api

    ws = api.read(ROOT / "samples" / SAMPLE)
    result = api.solve(ws)
    for _ in range(5):  # warm: the unit registry, the model's caches, the species data
        api.uncertainty(ws, result=result)
    found = api.uncertainty(ws, result=result)
    print(f"sample: {SAMPLE} ({ws.fluid.model}); {len(found.inputs)} uncertain inputs, "
          f"{len(found.budgets)} main results")

    times = []
    for _ in range(rounds):
        t0 = time.perf_counter()
        for _ in range(10):
            api.uncertainty(ws, result=result)
        times.append((time.perf_counter() - t0) / 10)
    best, median = min(times), statistics.median(times)
    print(f"first order ({2 * len(found.inputs)} solves): best {1e3 * best:6.2f} ms, median {1e3 * median:6.2f} ms; "
          f"median / budget {median / FIRST_ORDER_BUDGET:5.2f} (budget {1e3 * FIRST_ORDER_BUDGET:.0f} ms)")

    t0 = time.perf_counter()
    run = api.uncertainty(ws, result=result, monte_carlo=samples, seed=1, jobs=JOBS).monte_carlo
    wall = time.perf_counter() - t0
    print(f"Monte Carlo, {samples} samples on {JOBS} processes: {wall:6.2f} s ({1e6 * wall / samples:5.0f} µs a "
          f"sample); wall / budget {wall / MONTE_CARLO_BUDGET * 10_000 / samples:5.2f} "
          f"(budget {MONTE_CARLO_BUDGET:.0f} s for 10,000, scaled to {samples}); {run.failed} failed")
    for s in run.spreads:
        print(f"  {s.column}: mean {s.mean:.6g}, sd {s.sd:.6g}, 95 % interval [{s.low:.6g}, {s.high:.6g}]")

    short = min(samples, 400)
    t0 = time.perf_counter()
    serial = api.uncertainty(ws, result=result, monte_carlo=short, seed=2).monte_carlo
    rate = short / (time.perf_counter() - t0)
    pooled = api.uncertainty(ws, result=result, monte_carlo=short, seed=2, jobs=JOBS).monte_carlo
    same = serial.as_json() == pooled.as_json()
    print(f"serial: {rate:6.0f} samples/s; {short} samples pooled equal the serial ones: {'yes' if same else 'NO'}")


if __name__ == "__main__":
    main()
