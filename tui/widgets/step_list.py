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
    """The eight steps with a status mark each; Enter (or a digit) opens one."""

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
        mark, style = MARKS[self.status_of(step.id)]
        here = step.id == self.current
        return Content.assemble((f"{mark} ", style), (f"{step.number} {step.short}", "bold underline" if here else ""))

    def on_mount(self) -> None:
        self.watch(self.app, "statuses", self.show_statuses, init=False)  # built with them

    def show_statuses(self, statuses: dict[str, str]) -> None:
        self._statuses = dict(statuses)
        self.refresh()

    def status_of(self, step: str) -> str:
        return self._statuses.get(step, "incomplete")

    def chosen(self, index: int) -> None:
        self.post_message(self.Chosen(STEPS[index].id))

    def action_choose_number(self, number: int) -> None:
        self.post_message(self.Chosen(STEPS[number - 1].id))
