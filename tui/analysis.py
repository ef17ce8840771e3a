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
from balance.errors import BalanceError, InputError
from balance.worksheet import DEVICE_KINDS, SECTIONS, UNKNOWN, Worksheet

from . import fields as field_checks
from .steps import steps_of

COMPLETE, INCOMPLETE, INVALID = "complete", "incomplete", "invalid"
#: The parts of a worksheet that are lists (a compartment, term, stream or device each).
_LISTS = ("initial", "heat", "work", "stream", "device", "vessel", "line")


@dataclass(frozen=True)
class FieldProblem:
    """What is wrong with one field (or one part) of the worksheet, and where it is typed.

    ``part`` is the worksheet's part (``initial``, ``final``, ``heat``, ``work``,
    ``process``, ``fluid``, ``system``, ``worksheet``), ``index`` which compartment
    or term of a list part (None for the others, or when the domain named none),
    ``key`` the field in it (``T``, ``Q``, ``T_boundary``, ``constraints`` ...; ''
    for the part as a whole).
    """

    step: str
    part: str
    index: int | None
    key: str
    message: str

    @property
    def place(self) -> tuple[str, int | None, str]:
        return self.part, self.index, self.key


@dataclass(frozen=True)
class Check(api.Check):
    """The façade's check of a worksheet, with each step's status and every field at fault."""

    statuses: dict[str, str] = field(default_factory=dict)
    problems: tuple[FieldProblem, ...] = ()
    """every field at fault, in the order of the steps and the form (the first is where to go)"""
    missing: tuple[FieldProblem, ...] = ()
    """what stops the count but is only not given yet (a blank field, a state with one
    property so far, no path ticked): not a fault, and where ctrl+r goes when nothing is"""

    def faults(self, step: str) -> int:
        """How many fields of ``step`` are at fault."""
        return len({p.place for p in self.problems if p.step == step})

    def problems_in(self, step: str) -> tuple[FieldProblem, ...]:
        return tuple(p for p in self.problems if p.step == step)


# -- constraints implied by others ----------------------------------------------------------
#: What a ticked constraint brings with it, as the closed balance reads it (free expansion
#: is rigid and adiabatic; a membrane rupture is rigid): shown as implied in step 6.
#: tests/test_tui_frame.py holds it to the domain's count (``Check.constraints``).
IMPLIED = {"free-expansion": ("rigid", "adiabatic"), "membrane-rupture": ("rigid",)}


def implied(ticked) -> dict[str, str]:
    """Each constraint implied by a ticked one, and the first ticked one that implies it."""
    out: dict[str, str] = {}
    for by in ticked:
        for c in IMPLIED.get(by, ()):
            out.setdefault(c, by)
    return out


# -- where a domain error's field is typed -----------------------------------------------
def _items(ws: Worksheet, part: str) -> tuple:
    """The compartments, terms, streams or devices of a list part (() for the other parts)."""
    return getattr(ws, SECTIONS[part]) if part in _LISTS else ()


def locate(name: str, ws: Worksheet, message: str) -> FieldProblem | None:
    """The field a domain error names (``initial 'V-101'.T``, ``heat 'jacket'.T_boundary``,
    ``final.T``, ``initial[2].P``, ``process.constraints``, ``stream 'header'.rate``,
    ``device 'PCV-201'``), placed in ``ws`` at the step of its kind where it is typed; None
    when it names no part of the worksheet that its steps edit (a problem of the whole sheet)."""
    name = name.strip()
    if not name:
        return None
    index = None
    if " '" in name and name.rfind("'") > name.index(" '") + 1:
        head, rest = name.split(" '", 1)
        label, key = rest[:rest.rfind("'")], rest[rest.rfind("'") + 1:].lstrip(".")
        index = next((i for i, item in enumerate(_items(ws, head)) if item.name == label), None)
    else:
        head, _, key = name.partition(".")
        if "[" in head and head.endswith("]"):
            head, _, number = head[:-1].partition("[")
            index = int(number) - 1 if number.isdigit() else None
    key = key.split(".")[0].split("[")[0]
    step = steps_of(ws.system.kind).section_steps.get(head)
    if step is None:
        return None
    if index is not None and not 0 <= index < len(_items(ws, head)):
        index = None
    return FieldProblem(step.id, head, index, key, message)


