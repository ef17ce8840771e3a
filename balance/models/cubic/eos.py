"""One cubic equation of state applied to one species: states at (T, v) and (T, P).

Two paths through one formula set (:mod:`.formulas`):

* the scalar path — ``at_TP``, ``at_Tv``, ``flash`` and :meth:`Cubic.tv` —
  computes in plain Python floats (a few microseconds per state; numpy on
  one-element arrays costs some thirty times more);
* the vectorised path — ``props_Tv``, ``roots_TP``, ``states_TP`` — takes
  numpy arrays, in chunks so that a million points cost no more per point
  than a thousand and need little memory beyond the results.
"""

from __future__ import annotations

import math

import numpy as np

from ...errors import InputError, TwoPhaseError
from ...species import Species
from ...units import R
from ..base import Point, PropertyModel, check_arguments
from . import formulas as fm
from .flash import solve_pair
from .forms import CubicForm
from .saturation import SaturationCurve

#: Points per chunk of the vectorised path (keeps temporaries in cache and memory small).
CHUNK = 1 << 15
#: The properties the vectorised path returns, in this order.
ARRAY_KEYS = ("T", "P", "v", "Z", "u", "h", "s", "cv", "cp", "u_dep", "h_dep", "s_dep", "ln_phi")

_ONE_ROOT = "one real root"
_THREE = "three real roots; {} chosen: lower fugacity (stable)"
_LIQUID_ROOT = _THREE.format("the liquid-like (smallest)")
_VAPOUR_ROOT = _THREE.format("the vapour-like (largest)")


def _clip(x: float) -> float:
    return -1.0 if x < -1.0 else 1.0 if x > 1.0 else x


def _np_clip(x):
    return np.clip(x, -1.0, 1.0)


def z_roots(c2: float, c1: float, c0: float) -> tuple[float, float, int]:
    """Real roots of Z³ + c2 Z² + c1 Z + c0 = 0 in floats: (Z_low, Z_high, n_real).

    The largest root comes from the closed form (Cardano's, or the
    trigonometric one), polished by two Newton steps; the other two from the
    quadratic left when it is divided out (:func:`.formulas.deflated`), which
    keeps a liquid root of 1e-12 exact where the closed form loses it. With
    one real root both are that root; with three, the smallest and the largest.
    """
    p, q, disc, shift = fm.depressed(c2, c1, c0)
    if disc > 0 or p == 0.0:
        z = fm.one_root(q, max(disc, 0.0), math.cbrt, math.sqrt) - shift
    else:
        z = fm.three_roots(p, q, math.sqrt, math.acos, math.cos, _clip)[1] - shift
    z = _polish(z, c2, c1, c0)
    d1, d0, dq = fm.deflated(z, c2, c0)
    if not dq > 0.0:
        return z, z, 1
    r = -0.5 * (d1 + math.copysign(math.sqrt(dq), d1))
    small = min(r, d0 / r) if r != 0.0 else 0.0
    return _polish(small, c2, c1, c0), z, 3


def _polish(z: float, c2: float, c1: float, c0: float) -> float:
    """Two Newton steps on the cubic (:func:`.formulas.newton_terms`, written out: the scalar path's hot spot)."""
    for _ in range(2):
        df = (3.0 * z + 2.0 * c2) * z + c1
        if df != 0.0:
            z -= (((z + c2) * z + c1) * z + c0) / df
    return z


def cubic_roots(c2, c1, c0):
    """Real roots of Z³ + c2 Z² + c1 Z + c0 = 0 for arrays: (Z_low, Z_high, n_real).

    The same formulas as :func:`z_roots`, applied element by element.
    """
    c2, c1, c0 = np.broadcast_arrays(*(np.asarray(c, dtype=float) for c in (c2, c1, c0)))
    with np.errstate(invalid="ignore", divide="ignore"):
        p, q, disc, shift = fm.depressed(c2, c1, c0)
        one = (disc > 0) | (p == 0.0)
        t_one = fm.one_root(q, np.where(disc > 0, disc, 0.0), np.cbrt, np.sqrt)
        t_hi = fm.three_roots(np.where(one, -1.0, p), q, np.sqrt, np.arccos, np.cos, _np_clip)[1]
        z = _np_polish(np.where(one, t_one, t_hi) - shift, c2, c1, c0)
        d1, d0, dq = fm.deflated(z, c2, c0)
        three = dq > 0.0
        r = -0.5 * (d1 + np.copysign(np.sqrt(np.where(three, dq, 0.0)), d1))
        small = np.where(r != 0.0, np.minimum(r, d0 / np.where(r != 0.0, r, 1.0)), 0.0)
        z_lo = np.where(three, _np_polish(small, c2, c1, c0), z)
    return z_lo, z, np.where(three, 3, 1)


