"""The app at 80×24: what the frame shows is never cut, nothing covers an input, and what
is on screen is not stale. Key presses only; the checks read the screen as drawn.

Expected values are what the screen must show for an engineer to read it (common
practice, no source).
"""

from __future__ import annotations

from tests.test_tui_pilot import (SAMPLES, SIZE, author, fill, in_row, is_widget, focus, next_step,  # noqa: F401
                                  ready, sample_app, settle)
from tui.app import JoulebookApp
from tui.widgets.dof_line import DofLine
from tui.widgets.notice_bar import NoticeBar

DEMO = "n2-buffer-into-receiver.toml"


def screen_lines(app) -> list[str]:
    """The screen as drawn, line by line."""
    return [strip.text for strip in app.screen._compositor.render_strips()]


def on_screen(app, text: str) -> bool:
    """Whether ``text`` is drawn whole, wrapped at word ends onto as many lines as it takes."""
    drawn = " ".join(" ".join(line.split()) for line in screen_lines(app))
    return " ".join(text.split()) in drawn


async def test_a_long_degrees_of_freedom_line_wraps_and_is_never_cut(tmp_path, author):
    app = sample_app(tmp_path, DEMO)
    app.session.step = "states"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("prop-T", "initial-0"), "-5 K")
        await settle(pilot)
        line = app.screen.query_one(DofLine)
        message = line.text
        assert len(message) > 80  # longer than the screen is wide
        assert line.size.height >= 2
        assert on_screen(app, message), (message, screen_lines(app)[-6:])


async def test_notices_take_lines_of_their_own_and_cover_no_input(tmp_path, author):
    from tui.session import demo_session

    app = JoulebookApp(demo_session(SAMPLES / DEMO, tmp_path / "demo.jbk"))
    async with app.run_test(size=SIZE, notifications=True) as pilot:  # with Textual's toasts, as the app runs
        await ready(pilot)
        bar = app.screen.query_one(NoticeBar)
        assert bar.text.startswith("· demo record: ") and on_screen(app, bar.text)
        # every input, list and button of the form lies outside the bar (the form gives up lines)
        form = app.screen.query_one("#form")
        for widget in form.query("Input, TextArea, LineList, Button"):
            if widget.region.area:
                assert not widget.region.overlaps(bar.region), widget
        # Textual's toasts are not drawn over the step
        rack = app.screen.query_one("ToastRack")
        assert rack.region.height == 0
        # the sign convention (the choice the demo's notice used to cover) is on screen
        assert on_screen(app, "work done BY the system is positive")