# -- field problems, shared with the inline validators ------------------------------
def _at(step: str, part: str, index: int | None, key: str, message: str | None) -> list[FieldProblem]:
    return [FieldProblem(step, part, index, key, message)] if message else []


def heading_problems(ws: Worksheet) -> list[FieldProblem]:
    msg = field_checks.problem("pressure", ws.heading.atmosphere, "atmosphere")
    return _at("purpose", "worksheet", None, "atmosphere", msg)


def state_problems(ws: Worksheet) -> list[FieldProblem]:
    p_atm = field_checks.atmosphere(ws.heading.atmosphere)
    out: list[FieldProblem] = []
    for i, s in enumerate(ws.initial):
        where = f"initial '{s.name or i + 1}'"
        for key, text in s.props.items():
            out += _at("states", "initial", i, key,
                       field_checks.problem(key, text, f"{key} ({where})", p_atm=p_atm))
        for key, text in s.amount.items():
            out += _at("states", "initial", i, key,
                       field_checks.problem(key, text, f"{key} ({where})", allow_unknown=key in ("n", "m"),
                                            p_atm=p_atm, positive=True))
    for key, text in ws.final.props.items():
        out += _at("states", "final", None, key,
                   field_checks.problem(key, text, f"{key} (final)", allow_unknown=True, p_atm=p_atm))
    for key, text in ws.final.amount.items():
        out += _at("states", "final", None, key,
                   field_checks.problem(key, text, f"{key} (final)", allow_unknown=True, positive=True))
    return out


def term_problems(ws: Worksheet) -> list[FieldProblem]:
    out: list[FieldProblem] = []
    for i, h in enumerate(ws.heat):
        out += _at("terms", "heat", i, "Q", field_checks.problem("energy", h.Q, f"Q ('{h.name}')",
                                                                 allow_unknown=True, required=True))
        out += _at("terms", "heat", i, "T_boundary",
                   field_checks.problem("temperature", h.T_boundary, f"T boundary ('{h.name}')", positive=True))
    for i, w in enumerate(ws.work):
        out += _at("terms", "work", i, "W", field_checks.problem("energy", w.W, f"W ('{w.name}')",
                                                                 allow_unknown=True, required=True))
    return out


def process_problems(ws: Worksheet) -> list[FieldProblem]:
    pr = ws.process
    return (_at("constraints", "process", None, "n",
                field_checks.problem("dimensionless", pr.n, "polytropic n", required="polytropic" in pr.constraints))
            + _at("constraints", "process", None, "dKE", field_checks.problem("energy", pr.dKE, "ΔKE"))
            + _at("constraints", "process", None, "dPE", field_checks.problem("energy", pr.dPE, "ΔPE")))


def _closed_problems(ws: Worksheet) -> list[FieldProblem]:
    return (heading_problems(ws) + system_problems(ws) + fluid_problems(ws) + state_problems(ws)
            + term_problems(ws) + process_problems(ws))


def _closed_domain(ws: Worksheet, counted: api.Check, found: list[FieldProblem]) -> list[FieldProblem]:
    """What stopped the closed balance's count, at its field (unless a field's own check is there)."""
    if not counted.error:
        return []
    at = locate(counted.error_field, ws, counted.error)
    return [at] if at is not None and at.place not in {p.place for p in found} else []


def _closed_text_at(ws: Worksheet, p: FieldProblem) -> str | None:
    part, i, key = p.place
    if part == "fluid" and key in ("species", "model"):
        return getattr(ws.fluid, key).strip()
    if part == "worksheet" and key == "atmosphere":
        return ws.heading.atmosphere.strip()
    if part == "process":
        if key == "constraints":
            return "" if not ws.process.constraints and not any(w.kind == "boundary" for w in ws.work) else None
        return getattr(ws.process, key, None).strip() if key in ("n", "dKE", "dPE") else None
    if part in ("initial", "final"):
        state = ws.final if part == "final" else (ws.initial[i] if i is not None else None)
        if state is None:
            return None
        if key == "name":
            return state.name.strip()
        return (state.props.get(key) or state.amount.get(key) or "").strip()
    if part in ("heat", "work") and i is not None:
        term = getattr(ws, part)[i]
        attr = {"Q": "Q", "W": "W", "T_boundary": "T_boundary", "name": "name"}.get(key)
        return getattr(term, attr).strip() if attr else None
    return None


