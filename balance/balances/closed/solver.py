"""The closed-system search: the balances' equations and their solution.

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

import math
from functools import lru_cache

import numpy as np

from ...errors import InputError, SolveError, SpecificationError, TwoPhaseError
from ...models.base import SPEC_KEYS, Point, pair_of
from ...rootfind import root_near, scan_root
from ...units import R
from ..control_volume import TOLERANCE, Unknown, best_rows
from .problem import Problem
from .result import Result, result_of

AMOUNT = Unknown("amount")
#: Points of the bracket scan's grid over the free property's range.
GRID_POINTS = 400


@lru_cache(maxsize=64)
def _grid(lo: float, hi: float) -> tuple[float, ...]:
    """The scan's grid, geometric from ``lo`` to ``hi`` (built once per range: a model's
    temperature range is the same for every solve on it)."""
    return tuple(float(x) for x in np.geomspace(lo, hi, GRID_POINTS))


def solve(p: Problem) -> Result:
    """Solve a prepared problem; raises SpecificationError or SolveError."""
    dof = p.dof
    if not dof.ok:
        raise SpecificationError(dof.message)
    solver = _Solver(p)
    final, lin, method = solver.run()
    return result_of(solver, final, lin, method)


#: How far past the edge of the single-phase states a root may be taken to lie inside a
#: two-phase gap at the end of the range, as a multiple of the residual's change over the single
#: phase: a phase change takes up energy of the order of the sensible heat across the model's
#: range (latent heats are some 10 R Tc per mole; common practice, no source), not millions of times more.
GAP_REACH = 10.0


def _root_in_gap(seen: dict[float, float], gap: list[float]) -> bool:
    """Whether the balance's root can lie where the model has no single-phase state.

    ``seen`` holds the residual where the model gave a state, ``gap`` the points where the
    state would be two-phase. Yes when the residual changes sign across the gap; or when it
    keeps one sign, the gap lies at the end of the range it points to (the side where |f|
    falls), and it is within GAP_REACH times its change over the single phase of zero. A
    balance beyond every state (a ΔKE of 1e300 J) is not put in the two-phase region.
    """
    if not gap:
        return False
    if not seen:
        return True
    points = sorted(seen.items())
    values = [r for _, r in points]
    if min(values) < 0 < max(values):
        return True  # a sign change the single phase does not bridge
    (t_lo, r_lo), (t_hi, r_hi) = points[0], points[-1]
    span = max(values) - min(values)
    if abs(r_lo) < abs(r_hi):  # |f| falls towards low theta: the root would lie below the states seen
        return any(t < t_lo for t in gap) and abs(r_lo) <= GAP_REACH * span
    return any(t > t_hi for t in gap) and abs(r_hi) <= GAP_REACH * span


class _Solver:
    def __init__(self, p: Problem):
        self.p = p
        self.evaluations = 0
        self.lin_names = p.linear_unknowns()
        first = p.gases[0].state.point
        n_guess = p.n if p.n is not None else 1.0
        self.E_scale = max(n_guess * R * first.T, 1e-30)
        self.S_scale = n_guess * R
        self._first = first
        # the initial sums, worked out once when the amount is known (every evaluation needs them)
        self._known_sums = self._sums(p.n) if p.n is not None else None

    def amount(self, lin: dict) -> float:
        return self.p.n if self.p.n is not None else lin[AMOUNT]

    def _sums(self, n: float):
        U = S = V = 0.0
        for c in self.p.gases:
            ni = c.state.n if self.p.n is not None else n
            U += ni * c.state.point.u
            S += ni * c.state.point.s
            V += ni * c.state.point.v
        V += sum(c.V for c in self.p.initial if c.state is None)
        return U, S, V

    def initial_sums(self, n: float):
        """Σ n_i u_i [J], Σ n_i s_i [J/K] and Σ V_i [m3] of the initial compartments."""
        return self._known_sums if self._known_sums is not None else self._sums(n)

    def boundary_work(self, final: Point, n: float, V1: float | None = None) -> float:
        """Work done on the system by its moving boundary [J] (``V1``: the initial volume, when known)."""
        p = self.p
        path = p.path
        if path == "rigid":
            return 0.0
        first = self._first
        if V1 is None:
            V1 = self.initial_sums(n)[2]
        V2 = n * final.v
        if path == "isobaric":
            return -first.P * (V2 - V1)
        if path == "isothermal":
            return n * (final.a - first.a)
        if path == "polytropic":
            k = p.n_poly
            if abs(k - 1.0) < 1e-12:
                return -first.P * V1 * math.log(V2 / V1)
            return (final.P * V2 - first.P * V1) / (k - 1.0)
        return 0.0  # 'given': the boundary term is one of the work terms

    def residuals(self, final: Point, lin: dict) -> list[float]:
        """Scaled residuals of every equation at a final state and linear unknowns."""
        p = self.p
        n = self.amount(lin)
        U1, S1, V1 = self.initial_sums(n)
        Q = sum(lin[h.unknown] if h.Q is None else h.Q for h in p.heat)
        W = sum(lin[w.unknown] if w.W_on is None else w.W_on for w in p.work)
        energy = n * final.u - U1 + p.dKE + p.dPE - Q - W - self.boundary_work(final, n, V1)
        out = [energy / self.E_scale]
        if p.reversible_equation:
            q_over_t = sum(
                (lin[h.unknown] if h.Q is None else h.Q) / h.T_boundary for h in p.heat
            )
            out.append((n * final.s - S1 - q_over_t) / self.S_scale)
        if p.path == "polytropic":
            first = self._first
            k = p.n_poly
            # P2 v2^k / (P1 v1^k) - 1, in logarithms: v^k under- or overflows for a large k
            out.append(math.expm1(min(math.log(final.P / first.P) + k * math.log(final.v / first.v), 700.0)))
        return out

    def eliminate(self, final: Point):
        """Solve the linear unknowns at this final state; return them and the leftover residuals."""
        self.evaluations += 1
        names = self.lin_names
        if not names:
            return {}, self.residuals(final, {})
        zero = {k: 0.0 for k in names}
        c = np.array(self.residuals(final, zero))
        A = np.empty((len(c), len(names)))
        for j, k in enumerate(names):
            A[:, j] = np.array(self.residuals(final, {**zero, k: 1.0})) - c
        rows = best_rows(A, len(names))
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
            final = p.final_point if p.final_point is not None else self.state(dict(fixed))
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
        last: dict = {}
        seen: dict[float, float] = {}  # theta -> residual, where the model gave a state
        gap: list[float] = []  # thetas where the state would be two-phase
        keys = tuple(sorted((key, var), key=SPEC_KEYS.index))
        pair = pair_of(model, keys, "final")
        given_first = keys[0] == key

        def f(theta):
            try:
                final = pair(value, theta) if given_first else pair(theta, value)
            except TwoPhaseError:
                gap.append(theta)
                raise
            lin, rest = self.eliminate(final)
            last.update(theta=theta, final=final, lin=lin)
            seen[theta] = float(rest[0])
            return seen[theta]

        skip = (InputError, ValueError, ArithmeticError)
        theta, jumps, skipped = root_near(f, start, lo, hi, skip=skip), 0, []
        if theta is None:  # not smooth near the start: scan the whole range
            theta, jumps, skipped = scan_root(f, _grid(lo, hi), start=start, skip=skip)
        if theta is None:
            if jumps or _root_in_gap(seen, gap):
                raise TwoPhaseError(
                    "final",
                    f"the balance puts the final state inside the two-phase region of {model.label}; "
                    "use the reference model for a liquid-vapour mixture",
                )
            side = ""
            if seen and all(r > 0 for r in seen.values()) or seen and all(r < 0 for r in seen.values()):
                side = (" (the balance stays on one side of zero over the whole range: the heat, work and "
                        "energy terms are more than the fluid can take up or give between those limits)")
            raise SolveError(
                f"no final state with {key} fixed satisfies the balance between {var} = {lo:.4g} and {hi:.4g} "
                f"(SI){side}; check the given values and the sign of heat and work"
            )
        if last.get("theta") == theta:  # the search's last evaluation was at the root
            final, lin = last["final"], last["lin"]
        else:
            final = self.state({key: value, var: theta})
            lin, _ = self.eliminate(final)
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
