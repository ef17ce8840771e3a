"""The list of steps: where the user is, and which steps are complete."""

from __future__ import annotations

from textual.binding import Binding
from textual.content import Content
from textual.message import Message

from ..steps import STEPS
from .line_list import LineList

#: marker and style of each status (the style names are theme variables)
MARKS = {
    "complete": ("✓", "$text-success"),
    "incomplete": ("·", "$text-muted"),
    "invalid": ("✗", "$text-error"),
}


class StepList(LineList):
    """The eight steps with a status mark each (``✗2``: two fields at fault); Enter (or a digit) opens one."""

    DEFAULT_CSS = """
    StepList {
        width: 18;
        height: 1fr;
        padding: 0 0 0 1;
        background: $panel;
    }
    StepList:focus { background-tint: $primary 10%; }
    """

    BINDINGS = [
        Binding(str(s.number), f"choose_number({s.number})", f"step {s.number}", show=False,
                id=f"steps.{s.number}", tooltip=f"Open step {s.number}: {s.title}")
        for s in STEPS
    ]

    class Chosen(Message):
        """The user picked a step."""

        def __init__(self, step: str) -> None:
            super().__init__()
            self.step = step

    def __init__(self, current: str, statuses: dict[str, str] | None = None, id: str | None = None) -> None:
        super().__init__(id=id)
        self.current = current
        self._statuses = dict(statuses or {})
        self.set_reactive(StepList.cursor, [s.id for s in STEPS].index(current))

    def line_count(self) -> int:
        return len(STEPS)

    def line(self, index: int) -> Content:
        step = STEPS[index]
        status = self.status_of(step.id)
        mark, style = MARKS[status]
        faults = self.faults_of(step.id) if status == "invalid" else 0
        # the count of fields at fault beside the cross (two columns, as every mark has)
        mark += ((str(faults) if faults < 10 else "+") if faults else " ") + " "
        here = step.id == self.current
        return Content.assemble((mark, style), (f"{step.number} {step.short}", "bold underline" if here else ""))

    def on_mount(self) -> None:
        self.watch(self.app, "statuses", self.show_statuses, init=False)  # built with them
        self.watch(self.app, "check", lambda _: self.refresh(), init=False)  # the counts, status unchanged

    def show_statuses(self, statuses: dict[str, str]) -> None:
        self._statuses = dict(statuses)
        self.refresh()

    def faults_of(self, step: str) -> int:
        """How many fields of the step are at fault (by the latest check)."""
        check = self.app.check
        return check.faults(step) if check is not None and hasattr(check, "faults") else 0

    def status_of(self, step: str) -> str:
        return self._statuses.get(step, "incomplete")

    def chosen(self, index: int) -> None:
        self.post_message(self.Chosen(STEPS[index].id))

    def action_choose_number(self, number: int) -> None:
        self.post_message(self.Chosen(STEPS[number - 1].id))
