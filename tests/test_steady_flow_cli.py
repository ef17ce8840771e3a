"""The command line on steady-flow worksheets: solve, solve --json, solve --units, check, bad input.

Sources: "CoolProp 8.0 HEOS" computed in the test (the turbine's expansion by PSmass and
HmassP flashes); the Btu as pint defines it (ISO 31-4: 1055.056 J; the IT Btu, 1055.05585262 J,
differs by 1e-7); °F = °C × 1.8 + 32 and 1 lb = 0.45359237 kg exactly (NIST SP 811).
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from tests.helpers import ROOT, SAMPLES
from tui.cli import main

STEADY = ["gas-letdown-preheated.toml", "n2-two-stage-compressor.toml", "steam-backpressure-turbine.toml",
          "feedwater-heater-steam-mix.toml", "r134a-chiller-evaporator-condenser.toml",
          "steam-condensate-flash-drum.toml", "n2-feed-effluent-preheater.toml"]
BTU = 1055.056  # J (pint's Btu, ISO 31-4)


def run(capsys, *args) -> tuple[int, str, str]:
    """The command's exit code, its output with lines joined (rich wraps at 80 columns) and stderr."""
    code = main([*map(str, args)])
    out = capsys.readouterr()
    return code, " ".join(out.out.split()), " ".join(out.err.split())


def as_json(capsys, name: str) -> dict:
    code = main(["solve", "--json", str(SAMPLES / name)])
    assert code == 0
    return json.loads(capsys.readouterr().out)


@pytest.mark.parametrize("name", STEADY)
def test_each_steady_sample_solves_and_prints_its_tables(capsys, name):
    code, out, err = run(capsys, "solve", SAMPLES / name)
    assert code == 0, err
    for part in ("Result: ", "Streams", "Devices", "Equations with numbers", "Cautions", "licensed engineer",
                 "exergy destroyed at T0 = 25 °C"):
        assert part in out, part
    assert "Traceback" not in out + err


@pytest.mark.parametrize("name", STEADY)
def test_solve_json_gives_every_stream_and_device_with_pint_units(capsys, name):
    from balance.units import Q_

    data = as_json(capsys, name)
    assert data["kind"] == "steady-flow"
    assert data["streams"] and data["devices"]
    for stream in data["streams"].values():
        for key in ("T", "P", "h", "s", "m_dot", "n_dot", "V_dot"):
            Q_(stream[key]["value"], stream[key]["unit"])  # a unit pint reads
    for device in data["devices"].values():
        assert abs(device["residual_mass"]) < 1e-9 and abs(device["residual_energy"]) < 1e-9


def test_the_headline_gives_the_duty_and_the_header_temperature_as_the_json_does(capsys):
    data = as_json(capsys, "gas-letdown-preheated.toml")
    Q = data["devices"]["E-201"]["Q_dot"]["value"]
    T = data["streams"]["header"]["T"]["value"]
    _, out, _ = run(capsys, "solve", SAMPLES / "gas-letdown-preheated.toml")
    head = out.split("Result: ", 1)[1]
    assert head.startswith(f"E-201 Q̇ = {Q / 1e3:.5g} kW; header: T = {T - 273.15:.5g} °C")


def test_us_units_show_powers_in_btu_per_hour_and_rates_in_pounds_per_hour(capsys):
    data = as_json(capsys, "gas-letdown-preheated.toml")
    Q = data["devices"]["E-201"]["Q_dot"]["value"]
    T = data["streams"]["header"]["T"]["value"]
    m = data["streams"]["pipeline"]["m_dot"]["value"]
    code, out, _ = run(capsys, "solve", "--units", "us", SAMPLES / "gas-letdown-preheated.toml")
    assert code == 0
    flat = out
    assert f"E-201 Q̇ = {Q * 3600 / BTU:.5g} Btu/h" in flat
    assert f"T = {(T - 273.15) * 1.8 + 32:.5g} °F" in flat
    assert "lb/h" in out and "psia" in out
    assert f"{m * 3600 / 0.45359237:.6g}" in out  # the mass rate row, lb/h


