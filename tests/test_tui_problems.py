"""Nothing invalid is taken as valid: every check the domain makes on a field is shown at
that field and counted in the step list (✗ and the number of fields at fault) as it is
typed, and it is still there on coming back to the step. Key presses only, at 80×24.

The expected words are what an engineer reading the message needs (common practice, no
source): the field, and what is wrong with it (below absolute zero; what contradicts it).
"""

from __future__ import annotations

from tests.test_tui_pilot import (SIZE, author, fill, in_row, next_step, ready, sample_app,  # noqa: F401
                                  settle)
from tui.widgets.field_row import FieldRow
from tui.widgets.step_list import StepList

DEMO = "n2-buffer-into-receiver.toml"


def row(app, form: str, row_id: str) -> FieldRow:
    return app.screen.query_one(f"#{form}").query_one(f"#{row_id}", FieldRow)


def step_line(app, number: int) -> str:
    """The step's line in the step list, as drawn on the screen."""
    steps = app.screen.query_one(StepList)
    drawn = [strip.text for strip in app.screen._compositor.render_strips()]
    row = steps.region.y + number - 1
    return drawn[row][steps.region.x + 1:steps.region.right].rstrip()


# a state field and what its message must say: below absolute zero is not a temperature
BAD_T = [
    ("-5 K", "absolute zero"),
    ("-300 degC", "absolute zero"),
    ("0 K", "absolute zero"),
    ("abc", "a temperature"),
]


async def test_a_bad_temperature_is_shown_at_its_field_and_counted_in_the_step_list(tmp_path, author):
    app = sample_app(tmp_path, DEMO)
    app.session.step = "states"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        assert step_line(app, 4) == "✓  4 States"
        for text, words in BAD_T:
            await fill(pilot, in_row("prop-T", "initial-0"), text)
            await settle(pilot)
            shown = row(app, "initial-0", "prop-T").message
            assert "T" in shown and words in shown, (text, shown)
            assert app.statuses["states"] == "invalid"
            assert step_line(app, 4) == "✗1 4 States", text
            assert not app.check.ready
        # a second field at fault: the count says two
        await fill(pilot, in_row("prop-P", "initial-0"), "150 bargg")
        await settle(pilot)
        assert step_line(app, 4) == "✗2 4 States"
        await fill(pilot, in_row("prop-P", "initial-0"), "150 barg")
        await fill(pilot, in_row("prop-T", "initial-0"), "20 degC")
        await settle(pilot)
        assert row(app, "initial-0", "prop-T").message == ""
        assert step_line(app, 4) == "✓  4 States" and app.check.ready


async def test_messages_are_still_there_on_coming_back_to_the_step(tmp_path, author):
    app = sample_app(tmp_path, DEMO)
    app.session.step = "states"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("prop-T", "initial-0"), "abc")
        await fill(pilot, in_row("prop-P", "initial-0"), "-300 degC")
        await settle(pilot)
        before = (row(app, "initial-0", "prop-T").message, row(app, "initial-0", "prop-P").message)
        assert all(before)
        await next_step(pilot)
        await pilot.press("ctrl+o")
        await pilot.pause(0.2)
        await settle(pilot)
        assert app.session.step == "states"
        after = (row(app, "initial-0", "prop-T").message, row(app, "initial-0", "prop-P").message)
        assert after == before
        assert row(app, "initial-0", "prop-T").value == "abc"  # the text as typed
        assert step_line(app, 4) == "✗2 4 States"


async def test_a_final_temperature_that_contradicts_isothermal_is_shown_at_it(tmp_path, author):
    app = sample_app(tmp_path, "methane-piston-isothermal.toml")
    app.session.step = "states"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        assert app.check.ready
        await fill(pilot, in_row("prop-T", "final"), "350 K")
        await settle(pilot)
        shown = row(app, "final", "prop-T").message
        assert "isothermal" in shown and "remove one" in shown, shown
        assert app.statuses["states"] == "invalid" and step_line(app, 4) == "✗1 4 States"
        assert not app.check.ready


# -- what the record receives ------------------------------------------------------------
def notices(seen: list) -> list[str]:
    return [m.notification.message for m in seen if type(m).__name__ == "Notify"]


async def test_a_step_at_fault_stays_in_the_draft_and_the_record_receives_it_once_put_right(tmp_path, author):
    import json

    app = sample_app(tmp_path, DEMO)
    app.session.step = "states"
    session = app.session
    seen: list = []
    async with app.run_test(size=SIZE, message_hook=seen.append) as pilot:
        await ready(pilot)
        entries = len(session.entries())
        await fill(pilot, in_row("prop-T", "initial-0"), "-5 K")
        await next_step(pilot)  # leaving the step: nothing of it is committed
        assert session.step == "terms"
        assert len(session.entries()) == entries
        assert session.dirty() == ("initial",) and session.record.worksheet().initial[0].props["T"] == "20 degC"
        assert json.loads(session.draft_path.read_text())["worksheet"]["initial"][0]["props"]["T"] == "-5 K"
        assert any("4 States not committed: 1 field at fault (kept in the draft)" in n for n in notices(seen))
        await pilot.press("ctrl+s")  # says what it saved: nothing, and why
        await settle(pilot)
        assert notices(seen)[-1] == "step 4 States not committed: 1 field at fault (kept in the draft)"
        assert len(session.entries()) == entries

        await pilot.press("ctrl+o")
        await pilot.pause(0.2)
        await settle(pilot)
        await fill(pilot, in_row("prop-T", "initial-0"), "25 degC")
        await settle(pilot)
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert notices(seen)[-1] == f"committed States to {session.path.name} (entry {entries + 1})"
        entry = session.entries()[-1]
        assert entry.kind == "initial state" and entry.data["initial"][0]["T"] == "25 degC"
        assert session.dirty() == ()


async def test_ctrl_r_on_a_sheet_not_ready_says_why_and_goes_to_the_first_field_at_fault(tmp_path, author):
    app = sample_app(tmp_path, DEMO)
    app.session.step = "states"
    seen: list = []
    async with app.run_test(size=SIZE, message_hook=seen.append) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("prop-P", "initial-0"), "150 bargg")
        await next_step(pilot)
        await next_step(pilot)
        assert app.session.step == "constraints"
        await pilot.press("ctrl+r")
        await pilot.pause(0.3)
        await settle(pilot)
        assert app.session.step == "states"
        assert in_row("prop-P", "initial-0")(app.focused)
        said = notices(seen)[-1]
        assert said.startswith("not solved: 1 field at fault; the first, in step 4: P (initial 'V-101')")
        assert "150 bargg" in said
        assert app.outcome is None  # nothing was solved
