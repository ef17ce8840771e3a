"""What the app asks the domain about a worksheet, without widgets.

Every function here takes a :class:`~balance.worksheet.Worksheet` (or a
result) and returns a frozen answer the screens only display. They are
called from Textual thread workers, or for the reference model in its own
process (:func:`tui.offload.call`): they may be slow and must never touch
the UI. Each goes through the façade, :mod:`balance.api`:

* :func:`check`    — degrees of freedom in words, and each step's status
* :func:`solve`    — the balance as the record holds it (:func:`balance.api.attempt`)
* :func:`trace`    — the diagrams' paths (:func:`balance.api.trace`)

The engineering judgement lives in ``balance``: the model's adequacy in
:func:`balance.api.advise`, the diagrams' paths in :func:`balance.api.trace`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, fields, replace

from balance import api
from balance.errors import InputError
from balance.kinds import KINDS
from balance.worksheet import UNKNOWN, Worksheet

from . import fields as field_checks
from .steps import BY_ID, SECTION_STEPS

COMPLETE, INCOMPLETE, INVALID = "complete", "incomplete", "invalid"


@dataclass(frozen=True)
class Check(api.Check):
    """The façade's check of a worksheet, with each step's status."""

    statuses: dict[str, str] = field(default_factory=dict)


# -- field problems, shared with the inline validators ------------------------------
def heading_problems(ws: Worksheet) -> list[str]:
    msg = field_checks.problem("pressure", ws.heading.atmosphere, "atmosphere")
    return [msg] if msg else []


def state_problems(ws: Worksheet) -> list[str]:
    p_atm = field_checks.atmosphere(ws.heading.atmosphere)
    out = []
    for i, s in enumerate(ws.initial):
        where = f"initial '{s.name or i + 1}'"
        for key, text in s.props.items():
            out.append(field_checks.problem(key, text, f"{key} ({where})", p_atm=p_atm))
        for key, text in s.amount.items():
            out.append(field_checks.problem(key, text, f"{key} ({where})", allow_unknown=key in ("n", "m"),
                                      p_atm=p_atm, positive=True))
    for key, text in ws.final.props.items():
        out.append(field_checks.problem(key, text, f"{key} (final)", allow_unknown=True, p_atm=p_atm))
    for key, text in ws.final.amount.items():
        out.append(field_checks.problem(key, text, f"{key} (final)", allow_unknown=True, positive=True))
    return [m for m in out if m]


def term_problems(ws: Worksheet) -> list[str]:
    out = []
    for h in ws.heat:
        out.append(field_checks.problem("energy", h.Q, f"Q ('{h.name}')", allow_unknown=True, required=True))
        out.append(field_checks.problem("temperature", h.T_boundary, f"T boundary ('{h.name}')", positive=True))
    for w in ws.work:
        out.append(field_checks.problem("energy", w.W, f"W ('{w.name}')", allow_unknown=True, required=True))
    return [m for m in out if m]


def process_problems(ws: Worksheet) -> list[str]:
    pr = ws.process
    out = [
        field_checks.problem("dimensionless", pr.n, "polytropic n", required="polytropic" in pr.constraints),
        field_checks.problem("energy", pr.dKE, "ΔKE"),
        field_checks.problem("energy", pr.dPE, "ΔPE"),
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
    if ws.system.kind not in KINDS:
        out["boundary"] = INVALID
    else:
        out["boundary"] = COMPLETE if ws.system.inside.strip() else INCOMPLETE
    at = step_of_field(error_field)
    out["fluid"] = INVALID if at == "fluid" else _fluid_status(ws)  # e.g. an override
    if state_problems(ws):
        out["states"] = INVALID
    elif ws.initial and all(_state_complete(s, False) for s in ws.initial) and _state_complete(ws.final, True):
        out["states"] = COMPLETE
    else:
        out["states"] = INCOMPLETE
    if term_problems(ws) or at == "terms":
        out["terms"] = INVALID
    else:
        out["terms"] = COMPLETE if (ws.heat or ws.work or "terms" in visited) else INCOMPLETE
    boundary_work = any(w.kind == "boundary" for w in ws.work)
    if process_problems(ws) or at == "constraints":
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


def step_of_field(name: str) -> str | None:
    """The step where a domain error's field is typed (its first word is the section)."""
    head = name.replace("'", " ").replace(".", " ").replace("[", " ").split(" ")[0] if name else ""
    step = SECTION_STEPS.get(head)
    return step.id if step else None


def check(ws: Worksheet, visited: frozenset[str] = frozenset()) -> Check:
    """The degrees of freedom (:func:`balance.api.check`) and the steps' statuses; never raises for bad input."""
    counted = api.check(ws)
    answer = Check(**{f.name: getattr(counted, f.name) for f in fields(api.Check) if f.name != "problem"},
                   statuses=statuses(ws, visited, counted.error_field))  # no problem: it crosses processes
    if not counted.error:
        return answer
    step = step_of_field(counted.error_field)
    prefix = f"not ready (step {BY_ID[step].number}): " if step else "not ready: "
    return replace(answer, message=prefix + counted.error)


# -- solving --------------------------------------------------------------------------
def solve(source: Worksheet | dict) -> api.Attempt:
    """The balance solved as the record holds it (the worksheet's sections), so that the
    record's solve entry is this very solve (:func:`balance.api.entry_data`); never raises
    for bad input or a failed solve."""
    return api.attempt(source.to_dict() if isinstance(source, Worksheet) else source)


def trace(result):
    """The P-v and T-s diagrams' lines (:func:`balance.api.trace`); raises BalanceError.

    numpy's floating-point warnings are off while the paths are sampled:
    the lines are a sketch, and a terminal app has nowhere to print them.
    """
    import numpy as np

    with np.errstate(all="ignore"):
        return api.trace(result)


def sig(x: float, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, for hints."""
    if x is None or not math.isfinite(x):
        return "—"
    return f"{x:.{digits}g}"
