"""From a worksheet as typed to a closed-system problem in SI numbers.

``prepare(worksheet)`` reads every value, builds the species (with its
overrides) and the model, fixes the initial compartments, works out what
the constraints imply for the final state and the boundary work, and counts
unknowns against equations. ``Problem.dof`` says in words what is missing
or over-specified before anything is solved.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

from ...convention import Convention
from ...errors import InputError, SpecificationError
from ...models.base import Point, PropertyModel
from ...species import Species
from ...species import with_overrides
from ...state import State, fluid_pair, read_spec, read_specs, species_of
from ...units import P_ATM
from ...worksheet import UNKNOWN, FieldProblem, Worksheet, place
from ..control_volume import (Dof, Heat, Unknown, Work, check_term_names, read_amount, read_atmosphere,
                              read_field, read_heat, read_polytropic_n, read_volume, read_work)


@dataclass(frozen=True)
class Compartment:
    """One initial compartment: its state (None when evacuated) and volume."""

    name: str
    state: State | None
    V: float | None
    """volume [m3]; None when the amount is the unknown"""


@dataclass
class Problem:
    """A closed-system problem, every value in SI."""

    worksheet: Worksheet
    species: Species
    model: PropertyModel
    p_atm: float
    convention: Convention
    initial: tuple[Compartment, ...]
    n: float | None
    """total amount [mol]; None when unknown"""
    final_fixed: dict[str, float]
    final_sources: dict[str, str]
    path: str
    """'rigid', 'isobaric', 'isothermal', 'polytropic' or 'given' (a boundary work term)"""
    n_poly: float | None
    heat: tuple[Heat, ...]
    work: tuple[Work, ...]
    reversible: bool
    dKE: float
    dPE: float
    constraints: tuple[str, ...]
    notes: list[str] = field(default_factory=list)
    implied: tuple[str, ...] = ()
    """equations the constraints add that the others already imply, in words (counted once)"""
    pressure_undetermined: bool = False
    """the model cannot give the final pressure (the incompressible model, with no P given or
    implied): the result's P is NaN, and its words and cautions must say so"""
    final_point: Point | None = None
    """the final state, when the worksheet fixes it directly (flashed while checking)"""

    @property
    def reversible_equation(self) -> bool:
        """Whether S_gen = 0 is one of the equations counted (declared, and not implied by the others)."""
        return self.reversible and not self.implied

    @property
    def gases(self) -> list[Compartment]:
        return [c for c in self.initial if c.state is not None]

    @cached_property
    def dof(self) -> Dof:
        """The degrees-of-freedom count (worked out once: a prepared problem does not change)."""
        return count_dof(self)

    def linear_unknowns(self) -> list[Unknown]:
        """The unknowns that enter the balances linearly: heat, work and the amount."""
        out = [h.unknown for h in self.heat if h.Q is None]
        out += [w.unknown for w in self.work if w.W_on is None]
        if self.n is None:
            out.append(Unknown("amount"))
        return out

    def equation_names(self) -> list[str]:
        eqs = ["energy balance (first law)"]
        if self.reversible_equation:
            eqs.append("reversible: S_gen = 0 (second law)")
        if self.path == "polytropic":
            eqs.append(f"polytropic path P v^{self.n_poly:g} = const")
        return eqs


