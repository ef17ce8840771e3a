"""The export dialog: the calculation report as Markdown or as one HTML page, and where."""

from __future__ import annotations

from dataclasses import dataclass

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from ..widgets.choice_list import ChoiceList
from ..widgets.field_row import FieldRow

FORMATS = [("md", "Markdown (.md): for a document or a review tool"),
           ("html", "HTML (.html): one page, prints as it shows")]


@dataclass(frozen=True)
class ExportRequest:
    format: str
    """'md' or 'html'"""
    path: str


class ExportScreen(ModalScreen[ExportRequest | None]):
    """↑/↓ choose the format; the file follows it until it is edited; Enter in the file field exports."""

    DEFAULT_CSS = """
    ExportScreen { align: center middle; }
    ExportScreen > Vertical {
        width: 74; max-width: 100%; height: auto;
        border: round $accent; background: $surface; padding: 0 1;
    }
    ExportScreen Static { margin-bottom: 1; }
    ExportScreen ChoiceList { margin-bottom: 1; }
    ExportScreen .export--foot { color: $text-muted; margin: 0; }
    """

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="export.cancel", tooltip="Close without exporting")]

    def __init__(self, paths: dict[str, str], note: str) -> None:
        """``paths``: the default file of each format; ``note``: what the report holds."""
        super().__init__()
        self.paths = paths
        self.note = note
        self.format = "md"

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Export the report"
            yield Static(self.note, markup=False)
            yield ChoiceList(FORMATS, self.format, id="format")
            yield FieldRow("File", self.paths[self.format], id="path", enter_moves_on=False,
                           tooltip="Where to write the report (replaced if it exists)")
            yield Static("↑/↓ and space choose the format · enter in File exports · esc cancels",
                         classes="export--foot")

    def on_mount(self) -> None:
        self.query_one("#format", ChoiceList).focus()

    def on_choice_list_chosen(self, event: ChoiceList.Chosen) -> None:
        event.stop()
        row = self.query_one("#path", FieldRow)
        if row.value in self.paths.values():  # not edited: the file follows the format
            row.set_value(self.paths[event.value])
        self.format = event.value
        row.input.focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        path = event.value.strip()
        if not path:
            self.notify("give the file to write (or esc to cancel)", severity="warning")
            return
        self.dismiss(ExportRequest(self.format, path))

    def action_cancel(self) -> None:
        self.dismiss(None)
