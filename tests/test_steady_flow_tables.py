"""Steady-flow worksheets solved end to end (read, prepare, solve) against sources outside the project.

Sources, named again beside each check:
* "published definitions": isentropic efficiency of compression (h2s - h1)/(h2 - h1), of expansion
  (h1 - h2)/(h1 - h2s), of a nozzle (h1 - h2)/(h1 - h2s) and of a diffuser (h2s - h1)/(h2 - h1);
* "closed form": an ideal gas with constant cp (common practice, no source beyond the ideal-gas law):
  T2s = T1 (P2/P1)^(R/cp), adiabatic mixing T = Σ ṅ T / Σ ṅ, nozzle V2 = sqrt(V1² + 2 (h1 - h2)/M);
* "iapws 1.5 IAPWS97" (IAPWS-IF97, the industrial formulation, independent of CoolProp) and
  "CoolProp 8.0 HEOS" (IAPWS-95 for water, the GERG/Setzmann-Wagner equations for methane) called in
  the test;
* the standard conditions of a standard volume: DIN 1343 (normal: 0 °C, 1.01325 bar), ISO 13443
  (standard: 15 °C, 1.01325 bar), the US gas trade's standard cubic foot (60 °F, 14.696 psia; the
  AGA/GPA base conditions), counted as an ideal gas n = P V / (R T) with R = 8.314462618 J/(mol K)
  (CODATA 2018, exact) and 1 psi = 6894.757293168 Pa, 1 ft = 0.3048 m (NIST SP 811, exact).
"""

from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import pytest

from balance import api
from balance.balances.steady_flow import devices as dv
from balance.balances.steady_flow.streams import Flow
from balance.errors import SolveError, SpecificationError
from balance.models import make_model
from balance.species import lookup, with_overrides
from balance.units import read_rate

R = 8.314462618  # CODATA 2018, exact


def solve(text: str):
    return api.solve(api.read(text))


def sheet(fluid: str, streams: str, devices: str, overrides: str = "") -> str:
    species, model = fluid.split("/")
    return (f'[worksheet]\ntitle = "t"\n[fluid]\nspecies = "{species}"\nmodel = "{model}"\n{overrides}'
            f'[system]\nkind = "steady-flow"\n{streams}\n{devices}\n')


def stream(name: str, **values) -> str:
    return f"[[stream]]\nname = \"{name}\"\n" + "".join(f'{k} = "{v}"\n' for k, v in values.items())


def device(name: str, kind: str, inlets, outlets, **values) -> str:
    ins = ", ".join(f'"{s}"' for s in inlets)
    outs = ", ".join(f'"{s}"' for s in outlets)
    return (f'[[device]]\nname = "{name}"\nkind = "{kind}"\ninlets = [{ins}]\noutlets = [{outs}]\n'
            + "".join(f'{k} = "{v}"\n' for k, v in values.items()))


def row(result, name):
    return next(d for d in result.devices if d.name == name)


CP_CONST = 29.1  # J/(mol K): a constant cp for nitrogen, as a hand calculation takes it
IDEAL = '[fluid.overrides]\ncp = "29.1 J/(mol K)"\n'


# -- the isentropic efficiencies as published ------------------------------------------------
def test_compressor_efficiency_from_its_outlet_state_is_the_published_compression_definition():
    text = sheet("N2/reference", stream("a", T="300 K", P="1 bar", rate="2 kg/s") + stream("b", T="520 K", P="6 bar"),
                 device("K-1", "compressor", ["a"], ["b"], W="?", eta="?"))
    res = solve(text)
    f = "Nitrogen"  # CoolProp 8.0 HEOS, the published definition (h2s - h1)/(h2 - h1)
    h1, s1 = CP.PropsSI("Hmass", "T", 300, "P", 1e5, f), CP.PropsSI("Smass", "T", 300, "P", 1e5, f)
    h2, h2s = CP.PropsSI("Hmass", "T", 520, "P", 6e5, f), CP.PropsSI("Hmass", "P", 6e5, "Smass", s1, f)
    k = row(res, "K-1")
    assert k.eta == pytest.approx((h2s - h1) / (h2 - h1), rel=1e-8)
    assert k.W_dot == pytest.approx(2.0 * (h2 - h1), rel=1e-8)
    assert k.isentropic_T == pytest.approx(CP.PropsSI("T", "P", 6e5, "Smass", s1, f), rel=1e-8)


