"""Help on a step: what it is for, how to use it, common mistakes, and the keys."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Markdown, Static

KEYS = """\
### Keys everywhere

| key | does |
|---|---|
| `ctrl+n` / `ctrl+o` | next / previous step (commits this one) |
| `esc` | the step list: ↑/↓ and Enter, or the step's number (1–8 closed, 1–7 steady-flow) |
| `tab` / `shift+tab` | next / previous field (buttons are passed by: use their keys) |
| `↑` / `↓` | move in a list (choices, constraints, species found, entries) |
| `space` / `enter` | in a list: choose the line, or tick and untick it |
| `ctrl+s` | commit the edits to the record |
| `ctrl+r` | solve (when unknowns and equations match) |
| `f1` | this help; `f2` display units; `f3` export the report (Markdown, HTML) |
| `f4` | compare: the worksheet on its model and another, side by side |
| `ctrl+p` | command palette: every command by name |
| `ctrl+q` | quit (asks first when edits are uncommitted) |

Edits are saved to the draft as you type; committing writes them to the
record.
"""


class HelpScreen(ModalScreen[None]):
    """Help for one step; Esc, F1 or q closes it."""

    DEFAULT_CSS = """
    HelpScreen { align: center middle; }
    HelpScreen > Vertical {
        width: 76; max-width: 100%; height: 90%;
        border: round $accent; background: $surface; padding: 0 1;
    }
    HelpScreen VerticalScroll { height: 1fr; }
    HelpScreen .help--foot { height: 1; color: $text-muted; }
    """

    BINDINGS = [
        Binding("escape,f1,q", "dismiss_help", "Close", id="help.close", tooltip="Close the help"),
    ]

    def __init__(self, title: str, text: str) -> None:
        super().__init__()
        self.title_text = title
        self.text = text

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = f"Help: {self.title_text}"
            with VerticalScroll(id="help-scroll", can_focus=True):
                yield Markdown(self.text + "\n" + KEYS, id="help-text")
            yield Static("↑/↓ scroll · esc closes", classes="help--foot")

    def on_mount(self) -> None:
        self.query_one("#help-scroll").focus()

    def action_dismiss_help(self) -> None:
        self.dismiss(None)
