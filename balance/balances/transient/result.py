"""A solved transient: the end state without time, the history in time, and what is checked.

Both levels where the worksheet allows them: the uniform-state end state (no
time) and the history through the lines' restrictions. The history's end is
held against the end state where both are adiabatic (the same balance, found
two ways); its energy closure and entropy generation are recomputed from the
model at the end state. The cautions are the usual ones of a result that can
hurt someone: pressure, low temperature (brittle fracture) during a blowdown,
the depressuring time relief standards ask for, and the heating limit of a
composite tank in a fast fill; each defers to the code that applies.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ...errors import InputError, SolveError
from ...state import quantity
from ...units import R
from ..cautions import DISCLAIMER, LOW_TEMPERATURE_K, Caution
from ..control_volume import number
from .end_state import EndState, case_of, end_state
from .history import History, integrate
from .problem import BALANCED, OUTSIDE, SUPPLY, Problem

#: The energy closure of a history must be below this (relative).
CLOSURE_LIMIT = 1e-6
#: Composite (type III and IV) tanks are commonly held to this gas temperature in a fast fill
#: [K] (85 °C: common practice in fuelling protocols; from memory).
COMPOSITE_LIMIT_K = 358.15
#: Rows of the history a record and the JSON keep (the CSV keeps every row).
RECORD_ROWS = 41


@dataclass(frozen=True)
class Result:
    """A solved transient, every value in SI."""

    problem: Problem
    end_state: EndState | None
    end_state_why: str
    """why there is no end state without time ('' when there is one)"""
    history: History | None
    history_why: str
    equations: tuple[str, ...]
    warnings: tuple[str, ...]
    cautions: tuple[Caution, ...]

    @property
    def case(self) -> str:
        return case_of(self.problem)[0] or "combined"

    def end_points(self) -> dict[str, tuple[object, float]]:
        """Each vessel's end state (Point, n [mol]): the history's where there is one."""
        if self.history is not None:
            h = self.history
            return {name: (h.end_points[name], h.n_end[name]) for name in h.end_points}
        return {v.name: (v.end, v.n2) for v in self.end_state.vessels}

    @property
    def S_gen(self) -> float:
        if self.history is not None:
            return sum(self.history.S_gen(name) for name in self.history.end_points)
        return self.end_state.S_gen

    def as_json(self) -> dict:
        """Everything in the result; quantities as {"value", "unit"} (SI)."""
        p = self.problem
        M = p.M
        out: dict = {"title": p.worksheet.heading.title, "kind": "transient", "case": self.case,
                     "end": p.end.words(), "model": p.model.name, "species": p.model.species.id}
        if p.model.species.composition:
            out["composition"] = dict(p.model.species.composition)
        if self.end_state is not None:
            e = self.end_state
            out["end_state"] = {
                "heat": e.heat, "adiabatic_bound": e.bound, "S_gen": quantity(e.S_gen, "J/K"),
                "residual": e.residual,
                "vessels": {v.name: {
                    "V": quantity(v.V, "m**3"), "m1": quantity(v.n1 * M, "kg"), "m2": quantity(v.n2 * M, "kg"),
                    "T1": quantity(v.start.T if v.start else None, "K"),
                    "P1": quantity(v.start.P if v.start else None, "Pa"),
                    "T2": quantity(v.end.T, "K"), "P2": quantity(v.end.P, "Pa"),
                    "u2": quantity(v.end.u, "J/mol"), "s2": quantity(v.end.s, "J/(mol*K)"),
                    "Q": quantity(v.Q, "J"), "m_in": quantity(v.n_in * M, "kg"), "m_out": quantity(v.n_out * M, "kg"),
                    "S_gen": quantity(v.S_gen, "J/K"),
                } for v in e.vessels},
            }
        else:
            out["end_state_why"] = self.end_state_why
        if self.history is not None:
            out["history"] = history_json(self.history, M)
        else:
            out["history_why"] = self.history_why
        out.update(S_gen=quantity(self.S_gen, "J/K"), equations=list(self.equations),
                   warnings=list(self.warnings), cautions=[c.text() for c in self.cautions])
        return out


def history_json(h: History, M: float) -> dict:
    """The history's figures and a table of RECORD_ROWS rows resampled from its rows."""
    import numpy as np

    idx = np.unique(np.linspace(0, len(h.t) - 1, RECORD_ROWS).round().astype(int))
    extremes = {f"{name} {key} {which}": {"value": quantity(e.value, "K"), "t": quantity(e.t, "s")}
                for (name, key, which), e in h.extremes.items()}
    table = {"t [s]": [float(h.t[i]) for i in idx]}
    for name, c in h.vessels.items():
        table[f"{name} T [K]"] = [float(c["T"][i]) for i in idx]
        table[f"{name} P [Pa]"] = [float(c["P"][i]) for i in idx]
        table[f"{name} m [kg]"] = [float(c["m"][i]) for i in idx]
        if "T_wall" in c:
            table[f"{name} T_wall [K]"] = [float(c["T_wall"][i]) for i in idx]
    for name, c in h.lines.items():
        table[f"{name} mdot [kg/s]"] = [float(c["mdot"][i]) for i in idx]
    return {
        "settings": h.settings_words, "t_end": quantity(h.t_end, "s"), "reached": h.reached, "stop": h.stop,
        "extremes": extremes,
        "vessels": {name: {"T2": quantity(pt.T, "K"), "P2": quantity(pt.P, "Pa"),
                           "m2": quantity(h.n_end[name] * M, "kg"), "closure": h.closure(name),
                           "S_gen": quantity(h.S_gen(name), "J/K"), "Q": quantity(h.flows[name]["Q"], "J"),
                           **({"T_wall2": quantity(h.T_wall_end[name], "K")} if name in h.T_wall_end else {})}
                    for name, pt in h.end_points.items()},
        "moved": {name: quantity(m, "kg") for name, m in h.moved.items()},
        "evaluations": h.nfev, "rows": table,
    }


