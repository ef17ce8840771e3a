"""The terminal app driven by key presses only, at 80×24.

Each test builds (or walks) a whole worksheet the way an engineer would:
typing into fields, Tab between them, ctrl+n to the next step, and reads
back the domain result and the record entries written. The tests look at
the app's state to decide *where* the focus is, but every change is a key
press.

Check values: the solved figures are the same as ``joulebook solve --json``
on the sample that the test types in (named beside each number).
"""

from __future__ import annotations

import asyncio
import math
from pathlib import Path

import pytest

from balance.worksheet import Worksheet
from tui.app import JoulebookApp
from tui.session import Session

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"
SIZE = (80, 24)


# -- helpers shared with the other TUI tests ---------------------------------------------
@pytest.fixture
def author(monkeypatch, tmp_path):
    """A fixed author for record entries, and no user config file."""
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "t.engineer")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.delenv("JOULEBOOK_ALLOWED_SIGNERS", raising=False)
    return "t.engineer"


async def settle(pilot, rounds: int = 3) -> None:
    """Let workers finish and their messages land."""
    app = pilot.app
    for _ in range(rounds):
        await pilot.pause()
        await app.workers.wait_for_complete()
    await pilot.pause()


async def wait_until(pilot, predicate, timeout: float = 60.0, what: str = "condition") -> None:
    loop = asyncio.get_running_loop()
    end = loop.time() + timeout
    while not predicate():
        if loop.time() > end:
            raise AssertionError(f"timed out waiting for {what}")
        await pilot.pause(0.05)
        await pilot.app.workers.wait_for_complete()


async def ready(pilot) -> None:
    """Wait for the warm-up (units can be checked) and the first count."""
    await wait_until(pilot, lambda: pilot.app.units_ready and pilot.app.check is not None, what="warm-up")
    await settle(pilot)


def in_row(row_id: str, container_id: str | None = None):
    """A predicate: the focused widget is the input of FieldRow ``row_id`` (inside ``container_id``)."""

    def test(focused) -> bool:
        if focused is None or focused.parent is None or focused.parent.id != row_id:
            return False
        return container_id is None or any(a.id == container_id for a in focused.ancestors)

    return test


def is_widget(widget_id: str):
    return lambda focused: focused is not None and focused.id == widget_id


async def focus(pilot, predicate, limit: int = 80) -> None:
    """Tab until the focus satisfies ``predicate``."""
    for _ in range(limit):
        if predicate(pilot.app.focused):
            return
        await pilot.press("tab")
    raise AssertionError(f"could not tab to the field; focus is on {pilot.app.focused!r}")


async def fill(pilot, predicate, text: str) -> None:
    """Tab to a field, clear it, and type ``text``."""
    await focus(pilot, predicate)
    await pilot.press("end", "ctrl+u")
    if text:
        await pilot.press(*text)


async def next_step(pilot) -> None:
    await pilot.press("ctrl+n")
    await pilot.pause(0.1)
    await settle(pilot)


async def sign_off_unsigned(pilot) -> None:
    """On the review step: ctrl+g, tick 'unsigned', press Sign off (the role and signer as offered)."""
    await pilot.press("ctrl+g")
    await pilot.pause(0.2)
    assert type(pilot.app.screen).__name__ == "SignScreen"
    await focus(pilot, is_widget("unsigned"))
    await pilot.press("space")
    await focus(pilot, is_widget("sign"))
    await pilot.press("enter")
    await settle(pilot)


def kinds(session: Session) -> list[str]:
    return [e.kind for e in session.entries()]


def new_app(tmp_path, name: str = "typed.jbk") -> JoulebookApp:
    return JoulebookApp(Session.new(tmp_path / name))


def sample_app(tmp_path, sample: str) -> JoulebookApp:
    ws = Worksheet.load(SAMPLES / sample)
    return JoulebookApp(Session.from_worksheet(ws, tmp_path / (Path(sample).stem + ".jbk")))


# -- typing whole worksheets ------------------------------------------------------------------
async def type_purpose(pilot, title, job, asked, basis, assumptions) -> None:
    await fill(pilot, in_row("title"), title)
    await fill(pilot, in_row("job"), job)
    await fill(pilot, in_row("purpose"), asked)
    await fill(pilot, in_row("basis"), basis)
    await focus(pilot, is_widget("assumptions"))
    for i, line in enumerate(assumptions):
        if i:
            await pilot.press("enter")
        await pilot.press(*line)


