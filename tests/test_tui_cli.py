"""How the command line opens the terminal app: which session each form of
``joulebook [...]`` starts (the app itself is replaced by a recorder here).

Expected behaviour: the README, "Using the terminal app".
"""

from __future__ import annotations

import pytest

from tests.test_tui_pilot import SAMPLES, author  # noqa: F401
from tui import cli


#: What the recorder returns as the app's exit code: not 0, so that a test sees
#: the command line pass on the app's own code rather than a 0 of its own.
APP_EXIT = 3


class Joulebook:
    """The command line with the app replaced by a recorder of the sessions it would open."""

    def __init__(self) -> None:
        self.sessions: list = []

    def __call__(self, argv: list[str]) -> int:
        return cli.main(argv, run_app=self._run)

    def _run(self, session) -> int:
        self.sessions.append(session)
        return APP_EXIT


@pytest.fixture
def joulebook(monkeypatch, tmp_path):
    """Run the CLI in an empty folder; capture the session the app would open."""
    monkeypatch.chdir(tmp_path)
    return Joulebook()


def test_no_arguments_opens_a_new_worksheet_here(joulebook, tmp_path, author):
    assert joulebook([]) == APP_EXIT
    (session,) = joulebook.sessions
    assert session.path == tmp_path / "worksheet.jbk"
    assert session.worksheet.heading.title == "" and session.step == "purpose"
    (tmp_path / "worksheet.jbk.draft").write_text("{}")  # taken: the next one gets a new name
    assert joulebook([]) == APP_EXIT
    assert joulebook.sessions[1].path == tmp_path / "worksheet-2.jbk"


def test_a_new_record_path_starts_a_worksheet_there(joulebook, tmp_path, author):
    assert joulebook(["pump-test.jbk"]) == APP_EXIT
    assert joulebook.sessions[0].path.name == "pump-test.jbk"


def test_open_needs_an_existing_record(joulebook, capsys, author):
    assert joulebook(["open", "missing.jbk"]) == 2
    assert "missing.jbk" in capsys.readouterr().err
    assert joulebook.sessions == []


def test_a_worksheet_file_starts_a_record_from_it(joulebook, tmp_path, author):
    assert joulebook([str(SAMPLES / "argon-membrane-rupture.toml")]) == APP_EXIT
    session = joulebook.sessions[0]
    assert session.path == tmp_path / "argon-membrane-rupture.jbk"
    assert session.worksheet.fluid.species == "Ar"
    assert [e.kind for e in session.entries()][0] == "opening"
    # and `joulebook open` reopens it at its current state
    assert joulebook(["open", str(session.path)]) == APP_EXIT
    assert joulebook.sessions[1].worksheet.to_dict() == session.worksheet.to_dict()


def test_demo_opens_the_bundled_sample_and_print_keeps_the_old_output(joulebook, capsys, tmp_path, author):
    assert joulebook(["demo", "--record", str(tmp_path / "demo.jbk")]) == APP_EXIT
    assert joulebook.sessions[0].worksheet.heading.job == "PP-UT-0142"
    assert joulebook(["demo", "--print", "--units", "si"]) == 0
    out = capsys.readouterr().out
    assert "N2 buffer vessel V-101" in out and "Energy balance" in out


def test_the_first_word_is_told_from_a_file_without_building_the_parser(joulebook):
    """`joulebook` skips building its parser on the way to the app; the short list it reads
    instead must name exactly the subcommands the parser has."""
    import argparse

    parser = cli.build_parser()
    (sub,) = [a for a in parser._actions if isinstance(a, argparse._SubParsersAction)]
    assert tuple(sub.choices) == cli.COMMANDS


def test_app_for_pauses_the_collector_until_the_first_screen(monkeypatch, tmp_path, author):
    """Start-up runs with the garbage collector paused; the app resumes it once painted."""
    import asyncio
    import gc

    from tui.session import Session

    monkeypatch.setattr(gc, "freeze", lambda: None)  # keep the test process's heap as it is
    app = cli.app_for(Session.new(tmp_path / "gc.jbk"))
    try:
        assert not gc.isenabled()

        async def show() -> None:
            async with app.run_test(size=(80, 24)) as pilot:
                await pilot.pause()
                assert gc.isenabled()

        asyncio.run(show())
    finally:
        gc.enable()


def test_a_reference_worksheet_says_it_is_solving_before_the_app_opens(joulebook, capsys, author):
    """Starting a record from a .toml on the reference model waits for that model's process:
    the terminal is told, not left silent (other models open at once, with nothing printed)."""
    pytest.importorskip("CoolProp")
    from tui import offload

    try:
        assert joulebook([str(SAMPLES / "n2-buffer-into-receiver.toml")]) == APP_EXIT
        assert capsys.readouterr().err == ""
        assert joulebook([str(SAMPLES / "steam-kettle-wet.toml")]) == APP_EXIT
        assert "solving the worksheet with the reference model" in capsys.readouterr().err
        assert [e.kind for e in joulebook.sessions[1].entries()][-1] == "solve"
    finally:
        offload.shutdown()
