"""Each kind of steady-flow device against an outside source.

Sources:
* "CoolProp 8.0 HEOS": the reference equation of state called directly in the test (HmassP and
  PSmass flashes), the device's published definition applied by hand;
* "closed form": an ideal gas with constant cp (common practice, no source beyond the ideal-gas
  law): isentropic T2s = T1 (P2/P1)^(R/cp); polytropic compression T2 = T1 (P2/P1)^(R/(cp η_p));
  adiabatic mixing T = Σ n cp T_i / Σ n cp; nozzle V2 = sqrt(2 cp (T1 - T2s)/M) from rest;
* "iapws 1.5 IAPWS95": steam states for a turbine's exit quality, independent of CoolProp.
"""

from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import pytest

from balance.balances.steady_flow import devices as dv
from balance.balances.steady_flow.streams import Flow
from balance.errors import InputError
from balance.models import make_model
from balance.species import lookup, with_overrides
from balance.units import R


def flow(model, name="in", n_dot=10.0, **specs) -> Flow:
    return Flow(name, model, model.flash(specs), n_dot)


def closes(b: dv.Balance) -> None:
    assert abs(b.mass) <= 1e-12 and abs(b.energy) <= 1e-9
    assert b.S_gen_dot is None or b.S_gen_dot >= -1e-9


@pytest.fixture(scope="module")
def n2_ref():
    return make_model("reference", lookup("N2"))


@pytest.fixture(scope="module")
def water():
    return make_model("reference", lookup("H2O"))


def test_a_valve_keeps_h_as_coolprop_finds_the_outlet(n2_ref):
    inlet = flow(n2_ref, T=300.0, P=100e5)
    out = dv.throttle(inlet, 10e5, "out")
    # CoolProp 8.0 HEOS: the state at 10 bar with the inlet's enthalpy
    h = CP.PropsSI("Hmass", "T", 300.0, "P", 100e5, "Nitrogen")
    assert out.point.T == pytest.approx(CP.PropsSI("T", "P", 10e5, "Hmass", h, "Nitrogen"), rel=1e-9)
    assert out.point.T < 300.0  # nitrogen cools on throttling at room temperature (Joule-Thomson)
    closes(dv.balance_of([inlet], [out], 0.0, 0.0, None))


@pytest.mark.parametrize("eta", (1.0, 0.78))
def test_a_compressor_by_the_published_isentropic_efficiency(n2_ref, eta):
    inlet = flow(n2_ref, T=300.0, P=1e5)
    m = dv.machine(inlet, 8e5, "out", compresses=True, eta=eta)
    # CoolProp 8.0 HEOS: h2s at (P2, s1), h2 = h1 + (h2s - h1)/eta
    h1 = CP.PropsSI("Hmass", "T", 300.0, "P", 1e5, "Nitrogen")
    s1 = CP.PropsSI("Smass", "T", 300.0, "P", 1e5, "Nitrogen")
    h2s = CP.PropsSI("Hmass", "P", 8e5, "Smass", s1, "Nitrogen")
    T2 = CP.PropsSI("T", "P", 8e5, "Hmass", h1 + (h2s - h1) / eta, "Nitrogen")
    assert m.out.point.T == pytest.approx(T2, rel=1e-8)
    assert m.W_dot == pytest.approx(inlet.m_dot * (h2s - h1) / eta, rel=1e-8)
    assert m.eta == pytest.approx(eta, rel=1e-12)
    closes(dv.balance_of([inlet], [m.out], 0.0, m.W_dot, None))


def test_an_outlet_state_gives_the_efficiency_back(n2_ref):
    inlet = flow(n2_ref, T=300.0, P=1e5)
    forward = dv.machine(inlet, 8e5, "out", compresses=True, eta=0.8)
    back = dv.machine(inlet, 8e5, "out", compresses=True, point=forward.out.point)
    assert back.eta == pytest.approx(0.8, rel=1e-9)


def _constant_cp_air():
    """Nitrogen as an ideal gas with cp = 29.1 J/(mol K) (a constant, as a checker's hand calculation)."""
    species, params = with_overrides(lookup("N2"), {"cp": "29.1 J/(mol K)"})
    return make_model("ideal-gas", species, params), 29.1


def test_isentropic_and_polytropic_compression_of_an_ideal_gas_with_constant_cp():
    model, cp = _constant_cp_air()
    inlet = flow(model, T=300.0, P=1e5)
    m = dv.machine(inlet, 10e5, "out", compresses=True, eta=1.0)
    assert m.out.point.T == pytest.approx(300.0 * 10 ** (R / cp), rel=1e-12)  # closed form
    poly = dv.machine(inlet, 10e5, "out", compresses=True, eta=0.85, polytropic=True)
    # closed form for an ideal gas: T2 = T1 (P2/P1)^(R/(cp η_p))
    assert poly.out.point.T == pytest.approx(300.0 * 10 ** (R / (cp * 0.85)), rel=1e-9)
    assert poly.eta_isentropic < 0.85  # the isentropic efficiency of a whole machine is lower


