"""What every form of the control-volume balance shares.

A closed system, a steady-flow device and a transient vessel are forms of
one balance of mass, energy and entropy; this module holds the pieces they
have in common, so that a new kind is written beside the closed one rather
than threaded through it.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

from ..convention import Convention
from ..errors import InputError
from ..state import SPEC_DIMENSIONS, read_spec
from ..units import P_ATM, dimension_of, parse
from ..worksheet import UNKNOWN, HeatTerm, WorkTerm

#: A balance closes when its scaled residual is below this.
TOLERANCE = 1e-9
#: The energy balance recomputed from the states' extensive values must close below this (relative).
RESIDUAL_LIMIT = 1e-7
#: S_gen below -this × n R is an impossible process rather than round-off.
SGEN_TOLERANCE = 1e-7


# -- numbers in the equations, as engineers write them --------------------------------------
def number(x: float) -> str:
    """A number to six digits ("0" for a negative zero)."""
    t = f"{x:.6g}"
    return "0" if t == "-0" else t


def factor(x: float) -> str:
    """A number as a factor after ×: a negative one in parentheses, as engineers write it."""
    return f"({number(x)})" if x < 0 else number(x)


def minus(x: float) -> str:
    """`` - x`` written as an engineer would: `` + 5`` for x = -5."""
    return f" + {number(-x)}" if x < 0 else f" - {number(x)}"


#: The kinds of value a balance may solve for, and how a message names each.
_WORDS = {
    "heat": lambda name: f"Q '{name}'",
    "work": lambda name: f"W '{name}'",
    "amount": lambda name: "amount n",
    "state": lambda name: f"final-state property {name}",
}


@dataclass(frozen=True)
class Unknown:
    """One value a balance solves for: a heat or work term (by its name), the amount,
    or a free property of the final state (numbered ``"1"``, ``"2"``).

    >>> Unknown("heat", "jacket").words()
    "Q 'jacket'"
    >>> Unknown("amount").words()
    'amount n'
    """

    kind: str
    """'heat', 'work', 'amount' or 'state'"""
    name: str = ""

    def __post_init__(self) -> None:
        if self.kind not in _WORDS:  # a defect of the caller, not of the input
            raise ValueError(f"unknown kind {self.kind!r}; expected one of {', '.join(_WORDS)}")

    def words(self) -> str:
        """How messages and explanations name it: ``Q 'jacket'``, ``W 'shaft'``, ``amount n``."""
        return _WORDS[self.kind](self.name)

    def __str__(self) -> str:
        return self.words()


# -- the terms that cross the boundary ---------------------------------------------------
@dataclass(frozen=True)
class Heat:
    """A heat term as the balance reads it."""

    name: str
    Q: float | None
    """heat to the system [J]; None when unknown"""
    T_boundary: float | None
    """boundary or reservoir temperature [K]"""
    T_boundary_note: str = ""
    """where T_boundary came from when the worksheet did not give it"""

    @property
    def unknown(self) -> Unknown:
        return Unknown("heat", self.name)


@dataclass(frozen=True)
class Work:
    """A work term as the balance reads it."""

    name: str
    kind: str
    W_on: float | None
    """work done on the system [J]; None when unknown"""

    @property
    def unknown(self) -> Unknown:
        return Unknown("work", self.name)


@dataclass(frozen=True)
class Term:
    """One term of the energy balance, in the canonical sign (on/to the system)."""

    kind: str
    """'heat', 'work' or 'boundary work'"""
    name: str
    value: float
    """[J], heat to / work on the system"""
    solved: bool = False
    """True when the value was an unknown"""
    T_boundary: float | None = None
    detail: str = ""


def check_term_names(heat: tuple[HeatTerm, ...], work: tuple[WorkTerm, ...]) -> None:
    """Refuse two heat (or work) terms of one name: they would share one unknown."""
    for kind, terms in (("heat", heat), ("work", work)):
        names = [t.name for t in terms]
        twice = sorted({n for n in names if names.count(n) > 1})
        if twice:
            raise InputError(kind, f"two {kind} terms are named {twice[0]!r}: give each its own name")


# -- the fields, one rule each: what a balance reads, the checks (api.problems) and the app apply
def read_atmosphere(text: str, field: str = "worksheet.atmosphere") -> float:
    """The atmospheric pressure gauge readings are taken against [Pa] (blank: the standard
    atmosphere): an absolute pressure above vacuum; raises InputError naming ``field``."""
    return parse(text or "1.01325 bar", "pressure", field, gauge=False)


def read_amount(key: str, text: str, M: float, field: str) -> float:
    """An amount as typed, ``n`` (moles, or a mass) or ``m`` (a mass), in mol [mol]; positive.

    ``M`` : float  molar mass [kg/mol]
    """
    if key == "m":
        n = parse(text, "mass", field) / M
    else:
        kind, value = dimension_of(text, ("amount", "mass"), field)
        n = value if kind == "amount" else value / M
    _positive(n, text, field)
    return n


def read_volume(text: str, field: str) -> float:
    """A volume as typed [m3]; positive."""
    V = parse(text, "volume", field)
    _positive(V, text, field)
    return V


#: The largest polytropic exponent taken: beyond it the path is a rigid vessel to within parts
#: per million of the volume (v2/v1 = (P1/P2)^(1/n)), and 'rigid' says so plainly.
N_POLY_MAX = 1e6


def read_polytropic_n(text: str, field: str = "process.n") -> float:
    """The polytropic exponent n of P v^n = const [-], 0 <= n <= N_POLY_MAX; raises InputError."""
    if not text.strip():
        raise InputError(field, "give the polytropic exponent n, e.g. 1.3")
    n = parse(text, "dimensionless", field)
    if not 0.0 <= n <= N_POLY_MAX:
        raise InputError(field, f"expected a polytropic exponent from 0 (isobaric) to {N_POLY_MAX:g} "
                                f"(beyond that, tick 'rigid'); got {text!r}")
    return n


def read_field(kind: str, text: str, field: str, *, p_atm: float = P_ATM, M: float = 1.0) -> float:
    """One typed value, in SI, by every rule a balance applies to a field of ``kind``; raises
    InputError naming ``field``. A balance reads its worksheet with the same functions.

    ``kind`` is a state property (T, P, v, rho, u, h, s, x: molar SI, rho as v), an amount
    (n, m as mol; V), or ``atmosphere``, ``T_boundary``, ``energy`` (Q, W, ΔKE, ΔPE),
    ``polytropic_n``. ``M`` [kg/mol] scales mass-based values (any positive M checks a text).
    """
    if kind in SPEC_DIMENSIONS:
        return read_spec(kind, text, M, field, p_atm)[1]
    if kind in ("n", "m"):
        return read_amount(kind, text, M, field)
    if kind == "V":
        return read_volume(text, field)
    if kind == "atmosphere":
        return read_atmosphere(text, field)
    if kind == "T_boundary":
        return parse(text, "temperature", field)
    if kind == "energy":
        return parse(text, "energy", field)
    if kind == "polytropic_n":
        return read_polytropic_n(text, field)
    raise ValueError(f"unknown kind of field {kind!r}")  # a caller's defect, not the input's


def _positive(value: float, text: str, field: str) -> None:
    if not value > 0:
        raise InputError(field, f"must be positive; got {text!r}")


def read_heat(h: HeatTerm, T_default: float | None = None, T_note: str = "") -> Heat:
    """A heat term's numbers; ``T_default`` [K] (with ``T_note`` saying why) stands in for a
    boundary temperature the worksheet leaves out."""
    where = f"heat '{h.name}'"
    Q = None if h.Q.strip() == UNKNOWN else read_field("energy", h.Q, f"{where}.Q")
    Tb, note = None, ""
    if h.T_boundary:
        Tb = read_field("T_boundary", h.T_boundary, f"{where}.T_boundary")
    elif T_default is not None:
        Tb, note = T_default, T_note
    return Heat(h.name, Q, Tb, note)


def read_work(w: WorkTerm, convention: Convention) -> Work:
    """A work term's numbers, in the canonical sign (done on the system)."""
    if w.W.strip() == UNKNOWN:
        return Work(w.name, w.kind, None)
    return Work(w.name, w.kind, convention.work_on(read_field("energy", w.W, f"work '{w.name}'.W")))


