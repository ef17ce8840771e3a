"""The ideal-gas model: P v = R T, with cp°(T) from the species' polynomials."""

from __future__ import annotations

import math

from ..errors import InputError
from ..units import P_REF, R
from .base import Point, PropertyModel, check_arguments


class IdealGas(PropertyModel):
    """Ideal gas with temperature-dependent cp° (or a constant cp override)."""

    name = "ideal-gas"
    label = "ideal gas"

    @property
    def reference_state(self) -> str:
        return "ideal gas at 298.15 K and 1 bar: h = 0, s = 0"

    def equations(self) -> list[str]:
        return [
            "P v = R T",
            "u(T) = h(T) - R T;  h(T) = ∫ cp°(T) dT from 298.15 K",
            "s(T, P) = ∫ cp°/T dT from 298.15 K - R ln(P / 1 bar)",
            f"cp°(T): {self.species.cp_ig.label}",
        ]

    def at_Tv(self, T: float, v: float) -> Point:
        check_arguments(T=T, v=v)
        P = R * T / v
        return self._point(T, P, v)

    def at_TP(self, T: float, P: float) -> Point:
        check_arguments(T=T, P=P)
        return self._point(T, P, R * T / P)

    def flash(self, specs: dict[str, float], field: str = "state") -> Point:
        # u and h of an ideal gas depend on T alone: two of T, u, h fix one
        # number, not a state (the generic search would return an arbitrary
        # volume, every one of which meets the pair).
        if len(specs) == 2 and set(specs) <= {"T", "u", "h"}:
            a, b = sorted(specs, key=("T", "u", "h").index)
            raise InputError(
                field,
                f"{a} and {b} do not fix a state of an ideal gas (u and h depend on T alone); "
                "give P, v or s with one of them",
            )
        return super().flash(specs, field)

    def _point(self, T: float, P: float, v: float) -> Point:
        cp_ig = self.species.cp_ig
        cp = float(cp_ig.cp(T))
        h = float(cp_ig.h(T))
        s = float(cp_ig.s(T)) - R * math.log(P / P_REF)
        return Point(T=T, P=P, v=v, u=h - R * T, h=h, s=s, cv=cp - R, cp=cp, Z=1.0,
                     phase="gas", ln_phi=0.0)

    def warnings(self, p: Point) -> list[str]:
        out = []
        cp_ig = self.species.cp_ig
        if not cp_ig.in_range(p.T):
            out.append(
                f"T = {p.T:.2f} K is outside the range of the cp° polynomial ({cp_ig.range_text}); "
                "cp, h and s there are extrapolated"
            )
        Tr, Pr = p.T / self.species.Tc, p.P / self.species.Pc
        if Pr > 0.1 and Tr < 2.5:
            out.append(
                f"ideal gas at Tr = {Tr:.2f}, Pr = {Pr:.2f}: real-gas effects are likely "
                "significant; compare with a cubic or the reference model"
            )
        return out
