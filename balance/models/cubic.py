"""Cubic equations of state in one generic form.

    P = R T / (v - b) - a(T) / ((v + ε b)(v + σ b)),   a(T) = a_c α(T)

with a_c = Ωa R² Tc² / Pc and b = Ωb R Tc / Pc:

============================  =====  =====  ===================================
model                          ε      σ      α(T)
============================  =====  =====  ===================================
van der Waals (1873)           0      0      1
Redlich–Kwong (1949)           0      1      Tr^-1/2
Soave–Redlich–Kwong (1972)     0      1      [1 + m(1 - √Tr)]², m = 0.480 + 1.574ω - 0.176ω²
Peng–Robinson (1976)           1-√2   1+√2   [1 + m(1 - √Tr)]², m = 0.37464 + 1.54226ω - 0.26992ω²
============================  =====  =====  ===================================

Ωa and Ωb are the exact values that put the critical point of each
equation at (Tc, Pc) — the rounded published figures 0.42748/0.08664 and
0.45724/0.07780 agree with them to five digits.

Residual (departure) properties come from the closed form of the residual
Helmholtz energy at (T, v), with I = ln((v + σb)/(v + εb)) / (b(σ - ε))
(I = 1/v for van der Waals):

    A^r  = -R T ln(1 - b/v) - a I
    U^r  = (T a' - a) I
    S^r  = R ln(1 - b/v) + a' I                (at the same T and v)
    cv^r = T a'' I                              (zero for van der Waals: a'' = 0)
    departures at the same T and P: u_dep = U^r, h_dep = U^r + P v - R T,
    s_dep = S^r + R ln Z;  ln φ = A^r/(R T) + Z - 1 - ln Z

Everything here is vectorised over numpy arrays; scalar calls go through
the same code.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError, TwoPhaseError
from ..rootfind import brent
from ..species import Species
from ..units import P_REF, R
from .base import Point, PropertyModel, check_arguments

SQRT2 = math.sqrt(2.0)
_CBRT2 = 2.0 ** (1.0 / 3.0)
# Exact critical-point constants (the published rounded values in the docstring).
_OMEGA_RK = (1.0 / (9.0 * (_CBRT2 - 1.0)), (_CBRT2 - 1.0) / 3.0)
_OMEGA_PR = (0.45723552892138218938, 0.077796073903888455972)


@dataclass(frozen=True)
class CubicForm:
    """The constants that make one member of the generic cubic."""

    name: str
    label: str
    epsilon: float
    sigma: float
    omega_a: float
    omega_b: float
    alpha: str
    """'one', 'rk' (Tr^-1/2) or 'soave' ([1 + m(1 - √Tr)]²)"""
    m: tuple[float, float, float] = (0.0, 0.0, 0.0)
    """coefficients of m(ω) = m0 + m1 ω + m2 ω² for the Soave α"""
    Zc: float = 0.0
    """the equation's own critical compressibility"""
    alpha_text: str = ""


FORMS = {
    f.name: f
    for f in (
        CubicForm("van-der-waals", "van der Waals", 0.0, 0.0, 27.0 / 64.0, 1.0 / 8.0, "one",
                  Zc=0.375, alpha_text="α = 1"),
        CubicForm("redlich-kwong", "Redlich-Kwong", 0.0, 1.0, *_OMEGA_RK, "rk",
                  Zc=1.0 / 3.0, alpha_text="α = Tr^-1/2"),
        CubicForm("soave-redlich-kwong", "Soave-Redlich-Kwong", 0.0, 1.0, *_OMEGA_RK, "soave",
                  m=(0.480, 1.574, -0.176), Zc=1.0 / 3.0,
                  alpha_text="α = [1 + m(1 - √Tr)]², m = 0.480 + 1.574ω - 0.176ω²"),
        CubicForm("peng-robinson", "Peng-Robinson", 1.0 - SQRT2, 1.0 + SQRT2, *_OMEGA_PR, "soave",
                  m=(0.37464, 1.54226, -0.26992), Zc=0.30740130869870,
                  alpha_text="α = [1 + m(1 - √Tr)]², m = 0.37464 + 1.54226ω - 0.26992ω²"),
    )
}


