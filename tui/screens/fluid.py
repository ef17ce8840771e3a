"""Step 3: the fluid and its property model, with a live adequacy hint."""

from __future__ import annotations

from dataclasses import replace

from textual.app import ComposeResult
from textual.content import Content
from textual.widgets import Label, Static

from balance.worksheet import Worksheet

from ..analysis import sig
from ..widgets.choice_list import ChoiceList
from ..widgets.field_row import FieldRow
from ..widgets.problem_line import ProblemLine
from ..widgets.species_picker import SpeciesPicker
from .step import StepScreen

MODELS = [
    ("ideal-gas", "ideal gas — low pressure, or far above Tc"),
    ("van-der-waals", "van der Waals — rough bounds"),
    ("redlich-kwong", "Redlich–Kwong — gases, moderate P"),
    ("soave-redlich-kwong", "Soave–Redlich–Kwong — gases, supercritical"),
    ("peng-robinson", "Peng–Robinson — gases, supercritical"),
    ("incompressible", "incompressible — liquids and solids"),
    ("reference", "reference EOS (CoolProp) — wet states, any phase"),
]


class FluidScreen(StepScreen):
    STEP = "fluid"
    HELP = """\
## Fluid and property model

**What it is for.** Every number in the balance comes from the property
model, so choose it for the states you have, not by habit.

- *Species*: type an id, formula, name or alias (`N2`, `nitrogen`,
  `methane`); ↓ moves into the matches, Enter picks.
- *Model*: ↑/↓ and Enter. The reference model is greyed for species without
  a reference equation of state.
- *Overrides*: constants that replace the species data, `NAME = VALUE`
  separated by `;` — `M`, `Tc`, `Pc`, `omega`; a constant `cp` or `cv`
  (molar or specific) in place of the ideal-gas polynomial; the cubic's
  `a` and `b`; the liquid's `rho`. They travel with the record; a wrong
  name or unit shows on the degrees-of-freedom line, naming the override.
- *Mixture*: a gas mixture's mole fractions, `SPECIES = FRACTION`
  separated by `;` (`CH4 = 0.9; C2H6 = 0.1`; start with `mass:` for mass
  fractions); the species field is then the mixture's name. A bundled
  composition (`hpp-natural-gas`, `dry-air`) is picked as a species. Every
  model but the incompressible one takes a mixture: the cubics by the van
  der Waals one-fluid rule with the bundled kij, the reference model where
  CoolProp has the pairs. A cubic tests each state for a split into two
  phases and refuses one with the dew and bubble points.
- *kij*: a cubic mixture's binary interaction parameters, `A-B = VALUE`
  separated by `;`, in place of the bundled ones (`joulebook species
  --kij` lists them with their sources); a pair in neither is 0, warned.
- *Adequacy*: once step 4 has two properties of a state, the hint shows the
  reduced temperature and pressure, the compressibility Z and the phase at
  each state, with a recommendation. For an ideal gas it also shows Z from
  Peng–Robinson, as a yardstick.

**Common mistakes.** An ideal gas at high reduced pressure (Z far from 1:
a rupture or a fill from a high-pressure cylinder); a cubic equation for a
wet state (it refuses it: use the reference model); a gas model for a
liquid (use the incompressible or the reference model).
"""

    def compose_form(self) -> ComposeResult:
        f = self.worksheet.fluid
        yield SpeciesPicker(f.species, id="picker", mixture=f.composition)
        yield Label("Property model", classes="form-label fluid--model-label")
        yield ChoiceList(MODELS, _canonical(f.model), disabled_values=self._disabled(f.species, f.composition),
                         id="model")
        yield ProblemLine(about="#model", id="model-problem")
        yield Static("", id="house-model", markup=False)
        # the hint straight under the model it judges: on screen at 80x24 without scrolling
        yield Label("Adequacy at the states given so far", classes="form-label")
        yield Static("", id="advice", markup=False)
        yield FieldRow("Overrides", overrides_text(f.overrides), id="overrides",
                       placeholder="none; e.g. Tc = 126.2 K; omega = 0.04",
                       tooltip="Constants that replace the data's, NAME = VALUE; separated by ;")
        yield FieldRow("Mixture", composition_text(f.composition, f.fractions), id="composition",
                       placeholder="none (one species); e.g. CH4 = 0.9; C2H6 = 0.1",
                       tooltip="A mixture's mole fractions, SPECIES = FRACTION separated by ; (start with "
                               "'mass:' for mass fractions); the species field is then its name")
        yield FieldRow("kij", overrides_text(f.kij), id="kij",
                       placeholder="bundled (joulebook species --kij); e.g. CH4-CO2 = 0.1",
                       tooltip="A cubic mixture's binary interaction parameters, A-B = VALUE separated by ;, "
                               "in place of the bundled ones")

    def on_mount(self) -> None:
        super().on_mount()
        self.watch(self.app, "advice", self._show_advice)
        self.watch(self.app, "worksheet", lambda _: self._show_house_rule())
        self.app.start_advice()

    def _show_house_rule(self) -> None:
        """The house rule a model outside its allowed ones breaks, in the rule's own words."""
        found = [f for f in self.app.session.findings() if f.kind == "model" and f.outcome in ("stop", "warn")]
        box = self.query_one("#house-model", Static)
        box.display = bool(found)
        box.update(Content.assemble(*[(f"{'✗' if f.blocks else '!'} house rule {f.rule}: {f.message}\n",
                                       "bold $text-error" if f.blocks else "$text-warning") for f in found]))

    @staticmethod
    def _disabled(species: str, composition: dict | None = None) -> tuple[str, ...]:
        """The models the fluid cannot take: a mixture no incompressible model; a species with no
        reference equation no reference model (a mixture's is judged when it is built)."""
        from balance.errors import InputError
        from balance.mixture import bundled_mixture
        from balance.species import lookup

        if composition:
            return ("incompressible",)
        try:
            sp = bundled_mixture(species) or lookup(species, "species")
        except InputError:
            return ()
        if sp.composition:
            return ("incompressible",)
        return () if sp.coolprop else ("reference",)

    def problem_targets(self) -> dict:
        q = self.query_one
        return {("fluid", None, "species"): q(SpeciesPicker), ("fluid", None, ""): q("#model-problem", ProblemLine),
                ("fluid", None, "overrides"): q("#overrides", FieldRow),
                ("fluid", None, "composition"): q("#composition", FieldRow),
                ("fluid", None, "fractions"): q("#composition", FieldRow), ("fluid", None, "kij"): q("#kij", FieldRow)}

    def collect(self, ws: Worksheet) -> Worksheet:
        species = self.query_one(SpeciesPicker).value
        fractions, composition = parse_composition(self.query_one("#composition", FieldRow).value, ws.fluid.fractions)
        self.query_one(SpeciesPicker).set_mixture(composition)
        model = self.query_one("#model", ChoiceList)
        model.set_disabled(self._disabled(species, composition))
        # keep the model's text as typed (an alias such as 'pr') unless another model was chosen
        value = ws.fluid.model if _canonical(ws.fluid.model) == model.value else model.value
        overrides = parse_overrides(self.query_one("#overrides", FieldRow).value)
        kij = parse_overrides(self.query_one("#kij", FieldRow).value)
        return ws.with_(fluid=replace(ws.fluid, species=species, model=value, overrides=overrides,
                                      composition=composition, fractions=fractions, kij=kij))

    def on_species_picker_picked(self, event: SpeciesPicker.Picked) -> None:
        self.changed()
        self.query_one("#model", ChoiceList).focus()

    def _show_advice(self, advice) -> None:
        box = self.query_one("#advice", Static)
        if advice is None:
            box.update(Content.styled("checking…", "$text-muted"))
            return
        parts: list = []
        units = self.app.units
        from ..display import show, unit_label

        for h in advice.states:
            zr = f", Z(PR) = {sig(h.Z_real, 4)}" if h.Z_real is not None else ""
            parts.append((f"{h.name}: T = {show(h.T, 'T', units, 5)} {unit_label('T', units)}, "
                          f"P = {show(h.P, 'P', units, 5)} {unit_label('P', units)}\n", ""))
            parts.append((f"   Tr = {sig(h.Tr, 3)}, Pr = {sig(h.Pr, 3)}, Z = {sig(h.Z, 4)}{zr}, {h.phase}\n",
                          "$text-muted"))
            for note in h.notes:
                parts.append((f"   • {note}\n", "$text-warning"))
        for p in advice.problems:
            parts.append((f"• {p}\n", "$text-warning"))
        if advice.recommendation:
            if not advice.states:  # nothing judged yet: what to give, not a verdict
                mark, style = ("· ", "$text-muted")
            else:
                mark, style = ("✓ ", "$text-success") if advice.adequate else ("! ", "bold $text-warning")
            parts.append((mark + advice.recommendation, style))
        box.update(Content.assemble(*parts))


