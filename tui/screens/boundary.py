"""Step 2: the system boundary — what is inside, and where heat crosses."""

from __future__ import annotations

from dataclasses import replace

from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.widgets import Label, Static, TextArea

from balance.kinds import RESERVED
from balance.worksheet import HeatTerm, System, Worksheet

from ..widgets.choice_list import ChoiceList
from ..widgets.field_row import FieldRow
from ..widgets.problem_line import ProblemLine
from .step import StepScreen

#: The kinds of balance a worksheet may be (balance.kinds), in words. Choosing one opens its
#: steps (tui/steps.py); what was typed for the other stays in the draft.
KINDS = [
    ("closed", "closed: no mass crosses the boundary"),
    ("steady-flow", "steady-flow: streams cross it at steady state"),
    ("transient", "transient: a vessel filled, vented or equalised in time"),
]
#: Device kinds that take heat at a boundary temperature (the others are adiabatic).
HEATED = ("heater", "cooler")


def heated_devices(ws: Worksheet) -> list[int]:
    """The devices that take heat (heaters and coolers), by index."""
    return [i for i, d in enumerate(ws.devices) if d.kind in HEATED]


def common_boundary_T(ws: Worksheet, default: str) -> tuple[str, bool]:
    """The boundary temperature shared by every heat term and heated device (or the default),
    and whether they differ."""
    temps = {h.T_boundary for h in ws.heat} | {ws.devices[i].values.get("T_boundary", "")
                                               for i in heated_devices(ws)}
    if not temps:
        return default, False
    if len(temps) == 1:
        return temps.pop(), False
    return "", True


def with_boundary_T(ws: Worksheet, typed: str) -> Worksheet:
    """Every heat term and heated device with the boundary temperature ``typed``."""
    devices = list(ws.devices)
    for i in heated_devices(ws):
        values = {k: v for k, v in devices[i].values.items() if k != "T_boundary"}
        devices[i] = replace(devices[i], values={**values, "T_boundary": typed} if typed else values)
    return ws.with_(heat=tuple(HeatTerm(h.name, h.Q, typed) for h in ws.heat), devices=tuple(devices))


def sketch_for(ws: Worksheet) -> str:
    """A starter sketch of the boundary drawn from the compartments and terms, or the devices
    and the streams in and out."""
    boxes = ([f"[ {s.name or 'initial'} ]" for s in ws.initial] or [f"[ {d.name} ]" for d in ws.devices]
             or ["[ fluid ]"])
    inside = " ── ".join(boxes)
    width = max(len(inside) + 4, 30)
    lines = ["┌" + "─" * (width - 2) + "┐", "│ " + inside.ljust(width - 4) + " │", "└" + "─" * (width - 2) + "┘"]
    arrows = [f"  ↓ Q '{h.name}'" for h in ws.heat] + [f"  ⇅ W '{w.name}' ({w.kind})" for w in ws.work]
    outlets = {o for d in ws.devices for o in d.outlets}
    inlets = {i for d in ws.devices for i in d.inlets}
    arrows += [f"  → in: {st.name}" for st in ws.streams if st.name in inlets and st.name not in outlets]
    arrows += [f"  ← out: {st.name}" for st in ws.streams if st.name in outlets and st.name not in inlets]
    return "\n".join(lines + arrows) + "\n  (the box is the boundary)"


