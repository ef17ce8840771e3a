"""One stream of a steady-flow worksheet as typed: its name, what is known of its state,
its rate, speed or flow area, height, and its own species and model where they are not
the worksheet's."""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button

from balance.worksheet import STATE_KEYS, StreamInput

from .field_row import FieldRow
from .item_form import ItemForm
from .problem_line import ProblemLine
from .state_form import LABELS, TIPS, out_of_tab_order

#: What an empty field shows, for the fields besides the state (an example of each).
EXAMPLES = {"rate": "e.g. 2500 Nm3/h, 3 kg/s or ?", "velocity": "e.g. 15 m/s", "area": "e.g. 0.01 m2",
            "z": "e.g. 3 m", "species": "the worksheet's", "model": "the worksheet's"}
#: The stream's fields besides its state, in the order of the form: (key, label, tooltip).
OTHERS = (
    ("rate", "Rate", "mass, molar or standard-volume rate: 3 kg/s, 12 t/h, 30 mol/s, 2500 Nm3/h; ? to find it"),
    ("velocity", "Velocity", "the speed in the pipe: 15 m/s (or give the flow area)"),
    ("area", "Area", "the flow area: 0.01 m2 (the velocity follows from the rate)"),
    ("z", "Height", "elevation: 3 m (for g z in the energy balance)"),
    ("species", "Species", "the stream's own species, where it is not the worksheet's (an exchanger's other side)"),
    ("model", "Model", "the stream's own property model, where it is not the worksheet's"),
)


class StreamForm(ItemForm):
    """A stream: blank means not given (a device may fix it), ``?`` marks what to find.
    Up to two state properties fix its state."""

    def __init__(self, stream: StreamInput, index: int, *, removable: bool = True,
                 p_atm: Callable[[], float] | None = None, id: str | None = None) -> None:
        super().__init__(id=id, classes="stream")
        self.stream = stream
        self.index = index
        self.removable = removable
        self.p_atm = p_atm

    def on_mount(self) -> None:
        self.border_title = f"Stream {self.index + 1}"

    def compose(self) -> ComposeResult:
        s = self.stream
        where = f"stream {self.index + 1}"
        with Horizontal(classes="item-form--top"):
            yield FieldRow("Name", s.name, id="name", label_width=6,
                           tooltip="The stream's name: the devices join streams by it")
            if self.removable:
                yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                              tooltip="Remove this stream (ctrl+g)"))
        with Grid(classes="stream-form--state"):
            for key in STATE_KEYS:
                yield FieldRow(LABELS[key], s.props.get(key, ""), kind=key, id=f"prop-{key}",
                               field_label=f"{key} of {where}", allow_unknown=True, p_atm=self.p_atm,
                               label_width=3, tooltip=TIPS[key])
        with Grid():
            for key, label, tip in OTHERS:
                yield FieldRow(label, getattr(s, key), id=key, label_width=9,
                               placeholder=EXAMPLES[key],
                               tooltip=tip)
        yield ProblemLine(about="#prop-T Input", classes="stream-form--problem")

    def problem_targets(self) -> dict:
        """Where each field of this stream shows what the check found (see StepScreen)."""
        i = self.index
        out = {("stream", i, key): self.query_one(f"#prop-{key}", FieldRow) for key in STATE_KEYS}
        out.update({("stream", i, key): self.query_one(f"#{key}", FieldRow) for key, _, _ in OTHERS})
        out[("stream", i, "name")] = self.query_one("#name", FieldRow)
        out[("stream", i, "")] = self.query_one(ProblemLine)
        return out

    def collect(self) -> StreamInput:
        """The stream as typed now (blank properties left out)."""
        props = {}
        for key in STATE_KEYS:
            text = self.query_one(f"#prop-{key}", FieldRow).value
            if text.strip():
                props[key] = text
        others = {key: self.query_one(f"#{key}", FieldRow).value for key, _, _ in OTHERS}
        return StreamInput(name=self.query_one("#name", FieldRow).value, props=props, **others)
