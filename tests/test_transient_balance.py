"""The transient balance against outside sources: closed forms of the ideal gas, CoolProp HEOS
flashes computed here, and the balance's own closures recomputed from the model.

Sources, beside each check:
- the adiabatic fill of an evacuated tank with an ideal gas of constant cp ends at T2 = γ T_line
  (the uniform-state energy balance u2 = h_line; a standard result of every thermodynamics text,
  e.g. Çengel & Boles, Thermodynamics: An Engineering Approach, the charging of a rigid tank);
- an adiabatic vent leaves the remaining gas on the isentrope of its initial state (the same
  texts' discharge of a rigid tank); checked by a CoolProp HEOS (P, s) flash here;
- an isothermal vent or fill of an ideal gas exchanges Q = ±Δn R T (u, h constant at constant T);
- choked flow of an ideal gas of constant cp: G* = P0 sqrt(γ M/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1)))
  (Shapiro, The Dynamics and Thermodynamics of Compressible Fluid Flow, 1953, vol. 1 ch. 4);
- the energy closure ∫ṁh dt + ∫Q̇ dt = Δ(m u) and the wall's own balance, recomputed here.
"""

from __future__ import annotations

import math

import pytest

from balance import api
from balance.errors import InputError
from balance.units import R
from balance.worksheet import Worksheet

CP_AR = 20.786  # J/(mol K): 5/2 R, a monatomic ideal gas (common practice, no source)


def sheet(body: str, species: str = "Ar", model: str = "ideal-gas", overrides: str = "") -> Worksheet:
    head = f'[fluid]\nspecies = "{species}"\nmodel = "{model}"\n'
    if overrides:
        head += f"[fluid.overrides]\n{overrides}\n"
    return Worksheet.from_toml(head + '[system]\nkind = "transient"\n' + body)


FILL = '''
[[vessel]]
name = "pot"
V = "50 L"
empty = true
T = "20 degC"
heat = "HEAT"

[[line]]
name = "fill"
from = "supply"
to = "pot"
T = "20 degC"
P = "10 bar"
orifice = "1 mm"
Cd = "0.8"

[end]
balanced = true
'''

VENT = '''
[[vessel]]
name = "V"
V = "1 m3"
T = "20 degC"
P = "150 bar"
heat = "HEAT"

[[line]]
name = "vent"
from = "V"
to = "outside"
orifice = "10 mm"
Cd = "0.62"

[end]
P = "PEND"
'''


def solve(ws):
    return api.solve(ws)


def test_adiabatic_fill_of_an_evacuated_tank_ends_at_gamma_times_the_line_temperature():
    # closed form: u2 = h_line gives T2 = γ T_line for an ideal gas of constant cp
    r = solve(sheet(FILL.replace("HEAT", "adiabatic"), overrides=f'cp = "{CP_AR} J/(mol K)"'))
    gamma = CP_AR / (CP_AR - R)
    T_line = 293.15
    assert r.end_state.vessels[0].end.T == pytest.approx(gamma * T_line, rel=1e-12)
    # the history is at the same temperature from the first gas in to the end
    T = r.history.vessels["pot"]["T"]
    assert max(abs(T - gamma * T_line)) < 1e-6
    assert r.history.reached and r.history.closure("pot") < 1e-6


def test_isothermal_fill_and_vent_of_an_ideal_gas_exchange_delta_n_R_T():
    # closed form: at constant T an ideal gas's u and h are constant, so Q = n2 u - n1 u ∓ Δn h = ∓Δn R T
    r = solve(sheet(FILL.replace("HEAT", "isothermal")))
    v = r.end_state.vessels[0]
    assert v.Q == pytest.approx(-v.n2 * R * 293.15, rel=1e-10)
    assert r.history.flows["pot"]["Q"] == pytest.approx(-r.history.n_end["pot"] * R * 293.15, rel=1e-6)
    r = solve(sheet(VENT.replace("HEAT", "isothermal").replace("PEND", "20 bar"), species="N2"))
    v = r.end_state.vessels[0]
    assert v.Q == pytest.approx((v.n1 - v.n2) * R * 293.15, rel=1e-10)
    assert v.end.T == 293.15 and v.end.P == pytest.approx(20e5, rel=1e-12)