def cubic_roots(c2, c1, c0):
    """Real roots of Z³ + c2 Z² + c1 Z + c0 = 0, vectorised.

    Returns (Z_low, Z_high, n_real): where the cubic has one real root both
    are that root; with three, the smallest and the largest. Roots are
    polished by two Newton steps.
    """
    c2, c1, c0 = np.broadcast_arrays(*(np.asarray(c, dtype=float) for c in (c2, c1, c0)))
    p = c1 - c2 * c2 / 3.0
    q = 2.0 * c2**3 / 27.0 - c2 * c1 / 3.0 + c0
    disc = (q / 2.0) ** 2 + (p / 3.0) ** 3
    one = disc > 0
    sq = np.sqrt(np.where(one, disc, 0.0))
    t_one = np.cbrt(-q / 2.0 + sq) + np.cbrt(-q / 2.0 - sq)
    pn = np.where(one, -1.0, p)  # p < 0 wherever three roots exist
    r = 2.0 * np.sqrt(-pn / 3.0)
    arg = np.clip(3.0 * q / (pn * r), -1.0, 1.0)
    phi = np.arccos(arg) / 3.0
    t_hi = r * np.cos(phi)
    t_lo = r * np.cos(phi + 2.0 * np.pi / 3.0)
    shift = c2 / 3.0
    z_lo = np.where(one, t_one, t_lo) - shift
    z_hi = np.where(one, t_one, t_hi) - shift
    z_lo, z_hi = _newton(z_lo, c2, c1, c0), _newton(z_hi, c2, c1, c0)
    return z_lo, z_hi, np.where(one, 1, 3)


def _newton(z, c2, c1, c0, steps: int = 2):
    for _ in range(steps):
        f = ((z + c2) * z + c1) * z + c0
        df = (3.0 * z + 2.0 * c2) * z + c1
        z = np.where(df != 0.0, z - f / np.where(df != 0.0, df, 1.0), z)
    return z


