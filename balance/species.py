"""Pure-species constants and ideal-gas heat capacities.

The data lives in ``balance/data/species.toml`` (its header explains the
layout and where every number came from). This module reads it once, looks
species up by id, formula, name or alias, applies a worksheet's overrides,
and evaluates the ideal-gas heat capacity.

Ideal-gas reference state used by every model built on these polynomials:
the ideal gas at ``T_REF`` = 298.15 K and ``P_REF`` = 1 bar has h = 0 and
s = 0. Balances use changes only, so the choice cancels; the output names it.
"""

from __future__ import annotations

import hashlib
import math
import tomllib
from dataclasses import dataclass, field, replace
from functools import lru_cache
from importlib import resources

import numpy as np

from .errors import InputError
from .units import R, T_REF

DATA_FILE = "species.toml"


def _nasa_terms(t, a, log):
    """cp/R, h/(R T) and s/R [-] of one NASA-7 range at t [K].

    One formula set for both paths: ``t`` and the coefficients ``a`` are
    floats (``log`` is ``math.log``) or numpy arrays (``numpy.log``).
    """
    a1, a2, a3, a4, a5, a6, a7 = a
    cp = a1 + t * (a2 + t * (a3 + t * (a4 + t * a5)))
    h = a1 + t * (a2 / 2 + t * (a3 / 3 + t * (a4 / 4 + t * a5 / 5))) + a6 / t
    s = a1 * log(t) + t * (a2 + t * (a3 / 2 + t * (a4 / 3 + t * a5 / 4))) + a7
    return cp, h, s


@dataclass(frozen=True)
class Nasa7:
    """Ideal-gas heat capacity as two NASA 7-coefficient polynomials.

    cp/R = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4 on each range.
    """

    T_min: float
    """lower limit of the low range [K]"""
    T_mid: float
    """boundary between the ranges [K]"""
    T_max: float
    """upper limit of the high range [K]"""
    low: tuple[float, ...]
    high: tuple[float, ...]

    def coefficients(self, T):
        """The seven coefficients that apply at T [K]: a tuple of floats, or of arrays for an array T."""
        if isinstance(T, float):
            return self.low if T <= self.T_mid else self.high
        below = np.asarray(T) <= self.T_mid
        return tuple(np.where(below, lo, hi) for lo, hi in zip(self.low, self.high))

    def terms(self, T):
        """(cp/R, h/(R T), s/R) [-] at T [K], absolute (with a6, a7); floats or arrays."""
        if isinstance(T, float):
            return _nasa_terms(T, self.coefficients(T), math.log)
        T = np.asarray(T, dtype=float)
        return _nasa_terms(T, self.coefficients(T), np.log)

    def cp_R(self, T):
        """cp/R [-] at T [K]."""
        return self.terms(_arg(T))[0]

    def h_RT(self, T):
        """absolute h/(R T) [-] of the polynomial (with its a6)."""
        return self.terms(_arg(T))[1]

    def s_R(self, T):
        """absolute s°/R [-] of the polynomial (with its a7), at 1 bar."""
        return self.terms(_arg(T))[2]

    @property
    def label(self) -> str:
        return f"NASA 7-coefficient polynomials, {self.T_min:g}-{self.T_mid:g}-{self.T_max:g} K"


def _arg(T):
    """A Python float stays a float (the scalar path); anything else becomes an array."""
    return T if isinstance(T, float) else np.asarray(T, dtype=float)


class HeatCapacityTerms:
    """cp°, h° and s° one at a time, from a class's ``terms(T)`` (all three at once)."""

    def cp(self, T):
        """cp° [J/(mol K)] at T [K] (float or array)."""
        return self.terms(T)[0]

    def h(self, T):
        """h° [J/mol] relative to the ideal gas at 298.15 K."""
        return self.terms(T)[1]

    def s(self, T):
        """s° [J/(mol K)] at 1 bar relative to the ideal gas at 298.15 K, 1 bar."""
        return self.terms(T)[2]


