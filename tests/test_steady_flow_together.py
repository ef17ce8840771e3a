"""Devices solved together where propagation stalls, against CoolProp HEOS computed in the test.

Sources: "CoolProp 8.0 HEOS" (PropsSI molar flashes; each device's mass and energy balance
written out by hand and the loop solved with scipy.optimize.root, or in closed form);
"common practice, no source" for a heater or an exchanger side without a pressure drop
given having none, and a splitter's outlets in its inlet's state.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import pytest
from scipy.optimize import root

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


def feed_effluent(n2, effluent_T: float | None):
    """20 mol/s of nitrogen at 300 K, 10 bar preheated in E-1 by the gas it becomes: H-1 adds 60 kW, a
    fifth of the hot gas bypasses E-1 (S-1), the rest leaves E-1 as the effluent (at ``effluent_T``)."""
    effluent = S(n2, "effluent") if effluent_T is None else S(n2, "effluent", T=effluent_T)
    return Network([S(n2, "feed", 20.0, T=300.0, P=10e5), S(n2, "preheated"), S(n2, "hot"), S(n2, "to E-1"),
                    S(n2, "bypass"), effluent],
                   [DeviceSpec("E-1", "exchanger", ("to E-1", "feed"), ("effluent", "preheated")),
                    DeviceSpec("H-1", "heater", ("preheated",), ("hot",), Q_dot=60e3),
                    DeviceSpec("S-1", "splitter", ("hot",), ("to E-1", "bypass"), fractions=(0.8, 0.2))])


def test_a_feed_effluent_loop_is_solved_together(n2):
    """Propagation stalls here (E-1 waits for its hot inlet, H-1 for its inlet, which E-1 makes): the
    tear closes the loop. Without the tear this worksheet raised SpecificationError."""
    sol = feed_effluent(n2, 360.0).solve()
    # CoolProp 8.0 HEOS by hand: H-1  n (h_hot - h_pre) = Q;  E-1  n (h_pre - h_feed) = 0.8 n (h_hot - h_eff)
    f, n, Q, P = "Nitrogen", 20.0, 60e3, 10e5
    h_feed = CP.PropsSI("Hmolar", "T", 300.0, "P", P, f)
    h_eff = CP.PropsSI("Hmolar", "T", 360.0, "P", P, f)

    def h(T):
        return CP.PropsSI("Hmolar", "T", T, "P", P, f)

    def residual(T):  # in the two inner temperatures [K]
        h_pre, h_hot = h(T[0]), h(T[1])
        return [(n * (h_hot - h_pre) - Q) / Q, (n * (h_pre - h_feed) - 0.8 * n * (h_hot - h_eff)) / Q]

    hand = root(residual, [400.0, 500.0], method="hybr", tol=1e-13)
    assert max(abs(r) for r in residual(hand.x)) < 1e-11
    T_pre, T_hot = hand.x
    assert sol.flows["preheated"].point.T == pytest.approx(T_pre, rel=1e-8)
    assert sol.flows["hot"].point.T == pytest.approx(T_hot, rel=1e-8)
    assert sol.flows["bypass"].point.T == pytest.approx(T_hot, rel=1e-8)
    assert sol.flows["to E-1"].n_dot == pytest.approx(16.0, rel=1e-12)
    assert sol.Q_dot["H-1"] == pytest.approx(Q, rel=1e-9)
    # the checks every result passes: balances closed, no entropy destroyed, no cross, the approach
    for b in sol.balances.values():
        assert abs(b.mass) <= 1e-9 and abs(b.energy) <= 1e-9
    assert sol.balances["E-1"].S_gen_dot > 0
    assert 0 < sol.approach["E-1"].minimum <= 360.0 - 300.0 + 1e-9
    assert any("solved together" in note for note in sol.notes)


def test_two_devices_fixed_only_by_their_balances_together(water):
    """A heater of given duty on a makeup line whose rate is unknown, mixed with 2 kg/s of hot water to a
    given outlet temperature: neither device alone fixes the rate (this raised SpecificationError before
    the devices were solved together)."""
    M = water.species.M
    P, Q = 3e5, 200e3
    net = Network([S(water, "makeup", None, T=288.15, P=P), S(water, "warmed"),
                   S(water, "return", 2.0 / M, T=353.15, P=P), S(water, "header", None, T=333.15, P=P)],
                  [DeviceSpec("H-2", "heater", ("makeup",), ("warmed",), Q_dot=Q),
                   DeviceSpec("M-1", "mixer", ("warmed", "return"), ("header",))])
    sol = net.solve()
    # CoolProp 8.0 HEOS, closed form: n_a (h_w - h_a) = Q and n_a h_w + n_r h_r = (n_a + n_r) h_o give
    # n_a = (Q + n_r (h_r - h_o)) / (h_o - h_a)
    f = "Water"
    h_a, h_r, h_o = (CP.PropsSI("Hmolar", "T", T, "P", P, f) for T in (288.15, 353.15, 333.15))
    n_r = 2.0 / M
    n_a = (Q + n_r * (h_r - h_o)) / (h_o - h_a)
    h_w = h_a + Q / n_a
    assert sol.flows["makeup"].n_dot == pytest.approx(n_a, rel=1e-8)
    assert sol.flows["header"].n_dot == pytest.approx(n_a + n_r, rel=1e-8)
    assert sol.flows["warmed"].point.T == pytest.approx(CP.PropsSI("T", "P", P, "Hmolar", h_w, f), rel=1e-8)
    for b in sol.balances.values():
        assert abs(b.mass) <= 1e-9 and abs(b.energy) <= 1e-9
        assert b.S_gen_dot is None or b.S_gen_dot >= 0


def test_an_under_specified_loop_still_says_what_is_missing_per_device(n2):
    """No effluent temperature: the loop has one unknown more than equations; nothing is solved together
    and the words are propagation's, per device, as before."""
    with pytest.raises(SpecificationError) as err:
        feed_effluent(n2, None).solve()
    words = str(err.value)  # propagation's own words: the exchanger waits for an outlet's second property
    assert words.startswith("exchanger E-1: give one outlet's second property") and "together" not in words


