"""The reference model's own process (tui.offload).

The app hands reference-model work to one spawned process and waits for
it in a thread worker, so the UI keeps running while the process starts
and the app's own process never imports CoolProp.

Check values: what comes back from the process is compared with the same
work done in this process: ``balance.api.solve`` and
``balance.record.replay.solve_data``, which evaluate the reference model
with CoolProp (HEOS) here. Thresholds for "live" are common practice, no
source.

The app is driven in a subprocess (``python -c``) so that the check on
``sys.modules`` means something (this test process imports CoolProp for
the comparisons); one run serves several tests, which keeps the process's
start (about 3 s: a new interpreter that imports numpy, pint and CoolProp)
to one per test module.
"""

from __future__ import annotations

import asyncio
import json
import math
import multiprocessing
import os
import pickle
import signal
import subprocess
import sys
import time
from dataclasses import replace
from pathlib import Path

import pytest

from balance.errors import BalanceError, InputError
from balance.worksheet import Fluid, Worksheet
from tests.test_tui_pilot import SIZE, author, focus, is_widget, kinds, ready, settle, wait_until  # noqa: F401
from tui import offload
from tui.session import Session

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"
CO2 = "co2-cylinder-hot-store.toml"
STEAM = "steam-kettle-wet.toml"
#: the UI timer's period during the child's start [s]
TICK = 0.02
#: the longest pause of the UI timer that still counts as live [s]. Not a speed target
#: (those are met in benchmarks/): a freeze detector with room for a shared, noisy machine.
#: CoolProp's import in a thread of the app's own process stopped the timer for about 2 s
#: and let a sixth of its ticks through (measured here, 2 cores); common practice, no source.
LIVE_GAP = 1.0
#: the models' position in the fluid step's list, counted from the top (0)
REFERENCE_INDEX = 6


# -- the app driven in a subprocess ------------------------------------------------------------
def drive(folder: str) -> None:
    """Run in a subprocess: switch a worksheet to the reference model by keys, solve, report.

    Writes ``report.json`` in ``folder``; the records it writes are there too.
    """
    asyncio.run(_drive(Path(folder)))


async def _drive(folder: Path) -> None:
    from tui.app import JoulebookApp
    from tui.widgets.dof_line import DofLine

    ws = Worksheet.load(SAMPLES / CO2)
    session = Session.from_worksheet(ws.with_(fluid=Fluid(species="CO2", model="peng-robinson")),
                                     folder / "co2.jbk")
    session.set_step("fluid")
    app = JoulebookApp(session)
    ticks: list[float] = []
    busy: list[str] = []
    dof: list[str] = []
    report: dict = {}
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await focus(pilot, is_widget("model"))
        app.set_interval(TICK, lambda: ticks.append(time.perf_counter()))
        app.watch(app, "busy", lambda text: text and busy.append(text))
        await pilot.pause(0.2)
        t0 = time.perf_counter()
        await pilot.press("home", *["down"] * REFERENCE_INDEX, "enter")
        while not (app.check is not None and app.check.worksheet == app.session.worksheet and not app.busy):
            assert time.perf_counter() < t0 + 60, "no check came back from the reference-model process"
            dof.append(app.screen.query_one(DofLine).text)
            await pilot.pause(0.05)
        t1 = time.perf_counter()
        report.update(worksheet=app.session.worksheet.to_dict(), wait=t1 - t0,
                      ticks=[t for t in ticks if t0 <= t <= t1], busy=busy, dof=dof, check=app.check.message)

        await pilot.press("ctrl+r")  # opens the results step, which solves
        await wait_until(pilot, lambda: app.outcome is not None and app.outcome.trace is not None
                         and kinds(session)[-1] == "solve" and not app.busy, what="the solve")
        result = app.outcome.result
        report.update(error=app.outcome.error, result=result.as_json(), trace=_plain(app.outcome.trace),
                      reference_state=result.problem.model.reference_state, label=result.problem.model.label,
                      record=str(session.path))
        await pilot.press("ctrl+n")  # the review step reads the record
        await settle(pilot)
        report["step"] = app.session.step

        # a worksheet file opened as a new record, then a change committed and solved again,
        # as signing does: both solves in the reference-model process
        steam = Session.from_worksheet(Worksheet.load(SAMPLES / STEAM), folder / "steam.jbk")
        heading = steam.worksheet.heading
        steam.edit(steam.worksheet.with_(heading=replace(heading, title=heading.title + " (checked)")))
        steam.commit()
        steam.append_solve()
        report["steam"] = str(steam.path)
        try:  # an error of the model's, raised in the process
            from balance import api

            offload.call("reference", api.solve, _wet_above_critical(ws))
        except BalanceError as exc:
            report["refused"] = [type(exc).__name__, str(exc)]
    report["coolprop"] = "CoolProp" in sys.modules
    report["children"] = [child.pid for child in multiprocessing.active_children()]
    (folder / "report.json").write_text(json.dumps(report))


