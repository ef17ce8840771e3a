"""Every input pair of a cubic, solved on (T, v) with the phase decided first.

The state is always sought as (T, v) on the equation itself, in plain
floats, by Newton's method kept inside a bracket
(:func:`~balance.rootfind.newton_bracketed`) with the analytic derivatives
the equation gives: cv, (∂P/∂T)_v and (∂P/∂v)_T. Before any iteration the
phase is decided from the saturation curve (:mod:`.saturation`), so no
search crosses the dome:

* **T fixed** (with u or s): at fixed T, u and s rise with v. Compared with
  their saturated values at T the target says liquid (v up to the saturated
  liquid's), vapour (from the saturated vapour's) or wet; one root.
* **v fixed** (with P, u, h or s): each rises with T along an isochore; one
  root, then refused as wet if it lies inside the dome (the equilibrium
  state with that v and that property is then a mixture).
* **P fixed** (with v, u, h or s): along an isobar below Pc the target is
  compared with the saturated liquid and vapour at T_sat(P): the liquid
  branch (T below T_sat, the smallest volume root) or the vapour branch.
* **s fixed** (with u or h): along the equilibrium isentrope u and h rise
  with T; at each T the state with that s is liquid, vapour or wet by the
  same comparison as at fixed T, so the outer function is continuous and
  one-to-one, and the wet part is refused only if the answer lies in it.
* **T with h**, and **u with h**: more than one state can meet the pair
  (the two sides of an isotherm's Joule-Thomson inversion): :mod:`.twins`.

What the searches share (the derivatives, the branch of an isotherm, the
range where a u or s exists, a first T) is :mod:`.lines`.

The cubic gives no wet states: a target inside the dome is refused with
its quality, recommending the reference model.
"""

from __future__ import annotations

import math

from ...rootfind import NoBracket, brent, newton_bracketed
from ...units import P_REF
from ...units import R as R_GAS
from ..base import Point, fmt_spec
from .lines import INDEX, TTOL, branch_at_T, cannot, d_dT, d_dv, existing, ideal_start, solve_v
from .twins import isotherm_h, u_h


