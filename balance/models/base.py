"""The one interface every property model offers.

A balance never knows which model it uses: it asks a model for a
:class:`Point` at a pair of specifications (``T`` and ``P``, ``P`` and
``h``, ``v`` and ``u`` ...) and gets every property back in molar SI units.

:meth:`PropertyModel.flash` checks the pair and hands it to the model's
:meth:`~PropertyModel.solve_pair`; each model solves the pairs in its own
way (the cubics and the ideal gas by safeguarded Newton iterations on
(T, v) with the phase decided first, the reference model through
CoolProp's solvers).

One rule for a pair that more than one state meets (T and h on both sides
of an isotherm's Joule-Thomson inversion, u and h ...), in every model:
the state of **largest molar volume** that the model can represent is
returned (of equal volumes, as P and v of water on both sides of its
density maximum, the one of higher entropy), and its :attr:`Point.note`
names the others, so the output says so beside the result
(:func:`choose_largest_volume`).
"""

from __future__ import annotations

import math
from abc import ABC, abstractmethod
from typing import NamedTuple

from ..errors import InputError
from ..species import Species

#: The intensive properties a state may be fixed by.
SPEC_KEYS = ("T", "P", "v", "u", "h", "s", "x")

_UNITS = {"T": "K", "P": "Pa", "v": "m3/mol", "u": "J/mol", "h": "J/mol", "s": "J/(mol K)", "x": ""}


class Point(NamedTuple):
    """Every intensive property of one equilibrium state, molar SI units.

    Immutable. A named tuple rather than a frozen dataclass because models
    build one per state in their inner loops (0.9 µs against 4.5 µs).

    Fields: T [K], P [Pa], v [m3/mol], u, h [J/mol] (relative to the
    model's reference state), s [J/(mol K)], cv, cp [J/(mol K)] (cp is inf
    inside a two-phase region), Z = P v/(R T) [-], phase ('gas', 'liquid',
    'supercritical', 'two-phase' or 'incompressible'), u_dep, h_dep
    [J/mol] and s_dep [J/(mol K)] — the departures from the ideal gas at
    the same T and P (u = u_ig(T) + u_dep), the part a reviewer needs to see
    why a real gas cools when it expands — x (vapour quality [-] where the
    model has two phases, else None), ln_phi (natural log of the fugacity
    coefficient [-]), root (how the volume root was chosen, for the record)
    and note (what a reviewer must know of how this state was chosen: the
    other states that meet the same pair).
    """

    T: float
    P: float
    v: float
    u: float
    h: float
    s: float
    cv: float
    cp: float
    Z: float
    phase: str
    u_dep: float = 0.0
    h_dep: float = 0.0
    s_dep: float = 0.0
    x: float | None = None
    ln_phi: float | None = None
    root: str = ""
    note: str = ""

    @property
    def a(self) -> float:
        """molar Helmholtz energy u - T s [J/mol]"""
        return self.u - self.T * self.s

    def get(self, key: str) -> float:
        return getattr(self, key)

    def as_dict(self) -> dict:
        return self._asdict()


class PropertyModel(ABC):
    """A property model for one species."""

    #: command-line name, e.g. 'peng-robinson'
    name: str = ""
    #: readable name, e.g. 'Peng-Robinson (1976)'
    label: str = ""
    #: whether states inside a two-phase region can be computed
    two_phase: bool = False

    def __init__(self, species: Species):
        self.species = species

    # -- what each model must provide ------------------------------------
    @abstractmethod
    def at_Tv(self, T: float, v: float) -> Point:
        """The state at T [K] and molar volume v [m3/mol]."""

    @abstractmethod
    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K] and P [Pa]."""

    @abstractmethod
    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        """The state fixed by two checked specifications, ``keys`` in SPEC_KEYS order (SI floats)."""

    @property
    @abstractmethod
    def reference_state(self) -> str:
        """Words saying where u, h and s are measured from."""

    def equations(self) -> list[str]:
        """The model's equations, in plain text, for the record."""
        return []

    def warnings(self, p: Point) -> list[str]:
        """What a reviewer should know about this state under this model."""
        return [p.note] if p.note else []

    def T_bounds(self) -> tuple[float, float]:
        """Temperatures [K] the searches run between."""
        return (max(1.0, 0.2 * self.species.Tc), 6000.0)

    def v_bounds(self, T: float) -> tuple[float, float]:
        """Molar volumes [m3/mol] the searches run between at T."""
        return (1e-6, 1e4)

    def flash(self, specs: dict[str, float], field: str = "state") -> Point:
        """The state fixed by exactly two of T, P, v, u, h, s, x (SI floats).

        Raises InputError naming ``field`` when the pair cannot be met.
        """
        check_specs(specs, field)  # first: it names an unknown key before sorting needs it
        keys = tuple(sorted(specs, key=SPEC_KEYS.index))
        if len(keys) != 2:
            listed = ", ".join(keys) or "none"
            raise InputError(field, f"needs exactly two of T, P, v, u, h, s; got {listed}")
        if "x" in keys and not self.two_phase:
            raise InputError(
                f"{field}.x",
                f"quality x needs a model with two phases (the reference model); {self.label} has none",
            )
        return self.solve_pair(keys, (float(specs[keys[0]]), float(specs[keys[1]])), field)


