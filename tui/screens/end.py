"""Step 6 of a transient worksheet: what ends it, and the integrator's settings."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Label, Select

from balance.worksheet import EndInput, Worksheet

from .. import fields
from ..widgets.field_row import FieldRow
from ..widgets.problem_line import ProblemLine
from .step import StepScreen

#: What may end a transient, in words.
ENDS = (("a pressure P in the vessel", "P"), ("a mass m in the vessel", "m"), ("a time t", "t"),
        ("balanced: the flow stops", "balanced"))
#: The integrator's settings: (key, label, example, tooltip).
SETTINGS = (
    ("method", "method", "LSODA", "scipy's solve_ivp method: LSODA (default), RK45, DOP853, Radau, BDF"),
    ("rtol", "rtol", "1e-8", "the relative tolerance (default 1e-8); halving it moves the coldest T < 0.01 K"),
    ("points", "rows", "500", "rows of the history kept (default 500; the record keeps 41 of them)"),
    ("t_max", "t max", "24 h", "the longest time integrated (default 24 h)"),
)


class EndScreen(StepScreen):
    STEP = "end"
    AUTO_FOCUS = "#end-value Input"  # balanced (no value): the end's list, on mount
    DEFAULT_CSS = """
    EndScreen .end-row { height: auto; }
    EndScreen .end-row Select { width: 1fr; }
    """
    HELP = """\
## End condition and integrator

**What it is for.** What ends the transient, and how finely its history is
integrated.

- *End*: a pressure in the vessel (`1 barg`: a blowdown's end, a fill's
  target), a mass (`12 kg`), a time (`15 min`: needs every line restricted),
  or *balanced*: until the flow stops (the pressures across the line within
  1e-4 of each other; a fill from a supply ends at the supply's pressure).
- *Vessel*: the one the end watches (blank: the first).
- *Integrator*: scipy's solve_ivp; the defaults suit most cases. The record
  keeps the settings with the result.

**Common mistakes.** An end pressure below the back pressure (it is never
reached: joulebook says so); a time on a line without a restriction.
"""

    def compose_form(self) -> ComposeResult:
        ws = self.worksheet
        e = ws.end
        kind = "balanced" if e.balanced else next((k for k in ("P", "m", "t") if e.values.get(k, "").strip()), "P")
        value = e.values.get(kind, "") if kind != "balanced" else ""
        names = [v.name for v in ws.vessels if v.name.strip()]
        yield Label("What ends it (Enter opens the list)", classes="form-label")
        with Horizontal(classes="end-row"):
            yield Select(ENDS, value=kind, allow_blank=False, compact=True, id="end-kind",
                         tooltip="A pressure, a mass, a time, or until the flow stops")
            yield Select([(n, n) for n in names], value=e.vessel if e.vessel in names else Select.NULL,
                         prompt="vessel (the first)", compact=True, id="end-vessel",
                         tooltip="The vessel the end condition watches")
        yield FieldRow("value", value, id="end-value", label_width=10, placeholder="e.g. 1 barg, 12 kg, 15 min",
                       p_atm=self._p_atm, tooltip="the end pressure, mass or time")
        yield ProblemLine(about="#end-value Input", id="end-problem")
        yield Label("Integrator (blank: the default)", classes="form-label")
        for key, label, example, tip in SETTINGS:
            yield FieldRow(label, ws.history.get(key, ""), id=f"history-{key}", label_width=10,
                           placeholder=example, tooltip=tip)
        yield ProblemLine(about="#history-rtol Input", id="history-problem")

    def _p_atm(self) -> float:
        return fields.atmosphere(self.worksheet.heading.atmosphere)

    def on_mount(self) -> None:
        super().on_mount()
        self._show_value()
        if self._kind() == "balanced":
            self.query_one("#end-kind", Select).focus()

    def _kind(self) -> str:
        value = self.query_one("#end-kind", Select).value
        return value if isinstance(value, str) else "P"

    def _show_value(self) -> None:
        self.query_one("#end-value", FieldRow).display = self._kind() != "balanced"

    def on_select_changed(self, event) -> None:
        if event.select.id == "end-kind":
            self._show_value()
        super().on_select_changed(event)

    def problem_targets(self) -> dict:
        q = self.query_one
        value = q("#end-value", FieldRow)
        out = {("end", None, ""): q("#end-problem", ProblemLine), ("end", None, "vessel"): q("#end-problem", ProblemLine),
               ("history", None, ""): q("#history-problem", ProblemLine)}
        for key in ("P", "m", "t", "balanced"):
            out[("end", None, key)] = value if key != "balanced" else q("#end-problem", ProblemLine)
        for key, *_ in SETTINGS:
            out[("history", None, key)] = q(f"#history-{key}", FieldRow)
        return out

    def collect(self, ws: Worksheet) -> Worksheet:
        q = self.query_one
        kind = self._kind()
        vessel = q("#end-vessel", Select).value
        text = q("#end-value", FieldRow).value
        end = EndInput(values={kind: text} if kind != "balanced" and text.strip() else {},
                       balanced=kind == "balanced", vessel=vessel if isinstance(vessel, str) else "")
        history = {key: q(f"#history-{key}", FieldRow).value for key, *_ in SETTINGS
                   if q(f"#history-{key}", FieldRow).value.strip()}
        return ws.with_(end=end, history=history)


__all__ = ["EndScreen"]