def _state_complete(s, final: bool) -> bool:
    if final:
        return bool(s.props or s.amount)
    if s.empty:
        return bool(s.amount.get("V", "").strip())
    given = [k for k, t in s.props.items() if t.strip() and t.strip() != UNKNOWN]
    amounts = [k for k, t in s.amount.items() if t.strip()]
    return len(given) == 2 and len(amounts) >= 1


def _closed_missing(ws: Worksheet, p: FieldProblem) -> bool:
    if p.key:
        return _closed_text_at(ws, p) == ""
    if p.part == "initial":
        states = ws.initial if p.index is None else ws.initial[p.index:p.index + 1]
        return not states or not all(_state_complete(s, False) for s in states)
    if p.part == "final":
        return not _state_complete(ws.final, True)
    return False


def _closed_complete(ws: Worksheet, visited: frozenset[str]) -> dict[str, bool]:
    boundary_work = any(w.kind == "boundary" for w in ws.work)
    return {
        "states": bool(ws.initial and all(_state_complete(s, False) for s in ws.initial)
                       and _state_complete(ws.final, True)),
        "terms": bool(ws.heat or ws.work or "terms" in visited),
        "constraints": bool(ws.process.constraints or boundary_work),
    }


# -- the steady-flow worksheet's fields ----------------------------------------------------
#: A stream's fields besides its state properties (text as typed).
STREAM_FIELDS = ("name", "rate", "velocity", "area", "z", "species", "model")


def stream_problems(ws: Worksheet) -> list[FieldProblem]:
    """Each stream's name (given, its own) and state properties, by the rules the solve
    reads them with; the rate and the rest are the domain's to judge (:func:`balance.api.problems`)."""
    p_atm = field_checks.atmosphere(ws.heading.atmosphere)
    names = [st.name.strip() for st in ws.streams]
    out: list[FieldProblem] = []
    for i, st in enumerate(ws.streams):
        label = st.name.strip() or str(i + 1)
        where = f"stream '{label}'"
        if not st.name.strip():
            out += _at("streams", "stream", i, "name",
                       f"stream {i + 1}: give it a name (the devices join streams by name)")
        elif names.index(st.name.strip()) != i:
            out += _at("streams", "stream", i, "name",
                       f"{where}: another stream has this name; give each its own")
        for key, text in st.props.items():
            out += _at("streams", "stream", i, key,
                       field_checks.problem(key, text, f"{key} ({where})", allow_unknown=True, p_atm=p_atm))
        given = [k for k, text in st.props.items() if text.strip() and text.strip() != UNKNOWN]
        if len(given) > 2:
            out += _at("streams", "stream", i, "",
                       f"{where}: {', '.join(given)} are given, but two properties fix a state; leave the others blank")
    return out


def device_problems(ws: Worksheet) -> list[FieldProblem]:
    """Each device's name, kind, and the streams it joins: every inlet and outlet names a
    stream of step 4."""
    streams = {st.name.strip() for st in ws.streams if st.name.strip()}
    out: list[FieldProblem] = []
    for i, d in enumerate(ws.devices):
        where = f"device '{d.name.strip() or i + 1}'"
        if not d.name.strip():
            out += _at("devices", "device", i, "name", f"device {i + 1}: give it a name, e.g. 'PCV-101'")
        if d.kind not in DEVICE_KINDS:
            out += _at("devices", "device", i, "kind", f"{where}.kind: choose one of {', '.join(DEVICE_KINDS)}")
        for key, names in (("inlets", d.inlets), ("outlets", d.outlets)):
            unknown = [n for n in names if n.strip() and n.strip() not in streams]
            if unknown:
                out += _at("devices", "device", i, key,
                           f"{key} of {d.name.strip() or f'device {i + 1}'}: {', '.join(repr(n) for n in unknown)} "
                           f"{'is' if len(unknown) == 1 else 'are'} not a stream of step 4 "
                           f"({', '.join(sorted(streams)) or 'none named yet'})")
    return out


def _flow_problems(ws: Worksheet) -> list[FieldProblem]:
    return (heading_problems(ws) + system_problems(ws) + fluid_problems(ws) + stream_problems(ws)
            + device_problems(ws))


