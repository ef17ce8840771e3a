"""One vessel of a transient worksheet as typed: its name, volume, its gas at the start (or
evacuated), how its gas exchanges heat, and what that heat takes (a given rate; a wall's mass,
specific heat, area and coefficients)."""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button, Select

from balance.worksheet import VESSEL_HEAT, VesselInput

from .field_row import FieldRow
from .item_form import ItemForm
from .problem_line import ProblemLine
from .state_form import out_of_tab_order

#: How the vessel starts: with a gas of a given state, or evacuated.
STARTS = (("gas of a given state", "gas"), ("evacuated", "empty"))
#: The state fields of a vessel's start: (key, label, field kind, example).
STATE = (("T", "T", "T", "e.g. 20 degC"), ("P", "P", "P", "e.g. 30 barg"), ("rho", "rho", None, "or a density"))
#: What each heat choice takes (the fields shown for it).
TAKES = {
    "adiabatic": (),
    "isothermal": (),
    "given": ("Q",),
    "wall": ("wall_mass", "wall_cp", "wall_area", "h_inside", "height", "h_outside", "T_ambient", "fire_flux"),
}
#: Each heat value's label, field kind (for the inline check), example and tooltip.
VALUES = {
    "Q": ("Q rate", None, "e.g. 2 kW", "the heat rate to the gas: 2 kW (constant), - for heat out"),
    "wall_mass": ("wall mass", "m", "e.g. 850 kg", "the wall's mass: one lumped temperature"),
    "wall_cp": ("wall cp", None, "e.g. 480 J/(kg K)", "the wall material's specific heat: carbon steel ~480 J/(kg K)"),
    "wall_area": ("wall area", None, "e.g. 6.2 m2", "the wall's area (inside = outside, a thin wall)"),
    "h_inside": ("h inside", None, "natural", "inside coefficient: natural (Churchill and Chu) or 40 W/(m2 K)"),
    "height": ("height", None, "e.g. 2.4 m", "the vessel's height: the natural-convection length"),
    "h_outside": ("h outside", None, "0 (insulated)", "to the ambient: 8 W/(m2 K); blank or 0: insulated"),
    "T_ambient": ("T ambient", "T", "the start T", "the ambient temperature outside"),
    "fire_flux": ("fire flux", None, "0 (no fire)", "a fire's heat flux onto the outside, from the code: 50 kW/m2"),
}


class VesselForm(ItemForm):
    """A vessel: the start and the heat are drop-down lists (Enter opens, ↑/↓, Enter chooses);
    only the fields the choices take are shown. A value typed for another choice stays in the
    form while the step is open."""

    def __init__(self, vessel: VesselInput, index: int, *, p_atm: Callable[[], float] | None = None,
                 id: str | None = None) -> None:
        super().__init__(id=id, classes="vessel")
        self.vessel = vessel
        self.index = index
        self.p_atm = p_atm

    @property
    def heat(self) -> str:
        return self.choice("heat", self.vessel.heat)

    @property
    def empty(self) -> bool:
        return self.choice("start", "empty" if self.vessel.empty else "gas") == "empty"

    def on_mount(self) -> None:
        self.border_title = f"Vessel {self.index + 1}"
        self._show_taken()

    def compose(self) -> ComposeResult:
        v = self.vessel
        with Horizontal(classes="item-form--top"):
            yield FieldRow("Name", v.name, id="name", label_width=6, tooltip="The vessel's tag, e.g. V-12")
            yield FieldRow("V", v.V, kind="V", field_label=f"V ('{v.name}')", id="V", label_width=3,
                           positive=True, placeholder="e.g. 2 m3", tooltip="The vessel's volume")
            yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                          tooltip="Remove this vessel (ctrl+g)"))
        with Horizontal():
            yield Select(STARTS, value="empty" if v.empty else "gas", allow_blank=False, compact=True, id="start",
                         tooltip="At the start: a gas of a given state, or evacuated")
            yield Select([(h, h) for h in VESSEL_HEAT], value=v.heat if v.heat in VESSEL_HEAT else "adiabatic",
                         allow_blank=False, compact=True, id="heat",
                         tooltip="How the gas exchanges heat: adiabatic, isothermal, a given rate, or a wall")
        with Grid():
            for key, label, kind, example in STATE:
                yield FieldRow(label, v.props.get(key, ""), kind=kind, field_label=f"{key} ('{v.name}')",
                               id=f"state-{key}", label_width=10, placeholder=example, p_atm=self.p_atm,
                               tooltip="the gas at the start: two of T, P, rho (an evacuated vessel: T only, "
                                       "its wall's)")
            for key, (label, kind, example, tip) in VALUES.items():
                text = ", ".join(v.Q_points) if key == "Q" and v.Q_points else v.values.get(key, "")
                yield FieldRow(label, text, kind=kind, field_label=f"{label} ('{v.name}')", id=f"value-{key}",
                               label_width=10, placeholder=example, tooltip=tip)
        yield ProblemLine(about="#V Input", classes="vessel-form--problem")

    def _show_taken(self) -> None:
        taken = TAKES.get(self.heat, ())
        for key in VALUES:
            self.query_one(f"#value-{key}", FieldRow).set_class(key not in taken, "-not-taken")
        empty = self.empty
        for key, *_ in STATE:
            self.query_one(f"#state-{key}", FieldRow).set_class(empty and key != "T", "-not-taken")

    def on_select_changed(self, event: Select.Changed) -> None:
        if event.select.id in ("heat", "start"):
            self._show_taken()  # the event bubbles on: the screen collects the worksheet

    def problem_targets(self) -> dict:
        """Where each field of this vessel shows what the check found (see StepScreen)."""
        i = self.index
        out = {("vessel", i, key): self.query_one(f"#value-{key}", FieldRow) for key in VALUES}
        out.update({("vessel", i, key): self.query_one(f"#state-{key}", FieldRow) for key, *_ in STATE})
        for key in ("name", "V"):
            out[("vessel", i, key)] = self.query_one(f"#{key}", FieldRow)
        out[("vessel", i, "")] = self.query_one(ProblemLine)
        out[("vessel", i, "heat")] = self.query_one(ProblemLine)
        out[("vessel", i, "empty")] = self.query_one(ProblemLine)
        return out

    def collect(self) -> VesselInput:
        """The vessel as typed now: the fields its choices take (blank ones left out)."""
        heat, empty = self.heat, self.empty
        props = {}
        for key, *_ in STATE:
            text = self.query_one(f"#state-{key}", FieldRow).value
            if text.strip() and (not empty or key == "T"):
                props[key] = text
        values, points = {}, ()
        for key in TAKES.get(heat, ()):
            text = self.query_one(f"#value-{key}", FieldRow).value
            if not text.strip():
                continue
            if key == "Q" and ":" in text:  # points in time, 'time: rate, time: rate'
                points = tuple(piece.strip() for piece in text.split(",") if piece.strip())
            else:
                values[key] = text
        return VesselInput(name=self.query_one("#name", FieldRow).value, V=self.query_one("#V", FieldRow).value,
                           props=props, empty=empty, heat=heat, values=values, Q_points=points)


__all__ = ["VesselForm"]
