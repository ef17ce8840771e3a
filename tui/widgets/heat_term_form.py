"""One heat term: name, direction, value (or unknown) and boundary temperature."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widget import Widget
from textual.widgets import Button, Select, Static

from balance.worksheet import HeatTerm

from .. import fields
from .field_row import FieldRow

DIRECTIONS = [("into the system", "in"), ("out of the system", "out")]


class HeatTermForm(Widget):
    """Heat *to* the system is positive in the worksheet; the direction picks the sign."""

    DEFAULT_CSS = """
    HeatTermForm {
        height: auto;
        border: round $border-blurred;
        border-title-color: $text-accent;
        padding: 0 1;
        & Grid { grid-size: 2; grid-columns: 1fr 1fr; grid-gutter: 0 2; height: auto; grid-rows: auto; }
        & Horizontal { height: 1; }
        & Button { width: auto; min-width: 0; }
        & .term--spacer { width: 1fr; }
        & .term--label { width: 10; color: $text-muted; }
        & Select { width: 1fr; }
    }
    HeatTermForm:focus-within { border: round $border; }
    """

    def __init__(self, term: HeatTerm, index: int, id: str | None = None) -> None:
        super().__init__(id=id, classes="term")
        self.term = term
        self.index = index

    def on_mount(self) -> None:
        self.border_title = f"Heat term {self.index + 1}"

    def compose(self) -> ComposeResult:
        negative, magnitude = fields.split_sign(self.term.Q)
        with Grid():
            yield FieldRow("Name", self.term.name, id="name", label_width=6)
            with Horizontal():
                yield Static("", classes="term--spacer")
                yield Button("remove", compact=True, id="remove", tooltip="Remove this term (ctrl+g)")
            yield FieldRow("Q", magnitude, kind="energy", id="value", allow_unknown=True, required=True,
                           field_label=f"Q of heat term {self.index + 1}", label_width=6,
                           tooltip="The heat, e.g. 400 kJ, or ? to solve for it")
            yield Select(DIRECTIONS, value="out" if negative else "in", allow_blank=False, compact=True,
                         id="direction", tooltip="Heat into the system is positive in the balance")
            yield FieldRow("T bound.", self.term.T_boundary, kind="temperature", id="T_boundary",
                           positive=True, field_label=f"boundary temperature of heat term {self.index + 1}",
                           label_width=9, tooltip="Temperature of the wall or reservoir the heat crosses")

    def collect(self) -> HeatTerm:
        direction = self.query_one("#direction", Select).value
        magnitude = self.query_one("#value", FieldRow).value
        Q = fields.join_sign(direction == "out", magnitude) if not magnitude.strip().startswith("-") else magnitude
        return HeatTerm(name=self.query_one("#name", FieldRow).value, Q=Q,
                        T_boundary=self.query_one("#T_boundary", FieldRow).value)