def _flow_domain(ws: Worksheet, counted: api.Check, found: list[FieldProblem]) -> list[FieldProblem]:
    """The domain's fields at fault (:func:`balance.api.problems`), each at its field; one the
    fields' own checks already show is left out, and so is a stream's or device's problem as a
    whole where a field of it already says why (a device's inlet naming no stream)."""
    if not counted.error:
        return []
    places = {p.place for p in found}
    items = {(p.part, p.index) for p in found}
    out = []
    for problem in api.problems(ws):
        at = locate(problem.field, ws, str(problem))
        if at is None or at.place in places or (at.key == "" and (at.part, at.index) in items):
            continue
        out.append(at)
        places.add(at.place)
    return out


def _flow_text_at(ws: Worksheet, p: FieldProblem) -> str | None:
    part, i, key = p.place
    if part in ("stream", "device") and i is not None and key:
        item = _items(ws, part)[i]
        if part == "stream":
            return (getattr(item, key) if key in STREAM_FIELDS else item.props.get(key, "")).strip()
        if key in ("name", "kind"):
            return getattr(item, key).strip()
        if key in ("inlets", "outlets", "fractions"):
            return ", ".join(getattr(item, key)).strip()
        return item.values.get(key, "").strip()
    return _closed_text_at(ws, p)


def _flow_missing(ws: Worksheet, p: FieldProblem) -> bool:
    if p.key:
        return _flow_text_at(ws, p) == ""
    return p.part in ("stream", "device") and p.index is None and not _items(ws, p.part)


def _flow_complete(ws: Worksheet, visited: frozenset[str]) -> dict[str, bool]:
    return {
        "streams": bool(ws.streams and all(st.name.strip() for st in ws.streams)),
        "devices": bool(ws.devices and all(d.name.strip() and d.kind and d.inlets and d.outlets
                                           for d in ws.devices)),
    }


def _device_named(ws: Worksheet, message: str) -> list[FieldProblem]:
    """Where to go for what a counted network lacks: the device or stream its words start with
    (``valve PCV-201: give the outlet pressure``, ``stream 'feed': ...``); not a fault."""
    for i, d in enumerate(ws.devices):
        if message.startswith(f"{d.kind} {d.name}:"):
            return [FieldProblem("devices", "device", i, "", message)]
    for i, st in enumerate(ws.streams):
        if message.startswith(f"stream '{st.name}'"):
            return [FieldProblem("streams", "stream", i, "", message)]
    return []


# -- the transient worksheet's fields -------------------------------------------------------
def vessel_problems(ws: Worksheet) -> list[FieldProblem]:
    """Each vessel's name (given, its own) and volume, by the rules the solve reads them with;
    the rest is the domain's to judge (:func:`balance.api.problems`)."""
    names = [v.name.strip() for v in ws.vessels]
    out: list[FieldProblem] = []
    for i, v in enumerate(ws.vessels):
        where = f"vessel '{v.name.strip() or i + 1}'"
        if not v.name.strip():
            out += _at("vessels", "vessel", i, "name", f"vessel {i + 1}: give it a name (the lines join vessels by name)")
        elif names.index(v.name.strip()) != i:
            out += _at("vessels", "vessel", i, "name", f"{where}: another vessel has this name; give each its own")
        out += _at("vessels", "vessel", i, "V", field_checks.problem("V", v.V, f"V ({where})", positive=True))
    return out


def line_problems(ws: Worksheet) -> list[FieldProblem]:
    """Each line's name, and its ends: the supply or a vessel of step 4, a vessel or the outside."""
    vessels = {v.name.strip() for v in ws.vessels if v.name.strip()}
    out: list[FieldProblem] = []
    for i, line in enumerate(ws.lines):
        if not line.name.strip():
            out += _at("lines", "line", i, "name", f"line {i + 1}: give it a name, e.g. 'vent stack'")
        for key, end, other in (("from", line.source, "supply"), ("to", line.target, "outside")):
            if end.strip() and end not in vessels and end != other:
                out += _at("lines", "line", i, key, f"{key} of {line.name.strip() or f'line {i + 1}'}: {end!r} is "
                                                    f"not a vessel of step 4 ({', '.join(sorted(vessels)) or 'none named yet'})")
    return out


def _transient_problems(ws: Worksheet) -> list[FieldProblem]:
    return (heading_problems(ws) + system_problems(ws) + fluid_problems(ws) + vessel_problems(ws)
            + line_problems(ws))


