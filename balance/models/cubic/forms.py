"""The members of the generic cubic equation of state.

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
"""

from __future__ import annotations

import math
from dataclasses import dataclass

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
