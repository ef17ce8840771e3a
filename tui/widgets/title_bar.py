"""The top line: the worksheet's title, its record file, units and commit state."""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static


class TitleBar(Static):
    DEFAULT_CSS = """
    TitleBar {
        height: 1;
        width: 1fr;
        background: $primary 30%;
        padding: 0 1;
        text-wrap: nowrap;
        text-overflow: ellipsis;
    }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__("", id=id, markup=False)

    def on_mount(self) -> None:
        for name in ("dirty", "units", "worksheet"):
            self.watch(self.app, name, lambda _: self._draw())

    @property
    def text(self) -> str:
        return self._line().plain

    def _line(self) -> Content:
        app = self.app
        session = app.session
        title = session.worksheet.heading.title.strip() or "new worksheet"
        dirty = app.dirty
        state = (f"● {len(dirty)} uncommitted", "bold $text-warning") if dirty else ("✓ committed", "$text-success")
        return Content.assemble(("joulebook", "bold"), f" │ {session.path.name} │ ", state,
                                f" │ {app.units} │ ", (title, "italic"))

    def _draw(self) -> None:
        line = self._line()
        if line != getattr(self, "_shown", None):  # an unchanged line costs no layout
            self._shown = line
            self.update(line)
