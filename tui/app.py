"""The terminal app: a guided worksheet in eight steps.

The app holds the :class:`~tui.session.Session` and the few values every
screen watches (each replaced, never mutated): the worksheet, the
degrees-of-freedom check, the step statuses, the latest solve, the display
units, what is uncommitted, and what is running in the background.

Work that may be slow runs in thread workers and reports back with a
message: the check (prepare + DOF count), the adequacy hint, the solve and
the diagram. For the reference model the workers hand the work to its own
process (:mod:`tui.offload`) and wait: CoolProp is never imported here.
Errors from workers end up in one place,
:meth:`JoulebookApp.on_worker_state_changed`.

Nothing heavy is imported before the first screen is shown: numpy, scipy,
pint and the models load in a warm-up worker after it.
"""

from __future__ import annotations

import gc
import time
from dataclasses import dataclass, replace

from textual import work
from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.message import Message
from textual.reactive import reactive
from textual.worker import Worker, WorkerState

from balance.errors import BalanceError
from balance.worksheet import Worksheet

from . import offload
from .session import Session
from .steps import BY_ID, ORDER, STEPS, neighbour, screen_class

UNIT_SETS = ("si", "metric", "us")
UNIT_NAMES = {"si": "SI", "metric": "metric engineering", "us": "US customary"}


@dataclass(frozen=True)
class Outcome:
    """The latest solve: for which worksheet, and what came of it."""

    worksheet: Worksheet
    result: object | None = None
    """the solved balance (balance.balances.closed.Result)"""
    error: str = ""
    trace: object | None = None
    """balance.diagrams.Trace once the diagrams are computed"""
    seconds: float = 0.0


class Checked(Message):
    def __init__(self, version: int, check) -> None:
        super().__init__()
        self.version = version
        self.check = check


class Advised(Message):
    def __init__(self, worksheet: Worksheet, advice) -> None:
        super().__init__()
        self.worksheet = worksheet
        self.advice = advice


class Solved(Message):
    def __init__(self, outcome: Outcome) -> None:
        super().__init__()
        self.outcome = outcome


class Traced(Message):
    def __init__(self, worksheet: Worksheet, trace) -> None:
        super().__init__()
        self.worksheet = worksheet
        self.trace = trace


class Recorded(Message):
    """A solve entry was appended to the record (or failed to be)."""

    def __init__(self, entry, error: str = "") -> None:
        super().__init__()
        self.entry = entry
        self.error = error


class Warmed(Message):
    """numpy, scipy, pint and the models are loaded: units can be checked."""


