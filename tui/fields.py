"""What each input field of the worksheet expects, and whether a text meets it.

No widgets here: the Textual validator (:mod:`tui.validators`) and the
step-status check (:mod:`tui.analysis`) both ask :func:`problem`, so an
inline message and a step marked invalid always agree. Each field is read by
the rule the solve applies to it (:func:`balance.api.read_field`: a
temperature above absolute zero, a pressure above vacuum, an amount above
zero, an atmosphere that is absolute ...), so a field the solve would refuse
is at fault where it is typed; :func:`balance.api.problems` lists every field
of a whole worksheet at fault. The messages are the domain's own, prefixed
with the field's label.
"""

from __future__ import annotations

from dataclasses import dataclass

from balance.errors import InputError
from balance.units import P_ATM

UNKNOWN = "?"


@dataclass(frozen=True)
class FieldKind:
    """One kind of input: how it is read and what to call it."""

    key: str
    phrase: str
    """what is expected, for placeholders and help"""
    example: str


KINDS = {
    k.key: k
    for k in (
        FieldKind("T", "a temperature", "20 degC"),
        FieldKind("P", "a pressure (absolute, or gauge with barg/psig)", "35 bar"),
        FieldKind("v", "a molar or specific volume", "0.5 m3/kg"),
        FieldKind("rho", "a mass or molar density", "300 kg/m3"),
        FieldKind("u", "a molar or specific internal energy", "2800 kJ/kg"),
        FieldKind("h", "a molar or specific enthalpy", "2800 kJ/kg"),
        FieldKind("s", "a molar or specific entropy", "6.5 kJ/(kg K)"),
        FieldKind("x", "a vapour quality between 0 and 1", "0.05"),
        FieldKind("n", "an amount of substance (or a mass)", "2 mol"),
        FieldKind("m", "a mass", "2.5 kg"),
        FieldKind("V", "a volume", "2 m3"),
        FieldKind("T_boundary", "an absolute temperature", "180 degC"),
        FieldKind("atmosphere", "an absolute pressure", "1.01325 bar"),
        FieldKind("energy", "an energy", "400 kJ"),
        FieldKind("polytropic_n", "a polytropic exponent from 0 to 1e6", "1.3"),
    )
}
#: Earlier names of three kinds: the boundary temperature, the atmosphere and the polytropic
#: exponent are each the only field of its dimension, and get its rules.
ALIASES = {"temperature": "T_boundary", "pressure": "atmosphere", "dimensionless": "polytropic_n"}
KINDS.update({old: KINDS[new] for old, new in ALIASES.items()})


def read(kind: str, text: str, label: str, p_atm: float = P_ATM) -> float:
    """The SI value of ``text`` for a field of ``kind``, by every rule the solve applies to that
    field (:func:`balance.api.read_field`); raises InputError naming ``label``."""
    from balance import api

    # the molar mass only scales mass-based inputs; any positive value checks the text
    return api.read_field(ALIASES.get(kind, kind), text.strip(), label, p_atm=p_atm)


def problem(kind: str, text: str, label: str, *, allow_unknown: bool = False, required: bool = False,
            p_atm: float = P_ATM, positive: bool = False) -> str | None:
    """None when ``text`` is acceptable for the field, else the message to show."""
    stripped = text.strip()
    what = KINDS[kind]
    if not stripped:
        return f"{label}: give {what.phrase}, like '{what.example}'" if required else None
    if stripped == UNKNOWN:
        if allow_unknown:
            return None
        return f"{label}: cannot be unknown ('?') here; give {what.phrase}, like '{what.example}'"
    try:
        value = read(kind, stripped, label, p_atm)
    except InputError as exc:
        if _names_dimension(exc.message, what):
            return str(exc)
        return f"{label} ({what.phrase}): {exc.message}"
    if positive and not value > 0:
        return f"{label}: must be positive; got {text.strip()!r}"
    return None


def _names_dimension(message: str, what: FieldKind) -> bool:
    """Whether the domain's message already says what was expected."""
    words = what.phrase.split(" (")[0].replace(" or ", " ").split()
    return any(w in message for w in words if len(w) > 3 and w not in ("molar", "specific", "between"))


def atmosphere(text: str) -> float:
    """The worksheet's atmosphere [Pa] for gauge readings; the standard one if the text is bad."""
    try:
        return read("atmosphere", text, "atmosphere")
    except InputError:
        return P_ATM


def split_sign(text: str) -> tuple[bool, str]:
    """('-400 kJ') -> (True, '400 kJ'): a leading minus as a direction."""
    stripped = text.strip()
    if stripped.startswith("-"):
        return True, stripped[1:].lstrip()
    if stripped.startswith("+"):
        return False, stripped[1:].lstrip()
    return False, stripped


def join_sign(negative: bool, magnitude: str) -> str:
    """Inverse of :func:`split_sign`; an unknown or blank value has no sign."""
    m = magnitude.strip()
    if not m or m == UNKNOWN or not negative:
        return m
    return f"-{m}"