class Cubic(PropertyModel):
    """One cubic equation of state applied to one species."""

    def __init__(self, species: Species, form: CubicForm, a: float | None = None,
                 b: float | None = None):
        super().__init__(species)
        self.form = form
        self.name = form.name
        self.label = form.label
        sp = species
        self.a_c = a if a is not None else form.omega_a * R**2 * sp.Tc**2 / sp.Pc
        """attraction parameter at Tc [Pa m6/mol2] (a worksheet may set it)"""
        self.b = b if b is not None else form.omega_b * R * sp.Tc / sp.Pc
        """co-volume [m3/mol]"""
        self.a_given = a is not None
        self.b_given = b is not None
        m0, m1, m2 = form.m
        self.m = m0 + m1 * sp.omega + m2 * sp.omega**2
        # the equation's own critical point (differs from Tc, Pc when a or b are set)
        if form.alpha == "one":
            self.Tc_eos = 8.0 * self.a_c / (27.0 * R * self.b)
        else:
            self.Tc_eos = sp.Tc if not (self.a_given or self.b_given) else _critical_T(self)
        self.vc_eos = form.Zc / form.omega_b * self.b  # = Zc R Tc/Pc scaled by a given b

    # -- a(T) and its temperature derivatives ------------------------------
    def a_T(self, T):
        """a, da/dT, d²a/dT² at T [K] (arrays)."""
        T = np.asarray(T, dtype=float)
        Tc = self.species.Tc
        if self.form.alpha == "one":
            z = np.zeros_like(T)
            return self.a_c + z, z, z
        if self.form.alpha == "rk":
            Tr = T / Tc
            return (self.a_c * Tr**-0.5, -0.5 * self.a_c * Tr**-1.5 / Tc,
                    0.75 * self.a_c * Tr**-2.5 / Tc**2)
        m = self.m
        g = 1.0 + m * (1.0 - np.sqrt(T / Tc))
        dg = -m / (2.0 * np.sqrt(T * Tc))
        d2g = m / (4.0 * np.sqrt(Tc) * T**1.5)
        return self.a_c * g * g, self.a_c * 2.0 * g * dg, self.a_c * 2.0 * (dg * dg + g * d2g)

    def _I(self, v):
        """∫ dv / ((v + εb)(v + σb)) from v to ∞ [mol/m3]."""
        e, s, b = self.form.epsilon, self.form.sigma, self.b
        if s == e:
            return 1.0 / v
        return np.log((v + s * b) / (v + e * b)) / (b * (s - e))

    # -- vectorised core -------------------------------------------------------
    def pressure(self, T, v):
        """P [Pa] at T [K], v [m3/mol] (arrays)."""
        a, _, _ = self.a_T(T)
        e, s, b = self.form.epsilon, self.form.sigma, self.b
        return R * T / (v - b) - a / ((v + e * b) * (v + s * b))

    def props_Tv(self, T, v) -> dict[str, np.ndarray]:
        """Every property at T [K], v [m3/mol], as arrays in molar SI units."""
        T = np.asarray(T, dtype=float)
        v = np.asarray(v, dtype=float)
        e, s, b = self.form.epsilon, self.form.sigma, self.b
        a, da, d2a = self.a_T(T)
        I = self._I(v)
        den = (v + e * b) * (v + s * b)
        P = R * T / (v - b) - a / den
        Z = P * v / (R * T)
        ln_free = np.log(1.0 - b / v)
        A_r = -R * T * ln_free - a * I
        U_r = (T * da - a) * I
        S_r = R * ln_free + da * I
        cv_r = T * d2a * I
        dPdT = R / (v - b) - da / den
        dPdv = -R * T / (v - b) ** 2 + a * (2.0 * v + (e + s) * b) / den**2
        cp_ig = self.species.cp_ig
        cp0 = cp_ig.cp(T)
        cv = cp0 - R + cv_r
        cp = cv - T * dPdT**2 / dPdv
        with np.errstate(divide="ignore", invalid="ignore"):
            lnZ = np.log(Z)
        u_dep = U_r
        h_dep = U_r + P * v - R * T
        s_dep = S_r + R * lnZ
        h_ig = cp_ig.h(T)
        with np.errstate(invalid="ignore"):  # P < 0 (stretched liquid) is refused by the caller
            s_ig = cp_ig.s(T) - R * np.log(P / P_REF)
        return {
            "T": T, "P": P, "v": v, "Z": Z,
            "u": h_ig - R * T + u_dep, "h": h_ig + h_dep, "s": s_ig + s_dep,
            "cv": cv, "cp": cp, "u_dep": u_dep, "h_dep": h_dep, "s_dep": s_dep,
            "ln_phi": A_r / (R * T) + Z - 1.0 - lnZ,
        }

    def roots_TP(self, T, P):
        """Volume roots at T, P: (v_low, v_high, n_real, v_stable) arrays [m3/mol].

        Where three real roots exist the stable one is the one with the
        lower fugacity coefficient (lower Gibbs energy).
        """
        T = np.asarray(T, dtype=float)
        P = np.asarray(P, dtype=float)
        e, s = self.form.epsilon, self.form.sigma
        a, _, _ = self.a_T(T)
        A = a * P / (R * T) ** 2
        B = self.b * P / (R * T)
        c2 = -(1.0 + B - (e + s) * B)
        c1 = A + e * s * B * B - (e + s) * B * (B + 1.0)
        c0 = -(A * B + e * s * B * B * (B + 1.0))
        z_lo, z_hi, n = cubic_roots(c2, c1, c0)
        # a root at or below B is not a fluid state (v <= b)
        z_lo = np.where(z_lo > B, z_lo, z_hi)
        v_lo, v_hi = z_lo * R * T / P, z_hi * R * T / P
        three = (n == 3) & (z_hi > z_lo * (1 + 1e-12))
        if np.any(three):
            phi_lo = self.props_Tv(T, v_lo)["ln_phi"]
            phi_hi = self.props_Tv(T, v_hi)["ln_phi"]
            stable = np.where(three & (phi_lo < phi_hi), v_lo, v_hi)
        else:
            stable = v_hi
        return v_lo, v_hi, np.where(three, 3, 1), stable

    def states_TP(self, T, P) -> dict[str, np.ndarray]:
        """Every property of the stable state at each (T, P), vectorised."""
        _, _, _, v = self.roots_TP(T, P)
        return self.props_Tv(T, v)

    # -- the PropertyModel interface --------------------------------------
    @property
    def reference_state(self) -> str:
        return "ideal gas at 298.15 K and 1 bar: h = 0, s = 0 (real-fluid values add the departures)"

    def equations(self) -> list[str]:
        f = self.form
        e = f"{f.epsilon:.6g}"
        s = f"{f.sigma:.6g}"
        lines = [
            f"P = R T/(v - b) - a(T)/((v + ε b)(v + σ b)),  ε = {e}, σ = {s}",
            f"a(T) = a_c α(T),  a_c = {self.a_c:.6g} Pa m6/mol2"
            + (" (given)" if self.a_given else f" = Ωa R² Tc²/Pc, Ωa = {f.omega_a:.8f}"),
            f"b = {self.b:.6g} m3/mol" + (" (given)" if self.b_given else f" = Ωb R Tc/Pc, Ωb = {f.omega_b:.8f}"),
            f.alpha_text + (f",  m = {self.m:.6f}" if f.alpha == "soave" else ""),
            "u = u_ig(T) + (T a' - a) I;  s = s_ig(T, P) + R ln(1 - b/v) + a' I + R ln Z",
            "cv = cv_ig(T) + T a'' I;  cp = cv - T (∂P/∂T)_v² / (∂P/∂v)_T",
        ]
        if f.alpha == "one":
            lines.append("a'' = 0 for van der Waals: cv = cv_ig(T), no departure in cv")
        return lines

    def at_TP(self, T: float, P: float) -> Point:
        check_arguments(T=T, P=P)
        v_lo, v_hi, n, v = self.roots_TP(T, P)
        n, v, v_lo, v_hi = int(n), float(v), float(v_lo), float(v_hi)
        if n == 3:
            which = "the liquid-like (smallest)" if v == v_lo else "the vapour-like (largest)"
            how = f"three real roots; {which} chosen: lower fugacity (stable)"
        else:
            how = "one real root"
        return self._point(T, v, how)

    def at_Tv(self, T: float, v: float) -> Point:
        check_arguments(T=T, v=v)
        if v <= self.b:
            raise InputError("v", self._below_b(v))
        sat = self.saturation(T)
        if sat is not None and sat[1] < v < sat[2]:
            raise TwoPhaseError(
                "state",
                f"T = {T:.2f} K, v = {v:.4g} m3/mol lies inside the two-phase region of {self.label} "
                f"(saturated liquid {sat[1]:.4g}, vapour {sat[2]:.4g} m3/mol at {sat[0] / 1e5:.4g} bar). "
                "A cubic gives no wet states here: use the reference model (--model reference) for a "
                "liquid-vapour mixture",
            )
        return self._point(T, v, "given volume")

    def _below_b(self, v: float) -> str:
        return f"v = {v:.6g} m3/mol is not above the co-volume b = {self.b:.6g} m3/mol of {self.label}"

    def flash(self, specs: dict[str, float], field: str = "state") -> Point:
        v = specs.get("v")
        if isinstance(v, (int, float)) and 0 < v <= self.b:
            raise InputError(f"{field}.v", self._below_b(v))
        return super().flash(specs, field)

    def _point(self, T: float, v: float, how: str) -> Point:
        p = self.props_Tv(T, v)
        f = {k: float(val) for k, val in p.items()}
        if f["P"] <= 0:
            raise TwoPhaseError("state", f"{self.label} gives a negative pressure at T = {T:.2f} K, v = {v:.4g} m3/mol (a stretched liquid): no stable state")
        if T >= self.Tc_eos:
            phase = "supercritical" if f["P"] >= self.species.Pc else "gas"
        else:
            phase = "gas" if v > self.vc_eos else "liquid"
        return Point(T=T, P=f["P"], v=v, u=f["u"], h=f["h"], s=f["s"], cv=f["cv"], cp=f["cp"],
                     Z=f["Z"], phase=phase, u_dep=f["u_dep"], h_dep=f["h_dep"],
                     s_dep=f["s_dep"], ln_phi=f["ln_phi"], root=how)

    def saturation(self, T: float):
        """(P_sat [Pa], v_liquid, v_vapour [m3/mol]) at T, or None above the equation's Tc."""
        return _saturation(self, round(float(T), 12))

    def T_bounds(self) -> tuple[float, float]:
        return (max(1.0, 0.25 * self.species.Tc), 6000.0)

    def v_bounds(self, T: float) -> tuple[float, float]:
        return (self.b * 1.0005, 1e3)

    def warnings(self, p: Point) -> list[str]:
        out = []
        cp_ig = self.species.cp_ig
        if not cp_ig.in_range(p.T):
            out.append(f"T = {p.T:.2f} K is outside the range of the cp° polynomial ({cp_ig.range_text})")
        if p.phase == "liquid":
            out.append(
                f"liquid state with {self.label}: cubic liquid volumes are typically 5-20 % off; "
                "prefer the reference or the incompressible model for liquids"
            )
        if p.root.startswith("three"):
            out.append(f"{self.label} has three volume roots at T = {p.T:.2f} K, P = {p.P / 1e5:.4g} bar: {p.root}")
        return out


