"""Cautions in the units the user chose: the command line's --units and the app's f2 write the
cautions' numbers in SI, metric or US units; the record keeps its own fixed units (°C, bar(a))
and says so.

Conversions are pint's; the expected figures are worked by hand from the exact definitions
(1 psi = 6894.757 Pa, NIST SP 811; T[°F] = 1.8 T[°C] + 32; 0 °C = 273.15 K).
"""

from __future__ import annotations

import io

import pytest
from rich.console import Console

from balance import api
from balance.balances.cautions import Caution, record_units
from balance.record.solve_text import solve_text
from tests.helpers import SAMPLES, sample, sheet
from tests.test_output_app import text_of
from tests.test_tui_pilot import SIZE, author, ready, sample_app, solve_on_results  # noqa: F401  (fixture)
from tui.display import caution_value
from tui.render import result_renderable

#: Nitrogen from 200 bar, 0 °C into nine times its volume of vacuum (Peng-Robinson): it
#: settles near -52.6 °C, below the -29 °C at which carbon steel needs impact testing.
COLD = """
[fluid]
species = "N2"
model = "peng-robinson"
[[initial]]
name = "V-1"
T = "0 degC"
P = "200 bar"
V = "1 m3"
[[initial]]
name = "V-2"
empty = true
V = "9 m3"
[final]
name = "settled"
T = "?"
P = "?"
[process]
constraints = ["free-expansion"]
"""


def cautions_shown(r, units: str) -> str:
    out = io.StringIO()
    Console(file=out, width=400, color_system=None).print(result_renderable(r, units))
    text = out.getvalue()
    return " ".join(text[text.index("Cautions"):].split())


@pytest.fixture(scope="module")
def demo():
    return api.solve(sample("n2-buffer-into-receiver.toml"))


@pytest.fixture(scope="module")
def cold():
    return api.solve(sheet(COLD))


@pytest.mark.parametrize("kind, value, units, text", [
    ("P", 151.01325e5, "metric", "151 bar(a)"),
    ("P", 151.01325e5, "us", "2190 psia"),       # 15101325 Pa / 6894.757 Pa/psi = 2190.25
    ("P", 151.01325e5, "si", "15101 kPa(a)"),
    ("P", 200e5, "si", "20000 kPa(a)"),           # not 2e+04
    ("T", 220.6, "metric", "-52.5 °C"),
    ("T", 220.6, "us", "-62.6 °F"),               # 1.8 x (-52.55) + 32 = -62.59
    ("T", 220.6, "si", "220.6 K"),
    ("T limit", 244.15, "metric", "-29 °C"),
    ("T limit", 244.15, "us", "-20 °F"),          # -20.2 °F, to the degree as the trade quotes it
])
def test_a_caution_value_in_each_unit_set(kind, value, units, text):
    assert caution_value(kind, value, units) == text


def test_the_record_writes_cautions_in_bar_and_celsius():
    c = Caution("pressure", "up to {} at {}", (("P", 2e6), ("T", 250.0)))
    assert c.text() == str(c) == "up to 20 bar(a) at -23.1 °C"
    assert record_units("T limit", 244.15) == "-29 °C"


def test_us_units_never_print_bar_in_the_cautions(demo):
    text = cautions_shown(demo, "us")
    assert "Pressures up to 2190 psia occur" in text
    assert "bar" not in text
    assert "Pressures up to 15101 kPa(a) occur" in cautions_shown(demo, "si")
    assert "Pressures up to 151 bar(a) occur" in cautions_shown(demo, "metric")


def test_the_low_temperature_caution_follows_the_units(cold):
    from balance.balances.cautions import gas_left_behind
    from tests.test_cautions import held

    r = api.solve(sheet(held("-40 degC", "1 bar")))  # -40 °C is -40 °F
    us = cautions_shown(r, "us")
    assert "A temperature of -40.0 °F occurs (the final state 'final'), below -20 °F" in us
    assert "°C" not in us
    assert "A temperature of 233.1 K occurs (the final state 'final'), below 244 K" in cautions_shown(r, "si")
    # the gas left behind in a sudden expansion, in US units: 200 bar = 2900.75 psi
    _, T, _ = gas_left_behind(cold.initial, cold.final)
    us = cautions_shown(cold, "us")
    P2 = cold.final.point.P / 6894.757
    assert f"the gas left in 'V-1' expands from 2901 psia to {P2:.4g} psia" in us
    assert f"it cools to {1.8 * (T - 273.15) + 32:.1f} °F, below -20 °F" in us
    assert f"the settled {1.8 * (cold.final.point.T - 273.15) + 32:.1f} °F is the state after mixing" in us
    assert "°C" not in us and "bar" not in us


