"""A mixture worksheet in the app: the fluid step keeps the composition typed in the file, and
the solve is the domain's (tests/test_mixture.py checks it against CoolProp)."""

from __future__ import annotations

from balance.worksheet import Worksheet
from tui.app import JoulebookApp
from tui.session import Session

from .test_mixture import CLOSED
from .test_tui_pilot import SIZE, author, kinds, next_step, ready, solve_on_results  # noqa: F401


async def test_the_fluid_step_keeps_a_composition_and_the_app_solves_it(tmp_path, author):  # noqa: F811
    session = Session.from_worksheet(Worksheet.from_toml(CLOSED), tmp_path / "bottle.jbk")
    session.step = "fluid"
    app = JoulebookApp(session)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await pilot.press("end", "backspace")  # the species' name edited: "rig fuel ga"
        for _ in range(4):  # states, terms, constraints, results
            await next_step(pilot)
        await solve_on_results(pilot)
        assert app.outcome.result is not None
    fluid = session.worksheet.fluid
    assert fluid.composition == {"CH4": "0.9", "C2H6": "0.07", "N2": "0.03"} and fluid.species == "rig fuel ga"
    assert session.record.worksheet().fluid.composition == fluid.composition
    assert kinds(session)[-1] == "solve"


async def test_a_mixture_typed_in_the_fluid_step_is_checked_where_it_is_typed_and_solved(tmp_path, author):  # noqa: F811
    """A sample bottle of a methane-propane mixture typed from the keys: fractions that do not add
    up are named under the Mixture row; a cold final state inside the envelope is refused with the
    dew point; warmed instead, it solves (the numbers are the domain's, tests/test_cubic_mixture.py)."""
    from .test_tui_pilot import fill, in_row, new_app, settle, tick_constraints, type_fluid, type_purpose, type_state

    app = new_app(tmp_path, "bottle.jbk")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await type_purpose(pilot, "Sample bottle SB-2 warmed", "LAB-7", "heat to 50 degC", "the gas", ["rigid"])
        await next_step(pilot)
        await fill(pilot, in_row("inside"), "the gas in SB-2")
        await next_step(pilot)
        await type_fluid(pilot, "CH4", 4)  # Peng-Robinson
        await fill(pilot, in_row("species"), "rig gas")
        await fill(pilot, in_row("composition"), "CH4 = 0.85; C3H8 = 0.1")
        await pilot.press("tab")
        await settle(pilot)
        row = app.screen.query_one("#composition")
        assert "add up to 0.95" in row.message
        await fill(pilot, in_row("composition"), "CH4 = 0.85; C3H8 = 0.15")
        await fill(pilot, in_row("kij"), "CH4-C3H8 = 0.02")
        await next_step(pilot)
        await type_state(pilot, "initial-0", "charged", {"T": "15 degC", "P": "60 bar", "V": "2 L"})
        await type_state(pilot, "final", "cold", {"T": "-40 degC"})
        await next_step(pilot)
        await pilot.press("ctrl+t")  # a heat term, Q '?'
        await settle(pilot)
        await next_step(pilot)
        await tick_constraints(pilot, ["rigid"])
        await settle(pilot)
        assert "splits into two phases" in app.check.message and "dew point T = 266.2" in app.check.message
        await pilot.press("escape", "4")
        await settle(pilot)
        await type_state(pilot, "final", "warmed", {"T": "50 degC"})
        await pilot.press("escape", "7")
        await solve_on_results(pilot)
        r = app.outcome.result
        assert r is not None and abs(r.final.point.T - 323.15) < 1e-9
    fluid = app.session.worksheet.fluid
    assert fluid.composition == {"CH4": "0.85", "C3H8": "0.15"} and fluid.kij == {"CH4-C3H8": "0.02"}
    assert kinds(app.session)[-1] == "solve"
