"""The pairs a cubic can meet twice: T with h, and u with h.

Along an isotherm h falls, then rises past the Joule-Thomson inversion;
along a line of constant u, h - u = P v can turn. The whole path is
scanned, turning points included, every state found, and the one rule of
:mod:`..base` applied: the largest volume the model can represent, the
others named in the note (a wet state among them, which a cubic cannot give).
"""

from __future__ import annotations

import math

from ...errors import InputError
from ...rootfind import NoBracket, brent, newton_bracketed
from ..base import Point, choose_largest_volume, fmt_spec
from .lines import GAP, INDEX, V_MAX, XTOL, branch_at_T, cannot, d_dv, existing, solve_v


def isotherm_h(m, T: float, h: float, field: str) -> Point:
    """T with h: h(v) along an isotherm has a minimum (the Joule-Thomson inversion); all roots."""
    b = m.b
    found: list[Point] = []
    wet = ""
    sat = m.saturation_curve.at(T)
    if sat is None:
        branches = [(b * (1.0 + GAP), V_MAX)]
    else:
        _, v_l, v_v = sat
        h_l, h_v = m.tv(T, v_l)[2], m.tv(T, v_v)[2]
        branches = [(b * (1.0 + GAP), v_l), (v_v, V_MAX)]
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
        raise cannot(m, field, f"{fmt_spec('T', T)} and {fmt_spec('h', h)}")
    return chosen


def _all_roots_v(m, T: float, key: str, target: float, v_lo: float, v_hi: float, n: int = 40) -> list[float]:
    """Every v in [v_lo, v_hi] where key(T, v) = target: a scan in ln(v - b), turning points included."""
    b, i = m.b, INDEX[key]
    x_lo, x_hi = math.log(v_lo - b), math.log(v_hi - b)
    xs = [x_lo + (x_hi - x_lo) * k / (n - 1) for k in range(n)]

    def fdf(x: float):
        v = b + math.exp(x)
        K = m.tv(T, v)
        return K[i] - target, d_dv(key, T, v, K) * (v - b)

    return _roots_on_grid(fdf, xs, lambda x: b + math.exp(x), xtol=XTOL)


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


# -- u with h ----------------------------------------------------------------------------
def u_h(m, u: float, h: float, field: str) -> Point:
    """u with h (P v = h - u): along a line of constant u, h may turn; every state, the one rule."""
    if not h > u:
        raise InputError(field, f"h - u = P v must be positive; got {fmt_spec('h', h)}, {fmt_spec('u', u)}")
    T_lo, T_hi = existing(m, "u", u)

    def on_line(T: float):
        """(h - target, d/dT along the line, state): state ('one', v) or ('wet', x)."""
        v_lo, v_hi, f_lo, f_hi, x = branch_at_T(m, T, "u", u)
        if x is not None:  # wet: h of the mixture of quality x
            return f_lo[2] + x * (f_hi[2] - f_lo[2]) - h, None, ("wet", x)
        v = solve_v(m, T, "u", u, v_lo, v_hi, f_lo, f_hi)
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
        raise cannot(m, field, f"{fmt_spec('u', u)} and {fmt_spec('h', h)}", f" between {T_lo:g} K and {T_hi:g} K")
    return chosen
