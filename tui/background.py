"""The app's work in the background: the check, the adequacy advice, the solve and its
record entry, the diagrams, the warm-up, and the indicator that says what is running.

Work that may be slow runs in thread workers and reports back with a
message; for the reference model the workers hand it to that model's own
process (:func:`tui.offload.call`) and wait: CoolProp is never imported in
the app's process. A solve is solved once: the screen shows it and the
record files it (:meth:`tui.session.Session.append_solve`). Errors from
workers end up in one place, :meth:`BackgroundWork.on_worker_state_changed`.

:class:`BackgroundWork` is a part of :class:`tui.app.JoulebookApp` (its
reactive values ``check``, ``advice``, ``outcome`` and ``busy`` are the app's).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace

from textual import work
from textual.message import Message
from textual.worker import Worker, WorkerState

from balance.errors import BalanceError, InputError
from balance.worksheet import Worksheet

from . import offload


@dataclass(frozen=True)
class Outcome:
    """The latest solve: for which worksheet, and what came of it."""

    worksheet: Worksheet
    result: object | None = None
    """the solved balance (a result of its kind: balance.balances.closed.Result, ...)"""
    error: str = ""
    trace: object | None = None
    """once the diagrams are computed (:func:`tui.analysis.trace`): a closed system's
    balance.diagrams.Trace, a steady-flow network's tui.analysis.FlowTraces"""
    seconds: float = 0.0
    house: tuple = ()
    """the house procedure's rules applied to this solve (:class:`balance.procedures.Finding`)"""
    data: dict | None = None
    """the solve entry's data (:func:`balance.api.entry_data`): what the record files and the
    procedure's checks and the practice mode read"""
    uncertainty: object | None = None
    """where a value carries an uncertainty: the results' budgets (balance.study.uncertainty.Propagation)"""


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


class Compared(Message):
    """The worksheet solved on a second model, beside the first (tui.analysis.Comparison)."""

    def __init__(self, comparison) -> None:
        super().__init__()
        self.comparison = comparison


class Swept(Message):
    """The worksheet solved over a range of one input (balance.study.sweep.Sweep), or why not."""

    def __init__(self, worksheet: Worksheet, sweep=None, error: str = "", field: str = "") -> None:
        super().__init__()
        self.worksheet, self.sweep, self.error, self.field = worksheet, sweep, error, field


class Warmed(Message):
    """numpy, scipy, pint and the models are loaded: units can be checked."""


