"""A liquid-full rigid vessel on the incompressible model: the model fixes v, not P, so the output
says in words that it cannot give the pressure (never "P = nan Pa"), warns that a real liquid
heated there raises its pressure sharply (why liquid-full equipment gets thermal relief; common
practice, no source) and points to the reference model for the pressure.

Checks: the incompressible closed form T2 = T1 + Q/(m cp), S_gen = m cp ln(T2/T1) - Q/T_b with
the model's own cp (common practice, no source); the pressure rise of the same water on the
reference model (CoolProp 8.0, IAPWS-95: 1 bar to about 60 bar for 10 K).
"""

from __future__ import annotations

import io
import math

import pytest
from rich.console import Console

from balance import api
from balance.record.solve_text import solve_text
from balance.worksheet import Worksheet
from tests.helpers import sheet
from tests.test_output_app import text_of
from tests.test_tui_pilot import SIZE, author, ready, solve_on_results  # noqa: F401  (fixture)
from tui.app import JoulebookApp
from tui.render import headline, result_renderable
from tui.session import Session

DRUM = """
[worksheet]
title = "Water-full drum heated by an element"
[fluid]
species = "H2O"
model = "incompressible"
[[initial]]
name = "cold"
T = "20 degC"
P = "1 bar"
m = "10 kg"
[final]
name = "warm"
T = "?"
[[heat]]
name = "element"
Q = "418 kJ"
T_boundary = "200 degC"
[process]
constraints = ["rigid"]
"""

CAUTION = "model fixes the liquid's volume, not its pressure: it cannot give the pressure of 'warm'"


@pytest.fixture(scope="module")
def drum():
    return api.solve(sheet(DRUM))


def shown(r, units: str) -> str:
    out = io.StringIO()
    Console(file=out, width=400, color_system=None).print(result_renderable(r, units))
    return " ".join(out.getvalue().split())


def numbers_only(text: str) -> str:
    """The text without its warnings: the model's own warning says in words that P, h and Z are
    left as NaN (its text is the model's, not the output's numbers)."""
    start = text.find("Warnings")
    end = text.find("Cautions", start)
    return text if start < 0 else text[:start] + text[end:]


def test_the_drum_follows_the_closed_form(drum):
    m, Q = 10.0, 418e3
    cp = drum.final.point.cp / drum.final.M  # J/(kg K), the model's constant cp
    T2 = 293.15 + Q / (m * cp)
    assert drum.final.point.T == pytest.approx(T2, rel=1e-13)
    assert drum.S_gen == pytest.approx(m * cp * math.log(T2 / 293.15) - Q / 473.15, rel=1e-12)
    assert math.isnan(drum.final.point.P)  # the model does not determine it


def test_no_nan_is_shown_anywhere(drum):
    assert not any("nan" in e.lower() for e in drum.equations)
    for units in ("si", "metric", "us"):
        assert "nan" not in numbers_only(shown(drum, units)).lower()
        assert "P not determined by the model" in headline(drum, units)
    text = solve_text(api.as_json(drum))
    assert "nan" not in numbers_only(text).lower()


def test_the_explanation_says_the_model_cannot_give_the_pressure(drum):
    (state,) = [e for e in drum.equations if e.startswith("State warm:")]
    assert "P not determined by the model (it fixes v, not P)" in state
    assert ("  not split into ideal-gas and departure parts: the incompressible model has no ideal-gas state"
            in drum.equations)


def test_the_caution_warns_of_the_pressure_rise_and_points_to_the_reference_model(drum):
    (c,) = [str(c) for c in drum.cautions if CAUTION in str(c)]
    assert "A real liquid heated in a closed, rigid vessel it fills raises its pressure sharply" in c
    assert "liquid-full equipment that can be blocked in and heated gets thermal relief" in c
    assert "follow the code that governs the equipment" in c
    assert c.endswith('solve the same worksheet with the reference model (model = "reference"), which gives '
                      "water's compressibility.")
    assert not any("Pressures up to" in str(x) for x in drum.cautions)  # no pressure is claimed


def test_the_reference_model_gives_the_pressure_the_caution_warns_of():
    r = api.solve(sheet(DRUM.replace('model = "incompressible"', 'model = "reference"')))
    # IAPWS-95 through CoolProp 8.0: 10 K of heating liquid-full takes 1 bar to about 60 bar
    assert r.final.point.P / 1e5 == pytest.approx(59.6, abs=1.0)
    assert not any(CAUTION in str(c) for c in r.cautions)


async def test_the_results_step_says_it_in_words(tmp_path, author):  # noqa: F811
    session = Session.from_worksheet(Worksheet.from_toml(DRUM), tmp_path / "drum.jbk")
    session.step = "results"
    app = JoulebookApp(session)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await solve_on_results(pilot)
        head = " ".join(text_of(app, "#outcome").split())
        assert head.startswith("solved: warm: T = 29.997 °C, P not determined by the model;")
        balance = " ".join(text_of(app, "#balance").split())
        assert CAUTION in balance and "nan" not in numbers_only(balance).lower()