def _transient_text_at(ws: Worksheet, p: FieldProblem) -> str | None:
    part, i, key = p.place
    if part == "vessel" and i is not None and key:
        v = ws.vessels[i]
        if key in ("name", "V"):
            return getattr(v, key).strip()
        if key in v.props or key in ("T", "P", "rho"):
            return v.props.get(key, "").strip()
        if key == "Q" and v.Q_points:
            return ", ".join(v.Q_points)
        return v.values.get(key, "").strip() if key != "heat" else v.heat
    if part == "line" and i is not None and key:
        line = ws.lines[i]
        if key in ("name",):
            return line.name.strip()
        if key in ("from", "to"):
            return (line.source if key == "from" else line.target).strip()
        if key in ("T", "P"):
            return line.props.get(key, "").strip()
        return line.values.get(key, "").strip()
    if part == "end":
        if key in ("P", "m", "t"):
            return ws.end.values.get(key, "").strip()
        if key == "":
            return "" if not ws.end.values and not ws.end.balanced else None
        return None
    if part == "history" and key:
        return ws.history.get(key, "").strip() or None  # a blank setting takes the default: not missing
    return _closed_text_at(ws, p)


def _transient_missing(ws: Worksheet, p: FieldProblem) -> bool:
    if p.part in ("vessel", "line") and p.index is None:
        return not _items(ws, p.part)
    if p.part == "end" and not p.key:
        return _transient_text_at(ws, p) == ""
    if p.key:
        return _transient_text_at(ws, p) == ""
    return False


def _transient_complete(ws: Worksheet, visited: frozenset[str]) -> dict[str, bool]:
    def started(v) -> bool:  # evacuated, or its gas given by two properties
        return v.empty or sum(1 for t in v.props.values() if t.strip()) == 2

    def supplied(ln) -> bool:  # a supply's state given
        return ln.source != "supply" or all(ln.props.get(k, "").strip() for k in ("T", "P"))

    return {
        "vessels": bool(ws.vessels and all(v.name.strip() and v.V.strip() and started(v) for v in ws.vessels)),
        "lines": bool(ws.lines and all(ln.name.strip() and ln.source and ln.target and supplied(ln)
                                       for ln in ws.lines)),
        "end": bool(ws.end.balanced or any(t.strip() for t in ws.end.values.values())),
    }


# -- one lookup by kind ---------------------------------------------------------------------
@dataclass(frozen=True)
class _Form:
    """How the app checks the fields of one kind of worksheet (beyond what every kind shares)."""

    own: object
    """ws -> every field's own check (what the inline validators say)"""
    domain: object
    """(ws, counted, found) -> what the domain's check found, placed at its fields (less what
    ``found``, the fields' own checks, already says)"""
    missing: object
    """(ws, problem) -> whether the problem is only that something is not given yet"""
    complete: object
    """(ws, visited) -> for each of the kind's own input steps, whether it is complete"""
    lacking: object = None
    """(ws, message) -> where to go for what a counted worksheet lacks (ctrl+r), or None"""


_FORMS = {
    "closed": _Form(_closed_problems, _closed_domain, _closed_missing, _closed_complete),
    "steady-flow": _Form(_flow_problems, _flow_domain, _flow_missing, _flow_complete, _device_named),
    # the domain's problems are placed at their fields as a steady-flow worksheet's are
    "transient": _Form(_transient_problems, _flow_domain, _transient_missing, _transient_complete),
}


def _form(ws: Worksheet) -> _Form:
    return _FORMS[steps_of(ws.system.kind).kind]


def field_problems(ws: Worksheet, counted: api.Check | None = None) -> tuple[FieldProblem, ...]:
    """Every field at fault: each field's own check (what the inline validators say) and
    what the domain's check found, placed at its field; in the order of the steps. What is
    only not given yet is left out (:func:`missing_fields`)."""
    return _split(ws, _all_problems(ws, counted))[0]


def missing_fields(ws: Worksheet, counted: api.Check | None = None) -> tuple[FieldProblem, ...]:
    """What the checks name that is only not given yet: a blank field, a state given in
    part, no path ticked. Not a fault: the step is incomplete, not invalid."""
    return _split(ws, _all_problems(ws, counted))[1]


def _all_problems(ws: Worksheet, counted: api.Check | None) -> list[FieldProblem]:
    form = _form(ws)
    found = form.own(ws)
    if counted is not None:
        found += form.domain(ws, counted, found)
    return found