async def type_boundary(pilot, inside, boundary_T="") -> None:
    await fill(pilot, in_row("inside"), inside)
    if boundary_T:
        await fill(pilot, in_row("boundary-T"), boundary_T)


async def type_fluid(pilot, species, model_index) -> None:
    await fill(pilot, in_row("species"), species)
    await pilot.press("enter")  # picks the first match and moves to the model list
    await settle(pilot)
    assert pilot.app.focused.id == "model"
    await pilot.press("home", *["down"] * model_index, "enter")


async def type_state(pilot, form_id, name, values: dict[str, str]) -> None:
    await fill(pilot, in_row("name", form_id), name)
    for key, text in values.items():
        row = f"prop-{key}" if key not in ("n", "m", "V") else f"amount-{key}"
        await fill(pilot, in_row(row, form_id), text)


async def tick_constraints(pilot, names) -> None:
    from balance.worksheet import CONSTRAINTS

    await focus(pilot, is_widget("constraints"))
    await pilot.press("home")
    at = 0
    for name in sorted(names, key=CONSTRAINTS.index):
        target = CONSTRAINTS.index(name)
        await pilot.press(*["down"] * (target - at), "space")
        at = target


async def solve_on_results(pilot) -> None:
    """Open the results step (it solves by itself) and wait for the solve."""
    app = pilot.app
    await wait_until(pilot, lambda: app.session.step == "results", what="results step")
    await wait_until(pilot, lambda: app.outcome is not None and app.outcome.worksheet == app.session.worksheet
                     and not app.solving, what="the solve")
    await settle(pilot)


# -- the demo -----------------------------------------------------------------------------------
async def test_demo_walked_solved_recorded_and_signed(tmp_path, author):
    from tui.session import demo_session

    session = demo_session(SAMPLES / "n2-buffer-into-receiver.toml", tmp_path / "demo.jbk")
    app = JoulebookApp(session)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        # the bundled sample arrives as a record: opening, its sections and a solve
        assert kinds(session) == ["opening", "purpose and basis", "system boundary", "fluid and model",
                                  "initial state", "final state", "constraints", "solve"]
        assert app.check.ready and app.check.message == "1 unknown, 1 equation: ready to solve"
        for _ in range(6):
            await next_step(pilot)
        await solve_on_results(pilot)
        r = app.outcome.result
        # same figures as `joulebook solve --json samples/n2-buffer-into-receiver.toml`
        assert math.isclose(r.final.point.T, 262.38784353833796, rel_tol=1e-7)
        assert math.isclose(r.final.point.P, 3298422.4652897716, rel_tol=1e-7)
        assert math.isclose(r.S_gen, 139368.62458249566, rel_tol=1e-6)
        assert app.statuses["results"] == "complete"
        # nothing changed since the record's own solve: no second solve entry
        assert kinds(session).count("solve") == 1

        await next_step(pilot)  # review and sign
        assert app.session.step == "review"
        await sign_off_unsigned(pilot)
        last = session.entries()[-1]
        assert (last.kind, last.data["role"], last.data["signer"], last.data.get("unsigned")) == (
            "sign-off", "prepared", "t.engineer", True)
        assert app.statuses["review"] == "complete"

        # a comment on the solve, then its resolution, all by keys
        await pilot.press("ctrl+t")
        await pilot.pause(0.2)
        await pilot.press(*"check the receiver design temperature", "enter")
        await settle(pilot)
        comment = session.entries()[-1]
        assert comment.kind == "comment" and comment.data["text"] == "check the receiver design temperature"
        await pilot.press("ctrl+f")
        await pilot.pause(0.2)
        await pilot.press(*"MDMT is -46 degC", "enter")
        await settle(pilot)
        assert session.entries()[-1].kind == "resolution" and session.open_comments() == []
        assert session.verify().ok


