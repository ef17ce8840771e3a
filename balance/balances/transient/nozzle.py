"""Flow through a restriction: the model's own isentropic nozzle, choked or subcritical.

From the upstream stagnation state (T0, v0), with its entropy s0 and enthalpy h0,
the gas expands along its isentrope s(T, v) = s0 (each state at a given v by
Newton's method on T, (∂s/∂T)_v = cv/T). At a throat of state (T, v) the speed is
w = sqrt(2 (h0 - h)/M) and the mass flux G = w M/v. G is greatest where the throat
reaches the speed of sound, c² = -v² (∂P/∂v)_s / M with (∂P/∂v)_s = (∂P/∂v)_T -
T (∂P/∂T)_v² / cv: the flow is choked when that sonic pressure is above the back
pressure (the throat stays sonic, whatever the back pressure below it), and
subcritical otherwise (the throat at the back pressure). G is continuous across
the choking pressure, so an integrator's right-hand side is smooth there.

Real-gas h and s throughout: no ratio of specific heats is assumed. For an ideal
gas of constant cp this is the textbook critical-flow formula exactly (tests).

A restriction is an effective area Cd A: an orifice's (its diameter and discharge
coefficient), or a valve's from its flow coefficient's defining conditions (Kv: m3/h
of water at 1 bar drop; Cv: US gal/min of water at 60 °F at 1 psi drop), equating
ṁ = Kv sqrt(ρ ρ0 ΔP/ΔP0) with Cd A sqrt(2 ρ ΔP): Cd A = Kv sqrt(ρ0/(2 ΔP0)).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

from .gas import TV, WetState

#: The defining conditions of the flow coefficients: (flow, its unit, ΔP0, its unit, ρ0 [kg/m3]).
#: Kv: water at 5-40 °C, ρ0 = 1000 kg/m3 (IEC 60534-1); Cv: water at 60 °F, 999.0 kg/m3 (from memory).
COEFFICIENTS = {
    "Kv": (1.0, "m**3/hour", 1.0, "bar", 1000.0),
    "Cv": (1.0, "gallon/minute", 1.0, "psi", 999.0),
}


@dataclass(frozen=True)
class Restriction:
    """What a line's flow passes through: its effective flow area."""

    kind: str
    """'orifice' or 'valve'"""
    CdA: float
    """effective flow area, discharge coefficient times area [m2]"""
    words: str
    """how it was read, for the equations"""


def orifice(diameter: float, Cd: float) -> Restriction:
    """An orifice of ``diameter`` [m] and discharge coefficient ``Cd`` (0 < Cd <= 1)."""
    if not diameter > 0 or not math.isfinite(diameter):
        raise ValueError(f"an orifice's diameter must be positive; got {diameter!r}")
    if not 0.0 < Cd <= 1.0:
        raise ValueError(f"a discharge coefficient is above 0 and at most 1; got {Cd!r}")
    CdA = Cd * math.pi * diameter * diameter / 4.0
    return Restriction("orifice", CdA, f"orifice d = {diameter * 1e3:.6g} mm, Cd = {Cd:.6g}: "
                                       f"Cd A = {CdA:.4g} m2")


def valve(Cv: float | None = None, Kv: float | None = None) -> Restriction:
    """A valve by its flow coefficient (one of ``Cv`` or ``Kv``), as a nozzle of the same area."""
    from ...units import to_unit

    if (Cv is None) == (Kv is None):
        raise ValueError("give one of Cv or Kv")
    key, value = ("Cv", Cv) if Cv is not None else ("Kv", Kv)
    if not value > 0 or not math.isfinite(value):
        raise ValueError(f"a flow coefficient must be positive; got {value!r}")
    q, q_unit, dp, dp_unit, rho0 = COEFFICIENTS[key]
    Q0 = to_unit(q, q_unit, "m**3/s")
    dP0 = to_unit(dp, dp_unit, "Pa")
    CdA = value * Q0 * math.sqrt(rho0 / (2.0 * dP0))
    defined = ("m3/h of water at 1 bar drop" if key == "Kv" else "US gal/min of water at 60 °F at 1 psi drop")
    return Restriction("valve", CdA, f"valve {key} = {value:.6g} ({defined}): taken as a nozzle of "
                                     f"Cd A = {key} sqrt(ρ0/(2 ΔP0)) = {CdA:.4g} m2; its own choking and "
                                     "pressure recovery (x_T of IEC 60534-2-1) are not modelled")


