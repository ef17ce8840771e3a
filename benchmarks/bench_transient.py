"""A blowdown's history with 1,000 rows, on Peng-Robinson and on the reference model, against the
same integration written with direct CoolProp HEOS calls.

The case (the h2-buffer-blowdown sample, invented): 0.5 m3 of hydrogen at 30 barg and 25 °C blown
down to atmosphere through a 6 mm orifice (Cd 0.62), adiabatic, to 1 bar(g); 1,000 rows.

Targets (issue 11): <= 1 s on Peng-Robinson and <= 5 s on the reference model, the whole solve
(end state and history) through ``api.solve``. Beside them, the same history integrated with the
same solve_ivp settings, its right-hand side written with one CoolProp ``AbstractState`` (HEOS):
the tank at (ρ, T), the throat by CoolProp's own (P, s) flash, G = ρ_t sqrt(2 (h0 - h_t)) maximised
over the throat pressure by bounded Brent (choked) or taken at the back pressure (subcritical).
R rounds, interleaved; the medians and their ratios are printed. Not a test: machines here are
shared and noisy.

    python benchmarks/bench_transient.py [R]        (default 3 rounds)
"""

from __future__ import annotations

import math
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

TARGETS = {"peng-robinson": 1.0, "reference": 5.0}
"""seconds per solve"""
SAMPLE = ROOT / "samples" / "h2-buffer-blowdown.toml"
ROWS = 1000


def worksheet(model: str):
    from balance import api

    text = SAMPLE.read_text().replace('model = "reference"', f'model = "{model}"')
    return api.read(text + f'\n[history]\npoints = "{ROWS}"\n')


def ours(model: str) -> tuple[float, object]:
    from balance import api

    ws = worksheet(model)
    t = time.perf_counter()
    r = api.solve(ws)
    return time.perf_counter() - t, r


def direct() -> tuple[float, float, float]:
    """(seconds, t_end [s], lowest T [K]) of the same history with direct CoolProp HEOS calls."""
    import CoolProp.CoolProp as CP
    import numpy as np
    from scipy.integrate import solve_ivp
    from scipy.optimize import minimize_scalar

    AS = CP.AbstractState("HEOS", "Hydrogen")
    T0, P0, V, P_back = 298.15, 30e5 + 101325.0, 0.5, 101325.0
    P_end = 1e5 + 101325.0
    CdA = 0.62 * math.pi * 0.006 ** 2 / 4
    AS.update(CP.PT_INPUTS, P0, T0)
    n0 = V * AS.rhomolar()
    M = AS.molar_mass()

    def tank(n, T):
        AS.update(CP.DmolarT_INPUTS, n / V, T)
        return (AS.p(), AS.umolar(), AS.hmolar(), AS.smolar(), AS.cvmolar(),
                AS.first_partial_deriv(CP.iP, CP.iT, CP.iDmolar))

    def flux(P_up, h0, s0):
        def G(P):
            AS.update(CP.PSmolar_INPUTS, P, s0)
            return AS.rhomass() * math.sqrt(max(2.0 * (h0 - AS.hmolar()) / M, 0.0))
        r = minimize_scalar(lambda P: -G(P), bounds=(max(P_back, 0.2 * P_up), P_up * (1 - 1e-9)),
                            method="bounded", options={"xatol": 1e-9 * P_up})
        g_star, P_star = -r.fun, r.x
        return g_star if P_star > P_back else G(P_back)

    def rhs(t, y):
        n, T = y[0], y[1]
        P, u, h, s, cv, PT = tank(n, T)
        nd = -CdA * flux(P, h, s) / M
        v = V / n
        return [nd, (h * nd - u * nd + (T * PT - P) * v * nd) / (n * cv)]

    def ev(t, y):
        return tank(y[0], y[1])[0] - P_end
    ev.terminal, ev.direction = True, -1.0
    start = time.perf_counter()
    sol = solve_ivp(rhs, (0.0, 86400.0), [n0, T0], method="LSODA", rtol=1e-8, atol=[1e-12 * n0, 1e-9],
                    events=[ev], dense_output=True)
    rows = np.linspace(0.0, sol.t[-1], ROWS)
    T_rows = sol.sol(rows)[1]
    for n, T in sol.sol(rows).T:  # the same rows' pressures, as the solve computes them
        tank(n, T)
    return time.perf_counter() - start, float(sol.t[-1]), float(T_rows.min())


def main() -> None:
    rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    ours("peng-robinson"), ours("reference"), direct()  # warm: CoolProp loaded, models built
    times = {"peng-robinson": [], "reference": [], "direct": []}
    figures = {}
    for _ in range(rounds):
        for model in ("peng-robinson", "reference"):
            dt, r = ours(model)
            times[model].append(dt)
            figures[model] = (r.history.t_end, r.history.minimum("T").value, r.history.nfev)
        dt, t_end, T_min = direct()
        times["direct"].append(dt)
        figures["direct"] = (t_end, T_min, None)
    med = {k: statistics.median(v) for k, v in times.items()}
    print(f"blowdown of {SAMPLE.name}, {ROWS} rows, median of {rounds} rounds")
    for model in ("peng-robinson", "reference"):
        t_end, T_min, nfev = figures[model]
        ok = "meets" if med[model] <= TARGETS[model] else "MISSES"
        print(f"  {model:14s} {med[model]:7.3f} s  (target {TARGETS[model]:g} s: {ok});  t_end {t_end:8.2f} s,"
              f" lowest T {T_min:7.2f} K, {nfev} right-hand sides")
    t_end, T_min, _ = figures["direct"]
    print(f"  direct HEOS    {med['direct']:7.3f} s  (CoolProp PS flashes at the throat);  t_end {t_end:8.2f} s,"
          f" lowest T {T_min:7.2f} K")
    print(f"  ratio reference / direct HEOS: {med['reference'] / med['direct']:.2f};"
          f"  Peng-Robinson / direct HEOS: {med['peng-robinson'] / med['direct']:.2f}")


if __name__ == "__main__":
    main()
