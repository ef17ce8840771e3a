"""The cautions a result that can hurt someone carries, in every kind of balance.

The disclaimer always; a pressure above 0.5 bar gauge, a temperature below
-29 °C and a final pressure above every initial one each add theirs (one
caution where the highest pressure is the final one).

A caution keeps its numbers apart from its words (:class:`Caution`), so each
face writes them in its own units: the record in fixed ones (°C, bar(a):
:func:`record_units`), the command line and the app in the display units the
user chose.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

from ..errors import BalanceError

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
    """'disclaimer', 'pressure', 'low temperature', 'above initial' or 'pressure not determined'"""
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


def cautions_for(p_atm: float, initial, final, event: bool = False) -> list[Caution]:
    """The cautions an engineer expects to see beside a result that can hurt someone.

    ``p_atm`` [Pa] is the atmosphere gauge pressures are read against; ``initial``
    and ``final`` are the states (:class:`balance.state.State`). A pressure the
    model does not determine (NaN) is left out of the pressure cautions. ``event``:
    the compartments join suddenly (a free expansion, a rupture), so the gas left in
    a compartment that empties expands on its own on the way to the final pressure
    and is colder than the settled state (:func:`gas_left_behind`).
    """
    out = [DISCLAIMER]
    states = [*initial, final]
    known = [st.point.P for st in states if math.isfinite(st.point.P)]
    initial_P = [st.point.P for st in initial if math.isfinite(st.point.P)]
    rises = bool(initial_P) and math.isfinite(final.point.P) and final.point.P > max(initial_P) * 1.001
    if known and max(known) > p_atm + 0.5e5:
        where = ", in the final state, above every initial pressure" if rises else ""
        rated = "; the boundary must be rated for it" if rises else ""
        out.append(Caution(
            "pressure",
            f"Pressures up to {{}} occur{where}: confirm the design pressure of every vessel and pipe within "
            f"the boundary and the set pressure of its relief device{rated}.",
            (("P", max(known)),),
        ))
    elif rises:
        out.append(Caution("above initial",
                           "The final pressure is above every initial pressure: the boundary must be rated for it."))
    coldest = min(reversed(states), key=lambda st: st.point.T)  # of equals, the final state
    behind = gas_left_behind(initial, final) if event else None
    if behind is not None and (behind[1] is None or behind[1] < min(LOW_TEMPERATURE_K, coldest.point.T)):
        out.append(_cooling_caution(final, *behind))
    elif coldest.point.T < LOW_TEMPERATURE_K:
        where = "the final state" if coldest is final else "the initial state"
        out.append(Caution(
            "low temperature",
            f"A temperature of {{}} occurs ({where} '{coldest.name}'), below {{}}, the usual limit for "
            f"carbon-steel equipment without impact testing (common practice): {_CHECK}. {_DEFER}",
            (("T", coldest.point.T), ("T limit", LOW_TEMPERATURE_K)),
        ))
    if not math.isfinite(final.point.P):
        out.append(_liquid_full(final))
    return out


#: What the low-temperature cautions say after the temperature and its place.
_CHECK = ("check the minimum design metal temperature of every vessel and pipe within the boundary "
          "(low-temperature embrittlement) before relying on this result")
_DEFER = "The limit depends on the material and on the code that governs the equipment: follow that code."


def gas_left_behind(initial, final):
    """The coldest gas left in a compartment that empties, when compartments join suddenly.

    Each compartment whose pressure falls to the final pressure P2 keeps expanding
    while it empties; with no time for heat from the walls that expansion is
    isentropic, the usual bound of a fast blowdown (common practice, no source): the
    gas left in it cools to T(P2, s1), below the settled state, which is the state
    after the streams have mixed. Returns (state, T [K], reason) for the coldest
    compartment, with T None and the model's words when it cannot follow the gas
    there (it would condense, or leave the model's range); None when no
    compartment empties.
    """
    P2 = final.point.P
    found = []
    for st in initial:
        if not (math.isfinite(P2) and st.point.P > P2 * (1 + 1e-9)):
            continue
        try:
            found.append((st, isentropic_temperature(st.model, st.point, P2, final.point), ""))
        except BalanceError as exc:
            found.append((st, None, str(exc)))
    if not found:
        return None
    unknown = [f for f in found if f[1] is None]
    return unknown[0] if unknown else min(found, key=lambda f: f[1])


def isentropic_temperature(model, start, P: float, near=None) -> float:
    """T [K] at pressure P [Pa] with the entropy of the point ``start``, in the same phase.

    Newton's method on ln T, (∂ln T/∂s)_P = 1/cp, through states at (T, P), from
    T1 (P/P1)^((cp - cv)/cp) with cp and cv of ``near`` (a point at or near P; default
    ``start``). A step below 1e-3 leaves an error of the order of its square (about
    1e-6 of T), far below the 0.1 K a caution prints, so two or three states do.
    Where the states leave the phase or do not settle, the model's own (P, s) flash.
    Raises BalanceError where the model has no such state (a cubic's two-phase region).
    """
    q = near if near is not None else start
    k = (q.cp - q.cv) / q.cp if math.isfinite(q.cp) and math.isfinite(q.cv) and q.cp > 0 else 0.0
    T = start.T * (P / start.P) ** k
    for _ in range(12):
        try:
            q = model.at_TP(T, P)
        except BalanceError:
            break
        if q.phase in ("liquid", "two-phase") or not (math.isfinite(q.cp) and q.cp > 0):
            break
        step = (start.s - q.s) / q.cp
        T *= math.exp(step)
        if abs(step) < 1e-3:
            return T
    return model.flash({"P": P, "s": start.s}, "state").T


def _cooling_caution(final, st, T, reason: str) -> Caution:
    if T is None:
        return Caution(
            "low temperature",
            f"During the event the gas left in '{st.name}' expands from {{}} to {{}} and cools below the "
            f"settled {{}}, but the model cannot follow it there ({reason.rstrip('.')}): estimate its "
            f"coldest temperature with the reference model, then {_CHECK}. {_DEFER}",
            (("P", st.point.P), ("P", final.point.P), ("T", final.point.T)),
        )
    return Caution(
        "low temperature",
        f"During the event the gas left in '{st.name}' expands from {{}} to {{}}: with no time for heat "
        "from the walls (isentropically, the usual bound of a fast blowdown) it cools to {}, below {}, "
        "the usual limit for carbon-steel equipment without impact testing (common practice); the "
        f"settled {{}} is the state after mixing (the balance gives end states only). {_CHECK[0].upper()}"
        f"{_CHECK[1:]}; the metal cools more slowly than the gas. {_DEFER}",
        (("P", st.point.P), ("P", final.point.P), ("T", T), ("T limit", LOW_TEMPERATURE_K), ("T", final.point.T)),
    )


def _liquid_full(final) -> Caution:
    """The final pressure is not the model's to give (the incompressible model fixes v, not P)."""
    species = final.model.species
    where = ('solve the same worksheet with the reference model (model = "reference"), which gives '
             f"{species.name}'s compressibility" if species.coolprop else
             f"use a model that gives {species.name}'s compressibility (the reference model has no "
             "equation for it)")
    return Caution(
        "pressure not determined",
        f"The {final.model.name} model fixes the liquid's volume, not its pressure: it cannot give the "
        f"pressure of '{final.name}'. A real liquid heated in a closed, rigid vessel it fills raises its "
        "pressure sharply (its expansion is held back only by its small compressibility), which is why "
        "liquid-full equipment that can be blocked in and heated gets thermal "
        f"relief (common practice; follow the code that governs the equipment, e.g. API 521). For the "
        f"pressure, {where}.",
    )