class Throat(NamedTuple):
    """The throat of the isentropic nozzle."""

    G: float
    """mass flux [kg/(m2 s)]"""
    choked: bool
    T: float
    P: float
    v: float
    """[K], [Pa], [m3/mol]"""
    w: float
    """speed [m/s]"""


def mass_flux(tv: TV, M: float, T0: float, v0: float, P_back: float) -> Throat:
    """The throat of the isentropic nozzle from the stagnation state (T0 [K], v0 [m3/mol]) to the
    back pressure P_back [Pa]; ``M`` [kg/mol]. No flow (G = 0) at or above the upstream pressure.

    Raises WetState where the gas would condense before its throat.
    """
    P0, _, h0, s0, cv0, PT0, _ = tv(T0, v0)
    if not P_back < P0:
        return Throat(0.0, False, T0, P0, v0, 0.0)
    slope = -v0 * PT0 / cv0  # d ln T / d ln v along the isentrope at the start (ideal gas: 1 - γ)
    lv0 = math.log(v0)

    last = [lv0, T0, slope]  # the last state found: a warm start for the next

    def state(lv: float):
        """The isentrope's state at ln v: (T, v, P, h, w² - c²)."""
        v = math.exp(lv)
        T = last[1] * math.exp(last[2] * (lv - last[0]))
        for _ in range(60):  # Newton on s(T, v) = s0, (∂s/∂T)_v = cv/T, kept within a factor 2
            P, _u, h, s, cv, PT, Pv = tv(T, v)
            step = (s - s0) * T / cv
            if abs(step) <= 1e-12 * T:  # the state at T is the state to 1e-12: take it
                break
            T = min(max(T - step, 0.5 * T), 2.0 * T)
        last[0], last[1], last[2] = lv, T, -v * PT / cv
        w2 = 2.0 * (h0 - h) / M
        c2 = -v * v * (Pv - T * PT * PT / cv) / M
        return T, v, P, h, w2 - c2

    # walk down the isentrope until the flow is sonic or the back pressure is reached
    lo, step = lv0, 0.25
    while True:
        try:
            T, v, P, h, gap = state(lo + step)
        except WetState:
            if step < 1e-9:
                raise WetState("state", "the expansion to the throat enters the two-phase region: the gas "
                                        "would condense in the restriction (two-phase flow is not "
                                        "modelled)") from None
            step *= 0.5
            continue
        if gap > 0 or P <= P_back:
            hi = lo + step
            break
        lo += step
    if gap > 0:
        sonic = _root(lambda x: state(x)[4], lo, hi)
        T, v, P, h, _ = state(sonic)
        if P > P_back:
            w = math.sqrt(max(2.0 * (h0 - h) / M, 0.0))
            return Throat(w * M / v, True, T, P, v, w)
        hi = sonic
    lv = _root(lambda x: state(x)[2] - P_back, lv0, hi)
    T, v, P, h, _ = state(lv)
    w = math.sqrt(max(2.0 * (h0 - h) / M, 0.0))
    return Throat(w * M / v, False, T, P, v, w)


def _root(f, lo: float, hi: float) -> float:
    """Brent's method on [lo, hi] (f(lo) < 0 < f(hi) or the reverse), to round-off in ln v."""
    from scipy.optimize import brentq

    return brentq(f, lo, hi, xtol=1e-14, rtol=1e-14, maxiter=200)


__all__ = ["COEFFICIENTS", "Restriction", "Throat", "mass_flux", "orifice", "valve"]
