"""The history of a transient in time: each vessel's amount and temperature (and its wall's),
integrated with scipy's ``solve_ivp`` until the end condition (an event).

Each vessel's gas is uniform (a lumped control volume). With n its amount, v = V/n,
Ė = Σ ṅ_in h_in - Σ ṅ_out h + Q̇ and ṅ = Σ ṅ_in - Σ ṅ_out, the energy balance
d(n u)/dt = Ė with u = u(T, v) gives the temperature's rate:

    n cv dT/dt = Ė - u ṅ + (T (∂P/∂T)_v - P) v ṅ

((∂u/∂v)_T = T (∂P/∂T)_v - P, dv/dt = -v ṅ/n). Gas leaves at the vessel's state
and enters at its source's (a supply's fixed state, the other vessel's). The flow
through a line is the model's own isentropic nozzle (:mod:`.nozzle`) from the
upstream stagnation state to the downstream pressure, times the restriction's
Cd A; a given rate is constant. No flow runs back into a supply or in from the
outside (each line is taken to hold a check valve there); between two vessels it
runs from the higher pressure to the lower.

Alongside, the integrator carries what each vessel took in and gave out (∫ṅh,
∫Q̇, ∫ṅs, ∫Q̇/T_b): the energy closure ∫ṅh dt + ∫Q̇ dt = Δ(n u), with Δ(n u)
from the model at the end state, checks the integration and the rate equation
above; S_gen follows from the entropy balance.

An evacuated vessel starts from a trace of gas (1e-9 of what the supply would put
in it) at the supply's temperature: its energy is below 1e-9 of the end's, and
the integrator (stiff at that start) passes it in its first steps.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ...errors import SolveError
from ...units import R
from .gas import WetState, tv_function
from .problem import BALANCED, OUTSIDE, SUPPLY, Problem

#: An evacuated vessel starts from this fraction of the amount the supply would put in it.
TRACE = 1e-9
#: A vessel is empty (and the history ends) below this fraction of its largest amount.
EMPTY = 1e-7


@dataclass(frozen=True)
class Extreme:
    """The lowest or highest value of a curve, and when."""

    value: float
    t: float
    where: str
    """the vessel (or wall) it is of"""


@dataclass
class History:
    """A transient in time."""

    t: np.ndarray
    """[s], the rows"""
    vessels: dict[str, dict[str, np.ndarray]]
    """vessel name -> 'T' [K], 'P' [Pa], 'm' [kg], 'n' [mol] (and 'T_wall' [K]) at each row"""
    lines: dict[str, dict[str, np.ndarray]]
    """line name -> 'mdot' [kg/s], 'choked' (1 or 0) at each row"""
    t_end: float
    reached: bool
    """whether the end condition was met (else it stopped at t_max, or on the reason)"""
    stop: str
    """why it ended, in words"""
    end_points: dict[str, object]
    """vessel name -> the Point at the end"""
    n_end: dict[str, float]
    n_start: dict[str, float]
    U_start: dict[str, float]
    S_start: dict[str, float]
    flows: dict[str, dict[str, float]]
    """vessel name -> 'E_in', 'E_out', 'Q', 'S_in', 'S_out', 'Q_over_T', 'n_in', 'n_out', 'Q_wall_outside'"""
    moved: dict[str, float]
    """line name -> mass through it [kg]"""
    T_wall_start: dict[str, float]
    T_wall_end: dict[str, float]
    extremes: dict[tuple[str, str, str], Extreme]
    """(vessel, 'T' or 'T_wall', 'min' or 'max') -> the extreme"""
    nfev: int
    settings_words: str

    # -- what an engineer asks of it -----------------------------------------------------------
    def minimum(self, key: str = "T") -> Extreme | None:
        """The lowest gas ('T') or wall ('T_wall') temperature of any vessel, and when."""
        found = [e for (_, k, w), e in self.extremes.items() if k == key and w == "min"]
        return min(found, key=lambda e: e.value) if found else None

    def maximum(self, key: str = "T") -> Extreme | None:
        found = [e for (_, k, w), e in self.extremes.items() if k == key and w == "max"]
        return max(found, key=lambda e: e.value) if found else None

    def closure(self, name: str) -> float:
        """|Δ(n u) - ∫ṅh dt - ∫Q̇ dt| of a vessel's gas, relative to the largest of |U1|, |U2|, the
        energies in and out, and n R T."""
        f = self.flows[name]
        U2 = self.n_end[name] * self.end_points[name].u
        U1 = self.U_start[name]
        T = self.end_points[name].T
        scale = max(abs(U1), abs(U2), abs(f["E_in"]), abs(f["E_out"]), abs(f["Q"]),
                    R * T * max(self.n_end[name], self.n_start[name], f["n_in"]), 1e-300)
        return abs(U2 - U1 - f["E_in"] + f["E_out"] - f["Q"]) / scale

    def S_gen(self, name: str) -> float:
        """The gas's entropy generated [J/K]: ΔS - ∫ṅ_in s_in + ∫ṅ_out s - ∫Q̇/T_b."""
        f = self.flows[name]
        S2 = self.n_end[name] * self.end_points[name].s
        return S2 - self.S_start[name] - f["S_in"] + f["S_out"] - f["Q_over_T"]