class BoundaryScreen(StepScreen):
    STEP = "boundary"
    HELP = """\
## System boundary

**What it is for.** Drawing the boundary decides what the balance is
written for. Everything inside it is the *system*; heat and work are only
what crosses it.

- *Kind*: a closed system keeps its mass; a steady-flow boundary has streams
  crossing it through devices (valves, heaters, machines ...) at steady
  state (↑/↓ in the list, space or Enter chooses). The steps follow the
  kind: compartments, terms and constraints for a closed system; streams
  and devices for steady flow. What was typed for the other kind stays in
  the draft.
- *Inside*: say in words what the boundary encloses — which vessels, lines,
  the gas only or the steel as well.
- *Boundary temperature*: the temperature of the wall or reservoir where
  heat crosses. The entropy balance needs it (S_gen = ΔS − Σ Q/T_b). It is
  set for every heat term, or every heater and cooler (step 5 can set each
  one on its own).
- *Sketch*: a few lines of text showing the boundary. `ctrl+t` drafts one
  from the compartments and terms.

**Common mistakes.** Putting the steel inside the boundary but leaving its
heat capacity out; leaving a vessel that shares the gas outside the boundary
in a rupture or blow-down; using the *system* temperature as the boundary
temperature for heat from a hotter jacket (that hides the entropy generated).
"""

    BINDINGS = [
        Binding("ctrl+t", "draft_sketch", "Sketch", id="boundary.sketch",
                tooltip="Draft a text sketch of the boundary from the compartments and terms"),
    ]

    def compose_form(self) -> ComposeResult:
        ws = self.worksheet
        yield Label("Kind of system", classes="form-label")
        yield ChoiceList(KINDS, ws.system.kind, disabled_values=tuple(RESERVED), id="kind")
        yield ProblemLine(about="#kind", id="system-problem")
        yield FieldRow("Inside" + self.house_mark("system.inside"), ws.system.inside, id="inside", placeholder="what the boundary encloses",
                       tooltip="What the boundary encloses")
        default = self.app.session.extras.get("T_boundary", "")
        shared, differs = common_boundary_T(ws, default)
        yield FieldRow("Boundary T", shared, kind="temperature", field_label="boundary temperature",
                       positive=True, id="boundary-T",
                       tooltip="Temperature of the wall or reservoir where heat crosses")
        yield Static(self._boundary_note(ws, differs), id="boundary-note", classes="hint")
        yield Label("Sketch (ctrl+t drafts one)" + self.house_mark("system.sketch"), classes="form-label")
        yield TextArea(ws.system.sketch, id="sketch", soft_wrap=False, tab_behavior="focus",
                       placeholder="a few lines showing the boundary")

    def on_mount(self) -> None:
        super().on_mount()
        self._show_boundary_T(self.worksheet.system.kind)

    def _show_boundary_T(self, kind: str) -> None:
        """A transient's heat crosses at its gas's or its wall's temperature (step 4): no shared
        boundary temperature to set here."""
        for widget in (self.query_one("#boundary-T"), self.query_one("#boundary-note")):
            widget.display = kind != "transient"

    def on_choice_list_chosen(self, event) -> None:
        self._show_boundary_T(self.query_one("#kind", ChoiceList).value)
        super().on_choice_list_chosen(event)

    @staticmethod
    def _boundary_note(ws: Worksheet, differs: bool) -> str:
        if differs:
            return "they differ: typing here sets them all (or edit each in step 5)"
        n = len(ws.heat) + len(heated_devices(ws))
        if not n:
            return "no heat yet: what step 5 adds starts with this temperature"
        return f"applies to the {n} place(s) heat crosses in step 5"

    def problem_targets(self) -> dict:
        return {("system", None, ""): self.query_one("#system-problem", ProblemLine)}

    def collect(self, ws: Worksheet) -> Worksheet:
        q = self.query_one
        system = System(kind=q("#kind", ChoiceList).value, inside=q("#inside", FieldRow).value,
                        sketch=q("#sketch", TextArea).text)
        typed = q("#boundary-T", FieldRow).value
        default = self.app.session.extras.get("T_boundary", "")
        shared, differs = common_boundary_T(ws, default)
        if typed != shared and not (differs and typed == ""):
            self.app.set_extra("T_boundary", typed)
            ws = with_boundary_T(ws, typed)
            q("#boundary-note", Static).update(self._boundary_note(ws, False))
        return ws.with_(system=system)

    def action_draft_sketch(self) -> None:
        area = self.query_one("#sketch", TextArea)
        if area.text.strip():
            self.notify("the sketch is not empty: clear it first to draft a new one", severity="warning")
            return
        area.load_text(sketch_for(self.worksheet))
        area.focus()
        self.changed()

    def step_commands(self):
        yield SystemCommand("Draft a sketch", "A text sketch of the boundary (ctrl+t)", self.action_draft_sketch)
