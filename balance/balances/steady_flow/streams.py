"""A stream at steady state: a state of one fluid, its rate, its speed and its height.

Inside the balance every rate is molar, ṅ [mol/s], and every state molar
(:class:`~balance.models.base.Point`); the mass rate and the per-kilogram
values follow from the species' molar mass. The energy a stream carries,
per mole, is h + M (V²/2 + g z).
"""

from __future__ import annotations

from dataclasses import dataclass

from ...models.base import Point, PropertyModel

#: Standard acceleration of gravity [m/s2] (3rd CGPM, 1901; exact).
G = 9.80665


@dataclass(frozen=True)
class Flow:
    """One stream at steady state, every value in SI."""

    name: str
    model: PropertyModel
    point: Point
    n_dot: float
    """molar rate [mol/s]"""
    velocity: float = 0.0
    """mean speed in the pipe [m/s]"""
    z: float = 0.0
    """elevation [m]"""

    @property
    def M(self) -> float:
        """molar mass [kg/mol]"""
        return self.model.species.M

    @property
    def m_dot(self) -> float:
        """mass rate [kg/s]"""
        return self.n_dot * self.M

    @property
    def e(self) -> float:
        """energy carried per mole, h + M (V²/2 + g z) [J/mol]"""
        return self.point.h + self.M * (0.5 * self.velocity * self.velocity + G * self.z)

    @property
    def E_dot(self) -> float:
        """energy carried [W]"""
        return self.n_dot * self.e

    @property
    def S_dot(self) -> float:
        """entropy carried [W/K]"""
        return self.n_dot * self.point.s

    @property
    def V_dot(self) -> float:
        """actual volumetric rate at the stream's own T and P [m3/s]"""
        return self.n_dot * self.point.v

    def with_(self, **changes) -> "Flow":
        from dataclasses import replace

        return replace(self, **changes)
