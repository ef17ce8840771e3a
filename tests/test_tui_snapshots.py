"""Screen snapshots of each step at 80×24 (pytest-textual-snapshot's SVG screenshots).

The snapshots live in ``tests/snapshots/test_tui_snapshots/``; update them
with ``pytest tests/test_tui_snapshots.py --snapshot-update`` and read every
changed SVG before committing it. Each test waits for the background work
(check, solve, diagram) to finish and freezes the cursor blink, so a
screenshot does not depend on timing. Record entries get a fixed clock and
author. Expected output: the accepted snapshot files (no outside source).
"""

from __future__ import annotations

from datetime import datetime, timezone
from pathlib import Path

import pytest
from pytest_textual_snapshot import SVGImageExtension
from syrupy.extensions.base import AbstractSyrupyExtension
from textual._doc import take_svg_screenshot

from balance.worksheet import Worksheet
from tests.test_tui_pilot import SAMPLES, SIZE, fill, in_row, ready, settle, wait_until
from tui.app import JoulebookApp
from tui.session import Session

pytest.importorskip("balance.record")


class StepSnapshots(SVGImageExtension):
    """SVG snapshots kept in tests/snapshots/<test module>/."""

    @classmethod
    def dirname(cls, *, test_location) -> str:
        tests_dir = Path(AbstractSyrupyExtension.dirname(test_location=test_location)).parent
        return str(tests_dir / "snapshots" / test_location.basename)


@pytest.fixture
def snap(snapshot, monkeypatch, tmp_path):
    """compare(app, run_before) -> whether the screenshot matches the stored one."""
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "t.engineer")
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    import balance.record.record as record_module

    monkeypatch.setattr(record_module, "utc_now", lambda: datetime(2025, 3, 4, 10, 2, 11, tzinfo=timezone.utc))
    store = snapshot.use_extension(StepSnapshots)

    def compare(app, run_before) -> bool:
        svg = take_svg_screenshot(app=app, terminal_size=SIZE, run_before=run_before)
        return store == svg

    return compare


def app_at(tmp_path, sample: str, step: str) -> JoulebookApp:
    session = Session.from_worksheet(Worksheet.load(SAMPLES / sample), tmp_path / "demo.jbk")
    session.step = step
    return JoulebookApp(session)


def freeze(app) -> None:
    """No blinking cursors in a screenshot."""
    for widget in app.screen.query("Input, TextArea"):
        widget.cursor_blink = False


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
def test_demo_step(snap, tmp_path, step):
    assert snap(app_at(tmp_path, DEMO, step), steady)


def test_terms_step_with_a_heat_term(snap, tmp_path):
    assert snap(app_at(tmp_path, "methane-piston-isothermal.toml", "terms"), steady)


def test_results_pv_diagram(snap, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await pilot.press("shift+tab", "right")  # from the balance to the tab bar, then P–v
        await settle(pilot)

    assert snap(app_at(tmp_path, DEMO, "results"), run_before)


def test_help_on_the_states_step(snap, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await pilot.press("f1")
        await settle(pilot)

    assert snap(app_at(tmp_path, DEMO, "states"), run_before)


def test_inline_message_for_a_bad_pressure(snap, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await fill(pilot, in_row("prop-P", "initial-0"), "150 bargg")
        await pilot.press("tab")
        await settle(pilot)
        freeze(pilot.app)

    assert snap(app_at(tmp_path, DEMO, "states"), run_before)
