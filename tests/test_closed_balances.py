"""Closed-system balances solved from worksheets, against outside references.

Each check names its source: a published closed form of the ideal-gas or
van der Waals laws, CoolProp 8.0 used directly (not through joulebook), or
"common practice, no source" for facts of the trade.
"""

from __future__ import annotations

import math

import pytest

from balance import api
from balance.balances.control_volume import Unknown
from balance.errors import SolveError
from balance.units import R
from tests.helpers import sheet

CONSTANT_CP = 29.0  # J/(mol K): a constant cp override so closed forms apply exactly


def ideal(body: str, cp: float = CONSTANT_CP, species: str = "N2", model: str = "ideal-gas") -> str:
    return f"""
[fluid]
species = "{species}"
model = "{model}"
[fluid.overrides]
cp = "{cp} J/(mol K)"
{body}
"""


def test_reversible_adiabatic_ideal_gas_follows_poisson():
    # Closed form for an ideal gas with constant cp (Poisson's relation):
    # T2 = T1 (P2/P1)^(R/cp), W_on = n cv (T2 - T1).
    r = api.solve(sheet(ideal("""
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
P = "10 bar"
[[work]]
name = "piston"
kind = "boundary"
W = "?"
[process]
constraints = ["adiabatic", "reversible"]
""")))
    T2 = 300.0 * 10.0 ** (R / CONSTANT_CP)
    assert r.final.point.T == pytest.approx(T2, rel=1e-9)
    assert r.unknowns[Unknown("work", "piston")] == pytest.approx((CONSTANT_CP - R) * (T2 - 300.0), rel=1e-9)
    assert abs(r.S_gen) < 1e-9


def test_isothermal_ideal_gas_work_and_heat():
    # Closed form: reversible isothermal ideal gas, W_on = n R T ln(P2/P1) = -Q.
    r = api.solve(sheet(ideal("""
[[initial]]
T = "350 K"
P = "2 bar"
n = "3 mol"
[final]
P = "12 bar"
[[heat]]
name = "bath"
Q = "?"
T_boundary = "350 K"
[process]
constraints = ["isothermal"]
""")))
    W = 3 * R * 350.0 * math.log(6.0)
    boundary = [t for t in r.terms if t.kind == "boundary work"][0]
    assert boundary.value == pytest.approx(W, rel=1e-9)
    assert r.unknowns[Unknown("heat", "bath")] == pytest.approx(-W, rel=1e-9)
    assert r.S_gen == pytest.approx(0.0, abs=1e-9)


def test_polytropic_ideal_gas():
    # Closed form: P v^k = const with an ideal gas, T2 = T1 (P2/P1)^((k-1)/k),
    # W_on = (P2 V2 - P1 V1)/(k - 1) = n R (T2 - T1)/(k - 1); Q = ΔU - W_on.
    k = 1.25
    r = api.solve(sheet(ideal("""
[[initial]]
T = "290 K"
P = "1 bar"
n = "2 mol"
[final]
P = "6 bar"
[[heat]]
name = "wall"
Q = "?"
T_boundary = "290 K"
[process]
constraints = ["polytropic"]
n = "1.25"
""")))
    T2 = 290.0 * 6.0 ** ((k - 1) / k)
    assert r.final.point.T == pytest.approx(T2, rel=1e-9)
    W = 2 * R * (T2 - 290.0) / (k - 1)
    assert [t for t in r.terms if t.kind == "boundary work"][0].value == pytest.approx(W, rel=1e-9)
    assert r.unknowns[Unknown("heat", "wall")] == pytest.approx(2 * (CONSTANT_CP - R) * (T2 - 290.0) - W, rel=1e-9)


def test_ideal_gas_mixing_compartments_is_energy_weighted():
    # Closed form: two compartments of one ideal gas with constant cv joined
    # adiabatically in a rigid housing: T2 = Σ n_i T_i / Σ n_i, P2 = n R T2 / V.
    r = api.solve(sheet(ideal("""
[[initial]]
name = "A"
T = "300 K"
P = "10 bar"
V = "1 m3"
[[initial]]
name = "B"
T = "400 K"
P = "1 bar"
V = "3 m3"
[final]
T = "?"
[process]
constraints = ["membrane-rupture", "adiabatic"]
""")))
    nA, nB = 1e6 / (R * 300.0), 3e5 / (R * 400.0)
    T2 = (nA * 300.0 + nB * 400.0) / (nA + nB)
    assert r.final.point.T == pytest.approx(T2, rel=1e-9)
    assert r.final.point.P == pytest.approx((nA + nB) * R * T2 / 4.0, rel=1e-9)
    assert r.S_gen > 0  # mixing at different T and P generates entropy (common practice, no source)