class _Layout:
    """Where each quantity sits in the integrator's vector."""

    PER_VESSEL = ("E_in", "E_out", "Q", "S_in", "S_out", "Q_over_T", "n_in", "n_out", "Q_wall_outside")

    def __init__(self, p: Problem):
        i = 0
        self.n, self.T, self.Tw, self.acc = {}, {}, {}, {}
        for v in p.vessels:
            self.n[v.name], self.T[v.name] = i, i + 1
            i += 2
            if v.wall is not None:
                self.Tw[v.name] = i
                i += 1
        for v in p.vessels:
            self.acc[v.name] = {k: i + j for j, k in enumerate(self.PER_VESSEL)}
            i += len(self.PER_VESSEL)
        self.moved = {}
        for line in p.lines:
            self.moved[line.name] = i
            i += 1
        self.size = i


def integrate(p: Problem, rtol: float | None = None) -> History:
    """The history to the end condition; raises SolveError (the integrator failing), with the time
    reached, and ends early (``reached`` False, ``stop`` saying why) at t_max, an empty vessel or the
    dome."""
    from scipy.integrate import solve_ivp

    s = p.settings
    rtol = rtol or s.rtol
    model, M = p.model, p.M
    tv = tv_function(model)
    L = _Layout(p)
    vessels = {v.name: v for v in p.vessels}

    supplies = {}
    for line in p.lines:
        if line.supply:
            pt = model.at_TP(*line.supply)
            supplies[line.name] = (pt.T, pt.v, pt.P, pt.h, pt.s)
    y0 = np.zeros(L.size)
    n_ref = {}
    for v in p.vessels:
        if v.n0 > 0:
            n, T = v.n0, v.T0
        else:
            n, T = _trace(p, v, vessels, supplies, tv)
        y0[L.n[v.name]], y0[L.T[v.name]] = n, T
        n_ref[v.name] = max(n, v.V / _smallest_v(p, supplies))
        if v.wall is not None:
            y0[L.Tw[v.name]] = v.T0
    start = {v.name: tv(y0[L.T[v.name]], v.V / y0[L.n[v.name]]) for v in p.vessels}

    from .nozzle import mass_flux

    natural = {}
    if any(v.wall is not None and v.wall.h_inside is None for v in p.vessels):
        from .wall import natural_convection
        natural = {v.name: natural_convection for v in p.vessels if v.wall is not None and v.wall.h_inside is None}
    from .wall import heat_rates

    last = {"t": 0.0}

    def states(y):
        out = {}
        for name, v in vessels.items():
            n, T = y[L.n[name]], y[L.T[name]]
            if not (n > 0 and T > 0):
                raise _Stopped(f"the gas in {name!r} left the model's range (n = {n:.3g} mol, T = {T:.3g} K)")
            vm = v.V / n
            out[name] = (T, vm, *tv(T, vm))
        return out

    def line_flow(line, st):
        """(ṅ [mol/s] from source to target, h, s of the gas moving [molar], choked)."""
        if line.source == SUPPLY:
            T0, v0, P0, h0, s0 = supplies[line.name]
            P_down = st[line.target][2]
            sign = 1.0
        else:
            up = st[line.source]
            T0, v0, P0, h0, s0 = up[0], up[1], up[2], up[4], up[5]
            P_down = line.back if line.target == OUTSIDE else st[line.target][2]
            sign = 1.0
            if line.target != OUTSIDE and P_down > P0:  # vessel to vessel, backwards
                down = st[line.target]
                T0, v0, P0, h0, s0, P_down = down[0], down[1], down[2], down[4], down[5], P0
                sign = -1.0
        if line.rate is not None:
            return sign * line.rate / M, h0, s0, False
        if not P0 > P_down:
            return 0.0, h0, s0, False
        throat = mass_flux(tv, M, T0, v0, P_down)
        return sign * line.restriction.CdA * throat.G / M, h0, s0, throat.choked

    def rhs(t, y):
        last["t"] = t
        st = states(y)
        dy = np.zeros_like(y)
        E = dict.fromkeys(vessels, 0.0)
        N = dict.fromkeys(vessels, 0.0)
        for line in p.lines:
            nd, h, s_, _ = line_flow(line, st)
            dy[L.moved[line.name]] = abs(nd) * M
            # the source loses it (a vessel), the target gains it (a vessel); nd < 0 runs backwards
            src, dst = (line.source, line.target) if nd >= 0 else (line.target, line.source)
            q = abs(nd)
            if src in vessels:
                a = L.acc[src]
                dy[a["E_out"]] += q * h
                dy[a["S_out"]] += q * s_
                dy[a["n_out"]] += q
                E[src] -= q * h
                N[src] -= q
            if dst in vessels:
                a = L.acc[dst]
                dy[a["E_in"]] += q * h
                dy[a["S_in"]] += q * s_
                dy[a["n_in"]] += q
                E[dst] += q * h
                N[dst] += q
        for name, v in vessels.items():
            T, vm, P, u, h, s_, cv, PT, _Pv = st[name]
            n = y[L.n[name]]
            core = E[name] - u * N[name] + (T * PT - P) * vm * N[name]
            a = L.acc[name]
            if v.heat == "isothermal":
                Q, Tb = -core, T
            elif v.heat == "given":
                Q, Tb = v.Q_rate(t), T
            elif v.heat == "wall":
                Tw = y[L.Tw[name]]
                h_in = v.wall.h_inside
                if h_in is None:
                    h_in = natural[name](model, T, P, Tw, v.wall.height)[0]
                Q, dTw = heat_rates(v.wall, T, Tw, h_in)
                dy[L.Tw[name]] = dTw
                dy[a["Q_wall_outside"]] = v.wall.mass * v.wall.cp * dTw + Q
                Tb = Tw
            else:
                Q, Tb = 0.0, T
            dy[L.n[name]] = N[name]
            dy[L.T[name]] = 0.0 if v.heat == "isothermal" else (core + Q) / (n * cv)
            dy[a["Q"]] = Q
            dy[a["Q_over_T"]] = Q / Tb
        return dy

    events = _events(p, L, vessels, supplies, tv, n_ref)
    t_end = p.end.value if p.end.kind == "t" else s.t_max
    try:
        sol = solve_ivp(rhs, (0.0, t_end), y0, method=s.method, rtol=rtol, atol=_atol(y0, L, p, n_ref),
                        events=[e for e, _ in events], dense_output=True)
    except _Stopped as exc:
        raise SolveError(f"the history stopped at about t = {last['t']:.4g} s: {exc}") from None
    except WetState as exc:
        raise SolveError(f"the history reaches the two-phase region at about t = {last['t']:.4g} s "
                         f"({exc.message}): a wet vessel or a condensing throat is not modelled here; the "
                         "history up to there can be had by ending it earlier (end.t or end.P)") from None
    if sol.status < 0:
        raise SolveError(f"the integrator failed at t = {sol.t[-1]:.4g} s: {sol.message}")
    stop, reached = "", False
    if sol.status == 1:
        k = next(i for i, te in enumerate(sol.t_events) if len(te))
        stop, reached = events[k][1], k == 0
    elif p.end.kind == "t":
        stop, reached = f"the end time {p.end.text} was reached", True
    else:
        stop = f"the end condition was not reached within t_max = {s.t_max:g} s"
    t_stop = float(sol.t[-1])
    t_rows = np.linspace(0.0, t_stop, s.points)
    Y = sol.sol(t_rows)
    Y[:, -1] = sol.y[:, -1]
    rows_v: dict[str, dict[str, np.ndarray]] = {}
    rows_l = {line.name: {"mdot": np.zeros(len(t_rows)), "choked": np.zeros(len(t_rows))} for line in p.lines}
    for name, v in vessels.items():
        rows_v[name] = {"T": Y[L.T[name]].copy(), "n": Y[L.n[name]].copy(), "P": np.zeros(len(t_rows))}
        rows_v[name]["m"] = rows_v[name]["n"] * M
        if v.wall is not None:
            rows_v[name]["T_wall"] = Y[L.Tw[name]].copy()
    for i in range(len(t_rows)):
        st = states(Y[:, i])
        for name in vessels:
            rows_v[name]["P"][i] = st[name][2]
        for line in p.lines:
            nd, _, _, choked = line_flow(line, st)
            rows_l[line.name]["mdot"][i] = nd * M
            rows_l[line.name]["choked"][i] = 1.0 if choked else 0.0
    extremes = _extremes(sol, rows_v, t_rows, L, vessels)
    y_end = sol.y[:, -1]
    end_points = {name: model.at_Tv(y_end[L.T[name]], v.V / y_end[L.n[name]]) for name, v in vessels.items()}
    flows = {name: {k: float(y_end[i]) for k, i in L.acc[name].items()} for name in vessels}
    return History(
        t=t_rows, vessels=rows_v, lines=rows_l, t_end=t_stop, reached=reached, stop=stop,
        end_points=end_points, n_end={name: float(y_end[L.n[name]]) for name in vessels},
        n_start={name: float(y0[L.n[name]]) for name in vessels},
        U_start={name: float(y0[L.n[name]] * start[name][1]) for name in vessels},
        S_start={name: float(y0[L.n[name]] * start[name][3]) for name in vessels},
        flows=flows, moved={line.name: float(y_end[L.moved[line.name]]) for line in p.lines},
        T_wall_start={name: float(y0[L.Tw[name]]) for name in L.Tw},
        T_wall_end={name: float(y_end[L.Tw[name]]) for name in L.Tw},
        extremes=extremes, nfev=int(sol.nfev), settings_words=s.words() if rtol == s.rtol else s.words() + f" (rtol {rtol:g})",
    )


