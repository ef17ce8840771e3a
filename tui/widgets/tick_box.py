"""A checkbox whose state reads without colour: ``[x]`` ticked, ``[ ]`` not.

Textual's checkbox draws ``▐X▌`` either way and tells the two apart by
colour only, which a monochrome terminal, a colour-blind reader or a
screenshot in a report loses.
"""

from __future__ import annotations

from textual.content import Content
from textual.geometry import Size
from textual.widgets import Checkbox

TICKED, UNTICKED = "[x]", "[ ]"


class TickBox(Checkbox):
    """A :class:`~textual.widgets.Checkbox` (the same keys and ``Checkbox.Changed``) drawn as ``[x] label``."""

    DEFAULT_CSS = """
    TickBox { border: none; padding: 0; height: 1; background: transparent; width: auto; }
    TickBox > .toggle--button { background: transparent; }
    TickBox.-on { text-style: none; }
    """

    @property
    def mark(self) -> str:
        return TICKED if self.value else UNTICKED

    def render(self) -> Content:
        label = self.label.stylize_before(self.get_visual_style("toggle--label"))
        return Content.assemble((self.mark, "bold" if self.value else ""), " ", label)

    def get_content_width(self, container: Size, viewport: Size) -> int:
        return len(self.mark) + 1 + self.label.cell_length