@pytest.mark.parametrize("model", ["reference", "peng-robinson"])
def test_adiabatic_vent_ends_on_the_isentrope_of_the_initial_state(model):
    import CoolProp.CoolProp as CP

    r = solve(sheet(VENT.replace("HEAT", "adiabatic").replace("PEND", "40 bar"), species="N2", model=model))
    end = r.end_state.vessels[0].end
    if model == "reference":  # CoolProp HEOS (P, s) flash from the initial state's entropy
        s1 = CP.PropsSI("Smolar", "T", 293.15, "P", 150e5, "Nitrogen")
        assert end.T == pytest.approx(CP.PropsSI("T", "P", 40e5, "Smolar", s1, "Nitrogen"), abs=1e-6)
    # the history leaves the gas on the same isentrope (the gas leaves at the tank's state)
    h = r.history
    assert h.reached
    assert h.end_points["V"].s == pytest.approx(r.end_state.vessels[0].start.s, abs=1e-5)
    assert h.end_points["V"].T == pytest.approx(end.T, abs=0.01)
    assert abs(h.S_gen("V")) < 1e-6 * h.n_start["V"] * R
    assert h.closure("V") < 1e-6


def test_the_first_flow_of_a_vent_is_the_choked_ideal_gas_flow():
    # Shapiro (1953): G* = P0 sqrt(γ M/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1))) for constant cp
    r = solve(sheet(VENT.replace("HEAT", "adiabatic").replace("PEND", "40 bar").replace("N2", "Ar"),
                    overrides=f'cp = "{CP_AR} J/(mol K)"'))
    g, M, T0, P0 = CP_AR / (CP_AR - R), 0.039948, 293.15, 150e5
    G_star = P0 * math.sqrt(g * M / (R * T0)) * (2 / (g + 1)) ** ((g + 1) / (2 * (g - 1)))
    CdA = 0.62 * math.pi * 0.010 ** 2 / 4
    assert r.history.lines["vent"]["mdot"][0] == pytest.approx(-CdA * G_star, rel=1e-6) or \
        r.history.lines["vent"]["mdot"][0] == pytest.approx(CdA * G_star, rel=1e-6)
    assert r.history.lines["vent"]["choked"][0] == 1.0


def test_halving_the_integrator_tolerance_moves_the_lowest_temperature_by_less_than_a_hundredth_kelvin():
    from balance.balances.transient.history import integrate

    p = api.prepare(sheet(VENT.replace("HEAT", "adiabatic").replace("PEND", "30 bar"), species="N2",
                          model="peng-robinson"))
    a = integrate(p).minimum("T").value
    b = integrate(p, rtol=p.settings.rtol / 2).minimum("T").value
    assert abs(a - b) < 0.01


def test_two_vessels_equalise_keeping_mass_and_energy():
    body = '''
[[vessel]]
name = "A"
V = "2 m3"
T = "20 degC"
P = "60 bar"

[[vessel]]
name = "B"
V = "1 m3"
T = "20 degC"
P = "5 bar"

[[line]]
name = "x"
from = "A"
to = "B"
orifice = "8 mm"
Cd = "0.8"

[end]
balanced = true
'''
    r = solve(sheet(body, species="N2", model="peng-robinson"))
    e = r.end_state
    a, b = e.vessel("A"), e.vessel("B")
    assert a.end.P == pytest.approx(b.end.P, rel=1e-9)  # balanced: the pressures meet
    assert a.n1 + b.n1 == pytest.approx(a.n2 + b.n2, rel=1e-12)  # mass kept
    assert a.U1 + b.U1 == pytest.approx(a.U2 + b.U2, rel=1e-10)  # energy kept (adiabatic, rigid)
    assert a.end.s == pytest.approx(a.start.s, abs=1e-9)  # what stays in A expands reversibly
    assert e.S_gen > 0  # mixing into B
    h = r.history
    assert h.reached and max(h.closure(n) for n in ("A", "B")) < 1e-6
    assert h.end_points["B"].T == pytest.approx(b.end.T, abs=0.05)
    assert sum(h.n_end.values()) == pytest.approx(a.n1 + b.n1, rel=1e-8)


