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
  (the two sides of an isotherm's Joule-Thomson inversion). The whole path
  is scanned, every state found, and the one rule of :mod:`..base` applied.

The cubic gives no wet states: a target inside the dome is refused with
its quality, recommending the reference model.
"""

from __future__ import annotations

import math

from ...errors import InputError
from ...rootfind import NoBracket, brent, newton_bracketed
from ...units import P_REF
from ...units import R as R_GAS
from ..base import Point, choose_largest_volume, fmt_spec

#: Largest molar volume searched [m3/mol] (0.25 Pa at 300 K).
V_MAX = 1e4
#: Smallest v - b searched, relative to b.
_GAP = 1e-10
#: Tolerance on ln(v - b) and on T, relative.
_XTOL = 1e-13
_TTOL = 1e-14

_INDEX = {"P": 0, "u": 1, "h": 2, "s": 3}
_CALORIC = ("u", "h", "s")


# -- derivatives from the equation: K = (P, u, h, s, cv, dP/dT|v, dP/dv|T) -----------
def _d_dT(key: str, T: float, v: float, K) -> float:
    """∂key/∂T at constant v."""
    if key == "u":
        return K[4]
    if key == "h":
        return K[4] + v * K[5]
    if key == "s":
        return K[4] / T
    return K[5]


def _d_dv(key: str, T: float, v: float, K) -> float:
    """∂key/∂v at constant T."""
    if key == "u":
        return T * K[5] - K[0]
    if key == "h":
        return T * K[5] + v * K[6]
    if key == "s":
        return K[5]
    return K[6]


def solve_pair(m, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
    """The state of cubic ``m`` fixed by a checked pair (SPEC_KEYS order, SI floats)."""
    (a, b), (va, vb) = keys, values
    if keys == ("T", "v"):
        return m.at_Tv(va, vb, field)
    if keys == ("T", "P"):
        return m.at_TP(va, vb)
    if keys == ("T", "h"):
        return _isotherm_h(m, va, vb, field)
    if a == "T":
        return _on_isotherm(m, va, b, vb, field)
    if a == "P":
        return _on_isobar(m, va, b, vb, field)
    if a == "v":
        return _on_isochore(m, va, b, vb, field)
    if b == "s":
        return _on_isentrope(m, vb, a, va, field)
    return _u_h(m, va, vb, field)


def _cannot(m, field: str, specs: str, where: str = "") -> InputError:
    return InputError(field, f"no state of {m.label}{where} has {specs}")


# -- fixed T ------------------------------------------------------------------------------
def _branch_at_T(m, T: float, key: str, target: float):
    """Where along the isotherm T the state with key = target lies.

    Returns ``(v_low, v_high, f(v_low), f(v_high), None)`` for the branch
    (liquid, vapour, or the whole isotherm above Tc) — a bound's f is None
    when it has to be evaluated — or ``(v_l, v_v, K_l, K_v, x)`` when the
    target lies between the saturated values (a wet state of quality x).
    """
    b = m.b
    sat = m.saturation_curve.at(T)
    if sat is None:
        return b * (1.0 + _GAP), V_MAX, None, None, None
    _, v_l, v_v = sat
    i = _INDEX[key]
    K_l, K_v = m.tv(T, v_l), m.tv(T, v_v)
    y_l, y_v = K_l[i], K_v[i]
    if target >= y_v:
        return v_v, V_MAX, y_v - target, None, None
    if target <= y_l:
        return b * (1.0 + _GAP), v_l, None, y_l - target, None
    return v_l, v_v, K_l, K_v, (target - y_l) / (y_v - y_l)


def _solve_v(m, T: float, key: str, target: float, v_lo: float, v_hi: float, f_lo=None, f_hi=None,
             v0: float | None = None) -> float | None:
    """v [m3/mol] in [v_lo, v_hi] where key(T, v) = target, in x = ln(v - b); None without a bracket."""
    b, i = m.b, _INDEX[key]

    def fdf(x: float):
        v = b + math.exp(x)
        K = m.tv(T, v)
        return K[i] - target, _d_dv(key, T, v, K) * (v - b)

    x_lo, x_hi = math.log(v_lo - b), math.log(v_hi - b)
    if f_lo is None:
        f_lo = fdf(x_lo)[0]
    if f_hi is None:
        f_hi = fdf(x_hi)[0]
    x0 = math.log(v0 - b) if v0 is not None and v0 > b else None
    try:
        x = newton_bracketed(fdf, x_lo, x_hi, x0, flo=f_lo, fhi=f_hi, xtol=_XTOL, rtol=0.0)
    except NoBracket:
        return None
    return b + math.exp(x)


def _on_isotherm(m, T: float, key: str, target: float, field: str) -> Point:
    """T with u or s: both rise with v at fixed T, so one state at most."""
    v_lo, v_hi, f_lo, f_hi, x = _branch_at_T(m, T, key, target)
    if x is not None:
        raise m.wet_error(field, f"T = {T:.6g} K with {fmt_spec(key, target)}", T, x)
    v = _solve_v(m, T, key, target, v_lo, v_hi, f_lo, f_hi)
    if v is None:
        raise _cannot(m, field, f"{fmt_spec('T', T)} and {fmt_spec(key, target)}")
    return m.point(T, v, "given T; volume from the pair", field=field)


def _isotherm_h(m, T: float, h: float, field: str) -> Point:
    """T with h: h(v) along an isotherm has a minimum (the Joule-Thomson inversion); all roots."""
    b = m.b
    found: list[Point] = []
    wet = ""
    sat = m.saturation_curve.at(T)
    if sat is None:
        branches = [(b * (1.0 + _GAP), V_MAX)]
    else:
        _, v_l, v_v = sat
        h_l, h_v = m.tv(T, v_l)[2], m.tv(T, v_v)[2]
        branches = [(b * (1.0 + _GAP), v_l), (v_v, V_MAX)]
        if min(h_l, h_v) < h < max(h_l, h_v):
            x = (h - h_l) / (h_v - h_l)
            wet = f"a wet state at T = {T:.6g} K, x = {x:.6g}, which {m.label} cannot represent"
    for v_lo, v_hi in branches:
        for v in _all_roots_v(m, T, "h", h, v_lo, v_hi):
            found.append(m.point(T, v, "given T; volume from the pair", field=field))
    chosen = choose_largest_volume(("T", "h"), (T, h), found, wet)
    if chosen is None:
        if wet:
            raise m.wet_error(field, f"T = {T:.6g} K with {fmt_spec('h', h)}", T, (h - h_l) / (h_v - h_l))
        raise _cannot(m, field, f"{fmt_spec('T', T)} and {fmt_spec('h', h)}")
    return chosen


def _all_roots_v(m, T: float, key: str, target: float, v_lo: float, v_hi: float, n: int = 40) -> list[float]:
    """Every v in [v_lo, v_hi] where key(T, v) = target: a scan in ln(v - b), turning points included."""
    b, i = m.b, _INDEX[key]
    x_lo, x_hi = math.log(v_lo - b), math.log(v_hi - b)
    xs = [x_lo + (x_hi - x_lo) * k / (n - 1) for k in range(n)]

    def fdf(x: float):
        v = b + math.exp(x)
        K = m.tv(T, v)
        return K[i] - target, _d_dv(key, T, v, K) * (v - b)

    return _roots_on_grid(fdf, xs, lambda x: b + math.exp(x), xtol=_XTOL)


def _roots_on_grid(fdf, xs: list[float], to_value, xtol: float, rtol: float = 0.0) -> list[float]:
    """Roots of f over a grid: each sign change, and each pair of roots hidden by a turning point.

    Where f' changes sign between two grid points of one sign of f, the
    turning point is found and, if f crosses zero there, both roots.
    """
    values = [fdf(x) for x in xs]
    roots: list[float] = []

    def refine(a: float, b: float, fa: float, fb: float) -> None:
        try:
            roots.append(to_value(newton_bracketed(fdf, a, b, flo=fa, fhi=fb, xtol=xtol, rtol=rtol)))
        except NoBracket:
            pass

    for (xa, (fa, da)), (xb, (fb, db)) in zip(zip(xs, values), zip(xs[1:], values[1:])):
        if fa == 0.0:
            roots.append(to_value(xa))
        if fa * fb < 0:
            refine(xa, xb, fa, fb)
        elif da is not None and db is not None and da * db < 0 and fa * fb > 0:
            # a turning point between: f may dip through zero and back
            try:
                xt = brent(lambda x: fdf(x)[1], xa, xb, xtol=xtol, rtol=1e-15)
            except (NoBracket, RuntimeError, TypeError):
                continue
            ft = fdf(xt)[0]
            if ft * fa < 0:
                refine(xa, xt, fa, ft)
                refine(xt, xb, ft, fb)
    if values and values[-1][0] == 0.0:
        roots.append(to_value(xs[-1]))
    return roots


# -- fixed v ------------------------------------------------------------------------------
def _on_isochore(m, v: float, key: str, target: float, field: str) -> Point:
    """v with P, u, h or s: each rises with T at fixed v; one root, refused if it is wet."""
    i = _INDEX[key]
    T_lo, T_hi = m.T_bounds()

    def fdf(T: float):
        K = m.tv(T, v)
        return K[i] - target, _d_dT(key, T, v, K)

    try:
        T = newton_bracketed(fdf, T_lo, T_hi, _isochore_start(m, v, key, target, T_lo, T_hi),
                             xtol=0.0, rtol=_TTOL)
    except NoBracket:
        raise _cannot(m, field, f"{fmt_spec('v', v)} and {fmt_spec(key, target)}",
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
    i = _INDEX[key]

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
    return _ideal_start(m, key, target, T_lo, T_hi, v=v)


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
        return K[_INDEX[key]] - target, _d_dT(key, T, v, K) + _d_dv(key, T, v, K) * dv_dT

    if branch == "gas":  # from the saturated end, along a branch on which key is smooth
        T0 = T_lo * (1.0 + 1e-9)
    elif branch == "liquid":
        T0 = T_hi * (1.0 - 1e-9)
    else:
        T0 = _ideal_start(m, key, target, T_lo, T_hi, P=P)
    try:
        T = newton_bracketed(fdf, T_lo, T_hi, T0, flo=f_lo, fhi=f_hi, xtol=0.0, rtol=_TTOL)
    except NoBracket:
        raise _cannot(m, field, f"{fmt_spec('P', P)} and {fmt_spec(key, target)}",
                      f" between {T_lo:g} K and {T_hi:g} K") from None
    v, how = _branch_volume(m, T, P, branch)
    return m.point(T, v, how, field=field)


def _value(m, key: str, T: float, v: float) -> float:
    return v if key == "v" else m.tv(T, v)[_INDEX[key]]


def _branch_volume(m, T: float, P: float, branch: str) -> tuple[float, str]:
    """The volume root at (T, P) on a branch ('liquid', 'gas' or 'stable'), and how it was chosen."""
    v_lo, v_hi, n = m.volume_roots(T, P)
    if n == 1:
        return v_hi, "one real root"
    if branch == "stable":
        p = m.at_TP(T, P)
        return p.v, p.root
    if branch == "liquid":
        return v_lo, "three real roots; the liquid-like (smallest) chosen: liquid side of saturation at this P"
    return v_hi, "three real roots; the vapour-like (largest) chosen: vapour side of saturation at this P"


# -- fixed s: the equilibrium isentrope ---------------------------------------------------
def _existing(m, key: str, target: float) -> tuple[float, float]:
    """The temperatures [K] between which an isotherm holds a state with key (u or s) = target.

    At fixed T, u and s rise with v from v -> b to V_MAX; both ends rise
    with T. So the states exist from where the largest volume reaches the
    target up to where the smallest does (each an isochore, one root).
    """
    T_lo, T_hi = m.T_bounds()
    a = _T_on_isochore(m, V_MAX, key, target, T_lo, T_hi)
    b = _T_on_isochore(m, m.b * (1.0 + _GAP), key, target, T_lo, T_hi)
    return a * (1.0 + 1e-10), b * (1.0 - 1e-10)


def _T_on_isochore(m, v: float, key: str, target: float, T_lo: float, T_hi: float) -> float:
    """T in [T_lo, T_hi] where key(T, v) = target, or the end the target lies beyond."""
    i = _INDEX[key]

    def fdf(T: float):
        K = m.tv(T, v)
        return K[i] - target, _d_dT(key, T, v, K)

    f_lo, f_hi = fdf(T_lo)[0], fdf(T_hi)[0]
    if f_lo >= 0:
        return T_lo
    if f_hi <= 0:
        return T_hi
    return newton_bracketed(fdf, T_lo, T_hi, flo=f_lo, fhi=f_hi, xtol=0.0, rtol=1e-13)


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
    T = _ideal_start(m, key, target, T_lo, T_hi)
    _, _, s0 = m.species.cp_ig.terms(T)
    b = m.b
    v = max(R_GAS * T / P_REF * math.exp((s - s0) / R_GAS), 2.0 * b)
    x = math.log(v - b)
    i = _INDEX[key]
    for _ in range(40):
        v = b + math.exp(x)
        K = m.tv(T, v)
        f1, f2 = K[i] - target, K[3] - s
        a11, a12 = _d_dT(key, T, v, K), _d_dv(key, T, v, K) * (v - b)
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
    T_lo, T_hi = _existing(m, "s", s)
    i = _INDEX[key]
    last = {"v": None, "state": None}

    def at(T: float):
        """(f, df/dT along the isentrope or None, state): state is ('one', v) or ('wet', x)."""
        v_lo, v_hi, f_lo, f_hi, x = _branch_at_T(m, T, "s", s)
        if x is not None:
            v_l, v_v, K_l, K_v = v_lo, v_hi, f_lo, f_hi
            y = K_l[i] + x * (K_v[i] - K_l[i])
            v = v_l + x * (v_v - v_l)
            dy = v * (K_v[3] - K_l[3]) / (v_v - v_l) if key == "h" else None  # dh = v dP, Clapeyron
            return y - target, dy, ("wet", x)
        v = _solve_v(m, T, "s", s, v_lo, v_hi, f_lo, f_hi, last["v"])
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
        raise _cannot(m, field, f"{fmt_spec(key, target)} and {fmt_spec('s', s)}",
                      f" between {T_lo:g} K and {T_hi:g} K")
    last["v"] = None
    try:
        T = newton_bracketed(fdf, T_lo, T_hi, _ideal_start(m, key, target, T_lo, T_hi), flo=f_lo, fhi=f_hi,
                             xtol=0.0, rtol=_TTOL)
    except NoBracket:
        raise _cannot(m, field, f"{fmt_spec(key, target)} and {fmt_spec('s', s)}",
                      f" between {T_lo:g} K and {T_hi:g} K") from None
    _, _, state = at(T)
    if state is None:
        raise _cannot(m, field, f"{fmt_spec(key, target)} and {fmt_spec('s', s)}")
    if state[0] == "wet":
        raise m.wet_error(field, f"{fmt_spec(key, target)} with {fmt_spec('s', s)} (T = {T:.6g} K)", T, state[1])
    return m.point(T, state[1], "volume and T from the pair (equilibrium isentrope)", field=field)


def _ideal_start(m, key: str, target: float, T_lo: float, T_hi: float, P: float | None = None,
                 v: float | None = None) -> float:
    """T [K] where the ideal gas meets key = target (u or h; s or v at the given P or v),
    inside the bracket: the departures neglected, a first point for Newton."""
    cp_ig = m.species.cp_ig
    if key == "v":
        T = P * target / R_GAS
    elif key == "P":
        T = target * v / R_GAS
    else:
        def fdf(T: float):
            cp, h, s0 = cp_ig.terms(T)
            if key == "h":
                return h - target, cp
            if key == "u":
                return h - R_GAS * T - target, cp - R_GAS
            if P is not None:
                return s0 - R_GAS * math.log(P / P_REF) - target, cp / T
            return s0 - R_GAS * math.log(R_GAS * T / (v * P_REF)) - target, (cp - R_GAS) / T

        try:
            T = newton_bracketed(fdf, T_lo, T_hi, min(max(300.0, T_lo * 1.0001), T_hi * 0.9999), xtol=0.0, rtol=1e-8)
        except NoBracket:
            return 0.5 * (T_lo + T_hi)
    return min(max(T, T_lo * 1.0001), T_hi * 0.9999)


# -- u with h ----------------------------------------------------------------------------
def _u_h(m, u: float, h: float, field: str) -> Point:
    """u with h (P v = h - u): along a line of constant u, h may turn; every state, the one rule."""
    if not h > u:
        raise InputError(field, f"h - u = P v must be positive; got {fmt_spec('h', h)}, {fmt_spec('u', u)}")
    T_lo, T_hi = _existing(m, "u", u)

    def on_line(T: float):
        """(h - target, d/dT along the line, state): state ('one', v) or ('wet', x)."""
        v_lo, v_hi, f_lo, f_hi, x = _branch_at_T(m, T, "u", u)
        if x is not None:  # wet: h of the mixture of quality x
            return f_lo[2] + x * (f_hi[2] - f_lo[2]) - h, None, ("wet", x)
        v = _solve_v(m, T, "u", u, v_lo, v_hi, f_lo, f_hi)
        if v is None:
            return math.nan, None, None
        K = m.tv(T, v)
        dv_dT = -K[4] / (T * K[5] - K[0])  # du = cv dT + (T (∂P/∂T)_v - P) dv = 0
        return K[2] - h, v * (K[5] + K[6] * dv_dT) + K[0] * dv_dT, ("one", v)

    def fdf(T: float):
        f, df, _ = on_line(T)
        if df is None and math.isfinite(f):  # the wet part: a central difference
            dT = 1e-7 * T
            df = (on_line(T + dT)[0] - on_line(T - dT)[0]) / (2.0 * dT)
        return f, df

    n = 96
    Ts = [T_lo * (T_hi / T_lo) ** (k / (n - 1)) for k in range(n)]
    found: list[Point] = []
    wet: list[tuple[float, float]] = []
    for T in _roots_on_grid(fdf, Ts, lambda T: T, xtol=0.0, rtol=1e-14):
        f, _, state = on_line(T)
        if state is None or not abs(f) <= 1e-9 * max(abs(h), 1e3):
            continue
        if state[0] == "wet":
            wet.append((T, state[1]))
        else:
            found.append(m.point(T, state[1], "volume and T from the pair", field=field))
    words = "; ".join(f"a wet state at T = {T:.6g} K, x = {x:.6g}, which {m.label} cannot represent"
                      for T, x in wet)
    chosen = choose_largest_volume(("u", "h"), (u, h), found, words)
    if chosen is None:
        if wet:
            T, x = wet[0]
            raise m.wet_error(field, f"{fmt_spec('u', u)} with {fmt_spec('h', h)} (T = {T:.6g} K)", T, x)
        raise _cannot(m, field, f"{fmt_spec('u', u)} and {fmt_spec('h', h)}", f" between {T_lo:g} K and {T_hi:g} K")
    return chosen
