"""The terminal app: a guided worksheet, one step a screen (tui/steps.py lists them).

The app holds the :class:`~tui.session.Session` and the few values every
screen watches (each replaced, never mutated): the worksheet, the
degrees-of-freedom check, the step statuses, the latest solve, the display
units, what is uncommitted, and what is running in the background. This
module owns the steps, committing, quitting, help, units and the command
palette; the work in the background (the check, the advice, the solve and
its record entry, the diagrams) is :mod:`tui.background`.

Nothing heavy is imported before the first screen is shown: numpy, scipy,
pint and the models load in a warm-up worker after it.
"""

from __future__ import annotations

import gc

from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.reactive import reactive

from balance.errors import BalanceError
from balance.worksheet import Worksheet

from . import offload
from .background import BackgroundWork, Outcome
from .house import HOUSE_ACTIONS, HouseMode
from .session import Session
from .steps import Steps, screen_class, steps_of

UNIT_SETS = ("si", "metric", "us", "typed")
UNIT_NAMES = {"si": "SI", "metric": "metric engineering", "us": "US customary",
              "typed": "as typed (each kind in the unit first typed for it; gauge shown absolute)"}


class JoulebookApp(BackgroundWork, HouseMode, App):
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
                tooltip="Switch the display units: SI, metric engineering, US customary, as typed"),
        Binding("ctrl+p", "command_palette", "Commands", id="app.commands", priority=True,
                tooltip="Every command by name"),
        Binding("f4", "compare", "Compare", id="balance.compare", show=False,
                tooltip="Solve the worksheet on another model too and show both side by side"),
        Binding("f3", "export", "Export", id="record.export", show=False,
                tooltip="Export the calculation report (Markdown or HTML) from the record"),
        Binding("f5", "toggle_guide", "Guide", id="house.guide",
                tooltip="Show or hide the house procedure's guidance beside the step"),
        Binding("f6", "check_step", "Check step", id="practice.check",
                tooltip="Practice: compare this step with the firm's model answer"),
        Binding("f7", "show_answer", "Answer", id="practice.answer",
                tooltip="Practice: show the firm's answer for this step"),
        Binding("f8", "justify", "Justify", id="house.justify",
                tooltip="Write the justification of a deviation from a house rule that stops the calculation"),
        Binding("ctrl+pagedown", "next_step", "Next", id="step.next.page", priority=True, show=False,
                tooltip="Commit this step and open the next one"),
        Binding("ctrl+pageup", "previous_step", "Back", id="step.back.page", priority=True, show=False,
                tooltip="Commit this step and open the one before"),
    ]

    worksheet: reactive[Worksheet] = reactive(Worksheet, init=False)
    check = reactive(None, init=False)
    statuses: reactive[dict] = reactive(dict, init=False)
    outcome = reactive(None, init=False)
    guide_shown: reactive[bool] = reactive(True, init=False)
    """whether the house procedure's side panel is shown (f5)"""
    practice_seen = reactive(0, init=False)
    """bumped after each practice check, for the side panel to redraw"""
    advice = reactive(None, init=False)
    units = reactive("metric", init=False)
    dirty: reactive[tuple] = reactive(tuple, init=False)
    busy = reactive("", init=False)
    comparison = reactive(None, init=False)
    """the worksheet solved on a second model (tui.analysis.Comparison), for the compare screen"""
    swept = reactive(None, init=False)
    """the worksheet solved over a range of one input (tui.background.Swept), for the sweep tab"""
    notices: reactive[tuple] = reactive(tuple, init=False)
    """the notifications being shown (textual.notifications.Notification), oldest first:
    a step shows them in its notice bar, where they cover nothing"""

    def __init__(self, session: Session, *, warm: bool = True, gc_paused: bool = False) -> None:
        super().__init__()
        self.session = session
        self._gc_paused = gc_paused
        self.units_ready = False
        self._warm_first = warm
        self._version = 0
        self._busy_tasks: dict[str, str] = {}
        self.focus_on_open = None
        """a FieldProblem whose field the next step screen focuses as it opens (ctrl+r)"""
        self._after_check: list = []
        """what waits for the check of the worksheet as it stands (committing, solving)"""
        self._visited: set[str] = set(session.extras.get("visited", ()))
        self.set_reactive(JoulebookApp.worksheet, session.worksheet)
        self.set_reactive(JoulebookApp.units, session.units)
        self.set_reactive(JoulebookApp.dirty, session.dirty())
        self.set_reactive(JoulebookApp.guide_shown, bool(session.extras.get("guide", True)))
        if session.extras.get("theme"):
            self.theme = session.extras["theme"]

    @property
    def steps(self) -> Steps:
        """The steps of the worksheet's kind (its ``[system] kind``): the step list, their
        numbers, Next and Back, the sections each commits."""
        return steps_of(self.session.worksheet.system.kind)

    # -- start ---------------------------------------------------------------
    def get_default_screen(self):
        # The first step is the bottom of the stack (no empty screen beneath it to build
        # and restyle first); steps replace each other there with switch_screen, which
        # pops a result callback from the screen it replaces, as any pushed screen has
        # (Textual 8.2). Give this one the same.
        if self.session.step not in self.steps:  # a step of the other kind (a draft edited by hand)
            self.session.step = self.steps.order[0]
        self._visit(self.session.step)
        screen = self.make_screen(self.session.step)
        screen._push_result_callback(self, None)
        return screen

    def on_mount(self) -> None:
        for alarm in self.session.alarms:
            self.notify(alarm, severity="error", timeout=60, markup=False)
        for note in self.session.notes:
            self.notify(note, timeout=8)
        self.screen.call_after_refresh(self._first_screen_shown)

    def _first_screen_shown(self) -> None:
        if self._gc_paused:
            gc.enable()  # paused for the start-up by tui.cli.app_for
        # a moment later: the imports would compete for the GIL with the first frame's writing
        self.set_timer(0.05, self._start_background)

    def on_notify(self, event) -> None:
        """Every notification is kept for the notice bar as well (Textual's own handler
        shows it as a toast, which a step hides)."""
        note = event.notification
        self.notices = (*self.notices, note)[-10:]
        self.set_timer(note.timeout, lambda: self._expire_notice(note.identity))

    def _expire_notice(self, identity: str) -> None:
        kept = tuple(n for n in self.notices if n.identity != identity)
        if len(kept) != len(self.notices):
            self.notices = kept

    def on_unmount(self) -> None:
        self.session.flush()  # the latest draft is on disk before the app goes
        offload.shutdown()

    @staticmethod
    def make_screen(step: str):
        return screen_class(step)()

    # -- edits -------------------------------------------------------------------
    def edit(self, ws: Worksheet) -> None:
        """A screen's new worksheet: autosave it and recount."""
        if ws == self.session.worksheet:
            return
        self.session.edit(ws)
        error = self.session.take_write_error()
        if error:
            self.notify(f"draft not saved: {error}", severity="error", timeout=10)
        kind_changed = ws.system.kind != self.worksheet.system.kind
        self.worksheet = ws
        if kind_changed:
            self._bindings_changed()  # Next and Back follow the kind's steps
        dirty = self.session.dirty()
        if dirty != self.dirty:
            self.dirty = dirty
        self.start_check()
        if self.session.step == "fluid":
            self.start_advice()

    def set_extra(self, key: str, value) -> None:
        self.session.set_extra(key, value)

    def _bindings_changed(self) -> None:
        """Ask the key bar to redraw (greyed actions may have become possible)."""
        if self.screen_stack:
            self.screen.refresh_bindings()

    def watch_check(self) -> None:
        # the worksheet was checked again: the "as typed" units follow what is typed now
        if self.units == "typed":
            from .display import use_typed

            use_typed(self.session.worksheet)

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

    # -- steps -----------------------------------------------------------------------
    def _visit(self, step: str) -> None:
        if step not in self._visited:
            self._visited.add(step)
            self.session.set_extra("visited", sorted(self._visited))

    def goto(self, step: str) -> None:
        """Leave the current step (committing it, unless a field of it is at fault) and open ``step``."""
        if step not in self.steps:
            return  # a step of another kind (the palette listed it before the kind changed)
        self.commit_all(quiet=True, leaving=self.session.step)
        self.house_leaving(self.session.step)
        self._visit(step)
        self.session.set_step(step)
        self.advice = None
        self.switch_screen(self.make_screen(step))
        self.start_check()
        self._bindings_changed()

    def action_next_step(self) -> None:
        nxt = self.steps.neighbour(self.session.step, 1)
        if nxt:
            self.goto(nxt)

    def action_previous_step(self) -> None:
        prev = self.steps.neighbour(self.session.step, -1)
        if prev:
            self.goto(prev)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "next_step":
            return True if self.steps.neighbour(self.session.step, 1) else None
        if action == "previous_step":
            return True if self.steps.neighbour(self.session.step, -1) else None
        if action == "commit":
            return True if self.dirty else None
        if action in HOUSE_ACTIONS:
            return self.house_action_state(action)
        return True

    # -- committing and quitting ---------------------------------------------------------
    def checked_now(self) -> bool:
        """Whether the latest check is of the worksheet as it stands."""
        check = self.check
        return check is not None and check.worksheet == self.session.worksheet

    def when_checked(self, then) -> None:
        """Call ``then`` once the check of the worksheet as it stands is in: now when it is,
        else as it lands (an edit has started it). Committing waits for it: a step is
        committed only when none of its fields is at fault."""
        if self.checked_now():
            then()
        else:
            self._after_check.append(then)

    def _run_after_check(self, force: bool = False) -> None:
        """The work waiting for the check (``force``: the check failed; do it on each
        field's own check)."""
        if not self._after_check or not (force or self.checked_now()):
            return
        waiting, self._after_check = self._after_check, []
        for then in waiting:
            then()

    def faults(self) -> dict[str, int]:
        """Each step with fields at fault and how many, by the check of the worksheet as it
        stands (each field's own check while the domain's is on its way)."""
        if self.checked_now():
            problems = self.check.problems
        else:
            from .analysis import field_problems

            problems = field_problems(self.session.worksheet) if self.units_ready else ()
        places: dict[str, set] = {}
        for p in problems:
            places.setdefault(p.step, set()).add(p.place)
        return {step: len(found) for step, found in places.items()}

    def hold_faulty(self) -> dict[str, int]:
        """Set the session's hold: the sections of the steps with fields at fault, which no
        commit writes to the record. Returns those steps' counts."""
        faults = self.faults()
        self.session.hold = tuple(section for step in faults for section in self.steps.sections.get(step, ()))
        return faults

    def commit_all(self, quiet: bool = False, leaving: str | None = None, then=None) -> None:
        """Commit every changed step that has no field at fault, once the check of the
        worksheet as it stands is in; a step at fault stays in the draft, and is named
        (always when ``quiet`` is False; when quiet, only ``leaving``, the step left). Then
        ``then(ok)``, ok False when the record refused to be written."""
        self.when_checked(lambda: self._commit_now(quiet, leaving, then))

    def _commit_now(self, quiet: bool, leaving: str | None, then) -> None:
        faults = self.hold_faulty()
        wanted = [s for s in self.session.dirty() if s not in self.session.hold]
        ok = True
        try:
            written = self.session.commit()
        except BalanceError as exc:
            self.notify(f"not committed: {exc}", severity="error", timeout=10)
            written, ok = [], False
        except OSError as exc:
            self.notify(f"not committed: {self.session.path}: {exc.strerror}", severity="error", timeout=10)
            written, ok = [], False
        self.dirty = self.session.dirty()
        held = [step for step in self.session.dirty_steps() if step in faults]
        if not quiet or (leaving in held):
            self.notify(self._commit_words(written, wanted, held if not quiet else [leaving], faults),
                        severity="warning" if held else "information", timeout=8 if held else 5)
        self._update_statuses()
        if then is not None:
            then(ok)

    def _commit_words(self, written: list, sections: list[str], held: list[str], faults: dict[str, int]) -> str:
        """What a commit saved, and what it left in the draft, in words."""
        parts = []
        if written:
            at = self.steps.section_steps
            steps = dict.fromkeys(at[s].title for s in sections if s in at)
            seqs = [e.seq for e in written]
            which = f"entry {seqs[0]}" if len(seqs) == 1 else f"entries {seqs[0]}–{seqs[-1]}"
            parts.append(f"committed {', '.join(steps)} to {self.session.path.name} ({which})")
        for step in held:
            n = faults.get(step, 0)
            parts.append(f"step {self.steps[step].number} {self.steps[step].title} not committed: {n} field"
                         f"{'' if n == 1 else 's'} at fault (kept in the draft)")
        return "; ".join(parts) or "nothing to commit: the record holds every step as typed"

    def after_record_change(self) -> None:
        """The record was written to outside a commit (comment, resolution, sign-off)."""
        self.dirty = self.session.dirty()
        self._update_statuses()
        self._bindings_changed()

    def action_commit(self) -> None:
        self.commit_all()

    async def action_quit(self) -> None:
        if not self.session.dirty():
            self.exit()
            return
        from .screens.confirm_quit import ConfirmQuitScreen

        def committed(ok: bool) -> None:
            if ok:
                self.exit()  # a step at fault is in the draft, as the dialog said

        def answered(choice: str | None) -> None:
            if choice == "commit":
                self.commit_all(quiet=True, then=committed)
            elif choice == "keep":
                self.session.save_draft()
                self.exit()

        faults = self.faults()
        held = tuple(step for step in self.session.dirty_steps() if step in faults)
        self.push_screen(ConfirmQuitScreen(self.session.dirty_steps(), self.session.draft_path.name, held),
                         answered)

    def go_to_problem(self, problem) -> None:
        """Open the step where ``problem`` is typed and put the focus on its field."""
        if self.session.step != problem.step:
            self.focus_on_open = problem  # the step's screen focuses it once it is shown
            self.goto(problem.step)
        else:
            self.screen.focus_problem(problem)

    def action_possible(self, action: str) -> bool:
        """Whether an action that always answers (it says why not) would do its work now:
        the key bar greys it otherwise."""
        if action == "solve":
            return self.check is not None and self.check.ready
        return True

    # -- solving ------------------------------------------------------------------------
    def action_solve(self) -> None:
        self.when_checked(self._solve_when_checked)

    def _solve_when_checked(self) -> None:
        check = self.check
        if check is None or not check.ready:
            message = check.message if check is not None else "still counting the degrees of freedom"
            first = check.problems[0] if check is not None and check.problems else None
            if first is not None:
                self.go_to_problem(first)
                n = len({p.place for p in check.problems})
                message = (f"not solved: {n} field{'' if n == 1 else 's'} at fault; the first, in step "
                           f"{self.steps[first.step].number}: {first.message}")
            else:
                message = f"not solved: {message}"
                missing = check.missing if check is not None else ()
                if missing:  # nothing at fault, something not given yet: go where it is typed
                    self.go_to_problem(missing[0])
            self.notify(message, severity="warning", timeout=10, markup=False)
            return
        self.commit_all(quiet=True)
        if self.session.step != "results":
            self.goto("results")  # the results step solves when it opens
        else:
            self.start_solve()

    # -- two models side by side --------------------------------------------------------------
    def action_compare(self) -> None:
        from .screens.compare import CompareScreen
        from .screens.fluid import FluidScreen

        if isinstance(self.screen, CompareScreen):
            return
        from .analysis import COMPARED

        if self.steps.kind not in COMPARED:
            self.notify(f"compare: not for {self.steps.kind} worksheets yet (closed systems only)",
                        severity="warning")
            return
        fluid = self.session.worksheet.fluid
        self.push_screen(CompareScreen(fluid.model, FluidScreen._disabled(fluid.species)))

    # -- the report ---------------------------------------------------------------------------
    def action_export(self, fmt: str | None = None) -> None:
        """Commit what can be committed, then export the record's report: ask for the format
        and the file (``fmt`` given: that format, to its default file)."""
        self.commit_all(quiet=True, then=lambda ok: self._export_committed(ok, fmt))

    def _export_committed(self, ok: bool, fmt: str | None) -> None:
        session = self.session
        if not ok:
            return
        if session.record is None:
            self.notify("no report yet: nothing has been committed (leaving a step or ctrl+s commits it)",
                        severity="warning")
            return
        if fmt is not None:
            self._export(fmt, None)
            return
        from .screens.export import ExportScreen

        held = session.dirty_steps()
        note = (f"The report of {session.path.name} as the record holds it: {len(session.entries())} entries, "
                f"revision {session.record.revision}.")
        if held:
            note += (" Not in it: the uncommitted edits to step"
                     f"{'' if len(held) == 1 else 's'} {', '.join(str(self.steps[s].number) for s in held)}.")
        paths = {f: str(session.report_path(f)) for f in ("md", "html")}
        self.push_screen(ExportScreen(paths, note),
                         lambda request: request and self._export(request.format, request.path))

    def _export(self, fmt: str, path: str | None) -> None:
        try:
            written = self.session.export_report(fmt, path)
        except BalanceError as exc:
            self.notify(f"report not written: {exc}", severity="error", timeout=10, markup=False)
            return
        except OSError as exc:
            self.notify(f"report not written: {path}: {exc.strerror}", severity="error", timeout=10, markup=False)
            return
        kind = "Markdown" if fmt == "md" else "HTML"
        self.notify(f"report written ({kind}, {len(self.session.entries())} entries): {written}", timeout=8,
                    markup=False)

    # -- help, units, theme ---------------------------------------------------------------------
    def action_help(self) -> None:
        from .screens.help import HelpScreen

        if isinstance(self.screen, HelpScreen):
            return
        step = self.session.step
        self.push_screen(HelpScreen(self.steps[step].title, screen_class(step).HELP))

    def action_cycle_units(self) -> None:
        units = UNIT_SETS[(UNIT_SETS.index(self.units) + 1) % len(UNIT_SETS)]
        self.set_units(units)

    def set_units(self, units: str) -> None:
        if units == "typed":
            from .display import use_typed

            use_typed(self.session.worksheet)
        self.units = units
        self.session.set_units(units)
        self.notify(f"display units: {UNIT_NAMES[units]}")

    def toggle_light_dark(self) -> None:
        self.theme = "textual-light" if self.current_theme.dark else "textual-dark"
        self.session.set_extra("theme", self.theme)

    def get_system_commands(self, screen):
        yield from super().get_system_commands(screen)
        for step in self.steps:
            yield SystemCommand(f"Step {step.number}: {step.title}", f"Commit this step and open step {step.number}",
                                lambda s=step.id: self.goto(s))
        yield SystemCommand("Commit", "Write the uncommitted edits to the record", self.action_commit)
        yield SystemCommand("Compare two models…", "The worksheet on its model and another, side by side (f4)",
                            self.action_compare)
        yield SystemCommand("Export the report…", "The calculation report, Markdown or HTML (f3)", self.action_export)
        yield SystemCommand("Export the report as Markdown", "Beside the record, NAME-report.md",
                            lambda: self.action_export("md"))
        yield SystemCommand("Export the report as HTML", "Beside the record, NAME-report.html",
                            lambda: self.action_export("html"))
        if self.check is not None and self.check.ready:
            yield SystemCommand("Solve", "Solve the balance and record the solve", self.action_solve)
        yield SystemCommand("Help for this step", "What the step is for, and common mistakes", self.action_help)
        for units in UNIT_SETS:
            yield SystemCommand(f"Units: {UNIT_NAMES[units]}", f"Show results in {UNIT_NAMES[units]} units",
                                lambda u=units: self.set_units(u))
        yield SystemCommand("Light or dark", "Switch between the light and the dark theme", self.toggle_light_dark)
        yield from self.house_commands()
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


__all__ = ["JoulebookApp", "Outcome", "run"]