def test_a_wall_warms_a_blowdown_and_its_own_balance_closes():
    body = VENT.replace("HEAT", "wall").replace("PEND", "30 bar").replace('heat = "wall"', '''heat = "wall"
wall_mass = "800 kg"
wall_cp = "480 J/(kg K)"
wall_area = "6 m2"
h_inside = "30 W/(m2 K)"
h_outside = "5 W/(m2 K)"
T_ambient = "20 degC"''')
    ws = sheet(body, species="N2", model="peng-robinson")
    r = solve(ws)
    h = r.history
    adiabatic = solve(sheet(VENT.replace("HEAT", "adiabatic").replace("PEND", "30 bar"), species="N2",
                            model="peng-robinson")).history
    assert h.minimum("T").value > adiabatic.minimum("T").value  # the wall gives heat to the cold gas
    assert h.minimum("T_wall").value < 293.15 and h.minimum("T_wall").value > h.minimum("T").value
    assert h.flows["V"]["Q"] > 0 and h.closure("V") < 1e-6
    # the wall's balance: m c ΔT_w = heat from outside - heat to the gas
    wall = r.problem.vessels[0].wall
    dU_wall = wall.mass * wall.cp * (h.T_wall_end["V"] - h.T_wall_start["V"])
    assert dU_wall == pytest.approx(h.flows["V"]["Q_wall_outside"] - h.flows["V"]["Q"], rel=1e-6)
    assert r.end_state.bound  # the end state without time is the adiabatic bound, said so


def test_a_given_heat_rate_is_integrated_and_closes():
    body = VENT.replace("HEAT", "given").replace("PEND", "60 bar").replace('heat = "given"', '''heat = "given"
Q = ["0 s: 20 kW", "10 min: 0 kW"]''')
    r = solve(sheet(body, species="N2", model="peng-robinson"))
    h = r.history
    t = h.t_end
    expected = 20e3 * t - 0.5 * (20e3 / 600.0) * t * t if t <= 600 else 20e3 * 300.0
    assert h.flows["V"]["Q"] == pytest.approx(expected, rel=1e-6)
    assert h.closure("V") < 1e-6


def test_an_end_at_a_time_needs_every_line_restricted():
    body = FILL.replace("HEAT", "adiabatic").replace('orifice = "1 mm"\nCd = "0.8"\n', "").replace(
        "balanced = true", 't = "5 min"')
    problems = api.problems(sheet(body))
    assert problems and problems[0].field == "line 'fill'" and "a time needs every line's flow" in problems[0].message


@pytest.mark.parametrize("change, field, words", [
    (('V = "50 L"', 'V = "-5 L"'), "vessel 'pot'.V", "must be positive"),
    (('Cd = "0.8"', 'Cd = "1.5"'), "line 'fill'.Cd", "at most 1"),
    (('to = "pot"', 'to = "pott"'), "line 'fill'.to", "expected 'outside' or a vessel's name"),
    (("balanced = true", 'P = "12 apples"'), "end.P", "pressure"),
    (('heat = "HEAT"', 'heat = "wall"'), "vessel 'pot'.wall_mass", "give the wall's mass"),
    (("balanced = true", 'P = "20 bar"'), "end.P", "an end pressure between"),  # above the 10 bar supply
    (("balanced = true", 'm = "0 kg"'), "end.m", "nothing would move"),
])
def test_bad_input_is_named_by_its_field(change, field, words):
    ws = sheet(FILL.replace(*change).replace("HEAT", "adiabatic"))
    problems = api.problems(ws)
    assert any(p.field == field and words in p.message for p in problems), problems
    with pytest.raises(InputError):
        api.prepare(ws)


def test_a_vent_entering_the_dome_is_said_to_and_keeps_its_end_state_words():
    r = api.attempt(sheet(VENT.replace("HEAT", "adiabatic").replace("PEND", "2 bar"), species="N2",
                          model="peng-robinson"))
    assert not r.ok
    assert "two-phase" in r.error
