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
    """Whether ``text`` is drawn whole, wrapped onto as many lines as it takes (across the
    screen's width, or in the form's column, right of the step list). A word longer than the
    line (a path) is broken inside it, so the text is compared without its spaces."""
    lines = screen_lines(app)
    wanted = "".join(text.split())
    for start in (0, 18):
        drawn = "".join("".join(line[start:].split()) for line in lines)
        if wanted in drawn:
            return True
    return False


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


# -- ticks read without colour; implied constraints; the keys --------------------------------
async def test_ticked_and_unticked_differ_in_their_characters_and_implied_constraints_are_shown(tmp_path, author):
    from balance import api
    from tui.analysis import IMPLIED
    from tui.widgets.check_list import CheckList
    from tui.widgets.tick_box import TickBox

    app = sample_app(tmp_path, DEMO)  # free expansion ticked: rigid and adiabatic follow from it
    app.session.step = "states"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        boxes = list(app.screen.query(TickBox))
        assert [b.value for b in boxes] == [False, True]  # V-101 holds gas, V-102 is evacuated
        assert on_screen(app, "[ ] evacuated: only a volume") and on_screen(app, "[x] evacuated: only a volume")
        await next_step(pilot)
        await next_step(pilot)
        assert app.session.step == "constraints"
        ticks = app.screen.query_one(CheckList)
        assert ticks.mark("free-expansion") == "[x]" and ticks.mark("isothermal") == "[ ]"
        assert ticks.mark("rigid") == ticks.mark("adiabatic") == "[=]"
        assert on_screen(app, "[=] rigid — implied by free expansion")
        assert on_screen(app, "[=] adiabatic — implied by free expansion")
        # the table the list shows is the domain's: the constraints in force, as counted
        assert set(app.check.constraints) == {"free-expansion", *IMPLIED["free-expansion"]}
        rupture = api.check(app.session.worksheet.with_(
            process=app.session.worksheet.process.__class__(constraints=("membrane-rupture", "adiabatic"))))
        assert set(rupture.constraints) == {"membrane-rupture", "adiabatic", *IMPLIED["membrane-rupture"]}


async def test_tab_goes_from_field_to_field_and_a_space_on_a_list_stays_there(tmp_path, author):
    from tui.widgets.check_list import CheckList

    app = sample_app(tmp_path, "argon-membrane-rupture.toml")  # two compartments: each has a remove button
    app.session.step = "states"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await focus(pilot, in_row("amount-V", "initial-1"))
        await pilot.press("tab")
        assert in_row("name", "final")(app.focused)  # the next field, not '+ compartment'
        # Tab across the whole step never lands on a button (Enter would fire it)
        for _ in range(40):
            await pilot.press("tab")
            assert type(app.focused).__name__ != "Button", app.focused
        await next_step(pilot)
        await next_step(pilot)
        assert app.session.step == "constraints"
        await focus(pilot, is_widget("constraints"))
        before = app.screen.query_one(CheckList).ticked
        await pilot.press("down", "space")  # ticks 'adiabatic' (the cursor starts on 'rigid')
        await settle(pilot)
        assert app.screen.query_one(CheckList).ticked != before
        await pilot.press("tab")
        assert in_row("n")(app.focused) and app.focused.value == ""  # the space stayed in the list
        await pilot.press("shift+tab", "space")
        await settle(pilot)
        assert app.screen.query_one(CheckList).ticked == before
        assert app.session.worksheet.process.n == ""


def test_every_step_with_a_list_says_its_arrow_keys_in_its_help():
    from tui.screens.help import KEYS
    from tui.steps import STEPS, screen_class

    assert "↑" in KEYS and "space" in KEYS
    for step in STEPS:
        if step.id in ("purpose", "boundary", "fluid", "constraints", "review"):
            assert "↑/↓" in screen_class(step.id).HELP, step.id
    assert "←/→" in screen_class("results").HELP


async def test_the_terms_note_follows_the_terms(tmp_path, author):
    app = sample_app(tmp_path, DEMO)  # no heat or work terms
    app.session.step = "terms"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        assert on_screen(app, "No terms: Q = 0 and W = 0.")
        await pilot.press("ctrl+f")  # a work term
        await settle(pilot)
        assert not on_screen(app, "No terms")
        await pilot.press("ctrl+g")  # removed again
        await settle(pilot)
        assert on_screen(app, "No terms: Q = 0 and W = 0.")


