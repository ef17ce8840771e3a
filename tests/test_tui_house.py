"""The app under a house procedure, driven by key presses only, at 80×24.

A procedure of an invented lab (written here) with guidance, required fields, a model rule,
an acceptance check and one exercise whose model answer is the argon bursting-disc worksheet
on Peng–Robinson. Check values: the answer's solved figures are `joulebook solve --json` on
that worksheet (CoolProp is not involved: Peng–Robinson is the project's own model, itself
checked against CoolProp's PR backend in tests/test_cubic_vs_coolprop.py).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from balance.procedures import load
from tui.app import JoulebookApp
from tui.session import Session

from .test_output_app import text_of
from .test_tui_pilot import (SAMPLES, SIZE, author, fill, in_row, is_widget, focus, kinds, next_step,  # noqa: F401
                             ready, settle, sign_off_unsigned, solve_on_results, tick_constraints, type_fluid,
                             type_purpose,
                             type_state, wait_until)

PROCEDURE = '''
[procedure]
id = "lab-closed"
title = "Lab rig closed vessels"
version = "2"
owner = "Rig safety desk"
kinds = ["closed"]

[step.purpose]
guidance = """Give the job number: the checker files the calculation under it."""
required = ["worksheet.job", "worksheet.assumptions"]

[step.fluid]
guidance = """Above 10 bar the rig uses Peng-Robinson or the reference model."""

[[model_rule]]
id = "real-gas-above-10-bar"
allowed = ["peng-robinson", "reference"]
P_above = "10 bar"
text = "Above 10 bar use Peng-Robinson or the reference model."

[[check]]
id = "second-law"
quantity = "S_gen"
compare = ">="
limit = "0 J/K"
severity = "stop"
message = "The entropy generated must not be negative"

[signoff]
roles = ["prepared", "checked"]

[[exercise]]
id = "disc"
title = "Argon bursting disc"
brief = "Chamber A: argon 300 K, 80 bar, 0.1 m3; chamber B: 350 K, 2 bar, 0.3 m3. The disc bursts."
answer = "exercises/disc.toml"
[exercise.hints]
fluid = "Look at the pressure in chamber A and the house model rule."
'''


@pytest.fixture
def procedure(tmp_path, monkeypatch):
    folder = tmp_path / "procedures"
    (folder / "exercises").mkdir(parents=True)
    (folder / "lab-closed.toml").write_text(PROCEDURE, encoding="utf-8")
    answer = (SAMPLES / "argon-membrane-rupture.toml").read_text(encoding="utf-8")
    answer = answer.replace('model = "redlich-kwong"', 'model = "peng-robinson"')
    answer = answer.replace("[worksheet]", '[worksheet]\nprocedure = "lab-closed"', 1)
    (folder / "exercises" / "disc.toml").write_text(answer, encoding="utf-8")
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(folder))
    monkeypatch.setenv("JOULEBOOK_CONFIG", str(tmp_path / "no-config.toml"))
    return load(folder / "lab-closed.toml")


def panel_text(app) -> str:
    return app.screen.query_one("#guide").text


async def test_practice_by_keys_wrong_then_right_and_never_signed(tmp_path, author, procedure):  # noqa: F811
    session = Session.new(tmp_path / "practice.jbk", procedure=procedure, exercise="disc")
    app = JoulebookApp(session)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        assert "PRACTICE: Argon bursting disc" in panel_text(app)
        assert "Job ◆" in str(app.screen.query_one("#job").label)
        await type_purpose(pilot, "disc practice", "TR-01", "settled T, P", "all argon", ["rigid"])
        await next_step(pilot)  # leaving the purpose step compares it
        await next_step(pilot)  # the boundary: closed, as the answer
        await type_fluid(pilot, "argon", 2)  # Redlich-Kwong: not the answer's model, and against the rule
        await settle(pilot)
        flag = app.screen.query_one("#house-model")
        assert not flag.display  # no pressure typed yet: the rule's condition is not known
        assert "real-gas-above-10-bar" in panel_text(app) and "not known yet" in panel_text(app)
        await pilot.press("f6")
        await settle(pilot)
        text = panel_text(app)
        assert "differs from the firm's answer" in text and "fluid.model" in text
        assert "Look at the pressure in chamber A" in text  # the hint before the answer
        differences = text.split("differs from the firm's answer:")[1].split("The exercise")[0]
        assert "peng-robinson" not in differences  # no answer value yet
        await pilot.press("f7")
        await settle(pilot)
        assert 'model = "peng-robinson"' in panel_text(app)
        await focus(pilot, is_widget("model"))
        await pilot.press("home", *["down"] * 4, "enter")  # Peng-Robinson
        await pilot.press("f6")
        await settle(pilot)
        assert "matches the firm's answer" in panel_text(app)
        await next_step(pilot)
        await type_state(pilot, "initial-0", "A", {"T": "300 K", "P": "80 bar", "V": "0.1 m3"})
        await pilot.press("ctrl+t")
        await settle(pilot)
        await type_state(pilot, "initial-1", "B", {"T": "350 K", "P": "2 bar", "V": "0.31 m3"})  # 3 % off
        await type_state(pilot, "final", "settled", {"T": "?", "P": "?"})
        await pilot.press("f6")
        await settle(pilot)
        text = panel_text(app)
        differences = text.split("differs from the firm's answer:")[1].split("The exercise")[0]
        assert "initial[2].V: differs from the answer" in differences and "0.3" not in differences
        await fill(pilot, in_row("amount-V", "initial-1"), "300 L")  # the same volume, another unit
        await pilot.press("f6")
        await settle(pilot)
        assert "matches the firm's answer" in panel_text(app)
        await next_step(pilot)
        await next_step(pilot)  # no heat or work terms
        await tick_constraints(pilot, ["adiabatic", "membrane-rupture"])
        await settle(pilot)
        await next_step(pilot)
        await solve_on_results(pilot)
        await pilot.press("f6")
        await settle(pilot)
        assert "matches the firm's answer" in panel_text(app)
        await next_step(pilot)  # the review: the summary
        text = panel_text(app)
        assert "purpose: right first time" in text
        assert "fluid: right after 2 tries; the answer was shown" in text
        assert "states: right after 2 tries" in text
        assert "A practice record is never signed." in text
        await sign_off_unsigned(pilot)
        assert "sign-off" not in kinds(session)
        assert any("practice record" in n.message for n in app.notices)
    opening = session.entries()[0].data
    assert opening["practice"] == {"exercise": "disc"} and opening["procedure"]["id"] == "lab-closed"


async def test_a_stop_is_justified_by_keys_and_the_record_keeps_it(tmp_path, author, procedure):  # noqa: F811
    from balance.worksheet import Worksheet

    ws = Worksheet.load(SAMPLES / "argon-membrane-rupture.toml")  # Redlich-Kwong at 80 bar: the rule stops
    from dataclasses import replace

    ws = ws.with_(heading=replace(ws.heading, procedure="lab-closed"))
    session = Session.from_worksheet(ws, tmp_path / "disc.jbk")
    assert session.entries()[0].data["procedure"]["version"] == "2"
    app = JoulebookApp(session)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        assert app.screen.has_class("-guided")
        await pilot.press("f5")
        await settle(pilot)
        assert not app.screen.has_class("-guided") and session.extras["guide"] is False
        await pilot.press("f5")
        for _ in range(6):
            await next_step(pilot)
        await solve_on_results(pilot)
        stops = [f.rule for f in app.outcome.house if f.blocks]
        assert stops == ["real-gas-above-10-bar"]
        balance = text_of(app, "#balance")
        assert "STOP" in balance and "real-gas-above-10-bar" in balance
        await pilot.press("f8")
        await pilot.pause(0.2)
        assert type(app.screen).__name__ == "TextPromptScreen"
        await pilot.press(*"bounding case for the rig file", "enter")
        await settle(pilot)
        assert session.worksheet.heading.deviations == {"real-gas-above-10-bar": "bounding case for the rig file"}
        await solve_on_results(pilot)
        assert [f.outcome for f in app.outcome.house if f.rule == "real-gas-above-10-bar"] == ["justified"]
        await next_step(pilot)
        await sign_off_unsigned(pilot)
    last = session.entries()[-1]
    assert (last.kind, last.data["role"]) == ("sign-off", "prepared")
    purposes = [e for e in session.entries() if e.kind == "purpose and basis"]
    assert purposes[-1].data["worksheet"]["deviations"] == {"real-gas-above-10-bar": "bounding case for the rig file"}
    assert "bounding case for the rig file" in purposes[-1].text  # what the checker reads


def test_a_record_under_an_older_version_says_so_on_opening(tmp_path, author, procedure):  # noqa: F811
    from dataclasses import replace

    from balance.worksheet import Worksheet

    ws = Worksheet.load(SAMPLES / "argon-membrane-rupture.toml")
    ws = ws.with_(heading=replace(ws.heading, procedure="lab-closed"))
    Session.from_worksheet(ws, tmp_path / "disc.jbk")
    path = Path(procedure.path)
    path.write_text(path.read_text(encoding="utf-8").replace('version = "2"', 'version = "3"'), encoding="utf-8")
    again = Session.open(tmp_path / "disc.jbk")
    assert any("made under lab-closed version 2" in n and "version 3" in n for n in again.notes)
    assert again.procedure.version == "2"  # the record's rules
    assert "Give the job number" in again.guidance("purpose")  # the current guidance
