"""The incompressible model: constant density and constant heat capacity.

For a liquid well below its critical point, or a solid (a steel vessel
wall), given a mass density ρ [kg/m3] and a heat capacity cp [J/(kg K)]:

    v = M / ρ                      (fixed)
    u = cp (T - T_ref)             T_ref = 298.15 K
    h = u + P v
    s = cp ln(T / T_ref)
    cv = cp,  Z = P v / (R T)

Reference state: u = 0 and s = 0 at 298.15 K, at every pressure (neither
depends on P here); h = u + P v exactly, so h = P v at 298.15 K (absolute
pressure, not P - 1 bar). Balances use changes only.

A state is fixed by T and P. v carries no information (it is always M/ρ),
so a pair with v is accepted only when v is that value, and then P is not
fixed by anything: the state is returned with P, h and Z = NaN and a
warning. A closed rigid vessel of liquid is exactly that case: u (and so T)
follows from the balance, P does not.

Where the constants come from, first found wins:

* ρ: the ``rho`` argument (a worksheet's ``rho`` override, passed by
  ``make_model``), else the species data's liquid density;
* cp: the ``cp`` argument, else the species data's liquid cp. A worksheet's
  ``cp``/``cv`` override of the species sets its *ideal-gas* heat capacity,
  which is not the liquid's; it is refused here rather than silently
  ignored or silently reinterpreted.
"""

from __future__ import annotations

import math

from ..errors import InputError
from ..species import Species
from ..units import R, T_REF
from .base import Point, PropertyModel, check_specs

#: relative tolerance for a given v to count as the model's fixed M/ρ
V_RTOL = 1e-9