# -- the entropy balance of the heat terms ---------------------------------------------------
def surroundings_entropy(terms) -> float | None:
    """ΔS of the surroundings [J/K], -Σ Q/T_boundary, or None when a heat term has no T_boundary."""
    heats = [t for t in terms if t.kind == "heat"]
    if any(t.T_boundary is None for t in heats):
        return None
    return -sum(t.value / t.T_boundary for t in heats)


def heat_direction_warnings(terms, T_final: float) -> list[str]:
    """Heat that would have to flow up a temperature difference by the end.

    The entropy balance with one boundary temperature can stay positive
    although the system ends hotter than the source feeding it (most heat went
    in while it was colder); heat alone still cannot do that.
    """
    out = []
    for t in terms:
        if t.kind != "heat" or t.T_boundary is None or t.detail:  # detail: T_b is the system's own
            continue
        if t.value > 0 and T_final > t.T_boundary * (1 + 1e-9):
            side, verb = "comes from", "hotter"
        elif t.value < 0 and T_final < t.T_boundary * (1 - 1e-9):
            side, verb = "goes to", "colder"
        else:
            continue
        out.append(
            f"heat term '{t.name}' {side} {t.T_boundary - 273.15:.1f} °C but the system ends {verb}, at "
            f"{T_final - 273.15:.1f} °C: heat alone cannot do that; check Q and T_boundary"
        )
    return out


# -- counting and eliminating ----------------------------------------------------------------
@dataclass(frozen=True)
class Dof:
    """The degrees-of-freedom count, with the words that explain it."""

    unknowns: tuple[Unknown, ...]
    equations: tuple[str, ...]
    fixed: tuple[str, ...]
    """what fixes the final state, e.g. 'v by rigid'"""
    message: str
    implied: tuple[str, ...] = ()
    """equations a constraint adds that the others already imply, and why (not counted again)"""

    @property
    def ok(self) -> bool:
        return len(self.unknowns) == len(self.equations)


def best_rows(A, k: int) -> list[int] | None:
    """The ``k`` rows of ``A`` (equations × linear unknowns) that fix the unknowns best
    (largest |det|), or None when no ``k`` rows fix them (they do not enter independently)."""
    import numpy as np

    best, best_det = None, 0.0
    for rows in itertools.combinations(range(A.shape[0]), k):
        det = abs(np.linalg.det(A[list(rows)]))
        if det > best_det * (1 + 1e-12):
            best, best_det = list(rows), det
    return best if best_det > 1e-14 else None
