"""Step 5: heat and work terms — what crosses the boundary."""

from __future__ import annotations

from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Button, Label, Static

from balance.convention import Convention
from balance.worksheet import HeatTerm, Worksheet, WorkTerm

from ..widgets.heat_term_form import HeatTermForm
from ..widgets.problem_line import ProblemLine
from ..widgets.state_form import out_of_tab_order
from ..widgets.work_term_form import WorkTermForm
from .step import StepScreen


class TermsScreen(StepScreen):
    STEP = "terms"
    HELP = """\
## Heat and work terms

**What it is for.** Everything that crosses the boundary as energy, other
than mass: heat terms and work terms. Each has a value, or `?` when the
balance should find it.

- *Direction*: heat into or out of the system; work done on or by it. You
  type the size; joulebook writes the sign in the worksheet's convention
  (step 1).
- *Boundary temperature*: where a heat term crosses; needed for the entropy
  balance (S_gen). Step 2 can set it for all terms at once.
- *Work kind*: shaft, stirring, electrical, boundary (a moving wall) or
  other. A path constraint (rigid, isobaric, isothermal, polytropic)
  supplies the boundary work itself: do not add a boundary term as well.
- `ctrl+t` adds a heat term, `ctrl+f` a work term, `ctrl+g` removes the term
  you are in. Tab goes from field to field and passes the buttons by.
- *Direction* and *kind* are drop-down lists: Enter opens one, ↑/↓ move,
  Enter chooses.

**Common mistakes.** A heat term on an adiabatic process (remove one);
counting the boundary work twice (a path constraint *and* a boundary
term); heat leaving the system typed as positive; the system temperature
used as the boundary temperature of a hotter jacket.
"""

    BINDINGS = [
        Binding("ctrl+t", "add_heat", "+Heat", id="terms.add_heat", tooltip="Add a heat term"),
        Binding("ctrl+f", "add_work", "+Work", id="terms.add_work", tooltip="Add a work term"),
        Binding("ctrl+g", "remove_term", "Remove", id="terms.remove",
                tooltip="Remove the term that has the focus"),
    ]

    def compose_form(self) -> ComposeResult:
        ws = self.worksheet
        yield Static(self._convention_note(ws), classes="hint", id="convention-note")
        yield Label("Heat terms", classes="form-label")
        yield ProblemLine(about="#heat-forms Input", id="heat-problem")
        with Vertical(id="heat-forms"):
            yield from self._heat_forms(ws)
        yield Label("Work terms", classes="form-label")
        yield ProblemLine(about="#work-forms Input", id="work-problem")
        with Vertical(id="work-forms"):
            yield from self._work_forms(ws)
        with Horizontal(classes="button-row"):
            yield out_of_tab_order(Button("+ heat term (ctrl+t)", id="add-heat", compact=True))
            yield out_of_tab_order(Button("+ work term (ctrl+f)", id="add-work", compact=True))

    @staticmethod
    def _convention_note(ws: Worksheet) -> str:
        direction = Convention(ws.heading.convention).positive_work
        note = f"Heat into the system is positive; work done {direction} the system is positive (step 1)."
        return note + ("" if ws.heat or ws.work else " No terms: Q = 0 and W = 0.")

    def _heat_forms(self, ws: Worksheet):
        if not ws.heat:
            yield Static("none", classes="hint")
        for i, h in enumerate(ws.heat):
            yield HeatTermForm(h, i, id=f"heat-{i}")

    def _work_forms(self, ws: Worksheet):
        if not ws.work:
            yield Static("none", classes="hint")
        for i, w in enumerate(ws.work):
            yield WorkTermForm(w, i, ws.heading.convention, id=f"work-{i}")

    def problem_targets(self) -> dict:
        targets: dict = {("heat", None, ""): self.query_one("#heat-problem", ProblemLine),
                         ("work", None, ""): self.query_one("#work-problem", ProblemLine)}
        for form in self.query(".term"):
            targets.update(form.problem_targets())
        return targets

    def collect(self, ws: Worksheet) -> Worksheet:
        heat = tuple(f.collect() for f in self.query_one("#heat-forms").query_children(HeatTermForm))
        work = tuple(f.collect() for f in self.query_one("#work-forms").query_children(WorkTermForm))
        return ws.with_(heat=heat, work=work)

    async def _rebuild(self, ws: Worksheet, focus: str | None) -> None:
        self._ready = False
        for box, forms in (("#heat-forms", self._heat_forms(ws)), ("#work-forms", self._work_forms(ws))):
            container = self.query_one(box)
            await container.remove_children()
            await container.mount_all(list(forms))
        self.app.edit(ws)
        self.query_one("#convention-note", Static).update(self._convention_note(ws))  # 'No terms' no more
        self._ready = True
        self._place_problems(self.app.check)
        if focus:
            matches = self.query(f"#{focus}")
            if matches:
                target = matches.first()
                target.query_one("#name").input.focus()
                target.scroll_visible()

    async def action_add_heat(self) -> None:
        ws = self.collect(self.worksheet)
        n = len(ws.heat) + 1
        default_T = self.app.session.extras.get("T_boundary", "")
        ws = ws.with_(heat=ws.heat + (HeatTerm(name=f"Q{n}", Q="?", T_boundary=default_T),))
        await self._rebuild(ws, f"heat-{n - 1}")

    async def action_add_work(self) -> None:
        ws = self.collect(self.worksheet)
        n = len(ws.work) + 1
        ws = ws.with_(work=ws.work + (WorkTerm(name=f"W{n}", kind="shaft", W="?"),))
        await self._rebuild(ws, f"work-{n - 1}")

    async def action_remove_term(self, form=None) -> None:
        if form is None:
            focused = self.focused
            form = next((a for a in (focused.ancestors if focused else [])
                         if isinstance(a, (HeatTermForm, WorkTermForm))), None)
        if form is None:
            self.notify("move into the term to remove first", severity="warning")
            return
        ws = self.collect(self.worksheet)
        if isinstance(form, HeatTermForm):
            ws = ws.with_(heat=ws.heat[:form.index] + ws.heat[form.index + 1:])
        else:
            ws = ws.with_(work=ws.work[:form.index] + ws.work[form.index + 1:])
        await self._rebuild(ws, None)
        first = self.query("#form FieldRow Input")
        if first:
            first.first().focus()

    async def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "add-heat":
            await self.action_add_heat()
        elif event.button.id == "add-work":
            await self.action_add_work()
        elif event.button.id == "remove":
            form = next(a for a in event.button.ancestors if isinstance(a, (HeatTermForm, WorkTermForm)))
            await self.action_remove_term(form)

    def step_commands(self):
        yield SystemCommand("Add a heat term", "Heat crossing the boundary (ctrl+t)", self.action_add_heat)
        yield SystemCommand("Add a work term", "Work crossing the boundary (ctrl+f)", self.action_add_work)
        yield SystemCommand("Remove this term", "The term with the focus (ctrl+g)", self.action_remove_term)
