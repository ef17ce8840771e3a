"""Bad input in every kind of field: an inline message naming the field and the
dimension expected, the text kept exactly as typed, the step marked invalid,
and no crash.

The messages are the domain's (balance.units.parse) with the field's label;
each expected phrase below is the dimension the field asks for (common
practice, no source: what an engineer reading the message needs to see).
These tests run on the draft alone (no record package needed).
"""

from __future__ import annotations

from balance.worksheet import Worksheet
from tests.test_tui_pilot import SIZE, author, fill, in_row, ready, settle, wait_until  # noqa: F401
from tui.app import JoulebookApp
from tui.session import Session
from tui.widgets.field_row import FieldRow

#: a worksheet with every kind of field present: two compartments, heat, work, polytropic n
EVERYTHING = """
[worksheet]
title = "every field"
purpose = "input checks"
basis = "1 mol"
[fluid]
species = "N2"
model = "peng-robinson"
[system]
inside = "the gas"
[[initial]]
name = "A"
T = "300 K"
P = "10 bar"
n = "1 mol"
[final]
name = "end"
T = "?"
P = "20 bar"
[[heat]]
name = "jacket"
Q = "?"
T_boundary = "300 K"
[[work]]
name = "shaft"
kind = "shaft"
W = "1 kJ"
[process]
constraints = ["polytropic"]
n = "1.3"
"""


def app_on(tmp_path, step: str) -> JoulebookApp:
    session = Session.from_worksheet(Worksheet.from_toml(EVERYTHING), tmp_path / "inputs.jbk")
    session.step = step
    return JoulebookApp(session)


def row_of(focused) -> FieldRow:
    return next(a for a in focused.ancestors if isinstance(a, FieldRow))


async def type_bad(pilot, predicate, text: str, *expected: str) -> FieldRow:
    """Type ``text``, then leave the field; the message must name every ``expected`` phrase."""
    await fill(pilot, predicate, text)
    row = row_of(pilot.app.focused)
    await pilot.press("tab")
    await settle(pilot, rounds=1)
    assert row.has_class("-invalid"), f"{text!r} was accepted in {row.field_label}"
    message = row.message
    for phrase in expected:
        assert phrase in message, f"{phrase!r} not in {message!r}"
    assert row.value == text  # nothing typed is lost
    return row


# (field in the states step, form, bad text, what the message must say)
STATE_CASES = [
    ("prop-T", "initial-0", "20 degX", ("T of initial state 1", "a temperature")),
    ("prop-P", "initial-0", "35 kg", ("P of initial state 1", "a pressure")),
    ("prop-v", "initial-0", "1 L", ("v of initial state 1", "a molar volume or a specific volume")),
    ("prop-rho", "initial-0", "300 kg/m2", ("rho of initial state 1", "density")),
    ("prop-u", "initial-0", "2800 kJ", ("u of initial state 1", "a molar energy or a specific energy")),
    ("prop-h", "initial-0", "hot", ("h of initial state 1", "energy")),
    ("prop-s", "initial-0", "6.5 kJ/kg", ("s of initial state 1", "entropy")),
    ("prop-x", "initial-0", "1.5", ("x of initial state 1", "between 0 and 1")),
    ("amount-n", "initial-0", "2 L", ("n of initial state 1", "an amount of substance or a mass")),
    ("amount-m", "initial-0", "2 mol", ("m of initial state 1", "a mass")),
    ("amount-V", "initial-0", "2 m2", ("V of initial state 1", "a volume")),
    ("prop-T", "final", "300 degK/s", ("T of the final state", "a temperature")),
    ("amount-V", "final", "-2 m3", ("V of the final state", "positive")),
]


async def test_every_state_field_rejects_bad_text_inline(tmp_path, author):
    app = app_on(tmp_path, "states")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        for row_id, form, text, expected in STATE_CASES:
            await type_bad(pilot, in_row(row_id, form), text, *expected)
        # an initial property cannot be the unknown
        await type_bad(pilot, in_row("prop-P", "initial-0"), "?", "cannot be unknown", "a pressure")
        await settle(pilot)
        assert app.statuses["states"] == "invalid"
        assert app.check.ready is False and app.check.message.startswith("not ready (step 4): initial")
        typed = app.session.worksheet
        assert typed.initial[0].props["T"] == "20 degX" and typed.final.amount["V"] == "-2 m3"
        assert app.is_running
    # and it comes back exactly as typed
    reopened = Session.open(tmp_path / "inputs.jbk")
    assert reopened.worksheet.initial[0].props == typed.initial[0].props


async def test_terms_fields_reject_bad_text_inline(tmp_path, author):
    app = app_on(tmp_path, "terms")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await type_bad(pilot, in_row("value", "heat-0"), "400 kW", "Q of heat term 1", "an energy")
        await type_bad(pilot, in_row("T_boundary", "heat-0"), "180",
                       "boundary temperature of heat term 1", "a temperature")
        await type_bad(pilot, in_row("value", "work-0"), "15 N", "W of work term 1", "an energy")
        await type_bad(pilot, in_row("value", "work-0"), "", "W of work term 1", "give an energy")
        await settle(pilot)
        assert app.statuses["terms"] == "invalid"
        assert app.session.worksheet.heat[0].T_boundary == "180"
        assert app.is_running


