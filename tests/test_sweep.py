"""Sweeps: a worksheet solved over ranges of its inputs.

The check of the main job is against the solve itself, case by case: every row of a sweep equals
the result of solving that case's worksheet on its own, to 1e-12 (the engine adds nothing to a
solve); the rows of a process pool equal the serial ones exactly (common practice for a
deterministic solve, no source).
"""

from __future__ import annotations

import csv
import io
import math

import pytest

from balance import api
from balance.errors import InputError
from balance.study.paths import get_value, parse_path, values_of, with_value
from balance.study.ranges import values
from tests.helpers import SAMPLES, sample
from tui.cli import main

RUPTURE = "n2-buffer-into-receiver.toml"


FILE = str(SAMPLES / RUPTURE)


@pytest.fixture(scope="module")
def ws():
    return sample(RUPTURE)


def test_a_range_gives_evenly_spaced_values_in_the_unit_as_typed():
    assert values("150 barg..180 barg", 4) == ["150 barg", "160 barg", "170 barg", "180 barg"]
    assert values("150..180 barg", 2) == ["150 barg", "180 barg"]  # a bare number takes the other end's unit
    assert values("-20 degC..40 degC", 3) == ["-20 degC", "10 degC", "40 degC"]
    assert values("ideal-gas, peng-robinson", None) == ["ideal-gas", "peng-robinson"]


@pytest.mark.parametrize("spec, points, field, words", [
    ("150 barg..180 bar", 3, "--vary", "one unit"),
    ("150 barg..180 barg", None, "--points", "needs --points"),
    ("150 barg..180 barg", 1, "--points", "from 2"),
    ("a,,b", None, "--vary", "empty value"),
    ("barg..180 barg", 3, "--vary", "not a number"),
])
def test_a_bad_range_names_what_is_wrong(spec, points, field, words):
    with pytest.raises(InputError) as caught:
        values(spec, points)
    assert caught.value.field == field and words in caught.value.message


def test_a_field_is_found_by_each_spelling_of_its_path(ws):
    assert get_value(ws, "initial.V-101.P") == get_value(ws, "initial 'V-101'.P") == get_value(ws, "initial[1].P")
    assert get_value(ws, "fluid.model") == "peng-robinson"
    changed = with_value(ws, "initial.V-101.P", "120 barg")
    assert changed.initial[0].props["P"] == "120 barg" and ws.initial[0].props["P"] == "150 barg"  # immutable
    assert ("initial 'V-101'.P", "150 barg") in list(values_of(ws))


@pytest.mark.parametrize("path, words", [
    ("initial.V-999.P", "no initial of that name"),
    ("nowhere.P", "expected a path like"),
    ("initial[7].P", "no number 7"),
    ("fluid", "name a field"),
])
def test_a_bad_path_is_named(ws, path, words):
    with pytest.raises(InputError) as caught:
        get_value(ws, parse_path(path))
    assert caught.value.field == "--vary" and words in caught.value.message


def test_a_field_the_section_does_not_take_is_refused_naming_it(ws):
    with pytest.raises(InputError) as caught:
        with_value(ws, "final.colour", "blue")
    assert caught.value.field == "--vary" and "colour" in caught.value.message


def test_every_row_equals_its_case_solved_on_its_own(ws):
    sweep = api.sweep(ws, ["initial.V-101.P=120 barg..180 barg", "fluid.model=ideal-gas,peng-robinson"], 3)
    assert len(sweep.rows) == 6 and sweep.failed() == 0
    assert [r.inputs for r in sweep.rows][:2] == [("120 barg", "ideal-gas"), ("120 barg", "peng-robinson")]
    for r in sweep.rows:
        case = with_value(with_value(ws, "initial.V-101.P", r.inputs[0]), "fluid.model", r.inputs[1])
        alone = api.as_json(api.solve(case))
        assert r.values["states.settled.T [K]"] == pytest.approx(alone["states"]["settled"]["T"]["value"], rel=1e-12)
        assert r.values["S_gen [J/K]"] == pytest.approx(alone["S_gen"]["value"], rel=1e-12)
    # the ideal gas and Peng-Robinson side by side: a sweep over fluid.model
    ig, pr = sweep.rows[4].values, sweep.rows[5].values
    assert ig["states.settled.T [K]"] != pr["states.settled.T [K]"]