def pair_of(model: "PropertyModel", keys: tuple[str, str], field: str = "state"):
    """A function of the two values of ``keys`` (SPEC_KEYS order) giving the state: ``flash``
    without building and sorting a dict on every call, for a search that asks thousands of times.

    The values are checked as ``flash`` checks them (finite; T, P, v positive; x in 0..1).
    """
    if tuple(sorted(keys, key=SPEC_KEYS.index)) != tuple(keys) or len(keys) != 2 or len(set(keys)) != 2:
        raise ValueError(f"keys must be two of {SPEC_KEYS} in that order; got {keys}")  # a caller's defect
    if "x" in keys and not model.two_phase:
        return lambda a, b: model.flash(dict(zip(keys, (a, b))), field)  # raises the model's own refusal
    solve = model.solve_pair

    def state(a: float, b: float) -> Point:
        if not (math.isfinite(a) and math.isfinite(b)) or (keys[0] in _POSITIVE and not a > 0) \
                or (keys[1] in _POSITIVE and not b > 0) or (keys[1] == "x" and not 0.0 <= b <= 1.0):
            check_specs({keys[0]: a, keys[1]: b}, field)  # raises, naming the value
        return solve(keys, (a, b), field)

    return state


def fmt_spec(key: str, value: float) -> str:
    """'h = 1234.5 J/mol': one specification with its SI unit."""
    unit = _UNITS[key]
    return f"{key} = {value:.6g}" + (f" {unit}" if unit else "")


def ambiguity_note(keys: tuple[str, str], values: tuple[float, float], chosen: Point,
                   others: list[Point], unrepresented: str = "") -> str:
    """The note of the one rule: several states meet the pair, the largest volume is taken.

    ``others`` are the states not taken; ``unrepresented`` names a state the
    model cannot give (a wet state of a cubic) that also meets the pair.
    """
    pair = f"{fmt_spec(keys[0], values[0])} and {fmt_spec(keys[1], values[1])}"
    listed = [f"T = {p.T:.6g} K, P = {p.P:.6g} Pa, v = {p.v:.6g} m3/mol ({p.phase})" for p in others]
    if unrepresented:
        listed.append(unrepresented)
    count = len(listed) + 1
    return (f"{count} states have {pair}: the one of largest volume is taken (T = {chosen.T:.6g} K, "
            f"v = {chosen.v:.6g} m3/mol, {chosen.phase}); also {'; '.join(listed)}. "
            "To take another, fix the state by another pair")


def choose_largest_volume(keys, values, found: list[Point], unrepresented: str = "") -> Point | None:
    """The one rule for several states meeting a pair: the largest volume (of equal volumes,
    the higher entropy), with the note naming the others; None when nothing was found."""
    distinct: list[Point] = []
    for p in found:
        if not any(_same_state(p, q) for q in distinct):
            distinct.append(p)
    if not distinct:
        return None
    v_max = max(p.v for p in distinct)
    chosen = max((p for p in distinct if p.v >= v_max * (1.0 - 1e-9)), key=lambda p: p.s)
    others = sorted((p for p in distinct if p is not chosen), key=lambda p: -p.v)
    if not others and not unrepresented:
        return chosen
    return chosen._replace(note=ambiguity_note(keys, values, chosen, others, unrepresented))


def _same_state(p: Point, q: Point) -> bool:
    return all(abs(a - b) <= 1e-6 * max(abs(a), abs(b)) for a, b in ((p.T, q.T), (p.P, q.P), (p.v, q.v)))


def check_arguments(**values: float) -> None:
    """Reject T [K], P [Pa] or v [m3/mol] that are not finite and positive.

    Called by ``at_TP`` and ``at_Tv``, whose callers may bypass
    :func:`check_specs`; the error names the argument (``T``, ``P`` or
    ``v``). Without it a direct call returned a point full of NaN.
    """
    for key, value in values.items():
        if not (value > 0 and math.isfinite(value)):
            raise InputError(key, f"must be {_POSITIVE[key]}; got {value:g} in SI units")


_POSITIVE = {"T": "an absolute temperature above 0 K", "P": "an absolute pressure above 0",
             "v": "a positive volume"}


def check_specs(specs: dict[str, float], field: str) -> None:
    """Reject values no state can have (T <= 0, P <= 0, v <= 0, x outside 0..1)."""
    for key, value in specs.items():
        if key not in SPEC_KEYS:
            raise InputError(f"{field}.{key}", f"is not a property a state can be fixed by; use {', '.join(SPEC_KEYS)}")
        if not math.isfinite(value):
            raise InputError(f"{field}.{key}", f"must be a finite number; got {value!r}")
        if key in _POSITIVE and value <= 0:
            raise InputError(f"{field}.{key}", f"must be {_POSITIVE[key]}; got {value:g} in SI units")
        if key == "x" and not 0.0 <= value <= 1.0:
            raise InputError(f"{field}.x", f"quality must be between 0 and 1; got {value:g}")
