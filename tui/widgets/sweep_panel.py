"""The results step's sweep tab: one input over a range, and a result drawn against it.

The engineer names a field by its path (the one messages use), its values (``FROM..TO`` with the
number of points, or a list), and Enter solves every case in a worker; the first of the kind's
main results that moves is drawn against the input (PgUp and PgDn step through the others). Nothing of a
sweep is recorded; ``joulebook sweep`` does the same from the command line, with a CSV.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.content import Content
from textual.widgets import Static
from textual_plotext import PlotextPlot

from .field_row import FieldRow


def _first_moving(sweep) -> int:
    """The first main result that differs between the cases (a given one stays put), else 0."""
    for k, column in enumerate(sweep.main):
        seen = {r.values.get(column) for r in sweep.rows if r.ok}
        if len(seen) > 1:
            return k
    return 0


class SweepPlot(PlotextPlot):
    DEFAULT_CSS = """
    SweepPlot { height: 1fr; min-height: 10; }
    """

    def draw(self, sweep, column: str) -> None:
        plt = self.plt
        plt.clear_data()
        plt.clear_figure()
        if sweep is None or not column:
            plt.title("give a field and its values, then Enter")
        else:
            from ..sweep_plot import lines, x_label

            drawn, labels = lines(sweep, column)
            for label, xs, ys in drawn:
                pts = [(x, y) for x, y in zip(xs, ys) if y is not None]
                if pts:
                    plt.plot([p[0] for p in pts], [p[1] for p in pts], marker="dot", label=label or None)
            if labels:
                plt.xticks(list(range(1, len(labels) + 1)), labels)
            plt.title(column)
            plt.xlabel(x_label(sweep))
        self.refresh()


class SweepPanel(Vertical):
    """Path, values and points; the status; the plot."""

    DEFAULT_CSS = """
    SweepPanel { height: 1fr; }
    SweepPanel Horizontal { height: auto; }
    SweepPanel #sweep-points { width: 20; margin-left: 1; }
    SweepPanel #sweep-status { height: auto; color: $text-muted; }
    """

    BINDINGS = [
        Binding("pageup", "result(-1)", "Result before", id="sweep.result.back",
                tooltip="Draw the main result before this one"),
        Binding("pagedown", "result(1)", "Next result", id="sweep.result.next",
                tooltip="Draw the next main result"),
    ]

    def __init__(self, path: str = "", id: str | None = None) -> None:
        super().__init__(id=id)
        self._path = path
        self._column = 0
        self.sweep = None

    def compose(self) -> ComposeResult:
        yield FieldRow("Vary", self._path, id="sweep-path", enter_moves_on=False,
                       placeholder="a field's path, e.g. initial.V-101.P or fluid.model",
                       tooltip="The field varied, by the path messages name it")
        with Horizontal():
            yield FieldRow("Over", "", id="sweep-values", enter_moves_on=False,
                           placeholder="e.g. 120 barg..180 barg, or a list A,B",
                           tooltip="FROM..TO in the unit as typed, or a list A,B,C; Enter solves the cases")
            yield FieldRow("Points", "9", id="sweep-points", label_width=7, enter_moves_on=False,
                           tooltip="Values of a FROM..TO range, its ends included")
        yield Static("Enter solves the cases (not recorded); PgUp and PgDn choose the result drawn", id="sweep-status",
                     markup=False)
        yield SweepPlot(id="sweep-plot")

    def on_mount(self) -> None:
        self.query_one(SweepPlot).draw(None, "")

    def on_input_submitted(self, event) -> None:
        event.stop()
        path = self.query_one("#sweep-path", FieldRow).value.strip()
        over = self.query_one("#sweep-values", FieldRow).value.strip()
        points_text = self.query_one("#sweep-points", FieldRow).value.strip()
        for row in ("#sweep-path", "#sweep-values", "#sweep-points"):
            self.query_one(row, FieldRow).set_problem("")
        try:
            points = int(points_text) if points_text else None
        except ValueError:
            self.query_one("#sweep-points", FieldRow).set_problem(f"a whole number of points; got {points_text!r}")
            return
        if not path or not over:
            self.query_one("#sweep-path" if not path else "#sweep-values", FieldRow).set_problem(
                "give the field's path" if not path else "give its values: FROM..TO, or a list A,B,C")
            return
        self.query_one("#sweep-status", Static).update(Content.styled("solving the cases…", "italic $text-accent"))
        self.app.start_sweep(f"{path}={over}", points)

    def show(self, swept) -> None:
        """Draw what the worker found (tui.background.Swept), or say why there is nothing."""
        status = self.query_one("#sweep-status", Static)
        if swept is None:
            return
        if swept.sweep is None:
            row = "#sweep-points" if swept.field == "--points" else (
                "#sweep-values" if swept.field.startswith("--vary ") else "#sweep-path")
            self.query_one(row, FieldRow).set_problem(swept.error)
            status.update(Content.styled("not swept: " + swept.error, "$text-error"))
            return
        self.sweep = swept.sweep
        self._column = _first_moving(swept.sweep)
        self._redraw()

    def _redraw(self) -> None:
        sweep = self.sweep
        main = sweep.main if sweep is not None else []
        column = main[self._column % len(main)] if main else ""
        failed = sweep.failed() if sweep is not None else 0
        words = f"{len(sweep.rows)} cases" + (f", {failed} not solved (the first: {next(r.message for r in sweep.rows if not r.ok)})"
                                               if failed else "") if sweep is not None else ""
        self.query_one("#sweep-status", Static).update(
            Content.assemble((words, "$text-warning" if failed else ""),
                             (f"; drawn: {column} (PgUp, PgDn: the others)" if column else "", "$text-muted")))
        self.query_one(SweepPlot).draw(sweep, column)

    def action_result(self, step: int) -> None:
        if self.sweep is not None and self.sweep.main:
            self._column = (self._column + step) % len(self.sweep.main)
            self._redraw()