# -- typed from nothing -----------------------------------------------------------------------------
async def test_methane_isothermal_typed_from_scratch(tmp_path, author):
    app = new_app(tmp_path)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await type_purpose(pilot, "CH4 isothermal", "PR3-019", "work and heat", "2 mol",
                           ["slow", "jacket at 25 degC"])
        await next_step(pilot)
        await type_boundary(pilot, "the methane", "25 degC")
        await next_step(pilot)
        await type_fluid(pilot, "CH4", 3)  # Soave-Redlich-Kwong
        await next_step(pilot)
        await type_state(pilot, "initial-0", "start", {"T": "25 degC", "P": "5 bar", "n": "2 mol"})
        await type_state(pilot, "final", "end", {"T": "?", "P": "60 bar"})
        await next_step(pilot)
        await pilot.press("ctrl+t")  # a heat term: Q '?' and the boundary T from step 2
        await settle(pilot)
        await fill(pilot, in_row("name", "heat-0"), "jacket")
        await next_step(pilot)
        await tick_constraints(pilot, ["isothermal"])
        await settle(pilot)
        assert app.check.message == "1 unknown, 1 equation: ready to solve"
        await next_step(pilot)
        await solve_on_results(pilot)

        ws = app.session.worksheet
        assert ws.fluid.species == "CH4" and ws.fluid.model == "soave-redlich-kwong"
        assert ws.heat[0].T_boundary == "25 degC" and ws.heat[0].Q == "?"
        r = app.outcome.result
        terms = {t.name: t.value for t in r.terms}
        # same figures as `joulebook solve --json samples/methane-piston-isothermal.toml`
        assert math.isclose(terms["jacket"], -13734.689073713314, rel_tol=1e-7)
        assert math.isclose(terms["isothermal"], 12290.529880771122, rel_tol=1e-7)
        assert math.isclose(r.final.point.P, 6.0e6, rel_tol=1e-9)
        assert kinds(app.session) == ["opening", "purpose and basis", "system boundary", "fluid and model",
                                      "initial state", "final state", "heat terms", "constraints", "solve"]
        # the record's replay is the worksheet on screen
        assert app.session.record.worksheet().to_dict() == ws.to_dict()
        solve_entry = app.session.entries()[-1]
        assert math.isclose(solve_entry.data["terms"][0]["value"]["value"], -13734.689073713314, rel_tol=1e-7)


async def test_argon_rupture_two_compartments_typed(tmp_path, author):
    app = new_app(tmp_path)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await type_purpose(pilot, "Ar disc burst", "TB2-004", "settled T, P", "all argon",
                           ["rigid", "insulated"])
        await next_step(pilot)
        await type_boundary(pilot, "chambers A and B")
        await next_step(pilot)
        await type_fluid(pilot, "argon", 2)  # Redlich-Kwong
        await next_step(pilot)
        await type_state(pilot, "initial-0", "A", {"T": "300 K", "P": "80 bar", "V": "0.1 m3"})
        await pilot.press("ctrl+t")  # a second compartment
        await settle(pilot)
        await type_state(pilot, "initial-1", "B", {"T": "350 K", "P": "2 bar", "V": "0.3 m3"})
        await type_state(pilot, "final", "settled", {"T": "?", "P": "?"})
        await next_step(pilot)
        await next_step(pilot)  # no heat or work terms
        await tick_constraints(pilot, ["adiabatic", "membrane-rupture"])
        await settle(pilot)
        await pilot.press("ctrl+r")  # solve from the constraints step
        await solve_on_results(pilot)

        r = app.outcome.result
        # same figures as `joulebook solve --json samples/argon-membrane-rupture.toml`
        assert math.isclose(r.final.point.T, 277.8608702476975, rel_tol=1e-7)
        assert math.isclose(r.final.point.P, 2014373.130466014, rel_tol=1e-7)
        assert math.isclose(r.n, 355.1896604933313, rel_tol=1e-9)
        assert [s.name for s in app.session.worksheet.initial] == ["A", "B"]
        assert kinds(app.session)[-3:] == ["final state", "constraints", "solve"]
        assert app.session.entries()[-1].data["states"]["settled"]["T"]["value"] == pytest.approx(
            277.8608702476975, rel=1e-7)