def prepare(ws: Worksheet) -> Problem:
    """Read a worksheet into a Problem; raises InputError naming the field."""
    p_atm = read_atmosphere(ws.heading.atmosphere)
    if not ws.fluid.species:
        raise InputError("fluid.species", "give the species, e.g. 'N2' (`joulebook species` lists them)")
    if not ws.fluid.model:
        raise InputError("fluid.model", "give the property model, e.g. 'peng-robinson'")
    species, model = fluid_pair(ws.fluid)
    constraints = set(ws.process.constraints)
    if "free-expansion" in constraints:
        constraints |= {"rigid", "adiabatic"}
        if ws.work:
            raise InputError("work", "free expansion means no work crosses the boundary: remove the work terms")
    if "membrane-rupture" in constraints:
        constraints.add("rigid")
    if not ws.initial:
        raise InputError("initial", "give the initial state: two properties and an amount")

    notes: list[str] = []
    compartments, n_total = _compartments(ws, model, p_atm, notes)
    gases = [c for c in compartments if c.state is not None]
    if not gases:
        raise InputError("initial", "every compartment is empty: at least one must hold the fluid")
    if len(compartments) > 1 and "rigid" not in constraints:
        raise InputError(
            "process.constraints",
            "several initial compartments join into one final state only inside a rigid boundary: "
            "add 'rigid' (or 'membrane-rupture' / 'free-expansion')",
        )
    paths = [c for c in ("rigid", "isobaric", "polytropic") if c in constraints]
    if len(paths) > 1:
        raise InputError("process.constraints", f"{' and '.join(paths)} contradict each other: keep one path")
    boundary_terms = [w for w in ws.work if w.kind == "boundary"]
    path = paths[0] if paths else ("isothermal" if "isothermal" in constraints else "given")
    if path != "given" and boundary_terms:
        raise InputError(
            "work", f"the {path} path fixes the boundary work; remove the work term '{boundary_terms[0].name}' of kind 'boundary'"
        )

    fixed: dict[str, float] = {}
    sources: dict[str, str] = {}
    M = species.M
    given = read_specs(ws.final.props, M, "final", p_atm)
    for key, value in given.items():
        fixed[key], sources[key] = value, "given"

    def imply(key: str, value: float, why: str) -> None:
        if key in fixed:
            if math.isclose(fixed[key], value, rel_tol=1e-9):
                notes.append(f"final {key} is both given and implied by {why}; counted once")
                return
            unit = {"T": "K", "P": "Pa", "v": "m3/mol"}.get(key, "(SI)")
            raise InputError(
                f"final.{key}",
                f"{key} is given as {fixed[key]:.6g} {unit} but {why} makes it {value:.6g} {unit}: remove one",
            )
        fixed[key], sources[key] = value, why

    first = gases[0].state.point
    if "isothermal" in constraints:
        _same(gases, "T", "isothermal")
        imply("T", first.T, "isothermal")
    if path == "isobaric":
        _same(gases, "P", "isobaric")
        imply("P", first.P, "isobaric")
    V_total = sum(c.V for c in compartments) if n_total is not None else None
    V_final = _final_volume(ws, p_atm)
    if path == "rigid":
        if n_total is not None:
            imply("v", V_total / n_total, "rigid")
        else:
            imply("v", first.v, "rigid")
    if V_final is not None:
        if n_total is None:
            raise InputError("final.V", "the amount is unknown, so a final volume cannot fix the state; give v instead")
        if path == "rigid" and not math.isclose(V_final, V_total, rel_tol=1e-9):
            raise InputError("final.V", f"rigid keeps V = {V_total:.6g} m3; the final V given differs")
        if path != "rigid":
            imply("v", V_final / n_total, "final V")
    if path == "given" and not boundary_terms:
        if _fixed_volume(model) is None:
            _whole_work(ws, fixed, notes)
        else:
            notes.append(f"the {model.name} model keeps v = M/ρ in every state: no boundary work, whatever the path")
    undetermined = False
    if _fixed_volume(model) is not None:
        undetermined = _volume_of_the_model(ws, model, path, fixed, sources, notes)
    if len(fixed) > 2:
        listed = ", ".join(f"{k} ({sources[k]})" for k in fixed)
        over = SpecificationError(
            f"the final state is over-specified: {listed} are all fixed but a state takes two; remove one"
        )
        over.field = "final"  # the part at fault, for check and problems (no one field is)
        raise over
    final_point = model.flash(dict(fixed), field="final") if len(fixed) == 2 else None
    n_poly = None
    if path == "polytropic":
        if len(gases) > 1:
            raise InputError("process.constraints", "a polytropic path applies to one compartment")
        n_poly = read_polytropic_n(ws.process.n)

    check_term_names(ws.heat, ws.work)
    reversible = "reversible" in constraints
    T_system = first.T if "isothermal" in constraints else None
    heat = tuple(read_heat(h, T_system, "system temperature (isothermal)") for h in ws.heat)
    if "adiabatic" in constraints and heat:
        raise InputError("heat", f"the process is adiabatic but heat term '{ws.heat[0].name}' is given: remove one")
    if reversible:
        for h in heat:
            if h.T_boundary is None:
                raise InputError(
                    f"heat '{h.name}'.T_boundary",
                    "a reversible process needs the temperature at which each heat term crosses the boundary",
                )
    if not heat and "adiabatic" not in constraints:
        notes.append("no heat term is given, so Q = 0: declare 'adiabatic' to say so explicitly")
    convention = Convention(ws.heading.convention)
    work = tuple(read_work(w, convention) for w in ws.work)
    dKE = read_field("energy", ws.process.dKE, "process.dKE") if ws.process.dKE else 0.0
    dPE = read_field("energy", ws.process.dPE, "process.dPE") if ws.process.dPE else 0.0
    implied = ()
    if reversible:
        why = _reversible_implied(path, compartments, heat, work, dKE, dPE, T_system)
        implied = (why,) if why else ()
    return Problem(
        worksheet=ws, species=species, model=model, p_atm=p_atm,
        convention=convention, initial=compartments, n=n_total,
        final_fixed=fixed, final_sources=sources, path=path, n_poly=n_poly, heat=heat,
        work=work, reversible=reversible, dKE=dKE, dPE=dPE,
        constraints=tuple(sorted(constraints)), notes=notes, implied=implied,
        pressure_undetermined=undetermined, final_point=final_point,
    )


