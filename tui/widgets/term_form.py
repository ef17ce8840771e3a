"""What a heat-term and a work-term form share: the frame, the layout and the index."""

from __future__ import annotations

from textual.widget import Widget

from .field_row import FieldRow
from .problem_line import ProblemLine


class TermForm(Widget):
    """A bordered, numbered form for one energy term; subclasses compose the fields."""

    #: the word in the border title: "Heat term 2"
    NOUN = "Term"
    #: the worksheet's part ('heat' or 'work') and the field of the term's value
    PART = ""
    VALUE = ""

    DEFAULT_CSS = """
    TermForm {
        height: auto;
        border: round $border-blurred;
        border-title-color: $text-accent;
        padding: 0 1;
        & Grid { grid-size: 2; grid-columns: 1fr 1fr; grid-gutter: 0 2; height: auto; grid-rows: auto; }
        & Horizontal { height: 1; }
        & Button { width: auto; min-width: 0; }
        & .term--spacer { width: 1fr; }
        & Select { width: 1fr; }
    }
    TermForm:focus-within { border: round $border; }
    """

    def __init__(self, index: int, id: str | None = None) -> None:
        super().__init__(id=id, classes="term")
        self.index = index

    def on_mount(self) -> None:
        self.border_title = f"{self.NOUN} {self.index + 1}"

    def problem_targets(self) -> dict:
        """Where each field of this term shows what the check found (see StepScreen)."""
        i = self.index
        out = {(self.PART, i, "name"): self.query_one("#name", FieldRow),
               (self.PART, i, self.VALUE): self.query_one("#value", FieldRow),
               (self.PART, i, ""): self.query_one(ProblemLine)}
        for row in self.query("#T_boundary").results(FieldRow):
            out[(self.PART, i, "T_boundary")] = row
        return out
