"""The results step's sweep tab, by key presses: one input over a range, the cases solved in a
worker, a result drawn against it; bad input shown at its field. The rows are the domain's
(tests/test_sweep.py holds them to the solve of each case on its own)."""

from __future__ import annotations

from .test_output_app import text_of
from .test_tui_flow_diagrams import _results
from .test_tui_pilot import SIZE, author, fill, in_row, sample_app, settle, wait_until  # noqa: F401

LETDOWN = "gas-letdown-preheated.toml"


async def _to_sweep_tab(pilot) -> None:
    app = pilot.app
    await pilot.press("shift+tab")  # from the balance to the tab bar
    for _ in range(6):
        if app.screen.query_one("#tabs").active == "tab-sweep":
            break
        await pilot.press("right")
        await settle(pilot)
    assert app.screen.query_one("#tabs").active == "tab-sweep"


async def test_a_steady_flow_result_is_swept_over_its_supply_pressure(tmp_path, author):  # noqa: F811
    app = sample_app(tmp_path, LETDOWN)
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await _results(pilot)
        await _to_sweep_tab(pilot)
        path = app.screen.query_one("#sweep-path")
        assert path.value == "stream 'pipeline'.P"  # the first pressure the worksheet gives
        await fill(pilot, in_row("sweep-values"), "50 barg..70 barg")
        await fill(pilot, in_row("sweep-points"), "5")
        await pilot.press("enter")
        await wait_until(pilot, lambda: app.swept is not None, what="the sweep")
        await settle(pilot)
        sweep = app.swept.sweep
        assert sweep is not None and len(sweep.rows) == 5 and sweep.failed() == 0
        status = text_of(app, "#sweep-status")
        assert "5 cases" in status and "drawn: devices.E-201.Q_dot [W]" in status  # the heater's duty moves
        await pilot.press("pagedown")  # the next main result
        await settle(pilot)
        assert "drawn: devices.E-201.Q_dot [W]" not in text_of(app, "#sweep-status")
        entries = len(app.session.entries())
    assert len(app.session.entries()) == entries  # nothing of a sweep is recorded


async def test_a_bad_path_is_shown_under_its_field(tmp_path, author):  # noqa: F811
    app = sample_app(tmp_path, LETDOWN)
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await _results(pilot)
        await _to_sweep_tab(pilot)
        await fill(pilot, in_row("sweep-path"), "stream.nowhere.P")
        await fill(pilot, in_row("sweep-values"), "50 barg..70 barg")
        await pilot.press("enter")
        await wait_until(pilot, lambda: app.swept is not None, what="the sweep's refusal")
        await settle(pilot)
        assert "no stream of that name" in app.screen.query_one("#sweep-path").message
