"""Worksheets as people write them: an amount and a volume for a state, a whole-work term between
two given states, constraints that imply one another, and the liquid-full rigid vessel.

Sources, beside each check: the ideal-gas law and the ideal gas's closed forms (P v = R T;
isothermal Q = -n R T ln(P2/P1); polytropic T2/T1 = (P2/P1)^((n-1)/n), W = n R (T2 - T1)/(n - 1);
u = cv T for a constant cv), the incompressible closed forms (T2 = T1 + Q/(m cp),
ΔS = m cp ln(T2/T1)), CoolProp 8.0 (its Peng-Robinson backend and HEOS for water), and the
SI value of R (CODATA 2018, exact since 2019).
"""

from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import pytest

from balance import api
from balance.units import R
from tests.helpers import sheet

N2_IG = '[fluid]\nspecies = "N2"\nmodel = "ideal-gas"\n'
N2_CV = N2_IG + '[fluid.overrides]\ncv = "20.8 J/(mol K)"\n'  # a constant cv: u = cv T + const
HEATED = '[final]\nT = "350 K"\n[[heat]]\nname = "jacket"\nQ = "?"\n[process]\nconstraints = ["rigid"]\n'


def solved(text: str):
    attempt = api.attempt(sheet(text))
    assert attempt.ok, attempt.message
    return attempt.result


# -- an amount and a volume fix the specific volume ----------------------------------------------
@pytest.mark.parametrize("model", ["ideal-gas", "peng-robinson"])
def test_an_amount_and_a_volume_are_a_whole_state(model):
    fluid = f'[fluid]\nspecies = "N2"\nmodel = "{model}"\n'
    by_volume = solved(fluid + '[[initial]]\nname = "tank"\nT = "320 K"\nn = "5 mol"\nV = "2 L"\n' + HEATED)
    spelled = solved(fluid + '[[initial]]\nname = "tank"\nT = "320 K"\nv = "0.4 L/mol"\nn = "5 mol"\n' + HEATED)
    for a, b in ((by_volume.initial[0].point, spelled.initial[0].point), (by_volume.final.point, spelled.final.point)):
        assert a.T == b.T and a.P == pytest.approx(b.P, rel=1e-12) and a.v == pytest.approx(b.v, rel=1e-12)
    assert by_volume.terms[0].value == pytest.approx(spelled.terms[0].value, rel=1e-10)
    assert by_volume.initial[0].V == pytest.approx(2e-3, rel=1e-12)
    P1 = by_volume.initial[0].point.P
    if model == "ideal-gas":  # P = n R T / V
        assert P1 == pytest.approx(5 * R * 320 / 2e-3, rel=1e-12)
    else:  # CoolProp 8.0, Peng-Robinson backend, at 320 K and 2500 mol/m3
        assert P1 == pytest.approx(CP.PropsSI("P", "T", 320, "Dmolar", 2500, "PR::Nitrogen"), rel=1e-6)


def test_a_mass_and_a_volume_are_a_whole_state():
    M = 0.02801348  # N2 in the species data, kg/mol
    by_mass = solved(N2_IG + f'[[initial]]\nT = "320 K"\nm = "{5 * M} kg"\nV = "2 L"\n' + HEATED)
    assert by_mass.n == pytest.approx(5.0, rel=1e-12)
    assert by_mass.initial[0].point.P == pytest.approx(5 * R * 320 / 2e-3, rel=1e-12)  # P = n R T / V


def test_an_amount_with_a_density_gives_the_volume():
    result = solved(N2_IG + '[[initial]]\nT = "320 K"\nrho = "50 kg/m3"\nm = "5 kg"\n' + HEATED)
    assert result.initial[0].V == pytest.approx(5 / 50, rel=1e-12)  # V = m / ρ


def test_the_record_says_that_v_came_from_V_over_n():
    attempt = api.attempt(sheet(N2_IG + '[[initial]]\nname = "tank"\nT = "320 K"\nn = "5 mol"\nV = "2 L"\n' + HEATED))
    said = "initial 'tank': v = V/n = 0.002 m3 / 5 mol = 0.0004 m3/mol, from the volume and the amount given"
    assert said in attempt.result.warnings
    assert said in api.entry_data(attempt)["warnings"]


