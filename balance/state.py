"""States: a fluid, a model, an amount and two intensive properties.

``flash(model, T=..., P=...)`` (any two of T, P, v, u, h, s, x in molar SI
units) returns an immutable :class:`State`. ``read_specs`` turns what a
person typed (``{"T": "20 degC", "v": "0.5 m3/kg"}``) into those molar SI
values, accepting mass-based or molar inputs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Mapping

from .errors import InputError
from .models.base import Point, PropertyModel
from .units import P_ATM, dimension_of, parse

if TYPE_CHECKING:
    from .species import Species

#: For each property a person may give: the dimensions it is read as.
SPEC_DIMENSIONS = {
    "T": ("temperature",),
    "P": ("pressure",),
    "v": ("molar_volume", "specific_volume"),
    "rho": ("density", "molar_density"),
    "u": ("molar_energy", "specific_energy"),
    "h": ("molar_energy", "specific_energy"),
    "s": ("molar_entropy", "specific_entropy"),
    "x": ("dimensionless",),
}

#: Units of every quantity in the JSON form (molar SI, pint-parsable).
JSON_UNITS = {
    "T": "K", "P": "Pa", "v": "m**3/mol", "u": "J/mol", "h": "J/mol", "s": "J/(mol*K)",
    "cv": "J/(mol*K)", "cp": "J/(mol*K)", "Z": "dimensionless", "x": "dimensionless",
    "u_dep": "J/mol", "h_dep": "J/mol", "s_dep": "J/(mol*K)", "n": "mol", "m": "kg",
    "V": "m**3", "U": "J", "H": "J", "S": "J/K", "rho": "kg/m**3",
}


def quantity(value: float | None, unit: str) -> dict | None:
    """The JSON encoding of a quantity: {"value": number, "unit": pint unit}."""
    if value is None or not math.isfinite(value):
        return None  # JSON has no inf or NaN (a two-phase cp, an undetermined P)
    return {"value": float(value), "unit": unit}


def read_spec(key: str, text: str, M: float, field: str, p_atm: float = P_ATM) -> tuple[str, float]:
    """One typed property as (key, molar SI value); rho becomes v.

    Parameters
    ----------
    key : str  one of T, P, v, rho, u, h, s, x
    text : str  what was typed
    M : float  molar mass [kg/mol], for mass-based inputs

    Every rule a state puts on one value is applied here, so a check finds what a solve would
    refuse: T above absolute zero, P above vacuum (in :func:`balance.units.parse`), v and rho
    positive, x between 0 and 1.
    """
    if key not in SPEC_DIMENSIONS:
        raise InputError(field, f"unknown property {key!r}; expected one of {', '.join(SPEC_DIMENSIONS)}")
    if key == "P":
        return "P", parse(text, "pressure", field, p_atm=p_atm)
    kind, value = dimension_of(text, SPEC_DIMENSIONS[key], field)
    if key == "rho":
        if not value > 0:
            raise InputError(field, f"must be a positive density; got {text!r}")
        return "v", (M / value if kind == "density" else 1.0 / value)
    if key == "v" and not value > 0:
        raise InputError(field, f"must be a positive volume; got {text!r}")
    if key == "x" and not 0.0 <= value <= 1.0:
        raise InputError(field, f"must be a vapour quality between 0 and 1; got {text!r}")
    if kind in ("specific_volume", "specific_energy", "specific_entropy"):
        value *= M
    return key, value


def read_specs(props: dict[str, str], M: float, where: str, p_atm: float = P_ATM) -> dict[str, float]:
    """Every typed property of a state as molar SI values (unknowns '?' skipped)."""
    out: dict[str, float] = {}
    for key, text in props.items():
        if text.strip() == "?":
            continue
        k, value = read_spec(key, text, M, f"{where}.{key}", p_atm)
        if k in out:
            raise InputError(f"{where}.{key}", "v and rho both fix the volume: give one")
        out[k] = value
    return out


@dataclass(frozen=True)
class State:
    """One state of a known amount of fluid, immutable."""

    name: str
    model: PropertyModel
    point: Point
    n: float
    """amount [mol]"""

    @property
    def M(self) -> float:
        """molar mass [kg/mol]"""
        return self.model.species.M

    @property
    def m(self) -> float:
        """mass [kg]"""
        return self.n * self.M

    @property
    def V(self) -> float:
        """volume [m3]"""
        return self.n * self.point.v

    @property
    def U(self) -> float:
        """internal energy [J], relative to the model's reference state"""
        return self.n * self.point.u

    @property
    def S(self) -> float:
        """entropy [J/K]"""
        return self.n * self.point.s

    def __repr__(self) -> str:
        p = self.point
        return (
            f"State({self.name!r}, {self.model.species.id}, {self.model.name}: T={p.T:.6g} K, "
            f"P={p.P:.6g} Pa, v={p.v:.6g} m3/mol, n={self.n:.6g} mol, {p.phase})"
        )

    def as_json(self) -> dict:
        """Every quantity as {"value", "unit"}; phase and root as text."""
        p = self.point
        out = {k: quantity(getattr(p, k), JSON_UNITS[k]) for k in
               ("T", "P", "v", "u", "h", "s", "cv", "cp", "Z", "u_dep", "h_dep", "s_dep")}
        out["x"] = quantity(p.x, "dimensionless")
        out["rho"] = quantity(self.M / p.v, JSON_UNITS["rho"])
        out.update(n=quantity(self.n, "mol"), m=quantity(self.m, "kg"), V=quantity(self.V, "m**3"))
        out["phase"] = p.phase
        out["root"] = p.root
        out["name"] = self.name
        return out