def result_of(p: Problem) -> Result:
    """Both levels, the checks between them, warnings and cautions."""
    try:
        end, end_why = end_state(p)
    except (InputError, SolveError) as exc:  # a wet end state, no root: said, and the history tried
        end, end_why = None, f"the end state without time cannot be had: {exc}"
    history, history_why = None, ""
    if p.timed:
        try:
            history = integrate(p)
        except SolveError as exc:
            if end is None:
                raise SolveError(f"{end_why}; and {exc}") from None
            history_why = str(exc)
    else:
        untimed = next(line for line in p.lines if not line.timed)
        history_why = (f"line '{untimed.name}' has no restriction or rate: the end state alone (give it an "
                       "orifice, a valve's Cv or Kv, or a rate for the history in time)")
    if end is None and history is None:
        raise SolveError(end_why)
    warnings = _warnings(p, end, history)
    if history_why and p.timed:
        warnings.insert(0, f"no history: {history_why}")
    if end is None and end_why.startswith("the end state without time cannot"):
        warnings.insert(0, end_why)
    return Result(p, end, end_why, history, history_why, tuple(_equations(p, end, history)), tuple(warnings),
                  tuple(_cautions(p, end, history)))


# -- words -----------------------------------------------------------------------------------
def _equations(p: Problem, end: EndState | None, h: History | None) -> list[str]:
    out = [f"model: {p.model.label}", *p.model.equations(),
           "each vessel's gas uniform: d(n u)/dt = Σ ṅ_in h_in - Σ ṅ_out h + Q̇,  dn/dt = Σ ṅ_in - Σ ṅ_out",
           f"end: {p.end.words()}"]
    for line in p.lines:
        where = "the supply" if line.source == SUPPLY else repr(line.source)
        to = f"the outside at {number(line.back)} Pa ({line.back_words})" if line.target == OUTSIDE else repr(line.target)
        how = (line.restriction.words if line.restriction is not None
               else f"a given rate of {number(line.rate)} kg/s" if line.rate is not None else "no restriction given")
        out.append(f"line '{line.name}': from {where} to {to}; {how}")
    if end is not None:
        head = "end state without time (the integrated uniform-state balance"
        head += ", adiabatic: the wall's or given heat is left out, a bound)" if end.bound else f", {end.heat})"
        out.append(head + ":")
        out += [f"  {e}" for e in end.equations]
        out.append(f"  energy balance recomputed from the states: residual {end.residual:.2g} (relative)")
    if h is not None:
        out += ["history in time:",
                "  n cv dT/dt = Ė - u ṅ + (T (∂P/∂T)_v - P) v ṅ  (the energy balance with u = u(T, v))",
                "  flow through a restriction: the model's isentropic nozzle from the upstream stagnation state, "
                "ṁ = Cd A ρ_t w_t, choked where the throat reaches sonic speed",
                f"  {h.settings_words}; {h.stop} at t = {number(h.t_end)} s"]
        for name in h.end_points:
            f = h.flows[name]
            out.append(f"  {name!r}: ∫ṁh_in = {number(f['E_in'])} J, ∫ṁh_out = {number(f['E_out'])} J, ∫Q̇ = "
                       f"{number(f['Q'])} J; Δ(n u) = {number(h.n_end[name] * h.end_points[name].u - h.U_start[name])}"
                       f" J: {_closure_words(h.closure(name))}")
            out.append(f"  {name!r}: S_gen = ΔS - ∫ṅ_in s_in + ∫ṅ_out s - ∫Q̇/T_b = {_entropy_words(h, name)}")
        if end is not None and not end.bound and h.reached:
            for v in end.vessels:
                pt = h.end_points[v.name]
                dT, dP = abs(pt.T - v.end.T), abs(pt.P - v.end.P) / v.end.P
                if dT < AGREES_K and dP < AGREES_P:
                    out.append(f"  {v.name!r}: the history ends on the end state without time (within "
                               f"{AGREES_K:g} K and {AGREES_P:.1%} of its pressure)")
                else:
                    out.append(f"  {v.name!r}: the history ends {dT:.3g} K and {dP:.2%} in pressure from the end "
                               "state without time" + (" (it stops when the flow is within "
                                                       f"{BALANCED:g} of balanced)" if p.end.kind == "balanced" else ""))
    return out


