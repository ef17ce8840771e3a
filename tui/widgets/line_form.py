"""One line of a transient worksheet as typed: where the gas comes from and goes to (a supply,
a vessel, the outside), the supply's state or the back pressure, and what restricts the flow
(an orifice and its discharge coefficient, a valve's Cv or Kv, a given rate, or nothing)."""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal
from textual.widgets import Button, Select

from balance.worksheet import LineInput

from .field_row import FieldRow
from .item_form import ItemForm
from .problem_line import ProblemLine
from .state_form import out_of_tab_order

SUPPLY, OUTSIDE = "supply", "outside"
#: What restricts the flow, and the fields each takes.
RESTRICTIONS = {
    "orifice": ("orifice", "Cd"),
    "Cv": ("Cv",),
    "Kv": ("Kv",),
    "rate": ("rate",),
    "none": (),
}
#: Each value's label, field kind, example and tooltip.
VALUES = {
    "orifice": ("orifice d", None, "e.g. 6 mm", "the orifice's diameter"),
    "Cd": ("Cd", None, "e.g. 0.62", "discharge coefficient: ~0.62 a sharp-edged orifice, ~0.97 a rounded nozzle"),
    "Cv": ("Cv", None, "e.g. 1.2", "the valve's Cv (US gal/min of water at 1 psi drop)"),
    "Kv": ("Kv", None, "e.g. 1.0", "the valve's Kv (m3/h of water at 1 bar drop)"),
    "rate": ("rate", None, "e.g. 0.1 kg/s", "a given constant mass rate"),
}


def restriction_of(line: LineInput) -> str:
    """The restriction a line is given (the first of orifice, Cv, Kv, rate), or 'none'."""
    return next((k for k in ("orifice", "Cv", "Kv", "rate") if line.values.get(k, "").strip()), "none")


class LineForm(ItemForm):
    """A line: from, to and the restriction are drop-down lists; the supply's state shows for a
    line from the supply, the back pressure for one to the outside."""

    def __init__(self, line: LineInput, index: int, vessels: tuple[str, ...], *,
                 p_atm: Callable[[], float] | None = None, id: str | None = None) -> None:
        super().__init__(id=id, classes="line")
        self.line = line
        self.index = index
        self.vessels = tuple(v for v in vessels if v.strip())
        self.p_atm = p_atm

    def on_mount(self) -> None:
        self.border_title = f"Line {self.index + 1}"
        self._show_taken()

    def compose(self) -> ComposeResult:
        ln = self.line
        with Horizontal(classes="item-form--top"):
            yield FieldRow("Name", ln.name, id="name", label_width=6, tooltip="The line's name, e.g. 'vent stack'")
            yield out_of_tab_order(Button("remove ^g", compact=True, id="remove",
                                          tooltip="Remove this line (ctrl+g)"))
        sources = [(SUPPLY, SUPPLY), *((v, v) for v in self.vessels)]
        targets = [*((v, v) for v in self.vessels), (OUTSIDE, OUTSIDE)]
        with Horizontal():
            yield Select(sources, value=ln.source if ln.source in dict(sources) else Select.NULL, prompt="from",
                         compact=True, id="from", tooltip="Where the gas comes from: the supply, or a vessel")
            yield Select(targets, value=ln.target if ln.target in dict(targets) else Select.NULL, prompt="to",
                         compact=True, id="to", tooltip="Where it goes: a vessel, or the outside")
            yield Select([(k, k) for k in RESTRICTIONS], value=restriction_of(ln), allow_blank=False, compact=True,
                         id="restriction", tooltip="What restricts the flow: an orifice, a valve's Cv or Kv, a "
                                                   "given rate, or none (the end state only)")
        with Grid():
            yield FieldRow("supply T", ln.props.get("T", ""), kind="T", field_label=f"supply T ('{ln.name}')",
                           id="supply-T", label_width=10, placeholder="e.g. 18 degC", tooltip="the supply's temperature")
            yield FieldRow("supply P", ln.props.get("P", ""), kind="P", field_label=f"supply P ('{ln.name}')",
                           id="supply-P", label_width=10, placeholder="e.g. 12 barg", p_atm=self.p_atm,
                           tooltip="the supply's pressure (it holds throughout)")
            yield FieldRow("back P", ln.values.get("back", ""), id="back", label_width=10,
                           placeholder="atmosphere", tooltip="the pressure outside: atmosphere, or 0.5 barg (a flare "
                                                             "header)")
            for key, (label, kind, example, tip) in VALUES.items():
                yield FieldRow(label, ln.values.get(key, ""), kind=kind, id=f"value-{key}", label_width=10,
                               placeholder=example, tooltip=tip)
        yield ProblemLine(about="#name Input", classes="line-form--problem")

    def _show_taken(self) -> None:
        taken = RESTRICTIONS.get(self.choice("restriction", restriction_of(self.line), "none"), ())
        for key in VALUES:
            self.query_one(f"#value-{key}", FieldRow).set_class(key not in taken, "-not-taken")
        supply = self.choice("from", self.line.source, "") == SUPPLY
        for key in ("supply-T", "supply-P"):
            self.query_one(f"#{key}", FieldRow).set_class(not supply, "-not-taken")
        outside = self.choice("to", self.line.target, "") == OUTSIDE
        self.query_one("#back", FieldRow).set_class(not outside, "-not-taken")

    def on_select_changed(self, event: Select.Changed) -> None:
        if event.select.id in ("from", "to", "restriction"):
            self._show_taken()  # the event bubbles on: the screen collects the worksheet

    def problem_targets(self) -> dict:
        i = self.index
        line = self.query_one(ProblemLine)
        out = {("line", i, key): self.query_one(f"#value-{key}", FieldRow) for key in VALUES}
        out.update({("line", i, "T"): self.query_one("#supply-T", FieldRow),
                    ("line", i, "P"): self.query_one("#supply-P", FieldRow),
                    ("line", i, "back"): self.query_one("#back", FieldRow),
                    ("line", i, "name"): self.query_one("#name", FieldRow),
                    ("line", i, "from"): line, ("line", i, "to"): line, ("line", i, ""): line})
        return out

    def collect(self) -> LineInput:
        source, target = self.choice("from", self.line.source, ""), self.choice("to", self.line.target, "")
        props = {}
        if source == SUPPLY:
            for key in ("T", "P"):
                text = self.query_one(f"#supply-{key}", FieldRow).value
                if text.strip():
                    props[key] = text
        values = {}
        if target == OUTSIDE:
            back = self.query_one("#back", FieldRow).value
            if back.strip():
                values["back"] = back
        for key in RESTRICTIONS.get(self.choice("restriction", "none"), ()):
            text = self.query_one(f"#value-{key}", FieldRow).value
            if text.strip():
                values[key] = text
        return LineInput(name=self.query_one("#name", FieldRow).value, source=source, target=target, props=props,
                         values=values)


__all__ = ["LineForm", "restriction_of"]
