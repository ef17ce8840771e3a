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
        Dimension("pressure_difference", "Pa", "a pressure difference"),
        Dimension("volume", "m**3", "a volume"),
        Dimension("molar_volume", "m**3/mol", "a molar volume"),
        Dimension("specific_volume", "m**3/kg", "a specific volume"),
        Dimension("density", "kg/m**3", "a mass density"),
        Dimension("molar_density", "mol/m**3", "a molar density"),
        Dimension("amount", "mol", "an amount of substance"),
        Dimension("mass", "kg", "a mass"),
        Dimension("energy", "J", "an energy"),
        Dimension("entropy", "J/K", "an entropy (energy per kelvin)"),
        Dimension("entropy_rate", "W/K", "an entropy rate (power per kelvin)"),
        Dimension("molar_energy", "J/mol", "a molar energy"),
        Dimension("specific_energy", "J/kg", "a specific energy"),
        Dimension("molar_entropy", "J/(mol*K)", "a molar entropy or heat capacity"),
        Dimension("specific_entropy", "J/(kg*K)", "a specific entropy or heat capacity"),
        Dimension("molar_mass", "kg/mol", "a molar mass"),
        Dimension("dimensionless", "dimensionless", "a pure number"),
        Dimension("cubic_a", "Pa*m**6/mol**2", "a cubic attraction parameter a"),
        Dimension("cubic_a_rk", "Pa*m**6*K**0.5/mol**2", "Redlich-Kwong's attraction parameter a (with K^0.5)"),
        Dimension("mass_rate", "kg/s", "a mass rate"),
        Dimension("molar_rate", "mol/s", "a molar rate"),
        Dimension("volume_rate", "m**3/s", "a volumetric rate"),
        Dimension("power", "W", "a power or heat rate"),
        Dimension("velocity", "m/s", "a velocity"),
        Dimension("area", "m**2", "an area"),
        Dimension("length", "m", "a length"),
        Dimension("time", "s", "a time"),
        Dimension("heat_transfer_coefficient", "W/(m**2*K)", "a heat-transfer coefficient"),
        Dimension("heat_flux", "W/m**2", "a heat flux"),
    )
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_DECIMAL_COMMA = re.compile(r"^\s*[-+]?\d*,\d")
_GAUGE = re.compile(r"^(.*?)\s*(?:\(g\)|g| g|\(gauge\)| gauge)$")
_ABSOLUTE = re.compile(r"^(.*?)\s*(?:\(a\)|a| a|\(abs\)| abs)$")
_PRESSURE_UNITS = {"bar", "psi", "kPa", "MPa", "Pa", "mbar", "atm", "kgf/cm2", "kgf/cm**2"}

#: The longest text a quantity field takes [characters]. A value and its unit are a few tens
#: ('1.01325 bar(a)', '29.1 J/(mol K)'); longer text is refused before anything reads it.
MAX_TEXT = 200
#: The largest power a unit may carry ('m**3', 'K^0.5', 'm6'); a power of a power is refused:
#: pint evaluates what it is given, and '10**10**10' is a number of ten billion digits.
MAX_POWER = 12

# 'm3', 'cm3', 'ft3', 'm2', 'm6' (a cubic's a, Pa m6/mol2) as people write them: a power after a letter
_POWER = re.compile(r"(?<=[A-Za-z])([2-6])(?![\d.])")
# a power in a unit: '**3', '^0.5', '** (-2)', '^-1'
_EXPONENT = re.compile(r"(?:\*\*|\^)\s*(\(\s*)?([-+]?\s*(?:\d+\.?\d*|\.\d+))\s*(\))?")

