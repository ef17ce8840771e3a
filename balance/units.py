"""The one unit registry, and the parsing of quantities people type.

Everything inside ``balance`` works in SI floats (K, Pa, m3, mol, kg, J);
pint is used only here, at the edges: to read what a person typed
(``"20 degC"``, ``"3.2 barg"``, ``"1 L/mol"``) and to show results in the
units they asked for.

Temperatures are offset units. ``"20 degC"`` is a temperature, 293.15 K,
never a difference of 20 K: the text is split into a number and a unit and
built with ``Q_(value, unit)``, which pint converts correctly; implicit
offset arithmetic stays off so that a mistake raises instead of hiding.

Gauge pressures (``barg``, ``psig``, ``kPag``, ``bar(g)``, ``bar g``) need an
atmospheric pressure; the caller passes it (default 1.01325 bar) and the
output states which was used.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from .errors import InputError

#: Standard atmosphere [Pa], the default for gauge pressures.
P_ATM = 101325.0

#: Molar gas constant [J/(mol K)], CODATA 2018 (exact by the 2019 SI).
R = 8.314462618

#: Reference temperature and pressure of the ideal-gas tables [K], [Pa].
T_REF = 298.15
P_REF = 1.0e5


@lru_cache(maxsize=1)
def registry():
    """The program's single pint registry, built once (with pint's cache).

    Imported lazily so that code paths that never parse a unit do not pay
    for building it.
    """
    import pint

    try:
        ureg = pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # a read-only home: build without the cache
        ureg = pint.UnitRegistry()
    ureg.formatter.default_format = "~P"
    return ureg


def Q_(value, unit: str):
    """A pint Quantity from a number and a unit string."""
    return registry().Quantity(value, unit)


@dataclass(frozen=True)
class Dimension:
    """A kind of quantity a field expects, its SI unit and a phrase for errors."""

    key: str
    si_unit: str
    phrase: str


DIMENSIONS: dict[str, Dimension] = {
    d.key: d
    for d in (
        Dimension("temperature", "K", "a temperature"),
        Dimension("temperature_difference", "K", "a temperature difference"),
        Dimension("pressure", "Pa", "a pressure"),
        Dimension("volume", "m**3", "a volume"),
        Dimension("molar_volume", "m**3/mol", "a molar volume"),
        Dimension("specific_volume", "m**3/kg", "a specific volume"),
        Dimension("density", "kg/m**3", "a mass density"),
        Dimension("molar_density", "mol/m**3", "a molar density"),
        Dimension("amount", "mol", "an amount of substance"),
        Dimension("mass", "kg", "a mass"),
        Dimension("energy", "J", "an energy"),
        Dimension("molar_energy", "J/mol", "a molar energy"),
        Dimension("specific_energy", "J/kg", "a specific energy"),
        Dimension("molar_entropy", "J/(mol*K)", "a molar entropy or heat capacity"),
        Dimension("specific_entropy", "J/(kg*K)", "a specific entropy or heat capacity"),
        Dimension("molar_mass", "kg/mol", "a molar mass"),
        Dimension("dimensionless", "dimensionless", "a pure number"),
        Dimension("cubic_a", "Pa*m**6/mol**2", "a cubic attraction parameter a"),
        Dimension("cubic_a_rk", "Pa*m**6*K**0.5/mol**2", "Redlich-Kwong's attraction parameter a (with K^0.5)"),
    )
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_GAUGE = re.compile(r"^(.*?)\s*(?:\(g\)|g| g|\(gauge\)| gauge)$")
_ABSOLUTE = re.compile(r"^(.*?)\s*(?:\(a\)|a| a|\(abs\)| abs)$")
_PRESSURE_UNITS = {"bar", "psi", "kPa", "MPa", "Pa", "mbar", "atm", "kgf/cm2", "kgf/cm**2"}


# 'm3', 'cm3', 'ft3', 'm2', 'm6' (a cubic's a, Pa m6/mol2) as people write them: a power after a letter
_POWER = re.compile(r"(?<=[A-Za-z])([2-6])(?![\d.])")


def _split(text: str, field: str) -> tuple[float, str]:
    m = _NUMBER.match(text)
    if not m:
        raise InputError(field, f"expected a number and a unit, like '500 K'; got {text!r}")
    value = float(m.group(1))
    unit = _POWER.sub(r"**\1", m.group(2).replace("³", "3").replace("²", "2"))
    return value, unit


def _pressure_suffix(unit: str) -> tuple[str, str | None]:
    """Split a gauge/absolute marker off a pressure unit: ('bar', 'gauge')."""
    for pattern, kind in ((_GAUGE, "gauge"), (_ABSOLUTE, "absolute")):
        m = pattern.match(unit)
        if m and m.group(1) in _PRESSURE_UNITS:
            return m.group(1), kind
    return unit, None


def parse(text, dimension: str, field: str, *, p_atm: float = P_ATM) -> float:
    """Read what a person typed as an SI float of the expected dimension.

    Parameters
    ----------
    text : str | float | int
        ``"500 K"``, ``"20 degC"``, ``"3.2 barg"``, ``"1 L/mol"``; a bare
        number is accepted only for ``dimensionless``.
    dimension : str
        A key of :data:`DIMENSIONS`.
    field : str
        The field's name, used in error messages.
    p_atm : float
        Atmospheric pressure for gauge readings [Pa].

    Returns
    -------
    float
        The value in the dimension's SI unit (K, Pa, m3, ...).

    >>> parse("20 degC", "temperature", "T1")
    293.15
    >>> parse("3.2 barg", "pressure", "P1")
    421325.0
    """
    dim = DIMENSIONS[dimension]
    if isinstance(text, bool):
        raise InputError(field, f"must be {dim.phrase}; got {text!r}")
    if isinstance(text, (int, float)):
        if dimension == "dimensionless":
            return float(text)
        raise InputError(
            field, f"must be {dim.phrase} with a unit, like '{_example(dimension)}'; got {text!r}"
        )
    if not isinstance(text, str):
        raise InputError(field, f"must be {dim.phrase} written as text; got {text!r}")
    si, gauge, problem = _convert(text, dimension)
    if problem:
        raise InputError(field, problem)
    return si + p_atm if gauge else si


@lru_cache(maxsize=4096)
def _convert(text: str, dimension: str) -> tuple[float, bool, str]:
    """``text`` as (SI value, whether it is a gauge pressure, '') or (nan, False, what is wrong).

    Cached: pint takes tens of microseconds a conversion, and a worksheet is
    read again at every check and solve. The atmosphere is not part of the
    key: a gauge reading is cached as its value above the atmosphere and the
    caller adds its own. The answer depends on nothing else (the registry is
    built once), so a cached answer is the answer; errors are cached as their
    words, without the field, which the caller names.
    """
    dim = DIMENSIONS[dimension]
    try:
        value, unit = _split(text, "")
    except InputError as exc:
        return math.nan, False, exc.message
    if not math.isfinite(value):
        return math.nan, False, f"must be a finite number; got {text!r}"
    if dimension == "dimensionless":
        if unit in ("", "-", "1"):
            return value, False, ""
        return math.nan, False, f"must be a pure number; got {text!r}"
    if not unit:
        return math.nan, False, f"must be {dim.phrase} with a unit, like '{_example(dimension)}'; got {text!r}"
    kind = None
    if dimension == "pressure":
        unit, kind = _pressure_suffix(unit)
    try:
        si = Q_(value, unit).to(dim.si_unit).magnitude
    except Exception:
        return math.nan, False, f"must be {dim.phrase} (like '{_example(dimension)}'); got {text!r}"
    if dimension == "temperature_difference" and _is_offset(unit):
        return math.nan, False, f"is a temperature difference: write it in K or delta_degC; got {text!r}"
    return float(si), kind == "gauge", ""


def _is_offset(unit: str) -> bool:
    return unit.strip() in {"degC", "degF", "°C", "°F", "celsius", "fahrenheit"}


def _example(dimension: str) -> str:
    return {
        "temperature": "500 K",
        "temperature_difference": "10 K",
        "pressure": "35 bar",
        "volume": "1 L",
        "molar_volume": "1 L/mol",
        "specific_volume": "0.1 m3/kg",
        "density": "1.2 kg/m3",
        "molar_density": "40 mol/m3",
        "amount": "1 mol",
        "mass": "2.5 kg",
        "energy": "12 kJ",
        "molar_energy": "1 kJ/mol",
        "specific_energy": "1 kJ/kg",
        "molar_entropy": "29.1 J/(mol K)",
        "specific_entropy": "1.04 kJ/(kg K)",
        "molar_mass": "28.01 g/mol",
        "cubic_a": "0.137 Pa m6/mol2",
        "cubic_a_rk": "1.56 Pa m6 K^0.5/mol2",
    }.get(dimension, "1")


def dimension_of(text: str, candidates: tuple[str, ...], field: str) -> tuple[str, float]:
    """Which of ``candidates`` the typed quantity is, and its SI value.

    Used where one field accepts several kinds (an amount given as moles or
    as kilograms; v given per mole or per kilogram).
    """
    for key in candidates:
        try:
            return key, parse(text, key, field)
        except InputError:
            continue
    phrases = " or ".join(DIMENSIONS[c].phrase for c in candidates)
    raise InputError(field, f"must be {phrases}; got {text!r}")


def to_unit(value: float, si_unit: str, unit: str) -> float:
    """Convert an SI float to ``unit`` (for display)."""
    return float(Q_(value, si_unit).to(unit).magnitude)