#: The history ends on the end state without time where they agree this well (an integration to
#: rtol 1e-8 against a root found to round-off).
AGREES_K, AGREES_P = 0.01, 1e-3


def _closure_words(closure: float) -> str:
    """The closure in words that do not change with the integrator's last digits."""
    if closure < CLOSURE_LIMIT * 1e-2:
        return f"closes to better than {CLOSURE_LIMIT * 1e-2:g} (limit {CLOSURE_LIMIT:g})"
    return f"closure {closure:.2g} (limit {CLOSURE_LIMIT:g})"


def _entropy_words(h: History, name: str) -> str:
    """S_gen of a vessel's gas; within the integration's own accuracy of n R it is said to be zero."""
    S = h.S_gen(name)
    scale = R * max(h.n_start[name], h.n_end[name])
    if abs(S) < 1e-7 * scale:
        return "0 J/K within the integration's accuracy (below 1e-7 n R)"
    return f"{number(S)} J/K"


def _warnings(p: Problem, end: EndState | None, h: History | None) -> list[str]:
    out = []
    if h is not None:
        if not h.reached:
            out.append(f"the history ended before its end condition: {h.stop}")
        for name in h.end_points:
            if h.closure(name) > CLOSURE_LIMIT:
                out.append(f"the energy closure of {name!r} is {h.closure(name):.2g}, above {CLOSURE_LIMIT:g}: "
                           "tighten history.rtol")
        for name, c in h.lines.items():
            if c["choked"].any():
                share = float(c["choked"].mean())
                out.append(f"line '{name}' is choked (sonic at its throat) for about {share:.0%} of the history")
        for line in p.lines:
            if line.restriction is not None and line.restriction.kind == "valve":
                out.append(f"line '{line.name}': the valve is taken as a nozzle of the same flow area; its own "
                           "choking and pressure recovery (x_T, IEC 60534-2-1) are not modelled: size valves by "
                           "that standard")
    points = []
    if end is not None:
        points += [(v.name, v.end) for v in end.vessels]
    if h is not None:
        points += list(h.end_points.items())
    seen = set()
    for name, pt in points:
        for w in p.model.warnings(pt):
            if (name, w) not in seen:
                seen.add((name, w))
                out.append(f"vessel '{name}' at the end: {w}")
    if end is not None and end.bound and h is not None:
        for v in end.vessels:
            if v.end.T < LOW_TEMPERATURE_K <= h.minimum("T").value:
                out.append(f"vessel '{v.name}': without its wall's heat (the adiabatic bound) the gas would end at "
                           f"{v.end.T - 273.15:.1f} °C; the history with the wall stays above "
                           f"{LOW_TEMPERATURE_K - 273.15:.0f} °C")
    for v in p.vessels:
        if v.heat == "wall" and v.wall.fire_flux > 0:
            out.append(f"vessel '{v.name}': the fire heat flux {v.wall.fire_flux / 1e3:.4g} kW/m2 is as given; take "
                       "it from the code that applies to the fire case")
    return out