async def test_air_reversible_with_a_boundary_work_term(tmp_path, author):
    app = new_app(tmp_path)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await type_purpose(pilot, "Air stroke", "CT-112", "ideal work", "1.2 g", ["isentropic"])
        await next_step(pilot)
        await type_boundary(pilot, "the air")
        await next_step(pilot)
        await type_fluid(pilot, "air", 0)  # ideal gas
        await next_step(pilot)
        await type_state(pilot, "initial-0", "suction", {"T": "20 degC", "P": "1 bar", "m": "1.2 g"})
        await type_state(pilot, "final", "discharge", {"T": "?", "P": "8 bar"})
        await next_step(pilot)
        await pilot.press("ctrl+f")  # a work term: W '?'
        await settle(pilot)
        await fill(pilot, in_row("name", "work-0"), "piston")
        await focus(pilot, is_widget("kind"))
        await pilot.press("enter")  # open the kind list: shaft, stirring, electrical, boundary
        await pilot.pause(0.2)
        await pilot.press("down", "down", "down", "enter")
        await settle(pilot)
        await next_step(pilot)
        await tick_constraints(pilot, ["adiabatic", "reversible"])
        await settle(pilot)
        await next_step(pilot)
        await solve_on_results(pilot)

        assert app.session.worksheet.work[0].kind == "boundary"
        r = app.outcome.result
        # same figures as `joulebook solve --json samples/air-test-cylinder-reversible.toml`
        assert math.isclose(r.final.point.T, 527.8116505182628, rel_tol=1e-7)
        assert math.isclose({t.name: t.value for t in r.terms}["piston"], 205.41027832311414, rel_tol=1e-7)
        assert kinds(app.session)[-3:] == ["work terms", "constraints", "solve"]


# -- safety of work --------------------------------------------------------------------------------
async def test_uncommitted_edits_survive_a_quit_and_come_back(tmp_path, author):
    app = sample_app(tmp_path, "n2-buffer-into-receiver.toml")
    path = app.session.path
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("job"), "PP-UT-0143 (rev B)")
        await settle(pilot)
        assert app.session.dirty() == ("worksheet",)
        await pilot.press("ctrl+q")
        await pilot.pause(0.2)
        assert type(app.screen).__name__ == "ConfirmQuitScreen"
        await pilot.press("escape")  # stay
        await pilot.pause(0.2)
        assert type(app.screen).__name__ == "PurposeScreen"
        await pilot.press("ctrl+q")
        await pilot.pause(0.2)
        await pilot.press("k")  # quit, keeping the draft
        await pilot.pause(0.2)
    assert app.return_code is not None or not app.is_running
    entries = len(Session.open(path).entries())
    reopened = Session.open(path)
    assert reopened.worksheet.heading.job == "PP-UT-0143 (rev B)"
    assert reopened.dirty() == ("worksheet",)
    assert reopened.step == "purpose"
    assert len(reopened.entries()) == entries  # nothing was committed on the way out


async def test_leaving_a_step_commits_it_and_quitting_clean_does_not_ask(tmp_path, author):
    app = sample_app(tmp_path, "n2-buffer-into-receiver.toml")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        before = len(app.session.entries())
        await fill(pilot, in_row("basis"), "all nitrogen in V-101, V-102 and the line")
        await next_step(pilot)
        entry = app.session.entries()[-1]
        assert len(app.session.entries()) == before + 1
        assert (entry.kind, entry.data["worksheet"]["basis"]) == (
            "purpose and basis", "all nitrogen in V-101, V-102 and the line")
        assert app.session.dirty() == ()
        await pilot.press("ctrl+q")
        await pilot.pause(0.2)
    assert not app.is_running


async def test_the_draft_restores_uncommitted_text_exactly(tmp_path, author):
    """What was typed and not committed comes back from the draft, bad text and all; a step
    with a field at fault is not committed when it is left, a step put right is."""
    app = new_app(tmp_path, "drafted.jbk")
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await fill(pilot, in_row("title"), "Half-typed title")
        await fill(pilot, in_row("atmosphere"), "0.98 barr")  # bad text is kept as typed
        await next_step(pilot)
        await fill(pilot, in_row("inside"), "the gas")
        await settle(pilot)
    reopened = Session.open(tmp_path / "drafted.jbk")
    assert reopened.worksheet.heading.title == "Half-typed title"
    assert reopened.worksheet.heading.atmosphere == "0.98 barr"
    assert reopened.worksheet.system.inside == "the gas"
    assert reopened.step == "boundary"
    assert reopened.dirty() == ("worksheet", "system")  # step 1 was left at fault: not committed
    assert reopened.entries() == []  # nothing committed, so no record yet

    app = JoulebookApp(reopened)
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await pilot.press("ctrl+o")
        await pilot.pause(0.2)
        await settle(pilot)
        await fill(pilot, in_row("atmosphere"), "0.98 bar")
        await next_step(pilot)
        assert kinds(app.session) == ["opening", "system boundary", "purpose and basis"]  # in the order left
        assert app.session.record.worksheet().heading.atmosphere == "0.98 bar"