async def test_purpose_boundary_and_process_fields_reject_bad_text(tmp_path, author):
    app = app_on(tmp_path, "purpose")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await type_bad(pilot, in_row("atmosphere"), "1 barr", "atmosphere", "a pressure")
        await settle(pilot)
        assert app.statuses["purpose"] == "invalid"
        await pilot.press("ctrl+n")
        await settle(pilot)
        await type_bad(pilot, in_row("boundary-T"), "warm", "boundary temperature", "a temperature")
        # the boundary temperature of step 2 is written to the heat terms, as typed
        assert app.session.worksheet.heat[0].T_boundary == "warm"
        for step in ("fluid", "states", "terms", "constraints"):  # each step shown before the next key
            await pilot.press("ctrl+n")
            await wait_until(pilot, lambda: app.session.step == step and app.screen.is_current, what=step)
            await settle(pilot)
        assert app.session.step == "constraints"
        await type_bad(pilot, in_row("n"), "1.3 K", "polytropic n", "a pure number")
        await type_bad(pilot, in_row("dKE"), "5 m/s", "ΔKE", "an energy")
        await settle(pilot)
        assert app.statuses["constraints"] == "invalid"
        assert app.session.worksheet.process.n == "1.3 K"
        assert app.is_running


async def test_the_message_goes_when_the_text_is_put_right(tmp_path, author):
    app = app_on(tmp_path, "purpose")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        row = await type_bad(pilot, in_row("atmosphere"), "1 barr", "atmosphere", "a pressure")
        assert row.outer_size.height == 2  # the field, and its message beneath
        await fill(pilot, in_row("atmosphere"), "1 bar")
        await settle(pilot)
        assert not row.has_class("-invalid") and row.message == ""
        assert row.outer_size.height == 1
        assert app.session.worksheet.heading.atmosphere == "1 bar"


async def test_overrides_are_typed_in_the_fluid_step_and_a_bad_one_is_named(tmp_path, author):
    """Overrides replace species constants (NAME = VALUE; ...). The check names a bad one, the
    fluid step is marked invalid, and the text stays as typed."""
    app = app_on(tmp_path, "fluid")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("overrides"), "Tc = 126.2 degX; omega = 0.04")
        await settle(pilot)
        assert app.session.worksheet.fluid.overrides == {"Tc": "126.2 degX", "omega": "0.04"}
        assert app.check.message.startswith("not ready (step 3): fluid.overrides.Tc: must be a temperature")
        assert app.statuses["fluid"] == "invalid"
        assert app.screen.query_one("#overrides", FieldRow).value == "Tc = 126.2 degX; omega = 0.04"
        await fill(pilot, in_row("overrides"), "Tc = 126.2 K; omega = 0.04")
        await settle(pilot)
        assert app.session.worksheet.fluid.overrides == {"Tc": "126.2 K", "omega": "0.04"}
        assert app.statuses["fluid"] == "complete" and not app.check.message.startswith("not ready (step 3)")


async def test_keys_typed_ahead_of_the_screen_land_in_the_next_field(tmp_path, author):
    """A burst of keys (a fast typist, a slow SSH link): after Enter, the rest goes to the next field.

    The keys are queued all at once, before the app has handled any, as a
    terminal delivers them when the link stalls (common practice, no source).
    """
    from textual import events

    app = app_on(tmp_path, "purpose")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("title"), "")
        for key in [*"V-7", "enter", *"J-12", "enter", *" (rig)"]:
            app.post_message(events.Key(key, key if len(key) == 1 else None))
        await settle(pilot)
        heading = app.session.worksheet.heading
        assert (heading.title, heading.job, heading.purpose) == ("V-7", "J-12", "input checks (rig)")
        assert in_row("purpose")(app.focused)


async def test_an_unknown_species_is_named_and_the_step_marked_invalid(tmp_path, author):
    app = app_on(tmp_path, "fluid")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("species"), "unobtainium")
        await settle(pilot)
        found = app.screen.query_one(".species-picker--found").content
        assert "unknown species 'unobtainium'" in str(found)
        assert app.statuses["fluid"] == "invalid"
        assert app.check.message.startswith("not ready (step 3): fluid.species: unknown species")
        assert app.session.worksheet.fluid.species == "unobtainium"
        await pilot.press("enter")  # Enter with no match keeps the text
        await settle(pilot)
        assert app.session.worksheet.fluid.species == "unobtainium"
        assert app.is_running


async def test_dof_recount_follows_every_edit(tmp_path, author):
    """The live degrees-of-freedom line follows each edit (its speed, under 100 ms for a
    cubic, is measured by benchmarks/bench_tui_recount.py, not here)."""
    app = app_on(tmp_path, "states")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        ws = app.session.worksheet
        for P2, expected in (("?", "3 unknowns, 2 equations"), ("25 bar", "2 unknowns, 2 equations"),
                             ("?", "3 unknowns, 2 equations")):
            app.edit(ws.with_(final=ws.final.__class__(name="end", props={"T": "?", "P": P2})))
            await wait_until(pilot, lambda: app.check.worksheet == app.session.worksheet, what="the recount")
            assert app.check.message.startswith(expected)
            await pilot.pause()
            assert app.screen.query_one("#dof").text.endswith(app.check.message)
