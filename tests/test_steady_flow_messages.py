"""What a steady-flow worksheet is told when it is wrong or near a limit: the field named, the
device's own words, and warnings that fit the fluid.

Sources: the critical pressure ratio of an ideal-gas nozzle, (2/(k+1))^(k/(k-1)) (0.5283 for
k = 1.4), published isentropic-flow theory, common practice; 60 °F = (60 - 32)/1.8 + 273.15 K
(the definition of the Fahrenheit scale, common practice, no source); CoolProp 8.0 HEOS for
the nitrogen's cp/cv, computed in the test.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import pytest

from balance import api
from balance.errors import InputError
from balance.units import STANDARDS
from tests.helpers import SAMPLES, sample, sheet

HEAD = """
[fluid]
species = "N2"
model = "peng-robinson"
[system]
kind = "steady-flow"
"""


def test_a_device_naming_no_stream_is_placed_at_its_inlets_or_outlets():
    ws = sheet(HEAD + """
[[stream]]
name = "a"
T = "300 K"
P = "10 bar"
rate = "1 kg/s"
[[stream]]
name = "b"
P = "2 bar"
[[device]]
name = "PCV-1"
kind = "valve"
inlets = ["a"]
outlets = ["c"]
""")
    with pytest.raises(InputError) as caught:
        api.prepare(ws)
    assert caught.value.field == "device 'PCV-1'.outlets"
    assert "names a stream 'c' that no [[stream]] defines" in caught.value.message


def test_a_heater_given_an_efficiency_is_told_it_has_none():
    ws = sheet(HEAD + """
[[stream]]
name = "a"
T = "300 K"
P = "10 bar"
rate = "1 kg/s"
[[stream]]
name = "b"
T = "350 K"
[[device]]
name = "E-1"
kind = "heater"
inlets = ["a"]
outlets = ["b"]
Q = "?"
eta = "0.8"
""")
    with pytest.raises(InputError) as caught:
        api.prepare(ws)
    assert caught.value.field == "device 'E-1'.eta" and "a heater has no efficiency" in caught.value.message


def test_an_exchanger_side_that_changes_species_names_the_stream():
    ws = sheet(HEAD + """
