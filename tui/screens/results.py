"""Solve, and the results — states or streams, balances, equations, diagrams.

What a result looks like is its kind's (one lookup, :data:`SHOWN`): a closed
system's states, terms and P–v and T–s diagrams; a steady-flow network's
streams and devices and its T–s, h–s and P–h diagrams. Each kind's diagram
tabs (:data:`DIAGRAM_TABS`; their planes are :data:`tui.analysis.DRAWN`) are
shown for a result of that kind, the others' hidden.
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import import_module

from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.content import Content
from textual.widgets import Static, TabbedContent, TabPane

from ..analysis import planes
from ..widgets.flow_diagram import FlowDiagram
from ..widgets.history_plot import HistoryPlot
from ..widgets.process_diagram import ProcessDiagram
from ..widgets.sweep_panel import SweepPanel
from .step import StepScreen


@dataclass(frozen=True)
class Shown:
    """How the results step shows one kind's result."""

    module: str
    """the rich renderings' module"""
    renderable: str
    """``(result, units, with_headline=False) -> Group``: the tables, equations, cautions"""
    headline: str
    """``(result, units) -> str``: the result in one line, above the tabs"""

    def render(self, name: str):
        return getattr(import_module(self.module), getattr(self, name))


#: Each kind's result, as the results step shows it (a kind not listed: as a closed one).
SHOWN = {
    "closed": Shown("tui.render", "result_renderable", "headline"),
    "steady-flow": Shown("tui.render_flow", "flow_result_renderable", "flow_headline"),
    "transient": Shown("tui.render_transient", "transient_result_renderable", "transient_headline"),
}

#: Each kind's diagram tabs: (pane id, tab label, the widget's class and what it draws).
DIAGRAM_TABS = {
    "closed": (("tab-pv", "P–v", ProcessDiagram, "Pv"), ("tab-ts", "T–s", ProcessDiagram, "Ts")),
    "steady-flow": (("tab-flow-ts", "T–s", FlowDiagram, "T-s"), ("tab-flow-hs", "h–s", FlowDiagram, "h-s"),
                    ("tab-flow-ph", "P–h", FlowDiagram, "P-h")),
    "transient": (("tab-hist-T", "T–t", HistoryPlot, "T-t"), ("tab-hist-P", "P–t", HistoryPlot, "P-t")),
}


def shown_for(result) -> Shown:
    return SHOWN.get(result.problem.worksheet.system.kind, SHOWN["closed"])