def _reversible_implied(path: str, compartments, heat: tuple[Heat, ...], work: tuple[Work, ...],
                        dKE: float, dPE: float, T_system: float | None) -> str:
    """Why S_gen = 0 follows from the other equations ('' when it is an equation of its own).

    - The isothermal path's work is the reversible work, n (a2 - a1) with a = u - T s; with every
      heat term crossing at the system's temperature and no other work or energy, the energy
      balance is n Δu = Q + n (Δu - T Δs), i.e. n Δs = Q / T: the entropy balance itself.
    - A rigid or isobaric boundary that nothing crosses (no heat, no work, no change of kinetic or
      potential energy) around one compartment keeps u and v (rigid) or h and P (isobaric): the
      state cannot change, and ΔS = 0 already.
    """
    quiet = not work and dKE == 0.0 and dPE == 0.0
    if path == "isothermal" and quiet and T_system is not None and all(
            h.T_boundary is not None and math.isclose(h.T_boundary, T_system, rel_tol=1e-9) for h in heat):
        return ("reversible (S_gen = 0) follows from the isothermal path: its work n (a2 - a1) is the "
                "reversible work and every heat term crosses at the system temperature, so the entropy "
                "balance is the energy balance divided by T")
    if path in ("rigid", "isobaric") and quiet and not heat and len(compartments) == 1:
        kept = "u and v" if path == "rigid" else "h and P"
        return (f"reversible (S_gen = 0) follows from the others: nothing crosses the {path} boundary, "
                f"so {kept} stay as they were, the state does not change and ΔS = 0")
    return ""


def _fixed_volume(model: PropertyModel) -> float | None:
    """The molar volume a model gives every state (the incompressible model's M/ρ) [m3/mol], or None."""
    return getattr(model, "v0", None) if model.name == "incompressible" else None


