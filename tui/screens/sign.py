"""The sign-off dialog: role, signer, and an SSH key (or an unsigned sign-off)."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Checkbox, Label, Select, Static

from ..widgets.field_row import FieldRow
from ..widgets.tick_box import TickBox

KEY_NAMES = ("id_ed25519", "id_ecdsa", "id_rsa")


@dataclass(frozen=True)
class SignRequest:
    role: str
    signer: str
    key_path: str | None
    unsigned: bool


def default_key() -> str:
    for name in KEY_NAMES:
        path = Path.home() / ".ssh" / name
        if path.exists():
            return str(path)
    return ""


class SignScreen(ModalScreen[SignRequest | None]):
    DEFAULT_CSS = """
    SignScreen { align: center middle; }
    SignScreen > Vertical {
        width: 70; max-width: 100%; height: auto;
        border: round $success; background: $surface; padding: 0 1;
    }
    SignScreen Static { margin-bottom: 1; }
    SignScreen .sign--hint { color: $text-muted; margin: 0 0 0 12; }
    SignScreen Horizontal { height: auto; }
    SignScreen .sign--buttons { margin-top: 1; align: center middle; }
    SignScreen Select { width: 1fr; }
    SignScreen Label { width: 12; color: $text-muted; }
    SignScreen Button { margin: 0 1; }
    """

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="sign.cancel", tooltip="Close without signing")]

    def __init__(self, roles: tuple[str, ...], role: str, signer: str, summary: str) -> None:
        super().__init__()
        self.roles = roles
        self.role = role
        self.signer = signer
        self.summary = summary

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Sign off"
            yield Static(self.summary, markup=False)
            with Horizontal():
                yield Label("Role")
                yield Select([(r, r) for r in self.roles], value=self.role, allow_blank=False, compact=True,
                             id="role")
            yield FieldRow("Signer", self.signer, id="signer", tooltip="Your name as the record shows it")
            found = default_key()
            yield FieldRow("SSH key", found, id="key", placeholder="(none: type the key file's path)",
                           tooltip="Private key file (or a public key held in ssh-agent)")
            # what the field is for, on a line of its own: a hint in the field looks typed
            yield Static(("found in ~/.ssh; " if found else "e.g. ~/.ssh/id_ed25519; ")
                         + "signed with ssh-keygen -Y sign", id="key-hint", classes="sign--hint", markup=False)
            yield TickBox("sign off without a signature (unsigned)", False, id="unsigned", compact=True)
            with Horizontal(classes="sign--buttons"):
                yield Button("Sign off", id="sign", variant="success")
                yield Button("Cancel (esc)", id="cancel")

    def on_mount(self) -> None:
        self.query_one("#role", Select).focus()

    def on_checkbox_changed(self, event: Checkbox.Changed) -> None:
        self.query_one("#key", FieldRow).disabled = event.value

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "cancel":
            self.dismiss(None)
            return
        unsigned = self.query_one("#unsigned", Checkbox).value
        key = self.query_one("#key", FieldRow).value.strip()
        signer = self.query_one("#signer", FieldRow).value.strip()
        if not unsigned and not key:
            self.notify("give the SSH key to sign with, or tick 'unsigned'", severity="warning")
            return
        self.dismiss(SignRequest(role=str(self.query_one("#role", Select).value), signer=signer,
                                 key_path=None if unsigned else str(Path(key).expanduser()), unsigned=unsigned))

    def action_cancel(self) -> None:
        self.dismiss(None)
