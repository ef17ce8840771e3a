"""What the cubic's searches share: the derivatives the equation gives, the branch of an
isotherm a target lies on, the volume on it, where states with a given u or s exist, and a
first temperature from the ideal gas. Each works on (T, v) in plain floats; ``K`` is
``Cubic.tv``'s tuple (P, u, h, s, cv, (∂P/∂T)_v, (∂P/∂v)_T).
"""

from __future__ import annotations

import math

from ...errors import InputError
from ...rootfind import NoBracket, newton_bracketed
from ...units import R as R_GAS
from ..idealgas import ideal_temperature

#: Largest molar volume searched [m3/mol] (0.25 Pa at 300 K).
V_MAX = 1e4
#: Smallest v - b searched, relative to b.
GAP = 1e-10
#: Tolerance on ln(v - b) (absolute) and on T (relative).
XTOL = 1e-13
TTOL = 1e-14
#: Where each property sits in ``Cubic.tv``'s tuple.
INDEX = {"P": 0, "u": 1, "h": 2, "s": 3}


# -- derivatives from the equation: K = (P, u, h, s, cv, dP/dT|v, dP/dv|T) -----------
def d_dT(key: str, T: float, v: float, K) -> float:
    """∂key/∂T at constant v."""
    if key == "u":
        return K[4]
    if key == "h":
        return K[4] + v * K[5]
    if key == "s":
        return K[4] / T
    return K[5]


def d_dv(key: str, T: float, v: float, K) -> float:
    """∂key/∂v at constant T."""
    if key == "u":
        return T * K[5] - K[0]
    if key == "h":
        return T * K[5] + v * K[6]
    if key == "s":
        return K[5]
    return K[6]


def cannot(m, field: str, specs: str, where: str = "") -> InputError:
    return InputError(field, f"no state of {m.label}{where} has {specs}")


# -- fixed T ------------------------------------------------------------------------------
def branch_at_T(m, T: float, key: str, target: float):
    """Where along the isotherm T the state with key = target lies.

    Returns ``(v_low, v_high, f(v_low), f(v_high), None)`` for the branch
    (liquid, vapour, or the whole isotherm above Tc) — a bound's f is None
    when it has to be evaluated — or ``(v_l, v_v, K_l, K_v, x)`` when the
    target lies between the saturated values (a wet state of quality x).
    """
    b = m.b
    sat = m.saturation_curve.at(T)
    if sat is None:
        return b * (1.0 + GAP), V_MAX, None, None, None
    _, v_l, v_v = sat
    i = INDEX[key]
    K_l, K_v = m.tv(T, v_l), m.tv(T, v_v)
    y_l, y_v = K_l[i], K_v[i]
    if target >= y_v:
        return v_v, V_MAX, y_v - target, None, None
    if target <= y_l:
        return b * (1.0 + GAP), v_l, None, y_l - target, None
    return v_l, v_v, K_l, K_v, (target - y_l) / (y_v - y_l)


def solve_v(m, T: float, key: str, target: float, v_lo: float, v_hi: float, f_lo=None, f_hi=None,
             v0: float | None = None) -> float | None:
    """v [m3/mol] in [v_lo, v_hi] where key(T, v) = target, in x = ln(v - b); None without a bracket."""
    b, i = m.b, INDEX[key]

    def fdf(x: float):
        v = b + math.exp(x)
        K = m.tv(T, v)
        return K[i] - target, d_dv(key, T, v, K) * (v - b)

    x_lo, x_hi = math.log(v_lo - b), math.log(v_hi - b)
    if f_lo is None:
        f_lo = fdf(x_lo)[0]
    if f_hi is None:
        f_hi = fdf(x_hi)[0]
    x0 = math.log(v0 - b) if v0 is not None and v0 > b else None
    try:
        x = newton_bracketed(fdf, x_lo, x_hi, x0, flo=f_lo, fhi=f_hi, xtol=XTOL, rtol=0.0)
    except NoBracket:
        return None
    return b + math.exp(x)


# -- fixed s: the equilibrium isentrope ---------------------------------------------------
def existing(m, key: str, target: float) -> tuple[float, float]:
    """The temperatures [K] between which an isotherm holds a state with key (u or s) = target.

    At fixed T, u and s rise with v from v -> b to V_MAX; both ends rise
    with T. So the states exist from where the largest volume reaches the
    target up to where the smallest does (each an isochore, one root).
    """
    T_lo, T_hi = m.T_bounds()
    a = T_on_isochore(m, V_MAX, key, target, T_lo, T_hi)
    b = T_on_isochore(m, m.b * (1.0 + GAP), key, target, T_lo, T_hi)
    return a * (1.0 + 1e-10), b * (1.0 - 1e-10)


def T_on_isochore(m, v: float, key: str, target: float, T_lo: float, T_hi: float) -> float:
    """T in [T_lo, T_hi] where key(T, v) = target, or the end the target lies beyond."""
    i = INDEX[key]

    def fdf(T: float):
        K = m.tv(T, v)
        return K[i] - target, d_dT(key, T, v, K)

    f_lo, f_hi = fdf(T_lo)[0], fdf(T_hi)[0]
    if f_lo >= 0:
        return T_lo
    if f_hi <= 0:
        return T_hi
    return newton_bracketed(fdf, T_lo, T_hi, flo=f_lo, fhi=f_hi, xtol=0.0, rtol=1e-13)


def ideal_start(m, key: str, target: float, T_lo: float, T_hi: float, P: float | None = None,
                 v: float | None = None) -> float:
    """T [K] where the ideal gas meets key = target (u or h; s or v at the given P or v),
    inside the bracket: the departures neglected, a first point for Newton."""
    if key == "v":
        T = P * target / R_GAS
    elif key == "P":
        T = target * v / R_GAS
    else:
        try:
            T = ideal_temperature(m.species.cp_ig, key, target, T_lo, T_hi, "P" if P is not None else "v",
                                  P if P is not None else (v or 0.0), rtol=1e-8)
        except NoBracket:
            return 0.5 * (T_lo + T_hi)
    return min(max(T, T_lo * 1.0001), T_hi * 0.9999)
