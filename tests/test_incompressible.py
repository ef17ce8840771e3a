"""The incompressible model: its identities, liquid water against CoolProp,
a solid wall, and the pairs it refuses.

Sources: the model's own definitions (v = M/ρ, u = cp (T - 298.15 K),
h = u + P v, s = cp ln(T/298.15 K), cv = cp, Z = P v/(R T)); CoolProp 8.0
HEOS for liquid water; the steel constants are inputs only (common
practice, no source), the check is the arithmetic of the balance.
"""

from __future__ import annotations

import dataclasses
import math

import CoolProp.CoolProp as CP
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from balance.errors import InputError
from balance.models import make_model
from balance.models.incompressible import Incompressible
from balance.species import IdealGasHeatCapacity, Species, lookup, with_overrides
from balance.units import R, T_REF

WATER = lookup("H2O")


def steel() -> Species:
    """A solid with no data of its own: M of iron (55.845 g/mol, IUPAC atomic weight,
    from memory: an input only, every check on it is per kilogram and holds for any M);
    Tc, Pc, omega and cp° are required fields the model never reads."""
    return Species(id="steel", name="carbon steel", formula="Fe", M=0.055845, Tc=9000.0, Pc=1e9,
                   omega=0.0, cp_ig=IdealGasHeatCapacity(constant_cp=25.0))


@pytest.fixture(scope="module")
def water():
    return make_model("incompressible", WATER)


@settings(max_examples=200, deadline=None)
@given(T=st.floats(250.0, 600.0), P=st.floats(1e3, 1e8))
def test_identities(T, P):
    m = make_model("incompressible", WATER)
    p = m.at_TP(T, P)
    cp = WATER.liquid.cp * WATER.M
    # the model's definitions
    assert p.v == WATER.M / WATER.liquid.rho
    assert p.h == pytest.approx(p.u + P * p.v, rel=1e-14, abs=1e-9)
    assert p.cp == p.cv == pytest.approx(cp, rel=1e-14)
    assert p.u == pytest.approx(cp * (T - T_REF), rel=1e-12, abs=1e-9)
    assert p.s == pytest.approx(cp * math.log(T / T_REF), rel=1e-12, abs=1e-12)
    assert p.Z == pytest.approx(P * p.v / (R * T), rel=1e-14)
    assert p.phase == "incompressible" and p.x is None
    assert math.isnan(p.u_dep) and math.isnan(p.h_dep) and math.isnan(p.s_dep)


def test_water_heated_20_K_against_coolprop(water):
    # CoolProp 8.0 HEOS: Δh of liquid water at 1 atm from 20 °C to 40 °C, i.e.
    # ∫cp dT (83.609 kJ/kg), and Δu (83.608 kJ/kg). The data's cp is taken at
    # 25 °C; cp of liquid water moves by less than 0.1 % between 20 and 40 °C
    # (CoolProp 8.0 HEOS), so 0.1 % is the tolerance.
    M = WATER.M
    p1, p2 = water.at_TP(293.15, 101325.0), water.at_TP(313.15, 101325.0)
    dh = CP.PropsSI("H", "T", 313.15, "P", 101325.0, "HEOS::Water") - CP.PropsSI("H", "T", 293.15, "P", 101325.0, "HEOS::Water")
    du = CP.PropsSI("U", "T", 313.15, "P", 101325.0, "HEOS::Water") - CP.PropsSI("U", "T", 293.15, "P", 101325.0, "HEOS::Water")
    assert (p2.h - p1.h) / M == pytest.approx(dh, rel=1e-3)
    assert (p2.u - p1.u) / M == pytest.approx(du, rel=1e-3)
    # and the data's density is CoolProp's at 25 °C, 1 atm (CoolProp 8.0 HEOS)
    assert WATER.M / water.at_TP(298.15, 101325.0).v == pytest.approx(
        CP.PropsSI("D", "T", 298.15, "P", 101325.0, "HEOS::Water"), rel=1e-12)


def test_steel_wall_heat_for_a_10_K_rise():
    # 100 kg of steel, cp = 490 J/(kg K), heated by 10 K takes Q = m cp ΔT = 490 kJ
    m = Incompressible(steel(), rho=7850.0, cp=490.0)
    n = 100.0 / steel().M
    p1, p2 = m.at_TP(300.0, 1e5), m.at_TP(310.0, 1e5)
    assert n * (p2.u - p1.u) == pytest.approx(490e3, rel=1e-12)
    assert n * p1.v == pytest.approx(100.0 / 7850.0, rel=1e-12)  # the wall's volume [m3]
    assert "490 J/(kg K)" in " ".join(m.equations())


def test_rho_override_from_make_model():
    m = make_model("incompressible", WATER, {"rho": 1000.0})
    assert m.at_TP(300.0, 1e5).v == pytest.approx(WATER.M / 1000.0, rel=1e-15)
    assert "worksheet override" in " ".join(m.equations())


