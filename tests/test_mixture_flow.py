"""Mixtures in steady flow, in a vessel and on the command line: blending different fluids in a mixer, the
dew and bubble points in the stream tables, `joulebook state` with a composition.

Sources of the check values:

* the entropy of mixing ideal gases at one T and P, Ṡ_gen = -R ṅ Σ y ln y (closed form);
* the energy balance of an adiabatic mixer, Σ ṅ_in h_in = ṅ_out h_out, with each component's
  ideal-gas h from the species data (closed form);
* the phase envelope against :mod:`balance.models.cubic.phases`, itself held to thermo 0.6.1's
  flash in tests/test_cubic_mixture.py.
"""

from __future__ import annotations

import json
import math

import pytest

from balance import api
from balance.errors import InputError
from balance.mixture import bundled_mixture
from balance.models import make_model
from balance.models.cubic.phases import envelope_at_P
from balance.species import lookup
from balance.units import R
from tui.cli import main

BLEND = '''
[worksheet]
title = "Lab rig: a synthetic-air blending tee"
[fluid]
model = "{model}"
[system]
kind = "steady-flow"
inside = "the blending tee and its trim heater"
[[stream]]
name = "n2"
species = "N2"
T = "{T_n2}"
P = "5 bar"
rate = "0.79 mol/s"
[[stream]]
name = "o2"
species = "O2"
T = "25 degC"
P = "5 bar"
rate = "0.21 mol/s"
[[stream]]
name = "blend"
P = "5 bar"
[[stream]]
name = "warm"
T = "80 degC"
[[device]]
name = "M-1"
kind = "mixer"
inlets = ["n2", "o2"]
outlets = ["blend"]
[[device]]
name = "E-1"
kind = "heater"
inlets = ["blend"]
outlets = ["warm"]
Q = "?"
'''


def _blend(model: str = "ideal-gas", T_n2: str = "25 degC") -> str:
    return BLEND.format(model=model, T_n2=T_n2)


def test_blending_two_ideal_gases_at_one_state_generates_the_entropy_of_mixing():
    data = api.as_json(api.solve(_blend()))
    y = {"N2": 0.79, "O2": 0.21}
    # closed form: Ṡ_gen = -R ṅ Σ y ln y for ideal gases mixed at one T and P (ṅ = 1 mol/s)
    assert data["devices"]["M-1"]["S_gen_dot"]["value"] == pytest.approx(
        -R * sum(v * math.log(v) for v in y.values()), rel=1e-10)
    assert data["streams"]["blend"]["composition"] == pytest.approx(y, rel=1e-12)
    assert data["streams"]["warm"]["composition"] == pytest.approx(y, rel=1e-12)  # the heater keeps it
    assert data["streams"]["blend"]["T"]["value"] == pytest.approx(298.15, rel=1e-9)


def test_blending_at_different_temperatures_keeps_the_energy_of_the_inlets():
    data = api.as_json(api.solve(_blend(T_n2="150 degC")))
    n2, o2 = lookup("N2").cp_ig, lookup("O2").cp_ig
    T_out = data["streams"]["blend"]["T"]["value"]
    # closed form: 0.79 h_N2(423.15) + 0.21 h_O2(298.15) = 0.79 h_N2(T) + 0.21 h_O2(T)
    assert 0.79 * n2.h(T_out) + 0.21 * o2.h(T_out) == pytest.approx(0.79 * n2.h(423.15) + 0.21 * o2.h(298.15),
                                                                    abs=1e-6)
    S = data["devices"]["M-1"]["S_gen_dot"]["value"]
    assert S > -R * (0.79 * math.log(0.79) + 0.21 * math.log(0.21))  # mixing plus the heat passed between them


def test_a_blend_on_a_cubic_carries_the_kij_of_its_components_into_the_record(tmp_path, monkeypatch):
    from balance.record import Record

    monkeypatch.setenv("JOULEBOOK_AUTHOR", "t.engineer")
    rec = Record.create(tmp_path / "blend.jbk", worksheet=api.read(_blend("peng-robinson")))
    solve = rec.entries[-1].data
    pins = solve["mixtures"]
    assert pins[0]["composition"] == pytest.approx({"N2": 0.79, "O2": 0.21}, rel=1e-12)
    assert pins[0]["kij"][0]["pair"] == "N2-O2" and pins[0]["kij"][0]["source"]  # with its source
    assert rec.replay().ok


@pytest.mark.parametrize("line, field", [
    ('species = "Ar"', "stream 'blend'.species"),
    ('rate = "1 mol/s"', "stream 'blend'.rate"),
    ('h = "10 kJ/kg"', "stream 'blend'.h"),
])
def test_a_blended_stream_refuses_what_the_blend_sets(line, field):
    text = _blend().replace('name = "blend"\nP = "5 bar"', f'name = "blend"\nP = "5 bar"\n{line}')
    with pytest.raises(InputError) as caught:
        api.solve(text)
    assert caught.value.field == field


def test_a_blend_of_streams_on_different_models_is_refused_naming_the_mixer():
    text = _blend().replace('species = "O2"', 'species = "O2"\nmodel = "peng-robinson"')
    with pytest.raises(InputError) as caught:
        api.solve(text)
    assert "M-1" in caught.value.field and "different models" in caught.value.message


