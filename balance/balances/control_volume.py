"""What every form of the control-volume balance shares.

A closed system, a steady-flow device and a transient vessel are forms of
one balance of mass, energy and entropy; this module holds the pieces they
have in common, so that a new kind is written beside the closed one rather
than threaded through it.
"""

from __future__ import annotations

from dataclasses import dataclass

#: The kinds of value a balance may solve for, and how a message names each.
_WORDS = {
    "heat": lambda name: f"Q '{name}'",
    "work": lambda name: f"W '{name}'",
    "amount": lambda name: "amount n",
    "state": lambda name: f"final-state property {name}",
}


@dataclass(frozen=True)
class Unknown:
    """One value a balance solves for: a heat or work term (by its name), the amount,
    or a free property of the final state (numbered ``"1"``, ``"2"``).

    >>> Unknown("heat", "jacket").words()
    "Q 'jacket'"
    >>> Unknown("amount").words()
    'amount n'
    """

    kind: str
    """'heat', 'work', 'amount' or 'state'"""
    name: str = ""

    def __post_init__(self) -> None:
        if self.kind not in _WORDS:  # a defect of the caller, not of the input
            raise ValueError(f"unknown kind {self.kind!r}; expected one of {', '.join(_WORDS)}")

    def words(self) -> str:
        """How messages and explanations name it: ``Q 'jacket'``, ``W 'shaft'``, ``amount n``."""
        return _WORDS[self.kind](self.name)

    def __str__(self) -> str:
        return self.words()