class _Stopped(Exception):
    pass


def _trace(p: Problem, v, vessels, supplies, tv) -> tuple[float, float]:
    """The trace of gas an evacuated vessel starts from: TRACE of what its source would put in it,
    at the temperature the first gas in reaches (u = h of the source: the uniform-state fill at
    n -> 0; an isothermal vessel's own temperature), so the integrator starts where the gas already
    is and not on a jump."""
    line = next(ln for ln in p.lines if ln.target == v.name)
    if line.supply:
        _, v_src, _, h_src, _ = supplies[line.name]
        T = line.supply[0]
    else:
        src = vessels[line.source]
        v_src, T = src.V / src.n0, src.T0
        h_src = tv(T, v_src)[2]
    vm = v_src / TRACE
    if v.heat == "isothermal":  # held at its own temperature from the first gas in
        return v.V / vm, v.T0
    for _ in range(60):  # Newton on u(T, v) = h_src, du/dT = cv
        _, u, _, _, cv, _, _ = tv(T, vm)
        step = (u - h_src) / cv
        T = max(T - step, 0.5 * T)
        if abs(step) < 1e-12 * T:
            break
    return v.V / vm, T


def _smallest_v(p: Problem, supplies) -> float:
    """The smallest molar volume in sight (a supply's, a vessel's at the start) [m3/mol]."""
    vs = [sp[1] for sp in supplies.values()] + [v.V / v.n0 for v in p.vessels if v.n0 > 0]
    return min(vs)