def _volume_of_the_model(ws: Worksheet, model: PropertyModel, path: str, fixed: dict[str, float],
                         sources: dict[str, str], notes: list[str]) -> bool:
    """On a model that fixes v in every state, v fixes nothing: a v from rigid (or a final V) is
    counted once, with the model's; a P asked for that nothing can give is refused. Returns
    whether the final pressure is left undetermined (no P or h given or implied)."""
    v0 = _fixed_volume(model)
    if "v" in fixed:
        if not math.isclose(fixed["v"], v0, rel_tol=1e-9):
            field = "final.V" if sources["v"] == "final V" else "final.v" if sources["v"] == "given" \
                else "process.constraints"
            raise InputError(field, f"{model.label} gives every state v = M/ρ = {v0:.6g} m3/mol; "
                                    f"{sources['v']} makes it {fixed['v']:.6g} m3/mol")
        why = sources.pop("v")
        del fixed["v"]
        if "P" in fixed or "h" in fixed:
            notes.append(f"{why} adds nothing on the {model.name} model (v = M/ρ in every state): counted once")
    if "P" in fixed or "h" in fixed:
        return False
    for key in ("P", "h"):
        if ws.final.props.get(key, "").strip() == UNKNOWN:
            raise InputError(
                f"final.{key}",
                f"the {model.name} model cannot give the final pressure{' (nor h = u + P v)' if key == 'h' else ''}: "
                "its volume is fixed by the density, so nothing in the balance depends on P; give P, "
                "or leave it out (the result then says it is undetermined), or use the reference model, "
                "which gives the pressure a liquid reaches",
            )
    # v stands in for the pressure, which nothing fixes: (T, v) is the model's state with P open
    fixed["v"], sources["v"] = v0, "rigid" if path == "rigid" else "the model (v = M/ρ)"
    return True


#: Work terms that may stand for the whole work across the boundary, the moving boundary's included.
WHOLE_WORK_KINDS = ("other", "shaft")


def _whole_work(ws: Worksheet, fixed: dict[str, float], notes: list[str]) -> None:
    """No path and no boundary-work term: the work terms hold the whole work when both end states
    are given (the first law then fixes it, whatever path the boundary took); else say what is missing."""
    whole = [w for w in ws.work if w.kind in WHOLE_WORK_KINDS]
    if whole and len(fixed) == 2:
        names = ", ".join(f"'{w.name}' ({w.kind})" for w in whole)
        notes.append(f"no path is given and both end states are: work {names} is the whole work across the "
                     "boundary, the moving boundary's included, and follows from the first law")
        return
    raise InputError(
        "process.constraints",
        "the volume may change but no path says how: add rigid, isobaric, isothermal or polytropic, "
        "or a work term of kind 'boundary', or give the final state fully (two properties) with a work "
        "term of kind 'other' or 'shaft' for the whole work",
    )