def test_turbine_efficiency_given_gives_the_published_expansion_definition():
    text = sheet("CH4/reference", stream("a", T="420 K", P="50 bar", rate="1 kg/s") + stream("b", P="8 bar"),
                 device("X-1", "expander", ["a"], ["b"], W="?", eta="0.83"))
    res = solve(text)
    f = "Methane"  # CoolProp 8.0 HEOS: h2 = h1 - eta (h1 - h2s), the published expansion definition
    h1, s1 = CP.PropsSI("Hmass", "T", 420, "P", 50e5, f), CP.PropsSI("Smass", "T", 420, "P", 50e5, f)
    h2s = CP.PropsSI("Hmass", "P", 8e5, "Smass", s1, f)
    h2 = h1 - 0.83 * (h1 - h2s)
    assert res.flows["b"].point.T == pytest.approx(CP.PropsSI("T", "P", 8e5, "Hmass", h2, f), rel=1e-8)
    assert row(res, "X-1").W_dot == pytest.approx(-(h1 - h2), rel=1e-8)  # work done on the fluid: negative
    assert row(res, "X-1").S_gen_dot > 0


# -- an ideal gas with constant cp: closed forms ----------------------------------------------
def test_isentropic_expansion_of_an_ideal_gas_with_constant_cp_is_the_closed_form():
    text = sheet("N2/ideal-gas", stream("a", T="600 K", P="10 bar", rate="5 mol/s") + stream("b", P="2 bar"),
                 device("T-1", "turbine", ["a"], ["b"], W="?", eta="0.9"), IDEAL)
    res = solve(text)
    T2s = 600.0 * (2 / 10) ** (R / CP_CONST)  # closed form
    T2 = 600.0 - 0.9 * (600.0 - T2s)  # the expansion definition with h = cp T
    assert row(res, "T-1").isentropic_T == pytest.approx(T2s, rel=1e-12)
    assert res.flows["b"].point.T == pytest.approx(T2, rel=1e-12)
    assert row(res, "T-1").W_dot == pytest.approx(5.0 * CP_CONST * (T2 - 600.0), rel=1e-10)


def test_adiabatic_mixing_of_three_streams_of_an_ideal_gas_is_the_rate_weighted_temperature():
    text = sheet("N2/ideal-gas",
                 stream("a", T="500 K", P="3 bar", rate="2 mol/s") + stream("b", T="300 K", P="3 bar", rate="5 mol/s")
                 + stream("c", T="350 K", P="3.5 bar", rate="1 mol/s") + stream("m", P="3 bar"),
                 device("M-1", "mixer", ["a", "b", "c"], ["m"]), IDEAL)
    res = solve(text)
    assert res.flows["m"].point.T == pytest.approx((2 * 500 + 5 * 300 + 1 * 350) / 8, rel=1e-12)  # closed form
    assert res.flows["m"].n_dot == pytest.approx(8.0, rel=1e-15)
    # entropy generated, closed form: Σ ṅ_i (cp ln(T/T_i) - R ln(P/P_i))
    T = (2 * 500 + 5 * 300 + 1 * 350) / 8
    S = sum(n * (CP_CONST * math.log(T / Ti) - R * math.log(3 / Pi)) for n, Ti, Pi in ((2, 500, 3), (5, 300, 3), (1, 350, 3.5)))
    assert row(res, "M-1").S_gen_dot == pytest.approx(S, rel=1e-9)


