"""A solved closed-system balance: the Result, and how it is built from the solution.

Every figure is recomputed from the states' extensive values after the
search (the energy balance's residual is reported; no unconverged result is
returned), the entropy balance is closed where every heat term has a
boundary temperature, and the cautions and the worked explanation are
attached.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from ...errors import SolveError
from ...models.base import Point
from ...state import State, quantity
from ...units import R
from ..cautions import Caution, cautions_for
from ..control_volume import (RESIDUAL_LIMIT, SGEN_TOLERANCE, Term, Unknown, heat_direction_warnings,
                              surroundings_entropy)
from .explain import WORDING, RoundOff, explain
from .problem import Problem


#: Constraints under which compartments join suddenly (the cautions look at the gas left behind).
EVENTS = {"free-expansion", "membrane-rupture"}


@dataclass(frozen=True)
class Result:
    """A solved closed-system balance, every value in SI."""

    problem: Problem
    initial: tuple[State, ...]
    final: State
    terms: tuple[Term, ...]
    n: float
    """amount [mol]"""
    dU: float
    dU_ig: float
    dU_dep: float
    dS_system: float
    dS_surroundings: float | None
    S_gen: float | None
    residual: float
    """independently recomputed energy-balance residual, relative"""
    iterations: int
    method: str
    equations: tuple[str, ...]
    warnings: tuple[str, ...]
    cautions: tuple[Caution, ...]
    """each with its values apart from its words: ``c.text()`` in the record's units, or ``c.text(show)``"""
    round_off: RoundOff
    """the scales below which a computed energy or entropy is round-off, shown as 0"""
    unknowns: dict[Unknown, float] = field(default_factory=dict)
    """the value found for each unknown [J for heat and work, mol for the amount]"""

    @property
    def Q(self) -> float:
        return sum(t.value for t in self.terms if t.kind == "heat")

    @property
    def W_on(self) -> float:
        return sum(t.value for t in self.terms if t.kind != "heat")

    def as_json(self) -> dict:
        """Everything in the result; quantities as {"value", "unit"} (SI)."""
        p = self.problem
        terms = []
        for t in self.terms:
            terms.append({
                "kind": t.kind, "name": t.name, "value": quantity(p.convention.shown(t.kind, t.value), "J"),
                "solved": t.solved,
                "T_boundary": quantity(t.T_boundary, "K"), "detail": t.detail,
            })
        return {
            "title": p.worksheet.heading.title,
            "species": p.species.id,
            **({"composition": dict(p.species.composition)} if p.species.composition else {}),
            "model": p.model.name,
            "reference_state": p.model.reference_state,
            "convention": p.convention.key,
            "overrides": dict(p.species.overrides),
            "states": {st.name: st.as_json() for st in (*self.initial, self.final)},
            "terms": terms,
            "n": quantity(self.n, "mol"),
            "dU": quantity(self.dU, "J"),
            "dU_ideal_gas": quantity(self.dU_ig, "J"),
            "dU_departure": quantity(self.dU_dep, "J"),
            "dS_system": quantity(self.dS_system, "J/K"),
            "dS_surroundings": quantity(self.dS_surroundings, "J/K"),
            "S_gen": quantity(self.S_gen, "J/K"),
            "round_off": {"relative": self.round_off.relative, "energy": quantity(self.round_off.energy, "J"),
                          "entropy": quantity(self.round_off.entropy, "J/K")},
            "residual": self.residual,
            "iterations": self.iterations,
            "method": self.method,
            "equations": list(self.equations),
            "warnings": list(self.warnings),
            "cautions": [c.text() for c in self.cautions],
            "wording": WORDING,
        }


