"""The command line on transient worksheets: solve, --json, --csv, --plot, check, bad input.

Sources: the history's figures come from ``api.solve`` itself (the CSV must be the same rows); the
unit conversions are pint's (°C = K - 273.15, 1 bar = 1e5 Pa exactly: NIST SP 811).
"""

from __future__ import annotations

import csv
import json

import pytest

from balance import api
from tests.helpers import SAMPLES
from tui.cli import main

TRANSIENT = ["argon-buffer-pot-fill.toml", "h2-buffer-blowdown.toml", "co2-receiver-flare-depressure.toml",
             "n2-receivers-equalise.toml"]


def run(capsys, *args) -> tuple[int, str, str]:
    code = main([*map(str, args)])
    out = capsys.readouterr()
    return code, " ".join(out.out.split()), " ".join(out.err.split())


@pytest.mark.parametrize("name", TRANSIENT)
def test_each_transient_sample_solves_and_prints_both_levels(capsys, name):
    code, out, err = run(capsys, "solve", SAMPLES / name)
    assert code == 0, err
    for part in ("Result: ", "End state without time", "history:", "coldest gas", "energy closure",
                 "Equations with numbers", "Cautions", "licensed engineer"):
        assert part in out, part
    assert "Traceback" not in out + err


def test_json_names_the_kind_and_keeps_a_resampled_history(capsys):
    code = main(["solve", "--json", str(SAMPLES / "h2-buffer-blowdown.toml")])
    assert code == 0
    data = json.loads(capsys.readouterr().out)
    assert data["kind"] == "transient" and data["case"] == "vent"
    rows = data["history"]["rows"]
    assert len(rows["t [s]"]) == 41 and rows["t [s]"][-1] == data["history"]["t_end"]["value"]
    assert data["history"]["vessels"]["T-201"]["closure"] < 1e-6


def test_csv_holds_every_row_of_the_history_in_the_display_units(capsys, tmp_path):
    out = tmp_path / "h.csv"
    code, _, err = run(capsys, "solve", SAMPLES / "co2-receiver-flare-depressure.toml", "--csv", out)
    assert code == 0 and "500 rows written" in err
    rows = list(csv.reader(out.open()))
    assert rows[0] == ["t [s]", "D-702 T [°C]", "D-702 P [bar(a)]", "D-702 m [kg]", "D-702 T_wall [°C]",
                       "to flare mdot [kg/h]", "to flare choked"]
    h = api.solve(SAMPLES / "co2-receiver-flare-depressure.toml").history
    assert len(rows) == 1 + len(h.t)
    last = [float(x) for x in rows[-1]]
    assert last[0] == pytest.approx(h.t_end, rel=1e-9)
    assert last[1] == pytest.approx(h.vessels["D-702"]["T"][-1] - 273.15, abs=1e-7)  # K to °C
    assert last[2] == pytest.approx(h.vessels["D-702"]["P"][-1] / 1e5, rel=1e-9)  # Pa to bar
    assert last[5] == pytest.approx(h.lines["to flare"]["mdot"][-1] * 3600, rel=1e-9)  # kg/s to kg/h


def test_plot_draws_temperature_and_pressure_against_time(capsys):
    code = main(["solve", str(SAMPLES / "n2-receivers-equalise.toml"), "--plot"])
    out = capsys.readouterr().out
    assert code == 0
    assert "temperature [°C] against time" in out and "pressure [bar(a)] against time" in out
    assert "R-41 gas" in out and "R-42" in out and "\x1b[" not in out


def test_csv_and_plot_are_refused_where_there_is_no_history(capsys, tmp_path):
    code, _, err = run(capsys, "solve", SAMPLES / "steam-kettle-wet.toml", "--plot")
    assert code == 2 and "a transient worksheet's" in err
    ws = (SAMPLES / "h2-buffer-blowdown.toml").read_text().replace('orifice = "6 mm"\nCd = "0.62"\n', "")
    path = tmp_path / "no-restriction.toml"
    path.write_text(ws)
    code, out, err = run(capsys, "solve", path, "--csv", tmp_path / "x.csv")
    assert code == 2 and "no history" in err and "no restriction or rate" in err
    code, out, err = run(capsys, "solve", path)  # the end state alone still solves
    assert code == 0 and "End state without time" in out and "history: none" in out


def test_check_counts_a_transient_and_names_a_bad_field(capsys, tmp_path):
    code, out, _ = run(capsys, "check", SAMPLES / "argon-buffer-pot-fill.toml")
    assert code == 0 and "ready to solve" in out and "Vessels" in out
    bad = (SAMPLES / "argon-buffer-pot-fill.toml").read_text().replace('Cd = "0.8"', 'Cd = "1.5"')
    path = tmp_path / "bad.toml"
    path.write_text(bad)
    code, out, err = run(capsys, "check", path)
    assert code == 2 and "line 'fill line'.Cd: must be above 0 and at most 1" in err and "Traceback" not in err
    code, out, err = run(capsys, "solve", path)
    assert code == 2 and "line 'fill line'.Cd" in err
