"""The list of steps: where the user is, and which steps are complete."""

from __future__ import annotations

from textual.binding import Binding
from textual.content import Content
from textual.message import Message

from ..steps import MOST
from .line_list import LineList

#: marker and style of each status (the style names are theme variables)
MARKS = {
    "complete": ("✓", "$text-success"),
    "incomplete": ("·", "$text-muted"),
    "invalid": ("✗", "$text-error"),
}


class StepList(LineList):
    """The worksheet's steps (its kind's: :attr:`tui.app.JoulebookApp.steps`) with a status mark
    each (``✗2``: two fields at fault); Enter (or a digit) opens one."""

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
        Binding(str(n), f"choose_number({n})", f"step {n}", show=False, id=f"steps.{n}",
                tooltip=f"Open step {n}")
        for n in range(1, MOST + 1)
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
        order = self.app.steps.order
        self.set_reactive(StepList.cursor, order.index(current) if current in order else 0)

    @property
    def steps(self) -> tuple:
        """The steps shown: the worksheet's kind's (they change with the kind, in step 2)."""
        return self.app.steps.steps

    def line_count(self) -> int:
        return len(self.steps)

    def line(self, index: int) -> Content:
        step = self.steps[index]
        status = self.status_of(step.id)
        mark, style = MARKS[status]
        faults = self.faults_of(step.id) if status == "invalid" else 0
        # the count of fields at fault beside the cross (two columns, as every mark has)
        mark += ((str(faults) if faults < 10 else "+") if faults else " ") + " "
        here = step.id == self.current
        # compact beside a house procedure's guidance: the marks and numbers, the heading names the step
        label = f"{step.number}" if self.has_class("-compact") else f"{step.number} {step.short}"
        return Content.assemble((mark, style), (label, "bold underline" if here else ""))

    def on_mount(self) -> None:
        self.watch(self.app, "statuses", self.show_statuses, init=False)  # built with them
        self.watch(self.app, "check", lambda _: self.refresh(), init=False)  # the counts, status unchanged
        self._shown_kind = self.app.steps.kind
        self.watch(self.app, "worksheet", self._kind_changed, init=False)

    def _kind_changed(self, _ws) -> None:
        """Another kind chosen in step 2: its steps, in as many lines."""
        kind = self.app.steps.kind
        if kind != self._shown_kind:
            self._shown_kind = kind
            order = self.app.steps.order
            self.set_reactive(StepList.cursor, order.index(self.current) if self.current in order else 0)
            self.refresh(layout=True)

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
        self.post_message(self.Chosen(self.steps[index].id))

    def action_choose_number(self, number: int) -> None:
        if 1 <= number <= len(self.steps):
            self.post_message(self.Chosen(self.steps[number - 1].id))
