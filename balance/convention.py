"""The sign convention for work, in one place.

Inside ``balance`` every term is in one canonical sign: heat *to* the system
and work done *on* the system are positive (ΔU = Q + W). A worksheet may be
written in either convention (``[worksheet] convention``); the numbers a
person typed are turned into the canonical sign when they are read
(:meth:`Convention.work_on`) and back into the worksheet's sign wherever a
work term is shown (:meth:`Convention.shown`): the JSON and the record, the
explanation, the command line's tables and the app.
"""

from __future__ import annotations

from dataclasses import dataclass

#: Each convention's key (as a worksheet writes it) and its words.
CONVENTIONS = {
    "work-on-system": "heat to the system and work done on the system are positive: ΔU = Q + W",
    "work-by-system": "heat to the system and work done by the system are positive: ΔU = Q - W",
}


@dataclass(frozen=True)
class Convention:
    """One of :data:`CONVENTIONS`; a key that is not one is a defect of the caller
    (the worksheet refuses it with the field named).

    >>> by = Convention("work-by-system")
    >>> by.work_on(2000.0), by.shown("heat", 500.0), by.shown("work", -2000.0)
    (-2000.0, 500.0, 2000.0)
    """

    key: str = "work-on-system"

    def __post_init__(self) -> None:
        if self.key not in CONVENTIONS:
            raise ValueError(f"unknown sign convention {self.key!r}; expected one of {', '.join(CONVENTIONS)}")

    @property
    def words(self) -> str:
        return CONVENTIONS[self.key]

    @property
    def flow_words(self) -> str:
        """The convention as a steady-flow balance states it (rates, no ΔU)."""
        sign, by = ("+", "on") if self.on_system else ("-", "by")
        return (f"heat to the fluid and work done {by} the fluid are positive: "
                f"0 = Σ ṁ_in e_in - Σ ṁ_out e_out + Q̇ {sign} Ẇ")

    @property
    def on_system(self) -> bool:
        """Whether work done on the system is the positive direction."""
        return self.key == "work-on-system"

    @property
    def positive_work(self) -> str:
        """The direction of positive work: ``"on"`` or ``"by"`` (the system)."""
        return "on" if self.on_system else "by"

    def work_on(self, written: float) -> float:
        """Work as the worksheet writes it [J] → work done on the system [J]."""
        return written if self.on_system else -written

    def shown(self, kind: str, value: float) -> float:
        """A term's canonical value [J] as this convention writes it: heat as it is,
        work (``kind`` 'work' or 'boundary work') in the worksheet's sign."""
        return value if kind == "heat" or self.on_system else -value