def test_one_property_and_one_amount_is_not_a_state():
    check = api.check(sheet(N2_IG + '[[initial]]\nname = "tank"\nT = "320 K"\nn = "5 mol"\n' + HEATED))
    assert check.error_field == "initial 'tank'"
    assert "needs two of T, P, v (or rho), u, h, s, x, or one of them with an amount (n or m) and the volume V; got T" \
        in check.message


# -- a whole-work term between two given states ---------------------------------------------------
WHOLE = N2_CV + """
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
T = "450 K"
P = "3 bar"
[[work]]
name = "press"
kind = "{kind}"
W = "?"
[process]
constraints = ["adiabatic"]
"""


@pytest.mark.parametrize("kind", ["other", "shaft"])
def test_a_whole_work_term_between_given_states_needs_no_path(kind):
    result = solved(WHOLE.format(kind=kind))
    # adiabatic, constant cv: W = n cv (T2 - T1) = 1 x 20.8 x 150 J
    assert result.unknowns[next(iter(result.unknowns))] == pytest.approx(20.8 * 150, rel=1e-10)
    assert not [t for t in result.terms if t.kind == "boundary work"]
    assert any("is the whole work across the boundary, the moving boundary's included" in w for w in result.warnings)


def test_a_whole_work_term_with_a_state_to_find_still_needs_a_path():
    check = api.check(sheet(WHOLE.format(kind="other").replace('P = "3 bar"\n[[work]]', 'P = "?"\n[[work]]')))
    assert check.error_field == "process.constraints"
    assert "or give the final state fully (two properties) with a work term of kind 'other' or 'shaft'" in check.message


# -- constraints that imply one another ------------------------------------------------------------
ISOTHERMAL = N2_IG + """
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
P = "3 bar"
[[heat]]
name = "bath"
Q = "?"
{T_boundary}
[process]
constraints = [{constraints}]
"""


@pytest.mark.parametrize("T_boundary", ["", 'T_boundary = "300 K"'])
def test_isothermal_and_reversible_are_one_equation(T_boundary):
    ws = sheet(ISOTHERMAL.format(T_boundary=T_boundary, constraints='"isothermal", "reversible"'))
    check = api.check(ws)
    assert check.ready
    assert check.message.startswith("1 unknown, 1 equation: ready to solve. Not counted again: reversible "
                                    "(S_gen = 0) follows from the isothermal path")
    result = api.solve(check)
    # isothermal ideal gas: Q = -n R T ln(P2/P1)
    assert result.terms[0].value == pytest.approx(-R * 300 * math.log(3), rel=1e-9)
    assert abs(result.S_gen) < 1e-9


def test_isothermal_and_reversible_with_heat_from_elsewhere_are_two_equations():
    # heat from a reservoir at 400 K cannot cross reversibly into gas at 300 K: two equations, one unknown
    check = api.check(sheet(ISOTHERMAL.format(T_boundary='T_boundary = "400 K"',
                                              constraints='"isothermal", "reversible"')))
    assert not check.ready and "1 unknown, 2 equations: over-specified" in check.message


def test_adiabatic_isothermal_and_reversible_leave_the_state_as_it_was():
    text = N2_IG + '[[initial]]\nT = "300 K"\nP = "1 bar"\nn = "1 mol"\n[final]\nP = "?"\n' \
                   '[process]\nconstraints = ["isothermal", "adiabatic", "reversible"]\n'
    check = api.check(sheet(text))
    assert check.ready and "Not counted again" in check.message
    result = api.solve(check)
    # n Δu = n Δa at constant T: Δs = 0, so for the ideal gas P2 = P1
    assert result.final.point.P == pytest.approx(1e5, rel=1e-9)


