"""A small dialog asking for one line of text (a comment, a resolution note)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static


class TextPromptScreen(ModalScreen[str | None]):
    """Enter returns the text (not empty); Esc returns None."""

    DEFAULT_CSS = """
    TextPromptScreen { align: center middle; }
    TextPromptScreen > Vertical {
        width: 70; max-width: 100%; height: auto;
        border: round $accent; background: $surface; padding: 0 1;
    }
    TextPromptScreen Static { margin-bottom: 1; }
    TextPromptScreen .prompt--foot { color: $text-muted; margin: 0; }
    """

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="prompt.cancel", tooltip="Close without saving")]

    def __init__(self, title: str, explanation: str, placeholder: str = "") -> None:
        super().__init__()
        self.title_text = title
        self.explanation = explanation
        self.placeholder = placeholder

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = self.title_text
            yield Static(self.explanation, markup=False)
            yield Input(placeholder=self.placeholder, id="text")
            yield Static("enter saves · esc cancels", classes="prompt--foot")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        if not event.value.strip():
            self.notify("write something first (or esc to cancel)", severity="warning")
            return
        self.dismiss(event.value.strip())

    def action_cancel(self) -> None:
        self.dismiss(None)
