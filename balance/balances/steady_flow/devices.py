"""What each kind of device does to the streams through it, at steady state.

Every device is a control volume with streams in and out (``Σ ṅ_in = Σ
ṅ_out`` for each fluid), heat ``Q̇`` to it and work ``Ẇ`` done on it, in the
canonical signs of :mod:`balance.convention`:

    0 = Σ ṅ_in e_in - Σ ṅ_out e_out + Q̇ + Ẇ,    e = h + M (V²/2 + g z)
    Ṡ_gen = Σ ṅ_out s_out - Σ ṅ_in s_in - Q̇ / T_boundary  >= 0

and each kind adds what is its own (molar SI throughout):

=================  ======================================================================
valve              adiabatic, no work: e_out = e_in (a throttle: h constant when V, z are)
heater, cooler     no work: Q̇ = ṅ (e_out - e_in); P_out = P_in - ΔP
compressor, pump   adiabatic: Ẇ = ṅ (h_out - h_in); isentropic efficiency
                   η_s = (h_2s - h_in) / (h_out - h_in), h_2s at (P_out, s_in);
                   or polytropic efficiency η_p over many small stages of that definition
turbine, expander  adiabatic: η_s = (h_in - h_out) / (h_in - h_2s)
nozzle, diffuser   adiabatic, no work: V_out² = V_in² + 2 (h_in - h_out) / M;
                   η = (h_in - h_out) / (h_in - h_2s) (a nozzle's kinetic-energy efficiency);
                   a diffuser's (P_out > P_in) η = (h_2s - h_in) / (h_out - h_in)
mixer              adiabatic, no work: ṅ_out e_out = Σ ṅ_in e_in
splitter           every outlet in the inlet's state; the rates share the inlet's
exchanger          two sides that do not mix: Q̇ = ṅ_hot (e_hot,in - e_hot,out)
                   = ṅ_cold (e_cold,out - e_cold,in); no temperature cross along either side
separator          a wet inlet into saturated liquid and saturated vapour at its pressure
=================  ======================================================================

These functions solve a device forward, from known inlets and the device's
own specification; :func:`balance_of` recomputes its three balances from
the flows alone, the independent check every solution must pass. The
isentropic-efficiency definitions are the published ones (compression
(h_2s - h_1)/(h_2 - h_1), expansion (h_1 - h_2)/(h_1 - h_2s)).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ...errors import InputError, SolveError
from ...models.base import Point
from .streams import G, Flow

#: Runge-Kutta steps (in ln P) along a polytropic path (T to about 5e-10 relative for a tenfold ratio).
POLYTROPIC_STEPS = 48
#: Points along each side of an exchanger where the temperatures are compared.
EXCHANGER_STEPS = 40


@dataclass(frozen=True)
class Balance:
    """A device's mass, energy and entropy balances, recomputed from its flows."""

    mass: float
    """(Σ ṁ_in - Σ ṁ_out) / Σ ṁ_in [-]"""
    energy: float
    """(Σ Ė_in - Σ Ė_out + Q̇ + Ẇ) over the largest term [-]"""
    S_gen_dot: float | None
    """entropy generated [W/K]; None where heat crosses with no boundary temperature"""


def balance_of(inlets: list[Flow], outlets: list[Flow], Q_dot: float, W_dot: float,
               T_boundary: float | None) -> Balance:
    """The three balances of one control volume, from its flows and terms alone.

    Q_dot : heat to the fluid [W];  W_dot : work done on the fluid [W];
    T_boundary : the temperature the heat crosses at [K].
    """
    m_in = sum(f.m_dot for f in inlets)
    m_out = sum(f.m_dot for f in outlets)
    mass = (m_in - m_out) / max(m_in, m_out, 1e-300)
    E_in = sum(f.E_dot for f in inlets)
    E_out = sum(f.E_dot for f in outlets)
    scale = max(abs(E_in), abs(E_out), abs(Q_dot), abs(W_dot),
                sum(abs(f.n_dot * f.point.h) for f in (*inlets, *outlets)), 1e-300)
    energy = (E_in - E_out + Q_dot + W_dot) / scale
    if Q_dot != 0.0 and T_boundary is None:
        S_gen = None
    else:
        S_gen = sum(f.S_dot for f in outlets) - sum(f.S_dot for f in inlets) - (Q_dot / T_boundary if Q_dot else 0.0)
    return Balance(mass, energy, S_gen)


