"""Gas mixtures of fixed composition: mole or mass fractions by species, and the ideal-gas mixture.

A worksheet gives a composition under ``[fluid]`` (``composition = {CH4 = 0.9, C2H6 = 0.1}``,
``fractions = "mole"`` or ``"mass"``, ``normalise = true`` to scale fractions that do not add up
to 1), or names a bundled one (``species = "dry-air"``; ``balance/data/compositions.toml``, each
with its source). :func:`mixture` makes a :class:`~balance.species.Species` of it, so every model
and every kind of balance that reads a species reads the mixture:

* M = Σ yᵢ Mᵢ;
* cp°, h°: mole-weighted; s° = Σ yᵢ sᵢ° − R Σ yᵢ ln yᵢ (the entropy of mixing ideal gases), each
  pure component's h and s measured from its ideal gas at 298.15 K and 1 bar;
* Tc, Pc, ω: Kay's mole-weighted pseudo-critical constants, used only to judge how far from ideal
  the gas is (the model's warnings and advice); a mixture's own critical point is not these.

Only the ideal-gas model takes a mixture in this version: the cubics' mixing rules (with binary
interaction parameters) and the reference model's mixtures are not built yet, and choosing one
for a mixture is refused with that said.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from typing import Mapping

import numpy as np

from .errors import InputError
from .species import HeatCapacityTerms, IdealGasHeatCapacity, Species, lookup
from .units import R, parse

#: How far the fractions may add up from 1 before they are refused (unless normalised).
SUM_TOLERANCE = 1e-6
FRACTIONS = ("mole", "mass")
#: The bundled compositions' file (in balance/data).
COMPOSITIONS_FILE = "compositions.toml"


@dataclass(frozen=True)
class MixtureHeatCapacity(HeatCapacityTerms):
    """cp°, h° and s° (at 1 bar) of an ideal-gas mixture from its components' (mole fractions y)."""

    parts: tuple[tuple[float, IdealGasHeatCapacity], ...]

    @property
    def mixing_entropy(self) -> float:
        """-R Σ y ln y [J/(mol K)]: the entropy of mixing the pure ideal gases at one T and P."""
        return -R * sum(y * math.log(y) for y, _ in self.parts if y > 0.0)

    def terms(self, T):
        """(cp° [J/(mol K)], h° [J/mol], s° at 1 bar [J/(mol K)]) at T [K] (float or array)."""
        cp = h = s = 0.0 if isinstance(T, float) else np.zeros_like(np.asarray(T, dtype=float))
        for y, part in self.parts:
            c, hh, ss = part.terms(T)
            cp, h, s = cp + y * c, h + y * hh, s + y * ss
        return cp, h, s + self.mixing_entropy

    def in_range(self, T: float) -> bool:
        return all(part.in_range(T) for _, part in self.parts)

    @property
    def label(self) -> str:
        return "mole-weighted cp° of the components (each: " + "; ".join(
            dict.fromkeys(part.label for _, part in self.parts)) + ")"

    @property
    def range_text(self) -> str:
        lows = [p.nasa.T_min for _, p in self.parts if p.nasa is not None]
        highs = [p.nasa.T_max for _, p in self.parts if p.nasa is not None]
        return f"{max(lows):g}-{min(highs):g} K (where every component's holds)" if lows else "any temperature"


def _fraction(text, field: str) -> float:
    value = parse(text, "dimensionless", field)
    if not 0.0 <= value <= 1.0:
        raise InputError(field, f"must be a fraction from 0 to 1; got {text!r}")
    return value


def read_composition(composition: Mapping[str, str], fractions: str = "", normalise: bool = False,
                     field: str = "fluid.composition") -> tuple[tuple[Species, float], ...]:
    """The components and their mole fractions, from fractions as typed (species -> text).

    ``fractions`` is ``mole`` (the default when blank) or ``mass``. Fractions that add up to
    more than :data:`SUM_TOLERANCE` from 1 are refused naming the sum, unless ``normalise``.
    Raises InputError naming the field.
    """
    basis = fractions.strip() or "mole"
    if basis not in FRACTIONS:
        raise InputError(field.rsplit(".", 1)[0] + ".fractions", f"expected mole or mass; got {fractions!r}")
    if not composition:
        raise InputError(field, "is empty: give each component's fraction, like {N2 = 0.79, O2 = 0.21}")
    parts: dict[str, tuple[Species, float]] = {}
    for key, text in composition.items():
        sp = lookup(key, f"{field}.{key}")
        if sp.id in parts:
            raise InputError(f"{field}.{key}", f"names {sp.id} a second time")
        parts[sp.id] = (sp, _fraction(text, f"{field}.{key}"))
    total = sum(x for _, x in parts.values())
    if not total > 0.0:
        raise InputError(field, "has no component with a fraction above 0")
    if abs(total - 1.0) > SUM_TOLERANCE and not normalise:
        raise InputError(field, f"the {basis} fractions add up to {total:.9g}, off 1 by {total - 1.0:+.3g} (more than "
                                f"{SUM_TOLERANCE:g}): correct them, or set normalise = true under [fluid] to scale "
                                "them to 1")
    if basis == "mass":
        moles = {k: x / sp.M for k, (sp, x) in parts.items()}
    else:
        moles = {k: x for k, (_, x) in parts.items()}
    n = sum(moles.values())
    return tuple((parts[k][0], moles[k] / n) for k in parts if moles[k] > 0.0)


