"""Step 4 of a transient worksheet: the vessels — each one's volume, its gas at the start, and
how its gas exchanges heat."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button

from balance.worksheet import VesselInput

from .. import fields
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from ..widgets.vessel_form import VesselForm
from .form_list import FormListScreen


class VesselsScreen(FormListScreen):
    STEP = "vessels"
    HELP = """\
## Vessels

**What it is for.** The vessel whose gas is filled, vented or blown down, or
the two vessels that equalise through a line (step 5). Its gas is taken as
uniform (one temperature and pressure in the vessel at each moment).

- *V*: the vessel's volume (`2 m3`, `40 L`).
- *Start*: a gas of a given state (two of T, P, rho: `20 degC`, `30 barg`),
  or *evacuated* (only its temperature, the wall's).
- *Heat* (Enter opens the list):
  - *adiabatic*: no heat during the transient — the fast bound (coldest in a
    blowdown, hottest in a fill);
  - *isothermal*: the gas held at its start temperature — the slow bound;
  - *given*: a heat rate to the gas, `2 kW`, or points in time
    `0 s: 2 kW, 10 min: 0 kW` (linear between);
  - *wall*: a lumped wall — its mass, specific heat (`480 J/(kg K)` for
    carbon steel), area, the inside coefficient (`natural`: Churchill and
    Chu on the vessel's height, or a number), outside to the ambient, and a
    fire's heat flux taken from the code that applies.
- `ctrl+t` adds a vessel (two at most); `ctrl+g` removes the one you are in.

**Common mistakes.** A gauge pressure typed as absolute; an adiabatic
blowdown read as the metal's temperature (the wall lags the gas: give the
wall for the metal); a wall's area in ft² typed as m².
"""

    NOUN, SECTION, PART, TAG, FORM = "vessel", "vessels", "vessel", "V", VesselForm

    BINDINGS = [
        Binding("ctrl+t", "add_vessel", "+Vessel", id="vessels.add", tooltip="Add a vessel"),
        Binding("ctrl+g", "remove_vessel", "Remove", id="vessels.remove",
                tooltip="Remove the vessel that has the focus"),
    ]

    def compose_form(self) -> ComposeResult:
        yield ProblemLine(about="#vessel-forms Input", id="vessels-problem")
        with Vertical(id="vessel-forms"):
            yield from self._forms(self.worksheet)
        yield out_of_tab_order(Button("+ vessel (ctrl+t)", id="add", compact=True))

    def new_item(self, name: str):
        return VesselInput(name=name)

    def make_form(self, item, index: int):
        return VesselForm(item, index, p_atm=self._p_atm, id=f"vessel-{index}")

    def _p_atm(self) -> float:
        return fields.atmosphere(self.worksheet.heading.atmosphere)

    async def action_add_vessel(self) -> None:
        await self.add_item()

    async def action_remove_vessel(self, index: int | None = None) -> None:
        await self.remove_item(index)


__all__ = ["VesselsScreen"]