def flash(model: PropertyModel, name: str = "state", n: float = 1.0, **specs: float) -> State:
    """The state of ``n`` mol fixed by two properties (molar SI).

    >>> from balance.species import lookup
    >>> from balance.models import make_model
    >>> s = flash(make_model("ideal-gas", lookup("N2")), T=300.0, P=1e5)
    >>> round(s.point.v * 1e3, 4)  # L/mol
    24.9434
    """
    point = model.flash(specs, field=name)
    return State(name=name, model=model, point=point, n=n)


def make_fluid(species: str, model: str, overrides: Mapping[str, str] | None = None, *,
               fields: tuple[str, str, str] = ("fluid.species", "fluid.model", "fluid.overrides"),
               composition: Mapping[str, str] | None = None, fractions: str = "", normalise: bool = False,
               named: Mapping[str, Mapping[str, str]] | None = None,
               kij: Mapping[str, str] | None = None,
               ) -> tuple[Species, PropertyModel]:
    """The species (with a worksheet's overrides applied) and the property model for it.

    The one place the pair is built, for a worksheet's problem, the model's
    adequacy advice and the command line's ``state``. ``fields`` name the
    species, the model and the overrides in errors. A ``composition`` (species
    -> fraction as typed, :mod:`balance.mixture`) makes the species a mixture,
    ``species`` then its name; so does a bundled composition's id as
    ``species`` (``dry-air``), or one of the worksheet's ``named`` compositions
    (``[fluid.compositions]``). ``kij`` is a worksheet's ``[fluid.kij]`` table (pair -> value
    as typed), read against the mixture's components; with several named compositions, each
    reads the pairs of its own components. Raises InputError.
    """
    from .models import make_model
    from .species import with_overrides

    sp = species_named(species, composition, fractions, normalise, fields[0], named)
    if sp.composition and overrides:
        raise InputError(fields[2], "do not apply to a mixture: its constants follow from its components' data")
    sp, params = with_overrides(sp, dict(overrides or {}), fields[2])
    return sp, make_model(model, sp, params, field=fields[1], kij=_kij_of(sp, kij, several=bool(named)))


def _kij_of(sp: Species, table: Mapping[str, str] | None, several: bool) -> dict | None:
    """The pairs of ``table`` ([fluid.kij]) for the mixture ``sp``, checked; None when none apply."""
    if not table:
        return None
    from .interaction import pair_ids, read_kij

    if not sp.composition:
        raise InputError("fluid.kij", f"binary interaction parameters apply to a mixture; {sp.name} is one species")
    ids = [i for i, _ in sp.composition]
    if several:  # each named composition takes the pairs of its own components
        table = {k: v for k, v in table.items() if set(pair_ids(k, f"fluid.kij.{k}")) <= set(ids)}
    return read_kij(table, ids) or None


def blended_model(models, amounts, kij: Mapping[str, str] | None = None, field: str = "device",
                  name: str = "") -> PropertyModel:
    """The model of a blend of streams (a mixer's inlets of different fluids): their species pooled
    in the molar ``amounts`` [mol/s] (:func:`balance.mixture.blend`) on the one model they share,
    with the worksheet's ``kij`` ([fluid.kij]). Raises InputError naming ``field``."""
    from .mixture import blend
    from .models import make_model

    names = sorted({m.name for m in models})
    if len(names) > 1:
        raise InputError(field, f"blends streams on different models ({', '.join(names)}): give its inlets one model")
    if names[0] == "reference" and any(not m.species.composition for m in models):
        # a pure fluid's reference model measures from CoolProp's own reference state, the mixture's
        # from each component's ideal gas at 298.15 K and 1 bar: their energies would not add
        raise InputError(field, "blends pure fluids on the reference model, whose h and s are measured from each "
                                "fluid's own CoolProp reference state, not from the ideal gas the mixture's are: "
                                "their energies do not add; blend them on a cubic or the ideal gas")
    sp = blend([(m.species, n) for m, n in zip(models, amounts)], name, field)
    return make_model(names[0], sp, kij=_kij_of(sp, kij, several=True))


def species_named(species: str, composition: Mapping[str, str] | None = None, fractions: str = "",
                  normalise: bool = False, field: str = "fluid.species",
                  named: Mapping[str, Mapping[str, str]] | None = None) -> Species:
    """A pure species by name, one of the ``named`` compositions or a bundled one by its name, or
    the mixture of ``composition`` (named ``species``). Raises InputError naming the field."""
    from .mixture import bundled_mixture, mixture, read_composition
    from .species import lookup

    if composition:
        where = field.rsplit(".", 1)[0]
        return mixture(read_composition(composition, fractions, normalise, f"{where}.composition"), species)
    if named and species in named:
        return mixture(read_composition(named[species], fractions, normalise, f"fluid.compositions.{species}"),
                       species)
    found = bundled_mixture(species) if isinstance(species, str) and species.strip() else None
    return found if found is not None else lookup(species, field)


def species_of(fluid) -> Species:
    """The species (or mixture) of a worksheet's ``[fluid]`` section, without its overrides."""
    return species_named(fluid.species, fluid.composition, fluid.fractions, fluid.normalise,
                         named=fluid.compositions)


def fluid_pair(fluid, model: str | None = None) -> tuple[Species, PropertyModel]:
    """:func:`make_fluid` for a worksheet's ``[fluid]`` section (a :class:`~balance.worksheet.Fluid`),
    on its own model or ``model``."""
    return make_fluid(fluid.species, model or fluid.model, fluid.overrides, composition=fluid.composition,
                      fractions=fluid.fractions, normalise=fluid.normalise, named=fluid.compositions, kij=fluid.kij)
