"""Property models by name.

==========================  ============================  =========================
name                        aliases                       what it is
==========================  ============================  =========================
ideal-gas                   ig, ideal                     P v = R T, cp°(T)
van-der-waals               vdw                           cubic, α = 1
redlich-kwong               rk                            cubic, α = Tr^-1/2
soave-redlich-kwong         srk, soave                    cubic, Soave α
peng-robinson               pr                            cubic, Soave α (PR m)
incompressible              liquid, solid                 constant cp and density
reference                   ref, helmholtz                multiparameter EOS (CoolProp)
==========================  ============================  =========================

The reference model is imported only when asked for (CoolProp's import
costs over a second). Importing this package is light (no numpy): the
names and :func:`canonical` serve the terminal app before anything heavy
is loaded; the models load in :func:`make_model`.
"""

from __future__ import annotations

from functools import lru_cache
from typing import TYPE_CHECKING

from ..errors import InputError

if TYPE_CHECKING:
    from ..species import Species
    from .base import Point, PropertyModel

MODEL_NAMES = (
    "ideal-gas",
    "van-der-waals",
    "redlich-kwong",
    "soave-redlich-kwong",
    "peng-robinson",
    "incompressible",
    "reference",
)

ALIASES = {
    "ig": "ideal-gas",
    "ideal": "ideal-gas",
    "vdw": "van-der-waals",
    "rk": "redlich-kwong",
    "srk": "soave-redlich-kwong",
    "soave": "soave-redlich-kwong",
    "pr": "peng-robinson",
    "liquid": "incompressible",
    "solid": "incompressible",
    "ref": "reference",
    "helmholtz": "reference",
}


def canonical(name: str, field: str = "fluid.model") -> str:
    """The model's full name from a name or alias (case-insensitive)."""
    key = (name or "").strip().lower().replace("_", "-").replace(" ", "-")
    key = ALIASES.get(key, key)
    if key not in MODEL_NAMES:
        raise InputError(field, f"unknown model {name!r}; expected one of {', '.join(MODEL_NAMES)}")
    return key


def make_model(name: str, species: Species, params: dict[str, float] | None = None,
               field: str = "fluid.model", kij: dict[tuple[str, str], float] | None = None) -> PropertyModel:
    """The model instance for a species (one per model, species and parameters).

    ``params`` carries model-level overrides from a worksheet: the cubic's
    ``a`` and ``b``, the incompressible model's ``rho`` and heat capacity
    (``cp`` or ``cv``, molar [J/(mol K)]). ``kij`` carries a mixture's binary
    interaction parameters given in the worksheet (pair of species ids ->
    value), read by the cubics in place of the bundled ones (the other models have no use for them).

    Models are immutable once built, apart from what they work out once and
    keep (a cubic's saturation curve, the reference model's CoolProp state
    and constants), so one instance serves every solve that asks for the
    same model: a second solve pays for none of it again.
    """
    key = canonical(name, field)
    if species.composition:
        if key == "incompressible":
            raise InputError(field, f"the incompressible model takes one liquid or solid, not a mixture "
                                    f"({species.formula}); choose ideal-gas, a cubic or reference")
        # kij belong to the cubics' mixing rule; the other models read none (a sweep over models keeps them)
        return _mixture_model(key, species, tuple(sorted((kij or {}).items())) if key in _CUBICS else ())
    if kij:
        raise InputError("fluid.kij", "binary interaction parameters apply to a mixture only")
    return _model(key, species, tuple(sorted((params or {}).items())))


@lru_cache(maxsize=32)
def _mixture_model(key: str, species: Species, kij: tuple) -> PropertyModel:
    if key == "ideal-gas":
        from .idealgas import IdealGas

        return IdealGas(species)
    if key in _CUBICS:
        from .cubic import FORMS
        from .cubic.mixing import CubicMixture

        return CubicMixture(species, FORMS[key], dict(kij))
    from .reference.mixture import ReferenceMixture

    return ReferenceMixture(species)


@lru_cache(maxsize=64)
def _model(key: str, species: Species, items: tuple) -> PropertyModel:
    params = dict(items)
    heat_capacity = {k: params.pop(k) for k in ("cp", "cv") if k in params}
    allowed = {"a", "a_rk", "b"} if key in _CUBICS else {"rho"} if key == "incompressible" else set()
    extra = set(params) - allowed
    if extra:
        raise InputError(
            "fluid.overrides",
            f"{', '.join(sorted({k.replace('a_rk', 'a') for k in extra}))} does not apply to the {key} model",
        )
    if key == "ideal-gas":
        from .idealgas import IdealGas

        return IdealGas(species)
    if key in _CUBICS:
        from .cubic import FORMS, Cubic

        return Cubic(species, FORMS[key], a=params.get("a"), b=params.get("b"), a_rk=params.get("a_rk"))
    if key == "incompressible":
        from .incompressible import Incompressible

        # a liquid or solid has cv = cp: either override is its heat capacity
        molar = heat_capacity.get("cp", heat_capacity.get("cv"))
        return Incompressible(species, rho=params.get("rho"), cp=None if molar is None else molar / species.M)
    from .reference import Reference

    return Reference(species)


def __getattr__(name: str):
    if name in ("Point", "PropertyModel"):  # the interface, loaded with numpy on first use
        from . import base

        return getattr(base, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


_CUBICS = ("van-der-waals", "redlich-kwong", "soave-redlich-kwong", "peng-robinson")

__all__ = ["MODEL_NAMES", "Point", "PropertyModel", "canonical", "make_model"]
