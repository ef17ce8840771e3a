"""What a cubic mixture's state costs: a 10-component natural gas on Peng-Robinson, at (T, P),
with the tangent-plane stability test that every state passes.

Printed, each the median of R rounds:

- the vectorised path, ``states_TP`` on N random gas states (properties and the stability test
  of every one), per state, against its budget of 200 µs;
- the scalar path, ``at_TP`` (the same) on the first 200 one-phase states, per call, against CoolProp's PR mixture backend
  (``AbstractState("PR", ...)``, the same constants and kij, a T-P update and h read) per call,
  and the ratio to it against its bound of 20; also against that backend with the gas phase
  imposed (no phase search of its own, the equation's cost alone: the harder comparison);
- the stability test alone, scalar, per state; and a state inside the envelope (the test finds
  the split; the flash and the dew point are what a refusal adds, timed once).

The gas is an invented lean analysis with a heavy tail, so the test has work to do near the
cold states. Not a test: machines here are shared and noisy.

    python benchmarks/bench_mixture.py [N] [R]    (default 2000 states, 5 rounds)
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from benchmarks.timing import timed  # noqa: E402  (after the path: run as a script)

#: An invented 10-component natural gas (mole fractions).
GAS = {"CH4": 0.8710, "C2H6": 0.0550, "C3H8": 0.0210, "iC4H10": 0.0040, "nC4H10": 0.0060, "iC5H12": 0.0015,
       "nC5H12": 0.0012, "nC6H14": 0.0008, "N2": 0.0195, "CO2": 0.0200}
VECTOR_BUDGET = 200e-6
"""[s] per state in the vectorised path"""
SCALAR_BOUND = 20.0
"""scalar call at most this many times CoolProp's PR mixture backend's"""


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 2000
    rounds = int(sys.argv[2]) if len(sys.argv) > 2 else 5
    import CoolProp.CoolProp as CP
    import numpy as np

    from balance.mixture import mixture
    from balance.models import make_model
    from balance.models.cubic.phases import describe_split, stability
    from balance.species import lookup

    sp = mixture(tuple((lookup(k), y) for k, y in GAS.items()), "benchmark gas")
    model = make_model("peng-robinson", sp)
    rng = np.random.default_rng(7)
    T = rng.uniform(240.0, 420.0, n)
    P = rng.uniform(1e5, 120e5, n)

    out = model.states_TP(T, P)  # first call: nothing cached that the timing then gains
    vector = timed(lambda: model.states_TP(T, P), 1, rounds) / n
    one = np.flatnonzero(out["stable"])[:200]  # the scalar path returns these; it refuses the others
    pairs = list(zip(T[one].tolist(), P[one].tolist()))
    k = len(pairs)

    def scalar_all():
        for t, p in pairs:
            model.at_TP(t, p)

    scalar = timed(scalar_all, 1, rounds) / k

    cp = CP.AbstractState("PR", "&".join(c.coolprop for c in model.components))
    cp.set_mole_fractions(list(model.z))
    kij = 1.0 - model.mixing.M
    for i in range(len(model.z)):
        for j in range(i + 1, len(model.z)):
            if kij[i, j]:
                cp.set_binary_interaction_double(i, j, "kij", float(kij[i, j]))

    def coolprop_all():
        for t, p in pairs:
            cp.update(CP.PT_INPUTS, p, t)
            cp.hmolar()

    coolprop = timed(coolprop_all, 1, rounds) / k
    cp.specify_phase(CP.iphase_gas)  # no phase search of its own: the equation's cost alone
    imposed = timed(coolprop_all, 1, rounds) / k
    cp.unspecify_phase()

    def stability_all():
        for t, p in pairs:
            stability(model.mixing, t, p, model.z)

    test = timed(stability_all, 1, rounds) / k
    t0 = time.perf_counter()
    refusal = describe_split(model, 230.0, 40e5)
    split = time.perf_counter() - t0

    print(f"10-component gas on Peng-Robinson, {n} random states (240-420 K, 1-120 bar), "
          f"{int(out['stable'].sum())} of them one phase; median of {rounds} rounds")
    print(f"  vectorised states_TP with the stability test: {vector * 1e6:8.2f} µs/state   "
          f"ratio to the 200 µs budget {vector / VECTOR_BUDGET:.3f}")
    print(f"  scalar at_TP with the stability test:         {scalar * 1e6:8.2f} µs/call")
    print(f"  CoolProp 8 PR mixture backend, T-P update:    {coolprop * 1e6:8.2f} µs/call   "
          f"ratio ours/CoolProp {scalar / coolprop:.3f} (bound {SCALAR_BOUND:g})")
    print(f"  CoolProp, the gas phase imposed (no test):    {imposed * 1e6:8.2f} µs/call   "
          f"ratio ours (with the test)/CoolProp (without) {scalar / imposed:.3f}")
    print(f"  the stability test alone:                     {test * 1e6:8.2f} µs/state")
    print(f"  a refusal inside the envelope (230 K, 40 bar: flash and dew point): {split * 1e3:.1f} ms")
    print(f"    {refusal[:110]}...")


if __name__ == "__main__":
    main()
