"""The live degrees-of-freedom line, with a busy indicator for slow work.

Never cut: a long message (an error naming its field and what was expected)
wraps onto as many lines as it needs; the form above gives them up.
"""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static

SPINNER = "⠋⠙⠹⠸⠼⠴⠦⠧⠇⠏"


class DofLine(Static):
    """``● 2 unknowns, 2 equations: ready to solve`` — updated after every edit."""

    DEFAULT_CSS = """
    DofLine {
        height: auto;
        width: 1fr;
        padding: 0 1;
        background: $panel;
    }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__("", id=id, markup=False)
        self._frame = 0
        self._timer = None

    def on_mount(self) -> None:
        self.watch(self.app, "check", lambda _: self._draw())
        self.watch(self.app, "busy", self._busy_changed)

    def _busy_changed(self, busy: str) -> None:
        if busy and self._timer is None:
            self._timer = self.set_interval(0.12, self._spin)
        elif not busy and self._timer is not None:
            self._timer.stop()
            self._timer = None
        self._draw()

    def _spin(self) -> None:
        self._frame = (self._frame + 1) % len(SPINNER)
        self._draw()

    @property
    def text(self) -> str:
        """The line as plain text (what a test reads)."""
        return self._line().plain

    def _line(self) -> Content:
        check = self.app.check
        busy = self.app.busy
        parts: list = []
        if check is None:
            parts += [("○ ", "$text-muted"), ("degrees of freedom: counting…", "$text-muted")]
        elif check.ready:
            parts += [("● ", "$text-success"), (check.message, "bold")]
        else:
            parts += [("● ", "$text-warning"), check.message]
        if busy:
            parts.append((f"  {SPINNER[self._frame]} {busy}", "italic $text-accent"))
        return Content.assemble(*parts)

    def _draw(self) -> None:
        line = self._line()
        if line != getattr(self, "_shown", None):  # an unchanged line costs no layout
            self._shown = line
            self.update(line)
            rows = len(line.plain) // max(1, self.size.width - 2)  # about how many lines it wraps to
            keep = getattr(self.screen, "keep_focus_in_view", None)
            if rows != getattr(self, "_rows", None) and keep is not None:
                keep()  # a line more or less for the form: the field being typed stays in view
            self._rows = rows
