"""The kinds of balance, by ``[system] kind``: one registry.

A worksheet says what its boundary is (``[system] kind``); this registry
says, for each kind, which worksheet sections it reads and which module
balances it. The façade (:mod:`balance.api`) prepares, solves and files a
result (the record's solve entry) through the kind it looks up here, so no
other module branches on the kind.

A kind's module provides four functions:

``prepare(worksheet) -> Problem``
    read the worksheet's text into SI numbers and count its degrees of freedom
    (``Problem.dof``); raise InputError naming the field;
``problems(worksheet) -> list[FieldProblem]``
    every field at fault, each with its message (read as ``prepare`` reads it),
    then what stops ``prepare`` if no field accounts for it; empty exactly when
    ``prepare`` succeeds;
``solve(problem) -> Result``
    solve it; raise SpecificationError or SolveError;
``as_json(result) -> dict``
    everything in the result, quantities as ``{"value", "unit"}`` in SI: what
    ``joulebook solve --json`` prints and what a record's solve entry holds.

Modules are named, not imported, here (as Textual's screen registry names
screens): reading the registry costs nothing, and a kind's numerics load on
its first solve. A new kind (a steady-flow device, a transient vessel) is a
module beside :mod:`balance.balances.closed`, sharing
:mod:`balance.balances.control_volume`, and one :class:`Kind` below.
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import import_module
from types import MappingProxyType

from .errors import InputError


@dataclass(frozen=True)
class Kind:
    """One kind of balance."""

    name: str
    """as ``[system] kind`` writes it"""
    title: str
    """in words, e.g. 'closed system'"""
    sections: tuple[str, ...]
    """the worksheet sections it reads, in the order a record takes them"""
    module: str
    """the module that balances it (``prepare``, ``problems``, ``solve``, ``as_json``)"""
    steps: tuple[str, ...] = ()
    """the steps a worksheet of this kind is built in, in order (the app's step ids, which a
    house procedure's guidance is keyed by; the app's own table must list the same)"""

    def _balance(self):
        return import_module(self.module)

    def prepare(self, worksheet):
        """The problem in SI numbers (``Problem.dof`` counts it); raises InputError naming the field."""
        return self._balance().prepare(worksheet)

    def problems(self, worksheet) -> list:
        """Every field of the worksheet at fault (:class:`~balance.worksheet.FieldProblem`), in its order."""
        return self._balance().problems(worksheet)

    def solve(self, problem):
        """The solved balance; raises SpecificationError or SolveError."""
        return self._balance().solve(problem)

    def as_json(self, result) -> dict:
        """Everything in a result (what a record's solve entry holds after its pins)."""
        return self._balance().as_json(result)


#: The worksheet sections each step edits and commits, by step id (a step not here edits none:
#: solving, review): the app's steps commit them, practice mode compares a trainee's step by them.
STEP_SECTIONS = MappingProxyType({
    "purpose": ("worksheet",), "boundary": ("system",), "fluid": ("fluid",), "states": ("initial", "final"),
    "terms": ("heat", "work"), "constraints": ("process",), "streams": ("stream",), "devices": ("device",),
    "vessels": ("vessel",), "lines": ("line",), "end": ("end", "history"),
})

#: The kinds that can be balanced, by name.
KINDS = MappingProxyType({k.name: k for k in (
    Kind("closed", "closed system",
         ("worksheet", "system", "fluid", "initial", "final", "heat", "work", "process"),
         "balance.balances.closed",
         ("purpose", "boundary", "fluid", "states", "terms", "constraints", "results", "review")),
    Kind("steady-flow", "steady-flow devices",
         ("worksheet", "system", "fluid", "stream", "device"),
         "balance.balances.steady_flow",
         ("purpose", "boundary", "fluid", "streams", "devices", "results", "review")),
    Kind("transient", "transient vessels",
         ("worksheet", "system", "fluid", "vessel", "line", "end", "history"),
         "balance.balances.transient",
         ("purpose", "boundary", "fluid", "vessels", "lines", "end", "results", "review")),
)})

#: Kinds a worksheet may already name, and why they cannot be balanced yet.
RESERVED = MappingProxyType({
    "open": "say which open system: 'steady-flow' for streams through devices at steady state, "
            "'transient' for a vessel filled, vented or equalised over time",
})


def kind_of(name: str, field: str = "system.kind") -> Kind:
    """The kind a worksheet names; raises InputError naming ``field`` for a reserved or unknown one.

    >>> kind_of("closed").title
    'closed system'
    """
    if name in KINDS:
        return KINDS[name]
    if name in RESERVED:
        raise InputError(field, RESERVED[name])
    got = repr(name) if len(name) <= 60 else f"{name[:60]!r}... ({len(name)} characters)"
    raise InputError(field, f"expected one of {', '.join(repr(k) for k in KINDS)}; got {got}")


def known(name: str) -> bool:
    """Whether a worksheet may name this kind (one that can be balanced, or a reserved one)."""
    return name in KINDS or name in RESERVED


__all__ = ["KINDS", "Kind", "RESERVED", "kind_of", "known"]
