"""The list of steps: where the user is, and which steps are complete."""

from __future__ import annotations

from textual.content import Content
from textual.binding import Binding
from textual.message import Message
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from ..steps import STEPS

#: marker and style of each status (the style names are theme variables)
MARKS = {
    "complete": ("✓", "$text-success"),
    "incomplete": ("·", "$text-muted"),
    "invalid": ("✗", "$text-error"),
}


class StepList(OptionList):
    """The eight steps with a status mark each; Enter (or a digit) opens one."""

    DEFAULT_CSS = """
    StepList {
        width: 18;
        height: 1fr;
        border: none;
        padding: 0;
        background: $panel;
        & > .option-list--option { padding: 0 0 0 1; }
    }
    StepList:focus { background-tint: $primary 10%; border: none; }
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
        self.current = current
        self._statuses = dict(statuses or {})
        super().__init__(*[Option(self._prompt(s), id=s.id) for s in STEPS], id=id)

    def _prompt(self, step) -> Content:
        status = self._statuses.get(step.id, "incomplete")
        mark, style = MARKS[status]
        here = step.id == self.current
        return Content.assemble((f"{mark} ", style), (f"{step.number} {step.short}", "bold underline" if here else ""))

    def on_mount(self) -> None:
        self.highlighted = [s.id for s in STEPS].index(self.current)
        self.watch(self.app, "statuses", self.show_statuses, init=False)  # built with them

    def show_statuses(self, statuses: dict[str, str]) -> None:
        self._statuses = dict(statuses)
        for i, step in enumerate(STEPS):
            self.replace_option_prompt_at_index(i, self._prompt(step))

    def status_of(self, step: str) -> str:
        return self._statuses.get(step, "incomplete")

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.post_message(self.Chosen(event.option.id))

    def action_choose_number(self, number: int) -> None:
        self.post_message(self.Chosen(STEPS[number - 1].id))
