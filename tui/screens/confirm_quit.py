"""Asked on quitting while edits are not committed."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class ConfirmQuitScreen(ModalScreen[str | None]):
    """Commit and quit, quit keeping the draft, or stay. Returns 'commit', 'keep' or None."""

    DEFAULT_CSS = """
    ConfirmQuitScreen { align: center middle; }
    ConfirmQuitScreen > Vertical {
        width: 64; max-width: 100%; height: auto;
        border: round $warning; background: $surface; padding: 0 1;
    }
    ConfirmQuitScreen Static { margin-bottom: 1; }
    ConfirmQuitScreen .confirm-quit--held { color: $text-warning; }
    ConfirmQuitScreen Horizontal { height: auto; align: center middle; }
    ConfirmQuitScreen Button { margin: 0 1; }
    """

    BINDINGS = [
        Binding("escape", "stay", "Stay", id="quit.stay", tooltip="Go back to the worksheet"),
        Binding("c", "choose('commit')", "Commit and quit", id="quit.commit", show=False,
                tooltip="Commit the edits to the record, then quit"),
        Binding("k", "choose('keep')", "Quit, keep draft", id="quit.keep", show=False,
                tooltip="Quit without committing; the edits stay in the draft"),
    ]

    def __init__(self, steps: tuple[str, ...], draft_name: str, held: tuple[str, ...] = ()) -> None:
        super().__init__()
        self.steps = steps
        self.draft_name = draft_name
        self.held = held
        """the steps with fields at fault: committing leaves them in the draft"""

    def compose(self) -> ComposeResult:
        by_id = self.app.steps.by_id
        names = ", ".join(f"{by_id[s].number} {by_id[s].title}" for s in self.steps) or "the worksheet"
        with Vertical() as box:
            box.border_title = "Uncommitted edits"
            yield Static(f"Edits to {names} are not committed to the record. They are kept in "
                         f"{self.draft_name} either way and come back when you reopen it.", markup=False)
            if self.held:
                faulty = ", ".join(f"{by_id[s].number} {by_id[s].title}" for s in self.held)
                yield Static(f"Fields of {faulty} are at fault: committing leaves "
                             f"{'it' if len(self.held) == 1 else 'them'} in the draft only.",
                             classes="confirm-quit--held", markup=False)
            with Horizontal():
                yield Button("Commit and quit (c)", id="commit", variant="primary")
                yield Button("Quit, keep draft (k)", id="keep")
                yield Button("Stay (esc)", id="stay")

    def on_mount(self) -> None:
        self.query_one("#commit", Button).focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(None if event.button.id == "stay" else event.button.id)

    def action_choose(self, choice: str) -> None:
        self.dismiss(choice)

    def action_stay(self) -> None:
        self.dismiss(None)