def _wet_above_critical(ws: Worksheet) -> Worksheet:
    """The CO2 sample starting wet at 40 degC, above CO2's critical temperature."""
    (first,) = ws.initial
    return ws.with_(initial=(replace(first, props={"T": "40 degC", "x": "0.5"}),))


def _plain(trace) -> dict:
    return {"M": trace.M, "states": [list(s) for s in trace.states],
            "curves": [[c.label, c.style, list(c.T), list(c.P), list(c.v), list(c.s)] for c in trace.curves]}


@pytest.fixture(scope="module")
def run(tmp_path_factory):
    """One headless run of the app in a subprocess, and what it reported."""
    folder = tmp_path_factory.mktemp("offload")
    env = {**os.environ, "JOULEBOOK_AUTHOR": "t.engineer", "XDG_CONFIG_HOME": str(folder / "config")}
    done = subprocess.run(
        [sys.executable, "-c", f"from tests.test_tui_offload import drive; drive({str(folder)!r})"],
        cwd=ROOT, env=env, capture_output=True, text=True, timeout=180,
    )
    assert done.returncode == 0, done.stderr[-4000:]
    return json.loads((folder / "report.json").read_text())


def test_the_ui_keeps_running_while_the_process_starts(run):
    # the worksheet typed is the sample, so the solve below can be compared with it
    assert run["worksheet"] == Worksheet.load(SAMPLES / CO2).to_dict()
    # the check was sent before the process was up: the wait covered the start
    assert "starting the reference model (seconds)" in run["busy"]
    ticks = run["ticks"]
    gaps = [b - a for a, b in zip(ticks, ticks[1:])]
    assert len(ticks) >= 0.25 * run["wait"] / TICK, (len(ticks), run["wait"])
    assert max(gaps) < LIVE_GAP, max(gaps)


def test_the_indicator_says_what_is_happening(run):
    assert any(line.endswith("starting the reference model (seconds)") for line in run["dof"])
    assert run["check"] == "1 unknown, 1 equation: ready to solve"  # as `joulebook check` counts the sample


def test_a_reference_solve_through_the_app_equals_the_solve_here(run):
    from balance import api
    from balance.record.replay import compare
    from tui.analysis import trace

    here = api.solve(Worksheet.load(SAMPLES / CO2))  # in this process, CoolProp HEOS: the reference
    got = run["result"]
    assert run["error"] == ""
    for key in ("T", "P", "v", "u", "s"):
        assert math.isclose(got["states"]["hot store"][key]["value"], getattr(here.final.point, key),
                            rel_tol=1e-9), key
    assert math.isclose(got["terms"][0]["value"]["value"], here.terms[0].value, rel_tol=1e-9)  # Q solved
    assert math.isclose(got["S_gen"]["value"], here.S_gen, rel_tol=1e-9)
    failing, _ = compare(here.as_json(), got, tolerance=1e-9)  # every number and line of text
    assert failing == [], [d.line() for d in failing]
    assert run["reference_state"] == here.problem.model.reference_state
    assert run["label"] == here.problem.model.label
    drawn = _plain(trace(here))
    assert [c[:2] for c in run["trace"]["curves"]] == [c[:2] for c in drawn["curves"]]
    for ours, theirs in zip(run["trace"]["curves"], drawn["curves"]):
        for a, b in zip(ours[2:], theirs[2:]):
            assert all(math.isclose(x, y, rel_tol=1e-9) for x, y in zip(a, b))


def test_the_record_gets_the_same_solve_entry_as_a_solve_here(run):
    from balance.record import Record
    from balance.record.replay import fold, solve_data

    assert run["step"] == "review"
    for path in (run["record"], run["steam"]):
        entries = Record.load(path).entries
        solves = [i for i, e in enumerate(entries) if e.kind == "solve"]
        for i in solves:
            # solve_data in this process (CoolProp HEOS here): the reference
            assert entries[i].data == solve_data(fold(entries[:i])), (path, i + 1)
    assert [e.kind for e in Record.load(run["steam"]).entries][-2:] == ["purpose and basis", "solve"]


def test_an_error_in_the_process_comes_back_with_its_message(run):
    from balance import api

    with pytest.raises(InputError) as here:  # in this process: the reference
        api.solve(_wet_above_critical(Worksheet.load(SAMPLES / CO2)))
    assert "quality x exists only below the critical point" in str(here.value)
    assert run["refused"] == ["BalanceError", str(here.value)]


