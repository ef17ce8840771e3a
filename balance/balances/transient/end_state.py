"""The end state of a transient without time: the integrated uniform-state balance.

For each vessel, over the whole transient,

    n2 u2 - n1 u1 = Σ n_in h_in - ∫ h dn_out + Q          (energy)
    n2 s2 - n1 s1 = Σ n_in s_in - ∫ s dn_out + Q/T + S_gen  (entropy)

with the gas leaving at the vessel's own state. Gas that leaves an adiabatic
vessel takes with it the enthalpy of the gas it leaves behind, so what stays
expands reversibly: its entropy is the vessel's at the start (s2 = s1), and
∫ h dn_out = n1 u1 - n2 u2. A fill from a supply at a fixed state brings the
supply's enthalpy h_s. An isothermal vessel keeps its temperature and its
heat follows from the energy balance (∫ h dn_out along the isotherm by
Gauss–Legendre quadrature).

Three cases have an end state without time: a fill from one supply, a vent
through any number of lines to the outside, and two vessels equalising
through a line. A vessel whose heat is a wall or a given rate takes the
adiabatic end state here, said to be a bound (the wall's heat is in the
history).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ...errors import InputError, SolveError
from ..control_volume import factor, minus, number
from .problem import OUTSIDE, SUPPLY, Problem

#: Gauss–Legendre nodes for ∫ h dn along an isotherm (h is smooth in n: 1e-12 well before 16 nodes).
_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(16)


@dataclass(frozen=True)
class VesselEnd:
    """One vessel's gas at the start and at the end of the uniform-state balance."""

    name: str
    V: float
    n1: float
    n2: float
    start: object
    """the Point at the start (None: evacuated)"""
    end: object
    """the Point at the end"""
    Q: float
    """heat to the gas [J]"""
    n_in: float
    """amount in [mol]"""
    n_out: float
    E_in: float
    """Σ n_in h_in [J]"""
    E_out: float
    """∫ h dn_out [J]"""
    S_in: float
    S_out: float
    T_boundary: float | None
    """where Q crosses [K] (the gas's own temperature, isothermal)"""

    @property
    def U1(self) -> float:
        return self.n1 * self.start.u if self.start is not None else 0.0

    @property
    def U2(self) -> float:
        return self.n2 * self.end.u

    @property
    def S_gen(self) -> float:
        S1 = self.n1 * self.start.s if self.start is not None else 0.0
        Q_term = self.Q / self.T_boundary if self.T_boundary else 0.0
        return self.n2 * self.end.s - S1 - self.S_in + self.S_out - Q_term

    @property
    def residual(self) -> float:
        """The energy balance recomputed from the two states and the terms, relative to its scale."""
        scale = max(abs(self.U1), abs(self.U2), abs(self.E_in), abs(self.E_out), abs(self.Q),
                    8.314462618 * self.end.T * max(self.n1, self.n2), 1e-300)
        return abs(self.U2 - self.U1 - self.E_in + self.E_out - self.Q) / scale


@dataclass(frozen=True)
class EndState:
    """The end state of the uniform-state balance."""

    case: str
    """'fill', 'vent' or 'equalisation'"""
    heat: str
    """'adiabatic' or 'isothermal'"""
    bound: bool
    """True when a vessel's heat (a wall, a given rate) is left out: the adiabatic bound"""
    vessels: tuple[VesselEnd, ...]
    equations: tuple[str, ...]

    @property
    def S_gen(self) -> float:
        return sum(v.S_gen for v in self.vessels)

    @property
    def residual(self) -> float:
        return max(v.residual for v in self.vessels)

    def vessel(self, name: str) -> VesselEnd:
        return next(v for v in self.vessels if v.name == name)


