"""The results step draws a steady-flow network on the T–s, h–s and P–h planes, at 80×24, keys only.

What is held and its source:
- a valve's path keeps the enthalpy (an adiabatic valve does no work and its kinetic energy
  change is neglected: the steady-flow energy balance, common practice, no source), so on the
  h–s plane it is horizontal: every point of it has the inlet's h;
- a heater with no pressure drop (the sample's assumption) runs along one isobar;
- R134a's valve outlet is two-phase: CoolProp HEOS, computed in the test, puts the liquid's
  enthalpy (35 °C, 10.17 bar) between the saturated liquid's and vapour's at 2.43 bar, and the
  app's outlet is at that pressure's saturation temperature; so the P–h view holds the dome;
- the P–h pressure axis is logarithmic and says so (common practice for refrigerant charts, no source).
The screen's words are the app's own (the titles, the axis labels); the snapshot is the accepted SVG.
"""

from __future__ import annotations

import math

from tests.test_tui_frame import on_screen, screen_lines
from tests.test_tui_pilot import SIZE, author, ready, sample_app, settle, wait_until  # noqa: F401
from tests.test_tui_snapshots import app_at, fixed_author_and_clock, steady  # noqa: F401
from tui.widgets.flow_diagram import FlowDiagram

LETDOWN = "gas-letdown-preheated.toml"
CHILLER = "r134a-chiller-evaporator-condenser.toml"


async def _results(pilot):
    app = pilot.app
    await ready(pilot)
    await wait_until(pilot, lambda: app.outcome is not None and app.outcome.trace is not None, what="the diagrams")
    await settle(pilot)


def _shown_tabs(app) -> list[str]:
    from textual.widgets import TabbedContent

    tabs = app.screen.query_one("#tabs", TabbedContent)
    return [str(t.label) for t in tabs.query("ContentTab") if t.display]


async def test_the_letdown_is_drawn_on_three_planes_with_its_heater_and_valve(tmp_path, author):
    app = sample_app(tmp_path, LETDOWN)
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await _results(pilot)
        assert _shown_tabs(app) == ["Balance", "T–s", "h–s", "P–h", "Sweep"]
        assert not on_screen(app, "No diagram")
        await pilot.press("shift+tab", "right")  # from the balance to the tab bar, then T–s
        await settle(pilot)
        assert app.screen.query_one("#tabs").active == "tab-flow-ts"
        assert on_screen(app, "E-201 isobar") and on_screen(app, "PCV-201 isenthalpic")
        assert on_screen(app, "T [°C]") and on_screen(app, "s [kJ/(kg·K)]")
        for stream in ("pipeline", "heated", "header"):
            assert on_screen(app, stream)
        await pilot.press("right")  # h–s
        await settle(pilot)
        assert app.screen.query_one("#tabs").active == "tab-flow-hs"
        assert on_screen(app, "h [kJ/kg]")
        trace = app.outcome.trace.on("h-s")
        valve = next(c for c in trace.curves if c.device == "PCV-201")
        heater = next(c for c in trace.curves if c.device == "E-201")
        assert (valve.style, heater.style) == ("isenthalpic", "isobar")
        _, hs = trace.xy(valve)
        assert len(hs) > 20 and max(hs) - min(hs) < 1e-9 * max(1.0, abs(hs[0]))  # horizontal
        assert max(heater.P) - min(heater.P) < 1e-9 * max(heater.P)  # the heater's one isobar
        await pilot.press("right")  # P–h: a log pressure axis
        await settle(pilot)
        assert app.screen.query_one("#tabs").active == "tab-flow-ph"
        assert any(line.lstrip().startswith("P [bar(a)], log scale") for line in screen_lines(app))
        widget = app.screen.query_one("#flow-ph", FlowDiagram)
        assert widget.trace.plane == "P-h" and widget.dome_shown is False  # methane gas far above its dome


async def test_the_chiller_on_p_h_shows_the_dome_and_a_log_pressure_axis(tmp_path, author):
    import CoolProp.CoolProp as CP

    from tui import offload

    app = sample_app(tmp_path, CHILLER)  # the reference model: traced in its own process
    app.session.step = "results"
    try:
        async with app.run_test(size=SIZE) as pilot:
            await _results(pilot)
            await pilot.press("shift+tab", "right", "right", "right")  # T–s, h–s, then P–h
            await settle(pilot)
            assert app.screen.query_one("#tabs").active == "tab-flow-ph"
            widget = app.screen.query_one("#flow-ph", FlowDiagram)
            assert widget.dome_shown
            assert on_screen(app, "dome grey")
            assert any(line.lstrip().startswith("P [bar(a)], log scale") for line in screen_lines(app))
            assert on_screen(app, "h [kJ/kg]")
            trace = app.outcome.trace.on("P-h")
            assert [c.style for c in trace.curves if c.device == "K-701"] == ["isentropic", "jump"]
            # the valve outlet is two-phase by CoolProp HEOS: its enthalpy between the saturated
            # liquid's and vapour's at 2.43 bar, so it lies under the dome the view shows
            P = 2.43e5
            h_liquid = CP.PropsSI("H", "T", 308.15, "P", 10.17e5, "R134a")
            h_f, h_g = (CP.PropsSI("H", "P", P, "Q", q, "R134a") for q in (0, 1))
            assert h_f < h_liquid < h_g
            _, _, T, P_out, *_ = next(st for st in trace.states if st[0] == "after valve")
            assert math.isclose(P_out, P, rel_tol=1e-9)
            # two-phase, so at the saturation temperature of its pressure (the app's enthalpies have
            # their own reference state: the temperature is compared, not h)
            assert math.isclose(T, CP.PropsSI("T", "P", P, "Q", 0.5, "R134a"), abs_tol=0.05)
    finally:
        offload.shutdown()


def test_letdown_t_s_diagram(snap_compare, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await pilot.press("shift+tab", "right")  # T–s
        await settle(pilot)

    assert snap_compare(app_at(tmp_path, LETDOWN, "results"), terminal_size=SIZE, run_before=run_before)
