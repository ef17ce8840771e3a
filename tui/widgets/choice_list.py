"""A single choice from a short list, with the current one marked (●)."""

from __future__ import annotations

from textual.binding import Binding
from textual.content import Content
from textual.message import Message

from .line_list import LineList


class ChoiceList(LineList):
    """Up/down to move, Enter or space to choose; disabled choices are greyed and skipped."""

    DEFAULT_CSS = """
    ChoiceList {
        max-height: 10;
        padding: 0 1;
        background: $boost;
    }
    ChoiceList:focus { background: $primary 15%; }
    """

    BINDINGS = [Binding("space", "choose", "Choose", show=False, id="choice.choose",
                        tooltip="Choose the highlighted option")]

    class Chosen(Message):
        def __init__(self, choice_list: "ChoiceList", value: str) -> None:
            super().__init__()
            self.choice_list = choice_list
            self.value = value

        @property
        def control(self) -> "ChoiceList":
            return self.choice_list

    def __init__(self, choices: list[tuple[str, str]], value: str = "", *, disabled_values=(),
                 id: str | None = None) -> None:
        """``choices``: (value, label) pairs."""
        super().__init__(id=id)
        self.choices = list(choices)
        self.value = value
        self.disabled_values = set(disabled_values)
        ids = [v for v, _ in self.choices]
        if value in ids:
            self.set_reactive(ChoiceList.cursor, ids.index(value))

    def line_count(self) -> int:
        return len(self.choices)

    def line(self, index: int) -> Content:
        v, label = self.choices[index]
        return Content(f"{'●' if v == self.value else '○'} {label}")

    def enabled(self, index: int) -> bool:
        return self.choices[index][0] not in self.disabled_values

    def set_value(self, value: str) -> None:
        self.value = value
        self.refresh()

    def set_disabled(self, values) -> None:
        self.disabled_values = set(values)
        self.refresh()

    def chosen(self, index: int) -> None:
        value = self.choices[index][0]
        self.set_value(value)
        self.post_message(self.Chosen(self, value))
