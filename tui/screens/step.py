"""What every worksheet step shares: the frame, and turning edits into a worksheet.

A step screen shows one part of the worksheet. Its widgets start from
``app.session.worksheet``; after any change the screen builds a new
:class:`~balance.worksheet.Worksheet` (``collect``) and hands it to the app,
which autosaves it and recounts the degrees of freedom. Screens never
compute thermodynamics and never touch files.
"""

from __future__ import annotations

from textual import events
from textual.actions import SkipAction
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Input, Static, TextArea

from balance.worksheet import Worksheet

from ..widgets.choice_list import ChoiceList
from ..widgets.dof_line import DofLine
from ..widgets.field_row import FieldRow
from ..widgets.guide_panel import GuidePanel
from ..widgets.key_bar import KeyBar
from ..widgets.notice_bar import NoticeBar
from ..widgets.step_list import StepList
from ..widgets.title_bar import TitleBar


class StepScreen(Screen):
    """One step of the worksheet, in the app's frame."""

    STEP = ""
    SCROLL = True
    """whether the form scrolls as a whole (the results and review steps manage their own)"""
    HELP = ""
    """Markdown: what the step is for, and the common mistakes."""

    AUTO_FOCUS = "#form Input, #form TextArea, #form LineList, #form OptionList, #form Button"

    BINDINGS = [
        Binding("escape", "focus_steps", "Steps", id="step.steps", show=False,
                tooltip="Move to the list of steps (arrows and Enter, or a digit, to open one)"),
        Binding("enter", "next_field", "Next field", id="form.next-field", show=False, priority=True,
                tooltip="From a field, on to the next field"),
    ]

    def __init__(self) -> None:
        super().__init__(name=self.STEP)
        self._ready = False

    @property
    def worksheet(self) -> Worksheet:
        return self.app.session.worksheet

    def compose(self) -> ComposeResult:
        step = self.app.steps[self.STEP]
        # laid out by the screen's grid (app.tcss): no containers for the frame
        yield TitleBar()
        yield StepList(self.STEP, self.app.statuses, id="steps")
        yield Static(f"{step.number}  {step.title}", id="step-heading")
        yield GuidePanel(self.STEP, id="guide")
        with (VerticalScroll if self.SCROLL else Vertical)(id="form"):
            yield from self.compose_form()
        # the foot: docked, so its lines (as many as the notices and the DOF line need) are
        # worked out at the full width, which a grid row spanning two columns is not
        with Vertical(id="foot"):
            yield NoticeBar(id="notices")
            yield DofLine(id="dof")
            yield KeyBar(id="keys")

    def compose_form(self) -> ComposeResult:
        yield from ()

    def house_mark(self, field: str) -> str:
        """' ◆' after the label of a field the house procedure requires ('' otherwise)."""
        procedure = self.app.session.procedure
        return " ◆" if procedure is not None and field in procedure.required() else ""

    def on_screen_resume(self, event: events.ScreenResume) -> None:
        # Runs before Textual's own handler. The first resume comes as the step opens: its
        # widgets are styled as they mount, and restyling the whole tree again would cost
        # about a fifth of the time to show it. Later resumes (back from a dialog) restyle.
        if self.stack_updates == 0:
            event.refresh_styles = False

    def on_mount(self) -> None:
        self.call_after_refresh(self._arm)
        self.watch(self.app, "check", self._place_problems)

    # -- what the check found, at its fields ------------------------------------------
    def problem_targets(self) -> dict:
        """Where this step shows what the check found: ``(part, index, key)`` (as in
        :class:`tui.analysis.FieldProblem`) to a widget with ``set_problem(text)`` — a
        field's row, or a :class:`ProblemLine` under a part (``key`` '')."""
        return {}

    def _place_problems(self, check) -> None:
        if check is None or check.worksheet != self.worksheet:
            return  # an older worksheet's: the count of this one is on its way
        self.place_problems(check.problems_in(self.STEP))

    def focus_problem(self, problem) -> bool:
        """Put the focus where ``problem`` is typed (its field, or what its part's line is
        about), scrolled into view; False when this step shows no such place."""
        targets = self.problem_targets()
        for place in _places(problem):
            target = targets.get(place)
            if target is None:
                continue
            widget = target.input if isinstance(target, FieldRow) else target.focus_target()
            if widget is None or not widget.focusable:
                continue
            widget.focus()
            widget.scroll_visible()
            return True
        return False

    def place_problems(self, problems) -> None:
        """Each problem at its field; one whose field has no place here goes to its part,
        or to the part's list as a whole."""
        targets = self.problem_targets()
        shown: dict[tuple, list[str]] = {}
        for p in problems:
            for place in _places(p):
                if place in targets:
                    shown.setdefault(place, []).append(p.message)
                    break
        said: dict[int, tuple] = {}  # a widget may stand for several places (a part's line for its keys)
        for place, widget in targets.items():
            widget_said = said.setdefault(id(widget), (widget, []))[1]
            widget_said += shown.get(place, ())
        for widget, messages in said.values():
            widget.set_problem("; ".join(dict.fromkeys(messages)))

    def _arm(self) -> None:
        self._ready = True
        problem = self.app.focus_on_open
        if problem is not None and problem.step == self.STEP:
            self.app.focus_on_open = None
            self.focus_problem(problem)

    # -- edits -----------------------------------------------------------------
    def collect(self, ws: Worksheet) -> Worksheet:
        """``ws`` with this step's sections replaced by what the widgets hold."""
        return ws

    def changed(self) -> None:
        if not self._ready:
            return
        self.app.edit(self.collect(self.worksheet))

    def on_input_changed(self, event) -> None:
        self.changed()

    def action_next_field(self) -> None:
        """Enter in a form field: on to the next text field, as on a paper form.

        It never ticks a box or picks a choice on the way. A priority binding, so
        the focus moves as the key is read: keys typed ahead of the screen (a fast
        typist, a slow SSH link) go to the next field, not this one.
        """
        field = self.focused
        if not (isinstance(field, Input) and isinstance(field.parent, FieldRow) and field.parent.enter_moves_on):
            raise SkipAction()  # Enter does what it does elsewhere (search, choose, press)
        chain = self.focus_chain
        following = [w for w in chain[chain.index(field) + 1:] if isinstance(w, (Input, TextArea))]
        self.set_focus(following[0] if following else chain[(chain.index(field) + 1) % len(chain)])

    def on_text_area_changed(self, event) -> None:
        self.changed()

    def on_select_changed(self, event) -> None:
        self.changed()

    def on_checkbox_changed(self, event) -> None:
        self.changed()

    def on_check_list_changed(self, event) -> None:
        self.changed()

    def on_choice_list_chosen(self, event: ChoiceList.Chosen) -> None:
        self.changed()

    # -- navigation ---------------------------------------------------------------
    def on_step_list_chosen(self, event: StepList.Chosen) -> None:
        self.app.goto(event.step)

    def action_focus_steps(self) -> None:
        self.query_one(StepList).focus()

    def keep_focus_in_view(self) -> None:
        """Scroll the focused field back into view once the foot has its new height (the
        notices and the DOF line take the lines they need from the form)."""
        def scroll() -> None:
            focused = self.focused
            if focused is not None and self.is_current:
                focused.scroll_visible(animate=False)

        # the first refresh restyles the foot, the second lays the form out again
        self.call_after_refresh(lambda: self.call_after_refresh(scroll))

    def revalidate(self) -> None:
        """Check every unit-aware field again (after warm-up, or a new atmosphere)."""
        for row in self.query(FieldRow):
            row.revalidate()


def _places(problem) -> tuple:
    """Where a problem may be shown, nearest first: its field; the field its key is under (a
    table's key, ``composition.CH4`` under ``composition``); its item's line; its part's line."""
    part, index, key = problem.place
    head = key.split(".", 1)[0]
    return (problem.place, *(((part, index, head),) if head != key else ()), (part, index, ""), (part, None, ""))