@dataclass(frozen=True)
class IdealGasHeatCapacity(HeatCapacityTerms):
    """cp°(T) of the ideal gas and the h°, s° that follow from it.

    Either the species' NASA polynomials or a constant (a worksheet may set
    a constant cp or cv to reproduce a checker's numbers). :meth:`terms`
    gives all three at once; a Python float T takes the scalar path (plain
    floats, no numpy), an array the vectorised one, through one formula set.
    """

    nasa: Nasa7 | None = None
    constant_cp: float | None = None
    """constant molar heat capacity at constant pressure [J/(mol K)]"""
    _ref: tuple[float, float] = field(init=False, repr=False, compare=False)
    """h/R and s/R [K], [-] of the polynomial at T_REF, subtracted to measure from the reference state"""

    def __post_init__(self):
        if self.nasa is not None:
            cp, h_RT, s_R = self.nasa.terms(float(T_REF))
            object.__setattr__(self, "_ref", (T_REF * h_RT, s_R))
        else:
            object.__setattr__(self, "_ref", (0.0, 0.0))

    def terms(self, T):
        """(cp° [J/(mol K)], h° [J/mol], s° at 1 bar [J/(mol K)]) at T [K], from the reference state.

        >>> cp, h, s = IdealGasHeatCapacity(constant_cp=29.0).terms(398.15)
        >>> round(cp, 6), round(h, 6), round(s, 6)
        (29.0, 2900.0, 8.387731)
        """
        if isinstance(T, float):
            log = math.log
            if self.constant_cp is None:
                n = self.nasa
                cp_R, h_RT, s_R = _nasa_terms(T, n.low if T <= n.T_mid else n.high, log)
        else:
            T, log = np.asarray(T, dtype=float), np.log
            if self.constant_cp is None:
                cp_R, h_RT, s_R = self.nasa.terms(T)
        if self.constant_cp is not None:
            c = self.constant_cp
            return c + 0.0 * T, c * (T - T_REF), c * log(T / T_REF)
        h_ref, s_ref = self._ref
        return R * cp_R, R * (T * h_RT - h_ref), R * (s_R - s_ref)

    def in_range(self, T: float) -> bool:
        if self.constant_cp is not None:
            return True
        return self.nasa.T_min <= T <= self.nasa.T_max

    @property
    def label(self) -> str:
        if self.constant_cp is not None:
            return f"constant cp = {self.constant_cp:.4g} J/(mol K)"
        return self.nasa.label

    @property
    def range_text(self) -> str:
        if self.constant_cp is not None:
            return "any temperature (constant cp)"
        return f"{self.nasa.T_min:g}-{self.nasa.T_max:g} K"


@dataclass(frozen=True)
class LiquidConstants:
    """Constants for the incompressible model."""

    T: float
    """temperature they were evaluated at [K]"""
    rho: float
    """mass density [kg/m3]"""
    cp: float
    """heat capacity [J/(kg K)]"""


@dataclass(frozen=True)
class Species:
    """A pure species: constants with their sources, as read from the data file.

    Overrides from a worksheet make a new ``Species`` (``with_overrides``),
    and ``overrides`` lists what was changed so the output can show it.
    """

    id: str
    name: str
    formula: str
    M: float
    """molar mass [kg/mol]"""
    Tc: float
    """critical temperature [K]"""
    Pc: float
    """critical pressure [Pa]"""
    omega: float
    """acentric factor [-]"""
    cp_ig: IdealGasHeatCapacity
    Vc: float | None = None
    """critical molar volume [m3/mol]"""
    Zc: float | None = None
    cas: str = ""
    aliases: tuple[str, ...] = ()
    coolprop: str | None = None
    """CoolProp fluid name, when the reference model can use it"""
    liquid: LiquidConstants | None = None
    sources: dict = field(default_factory=dict, compare=False)
    overrides: tuple[tuple[str, str], ...] = ()
    """(constant, text as given) pairs set by a worksheet"""
    composition: tuple[tuple[str, float], ...] = ()
    """a mixture's components (species id, mole fraction); () for a pure species (:mod:`balance.mixture`)"""

    def __repr__(self) -> str:
        return f"Species({self.id!r}, M={self.M * 1e3:.4f} g/mol, Tc={self.Tc:g} K, Pc={self.Pc:g} Pa)"


def _data_text() -> bytes:
    return resources.files("balance.data").joinpath(DATA_FILE).read_bytes()


@lru_cache(maxsize=1)
def data_hash() -> str:
    """SHA-256 of the species data file, pinned in every record."""
    return hashlib.sha256(_data_text()).hexdigest()


def _entry(key: str, raw: dict) -> Species:
    cp = raw["cp"]
    nasa = Nasa7(
        T_min=float(cp["T"][0]),
        T_mid=float(cp["T"][1]),
        T_max=float(cp["T"][2]),
        low=tuple(float(a) for a in cp["low"]),
        high=tuple(float(a) for a in cp["high"]),
    )
    liq = raw.get("liquid")
    return Species(
        id=key,
        name=raw["name"],
        formula=raw.get("formula", key),
        M=float(raw["M"]) * 1e-3,
        Tc=float(raw["Tc"]),
        Pc=float(raw["Pc"]),
        omega=float(raw["omega"]),
        cp_ig=IdealGasHeatCapacity(nasa=nasa),
        Vc=float(raw["Vc"]) if "Vc" in raw else None,
        Zc=float(raw["Zc"]) if "Zc" in raw else None,
        cas=raw.get("cas", ""),
        aliases=tuple(raw.get("aliases", ())),
        coolprop=raw.get("coolprop"),
        liquid=LiquidConstants(T=float(liq["T"]), rho=float(liq["rho"]), cp=float(liq["cp"]))
        if liq
        else None,
        sources=dict(raw.get("source", {})),
    )


