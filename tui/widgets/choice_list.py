"""A single choice from a short list, with the current one marked (●)."""

from __future__ import annotations

from textual.binding import Binding
from textual.message import Message
from textual.widgets import OptionList
from textual.widgets.option_list import Option


class ChoiceList(OptionList):
    """Up/down to move, Enter or space to choose; disabled choices are greyed."""

    DEFAULT_CSS = """
    ChoiceList {
        height: auto;
        max-height: 10;
        border: none;
        padding: 0;
        background: $boost;
        & > .option-list--option { padding: 0 1; }
    }
    ChoiceList:focus { background: $primary 15%; border: none; }
    """

    BINDINGS = [Binding("space", "select", "Choose", show=False, id="choice.choose",
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
        self.choices = list(choices)
        self.value = value
        self.disabled_values = set(disabled_values)
        super().__init__(*self._options(), id=id)

    def _options(self) -> list[Option]:
        return [
            Option(f"{'●' if v == self.value else '○'} {label}", id=v, disabled=v in self.disabled_values)
            for v, label in self.choices
        ]

    def on_mount(self) -> None:
        ids = [v for v, _ in self.choices]
        if self.value in ids:
            self.highlighted = ids.index(self.value)

    def set_value(self, value: str) -> None:
        self.value = value
        for i, (v, label) in enumerate(self.choices):
            self.replace_option_prompt_at_index(i, f"{'●' if v == value else '○'} {label}")

    def set_disabled(self, values) -> None:
        self.disabled_values = set(values)
        for i, (v, _) in enumerate(self.choices):
            if v in self.disabled_values:
                self.disable_option_at_index(i)
            else:
                self.enable_option_at_index(i)

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.set_value(event.option.id)
        self.post_message(self.Chosen(self, event.option.id))