def _atol(y0, L: _Layout, p: Problem, n_ref: dict[str, float]) -> np.ndarray:
    """Absolute tolerances by what each entry is: amounts against the largest amount, temperatures
    against 1e-9 K, energies against n R T."""
    atol = np.full(L.size, 1e-30)
    for v in p.vessels:
        n = n_ref[v.name]
        atol[L.n[v.name]] = 1e-12 * n
        atol[L.T[v.name]] = 1e-9
        if v.name in L.Tw:
            atol[L.Tw[v.name]] = 1e-9
        for k, i in L.acc[v.name].items():
            atol[i] = 1e-12 * n * (1.0 if k in ("n_in", "n_out") else R * 300.0)
    for i in L.moved.values():
        atol[i] = 1e-12 * max(n_ref.values()) * p.M
    return atol


def _events(p: Problem, L: _Layout, vessels, supplies, tv, n_ref):
    """The events that end a history: the end condition first (terminal), then the stops."""
    end = p.end
    watched = vessels[end.vessel]

    def pressure(y, name):
        v = vessels[name]
        return tv(y[L.T[name]], v.V / y[L.n[name]])[0]

    out = []
    if end.kind == "P":
        P0 = pressure_at_start(p, watched, supplies, tv, L)

        def ev(t, y):
            return pressure(y, end.vessel) - end.value
        ev.direction = 1.0 if end.value > P0 else -1.0
        out.append((ev, f"the pressure in {end.vessel!r} reached {end.text}"))
    elif end.kind == "m":
        def ev(t, y):
            return y[L.n[end.vessel]] * p.M - end.value
        ev.direction = 1.0 if end.value > watched.n0 * p.M else -1.0
        out.append((ev, f"the mass in {end.vessel!r} reached {end.text}"))
    elif end.kind == "balanced":
        lines = [ln for ln in p.lines if end.vessel in (ln.source, ln.target)]

        def gap(y, line):
            up = supplies[line.name][2] if line.source == SUPPLY else pressure(y, line.source)
            down = line.back if line.target == OUTSIDE else pressure(y, line.target)
            return abs(up - down) / max(up, down)

        def ev(t, y):
            return max(gap(y, line) for line in lines) - BALANCED
        ev.direction = -1.0
        out.append((ev, f"the flow stopped: the pressures across {'the line' if len(lines) == 1 else 'every line'} "
                        f"of {end.vessel!r} within {BALANCED:g} of each other"))
    else:  # end at a time: no event of its own; solve_ivp ends at the time
        def ev(t, y):
            return 1.0
        out.append((ev, ""))
    for name in vessels:
        def empty(t, y, name=name):
            return y[L.n[name]] - EMPTY * n_ref[name]
        empty.direction = -1.0
        out.append((empty, f"{name!r} emptied"))
    for ev, _ in out:
        ev.terminal = True
    return out