def problems(ws: Worksheet) -> list[FieldProblem]:
    """Every field of the worksheet at fault, each with its own message, in the worksheet's order;
    then what stops :func:`prepare` when no field accounts for it (a final T that a ticked
    constraint contradicts, a missing path, an over-specified final state). Empty exactly when
    :func:`prepare` succeeds. Each field is read by the function :func:`prepare` reads it with."""
    out: list[FieldProblem] = []

    def at(field: str, read):
        try:
            return read()
        except InputError as exc:
            out.append(place(ws, exc.field or field, exc.message))
            return None

    def refuse(field: str, message: str) -> None:
        out.append(place(ws, field, message))

    p_atm = at("worksheet.atmosphere", lambda: read_atmosphere(ws.heading.atmosphere))
    p_atm = P_ATM if p_atm is None else p_atm
    M = 1.0  # scales mass-based values only: any positive M checks their text
    fl = ws.fluid
    if not fl.species:
        refuse("fluid.species", "give the species, e.g. 'N2' (`joulebook species` lists them)")
    if not fl.model:
        refuse("fluid.model", "give the property model, e.g. 'peng-robinson'")
    species = at("fluid.species", lambda: species_of(fl)) if fl.species or fl.composition else None
    if species is not None:
        M = species.M
        before = len(out)
        for key, text in fl.overrides.items():
            at(f"fluid.overrides.{key}", lambda: with_overrides(species, {key: text}))
        if fl.model and len(out) == before:
            at("fluid.model", lambda: fluid_pair(fl))

    for si in ws.initial:
        where = f"initial '{si.name}'"
        for key, text in si.props.items():
            if text.strip() == UNKNOWN:
                refuse(f"{where}.{key}", "cannot be unknown ('?') in an initial state; give its value")
            else:
                at(f"{where}.{key}", lambda: read_spec(key, text, M, f"{where}.{key}", p_atm))
        for key, text in si.amount.items():
            if text.strip() == UNKNOWN:
                if key == "V":
                    refuse(f"{where}.V", "cannot be unknown ('?') in an initial state; give its value, or mark "
                                         "n '?' to solve for the amount")
            elif key == "V":
                at(f"{where}.V", lambda: read_volume(text, f"{where}.V"))
            else:
                at(f"{where}.{key}", lambda: read_amount(key, text, M, f"{where}.{key}"))
    for key, text in ws.final.props.items():
        if text.strip() != UNKNOWN:
            at(f"final.{key}", lambda: read_spec(key, text, M, f"final.{key}", p_atm))
    for key, text in ws.final.amount.items():
        if key != "V":
            refuse(f"final.{key}", "the final amount follows from the initial one; remove it")
        elif text.strip() not in ("", UNKNOWN):
            at("final.V", lambda: read_volume(text, "final.V"))
    for h in ws.heat:
        where = f"heat '{h.name}'"
        if h.Q.strip() != UNKNOWN:
            at(f"{where}.Q", lambda: read_field("energy", h.Q, f"{where}.Q"))
        if h.T_boundary:
            at(f"{where}.T_boundary", lambda: read_field("T_boundary", h.T_boundary, f"{where}.T_boundary"))
    for w in ws.work:
        if w.W.strip() != UNKNOWN:
            at(f"work '{w.name}'.W", lambda: read_field("energy", w.W, f"work '{w.name}'.W"))
    pr = ws.process
    if "polytropic" in pr.constraints:
        at("process.n", lambda: read_polytropic_n(pr.n))
    for key in ("dKE", "dPE"):
        text = getattr(pr, key)
        if text:
            at(f"process.{key}", lambda: read_field("energy", text, f"process.{key}"))

    try:
        prepare(ws)
    except InputError as exc:
        if exc.field not in {p.field for p in out}:
            refuse(exc.field, exc.message)
    except SpecificationError as exc:
        refuse(getattr(exc, "field", "final"), str(exc))
    return out


def _same(gases: list[Compartment], key: str, why: str) -> None:
    values = [getattr(c.state.point, key) for c in gases]
    if max(values) - min(values) > 1e-9 * max(abs(v) for v in values):
        raise InputError("process.constraints", f"{why} needs one initial {key}; the compartments differ")


def _compartments(ws: Worksheet, model: PropertyModel, p_atm: float, notes: list[str]):
    out = []
    n_total: float | None = 0.0
    M = model.species.M
    for i, si in enumerate(ws.initial):
        where = f"initial '{si.name}'"
        if si.empty:
            if "V" not in si.amount or si.amount["V"].strip() == UNKNOWN:
                raise InputError(f"{where}.V", "an empty compartment needs its volume V")
            if si.props or set(si.amount) - {"V"}:
                raise InputError(where, "an empty compartment has only a volume V")
            V = read_volume(si.amount["V"], f"{where}.V")
            out.append(Compartment(si.name, None, V))
            continue
        specs = read_specs(si.props, M, where, p_atm)
        asked = si.unknowns()
        if asked and set(asked) - {"n", "m"}:
            raise InputError(where, f"{', '.join(asked)} of an initial state cannot be unknown; give two properties")
        amounts = {k: t for k, t in si.amount.items() if t.strip() != UNKNOWN}
        if len(specs) == 1 and "v" not in specs and "V" in amounts and len(amounts) == 2:
            # an amount and a volume fix the specific volume: T, n and V are a whole state
            key, specs["v"], note = _volume_over_amount(amounts, M, where)
            amounts = {key: amounts[key]}
            notes.append(note)
        if len(specs) != 2:
            raise InputError(where, f"needs two of T, P, v (or rho), u, h, s, x, or one of them with an amount "
                                    f"(n or m) and the volume V; got {', '.join(specs) or 'none'}")
        point = model.flash(specs, field=where)
        if len(amounts) > 1:
            raise InputError(where, f"give one amount (n, m or V) with two properties; got {', '.join(amounts)}")
        if not amounts:
            if len(ws.initial) > 1:
                raise InputError(where, "give the amount: n, m or V")
            if not asked:
                raise InputError(where, "give the amount: n, m or V (or mark n '?' to solve for it)")
            out.append(Compartment(si.name, State(si.name, model, point, n=math.nan), None))
            n_total = None
            continue
        key, text = next(iter(amounts.items()))
        if key == "V":
            V = read_volume(text, f"{where}.V")
            n = V / point.v
        else:
            n = read_amount(key, text, M, f"{where}.{key}")
        out.append(Compartment(si.name, State(si.name, model, point, n=n), n * point.v))
        if n_total is not None:
            n_total += n
    return tuple(out), n_total