# Celsius and Fahrenheit as people write them in a temperature field. pint reads 'C' as the
# coulomb and 'F' as the farad (and has no 'degc'), but neither is ever a temperature: in a
# field that expects one, these spellings can only mean the temperature scales.
_TEMPERATURE_SPELLINGS = {
    **dict.fromkeys(("C", "c", "degc", "deg C", "deg c", "deg_C", "°c", "° C", "ºC", "º C", "℃",
                     "Celsius", "celcius", "Celcius"), "degC"),
    **dict.fromkeys(("F", "degf", "deg F", "deg f", "deg_F", "°f", "° F", "ºF", "º F", "℉",
                     "Fahrenheit"), "degF"),
    **dict.fromkeys(("deg K", "kelvin", "Kelvin"), "K"),
}


def _split(text: str, dimension: str) -> tuple[float, str] | str:
    """``text`` as (its number, its unit with powers written as pint reads them), or what is wrong."""
    if _DECIMAL_COMMA.match(text):
        return (f"has a comma in its number; write a decimal point and no thousands separators, "
                f"like '{_example(dimension)}'; got {text!r}")
    m = _NUMBER.match(text)
    if not m:
        return _no_number(DIMENSIONS[dimension].phrase, dimension, text)
    value = float(m.group(1))
    unit = m.group(2)
    if dimension in ("temperature", "temperature_difference"):
        unit = _TEMPERATURE_SPELLINGS.get(unit, unit)
    unit = _POWER.sub(r"**\1", unit.replace("³", "3").replace("²", "2"))
    return value, unit


def _no_number(phrase: str, dimension: str, text: str) -> str:
    return f"expected {phrase}: a number and a unit, like '{_example(dimension)}'; got {text!r}"


def _unit_problem(unit: str, text: str) -> str:
    """What makes a unit unsafe or wrong to hand to pint ('' when nothing): a number in it
    that is not a small power, or a power of a power."""
    for m in _EXPONENT.finditer(unit):
        if float(m.group(2).replace(" ", "")) > MAX_POWER or float(m.group(2).replace(" ", "")) < -MAX_POWER:
            return f"has a power beyond ±{MAX_POWER} in its unit; got {text!r}"
        if re.match(r"\s*(?:\*\*|\^)", unit[m.end():]):
            return f"has a power of a power in its unit; write the unit plainly, like 'm**3'; got {text!r}"
    if any(ch.isdigit() for ch in _EXPONENT.sub("", unit)):
        return f"has a number inside its unit; write one number, then the unit; got {text!r}"
    return ""


def _pressure_suffix(unit: str) -> tuple[str, str | None]:
    """Split a gauge/absolute marker off a pressure unit: ('bar', 'gauge')."""
    for pattern, kind in ((_GAUGE, "gauge"), (_ABSOLUTE, "absolute")):
        m = pattern.match(unit)
        if m and m.group(1) in _PRESSURE_UNITS:
            return m.group(1), kind
    return unit, None


