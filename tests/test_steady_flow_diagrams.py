"""Steady-flow diagrams: each device's path is made of the model's own states and keeps what its
device keeps.

Sources: the definitions of the paths (common practice, no source beyond the balances): a throttle
keeps h (adiabatic, no work, no change of speed), a heater or cooler follows its isobar (linear over a
given pressure drop), an isentropic line keeps s; the states are checked against the model itself,
recomputed at each point's (T, v); the refrigerant cycle's closure and the dome's pressures against
CoolProp 8.0 HEOS called in the test.
"""

from __future__ import annotations

import math
from pathlib import Path

import CoolProp.CoolProp as CP
import pytest

from balance import api
from balance.diagrams import FlowTrace, flow_trace
from balance.errors import InputError

TRAIN = '''
[worksheet]
title = "Nitrogen booster and letdown (invented rig)"
[fluid]
species = "N2"
model = "peng-robinson"
[system]
kind = "steady-flow"
[[stream]]
name = "a"
T = "290 K"
P = "2 bar"
rate = "0.4 kg/s"
[[stream]]
name = "b"
P = "7 bar"
[[stream]]
name = "c"
T = "300 K"
[[stream]]
name = "d"
P = "24 bar"
[[stream]]
name = "e"
T = "305 K"
P = "23 bar"
[[stream]]
name = "f"
P = "9 bar"
[[stream]]
name = "g"
T = "380 K"
[[stream]]
name = "h"
P = "3 bar"
[[stream]]
name = "side"
T = "330 K"
P = "3.5 bar"
rate = "0.1 kg/s"
[[stream]]
name = "mixed"
[[stream]]
name = "out 1"
[[stream]]
name = "out 2"
[[device]]
name = "K-1"
kind = "compressor"
inlets = ["a"]
outlets = ["b"]
eta = "0.8"
W = "?"
[[device]]
name = "E-1"
kind = "cooler"
inlets = ["b"]
outlets = ["c"]
Q = "?"
[[device]]
name = "K-2"
kind = "compressor"
inlets = ["c"]
outlets = ["d"]
eta_poly = "0.82"
W = "?"
[[device]]
name = "E-2"
kind = "cooler"
inlets = ["d"]
outlets = ["e"]
Q = "?"
[[device]]
name = "PCV-1"
kind = "valve"
inlets = ["e"]
outlets = ["f"]
[[device]]
name = "H-1"
kind = "heater"
inlets = ["f"]
outlets = ["g"]
Q = "?"
dP = "0.4 bar"
[[device]]
name = "X-1"
kind = "expander"
inlets = ["g"]
outlets = ["h"]
eta = "0.8"
W = "?"
[[device]]
name = "M-1"
kind = "mixer"
inlets = ["h", "side"]
outlets = ["mixed"]
[[device]]
name = "S-1"
kind = "splitter"
inlets = ["mixed"]
outlets = ["out 1", "out 2"]
fractions = ["0.3", "0.7"]
'''

CYCLE = '''
[worksheet]
title = "Chiller loop (invented rig)"
[fluid]
species = "R134a"
model = "reference"
[system]
kind = "steady-flow"
[[stream]]
name = "suction"
P = "2 bar"
x = "1"
rate = "0.1 kg/s"
[[stream]]
name = "discharge"
P = "10 bar"
[[stream]]
name = "liquid"
P = "10 bar"
x = "0"
[[stream]]
name = "wet"
P = "2 bar"
[[device]]
name = "K-1"
kind = "compressor"
inlets = ["suction"]
outlets = ["discharge"]
eta = "0.75"
W = "?"
[[device]]
name = "E-1"
kind = "cooler"
inlets = ["discharge"]
outlets = ["liquid"]
Q = "?"
[[device]]
name = "V-1"
kind = "valve"
inlets = ["liquid"]
outlets = ["wet"]
[[device]]
name = "E-2"
kind = "heater"
inlets = ["wet"]
outlets = ["suction"]
Q = "?"
'''


@pytest.fixture(scope="module")
def train():
    return api.solve(api.read(TRAIN))


@pytest.fixture(scope="module")
def cycle():
    return api.solve(api.read(CYCLE))


def model_of(result, species):
    return next(f.model for f in result.flows.values() if f.model.species.id == species)


def curves(t: FlowTrace, style: str):
    return [c for c in t.curves if c.style == style]


@pytest.mark.parametrize("which", ["train", "cycle"])
def test_every_point_of_every_path_is_a_state_of_the_model(which, request):
    result = request.getfixturevalue(which)
    t = flow_trace(result, "T-s")
    assert not t.problems
    for c in t.curves:
        model = model_of(result, c.species)
        for T, P, v, h, s in zip(c.T, c.P, c.v, c.h, c.s):
            again = model.at_Tv(T, v)  # recomputed by the model at the point's (T, v)
            assert again.P == pytest.approx(P, rel=1e-8), c.label
            assert again.h == pytest.approx(h, rel=1e-8, abs=1e-6), c.label
            assert again.s == pytest.approx(s, rel=1e-8, abs=1e-9), c.label


def test_each_device_kind_has_its_path(train):
    t = flow_trace(train, "h-s")
    by_device = {}
    for c in t.curves:
        by_device.setdefault(c.device, set()).add(c.style)
    assert by_device["K-1"] == by_device["K-2"] == by_device["X-1"] == {"isentropic", "jump"}
    assert by_device["E-1"] == by_device["E-2"] == by_device["H-1"] == {"isobar"}
    assert by_device["PCV-1"] == {"isenthalpic"}
    assert by_device["M-1"] == by_device["S-1"] == {"points"}
    assert len([c for c in t.curves if c.device == "M-1"]) == 3  # two inlets, one outlet
    assert by_device[""] == {"dome"}  # Peng-Robinson's own saturation curve


