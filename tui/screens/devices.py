"""Step 5 of a steady-flow worksheet: the devices — what each one is, the streams it joins
and what is known of it."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button, Static

from balance.worksheet import DeviceInput, Worksheet

from ..widgets.device_form import DeviceForm
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from .form_list import FormListScreen


class DevicesScreen(FormListScreen):
    STEP = "devices"
    HELP = """\
## Devices

**What it is for.** Each device the streams pass through, the streams it
joins, and what is known of it. The degrees-of-freedom line says, device by
device, what is still missing ("valve PCV-1: give the outlet pressure").

- *Kind*: a drop-down list (Enter opens it, ↑/↓ move, Enter chooses):
  valve, heater, cooler, compressor, pump, turbine, expander, nozzle,
  diffuser, mixer, splitter, exchanger (hot side first), separator (outlets:
  liquid, then vapour). Only the values the kind takes are shown.
- *Inlets* and *outlets*: stream names from step 4, separated by commas.
- *Q*: heat to the fluid (a rate: `50 kW`; `-` for heat out), `?` or blank
  to find it; *T bound.*: where the heat crosses (the heating medium's
  temperature), for the entropy generated.
- *W*: power in the worksheet's sign convention (step 1); *eta*: the
  isentropic efficiency, compression (h2s - h1)/(h2 - h1), expansion
  (h1 - h2)/(h1 - h2s); *eta poly*: a compressor's polytropic efficiency.
- *dP*: the pressure drop from inlet to outlet.
- `ctrl+t` adds a device; `ctrl+g` (or its *remove* button) removes the one
  you are in. Tab goes from field to field and passes the buttons by.

**Common mistakes.** A valve given a heat duty (a valve is adiabatic: add a
heater); an outlet named as another device's outlet too; a turbine's power
typed with the compressor's sign; an efficiency in percent (`78` for
`0.78`).
"""

    NOUN, SECTION, PART, TAG, FORM = "device", "devices", "device", "D", DeviceForm

    BINDINGS = [
        Binding("ctrl+t", "add_device", "+Device", id="devices.add", tooltip="Add a device"),
        Binding("ctrl+g", "remove_device", "Remove", id="devices.remove",
                tooltip="Remove the device that has the focus"),
    ]

    def compose_form(self) -> ComposeResult:
        yield Static(self._streams_note(self.worksheet), classes="hint", id="streams-note")
        yield ProblemLine(about="#device-forms Input", id="devices-problem")
        with Vertical(id="device-forms"):
            yield from self._forms(self.worksheet)
        yield out_of_tab_order(Button("+ device (ctrl+t)", id="add", compact=True))

    @staticmethod
    def _streams_note(ws: Worksheet) -> str:
        names = [st.name for st in ws.streams if st.name.strip()]
        return f"streams (step 4): {', '.join(names)}" if names else "no streams yet: name them in step 4"

    def new_item(self, name: str):
        return DeviceInput(name=name, kind="valve")

    def make_form(self, item, index: int):
        return DeviceForm(item, index, id=f"device-{index}")

    async def action_add_device(self) -> None:
        await self.add_item()

    async def action_remove_device(self, index: int | None = None) -> None:
        await self.remove_item(index)


__all__ = ["DevicesScreen"]
