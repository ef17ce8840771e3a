"""One device of a steady-flow worksheet as typed: its name, its kind, the streams it
joins (by name) and the values its kind takes (heat, power, efficiency, pressure drop,
boundary temperature, a splitter's fractions, an exchanger's arrangement)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button, Select

from balance.worksheet import DEVICE_KINDS, DeviceInput

from .field_row import FieldRow
from .item_form import ItemForm
from .problem_line import ProblemLine
from .state_form import out_of_tab_order

#: What each kind of device takes besides its streams (the fields shown for it); common
#: practice for each kind, as the steady-flow balance reads them.
TAKES = {
    "valve": ("dP",),
    "heater": ("Q", "dP", "T_boundary"),
    "cooler": ("Q", "dP", "T_boundary"),
    "compressor": ("W", "eta", "eta_poly"),
    "pump": ("W", "eta", "eta_poly"),
    "turbine": ("W", "eta"),
    "expander": ("W", "eta"),
    "nozzle": ("eta",),
    "diffuser": ("eta",),
    "mixer": (),
    "splitter": ("fractions",),
    "exchanger": ("dP", "dP_cold", "arrangement"),
    "separator": (),
}
#: Each value's label and tooltip.
VALUES = {
    "Q": ("Q", "heat to the fluid, a rate: 50 kW (- for heat out), or ? to find it"),
    "W": ("W", "power in the worksheet's sign convention (step 1): 120 kW, or ? to find it"),
    "eta": ("eta", "isentropic efficiency 0..1: 0.78 (a nozzle's: ideal when blank), or ?"),
    "eta_poly": ("eta poly", "polytropic efficiency 0..1 (compressors, pumps), in place of eta"),
    "dP": ("dP", "pressure drop inlet to outlet: 0.3 bar (an exchanger's hot side)"),
    "dP_cold": ("dP cold", "the exchanger's cold-side pressure drop: 0.2 bar"),
    "T_boundary": ("T bound.", "temperature where the heat crosses (the heating medium): 90 degC"),
    "fractions": ("fractions", "each outlet's share of the inlet rate, in order: 0.6, 0.4"),
    "arrangement": ("arrange.", "counter (the default) or co-current"),
}
#: What an empty value shows: an example of it.
EXAMPLES = {"Q": "e.g. 50 kW or ?", "W": "e.g. 120 kW or ?", "eta": "e.g. 0.78 or ?", "eta_poly": "e.g. 0.8",
            "dP": "e.g. 0.3 bar", "dP_cold": "e.g. 0.2 bar", "T_boundary": "e.g. 90 degC",
            "fractions": "e.g. 0.6, 0.4", "arrangement": "counter"}
#: What the inlets and outlets are, per kind, where the order matters.
ORDER_NOTE = {"exchanger": "hot side first", "separator": "outlets: liquid, then vapour"}


def split_names(text: str) -> tuple[str, ...]:
    """``'a, b'`` -> ``('a', 'b')``: stream names separated by commas, each kept as typed
    (a blank piece is dropped)."""
    return tuple(piece.strip() for piece in text.split(",") if piece.strip())


class DeviceForm(ItemForm):
    """A device: the kind is a drop-down list (Enter opens it, ↑/↓, Enter chooses); only the
    values the kind takes are shown. A value typed for another kind stays in the form while
    the step is open, and comes back when that kind is chosen again."""

    def __init__(self, device: DeviceInput, index: int, *, id: str | None = None) -> None:
        super().__init__(id=id, classes="device")
        self.device = device
        self.index = index

    @property
    def kind(self) -> str:
        return self.choice("kind", self.device.kind, blank="")

    def on_mount(self) -> None:
        self.border_title = f"Device {self.index + 1}"
        self._show_taken(self.device.kind)

    def compose(self) -> ComposeResult:
        d = self.device
        with Horizontal(classes="item-form--top"):
            yield FieldRow("Name", d.name, id="name", label_width=6, tooltip="The device's tag, e.g. PCV-101")
            kind = d.kind if d.kind in DEVICE_KINDS else Select.NULL
            yield Select([(k, k) for k in DEVICE_KINDS], value=kind, prompt="kind", compact=True, id="kind",
                         tooltip="What the device is: valve, heater, compressor ...")
            yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                          tooltip="Remove this device (ctrl+g)"))
        with Grid():
            yield FieldRow("Inlets", ", ".join(d.inlets), id="inlets", label_width=9,
                           placeholder="stream names, a, b", tooltip="The streams in, by name (step 4)")
            yield FieldRow("Outlets", ", ".join(d.outlets), id="outlets", label_width=9,
                           placeholder="stream names, a, b", tooltip="The streams out, by name (step 4)")
            for key, (label, tip) in VALUES.items():
                text = ", ".join(d.fractions) if key == "fractions" else d.values.get(key, "")
                if key == "T_boundary" and _house_requires(self, "device.T_boundary"):
                    label += " ◆"
                yield FieldRow(label, text, id=f"value-{key}", label_width=10, placeholder=EXAMPLES[key],
                               tooltip=tip)
        yield ProblemLine(about="#inlets Input", classes="device-form--problem")

    def _show_taken(self, kind: str) -> None:
        taken = TAKES.get(kind, ())
        for key in VALUES:
            self.query_one(f"#value-{key}", FieldRow).set_class(key not in taken, "-not-taken")
        note = ORDER_NOTE.get(kind)
        self.border_subtitle = note or ""

    def on_select_changed(self, event: Select.Changed) -> None:
        if event.select.id == "kind":
            self._show_taken(self.kind)  # the event bubbles on: the screen collects the worksheet

    def problem_targets(self) -> dict:
        """Where each field of this device shows what the check found (see StepScreen)."""
        i = self.index
        out = {("device", i, key): self.query_one(f"#value-{key}", FieldRow) for key in VALUES}
        for key in ("name", "inlets", "outlets"):
            out[("device", i, key)] = self.query_one(f"#{key}", FieldRow)
        out[("device", i, "")] = self.query_one(ProblemLine)  # the kind's problem too: the line is under it
        return out

    def collect(self) -> DeviceInput:
        """The device as typed now: the values its kind takes (blank ones left out)."""
        kind = self.kind
        taken = TAKES.get(kind, ())
        values = {}
        for key in VALUES:
            text = self.query_one(f"#value-{key}", FieldRow).value
            if key in taken and key != "fractions" and text.strip():
                values[key] = text
        fractions = split_names(self.query_one("#value-fractions", FieldRow).value) if "fractions" in taken else ()
        return DeviceInput(name=self.query_one("#name", FieldRow).value, kind=kind,
                           inlets=split_names(self.query_one("#inlets", FieldRow).value),
                           outlets=split_names(self.query_one("#outlets", FieldRow).value),
                           values=values, fractions=fractions)


def _house_requires(widget, field: str) -> bool:
    """Whether the house procedure requires ``field`` of every heater and cooler."""
    procedure = getattr(widget.app.session, "procedure", None)
    return procedure is not None and field in procedure.required()
