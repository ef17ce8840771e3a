"""Constraints to tick: one line each, its state in characters (``[x]`` ticked,
``[ ]`` not, ``[=]`` implied by another that is ticked), so it reads without colour.

Up and down move, space or Enter ticks and unticks; a constraint implied by
a ticked one is shown with what implies it (ticking it as well says it twice,
which the count takes once).
"""

from __future__ import annotations

from textual.binding import Binding
from textual.content import Content
from textual.message import Message

from .line_list import LineList

TICKED, UNTICKED, IMPLIED = "[x]", "[ ]", "[=]"


class CheckList(LineList):
    """``(value, label)`` lines; ``implied`` maps a value to the ticked value that implies it."""

    DEFAULT_CSS = """
    CheckList {
        padding: 0 1;
        background: $boost;
    }
    CheckList:focus { background: $primary 15%; }
    """

    BINDINGS = [Binding("space", "choose", "Tick", show=False, id="check.tick",
                        tooltip="Tick or untick the highlighted line")]

    class Changed(Message):
        """The ticked values changed."""

        def __init__(self, check_list: "CheckList", ticked: tuple[str, ...]) -> None:
            super().__init__()
            self.check_list = check_list
            self.ticked = ticked

        @property
        def control(self) -> "CheckList":
            return self.check_list

    def __init__(self, choices: list[tuple[str, str]], ticked=(), *, implies=None, id: str | None = None) -> None:
        """``implies``: a function from the ticked values to {implied value: the ticked one implying it}."""
        super().__init__(id=id)
        self.choices = list(choices)
        self.ticked = tuple(v for v, _ in self.choices if v in set(ticked))
        self._implies = implies or (lambda ticked: {})

    @property
    def implied(self) -> dict[str, str]:
        """Each value implied by a ticked one (and not ticked itself), with what implies it."""
        return {v: by for v, by in self._implies(self.ticked).items() if v not in self.ticked}

    def mark(self, value: str) -> str:
        if value in self.ticked:
            return TICKED
        return IMPLIED if value in self.implied else UNTICKED

    def line_count(self) -> int:
        return len(self.choices)

    def line(self, index: int) -> Content:
        value, label = self.choices[index]
        mark = self.mark(value)
        by = self.implied.get(value)
        if by:  # in place of the description: a line stays one line at 80 columns
            return Content.assemble((mark, "bold"), f" {value.replace('-', ' ')} — ",
                                    (f"implied by {by.replace('-', ' ')}", "italic"))
        return Content.assemble((mark, "bold" if mark != UNTICKED else ""), " ", label)

    def chosen(self, index: int) -> None:
        value = self.choices[index][0]
        if value in self.ticked:
            ticked = tuple(v for v in self.ticked if v != value)
        else:
            ticked = tuple(v for v, _ in self.choices if v in self.ticked or v == value)
        self.ticked = ticked
        self.refresh(layout=True)
        self.post_message(self.Changed(self, ticked))