def _split(ws: Worksheet, problems) -> tuple[tuple[FieldProblem, ...], tuple[FieldProblem, ...]]:
    """(the faults, what is only not given yet), each in the order of the steps."""
    missing = _form(ws).missing
    order = {step_id: i for i, step_id in enumerate(steps_of(ws.system.kind).order)}
    ranked = sorted(problems, key=lambda p: order.get(p.step, len(order)))
    return (tuple(p for p in ranked if not missing(ws, p)), tuple(p for p in ranked if missing(ws, p)))


def system_problems(ws: Worksheet) -> list[FieldProblem]:
    """The kind of balance: one the app can balance (:func:`balance.api.kind`)."""
    try:
        api.kind(ws)
    except InputError as exc:
        return _at("boundary", "system", None, "kind", str(exc))
    return []


def fluid_problems(ws: Worksheet) -> list[FieldProblem]:
    """The species and the model: known names, and a model the species can use."""
    from balance.models import canonical
    from balance.state import species_of

    f = ws.fluid
    out: list[FieldProblem] = []
    sp = model = None
    if f.species.strip() or f.composition:
        try:
            sp = species_of(f)
        except InputError as exc:
            out += _at("fluid", "fluid", None, "species", str(exc))
    if f.model.strip():
        try:
            model = canonical(f.model)
        except InputError as exc:
            out += _at("fluid", "fluid", None, "model", str(exc))
    if model == "reference" and sp is not None and not sp.coolprop:
        out += _at("fluid", "fluid", None, "model",
                   f"fluid.model: the reference model has no equation of state for {sp.name}; choose another")
    if model == "incompressible" and sp is not None and sp.liquid is None and "rho" not in f.overrides:
        out += _at("fluid", "fluid", None, "overrides",
                   f"fluid.overrides: the incompressible model needs a density, and the species data has none "
                   f"for {sp.name}; give rho, e.g. rho = 998 kg/m3")
    return out


def statuses(ws: Worksheet, visited: frozenset[str] = frozenset(),
             problems: tuple[FieldProblem, ...] | None = None) -> dict[str, str]:
    """Each input step of the worksheet's kind: complete, incomplete or invalid (solve and
    review are the app's).

    A step is invalid when one of its fields is at fault (``problems``, by default each
    field's own check: :func:`field_problems` without the domain's count).
    """
    if problems is None:
        problems = field_problems(ws)
    faulty = {p.step for p in problems}
    h = ws.heading
    f = ws.fluid
    complete = {
        "purpose": bool(h.title.strip() and h.purpose.strip() and h.basis.strip()),
        "boundary": bool(ws.system.inside.strip()),
        "fluid": bool(f.species.strip() and f.model.strip()),
        **_form(ws).complete(ws, visited),
    }
    return {step: INVALID if step in faulty else COMPLETE if done else INCOMPLETE
            for step, done in complete.items()}


def step_of_field(name: str, ws: Worksheet | None = None) -> str | None:
    """The step where a domain error's field is typed (its first word is the section), in the
    steps of ``ws``'s kind (the closed system's without one)."""
    head = name.replace("'", " ").replace(".", " ").replace("[", " ").split(" ")[0] if name else ""
    step = steps_of(ws.system.kind if ws is not None else "closed").section_steps.get(head)
    return step.id if step else None


def check(ws: Worksheet, visited: frozenset[str] = frozenset()) -> Check:
    """The degrees of freedom (:func:`balance.api.check`), every field at fault and the
    steps' statuses; never raises for bad input."""
    counted = api.check(ws)
    problems, missing = _split(ws, _all_problems(ws, counted))
    lacking = _form(ws).lacking
    if not counted.ready and not counted.error and lacking is not None:
        missing += tuple(lacking(ws, counted.message))
    answer = Check(**{f.name: getattr(counted, f.name) for f in fields(api.Check) if f.name != "problem"},
                   statuses=statuses(ws, visited, problems), problems=problems,
                   missing=missing)  # no `problem`: the check crosses processes
    if not counted.error:
        return answer
    step = step_of_field(counted.error_field, ws)
    prefix = f"not ready (step {steps_of(ws.system.kind)[step].number}): " if step else "not ready: "
    return replace(answer, message=prefix + counted.error)


