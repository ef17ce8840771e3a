"""The model-adequacy advice and the diagram paths, from the domain directly.

The thresholds are the product's own rules (common practice, no source):
Pr < 0.1 or (Tr > 2.5 and |Z - 1| < 1 %) lets the ideal gas through; a wet
state needs a model with two phases.
"""

from __future__ import annotations

import pytest

from balance import api
from balance.adequacy import advise
from balance.diagrams import trace
from tests.helpers import WET_WATER_PR, sample, sheet


def fluid(model: str, T: str, P: str, species: str = "N2"):
    return sheet(f"""
[fluid]
species = "{species}"
model = "{model}"
[[initial]]
T = "{T}"
P = "{P}"
n = "1 mol"
""")


def test_ideal_gas_refused_at_high_reduced_pressure():
    advice = advise(fluid("ideal-gas", "300 K", "150 bar"))
    assert not advice.adequate
    assert "Peng-Robinson" in advice.recommendation
    hint = advice.states[0]
    assert hint.Pr == pytest.approx(150e5 / 33.958e5, rel=1e-3)  # Pc of N2, 33.958 bar (CoolProp 8.0)
    assert hint.Z_real is not None and hint.Z_real != 1.0


def test_ideal_gas_fine_at_low_pressure():
    assert advise(fluid("ideal-gas", "300 K", "1 bar")).adequate


def test_wet_state_with_a_cubic_points_to_the_reference_model():
    ws = sheet(WET_WATER_PR)
    advice = advise(ws)
    assert not advice.adequate and "reference model" in advice.recommendation


def test_rigid_path_keeps_the_volume():
    r = api.solve(sample("co2-cylinder-hot-store.toml"))
    t = trace(r)
    path = [c for c in t.curves if c.style == "path"][0]
    v0 = r.initial[0].point.v
    assert all(v == pytest.approx(v0, rel=1e-9) for v in path.v)
    assert any(c.style == "dome" for c in t.curves)  # the reference model has two phases


def test_free_expansion_is_drawn_as_a_jump():
    t = trace(api.solve(sample("n2-buffer-into-receiver.toml")))
    assert [c.style for c in t.curves if c.style != "dome"] == ["jump"]
    assert "no quasi-static path" in t.note


@pytest.mark.parametrize("sample_name", ["methane-piston-isothermal.toml", "n2-buffer-into-receiver.toml"])
def test_a_cubic_model_draws_its_own_saturation_dome(sample_name):
    """The dome of a cubic is its own saturation (Cubic.saturation): at each of its
    temperatures the liquid and the vapour it joins are at one pressure and one Gibbs
    energy g = h - T s (phase equilibrium of a pure fluid: common practice, no source)."""
    r = api.solve(sample(sample_name))
    model = r.problem.model
    dome = [c for c in trace(r).curves if c.style == "dome"]
    assert len(dome) == 1 and len(dome[0].T) >= 2 * 20
    curve = dome[0]
    half = len(curve.T) // 2
    for i in range(half):
        j = len(curve.T) - 1 - i  # the vapour side runs back down
        T = curve.T[i]
        assert curve.T[j] == pytest.approx(T, rel=1e-12) and T < model.Tc_eos
        assert curve.P[j] == pytest.approx(curve.P[i], rel=1e-6)
        assert curve.v[j] > curve.v[i]  # vapour right of liquid
        liquid, vapour = model.at_Tv(T, curve.v[i]), model.at_Tv(T, curve.v[j])
        g_l, g_v = liquid.h - T * liquid.s, vapour.h - T * vapour.s
        assert g_v == pytest.approx(g_l, abs=1e-6 * abs(liquid.h - vapour.h))


def test_a_model_without_saturation_draws_no_dome():
    t = trace(api.solve(sample("air-test-cylinder-reversible.toml")))  # the ideal gas
    assert [c.style for c in t.curves] == ["path"]