_DEFER = "The limit depends on the material and on the code that governs the equipment: follow that code."


def _cautions(p: Problem, end: EndState | None, h: History | None) -> list[Caution]:
    out = [DISCLAIMER]
    P_max, T_min, T_max, where_min = 0.0, math.inf, 0.0, ""
    if h is not None:
        for name, c in h.vessels.items():
            P_max = max(P_max, float(c["P"].max()))
        e = h.minimum("T")
        T_min, where_min = e.value, f"the gas in '{e.where}' at t = {e.t:.4g} s"
        T_max = h.maximum("T").value
    if end is not None:
        for v in end.vessels:
            P_max = max(P_max, v.end.P, v.start.P if v.start else 0.0)
            if end.bound and h is not None:  # the history has the wall's heat; the bound is said apart
                continue
            if v.end.T < T_min - 0.01:  # the history's own words where it says the same
                T_min, where_min = v.end.T, f"the gas left in '{v.name}' at the end"
            T_max = max(T_max, v.end.T)
    for line in p.lines:
        if line.supply:
            P_max = max(P_max, line.supply[1])
    if P_max > p.p_atm + 0.5e5:
        out.append(Caution("pressure", "Pressures up to {} occur: confirm the design pressure of every vessel and "
                                       "line and the set pressure of each relief device.", (("P", P_max),)))
    wall = h.minimum("T_wall") if h is not None else None
    cold_wall = wall is not None and wall.value < LOW_TEMPERATURE_K
    if T_min < LOW_TEMPERATURE_K or cold_wall:
        values: list[tuple[str, float]] = [("T", T_min), ("T limit", LOW_TEMPERATURE_K)]
        if wall is not None:
            metal = f" The wall of '{wall.where}' reaches {{}} at t = {wall.t:.4g} s."
            values.append(("T", wall.value))
        else:
            metal = " With no wall modelled, take the gas's temperature as the metal's (a bound)."
        out.append(Caution(
            "low temperature",
            f"A gas temperature of {{}} occurs ({where_min}); below {{}}, the usual limit for carbon-steel "
            f"equipment without impact testing (common practice), brittle fracture is possible.{metal} Check the "
            f"minimum design metal temperature of the vessel, its nozzles and the line downstream. {_DEFER}",
            tuple(values)))
    case = case_of(p)[0]
    if case == "vent" or any(line.target == OUTSIDE for line in p.lines):
        if h is not None:
            name = p.end.vessel
            P_end = h.end_points[name].P
            out.append(Caution(
                "depressuring",
                f"'{name}' depressures to {{}} in {_duration(h.t_end)}: relief and depressuring standards (e.g. "
                "API 521, ISO 23251) set the end pressure and the time to check against (often half the design "
                "pressure or 690 kPa(g), whichever is lower, in about 15 minutes for a fire case; from memory). "
                "Check this against the standard that applies, with the licensed engineer responsible.",
                (("P", P_end),)))
        else:
            out.append(Caution("depressuring", "This end state has no time: the depressuring time that relief "
                                               "standards (e.g. API 521, ISO 23251) ask for needs the history "
                                               "through the vent's restriction."))
    if case == "fill" or any(line.source == SUPPLY for line in p.lines):
        out.append(Caution(
            "fill heating",
            "The gas peaks at {} in the fill. Composite (type III and IV) tanks are commonly limited to {} in a "
            "fast fill (common practice, from memory): for such a tank follow the filling standard that applies "
            "to it; a metal vessel is limited by its design temperature.",
            (("T", T_max), ("T limit", COMPOSITE_LIMIT_K))))
    return out


def _duration(t: float) -> str:
    if t < 120:
        return f"{t:.3g} s"
    if t < 7200:
        return f"{t / 60:.3g} min"
    return f"{t / 3600:.3g} h"


__all__ = ["CLOSURE_LIMIT", "COMPOSITE_LIMIT_K", "RECORD_ROWS", "Result", "history_json", "result_of"]
