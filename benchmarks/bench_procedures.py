"""What a house procedure costs: reading its file, and applying its rules to a solved result.

The app applies the rules after every solve and at every edit (the side panel's required
fields and model rules), and a sign-off applies them again: they must cost a small part of
the solve they follow. Printed: the median of R rounds of N calls, per call, for

- reading and checking the bundled closed-vessels procedure (its exercises' answer worksheets
  read too), as `procedure check` and every search of the folders do;
- applying every rule to a solved closed PR worksheet (one of its exercises' answers), as the
  app does after a solve;
- that solve itself (check, solve, the solve entry's data), as the app does;

with the ratios of the rules to their budget (1 ms: a hundredth of the 100 ms the app's recount
after an edit may take, benchmarks/bench_tui_recount.py) and to the solve (for scale: a closed PR
solve is itself well under a millisecond). Not a test: machines here are shared and noisy.

    python benchmarks/bench_procedures.py [N] [R]    (default 200 calls, 5 rounds)
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from benchmarks.timing import timed  # noqa: E402  (after the path: run as a script)

BUDGET = 1e-3
"""[s] applying every rule once: a hundredth of the app's recount budget"""


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 200
    rounds = int(sys.argv[2]) if len(sys.argv) > 2 else 5
    from balance import api
    from balance.procedures import findings, load

    path = ROOT / "balance" / "data" / "procedures" / "hpp-closed-vessels.toml"
    procedure = load(path)
    answer = next(e for e in procedure.exercises if api.read(e.answer).fluid.model == "peng-robinson")
    ws = api.read(answer.answer)
    data = api.entry_data(api.attempt(ws))

    read = timed(lambda: load(path), max(1, n // 10), rounds)
    rules = timed(lambda: findings(procedure, ws, data), n, rounds)
    solve = timed(lambda: api.entry_data(api.attempt(ws)), max(1, n // 4), rounds)
    print(f"procedure {procedure.id}: {len(procedure.checks)} checks, {len(procedure.model_rules)} model rules, "
          f"{len(procedure.required())} required fields; exercise {answer.id} on {ws.fluid.model}")
    print(f"read and check the file      {read * 1e3:8.3f} ms")
    print(f"apply every rule to a solve  {rules * 1e3:8.3f} ms")
    print(f"the solve itself             {solve * 1e3:8.3f} ms")
    print(f"rules / budget ({BUDGET * 1e3:g} ms) = {rules / BUDGET:.3f}: {'met' if rules < BUDGET else 'NOT met'}")
    print(f"rules / solve = {rules / solve:.3f}")


if __name__ == "__main__":
    main()