def parse(text, dimension: str, field: str, *, p_atm: float = P_ATM, gauge: bool = True) -> float:
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
    gauge : bool
        Whether a gauge reading is accepted (not for the atmosphere itself).

    Returns
    -------
    float
        The value in the dimension's SI unit (K, Pa, m3, ...). A temperature
        is above absolute zero and a pressure above vacuum, or InputError says
        so; ``C``, ``degc``, ``deg C`` in a temperature field read as °C
        (and ``F`` as °F): pint's coulomb and farad are never temperatures.
        A value may carry its uncertainty (``"150 barg ± 2 bar"``,
        :func:`split_uncertainty`): the value alone is returned, and a bad
        uncertainty is an InputError naming ``field``.

    >>> parse("20 degC", "temperature", "T1")
    293.15
    >>> parse("25 C", "temperature", "T1")
    298.15
    >>> parse("3.2 barg", "pressure", "P1")
    421325.0
    >>> parse("3.2 barg ± 0.05 bar", "pressure", "P1")
    421325.0
    """
    dim = DIMENSIONS[dimension]
    if isinstance(text, bool):
        raise InputError(field, f"must be {dim.phrase}; got {text!r}")
    if isinstance(text, (int, float)):
        if dimension == "dimensionless" and math.isfinite(text):
            return float(text)
        if dimension == "dimensionless":
            raise InputError(field, f"must be a finite number; got {text!r}")
        raise InputError(
            field, f"must be {dim.phrase} with a unit, like '{_example(dimension)}'; got {text!r}"
        )
    if not isinstance(text, str):
        raise InputError(field, f"must be {dim.phrase} written as text; got {type(text).__name__}")
    if len(text) > MAX_TEXT:  # before the cache, which would keep it
        raise InputError(field, f"is {len(text)} characters long; {dim.phrase} is a number and a unit, "
                                f"like '{_example(dimension)}', at most {MAX_TEXT} characters")
    text, uncertainty = split_uncertainty(text, field)
    si, is_gauge, problem, _ = _convert(text, dimension)
    if problem:
        raise InputError(field, problem)
    if uncertainty is not None:  # the value is read alone; its uncertainty must still read beside it
        uncertainty.standard(text, field)
    if not is_gauge:
        return si
    if not gauge:
        raise InputError(field, f"must be an absolute pressure, not a gauge reading; got {text!r}")
    if not si + p_atm > 0:
        raise InputError(field, f"is at or below vacuum: {text!r} is {(si + p_atm) / 1e5:.6g} bar absolute against "
                                f"an atmosphere of {p_atm / 1e5:.6g} bar; a gauge reading cannot be below "
                                f"-{p_atm / 1e5:.6g} bar(g)")
    return si + p_atm


@lru_cache(maxsize=4096)
def _convert(text: str, dimension: str) -> tuple[float, bool, str, bool]:
    """``text`` as (SI value, whether it is a gauge pressure, '', False) or (nan, False, what is
    wrong, whether it is only the dimension that is wrong).

    Cached: pint takes tens of microseconds a conversion, and a worksheet is
    read again at every check and solve. The atmosphere is not part of the
    key: a gauge reading is cached as its value above the atmosphere and the
    caller adds its own. The answer depends on nothing else (the registry is
    built once), so a cached answer is the answer; errors are cached as their
    words, without the field, which the caller names.
    """
    dim = DIMENSIONS[dimension]
    split = _split(text, dimension)
    if isinstance(split, str):
        return math.nan, False, split, False
    value, unit = split
    if not math.isfinite(value):
        return math.nan, False, f"must be a finite number; got {text!r}", False
    if dimension == "dimensionless":
        if unit in ("", "-", "1"):
            return value, False, "", False
        return math.nan, False, f"must be a pure number; got {text!r}", True
    if not unit:
        return math.nan, False, f"must be {dim.phrase} with a unit, like '{_example(dimension)}'; got {text!r}", True
    problem = _unit_problem(unit, text)
    if problem:
        return math.nan, False, problem, False
    kind = None
    if dimension == "pressure":
        unit, kind = _pressure_suffix(unit)
    try:
        si = float(Q_(value, unit).to(dim.si_unit).magnitude)
    except Exception:
        return math.nan, False, f"must be {dim.phrase} (like '{_example(dimension)}'); got {text!r}", True
    if not math.isfinite(si):
        return math.nan, False, f"is too large to compute with; got {text!r}", False
    if dimension == "temperature_difference" and _is_offset(unit):
        return math.nan, False, f"is a temperature difference: write it in K or delta_degC; got {text!r}", True
    if dimension == "temperature" and not si > 0:
        which = f", which is {si:.6g} K" if unit != "K" else ""
        return math.nan, False, f"must be above absolute zero (0 K, -273.15 degC); got {text!r}{which}", False
    if dimension == "pressure" and kind != "gauge" and not si > 0:
        return math.nan, False, f"must be an absolute pressure above zero (a vacuum); got {text!r}", False
    return si, kind == "gauge", "", False


def unit_of(text, dimension: str) -> str | None:
    """The unit ``text`` is written in, as it is read: 'degC' for '25 C', 'bar' for '3 barg'
    (a gauge or absolute marker taken off), 'm**3' for 'm3'; None where ``text`` does not read
    as ``dimension`` (blank, '?', a bare number, a fault)."""
    if not isinstance(text, str) or len(text) > MAX_TEXT:
        return None
    if "±" in text or "+-" in text:
        text = text.partition("±" if "±" in text else "+-")[0].strip()
    if _convert(text, dimension)[2]:
        return None
    split = _split(text, dimension)
    if isinstance(split, str) or not split[1]:
        return None
    return _pressure_suffix(split[1])[0] if dimension == "pressure" else split[1]


def _is_offset(unit: str) -> bool:
    return unit.strip() in {"degC", "degF", "°C", "°F", "celsius", "fahrenheit"}


def _example(dimension: str) -> str:
    return {
        "temperature": "500 K",
        "temperature_difference": "10 K",
        "pressure": "35 bar",
        "pressure_difference": "0.3 bar",
        "volume": "1 L",
        "molar_volume": "1 L/mol",
        "specific_volume": "0.1 m3/kg",
        "density": "1.2 kg/m3",
        "molar_density": "40 mol/m3",
        "amount": "1 mol",
        "mass": "2.5 kg",
        "energy": "12 kJ",
        "entropy": "0 J/K",
        "entropy_rate": "0 W/K",
        "molar_energy": "1 kJ/mol",
        "specific_energy": "1 kJ/kg",
        "molar_entropy": "29.1 J/(mol K)",
        "specific_entropy": "1.04 kJ/(kg K)",
        "molar_mass": "28.01 g/mol",
        "cubic_a": "0.137 Pa m6/mol2",
        "cubic_a_rk": "1.56 Pa m6 K^0.5/mol2",
        "mass_rate": "12 t/h",
        "molar_rate": "30 mol/s",
        "volume_rate": "1500 Nm3/h",
        "power": "250 kW",
        "velocity": "20 m/s",
        "area": "0.05 m2",
        "length": "3 m",
        "time": "15 min",
        "heat_transfer_coefficient": "10 W/(m2 K)",
        "heat_flux": "50 kW/m2",
    }.get(dimension, "1")


# -- the uncertainty a value may carry --------------------------------------------------------
#: What each distribution word divides its number by to give the standard uncertainty u
#: (JCGM 100:2008 4.3.7 for the rectangular a/√3, 4.3.9 for the triangular a/√6, from memory).
DIVISORS = {"normal": 1.0, "rectangular": math.sqrt(3.0), "triangular": math.sqrt(6.0)}
_SIGN = ("±", "+-")
# '(rectangular)', '(k=2)' at the end of the uncertainty; not '(g)' of 'bar (g)', nor '(mol K)' of 'J/(mol K)'
_PARENTHESES = re.compile(r"^(.*?)\s*\(\s*([^()]*?)\s*\)\s*$")
_COVERAGE = re.compile(r"^k\s*=\s*(.+)$", re.IGNORECASE)
_UNIT_MARKS = {"g", "a", "abs", "gauge"}


@dataclass(frozen=True)
class Uncertainty:
    """The uncertainty typed after a value: ``2 bar``, ``0.5 %``, ``0.3 K (rectangular)``, ``4 kPa (k=2)``.

    The number is a standard uncertainty (``normal``, the default), the half-width a of a
    rectangular (u = a/√3) or triangular (u = a/√6) distribution, or an expanded uncertainty
    U with its coverage factor k (u = U/k). Its unit is read as a difference and may differ
    from the value's, of the same dimension; ``%`` makes it relative to the value as typed.
    """

    text: str
    """as typed after the ± sign"""
    number: float
    """the number as typed [its unit]"""
    unit: str = ""
    """its unit as typed: '' for a pure number, '%' for a relative uncertainty"""
    distribution: str = "normal"
    """normal, rectangular or triangular"""
    k: float | None = None
    """the coverage factor the number was expanded with (then ``number`` is U), else None"""

    @property
    def relative(self) -> bool:
        return self.unit == "%"

    @property
    def divisor(self) -> float:
        """What the number is divided by to give the standard uncertainty [-]."""
        return self.k if self.k is not None else DIVISORS[self.distribution]

    @property
    def words(self) -> str:
        """The distribution as a reader is told it: 'normal', 'rectangular', 'normal (k=2)'."""
        return f"normal (k={self.k:g})" if self.k is not None else self.distribution

    def standard(self, value_text: str, field: str = "") -> float:
        """The standard uncertainty in the unit ``value_text`` is typed in [that unit, as a
        difference: 1 K beside '20 degC' is 1]; raises InputError naming ``field`` when the
        uncertainty is not of the value's dimension (or has no unit beside one that has)."""
        m = _NUMBER.match(value_text)
        if not m:
            raise InputError(field, f"expected a value before ±, like '150 barg ± 2 bar'; got {value_text!r}")
        if self.relative:
            return abs(float(m.group(1))) * self.number / 100.0 / self.divisor
        value_unit, unit = _pressure_suffix(m.group(2).strip())[0], _pressure_suffix(self.unit)[0]
        if unit == value_unit:  # the value's own unit, whatever it is ('Nm3/h', 'MMscf/d')
            return self.number / self.divisor
        like = f"'± {self.number:g}{' ' + value_unit if value_unit else ''}'"
        if not unit:
            raise InputError(field, f"the uncertainty {self.text!r} needs a unit beside {value_text!r}, like "
                                    f"{like}, or make it relative, like '± 0.5 %'")
        scale, si = difference_scale(value_unit, field)
        scale_u, si_u = difference_scale(unit, field)
        if si != si_u:
            raise InputError(field, f"the uncertainty {self.text!r} is {_phrase(si_u)}, not of the dimension of "
                                    f"{value_text!r} ({_phrase(si)}): write it like {like}, or as '± 0.5 %'")
        return self.number * scale_u / scale / self.divisor