def overrides_text(overrides: dict[str, str]) -> str:
    """The worksheet's overrides as one line: ``Tc = 126.2 K; omega = 0.04``."""
    return "; ".join(f"{k} = {v}" if v else k for k, v in overrides.items())


def composition_text(composition: dict[str, str], fractions: str = "") -> str:
    """A mixture's fractions as one line, ``CH4 = 0.9; C2H6 = 0.1`` (``mass: ...`` for mass fractions)."""
    text = overrides_text(composition)
    return f"mass: {text}" if text and fractions.strip() == "mass" else text


def parse_composition(text: str, fractions: str = "") -> tuple[str, dict[str, str]]:
    """(fractions, composition) from :func:`composition_text`'s line; the basis of a line without
    'mass:' is mole (kept blank where it was, so a worksheet read and saved is unchanged)."""
    head, colon, rest = text.partition(":")
    if colon and head.strip().lower() in ("mass", "mole"):
        return head.strip().lower(), parse_overrides(rest)
    return (fractions if fractions.strip() == "mole" else ""), parse_overrides(text)


def parse_overrides(text: str) -> dict[str, str]:
    """``NAME = VALUE`` pairs separated by ``;``, each kept as typed.

    A piece without ``=`` is kept whole as a name with no value, so the
    check names it (and nothing typed is dropped).
    """
    out: dict[str, str] = {}
    for piece in text.split(";"):
        name, _, value = piece.partition("=")
        if name.strip() or value.strip():
            out[name.strip()] = value.strip()
    return out


def _canonical(name: str) -> str:
    from balance.errors import InputError
    from balance.models import canonical

    try:
        return canonical(name) if name.strip() else ""
    except InputError:
        return ""
