"""Species picker: type to search by id, formula, name or alias; Enter picks."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.message import Message
from textual.widget import Widget
from textual.widgets import Input, OptionList, Static
from textual.widgets.option_list import Option

from .field_row import FieldRow

MAX_SHOWN = 40


def _norm(text: str) -> str:
    return "".join(ch for ch in text.lower() if ch.isalnum())


def matches(query: str):
    """Species whose id, formula, name, CAS number or an alias contains the query."""
    from balance.species import catalogue

    q = _norm(query)
    out = []
    for sp in catalogue().values():
        names = (sp.id, sp.formula, sp.name, sp.cas, *(sp.aliases or ()))
        keys = [_norm(n) for n in names if n]
        if not q or any(q in k for k in keys):
            exact = any(q == k for k in keys)
            out.append((0 if exact else 1, sp))
    from types import SimpleNamespace

    from balance.mixture import bundled

    for key, entry in bundled().items():  # the bundled compositions, named as a species is
        keys = [_norm(key), _norm(entry["name"])]
        if not q or any(q in k for k in keys):
            # its own id typed whole comes first: a species may have the same words as an alias ('dry air')
            out.append((-1 if q == keys[0] else 1, SimpleNamespace(id=key, name=entry["name"])))
    out.sort(key=lambda t: t[0])
    return [sp for _, sp in out]


class SpeciesPicker(Widget):
    """The species field with its search results and what the text resolves to."""

    DEFAULT_CSS = """
    SpeciesPicker {
        height: auto;
        & OptionList { height: auto; max-height: 6; border: none; padding: 0; margin-left: 12;
                       background: $boost; }
        & OptionList:focus { background: $primary 15%; }
        & .species-picker--found { padding-left: 12; color: $text-muted; height: auto; }
    }
    """

    BINDINGS = [
        Binding("down", "to_results", "Results", show=False, id="species.results",
                tooltip="Move into the list of matching species"),
    ]

    class Picked(Message):
        def __init__(self, text: str) -> None:
            super().__init__()
            self.text = text

    def __init__(self, value: str = "", id: str | None = None, mixture=()) -> None:
        super().__init__(id=id)
        self._initial = value
        self._mixture: tuple[str, ...] = tuple(mixture)

    def set_mixture(self, components) -> None:
        """The components of a mixture typed below, whose name the field then holds (not a species)."""
        components = tuple(components)
        if components != self._mixture:
            self._mixture = components
            self._fill(self.value)

    def compose(self) -> ComposeResult:
        yield FieldRow("Species", self._initial, id="species", enter_moves_on=False,
                       placeholder="type to search: N2, nitrogen, methane ...",
                       tooltip="Species id, formula, name or alias; Enter picks the first match")
        yield OptionList(id="species-results")
        yield Static("", classes="species-picker--found", markup=False)

    def on_mount(self) -> None:
        self._fill(self._initial)

    # -- what the check found at the species (see StepScreen.problem_targets) -------------
    def set_problem(self, text: str) -> None:
        """The note under the field already says what the lookup found (the check's own
        words for an unknown species): only a finding it does not say is shown there."""
        note = self.query_one(".species-picker--found", Static)
        if text and str(note.content) not in text:
            note.update(text)

    def focus_target(self):
        return self.query_one("#species", FieldRow).input

    @property
    def value(self) -> str:
        return self.query_one("#species", FieldRow).value

    def _fill(self, query: str) -> None:
        from balance.errors import InputError
        from balance.mixture import bundled_mixture
        from balance.species import lookup

        results = self.query_one("#species-results", OptionList)
        found = matches(query)
        shown = found[:MAX_SHOWN]
        results.set_options([Option(f"{sp.id:<8} {sp.name}", id=sp.id) for sp in shown])
        self._show_results()
        note = self.query_one(".species-picker--found", Static)
        if self._mixture:
            named = f"'{query.strip()}' names" if query.strip() else "give a name for"
            note.update(f"→ {named} the mixture of {', '.join(self._mixture)} typed under Mixture")
            return
        if not query.strip():
            first = f" (first {len(shown)} listed)" if len(shown) < len(found) else ""
            note.update(f"{len(found)} species{first}; type to narrow, ↓ to choose")
            return
        try:
            sp = bundled_mixture(query) or lookup(query, "species")
        except InputError as exc:
            note.update(exc.message)
            return
        if sp.composition:
            note.update(f"→ {sp.name} (a mixture): {sp.formula}; M = {sp.M * 1e3:.4g} g/mol")
            return
        ref = "reference model: yes" if sp.coolprop else "reference model: no"
        note.update(f"→ {sp.name} ({sp.id}): M = {sp.M * 1e3:.4g} g/mol, Tc = {sp.Tc:.5g} K, "
                    f"Pc = {sp.Pc / 1e5:.4g} bar, ω = {sp.omega:.3g}; {ref}")

    def _show_results(self) -> None:
        """The matches while the species is being chosen (its field or the list focused);
        otherwise they give their lines to the model and its adequacy hint."""
        found = self.query("#species-results")
        if not found:
            return  # the step was left before this ran (a blur is answered after a refresh)
        results = found.first(OptionList)
        results.display = bool(results.option_count) and self.has_focus_within

    def on_descendant_focus(self, event) -> None:
        self._show_results()

    def on_descendant_blur(self, event) -> None:
        self.call_after_refresh(self._show_results)  # the focus may move to the list, within

    def on_input_changed(self, event: Input.Changed) -> None:
        self._fill(event.value)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        results = self.query_one("#species-results", OptionList)
        if results.option_count:
            self._pick(results.get_option_at_index(results.highlighted or 0).id)

    def action_to_results(self) -> None:
        results = self.query_one("#species-results", OptionList)
        if results.option_count:
            results.focus()
            results.highlighted = results.highlighted or 0

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self._pick(event.option.id)

    def _pick(self, species_id: str) -> None:
        row = self.query_one("#species", FieldRow)
        row.set_value(species_id)
        row.input.focus()
        self.post_message(self.Picked(species_id))