def _phrase(si_unit: str) -> str:
    """A difference in ``si_unit`` in words ('a pressure difference' for Pa)."""
    if not si_unit:
        return "a pure number"
    found = [d for d in DIMENSIONS.values() if d.si_unit == si_unit]
    return next((d.phrase for d in found if d.key.endswith("_difference")), found[0].phrase if found else f"in {si_unit}")


def split_uncertainty(text: str, field: str = "") -> tuple[str, Uncertainty | None]:
    """``text`` as (the value as typed, its :class:`Uncertainty` or None when it has none).

    ``"150 barg ± 2 bar"`` (or ``+-``), ``"20 degC ± 1 K"``, ``"2 m3 ± 0.5 %"``,
    ``"300 K ± 0.5 K (rectangular)"``, ``"(triangular)"``, ``"(k=2)"``; ``(normal)`` is the
    default. Raises InputError naming ``field`` for an uncertainty that is negative, not a
    number, or has a distribution word it does not know.

    >>> split_uncertainty("150 barg ± 2 bar")
    ('150 barg', Uncertainty(text='2 bar', number=2.0, unit='bar', distribution='normal', k=None))
    >>> split_uncertainty("20 degC +- 0.5 K (rectangular)")[1].distribution
    'rectangular'
    """
    if not isinstance(text, str) or ("±" not in text and "+-" not in text):  # the usual case, at once
        return text, None
    sign = min((text.index(s), s) for s in _SIGN if s in text)
    value, rest = text[:sign[0]].strip(), text[sign[0] + len(sign[1]):].strip()
    if any(s in rest for s in _SIGN):
        raise InputError(field, f"give one uncertainty after one ±; got {text!r}")
    written = rest
    distribution, k = "normal", None
    m = _PARENTHESES.match(rest)
    if m and m.group(2).lower() not in _UNIT_MARKS and not m.group(1).rstrip().endswith(("/", "*", "^", "(")):
        rest, word = m.group(1).strip(), m.group(2)
        coverage = _COVERAGE.match(word)
        if coverage:
            try:
                k = float(coverage.group(1))
            except ValueError:
                k = math.nan
            if not (math.isfinite(k) and k > 0):
                raise InputError(field, f"the coverage factor in ({word}) must be a number above 0, like (k=2); "
                                        f"got {text!r}")
        elif word.lower() in DIVISORS:
            distribution = word.lower()
        else:
            raise InputError(field, f"the uncertainty's distribution ({word}) is not one of (normal), "
                                    f"(rectangular), (triangular) or (k=2); got {text!r}")
    if _DECIMAL_COMMA.match(rest):
        raise InputError(field, f"the uncertainty has a comma in its number; write a decimal point, like "
                                f"'± 0.5 bar'; got {text!r}")
    n = _NUMBER.match(rest)
    if not n:
        raise InputError(field, f"expected a number after ±, like '150 barg ± 2 bar' or '± 0.5 %'; got {text!r}")
    number = float(n.group(1))
    if not math.isfinite(number):
        raise InputError(field, f"the uncertainty must be a finite number; got {text!r}")
    if number < 0:
        raise InputError(field, f"an uncertainty is not negative (± says both ways); got {text!r}")
    return value, Uncertainty(written, number, n.group(2).strip(), distribution, k)