def test_rigid_adiabatic_and_reversible_are_counted_once():
    text = N2_IG + '[[initial]]\nT = "300 K"\nP = "1 bar"\nn = "1 mol"\n[final]\nT = "?"\n' \
                   '[process]\nconstraints = ["rigid", "adiabatic", "reversible"]\n'
    check = api.check(sheet(text))
    assert check.ready
    assert "nothing crosses the rigid boundary, so u and v stay as they were" in check.message
    result = api.solve(check)
    assert result.final.point.T == pytest.approx(300.0, rel=1e-12)  # nothing changes


def test_reversible_adiabatic_with_boundary_work_is_still_two_equations():
    text = N2_IG + '[[initial]]\nT = "300 K"\nP = "1 bar"\nn = "1 mol"\n[final]\nP = "3 bar"\n' \
                   '[[work]]\nkind = "boundary"\nW = "?"\n[process]\nconstraints = ["adiabatic", "reversible"]\n'
    check = api.check(sheet(text))
    assert check.message == "2 unknowns, 2 equations: ready to solve"


# -- a steep polytropic path ----------------------------------------------------------------------------
POLY = N2_CV + """
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
P = "3 bar"
T = "?"
[[heat]]
name = "wall"
Q = "?"
[process]
constraints = ["polytropic"]
n = "{n}"
"""


@pytest.mark.parametrize("k", [1.3, 1000.0, 1e6])
def test_a_polytropic_path_with_a_large_exponent(k):
    result = solved(POLY.format(n=k))  # n = 1000 divided by zero: v^1000 underflowed
    T2 = 300 * 3 ** ((k - 1) / k)  # ideal gas: T2/T1 = (P2/P1)^((n-1)/n)
    assert result.final.point.T == pytest.approx(T2, rel=1e-9)
    W_b = next(t.value for t in result.terms if t.kind == "boundary work")
    assert W_b == pytest.approx(R * (T2 - 300) / (k - 1), rel=1e-7)  # W = n R (T2 - T1)/(n - 1)
    Q = next(t.value for t in result.terms if t.kind == "heat")
    assert Q + W_b == pytest.approx(20.8 * (T2 - 300), rel=1e-9)  # ΔU = n cv ΔT


@pytest.mark.parametrize("text", ["1e7", "-0.5", "1e308"])
def test_a_polytropic_exponent_out_of_bounds_is_refused_by_check(text):
    check = api.check(sheet(POLY.format(n=text)))
    assert check.error_field == "process.n"
    assert "expected a polytropic exponent from 0 (isobaric) to 1e+06 (beyond that, tick 'rigid')" in check.message


# -- the liquid-full rigid vessel -------------------------------------------------------------------------
LIQUID = """
[fluid]
species = "H2O"
model = "incompressible"
[[initial]]
name = "full"
T = "20 degC"
P = "1 bar"
m = "10 kg"
[final]
T = "?"
{final}
[[heat]]
name = "element"
Q = "418 kJ"
T_boundary = "80 degC"
[process]
constraints = ["rigid"]
"""
CP_WATER = 4181.314990770664  # J/(kg K), the species data's liquid cp (CoolProp 8.0 HEOS at 298.15 K)


def closed_form_liquid():
    """T2 = T1 + Q/(m cp); S_gen = m cp ln(T2/T1) - Q/T_b."""
    T2 = 293.15 + 418e3 / (10 * CP_WATER)
    return T2, 10 * CP_WATER * math.log(T2 / 293.15) - 418e3 / 353.15


def test_liquid_full_rigid_vessel_with_its_final_pressure_given_is_not_over_specified():
    check = api.check(sheet(LIQUID.format(final='P = "1 bar"')))
    assert check.ready, check.message
    result = api.solve(check)
    T2, S_gen = closed_form_liquid()
    assert round(result.final.point.T - 273.15, 1) == 30.0
    assert result.final.point.T == pytest.approx(T2, rel=1e-13)
    assert result.S_gen == pytest.approx(S_gen, abs=1e-13 * 10 * CP_WATER)
    assert result.final.point.P == 1e5
    assert "rigid adds nothing on the incompressible model (v = M/ρ in every state): counted once" in result.warnings
    assert not result.problem.pressure_undetermined


