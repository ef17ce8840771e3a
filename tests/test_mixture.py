"""Ideal-gas mixtures of fixed composition: reading a composition, the mixture's properties, and
every kind of balance on one.

Sources: CoolProp 8.0's HEOS mixture backend for the ideal-gas heat capacity (cp0molar) and the
molar mass of a mixture; the entropy of mixing ideal gases, -R Σ y ln y, and mole-weighted ideal-gas
h and cp (closed forms, common practice, no source); the molar mass of dry air, 28.9644 g/mol
(U.S. Standard Atmosphere, 1976; from memory).
"""

from __future__ import annotations

import math

import pytest
from scipy.integrate import quad

from balance import api
from balance.errors import InputError
from balance.mixture import SUM_TOLERANCE, bundled, bundled_mixture, mixture, read_composition
from balance.species import lookup
from balance.units import R

COOLPROP_NAMES = {"N2": "Nitrogen", "O2": "Oxygen", "Ar": "Argon", "CO2": "CarbonDioxide", "CH4": "Methane",
                  "C2H6": "Ethane", "C3H8": "Propane", "nC4H10": "n-Butane", "H2O": "Water"}


def coolprop_mixture(sp):
    CP = pytest.importorskip("CoolProp.CoolProp")
    AS = CP.AbstractState("HEOS", "&".join(COOLPROP_NAMES[i] for i, _ in sp.composition))
    AS.set_mole_fractions([y for _, y in sp.composition])
    return CP, AS


# -- reading a composition ------------------------------------------------------------------------
def test_fractions_that_do_not_add_up_are_refused_naming_the_sum():
    with pytest.raises(InputError, match=r"fluid.composition: the mole fractions add up to 1.005, off 1 by \+0.005"):
        read_composition({"CH4": "0.9", "C2H6": "0.075", "N2": "0.03"})
    (a, ya), (b, yb) = read_composition({"N2": "0.8", "O2": "0.3"}, normalise=True)  # scaled only when asked
    assert (a.id, b.id) == ("N2", "O2") and ya == pytest.approx(0.8 / 1.1, rel=1e-15)
    # within the tolerance: read as typed, scaled to exactly 1
    assert sum(y for _, y in read_composition({"N2": "0.79", "O2": repr(0.21 + SUM_TOLERANCE / 2)})) == 1.0


def test_mass_fractions_are_turned_into_mole_fractions():
    """y_i = (w_i / M_i) / Σ (w_j / M_j): common practice, no source."""
    (_, y_n2), (_, y_co2) = read_composition({"N2": "0.5", "CO2": "0.5"}, "mass")
    M_n2, M_co2 = lookup("N2").M, lookup("CO2").M
    assert y_n2 == pytest.approx((0.5 / M_n2) / (0.5 / M_n2 + 0.5 / M_co2), rel=1e-14)
    assert y_n2 + y_co2 == pytest.approx(1.0, abs=1e-15)


@pytest.mark.parametrize("composition, fractions, field, words", [
    ({"N2": "0.5", "nitrogen": "0.5"}, "mole", "fluid.composition.nitrogen", "names N2 a second time"),
    ({"N2": "1.2"}, "mole", "fluid.composition.N2", "must be a fraction from 0 to 1"),
    ({"N2": "-0.1", "O2": "1.1"}, "mole", "fluid.composition.N2", "must be a fraction from 0 to 1"),
    ({"Xx": "1"}, "mole", "fluid.composition.Xx", "unknown species 'Xx'"),
    ({"N2": "1"}, "volume", "fluid.fractions", "expected mole or mass"),
    ({}, "mole", "fluid.composition", "is empty"),
    ({"N2": "0", "O2": "0"}, "mole", "fluid.composition", "no component with a fraction above 0"),
])
def test_a_bad_composition_names_its_field(composition, fractions, field, words):
    with pytest.raises(InputError) as caught:
        read_composition(composition, fractions)
    assert caught.value.field == field and words in caught.value.message


