"""The bottom line: the keys that work here, greyed when their action cannot run yet.

One widget drawing one line, redrawn only when the bindings change: cheaper
than a widget per key, which matters on every focus change over SSH.
"""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static


class KeyBar(Static):
    DEFAULT_CSS = """
    KeyBar {
        height: 1;
        width: 1fr;
        background: $footer-background;
        color: $footer-foreground;
        text-wrap: nowrap;
        text-overflow: ellipsis;
    }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__("", id=id, markup=False)
        self._shown: Content | None = None

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, lambda _: self._draw())
        self.call_after_refresh(self._draw)

    @property
    def text(self) -> str:
        return self._line().plain

    def _line(self) -> Content:
        parts: list = []
        seen: set[str] = set()
        for key, active in self.screen.active_bindings.items():
            binding = active.binding
            if not binding.show or binding.action in seen:
                continue
            seen.add(binding.action)
            shown = binding.key_display or self.app.get_key_display(binding)
            possible = getattr(self.app, "action_possible", None)
            # greyed: the action cannot run, or it only says why not (ctrl+r on a sheet not ready)
            if active.enabled and (possible is None or possible(binding.action)):
                parts += [(f" {shown}", "bold $footer-key-foreground"), (f" {binding.description} ", "")]
            else:
                parts += [(f" {shown} {binding.description} ", "$text-disabled")]
        return Content.assemble(*parts)

    def _draw(self) -> None:
        line = self._line()
        if line != self._shown:
            self._shown = line
            self.update(line)