def case_of(p: Problem) -> tuple[str, str]:
    """('fill' | 'vent' | 'equalisation', '') or ('', why the end state needs the history)."""
    if p.end.kind == "t":
        return "", "an end at a given time needs the history"
    names = p.vessel_names()
    if len(p.vessels) == 2:
        joined = [ln for ln in p.lines if ln.source in names and ln.target in names]
        if len(p.lines) == 1 and joined:
            return "equalisation", ""
        return "", "two vessels with lines to a supply or the outside as well need the history"
    if all(ln.source == SUPPLY for ln in p.lines):
        if len(p.lines) == 1:
            return "fill", ""
        return "", "a fill from several supplies needs the history (the share of each depends on time)"
    if all(ln.target == OUTSIDE for ln in p.lines):
        return "vent", ""
    return "", "a vessel filled and vented at once needs the history"


def heat_of(p: Problem) -> tuple[str, bool]:
    """The heat the uniform-state balance takes: isothermal when every vessel is, else adiabatic
    (a bound where a vessel has a wall or a given heat rate)."""
    kinds = {v.heat for v in p.vessels}
    if kinds == {"isothermal"}:
        return "isothermal", False
    return "adiabatic", bool(kinds - {"adiabatic"})


def end_state(p: Problem) -> tuple[EndState | None, str]:
    """The uniform-state end state, or (None, why it needs the history)."""
    case, why = case_of(p)
    if not case:
        return None, why
    heat, bound = heat_of(p)
    if len({v.heat for v in p.vessels} & {"isothermal"}) and heat != "isothermal":
        return None, "one vessel isothermal and the other not: the end state needs the history"
    return {"fill": _fill, "vent": _vent, "equalisation": _equalise}[case](p, heat, bound), ""


# -- the three cases ------------------------------------------------------------------------
def _start(p: Problem, v):
    return p.model.at_Tv(v.T0, v.V / v.n0) if v.n0 > 0 else None


def _fill(p: Problem, heat: str, bound: bool) -> EndState:
    m = p.model
    line = p.lines[0]
    v = p.vessel(line.target)
    s = m.at_TP(*line.supply)
    start = _start(p, v)
    n1, U1 = v.n0, (v.n0 * start.u if start else 0.0)
    target_P = _end_pressure(p, v, fill=True)
    if heat == "isothermal":
        end = m.at_TP(v.T0, target_P) if target_P is not None else m.at_Tv(v.T0, v.V * p.M / p.end.value)
    elif target_P is not None:
        def f(T):
            q = m.at_TP(T, target_P)
            n2 = v.V / q.v
            return n2 * (q.u - s.h) - n1 * ((start.u if start else 0.0) - s.h)
        end = m.at_TP(_root_T(f, min(v.T0, s.T), max(v.T0, s.T), "the filled vessel's temperature"), target_P)
    else:
        n2 = p.end.value / p.M
        end = m.flash({"v": v.V / n2, "u": (U1 + (n2 - n1) * s.h) / n2}, field="end.m")
    n2 = v.V / end.v
    if not n2 > n1:
        raise SolveError(f"the end condition is reached without filling: {v.name!r} holds {n1 * p.M:.6g} kg at "
                         f"the start and {n2 * p.M:.6g} kg at the end")
    n_in = n2 - n1
    Q = n2 * end.u - U1 - n_in * s.h if heat == "isothermal" else 0.0
    ve = VesselEnd(v.name, v.V, n1, n2, start, end, Q, n_in, 0.0, n_in * s.h, 0.0, n_in * s.s, 0.0,
                   end.T if heat == "isothermal" else None)
    eq = [f"fill of {v.name!r} from the supply at {number(s.T)} K, {number(s.P)} Pa: h_s = {number(s.h)} J/mol, "
          f"s_s = {number(s.s)} J/(mol K)",
          "n2 u2 - n1 u1 = (n2 - n1) h_s + Q",
          f"{number(n2)} × {factor(end.u)}{minus(U1)} = {number(n_in)} × {factor(s.h)} + {number(Q)}",
          f"S_gen = n2 s2 - n1 s1 - (n2 - n1) s_s - Q/T = {number(ve.S_gen)} J/K"]
    if heat == "adiabatic" and n1 == 0:
        eq.insert(2, "evacuated at the start: u2 = h_s")
    return EndState("fill", heat, bound, (ve,), tuple(eq))