def test_the_bundled_compositions_read_and_say_where_they_come_from():
    for key, entry in bundled().items():
        sp = bundled_mixture(key)
        assert sum(y for _, y in sp.composition) == pytest.approx(1.0, abs=1e-15)
        assert entry["source"] and sp.sources["source"] == entry["source"]
        if key != "dry-air":
            assert "invented" in entry["source"] and "invented" in entry["name"]
    # U.S. Standard Atmosphere, 1976 (from memory): M0 = 28.9644 g/mol
    assert bundled_mixture("dry-air").M * 1e3 == pytest.approx(28.9644, abs=2e-3)


# -- the mixture's properties ---------------------------------------------------------------------
@pytest.mark.parametrize("key", ["dry-air", "hpp-natural-gas", "hpp-flue-gas"])
def test_the_molar_mass_and_cp0_agree_with_coolprop_mixtures(key):
    """CoolProp 8.0 HEOS mixture: molar_mass() to 2e-5 (each component's M is CoolProp's own), and
    cp0molar() as far as the components' own data allow: the mixture's difference from CoolProp's
    mixture is no more than the mole-weighted differences of its components from CoolProp's pure
    fluids (the NASA polynomials and CoolProp's ideal-gas parts differ by up to 0.7 % for methane at
    900 K, measured); for dry air that is within 0.1 % from 250 to 900 K."""
    sp = bundled_mixture(key)
    CP, AS = coolprop_mixture(sp)
    assert sp.M == pytest.approx(AS.molar_mass(), rel=2e-5)
    pure = {i: CP.AbstractState("HEOS", COOLPROP_NAMES[i]) for i, _ in sp.composition}
    wet = any(i == "H2O" for i, _ in sp.composition)  # CoolProp takes no water mixture below 273.16 K
    for T in (300.0, 600.0, 900.0) if wet else (250.0, 300.0, 600.0, 900.0):
        AS.update(CP.PT_INPUTS, 1e4, T)  # low pressure; cp0 does not depend on it
        bound = 0.0
        for i, y in sp.composition:
            pure[i].update(CP.PT_INPUTS, 1e4, T)
            bound += y * abs(lookup(i).cp_ig.cp(T) - pure[i].cp0molar())
        assert abs(sp.cp_ig.cp(T) - AS.cp0molar()) <= bound + 1e-9, T
        if key == "dry-air":
            assert sp.cp_ig.cp(T) == pytest.approx(AS.cp0molar(), rel=1e-3), T


def test_h_and_cp_are_mole_weighted_and_s_carries_the_entropy_of_mixing():
    """Closed forms (common practice, no source): h = Σ y h_i, cp = Σ y cp_i, s = Σ y s_i - R Σ y ln y."""
    parts = read_composition({"CH4": "0.6", "N2": "0.3", "CO2": "0.1"})
    sp = mixture(parts)
    for T in (260.0, 298.15, 700.0):
        cp, h, s = sp.cp_ig.terms(T)
        assert cp == pytest.approx(sum(y * p.cp_ig.cp(T) for p, y in parts), rel=1e-14)
        assert h == pytest.approx(sum(y * p.cp_ig.h(T) for p, y in parts), rel=1e-13, abs=1e-9)
        mixing = -R * (0.6 * math.log(0.6) + 0.3 * math.log(0.3) + 0.1 * math.log(0.1))
        assert s == pytest.approx(sum(y * p.cp_ig.s(T) for p, y in parts) + mixing, rel=1e-13, abs=1e-12)
    # the same formulas on arrays (the vectorised path)
    import numpy as np

    cps, hs, ss = sp.cp_ig.terms(np.array([260.0, 700.0]))
    assert cps[1] == pytest.approx(sp.cp_ig.cp(700.0), rel=1e-15) and ss[0] == pytest.approx(sp.cp_ig.s(260.0))


def test_a_mixture_takes_every_model_but_the_incompressible_one():
    with pytest.raises(InputError) as caught:
        api.fluid("dry-air", "incompressible")
    assert caught.value.field == "fluid.model" and "not a mixture" in caught.value.message
    sp, model = api.fluid("dry-air", "ideal-gas")
    assert model.at_TP(300.0, 1e5).v == pytest.approx(R * 300.0 / 1e5, rel=1e-15)  # P v = R T
    assert api.fluid("dry-air", "peng-robinson")[1].name == "peng-robinson"