def test_a_nozzle_in_a_worksheet_gives_the_closed_form_exit_speed():
    """Regression: the network kept the outlet stream at rest, so every nozzle's energy balance failed."""
    text = sheet("N2/ideal-gas", stream("a", T="450 K", P="4 bar", rate="0.5 kg/s", velocity="30 m/s")
                 + stream("jet", P="1.5 bar"),
                 device("N-1", "nozzle", ["a"], ["jet"], eta="0.94"), IDEAL)
    res = solve(text)
    M = lookup("N2").M
    T2s = 450.0 * (1.5 / 4) ** (R / CP_CONST)  # closed form
    T2 = 450.0 - 0.94 * (450.0 - T2s)
    V2 = math.sqrt(30.0**2 + 2 * CP_CONST * (450.0 - T2) / M)  # V2 = sqrt(V1² + 2 (h1 - h2)/M)
    assert res.flows["jet"].point.T == pytest.approx(T2, rel=1e-12)
    assert res.flows["jet"].velocity == pytest.approx(V2, rel=1e-10)
    assert abs(row(res, "N-1").energy) < 1e-12


def test_a_diffuser_below_ideal_is_the_published_diffuser_definition():
    """Regression: a diffuser's efficiency was applied as a nozzle's, which for eta < 1 gave an outlet
    below the isentropic enthalpy rise (negative entropy generation)."""
    model, cp = make_model("ideal-gas", *with_overrides(lookup("N2"), {"cp": "29.1 J/(mol K)"})), CP_CONST
    inlet = Flow("in", model, model.flash({"T": 300.0, "P": 1e5}), 2.0, 250.0)
    out = dv.nozzle(inlet, 1.2e5, "out", eta=0.8)
    T2s = 300.0 * 1.2 ** (R / cp)  # closed form; diffuser: (h2s - h1)/(h2 - h1) = eta
    T2 = 300.0 + (T2s - 300.0) / 0.8
    assert out.point.T == pytest.approx(T2, rel=1e-12)
    assert out.velocity == pytest.approx(math.sqrt(250.0**2 - 2 * cp * (T2 - 300.0) / inlet.M), rel=1e-10)
    assert dv.balance_of([inlet], [out], 0.0, 0.0, None).S_gen_dot > 0


def test_a_compressor_with_stream_speeds_does_the_work_of_the_energy_carried():
    """Regression: the work was ṅ (h2 - h1) whatever the speeds, and the energy balance then refused it."""
    text = sheet("N2/ideal-gas", stream("a", T="300 K", P="1 bar", rate="1 mol/s", velocity="80 m/s")
                 + stream("b", P="3 bar", velocity="10 m/s"),
                 device("K-1", "compressor", ["a"], ["b"], W="?", eta="0.8"), IDEAL)
    res = solve(text)
    M = lookup("N2").M
    T2 = 300.0 + 300.0 * (3 ** (R / CP_CONST) - 1) / 0.8  # closed form
    W = CP_CONST * (T2 - 300.0) + M * (10.0**2 - 80.0**2) / 2  # Ẇ = ṅ (Δh + M ΔV²/2)
    assert row(res, "K-1").W_dot == pytest.approx(W, rel=1e-10)
    # and given the power, the outlet follows from the energy carried
    res2 = solve(text.replace('W = "?"\neta = "0.8"', f'W = "{W!r} W"'))
    assert res2.flows["b"].point.T == pytest.approx(T2, rel=1e-10)


# -- steam: a turbine's exit quality and a throttle's outlet, against IF97 and CoolProp ------------
def test_a_back_pressure_steam_turbine_exit_quality_against_if97_and_coolprop():
    from iapws import IAPWS97

    text = sheet("H2O/reference", stream("hp", T="450 degC", P="60 bar", rate="10 t/h") + stream("exh", P="0.5 bar"),
                 device("T-1", "turbine", ["hp"], ["exh"], W="?", eta="0.8"))
    res = solve(text)
    # iapws 1.5 IAPWS97 (MPa, kJ/kg): h2 = h1 - 0.8 (h1 - h2s), x at 0.05 MPa
    one = IAPWS97(T=723.15, P=6.0)
    h2 = one.h - 0.8 * (one.h - IAPWS97(P=0.05, s=one.s).h)
    assert res.flows["exh"].point.x == pytest.approx(IAPWS97(P=0.05, h=h2).x, abs=2e-4)  # IF97 vs IAPWS-95
    # CoolProp 8.0 HEOS (IAPWS-95), the same definition
    h1, s1 = CP.PropsSI("Hmass", "T", 723.15, "P", 60e5, "Water"), CP.PropsSI("Smass", "T", 723.15, "P", 60e5, "Water")
    h2 = h1 - 0.8 * (h1 - CP.PropsSI("Hmass", "P", 0.5e5, "Smass", s1, "Water"))
    assert res.flows["exh"].point.x == pytest.approx(CP.PropsSI("Q", "P", 0.5e5, "Hmass", h2, "Water"), abs=1e-8)
    assert row(res, "T-1").W_dot == pytest.approx(-10000 / 3600 * (h1 - h2), rel=1e-8)
    assert any("wet" in w for w in res.warnings)


