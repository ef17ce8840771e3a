"""In-process closed solve of the bundled Peng-Robinson sample, through the façade.

Target: >= 2,000 solves per second for the path the app takes at every solve,
from the worksheet it holds: check it (``api.check``: prepare and count),
solve what was checked (``api.solve``) and explain it (``api.explain``).
Printed beside it, the same path from the worksheet's text (``api.read``
first: TOML parsed every time, as ``joulebook solve`` does once a process).
Each is the best and the median of R rounds of N solves, with the ratio to
the target; then where the time goes: each stage's share (cProfile: the time
of each façade call made by the path) and the functions that cost most. Not
a test: machines here are shared and noisy.

    python benchmarks/bench_solve.py [N] [R] [SAMPLE]    (default 300 solves, 7 rounds,
                                                         n2-buffer-into-receiver.toml)
"""

from __future__ import annotations

import cProfile
import io
import pstats
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

TARGET = 2000.0
"""solves per second: the issue's target for the in-process closed solve"""
STAGES = ("read", "check", "solve", "explain")


def from_worksheet(api, ws) -> None:
    checked = api.check(ws)
    if not checked.ready:
        raise SystemExit(f"the sample does not check: {checked.message}")
    api.explain(api.solve(checked))


def from_text(api, text: str) -> None:
    from_worksheet(api, api.read(text))


def rate(path, arg, n: int) -> float:
    t0 = time.perf_counter()
    for _ in range(n):
        path(arg)
    return n / (time.perf_counter() - t0)


def measure(name: str, path, arg, n: int, rounds: int) -> None:
    rates = [rate(path, arg, n) for _ in range(rounds)]
    best, median = max(rates), statistics.median(rates)
    print(f"{name}: best {best:7.0f} solves/s, median {median:7.0f} solves/s ({1e6 / median:5.0f} µs a solve); "
          f"median / target {median / TARGET:5.2f}")


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 300
    rounds = int(sys.argv[2]) if len(sys.argv) > 2 else 7
    sample = ROOT / "samples" / (sys.argv[3] if len(sys.argv) > 3 else "n2-buffer-into-receiver.toml")
    from balance import api

    text = sample.read_text(encoding="utf-8")
    ws = api.read(text)
    for _ in range(20):  # warm: the unit registry, the model's caches, the species data
        from_text(api, text)
    print(f"sample: {sample.name} ({ws.fluid.model}); {rounds} rounds of {n} solves; "
          f"target {TARGET:.0f} solves/s (ratio >= 1)")
    measure("check + solve + explain (the app)", lambda w: from_worksheet(api, w), ws, n, rounds)
    measure("read + check + solve + explain   ", lambda t: from_text(api, t), text, n, rounds)

    profile = cProfile.Profile()
    profile.enable()
    for _ in range(n):
        from_text(api, text)
    profile.disable()
    stats = pstats.Stats(profile)
    calls = {}  # each façade call the path makes: its cumulative time from its caller in the path
    for (file, _, name), (_, _, _, _, callers) in stats.stats.items():
        if file.endswith("api.py") and name in STAGES:
            calls[name] = sum(ct for (cfile, _, cname), (_, _, _, ct) in callers.items()
                              if cfile.endswith("bench_solve.py"))
    total = sum(calls.values())
    print(f"\nshare of each stage of the path from the text (cProfile, {n} solves; the profiler's "
          "own cost inflates small calls):")
    for stage in STAGES:
        spent = calls.get(stage, 0.0)
        print(f"  {stage:8s} {100 * spent / total:5.1f} %   {1e6 * spent / n:8.1f} µs a solve")
    out = io.StringIO()
    pstats.Stats(profile, stream=out).sort_stats("tottime").print_stats(20)
    print("\nmost costly functions (own time):")
    print("\n".join(out.getvalue().splitlines()[6:30]))


if __name__ == "__main__":
    main()
