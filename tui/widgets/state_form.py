"""One state as typed: its name, the properties given or unknown, and the amount."""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button, Checkbox, Static

from balance.worksheet import STATE_KEYS, StateInput

from .field_row import FieldRow
from .item_form import ItemForm
from .problem_line import ProblemLine
from .tick_box import TickBox

LABELS = {"T": "T", "P": "P", "v": "v", "rho": "ρ", "u": "u", "h": "h", "s": "s", "x": "x",
          "n": "n", "m": "m", "V": "V"}
TIPS = {
    "T": "temperature: 500 K, 20 degC, 68 degF",
    "P": "pressure: 35 bar, 3 barg (gauge), 150 psig, 10 bara",
    "v": "molar or specific volume: 1 L/mol, 0.5 m3/kg",
    "rho": "density: 300 kg/m3, 40 mol/m3",
    "u": "internal energy: 2800 kJ/kg, 10 kJ/mol",
    "h": "enthalpy: 2800 kJ/kg",
    "s": "entropy: 6.5 kJ/(kg K)",
    "x": "vapour quality 0..1 (reference model)",
    "n": "amount: 2 mol, or a mass",
    "m": "mass: 2.5 kg, 1.2 g",
    "V": "volume: 2 m3, 50 L",
}


def out_of_tab_order(button: Button) -> Button:
    """A button Tab passes by (its key and a click still press it): Tab goes from field to
    field, and never onto a button that Enter would fire (a 'remove' among the fields)."""
    button.can_focus = False
    return button


class StateForm(ItemForm):
    """An initial compartment (``role='initial'``) or the final state.

    Blank means not given; ``?`` marks an unknown. Two properties fix a
    state; the amount is one of n, m or V (a final state takes only V).
    """

    DEFAULT_CSS = """
    StateForm .state-form--amount { color: $text-muted; height: 1; margin-top: 0; }
    StateForm.-empty .state-form--props { display: none; }
    """

    def __init__(self, state: StateInput, role: str, index: int = 0, *, removable: bool = False,
                 p_atm: Callable[[], float] | None = None, id: str | None = None) -> None:
        super().__init__(id=id)
        self.state = state
        self.role = role
        self.index = index
        self.removable = removable
        self.p_atm = p_atm
        self.set_class(role == "initial" and state.empty, "-empty")

    @property
    def where(self) -> str:
        return f"initial state {self.index + 1}" if self.role == "initial" else "the final state"

    def on_mount(self) -> None:
        self.border_title = (f"Initial compartment {self.index + 1}" if self.role == "initial"
                             else "Final state")

    def compose(self) -> ComposeResult:
        s = self.state
        initial = self.role == "initial"
        with Horizontal(classes="item-form--top"):
            yield FieldRow("Name", s.name, id="name", label_width=6)
            if self.removable:
                yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                              tooltip="Remove this compartment (ctrl+g)"))
        if initial:
            yield TickBox("evacuated: only a volume", s.empty, id="empty", compact=True)
        with Grid(classes="state-form--props"):
            for key in STATE_KEYS:
                yield FieldRow(LABELS[key], s.props.get(key, ""), kind=key, id=f"prop-{key}",
                               field_label=f"{key} of {self.where}", allow_unknown=not initial,
                               p_atm=self.p_atm, label_width=3, tooltip=TIPS[key])
        yield Static("amount: one of n, m, V" if initial else "amount: from the initial states (V may be given)",
                     classes="state-form--amount")
        with Grid():
            keys = ("n", "m", "V") if initial else ("V",)
            for key in keys:
                row = FieldRow(LABELS[key], s.amount.get(key, ""), kind=key, id=f"amount-{key}",
                               field_label=f"{key} of {self.where}",
                               allow_unknown=(key in ("n", "m")) if initial else True,
                               positive=True, label_width=3, tooltip=TIPS[key])
                if initial and key != "V":
                    row.add_class("state-form--props")
                yield row
        yield ProblemLine(about=self._first_field(s.empty), classes="state-form--problem")

    @property
    def part(self) -> tuple[str, int | None]:
        """Where the worksheet holds this state: ('initial', index) or ('final', None)."""
        return (self.role, self.index) if self.role == "initial" else (self.role, None)

    def problem_targets(self) -> dict:
        """Where each field of this state shows what the check found (see StepScreen)."""
        part, index = self.part
        out = {(part, index, key): row for key in STATE_KEYS
               for row in self.query(f"#prop-{key}").results(FieldRow)}
        out.update({(part, index, key): row for key in ("n", "m", "V")
                    for row in self.query(f"#amount-{key}").results(FieldRow)})
        out[(part, index, "name")] = self.query_one("#name", FieldRow)
        out[(part, index, "")] = self.query_one(ProblemLine)
        return out

    def collect(self) -> StateInput:
        """The state as typed now (blank fields left out)."""
        empty = False
        if self.role == "initial":
            empty = self.query_one("#empty", Checkbox).value
        props = {}
        if not empty:
            for key in STATE_KEYS:
                text = self.query_one(f"#prop-{key}", FieldRow).value
                if text.strip():
                    props[key] = text
        amount = {}
        keys = ("n", "m", "V") if self.role == "initial" else ("V",)
        for key in keys:
            if empty and key != "V":
                continue
            text = self.query_one(f"#amount-{key}", FieldRow).value
            if text.strip():
                amount[key] = text
        # a blank name is the name the worksheet reader gives it, so the record reads back what is held
        name = self.query_one("#name", FieldRow).value or (f"initial {self.index + 1}" if self.role == "initial"
                                                           else "final")
        return StateInput(name=name, props=props, amount=amount, empty=empty)

    @staticmethod
    def _first_field(empty: bool) -> str:
        """The field to go to for a problem of the state as a whole."""
        return "#amount-V Input" if empty else "#prop-T Input"

    def on_checkbox_changed(self, event: Checkbox.Changed) -> None:
        self.set_class(event.value, "-empty")
        self.query_one(ProblemLine).about = self._first_field(event.value)