def outlet(inlet: Flow, name: str, point: Point, n_dot: float | None = None, velocity: float = 0.0,
           z: float = 0.0) -> Flow:
    """A stream leaving with the inlet's fluid (and rate, unless given)."""
    return Flow(name, inlet.model, point, inlet.n_dot if n_dot is None else n_dot, velocity, z)


def h_for_energy(e: float, M: float, velocity: float, z: float) -> float:
    """The molar enthalpy [J/mol] that carries energy ``e`` [J/mol] at this speed [m/s] and height [m]."""
    return e - M * (0.5 * velocity * velocity + G * z)


# -- devices with one stream in and one out ---------------------------------------------
def throttle(inlet: Flow, P_out: float, name: str, velocity: float = 0.0, z: float = 0.0,
             field: str = "device") -> Flow:
    """A valve: adiabatic, no work, so the energy per mole is kept; the state at P_out [Pa]."""
    h = h_for_energy(inlet.e, inlet.M, velocity, z)
    return outlet(inlet, name, inlet.model.flash({"P": P_out, "h": h}, field=field), velocity=velocity, z=z)


def exchange(inlet: Flow, P_out: float, name: str, *, Q_dot: float | None = None, point: Point | None = None,
             velocity: float = 0.0, z: float = 0.0, field: str = "device") -> tuple[Flow, float]:
    """A heater or cooler (no work): the outlet and the heat to the fluid [W].

    Given the heat ``Q_dot`` [W] the outlet is the state at P_out [Pa] with the
    energy that follows; given the outlet ``point``, the heat follows from it.
    """
    if point is None:
        if Q_dot is None:
            raise SolveError(f"{field}: give the heat or the outlet state")
        h = h_for_energy(inlet.e + Q_dot / inlet.n_dot, inlet.M, velocity, z)
        point = inlet.model.flash({"P": P_out, "h": h}, field=field)
    out = outlet(inlet, name, point, velocity=velocity, z=z)
    return out, inlet.n_dot * (out.e - inlet.e)


def isentropic_end(inlet: Flow, P_out: float, field: str = "device") -> Point:
    """The state at P_out [Pa] with the inlet's entropy: the end of the isentropic path."""
    return inlet.model.flash({"P": P_out, "s": inlet.point.s}, field=f"{field} (isentropic end)")


@dataclass(frozen=True)
class Machine:
    """A compressor, pump, turbine or expander, solved."""

    out: Flow
    W_dot: float
    """work done on the fluid [W] (negative for a turbine)"""
    eta: float
    """isentropic efficiency [-] (the polytropic one, for a compressor given it)"""
    isentropic: Point
    """the state at the outlet pressure with the inlet's entropy"""
    eta_isentropic: float
    """the isentropic efficiency that the outlet state implies [-]"""


def machine(inlet: Flow, P_out: float, name: str, *, compresses: bool, eta: float | None = None,
            polytropic: bool = False, point: Point | None = None, field: str = "device") -> Machine:
    """An adiabatic machine from its inlet and outlet pressure, and its efficiency or its outlet state.

    Compression: h_2 = h_1 + (h_2s - h_1) / η_s; expansion: h_2 = h_1 - η_s (h_1 - h_2s).
    A polytropic efficiency (compression) is that of every infinitesimal stage,
    dh = v dP / η_p along the path, integrated in ln P by the classical
    Runge-Kutta method (POLYTROPIC_STEPS steps).
    """
    model = inlet.model
    if (P_out > inlet.point.P) != compresses and P_out != inlet.point.P:
        raise InputError(f"{field}.P_out", f"a {'compressor or pump' if compresses else 'turbine or expander'} "
                                           f"{'raises' if compresses else 'lowers'} the pressure; "
                                           f"the outlet's is {P_out / 1e5:.6g} bar against the inlet's "
                                           f"{inlet.point.P / 1e5:.6g} bar")
    end = isentropic_end(inlet, P_out, field)
    h1, h2s = inlet.point.h, end.h
    if point is None:
        if eta is None or not 0.0 < eta <= 1.0:
            raise InputError(f"{field}.eta", f"must be an efficiency in (0, 1]; got {eta!r}")
        if polytropic:
            point = _polytropic(inlet, P_out, eta, field)
        else:
            h2 = h1 + (h2s - h1) / eta if compresses else h1 - eta * (h1 - h2s)
            point = model.flash({"P": P_out, "h": h2}, field=field)
    h2 = point.h
    if h2 == h1:
        eta_s = math.nan
    else:
        eta_s = (h2s - h1) / (h2 - h1) if compresses else (h1 - h2) / (h1 - h2s)
    out = outlet(inlet, name, point)
    return Machine(out, inlet.n_dot * (h2 - h1), eta if (eta is not None and polytropic) else eta_s, end, eta_s)