# -- balances on a mixture ------------------------------------------------------------------------
CLOSED = '''
[worksheet]
title = "Lab rig: sealed bottle of rig fuel gas in the sun"
[fluid]
species = "rig fuel gas"
model = "ideal-gas"
composition = {CH4 = 0.9, C2H6 = 0.07, N2 = 0.03}
[[initial]]
name = "bottle"
T = "15 degC"
P = "5 bar"
V = "50 L"
[final]
T = "60 degC"
[[heat]]
name = "sun"
Q = "?"
T_boundary = "70 degC"
[process]
constraints = ["rigid"]
'''


def test_a_rigid_mixture_heated_takes_n_times_the_mole_weighted_cv_integral():
    """Q = n ∫ (Σ y cp0_i - R) dT, with cp0 from CoolProp 8.0's HEOS mixture (cp0molar): within 0.2 %."""
    result = api.solve(CLOSED)
    data = api.as_json(result)
    assert data["species"] == "mixture" and data["composition"] == {"CH4": 0.9, "C2H6": 0.07, "N2": 0.03}
    T1, T2, n = 288.15, 333.15, 5e5 * 0.05 / (R * 288.15)
    CP, AS = coolprop_mixture(result.problem.species)

    def cv0(T):
        AS.update(CP.PT_INPUTS, 1e4, T)
        return AS.cp0molar() - R

    assert result.terms[0].value == pytest.approx(n * quad(cv0, T1, T2)[0], rel=2e-3)
    assert result.final.point.P == pytest.approx(5e5 * T2 / T1, rel=1e-12)  # rigid ideal gas: P/T constant


def test_a_worksheet_names_a_bundled_composition_as_its_species(tmp_path):
    ws = CLOSED.replace('species = "rig fuel gas"', 'species = "dry-air"').replace(
        "composition = {CH4 = 0.9, C2H6 = 0.07, N2 = 0.03}\n", "")
    result = api.solve(ws)
    assert result.problem.species.name == "dry air"
    # the same heating of CoolProp's dry-air mixture (HEOS cp0molar), within 0.2 %
    CP, AS = coolprop_mixture(result.problem.species)
    n = 5e5 * 0.05 / (R * 288.15)

    def cv0(T):
        AS.update(CP.PT_INPUTS, 1e4, T)
        return AS.cp0molar() - R

    assert result.terms[0].value == pytest.approx(n * quad(cv0, 288.15, 333.15)[0], rel=2e-3)


def test_a_heater_on_flue_gas_takes_the_mole_weighted_enthalpy_rise():
    """Q̇ = ṅ Σ y (h_i(T2) - h_i(T1)) (closed form; common practice, no source)."""
    ws = '''
[worksheet]
title = "Pilot burner: flue gas reheated ahead of the stack analyser"
[fluid]
species = "hpp-flue-gas"
model = "ideal-gas"
[system]
kind = "steady-flow"
[[stream]]
name = "in"
T = "180 degC"
P = "1.1 bar"
rate = "2 mol/s"
[[stream]]
name = "out"
T = "260 degC"
[[device]]
name = "E-7"
kind = "heater"
inlets = ["in"]
outlets = ["out"]
Q = "?"
'''
    data = api.as_json(api.solve(ws))
    sp = bundled_mixture("hpp-flue-gas")
    parts = [(lookup(i), y) for i, y in sp.composition]
    expected = 2.0 * sum(y * (p.cp_ig.h(533.15) - p.cp_ig.h(453.15)) for p, y in parts)
    assert data["devices"]["E-7"]["Q_dot"]["value"] == pytest.approx(expected, rel=1e-9)
    assert data["streams"]["in"]["composition"] == dict(sp.composition)


