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
from .session import Session
from .steps import BY_ID, ORDER, STEPS, neighbour, screen_class

UNIT_SETS = ("si", "metric", "us")
UNIT_NAMES = {"si": "SI", "metric": "metric engineering", "us": "US customary"}


class JoulebookApp(BackgroundWork, App):
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
        self.worksheet = ws
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