async def test_the_adequacy_hint_of_step_3_is_on_screen_without_scrolling(tmp_path, author):
    app = sample_app(tmp_path, DEMO)
    app.session.step = "fluid"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        from tests.test_tui_pilot import wait_until

        await wait_until(pilot, lambda: app.advice is not None, what="advice")
        await settle(pilot)
        advice = app.screen.query_one("#advice")
        form = app.screen.query_one("#form")
        assert form.scroll_y == 0
        assert advice.region.height >= 3 and advice.region.bottom <= form.region.bottom
        assert on_screen(app, app.advice.recommendation)
        # moving on to the model list gives the species matches' lines to the hint
        await focus(pilot, is_widget("model"))
        await settle(pilot)
        assert not app.screen.query_one("#species-results").display
        assert advice.region.bottom <= form.region.bottom


# -- sign-off ---------------------------------------------------------------------------------
async def test_an_unsigned_sign_off_is_never_reported_as_a_plain_pass(tmp_path, author, monkeypatch):
    from tui.screens import sign

    monkeypatch.setattr(sign, "default_key", lambda: "")  # no key found on this machine
    app = sample_app(tmp_path, DEMO)
    app.session.step = "review"
    seen: list = []
    async with app.run_test(size=SIZE, message_hook=seen.append) as pilot:
        await ready(pilot)
        await pilot.press("ctrl+g")
        await pilot.pause(0.2)
        key = app.screen.query_one("#key")
        # the field's hint cannot be taken for a typed path: it is a sentence in brackets
        assert key.value == "" and key.input.placeholder.startswith("(none")
        assert "/" not in key.input.placeholder and "~" not in key.input.placeholder
        assert on_screen(app, "e.g. ~/.ssh/id_ed25519; signed with ssh-keygen -Y sign")
        await focus(pilot, is_widget("unsigned"))
        await pilot.press("space")
        await focus(pilot, is_widget("sign"))
        await pilot.press("enter")
        await settle(pilot)
        said = [m.notification.message for m in seen if type(m).__name__ == "Notify"]
        assert said[-1].startswith("signed off: prepared by t.engineer, unsigned (no signature) (entry ")
        assert on_screen(app, "UNSIGNED: no signature proves who did")
        await focus(pilot, is_widget("verify"))
        await pilot.press("enter")
        await settle(pilot)
        said = [m.notification.message for m in seen if type(m).__name__ == "Notify"]
        assert said[-1].startswith("the record verifies: chain intact")
        assert "UNSIGNED sign-off, no signature: prepared by t.engineer (entry " in said[-1]


# -- the report, from the app -------------------------------------------------------------------
async def test_the_report_is_exported_from_the_app_as_markdown_and_html(tmp_path, author):
    app = sample_app(tmp_path, DEMO)
    app.session.step = "review"
    seen: list = []
    async with app.run_test(size=SIZE, message_hook=seen.append) as pilot:
        await ready(pilot)
        await pilot.press("f3")
        await pilot.pause(0.2)
        assert type(app.screen).__name__ == "ExportScreen"
        await pilot.press("enter")  # Markdown (the first format); on to the file
        assert app.focused.value == str(tmp_path / "n2-buffer-into-receiver-report.md")
        await pilot.press("enter")
        await settle(pilot)
        md = (tmp_path / "n2-buffer-into-receiver-report.md").read_text()
        assert md.startswith("# N2 buffer vessel V-101 emptied into evacuated receiver V-102")
        said = [m.notification.message for m in seen if type(m).__name__ == "Notify"]
        assert said[-1].startswith("report written (Markdown, 8 entries): ")

        await pilot.press("f3")
        await pilot.pause(0.2)
        await pilot.press("down", "space")  # HTML: the file follows the format
        assert app.focused.value == str(tmp_path / "n2-buffer-into-receiver-report.html")
        await pilot.press("end", "ctrl+u", *str(tmp_path / "calc.html"), "enter")
        await settle(pilot)
        page = (tmp_path / "calc.html").read_text()
        assert page.lstrip().lower().startswith("<!doctype html") and "V-102" in page