class BackgroundWork:
    """The app's workers and what they report (a mixin of :class:`tui.app.JoulebookApp`)."""

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
        from .analysis import Check, check, field_problems, statuses

        try:
            answer = offload.call(ws.fluid.model, check, ws, visited)
        except offload.OffloadError as exc:
            self.notify(str(exc), title="not checked", severity="error", timeout=10, markup=False)
            problems = field_problems(ws)  # each field's own check still holds
            answer = Check(ws, False, f"not checked: {exc}", statuses(ws, visited, problems), problems=problems)
        self.post_message(Checked(version, answer))

    def on_checked(self, message: Checked) -> None:
        if message.version != self._version:
            return  # an older worksheet's count
        self._set_busy("check", None)
        was_ready = self.check is not None and self.check.ready
        self.check = message.check
        self.hold_faulty()  # no commit writes a step at fault
        self._update_statuses()
        if message.check.ready != was_ready:
            self._bindings_changed()  # grey or ungrey Solve
        self._run_after_check()

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

    def start_solve(self) -> None:
        self.commit_all(quiet=True)  # the record solves what it holds: commit first
        ws = self.session.worksheet  # ready, so no field is at fault: the commit writes it all
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
        house = None
        try:  # where the model runs: a budget of the uncertainty solves the worksheet again
            data, uncertainty = offload.call(ws.fluid.model, analysis.filed, solved)
        except (BalanceError, offload.OffloadError) as exc:
            data = uncertainty = None
            self.notify(f"the solve's record entry not worked out: {exc}", severity="error", markup=False)
        if self.session.procedure is not None and data is not None:
            house = tuple(self.session.findings(data, ws))
        self.post_message(Solved(Outcome(ws, solved.result, solved.message, seconds=time.perf_counter() - t0,
                                         house=house or (), data=data, uncertainty=uncertainty)))
        self._record_solve(solved, data)  # the record files this very solve
        if solved.result is None:
            return
        try:
            drawn = offload.call(ws.fluid.model, analysis.trace, solved.result)
        except BalanceError as exc:
            self.notify(f"diagram not drawn: {exc}", severity="warning", markup=False)
            drawn = None
        self.post_message(Traced(ws, drawn))

    def _record_solve(self, solved=None, data: dict | None = None) -> None:
        """Append the solve to the record, from a worker: ``solved`` as it is (the one
        shown, with its entry's ``data`` when worked out), or without it the record's due
        solve, worked out by :meth:`Session.append_solve`."""
        try:
            entry = self.session.append_solve(solved, data)
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

    # -- two models side by side ---------------------------------------------------------
    def start_compare(self, other: str) -> None:
        """Solve the worksheet on ``other`` as well (the reference model in its own process)
        and show the two side by side; nothing of it is recorded."""
        ws = self.session.worksheet
        slow = self._slow(ws) or offload.uses_reference(other)
        self._set_busy("compare", self._slow_text("comparing") if slow else "comparing")
        outcome = self.outcome
        first = None
        if outcome is not None and outcome.worksheet == ws and outcome.result is not None:
            from balance.api import Attempt

            first = Attempt(ws, outcome.result)  # the solve on screen: not solved again
        self._compare_worker(ws, other, first)

    @work(thread=True, exclusive=True, group="compare", exit_on_error=False)
    def _compare_worker(self, ws: Worksheet, other: str, first) -> None:
        from balance.api import Attempt

        from . import analysis

        def solved(sheet: Worksheet):
            try:
                return offload.call(sheet.fluid.model, analysis.solve, sheet)
            except offload.OffloadError as exc:
                return Attempt(sheet, error_kind="OffloadError", error=str(exc))

        second_ws = analysis.with_model(ws, other)
        attempts = (first or solved(ws), solved(second_ws))
        self.post_message(Compared(analysis.compared(ws, (ws.fluid.model, other), attempts)))

    # -- one input over a range (the results step's sweep tab) -----------------------------
    def start_sweep(self, vary: str, points: int | None) -> None:
        """Solve the worksheet over ``vary`` (``PATH=VALUES``) and show the cases (not recorded)."""
        ws = self.session.worksheet
        self._set_busy("sweep", self._slow_text("sweeping") if self._slow(ws) else "sweeping")
        self._sweep_worker(ws, vary, points)

    @work(thread=True, exclusive=True, group="sweep", exit_on_error=False)
    def _sweep_worker(self, ws: Worksheet, vary: str, points: int | None) -> None:
        from . import analysis

        try:
            swept = offload.call(ws.fluid.model, analysis.sweep, ws, vary, points)
        except InputError as exc:
            self.post_message(Swept(ws, error=exc.message, field=exc.field))
            return
        except (BalanceError, offload.OffloadError) as exc:
            self.post_message(Swept(ws, error=str(exc)))
            return
        self.post_message(Swept(ws, swept))

    def on_swept(self, message: Swept) -> None:
        self._set_busy("sweep", None)
        self.swept = message

    def on_compared(self, message: Compared) -> None:
        self._set_busy("compare", None)
        self.comparison = message.comparison

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

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.state != WorkerState.ERROR:
            return
        group = event.worker.group
        self._set_busy({"check": "check", "advice": "advice", "solve": "solve", "compare": "compare"}.get(group, group),
                       None)
        if group == "check":
            self._run_after_check(force=True)  # committing waits no longer: each field's own check holds
        error = event.worker.error
        self.notify(f"{group}: {type(error).__name__}: {error}", title="internal error", severity="error",
                    timeout=15)
