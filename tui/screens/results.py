"""Step 7: solve, and the results — states, balances, equations, diagrams."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.content import Content
from textual.widgets import Static, TabbedContent, TabPane

from ..widgets.process_diagram import ProcessDiagram
from .step import StepScreen


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
            with TabPane("P–v", id="tab-pv"):
                yield ProcessDiagram("Pv", id="pv")
            with TabPane("T–s", id="tab-ts"):
                yield ProcessDiagram("Ts", id="ts")

    def on_mount(self) -> None:
        super().on_mount()
        self.watch(self.app, "outcome", lambda _: self._show())
        self.watch(self.app, "units", lambda _: self._show())
        self.watch(self.app, "check", lambda _: self._maybe_solve())
        self.watch(self.app, "busy", lambda _: self._show())

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
            from ..render import result_renderable

            balance.update(result_renderable(outcome.result, app.units, with_headline=False))
            for diagram in self.query(ProcessDiagram):
                diagram.show_trace(outcome.trace, app.units)
        elif outcome is not None and outcome.error:
            balance.update(Content.styled(outcome.error, "$text-error"))
        else:
            balance.update("")

    def _summary(self, r, stale: bool) -> Content:
        from ..render import headline

        text = headline(r, self.app.units)
        head = ("changed since this solve (ctrl+r): ", "bold $text-warning") if stale else ("solved: ", "bold $text-success")
        return Content.assemble(head, text)