def test_typed_units_follow_the_rate_as_the_worksheet_gives_it(capsys):
    code, out, _ = run(capsys, "solve", "--units", "typed", SAMPLES / "steam-condensate-flash-drum.toml")
    assert code == 0
    assert "t/h" in out


def test_a_worksheet_without_a_rate_is_shown_per_kg_of_its_feed(capsys, tmp_path):
    CP = pytest.importorskip("CoolProp.CoolProp")
    text = (SAMPLES / "steam-backpressure-turbine.toml").read_text()
    path = tmp_path / "per-kg.toml"
    path.write_text(text.replace('rate = "4 t/h"\n', ""))
    code, out, err = run(capsys, "solve", path)
    assert code == 0, err
    flat = out
    assert "per kg of 'HP steam'" in flat
    # CoolProp 8.0 HEOS: w = h1 - h2, h2 = h1 - 0.70 (h1 - h2s), per kg
    h1, s1 = (CP.PropsSI(k, "T", 533.15, "P", 20e5 + 101325, "Water") for k in ("Hmass", "Smass"))
    h2s = CP.PropsSI("Hmass", "P", 2e5 + 101325, "Smass", s1, "Water")
    assert f"ST-501 Ẇ = {0.70 * (h1 - h2s) / 1e3:.5g} kJ/kg" in flat


def test_check_says_what_each_device_joins_and_that_it_is_ready(capsys):
    code, out, err = run(capsys, "check", SAMPLES / "n2-two-stage-compressor.toml")
    assert code == 0, err
    assert "K-301A (compressor)" in out and "suction → stage-1" in out
    assert "4 devices, 5 streams: ready to solve" in out


def test_check_says_per_device_what_is_missing(capsys, tmp_path):
    text = (SAMPLES / "gas-letdown-preheated.toml").read_text()
    path = tmp_path / "no-header-pressure.toml"
    path.write_text(text.replace('P = "7 barg"\n', ""))
    code, out, err = run(capsys, "check", path)
    assert code == 2
    assert "valve PCV-201: give the outlet pressure (P of 'header')" in out
    code, out, err = run(capsys, "solve", path)
    assert code == 2 and "PCV-201" in err and "outlet pressure" in err


BAD = [
    # (what is changed, into what, words the message must hold)
    ('inlets = ["heated"]', 'inlets = ["heatd"]', ("device 'PCV-201'", "'heatd'")),
    ('kind = "valve"', 'kind = "vlave"', ("device 'PCV-201'.kind", "'vlave'", "valve, heater")),
    ('rate = "2500 Nm3/h"', 'rate = "abc"', ("stream 'pipeline'.rate", "'abc'", "Nm3/h")),
]


@pytest.mark.parametrize("old,new,words", BAD, ids=["unknown stream", "kind misspelled", "rate not a rate"])
@pytest.mark.parametrize("command", [("solve",), ("solve", "--json"), ("check",)], ids=" ".join)
def test_bad_input_exits_2_naming_the_field(capsys, tmp_path, old, new, words, command):
    text = (SAMPLES / "gas-letdown-preheated.toml").read_text()
    assert old in text
    path = tmp_path / "bad.toml"
    path.write_text(text.replace(old, new))
    code, out, err = run(capsys, *command, path)
    assert code == 2
    for w in words:
        assert w in err, (w, err)
    assert "Traceback" not in out + err


def test_the_installed_command_runs_a_steady_sample_in_its_own_process():
    out = subprocess.run([sys.executable, "-m", "tui.cli", "solve", str(SAMPLES / "feedwater-heater-steam-mix.toml")],
                         capture_output=True, text=True, cwd=ROOT, timeout=300, check=False)
    assert out.returncode == 0, out.stderr
    assert "heating steam: ṁ = " in out.stdout