def solve_pair(m, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
    """The state of cubic ``m`` fixed by a checked pair (SPEC_KEYS order, SI floats)."""
    (a, b), (va, vb) = keys, values
    if keys == ("T", "v"):
        return m.at_Tv(va, vb, field)
    if keys == ("T", "P"):
        return m.at_TP(va, vb)
    if keys == ("T", "h"):
        return isotherm_h(m, va, vb, field)
    if a == "T":
        return _on_isotherm(m, va, b, vb, field)
    if a == "P":
        return _on_isobar(m, va, b, vb, field)
    if a == "v":
        return _on_isochore(m, va, b, vb, field)
    if b == "s":
        return _on_isentrope(m, vb, a, va, field)
    return u_h(m, va, vb, field)


def _on_isotherm(m, T: float, key: str, target: float, field: str) -> Point:
    """T with u or s: both rise with v at fixed T, so one state at most."""
    v_lo, v_hi, f_lo, f_hi, x = branch_at_T(m, T, key, target)
    if x is not None:
        raise m.wet_error(field, f"T = {T:.6g} K with {fmt_spec(key, target)}", T, x)
    v = solve_v(m, T, key, target, v_lo, v_hi, f_lo, f_hi)
    if v is None:
        raise cannot(m, field, f"{fmt_spec('T', T)} and {fmt_spec(key, target)}")
    return m.point(T, v, "given T; volume from the pair", field=field)


# -- fixed v ------------------------------------------------------------------------------
def _on_isochore(m, v: float, key: str, target: float, field: str) -> Point:
    """v with P, u, h or s: each rises with T at fixed v; one root, refused if it is wet."""
    i = INDEX[key]
    T_lo, T_hi = m.T_bounds()

    def fdf(T: float):
        K = m.tv(T, v)
        return K[i] - target, d_dT(key, T, v, K)

    try:
        T = newton_bracketed(fdf, T_lo, T_hi, _isochore_start(m, v, key, target, T_lo, T_hi),
                             xtol=0.0, rtol=TTOL)
    except NoBracket:
        raise cannot(m, field, f"{fmt_spec('v', v)} and {fmt_spec(key, target)}",
                      f" between {T_lo:g} K and {T_hi:g} K") from None
    if m.saturation_curve.contains(T, v):
        T_wet, x = _wet_on_isochore(m, v, key, target, T)
        raise m.wet_error(field, f"{fmt_spec('v', v)} with {fmt_spec(key, target)} (T = {T_wet:.6g} K)", T_wet, x)
    return m.point(T, v, "given volume", field=field)


def _wet_on_isochore(m, v: float, key: str, target: float, T_inside: float) -> tuple[float, float | None]:
    """(T, x) of the wet state with this v and key = target, for the refusal's words.

    Along the isochore inside the dome the mixture's key rises with T; the
    search runs from the fit's lowest T up to where v leaves the dome
    (found by halving from T_inside, a temperature at which it is inside).
    """
    curve = m.saturation_curve
    i = INDEX[key]

    def inside(T: float) -> bool:
        sat = curve.at(T)
        return sat is not None and sat[1] < v < sat[2]

    def f(T: float) -> float:
        P, v_l, v_v = curve.at(T)
        if key == "P":
            return P - target
        x = (v - v_l) / (v_v - v_l)
        y_l, y_v = m.tv(T, v_l)[i], m.tv(T, v_v)[i]
        return y_l + x * (y_v - y_l) - target

    lo, hi = T_inside, m.Tc_eos
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if inside(mid) else (lo, mid)
    bottom = max(curve.T_low, m.T_bounds()[0])
    try:
        T = brent(f, bottom, lo, xtol=0.0, rtol=1e-12)
    except (NoBracket, TypeError):
        return T_inside, None
    _, v_l, v_v = curve.at(T)
    return T, (v - v_l) / (v_v - v_l)


def _isochore_start(m, v: float, key: str, target: float, T_lo: float, T_hi: float) -> float:
    """A first T: the pressure's is nearly linear in T; the others start where the ideal gas would."""
    if key == "P":
        K = m.tv(m.Tc_eos, v)
        T = m.Tc_eos + (target - K[0]) / K[5]
        return min(max(T, T_lo * 1.0001), T_hi * 0.9999)
    return ideal_start(m, key, target, T_lo, T_hi, v=v)


# -- fixed P ------------------------------------------------------------------------------
def _on_isobar(m, P: float, key: str, target: float, field: str) -> Point:
    """P with v, u, h or s: each rises with T along a branch of the isobar; one state."""
    T_lo, T_hi = m.T_bounds()
    branch, f_lo, f_hi = "stable", None, None
    T_s = m.saturation_curve.T_at(P)
    sat = m.saturation_curve.at(T_s) if T_s is not None and T_lo < T_s < T_hi else None
    if sat is not None:
        _, v_l, v_v = sat
        y_l, y_v = _value(m, key, T_s, v_l), _value(m, key, T_s, v_v)
        if target >= y_v:
            branch, T_lo, f_lo = "gas", T_s, y_v - target
        elif target <= y_l:
            branch, T_hi, f_hi = "liquid", T_s, y_l - target
        else:
            x = (target - y_l) / (y_v - y_l)
            raise m.wet_error(field, f"{fmt_spec('P', P)} with {fmt_spec(key, target)}", T_s, x)

    def fdf(T: float):
        v, _ = _branch_volume(m, T, P, branch)
        K = m.tv(T, v)
        dv_dT = -K[5] / K[6]
        if key == "v":
            return v - target, dv_dT
        return K[INDEX[key]] - target, d_dT(key, T, v, K) + d_dv(key, T, v, K) * dv_dT

    if branch == "gas":  # from the saturated end, along a branch on which key is smooth
        T0 = T_lo * (1.0 + 1e-9)
    elif branch == "liquid":
        T0 = T_hi * (1.0 - 1e-9)
    else:
        T0 = ideal_start(m, key, target, T_lo, T_hi, P=P)
    try:
        T = newton_bracketed(fdf, T_lo, T_hi, T0, flo=f_lo, fhi=f_hi, xtol=0.0, rtol=TTOL)
    except NoBracket:
        raise cannot(m, field, f"{fmt_spec('P', P)} and {fmt_spec(key, target)}",
                      f" between {T_lo:g} K and {T_hi:g} K") from None
    v, how = _branch_volume(m, T, P, branch)
    return m.point(T, v, how, field=field)


def _value(m, key: str, T: float, v: float) -> float:
    return v if key == "v" else m.tv(T, v)[INDEX[key]]


def _branch_volume(m, T: float, P: float, branch: str) -> tuple[float, str]:
    """The volume root at (T, P) on a branch ('liquid', 'gas' or 'stable'), and how it was chosen."""
    v_lo, v_hi, n = m.volume_roots(T, P)
    if n == 1:
        return v_hi, "one real root"
    if branch == "stable":
        p = m.at_TP_one_phase(T, P)
        return p.v, p.root
    if branch == "liquid":
        return v_lo, "three real roots; the liquid-like (smallest) chosen: liquid side of saturation at this P"
    return v_hi, "three real roots; the vapour-like (largest) chosen: vapour side of saturation at this P"


def _on_isentrope(m, s: float, key: str, target: float, field: str) -> Point:
    """s with u or h: along the equilibrium isentrope both rise with T; one state.

    The answer is unique, so a stable single-phase (T, v) that meets both is
    it: first Newton's method on (T, ln(v - b)) from the ideal gas's state
    (a gas or a supercritical target converges in a few steps); where that
    fails or lands in the dome, the search along the equilibrium isentrope.
    """
    fast = _newton_pair(m, key, target, s)
    if fast is not None:
        return m.point(*fast, "volume and T from the pair (Newton on T and v)", field=field)
    return _along_isentrope(m, s, key, target, field)


def _newton_pair(m, key: str, target: float, s: float) -> tuple[float, float] | None:
    """(T, v) meeting key (u or h) = target and s by 2-D Newton from the ideal gas, or None."""
    T_lo, T_hi = m.T_bounds()
    T = ideal_start(m, key, target, T_lo, T_hi)
    _, _, s0 = m.species.cp_ig.terms(T)
    b = m.b
    v = max(R_GAS * T / P_REF * math.exp((s - s0) / R_GAS), 2.0 * b)
    x = math.log(v - b)
    i = INDEX[key]
    for _ in range(40):
        v = b + math.exp(x)
        K = m.tv(T, v)
        f1, f2 = K[i] - target, K[3] - s
        a11, a12 = d_dT(key, T, v, K), d_dv(key, T, v, K) * (v - b)
        a21, a22 = K[4] / T, K[5] * (v - b)
        det = a11 * a22 - a12 * a21
        if not (det != 0.0 and math.isfinite(det)):
            return None
        dT = (f1 * a22 - f2 * a12) / det
        dx = (a11 * f2 - a21 * f1) / det
        scale = max(abs(dT) / (0.5 * T), abs(dx) / 2.0, 1.0)  # at most half of T, e² of v - b per step
        T -= dT / scale
        x -= dx / scale
        if not T_lo <= T <= T_hi:
            return None
        if scale == 1.0 and abs(dT) <= 1e-13 * T and abs(dx) <= 1e-12:
            v = b + math.exp(x)
            K = m.tv(T, v)
            if K[0] > 0 and K[6] < 0 and not m.saturation_curve.contains(T, v):
                return T, v
            return None
    return None


def _along_isentrope(m, s: float, key: str, target: float, field: str) -> Point:
    """The robust search: T along the equilibrium isentrope, where u and h rise with T."""
    T_lo, T_hi = existing(m, "s", s)
    i = INDEX[key]
    last = {"v": None, "state": None}

    def at(T: float):
        """(f, df/dT along the isentrope or None, state): state is ('one', v) or ('wet', x)."""
        v_lo, v_hi, f_lo, f_hi, x = branch_at_T(m, T, "s", s)
        if x is not None:
            v_l, v_v, K_l, K_v = v_lo, v_hi, f_lo, f_hi
            y = K_l[i] + x * (K_v[i] - K_l[i])
            v = v_l + x * (v_v - v_l)
            dy = v * (K_v[3] - K_l[3]) / (v_v - v_l) if key == "h" else None  # dh = v dP, Clapeyron
            return y - target, dy, ("wet", x)
        v = solve_v(m, T, "s", s, v_lo, v_hi, f_lo, f_hi, last["v"])
        if v is None:
            return math.nan, None, None
        last["v"] = v
        K = m.tv(T, v)
        dv_dT = -(K[4] / T) / K[5]
        dy = v * (K[5] + K[6] * dv_dT) if key == "h" else -K[0] * dv_dT
        return K[i] - target, dy, ("one", v)

    def fdf(T: float):
        f, df, state = at(T)
        last["state"] = state
        return f, df

    f_lo, f_hi = at(T_lo)[0], at(T_hi)[0]
    if not (math.isfinite(f_lo) and math.isfinite(f_hi)):
        raise cannot(m, field, f"{fmt_spec(key, target)} and {fmt_spec('s', s)}",
                      f" between {T_lo:g} K and {T_hi:g} K")
    last["v"] = None
    try:
        T = newton_bracketed(fdf, T_lo, T_hi, ideal_start(m, key, target, T_lo, T_hi), flo=f_lo, fhi=f_hi,
                             xtol=0.0, rtol=TTOL)
    except NoBracket:
        raise cannot(m, field, f"{fmt_spec(key, target)} and {fmt_spec('s', s)}",
                      f" between {T_lo:g} K and {T_hi:g} K") from None
    _, _, state = at(T)
    if state is None:
        raise cannot(m, field, f"{fmt_spec(key, target)} and {fmt_spec('s', s)}")
    if state[0] == "wet":
        raise m.wet_error(field, f"{fmt_spec(key, target)} with {fmt_spec('s', s)} (T = {T:.6g} K)", T, state[1])
    return m.point(T, state[1], "volume and T from the pair (equilibrium isentrope)", field=field)