@lru_cache(maxsize=512)
def _difference(unit: str) -> tuple[float, str] | str:
    """A difference of one ``unit`` in SI, and the SI unit (a temperature's °C or °F as the
    kelvin difference it is); or what is wrong with the unit."""
    if unit in ("", "-", "1"):
        return 1.0, ""
    plain = unit.replace(" ", "")
    std = _STANDARD.match(plain)
    if std:  # a standard volume counts moles: the rate's own reading (mol/s per unit)
        return read_rate(f"1 {plain}", 1.0, "")[0], "mol/s"
    u = _TEMPERATURE_SPELLINGS.get(unit, unit)
    u = _POWER.sub(r"**\1", u.replace("³", "3").replace("²", "2"))
    problem = _unit_problem(u, unit)
    if problem:
        return problem
    if _is_offset(u):  # a difference of degrees Celsius is one of kelvins, not 274.15 K
        u = "delta_degF" if u.strip() in ("degF", "°F", "fahrenheit") else "delta_degC"
    try:
        q = Q_(1.0, u)
        for d in DIMENSIONS.values():
            if d.key != "dimensionless" and _dimensionality(d.si_unit) == q.dimensionality:
                return float(q.to(d.si_unit).magnitude), d.si_unit
        base = q.to_base_units()
    except Exception:
        return f"{unit!r} is not a unit this program reads"
    return float(base.magnitude), str(base.units)


