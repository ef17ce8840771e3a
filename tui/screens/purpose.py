"""Step 1: purpose and basis — what the calculation is for and on what basis."""

from __future__ import annotations

from dataclasses import replace

from textual.app import ComposeResult
from textual.widgets import Label, TextArea

from balance.worksheet import CONVENTIONS, Worksheet

from .. import fields
from ..widgets.choice_list import ChoiceList
from ..widgets.field_row import FieldRow
from ..widgets.problem_line import ProblemLine
from .step import StepScreen

CONVENTION_LABELS = {
    "work-on-system": "work done ON the system is positive (ΔU = Q + W)",
    "work-by-system": "work done BY the system is positive (ΔU = Q − W)",
}


class PurposeScreen(StepScreen):
    STEP = "purpose"
    HELP = """\
## Purpose and basis

**What it is for.** The first thing a checker reads: what the calculation
answers, for which job, and on what basis (which mass of fluid, which
vessels). The assumptions you list here travel with the record and are
printed with every result.

- *Title*: one line naming the equipment and the event.
- *Job*: the job, calculation or document number your office uses.
- *Asked*: the question, e.g. "final T and P after the valve fails open".
- *Basis*: what the balance is written for, e.g. "all gas in both vessels".
- *Assumptions*: one per line (rigid vessels, no heat from the walls ...).
- *Sign convention*: which work is counted positive (↑/↓ in the list, space
  or Enter chooses). Heat *to* the system is always positive.
- *Atmosphere*: used to turn gauge readings (`barg`, `psig`) into absolute
  pressures.

**Common mistakes.** A basis that does not match the states (a basis of
"1 kg" with a vessel volume given in step 4); assumptions left implicit
("adiabatic" belongs here *and* as a constraint in step 6); switching the
sign convention after typing work values — joulebook keeps each work term's
direction when you switch it.
"""

    def compose_form(self) -> ComposeResult:
        h = self.worksheet.heading
        yield FieldRow("Title" + self.house_mark("worksheet.title"), h.title, id="title", placeholder="equipment and event, e.g. V-101 blow-down",
                       tooltip="One line naming the equipment and the event")
        yield FieldRow("Job" + self.house_mark("worksheet.job"), h.job, id="job", placeholder="job or calculation number",
                       tooltip="Job or calculation reference")
        yield FieldRow("Asked" + self.house_mark("worksheet.purpose"), h.purpose, id="purpose", placeholder="what the calculation must answer",
                       tooltip="What the calculation must answer")
        yield FieldRow("Basis" + self.house_mark("worksheet.basis"), h.basis, id="basis", placeholder="e.g. all gas in both vessels",
                       tooltip="What the balance is written for")
        yield Label("Assumptions, one per line" + self.house_mark("worksheet.assumptions"), classes="form-label")
        area = TextArea("\n".join(h.assumptions), id="assumptions", soft_wrap=True, tab_behavior="focus",
                        placeholder="e.g. rigid vessels")
        yield area
        yield Label("Sign convention for work", classes="form-label")
        yield ChoiceList([(k, CONVENTION_LABELS[k]) for k in CONVENTIONS], h.convention, id="convention")
        yield FieldRow("Atmosphere", h.atmosphere, kind="pressure", field_label="atmosphere", id="atmosphere",
                       tooltip="Atmospheric pressure for gauge readings (barg, psig)")
        yield ProblemLine(about="#title Input", id="heading-problem")

    def problem_targets(self) -> dict:
        return {("worksheet", None, "atmosphere"): self.query_one("#atmosphere", FieldRow),
                ("worksheet", None, ""): self.query_one("#heading-problem", ProblemLine)}

    def collect(self, ws: Worksheet) -> Worksheet:
        q = self.query_one
        assumptions = tuple(line.strip() for line in q("#assumptions", TextArea).text.splitlines() if line.strip())
        convention = q("#convention", ChoiceList).value
        if convention not in CONVENTIONS:
            convention = ws.heading.convention
        heading = replace(
            ws.heading,  # the procedure and the deviations are kept as they are
            title=q("#title", FieldRow).value,
            job=q("#job", FieldRow).value,
            purpose=q("#purpose", FieldRow).value,
            basis=q("#basis", FieldRow).value,
            assumptions=assumptions,
            convention=convention,
            atmosphere=q("#atmosphere", FieldRow).value,
        )
        work = ws.work
        if convention != ws.heading.convention:
            # the same physical work, written in the new convention
            work = tuple(w.__class__(w.name, w.kind, _flip(w.W)) for w in ws.work)
        return ws.with_(heading=heading, work=work)


def _flip(text: str) -> str:
    negative, magnitude = fields.split_sign(text)
    return fields.join_sign(not negative, magnitude)