def _critical_T(model: Cubic) -> float:
    """Critical temperature of a cubic with given a, b: where the spinodals meet."""
    def has_three(T):
        return _spinodals(model, T) is not None

    lo, hi = 0.05 * model.species.Tc, 20 * model.species.Tc
    if not has_three(lo):
        return lo
    for _ in range(80):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if has_three(mid) else (lo, mid)
    return lo


def _spinodals(model: Cubic, T: float):
    """Volumes where (∂P/∂v)_T = 0 above b, or None (no van der Waals loop)."""
    e, s, b = model.form.epsilon, model.form.sigma, model.b
    a = float(model.a_T(T)[0])
    # R T ((v+eb)(v+sb))² - a (2v + (e+s) b)(v-b)² = 0, a quartic in v
    q = np.polynomial.polynomial
    den = q.polymul([e * b, 1.0], [s * b, 1.0])
    lhs = R * T * q.polymul(den, den)
    rhs = a * q.polymul([(e + s) * b, 2.0], q.polymul([-b, 1.0], [-b, 1.0]))
    coeffs = q.polysub(lhs, rhs)
    roots = q.polyroots(coeffs)
    real = sorted(r.real for r in roots if abs(r.imag) < 1e-12 * max(1.0, abs(r.real)) and r.real > b)
    if len(real) < 2:
        return None
    return real[0], real[-1]


