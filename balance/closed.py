"""The closed-system balance: equations, solution, and the worked explanation.

First law (canonical form inside: heat to the system and work done on the
system positive):

    ΔU + ΔKE + ΔPE = Σ Q_k + Σ W_k + W_boundary,   ΔU = n u2 - Σ n_i u1,i

Second law:

    S_gen = ΔS_system + ΔS_surroundings = (n s2 - Σ n_i s1,i) - Σ Q_k / T_k  >= 0

Boundary work on the system along the path:

    rigid        W_b = 0
    isobaric     W_b = -P (V2 - V1)
    isothermal   W_b = n (a2 - a1), a = u - T s   (= -∫P dV along the isotherm)
    polytropic   W_b = (P2 V2 - P1 V1)/(n - 1)    (n = 1: -P1 V1 ln(V2/V1))

Unknown heat and work values, and an unknown amount, enter these equations
linearly; they are eliminated exactly, so the search is only over the final
state's free properties: none (a direct flash), one (a bracket searched
outward from the initial state, then
Brent's method) or two (scipy's root from the initial state, then verified).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field, replace

import numpy as np

from .balances.control_volume import Unknown
from .errors import InputError, SolveError, SpecificationError, TwoPhaseError
from .explain import explain
from .models.base import Point
from .problem import Problem, prepare
from .rootfind import scan_root
from .state import State, quantity
from .units import R
from .worksheet import Worksheet

#: A balance closes when its scaled residual is below this.
TOLERANCE = 1e-9
#: S_gen below -this × n R is an impossible process rather than round-off.
SGEN_TOLERANCE = 1e-7
AMOUNT = Unknown("amount")


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


@dataclass(frozen=True)
class Result:
    """A solved closed-system balance."""

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
    cautions: tuple[str, ...]
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
            "residual": self.residual,
            "iterations": self.iterations,
            "method": self.method,
            "equations": list(self.equations),
            "warnings": list(self.warnings),
            "cautions": list(self.cautions),
        }


def solve_worksheet(ws: Worksheet) -> Result:
    return solve(prepare(ws))


def solve(p: Problem) -> Result:
    """Solve a prepared problem; raises SpecificationError or SolveError."""
    dof = p.dof
    if not dof.ok:
        raise SpecificationError(dof.message)
    solver = _Solver(p)
    final, lin, method = solver.run()
    return _result(solver, final, lin, method)


# -- the equations ---------------------------------------------------------------
class _Solver:
    def __init__(self, p: Problem):
        self.p = p
        self.evaluations = 0
        self.lin_names = p.linear_unknowns()
        first = p.gases[0].state.point
        n_guess = p.n if p.n is not None else 1.0
        self.E_scale = max(n_guess * R * first.T, 1e-30)
        self.S_scale = n_guess * R

    def amount(self, lin: dict) -> float:
        return self.p.n if self.p.n is not None else lin[AMOUNT]

    def initial_sums(self, n: float):
        """Σ n_i u_i, Σ n_i s_i and Σ V_i of the initial compartments."""
        U = S = V = 0.0
        for c in self.p.gases:
            ni = c.state.n if self.p.n is not None else n
            U += ni * c.state.point.u
            S += ni * c.state.point.s
            V += ni * c.state.point.v
        V += sum(c.V for c in self.p.initial if c.state is None)
        return U, S, V

    def boundary_work(self, final: Point, n: float) -> float:
        """Work done on the system by its moving boundary [J]."""
        p = self.p
        first = p.gases[0].state.point
        _, _, V1 = self.initial_sums(n)
        V2 = n * final.v
        if p.path == "rigid":
            return 0.0
        if p.path == "isobaric":
            return -first.P * (V2 - V1)
        if p.path == "isothermal":
            return n * (final.a - first.a)
        if p.path == "polytropic":
            k = p.n_poly
            if abs(k - 1.0) < 1e-12:
                return -first.P * V1 * math.log(V2 / V1)
            return (final.P * V2 - first.P * V1) / (k - 1.0)
        return 0.0  # 'given': the boundary term is one of the work terms

    def residuals(self, final: Point, lin: dict) -> np.ndarray:
        """Scaled residuals of every equation at a final state and linear unknowns."""
        p = self.p
        n = self.amount(lin)
        U1, S1, _ = self.initial_sums(n)
        Q = sum(lin[Unknown("heat", h.name)] if h.Q is None else h.Q for h in p.heat)
        W = sum(lin[Unknown("work", w.name)] if w.W_on is None else w.W_on for w in p.work)
        energy = n * final.u - U1 + p.dKE + p.dPE - Q - W - self.boundary_work(final, n)
        out = [energy / self.E_scale]
        if p.reversible:
            q_over_t = sum(
                (lin[Unknown("heat", h.name)] if h.Q is None else h.Q) / h.T_boundary for h in p.heat
            )
            out.append((n * final.s - S1 - q_over_t) / self.S_scale)
        if p.path == "polytropic":
            first = p.gases[0].state.point
            k = p.n_poly
            out.append(final.P * final.v**k / (first.P * first.v**k) - 1.0)
        return np.array(out)

    def eliminate(self, final: Point):
        """Solve the linear unknowns at this final state; return them and the leftover residuals."""
        self.evaluations += 1
        names = self.lin_names
        zero = {k: 0.0 for k in names}
        c = self.residuals(final, zero)
        if not names:
            return zero, c
        A = np.empty((len(c), len(names)))
        for j, k in enumerate(names):
            A[:, j] = self.residuals(final, {**zero, k: 1.0}) - c
        rows = _best_rows(A, len(names))
        if rows is None:
            raise SolveError(
                f"{', '.join(u.words() for u in names)} cannot be found from these balances (they do not enter them independently)"
            )
        x = np.linalg.solve(A[rows], -c[rows])
        lin = dict(zip(names, x))
        rest = [i for i in range(len(c)) if i not in rows]
        return lin, (A[rest] @ x + c[rest])

    def state(self, specs: dict[str, float]) -> Point:
        return self.p.model.flash(specs, field="final")

    def run(self):
        p = self.p
        fixed = p.final_fixed
        free = 2 - len(fixed)
        if free == 0:
            final = self.state(dict(fixed))
            lin, _ = self.eliminate(final)
            return final, lin, "final state fixed directly; linear unknowns from the balances"
        if free == 1:
            return self._one(fixed)
        return self._two()

    def _one(self, fixed: dict[str, float]):
        (key, value), = fixed.items()
        first = self.p.gases[0].state.point
        model = self.p.model
        # The free property: one the balance residual is monotone in (u, h and s
        # rise with T at fixed v or P since cv, cp > 0; at fixed T, or across a
        # dome at fixed P, the volume is the coordinate that moves).
        if key == "T" or (key in ("P", "u", "h", "s", "x") and model.two_phase):
            var, start = "v", first.v
            lo, hi = model.v_bounds(first.T)
            lo, hi = max(lo, first.v * 1e-4), min(hi, first.v * 1e5)
        else:
            var, start = "T", first.T
            lo, hi = model.T_bounds()
        grid = np.geomspace(lo, hi, 400)

        def f(theta):
            final = self.state({key: value, var: theta})
            return float(self.eliminate(final)[1][0])

        theta, jumps, skipped = scan_root(f, grid, start=start, skip=(InputError, ValueError, ArithmeticError))
        if theta is None:
            if jumps or any(isinstance(exc, TwoPhaseError) for exc in skipped):
                raise TwoPhaseError(
                    "final",
                    f"the balance puts the final state inside the two-phase region of {model.label}; "
                    "use the reference model for a liquid-vapour mixture",
                )
            raise SolveError(
                f"no final state with {key} fixed satisfies the balance between {var} = {lo:.4g} and {hi:.4g} "
                "(SI); check the given values and the sign of heat and work"
            )
        final = self.state({key: value, var: theta})
        lin, rest = self.eliminate(final)
        return final, lin, (
            f"one free property ({var}2): bracket searched outward from the initial {var}, then Brent's method"
        )

    def _two(self):
        first = self.p.gases[0].state.point

        def f(z):
            final = self.state({"T": math.exp(z[0]), "v": math.exp(z[1])})
            return self.eliminate(final)[1]

        starts = [(first.T, first.v), (first.T, first.v * 2), (first.T * 1.5, first.v), (first.T * 0.7, first.v * 0.5)]
        from scipy.optimize import root as nd_root  # lazy: scipy.optimize costs ~0.4 s to import

        for T0, v0 in starts:
            try:
                sol = nd_root(f, [math.log(T0), math.log(v0)], method="hybr", options={"xtol": 1e-13})
            except (InputError, ValueError, FloatingPointError):
                continue
            if sol.success and np.max(np.abs(sol.fun)) < TOLERANCE:
                final = self.state({"T": math.exp(sol.x[0]), "v": math.exp(sol.x[1])})
                lin, _ = self.eliminate(final)
                return final, lin, "two free properties (T2, v2): scipy root (hybr), verified"
        raise SolveError("the solver did not converge on a final state (two free properties); give T2, P2 or v2")


def _best_rows(A: np.ndarray, k: int):
    best, best_det = None, 0.0
    for rows in itertools.combinations(range(A.shape[0]), k):
        det = abs(np.linalg.det(A[list(rows)]))
        if det > best_det * (1 + 1e-12):
            best, best_det = list(rows), det
    return best if best_det > 1e-14 else None


# -- result, check and explanation -------------------------------------------------
def _result(s: _Solver, final_point: Point, lin: dict, method: str) -> Result:
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
        value = lin[Unknown("heat", h.name)] if h.Q is None else h.Q
        terms.append(Term("heat", h.name, value, h.Q is None, h.T_boundary, h.T_boundary_note))
    for w in p.work:
        value = lin[Unknown("work", w.name)] if w.W_on is None else w.W_on
        terms.append(Term("work", w.name, value, w.W_on is None, detail=w.kind))
    if p.path != "given":
        terms.append(Term("boundary work", p.path, s.boundary_work(final_point, n), True, detail=p.path))

    # independent recomputation, from the states' extensive values
    U1 = sum(st.U for st in initial)
    dU = final.U - U1
    Q = sum(t.value for t in terms if t.kind == "heat")
    W = sum(t.value for t in terms if t.kind != "heat")
    residual = abs(dU + p.dKE + p.dPE - Q - W) / max(abs(dU), abs(Q) + abs(W), s.E_scale)
    if not residual < 1e-7:
        raise SolveError(f"the energy balance does not close after solving (relative residual {residual:.2e}); no result reported")
    dU_ig = sum(st.n * ((final_point.u - final_point.u_dep) - (st.point.u - st.point.u_dep)) for st in initial)
    dU_dep = sum(st.n * (final_point.u_dep - st.point.u_dep) for st in initial)
    dS = final.S - sum(st.S for st in initial)
    warnings = list(p.notes)
    if all(t.T_boundary is not None for t in terms if t.kind == "heat"):
        dS_surr = -sum(t.value / t.T_boundary for t in terms if t.kind == "heat")
        S_gen = dS + dS_surr
        if S_gen < -SGEN_TOLERANCE * n * R:
            raise SolveError(
                f"impossible process: S_gen = {S_gen:.6g} J/K < 0. {_sgen_cause(p, terms)}"
            )
    else:
        dS_surr = S_gen = None
        missing = [t.name for t in terms if t.kind == "heat" and t.T_boundary is None]
        warnings.append(f"S_gen not evaluated: heat term {', '.join(repr(m) for m in missing)} has no boundary temperature")
    warnings += _heat_direction_warnings(terms, final)
    for st in (*initial, final):
        warnings += [f"{st.name}: {w}" for w in p.model.warnings(st.point)]
    unknowns = {k: float(v) for k, v in lin.items()}
    result = Result(
        problem=p, initial=initial, final=final, terms=tuple(terms), n=n, dU=dU, dU_ig=dU_ig,
        dU_dep=dU_dep, dS_system=dS, dS_surroundings=dS_surr, S_gen=S_gen, residual=residual,
        iterations=evaluations, method=method, equations=(), warnings=tuple(warnings),
        cautions=tuple(cautions_for(p, initial, final)), unknowns=unknowns,
    )
    return replace(result, equations=tuple(explain(result)))


def _heat_direction_warnings(terms, final: State) -> list[str]:
    """Heat that would have to flow up a temperature difference by the end.

    The entropy balance with one boundary temperature can stay positive
    although the system ends hotter than the source feeding it (most heat went
    in while it was colder); heat alone still cannot do that.
    """
    out = []
    T2 = final.point.T
    for t in terms:
        if t.kind != "heat" or t.T_boundary is None or t.detail:  # detail: T_b is the system's own
            continue
        if t.value > 0 and T2 > t.T_boundary * (1 + 1e-9):
            side, verb = "comes from", "hotter"
        elif t.value < 0 and T2 < t.T_boundary * (1 - 1e-9):
            side, verb = "goes to", "colder"
        else:
            continue
        out.append(
            f"heat term '{t.name}' {side} {t.T_boundary - 273.15:.1f} °C but the system ends {verb}, at "
            f"{T2 - 273.15:.1f} °C: heat alone cannot do that; check Q and T_boundary"
        )
    return out


def _sgen_cause(p: Problem, terms) -> str:
    heats = [t for t in terms if t.kind == "heat"]
    if p.reversible:
        return "The process was declared reversible but the balances cannot meet S_gen = 0."
    if heats:
        return ("Check the direction of the heat terms and their boundary temperatures: heat cannot flow "
                "from a colder reservoir into a hotter system on its own.")
    return "An adiabatic closed system cannot lose entropy: check the final state and the work terms."


#: Below this metal temperature carbon steels need impact-test qualification under
#: the common pressure-vessel codes (-29 °C / -20 °F; common practice, no source).
LOW_TEMPERATURE_K = 244.15


def cautions_for(p: Problem, initial, final: State) -> list[str]:
    """The cautions an engineer expects to see beside a result that can hurt someone."""
    out = [
        "This is an energy-balance calculation, not a design or assessment of pressure equipment or "
        "relief systems. Apply the codes that govern your equipment (e.g. ASME VIII, EN 13445, "
        "API 520/521) and have the calculation checked by a competent, licensed engineer."
    ]
    states = [*initial, final]
    P_max = max(st.point.P for st in states)
    if P_max > p.p_atm + 0.5e5:
        out.append(
            f"Pressures up to {P_max / 1e5:.4g} bar(a) occur: confirm the design pressure of every vessel "
            "and pipe within the boundary and the set pressure of its relief device."
        )
    T_min = min(st.point.T for st in states)
    if T_min < LOW_TEMPERATURE_K:
        out.append(
            f"A temperature of {T_min - 273.15:.1f} °C occurs: check the minimum design metal temperature "
            "of the equipment (low-temperature embrittlement) before relying on this result."
        )
    if final.point.P > max(st.point.P for st in initial) * 1.001:
        out.append("The final pressure exceeds every initial pressure: the boundary must be rated for it.")
    return out


__all__ = ["Result", "Term", "solve", "solve_worksheet"]
