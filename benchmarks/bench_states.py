"""One state per call, from (T, P) and from (T, v): ours against CoolProp's cubic backends.

Run from the repository root:

    python benchmarks/bench_states.py [rounds]

What is timed, per call, in one process, the two sides interleaved round by
round (the figure is the median over rounds of each round's own ratio, so
a noisy neighbour slows both sides of a round alike):

* ours: ``Cubic.at_TP(T, P)`` and ``Cubic.at_Tv(T, v)`` for Peng-Robinson and
  Soave-Redlich-Kwong methane and CO2, each returning a ``Point`` with every
  property (P, v, u, h, s, cv, cp, Z, the three departures, ln φ);
* CoolProp: one ``AbstractState("PR" | "SRK", fluid)``: ``update(PT_INPUTS,
  P, T)`` (or ``DmolarT_INPUTS``) and then the same properties read one by
  one (rhomolar, umolar, hmolar, smolar, cvmolar, cpmolar,
  compressibility_factor, fugacity_coefficient): asking CoolProp for less
  than ours returns would flatter it. Where three volume roots exist
  CoolProp's (T, P) solve refuses to choose; there it is told the phase
  ours found (``specify_phase``), which it then keeps to.

The states: gas, liquid and supercritical (T, P) pairs outside the dome.
Target (issue 8): ours <= 3x CoolProp per call.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import CoolProp.CoolProp as CP  # noqa: E402

from balance.models import make_model  # noqa: E402
from balance.species import lookup  # noqa: E402

CASES = (("peng-robinson", "PR", "CH4", "Methane"), ("soave-redlich-kwong", "SRK", "CH4", "Methane"),
         ("peng-robinson", "PR", "CO2", "CarbonDioxide"), ("soave-redlich-kwong", "SRK", "CO2", "CarbonDioxide"))
TARGET = 3.0


def states(model, AS) -> list[tuple[float, float, float, int | None]]:
    """(T, P, v, the phase CoolProp must be told or None) of gas, liquid and supercritical states."""
    points = []
    Tc, Pc = model.Tc_eos, model.Pc_eos
    for Tr in (0.6, 0.75, 0.9):
        Ps = model.saturation(Tr * Tc)[0]
        points += [model.at_TP(Tr * Tc, ratio * Ps) for ratio in (0.1, 0.5, 0.9, 1.2, 3.0, 10.0)]
    for Tr in (1.1, 1.5, 2.5):
        points += [model.at_TP(Tr * Tc, Pr * Pc) for Pr in (0.1, 0.8, 2.0, 5.0)]
    out = []
    for p in points:
        try:
            AS.update(CP.PT_INPUTS, p.P, p.T)
            phase = None
        except ValueError:  # three roots: CoolProp will not choose
            phase = CP.iphase_liquid if p.phase == "liquid" else CP.iphase_gas
        out.append((p.T, p.P, p.v, phase))
    return out


def time_per_call(fn, points, repeat: int) -> float:
    t0 = time.perf_counter()
    for _ in range(repeat):
        for p in points:
            fn(p)
    return (time.perf_counter() - t0) / (repeat * len(points))


def main(rounds: int = 9) -> None:
    print(f"one state per call, {rounds} interleaved rounds; figure = median of per-round ratios (ours / CoolProp)")
    print(f"{'model':22s} {'fluid':6s} {'input':6s} {'ours µs':>9s} {'CoolProp µs':>12s} {'ratio':>7s}  target <= {TARGET:g}")
    worst = 0.0
    for name, backend, sid, fluid in CASES:
        model = make_model(name, lookup(sid))
        AS = CP.AbstractState(backend, fluid)
        pts = states(model, AS)

        def read(AS=AS):
            return (AS.rhomolar(), AS.umolar(), AS.hmolar(), AS.smolar(), AS.cvmolar(), AS.cpmolar(),
                    AS.compressibility_factor(), AS.fugacity_coefficient(0))

        def cp_TP(p, AS=AS, read=read):
            if p[3] is None:
                AS.update(CP.PT_INPUTS, p[1], p[0])
            else:
                AS.specify_phase(p[3])
                AS.update(CP.PT_INPUTS, p[1], p[0])
                AS.unspecify_phase()
            return read()

        def cp_Tv(p, AS=AS, read=read):
            AS.update(CP.DmolarT_INPUTS, 1.0 / p[2], p[0])
            return read()

        for label, ours, theirs in (("(T,P)", lambda p, m=model: m.at_TP(p[0], p[1]), cp_TP),
                                    ("(T,v)", lambda p, m=model: m.at_Tv(p[0], p[2]), cp_Tv)):
            ratios, t_ours, t_cp = [], [], []
            for _ in range(rounds):
                a = time_per_call(ours, pts, 40)
                b = time_per_call(theirs, pts, 40)
                ratios.append(a / b)
                t_ours.append(a)
                t_cp.append(b)
            r = statistics.median(ratios)
            worst = max(worst, r)
            print(f"{name:22s} {sid:6s} {label:6s} {statistics.median(t_ours) * 1e6:9.2f} "
                  f"{statistics.median(t_cp) * 1e6:12.2f} {r:7.2f}")
    print(f"worst ratio {worst:.2f} (target <= {TARGET:g}): {'met' if worst <= TARGET else 'NOT met'}")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 9)
