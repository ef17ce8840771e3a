"""Step 4 of a steady-flow worksheet: the streams — what crosses the boundary, and what
flows between the devices."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button

from balance.worksheet import StreamInput

from .. import fields
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from ..widgets.stream_form import StreamForm
from .form_list import FormListScreen


class StreamsScreen(FormListScreen):
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

    NOUN, SECTION, PART, TAG, FORM = "stream", "streams", "stream", "S", StreamForm

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

    def new_item(self, name: str):
        return StreamInput(name=name)

    def make_form(self, item, index: int):
        return StreamForm(item, index, p_atm=self._p_atm, id=f"stream-{index}")

    def _p_atm(self) -> float:
        return fields.atmosphere(self.worksheet.heading.atmosphere)

    async def action_add_stream(self) -> None:
        await self.add_item()

    async def action_remove_stream(self, index: int | None = None) -> None:
        await self.remove_item(index)


__all__ = ["StreamsScreen"]
