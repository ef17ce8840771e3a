"""Screen snapshots of a steady-flow worksheet's own steps at 80×24 (``snap_compare``; see
tests/test_tui_snapshots.py for how they are made and updated). Expected output: the
accepted snapshot files (no outside source)."""

from __future__ import annotations

import pytest

from tests.test_tui_pilot import SIZE, fill, in_row, ready, settle, wait_until
from tests.test_tui_snapshots import app_at, fixed_author_and_clock, freeze, steady  # noqa: F401

LETDOWN = "gas-letdown-preheated.toml"


@pytest.mark.parametrize("step", ["streams", "devices"])
def test_letdown_step(snap_compare, tmp_path, step):
    assert snap_compare(app_at(tmp_path, LETDOWN, step), terminal_size=SIZE, run_before=steady)


def test_letdown_results(snap_compare, tmp_path):
    async def run_before(pilot):
        await ready(pilot)
        app = pilot.app
        await wait_until(pilot, lambda: app.outcome is not None and not app.busy, what="the solve")
        await settle(pilot)
        freeze(app)
        await pilot.pause()

    assert snap_compare(app_at(tmp_path, LETDOWN, "results"), terminal_size=SIZE, run_before=run_before)


def test_a_device_inlet_naming_no_stream(snap_compare, tmp_path):
    async def run_before(pilot):
        await steady(pilot)
        await fill(pilot, in_row("inlets", "device-1"), "hot gas")
        await pilot.press("tab")
        await settle(pilot)
        freeze(pilot.app)

    assert snap_compare(app_at(tmp_path, LETDOWN, "devices"), terminal_size=SIZE, run_before=run_before)