def _vent(p: Problem, heat: str, bound: bool) -> EndState:
    m = p.model
    v = p.vessels[0]
    start = _start(p, v)
    n1 = v.n0
    target_P = _end_pressure(p, v, fill=False)
    if heat == "isothermal":
        end = m.at_TP(v.T0, target_P) if target_P is not None else m.at_Tv(v.T0, v.V * p.M / p.end.value)
    else:
        specs = {"P": target_P, "s": start.s} if target_P is not None else {"v": v.V * p.M / p.end.value,
                                                                            "s": start.s}
        end = m.flash(specs, field="end")
    n2 = v.V / end.v
    if not n2 < n1:
        raise SolveError(f"the end condition is reached without venting: {v.name!r} holds {n1 * p.M:.6g} kg at "
                         f"the start and {n2 * p.M:.6g} kg at the end")
    n_out = n1 - n2
    if heat == "isothermal":
        E_out, S_out = _along_isotherm(m, v.T0, v.V, n2, n1)
        Q = n2 * end.u - n1 * start.u + E_out
    else:
        E_out, S_out, Q = n1 * start.u - n2 * end.u, n_out * start.s, 0.0
    ve = VesselEnd(v.name, v.V, n1, n2, start, end, Q, 0.0, n_out, 0.0, E_out, 0.0, S_out,
                   end.T if heat == "isothermal" else None)
    if heat == "adiabatic":
        eq = ["the gas left in the vessel expands reversibly (the gas leaving takes the enthalpy of the gas "
              "it leaves): s2 = s1",
              f"s2 = s1 = {number(start.s)} J/(mol K), P2 = {number(end.P)} Pa: T2 = {number(end.T)} K",
              "∫ h dn_out = n1 u1 - n2 u2",
              f"= {number(n1)} × {factor(start.u)}{minus(n2 * end.u)} = {number(E_out)} J"]
    else:
        eq = [f"isothermal at T = {number(v.T0)} K: Q = n2 u2 - n1 u1 + ∫ h dn_out (∫ along the isotherm, "
              "16-point Gauss–Legendre)",
              f"Q = {number(n2 * end.u)}{minus(n1 * start.u)} + {number(E_out)} = {number(Q)} J"]
    eq.append(f"S_gen = n2 s2 - n1 s1 + ∫ s dn_out - Q/T = {number(ve.S_gen)} J/K")
    return EndState("vent", heat, bound, (ve,), tuple(eq))


