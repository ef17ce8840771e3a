"""A vessel's wall as one lumped mass: the heat it gives the gas, and what it takes from outside.

    Q̇_gas = h_in A (T_wall - T_gas)
    m_w c_w dT_wall/dt = h_out A (T_ambient - T_wall) + q_fire A - Q̇_gas

A thin wall (one area inside and out), at one temperature through its thickness.
The inside coefficient is given, or from natural convection of the gas on a vertical
surface of the vessel's height: the correlation of Churchill and Chu (1975), for
every Rayleigh number,

    Nu = {0.825 + 0.387 Ra^(1/6) / [1 + (0.492/Pr)^(9/16)]^(8/27)}²,   h = Nu k / L

with Ra = g β |ΔT| L³ ρ² cp / (μ k) and the gas's properties at the film temperature
(T_gas + T_wall)/2: density, cp and β = -(1/ρ)(∂ρ/∂T)_P, viscosity and conductivity,
all from CoolProp's reference equations (transport properties are not in the
cubic models). A fire's heat flux is a number the user takes from the code that
applies.
"""

from __future__ import annotations

from dataclasses import dataclass

from ...errors import InputError

#: Standard gravity [m/s2] (ISO 80000-3).
G_STANDARD = 9.80665


@dataclass(frozen=True)
class Wall:
    """A lumped wall, SI."""

    mass: float
    """[kg]"""
    cp: float
    """specific heat of its material [J/(kg K)]"""
    area: float
    """inside area = outside area [m2]"""
    h_inside: float | None
    """[W/(m2 K)]; None: natural convection (Churchill and Chu, 1975)"""
    height: float
    """the correlation's length, the vessel's height [m]"""
    h_outside: float
    """to the ambient [W/(m2 K)]; 0: insulated"""
    T_ambient: float
    """[K]"""
    fire_flux: float
    """heat flux onto the outside [W/m2]; 0: no fire"""

    def words(self) -> str:
        inside = (f"h_in = {self.h_inside:.4g} W/(m2 K)" if self.h_inside is not None else
                  f"h_in by natural convection (Churchill and Chu, 1975) on a height of {self.height:.4g} m")
        outside = (f"h_out = {self.h_outside:.4g} W/(m2 K) to {self.T_ambient - 273.15:.1f} °C"
                   if self.h_outside > 0 else "insulated outside")
        fire = f", a fire's {self.fire_flux / 1e3:.4g} kW/m2 on it" if self.fire_flux > 0 else ""
        return (f"wall {self.mass:.6g} kg, cp {self.cp:.4g} J/(kg K), area {self.area:.4g} m2; {inside}; "
                f"{outside}{fire}")


def churchill_chu(Ra: float, Pr: float) -> float:
    """Nu of natural convection on a vertical surface, every Ra (Churchill and Chu, 1975)."""
    return (0.825 + 0.387 * Ra ** (1.0 / 6.0) / (1.0 + (0.492 / Pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)) ** 2


_STATES: dict[str, object] = {}


def _gas(species):
    """A CoolProp HEOS AbstractState for the species, made once."""
    name = species.coolprop
    if name not in _STATES:
        from ...models.reference.coolprop import coolprop

        CP = coolprop()
        try:
            _STATES[name] = CP.AbstractState("HEOS", name)
        except (ValueError, RuntimeError) as exc:
            raise InputError("h_inside", f"CoolProp has no {name!r} for the gas's transport properties ({exc}); "
                                         "give h_inside as a number") from None
    return _STATES[name]


def film_properties(species, T: float, P: float) -> tuple[float, float, float, float, float]:
    """(ρ [kg/m3], cp [J/(kg K)], β [1/K], μ [Pa s], k [W/(m K)]) of the gas at T [K], P [Pa]."""
    from ...models.reference.coolprop import coolprop

    if not species.coolprop:
        raise InputError("h_inside", f"{species.name} has no transport properties here; give h_inside as a number")
    CP = coolprop()
    AS = _gas(species)
    try:
        AS.update(CP.PT_INPUTS, P, T)
        return (AS.rhomass(), AS.cpmass(), AS.isobaric_expansion_coefficient(), AS.viscosity(), AS.conductivity())
    except (ValueError, RuntimeError) as exc:
        raise InputError("h_inside", f"CoolProp gives no transport properties of {species.name} at "
                                     f"{T:.2f} K and {P / 1e5:.4g} bar ({exc}); give h_inside as a number") from None


def natural_convection(model, T_gas: float, P: float, T_wall: float, height: float) -> tuple[float, str]:
    """(h [W/(m2 K)], words) of natural convection of the gas on the wall (Churchill and Chu, 1975)."""
    rho, cp, beta, mu, k = film_properties(model.species, 0.5 * (T_gas + T_wall), P)
    Pr = cp * mu / k
    Ra = G_STANDARD * abs(beta) * abs(T_wall - T_gas) * height ** 3 * rho * rho * cp / (mu * k)
    Nu = churchill_chu(Ra, Pr)
    h = Nu * k / height
    return h, f"Churchill and Chu (1975): Ra = {Ra:.3g}, Pr = {Pr:.3g}, Nu = {Nu:.4g}, h_in = {h:.4g} W/(m2 K)"


def heat_rates(wall: Wall, T_gas: float, T_wall: float, h_in: float) -> tuple[float, float]:
    """(Q̇ to the gas [W], dT_wall/dt [K/s])."""
    Q_gas = h_in * wall.area * (T_wall - T_gas)
    outside = wall.h_outside * wall.area * (wall.T_ambient - T_wall) + wall.fire_flux * wall.area
    return Q_gas, (outside - Q_gas) / (wall.mass * wall.cp)


__all__ = ["G_STANDARD", "Wall", "churchill_chu", "film_properties", "heat_rates", "natural_convection"]