class Incompressible(PropertyModel):
    """Constant-density, constant-cp liquid or solid.

    Parameters
    ----------
    species : Species
        the substance; ``species.M`` [kg/mol] and, unless given here,
        ``species.liquid`` (rho [kg/m3], cp [J/(kg K)])
    rho : float, optional
        mass density [kg/m3], overriding the species data
    cp : float, optional
        heat capacity [J/(kg K)], overriding the species data

    Raises
    ------
    InputError
        ``fluid.overrides.rho`` or ``fluid.overrides.cp`` when a constant is
        missing or not a positive finite number.
    """

    name = "incompressible"
    label = "incompressible (constant density and cp)"

    def __init__(self, species: Species, rho: float | None = None, cp: float | None = None):
        super().__init__(species)
        liquid = species.liquid
        if rho is not None:
            self.rho, self.rho_source = _positive(rho, "fluid.overrides.rho", "kg/m3"), "worksheet override"
        elif liquid is not None:
            self.rho, self.rho_source = liquid.rho, f"species data, liquid at {liquid.T:g} K"
        else:
            raise InputError(
                "fluid.overrides.rho",
                f"the incompressible model needs a density, and the species data has none for "
                f"{species.name}; give rho, e.g. rho = '7850 kg/m3'",
            )
        overridden = {key for key, _ in species.overrides} & {"cp", "cv"}
        if cp is not None:
            self.cp_mass, self.cp_source = _positive(cp, "fluid.overrides.cp", "J/(kg K)"), "given to the model"
        elif overridden:
            key = sorted(overridden)[0]
            raise InputError(
                f"fluid.overrides.{key}",
                f"sets the ideal-gas heat capacity of {species.name}, which the incompressible model "
                "does not use, and this model cannot take a liquid cp from a worksheet override; "
                + ("remove it to use the species data's liquid cp"
                   if liquid is not None else "use a species with liquid data"),
            )
        elif liquid is not None:
            self.cp_mass, self.cp_source = liquid.cp, f"species data, liquid at {liquid.T:g} K"
        else:
            raise InputError(
                "fluid.overrides.cp",
                f"the incompressible model needs a heat capacity, and the species data has no "
                f"liquid cp for {species.name}",
            )
        self.v0 = species.M / self.rho
        """the fixed molar volume [m3/mol]"""
        self.cp = self.cp_mass * species.M
        """molar heat capacity [J/(mol K)]"""

    # -- the interface -------------------------------------------------------
    @property
    def reference_state(self) -> str:
        return (f"u = 0 and s = 0 at {T_REF:g} K at every pressure; h = u + P v "
                f"(so h = P v at {T_REF:g} K)")

    def equations(self) -> list[str]:
        return [
            f"v = M / ρ = {self.v0:.6g} m3/mol  (ρ = {self.rho:.6g} kg/m3, {self.rho_source})",
            f"u = cp (T - {T_REF:g} K),  cp = cv = {self.cp:.6g} J/(mol K) = "
            f"{self.cp_mass:.6g} J/(kg K)  ({self.cp_source})",
            "h = u + P v",
            f"s = cp ln(T / {T_REF:g} K)",
            "Z = P v / (R T)",
        ]

    def at_TP(self, T: float, P: float) -> Point:
        """The state at T [K] and P [Pa]."""
        check_specs({"T": T, "P": P}, "state")
        return self._point(T, P)

    def at_Tv(self, T: float, v: float) -> Point:
        """The state at T [K]; v [m3/mol] must be the model's M/ρ, and P is left open (NaN)."""
        check_specs({"T": T, "v": v}, "state")
        self._check_v(v, "state")
        return self._point(T, math.nan)

    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        """The state fixed by two of T [K], P [Pa], v [m3/mol], u, h [J/mol], s [J/(mol K)].

        Raises InputError naming ``field`` for a pair this model cannot meet.
        """
        (a, b), (va, vb) = keys, values
        if "v" in keys:
            self._check_v(va if a == "v" else vb, field)
            other, value = (b, vb) if a == "v" else (a, va)
            if other in ("P", "h"):
                raise InputError(
                    field,
                    f"v and {other} do not fix an incompressible state: v is M/ρ in every state, "
                    + ("and P says nothing of T; give T, u, h or s with P" if other == "P"
                       else "and h alone mixes T and P; give P with h, or T with P"),
                )
            return self._point(self._T_from(other, value, field), math.nan)
        if keys == ("T", "P"):
            return self._point(va, vb)
        if keys in (("T", "u"), ("T", "s"), ("u", "s")):
            raise InputError(
                field,
                f"{a} and {b} both fix only the temperature of an incompressible state "
                "(u and s depend on T alone), and leave P open; give P (or h) with one of them",
            )
        if keys == ("T", "h"):
            return self._point(va, self._P_from(va, vb, field))
        if a == "P":  # P with u, h or s
            T = self._T_from(b, vb, field) if b != "h" else self._T_from("u", vb - va * self.v0, field, "h")
            return self._point(T, va)
        # u with h, or h with s: the first fixes T, h then fixes P
        T = self._T_from("u", va, field) if a == "u" else self._T_from("s", vb, field)
        h = vb if a == "u" else va
        return self._point(T, self._P_from(T, h, field))

    def warnings(self, p: Point) -> list[str]:
        out = super().warnings(p)
        if math.isnan(p.P):
            out.append("P is not fixed: an incompressible state given by v has no pressure, so P, h "
                       "and Z are left as NaN (u and s do not depend on P)")
        liquid = self.species.liquid
        if liquid is not None and "species data" in self.cp_source + self.rho_source:
            if abs(p.T - liquid.T) > 50.0:
                out.append(f"T = {p.T:.2f} K is {abs(p.T - liquid.T):.0f} K from {liquid.T:g} K, where the "
                           "species data's liquid density and cp were evaluated; they may be off here")
            if p.T >= self.species.Tc:
                out.append(f"T = {p.T:.2f} K is above the critical temperature ({self.species.Tc:.2f} K): "
                           "no liquid exists there")
        return out

    # -- helpers ---------------------------------------------------------------
    def _point(self, T: float, P: float) -> Point:
        u = self.cp * (T - T_REF)
        # departures from an ideal gas are not defined for this model: NaN
        return Point(T=T, P=P, v=self.v0, u=u, h=u + P * self.v0, s=self.cp * math.log(T / T_REF),
                     cv=self.cp, cp=self.cp, Z=P * self.v0 / (R * T), phase="incompressible",
                     u_dep=math.nan, h_dep=math.nan, s_dep=math.nan, x=None, ln_phi=None,
                     root="fixed volume M/ρ (incompressible)")

    def _check_v(self, v: float, field: str) -> None:
        if abs(v / self.v0 - 1.0) > V_RTOL:
            raise InputError(
                f"{field}.v",
                f"an incompressible state is fixed by T (and P); its molar volume is always "
                f"M/ρ = {self.v0:.9g} m3/mol (ρ = {self.rho:.6g} kg/m3), but v = {v:.9g} m3/mol was "
                f"given ({(v / self.v0 - 1.0) * 100:+.3g} %)",
            )

    def _T_from(self, key: str, value: float, field: str, given: str = "") -> float:
        """T [K] from T itself, u [J/mol] or s [J/(mol K)]; ``given`` names the
        specification u was derived from (h with P), for the message."""
        if key == "T":
            return value
        if key == "s":
            return T_REF * math.exp(value / self.cp)
        T = T_REF + value / self.cp
        if T <= 0.0:
            raise InputError(f"{field}.{given or 'u'}", f"u = {value:.6g} J/mol would need T = {T:.6g} K; "
                                           f"with cp = {self.cp:.6g} J/(mol K) u must exceed "
                                           f"{-self.cp * T_REF:.6g} J/mol")
        return T

    def _P_from(self, T: float, h: float, field: str) -> float:
        """P [Pa] from h = u(T) + P v."""
        P = (h - self.cp * (T - T_REF)) / self.v0
        if P <= 0.0:
            raise InputError(f"{field}.h", f"h = {h:.6g} J/mol at T = {T:.6g} K would need P = {P:.6g} Pa; "
                                           f"h must exceed u(T) = {self.cp * (T - T_REF):.6g} J/mol")
        return P


def _positive(value: float, field: str, unit: str) -> float:
    value = float(value)
    if not (math.isfinite(value) and value > 0.0):
        raise InputError(field, f"must be a positive number in {unit}; got {value!r}")
    return value