def test_wet_steam_throttled_to_near_atmospheric_is_superheated_as_if97_and_coolprop_say():
    from iapws import IAPWS97

    text = sheet("H2O/reference", stream("wet", P="12 bar", x="0.97", rate="0.2 kg/s") + stream("out", P="1.1 bar"),
                 device("V-1", "valve", ["wet"], ["out"]))
    res = solve(text)
    h = IAPWS97(P=1.2, x=0.97).h  # iapws 1.5 IAPWS97: the throttle keeps h
    assert res.flows["out"].point.T == pytest.approx(IAPWS97(P=0.11, h=h).T, abs=0.05)  # IF97 vs IAPWS-95
    h = CP.PropsSI("Hmass", "P", 12e5, "Q", 0.97, "Water")  # CoolProp 8.0 HEOS
    assert res.flows["out"].point.T == pytest.approx(CP.PropsSI("T", "P", 1.1e5, "Hmass", h, "Water"), rel=1e-9)
    assert res.flows["out"].point.x is None or res.flows["out"].point.x > 1 - 1e-12 or \
        res.flows["out"].point.phase in ("gas", "supercritical_gas")


def test_a_methane_letdown_valve_outlet_temperature_against_coolprop():
    text = sheet("CH4/reference", stream("a", T="8 degC", P="71.01325 bar", rate="2500 Nm3/h") + stream("b", P="8.01325 bar"),
                 device("PCV", "valve", ["a"], ["b"]))
    res = solve(text)
    h = CP.PropsSI("Hmass", "T", 281.15, "P", 71.01325e5, "Methane")  # CoolProp 8.0 HEOS
    assert res.flows["b"].point.T == pytest.approx(CP.PropsSI("T", "P", 8.01325e5, "Hmass", h, "Methane"), rel=1e-9)


# -- standard volumes -------------------------------------------------------------------------
@pytest.mark.parametrize(("text", "T", "P", "volume", "standard"), [
    ("1000 Nm3/h", 273.15, 101325.0, 1000 / 3600, "DIN 1343"),  # DIN 1343: 0 °C, 1.01325 bar
    ("1000 Sm3/h", 288.15, 101325.0, 1000 / 3600, "ISO 13443"),  # ISO 13443: 15 °C, 1.01325 bar
    ("100 scf/min", (60 - 32) / 1.8 + 273.15, 14.696 * 6894.757293168, 100 * 0.3048**3 / 60, "60 °F"),
    ("2 MMscf/d", (60 - 32) / 1.8 + 273.15, 14.696 * 6894.757293168, 2e6 * 0.3048**3 / 86400, "14.696 psia"),
])
def test_a_standard_volume_counts_the_moles_of_an_ideal_gas_at_the_standard_conditions(text, T, P, volume, standard):
    n, words = read_rate(text, lookup("CH4").M, "rate")
    assert n == pytest.approx(P * volume / (R * T), rel=1e-8)  # n = PV/(RT) at the standard's conditions
    assert standard in words


def test_a_worksheet_says_which_standard_its_rate_was_read_at():
    text = sheet("CH4/peng-robinson", stream("a", T="15 degC", P="20 bar", rate="5000 Sm3/h") + stream("b", P="5 bar"),
                 device("V", "valve", ["a"], ["b"]))
    data = api.as_json(solve(text))
    assert data["streams"]["a"]["n_dot"]["value"] == pytest.approx(101325 * 5000 / 3600 / (R * 288.15), rel=1e-12)
    assert "ISO 13443" in data["streams"]["a"]["rate_read_as"]