def test_the_app_process_never_imports_coolprop(run):
    assert run["coolprop"] is False
    assert run["children"] == []  # the process was shut down when the app closed


def test_a_solve_of_older_sections_is_not_recorded(tmp_path, author):
    from balance.record.replay import solve_data
    from tui.analysis import solve

    session = Session.from_worksheet(Worksheet.load(SAMPLES / "n2-buffer-into-receiver.toml"), tmp_path / "n2.jbk")
    heading = session.worksheet.heading
    session.edit(session.worksheet.with_(heading=replace(heading, title="first change")))
    session.commit()
    older = session.solve_due()
    session.edit(session.worksheet.with_(heading=replace(heading, title="second change")))
    session.commit()
    entries = len(session.entries())
    assert session.append_solve(solve(older)) is None  # solved before the second commit
    assert len(session.entries()) == entries
    entry = session.append_solve(solve(session.worksheet))  # as the app's solve worker does
    # the record's own solve of what it holds (solve_data here) is the reference
    assert entry.kind == "solve" and entry.data == solve_data(session.record.sections())
    assert session.solve_due() is None


async def test_a_sign_off_waits_for_its_solve_in_a_worker(tmp_path, author):
    """A sign-off covers a solve: one due on the reference model is recorded from a worker
    (the UI thread never waits for the process), and the sign-off follows it."""
    from balance.record.replay import solve_data
    from tui.app import JoulebookApp

    session = Session.from_worksheet(Worksheet.load(SAMPLES / STEAM), tmp_path / "kettle.jbk")
    heading = session.worksheet.heading
    session.edit(session.worksheet.with_(heading=replace(heading, title="kettle, second look")))
    session.set_step("review")  # the edit is committed when the sign-off starts: a solve is due
    app = JoulebookApp(session)
    waited: list[bool] = []
    ask = app.solve_before_signing
    app.solve_before_signing = lambda then: waited.append(ask(then)) or waited[-1]
    try:
        async with app.run_test(size=SIZE) as pilot:
            await ready(pilot)
            await pilot.press("ctrl+g")
            await pilot.pause(0.2)
            await focus(pilot, is_widget("unsigned"))
            await pilot.press("space")
            await focus(pilot, is_widget("sign"))
            await pilot.press("enter")
            await wait_until(pilot, lambda: session.entries()[-1].kind == "sign-off", what="the sign-off")
            assert waited == [True]
            *_, solve, sign_off = session.entries()
            # the record's own solve of what it holds, worked out here (CoolProp HEOS), is the reference
            assert solve.kind == "solve" and solve.data == solve_data(session.record.sections())
            assert (sign_off.data["role"], sign_off.data.get("unsigned")) == ("prepared", True)
    finally:
        offload.shutdown()


# -- pickling -----------------------------------------------------------------------------------------
READ_BACK = """
import io, json, pickle, sys
from rich.console import Console
from tui.render import result_renderable
result, drawn = pickle.loads(sys.stdin.buffer.read())
model, final = result.problem.model, result.final.point
console = Console(file=io.StringIO(), width=120)
console.print(result_renderable(result, "si"))
print(json.dumps({
    "final": [final.T, final.P, final.v, final.u, final.h, final.s, final.x],
    "label": model.label, "reference_state": model.reference_state, "bounds": list(model.T_bounds()),
    "warnings": model.warnings(final), "equations": list(result.equations),
    "dome": list(drawn.curves[-1].P), "shown": model.label in console.file.getvalue(),
    "coolprop": "CoolProp" in sys.modules,
}))
"""


def test_a_pickled_reference_result_reads_without_coolprop():
    from balance import api
    from tui.analysis import trace

    here = api.solve(Worksheet.load(SAMPLES / STEAM))  # in this process, CoolProp HEOS: the reference
    drawn = trace(here)
    done = subprocess.run([sys.executable, "-c", READ_BACK], input=pickle.dumps((here, drawn)), cwd=ROOT,
                          capture_output=True, timeout=60)
    assert done.returncode == 0, done.stderr.decode()[-4000:]
    back = json.loads(done.stdout)
    model, final = here.problem.model, here.final.point
    assert back["final"] == [final.T, final.P, final.v, final.u, final.h, final.s, final.x]
    assert 0.0 < back["final"][-1] < 1.0  # the sample's final state is wet
    assert back["label"] == model.label and back["reference_state"] == model.reference_state
    assert back["bounds"] == list(model.T_bounds()) and back["warnings"] == model.warnings(final)
    assert back["equations"] == list(here.equations) and back["dome"] == list(drawn.curves[-1].P)
    assert back["shown"]
    assert back["coolprop"] is False