def test_adiabatic_mixing_of_an_ideal_gas_with_constant_cp():
    model, cp = _constant_cp_air()
    hot, cold = flow(model, "hot", 3.0, T=500.0, P=2e5), flow(model, "cold", 1.0, T=300.0, P=2e5)
    out = dv.mix([hot, cold], 2e5, "out")
    assert out.point.T == pytest.approx((3 * 500 + 1 * 300) / 4, rel=1e-12)  # closed form
    closes(dv.balance_of([hot, cold], [out], 0.0, 0.0, None))
    assert dv.balance_of([hot, cold], [out], 0.0, 0.0, None).S_gen_dot > 0  # mixing generates entropy


def test_a_nozzle_from_rest_by_the_closed_form():
    model, cp = _constant_cp_air()
    inlet = flow(model, T=400.0, P=3e5)
    out = dv.nozzle(inlet, 1e5, "jet")
    T2s = 400.0 * (1 / 3) ** (R / cp)
    assert out.point.T == pytest.approx(T2s, rel=1e-12)
    assert out.velocity == pytest.approx(math.sqrt(2 * cp * (400.0 - T2s) / inlet.M), rel=1e-10)  # closed form
    closes(dv.balance_of([inlet], [out], 0.0, 0.0, None))


def test_a_steam_turbine_exit_quality_against_iapws(water):
    from iapws import IAPWS95

    inlet = flow(water, T=673.15, P=40e5)  # 40 bar, 400 °C
    m = dv.machine(inlet, 0.5e5, "exhaust", compresses=False, eta=0.82)
    # iapws 1.5 IAPWS95 (kJ/kg, MPa): h2 = h1 - eta (h1 - h2s), the exit quality at 0.05 MPa
    one = IAPWS95(T=673.15, P=4.0)
    h2s = IAPWS95(P=0.05, s=one.s).h
    h2 = one.h - 0.82 * (one.h - h2s)
    exit_ = IAPWS95(P=0.05, h=h2)
    assert m.out.point.x == pytest.approx(exit_.x, abs=1e-7)
    assert m.W_dot == pytest.approx(-inlet.m_dot * (one.h - h2) * 1e3, rel=1e-7)


def test_a_heater_duty_against_coolprop(water):
    inlet = flow(water, T=300.0, P=5e5)
    out, Q = dv.exchange(inlet, 4.8e5, "out", point=water.flash({"T": 420.0, "P": 4.8e5}))
    # CoolProp 8.0 HEOS: Q = m (h2 - h1)
    dh = CP.PropsSI("Hmass", "T", 420.0, "P", 4.8e5, "Water") - CP.PropsSI("Hmass", "T", 300.0, "P", 5e5, "Water")
    assert Q == pytest.approx(inlet.m_dot * dh, rel=1e-9)
    again, Q2 = dv.exchange(inlet, 4.8e5, "out", Q_dot=Q)
    assert again.point.T == pytest.approx(420.0, rel=1e-9) and Q2 == pytest.approx(Q, rel=1e-12)


def test_a_flash_drum_splits_by_the_quality(water):
    condensate = flow(water, "condensate", 2.0, T=453.15, P=12e5)  # liquid at 180 °C, 12 bar
    liquid, vapour = dv.separate(condensate, ("drain", "flash steam"), P=2e5)
    h = CP.PropsSI("Hmolar", "T", 453.15, "P", 12e5, "Water")  # CoolProp 8.0 HEOS
    x = CP.PropsSI("Q", "P", 2e5, "Hmolar", h, "Water")
    assert vapour.n_dot == pytest.approx(2.0 * x, rel=1e-8) and liquid.n_dot == pytest.approx(2.0 * (1 - x), rel=1e-8)
    closes(dv.balance_of([condensate], [liquid, vapour], 0.0, 0.0, None))


def test_an_exchanger_finds_a_pinch_inside_a_condensing_side(water):
    """Steam condensing at 1.5 bar (111.4 °C, CoolProp 8.0 HEOS) against water heated from 20 to 105 °C:
    the ends differ by 30 K and more, but the pinch sits where the steam starts to condense."""
    steam_in = flow(water, "steam", 1.0, T=423.15, P=1.5e5)
    steam_out = Flow("condensate", water, water.flash({"P": 1.5e5, "x": 0.0}), 1.0)
    Q = steam_in.n_dot * (steam_in.point.h - steam_out.point.h)
    cold_in = flow(water, "cw", 1.0, T=293.15, P=3e5)
    h_out = cold_in.point.h + Q / 8.0
    cold_in = cold_in.with_(n_dot=8.0)
    cold_out = Flow("cw out", water, water.flash({"P": 3e5, "h": h_out}), 8.0)
    ap = dv.approach(steam_in, steam_out, cold_in, cold_out)
    T_sat = CP.PropsSI("T", "P", 1.5e5, "Q", 0, "Water")
    assert ap.minimum < min(steam_in.point.T - cold_out.point.T, steam_out.point.T - cold_in.point.T)
    assert 0 < ap.where < 1
    closes(dv.balance_of([steam_in, cold_in], [steam_out, cold_out], 0.0, 0.0, None))
    assert T_sat > cold_out.point.T


def test_a_machine_the_wrong_way_is_refused_naming_the_pressure(n2_ref):
    with pytest.raises(InputError) as err:
        dv.machine(flow(n2_ref, T=300.0, P=10e5), 1e5, "out", compresses=True, eta=0.8, field="device 'K-1'")
    assert err.value.field == "device 'K-1'.P_out" and "raises the pressure" in str(err.value)