# -- refusals -----------------------------------------------------------------------------------
def test_an_outlet_colder_than_isentropic_is_refused_naming_the_compressor():
    """Nitrogen from 300 K, 1 bar to 6 bar: the isentropic end is near 500 K (CoolProp 8.0 HEOS, 499.4 K),
    so an outlet at 480 K would need an efficiency above 1 and negative entropy generation."""
    text = sheet("N2/reference", stream("a", T="300 K", P="1 bar", rate="1 kg/s") + stream("b", T="480 K", P="6 bar"),
                 device("K-7", "compressor", ["a"], ["b"], W="?", eta="?"))
    with pytest.raises(SolveError) as err:
        solve(text)
    assert "device 'K-7'" in str(err.value) and "S_gen" in str(err.value)


def test_heat_from_a_colder_boundary_is_refused_naming_the_heater():
    text = sheet("N2/ideal-gas", stream("a", T="400 K", P="2 bar", rate="1 mol/s") + stream("b", T="450 K"),
                 device("E-9", "heater", ["a"], ["b"], Q="?", T_boundary="350 K"), IDEAL)
    with pytest.raises(SolveError) as err:
        solve(text)
    assert "device 'E-9'" in str(err.value) and "S_gen" in str(err.value)


# -- an exchanger: a condensing side stepped along its enthalpy -----------------------------------
def _coolprop_approach(hot, cold, P_hot, P_cold, h_hot, h_cold, steps=dv.EXCHANGER_STEPS, extra=()):
    """CoolProp 8.0 HEOS along each side's molar enthalpy, counter-flow (hot inlet at the cold outlet), at
    even steps of the duty and at the fractions ``extra``."""
    worst = math.inf
    for f in sorted({k / steps for k in range(steps + 1)} | set(extra)):
        T_h = CP.PropsSI("T", "P", P_hot, "Hmolar", h_hot[0] + f * (h_hot[1] - h_hot[0]), hot)
        g = 1 - f
        T_c = CP.PropsSI("T", "P", P_cold, "Hmolar", h_cold[0] + g * (h_cold[1] - h_cold[0]), cold)
        worst = min(worst, T_h - T_c)
    return worst


def _exchanger_sheet(gas_out: str) -> str:
    streams = (stream("steam", T="200 degC", P="1.5 bar", rate="0.05 kg/s", species="H2O", model="reference")
               + stream("condensate", P="1.5 bar", x="0", species="H2O", model="reference")
               + stream("gas", T="20 degC", P="3 bar", rate="?", species="N2", model="reference")
               + stream("gas out", T=gas_out, species="N2", model="reference"))
    return sheet("N2/reference", streams, device("E-5", "exchanger", ["steam", "gas"], ["condensate", "gas out"]))


def test_steam_condensing_against_a_gas_crosses_inside_though_both_ends_are_apart():
    """Steam at 200 °C, 1.5 bar condenses at 111.4 °C (CoolProp 8.0 HEOS); the gas leaves at 180 °C.
    Both ends are apart (200 - 180 = 20 K, 111.4 - 20 = 91 K), but the gas passes the condensing steam's
    temperature a few per cent into the duty: only stepping along the enthalpy finds it."""
    with pytest.raises(SolveError) as err:
        solve(_exchanger_sheet("180 degC"))
    assert "device 'E-5'" in str(err.value) and "cross" in str(err.value)
    # the ends alone do not cross, the condensing temperature does (CoolProp 8.0 HEOS)
    assert 293.15 < CP.PropsSI("T", "P", 1.5e5, "Q", 0, "Water") < 453.15