def test_free_expansion_ideal_gas_keeps_temperature():
    # Fact of the trade (common practice, no source): an ideal gas expanding
    # into vacuum in an insulated rigid vessel keeps its temperature; S_gen = n R ln 4.
    r = api.solve(sheet(ideal("""
[[initial]]
T = "320 K"
P = "20 bar"
V = "1 m3"
[[initial]]
empty = true
V = "3 m3"
[final]
T = "?"
[process]
constraints = ["free-expansion"]
""")))
    assert r.final.point.T == pytest.approx(320.0, rel=1e-10)
    n = 2e6 / (R * 320.0)
    assert r.S_gen == pytest.approx(n * R * math.log(4.0), rel=1e-9)


def test_free_expansion_van_der_waals_closed_form():
    # Closed form for the van der Waals gas with constant cv:
    # T2 = T1 - (a n / cv)(1/V1 - 1/V2);  ΔS = n cv ln(T2/T1) + n R ln((V2 - nb)/(V1 - nb)).
    r = api.solve(sheet(ideal("""
[[initial]]
T = "250 K"
P = "60 bar"
V = "0.1 m3"
[[initial]]
empty = true
V = "0.4 m3"
[final]
T = "?"
[process]
constraints = ["free-expansion"]
""", model="van-der-waals")))
    model = r.problem.model
    a, b, cv = model.a_c, model.b, CONSTANT_CP - R
    n = r.n
    T2 = 250.0 - a * n / (n * cv) * (n / 0.1 - n / 0.5)
    assert r.final.point.T == pytest.approx(T2, rel=1e-9)
    dS = n * cv * math.log(T2 / 250.0) + n * R * math.log((0.5 - n * b) / (0.1 - n * b))
    assert r.dS_system == pytest.approx(dS, rel=1e-9)
    # the departure part is what cools it (common practice, no source)
    assert r.dU_ig < 0 < r.dU_dep
    assert r.dU_ig == pytest.approx(-r.dU_dep, rel=1e-9)


def test_sign_convention_work_by_system():
    # Common practice, no source: with work done by the system positive,
    # the work of a compression is negative and ΔU = Q - W.
    text = ideal("""
[worksheet]
convention = "work-by-system"
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
P = "5 bar"
[[work]]
name = "piston"
kind = "boundary"
W = "?"
[process]
constraints = ["adiabatic", "reversible"]
""")
    by = api.solve(sheet(text))
    on = api.solve(sheet(text.replace("work-by-system", "work-on-system")))
    assert by.as_json()["terms"][0]["value"]["value"] == pytest.approx(
        -on.as_json()["terms"][0]["value"]["value"], rel=1e-12)
    assert by.as_json()["terms"][0]["value"]["value"] < 0


def test_impossible_heat_flow_is_refused():
    # Second law (common practice, no source): heating a gas from 300 K to 400 K
    # with heat from a 320 K reservoir alone would make S_gen < 0.
    with pytest.raises(SolveError, match="impossible process"):
        api.solve(sheet(ideal("""
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
T = "400 K"
[[heat]]
name = "reservoir"
Q = "?"
T_boundary = "320 K"
[process]
constraints = ["rigid"]
""")))


def test_constant_cv_override_is_shown():
    # Overrides are part of the result the record shows (common practice, no source).
    r = api.solve(sheet(ideal("""
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
T = "310 K"
[[heat]]
name = "h"
Q = "?"
T_boundary = "320 K"
[process]
constraints = ["rigid"]
""")))
    assert ("cp", f"{CONSTANT_CP} J/(mol K)") in r.problem.species.overrides
    assert any("Overrides" in line for line in r.equations)
    assert r.unknowns[Unknown("heat", "h")] == pytest.approx((CONSTANT_CP - R) * 10.0, rel=1e-12)