[[stream]]
name = "gas"
T = "400 K"
P = "5 bar"
rate = "1 kg/s"
[[stream]]
name = "gas out"
T = "320 K"
[[stream]]
name = "cw"
T = "20 degC"
P = "3 bar"
rate = "2 kg/s"
species = "H2O"
model = "reference"
[[stream]]
name = "cw out"
[[device]]
name = "E-3"
kind = "exchanger"
inlets = ["gas", "cw"]
outlets = ["gas out", "cw out"]
""")
    with pytest.raises(InputError) as caught:
        api.prepare(ws)
    assert caught.value.field == "stream 'cw out'.species"
    assert "is N2 but device 'E-3' takes it with stream 'cw' of H2O" in caught.value.message


def test_a_separators_outlets_are_said_to_be_saturated():
    streams = api.as_json(api.solve(sample("steam-condensate-flash-drum.toml")))["streams"]
    assert streams["drum liquid"]["phase"] == "saturated liquid"
    assert streams["flash steam"]["phase"] == "saturated vapour"
    assert streams["flashed"]["phase"] == "two-phase"


NOZZLE = HEAD.replace("peng-robinson", "reference") + """
[[stream]]
name = "a"
T = "300 K"
P = "10 bar"
rate = "0.1 kg/s"
[[stream]]
name = "b"
P = "{P2}"
[[device]]
name = "N-1"
kind = "nozzle"
inlets = ["a"]
outlets = ["b"]
"""


def test_a_gas_nozzle_past_its_critical_ratio_is_warned_to_choke():
    warnings = api.solve(sheet(NOZZLE.format(P2="1 bar"))).warnings
    (choke,) = [w for w in warnings if w.startswith("nozzle N-1:") and "critical ratio" in w]
    k = CP.PropsSI("Cpmass", "T", 300.0, "P", 10e5, "Nitrogen") / CP.PropsSI("Cvmass", "T", 300.0, "P", 10e5, "Nitrogen")
    critical = (2 / (k + 1)) ** (k / (k - 1))
    assert 0.52 < critical < 0.54  # about 0.528 for k near 1.4
    assert f"about {critical:.3g} for k = cp/cv = {k:.3g}" in choke
    assert f"chokes at about {critical * 10:.4g} bar" in choke
    # above the critical ratio: no such warning
    gentle = api.solve(sheet(NOZZLE.format(P2="8 bar"))).warnings
    assert not [w for w in gentle if "critical ratio" in w]


def test_a_refrigerant_flashing_in_its_valve_is_not_warned_of_hydrates():
    warnings = api.solve(sample("r134a-chiller-evaporator-condenser.toml")).warnings
    assert not [w for w in warnings if "hydrates" in w]


def test_a_gas_letdown_below_zero_is_warned_of_hydrates():
    # the letdown skid's heater set to 15 °C instead of 45 °C: the gas leaves the valve below 0 °C
    text = (SAMPLES / "gas-letdown-preheated.toml").read_text().replace('T = "45 degC"', 'T = "15 degC"')
    warnings = api.solve(sheet(text)).warnings
    (cold,) = [w for w in warnings if "hydrates" in w]
    assert cold.startswith("valve PCV-201: the outlet is below 0 °C") and "water dew point" in cold


def test_standard_cubic_feet_are_at_sixty_fahrenheit_exactly():
    assert STANDARDS["scf"].T == (60 - 32) / 1.8 + 273.15  # 288.705555... K


def test_every_field_at_fault_is_named_at_once_and_placed_at_its_stream_or_device():
    text = (SAMPLES / "gas-letdown-preheated.toml").read_text()
    bad = (text.replace('rate = "2500 Nm3/h"', 'rate = "abc"').replace('T = "45 degC"', 'T = "warm"')
           .replace('kind = "valve"', 'kind = "valve"\neta = "0.5"'))
    found = api.problems(sheet(bad))
    assert [(p.field, p.part, p.index, p.key) for p in found] == [
        ("stream 'pipeline'.rate", "stream", 0, "rate"),
        ("stream 'heated'.T", "stream", 1, "T"),
        ("device 'PCV-201'.eta", "device", 1, "eta"),
    ]
    assert api.problems(sheet(text)) == ()  # none: and prepare succeeds
    api.prepare(sheet(text))


def test_step_3s_advice_judges_the_streams_of_a_steady_flow_worksheet():
    advice = api.advise(sample("gas-letdown-preheated.toml"))
    (pipeline,) = advice.states  # the only stream given two properties
    assert pipeline.name == "stream 'pipeline'"
    # CoolProp 8.0 HEOS: methane at 8 °C and 71.01325 bar has Z = P / (rho R T) near 0.85; PR about 0.83
    rho = CP.PropsSI("Dmolar", "T", 281.15, "P", 7101325.0, "Methane")
    assert pipeline.Z == pytest.approx(7101325.0 / (rho * 8.314462618 * 281.15), rel=0.03)
    blank = api.advise(sheet(HEAD + '[[stream]]\nname = "a"\nT = "300 K"\n'))
    assert blank.recommendation == "give two properties of a stream (step 4) to see how well the model fits"


def test_a_device_without_a_kind_is_asked_for_one():
    from dataclasses import replace

    ws = sheet(HEAD + '[[stream]]\nname = "a"\n[[stream]]\nname = "b"\n'
               '[[device]]\nname = "X-1"\nkind = "heater"\ninlets = ["a"]\noutlets = ["b"]\nQ = "?"\n')
    ws = replace(ws, devices=(replace(ws.devices[0], kind=""),))  # as the app holds a kind not chosen yet
    (problem,) = api.problems(ws)
    assert problem.field == "device 'X-1'.kind" and problem.message.startswith("expected one of valve, heater")
    assert "got" not in problem.message  # not "a  here is adiabatic"


def test_a_steady_flow_worksheet_is_written_without_compartments_it_does_not_have():
    from balance.worksheet import Worksheet

    ws = sample("gas-letdown-preheated.toml")
    data = ws.to_dict()
    assert "initial" not in data and "final" not in data  # it had none; closed worksheets keep both
    assert Worksheet.from_toml(ws.to_toml()) == ws
    assert {"initial", "final"} <= set(sample("n2-buffer-into-receiver.toml").to_dict())
