"""The cautions a result that can hurt someone carries, in every kind of balance.

The disclaimer always; a pressure above 0.5 bar gauge, a temperature below
-29 °C and a final pressure above every initial one each add theirs.

A caution keeps its numbers apart from its words (:class:`Caution`), so each
face writes them in its own units: the record in fixed ones (°C, bar(a):
:func:`record_units`), the command line and the app in the display units the
user chose.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

#: Below this metal temperature carbon steels need impact-test qualification under
#: the common pressure-vessel codes (-29 °C / -20 °F; common practice, no source).
LOW_TEMPERATURE_K = 244.15

#: How a face writes a caution's value: (kind, SI value) -> text with its unit. The kinds are
#: "T" (a temperature [K], to 0.1 degree), "T limit" (a threshold [K], to the degree) and
#: "P" (an absolute pressure [Pa]).
Show = Callable[[str, float], str]


def record_units(kind: str, value: float) -> str:
    """A caution's value as the record writes it: temperatures in °C, pressures in bar(a)."""
    if kind == "P":
        return f"{value / 1e5:.4g} bar(a)"
    return f"{value - 273.15:.{0 if kind == 'T limit' else 1}f} °C"


@dataclass(frozen=True)
class Caution:
    """One caution: its words, with ``{}`` where each value goes, and the values in SI."""

    kind: str
    """'disclaimer', 'pressure', 'low temperature' or 'above initial'"""
    words: str
    values: tuple[tuple[str, float], ...] = ()
    """(kind of value, SI value) for each ``{}`` in ``words`` (see :data:`Show`)"""

    def text(self, show: Show = record_units) -> str:
        """The caution with its values written by ``show`` (default: the record's units)."""
        return self.words.format(*(show(kind, value) for kind, value in self.values))

    def __str__(self) -> str:
        return self.text()

    def __contains__(self, phrase: str) -> bool:
        """Whether the caution's text (in the record's units) says ``phrase``, as a text would."""
        return phrase in self.text()


DISCLAIMER = Caution(
    "disclaimer",
    "This is an energy-balance calculation, not a design or assessment of pressure equipment or "
    "relief systems. Apply the codes that govern your equipment (e.g. ASME VIII, EN 13445, "
    "API 520/521) and have the calculation checked by a competent, licensed engineer.",
)


def cautions_for(p_atm: float, initial, final) -> list[Caution]:
    """The cautions an engineer expects to see beside a result that can hurt someone.

    ``p_atm`` [Pa] is the atmosphere gauge pressures are read against; ``initial``
    and ``final`` are the states (:class:`balance.state.State`). A pressure the
    model does not determine (NaN) is left out of the pressure cautions.
    """
    out = [DISCLAIMER]
    states = [*initial, final]
    known = [st.point.P for st in states if math.isfinite(st.point.P)]
    if known and max(known) > p_atm + 0.5e5:
        out.append(Caution(
            "pressure",
            "Pressures up to {} occur: confirm the design pressure of every vessel and pipe within the "
            "boundary and the set pressure of its relief device.",
            (("P", max(known)),),
        ))
    coldest = min(reversed(states), key=lambda st: st.point.T)  # of equals, the final state
    if coldest.point.T < LOW_TEMPERATURE_K:
        where = "the final state" if coldest is final else "the initial state"
        out.append(Caution(
            "low temperature",
            f"A temperature of {{}} occurs ({where} '{coldest.name}'), below {{}}, the usual limit for "
            "carbon-steel equipment without impact testing (common practice): check the minimum design "
            "metal temperature of every vessel and pipe within the boundary (low-temperature "
            "embrittlement) before relying on this result. The limit depends on the material and on "
            "the code that governs the equipment: follow that code.",
            (("T", coldest.point.T), ("T limit", LOW_TEMPERATURE_K)),
        ))
    initial_P = [st.point.P for st in initial if math.isfinite(st.point.P)]
    if initial_P and math.isfinite(final.point.P) and final.point.P > max(initial_P) * 1.001:
        out.append(Caution("above initial",
                           "The final pressure exceeds every initial pressure: the boundary must be rated for it."))
    return out
