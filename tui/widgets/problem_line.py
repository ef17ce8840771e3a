"""What the domain's check found at a part of the worksheet that is not one text field:
a compartment as a whole, the list of constraints, the model, the heat terms.

Hidden while there is nothing to say, so it costs no line of the form.
"""

from __future__ import annotations

from textual.widgets import Static


class ProblemLine(Static):
    """``✗ initial 'V-101': needs exactly two of T, P ...`` under the part it is about."""

    DEFAULT_CSS = """
    ProblemLine {
        height: auto;
        color: $text-error;
        display: none;
    }
    ProblemLine.-shown { display: block; }
    """

    def __init__(self, about: str = "", id: str | None = None, classes: str | None = None) -> None:
        """``about``: a selector, within the line's parent, of the widget to focus to put it
        right (the list of constraints, the model list, the state's first property)."""
        super().__init__("", id=id, classes=classes, markup=False)
        self.about = about
        self._problem = ""

    @property
    def message(self) -> str:
        return self._problem

    def set_problem(self, text: str) -> None:
        if text == self._problem:
            return
        self._problem = text
        self.update(f"✗ {text}" if text else "")
        self.set_class(bool(text), "-shown")

    def focus_target(self):
        """The widget to focus to put the problem right (None: nothing to focus)."""
        if not self.about or self.parent is None:
            return None
        found = self.parent.query(self.about)
        return found.first() if found else None
