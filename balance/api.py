"""The façade: the one way the app, the command line and the record reach the domain.

Read a worksheet, check it (and list every field at fault: :func:`problems`),
solve it, explain it, draw it; build the species-and-model pair; and turn a
solve that has already been done into the data of a record's solve entry. A face never solves again what this
module has solved: the app shows a :class:`Attempt`'s result and the record
files the same attempt (:func:`entry_data`); only a replay solves again, on
purpose.

>>> from balance import api
>>> ws = api.read('''
... [fluid]
... species = "N2"
... model = "ideal-gas"
... [[initial]]
... T = "300 K"
... P = "10 bar"
... n = "1 mol"
... [final]
... T = "350 K"
... [[heat]]
... name = "jacket"
... Q = "?"
... [process]
... constraints = ["rigid"]
... ''')
>>> api.check(ws).message
'1 unknown, 1 equation: ready to solve'
>>> solved = api.attempt(ws)
>>> round(solved.result.terms[0].value)  # Q 'jacket' [J]
1042
>>> sorted(api.entry_data(solved))[:3]
['S_gen', 'cautions', 'convention']
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Mapping, Sequence, Union

from .errors import BalanceError
from .kinds import kind_of
from .units import P_ATM
from .worksheet import FieldProblem, Worksheet

if TYPE_CHECKING:  # the rest loads on first use: the app imports this module before its first screen
    from .adequacy import Advice
    from .balances.closed import Problem, Result
    from .kinds import Kind
    from .models.base import PropertyModel
    from .diagrams import Trace
    from .species import Species

#: What :func:`read` takes: TOML text, a path, the sections as plain data, or a worksheet.
Source = Union[str, os.PathLike, Mapping, Worksheet]

def fluid(species: str, model: str, overrides: Mapping[str, str] | None = None, *,
          fields: tuple[str, str, str] = ("fluid.species", "fluid.model", "fluid.overrides"),
          composition: Mapping[str, str] | None = None, fractions: str = "", normalise: bool = False,
          kij: Mapping[str, str] | None = None) -> tuple[Species, PropertyModel]:
    """The species (with a worksheet's overrides applied) and the property model for it.

    ``fields`` name the species, the model and the overrides in errors (the
    command line's ``state`` names its arguments); a ``composition`` (species -> fraction
    as typed) makes a mixture named ``species``, ``kij`` its cubic's interaction parameters
    ("A-B" -> value as typed). Raises InputError.
    """
    from .state import make_fluid

    return make_fluid(species, model, overrides, fields=fields, composition=composition, fractions=fractions,
                      normalise=normalise, kij=kij)


def phases(model: PropertyModel, T: float, P: float):
    """A mixture's phase at T [K], P [Pa] under a cubic: its two-phase region's edges along the
    isobar and the isotherm, and the isothermal flash where it splits
    (:class:`balance.models.cubic.phases.PhaseReport`); None for a pure fluid or another model."""
    if getattr(model, "mixing", None) is None:
        return None
    from .models.cubic.phases import report

    return report(model, T, P)


def read_field(kind: str, text: str, field: str, *, p_atm: float = P_ATM, M: float = 1.0) -> float:
    """One typed value in SI, by every rule the solve applies to a field of ``kind``: what the
    app checks each field with as it is typed, so that a field the solve would refuse is shown
    at fault where it is typed. Raises InputError naming ``field``.

    ``kind``: a state property (T, P, v, rho, u, h, s, x; molar SI, rho read as v), an amount
    (n and m in mol, V), ``atmosphere``, ``T_boundary``, ``energy`` (Q, W, ΔKE, ΔPE) or
    ``polytropic_n``; ``p_atm`` [Pa] is the atmosphere of gauge readings, ``M`` [kg/mol] scales
    mass-based values (any positive M checks a text).

    >>> read_field("T", "25 C", "final.T")
    298.15
    >>> read_field("P", "-2 barg", "final.P")
    Traceback (most recent call last):
    ...
    balance.errors.InputError: final.P: is at or below vacuum: '-2 barg' is -0.98675 bar absolute against an atmosphere of 1.01325 bar; a gauge reading cannot be below -1.01325 bar(g)
    """
    from .balances.control_volume import read_field as read_one

    return read_one(kind, text, field, p_atm=p_atm, M=M)


def read(source: Source, name: str = "worksheet") -> Worksheet:
    """A worksheet from TOML text, a file path, its sections as plain data (a worksheet
    file's layout, as a record's step entries fold to) or a Worksheet (returned as it is).

    Raises InputError naming the field, or ``name`` for text that is not TOML.
    """
    if isinstance(source, Worksheet):
        return source
    if isinstance(source, Mapping):
        return Worksheet.from_dict(dict(source))
    if isinstance(source, os.PathLike):
        return Worksheet.load(source)
    return Worksheet.from_toml(source, name)


def kind(ws: Worksheet) -> Kind:
    """The kind of balance the worksheet's ``[system] kind`` names (:mod:`balance.kinds`);
    raises InputError naming ``system.kind`` for one that cannot be balanced."""
    return kind_of(ws.system.kind)


def prepare(source: Source) -> Problem:
    """The problem in SI numbers, its degrees of freedom counted (``Problem.dof``);
    raises InputError naming the field."""
    ws = read(source)
    return kind(ws).prepare(ws)


# -- checking ----------------------------------------------------------------------------
@dataclass(frozen=True)
class Check:
    """A worksheet checked: its degrees of freedom in words, or what stops the count."""

    worksheet: Worksheet
    ready: bool
    """as many unknowns as equations: the balance can be solved"""
    message: str
    """the degrees-of-freedom line, or the error"""
    unknowns: tuple[str, ...] = ()
    """what the balance will solve for, in words (``Q 'jacket'``, ``amount n``)"""
    equations: tuple[str, ...] = ()
    fixed: tuple[str, ...] = ()
    """what fixes the final state, e.g. 'v by rigid'"""
    path: str = ""
    constraints: tuple[str, ...] = ()
    """the constraints in force, with the ones implied (free expansion ⇒ rigid, adiabatic)"""
    error: str = ""
    """what stopped the count (``field: what was expected``), or '' when it was made"""
    error_field: str = ""
    """the field the error names"""
    problem: Problem | None = field(default=None, repr=False, compare=False)
    """the problem prepared for the count (None when it failed): :func:`solve` takes it on"""


def check(ws: Worksheet) -> Check:
    """Prepare the problem and count its degrees of freedom; never raises for bad input.

    Every rule the solve applies to a field is applied here (through the same readers), so a
    check is never ready for what the solve then refuses for a value typed; ``error_field`` is
    the first field at fault, and :func:`problems` lists them all.
    """
    try:
        problem = prepare(ws)
        dof = problem.dof
    except BalanceError as exc:
        return Check(ws, False, str(exc), error=str(exc), error_field=getattr(exc, "field", ""))
    return Check(ws, dof.ok, dof.message, tuple(u.words() for u in dof.unknowns), dof.equations, dof.fixed,
                 getattr(problem, "path", ""), getattr(problem, "constraints", ()), problem=problem)


def problems(source: Source) -> tuple[FieldProblem, ...]:
    """Every field of a worksheet at fault, not only the first: each a
    :class:`~balance.worksheet.FieldProblem` (the field as messages name it, the message, and
    where it is: the section, which compartment or term, the key), in the worksheet's order.

    Each field is read by the rule the solve reads it with (a temperature above absolute zero,
    a pressure above vacuum, an amount above zero, a known species ...), then what stops the
    problem being prepared (a final T that a ticked constraint contradicts, a missing path) is
    added when no field already accounts for it. Empty exactly when :func:`check` gets as far
    as counting the degrees of freedom; a text that is not a worksheet is one problem. Never
    raises for bad input.
    """
    from .worksheet import place

    try:
        ws = read(source, "the worksheet")  # not 'worksheet': that is the heading's section
        return tuple(kind(ws).problems(ws))
    except BalanceError as exc:  # it is not a worksheet, or of no kind that can be balanced
        return (place(Worksheet(), getattr(exc, "field", ""), getattr(exc, "message", str(exc))),)


# -- solving -----------------------------------------------------------------------------
def solve(source: Source | Check) -> Result:
    """The solved balance; raises InputError, SpecificationError or SolveError.

    A :class:`Check` is solved from the problem it prepared (not prepared again).
    """
    if isinstance(source, Check):
        problem = source.problem if source.problem is not None else prepare(source.worksheet)
        return kind(problem.worksheet).solve(problem)
    ws = read(source)
    balance = kind(ws)
    return balance.solve(balance.prepare(ws))


@dataclass(frozen=True)
class Attempt:
    """One solve as a record files it: the result, or why there is none.

    Plain data (it crosses from the reference model's process pickled).
    """

    worksheet: Worksheet | None
    """what was solved (None when the source could not be read as a worksheet)"""
    result: Result | None = None
    error_kind: str = ""
    """the error's kind: 'InputError', 'SolveError' ... or 'numerical error (ZeroDivisionError)'"""
    error: str = ""

    @property
    def ok(self) -> bool:
        return self.result is not None

    @property
    def message(self) -> str:
        """The error as a person reads it ('' when solved)."""
        if self.ok or not self.error_kind.startswith("numerical"):
            return self.error
        return f"{self.error_kind}: {self.error}"


def attempt(source: Source) -> Attempt:
    """Read and solve; a failure (bad input, no solution, numerical trouble inside a
    model) is returned as the attempt's error, never raised."""
    ws = None
    try:
        ws = read(source)
        return Attempt(ws, solve(ws))
    except BalanceError as exc:
        return Attempt(ws, error_kind=type(exc).__name__, error=str(exc))
    except (ArithmeticError, ValueError) as exc:  # a model's numerical trouble: recorded, not raised
        return Attempt(ws, error_kind=f"numerical error ({type(exc).__name__})", error=str(exc) or type(exc).__name__)


def explain(result: Result) -> list[str]:
    """The equations of a result with its numbers, one line each (worked out by the solve)."""
    return list(result.equations)


def as_json(result: Result) -> dict:
    """Everything in a result; quantities as {"value", "unit"} (SI): what ``joulebook solve
    --json`` prints and a record's solve entry holds, as the result's kind writes it."""
    return kind(result.problem.worksheet).as_json(result)


# -- the record's solve entry ------------------------------------------------------------
def pins() -> dict:
    """What the numbers depend on, for the running joulebook: its version and the species data."""
    from . import __version__
    from .species import data_hash

    return {"joulebook": __version__, "species_data_sha256": data_hash()}


def entry_data(solved: Attempt, propagation=None) -> dict:
    """The data of a record's solve entry for an attempt already made: the pins, then the
    result's JSON, or ``error_kind`` and ``error``. Needs no solve and no CoolProp: the
    reference model's attempt serves as it comes back from its process. Only a worksheet
    whose values carry uncertainties adds its first-order budget (``uncertainty``), which
    solves the cases x ± h here, on the worksheet's model, unless ``propagation`` (that
    budget, :func:`uncertainty` of this solve) is handed in."""
    data = pins()
    if solved.result is None:
        data.update(error_kind=solved.error_kind, error=solved.error)
    else:
        data.update(as_json(solved.result))
        mixtures = mixture_pins(solved.result)
        if mixtures:
            data["mixtures"] = mixtures
        budget = _uncertainty_entry(solved, propagation)
        if budget is not None:
            data["uncertainty"] = budget
    return data


def _uncertainty_entry(solved: Attempt, propagation=None) -> dict | None:
    """The first-order budget a solve entry keeps when a value of its worksheet carries an
    uncertainty (None when none does: such an entry is as it always was). Solves the cases
    x ± h here unless ``propagation`` has them; a budget that cannot be made is filed as why."""
    from .study.uncertainty import has_uncertain_inputs

    ws = solved.worksheet
    try:
        if ws is None or not has_uncertain_inputs(ws):
            return None
        made = propagation if propagation is not None else uncertainty(ws, result=solved.result)
        return made.as_json(monte_carlo=False)
    except BalanceError as exc:
        return {"error": str(exc)}


def mixture_pins(result) -> list[dict]:
    """What a cubic mixture's numbers depend on beyond the species data: for each such model the
    result uses (a stream's, a blend's), its composition and every kij with its source (the record
    keeps them)."""
    # a closed or transient problem's one model, or each steady-flow stream's as solved (a blend's too)
    models = [getattr(result.problem, "model", None), *(f.model for f in getattr(result, "flows", {}).values())]
    out, seen = [], set()
    for m in models:
        kij = getattr(m, "kij", None)
        if kij is None or id(m) in seen:
            continue
        seen.add(id(m))
        out.append({"model": m.name, "composition": dict(m.species.composition),
                    "kij": [{"pair": f"{i}-{j}", "value": k, "source": src} for i, j, k, src in kij.used]})
    return out


# -- studies: many solves of one worksheet ----------------------------------------------------
def _row(result: Result | None, message: str = "", main: bool = True) -> dict:
    """A study's row of one case: {"ok", "message", "values", "main"} (:mod:`balance.study.table`),
    the kind's main results named only when ``main``."""
    from .study.table import flatten, main_results

    if result is None:
        return {"ok": False, "message": message, "values": {}, "main": ()}
    data = as_json(result)
    return {"ok": True, "message": "", "values": flatten(data), "main": tuple(main_results(data)) if main else ()}


def case_row(text: str) -> dict:
    """One case of a study, from its worksheet's TOML text: {"ok", "message", "values", "main"}
    (:mod:`balance.study.table`). Module-level and plain in and out: a process pool runs it."""
    solved = attempt(text)
    return _row(solved.result, solved.message)


def sweep(ws: Worksheet, vary: Sequence[str], points: int | None = None, *, together: bool = False,
          jobs: int = 1, progress=None):
    """The worksheet solved over ``--vary PATH=VALUES`` fields (:mod:`balance.study.sweep`): every
    case a row, a failed one with its message. Raises InputError for a bad path or range."""
    from .study.sweep import read_varies, run

    return run(ws, read_varies(ws, vary, points), case_row, together=together, jobs=jobs, progress=progress)


def uncertainty_row(source: Source) -> dict:
    """One case of an uncertainty study (a worksheet, or its TOML text): :func:`case_row` without
    the main results, which the nominal case alone names (a Monte Carlo run solves this thousands
    of times). Module-level: a process pool runs it."""
    solved = attempt(source)
    return _row(solved.result, solved.message, main=False)


def uncertainty(ws: Worksheet, *, result: Result | None = None, columns: Sequence[str] | str | None = None,
                coverage: float = 2.0, monte_carlo: int | None = None, seed: int | None = 1, jobs: int = 1,
                progress=None):
    """The uncertainty of the worksheet's results from the uncertainties its values are typed
    with (:mod:`balance.study.uncertainty`): the first-order budget of each main result (every
    column with ``columns="all"``, or those named), U = ``coverage`` × u_c; with ``monte_carlo`` N
    (not None), also N samples solved (seeded by ``seed``, on ``jobs`` processes with the serial numbers).
    ``result``: the worksheet's nominal result, when it is solved already. Each case is solved by
    :func:`uncertainty_row`. Raises InputError for a bad uncertainty or option, SolveError when the
    worksheet does not solve."""
    from .study.uncertainty import propagate

    nominal = _row(result) if result is not None else case_row(ws)  # the nominal case names the main results
    return propagate(ws, uncertainty_row, columns=columns, coverage=coverage, nominal=nominal, samples=monte_carlo,
                     seed=seed, jobs=jobs, progress=progress)


# -- what the app draws and advises --------------------------------------------------------
def trace(result: Result) -> Trace:
    """The P–v and T–s diagrams' lines of a result; raises BalanceError."""
    from .diagrams import trace as trace_diagrams

    return trace_diagrams(result)


def flow_trace(result, plane: str = "T-s"):
    """A steady-flow result drawn on the 'T-s', 'h-s' or 'P-h' plane: each device's path
    through its model's states and each model's dome (:func:`balance.diagrams.flow_trace`)."""
    from .diagrams import flow_trace as trace_flow

    return trace_flow(result, plane)


def advise(ws: Worksheet) -> Advice:
    """How well the worksheet's property model fits its states, and what to use instead."""
    from .adequacy import advise as advise_model

    return advise_model(ws)


__all__ = ["Attempt", "Check", "FieldProblem", "Source", "advise", "as_json", "attempt", "check", "entry_data",
           "explain", "flow_trace", "fluid", "kind", "case_row", "mixture_pins", "phases", "pins", "prepare", "problems", "read",
           "read_field", "solve", "sweep", "trace", "uncertainty", "uncertainty_row"]
