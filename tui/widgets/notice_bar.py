"""The app's notices, in a band of their own above the degrees-of-freedom line.

Textual shows a notification as a toast over the screen's bottom right,
which at 80 columns lies over the form's inputs and the results' cautions
for seconds. On a step the notices take lines of the frame instead: the form
gives up the lines they need while they are shown (and keeps the focused
field in view), so a notice never covers anything. The app keeps them
(``JoulebookApp.notices``); dialogs show theirs as toasts, over nothing of
the step.
"""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static

#: how a notice of each severity begins, so it reads without colour too
MARKS = {"information": ("· ", "$text-success"), "warning": ("! ", "bold $text-warning"),
         "error": ("✗ ", "bold $text-error")}
#: the newest notices shown at once
SHOWN = 3


class NoticeBar(Static):
    """The newest notices, one paragraph each (wrapped, never cut); nothing when there is none."""

    DEFAULT_CSS = """
    NoticeBar {
        height: auto;
        width: 1fr;
        padding: 0 1;
        background: $panel-lighten-1;
        display: none;
    }
    NoticeBar.-shown { display: block; }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__("", id=id, markup=False)

    def on_mount(self) -> None:
        self.watch(self.app, "notices", self._draw)

    @property
    def text(self) -> str:
        """What the bar shows, as plain text (what a test reads)."""
        return self._content(self.app.notices).plain

    @staticmethod
    def _content(notices) -> Content:
        lines = []
        for note in notices[-SHOWN:]:
            mark, style = MARKS.get(note.severity, MARKS["information"])
            title = f"{note.title}: " if note.title else ""
            lines.append(Content.assemble((mark, style), (title, "bold"), note.message))
        return Content("\n").join(lines)

    def _draw(self, notices) -> None:
        shown = bool(notices)
        self.update(self._content(notices) if shown else "")
        if shown != self.has_class("-shown"):
            self.set_class(shown, "-shown")
        keep = getattr(self.screen, "keep_focus_in_view", None)
        if keep is not None:
            keep()  # the form gave lines up to the notices: keep the field being typed in view
