"""A house procedure as data: what a firm's procedure file says, once read and checked.

The file's layout (every key) is in the README, "House procedures"; :mod:`.load` reads a file
into these types and names the line of every mistake. Nothing here is evaluated as code: a
check is a quantity from :mod:`.quantities`, a comparison from :data:`COMPARISONS` and a limit
with its unit, read once into SI.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

#: How a check compares the result's quantity with its limit: the result must satisfy it.
COMPARISONS = {
    ">=": (lambda value, limit: value >= limit, "at least"),
    "<=": (lambda value, limit: value <= limit, "at most"),
    ">": (lambda value, limit: value > limit, "above"),
    "<": (lambda value, limit: value < limit, "below"),
}
SEVERITIES = ("stop", "warn")
STOP, WARN = SEVERITIES
#: The display units a procedure may choose (the command line's and the app's ``--units``).
UNIT_SYSTEMS = ("si", "metric", "us")


@dataclass(frozen=True)
class Requirable:
    """A worksheet field a procedure may require to be filled in."""

    field: str
    """the name messages use: ``worksheet.job``"""
    step: str
    """the step of the app where it is typed"""
    words: str


#: The fields a procedure may require, and the step each is typed at.
REQUIRABLE: dict[str, Requirable] = {r.field: r for r in (
    Requirable("worksheet.title", "purpose", "a title"),
    Requirable("worksheet.job", "purpose", "a job or calculation number"),
    Requirable("worksheet.purpose", "purpose", "what is asked"),
    Requirable("worksheet.basis", "purpose", "a stated basis"),
    Requirable("worksheet.assumptions", "purpose", "at least one assumption"),
    Requirable("system.inside", "boundary", "what the boundary encloses"),
    Requirable("system.sketch", "boundary", "a sketch of the boundary"),
    Requirable("heat.T_boundary", "terms", "the boundary temperature of every heat term (for the entropy "
                                          "generated)"),
    Requirable("device.T_boundary", "devices", "the boundary temperature of every heater and cooler (for the "
                                               "entropy generated)"),
)}


@dataclass(frozen=True)
class StepGuide:
    """What a procedure says at one step of the app."""

    step: str
    guidance: str = ""
    """what to do and why, in the firm's words"""
    required: tuple[str, ...] = ()
    """keys of :data:`REQUIRABLE`"""


@dataclass(frozen=True)
class ModelRule:
    """Which property models are allowed, always or when a condition holds.

    It applies when any condition given holds (none given: always): the highest pressure
    above ``P_above``, or the lowest reduced temperature T/Tc below ``Tr_below``.
    """

    id: str
    allowed: tuple[str, ...]
    text: str
    """the house rule's own words, shown where a model outside ``allowed`` is chosen"""
    P_above: float | None = None
    """[Pa]"""
    Tr_below: float | None = None
    severity: str = STOP


@dataclass(frozen=True)
class Check:
    """An acceptance check on a solved result: ``quantity compare limit`` must hold."""

    id: str
    quantity: str
    """a key of :data:`.quantities.QUANTITIES`"""
    compare: str
    """a key of :data:`COMPARISONS`"""
    limit: float
    """[SI of the quantity's dimension]"""
    limit_text: str
    """the limit as the procedure writes it ('-29 degC')"""
    severity: str
    message: str
    kinds: tuple[str, ...] = ()
    """the kinds it applies to (blank: every kind of the procedure whose results have the quantity)"""


@dataclass(frozen=True)
class Escalation:
    """A further sign-off role required when a result's quantity is above a threshold."""

    role: str
    quantity: str
    above: float
    """[SI]"""
    above_text: str
    text: str


@dataclass(frozen=True)
class Signoff:
    roles: tuple[str, ...] = ("prepared", "checked")
    """the roles always required, in their order"""
    distinct: bool = True
    """every role signed by a different person"""
    escalations: tuple[Escalation, ...] = ()

    @property
    def all_roles(self) -> tuple[str, ...]:
        """Every role a record under this procedure may be signed in, in order."""
        extra = [e.role for e in self.escalations if e.role not in self.roles]
        return self.roles + tuple(dict.fromkeys(extra))


@dataclass(frozen=True)
class Exercise:
    """A worked exercise for practice mode: the brief a new hire is given and the firm's answer."""

    id: str
    title: str
    brief: str
    answer: Path
    """the model answer: a worksheet beside the procedure file"""
    tolerance: float = 0.01
    """relative tolerance on numbers compared with the answer"""
    hints: dict[str, str] = field(default_factory=dict)
    """step id -> a hint shown before the answer"""


@dataclass(frozen=True)
class Procedure:
    id: str
    title: str
    version: str
    owner: str
    kinds: tuple[str, ...]
    summary: str = ""
    defaults: dict[str, str] = field(default_factory=dict)
    """units, convention, atmosphere (text as written)"""
    steps: dict[str, StepGuide] = field(default_factory=dict)
    model_rules: tuple[ModelRule, ...] = ()
    checks: tuple[Check, ...] = ()
    signoff: Signoff = field(default_factory=Signoff)
    exercises: tuple[Exercise, ...] = ()
    sha256: str = ""
    """of the file's bytes (what a record pins)"""
    path: Path | None = None
    rules: dict = field(default_factory=dict, compare=False)
    """the file's rule tables as read (steps' required fields, model rules, checks, sign-off):
    what a record pins, so that its rules can be applied where the file is not at hand"""

    def guide(self, step: str) -> StepGuide:
        return self.steps.get(step, StepGuide(step))

    def required(self) -> tuple[str, ...]:
        return tuple(f for guide in self.steps.values() for f in guide.required)

    def rule_ids(self) -> tuple[str, ...]:
        """Every rule a worksheet may deviate from (with a justification): the required fields,
        the model rules and the checks."""
        return self.required() + tuple(r.id for r in self.model_rules) + tuple(c.id for c in self.checks)

    def exercise(self, exercise_id: str) -> Exercise | None:
        return next((e for e in self.exercises if e.id == exercise_id), None)

    def pin(self) -> dict:
        """What a record's opening entry keeps of it."""
        return {"id": self.id, "version": self.version, "title": self.title, "sha256": self.sha256,
                "rules": self.rules}
