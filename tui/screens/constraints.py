"""Step 6: constraints on the process, and what is unknown."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.content import Content
from textual.widgets import Label, Static

from balance.worksheet import CONSTRAINTS, Process, Worksheet

from ..analysis import implied
from ..widgets.check_list import CheckList
from ..widgets.field_row import FieldRow
from ..widgets.problem_line import ProblemLine
from .step import StepScreen

DESCRIPTIONS = {
    "rigid": "rigid — volume fixed, no boundary work",
    "adiabatic": "adiabatic — no heat crosses",
    "isothermal": "isothermal — T2 = T1, work along the isotherm",
    "isobaric": "isobaric — P2 = P1, W = −P ΔV",
    "reversible": "reversible — S_gen = 0",
    "polytropic": "polytropic — P vⁿ constant (give n)",
    "free-expansion": "free expansion — rigid + adiabatic + no work",
    "membrane-rupture": "membrane rupture — compartments join, rigid",
}


class ConstraintsScreen(StepScreen):
    STEP = "constraints"
    HELP = """\
## Constraints and the unknown

**What it is for.** What you know about the *process* rather than the
states: each constraint is an equation (or fixes a final property), and the
degrees-of-freedom line below counts them against the unknowns.

- ↑/↓ to move in the list, space (or Enter) to tick or untick a constraint:
  `[x]` ticked, `[ ]` not, `[=]` implied by another that is ticked.
- *Rigid*, *isobaric*, *isothermal* and *polytropic* say how the boundary
  moves and so give the boundary work. Where none applies and the volume
  changes, add a work term of kind *boundary* (step 5).
- *Reversible* adds the second law as an equation (S_gen = 0): with
  *adiabatic* it is the isentropic process.
- *Free expansion* (into a vacuum) and *membrane rupture* are rigid and, for
  a free expansion, adiabatic with no work.
- ΔKE and ΔPE are optional changes of the system's kinetic and potential
  energy.
- *Unknowns* lists what the balance will find; give more values or add a
  constraint until the counts match.

**Common mistakes.** Rigid and isobaric together (they contradict); adiabatic
with a heat term; reversible for a rupture or a throttling (those generate
entropy: the solver will refuse a negative S_gen); a polytropic path without
its exponent n.
"""

    def compose_form(self) -> ComposeResult:
        pr = self.worksheet.process
        yield Label("Constraints (↑/↓ move, space ticks; [=] implied by another)", classes="form-label")
        yield CheckList([(c, DESCRIPTIONS[c]) for c in CONSTRAINTS], pr.constraints, implies=implied,
                        id="constraints")
        yield ProblemLine(about="#constraints", id="constraints-problem")
        yield FieldRow("Polytropic n", pr.n, kind="dimensionless", field_label="polytropic n", id="n",
                       label_width=13, tooltip="The exponent of P vⁿ = const, e.g. 1.3")
        yield FieldRow("ΔKE", pr.dKE, kind="energy", field_label="ΔKE", id="dKE", label_width=13,
                       tooltip="Change of the system's kinetic energy (optional)")
        yield FieldRow("ΔPE", pr.dPE, kind="energy", field_label="ΔPE", id="dPE", label_width=13,
                       tooltip="Change of the system's potential energy (optional)")
        yield Label("Unknowns and equations", classes="form-label")
        yield Static("", id="unknowns")

    def on_mount(self) -> None:
        super().on_mount()
        self.watch(self.app, "check", self._show_unknowns)

    def problem_targets(self) -> dict:
        q = self.query_one
        return {("process", None, ""): q("#constraints-problem", ProblemLine),
                ("process", None, "n"): q("#n", FieldRow), ("process", None, "dKE"): q("#dKE", FieldRow),
                ("process", None, "dPE"): q("#dPE", FieldRow)}

    def collect(self, ws: Worksheet) -> Worksheet:
        ticked = set(self.query_one("#constraints", CheckList).ticked)
        # keep the order the worksheet had; add new ones at the end
        kept = [c for c in ws.process.constraints if c in ticked]
        added = [c for c in CONSTRAINTS if c in ticked and c not in kept]
        q = self.query_one
        process = Process(constraints=tuple(kept + added), n=q("#n", FieldRow).value,
                          dKE=q("#dKE", FieldRow).value, dPE=q("#dPE", FieldRow).value)
        return ws.with_(process=process)

    def _show_unknowns(self, check) -> None:
        box = self.query_one("#unknowns", Static)
        if check is None:
            box.update(Content.styled("counting…", "$text-muted"))
            return
        if not (check.unknowns or check.equations):
            box.update(Content.styled(check.message, "$text-warning"))
            return
        parts = [("unknowns:  ", "bold"), ", ".join(check.unknowns) or "none", "\n",
                 ("equations: ", "bold"), ", ".join(check.equations), "\n",
                 ("final state fixed by: ", "bold"), ", ".join(check.fixed) or "nothing yet", "\n",
                 ("in force:  ", "bold"), ", ".join(check.constraints) or "none", f" (path: {check.path})"]
        box.update(Content.assemble(*parts))