def test_the_record_keeps_its_units_and_says_which(demo):
    data = api.as_json(demo)
    assert "Pressures up to 151 bar(a) occur" in data["cautions"][1]
    text = solve_text(data)
    assert "Units (fixed, whatever the display): T in K and °C, P in bar(a)" in " ".join(text.split())


def test_the_command_line_gives_the_atmosphere_in_the_display_units(demo):
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(result_renderable(demo, "us"))
    assert "gauge pressures read with atmosphere = 14.6959 psia" in out.getvalue()  # 101325 Pa / 6894.757


async def test_f2_on_the_results_step_rewrites_the_cautions(tmp_path, author):  # noqa: F811
    app = sample_app(tmp_path, "n2-buffer-into-receiver.toml")
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await solve_on_results(pilot)
        assert "Pressures up to 151 bar(a) occur" in " ".join(text_of(app, "#balance").split())
        await pilot.press("f2")  # metric -> US customary
        await pilot.pause()
        shown = " ".join(text_of(app, "#balance").split())
        assert "Pressures up to 2190 psia occur" in shown
        assert "bar(a)" not in shown


def test_the_amount_in_us_units_is_in_pound_moles(demo):
    from tui.display import show

    # 1 lbmol = 453.59237 mol (the avoirdupois pound, 0.45359237 kg exactly: NIST SP 811);
    # the demo holds 12413 mol: 27.3659 lbmol (it was printed as 12413 "lbmol")
    assert show(demo.n, "n", "us") == f"{demo.n / 453.59237:.6g}" == "27.3659"
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(result_renderable(demo, "us"))
    (n_row,) = [ln for ln in out.getvalue().splitlines() if ln.split()[:2] == ["n", "lbmol"]]
    assert n_row.split()[2:] == ["27.3659", "27.3659"]


# -- units as typed -------------------------------------------------------------------------
#: The piston rig typed in US units (77 degF, 72.5 psia, 0.07 lb) but for the final pressure.
TYPED = (SAMPLES / "methane-piston-isothermal.toml").read_text().replace('T = "25 degC"', 'T = "77 degF"').replace(
    'P = "5 bar"', 'P = "72.5 psia"').replace('n = "2 mol"', 'm = "0.07 lb"')


def test_the_typed_set_takes_each_kind_in_the_unit_first_typed_for_it(tmp_path):
    from tui.display import show, typed_set, unit_label, use_typed

    ws = sheet(TYPED)
    units = typed_set(ws)
    # psia read as psi (absolute), °F as typed, the mass in pounds; what is not typed: metric
    assert (units["T"], units["P"], units["m"], units["E"], units["V"]) == ("degF", "psi", "lb", "kJ", "m**3")
    use_typed(ws)
    assert unit_label("T", "typed") == "°F" and unit_label("P", "typed") == "psia"
    # 298.15 K is 77 °F (T[°F] = 1.8 T[°C] + 32); 72.5 psi is 499869.9 Pa (1 psi = 6894.757 Pa)
    assert show(298.15, "T", "typed") == "77"
    assert show(72.5 * 6894.757, "P", "typed") == "72.5"


def test_a_gauge_reading_and_a_unit_of_another_dimension_in_the_typed_set(tmp_path):
    from tui.display import typed_set

    text = TYPED.replace('P = "72.5 psia"', 'P = "4 barg"').replace('T = "77 degF"', 'T = "25 C"')
    units = typed_set(sheet(text))
    assert units["P"] == "bar" and units["T"] == "degC"  # barg shown absolute, in bar; '25 C' is °C
    # a specific volume typed as a molar one (L/mol) cannot show a mass-based v: the metric unit stays
    text = text.replace('m = "0.07 lb"', 'n = "2 mol"').replace('P = "4 barg"', 'v = "12 L/mol"')
    assert typed_set(sheet(text))["v"] == "m**3/kg"


def test_solve_on_the_command_line_in_the_units_typed(tmp_path):
    from tui.display import use_typed

    result = api.solve(sheet(TYPED))
    use_typed(result.problem.worksheet)
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(result_renderable(result, "typed"))
    shown = out.getvalue()
    assert "Result: end: T = 77 °F" in shown  # isothermal at the 77 °F typed
    (m_row,) = [ln for ln in shown.splitlines() if ln.split()[:2] == ["m", "lb"]]
    assert m_row.split()[2:] == ["0.07", "0.07"]


async def test_f2_reaches_the_units_as_typed(tmp_path, author):  # noqa: F811
    from tui.app import JoulebookApp
    from tui.session import Session

    app = JoulebookApp(Session.from_worksheet(sheet(TYPED), tmp_path / "typed.jbk"))
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await solve_on_results(pilot)
        for _ in range(2):  # metric -> US customary -> as typed
            await pilot.press("f2")
            await pilot.pause()
        assert app.units == "typed"
        shown = " ".join(text_of(app, "#balance").split())
        assert "crosses at 77 °F" in shown and "lb 0.07 0.07" in shown