@lru_cache(maxsize=1)
def catalogue() -> dict[str, Species]:
    """Every species in the data file, by id, in file order."""
    raw = tomllib.loads(_data_text().decode("utf-8"))
    return {key: _entry(key, value) for key, value in raw.items()}


@lru_cache(maxsize=1)
def _index() -> dict[str, str]:
    index: dict[str, str] = {}
    for sp in catalogue().values():
        for name in (sp.id, sp.formula, sp.name, sp.cas, sp.coolprop or "", *sp.aliases):
            if name:
                index.setdefault(_norm(name), sp.id)
    return index


def _norm(name: str) -> str:
    return "".join(ch for ch in name.lower() if ch.isalnum())


#: The longest species name looked up [characters]: the longest name in the data is some thirty.
MAX_NAME = 100


def lookup(name: str, field: str = "species") -> Species:
    """A species by id, formula, name, CAS number or alias (case-insensitive)."""
    if not isinstance(name, str):
        raise InputError(field, f"must be a species name; got {type(name).__name__}")
    if len(name) > MAX_NAME:  # before it is normalised and matched
        raise InputError(field, f"is {len(name)} characters long; a species is named by its id, formula, "
                                f"name or CAS number, at most {MAX_NAME} characters (`joulebook species` lists them)")
    norm = _norm(name)
    key = _index().get(norm)
    if key is None:
        close = [s for s in _index() if norm[:3] and s.startswith(norm[:3])]
        hint = ""
        if close:
            names = sorted({catalogue()[_index()[c]].id for c in close})[:6]
            hint = f"; did you mean {', '.join(names)}?"
        raise InputError(field, f"unknown species {name!r}{hint} (`joulebook species` lists them)")
    return catalogue()[key]


# Each overridable constant and the dimension(s) it is read as.
OVERRIDABLE = {
    "M": "molar_mass",
    "Tc": "temperature",
    "Pc": "pressure",
    "omega": "dimensionless",
    "cp": ("molar_entropy", "specific_entropy"),
    "cv": ("molar_entropy", "specific_entropy"),
    "rho": "density",
    "a": "cubic_a",
    "b": "molar_volume",
}


def with_overrides(sp: Species, overrides: dict[str, str], field: str = "fluid.overrides") -> tuple[Species, dict[str, float]]:
    """Apply a worksheet's overrides to a species.

    Returns the new species and the overrides that belong to a model rather
    than to the species (the cubic's ``a`` and ``b``, the liquid's ``rho``;
    ``cp``/``cv`` also go there, molar, for the incompressible model), as SI
    floats. A constant ``cp`` or ``cv`` replaces the ideal-gas polynomial.
    """
    from .units import dimension_of, parse

    changes: dict = {}
    model_params: dict[str, float] = {}
    shown: list[tuple[str, str]] = []
    constant_cp = None
    for key, text in overrides.items():
        if key not in OVERRIDABLE:
            raise InputError(
                f"{field}.{key}", f"cannot be overridden; expected one of {', '.join(OVERRIDABLE)}"
            )
        dim = OVERRIDABLE[key]
        name = f"{field}.{key}"
        if key == "a":  # a cubic's a at Tc, or Redlich-Kwong's own a (a / √T in the equation)
            kind, value = dimension_of(text, ("cubic_a", "cubic_a_rk"), name)
            if not value > 0:
                raise InputError(name, f"must be positive; got {text!r}")
            model_params["a" if kind == "cubic_a" else "a_rk"] = value
        elif isinstance(dim, tuple):
            kind, value = dimension_of(text, dim, name)
            if kind == "specific_entropy":
                value *= changes.get("M", sp.M)
            if value <= 0:
                raise InputError(name, f"must be positive; got {text!r}")
            constant_cp = value if key == "cp" else value + R
            model_params[key] = value  # molar; the incompressible model takes it as its cp
        else:
            value = parse(text, dim, name)
            if key != "omega" and value <= 0:
                raise InputError(name, f"must be positive; got {text!r}")
            if key in ("a", "b", "rho"):
                model_params[key] = value
            else:
                changes[key] = value
        shown.append((key, str(text)))
    if constant_cp is not None:
        changes["cp_ig"] = IdealGasHeatCapacity(constant_cp=constant_cp)
    if "cp" in overrides and "cv" in overrides:
        raise InputError(field, "give a constant cp or a constant cv, not both")
    if shown:
        changes["overrides"] = tuple(shown)
    return (replace(sp, **changes) if changes else sp), model_params


__all__ = [
    "Species",
    "Nasa7",
    "IdealGasHeatCapacity",
    "LiquidConstants",
    "catalogue",
    "lookup",
    "with_overrides",
    "data_hash",
]