class ResultsScreen(StepScreen):
    STEP = "results"
    SCROLL = False
    AUTO_FOCUS = "#balance-scroll"
    HELP = """\
## Solve and results

**What it is for.** Solving the balance and reading it the way a checker
will: the states, each energy term, the entropy balance with the entropy
generated, ΔU split into its ideal-gas and departure parts, and every
equation with its numbers.

- `ctrl+r` solves (it is greyed while the degrees of freedom do not match).
  Opening this step solves by itself when the worksheet is ready. Each solve
  is written to the record.
- The tabs show the balance, a P–v and a T–s diagram (←/→ on the tab bar).
  Quasi-static paths are drawn through the model; a rupture or a free
  expansion has none, so its end states are joined by a dotted line.
- A steady-flow worksheet shows its streams (state, rates, speed) and its
  devices (heat, power, efficiency, entropy generated, exergy destroyed,
  each one's balances recomputed), and T–s, h–s and P–h diagrams (P on a
  log scale): each device's path in its own colour with its name beside it,
  a valve's isenthalpic line and a heater's or cooler's isobar solid, a
  machine's isentropic line from its inlet dotted and its inlet joined to
  its actual outlet dashed (the path between is not known), each stream's
  state marked and named, the saturation dome grey where it is in view.
- A transient shows its end state without time and its history: the coldest
  and hottest gas and wall and when, the time to the end, the mass moved,
  the energy closure; its T–t and P–t tabs draw the gas's (and the wall's)
  temperature and the pressure against time.
- The Sweep tab solves the worksheet over a range of one input: give the
  field's path (`initial.V-101.P`, `stream.feed.T`, `fluid.model`), its
  values (`120 barg..180 barg` with the points, or a list `ideal-gas,
  peng-robinson`) and Enter; the first main result that moves is drawn
  against it, PgUp and PgDn draw the others. Not recorded (`joulebook
  sweep` gives a CSV).
- `f2` switches the display units (SI, metric, US).
- `f4` solves the worksheet on another model as well (the reference model
  in its own process) and shows the two side by side, with the difference;
  the comparison is not recorded.

**Common mistakes.** Reading a negative S_gen as a result (joulebook refuses
it: look at heat directions and boundary temperatures); ignoring the
warnings (a state outside the model's range); taking a result that bears
on pressure equipment without the cautions.
"""

    def compose_form(self) -> ComposeResult:
        yield Static("", id="outcome")
        with TabbedContent(id="tabs"):
            with TabPane("Balance", id="tab-balance"):
                with VerticalScroll(id="balance-scroll", can_focus=True):
                    yield Static("", id="balance")
            for tabs in DIAGRAM_TABS.values():
                for pane, label, widget, plane in tabs:
                    with TabPane(label, id=pane):
                        yield widget(plane, id=pane.removeprefix("tab-"))
            with TabPane("Sweep", id="tab-sweep"):  # every kind: one input over a range
                from ..analysis import sweep_default

                yield SweepPanel(sweep_default(self.worksheet), id="sweep")

    def on_mount(self) -> None:
        super().on_mount()
        self.watch(self.app, "outcome", lambda _: self._show())
        self.watch(self.app, "units", lambda _: self._show())
        self.watch(self.app, "check", lambda _: self._maybe_solve())
        self.watch(self.app, "busy", lambda _: self._show())
        self.watch(self.app, "swept", lambda swept: self.query_one(SweepPanel).show(swept))

    def _maybe_solve(self) -> None:
        app = self.app
        check = app.check
        if check is None or not check.ready or check.worksheet != app.session.worksheet:
            self._show()
            return
        if app.outcome is None or app.outcome.worksheet != app.session.worksheet:
            if not app.solving:
                app.start_solve()
        self._show()

    def _show(self) -> None:
        app = self.app
        outcome = app.outcome
        status = self.query_one("#outcome", Static)
        balance = self.query_one("#balance", Static)
        current = outcome is not None and outcome.worksheet == app.session.worksheet
        if app.solving:
            status.update(Content.styled("solving…", "italic $text-accent"))
        elif outcome is None:
            check = app.check
            msg = check.message if check is not None else "counting the degrees of freedom…"
            status.update(Content.assemble(("not solved yet: ", "bold"), msg))
        elif outcome.error:
            status.update(Content.assemble(("not solved: ", "bold $text-error"), outcome.error))
        else:
            status.update(self._summary(outcome.result, stale=not current))
        if outcome is not None and outcome.result is not None:
            how = shown_for(outcome.result)
            shown = how.render("renderable")(outcome.result, app.units, with_headline=False)
            if outcome.house and app.session.procedure is not None:
                from rich.console import Group

                from ..panels import house_panel

                shown = Group(house_panel(outcome.house, app.session.procedure), shown)
            if outcome.uncertainty is not None:
                from rich.console import Group

                from ..render_uncertainty import uncertainty_renderable

                shown = Group(shown, uncertainty_renderable(outcome.uncertainty, compact=True))
            balance.update(shown)
            kind = outcome.result.problem.worksheet.system.kind
            self._show_diagram_tabs(kind if planes(outcome.result) else None)
            for pane, *_ in DIAGRAM_TABS.get(kind, ()):
                self.query_one(f"#{pane.removeprefix('tab-')}").show_trace(outcome.trace, app.units)
        else:
            balance.update(Content.styled(outcome.error, "$text-error") if outcome is not None and outcome.error
                           else "")
            self._show_diagram_tabs(app.session.worksheet.system.kind)

    def _show_diagram_tabs(self, kind: str | None) -> None:
        """The diagram tabs of one kind (:data:`DIAGRAM_TABS`), the others hidden (←/→ pass
        them by); none for a result the app draws no diagram of (``kind`` None)."""
        if getattr(self, "_diagram_kind", "") == kind:
            return
        self._diagram_kind = kind
        tabs = self.query_one("#tabs", TabbedContent)
        for of_kind, panes in DIAGRAM_TABS.items():
            for pane, *_ in panes:
                (tabs.show_tab if of_kind == kind else tabs.hide_tab)(pane)

    def _summary(self, r, stale: bool) -> Content:
        text = shown_for(r).render("headline")(r, self.app.units)
        head = ("changed since this solve (ctrl+r): ", "bold $text-warning") if stale else ("solved: ", "bold $text-success")
        return Content.assemble(head, text)