def test_the_minimum_approach_reported_is_the_one_stepped_through_coolprop():
    res = solve(_exchanger_sheet("100 degC"))
    fl = res.flows
    got = row(res, "E-5").approach
    h_steam = (fl["steam"].point.h, fl["condensate"].point.h)
    f_dew = (h_steam[0] - CP.PropsSI("Hmolar", "P", 1.5e5, "Q", 1, "Water")) / (h_steam[0] - h_steam[1])
    want = _coolprop_approach("Water", "Nitrogen", 1.5e5, 3e5, h_steam, (fl["gas"].point.h, fl["gas out"].point.h),
                              extra=(f_dew,))  # the steam's dew point, where it pinches
    assert got == pytest.approx(want, abs=1e-6)
    # the pinch is inside, at the dew point, well below either end's difference (CoolProp 8.0 HEOS)
    T_sat = CP.PropsSI("T", "P", 1.5e5, "Q", 1, "Water")
    assert got < min(473.15 - 373.15, T_sat - 293.15)
    # the gas's rate followed from the steam's duty: Q = ṁ_s (h_s,in - h_s,out) = ṅ_g (h_g,out - h_g,in)
    Q = 0.05 * (CP.PropsSI("Hmass", "T", 473.15, "P", 1.5e5, "Water") - CP.PropsSI("Hmass", "P", 1.5e5, "Q", 0, "Water"))
    dh = CP.PropsSI("Hmass", "T", 373.15, "P", 3e5, "Nitrogen") - CP.PropsSI("Hmass", "T", 293.15, "P", 3e5, "Nitrogen")
    assert fl["gas"].m_dot == pytest.approx(Q / dh, rel=1e-7)


def test_a_state_given_twice_is_refused_as_over_specified():
    text = sheet("N2/ideal-gas", stream("a", T="300 K", P="5 bar", rate="1 mol/s") + stream("b", T="250 K", P="1 bar"),
                 device("V", "valve", ["a"], ["b"]), IDEAL)
    with pytest.raises(SpecificationError):
        solve(text)


def test_a_compressor_given_its_efficiency_and_its_outlet_temperature_is_over_specified():
    """Regression: the given efficiency was reported beside an outlet state that implies another one
    (here 0.764 by the published definition, CoolProp 8.0 HEOS: nitrogen 300 K, 1 bar to 6 bar, 560 K)."""
    text = sheet("N2/reference", stream("a", T="300 K", P="1 bar", rate="1 kg/s") + stream("b", T="560 K", P="6 bar"),
                 device("K-3", "compressor", ["a"], ["b"], W="?", eta="0.8"))
    with pytest.raises(SpecificationError) as err:
        solve(text)
    assert "stream 'b'" in str(err.value) and "given" in str(err.value)


def test_a_heater_given_its_duty_and_both_temperatures_gives_the_rate():
    """Regression: the rate was asked for although Q = ṅ cp (T2 - T1) fixes it (closed form, constant cp)."""
    text = sheet("N2/ideal-gas", stream("a", T="300 K", P="2 bar") + stream("b", T="360 K") + stream("c", P="1 bar"),
                 device("E-1", "heater", ["a"], ["b"], Q="50 kW") + device("V-1", "valve", ["b"], ["c"]), IDEAL)
    res = solve(text)
    assert res.flows["a"].n_dot == pytest.approx(50e3 / (CP_CONST * 60.0), rel=1e-12)
    assert res.flows["c"].n_dot == res.flows["a"].n_dot and not res.basis


def test_a_turbine_given_its_power_and_its_exit_state_gives_the_steam_rate():
    """The steam a 1 MW turbine needs from 40 bar, 400 °C to 3 bar, 160 °C: ṁ = W / (h1 - h2)
    (CoolProp 8.0 HEOS)."""
    text = sheet("H2O/reference", stream("a", T="400 degC", P="40 bar") + stream("b", T="160 degC", P="3 bar"),
                 device("T-2", "turbine", ["a"], ["b"], W="-1 MW"))
    res = solve(text)
    dh = CP.PropsSI("Hmass", "T", 673.15, "P", 40e5, "Water") - CP.PropsSI("Hmass", "T", 433.15, "P", 3e5, "Water")
    assert res.flows["a"].m_dot == pytest.approx(1e6 / dh, rel=1e-8)


