"""Step 4 of a steady-flow worksheet: the streams — what crosses the boundary, and what
flows between the devices."""

from __future__ import annotations

from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button

from balance.worksheet import StreamInput, Worksheet

from .. import fields
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from ..widgets.stream_form import StreamForm
from .step import StepScreen


class StreamsScreen(StepScreen):
    STEP = "streams"
    HELP = """\
## Streams

**What it is for.** Every stream that enters, leaves or joins the devices of
step 5, each with a name the devices use. A stream's state is fixed by two
properties; give fewer when a device fixes the rest (a valve's outlet needs
only its pressure: the valve keeps the enthalpy).

- Type values with units: `8 degC`, `70 barg`, `2800 kJ/kg`; gauge pressures
  use the atmosphere of step 1. Blank means not given.
- *Rate*: a mass rate (`3 kg/s`, `12 t/h`), a molar rate (`30 mol/s`) or a
  standard volume (`2500 Nm3/h` at 0 °C and 1.01325 bar, `scf/min` at 60 °F
  and 14.696 psia), or `?` to find it. One rate is usually enough: the
  devices carry it along. With no rate anywhere the balance is per kg.
- *Velocity* or *area* (not both) for the kinetic energy; *height* for g z.
- *Species* and *model*: only where the stream is not the worksheet's fluid
  (the other side of an exchanger).
- `ctrl+t` adds a stream; `ctrl+g` (or its *remove* button) removes the one
  you are in. Tab goes from field to field and passes the buttons by.

**Common mistakes.** A gauge pressure typed as absolute (`70 bar` for
`70 barg`); three properties for one stream; a standard volume read as an
actual volume; the same stream named as the outlet of two devices.
"""

    BINDINGS = [
        Binding("ctrl+t", "add_stream", "+Stream", id="streams.add", tooltip="Add a stream"),
        Binding("ctrl+g", "remove_stream", "Remove", id="streams.remove",
                tooltip="Remove the stream that has the focus"),
    ]

    def compose_form(self) -> ComposeResult:
        yield ProblemLine(about="#stream-forms Input", id="streams-problem")
        with Vertical(id="stream-forms"):
            yield from self._forms(self.worksheet)
        yield out_of_tab_order(Button("+ stream (ctrl+t)", id="add", compact=True))

    def _forms(self, ws: Worksheet):
        streams = ws.streams or (StreamInput(name="S1"),)
        for i, st in enumerate(streams):
            yield StreamForm(st, i, p_atm=self._p_atm, id=f"stream-{i}")

    def _p_atm(self) -> float:
        return fields.atmosphere(self.worksheet.heading.atmosphere)

    def problem_targets(self) -> dict:
        targets: dict = {("stream", None, ""): self.query_one("#streams-problem", ProblemLine)}
        for form in self.query(StreamForm):
            targets.update(form.problem_targets())
        return targets

    def collect(self, ws: Worksheet) -> Worksheet:
        forms = self.query_one("#stream-forms").query_children(StreamForm)
        return ws.with_(streams=tuple(f.collect() for f in forms))

    async def _rebuild(self, ws: Worksheet, focus_index: int | None) -> None:
        box = self.query_one("#stream-forms")
        self._ready = False
        await box.remove_children()
        await box.mount_all(list(self._forms(ws)))
        self.app.edit(ws)
        self._ready = True
        self._place_problems(self.app.check)
        forms = list(box.query_children(StreamForm))
        if forms and focus_index is not None:
            target = forms[min(focus_index, len(forms) - 1)]
            target.query_one("#name").input.focus()
            target.scroll_visible()

    async def action_add_stream(self) -> None:
        ws = self.collect(self.worksheet)
        taken = {st.name for st in ws.streams}
        n = len(ws.streams) + 1
        while f"S{n}" in taken:
            n += 1
        ws = ws.with_(streams=ws.streams + (StreamInput(name=f"S{n}"),))
        await self._rebuild(ws, len(ws.streams) - 1)

    async def action_remove_stream(self, index: int | None = None) -> None:
        forms = list(self.query_one("#stream-forms").query_children(StreamForm))
        if index is None:
            focused = self.focused
            index = next((f.index for f in forms if focused is not None and f in focused.ancestors), None)
        if index is None:
            self.notify("move into the stream to remove first", severity="warning")
            return
        ws = self.collect(self.worksheet)
        await self._rebuild(ws.with_(streams=ws.streams[:index] + ws.streams[index + 1:]), index)

    async def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "add":
            await self.action_add_stream()
        elif event.button.id == "remove":
            form = next(a for a in event.button.ancestors if isinstance(a, StreamForm))
            await self.action_remove_stream(form.index)

    def step_commands(self):
        yield SystemCommand("Add a stream", "Another stream (ctrl+t)", self.action_add_stream)
        yield SystemCommand("Remove this stream", "The stream with the focus (ctrl+g)", self.action_remove_stream)


__all__ = ["StreamsScreen"]