def pressure_at_start(p: Problem, v, supplies, tv, L) -> float:
    return tv(v.T0, v.V / v.n0)[0] if v.n0 > 0 else 0.0


def _extremes(sol, rows, t_rows, L: _Layout, vessels) -> dict[tuple[str, str, str], Extreme]:
    """Each temperature curve's lowest and highest value and when: the rows' extreme, refined between
    its neighbours on the integrator's own interpolant (bounded Brent), so an extreme between two
    rows is not missed by the resampling."""
    from scipy.optimize import minimize_scalar

    out = {}
    for name in vessels:
        keys = [("T", L.T[name])] + ([("T_wall", L.Tw[name])] if name in L.Tw else [])
        for key, idx in keys:
            curve = rows[name][key]
            for sign, which in ((1.0, "min"), (-1.0, "max")):
                i = int(np.argmin(sign * curve))
                best = Extreme(float(curve[i]), float(t_rows[i]), name)
                if 0 < i < len(curve) - 1:
                    lo, hi = t_rows[i - 1], t_rows[i + 1]
                    r = minimize_scalar(lambda t: sign * sol.sol(t)[idx], bounds=(lo, hi), method="bounded",
                                        options={"xatol": 1e-10 * max(hi, 1e-6)})
                    if sign * r.fun < sign * best.value:
                        best = Extreme(float(sign * r.fun), float(r.x), name)
                out[(name, key, which)] = best
    return out


__all__ = ["EMPTY", "TRACE", "Extreme", "History", "integrate"]