# -- pairs ------------------------------------------------------------------------------
def test_pairs_that_fix_T_and_P_round_trip(water):
    base = water.at_TP(320.0, 5e5)
    for pair in [("T", "P"), ("P", "u"), ("P", "h"), ("P", "s"), ("T", "h"), ("u", "h"), ("h", "s")]:
        q = water.flash({k: base.get(k) for k in pair})
        assert q.T == pytest.approx(320.0, rel=1e-12), pair
        assert q.P == pytest.approx(5e5, rel=1e-8), pair  # P from h - u: rounding of u (1e4 J/mol)


def test_pairs_with_v_leave_P_open(water):
    base = water.at_TP(320.0, 5e5)
    for pair in [("T", "v"), ("v", "u"), ("v", "s")]:
        q = water.flash({k: base.get(k) for k in pair})
        assert q.T == pytest.approx(320.0, rel=1e-12), pair
        assert math.isnan(q.P) and math.isnan(q.h) and q.u == pytest.approx(base.u, rel=1e-12)
        assert any("P is not fixed" in w for w in water.warnings(q))
    assert water.at_Tv(320.0, base.v).u == base.u


@pytest.mark.parametrize("pair, words", [
    (("T", "u"), "both fix only the temperature"),
    (("T", "s"), "both fix only the temperature"),
    (("u", "s"), "both fix only the temperature"),
    (("P", "v"), "v and P do not fix"),
    (("v", "h"), "v and h do not fix"),
])
def test_pairs_that_cannot_fix_a_state(water, pair, words):
    base = water.at_TP(320.0, 5e5)
    with pytest.raises(InputError, match=words) as err:
        water.flash({k: base.get(k) for k in pair}, field="final")
    assert err.value.field == "final"


def test_v_must_be_the_fixed_volume(water):
    v0 = WATER.M / WATER.liquid.rho
    with pytest.raises(InputError) as err:
        water.at_Tv(300.0, v0 * 1.001)
    assert err.value.field == "state.v"
    assert "fixed by T (and P)" in str(err.value) and "+0.1 %" in str(err.value)
    water.at_Tv(300.0, v0 * (1 + 1e-12))  # within the 1e-9 tolerance: accepted


def test_bad_values(water):
    with pytest.raises(InputError) as err:
        water.flash({"T": 300.0, "x": 0.5})
    assert err.value.field == "state.x" and "two phases" in str(err.value)
    with pytest.raises(InputError) as err:
        water.flash({"T": -1.0, "P": 1e5})
    assert err.value.field == "state.T"
    with pytest.raises(InputError) as err:  # u below -cp T_ref would need T < 0 K
        water.flash({"P": 1e5, "u": -1e6})
    assert err.value.field == "state.u" and "would need T" in str(err.value)
    with pytest.raises(InputError) as err:  # h below u(T) would need P < 0
        water.flash({"T": 300.0, "h": 0.0})
    assert err.value.field == "state.h" and "would need P" in str(err.value)
    with pytest.raises(InputError) as err:
        water.flash({"P": 1e5, "h": -1e6})
    assert err.value.field == "state.h"
    with pytest.raises(InputError, match="exactly two"):
        water.flash({"T": 300.0})


# -- where the constants come from ---------------------------------------------------
def test_missing_density_and_cp_name_the_field():
    with pytest.raises(InputError) as err:
        Incompressible(steel())
    assert err.value.field == "fluid.overrides.rho"
    with pytest.raises(InputError) as err:
        Incompressible(steel(), rho=7850.0)
    assert err.value.field == "fluid.overrides.cp"
    with pytest.raises(InputError) as err:
        make_model("incompressible", lookup("N2"))  # a gas: no liquid data
    assert err.value.field == "fluid.overrides.rho"
    with pytest.raises(InputError) as err:
        Incompressible(steel(), rho=-1.0, cp=490.0)
    assert err.value.field == "fluid.overrides.rho" and "positive" in str(err.value)


def test_ideal_gas_cp_override_is_not_taken_as_the_liquid_cp():
    # A worksheet's cp override sets the ideal-gas cp (species.with_overrides);
    # the incompressible model refuses it rather than ignore it silently.
    sp, _ = with_overrides(WATER, {"cp": "4.2 kJ/(kg K)"})
    with pytest.raises(InputError) as err:
        make_model("incompressible", sp)
    assert err.value.field == "fluid.overrides.cp" and "ideal-gas heat capacity" in str(err.value)
    # given to the model as its own parameter, a liquid cp is used
    m = Incompressible(sp, cp=4200.0)
    assert m.at_TP(300.0, 1e5).cp == pytest.approx(4200.0 * WATER.M, rel=1e-15)


def test_warnings_far_from_the_data_temperature(water):
    assert water.warnings(water.at_TP(300.0, 1e5)) == []
    assert any("from 298.15 K" in w for w in water.warnings(water.at_TP(400.0, 1e6)))
    assert any("critical temperature" in w for w in water.warnings(water.at_TP(700.0, 1e6)))
    assert water.reference_state.startswith("u = 0 and s = 0 at 298.15 K")


def test_species_data_without_liquid_uses_overrides_only():
    sp = dataclasses.replace(WATER, liquid=None)
    m = Incompressible(sp, rho=1000.0, cp=4180.0)
    assert m.warnings(m.at_TP(500.0, 1e5)) == []  # no data temperature to be far from
