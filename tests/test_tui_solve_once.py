"""A solve in the app is solved once: the screen shows it and the record files it.

Regression test: the record's solve entry used to be worked out by solving
the record's worksheet again (every solve in the app ran twice). The count
is taken with a spy on the façade's solve (``unittest.mock`` ``wraps``: the
real solve runs). The reference for the entry's data is a fresh solve of the
record's sections in this process (``balance.record.replay.solve_data``).
"""

from __future__ import annotations

from dataclasses import replace
from unittest import mock

from balance import api
from balance.record.format import prune
from balance.record.replay import solve_data
from balance.worksheet import Worksheet
from tests.helpers import SAMPLES
from tests.test_tui_pilot import SIZE, author, ready, settle, wait_until  # noqa: F401
from tui.app import JoulebookApp
from tui.session import Session


async def test_a_solve_on_the_screen_is_the_one_recorded(tmp_path, author):
    session = Session.from_worksheet(Worksheet.load(SAMPLES / "n2-buffer-into-receiver.toml"), tmp_path / "n2.jbk")
    heading = session.worksheet.heading
    session.edit(session.worksheet.with_(heading=replace(heading, title="buffer, second look")))
    session.set_step("results")  # the results step solves when it opens (committing first)
    app = JoulebookApp(session)
    with mock.patch.object(api, "solve", wraps=api.solve) as solve:
        async with app.run_test(size=SIZE) as pilot:
            await ready(pilot)
            await wait_until(pilot, lambda: app.outcome is not None and app.outcome.trace is not None
                             and session.entries()[-1].kind == "solve", what="the solve and its entry")
            await settle(pilot)
    assert solve.call_count == 1
    *_, step, entry = session.entries()
    assert (step.kind, entry.kind) == ("purpose and basis", "solve")
    assert entry.data["title"] == "buffer, second look"
    assert entry.data == solve_data(session.record.sections())
    assert prune(app.outcome.result.as_json()) == {k: v for k, v in entry.data.items() if k not in api.pins()}
