"""Step 5 of a transient worksheet: the lines — where the gas comes from and goes to, and what
restricts it."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button, Static

from balance.worksheet import LineInput, Worksheet

from .. import fields
from ..widgets.line_form import LineForm
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from .form_list import FormListScreen


class LinesScreen(FormListScreen):
    STEP = "lines"
    HELP = """\
## Lines and restrictions

**What it is for.** Each way gas moves: from a *supply* at a fixed state
into a vessel (a fill), from a vessel to the *outside* at a back pressure
(a vent or blowdown), or from one vessel to the other (equalisation).

- *From*, *to*, *restriction*: drop-down lists (Enter opens, ↑/↓, Enter).
- A supply's *T* and *P* hold throughout the fill (`12 barg`).
- *Back P*: the pressure outside — `atmosphere`, or a flare header's
  `0.5 barg`.
- *Restriction*: an *orifice* (its diameter and discharge coefficient Cd,
  about 0.62 sharp-edged), a valve's *Cv* or *Kv* (taken as a nozzle of the
  same flow area), a given *rate*, or *none* — then only the end state
  without time is found, not the history.
- The flow is the model's own isentropic nozzle: choked (sonic at the
  throat) while the pressure ratio allows, subcritical after.
- `ctrl+t` adds a line; `ctrl+g` removes the one you are in.

**Common mistakes.** A Cv typed as a Kv (Kv = 0.865 Cv); a vent's back
pressure left at the atmosphere when it goes to a flare header; a valve's
own choking (x_T) expected: it is not modelled — size valves by their
standard.
"""

    NOUN, SECTION, PART, TAG, FORM = "line", "lines", "line", "L", LineForm

    BINDINGS = [
        Binding("ctrl+t", "add_line", "+Line", id="lines.add", tooltip="Add a line"),
        Binding("ctrl+g", "remove_line", "Remove", id="lines.remove", tooltip="Remove the line that has the focus"),
    ]

    def compose_form(self) -> ComposeResult:
        yield Static(self._vessels_note(self.worksheet), classes="hint", id="vessels-note")
        yield ProblemLine(about="#line-forms Input", id="lines-problem")
        with Vertical(id="line-forms"):
            yield from self._forms(self.worksheet)
        yield out_of_tab_order(Button("+ line (ctrl+t)", id="add", compact=True))

    @staticmethod
    def _vessels_note(ws: Worksheet) -> str:
        names = [v.name for v in ws.vessels if v.name.strip()]
        return f"vessels (step 4): {', '.join(names)}" if names else "no vessels yet: name them in step 4"

    def new_item(self, name: str):
        vessels = [v.name for v in self.worksheet.vessels if v.name.strip()]
        return LineInput(name=name, source="supply", target=vessels[0] if vessels else "")

    def make_form(self, item, index: int):
        names = tuple(v.name for v in self.worksheet.vessels)
        return LineForm(item, index, names, p_atm=self._p_atm, id=f"line-{index}")

    def _p_atm(self) -> float:
        return fields.atmosphere(self.worksheet.heading.atmosphere)

    async def action_add_line(self) -> None:
        await self.add_item()

    async def action_remove_line(self, index: int | None = None) -> None:
        await self.remove_item(index)


__all__ = ["LinesScreen"]