def _polytropic(inlet: Flow, P_out: float, eta_p: float, field: str) -> Point:
    """The end of the path dh/d(ln P) = P v(P, h) / η_p from the inlet to P_out [Pa]."""
    model = inlet.model

    def slope(lnP: float, h: float) -> float:
        P = math.exp(lnP)
        return P * model.flash({"P": P, "h": h}, field=field).v / eta_p

    x, h = math.log(inlet.point.P), inlet.point.h
    step = (math.log(P_out) - x) / POLYTROPIC_STEPS
    for _ in range(POLYTROPIC_STEPS):
        k1 = slope(x, h)
        k2 = slope(x + step / 2, h + step * k1 / 2)
        k3 = slope(x + step / 2, h + step * k2 / 2)
        k4 = slope(x + step, h + step * k3)
        x, h = x + step, h + step * (k1 + 2 * k2 + 2 * k3 + k4) / 6
    return model.flash({"P": P_out, "h": h}, field=field)


def nozzle(inlet: Flow, P_out: float, name: str, *, eta: float = 1.0, field: str = "device") -> Flow:
    """A nozzle (or, run the other way, a diffuser): adiabatic, no work; the outlet speed [m/s] from
    V_out² = V_in² + 2 (h_in - h_out) / M (same height), with h_out from the efficiency as published:
    a nozzle's η = (h_in - h_out) / (h_in - h_2s) (the kinetic energy gained over the isentropic gain),
    a diffuser's (P_out above P_in) η = (h_2s - h_in) / (h_out - h_in) (the isentropic rise over the
    kinetic energy given up)."""
    end = isentropic_end(inlet, P_out, field)
    h1 = inlet.point.h
    h2 = h1 + (end.h - h1) / eta if P_out > inlet.point.P else h1 - eta * (h1 - end.h)
    point = inlet.model.flash({"P": P_out, "h": h2}, field=field)
    V2sq = inlet.velocity**2 + 2.0 * (inlet.point.h - point.h) / inlet.M
    if V2sq < 0:
        raise SolveError(f"{field}: the outlet would need a negative kinetic energy (the flow slows below rest)")
    return outlet(inlet, name, point, velocity=math.sqrt(V2sq), z=inlet.z)


# -- devices with several streams ----------------------------------------------------------
def mix(inlets: list[Flow], P_out: float, name: str, velocity: float = 0.0, z: float = 0.0,
        field: str = "device", blend=None) -> Flow:
    """Adiabatic mixing at P_out [Pa]: ṅ_out e_out = Σ ṅ_in e_in; of streams of one fluid, or
    of different fluids on the ``blend`` model of their mixture (every model measures h and s of
    each component from its ideal gas at 298.15 K and 1 bar, so the inlets' energies add, and
    the outlet's entropy holds the entropy of mixing, -R Σ y ln y, that Ṡ_gen then counts)."""
    model = blend or inlets[0].model
    if blend is None and any(f.model is not model for f in inlets):
        raise InputError(field, "a mixer's streams must be of one fluid and model")
    n = sum(f.n_dot for f in inlets)
    e = sum(f.E_dot for f in inlets) / n
    h = h_for_energy(e, model.species.M, velocity, z)
    return Flow(name, model, model.flash({"P": P_out, "h": h}, field=field), n, velocity, z)


def split(inlet: Flow, names: list[str], fractions: list[float]) -> list[Flow]:
    """Every outlet in the inlet's state, with its fraction of the rate (the fractions sum to 1)."""
    total = sum(fractions)
    if not math.isclose(total, 1.0, rel_tol=1e-9, abs_tol=1e-12):
        raise InputError("device.fractions", f"a splitter's fractions must sum to 1; they sum to {total:.6g}")
    return [inlet.with_(name=n, n_dot=inlet.n_dot * f) for n, f in zip(names, fractions)]


