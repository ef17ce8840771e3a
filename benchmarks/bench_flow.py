"""In-process steady-flow solve of a ten-device chain on Peng-Robinson, against the same chain by hand
with CoolProp HEOS.

The chain (methane, an invented booster-and-letdown rig): compressor, aftercooler, compressor,
aftercooler, letdown valve, heater, turbine, heater, expander, valve — each machine given its
isentropic efficiency, each heater or cooler its outlet temperature, each valve its outlet pressure.

Targets (issue 10): the solve, the app's path (``api.check`` then ``api.solve`` of the worksheet it
holds), <= 50 ms; and <= 20 times the same chain computed with direct CoolProp HEOS calls (one
``AbstractState``, the published device definitions applied with PT, PSmass and HmassP flashes:
h2s = h(P2, s1), h2 = h1 + (h2s - h1)/η or h1 - η (h1 - h2s), Q = ṁ (h2 - h1), a valve at h1).
The two are interleaved, R rounds of N chains each; the medians and their ratio are printed, and
where the time goes (cProfile, own time). Not a test: machines here are shared and noisy.

    python benchmarks/bench_flow.py [N] [R]        (default 20 chains, 7 rounds)
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

TARGET_MS = 50.0
"""milliseconds per solve, in process"""
TARGET_RATIO = 20.0
"""times the direct CoolProp HEOS chain"""

FEED = (300.0, 5e5, 0.5)  # T [K], P [Pa], mass rate [kg/s]
#: The chain: (name, kind, outlet P [Pa] or None, outlet T [K] or None, efficiency or None)
CHAIN = (
    ("K-1", "compressor", 20e5, None, 0.80),
    ("E-1", "cooler", None, 310.0, None),
    ("K-2", "compressor", 60e5, None, 0.78),
    ("E-2", "cooler", None, 300.0, None),
    ("PCV-1", "valve", 40e5, None, None),
    ("H-1", "heater", None, 350.0, None),
    ("T-1", "turbine", 10e5, None, 0.85),
    ("H-2", "heater", None, 320.0, None),
    ("X-1", "expander", 3e5, None, 0.80),
    ("PCV-2", "valve", 1.5e5, None, None),
)


def worksheet_text() -> str:
    T, P, m = FEED
    out = ['[worksheet]\ntitle = "Booster and letdown rig (benchmark)"\n[fluid]\nspecies = "CH4"\n'
           'model = "peng-robinson"\n[system]\nkind = "steady-flow"\n',
           f'[[stream]]\nname = "s0"\nT = "{T} K"\nP = "{P} Pa"\nrate = "{m} kg/s"\n']
    for i, (_, _, P2, T2, _) in enumerate(CHAIN, 1):
        out.append(f'[[stream]]\nname = "s{i}"\n' + (f'P = "{P2} Pa"\n' if P2 else "") + (f'T = "{T2} K"\n' if T2 else ""))
    for i, (name, kind, _, _, eta) in enumerate(CHAIN, 1):
        out.append(f'[[device]]\nname = "{name}"\nkind = "{kind}"\ninlets = ["s{i - 1}"]\noutlets = ["s{i}"]\n')
        if eta:
            out.append(f'eta = "{eta}"\nW = "?"\n')
        elif kind in ("heater", "cooler"):
            out.append('Q = "?"\n')
    return "".join(out)


def by_domain(api, ws):
    checked = api.check(ws)
    if not checked.ready:
        raise SystemExit(f"the chain does not check: {checked.message}")
    return api.solve(checked)


def by_coolprop(state, CP):
    """The chain with CoolProp HEOS, by the published definitions: [(T2, W or Q)] per device."""
    T, P, m = FEED
    state.update(CP.PT_INPUTS, P, T)
    h, s = state.hmass(), state.smass()
    out = []
    for _, kind, P2, T2, eta in CHAIN:
        if kind in ("heater", "cooler"):
            state.update(CP.PT_INPUTS, P, T2)
            h2 = state.hmass()
            out.append((T2, m * (h2 - h)))
        elif kind == "valve":
            state.update(CP.HmassP_INPUTS, h, P2)
            h2 = h
            out.append((state.T(), 0.0))
            P = P2
        else:
            state.update(CP.PSmass_INPUTS, P2, s)
            h2s = state.hmass()
            h2 = h + (h2s - h) / eta if kind == "compressor" else h - eta * (h - h2s)
            state.update(CP.HmassP_INPUTS, h2, P2)
            out.append((state.T(), m * (h2 - h)))
            P = P2
        h, s = h2, state.smass()
    return out


def timed(job, n: int) -> float:
    t0 = time.perf_counter()
    for _ in range(n):
        job()
    return (time.perf_counter() - t0) / n


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 20
    rounds = int(sys.argv[2]) if len(sys.argv) > 2 else 7
    import CoolProp.CoolProp as CP

    from balance import api

    ws = api.read(worksheet_text())
    state = CP.AbstractState("HEOS", "Methane")
    result = by_domain(api, ws)  # warm: the unit registry, the cubic's saturation curve, CoolProp's tables
    by_coolprop(state, CP)
    print(f"{len(CHAIN)} devices on methane: {rounds} rounds of {n} chains, interleaved")
    ref = by_coolprop(state, CP)
    print("  device   kind         T out PR [K]  T out HEOS [K]   (W or Q) PR [kW]  HEOS [kW]")
    for (name, kind, *_), d, (T2, E) in zip(CHAIN, result.devices, ref):
        f = result.flows[d.outlets[0]]
        print(f"  {name:8s} {kind:11s} {f.point.T:13.3f} {T2:15.3f} {(d.W_dot or d.Q_dot) / 1e3:17.3f} {E / 1e3:10.3f}")
    ours, theirs = [], []
    for _ in range(rounds):
        ours.append(timed(lambda: by_domain(api, ws), n))
        theirs.append(timed(lambda: by_coolprop(state, CP), n))
    mine, direct = statistics.median(ours), statistics.median(theirs)
    print(f"\njoulebook (api.check + api.solve, Peng-Robinson): median {1e3 * mine:7.2f} ms a chain, "
          f"best {1e3 * min(ours):7.2f} ms; target {TARGET_MS:.0f} ms: median / target {1e3 * mine / TARGET_MS:5.2f}")
    print(f"direct CoolProp HEOS (AbstractState, by hand):     median {1e3 * direct:7.2f} ms a chain, "
          f"best {1e3 * min(theirs):7.2f} ms")
    print(f"ratio joulebook / CoolProp HEOS: {mine / direct:5.2f} (target <= {TARGET_RATIO:.0f}: "
          f"{'met' if mine / direct <= TARGET_RATIO else 'MISSED'}); per-solve target "
          f"{'met' if 1e3 * mine <= TARGET_MS else 'MISSED'}")

    profile = cProfile.Profile()
    profile.enable()
    for _ in range(n):
        by_domain(api, ws)
    profile.disable()
    out = io.StringIO()
    pstats.Stats(profile, stream=out).sort_stats("tottime").print_stats(15)
    print("\nmost costly functions of the solve (own time, cProfile):")
    print("\n".join(out.getvalue().splitlines()[6:24]))


if __name__ == "__main__":
    main()