def test_liquid_full_rigid_vessel_with_only_T_asked_flags_its_pressure():
    result = solved(LIQUID.format(final=""))
    T2, S_gen = closed_form_liquid()
    assert result.final.point.T == pytest.approx(T2, rel=1e-13)
    assert result.S_gen == pytest.approx(S_gen, abs=1e-13 * 10 * CP_WATER)
    assert result.problem.pressure_undetermined and math.isnan(result.final.point.P)


def test_an_incompressible_final_pressure_asked_for_is_refused_in_words():
    check = api.check(sheet(LIQUID.format(final='P = "?"')))
    assert not check.ready and check.error_field == "final.P"
    assert "the incompressible model cannot give the final pressure: its volume is fixed by the density" in check.message


# -- what the search reports when it finds no state ---------------------------------------------------------
RIGID_PR = '[fluid]\nspecies = "N2"\nmodel = "peng-robinson"\n[[initial]]\nT = "300 K"\nP = "1 bar"\nn = "1 mol"\n' \
           '[final]\nT = "?"\n[[heat]]\nQ = "1 kJ"\n[process]\nconstraints = ["rigid"]\ndKE = "{dKE}"\n'


@pytest.mark.parametrize("dKE", ["1e300 kJ", "1e5 kJ", "-1e12 kJ"])
def test_an_energy_beyond_every_state_is_not_called_two_phase(dKE):
    attempt = api.attempt(sheet(RIGID_PR.format(dKE=dKE)))
    assert attempt.error_kind == "SolveError"
    assert "two-phase" not in attempt.message
    assert "the balance stays on one side of zero over the whole range" in attempt.message


def test_nitrogen_cooled_into_its_dome_is_still_called_two_phase():
    # N2 at 130 K and 10 bar in a rigid vessel, 5 kJ/mol taken out: Tc = 126.2 K, the gas condenses
    text = RIGID_PR.format(dKE="0 kJ").replace('T = "300 K"\nP = "1 bar"', 'T = "130 K"\nP = "10 bar"') \
        .replace('Q = "1 kJ"', 'Q = "-5 kJ"')
    attempt = api.attempt(sheet(text))
    assert attempt.error_kind == "TwoPhaseError" and "inside the two-phase region of Peng-Robinson" in attempt.message


def test_the_wet_steam_kettle_without_a_boundary_temperature():
    # it raised ZeroDivisionError; the final state against CoolProp 8.0 HEOS: v fixed, u2 = u1 + Q/m
    text = """
[fluid]
species = "H2O"
model = "reference"
[[initial]]
P = "1.01325 bar"
x = "0.05"
V = "20 L"
[final]
T = "?"
[[heat]]
name = "jacket"
Q = "150 kJ"
[process]
constraints = ["rigid"]
"""
    result = solved(text)
    rho1 = CP.PropsSI("Dmass", "P", 101325.0, "Q", 0.05, "Water")
    u1 = CP.PropsSI("Umass", "P", 101325.0, "Q", 0.05, "Water")
    m = 0.020 * rho1
    T2 = CP.PropsSI("T", "Dmass", rho1, "Umass", u1 + 150e3 / m, "Water")
    assert result.final.point.T == pytest.approx(T2, rel=1e-6)


@pytest.mark.parametrize("typed", ["25 C", "25 degc", "25 deg C"])
def test_celsius_written_as_people_write_it_solves_as_degC(typed):
    def sheet_with(T):
        return N2_IG + f'[[initial]]\nT = "{T}"\nP = "10 bar"\nn = "1 mol"\n' + HEATED
    as_typed, spelled = solved(sheet_with(typed)), solved(sheet_with("25 degC"))
    assert as_typed.initial[0].point.T == spelled.initial[0].point.T == pytest.approx(298.15, abs=1e-12)  # 0 degC = 273.15 K
    assert as_typed.terms[0].value == spelled.terms[0].value
