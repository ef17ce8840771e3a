"""A short list drawn by one widget: a line per item, one under the cursor.

The step list and the choice lists are on every step, the first one's time to
screen included. Textual's OptionList carries an object, a wrapped render and
a scrolling view per option; these lists are a handful of one-line items that
always fit, so one widget draws them all. No scrolling: keep them short.
"""

from __future__ import annotations

from textual import events
from textual.binding import Binding
from textual.content import Content
from textual.reactive import reactive
from textual.widget import Widget


class LineList(Widget, can_focus=True):
    """Up and down move the cursor over the enabled lines; Enter chooses (subclasses say what)."""

    DEFAULT_CSS = """
    LineList {
        height: auto;
        & > .line-list--cursor {
            color: $block-cursor-blurred-foreground;
            background: $block-cursor-blurred-background;
            text-style: $block-cursor-blurred-text-style;
        }
        &:focus > .line-list--cursor {
            color: $block-cursor-foreground;
            background: $block-cursor-background;
            text-style: $block-cursor-text-style;
        }
        & > .line-list--disabled { color: $text-disabled; }
    }
    """

    COMPONENT_CLASSES = {"line-list--cursor", "line-list--disabled"}

    BINDINGS = [
        Binding("up", "move(-1)", "Up", show=False, id="list.up", tooltip="The line above"),
        Binding("down", "move(1)", "Down", show=False, id="list.down", tooltip="The line below"),
        Binding("home", "move_to(0)", "First", show=False, id="list.first", tooltip="The first line"),
        Binding("end", "move_to(-1)", "Last", show=False, id="list.last", tooltip="The last line"),
        Binding("enter", "choose", "Choose", show=False, id="list.choose", tooltip="Choose this line"),
    ]

    cursor: reactive[int] = reactive(0)

    # -- what a subclass provides --------------------------------------------------------
    def line_count(self) -> int:
        raise NotImplementedError

    def line(self, index: int) -> Content:
        """The text of line ``index`` (without the cursor's highlight)."""
        raise NotImplementedError

    def enabled(self, index: int) -> bool:
        return True

    def chosen(self, index: int) -> None:
        """Line ``index`` was chosen (Enter or a click on an enabled line)."""

    # -- drawing -----------------------------------------------------------------------------
    def render(self) -> Content:
        width = self.content_region.width
        lines = []
        for i in range(self.line_count()):
            text = self.line(i)
            if not self.enabled(i):
                text = text.stylize(".line-list--disabled")
            if i == self.cursor:
                text = text.pad_right(max(0, width - text.cell_length)).stylize(".line-list--cursor")
            lines.append(text)
        return Content("\n").join(lines)

    def get_content_height(self, container, viewport, width: int) -> int:
        return self.line_count()

    # -- moving and choosing -----------------------------------------------------------------
    def watch_cursor(self) -> None:
        self.refresh()

    def action_move(self, step: int) -> None:
        i = self.cursor + step
        while 0 <= i < self.line_count() and not self.enabled(i):
            i += step
        if 0 <= i < self.line_count():
            self.cursor = i

    def action_move_to(self, index: int) -> None:
        count = self.line_count()
        order = range(count) if index >= 0 else range(count - 1, -1, -1)
        self.cursor = next((i for i in order if self.enabled(i)), self.cursor)

    def action_choose(self) -> None:
        if 0 <= self.cursor < self.line_count() and self.enabled(self.cursor):
            self.chosen(self.cursor)

    def on_click(self, event: events.Click) -> None:
        offset = event.get_content_offset(self)
        if offset is not None and 0 <= offset.y < self.line_count() and self.enabled(offset.y):
            self.cursor = offset.y
            self.chosen(offset.y)
