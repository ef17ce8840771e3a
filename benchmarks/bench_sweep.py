"""What a sweep costs: a 1,000-case Peng-Robinson closed sweep (the nitrogen rupture sample over
its charge pressure and temperature, a 40 x 25 grid), solved serially and on a pool of 2
processes.

Printed: cases per second each way, the ratio of the pool to the serial run (2 cores: at best
about 2), and whether the two gave the same rows number for number (they must). Not a test:
machines here are shared and noisy.

    python benchmarks/bench_sweep.py [N_PRESSURES] [N_TEMPERATURES]    (default 40 25)
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


def main() -> None:
    n_p = int(sys.argv[1]) if len(sys.argv) > 1 else 40
    n_t = int(sys.argv[2]) if len(sys.argv) > 2 else 25
    from balance import api
    from balance.study.paths import parse_path
    from balance.study.ranges import values
    from balance.study.sweep import Vary, run

    ws = api.read(ROOT / "samples" / "n2-buffer-into-receiver.toml")
    # each field its own count of values (the command line's --points gives every range one)
    varies = (Vary(parse_path("initial.V-101.P"), tuple(values("100 barg..200 barg", n_p))),
              Vary(parse_path("initial.V-101.T"), tuple(values("-10 degC..50 degC", n_t))))
    t0 = time.perf_counter()
    serial = run(ws, varies, api.case_row)
    t_serial = time.perf_counter() - t0
    t0 = time.perf_counter()
    pooled = run(ws, varies, api.case_row, jobs=2)
    t_pool = time.perf_counter() - t0
    n = len(serial.rows)
    same = [r.values for r in serial.rows] == [r.values for r in pooled.rows]
    print(f"{n} cases of the N2 rupture on Peng-Robinson ({serial.failed()} not solved)")
    print(f"  serial:          {n / t_serial:8.1f} cases/s  ({t_serial:.2f} s)")
    print(f"  2 processes:     {n / t_pool:8.1f} cases/s  ({t_pool:.2f} s)   ratio to serial {t_serial / t_pool:.2f}")
    print(f"  the same rows:   {'yes' if same else 'NO'}")


if __name__ == "__main__":
    main()
