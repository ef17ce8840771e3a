"""Time the vectorised cubic against a per-point loop over CoolProp's PR backend.

Run from the repository root:

    python benchmarks/bench_cubic.py [n_points]

What is timed (best of 3 runs each, one process):

* ours: ``Cubic.states_TP(T, P)`` for Peng-Robinson methane on n random
  gas and supercritical (T, P) points at once; it returns Z, h, s, cp (and
  every other property) as arrays;
* CoolProp 8.0: a Python loop over the same points with one low-level
  ``AbstractState("PR", "Methane")``: ``update(PT_INPUTS, P, T)`` then
  ``compressibility_factor()``, ``hmolar()``, ``smolar()``, ``cpmolar()``.
  Points where CoolProp's T-P solve raises are caught and counted (the
  exception is part of its cost).

Both use the same Tc, Pc, ω (taken from CoolProp's PR backend). Our
species' cp° is a quartic fitted to CoolProp HEOS's cp0 (the values do
not matter for timing; Z is compared as a sanity check). The target is
ours/CoolProp <= 1.0 per point.

Then the scaling of the vectorised path alone: ``states_TP`` on 1e5 and on
1e6 points of the same kind, best of 3 each; the cost per point at 1e6
must be no worse than at 1e5, and the peak memory the call allocates
(``tracemalloc``, which numpy reports to) at most twice its results'.
"""

from __future__ import annotations

import math
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import CoolProp.CoolProp as CP  # noqa: E402
from CoolProp.CoolProp import AbstractState  # noqa: E402

from balance.models.cubic import FORMS, Cubic  # noqa: E402
from balance.species import IdealGasHeatCapacity, Nasa7, Species  # noqa: E402

T_RANGE = (140.0, 450.0)  # [K]; methane Tc = 190.6 K
P_RANGE = (1e4, 1e7)  # [Pa], log-uniform; below Tc capped at 0.9 P_sat (gas only)
SEED = 1


def methane_pr() -> Cubic:
    cp = AbstractState("PR", "Methane")
    heos = AbstractState("HEOS", "Methane")
    T = np.linspace(150.0, 1000.0, 100)
    cp0_R = []
    for t in T:
        heos.update(CP.DmolarT_INPUTS, 1e-9, float(t))
        cp0_R.append(heos.cp0molar() / heos.gas_constant())
    c = tuple(np.polynomial.polynomial.polyfit(T, cp0_R, 4)) + (0.0, 0.0)
    sp = Species(id="methane", name="methane", formula="CH4", M=cp.molar_mass(), Tc=cp.T_critical(),
                 Pc=cp.p_critical(), omega=cp.acentric_factor(),
                 cp_ig=IdealGasHeatCapacity(nasa=Nasa7(100.0, 1000.0, 6000.0, c, c)))
    return Cubic(sp, FORMS["peng-robinson"])


def best_of(n: int, fn):
    times, out = [], None
    for _ in range(n):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def coolprop_loop(T: np.ndarray, P: np.ndarray):
    state = AbstractState("PR", "Methane")
    update, PT = state.update, CP.PT_INPUTS
    Z, h, s, cp = (np.empty(T.size) for _ in range(4))
    failed = 0
    for i, (t, p) in enumerate(zip(T.tolist(), P.tolist())):
        try:
            update(PT, p, t)
        except ValueError:
            failed += 1
            Z[i] = h[i] = s[i] = cp[i] = math.nan
            continue
        Z[i] = state.compressibility_factor()
        h[i] = state.hmolar()
        s[i] = state.smolar()
        cp[i] = state.cpmolar()
    return Z, h, s, cp, failed


def main(n: int = 100_000) -> float:
    model = methane_pr()
    rng = np.random.default_rng(SEED)
    T = rng.uniform(*T_RANGE, n)
    # gas points: below Tc, P under 0.9 of our saturation pressure (interpolated in ln P)
    Tc = model.species.Tc
    T_grid = np.linspace(T_RANGE[0], 0.999 * Tc, 60)
    lnP_sat = np.interp(T, T_grid, [math.log(model.saturation(t)[0]) for t in T_grid])
    P_max = np.where(T < Tc, np.minimum(P_RANGE[1], 0.9 * np.exp(lnP_sat)), P_RANGE[1])
    u = rng.uniform(0.0, 1.0, n)
    P = np.exp(math.log(P_RANGE[0]) + u * (np.log(P_max) - math.log(P_RANGE[0])))
    assert np.all(model.states_TP(T[T < Tc], P[T < Tc])["v"] > model.vc_eos)  # vapour roots below Tc

    model.states_TP(T[:10], P[:10])  # warm-up (imports, caches)
    t_ours, ours = best_of(3, lambda: model.states_TP(T, P))
    t_cp, (Z_cp, _, _, _, failed) = best_of(3, lambda: coolprop_loop(T, P))

    ok = np.isfinite(Z_cp)
    dZ = float(np.max(np.abs(ours["Z"][ok] / Z_cp[ok] - 1.0)))
    ratio = t_ours / t_cp
    print(f"Peng-Robinson methane, {n:,} random gas (T, P): T {T_RANGE[0]:g}-{T_RANGE[1]:g} K "
          f"({np.mean(T < Tc):.0%} below Tc), P {P_RANGE[0]:g}-{P_RANGE[1]:g} Pa; best of 3 runs each")
    print(f"  ours     Cubic.states_TP (Z, h, s, cp, ... as arrays): {t_ours * 1e3:9.2f} ms  "
          f"= {t_ours / n * 1e6:8.3f} µs per point")
    print(f"  CoolProp AbstractState('PR') update(PT) + 4 reads, loop: {t_cp * 1e3:9.2f} ms  "
          f"= {t_cp / n * 1e6:8.3f} µs per point  ({failed} points raised)")
    print(f"  ratio ours / CoolProp = {ratio:.3f}  (target <= 1.0: {'met' if ratio <= 1.0 else 'MISSED'})")
    print(f"  sanity: worst relative Z difference where CoolProp solved = {dZ:.1e}")
    scaling(model)
    return ratio


def points(model, n: int, seed: int):
    rng = np.random.default_rng(seed)
    T = rng.uniform(1.05, 3.0, n) * model.species.Tc
    P = np.exp(rng.uniform(math.log(P_RANGE[0]), math.log(P_RANGE[1]), n))
    return T, P


def scaling(model) -> None:
    import tracemalloc

    print("  the vectorised path alone, supercritical gas (T, P):")
    per_point = {}
    for n in (100_000, 1_000_000):
        T, P = points(model, n, SEED + 1)
        t, out = best_of(3, lambda: model.states_TP(T, P))
        results = sum(a.nbytes for a in out.values())
        del out
        tracemalloc.start()
        model.states_TP(T, P)
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        per_point[n] = t / n
        print(f"    {n:>9,} points: {t * 1e3:8.1f} ms = {t / n * 1e6:6.3f} µs per point; peak {peak / 2**20:6.1f} MiB "
              f"for {results / 2**20:6.1f} MiB of results = {peak / results:.2f}x (target <= 2)")
    r = per_point[1_000_000] / per_point[100_000]
    print(f"    cost per point at 1e6 / at 1e5 = {r:.2f} (target <= 1.0: {'met' if r <= 1.0 else 'MISSED'}; "
          "within a few per cent is noise)")


if __name__ == "__main__":
    main(int(float(sys.argv[1])) if len(sys.argv) > 1 else 100_000)