def test_a_loop_that_leaves_the_tear_free_is_not_solved(n2):
    """With no bypass the effluent's temperature is fixed by the heater's duty alone (the loop's overall
    balance), so giving it leaves the inner temperatures free: refused with the per-device words, never a
    made-up state."""
    net = Network([S(n2, "feed", 20.0, T=300.0, P=10e5), S(n2, "preheated"), S(n2, "hot"),
                   S(n2, "effluent", T=350.0)],
                  [DeviceSpec("E-1", "exchanger", ("hot", "feed"), ("effluent", "preheated")),
                   DeviceSpec("H-1", "heater", ("preheated",), ("hot",), Q_dot=60e3)])
    with pytest.raises(SpecificationError) as err:
        net.solve()
    assert "exchanger E-1:" in str(err.value)


def test_a_recycle_loop_finds_its_rate_and_state_together(n2):
    """10 mol/s of nitrogen at 300 K, 5 bar mixed with a recycle, heated by 40 kW, 40 % of it sent back:
    the recycle's rate and state are both guessed (nothing else fixes them) and closed."""
    net = Network([S(n2, "feed", 10.0, T=300.0, P=5e5), S(n2, "recycle"), S(n2, "mixed"), S(n2, "hot"),
                   S(n2, "product")],
                  [DeviceSpec("M-1", "mixer", ("feed", "recycle"), ("mixed",)),
                   DeviceSpec("H-1", "heater", ("mixed",), ("hot",), Q_dot=40e3),
                   DeviceSpec("S-1", "splitter", ("hot",), ("product", "recycle"), fractions=(0.6, 0.4))])
    sol = net.solve()
    # closed forms with CoolProp 8.0 HEOS: mass n_mixed = n_feed / 0.6; the loop's overall energy balance
    # n_feed h_feed + Q = n_product h_hot, with n_product = n_feed
    f, P = "Nitrogen", 5e5
    h_hot = CP.PropsSI("Hmolar", "T", 300.0, "P", P, f) + 40e3 / 10.0
    assert sol.flows["mixed"].n_dot == pytest.approx(10.0 / 0.6, rel=1e-9)
    assert sol.flows["recycle"].n_dot == pytest.approx(0.4 * 10.0 / 0.6, rel=1e-9)
    assert sol.flows["hot"].point.T == pytest.approx(CP.PropsSI("T", "P", P, "Hmolar", h_hot, f), rel=1e-8)
    assert sol.flows["recycle"].point.T == pytest.approx(sol.flows["hot"].point.T, rel=1e-9)
    for b in sol.balances.values():
        assert abs(b.mass) <= 1e-9 and abs(b.energy) <= 1e-9
        assert b.S_gen_dot is None or b.S_gen_dot > -1e-9  # a splitter makes none: zero to round-off (common practice, no source)


def test_a_loop_closed_together_is_still_refused_where_the_exchanger_crosses(n2):
    """An effluent asked to leave at 290 K, colder than the 300 K feed it meets at that end: the loop
    closes, but the exchanger's temperatures cross, and that is refused as for any other result (a
    counter-flow exchanger's hot outlet can be no colder than the cold inlet: common practice, no
    source)."""
    with pytest.raises(SolveError, match="E-1.*cross"):
        feed_effluent(n2, 290.0).solve()


def test_the_feed_effluent_sample_closes_its_loop_as_coolprops_pr_does():
    """samples/n2-feed-effluent-preheater.toml: 2000 kg/h of N2 at 27 °C, 9 barg; H-901 adds 60 kW;
    a fifth bypasses E-901; the effluent leaves at 87 °C. The same loop by hand on CoolProp 8.0's own
    Peng-Robinson backend (its ideal-gas part from HEOS, so within 0.2 % of our PR), scipy root."""
    from balance import api
    from tests.helpers import sample

    out = api.as_json(api.solve(sample("n2-feed-effluent-preheater.toml")))["streams"]
    pr = CP.AbstractState("PR", "Nitrogen")
    pr.specify_phase(CP.iphase_gas)  # its PT flash looks for a gas root it otherwise misses here
    P, M = 9e5 + 101325.0, 0.0280134
    n = 2000.0 / 3600.0 / M

    def h(T):
        pr.update(CP.PT_INPUTS, P, T)
        return pr.hmolar()

    h_feed, h_eff = h(300.15), h(360.15)

    def residual(T):
        h_pre, h_hot = h(T[0]), h(T[1])
        return [(n * (h_hot - h_pre) - 60e3) / 60e3, (n * (h_pre - h_feed) - 0.8 * n * (h_hot - h_eff)) / 60e3]

    T_pre, T_hot = root(residual, [450.0, 550.0], method="hybr", tol=1e-12).x
    # measured 0.16 K and 0.19 K apart: the two take their ideal-gas cp from different fits
    assert out["preheated"]["T"]["value"] == pytest.approx(T_pre, abs=0.3)
    assert out["to bed"]["T"]["value"] == pytest.approx(T_hot, abs=0.3)
    assert out["bypass"]["m_dot"]["value"] == pytest.approx(0.2 * 2000.0 / 3600.0, rel=1e-12)
