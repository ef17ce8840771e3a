"""How well the chosen property model fits the states given so far.

For each state with two given properties: Tr, Pr, Z (and, for the ideal gas,
Z from Peng-Robinson as a yardstick) and the phase; then one recommendation
(a wet state needs two phases, near-critical and liquid states want the
reference model, real-gas effects rule out the ideal gas ...). The thresholds
are common practice, stated below.
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import BalanceError, InputError
from .units import P_ATM, parse
from .worksheet import UNKNOWN, Worksheet


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


def _atmosphere(text: str) -> float:
    """The worksheet's atmosphere [Pa]; the standard one while the text is bad."""
    try:
        return parse(text or "1.01325 bar", "pressure", "worksheet.atmosphere")
    except InputError:
        return P_ATM


def _given_states(ws: Worksheet):
    """Each state the worksheet gives (label, properties, atmosphere): a closed system's
    compartments and final state, a steady-flow worksheet's streams on the worksheet's fluid, a
    transient worksheet's vessels at the start and its supplies."""
    p_atm = _atmosphere(ws.heading.atmosphere)
    if ws.system.kind == "transient":
        for v in ws.vessels:
            if not v.empty:
                yield f"vessel '{v.name}'", v.props, p_atm
        for line in ws.lines:
            if line.source == "supply":
                yield f"line '{line.name}' supply", line.props, p_atm
        return
    if ws.system.kind == "steady-flow":
        for i, st in enumerate(ws.streams):
            if not (st.species or st.model):  # a stream of its own fluid is not judged by this one
                yield f"stream '{st.name or i + 1}'", st.props, p_atm
        return
    for i, s in enumerate(ws.initial):
        if s.empty:
            continue
        yield s.name or f"initial {i + 1}", s.props, p_atm
    yield ws.final.name or "final", ws.final.props, p_atm


def advise(ws: Worksheet) -> Advice:
    """Z, Tr, Pr and phase at each state with two given properties, and a recommendation."""
    from .errors import TwoPhaseError
    from .mixture import pseudo_pure
    from .models import canonical, make_model
    from .state import fluid_pair, read_specs

    f = ws.fluid
    if not f.species.strip() or not f.model.strip():
        missing = "a species" if not f.species.strip() else "a property model"
        return Advice(f.model, problems=(f"choose {missing} to see how well the model fits",), adequate=False)
    try:
        species, model = fluid_pair(f)
        name = canonical(f.model)
    except BalanceError as exc:
        return Advice(f.model, problems=(str(exc),), adequate=False)
    yardstick = make_model("peng-robinson", pseudo_pure(species)) if name == "ideal-gas" else None
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
    where = {"steady-flow": "a stream (step 4)", "transient": "a vessel (step 4) or a supply (step 5)"}.get(
        ws.system.kind, "a state (step 4)")
    text, ok = _recommend(name, species, wet, liquid, near_critical, real_gas, bool(hints), where)
    return Advice(name, tuple(hints), tuple(problems), text, ok)


def _recommend(name, species, wet, liquid, near_critical, real_gas, any_state,
               where: str = "a state (step 4)") -> tuple[str, bool]:
    reference = "the reference model" if species.coolprop else "a model with two phases (none for this species)"
    if not any_state and not wet:
        return f"give two properties of {where} to see how well the model fits", True
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
