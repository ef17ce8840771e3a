"""What the app asks the domain about a worksheet, without widgets.

Every function here takes a :class:`~balance.worksheet.Worksheet` (or a
result) and returns a frozen answer the screens only display. They are
called from Textual thread workers: they may be slow (the reference model
imports CoolProp and solves with it) and must never touch the UI.

* :func:`check`    — degrees of freedom in words, and each step's status
* :func:`advise`   — the property model's adequacy at the states given so far
* :func:`solve`    — the balance, through :func:`balance.closed.solve`
* :func:`trace`    — points for the P–v and T–s diagrams (path, dome)

``advise`` and ``trace`` hold a little engineering judgement that belongs
in ``balance`` eventually (which model to recommend; how each constraint
maps to a quasi-static path); they use only the models' public interface.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from balance.errors import BalanceError, InputError
from balance.worksheet import UNKNOWN, Worksheet

from . import fields

COMPLETE, INCOMPLETE, INVALID = "complete", "incomplete", "invalid"


@dataclass(frozen=True)
class Check:
    """Degrees of freedom and step statuses for one worksheet."""

    worksheet: Worksheet
    ready: bool
    """the problem is well posed: as many unknowns as equations"""
    message: str
    """the degrees-of-freedom line, or what stops the count"""
    statuses: dict[str, str]
    unknowns: tuple[str, ...] = ()
    equations: tuple[str, ...] = ()
    fixed: tuple[str, ...] = ()
    path: str = ""
    constraints: tuple[str, ...] = ()
    """constraints in force, with the ones implied (free expansion ⇒ rigid, adiabatic)"""
    error_field: str = ""


# -- field problems, shared with the inline validators ------------------------------
def heading_problems(ws: Worksheet) -> list[str]:
    msg = fields.problem("pressure", ws.heading.atmosphere, "atmosphere")
    return [msg] if msg else []


def state_problems(ws: Worksheet) -> list[str]:
    p_atm = fields.atmosphere(ws.heading.atmosphere)
    out = []
    for i, s in enumerate(ws.initial):
        where = f"initial '{s.name or i + 1}'"
        for key, text in s.props.items():
            out.append(fields.problem(key, text, f"{key} ({where})", p_atm=p_atm))
        for key, text in s.amount.items():
            out.append(fields.problem(key, text, f"{key} ({where})", allow_unknown=key in ("n", "m"),
                                      p_atm=p_atm, positive=True))
    for key, text in ws.final.props.items():
        out.append(fields.problem(key, text, f"{key} (final)", allow_unknown=True, p_atm=p_atm))
    for key, text in ws.final.amount.items():
        out.append(fields.problem(key, text, f"{key} (final)", allow_unknown=True, positive=True))
    return [m for m in out if m]


def term_problems(ws: Worksheet) -> list[str]:
    out = []
    for h in ws.heat:
        out.append(fields.problem("energy", h.Q, f"Q ('{h.name}')", allow_unknown=True, required=True))
        out.append(fields.problem("temperature", h.T_boundary, f"T boundary ('{h.name}')", positive=True))
    for w in ws.work:
        out.append(fields.problem("energy", w.W, f"W ('{w.name}')", allow_unknown=True, required=True))
    return [m for m in out if m]


def process_problems(ws: Worksheet) -> list[str]:
    pr = ws.process
    out = [
        fields.problem("dimensionless", pr.n, "polytropic n", required="polytropic" in pr.constraints),
        fields.problem("energy", pr.dKE, "ΔKE"),
        fields.problem("energy", pr.dPE, "ΔPE"),
    ]
    return [m for m in out if m]


def _state_complete(s, final: bool) -> bool:
    if final:
        return bool(s.props or s.amount)
    if s.empty:
        return bool(s.amount.get("V", "").strip())
    given = [k for k, t in s.props.items() if t.strip() and t.strip() != UNKNOWN]
    amounts = [k for k, t in s.amount.items() if t.strip()]
    return len(given) == 2 and len(amounts) >= 1


def statuses(ws: Worksheet, visited: frozenset[str] = frozenset(), error_field: str = "") -> dict[str, str]:
    """Each input step: complete, incomplete or invalid (solve and review are the app's)."""
    out: dict[str, str] = {}
    h = ws.heading
    if heading_problems(ws):
        out["purpose"] = INVALID
    else:
        out["purpose"] = COMPLETE if h.title.strip() and h.purpose.strip() and h.basis.strip() else INCOMPLETE
    if ws.system.kind != "closed":
        out["boundary"] = INVALID
    else:
        out["boundary"] = COMPLETE if ws.system.inside.strip() else INCOMPLETE
    out["fluid"] = _fluid_status(ws)
    if state_problems(ws):
        out["states"] = INVALID
    elif ws.initial and all(_state_complete(s, False) for s in ws.initial) and _state_complete(ws.final, True):
        out["states"] = COMPLETE
    else:
        out["states"] = INCOMPLETE
    if term_problems(ws) or step_of_field(error_field) == 5:
        out["terms"] = INVALID
    else:
        out["terms"] = COMPLETE if (ws.heat or ws.work or "terms" in visited) else INCOMPLETE
    boundary_work = any(w.kind == "boundary" for w in ws.work)
    if process_problems(ws) or step_of_field(error_field) == 6:
        out["constraints"] = INVALID
    else:
        out["constraints"] = COMPLETE if (ws.process.constraints or boundary_work) else INCOMPLETE
    return out


def _fluid_status(ws: Worksheet) -> str:
    from balance.models import canonical
    from balance.species import lookup

    f = ws.fluid
    if not f.species.strip() or not f.model.strip():
        status = INCOMPLETE
    else:
        status = COMPLETE
    try:
        sp = lookup(f.species, "fluid.species") if f.species.strip() else None
        model = canonical(f.model) if f.model.strip() else None
    except InputError:
        return INVALID
    if model == "reference" and sp is not None and not sp.coolprop:
        return INVALID
    if model == "incompressible" and sp is not None and sp.liquid is None and "rho" not in f.overrides:
        return INVALID
    return status


#: where a domain error's field is typed: its first word -> step number
FIELD_STEPS = {"worksheet": 1, "system": 2, "fluid": 3, "initial": 4, "final": 4, "heat": 5, "work": 5,
               "process": 6}


def step_of_field(name: str) -> int | None:
    head = name.replace("'", " ").replace(".", " ").replace("[", " ").split(" ")[0] if name else ""
    return FIELD_STEPS.get(head)


def check(ws: Worksheet, visited: frozenset[str] = frozenset()) -> Check:
    """Prepare the problem and count its degrees of freedom; never raises for bad input."""
    from balance.problem import prepare

    try:
        problem = prepare(ws)
        dof = problem.dof
    except BalanceError as exc:
        where = getattr(exc, "field", "")
        step = step_of_field(where)
        prefix = f"not ready (step {step}): " if step else "not ready: "
        return Check(ws, False, prefix + str(exc), statuses(ws, visited, where), error_field=where)
    return Check(
        ws, dof.ok, dof.message, statuses(ws, visited), unknowns=dof.unknowns, equations=dof.equations,
        fixed=dof.fixed, path=problem.path, constraints=problem.constraints,
    )


# -- the model's adequacy at the states given so far ---------------------------------
@dataclass(frozen=True)
class StateHint:
    name: str
    T: float
    """[K]"""
    P: float
    """[Pa]"""
    Tr: float
    Pr: float
    Z: float
    """from the chosen model"""
    Z_real: float | None
    """from Peng-Robinson, when the chosen model is the ideal gas"""
    phase: str
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class Advice:
    """What the fluid step shows under the model picker."""

    model: str
    states: tuple[StateHint, ...] = ()
    problems: tuple[str, ...] = ()
    """states that could not be evaluated (and why)"""
    recommendation: str = ""
    adequate: bool = True


#: Thresholds of the recommendation (common practice, no source): below
#: Pr = 0.1, or above Tr = 2.5 with |Z - 1| < 1 %, the ideal gas is adequate for
#: energy balances; near the critical point only a reference equation is.
IDEAL_PR, IDEAL_TR, IDEAL_DZ = 0.1, 2.5, 0.01
NEAR_CRITICAL_TR, NEAR_CRITICAL_PR = 0.05, 0.5


def _given_states(ws: Worksheet):
    p_atm = fields.atmosphere(ws.heading.atmosphere)
    for i, s in enumerate(ws.initial):
        if s.empty:
            continue
        yield s.name or f"initial {i + 1}", s.props, p_atm
    yield ws.final.name or "final", ws.final.props, p_atm


def advise(ws: Worksheet) -> Advice:
    """Z, Tr, Pr and phase at each state with two given properties, and a recommendation."""
    from balance.errors import TwoPhaseError
    from balance.models import canonical, make_model
    from balance.species import lookup, with_overrides
    from balance.state import read_specs

    f = ws.fluid
    try:
        species, params = with_overrides(lookup(f.species, "fluid.species"), dict(f.overrides))
        name = canonical(f.model)
        model = make_model(name, species, params)
    except BalanceError as exc:
        return Advice(f.model, problems=(str(exc),), adequate=False)
    yardstick = make_model("peng-robinson", species) if name == "ideal-gas" else None
    hints, problems = [], []
    wet = liquid = near_critical = real_gas = False
    for label, props, p_atm in _given_states(ws):
        given = {k: t for k, t in props.items() if t.strip() and t.strip() != UNKNOWN}
        if len(given) != 2:
            continue
        try:
            specs = read_specs(given, species.M, label, p_atm)
            point = model.flash(specs, field=label)
        except TwoPhaseError:
            wet = True
            problems.append(f"{label}: inside the two-phase region of {model.label}")
            continue
        except BalanceError as exc:
            problems.append(str(exc))
            continue
        Tr, Pr = point.T / species.Tc, point.P / species.Pc
        Z_real = None
        if yardstick is not None:
            try:
                Z_real = yardstick.at_TP(point.T, point.P).Z
            except BalanceError:
                Z_real = None
        notes = tuple(model.warnings(point))
        hints.append(StateHint(label, point.T, point.P, Tr, Pr, point.Z, Z_real, point.phase, notes))
        wet |= point.phase == "two-phase"
        liquid |= point.phase == "liquid"
        near_critical |= abs(Tr - 1.0) < NEAR_CRITICAL_TR and Pr > NEAR_CRITICAL_PR
        z = Z_real if Z_real is not None else point.Z
        real_gas |= not (Pr < IDEAL_PR or (Tr > IDEAL_TR and abs(z - 1.0) < IDEAL_DZ))
    text, ok = _recommend(name, species, wet, liquid, near_critical, real_gas, bool(hints))
    return Advice(name, tuple(hints), tuple(problems), text, ok)


def _recommend(name, species, wet, liquid, near_critical, real_gas, any_state) -> tuple[str, bool]:
    reference = "the reference model" if species.coolprop else "a model with two phases (none for this species)"
    if not any_state and not wet:
        return "give two properties of a state (step 4) to see how well the model fits", True
    if wet:
        if name == "reference":
            return "wet states: the reference model handles them", True
        return f"a state is wet (two-phase): use {reference}", False
    if near_critical and name != "reference":
        return f"a state is near the critical point: prefer {reference}", False
    if liquid:
        if name in ("reference", "incompressible"):
            return "liquid states: this model suits them", True
        return f"a state is liquid: prefer {reference} or the incompressible model", False
    if name == "ideal-gas" and real_gas:
        return "real-gas effects are likely (see Z): use Peng-Robinson or Soave-Redlich-Kwong", False
    if name == "incompressible":
        return "gas states: the incompressible model does not apply; use a gas model", False
    if name in ("van-der-waals", "redlich-kwong") and real_gas:
        return "van der Waals and Redlich-Kwong are rough here: prefer Peng-Robinson or SRK", False
    if not real_gas and name != "ideal-gas":
        return "the ideal gas would also do here (low Pr or high Tr)", True
    return "the model suits the states given", True


# -- solving --------------------------------------------------------------------------
def solve(ws: Worksheet):
    """The solved balance (:class:`balance.closed.Result`); raises BalanceError."""
    from balance.closed import solve_worksheet

    return solve_worksheet(ws)


# -- diagrams --------------------------------------------------------------------------
@dataclass(frozen=True)
class Curve:
    """Points of one line, molar SI: T [K], P [Pa], v [m3/mol], s [J/(mol K)]."""

    label: str
    T: tuple[float, ...]
    P: tuple[float, ...]
    v: tuple[float, ...]
    s: tuple[float, ...]
    style: str = "path"
    """'path', 'jump' (no quasi-static path: end states joined, dashed) or 'dome'"""


@dataclass(frozen=True)
class Trace:
    """What the P–v and T–s diagrams draw."""

    M: float
    """molar mass [kg/mol], to draw per unit mass"""
    states: tuple[tuple[str, float, float, float, float], ...]
    """(name, T, P, v, s) of every initial state and the final one"""
    curves: tuple[Curve, ...] = ()
    note: str = ""
    problems: tuple[str, ...] = field(default_factory=tuple)


N_PATH = 40


def trace(result) -> Trace:
    """The process drawn as a path between the initial and final states.

    Quasi-static paths are followed through the model: rigid (v fixed),
    isothermal, isobaric, polytropic (P vⁿ fixed) and reversible adiabatic
    (s fixed). Free expansion and membrane rupture have no such path; their
    end states are joined by a dashed jump.
    """
    import numpy as np

    p = result.problem
    model = p.model
    fin = result.final.point
    states = tuple((st.name, st.point.T, st.point.P, st.point.v, st.point.s) for st in result.initial)
    states += ((result.final.name, fin.T, fin.P, fin.v, fin.s),)
    curves: list[Curve] = []
    problems: list[str] = []
    note = ""
    first = result.initial[0].point
    heats = [t for t in result.terms if t.kind == "heat"]
    adiabatic = "adiabatic" in p.constraints or not heats

    def along(label, specs_of, grid):
        pts = []
        for g in grid:
            try:
                pts.append(model.flash(specs_of(g), field="path"))
            except BalanceError:
                continue
        if len(pts) >= 2:
            curves.append(Curve(label, tuple(q.T for q in pts), tuple(q.P for q in pts),
                                tuple(q.v for q in pts), tuple(q.s for q in pts)))
        else:
            problems.append(f"the {label} path could not be evaluated")

    if len(result.initial) > 1 or "free-expansion" in p.constraints or "membrane-rupture" in p.constraints:
        note = "no quasi-static path: the end states are joined by a dashed line"
        for st in result.initial:
            q = st.point
            curves.append(Curve(f"{st.name} → {result.final.name}", (q.T, fin.T), (q.P, fin.P),
                                (q.v, fin.v), (q.s, fin.s), style="jump"))
    elif p.path == "rigid":
        along("rigid (v fixed)", lambda T: {"T": float(T), "v": first.v}, np.linspace(first.T, fin.T, N_PATH))
    elif p.path == "isothermal":
        along("isothermal", lambda v: {"T": first.T, "v": float(v)}, np.geomspace(first.v, fin.v, N_PATH))
    elif p.path == "isobaric":
        along("isobaric", lambda v: {"P": first.P, "v": float(v)}, np.geomspace(first.v, fin.v, N_PATH))
    elif p.path == "polytropic":
        k = p.n_poly
        along(f"polytropic n = {k:g}", lambda v: {"P": first.P * (first.v / v) ** k, "v": float(v)},
              np.geomspace(first.v, fin.v, N_PATH))
    elif p.reversible and adiabatic:
        along("reversible adiabatic (s fixed)", lambda v: {"s": first.s, "v": float(v)},
              np.geomspace(first.v, fin.v, N_PATH))
    else:
        note = "the worksheet gives the boundary work, not the path: the end states are joined by a dashed line"
        curves.append(Curve("initial → final", (first.T, fin.T), (first.P, fin.P), (first.v, fin.v),
                            (first.s, fin.s), style="jump"))
    if model.two_phase:
        dome = _dome(model)
        if dome is not None:
            curves.append(dome)
    return Trace(model.species.M, states, tuple(curves), note, tuple(problems))


def _dome(model) -> Curve | None:
    """The saturation curve (liquid side up to the critical point, vapour side down)."""
    import numpy as np

    lo, _ = model.T_bounds()
    Tc = model.species.Tc
    temps = list(np.linspace(max(lo, 0.5 * Tc), Tc * 0.999, 30))
    liquid, vapour = [], []
    for T in temps:
        try:
            liquid.append(model.flash({"T": float(T), "x": 0.0}, field="dome"))
            vapour.append(model.flash({"T": float(T), "x": 1.0}, field="dome"))
        except BalanceError:
            continue
    if len(liquid) < 3 or len(vapour) < 3:
        return None
    pts = liquid + vapour[::-1]
    return Curve("saturation", tuple(q.T for q in pts), tuple(q.P for q in pts), tuple(q.v for q in pts),
                 tuple(q.s for q in pts), style="dome")


def sig(x: float, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, for hints."""
    if x is None or not math.isfinite(x):
        return "—"
    return f"{x:.{digits}g}"