class JoulebookApp(App):
    """joulebook's guided worksheet."""

    CSS_PATH = "app.tcss"
    TITLE = "joulebook"

    BINDINGS = [
        # in footer order: what is cut off at 80 columns is also in F1 help and the palette
        Binding("ctrl+n", "next_step", "Next", id="step.next", priority=True,
                tooltip="Commit this step and open the next one"),
        Binding("ctrl+o", "previous_step", "Back", id="step.back", priority=True,
                tooltip="Commit this step and open the one before"),
        Binding("ctrl+q", "quit", "Quit", id="app.quit", priority=True,
                tooltip="Quit; asks first when edits are not committed"),
        Binding("f1", "help", "Help", id="step.help", tooltip="What this step is for, and common mistakes"),
        Binding("ctrl+r", "solve", "Solve", id="balance.solve",
                tooltip="Solve the balance (when unknowns and equations match)"),
        Binding("ctrl+s", "commit", "Commit", id="record.commit",
                tooltip="Write the uncommitted edits to the record"),
        Binding("f2", "cycle_units", "Units", id="display.units",
                tooltip="Switch the display units: SI, metric engineering, US customary"),
        Binding("ctrl+p", "command_palette", "Commands", id="app.commands", priority=True,
                tooltip="Every command by name"),
        Binding("ctrl+pagedown", "next_step", "Next", id="step.next.page", priority=True, show=False,
                tooltip="Commit this step and open the next one"),
        Binding("ctrl+pageup", "previous_step", "Back", id="step.back.page", priority=True, show=False,
                tooltip="Commit this step and open the one before"),
    ]

    worksheet: reactive[Worksheet] = reactive(Worksheet, init=False)
    check = reactive(None, init=False)
    statuses: reactive[dict] = reactive(dict, init=False)
    outcome = reactive(None, init=False)
    advice = reactive(None, init=False)
    units = reactive("metric", init=False)
    dirty: reactive[tuple] = reactive(tuple, init=False)
    busy = reactive("", init=False)

    def __init__(self, session: Session, *, warm: bool = True, gc_paused: bool = False) -> None:
        super().__init__()
        self.session = session
        self._gc_paused = gc_paused
        self.units_ready = False
        self._warm_first = warm
        self._version = 0
        self._busy_tasks: dict[str, str] = {}
        self._visited: set[str] = set(session.extras.get("visited", ()))
        self.set_reactive(JoulebookApp.worksheet, session.worksheet)
        self.set_reactive(JoulebookApp.units, session.units)
        self.set_reactive(JoulebookApp.dirty, session.dirty())
        if session.extras.get("theme"):
            self.theme = session.extras["theme"]

    # -- start ---------------------------------------------------------------
    def get_default_screen(self):
        # The first step is the bottom of the stack (no empty screen beneath it to build
        # and restyle first); steps replace each other there with switch_screen, which
        # pops a result callback from the screen it replaces, as any pushed screen has
        # (Textual 8.2). Give this one the same.
        self._visit(self.session.step)
        screen = self.make_screen(self.session.step)
        screen._push_result_callback(self, None)
        return screen

    def on_mount(self) -> None:
        for note in self.session.notes:
            self.notify(note, timeout=8)
        self.screen.call_after_refresh(self._first_screen_shown)

    def _first_screen_shown(self) -> None:
        if self._gc_paused:
            gc.enable()  # paused for the start-up by tui.cli.app_for
        # a moment later: the imports would compete for the GIL with the first frame's writing
        self.set_timer(0.05, self._start_background)

    def _start_background(self) -> None:
        if self._warm_first:
            self.run_worker(self._warm_up, thread=True, group="warm", exit_on_error=False)
        offload.warm(self.session.worksheet.fluid.model)

    def _warm_up(self) -> None:
        from balance.balances import closed  # noqa: F401  numpy, the models, the closed balance
        from balance.species import catalogue
        from balance.units import registry

        registry()
        catalogue()
        self.post_message(Warmed())

    def on_warmed(self, message: Warmed) -> None:
        self.units_ready = True
        if hasattr(self.screen, "revalidate"):
            self.screen.revalidate()
        self.start_check()
        if self.session.step == "fluid":
            self.start_advice()

    def on_unmount(self) -> None:
        self.session.flush()  # the latest draft is on disk before the app goes
        offload.shutdown()

    @staticmethod
    def make_screen(step: str):
        return screen_class(step)()

    # -- the background indicator ---------------------------------------------
    def _set_busy(self, key: str, text: str | None) -> None:
        tasks = dict(self._busy_tasks)
        if text:
            tasks[key] = text
        else:
            tasks.pop(key, None)
        self._busy_tasks = tasks
        self.busy = "; ".join(dict.fromkeys(tasks.values()))  # the same words once

    @property
    def solving(self) -> bool:
        return "solve" in self._busy_tasks

    # -- edits -------------------------------------------------------------------
    def edit(self, ws: Worksheet) -> None:
        """A screen's new worksheet: autosave it and recount."""
        if ws == self.session.worksheet:
            return
        self.session.edit(ws)
        error = self.session.take_write_error()
        if error:
            self.notify(f"draft not saved: {error}", severity="error", timeout=10)
        self.worksheet = ws
        dirty = self.session.dirty()
        if dirty != self.dirty:
            self.dirty = dirty
        self.start_check()
        if self.session.step == "fluid":
            self.start_advice()

    def set_extra(self, key: str, value) -> None:
        self.session.set_extra(key, value)

    def _slow(self, ws: Worksheet) -> bool:
        """Whether the work goes to the reference-model process (with the indicator shown)."""
        return offload.uses_reference(ws.fluid.model)

    def _slow_text(self, doing: str) -> str:
        if not offload.ready():
            return "starting the reference model (seconds)"  # once a session; fits at 80 columns
        return f"{doing} with the reference model"

    def start_check(self) -> None:
        if not self.units_ready:
            return
        self._version += 1
        ws = self.session.worksheet
        if self._slow(ws):
            self._set_busy("check", self._slow_text("checking"))
        self._check_worker(ws, self._version, frozenset(self._visited))

    @work(thread=True, exclusive=True, group="check", exit_on_error=False)
    def _check_worker(self, ws: Worksheet, version: int, visited: frozenset) -> None:
        from .analysis import Check, check, statuses

        try:
            answer = offload.call(ws.fluid.model, check, ws, visited)
        except offload.OffloadError as exc:
            self.notify(str(exc), title="not checked", severity="error", timeout=10, markup=False)
            answer = Check(ws, False, f"not checked: {exc}", statuses(ws, visited))
        self.post_message(Checked(version, answer))

    def on_checked(self, message: Checked) -> None:
        if message.version != self._version:
            return  # an older worksheet's count
        self._set_busy("check", None)
        was_ready = self.check is not None and self.check.ready
        self.check = message.check
        self._update_statuses()
        if message.check.ready != was_ready:
            self._bindings_changed()  # grey or ungrey Solve

    def _bindings_changed(self) -> None:
        """Ask the key bar to redraw (greyed actions may have become possible)."""
        if self.screen_stack:
            self.screen.refresh_bindings()

    def watch_dirty(self, old: tuple, new: tuple) -> None:
        if bool(old) != bool(new):
            self._bindings_changed()  # grey or ungrey Commit

    def _update_statuses(self) -> None:
        check = self.check
        statuses = dict(check.statuses) if check is not None else {}
        ws = self.session.worksheet
        outcome = self.outcome
        if outcome is not None and outcome.worksheet == ws:
            statuses["results"] = "complete" if outcome.result is not None else "invalid"
        else:
            statuses["results"] = "incomplete"
        statuses["review"] = "complete" if self.session.signed() else "incomplete"
        if statuses != self.statuses:
            self.statuses = statuses

    def start_advice(self) -> None:
        if not self.units_ready:
            return
        ws = self.session.worksheet
        if self._slow(ws):
            self._set_busy("advice", self._slow_text("evaluating the states"))
        self._advice_worker(ws)

    @work(thread=True, exclusive=True, group="advice", exit_on_error=False)
    def _advice_worker(self, ws: Worksheet) -> None:
        from balance import api
        from balance.adequacy import Advice

        try:
            answer = offload.call(ws.fluid.model, api.advise, ws)
        except offload.OffloadError as exc:
            answer = Advice(ws.fluid.model, problems=(str(exc),), adequate=False)
        self.post_message(Advised(ws, answer))

    def on_advised(self, message: Advised) -> None:
        if message.worksheet.fluid != self.session.worksheet.fluid:
            return
        self._set_busy("advice", None)
        self.advice = message.advice

    # -- steps -----------------------------------------------------------------------
    def _visit(self, step: str) -> None:
        if step not in self._visited:
            self._visited.add(step)
            self.session.set_extra("visited", sorted(self._visited))

    def goto(self, step: str) -> None:
        """Leave the current step (committing it) and open ``step``."""
        self.commit_all(quiet=True)
        self._visit(step)
        self.session.set_step(step)
        self.advice = None
        self.switch_screen(self.make_screen(step))
        self.start_check()
        self._bindings_changed()

    def action_next_step(self) -> None:
        nxt = neighbour(self.session.step, 1)
        if nxt:
            self.goto(nxt)

    def action_previous_step(self) -> None:
        prev = neighbour(self.session.step, -1)
        if prev:
            self.goto(prev)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "solve":
            return True if self.check is not None and self.check.ready else None
        if action == "next_step":
            return True if neighbour(self.session.step, 1) else None
        if action == "previous_step":
            return True if neighbour(self.session.step, -1) else None
        if action == "commit":
            return True if self.dirty else None
        return True

    # -- committing and quitting ---------------------------------------------------------
    def commit_all(self, quiet: bool = False) -> list:
        try:
            written = self.session.commit()
        except BalanceError as exc:
            self.notify(f"not committed: {exc}", severity="error", timeout=10)
            return []
        except OSError as exc:
            self.notify(f"not committed: {self.session.path}: {exc.strerror}", severity="error", timeout=10)
            return []
        self.dirty = self.session.dirty()
        if written and not quiet:
            self.notify(f"committed {len(written)} entr{'y' if len(written) == 1 else 'ies'} to "
                        f"{self.session.path.name}")
        self._update_statuses()
        return written

    def after_record_change(self) -> None:
        """The record was written to outside a commit (comment, resolution, sign-off)."""
        self.dirty = self.session.dirty()
        self._update_statuses()
        self._bindings_changed()

    def action_commit(self) -> None:
        if not self.session.dirty():
            self.notify("nothing to commit")
            return
        self.commit_all()

    async def action_quit(self) -> None:
        if not self.session.dirty():
            self.exit()
            return
        from .screens.confirm_quit import ConfirmQuitScreen

        def answered(choice: str | None) -> None:
            if choice == "commit":
                if self.commit_all(quiet=True) or not self.session.dirty():
                    self.exit()
            elif choice == "keep":
                self.session.save_draft()
                self.exit()

        self.push_screen(ConfirmQuitScreen(self.session.dirty_steps(), self.session.draft_path.name), answered)

    # -- solving ------------------------------------------------------------------------
    def action_solve(self) -> None:
        if self.check is None or not self.check.ready:
            self.notify(self.check.message if self.check else "still counting the degrees of freedom",
                        severity="warning")
            return
        self.commit_all(quiet=True)
        if self.session.step != "results":
            self.goto("results")  # the results step solves when it opens
        else:
            self.start_solve()

    def start_solve(self) -> None:
        self.commit_all(quiet=True)  # the record solves what it holds: commit first
        ws = self.session.worksheet
        self._set_busy("solve", self._slow_text("solving") if self._slow(ws) else "solving")
        self._solve_worker(ws)

    @work(thread=True, exclusive=True, group="solve", exit_on_error=False)
    def _solve_worker(self, ws: Worksheet) -> None:
        from . import analysis

        t0 = time.perf_counter()
        try:
            solved = offload.call(ws.fluid.model, analysis.solve, ws)
        except offload.OffloadError as exc:  # not solved at all: nothing to record
            self.post_message(Solved(Outcome(ws, error=str(exc), seconds=time.perf_counter() - t0)))
            return
        self.post_message(Solved(Outcome(ws, solved.result, solved.message, seconds=time.perf_counter() - t0)))
        self._record_solve(solved)  # the record files this very solve
        if solved.result is None:
            return
        try:
            drawn = offload.call(ws.fluid.model, analysis.trace, solved.result)
        except BalanceError as exc:
            self.notify(f"diagram not drawn: {exc}", severity="warning", markup=False)
            drawn = None
        self.post_message(Traced(ws, drawn))

    def _record_solve(self, solved=None) -> None:
        """Append the solve to the record, from a worker: ``solved`` as it is (the one
        shown), or without it the record's due solve, worked out by :meth:`Session.append_solve`."""
        try:
            entry = self.session.append_solve(solved)
        except BalanceError as exc:
            self.post_message(Recorded(None, str(exc)))
            return
        self.post_message(Recorded(entry))

    def solve_before_signing(self, then) -> bool:
        """A sign-off covers a solve: when one is due on the reference model, record it in a
        worker (the indicator shown) and call ``then`` on the UI thread after; False when no
        solve has to wait for that model's process (the sign-off then solves as it goes).

        Commit first: what is due is worked out from the record.
        """
        if not (self._slow(self.session.worksheet) and self.session.solve_due() is not None):
            return False
        self._set_busy("sign", self._slow_text("solving before the sign-off"))
        self._sign_solve_worker(then)
        return True

    @work(thread=True, exclusive=True, group="sign", exit_on_error=False)
    def _sign_solve_worker(self, then) -> None:
        try:
            self._record_solve()  # a failure is reported by on_recorded
        finally:
            self.call_from_thread(self._set_busy, "sign", None)
        if self.session.solve_due() is None:
            self.call_from_thread(then)
        else:
            self.notify("not signed off: the solve it covers was not recorded", severity="error", timeout=10)

    def on_solved(self, message: Solved) -> None:
        self._set_busy("solve", None)
        self.outcome = message.outcome
        self._update_statuses()

    def on_traced(self, message: Traced) -> None:
        if self.outcome is not None and self.outcome.worksheet == message.worksheet:
            self.outcome = replace(self.outcome, trace=message.trace)

    def on_recorded(self, message: Recorded) -> None:
        if message.error:
            self.notify(f"solve not recorded: {message.error}", severity="error", timeout=10)
        elif message.entry is not None:
            self.notify(f"solve recorded as entry {message.entry.seq}")
        self._update_statuses()
        self._bindings_changed()

    # -- errors from workers: one place ------------------------------------------------------
    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.state != WorkerState.ERROR:
            return
        group = event.worker.group
        self._set_busy({"check": "check", "advice": "advice", "solve": "solve"}.get(group, group), None)
        error = event.worker.error
        self.notify(f"{group}: {type(error).__name__}: {error}", title="internal error", severity="error",
                    timeout=15)

    # -- help, units, theme ---------------------------------------------------------------------
    def action_help(self) -> None:
        from .screens.help import HelpScreen

        if isinstance(self.screen, HelpScreen):
            return
        step = self.session.step
        self.push_screen(HelpScreen(BY_ID[step].title, screen_class(step).HELP))

    def action_cycle_units(self) -> None:
        units = UNIT_SETS[(UNIT_SETS.index(self.units) + 1) % len(UNIT_SETS)]
        self.set_units(units)

    def set_units(self, units: str) -> None:
        self.units = units
        self.session.set_units(units)
        self.notify(f"display units: {UNIT_NAMES[units]}")

    def toggle_light_dark(self) -> None:
        self.theme = "textual-light" if self.current_theme.dark else "textual-dark"
        self.session.set_extra("theme", self.theme)

    def get_system_commands(self, screen):
        yield from super().get_system_commands(screen)
        for step in STEPS:
            yield SystemCommand(f"Step {step.number}: {step.title}", f"Commit this step and open step {step.number}",
                                lambda s=step.id: self.goto(s))
        yield SystemCommand("Commit", "Write the uncommitted edits to the record", self.action_commit)
        if self.check is not None and self.check.ready:
            yield SystemCommand("Solve", "Solve the balance and record the solve", self.action_solve)
        yield SystemCommand("Help for this step", "What the step is for, and common mistakes", self.action_help)
        for units in UNIT_SETS:
            yield SystemCommand(f"Units: {UNIT_NAMES[units]}", f"Show results in {UNIT_NAMES[units]} units",
                                lambda u=units: self.set_units(u))
        yield SystemCommand("Light or dark", "Switch between the light and the dark theme", self.toggle_light_dark)
        extra = getattr(screen, "step_commands", None)
        if extra is not None:
            yield from extra()


def run(app: JoulebookApp) -> int:
    """Run the app; 0 when it closes normally."""
    try:
        app.run()
    finally:
        app.session.flush()
    return 0


__all__ = ["JoulebookApp", "Outcome", "run", "ORDER"]
