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