def _volume_over_amount(amounts: dict[str, str], M: float, where: str) -> tuple[str, float, str]:
    """The molar volume v = V/n of a compartment given an amount (n or m) and its volume V:
    (the amount's key, v [m3/mol], a note saying where v came from)."""
    key = "n" if "n" in amounts else "m"
    V = read_volume(amounts["V"], f"{where}.V")
    n = read_amount(key, amounts[key], M, f"{where}.{key}")
    v = V / n
    return key, v, (f"{where}: v = V/n = {V:.6g} m3 / {n:.6g} mol = {v:.6g} m3/mol, "
                    f"from the volume and the amount given")


def _final_volume(ws: Worksheet, p_atm: float) -> float | None:
    amount = ws.final.amount
    extra = set(amount) - {"V"}
    if extra:
        raise InputError("final", f"the final amount follows from the initial one; remove {', '.join(sorted(extra))}")
    text = amount.get("V", "").strip()
    if not text or text == UNKNOWN:
        return None
    V = read_volume(text, "final.V")
    return V


def count_dof(p: Problem) -> Dof:
    """Unknowns against equations, and what to do about a mismatch, in words."""
    missing = 2 - len(p.final_fixed)
    state_unknowns = [Unknown("state", str(i + 1)) for i in range(missing)]
    unknowns = tuple(state_unknowns + p.linear_unknowns())
    equations = tuple(p.equation_names())
    fixed = tuple(f"{k} by {why}" if why != "given" else f"{k} given" for k, why in p.final_sources.items())
    nu, ne = len(unknowns), len(equations)
    plural = lambda n, w: f"{n} {w}{'' if n == 1 else 's'}"  # noqa: E731
    head = f"{plural(nu, 'unknown')}, {plural(ne, 'equation')}"
    if nu == ne:
        msg = f"{head}: ready to solve"
    elif nu > ne:
        free = [k for k in ("T", "P", "v") if k not in p.final_fixed]
        options = [f"{k}2" for k in free] if missing else []
        options += [f"the value of {u.words()}" for u in p.linear_unknowns()]
        msg = f"{head}: give {plural(nu - ne, 'more value')}: one of {', '.join(options) or 'the missing values'}"
        if not p.reversible and missing:
            msg += ", or add a constraint (isothermal, isobaric, reversible ...)"
    else:
        drop = [f"{k}2 ({why})" for k, why in p.final_sources.items()]
        drop += [e for e in equations[1:]]
        msg = (
            f"{head}: over-specified; leave {plural(ne - nu, 'more value')} unknown ('?'), "
            f"or drop one of: {', '.join(drop) or 'the constraints'}"
        )
    if p.implied:  # an equation the others imply is not a second equation: say why it is not counted
        msg += "".join(f". Not counted again: {why}" for why in p.implied)
    return Dof(unknowns, equations, fixed, msg, p.implied)