def result_of(s, final_point: Point, lin: dict, method: str) -> Result:
    """The result at the solution: terms, states, the energy balance recomputed from the
    states' extensive values (no unconverged result is returned), the entropy balance,
    warnings, cautions and the explanation. ``s`` is the solver that found it."""
    p = s.p
    evaluations = s.evaluations
    n = s.amount(lin)
    initial = tuple(
        c.state if p.n is not None else State(c.state.name, c.state.model, c.state.point, n)
        for c in p.gases
    )
    final = State(p.worksheet.final.name or "final", p.model, final_point, n)
    terms = []
    for h in p.heat:
        value = lin[h.unknown] if h.Q is None else h.Q
        terms.append(Term("heat", h.name, value, h.Q is None, h.T_boundary, h.T_boundary_note))
    for w in p.work:
        value = lin[w.unknown] if w.W_on is None else w.W_on
        terms.append(Term("work", w.name, value, w.W_on is None, detail=w.kind))
    if p.path != "given":
        terms.append(Term("boundary work", p.path, s.boundary_work(final_point, n), True, detail=p.path))

    # independent recomputation, from the states' extensive values
    U1 = sum(st.U for st in initial)
    dU = final.U - U1
    Q = sum(t.value for t in terms if t.kind == "heat")
    W = sum(t.value for t in terms if t.kind != "heat")
    residual = abs(dU + p.dKE + p.dPE - Q - W) / max(abs(dU), abs(Q) + abs(W), s.E_scale)
    if not residual < RESIDUAL_LIMIT:
        raise SolveError(f"the energy balance does not close after solving (relative residual {residual:.2e}); no result reported")
    dU_ig = sum(st.n * ((final_point.u - final_point.u_dep) - (st.point.u - st.point.u_dep)) for st in initial)
    dU_dep = sum(st.n * (final_point.u_dep - st.point.u_dep) for st in initial)
    dS = final.S - sum(st.S for st in initial)
    warnings = list(p.notes)
    dS_surr = surroundings_entropy(terms)
    if dS_surr is not None:
        S_gen = dS + dS_surr
        if S_gen < -SGEN_TOLERANCE * n * R:
            raise SolveError(
                f"impossible process: S_gen = {S_gen:.6g} J/K < 0. {_sgen_cause(p, terms)}"
            )
    else:
        S_gen = None
        missing = [t.name for t in terms if t.kind == "heat" and t.T_boundary is None]
        warnings.append(f"S_gen not evaluated: heat term {', '.join(repr(m) for m in missing)} has no boundary temperature")
    warnings += heat_direction_warnings(terms, final.point.T)
    for st in (*initial, final):
        warnings += [f"{st.name}: {w}" for w in p.model.warnings(st.point)]
    unknowns = {k: float(v) for k, v in lin.items()}
    round_off = _round_off(n, (*initial, final), terms, (dU_ig, dU_dep, p.dKE, p.dPE), (dS, dS_surr))
    result = Result(
        problem=p, initial=initial, final=final, terms=tuple(terms), n=n, dU=dU, dU_ig=dU_ig,
        dU_dep=dU_dep, dS_system=dS, dS_surroundings=dS_surr, S_gen=S_gen, residual=residual,
        iterations=evaluations, method=method, equations=(), warnings=tuple(warnings),
        cautions=tuple(cautions_for(p.p_atm, initial, final, event=bool(EVENTS & set(p.constraints)))), round_off=round_off, unknowns=unknowns,
    )
    return replace(result, equations=tuple(explain(result)))


def _round_off(n: float, states, terms, energies, entropies) -> RoundOff:
    """The scales the balances are solved against: energy, the largest of n R T at each state
    and of each energy term [J]; entropy, the largest of n R and the entropy changes [J/K]."""
    E = [n * R * st.point.T for st in states] + [t.value for t in terms] + list(energies)
    S = [n * R] + [x for x in entropies if x is not None]
    return RoundOff(max(abs(x) for x in E if math.isfinite(x)), max(abs(x) for x in S if math.isfinite(x)))


def _sgen_cause(p: Problem, terms) -> str:
    heats = [t for t in terms if t.kind == "heat"]
    if p.reversible:
        return "The process was declared reversible but the balances cannot meet S_gen = 0."
    if heats:
        return ("Check the direction of the heat terms and their boundary temperatures: heat cannot flow "
                "from a colder reservoir into a hotter system on its own.")
    return "An adiabatic closed system cannot lose entropy: check the final state and the work terms."
