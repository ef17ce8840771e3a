"""What a heat-term and a work-term form share: the frame, the layout and the index."""

from __future__ import annotations

from textual.widget import Widget


class TermForm(Widget):
    """A bordered, numbered form for one energy term; subclasses compose the fields."""

    #: the word in the border title: "Heat term 2"
    NOUN = "Term"

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
