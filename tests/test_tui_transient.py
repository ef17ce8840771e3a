"""The app on a transient worksheet, by key presses: a fill typed from scratch and solved, bad input
said at its field, a sample walked, its history drawn, and screen snapshots at 80×24.

Outside check: the evacuated pot filled adiabatically ends where its gas's internal energy is the
supply's enthalpy at the supply's pressure (the uniform-state balance, u2 = h_s), here from CoolProp
8.0 HEOS for argon: a (P, U) flash from the supply's (T, P) enthalpy. Peng-Robinson and HEOS differ
by about a kelvin there (measured), hence the 2 K. The snapshots' expected output is the accepted
snapshot files (no outside source).
"""

from __future__ import annotations

import pytest

from balance import api
from tests.test_tui_flow import step_line, to_step
from tests.test_tui_pilot import (  # noqa: F401
    SIZE,
    author,
    fill,
    focus,
    in_row,
    is_widget,
    kinds,
    new_app,
    ready,
    sample_app,
    settle,
    solve_on_results,
    type_fluid,
    wait_until,
)
from tests.test_tui_snapshots import app_at, fixed_author_and_clock, freeze, steady  # noqa: F401


async def choose(pilot, select_id: str, downs: int) -> None:
    """Open a drop-down list, move to its entry ``downs`` below the first, choose it."""
    await focus(pilot, is_widget(select_id))
    await pilot.press("enter", "home", *["down"] * downs, "enter")
    await settle(pilot)


async def test_an_evacuated_pot_filled_from_a_header_typed_from_scratch(tmp_path, author):
    import CoolProp.CoolProp as CP

    app = new_app(tmp_path, "pot.jbk")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("title"), "Pot BP-9 filled from the argon header")
        await to_step(pilot, "boundary")
        await focus(pilot, is_widget("kind"))
        await pilot.press("home", "down", "down", "enter")  # transient
        await settle(pilot)
        assert app.session.worksheet.system.kind == "transient"
        assert app.steps.order[3:6] == ("vessels", "lines", "end")
        assert "4 Vessels" in step_line(app, "vessels")
        await to_step(pilot, "fluid")
        await type_fluid(pilot, "Ar", 4)  # Peng-Robinson
        await to_step(pilot, "vessels")
        await fill(pilot, in_row("name", "vessel-0"), "BP-9")
        await fill(pilot, in_row("V", "vessel-0"), "-40 L")  # bad: said at the field
        await settle(pilot)
        row = app.screen.query_one("#vessel-0 #V")
        await wait_until(pilot, lambda: "must be positive" in row.message, what="the volume's message")
        assert "✗" in step_line(app, "vessels")
        await fill(pilot, in_row("V", "vessel-0"), "40 L")
        await choose(pilot, "start", 1)  # evacuated
        await fill(pilot, in_row("state-T", "vessel-0"), "18 degC")
        await to_step(pilot, "lines")
        await fill(pilot, in_row("name", "line-0"), "fill line")
        await choose(pilot, "restriction", 0)  # orifice
        await fill(pilot, in_row("supply-T", "line-0"), "18 degC")
        await fill(pilot, in_row("supply-P", "line-0"), "12 barg")
        await fill(pilot, in_row("value-orifice", "line-0"), "1.5 mm")
        await fill(pilot, in_row("value-Cd", "line-0"), "1.5")  # bad: above 1
        await settle(pilot)
        cd = app.screen.query_one("#line-0 #value-Cd")
        await wait_until(pilot, lambda: "at most 1" in cd.message, what="the Cd's message")
        await fill(pilot, in_row("value-Cd", "line-0"), "0.8")
        await to_step(pilot, "end")
        await fill(pilot, in_row("end-value"), "50 barg")  # bad: above the header's pressure
        await settle(pilot)
        value = app.screen.query_one("#end-value")
        await wait_until(pilot, lambda: "an end pressure between" in value.message, what="the end's message")
        await choose(pilot, "end-kind", 3)  # balanced
        ws = app.session.worksheet
        assert ws.end.balanced and ws.vessels[0].empty and ws.lines[0].values == {"orifice": "1.5 mm", "Cd": "0.8"}
        await wait_until(pilot, lambda: app.check is not None and app.check.ready, what="ready")
        await pilot.press("ctrl+r")
        await solve_on_results(pilot)
        r = app.outcome.result
        assert r is not None, app.outcome.error
        same = api.solve(ws)
        assert r.history.end_points["BP-9"].T == pytest.approx(same.history.end_points["BP-9"].T, rel=1e-12)
        # CoolProp 8.0 HEOS: u2 = h of the supply (18 °C, 12 barg) at the supply's pressure
        P = 12e5 + 101325.0
        h_s = CP.PropsSI("Hmass", "T", 291.15, "P", P, "Argon")
        T2 = CP.PropsSI("T", "P", P, "Umass", h_s, "Argon")
        assert abs(r.end_state.vessels[0].end.T - T2) < 2.0
        assert "solved:" in str(app.screen.query_one("#outcome").render())
        entries = kinds(app.session)
        assert "vessels" in entries and "lines" in entries and "end condition" in entries and entries[-1] == "solve"


async def test_the_equalising_receivers_draw_their_history(tmp_path, author):
    app = sample_app(tmp_path, "n2-receivers-equalise.toml")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        for step in ("boundary", "fluid", "vessels", "lines", "end", "results"):
            await to_step(pilot, step)
        await solve_on_results(pilot)
        await wait_until(pilot, lambda: app.outcome.trace is not None, what="the history's trace")
        await pilot.press("shift+tab", "right")  # from the balance to the tab bar, then T–t
        await settle(pilot)
        assert app.screen.query_one("#tabs").active == "tab-hist-T"
        plot = app.screen.query_one("#hist-T")
        assert plot.trace is not None and [v[0] for v in plot.trace.vessels] == ["R-41", "R-42"]
        await pilot.press("right")
        await settle(pilot)
        assert app.screen.query_one("#tabs").active == "tab-hist-P"


@pytest.mark.parametrize("step", ["vessels", "lines", "end"])
def test_the_co2_receivers_step(snap_compare, tmp_path, step):
    assert snap_compare(app_at(tmp_path, "co2-receiver-flare-depressure.toml", step), terminal_size=SIZE,
                        run_before=steady)


def test_the_equalising_receivers_results(snap_compare, tmp_path):
    async def run_before(pilot):
        await ready(pilot)
        app = pilot.app
        await wait_until(pilot, lambda: app.outcome is not None and not app.busy, what="the solve")
        await settle(pilot)
        freeze(app)
        await pilot.pause()

    assert snap_compare(app_at(tmp_path, "n2-receivers-equalise.toml", "results"), terminal_size=SIZE,
                        run_before=run_before)