# -- dew and bubble points in the stream tables -----------------------------------------------
def test_the_letdown_sample_shows_each_stream_s_dew_and_bubble_points():
    from tui.cli import sample_path

    result = api.solve(open(sample_path("ng-fuel-letdown-dewpoint.toml"), encoding="utf-8").read())
    data = api.as_json(result)
    m = make_model("peng-robinson", bundled_mixture("hpp-natural-gas"))
    for name in ("supply", "header"):
        st = data["streams"][name]
        bubble, dew = envelope_at_P(m.mixing, st["P"]["value"], m.z)
        assert st["dew_point"]["value"] == pytest.approx(dew.value, rel=1e-9)
        assert st["bubble_point"]["value"] == pytest.approx(bubble.value, rel=1e-9)
        assert st["T"]["value"] > st["dew_point"]["value"]  # the header stays gas


# -- joulebook state with a composition -------------------------------------------------------------
def test_state_of_a_typed_composition_prints_its_phase_envelope(capsys):
    code = main(["state", "lab gas", "--composition", "CH4=0.9", "--composition", "C3H8=0.1", "--model", "pr",
                 "--given", "T=20 degC", "--given", "P=30 bar", "--json"])
    out = json.loads(capsys.readouterr().out)
    assert code == 0 and out["composition"] == {"CH4": 0.9, "C3H8": 0.1}
    dew = out["phases"]["along_P"][1]
    assert dew["kind"] == "dew point" and 240.0 < dew["value"] < 260.0 and out["phases"]["split"] is None


def test_state_inside_the_envelope_prints_the_flash(capsys):
    code = main(["state", "hpp-natural-gas", "--model", "pr", "--given", "T=-60 degC", "--given", "P=30 bar"])
    text = capsys.readouterr().out
    assert code == 0 and "vapour fraction beta = 0.98918" in text and "K = y/x" in text


def test_state_with_a_bad_kij_names_it(capsys):
    code = main(["state", "hpp-natural-gas", "--model", "pr", "--kij", "CH4-Xe=0.1",
                 "--given", "T=20 degC", "--given", "P=30 bar"])
    err = capsys.readouterr().err
    assert code == 2 and "fluid.kij.CH4-Xe" in err and "not a component" in err


# -- a vessel of a mixture ----------------------------------------------------------------------------
VENT = '''
[worksheet]
title = "Pilot gasifier's syngas buffer vented through its stack"
[fluid]
species = "pilot syngas"
composition = {H2 = 0.45, CO = 0.35, CO2 = 0.15, CH4 = 0.05}
model = "peng-robinson"
[system]
kind = "transient"
inside = "the syngas in buffer B-3"
[[vessel]]
name = "B-3"
V = "0.5 m3"
T = "25 degC"
P = "30 barg"
heat = "adiabatic"
[[line]]
name = "stack"
from = "B-3"
to = "outside"
back = "atmosphere"
orifice = "6 mm"
Cd = "0.62"
[end]
P = "{end}"
'''


def test_an_adiabatic_vent_of_a_mixture_keeps_the_entropy_of_the_gas_left_behind():
    """The gas left in an adiabatic vessel expands reversibly (common practice, no source):
    s2 = s1 at the end state, on the mixture's own entropy."""
    data = api.as_json(api.solve(VENT.replace("{end}", "20 barg")))
    vessel = data["end_state"]["vessels"]["B-3"]
    sp, model = api.fluid("pilot syngas", "peng-robinson",
                          composition={"H2": "0.45", "CO": "0.35", "CO2": "0.15", "CH4": "0.05"})
    s1 = model.at_TP(vessel["T1"]["value"], vessel["P1"]["value"]).s
    assert vessel["s2"]["value"] == pytest.approx(s1, rel=1e-8, abs=1e-8)
    assert data["composition"] == {"H2": 0.45, "CO": 0.35, "CO2": 0.15, "CH4": 0.05}


def test_a_vent_that_cools_the_mixture_into_its_envelope_is_refused_with_its_dew_point():
    from balance.errors import BalanceError

    with pytest.raises(BalanceError) as caught:
        api.solve(VENT.replace("{end}", "1 barg"))
    text = str(caught.value)
    assert "splits into two phases" in text and "dew point T =" in text and "CO2" in text


def test_a_blend_of_pure_fluids_on_the_reference_model_is_refused():
    """The pure reference model measures h and s from CoolProp's reference state of each fluid, the
    mixture from the ideal gas (README, Models): their energies would not add."""
    with pytest.raises(InputError) as caught:
        api.solve(_blend("reference"))
    assert "M-1" in caught.value.field and "do not add" in caught.value.message


def test_a_reference_mixture_stream_shows_coolprop_s_dew_point():
    """The letdown on the reference model: each stream's dew point is CoolProp HEOS's own
    (its P-Q flash at Q = 1 with the same mole fractions: the source)."""
    import CoolProp.CoolProp as CP

    from tui.cli import sample_path

    text = open(sample_path("ng-fuel-letdown-dewpoint.toml"), encoding="utf-8").read()
    data = api.as_json(api.solve(text.replace('model = "peng-robinson"', 'model = "reference"')))
    sp = bundled_mixture("hpp-natural-gas")
    heos = CP.AbstractState("HEOS", "&".join(lookup(i).coolprop for i, _ in sp.composition))
    heos.set_mole_fractions([y for _, y in sp.composition])
    P = data["streams"]["header"]["P"]["value"]
    heos.update(CP.PQ_INPUTS, P, 1.0)
    assert data["streams"]["header"]["dew_point"]["value"] == pytest.approx(heos.T(), rel=1e-9)