# -- solving --------------------------------------------------------------------------
def solve(source: Worksheet | dict) -> api.Attempt:
    """The balance solved as the record holds it (the worksheet's sections), so that the
    record's solve entry is this very solve (:func:`balance.api.entry_data`); never raises
    for bad input or a failed solve."""
    return api.attempt(source.to_dict() if isinstance(source, Worksheet) else source)


def filed(solved: api.Attempt):
    """(the solve entry's data, the uncertainty budgets or None) of a solve: the budgets made once,
    for the record and the screen alike, where the values carry uncertainties. Module-level so
    that the reference model's process can run it."""
    from balance.study.uncertainty import has_uncertain_inputs

    ws = solved.worksheet
    budgets = None
    if solved.result is not None and ws is not None and has_uncertain_inputs(ws):
        try:
            budgets = api.uncertainty(ws, result=solved.result)
        except BalanceError:
            budgets = None  # the entry files why (entry_data works it out again and keeps the message)
    return api.entry_data(solved, budgets), budgets


def sweep(ws: Worksheet, vary: str, points: int | None):
    """The worksheet solved over one ``PATH=VALUES`` (:func:`balance.api.sweep`); module-level so
    that the reference model's process can run it. Raises InputError for a bad path or range."""
    return api.sweep(ws, [vary], points)


def sweep_default(ws: Worksheet) -> str:
    """The field a sweep offers first: the first pressure the worksheet gives (a charge, a
    supply, a stream's), else its first temperature, else nothing."""
    from balance.study.paths import values_of

    given = [p for p, text in values_of(ws) if text.strip() and not text.strip().startswith("?")]
    for key in (".P", ".T"):
        for p in given:
            if p.endswith(key) and not p.startswith(("worksheet.", "fluid.")):
                return p
    return ""


# -- two models side by side ----------------------------------------------------------------
@dataclass(frozen=True)
class Comparison:
    """One worksheet solved on two models: what each gives, row by row."""

    worksheet: Worksheet
    models: tuple[str, str]
    attempts: tuple[api.Attempt, api.Attempt]
    rows: tuple[tuple[str, str, float | None, float | None], ...] = ()
    """(label, display kind, value on the first model, on the second); SI, per unit mass
    for the intensive ones (what :func:`tui.display.show` takes)"""


#: The kinds whose results the compare screen lays side by side (its rows are a closed
#: system's final state and terms).
COMPARED = ("closed",)


def with_model(ws: Worksheet, model: str) -> Worksheet:
    """The worksheet with its property model replaced (species and overrides kept)."""
    return ws.with_(fluid=replace(ws.fluid, model=model))


def compared(ws: Worksheet, models: tuple[str, str], attempts: tuple[api.Attempt, api.Attempt]) -> Comparison:
    """The rows worth comparing: the final state, each term the balance solved for, ΔU and
    the entropy generated."""
    a, b = (x.result for x in attempts)

    def value(result, get):
        if result is None:
            return None
        try:
            return get(result)
        except (AttributeError, KeyError, StopIteration):
            return None

    some = a or b
    rows: list[tuple] = []
    if some is not None:
        name = some.final.name
        rows += [(f"T {name}", "T", value(a, lambda r: r.final.point.T), value(b, lambda r: r.final.point.T)),
                 (f"P {name}", "P", value(a, lambda r: r.final.point.P), value(b, lambda r: r.final.point.P)),
                 (f"v {name}", "v", value(a, lambda r: r.final.point.v / r.final.M),
                  value(b, lambda r: r.final.point.v / r.final.M))]
        for t in some.terms:
            if t.kind == "boundary work" and some.problem.path == "rigid":
                continue  # no boundary work on a rigid path, on any model
            if t.solved or t.kind == "boundary work":
                label = ("Q" if t.kind == "heat" else "W") + f" '{t.name}'"

                def term(r, t=t):
                    found = next(x for x in r.terms if x.kind == t.kind and x.name == t.name)
                    return r.problem.convention.shown(found.kind, found.value)

                rows.append((label, "E", value(a, term), value(b, term)))
        rows += [("ΔU", "E", value(a, lambda r: r.dU), value(b, lambda r: r.dU)),
                 ("S_gen", "S", value(a, lambda r: r.S_gen), value(b, lambda r: r.S_gen))]
        rows = _round_off(rows, [r for r in (a, b) if r is not None])
    return Comparison(ws, models, attempts, tuple(rows))


