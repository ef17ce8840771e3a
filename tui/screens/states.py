"""Step 4: the states — each initial compartment and the final state."""

from __future__ import annotations

from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button, Static

from balance.worksheet import StateInput, Worksheet

from .. import fields
from ..widgets.state_form import StateForm, out_of_tab_order
from .step import StepScreen


class StatesScreen(StepScreen):
    STEP = "states"
    HELP = """\
## States

**What it is for.** The initial state of each compartment and the final
state. A state is fixed by two properties; the amount by one of n, m or V.

- Type values with units: `500 K`, `20 degC`, `35 bar`, `3 barg`, `1 L`,
  `0.5 m3/kg`, `2800 kJ/kg`. Gauge pressures use the atmosphere of step 1.
- Leave a property blank when it is not given; type `?` to mark it unknown
  (what the balance should find). The final state usually has `?` for the
  properties asked.
- *Evacuated* compartments (a receiver under vacuum) have only a volume.
- `ctrl+t` adds a compartment; `ctrl+g` (or its *remove* button) removes the
  one you are in. Tab goes from field to field and passes the buttons by.
- *Evacuated*: space ticks it (`[x]`) and unticks it (`[ ]`). Several compartments join into one final state inside a
  rigid boundary (a rupture, a valve opening).
- The amount of an initial state may be unknown: type `?` for n.

**Common mistakes.** A gauge pressure typed as absolute (`150 bar` for
`150 barg`); three properties for one state (two fix it); a temperature
difference where a temperature is meant; giving the final amount (it
follows from the initial one).
"""

    BINDINGS = [
        Binding("ctrl+t", "add_compartment", "+Compartment", id="states.add",
                tooltip="Add an initial compartment"),
        Binding("ctrl+g", "remove_compartment", "Remove", id="states.remove",
                tooltip="Remove the initial compartment that has the focus"),
    ]

    def compose_form(self) -> ComposeResult:
        ws = self.worksheet
        with Vertical(id="initial-forms"):
            yield from self._initial_forms(ws)
        yield out_of_tab_order(Button("+ compartment (ctrl+t)", id="add", compact=True))
        yield Static("", classes="spacer")
        yield StateForm(ws.final, "final", p_atm=self._p_atm, id="final")

    def _initial_forms(self, ws: Worksheet):
        initial = ws.initial or (StateInput(name="initial"),)
        for i, s in enumerate(initial):
            yield StateForm(s, "initial", i, removable=len(initial) > 1, p_atm=self._p_atm, id=f"initial-{i}")

    def _p_atm(self) -> float:
        return fields.atmosphere(self.worksheet.heading.atmosphere)

    def problem_targets(self) -> dict:
        targets: dict = {}
        for form in self.query(StateForm):
            targets.update(form.problem_targets())
        return targets

    def collect(self, ws: Worksheet) -> Worksheet:
        forms = list(self.query_one("#initial-forms").query_children(StateForm))
        initial = tuple(f.collect() for f in forms)
        final = self.query_one("#final", StateForm).collect()
        return ws.with_(initial=initial, final=final)

    async def _rebuild(self, ws: Worksheet, focus_index: int) -> None:
        box = self.query_one("#initial-forms")
        self._ready = False
        await box.remove_children()
        await box.mount_all(list(self._initial_forms(ws)))
        self.app.edit(ws)
        self._ready = True
        self._place_problems(self.app.check)
        forms = list(box.query_children(StateForm))
        if forms:
            target = forms[min(focus_index, len(forms) - 1)]
            target.query_one("#name").input.focus()
            target.scroll_visible()

    async def action_add_compartment(self) -> None:
        ws = self.collect(self.worksheet)
        n = len(ws.initial) + 1
        ws = ws.with_(initial=ws.initial + (StateInput(name=f"compartment {n}"),))
        await self._rebuild(ws, n - 1)

    async def action_remove_compartment(self, index: int | None = None) -> None:
        forms = list(self.query_one("#initial-forms").query_children(StateForm))
        if index is None:
            focused = self.focused
            index = next((f.index for f in forms if focused is not None and f in focused.ancestors), None)
        if index is None:
            self.notify("move into the compartment to remove first", severity="warning")
            return
        if len(forms) <= 1:
            self.notify("a worksheet needs at least one initial compartment", severity="warning")
            return
        ws = self.collect(self.worksheet)
        initial = ws.initial[:index] + ws.initial[index + 1:]
        await self._rebuild(ws.with_(initial=initial), index)

    async def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "add":
            await self.action_add_compartment()
        elif event.button.id == "remove":
            form = next(a for a in event.button.ancestors if isinstance(a, StateForm))
            await self.action_remove_compartment(form.index)

    def step_commands(self):
        yield SystemCommand("Add a compartment", "Another initial compartment (ctrl+t)", self.action_add_compartment)
        yield SystemCommand("Remove this compartment", "The compartment with the focus (ctrl+g)",
                            self.action_remove_compartment)
