"""A step that is a list of like forms (a steady-flow worksheet's streams, its devices): each
form one item of a worksheet section, added and removed by keys, named by a default tag."""

from __future__ import annotations

from textual.app import SystemCommand
from textual.widgets import Button

from balance.worksheet import Worksheet

from ..widgets.problem_line import ProblemLine
from .step import StepScreen


class FormListScreen(StepScreen):
    """What the streams and devices steps share. A subclass names its item (``NOUN``), the
    worksheet section (``SECTION``, an attribute of Worksheet), the field-problem part
    (``PART``), the default tag (``TAG``: S1, D1 ...), the form class and its new item."""

    NOUN = ""
    SECTION = ""
    PART = ""
    TAG = ""
    FORM: type

    # -- what a subclass says ----------------------------------------------------------
    def new_item(self, name: str):
        raise NotImplementedError

    def make_form(self, item, index: int):
        raise NotImplementedError

    # -- the list ----------------------------------------------------------------------
    @property
    def box_id(self) -> str:
        return f"{self.PART}-forms"

    def _items(self, ws: Worksheet) -> tuple:
        return getattr(ws, self.SECTION)

    def _forms(self, ws: Worksheet):
        for i, item in enumerate(self._items(ws) or (self.new_item(f"{self.TAG}1"),)):
            yield self.make_form(item, i)

    def problem_targets(self) -> dict:
        targets: dict = {(self.PART, None, ""): self.query_one(f"#{self.SECTION}-problem", ProblemLine)}
        for form in self.query(self.FORM):
            targets.update(form.problem_targets())
        return targets

    def collect(self, ws: Worksheet) -> Worksheet:
        forms = self.query_one(f"#{self.box_id}").query_children(self.FORM)
        return ws.with_(**{self.SECTION: tuple(f.collect() for f in forms)})

    async def _rebuild(self, ws: Worksheet, focus_index: int | None) -> None:
        box = self.query_one(f"#{self.box_id}")
        self._ready = False
        await box.remove_children()
        await box.mount_all(list(self._forms(ws)))
        self.app.edit(ws)
        self._ready = True
        self._place_problems(self.app.check)
        forms = list(box.query_children(self.FORM))
        if forms and focus_index is not None:
            target = forms[min(focus_index, len(forms) - 1)]
            target.query_one("#name").input.focus()
            target.scroll_visible()

    async def add_item(self) -> None:
        ws = self.collect(self.worksheet)
        items = self._items(ws)
        taken = {item.name for item in items}
        n = len(items) + 1
        while f"{self.TAG}{n}" in taken:
            n += 1
        ws = ws.with_(**{self.SECTION: items + (self.new_item(f"{self.TAG}{n}"),)})
        await self._rebuild(ws, len(items))

    async def remove_item(self, index: int | None = None) -> None:
        forms = list(self.query_one(f"#{self.box_id}").query_children(self.FORM))
        if index is None:
            focused = self.focused
            index = next((f.index for f in forms if focused is not None and f in focused.ancestors), None)
        if index is None:
            self.notify(f"move into the {self.NOUN} to remove first", severity="warning")
            return
        ws = self.collect(self.worksheet)
        items = self._items(ws)
        await self._rebuild(ws.with_(**{self.SECTION: items[:index] + items[index + 1:]}), index)

    async def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "add":
            await self.add_item()
        elif event.button.id == "remove":
            form = next(a for a in event.button.ancestors if isinstance(a, self.FORM))
            await self.remove_item(form.index)

    def step_commands(self):
        yield SystemCommand(f"Add a {self.NOUN}", f"Another {self.NOUN} (ctrl+t)", self.add_item)
        yield SystemCommand(f"Remove this {self.NOUN}", f"The {self.NOUN} with the focus (ctrl+g)", self.remove_item)


__all__ = ["FormListScreen"]