@lru_cache(maxsize=64)
def _dimensionality(si_unit: str):
    return Q_(1.0, si_unit).dimensionality


def difference_scale(unit: str, field: str = "") -> tuple[float, str]:
    """How much one ``unit`` of a difference is in SI, and that SI unit: ('bar') -> (1e5, 'Pa'),
    ('degC') -> (1.0, 'K'), ('barg') -> (1e5, 'Pa'), ('Nm3/h') -> (0.0124, 'mol/s'); a pure
    number is (1.0, ''). Raises InputError naming ``field`` for a unit it cannot read."""
    found = _difference(_pressure_suffix(unit.strip())[0])
    if isinstance(found, str):
        raise InputError(field, found)
    return found


@dataclass(frozen=True)
class Standard:
    """The standard conditions a standard-volume rate is counted at."""

    prefix: str
    T: float
    """[K]"""
    P: float
    """[Pa]"""
    words: str


#: Standard-volume units as the gas trade writes them, and the conditions each counts at
#: (common practice; the conditions are the ones each name stands for in its standard).
STANDARDS = {
    "Nm3": Standard("Nm3", 273.15, 101325.0, "normal m3 at 0 °C and 1.01325 bar (DIN 1343)"),
    "Sm3": Standard("Sm3", 288.15, 101325.0, "standard m3 at 15 °C and 1.01325 bar (ISO 13443)"),
    "scf": Standard("scf", (60.0 - 32.0) / 1.8 + 273.15, 14.696 * 6894.757293168, "standard ft3 at 60 °F and 14.696 psia"),
}
_STANDARD = re.compile(r"^(MM|M)?(Nm3|Nm\^3|Nm³|Sm3|Sm\^3|Sm³|scf)(.*)$")


