"""What the forms of one item of a list step share (a state, a stream, a device, a vessel, a
line): the card's look, drop-down lists whose choice shows the fields it takes, and reading a
list's choice. The energy terms' cards (term_form.py) are laid out tighter and keep their own."""

from __future__ import annotations

from textual.widget import Widget
from textual.widgets import Select


class ItemForm(Widget):
    """A card of fields with drop-down lists; fields a choice does not take carry ``-not-taken``."""

    DEFAULT_CSS = """
    ItemForm {
        height: auto;
        border: round $border-blurred;
        border-title-color: $text-accent;
        padding: 0 1;
        margin-bottom: 1;
        & Grid { grid-size: 2; grid-gutter: 0 2; height: auto; grid-rows: auto; }
        & Horizontal { height: auto; }
        & .item-form--top FieldRow { width: 1fr; }
        & Select { width: 1fr; }
        & Button { width: auto; min-width: 0; margin-left: 1; }
        & .-not-taken { display: none; }
    }
    ItemForm:focus-within { border: round $border; }
    """

    def choice(self, name: str, default: str, blank: str | None = None) -> str:
        """The value chosen in the list ``#name`` (``default`` before it is mounted; ``blank``,
        or ``default``, where nothing is chosen)."""
        found = self.query(f"#{name}")
        if not found:
            return default
        value = found.first(Select).value
        return value if isinstance(value, str) else (default if blank is None else blank)


__all__ = ["ItemForm"]