def mixture(components: tuple[tuple[Species, float], ...], name: str = "") -> Species:
    """The ideal-gas mixture of ``components`` (species, mole fraction) as a Species."""
    words = " + ".join(f"{x:.6g} {sp.id}" for sp, x in components)
    return Species(
        id="mixture",
        name=name or f"mixture of {', '.join(sp.id for sp, _ in components)}",
        formula=words,
        M=sum(x * sp.M for sp, x in components),
        Tc=sum(x * sp.Tc for sp, x in components),
        Pc=sum(x * sp.Pc for sp, x in components),
        omega=sum(x * sp.omega for sp, x in components),
        cp_ig=MixtureHeatCapacity(tuple((x, sp.cp_ig) for sp, x in components)),
        sources={"composition": f"mole fractions {words}",
                 "Tc, Pc, omega": "Kay's rule: mole-weighted pseudo-critical constants (for judging ideality only)"},
        composition=tuple((sp.id, x) for sp, x in components),
    )


def blend(parts, name: str = "", field: str = "device") -> Species:
    """The mixture of species or mixtures in molar amounts: ``parts`` are (Species, amount
    [mol or mol/s]); each mixture's own components are pooled with the others'. A species with
    overrides is refused (its constants are the worksheet's, not its components' data)."""
    moles: dict[str, float] = {}
    for sp, n in parts:
        if sp.overrides:
            raise InputError(field, f"{sp.id} carries overrides of its constants: it cannot be blended with "
                                    "other fluids (the blend reads each component's data)")
        for i, y in sp.composition or ((sp.id, 1.0),):
            moles[i] = moles.get(i, 0.0) + n * y
    total = sum(moles.values())
    if not total > 0.0:
        raise InputError(field, "the streams blended carry no flow")
    return mixture(tuple((lookup(i), x / total) for i, x in moles.items() if x > 0.0), name)


@lru_cache(maxsize=1)
def bundled() -> dict[str, dict]:
    """The bundled compositions by id: name, fractions, composition, source, normalise."""
    import tomllib

    return tomllib.loads(resources.files("balance.data").joinpath(COMPOSITIONS_FILE).read_text(encoding="utf-8"))


def bundled_mixture(name: str) -> Species | None:
    """The bundled composition of id ``name`` as a Species (None: no such composition)."""
    entry = bundled().get(name.strip().lower())
    if entry is None:
        return None
    components = read_composition({k: repr(v) for k, v in entry["composition"].items()}, entry.get("fractions", "mole"),
                                  entry.get("normalise", False), f"compositions.{name}")
    sp = mixture(components, entry.get("name", name))
    from dataclasses import replace

    return replace(sp, sources={**sp.sources, "source": entry["source"]})


def pseudo_pure(sp: Species) -> Species:
    """A mixture as one pseudo-pure gas of its Kay's-rule Tc, Pc and ω: the yardstick the
    ideal-gas model's warnings and the model advice judge ideality by (a pure species as it is)."""
    if not sp.composition:
        return sp
    from dataclasses import replace

    return replace(sp, id="pseudo-pure mixture", composition=())


def wilson_psat(sp: Species, T: float) -> float:
    """Vapour pressure [Pa] of a component at T [K] by Wilson's K-value correlation,
    ln(Psat / Pc) = 5.373 (1 + ω)(1 - Tc / T): an estimate for screening, not a saturation line."""
    return sp.Pc * math.exp(5.373 * (1.0 + sp.omega) * (1.0 - sp.Tc / T))


def dew_screen(sp: Species, T: float, P: float) -> tuple[float, str]:
    """Σ yᵢ P / Psatᵢ(T) with Wilson's vapour pressures (Raoult's law: at or above 1, at or below
    the mixture's dew point, estimated), and the component that contributes most."""
    parts = [(i, y * P / wilson_psat(lookup(i), T)) for i, y in sp.composition]
    worst = max(parts, key=lambda p: p[1])[0] if parts else ""
    return sum(r for _, r in parts), worst