# -- two models side by side ---------------------------------------------------------------------
async def test_the_worksheet_is_compared_on_the_reference_model_solved_in_its_own_process(tmp_path, author):
    import math
    import multiprocessing

    from balance import api
    from tests.test_tui_pilot import wait_until
    from tui import analysis, offload

    app = sample_app(tmp_path, "methane-piston-isothermal.toml")  # Soave-Redlich-Kwong
    app.session.step = "results"
    try:
        async with app.run_test(size=SIZE) as pilot:
            await ready(pilot)
            await wait_until(pilot, lambda: app.outcome is not None and app.outcome.result is not None,
                             what="the solve")
            entries = len(app.session.entries())
            await pilot.press("f4")
            await pilot.pause(0.2)
            assert type(app.screen).__name__ == "CompareScreen"
            await pilot.press("end", "enter")  # the last model listed: the reference EOS
            await wait_until(pilot, lambda: app.comparison is not None and not app.busy, timeout=120,
                             what="the comparison")
            await settle(pilot)
            assert multiprocessing.active_children()  # solved in the reference model's process
            c = app.comparison
            rows = {label: (a, b) for label, _, a, b in c.rows}
            own = app.outcome.result
            # the first column is the solve on screen, not another one
            assert c.attempts[0].result is own and rows["P end"][0] == own.final.point.P
            # the second is the worksheet solved on the reference model (CoolProp 8.0)
            reference = api.attempt(analysis.with_model(app.session.worksheet, "reference")).result
            q_ref = next(t for t in reference.terms if t.name == "jacket").value
            assert math.isclose(rows["Q 'jacket'"][1], q_ref, rel_tol=1e-9)
            assert math.isclose(rows["T end"][1], reference.final.point.T, rel_tol=1e-9)
            # side by side on screen, with the difference, and nothing recorded
            assert on_screen(app, "A: Soave–Redlich–Kwong B: reference EOS (CoolProp)")
            assert any(line.lstrip("│ ").startswith("Q 'jacket'") for line in screen_lines(app))
            assert len(app.session.entries()) == entries
    finally:
        offload.shutdown()


# -- diagrams --------------------------------------------------------------------------------------
async def test_the_diagrams_label_their_log_axes_and_draw_the_path_through_the_model_states(tmp_path, author):
    from tests.test_tui_pilot import wait_until

    app = sample_app(tmp_path, "methane-piston-isothermal.toml")  # Soave-Redlich-Kwong: it has a dome
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await wait_until(pilot, lambda: app.outcome is not None and app.outcome.trace is not None,
                         what="the diagram")
        await settle(pilot)
        styles = [c.style for c in app.outcome.trace.curves]
        assert styles == ["path", "dome"]
        await pilot.press("shift+tab", "right")  # from the balance to the tab bar, then P–v
        await settle(pilot)
        assert on_screen(app, "isothermal: 40 model states • · dome grey")
        assert on_screen(app, "v [m³/kg], log scale")
        assert any(line.lstrip().startswith("P [") and "], log scale" in line for line in screen_lines(app)), \
            "the pressure axis says it is logarithmic"
        await pilot.press("right")  # T–s: linear axes
        await settle(pilot)
        assert on_screen(app, "isothermal: 40 model states • · dome")
        assert not on_screen(app, "log scale")


# -- a record whose chain is broken -----------------------------------------------------------
async def test_a_broken_record_is_said_to_be_broken_on_opening_and_takes_no_commit(tmp_path, author):
    from tui.session import Session

    app = sample_app(tmp_path, DEMO)
    app.session.commit()
    path = app.session.path
    text = path.read_text()
    entries = text.split("\n\n")
    path.write_text(text.rstrip("\n") + "\n\n" + entries[2].strip("\n") + "\n")  # an entry filed twice
    app = JoulebookApp(Session.open(path))
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        bar = app.screen.query_one(NoticeBar)
        assert "the chain is BROKEN at entry" in bar.text and "It can be read, not extended" in bar.text
        await fill(pilot, in_row("title"), "typed after opening")
        await pilot.press("ctrl+s")
        await settle(pilot)
        assert "not committed" in app.screen.query_one(NoticeBar).text
    assert "typed after opening" not in path.read_text()  # the record is left as found
    assert "typed after opening" in Session.open(path).worksheet.heading.title  # and the draft keeps it