def read_rate(text: str, M: float, field: str) -> tuple[float, str]:
    """A stream's rate as typed — mass ('12 t/h'), molar ('30 mol/s') or standard volume
    ('1500 Nm3/h', '2 MMscf/d') — as a molar rate [mol/s], and what was read, in words.

    A standard volume counts the moles an ideal gas has in it at the standard conditions,
    n = P_std V_std / (R T_std) (the trade's own convention). ``M`` [kg/mol] converts a mass rate.

    >>> round(read_rate("1000 kg/h", 0.016043, "rate")[0], 6)
    17.314578
    >>> read_rate("1500 Nm3/h", 0.016043, "rate")[1]
    'standard volume: normal m3 at 0 °C and 1.01325 bar (DIN 1343)'
    """
    if isinstance(text, str) and len(text) <= MAX_TEXT and ("±" in text or "+-" in text):
        value_text, uncertainty = split_uncertainty(text, field)
        rate = read_rate(value_text, M, field)
        if uncertainty is not None:
            uncertainty.standard(value_text, field)
        return rate
    m = _NUMBER.match(text) if isinstance(text, str) else None
    unit = m.group(2).replace(" ", "") if m else ""
    std = _STANDARD.match(unit)
    if m and std:
        scale = {"MM": 1e6, "M": 1e3, None: 1.0}[std.group(1)]
        name = std.group(2).replace("^", "").replace("³", "3")
        standard = STANDARDS[name]
        volume_unit = ("ft**3" if name == "scf" else "m**3") + std.group(3)
        V = parse(f"{float(m.group(1)) * scale!r} {volume_unit}", "volume_rate", field)
        return standard.P * V / (R * standard.T), f"standard volume: {standard.words}"
    try:
        kind, value = dimension_of(text, ("mass_rate", "molar_rate"), field)
    except InputError:
        raise InputError(field, f"must be a mass, molar or standard-volume rate (like '12 t/h', '30 mol/s', "
                                f"'1500 Nm3/h', '2 MMscf/d'); got {text!r}") from None
    if not value > 0:
        raise InputError(field, f"must be a positive rate; got {text!r}")
    return (value / M, "mass rate") if kind == "mass_rate" else (value, "molar rate")


def dimension_of(text: str, candidates: tuple[str, ...], field: str) -> tuple[str, float]:
    """Which of ``candidates`` the typed quantity is, and its SI value.

    Used where one field accepts several kinds (an amount given as moles or
    as kilograms; v given per mole or per kilogram). A text that is wrong
    whatever the dimension (a decimal comma, no number, too long) gets that
    message; a quantity of none of them is told all the dimensions expected.
    """
    phrases = " or ".join(DIMENSIONS[c].phrase for c in candidates)
    value = text  # the value alone says which dimension it is (its uncertainty is checked beside it)
    if isinstance(text, str) and len(text) <= MAX_TEXT and ("±" in text or "+-" in text):
        value = text.partition("±" if "±" in text else "+-")[0].strip()
    for key in candidates:
        try:
            return key, parse(text, key, field)
        except InputError:
            if not (isinstance(value, str) and len(value) <= MAX_TEXT and _convert(value, key)[3]):
                if isinstance(value, str) and not _DECIMAL_COMMA.match(value) and not _NUMBER.match(value):
                    raise InputError(field, _no_number(phrases, key, value)) from None
                raise  # not a question of dimension: the same for every candidate
    raise InputError(field, f"must be {phrases}; got {value!r}")


def to_unit(value: float, si_unit: str, unit: str) -> float:
    """Convert an SI float to ``unit`` (for display)."""
    return float(Q_(value, si_unit).to(unit).magnitude)
