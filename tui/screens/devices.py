"""Step 5 of a steady-flow worksheet: the devices — what each one is, the streams it joins
and what is known of it."""

from __future__ import annotations

from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button, Static

from balance.worksheet import DeviceInput, Worksheet

from ..widgets.device_form import DeviceForm
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from .step import StepScreen


class DevicesScreen(StepScreen):
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

    def _forms(self, ws: Worksheet):
        devices = ws.devices or (DeviceInput(name="D1", kind="valve"),)
        for i, d in enumerate(devices):
            yield DeviceForm(d, i, id=f"device-{i}")

    def problem_targets(self) -> dict:
        targets: dict = {("device", None, ""): self.query_one("#devices-problem", ProblemLine)}
        for form in self.query(DeviceForm):
            targets.update(form.problem_targets())
        return targets

    def collect(self, ws: Worksheet) -> Worksheet:
        forms = self.query_one("#device-forms").query_children(DeviceForm)
        return ws.with_(devices=tuple(f.collect() for f in forms))

    async def _rebuild(self, ws: Worksheet, focus_index: int | None) -> None:
        box = self.query_one("#device-forms")
        self._ready = False
        await box.remove_children()
        await box.mount_all(list(self._forms(ws)))
        self.app.edit(ws)
        self._ready = True
        self._place_problems(self.app.check)
        forms = list(box.query_children(DeviceForm))
        if forms and focus_index is not None:
            target = forms[min(focus_index, len(forms) - 1)]
            target.query_one("#name").input.focus()
            target.scroll_visible()

    async def action_add_device(self) -> None:
        ws = self.collect(self.worksheet)
        taken = {d.name for d in ws.devices}
        n = len(ws.devices) + 1
        while f"D{n}" in taken:
            n += 1
        ws = ws.with_(devices=ws.devices + (DeviceInput(name=f"D{n}", kind="valve"),))
        await self._rebuild(ws, len(ws.devices) - 1)

    async def action_remove_device(self, index: int | None = None) -> None:
        forms = list(self.query_one("#device-forms").query_children(DeviceForm))
        if index is None:
            focused = self.focused
            index = next((f.index for f in forms if focused is not None and f in focused.ancestors), None)
        if index is None:
            self.notify("move into the device to remove first", severity="warning")
            return
        ws = self.collect(self.worksheet)
        await self._rebuild(ws.with_(devices=ws.devices[:index] + ws.devices[index + 1:]), index)

    async def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "add":
            await self.action_add_device()
        elif event.button.id == "remove":
            form = next(a for a in event.button.ancestors if isinstance(a, DeviceForm))
            await self.action_remove_device(form.index)

    def step_commands(self):
        yield SystemCommand("Add a device", "Another device (ctrl+t)", self.action_add_device)
        yield SystemCommand("Remove this device", "The device with the focus (ctrl+g)", self.action_remove_device)


__all__ = ["DevicesScreen"]