def separate(inlet: Flow, names: tuple[str, str], P: float | None = None, field: str = "device") -> tuple[Flow, Flow]:
    """A wet stream into its saturated liquid and saturated vapour at its pressure (or P [Pa]):
    the vapour takes the quality's share of the rate (adiabatic flash when P is lower)."""
    model = inlet.model
    if not model.two_phase:
        raise InputError(f"{field}.model", f"a separator needs a model with two phases (the reference model); "
                                           f"{model.label} has none")
    P = inlet.point.P if P is None else P
    mixed = model.flash({"P": P, "h": h_for_energy(inlet.e, inlet.M, 0.0, inlet.z)}, field=field)
    x = mixed.x if mixed.x is not None else (1.0 if mixed.phase == "gas" else 0.0)
    liquid = model.flash({"P": P, "x": 0.0}, field=field)
    vapour = model.flash({"P": P, "x": 1.0}, field=field)
    return (Flow(names[0], model, liquid, inlet.n_dot * (1.0 - x), 0.0, inlet.z),
            Flow(names[1], model, vapour, inlet.n_dot * x, 0.0, inlet.z))


@dataclass(frozen=True)
class Approach:
    """The temperatures along an exchanger, side by side."""

    minimum: float
    """the smallest T_hot - T_cold along the exchanger [K] (negative: a temperature cross)"""
    where: float
    """the fraction of the duty at which it occurs [-], 0 at the hot inlet's end"""


def approach(hot_in: Flow, hot_out: Flow, cold_in: Flow, cold_out: Flow, *, counter: bool = True,
             steps: int = EXCHANGER_STEPS, field: str = "device") -> Approach:
    """The smallest temperature difference along an exchanger, stepping along each side's enthalpy.

    The enthalpy of each side changes linearly with the duty transferred; at
    each step the temperature of each side is its state at (P, h), with the
    pressure taken linear between its ends, so a condensing or boiling side
    (h changing at constant T) shows where it pinches. Counter-flow: the hot
    inlet faces the cold outlet. Where a side's model has two phases, the points
    where that side meets its bubble or dew point are stepped to as well: a
    pinch sits there (a superheated vapour starting to condense), and between
    the regular steps it would be missed by up to a step's change of the other
    side's temperature.
    """
    worst, where = math.inf, 0.0
    fractions = {k / steps for k in range(steps + 1)}
    fractions.update(_phase_breaks(hot_in, hot_out, field))
    fractions.update((1.0 - g if counter else g) for g in _phase_breaks(cold_in, cold_out, field))
    for f in sorted(fractions):
        hot = _along(hot_in, hot_out, f, field)
        g = 1.0 - f if counter else f
        cold = _along(cold_in, cold_out, g, field)
        dT = hot.T - cold.T
        if dT < worst:
            worst, where = dT, f
    return Approach(worst, where)


def _phase_breaks(a: Flow, b: Flow, field: str) -> list[float]:
    """The fractions of the way from a to b (by enthalpy, the pressure linear) where the side reaches its
    saturated liquid or vapour; none for a model without two phases."""
    model = a.model
    dh = b.point.h - a.point.h
    if not model.two_phase or dh == 0.0:
        return []
    out = []
    for x in (0.0, 1.0):
        f = 0.0
        try:
            for _ in range(3):  # the saturation enthalpy at the pressure where it is met (P changes little)
                P = a.point.P + f * (b.point.P - a.point.P)
                f = (model.flash({"P": P, "x": x}, field=field).h - a.point.h) / dh
                if not 0.0 < f < 1.0:
                    break
        except InputError:  # above the critical pressure or outside the model's range: no phase change
            continue
        if 0.0 < f < 1.0:
            out.append(f)
    return out


def _along(a: Flow, b: Flow, f: float, field: str) -> Point:
    """The state a fraction f of the way from a to b, by enthalpy, on one side of an exchanger."""
    if f == 0.0:
        return a.point
    if f == 1.0:
        return b.point
    P = a.point.P + f * (b.point.P - a.point.P)
    h = a.point.h + f * (b.point.h - a.point.h)
    return a.model.flash({"P": P, "h": h}, field=field)


__all__ = ["Approach", "Balance", "Machine", "approach", "balance_of", "exchange", "isentropic_end", "machine",
           "mix", "nozzle", "outlet", "separate", "split", "throttle"]