def test_a_process_pool_gives_the_serial_rows_exactly(ws):
    spec = ["initial.V-101.P=120 barg..180 barg"]
    serial = api.sweep(ws, spec, 6)
    pooled = api.sweep(ws, spec, 6, jobs=2)
    assert [r.values for r in pooled.rows] == [r.values for r in serial.rows]


def test_fields_varied_together_go_value_by_value(ws):
    sweep = api.sweep(ws, ["initial.V-101.P=120 barg..180 barg", "initial.V-101.T=10 degC..30 degC"], 3, together=True)
    assert [r.inputs for r in sweep.rows] == [("120 barg", "10 degC"), ("150 barg", "20 degC"), ("180 barg", "30 degC")]
    with pytest.raises(InputError) as caught:
        api.sweep(ws, ["initial.V-101.P=120 barg..180 barg", "fluid.model=ideal-gas,peng-robinson"], 3, together=True)
    assert caught.value.field == "--together"


def test_a_bad_case_is_a_row_with_its_message_and_the_sweep_goes_on(ws):
    sweep = api.sweep(ws, ["initial.V-101.P=-3 barg,150 barg", "fluid.model=peng-robinson,incompressible"])
    assert len(sweep.rows) == 4 and [r.ok for r in sweep.rows] == [False, False, True, False]
    assert "vacuum" in sweep.rows[0].message and "incompressible" in sweep.rows[3].message.lower()
    out = io.StringIO()
    sweep.csv(out)
    table = list(csv.reader(io.StringIO(out.getvalue())))
    assert table[0][:4] == ["initial.V-101.P", "fluid.model", "solved", "message"]
    assert "states.settled.T [K]" in table[0] and "warnings" in table[0]  # units in the header
    assert table[1][2] == "no" and "vacuum" in table[1][3]
    T = table[0].index("states.settled.T [K]")
    assert math.isclose(float(table[3][T]), sweep.rows[2].values["states.settled.T [K]"], rel_tol=0, abs_tol=0)


def test_the_command_writes_the_csv_and_draws_the_plot(tmp_path, capsys):
    out = tmp_path / "sweep.csv"
    code = main(["sweep", FILE, "--vary", "initial.V-101.P=120 barg..180 barg", "--points", "4",
                 "--csv", str(out), "--plot"])
    text = capsys.readouterr().out
    assert code == 0 and "Sweep: 4 cases" in text and "states.settled.T [K] against initial.V-101.P" in text
    assert len(out.read_text().splitlines()) == 5


def test_the_command_draws_to_a_file_with_the_plotting_extra(tmp_path, capsys):
    pytest.importorskip("matplotlib")
    png = tmp_path / "T.png"
    code = main(["sweep", FILE, "--vary", "fluid.model=ideal-gas,peng-robinson",
                 "--plot-file", str(png)])
    assert code == 0 and png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_the_command_says_a_failed_case_and_a_bad_column(capsys):
    code = main(["sweep", FILE, "--vary", "initial.V-101.P=-3 barg,150 barg"])
    assert code == 1 and "1 of 2 cases not solved" in capsys.readouterr().err
    code = main(["sweep", FILE, "--vary", "initial.V-101.P=150 barg", "--plot", "nothing [K]"])
    assert code == 2 and "--plot" in capsys.readouterr().err


@pytest.mark.parametrize("name, vary", [
    ("gas-letdown-preheated.toml", "stream.pipeline.P=50 barg..70 barg"),
    ("h2-buffer-blowdown.toml", "vessel.T-201.P=20 barg..30 barg"),
])
def test_every_kind_of_balance_sweeps(name, vary):
    sweep = api.sweep(sample(name), [vary], 2)
    assert sweep.failed() == 0 and sweep.main
    a, b = (r.values[sweep.main[0]] for r in sweep.rows)
    assert a != b  # the input moves the result