def _np_polish(z, c2, c1, c0):
    for _ in range(2):
        f, df = fm.newton_terms(z, c2, c1, c0)
        ok = df != 0.0
        z = z - np.where(ok, f / np.where(ok, df, 1.0), 0.0)
    return z


class Cubic(PropertyModel):
    """One cubic equation of state applied to one species.

    Parameters
    ----------
    species : Species
    form : CubicForm  which member of the generic cubic
    a : float, optional  attraction parameter at Tc [Pa m6/mol2] (a worksheet may set it)
    b : float, optional  co-volume [m3/mol]
    a_rk : float, optional  Redlich-Kwong's own a [Pa m6 K^0.5/mol2], the a of a / (√T v (v + b));
        a_c = a_rk / √Tc (only for Redlich-Kwong)
    """

    def __init__(self, species: Species, form: CubicForm, a: float | None = None,
                 b: float | None = None, a_rk: float | None = None):
        super().__init__(species)
        self.form = form
        self.name = form.name
        self.label = form.label
        sp = species
        if a_rk is not None:
            if form.alpha != "rk":
                raise InputError("fluid.overrides.a", f"is in Pa m6 K^0.5/mol2, Redlich-Kwong's form of a (a / √T in "
                                                      f"the equation); {form.label} takes a at Tc, in Pa m6/mol2")
            a = a_rk / math.sqrt(sp.Tc)
        self.a_rk = a_rk
        """Redlich-Kwong's a as given [Pa m6 K^0.5/mol2], or None"""
        self.a_c = a if a is not None else form.omega_a * R**2 * sp.Tc**2 / sp.Pc
        """attraction parameter at Tc [Pa m6/mol2]"""
        self.b = b if b is not None else form.omega_b * R * sp.Tc / sp.Pc
        """co-volume [m3/mol]"""
        self.a_given = a is not None
        self.b_given = b is not None
        if not -1.0 < sp.omega < 5.0:  # beyond any fluid's; 1e308 would overflow below
            raise InputError("fluid.overrides.omega",
                             f"must be an acentric factor between -1 and 5; got {sp.omega:g}")
        m0, m1, m2 = form.m
        self.m = m0 + m1 * sp.omega + m2 * sp.omega * sp.omega
        """the Soave α's m(ω) [-]"""
        self._eps, self._sig = form.epsilon, form.sigma
        self._Tc, self._sqrt_Tc = sp.Tc, math.sqrt(sp.Tc)
        self.Tc_eos, self.Pc_eos = self._critical_point()
        """the equation's own critical point [K], [Pa] (Tc, Pc unless a or b are set)"""
        self.vc_eos = form.Zc / form.omega_b * self.b
        """the equation's critical molar volume [m3/mol]"""
        self.saturation_curve = SaturationCurve(self)
        """the equation's vapour-liquid coexistence, fitted once on first use"""

    def _critical_point(self) -> tuple[float, float]:
        """Where a(T) / (b R T) = Ωa / Ωb: the reduced attraction of the critical point."""
        f, sp = self.form, self.species
        if not (self.a_given or self.b_given):
            return sp.Tc, sp.Pc
        k = f.omega_a / f.omega_b * self.b * R  # a(Tc) = k Tc
        if f.alpha == "one":
            Tc = self.a_c / k
        elif f.alpha == "rk":  # a_c (T/Tc)^-1/2 = k T
            Tc = (self.a_c * self._sqrt_Tc / k) ** (2.0 / 3.0)
        else:  # √a_c (1 + m (1 - √(T/Tc))) = √(k T), linear in √T
            ra = math.sqrt(self.a_c)
            Tc = (ra * (1.0 + self.m) / (math.sqrt(k) + ra * self.m / self._sqrt_Tc)) ** 2
        return Tc, f.omega_b * R * Tc / self.b

    # -- a(T) and its temperature derivatives ------------------------------
    def a_terms(self, T):
        """a [Pa m6/mol2], da/dT, d²a/dT² at T [K]; floats or arrays alike."""
        a_c = self.a_c
        if self.form.alpha == "one":
            zero = 0.0 * T
            return a_c + zero, zero, zero
        if self.form.alpha == "rk":
            a = a_c * (self._Tc / T) ** 0.5
            return a, -0.5 * a / T, 0.75 * a / (T * T)
        m = self.m
        root = (T / self._Tc) ** 0.5
        g = 1.0 + m * (1.0 - root)
        dg = -0.5 * m * root / T
        d2g = 0.25 * m * root / (T * T)
        return a_c * g * g, 2.0 * a_c * g * dg, 2.0 * a_c * (dg * dg + g * d2g)

    # -- the scalar path ------------------------------------------------------
    def residual(self, T: float, v: float, a3=None):
        """:func:`.formulas.residual_terms` at (T, v) in floats."""
        a, da, d2a = self.a_terms(T) if a3 is None else a3
        return fm.residual_terms(T, v, a, da, d2a, self.b, self._eps, self._sig, math.log1p)

    def tv(self, T: float, v: float) -> tuple:
        """(P, u, h, s, cv, (∂P/∂T)_v, (∂P/∂v)_T) at T [K], v [m3/mol], molar SI floats.

        What a search needs and nothing more: no checks, no Point.
        """
        return fm.caloric(T, v, self.species.cp_ig.terms(T), self.residual(T, v), math.log)

    def volume_roots(self, T: float, P: float, a: float | None = None) -> tuple[float, float, int]:
        """(v_low, v_high, n) [m3/mol]: the smallest and largest volume roots at T, P.

        n is 3 where three distinct roots above b exist, else 1 (both are then the one root).
        """
        if a is None:
            a = self.a_terms(T)[0]
        RT = R * T
        B = self.b * P / RT
        c2, c1, c0 = fm.z_coefficients(a * P / (RT * RT), B, self._eps, self._sig)
        z_lo, z_hi, n = z_roots(c2, c1, c0)
        if not z_lo > B:  # a root at or below B is not a fluid state (v <= b)
            z_lo = z_hi
        three = n == 3 and z_hi > z_lo * (1.0 + 1e-12)
        return z_lo * RT / P, z_hi * RT / P, 3 if three else 1

    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K], P [Pa]: of three roots, the one of lower fugacity."""
        if not (0.0 < T < math.inf and 0.0 < P < math.inf):
            check_arguments(T=T, P=P)  # raises, naming the argument
        T, P = float(T), float(P)
        a3 = self.a_terms(T)
        v_lo, v_hi, n = self.volume_roots(T, P, a3[0])
        if n == 3:
            res_lo, res_hi = self.residual(T, v_lo, a3), self.residual(T, v_hi, a3)
            phi_lo = fm.ln_phi(T, v_lo, P, res_lo[3], math.log)
            phi_hi = fm.ln_phi(T, v_hi, P, res_hi[3], math.log)
            if phi_lo < phi_hi:
                return self.point(T, v_lo, _LIQUID_ROOT, res=res_lo)
            return self.point(T, v_hi, _VAPOUR_ROOT, res=res_hi)
        return self.point(T, v_hi, _ONE_ROOT, res=self.residual(T, v_hi, a3))

    def at_TP_one_phase(self, T: float, P: float) -> Point:
        """:meth:`at_TP` of the equation alone, without a mixture's phase test (what a search asks)."""
        return Cubic.at_TP(self, T, P)

    def at_Tv(self, T: float, v: float, field: str = "") -> Point:
        """The state at T [K] and molar volume v [m3/mol]; inside the dome a TwoPhaseError.

        Errors name ``field`` (a flash's), or the argument of a direct call.
        """
        if not (0.0 < T < math.inf and 0.0 < v < math.inf):
            check_arguments(T=T, v=v)  # raises, naming the argument
        T, v = float(T), float(v)
        if v <= self.b:
            raise InputError(f"{field}.v" if field else "v", self.below_b(v))
        if self.saturation_curve.contains(T, v):
            raise self.wet_error(field or "state", f"T = {T:.2f} K, v = {v:.4g} m3/mol", T)
        return self.point(T, v, "given volume", field=field or "state")

    def point(self, T: float, v: float, how: str, note: str = "", res=None, field: str = "state") -> Point:
        """The :class:`Point` at (T, v) [K, m3/mol], with how its root was chosen."""
        if res is None:
            res = self.residual(T, v)
        if not res[0] > 0:
            raise TwoPhaseError(field, f"{self.label} gives a negative pressure at T = {T:.2f} K, v = {v:.4g} "
                                       "m3/mol (a stretched liquid): no stable state")
        cal = fm.caloric(T, v, self.species.cp_ig.terms(T), res, math.log)
        P, Z, u, h, s, cv, cp, u_dep, h_dep, s_dep, ln_phi = fm.properties(T, v, cal, res, math.log)
        if T >= self.Tc_eos:
            phase = "supercritical" if P >= self.Pc_eos else "gas"
        else:
            phase = "gas" if v > self.vc_eos else "liquid"
        return Point(T, P, v, u, h, s, cv, cp, Z, phase, u_dep, h_dep, s_dep, None, ln_phi, how, note)

    def below_b(self, v: float) -> str:
        return f"v = {v:.6g} m3/mol is not above the co-volume b = {self.b:.6g} m3/mol of {self.label}"

    def wet_error(self, field: str, where: str, T: float, x: float | None = None) -> TwoPhaseError:
        """The refusal of a state inside the dome, with the saturated ends at T."""
        sat = self.saturation_curve.at(T)
        ends = ""
        if sat is not None:
            ends = (f" (saturated liquid {sat[1]:.4g}, vapour {sat[2]:.4g} m3/mol at "
                    f"{sat[0] / 1e5:.4g} bar)")
        quality = f", quality x = {x:.4g}" if x is not None else ""
        return TwoPhaseError(
            field,
            f"{where} lies inside the two-phase region of {self.label}{ends}{quality}. A cubic gives no "
            "wet states: for a liquid-vapour mixture choose the reference model for the fluid",
        )

    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        if "v" in keys:
            v = values[keys.index("v")]
            if v <= self.b:
                raise InputError(f"{field}.v", self.below_b(v))
            if keys[0] == "T":
                return self.at_Tv(values[0], v, field)
        return solve_pair(self, keys, values, field)

    def spinodal_volumes(self, T: float) -> tuple[float, float] | None:
        """(v_liquid, v_vapour) [m3/mol] where (∂P/∂v)_T = 0 at T [K], or None (no loop at this T).

        The roots above b of the quartic R T ((v+εb)(v+σb))² - a (2v + (ε+σ)b)(v-b)² = 0.
        """
        e, s, b = self._eps, self._sig, self.b
        a = self.a_terms(float(T))[0]
        q = np.polynomial.polynomial
        den = q.polymul([e * b, 1.0], [s * b, 1.0])
        coeffs = q.polysub(R * T * q.polymul(den, den), a * q.polymul([(e + s) * b, 2.0], q.polymul([-b, 1.0], [-b, 1.0])))
        real = sorted(r.real for r in q.polyroots(coeffs) if abs(r.imag) < 1e-12 * max(1.0, abs(r.real)) and r.real > b)
        return (real[0], real[-1]) if len(real) >= 2 else None

    def saturation(self, T: float):
        """(P_sat [Pa], v_liquid, v_vapour [m3/mol]) at T [K], solved to round-off; None at or above Tc."""
        return self.saturation_curve.exact(float(T))

    # -- the vectorised path -------------------------------------------------------
    def pressure(self, T, v):
        """P [Pa] at T [K], v [m3/mol] (arrays)."""
        T, v = np.asarray(T, dtype=float), np.asarray(v, dtype=float)
        a, da, d2a = self.a_terms(T)
        with np.errstate(invalid="ignore", divide="ignore"):
            return fm.residual_terms(T, v, a, da, d2a, self.b, self._eps, self._sig, np.log1p)[0]

    def props_Tv(self, T, v) -> dict[str, np.ndarray]:
        """Every property at T [K], v [m3/mol], as arrays in molar SI units (keys: ARRAY_KEYS)."""
        T, v = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(v, dtype=float))
        a, da, d2a = self.a_terms(T)
        with np.errstate(invalid="ignore", divide="ignore"):  # P <= 0 (stretched liquid): the caller refuses
            res = fm.residual_terms(T, v, a, da, d2a, self.b, self._eps, self._sig, np.log1p)
            cal = fm.caloric(T, v, self.species.cp_ig.terms(T), res, np.log)
            values = fm.properties(T, v, cal, res, np.log)
        return dict(zip(ARRAY_KEYS, (T, values[0], v, *values[1:])))

    def roots_TP(self, T, P):
        """Volume roots at T, P: (v_low, v_high, n_real, v_stable) arrays [m3/mol].

        Where three real roots exist the stable one is the one with the
        lower fugacity coefficient (lower Gibbs energy).
        """
        T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
        a, da, d2a = self.a_terms(T)
        RT = R * T
        B = self.b * P / RT
        z_lo, z_hi, n = cubic_roots(*fm.z_coefficients(a * P / (RT * RT), B, self._eps, self._sig))
        z_lo = np.where(z_lo > B, z_lo, z_hi)
        v_lo, v_hi = z_lo * RT / P, z_hi * RT / P
        three = (n == 3) & (z_hi > z_lo * (1 + 1e-12))
        stable = np.array(v_hi, copy=True)
        if np.any(three):
            Tt, at, dat, d2at = T[three], a[three], da[three], d2a[three]
            with np.errstate(invalid="ignore", divide="ignore"):
                phi = []
                for v in (v_lo[three], v_hi[three]):
                    res = fm.residual_terms(Tt, v, at, dat, d2at, self.b, self._eps, self._sig, np.log1p)
                    phi.append(fm.ln_phi(Tt, v, P[three], res[3], np.log))
            stable[three] = np.where(phi[0] < phi[1], v_lo[three], v_hi[three])
        return v_lo, v_hi, np.where(three, 3, 1), stable

    def states_TP(self, T, P) -> dict[str, np.ndarray]:
        """Every property of the stable state at each (T, P), vectorised, chunk by chunk."""
        T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
        shape, Tf, Pf = T.shape, T.reshape(-1), P.reshape(-1)
        out = {k: np.empty(Tf.size) for k in ARRAY_KEYS}
        for start in range(0, Tf.size, CHUNK):
            part = slice(start, start + CHUNK)
            props = self.props_Tv(Tf[part], self.roots_TP(Tf[part], Pf[part])[3])
            for k in ARRAY_KEYS:
                out[k][part] = props[k]
        return {k: a.reshape(shape) for k, a in out.items()}

    # -- the PropertyModel interface --------------------------------------
    @property
    def reference_state(self) -> str:
        return "ideal gas at 298.15 K and 1 bar: h = 0, s = 0 (real-fluid values add the departures)"

    def equations(self) -> list[str]:
        f = self.form
        lines = [
            f"P = R T/(v - b) - a(T)/((v + ε b)(v + σ b)),  ε = {f.epsilon:.6g}, σ = {f.sigma:.6g}",
            f"a(T) = a_c α(T),  a_c = {self.a_c:.6g} Pa m6/mol2" + (
                f" (read from Redlich-Kwong's a = {self.a_rk:.6g} Pa m6 K^0.5/mol2 given: a_c = a / √Tc)"
                if self.a_rk is not None else " (given, the value at Tc)" if self.a_given
                else f" = Ωa R² Tc²/Pc, Ωa = {f.omega_a:.8f}"),
            f"b = {self.b:.6g} m3/mol" + (" (given)" if self.b_given else f" = Ωb R Tc/Pc, Ωb = {f.omega_b:.8f}"),
            f.alpha_text + (f",  m = {self.m:.6f}" if f.alpha == "soave" else ""),
            "u = u_ig(T) + (T a' - a) I;  s = s_ig(T, P) + R ln(1 - b/v) + a' I + R ln Z",
            "cv = cv_ig(T) + T a'' I;  cp = cv - T (∂P/∂T)_v² / (∂P/∂v)_T",
        ]
        if f.alpha == "one":
            lines.append("a'' = 0 for van der Waals: cv = cv_ig(T), no departure in cv")
        return lines

    def T_bounds(self) -> tuple[float, float]:
        return (max(1.0, 0.25 * self.species.Tc), 6000.0)

    def v_bounds(self, T: float) -> tuple[float, float]:
        return (self.b * 1.0005, 1e3)

    def warnings(self, p: Point) -> list[str]:
        out = super().warnings(p)
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
