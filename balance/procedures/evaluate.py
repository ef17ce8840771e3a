"""Applying a procedure to a worksheet and its result: what passes, what warns, what stops.

:func:`findings` gives one :class:`Finding` per rule (a required field, a model rule, an
acceptance check). A rule that fails is a deviation; the worksheet may justify it in writing
(``[worksheet.deviations]``, the rule's id and the reason), and a justified deviation neither
warns nor stops: it is shown, with its reason, to whoever checks the calculation.
:func:`signoff_problem` is the procedure's part of the sign-off rules.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from ..units import DIMENSIONS
from .quantities import QUANTITIES, value_of
from .schema import COMPARISONS, REQUIRABLE, STOP, WARN, Check, ModelRule, Procedure

PASS, JUSTIFIED, NOT_APPLICABLE = "pass", "justified", "n/a"


@dataclass(frozen=True)
class Finding:
    rule: str
    """the rule's id (a required field's name, a model rule's or a check's id)"""
    kind: str
    """'required', 'model' or 'check'"""
    outcome: str
    """pass, warn, stop, justified (a failed rule the worksheet justifies) or n/a (not applicable,
    or not known until solved)"""
    message: str
    step: str
    """the step it concerns"""
    justification: str = ""

    @property
    def blocks(self) -> bool:
        """Whether it refuses the sign-off."""
        return self.outcome == STOP

    def line(self) -> str:
        mark = {PASS: "pass", WARN: "WARN", STOP: "STOP", JUSTIFIED: "deviation", NOT_APPLICABLE: "n/a"}[self.outcome]
        text = f"{mark:9} {self.rule}: {self.message}"
        if self.justification:
            text += f" — justified: {self.justification}"
        return text


def _fmt(value: float, dimension: str) -> str:
    unit = DIMENSIONS[dimension].si_unit
    if dimension == "temperature":
        return f"{value:.2f} K ({value - 273.15:.2f} °C)"
    if dimension == "pressure":
        return f"{value / 1e5:.4g} bar(a)"
    if unit == "dimensionless":
        return f"{value:.3g}"
    return f"{value:.4g} {unit.replace('**', '^')}"


def _filled(ws, name: str) -> bool:
    section, key = name.split(".")
    if section == "worksheet":
        return bool(getattr(ws.heading, key))
    if section == "system":
        return bool(getattr(ws.system, key).strip())
    if section == "heat":
        return all(h.T_boundary.strip() for h in ws.heat)
    if section == "device":
        return all(d.values.get("T_boundary", "").strip() for d in ws.devices if d.kind in ("heater", "cooler"))
    raise KeyError(name)


def _judged(rule: str, kind: str, failed: bool, severity: str, message: str, step: str, deviations) -> Finding:
    if not failed:
        return Finding(rule, kind, PASS, message, step)
    why = (deviations.get(rule) or "").strip()
    if why:
        return Finding(rule, kind, JUSTIFIED, message, step, why)
    return Finding(rule, kind, severity, message, step)


def required_findings(procedure: Procedure, ws) -> list[Finding]:
    out = []
    for guide in procedure.steps.values():
        for name in guide.required:
            ok = _filled(ws, name)
            message = f"the house asks for {REQUIRABLE[name].words}" + ("" if ok else f": {name} is blank")
            out.append(_judged(name, "required", not ok, STOP, message, guide.step, ws.heading.deviations))
    return out


def _conditions(ws, data: dict | None) -> tuple[float | None, float | None]:
    """The highest pressure [Pa] and lowest reduced temperature of the calculation: from the
    result when solved, else from the pressures and temperatures typed."""
    from ..api import read_field
    from ..errors import BalanceError

    P_max = T_min = None
    if data is not None and "error" not in data:
        P_max, T_min = value_of("P_max", data), value_of("T_min", data)
    else:
        p_atm = None
        try:
            p_atm = read_field("atmosphere", ws.heading.atmosphere, "worksheet.atmosphere")
        except BalanceError:
            pass
        for props in _typed_states(ws):
            for key, store in (("P", "P"), ("T", "T")):
                text = props.get(key, "")
                if not text or text.strip() == "?":
                    continue
                try:
                    value = read_field(key, text, key, **({"p_atm": p_atm} if p_atm else {}))
                except BalanceError:
                    continue
                if store == "P":
                    P_max = value if P_max is None else max(P_max, value)
                else:
                    T_min = value if T_min is None else min(T_min, value)
    Tc = _critical_T(ws)
    return P_max, (T_min / Tc if T_min is not None and Tc else None)


def _typed_states(ws):
    for s in ws.initial:
        yield s.props
    yield ws.final.props
    for st in ws.streams:
        yield st.props
    for v in ws.vessels:
        yield v.props
    for line in ws.lines:
        yield line.props


def _critical_T(ws) -> float | None:
    from ..errors import BalanceError
    from ..state import species_of

    try:
        return species_of(ws.fluid).Tc  # a mixture's: Kay's pseudo-critical
    except (BalanceError, AttributeError):
        return None


def _models_used(ws) -> list[tuple[str, str]]:
    """(where, model) of every model the worksheet chooses: the fluid's, and each stream's own."""
    from ..errors import BalanceError
    from ..models import canonical

    out = []
    for where, name in [("fluid.model", ws.fluid.model)] + [(f"stream '{s.name}'.model", s.model)
                                                            for s in ws.streams if getattr(s, "model", "")]:
        if not name:
            continue
        try:
            out.append((where, canonical(name)))
        except BalanceError:
            continue  # the worksheet's own check names it
    return out


def model_findings(procedure: Procedure, ws, data: dict | None = None) -> list[Finding]:
    if not procedure.model_rules:
        return []
    P_max, Tr_min = _conditions(ws, data)
    used = _models_used(ws)
    out = []
    for rule in procedure.model_rules:
        applies, why = _applies(rule, P_max, Tr_min)
        if not applies:
            out.append(Finding(rule.id, "model", NOT_APPLICABLE, f"{rule.text} ({why})", "fluid"))
            continue
        outside = [f"{where} is {model}" for where, model in used if model not in rule.allowed]
        if not used:
            out.append(Finding(rule.id, "model", NOT_APPLICABLE, f"{rule.text} (no model chosen yet)", "fluid"))
            continue
        message = rule.text + (f" ({why}; " + "; ".join(outside) + ")" if outside else f" ({why})")
        out.append(_judged(rule.id, "model", bool(outside), rule.severity, message, "fluid", ws.heading.deviations))
    return out


def _applies(rule: ModelRule, P_max: float | None, Tr_min: float | None) -> tuple[bool, str]:
    if rule.P_above is None and rule.Tr_below is None:
        return True, "always"
    reasons, unknown = [], []
    if rule.P_above is not None:
        if P_max is None:
            unknown.append("the pressure")
        elif P_max > rule.P_above:
            reasons.append(f"the highest pressure {_fmt(P_max, 'pressure')} is above {_fmt(rule.P_above, 'pressure')}")
    if rule.Tr_below is not None:
        if Tr_min is None:
            unknown.append("the reduced temperature")
        elif Tr_min < rule.Tr_below:
            reasons.append(f"the lowest reduced temperature T/Tc {Tr_min:.3g} is below {rule.Tr_below:g}")
    if reasons:
        return True, " and ".join(reasons)
    if unknown:
        return False, f"{' and '.join(unknown)} not known yet"
    return False, "its conditions do not hold"


def check_findings(procedure: Procedure, ws, data: dict | None) -> list[Finding]:
    """The acceptance checks on a solve entry's data (None: not solved yet)."""
    out = []
    kind = ws.system.kind
    for check in procedure.checks:
        quantity = QUANTITIES[check.quantity]
        if kind not in (check.kinds or procedure.kinds) or kind not in quantity.kinds:
            continue
        value = None if data is None else value_of(check.quantity, data)
        if value is None:
            why = "not solved yet" if data is None else (
                "the solve failed" if "error" in data else f"this result has no {check.quantity}")
            out.append(Finding(check.id, "check", NOT_APPLICABLE if data is None else check.severity,
                               f"{check.message} ({why})", "results"))
            continue
        out.append(_judged(check.id, "check", not _holds(check, value), check.severity, _check_message(check, value),
                           "results", ws.heading.deviations))
    return out


