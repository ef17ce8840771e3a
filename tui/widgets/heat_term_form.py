"""One heat term: name, direction, value (or unknown) and boundary temperature."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button, Select, Static

from balance.worksheet import HeatTerm

from .. import fields
from .field_row import FieldRow
from .problem_line import ProblemLine
from .state_form import out_of_tab_order
from .term_form import TermForm

DIRECTIONS = [("into the system", "in"), ("out of the system", "out")]


class HeatTermForm(TermForm):
    """Heat *to* the system is positive in the worksheet; the direction picks the sign."""

    NOUN = "Heat term"
    PART, VALUE = "heat", "Q"
    DEFAULT_CSS = """
    HeatTermForm .term--label { width: 10; color: $text-muted; }
    """

    def __init__(self, term: HeatTerm, index: int, id: str | None = None) -> None:
        super().__init__(index, id=id)
        self.term = term

    def compose(self) -> ComposeResult:
        negative, magnitude = fields.split_sign(self.term.Q)
        with Grid():
            yield FieldRow("Name", self.term.name, id="name", label_width=6)
            with Horizontal():
                yield Static("", classes="term--spacer")
                yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                                    tooltip="Remove this term (ctrl+g)"))
            yield FieldRow("Q", magnitude, kind="energy", id="value", allow_unknown=True, required=True,
                           field_label=f"Q of heat term {self.index + 1}", label_width=6,
                           tooltip="The heat, e.g. 400 kJ, or ? to solve for it")
            yield Select(DIRECTIONS, value="out" if negative else "in", allow_blank=False, compact=True,
                         id="direction", tooltip="Heat into the system is positive in the balance")
            yield FieldRow("T bound◆" if _house_mark(self, "heat.T_boundary") else "T bound.", self.term.T_boundary, kind="temperature", id="T_boundary",
                           positive=True, field_label=f"boundary temperature of heat term {self.index + 1}",
                           label_width=9, tooltip="Temperature of the wall or reservoir the heat crosses")
        yield ProblemLine(about="#value Input")

    def collect(self) -> HeatTerm:
        direction = self.query_one("#direction", Select).value
        magnitude = self.query_one("#value", FieldRow).value
        Q = fields.join_sign(direction == "out", magnitude) if not magnitude.strip().startswith("-") else magnitude
        return HeatTerm(name=self.query_one("#name", FieldRow).value, Q=Q,
                        T_boundary=self.query_one("#T_boundary", FieldRow).value)


def _house_mark(widget, field: str) -> str:
    """'◆' where the house procedure requires ``field`` ('' otherwise)."""
    procedure = getattr(widget.app.session, "procedure", None)
    return "◆" if procedure is not None and field in procedure.required() else ""