def test_an_isentropic_line_keeps_the_inlet_entropy_and_ends_at_the_outlet_pressure(train):
    t = flow_trace(train, "T-s")
    flows = train.flows
    for c in curves(t, "isentropic"):
        dev = next(d for d in train.devices if d.name == c.device)
        a, b = flows[dev.inlets[0]].point, flows[dev.outlets[0]].point
        assert len(c.s) == 40
        assert max(abs(s - a.s) for s in c.s) <= 1e-9 * max(abs(a.s), 8.314462618)
        assert c.P[0] == a.P and c.P[-1] == pytest.approx(b.P, rel=1e-12)
        assert c.T[-1] == pytest.approx(dev.isentropic_T, rel=1e-9)  # the result's own isentropic end
    for c in curves(t, "jump"):
        dev = next(d for d in train.devices if d.name == c.device)
        assert (c.T[0], c.T[-1]) == (flows[dev.inlets[0]].point.T, flows[dev.outlets[0]].point.T)


def test_a_valve_path_keeps_h_and_a_heater_path_its_isobar(train):
    t = flow_trace(train, "P-h")
    flows = train.flows
    (valve,) = curves(t, "isenthalpic")
    h_in = flows["e"].point.h
    assert max(abs(h - h_in) for h in valve.h) <= 1e-9 * abs(h_in)
    assert valve.P[0] == flows["e"].point.P and valve.P[-1] == flows["f"].point.P
    assert all(p1 > p2 for p1, p2 in zip(valve.P, valve.P[1:]))
    heater = next(c for c in curves(t, "isobar") if c.device == "H-1")  # a 0.4 bar drop, linear along h
    P_in, P_out = flows["f"].point.P, flows["g"].point.P
    assert P_in - P_out == pytest.approx(0.4e5, rel=1e-9)
    for P, h in zip(heater.P, heater.h):
        g = (h - heater.h[0]) / (heater.h[-1] - heater.h[0])
        assert P == pytest.approx(P_in + g * (P_out - P_in), rel=1e-9)
    cooler = next(c for c in curves(t, "isobar") if c.device == "E-1")  # no drop: one pressure
    assert max(cooler.P) - min(cooler.P) <= 1e-9 * cooler.P[0]


def test_the_planes_put_per_kilogram_values_on_their_axes(train):
    M = train.flows["a"].M
    for plane, (x, y) in (("T-s", ("s", "T")), ("h-s", ("s", "h")), ("P-h", ("h", "P"))):
        t = flow_trace(train, plane)
        assert t.axes == (x, y)
        c = t.curves[0]
        xs, ys = t.xy(c)
        scale = {"s": 1 / M / 1e3, "h": 1 / M / 1e3, "T": 1.0, "P": 1e-5}
        assert xs[0] == pytest.approx(getattr(c, x)[0] * scale[x], rel=1e-15)
        assert ys[0] == pytest.approx(getattr(c, y)[0] * scale[y], rel=1e-15)
    with pytest.raises(InputError) as err:
        flow_trace(train, "P-v")
    assert err.value.field == "plane"


def test_a_refrigerant_cycle_closes_on_the_p_h_plane_and_throttles_into_the_dome(cycle):
    t = flow_trace(cycle, "P-h")
    (valve,) = curves(t, "isenthalpic")
    model = model_of(cycle, "R134a")
    inside = [model.flash({"P": P, "h": h}).x for P, h in zip(valve.P, valve.h)]
    assert inside[0] == pytest.approx(0.0, abs=1e-9) and 0 < inside[-1] < 1  # from saturated liquid into the dome
    evaporator = next(c for c in curves(t, "isobar") if c.device == "E-2")
    compressor = next(c for c in curves(t, "isentropic") if c.device == "K-1")
    assert evaporator.h[-1] == compressor.h[0] and evaporator.P[-1] == compressor.P[0]  # the loop closes
    # CoolProp 8.0 HEOS: the evaporator boils at the saturation temperature of 2 bar
    T_sat = CP.PropsSI("T", "P", 2e5, "Q", 0, "R134a")
    wet = [T for T, P, h in zip(evaporator.T, evaporator.P, evaporator.h) if 0 < model.flash({"P": P, "h": h}).x < 1]
    assert wet and max(abs(T - T_sat) for T in wet) < 1e-6
    (dome,) = curves(t, "dome")
    i = len(dome.T) // 4
    assert dome.P[i] == pytest.approx(CP.PropsSI("P", "T", dome.T[i], "Q", 0, "R134a"), rel=1e-6)
    # the energy over the loop: the work in and the heat taken up are the heat rejected
    rows = {d.name: d for d in cycle.devices}
    assert rows["K-1"].W_dot + rows["E-2"].Q_dot == pytest.approx(-rows["E-1"].Q_dot, rel=1e-9)


def test_an_ideal_gas_has_no_dome_and_the_letdown_sample_draws(tmp_path: Path):
    text = TRAIN.replace('model = "peng-robinson"', 'model = "ideal-gas"')
    t = flow_trace(api.solve(api.read(text)), "T-s")
    assert not curves(t, "dome") and curves(t, "isentropic")
    sample = Path(__file__).resolve().parent.parent / "samples" / "gas-letdown-preheated.toml"
    t = flow_trace(api.solve(api.read(sample)), "T-s")
    assert {c.style for c in t.curves} == {"isobar", "isenthalpic", "dome"}
    assert math.isfinite(sum(t.xy(t.curves[0])[1]))
