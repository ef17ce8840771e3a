"""The worksheet on two models side by side: its own and another one (e.g. Peng–Robinson
against the reference equation of state, solved in its own process).

Nothing here is recorded: the record holds the worksheet on its own model. The
numbers are the domain's (:func:`tui.analysis.compared`); this screen only lays
them out in the display units.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Static

from ..widgets.choice_list import ChoiceList
from .fluid import MODELS, _canonical

LABELS = dict(MODELS)


def model_words(model: str) -> str:
    """A model's name as the fluid step lists it (before its dash)."""
    return LABELS.get(_canonical(model), model).split(" — ")[0]


class CompareScreen(ModalScreen[None]):
    """↑/↓ and Enter pick the second model; the table shows both and their difference."""

    DEFAULT_CSS = """
    CompareScreen { align: center middle; }
    CompareScreen > Vertical {
        width: 80; max-width: 100%; height: 100%; max-height: 24;
        border: round $accent; background: $surface; padding: 0 1;
    }
    CompareScreen ChoiceList { margin-bottom: 1; }
    CompareScreen VerticalScroll { height: 1fr; }
    CompareScreen .compare--foot { color: $text-muted; height: 1; }
    """

    BINDINGS = [Binding("escape,f4", "close", "Close", id="compare.close", tooltip="Back to the worksheet")]

    def __init__(self, model: str, disabled: tuple[str, ...] = ()) -> None:
        super().__init__()
        self.model = _canonical(model) or model
        self.disabled = disabled

    def compose(self) -> ComposeResult:
        others = [(m, label) for m, label in MODELS if m != self.model]
        with Vertical() as box:
            box.border_title = f"Compare: {model_words(self.model)} against …"
            yield ChoiceList(others, "", disabled_values=self.disabled, id="other")
            with VerticalScroll(id="compare-scroll"):
                yield Static("", id="table")
            yield Static("↑/↓ and enter: the model to compare with · not recorded · esc closes",
                         classes="compare--foot")

    def on_mount(self) -> None:
        self.query_one("#other", ChoiceList).focus()
        self.watch(self.app, "comparison", self._show)
        self.watch(self.app, "busy", lambda _: self._show(self.app.comparison))

    def on_choice_list_chosen(self, event: ChoiceList.Chosen) -> None:
        event.stop()
        self.app.start_compare(event.value)

    def _show(self, comparison) -> None:
        table = self.query_one("#table", Static)
        if "compare" in self.app._busy_tasks:
            table.update(Content.styled(f"solving … ({self.app.busy})", "italic $text-accent"))
            return
        if comparison is None or comparison.worksheet != self.app.session.worksheet:
            table.update(Content.styled("choose the model to compare with", "$text-muted"))
            return
        table.update(self.table(comparison, self.app.units))

    @staticmethod
    def table(comparison, units: str) -> Content:
        """Both models' values, their difference and the difference relative to the first."""
        from ..display import show, temperature_step, unit_label

        a_name, b_name = (model_words(m) for m in comparison.models)
        lines: list = [("A: ", "bold"), f"{a_name}   ", ("B: ", "bold"), f"{b_name}\n",
                       (f"{'':<12}{'':<9}{'A':>15} {'B':>15}  B − A\n", "bold")]
        for label, kind, a, b in comparison.rows:
            unit = unit_label(kind, units)
            diff = rel = ""
            if a is not None and b is not None:
                if kind == "T":  # a difference of temperatures: kelvin (°F degrees in US units)
                    diff = temperature_step(b - a, units)
                else:
                    diff = show(b - a, kind, units, 4)
                rel = f" ({(b - a) / abs(a):+.1%})" if a else ""
            lines.append(f"{label[:11]:<12}{unit[:8]:<9}{show(a, kind, units, 6):>15} "
                         f"{show(b, kind, units, 6):>15}  {diff}{rel}\n")
        for name, attempt in zip((a_name, b_name), comparison.attempts):
            if attempt.result is None:
                lines.append((f"\n{name}: not solved: {attempt.message}\n", "$text-error"))
            else:
                for w in attempt.result.warnings:
                    lines.append((f"\n{name}: ! {w}", "$text-warning"))
        return Content.assemble(*lines)

    def action_close(self) -> None:
        self.dismiss(None)
