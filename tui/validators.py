"""Textual validators for unit-aware inputs.

The failure message is the one the step status uses (:func:`tui.fields.problem`):
the field's label and the dimension it expects, e.g.
``T (initial 'V-101'): must be a temperature (like '500 K'); got '20 degX'``.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.validation import ValidationResult, Validator

from . import fields


class UnitValidator(Validator):
    """Accepts a blank field, ``?`` where an unknown is allowed, or a quantity of ``kind``."""

    def __init__(self, kind: str, label: str, *, allow_unknown: bool = False, required: bool = False,
                 positive: bool = False, p_atm: Callable[[], float] | None = None) -> None:
        super().__init__()
        self.kind = kind
        self.label = label
        self.allow_unknown = allow_unknown
        self.required = required
        self.positive = positive
        self.p_atm = p_atm

    def validate(self, value: str) -> ValidationResult:
        p_atm = self.p_atm() if self.p_atm else fields.P_ATM
        message = fields.problem(self.kind, value, self.label, allow_unknown=self.allow_unknown,
                                 required=self.required, p_atm=p_atm, positive=self.positive)
        return self.success() if message is None else self.failure(message)