def _holds(check: Check, value: float) -> bool:
    return COMPARISONS[check.compare][0](value, check.limit)


def _check_message(check: Check, value: float) -> str:
    dimension = QUANTITIES[check.quantity].dimension
    words = COMPARISONS[check.compare][1]
    limit = check.limit_text
    if dimension == "pressure" and _fmt(check.limit, dimension).split()[0] not in limit:
        limit += f" ({_fmt(check.limit, dimension)})"  # a gauge limit, said absolute as the value is
    return f"{check.message}: {check.quantity} = {_fmt(value, dimension)}, must be {words} {limit}"


def findings(procedure: Procedure, ws, data: dict | None = None) -> list[Finding]:
    """Every rule of ``procedure`` applied to the worksheet ``ws`` and, when solved, the solve
    entry's ``data`` (:func:`balance.api.entry_data`); deviations the worksheet names that are no
    rule of the procedure are reported too (a warning)."""
    out = required_findings(procedure, ws) + model_findings(procedure, ws, data) + check_findings(procedure, ws, data)
    rules = set(procedure.rule_ids())
    for rule, why in ws.heading.deviations.items():
        if rule not in rules:
            out.append(Finding(rule, "deviation", WARN, f"worksheet.deviations names {rule!r}, which is no rule of "
                               f"{procedure.id} version {procedure.version}", "purpose", why))
    return out


def blocking(found: Sequence[Finding]) -> list[Finding]:
    return [f for f in found if f.blocks]


def escalated_roles(procedure: Procedure, data: dict | None) -> list[tuple[str, str]]:
    """The further roles this result requires (role, the rule's text with the value)."""
    out = []
    for e in procedure.signoff.escalations:
        value = None if data is None else value_of(e.quantity, data)
        if value is not None and value > e.above:
            dimension = QUANTITIES[e.quantity].dimension
            out.append((e.role, f"{e.text} ({e.quantity} = {_fmt(value, dimension)}, above {e.above_text})"))
    return out


def required_roles(procedure: Procedure, data: dict | None) -> tuple[str, ...]:
    """Every role that must sign this result, in the procedure's order."""
    extra = {role for role, _ in escalated_roles(procedure, data)}
    return tuple(r for r in procedure.signoff.all_roles if r in procedure.signoff.roles or r in extra)
