"""One work term: name, kind, direction and value (or unknown)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button, Select

from balance.convention import Convention
from balance.worksheet import WORK_KINDS, WorkTerm

from .. import fields
from .field_row import FieldRow
from .problem_line import ProblemLine
from .state_form import out_of_tab_order
from .term_form import TermForm

DIRECTIONS = [("done on the system", "on"), ("done by the system", "by")]


class WorkTermForm(TermForm):
    """The worksheet writes work in its sign convention; the direction picks the sign."""

    NOUN = "Work term"
    PART, VALUE = "work", "W"

    def __init__(self, term: WorkTerm, index: int, convention: str, id: str | None = None) -> None:
        super().__init__(index, id=id)
        self.term = term
        self.convention = convention

    @property
    def positive_direction(self) -> str:
        return Convention(self.convention).positive_work

    def compose(self) -> ComposeResult:
        negative, magnitude = fields.split_sign(self.term.W)
        other = "by" if self.positive_direction == "on" else "on"
        with Grid():
            yield FieldRow("Name", self.term.name, id="name", label_width=6)
            with Horizontal():
                yield Select([(k, k) for k in WORK_KINDS], value=self.term.kind, allow_blank=False,
                             compact=True, id="kind", tooltip="shaft, stirring, electrical, boundary or other")
                yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                                    tooltip="Remove this term (ctrl+g)"))
            yield FieldRow("W", magnitude, kind="energy", id="value", allow_unknown=True, required=True,
                           field_label=f"W of work term {self.index + 1}", label_width=6,
                           tooltip="The work, e.g. 15 kJ, or ? to solve for it")
            yield Select(DIRECTIONS, value=other if negative else self.positive_direction, allow_blank=False,
                         compact=True, id="direction",
                         tooltip="Whether the work is done on the system or by it")
        yield ProblemLine(about="#value Input")

    def collect(self) -> WorkTerm:
        direction = self.query_one("#direction", Select).value
        magnitude = self.query_one("#value", FieldRow).value
        kind = self.query_one("#kind", Select).value
        if magnitude.strip().startswith("-"):
            W = magnitude
        else:
            W = fields.join_sign(direction != self.positive_direction, magnitude)
        return WorkTerm(name=self.query_one("#name", FieldRow).value, kind=kind, W=W)