def test_the_readme_excerpt_is_what_solve_prints(capsys):
    """README, "Steady-flow worksheets": its excerpt of the turbine's output is the output."""
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    excerpt = readme.split("## Steady-flow worksheets", 1)[1].split("```text", 1)[1].split("```", 1)[0]
    code, out, _ = run(capsys, "solve", SAMPLES / "steam-backpressure-turbine.toml")
    assert code == 0
    for line in excerpt.strip().splitlines():
        if not set(line.strip()) <= {"─"}:  # the rules are as wide as the table
            assert " ".join(line.split()) in out, line


AFTERCOOLER = """
[worksheet]
title = "Aftercooler on cooling water, then a vent nozzle"
[fluid]
species = "N2"
model = "reference"
[system]
kind = "steady-flow"
[[stream]]
name = "hot gas"
T = "150 degC"
P = "10 bar"
rate = "500 kg/h"
[[stream]]
name = "cooled gas"
T = "35 degC"
[[stream]]
name = "cw in"
species = "H2O"
T = "25 degC"
P = "3 bar"
rate = "?"
[[stream]]
name = "cw out"
species = "H2O"
T = "35 degC"
[[stream]]
name = "vent"
P = "1.01325 bar"
[[device]]
name = "E-1"
kind = "exchanger"
inlets = ["hot gas", "cw in"]
outlets = ["cooled gas", "cw out"]
dP = "0.2 bar"
[[device]]
name = "N-1"
kind = "nozzle"
inlets = ["cooled gas"]
outlets = ["vent"]
eta = 0.95
"""


def test_an_exchanger_and_a_nozzle_show_their_duty_approach_and_speed(capsys, tmp_path):
    CP = pytest.importorskip("CoolProp.CoolProp")
    path = tmp_path / "aftercooler.toml"
    path.write_text(AFTERCOOLER)
    code, out, err = run(capsys, "solve", path)
    assert code == 0, err
    # CoolProp 8.0 HEOS: the water rate from the duty, m_w = m_g (h_g,in - h_g,out) / (h_w,out - h_w,in)
    m_g = 500.0 / 3600.0
    hg1 = CP.PropsSI("Hmass", "T", 423.15, "P", 10e5, "Nitrogen")
    hg2, sg2 = (CP.PropsSI(k, "T", 308.15, "P", 9.8e5, "Nitrogen") for k in ("Hmass", "Smass"))
    hw1 = CP.PropsSI("Hmass", "T", 298.15, "P", 3e5, "Water")
    hw2 = CP.PropsSI("Hmass", "T", 308.15, "P", 3e5, "Water")
    duty = m_g * (hg1 - hg2)
    assert f"cw in: ṁ = {duty / (hw2 - hw1) * 3600:.5g} kg/h" in out
    assert f"E-1: duty {duty / 1e3:.5g} kW from the hot side to the cold; minimum approach 10 K" in out
    # the nozzle: h_out = h_in - eta (h_in - h(P2, s_in)); V = sqrt(2 (h_in - h_out)) from rest
    h2 = hg2 - 0.95 * (hg2 - CP.PropsSI("Hmass", "P", 101325.0, "Smass", sg2, "Nitrogen"))
    speed = (2 * (hg2 - h2)) ** 0.5
    assert f"velocity m/s 0 0 0 0 {speed:.6g}" in out
    assert "minimum design metal temperature" in out  # the vent is far below -29 °C


def test_an_isentropic_nozzle_generates_no_entropy_and_shows_0_not_round_off(capsys, tmp_path):
    # an isentropic device generates no entropy (the second law's equality; common practice,
    # no source): its computed Ṡ_gen is round-off, shown as 0, and so is its exergy destroyed
    path = tmp_path / "ideal-nozzle.toml"
    path.write_text(AFTERCOOLER.replace("eta = 0.95", "eta = 1"))
    code, out, err = run(capsys, "solve", path)
    assert code == 0, err
    assert "N-1 nozzle — — 1 0 0 " in out
    data = as_json(capsys, path)
    assert abs(data["devices"]["N-1"]["S_gen_dot"]["value"]) < 1e-9  # what the JSON keeps: the computed value
