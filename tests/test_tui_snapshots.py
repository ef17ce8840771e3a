"""Screen snapshots of each step at 80×24, through pytest-textual-snapshot's ``snap_compare``.

The snapshots live where the plugin keeps them (syrupy's
``tests/__snapshots__/test_tui_snapshots/``); update them with
``pytest tests/test_tui_snapshots.py --snapshot-update`` and read every
changed SVG before committing it (a failing run writes an HTML report of the
differences). Each test waits for the background work (check, solve,
diagram) to finish and freezes the cursor blink, so a screenshot does not
depend on timing. Record entries get a fixed clock and author (the review
step shows their times). Expected output: the accepted snapshot files (no
outside source).
"""

from __future__ import annotations

from datetime import datetime, timezone

import pytest

from balance.worksheet import Worksheet
from tests.test_tui_pilot import SAMPLES, SIZE, fill, in_row, ready, settle, wait_until
from tui.app import JoulebookApp
from tui.session import Session


@pytest.fixture(autouse=True)
def fixed_author_and_clock(monkeypatch, tmp_path):
    """The same author and entry time on every run, and no user config file."""
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "t.engineer")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    import balance.record.record as record_module

    monkeypatch.setattr(record_module, "utc_now", lambda: datetime(2025, 3, 4, 10, 2, 11, tzinfo=timezone.utc))


def app_at(tmp_path, sample: str, step: str) -> JoulebookApp:
    session = Session.from_worksheet(Worksheet.load(SAMPLES / sample), tmp_path / "demo.jbk")
    session.step = step
    return JoulebookApp(session)


def freeze(app) -> None:
    """No blinking cursors in a screenshot, and no notices (they leave after a time, so
    whether one is still shown would depend on how long the test took)."""
    for widget in app.screen.query("Input, TextArea"):
        widget.cursor_blink = False
    app.notices = ()


async def steady(pilot) -> None:
    await ready(pilot)
    app = pilot.app
    await wait_until(pilot, lambda: not app.busy, what="background work")
    if app.session.step == "results":
        await wait_until(pilot, lambda: app.outcome is not None and app.outcome.trace is not None, what="diagram")
    if app.session.step == "fluid":
        await wait_until(pilot, lambda: app.advice is not None, what="advice")
    await settle(pilot)
    freeze(app)
    await pilot.pause()


DEMO = "n2-buffer-into-receiver.toml"


@pytest.mark.parametrize("step", ["purpose", "boundary", "fluid", "states", "constraints", "results", "review"])
def test_demo_step(snap_compare, tmp_path, step):
    assert snap_compare(app_at(tmp_path, DEMO, step), terminal_size=SIZE, run_before=steady)


def test_terms_step_with_a_heat_term(snap_compare, tmp_path):
    assert snap_compare(app_at(tmp_path, "methane-piston-isothermal.toml", "terms"), terminal_size=SIZE,
                        run_before=steady)


def test_results_pv_diagram(snap_compare, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await pilot.press("shift+tab", "right")  # from the balance to the tab bar, then P–v
        await settle(pilot)

    assert snap_compare(app_at(tmp_path, DEMO, "results"), terminal_size=SIZE, run_before=run_before)


def test_help_on_the_states_step(snap_compare, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await pilot.press("f1")
        await settle(pilot)

    assert snap_compare(app_at(tmp_path, DEMO, "states"), terminal_size=SIZE, run_before=run_before)


def test_inline_message_for_a_bad_pressure(snap_compare, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await fill(pilot, in_row("prop-P", "initial-0"), "150 bargg")
        await pilot.press("tab")
        await settle(pilot)
        freeze(pilot.app)

    assert snap_compare(app_at(tmp_path, DEMO, "states"), terminal_size=SIZE, run_before=run_before)


# -- under a house procedure (the bundled hpp-closed-vessels) ------------------------------------
def test_practice_purpose_step_with_the_brief_beside_it(snap_compare, tmp_path, monkeypatch):
    from balance.procedures import find

    monkeypatch.delenv("JOULEBOOK_PROCEDURES", raising=False)
    session = Session.new(tmp_path / "practice.jbk", procedure=find("hpp-closed-vessels"), exercise="disc-burst-n2-pot")
    assert snap_compare(JoulebookApp(session), terminal_size=SIZE, run_before=steady)


def test_results_with_the_house_rules(snap_compare, tmp_path, monkeypatch):
    from balance.procedures import find

    monkeypatch.delenv("JOULEBOOK_PROCEDURES", raising=False)
    answer = find("hpp-closed-vessels").exercise("disc-burst-n2-pot").answer
    session = Session.from_worksheet(Worksheet.load(answer), tmp_path / "disc.jbk")
    session.step = "results"
    assert snap_compare(JoulebookApp(session), terminal_size=SIZE, run_before=steady)