#: a computed energy or entropy below this share of the result's scale is round-off of zero
#: (the balances are solved far tighter; common practice, no source)
ROUND_OFF = 1e-9
R_GAS = 8.314462618  # J/(mol K), CODATA 2018 (exact since the 2019 SI)


def _round_off(rows: list[tuple], results: list) -> list[tuple]:
    """Energies and entropies that are round-off of zero, as 0: the scale is the largest of
    n R T at the final states and the energies compared (n R for entropies)."""
    scale = {"E": max([abs(r.n * R_GAS * r.final.point.T) for r in results]
                      + [abs(x) for _, k, *xs in rows if k == "E" for x in xs if x is not None and math.isfinite(x)]),
             "S": max([abs(r.n * R_GAS) for r in results]
                      + [abs(x) for _, k, *xs in rows if k == "S" for x in xs if x is not None and math.isfinite(x)])}

    def zeroed(kind: str, x):
        if kind in scale and x is not None and math.isfinite(x) and abs(x) < ROUND_OFF * scale[kind]:
            return 0.0
        return x

    return [(label, kind, zeroed(kind, a), zeroed(kind, b)) for label, kind, a, b in rows]


#: The kinds whose results the app draws, and on which planes: a closed system's process on
#: the P–v and T–s planes (:func:`balance.api.trace`), a steady-flow network's devices on the
#: T–s, h–s and P–h planes (:func:`balance.api.flow_trace`).
DRAWN = {"closed": ("P-v", "T-s"), "steady-flow": ("T-s", "h-s", "P-h"), "transient": ("T-t", "P-t")}


@dataclass(frozen=True)
class FlowTraces:
    """A steady-flow result's diagrams, one :class:`balance.diagrams.FlowTrace` a plane."""

    traces: tuple = ()
    """(FlowTrace, ...) in the order of ``DRAWN["steady-flow"]``"""

    def on(self, plane: str):
        """The trace drawn on ``plane`` ('T-s', 'h-s' or 'P-h')."""
        return next(t for t in self.traces if t.plane == plane)


def planes(result) -> tuple[str, ...]:
    """The planes the app draws this result on (none for a kind not in :data:`DRAWN`)."""
    return DRAWN.get(result.problem.worksheet.system.kind, ())


def draws(result) -> bool:
    """Whether the app draws diagrams of this result (its kind is in :data:`DRAWN`)."""
    return bool(planes(result))


def trace(result):
    """The diagrams' lines: a closed system's :class:`balance.diagrams.Trace`, a steady-flow
    network's :class:`FlowTraces`, or None for a result the app draws no diagram of
    (:func:`draws`); raises BalanceError.

    A steady-flow network's paths are followed through its models once: a flow trace's
    curves hold every property of each point (T, P, v, h, s), and its plane only says which
    two are drawn, so the other planes are the same trace named for them.

    numpy's floating-point warnings are off while the paths are sampled:
    the lines are a sketch, and a terminal app has nowhere to print them.
    """
    if not draws(result):
        return None
    import numpy as np

    with np.errstate(all="ignore"):
        return _TRACERS[result.problem.worksheet.system.kind](result)


def _flow_traces(result) -> FlowTraces:
    first, *others = DRAWN["steady-flow"]
    traced = api.flow_trace(result, first)
    return FlowTraces((traced, *(replace(traced, plane=plane) for plane in others)))


@dataclass(frozen=True)
class HistoryTrace:
    """A transient's history as its plots draw it: time [s] and, per vessel, T, P and the wall's T
    (SI), plus what it ended on."""

    t: tuple = ()
    vessels: tuple = ()
    """((name, T, P, T_wall or None), ...), each a tuple of floats"""
    stop: str = ""


def _history_trace(result) -> HistoryTrace | None:
    h = result.history
    if h is None:
        return None
    vessels = tuple((name, tuple(map(float, c["T"])), tuple(map(float, c["P"])),
                     tuple(map(float, c["T_wall"])) if "T_wall" in c else None) for name, c in h.vessels.items())
    return HistoryTrace(tuple(map(float, h.t)), vessels, h.stop)


#: How each kind in :data:`DRAWN` is traced.
_TRACERS = {"closed": api.trace, "steady-flow": _flow_traces, "transient": _history_trace}


def sig(x: float, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, for hints."""
    if x is None or not math.isfinite(x):
        return "—"
    return f"{x:.{digits}g}"