def _equalise(p: Problem, heat: str, bound: bool) -> EndState:
    m = p.model
    a, b = p.vessels
    sa, sb = _start(p, a), _start(p, b)
    Pa = sa.P if sa else 0.0
    Pb = sb.P if sb else 0.0
    if Pb > Pa:
        a, b, sa, sb, Pa, Pb = b, a, sb, sa, Pb, Pa
    if not Pa > Pb:
        raise SolveError(f"{a.name!r} and {b.name!r} start at the same pressure: nothing moves")
    N = a.n0 + b.n0
    E = a.n0 * sa.u + (b.n0 * sb.u if sb else 0.0)

    def states(x: float):
        """A's end state at pressure x, and B's from the mass and energy left for it."""
        ea = m.at_TP(a.T0, x) if heat == "isothermal" else m.flash({"P": x, "s": sa.s}, field="end")
        na = a.V / ea.v
        nb = N - na
        if heat == "isothermal":
            eb = m.at_Tv(b.T0, b.V / nb)
        else:
            eb = m.flash({"v": b.V / nb, "u": (E - na * ea.u) / nb}, field="end")
        return ea, na, eb, nb

    kind, target = p.end.kind, p.end.value
    watched = p.end.vessel

    def f(x: float) -> float:
        ea, na, eb, nb = states(x)
        if kind == "balanced":
            return eb.P - x
        if kind == "P":
            return (x if watched == a.name else eb.P) - target
        return (na if watched == a.name else nb) * p.M - target

    lo = Pb * (1 + 1e-9) if Pb > 0 else Pa * 1e-6
    x = _root(f, lo, Pa * (1 - 1e-12), "the pressure the vessels end at")
    ea, na, eb, nb = states(x)
    moved = a.n0 - na
    if heat == "isothermal":
        E_out, S_out = _along_isotherm(m, a.T0, a.V, na, a.n0)
        Qa = na * ea.u - a.n0 * sa.u + E_out
        Qb = nb * eb.u - (b.n0 * sb.u if sb else 0.0) - E_out
        S_in = S_out
    else:
        E_out, S_out, Qa, Qb = a.n0 * sa.u - na * ea.u, moved * sa.s, 0.0, 0.0
        S_in = S_out
    Tb = (lambda e: e.T) if heat == "isothermal" else (lambda e: None)
    va = VesselEnd(a.name, a.V, a.n0, na, sa, ea, Qa, 0.0, moved, 0.0, E_out, 0.0, S_out, Tb(ea))
    vb = VesselEnd(b.name, b.V, b.n0, nb, sb, eb, Qb, moved, 0.0, E_out, 0.0, S_in, 0.0, Tb(eb))
    eq = [f"{a.name!r} empties into {b.name!r}: n_A + n_B = {number(N)} mol, n_A u_A + n_B u_B + ... conserved",
          ("the gas left in A expands reversibly: s_A2 = s_A1" if heat == "adiabatic"
           else "each vessel held at its own temperature"),
          f"A: P = {number(ea.P)} Pa, T = {number(ea.T)} K, n = {number(na)} mol",
          f"B: n_B2 u_B2 - n_B1 u_B1 = ∫ h_A dn = {number(E_out)} J: T = {number(eb.T)} K, P = {number(eb.P)} Pa",
          f"S_gen = {number(va.S_gen + vb.S_gen)} J/K"]
    return EndState("equalisation", heat, bound, (va, vb), tuple(eq))


# -- pieces -------------------------------------------------------------------------------------
def _end_pressure(p: Problem, v, fill: bool) -> float | None:
    """The pressure the end condition sets [Pa], or None when it sets the mass."""
    if p.end.kind == "P":
        return p.end.value
    if p.end.kind == "balanced":
        if fill:
            return p.lines[0].supply[1]
        return max(line.back for line in p.lines)
    return None


def _along_isotherm(model, T: float, V: float, n_lo: float, n_hi: float) -> tuple[float, float]:
    """(∫ h dn, ∫ s dn) [J, J/K] over n from n_lo to n_hi of the vessel's gas at T, volume V."""
    half, mid = 0.5 * (n_hi - n_lo), 0.5 * (n_hi + n_lo)
    E = S = 0.0
    for x, w in zip(_NODES, _WEIGHTS):
        q = model.at_Tv(T, V / (mid + half * x))
        E += w * q.h
        S += w * q.s
    return half * E, half * S


def _root_T(f, T_lo: float, T_hi: float, what: str) -> float:
    lo, hi = 0.7 * T_lo, 1.2 * T_hi
    for _ in range(12):
        try:
            if f(lo) * f(hi) < 0:
                return brentq(f, lo, hi, xtol=1e-12, rtol=1e-15, maxiter=200)
        except InputError:
            pass
        lo, hi = max(lo * 0.8, 1.0), hi * 1.5
    raise SolveError(f"no {what} meets the energy balance between {lo:.1f} K and {hi:.1f} K")


def _root(f, lo: float, hi: float, what: str) -> float:
    try:
        f_lo, f_hi = f(lo), f(hi)
    except InputError as exc:
        raise SolveError(f"{what}: {exc.message}") from None
    if f_lo * f_hi > 0:
        raise SolveError(f"no {what} between {lo / 1e5:.6g} and {hi / 1e5:.6g} bar meets the end condition")
    return brentq(f, lo, hi, xtol=1e-9, rtol=1e-15, maxiter=200)


__all__ = ["EndState", "VesselEnd", "case_of", "end_state", "heat_of"]
