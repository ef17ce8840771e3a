"""The ideal-gas model: P v = R T, with cp°(T) from the species' polynomials.

Every input pair is solved directly or by one safeguarded Newton iteration
in T on a function that rises with T (h, u, and s along an isobar or an
isochore), in plain floats.
"""

from __future__ import annotations

import math

from ..errors import InputError
from ..rootfind import NoBracket, newton_bracketed
from ..units import P_REF, R
from .base import Point, PropertyModel, check_arguments, fmt_spec


def ideal_temperature(cp_ig, key: str, target: float, lo: float, hi: float, along: str | None = None,
                      fixed: float = 0.0, rtol: float = 1e-15) -> float:
    """T [K] in [lo, hi] where the ideal gas has ``key`` (u or h; s at fixed P or v, ``along``)
    equal to ``target`` (molar SI); each rises with T, so Newton kept in the bracket finds the one.

    Raises NoBracket when no T in the range meets it.
    """
    def fdf(T: float):
        cp, h, s = cp_ig.terms(T)
        if key == "h":
            return h - target, cp
        if key == "u":
            return h - R * T - target, cp - R
        if along == "P":
            return s - R * math.log(fixed / P_REF) - target, cp / T
        return s - R * math.log(R * T / (fixed * P_REF)) - target, (cp - R) / T

    return newton_bracketed(fdf, lo, hi, x0=min(max(300.0, lo * 1.0001), hi * 0.9999), rtol=rtol)


#: The ideal gas is warned about where Peng-Robinson's |Z - 1| at the same T and P exceeds this.
Z_TOLERANCE = 0.01


class IdealGas(PropertyModel):
    """Ideal gas with temperature-dependent cp° (or a constant cp override)."""

    name = "ideal-gas"
    label = "ideal gas"

    @property
    def reference_state(self) -> str:
        if self.species.composition:
            return ("each component's ideal gas at 298.15 K and 1 bar: h = 0, s = 0 (the mixture's s there is its "
                    "entropy of mixing, -R Σ y ln y)")
        return "ideal gas at 298.15 K and 1 bar: h = 0, s = 0"

    def equations(self) -> list[str]:
        return [
            "P v = R T",
            "u(T) = h(T) - R T;  h(T) = ∫ cp°(T) dT from 298.15 K",
            "s(T, P) = ∫ cp°/T dT from 298.15 K - R ln(P / 1 bar)",
            f"cp°(T): {self.species.cp_ig.label}",
        ] + ([f"mixture: cp°, h° mole-weighted; s°(T) = Σ y_i s_i°(T) - R Σ y_i ln y_i; y = {self.species.formula}"]
             if self.species.composition else [])

    def at_Tv(self, T: float, v: float) -> Point:
        check_arguments(T=T, v=v)
        T, v = float(T), float(v)
        return self._point(T, R * T / v, v)

    def at_TP(self, T: float, P: float) -> Point:
        check_arguments(T=T, P=P)
        T, P = float(T), float(P)
        return self._point(T, P, R * T / P)

    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        (a, b), (va, vb) = keys, values
        if keys == ("T", "v"):
            return self.at_Tv(va, vb)
        if keys == ("T", "P"):
            return self.at_TP(va, vb)
        if a == "T" and b in ("u", "h") or keys == ("u", "h"):
            # u and h of an ideal gas depend on T alone: two of T, u, h fix one
            # number, not a state
            raise InputError(
                field,
                f"{a} and {b} do not fix a state of an ideal gas (u and h depend on T alone); "
                "give P, v or s with one of them",
            )
        cp_ig = self.species.cp_ig
        if keys == ("T", "s"):  # s = s°(T) - R ln(P/P°)
            return self.at_TP(va, P_REF * math.exp((cp_ig.terms(va)[2] - vb) / R))
        if keys == ("P", "v"):
            return self.at_TP(va * vb / R, va)
        if a in ("P", "v"):
            T = self._temperature(b, vb, a, va, field)
            return self.at_TP(T, va) if a == "P" else self.at_Tv(T, va)
        # two caloric properties: u or h fixes T; s then fixes P
        T = self._temperature(a, va, None, 0.0, field)
        return self.at_TP(T, P_REF * math.exp((cp_ig.terms(T)[2] - vb) / R))

    def _temperature(self, key: str, target: float, along: str | None, fixed: float, field: str) -> float:
        """T [K] where ``key`` (u, h or s) reaches ``target``, at fixed P or v (``along``)."""
        lo, hi = self.T_bounds()
        try:
            return ideal_temperature(self.species.cp_ig, key, target, lo, hi, along, fixed, rtol=1e-15)
        except NoBracket:
            where = f" at {fmt_spec(along, fixed)}" if along else ""
            raise InputError(field, f"no state of the ideal gas between {lo:g} K and {hi:g} K has "
                                    f"{fmt_spec(key, target)}{where}") from None

    def _point(self, T: float, P: float, v: float) -> Point:
        cp, h, s0 = self.species.cp_ig.terms(T)
        return Point(T, P, v, h - R * T, h, s0 - R * math.log(P / P_REF), cp - R, cp, 1.0, "gas", ln_phi=0.0)

    def warnings(self, p: Point) -> list[str]:
        out = super().warnings(p)
        cp_ig = self.species.cp_ig
        if not cp_ig.in_range(p.T):
            out.append(
                f"T = {p.T:.2f} K is outside the range of the cp° polynomial ({cp_ig.range_text}); "
                "cp, h and s there are extrapolated"
            )
        if self.species.composition:
            from ..mixture import dew_screen

            ratio, worst = dew_screen(self.species, p.T, p.P)
            if ratio >= 1.0:
                out.append(
                    f"at {p.T:.2f} K, {p.P / 1e5:.4g} bar the mixture is at or below its dew point as estimated by "
                    f"Raoult's law with Wilson's vapour pressures (Σ y P / Psat = {ratio:.3g}, most from {worst}): "
                    "part of it may condense, and the ideal-gas mixture makes no phase split; the result is for "
                    "the gas as if it stayed gas"
                )
        Z = self._real_Z(p.T, p.P)
        if Z is not None and abs(Z - 1.0) > Z_TOLERANCE:
            out.append(
                f"ideal gas at {p.T:.2f} K, {p.P / 1e5:.4g} bar, where Peng-Robinson gives Z = {Z:.4f} "
                f"(|Z - 1| = {abs(Z - 1.0):.1%}, above {Z_TOLERANCE:.0%}): real-gas effects of that order; "
                "compare with a cubic or the reference model"
            )
        return out

    def _real_Z(self, T: float, P: float) -> float | None:
        """Z [-] of Peng-Robinson at T [K], P [Pa]: the measure of how far from ideal the gas is."""
        from ..mixture import pseudo_pure
        from . import make_model

        try:  # a mixture judged as one pseudo-pure gas of Kay's constants
            return make_model("peng-robinson", pseudo_pure(self.species)).at_TP(T, P).Z
        except InputError:
            return None