def test_the_record_keeps_the_composition(tmp_path, monkeypatch):
    from balance.record import Record

    monkeypatch.setenv("JOULEBOOK_AUTHOR", "t.engineer")
    rec = Record.create(tmp_path / "mix.jbk", worksheet=api.read(CLOSED))
    fluid = next(e for e in rec.entries if e.kind == "fluid and model")
    assert fluid.data["fluid"]["composition"] == {"CH4": "0.9", "C2H6": "0.07", "N2": "0.03"}
    assert "composition" in fluid.text and "CH4 = 0.9" in fluid.text
    assert rec.entries[-1].data["composition"] == {"CH4": 0.9, "C2H6": 0.07, "N2": 0.03}
    assert rec.replay().ok


def test_a_mixture_below_its_estimated_dew_point_is_warned_about():
    """Flue gas with 16.7 % water at 1.1 bar: water's partial pressure 0.184 bar is above its vapour
    pressure at 40 °C (7.38 kPa, CoolProp 8.0 IAPWS-95) and far below it at 180 °C (10.0 bar):
    the screen warns at the one and not at the other."""
    CP = pytest.importorskip("CoolProp.CoolProp")
    assert CP.PropsSI("P", "T", 313.15, "Q", 0, "Water") < 0.167 * 1.1e5 < CP.PropsSI("P", "T", 453.15, "Q", 0, "Water")
    sp, model = api.fluid("hpp-flue-gas", "ideal-gas")
    cold = model.warnings(model.at_TP(313.15, 1.1e5))
    assert any("dew point" in w and "most from H2O" in w for w in cold)
    assert not any("dew point" in w for w in model.warnings(model.at_TP(453.15, 1.1e5)))


EXCHANGER = '''
[worksheet]
title = "Pilot burner: flue gas preheats the fuel gas"
[fluid]
model = "ideal-gas"
[fluid.compositions.flue]
N2 = 0.72
CO2 = 0.09
H2O = 0.17
O2 = 0.02
[fluid.compositions.fuel]
CH4 = 0.92
C2H6 = 0.05
N2 = 0.03
[system]
kind = "steady-flow"
[[stream]]
name = "hot in"
species = "flue"
T = "420 degC"
P = "1.05 bar"
rate = "3 mol/s"
[[stream]]
name = "hot out"
species = "flue"
T = "250 degC"
[[stream]]
name = "cold in"
species = "fuel"
T = "15 degC"
P = "4 bar"
rate = "1 mol/s"
[[stream]]
name = "cold out"
species = "fuel"
[[device]]
name = "E-12"
kind = "exchanger"
inlets = ["hot in", "cold in"]
outlets = ["hot out", "cold out"]
'''


def test_named_compositions_meet_in_an_exchanger():
    """Each side its own named mixture: the heat the flue gas gives up is the heat the fuel gas takes,
    ṅ_hot Σ y (h_i(T_in) - h_i(T_out)) in closed form (common practice, no source)."""
    data = api.as_json(api.solve(EXCHANGER))
    hot = read_composition({"N2": "0.72", "CO2": "0.09", "H2O": "0.17", "O2": "0.02"})
    duty = 3.0 * sum(y * (sp.cp_ig.h(693.15) - sp.cp_ig.h(523.15)) for sp, y in hot)
    cold = mixture(read_composition({"CH4": "0.92", "C2H6": "0.05", "N2": "0.03"}))
    T_out = data["streams"]["cold out"]["T"]["value"]
    assert 1.0 * (cold.cp_ig.h(T_out) - cold.cp_ig.h(288.15)) == pytest.approx(duty, rel=1e-9)
    assert data["streams"]["hot in"]["composition"]["H2O"] == pytest.approx(0.17)
    assert data["streams"]["cold out"]["composition"]["CH4"] == pytest.approx(0.92)


def test_a_named_composition_that_does_not_add_up_names_itself():
    bad = EXCHANGER.replace("O2 = 0.02", "O2 = 0.03")
    with pytest.raises(InputError) as caught:
        api.solve(bad)
    assert caught.value.field == "fluid.compositions.flue" and "add up to 1.01" in caught.value.message