INCOMPRESSIBLE = """
[fluid]
species = "H2O"
model = "incompressible"
[[initial]]
T = "20 degC"
P = "1 bar"
m = "2 kg"
[final]
T = "60 degC"
[[heat]]
name = "heater"
Q = "?"
[process]
constraints = ["rigid"]
"""


@pytest.mark.parametrize("sample", [CO2, "air-test-cylinder-reversible.toml", "argon-membrane-rupture.toml",
                                    "n2-accumulator-polytropic.toml", None])
def test_results_of_every_model_pickle(sample):
    from balance import api

    ws = Worksheet.load(SAMPLES / sample) if sample else Worksheet.from_toml(INCOMPRESSIBLE)
    here = api.solve(ws)
    back = pickle.loads(pickle.dumps(here))
    # the result before pickling is the reference (common practice, no source)
    assert back.as_json() == here.as_json()
    assert back.problem.model.flash({"T": 330.0, "P": 2e5}) == here.problem.model.flash({"T": 330.0, "P": 2e5})


def test_an_unused_reference_model_pickles_without_its_state():
    from balance.models import make_model
    from balance.species import lookup

    model = make_model("reference", lookup("H2O"))
    back = pickle.loads(pickle.dumps(model))
    assert back.fluid == "Water" and back._state is None
    # made again on first use: IAPWS-95 through CoolProp, Tc as iapws 1.5 IAPWS95 gives it (647.096 K)
    from iapws import IAPWS95

    assert math.isclose(back.at_TP(300.0, 1e5).T, 300.0) and math.isclose(back._c.Tc, IAPWS95.Tc)


# -- the process dying ----------------------------------------------------------------------------------
def _child():
    """The reference-model process (the only child of this process a test starts)."""
    children = multiprocessing.active_children()
    return children[0] if len(children) == 1 else None


async def test_a_dead_process_is_reported_and_started_again(tmp_path, author):
    from tui.app import JoulebookApp
    from tui.widgets.dof_line import DofLine

    ws = Worksheet.load(SAMPLES / CO2)
    session = Session.from_worksheet(ws.with_(fluid=Fluid(species="CO2", model="ideal-gas")), tmp_path / "co2.jbk")
    session.edit(ws)  # the reference model, not committed yet
    session.set_step("states")  # no adequacy advice here: the check alone meets the dead process
    seen: list = []
    app = JoulebookApp(session)
    try:
        async with app.run_test(size=SIZE, message_hook=seen.append) as pilot:
            # the process is started once the first screen is painted: stop it while it loads
            # (before the check it will be sent; waiting for workers here would wait for that)
            for _ in range(3000):
                if _child() is not None:
                    break
                await pilot.pause(0.01)
            os.kill(_child().pid, signal.SIGKILL)
            await wait_until(pilot, lambda: app.check is not None and not app.busy, what="the check")
            assert app.check.message.startswith("not checked: the reference-model process stopped")
            assert app.screen.query_one(DofLine).text.startswith("● not checked: the reference-model process")
            notes = [m.notification for m in seen if type(m).__name__ == "Notify"]
            assert any(n.title == "not checked" and "started again at the next try" in n.message for n in notes)
            assert not any(n.title == "internal error" for n in notes)  # no traceback, no defect
            # what was typed is kept, on screen and in the draft
            assert app.session.worksheet == ws and session.dirty() == ("fluid",)
            assert json.loads(session.draft_path.read_text())["worksheet"]["fluid"]["model"] == "reference"

            await pilot.press("ctrl+n")  # the next step recounts: a new process
            deadline = time.perf_counter() + 60
            while not (app.check.ready and not app.busy):
                assert time.perf_counter() < deadline, ("no check from a new process", app.check.message, app.busy)
                await pilot.pause(0.05)
            await pilot.press("ctrl+r")
            # the whole solve worker: the result, its solve entry (worked out in the process too)
            # and the diagrams; the entries are counted only once nothing more is on its way
            await wait_until(pilot, lambda: app.outcome is not None and app.outcome.result is not None
                             and app.outcome.trace is not None and kinds(session)[-1] == "solve"
                             and not app.busy, what="the solve")
            await settle(pilot)
            entries = len(session.entries())

            os.kill(_child().pid, signal.SIGKILL)
            await wait_until(pilot, lambda: _child() is None, what="the process to end")
            await pilot.press("ctrl+r")  # on the results step: solves again, into the dead process
            await wait_until(pilot, lambda: not app.solving, what="the failed solve")
            assert app.outcome.result is None
            assert app.outcome.error.startswith("the reference-model process stopped")
            assert "not solved: the reference-model process stopped" in str(
                app.screen.query_one("#outcome").render())
            assert len(session.entries()) == entries  # nothing recorded for a solve that did not run
    finally:
        offload.shutdown()
    assert multiprocessing.active_children() == []
