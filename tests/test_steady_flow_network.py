"""A network of devices solved by propagation, against CoolProp HEOS computed in the test.

Sources: "CoolProp 8.0 HEOS" (PropsSI, molar or per-kg flashes, the devices' published
definitions applied by hand, stream by stream); "common practice, no source" for a mixer's
outlet at its lowest inlet pressure and a heater without a pressure drop given having none.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import pytest

from balance.balances.steady_flow.network import DeviceSpec, Network, StreamSpec
from balance.errors import SolveError, SpecificationError
from balance.models import make_model
from balance.species import lookup


@pytest.fixture(scope="module")
def n2():
    return make_model("reference", lookup("N2"))


@pytest.fixture(scope="module")
def water():
    return make_model("reference", lookup("H2O"))


def S(model, name, n=None, **given):
    return StreamSpec(name, model, given, n)


def test_a_compression_train_with_an_intercooler(n2):
    net = Network([S(n2, "a", 50.0, T=300.0, P=1e5), S(n2, "b", P=4e5), S(n2, "c", T=305.0),
                   S(n2, "d", P=15e5)],
                  [DeviceSpec("K-1", "compressor", ("a",), ("b",), W_dot=None, eta=0.8),
                   DeviceSpec("E-1", "cooler", ("b",), ("c",), Q_dot=None),
                   DeviceSpec("K-2", "compressor", ("c",), ("d",), W_dot=None, eta=0.8)])
    sol = net.solve()
    # CoolProp 8.0 HEOS, stage by stage (molar): h2 = h1 + (h(P2, s1) - h1)/eta
    f = "Nitrogen"
    h1, s1 = (CP.PropsSI(k, "T", 300.0, "P", 1e5, f) for k in ("Hmolar", "Smolar"))
    h2 = h1 + (CP.PropsSI("Hmolar", "P", 4e5, "Smolar", s1, f) - h1) / 0.8
    h3, s3 = (CP.PropsSI(k, "T", 305.0, "P", 4e5, f) for k in ("Hmolar", "Smolar"))
    h4 = h3 + (CP.PropsSI("Hmolar", "P", 15e5, "Smolar", s3, f) - h3) / 0.8
    assert sol.W_dot["K-1"] == pytest.approx(50.0 * (h2 - h1), rel=1e-8)
    assert sol.Q_dot["E-1"] == pytest.approx(50.0 * (h3 - h2), rel=1e-8)
    assert sol.W_dot["K-2"] == pytest.approx(50.0 * (h4 - h3), rel=1e-8)
    assert sol.flows["d"].point.T == pytest.approx(CP.PropsSI("T", "P", 15e5, "Hmolar", h4, f), rel=1e-8)
    assert all(b.S_gen_dot is None or b.S_gen_dot > 0 for b in sol.balances.values())


def test_a_feedwater_heater_finds_the_steam_rate_that_heats_the_water(water):
    """Steam at 10 bar, 250 °C mixed into 5 kg/s of water at 40 °C, 10 bar, to leave at 120 °C."""
    M = water.species.M
    net = Network([S(water, "steam", None, T=523.15, P=10e5), S(water, "water", 5.0 / M, T=313.15, P=10e5),
                   S(water, "out", None, T=393.15, P=10e5)],
                  [DeviceSpec("D-1", "mixer", ("steam", "water"), ("out",))])
    sol = net.solve()
    # CoolProp 8.0 HEOS: m_s h_s + m_w h_w = (m_s + m_w) h_out
    h_s, h_w, h_o = (CP.PropsSI("Hmass", "T", T, "P", 10e5, "Water") for T in (523.15, 313.15, 393.15))
    m_s = 5.0 * (h_o - h_w) / (h_s - h_o)
    assert sol.flows["steam"].m_dot == pytest.approx(m_s, rel=1e-8)
    assert sol.flows["out"].m_dot == pytest.approx(5.0 + m_s, rel=1e-12)


def test_an_exchanger_gives_the_other_outlet_and_its_approach(water, n2):
    """Nitrogen cooled from 400 K to 320 K by water at 20 °C: the water's outlet and the minimum approach."""
    net = Network([S(n2, "gas", 10.0, T=400.0, P=5e5), S(n2, "gas out", None, T=320.0),
                   S(water, "cw", 20.0, T=293.15, P=3e5), S(water, "cw out")],
                  [DeviceSpec("E-3", "exchanger", ("gas", "cw"), ("gas out", "cw out"))])
    sol = net.solve()
    f = "Nitrogen"
    Q = 10.0 * (CP.PropsSI("Hmolar", "T", 400.0, "P", 5e5, f) - CP.PropsSI("Hmolar", "T", 320.0, "P", 5e5, f))
    h_cw = CP.PropsSI("Hmolar", "T", 293.15, "P", 3e5, "Water") + Q / 20.0
    assert sol.flows["cw out"].point.T == pytest.approx(CP.PropsSI("T", "P", 3e5, "Hmolar", h_cw, "Water"), rel=1e-8)
    assert 0 < sol.approach["E-3"].minimum <= 320.0 - 293.15 + 1e-9


def test_a_temperature_cross_is_refused(water, n2):
    """Too little water: it would leave hotter (and boiled) than the gas that heats it enters."""
    net = Network([S(n2, "gas", 10.0, T=400.0, P=5e5), S(n2, "gas out", None, T=300.0),
                   S(water, "cw", 0.2, T=293.15, P=3e5), S(water, "cw out")],
                  [DeviceSpec("E-3", "exchanger", ("gas", "cw"), ("gas out", "cw out"))])
    with pytest.raises(SolveError, match="cross"):
        net.solve()


def test_what_is_missing_is_said_per_device(n2):
    net = Network([S(n2, "a", 1.0, T=300.0, P=1e5), S(n2, "b", P=5e5)],
                  [DeviceSpec("K-1", "compressor", ("a",), ("b",), W_dot=None, eta=None)])
    with pytest.raises(SpecificationError) as err:
        net.solve()
    assert str(err.value) == "compressor K-1: give one of the efficiency eta, the power W, a second property of 'b' (T, h ...)"


def test_no_rate_anywhere_is_a_balance_per_kilogram(n2):
    net = Network([S(n2, "a", None, T=300.0, P=60e5), S(n2, "b", None, P=5e5)],
                  [DeviceSpec("V-1", "valve", ("a",), ("b",))])
    sol = net.solve()
    assert sol.flows["a"].m_dot == pytest.approx(1.0) and "per 1 kg/s of stream 'a'" in sol.basis