def _saturation(model: Cubic, T: float):
    cache = model.__dict__.setdefault("_sat_cache", {})
    if T in cache:
        return cache[T]
    result = None
    if T < model.Tc_eos * (1 - 1e-9):
        spin = _spinodals(model, T)
        if spin is not None:
            P_max = float(model.pressure(T, spin[1]))
            # below ~1e-6 P_max the closed-form roots lose the liquid root to
            # round-off; saturation pressures that low only occur far below Tr = 0.3
            P_min = max(float(model.pressure(T, spin[0])), 1e-6 * P_max)

            def diff(P):
                v_lo, v_hi, _, _ = model.roots_TP(T, P)
                return float(model.props_Tv(T, v_lo)["ln_phi"] - model.props_Tv(T, v_hi)["ln_phi"])

            lo, hi = P_min * (1 + 1e-9), P_max * (1 - 1e-9)
            # Next to a spinodal two roots nearly coincide and the closed form
            # can return one real root (diff is then 0: no bracket, e.g. PR
            # nitrogen at T/Tc = 0.9), and at the lowest pressures a liquid
            # "root" lost to round-off (PR methane at T/Tc = 0.8967 gave
            # v_liquid = 5 m3/mol at 3 Pa): step inward until the smallest and
            # largest roots lie on the liquid and vapour sides of the spinodals.
            def roots_ok(P):
                v_lo, v_hi, n, _ = model.roots_TP(T, P)
                return int(n) == 3 and float(v_lo) < spin[0] and float(v_hi) > spin[1]

            gap = P_max - P_min
            for step in (1e-7, 1e-5, 1e-3, 1e-2):
                if roots_ok(lo):
                    break
                lo = P_min + step * gap
            for step in (1e-7, 1e-5, 1e-3, 1e-2):
                if roots_ok(hi):
                    break
                hi = P_max - step * gap
            try:
                if hi > lo and diff(lo) * diff(hi) < 0:
                    P = brent(diff, lo, hi, xtol=1e-12 * hi, rtol=2.5e-14)  # = brentq's rtol 1e-13
                    v_lo, v_hi, _, _ = model.roots_TP(T, P)
                    result = (P, float(v_lo), float(v_hi))
            except (ValueError, FloatingPointError):
                result = None
    if len(cache) > 4096:
        cache.clear()
    cache[T] = result
    return result