def test_a_heater_given_its_duty_its_rate_and_both_temperatures_is_over_specified():
    text = sheet("N2/ideal-gas", stream("a", T="300 K", P="2 bar", rate="10 mol/s") + stream("b", T="360 K"),
                 device("E-1", "heater", ["a"], ["b"], Q="50 kW"), IDEAL)
    with pytest.raises(SpecificationError) as err:
        solve(text)
    assert str(err.value).startswith("heater E-1: the heat Q is given as 50 kW but its streams' states and rate "
                                     "make it 17.46 kW")  # 10 × 29.1 × 60 W, closed form


def test_a_pinch_at_the_dew_point_between_the_steps_is_found():
    """Regression: stepping at 40 even fractions of the duty only, a cross of 0.5 K where superheated steam
    starts to condense was missed (the gas's temperature changes some 2.5 K a step). The case is built with
    CoolProp 8.0 HEOS: steam at 1.5 bar from 220 °C to saturated liquid, nitrogen at 3 bar from 20 °C to the
    outlet that puts it 0.5 K above the steam's dew point where the steam reaches it."""
    steam, n2 = make_model("reference", lookup("H2O")), make_model("reference", lookup("N2"))
    hot_in = Flow("steam", steam, steam.flash({"T": 493.15, "P": 1.5e5}), 1.0)
    hot_out = Flow("condensate", steam, steam.flash({"P": 1.5e5, "x": 0.0}), 1.0)
    h_in, h_out = (CP.PropsSI("Hmolar", "T", 493.15, "P", 1.5e5, "Water"), CP.PropsSI("Hmolar", "P", 1.5e5, "Q", 0, "Water"))
    h_dew, T_dew = CP.PropsSI("Hmolar", "P", 1.5e5, "Q", 1, "Water"), CP.PropsSI("T", "P", 1.5e5, "Q", 1, "Water")
    f_dew = (h_in - h_dew) / (h_in - h_out)
    steps = dv.EXCHANGER_STEPS
    assert abs(f_dew * steps - round(f_dew * steps)) > 0.2  # between two steps, so the steps alone miss it
    duty = h_in - h_out  # per mole of steam
    h_ci = CP.PropsSI("Hmolar", "T", 293.15, "P", 3e5, "Nitrogen")
    h_pinch = CP.PropsSI("Hmolar", "T", T_dew + 0.5, "P", 3e5, "Nitrogen")
    n_gas = duty * (1 - f_dew) / (h_pinch - h_ci)  # the gas takes (1 - f_dew) of the duty up to the pinch
    cold_in = Flow("gas", n2, n2.flash({"T": 293.15, "P": 3e5}), n_gas)
    cold_out = Flow("gas out", n2, n2.flash({"P": 3e5, "h": h_ci + duty / n_gas}), n_gas)
    ap = dv.approach(hot_in, hot_out, cold_in, cold_out)
    assert ap.minimum == pytest.approx(-0.5, abs=1e-5) and ap.where == pytest.approx(f_dew, rel=1e-6)
    # the even steps alone (CoolProp 8.0 HEOS along both sides) see no cross
    assert _coolprop_approach("Water", "Nitrogen", 1.5e5, 3e5, (h_in, h_out), (h_ci, h_ci + duty / n_gas)) > 0


def test_a_flash_drum_holds_what_is_given_of_its_outlets():
    """Regression: a separator's outlets were set without checking what the worksheet gives of them
    (a drain said to be at 100 °C was reported at the saturation temperature of 2 bar, 120.2 °C, CoolProp 8.0)."""
    streams = (stream("condensate", T="180 degC", P="12 bar", rate="2 kg/s") + stream("drain", P="2 bar", T="100 degC")
               + stream("flash steam", P="2 bar"))
    text = sheet("H2O/reference", streams, device("D-1", "separator", ["condensate"], ["drain", "flash steam"]))
    with pytest.raises(SpecificationError) as err:
        solve(text)
    assert "stream 'drain'" in str(err.value)
    good = solve(text.replace('T = "100 degC"\n', "", 1))
    assert good.flows["drain"].point.T == pytest.approx(CP.PropsSI("T", "P", 2e5, "Q", 0, "Water"), rel=1e-9)
