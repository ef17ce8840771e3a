"""A labelled one-line input with its inline message.

With a ``kind`` (see :mod:`tui.fields`) the input is unit-aware: a
:class:`~tui.validators.UnitValidator` checks it as the user types, and a
failure shows beneath it, naming the field and the dimension expected. What
the domain's check finds at the field (a temperature below absolute zero, a
final T that a constraint contradicts) is shown there too
(:meth:`FieldRow.set_problem`, from the step's screen). The text is never
changed or cleared by validation: what was typed stays.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.content import Content
from textual.widget import Widget
from textual.widgets import Input, Static

from .. import fields
from ..validators import UnitValidator


class FieldRow(Widget):
    """``label [ input ]`` and, when the text is not acceptable, why (on the line below)."""

    DEFAULT_CSS = """
    FieldRow {
        height: auto;
        width: 1fr;
        min-width: 20;
        color: $text-muted;
        & Input { margin-left: 12; background: $boost; }
        & Input:focus { background: $primary 20%; }
        & .field-row--message { color: $text-error; height: auto; display: none; }
        &.-invalid { color: $text-error; & .field-row--message { display: block; } }
    }
    """

    def __init__(
        self,
        label: str,
        value: str = "",
        *,
        kind: str | None = None,
        field_label: str | None = None,
        allow_unknown: bool = False,
        required: bool = False,
        positive: bool = False,
        placeholder: str | None = None,
        p_atm: Callable[[], float] | None = None,
        label_width: int | None = None,
        id: str | None = None,
        classes: str | None = None,
        disabled: bool = False,
        tooltip: str | None = None,
        enter_moves_on: bool = True,
    ) -> None:
        super().__init__(id=id, classes=classes, disabled=disabled)
        self.label = label
        self.kind = kind
        self.field_label = field_label or label
        self._initial = value
        self._seen = value
        """the text the verdicts shown are about"""
        self._label_width = label_width
        validators = []
        if kind is not None:
            validators.append(UnitValidator(kind, self.field_label, allow_unknown=allow_unknown,
                                            required=required, positive=positive, p_atm=p_atm))
            if placeholder is None:
                example = fields.KINDS[kind].example
                placeholder = f"e.g. {example}" + (" or ?" if allow_unknown else "")
        self._validators = validators
        self._placeholder = placeholder or ""
        self._tooltip = tooltip
        self._failure = ""
        """the validator's verdict on the text as it stands"""
        self._problem = ""
        """what the domain's check found at this field (cleared when the text changes)"""
        self.enter_moves_on = enter_moves_on
        """Enter goes on to the next field (the step's rule); False: Enter submits the input"""

    def render(self) -> Content:
        # the label, drawn by the row itself in the input's left margin: one widget fewer per field
        return Content(self.label)

    def compose(self) -> ComposeResult:
        # validators are attached once the unit registry is loaded (revalidate): checking
        # while the first screen is built would import pint and the models on the UI thread
        inp = Input(self._initial, placeholder=self._placeholder, compact=True,
                    validate_on=["changed", "blur"], select_on_focus=False)
        if self._tooltip:
            inp.tooltip = self._tooltip
        yield inp
        # the message line is mounted the first time there is something to say

    def on_mount(self) -> None:
        if self._label_width:
            self.input.styles.margin = (0, 0, 0, self._label_width)
        if getattr(self.app, "units_ready", True):
            self.revalidate()

    @property
    def input(self) -> Input:
        return self.query_one(Input)

    @property
    def value(self) -> str:
        """The text as typed (before mounting: as given)."""
        try:
            return self.query_one(Input).value
        except Exception:  # not composed yet
            return self._initial

    @property
    def message(self) -> str:
        """The inline message shown, or '' when the text is acceptable."""
        return self._failure or self._problem

    def set_problem(self, text: str) -> None:
        """Show what the domain's check found at this field ('' for nothing); the field's
        own check, when it fails, is shown first."""
        if text != self._problem:
            self._problem = text
            self._draw_message()

    def set_value(self, text: str) -> None:
        inp = self.input
        if inp.value != text:
            inp.value = text  # its Changed message shows the new verdict

    def revalidate(self) -> None:
        """Check the text again (after the unit registry warms up, or the atmosphere changes)."""
        if not self._validators:
            return
        inp = self.input
        if not inp.validators:
            inp.validators = list(self._validators)
        result = inp.validate(inp.value)
        self._show(result)

    def _show(self, result) -> None:
        invalid = result is not None and not result.is_valid
        self._failure = (result.failure_descriptions[0] if result.failure_descriptions else "?") if invalid else ""
        self._draw_message()

    def _draw_message(self) -> None:
        text = self.message
        found = self.query(".field-row--message")
        if found:
            found.first(Static).update(text)
        elif text:
            self.mount(Static(text, classes="field-row--message", markup=False))
        self.set_class(bool(text), "-invalid")

    def on_input_changed(self, event: Input.Changed) -> None:
        # validation has already run (validate_on "changed"); show its verdict, let the event bubble.
        if event.value == self._seen:
            # the input announcing the text it was built with (before its validators were
            # attached: no verdict), not an edit; the verdicts already shown stand
            return
        self._seen = event.value
        # the domain's finding was about the text before: the next check says it again if it holds
        self._problem = ""
        self._show(event.validation_result)

    def on_input_blurred(self, event: Input.Blurred) -> None:
        self._show(event.validation_result)
