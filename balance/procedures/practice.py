"""Practice mode: a new hire's steps compared with an exercise's model answer.

After each step the trainee's worksheet is compared with the firm's answer for what that step
decides (the purpose step: the fields the house requires; the boundary: the kind of balance;
the fluid: the species and the model; the states, terms, constraints, streams, devices,
vessels, lines and end: what is given, what is unknown and the values, within the exercise's
tolerance; the results: the solved quantities). A difference is said without the answer's
value; the answer itself is given only when asked (:attr:`StepVerdict.answer`).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from ..errors import BalanceError, InputError
from ..kinds import KINDS, STEP_SECTIONS
from ..units import DIMENSIONS, P_ATM, parse
from ..worksheet import UNKNOWN, Worksheet
from .evaluate import required_findings
from .quantities import QUANTITIES, value_of
from .schema import Exercise, Procedure

#: Keys that are names or words, not compared: a trainee names things their own way.
_FREE = {"name", "title", "job", "purpose", "basis", "assumptions", "inside", "sketch", "procedure", "deviations",
         "convention", "atmosphere"}
# the order a bare quantity's dimension is tried in (the first it reads as wins)
_TRY = ("temperature", "pressure", "volume", "mass", "amount", "energy", "power", "mass_rate", "molar_rate",
        "volume_rate", "time", "length", "area", "molar_volume", "specific_volume", "density", "velocity",
        "heat_transfer_coefficient", "heat_flux", "molar_energy", "specific_energy")


@dataclass(frozen=True)
class StepVerdict:
    step: str
    right: bool
    differences: tuple[str, ...]
    """what differs from the answer, in words, without the answer's values"""
    hint: str
    """the exercise's hint for the step (or the procedure's guidance where it has none)"""
    answer: tuple[str, ...]
    """the model answer for the step, as lines (shown only when asked)"""


def answer_of(exercise: Exercise) -> Worksheet:
    return Worksheet.load(exercise.answer)


def _reading(text, p_atm: float = P_ATM) -> tuple[str, object]:
    """A value as typed, made comparable: ('?', None), ('number', x), (dimension, SI) or ('text', words);
    a gauge pressure read against ``p_atm`` [Pa], its worksheet's atmosphere."""
    if isinstance(text, bool):
        return "text", str(text).lower()
    if isinstance(text, (int, float)):
        return "number", float(text)
    text = str(text).strip()
    if text == UNKNOWN:
        return UNKNOWN, None
    try:
        return "number", float(text)
    except ValueError:
        pass
    for dimension in _TRY:
        try:
            return dimension, parse(text, dimension, "", p_atm=p_atm)
        except InputError:
            continue
    return "text", " ".join(text.casefold().split())


def _same(a, b, tolerance: float, atm: tuple[float, float] = (P_ATM, P_ATM)) -> bool:
    (ka, va), (kb, vb) = _reading(a, atm[0]), _reading(b, atm[1])
    if ka != kb:
        return False
    if isinstance(va, float) and isinstance(vb, float):
        return abs(va - vb) <= tolerance * max(abs(va), abs(vb)) + 1e-12
    return va == vb


def _table_differences(mine: dict, theirs: dict, where: str, tolerance: float,
                       atm: tuple[float, float] = (P_ATM, P_ATM)) -> list[str]:
    out = []
    for key in sorted(set(mine) | set(theirs)):
        if key in _FREE:
            continue
        a, b = mine.get(key), theirs.get(key)
        if isinstance(a, dict) or isinstance(b, dict):
            out += _table_differences(a or {}, b or {}, f"{where}.{key}", tolerance, atm)
            continue
        if isinstance(a, list) or isinstance(b, list):
            a_list, b_list = list(a or []), list(b or [])
            if key in ("constraints", "inlets", "outlets"):
                if sorted(map(str, a_list)) != sorted(map(str, b_list)):
                    out.append(f"{where}.{key}: not what the answer has")
            elif len(a_list) != len(b_list) or not all(_same(x, y, tolerance, atm) for x, y in zip(a_list, b_list)):
                out.append(f"{where}.{key}: not what the answer has")
            continue
        if a in (None, "") and b in (None, ""):
            continue
        if a in (None, ""):
            out.append(f"{where}.{key}: " + ("the answer solves for it ('?'); you left it blank"
                                             if _reading(b)[0] == UNKNOWN else "the answer gives it; you have not"))
        elif b in (None, ""):
            out.append(f"{where}.{key}: the answer does not give it")
        elif _reading(a)[0] == UNKNOWN or _reading(b)[0] == UNKNOWN:
            if _reading(a)[0] != _reading(b)[0]:
                out.append(f"{where}.{key}: " + ("the answer solves for it" if _reading(b)[0] == UNKNOWN
                                                  else "the answer gives it; you solve for it"))
        elif not _same(a, b, tolerance, atm):
            out.append(f"{where}.{key}: differs from the answer")
    return out


def _atmosphere(ws: Worksheet) -> float:
    """[Pa] the worksheet's atmosphere (the standard one where it does not read)."""
    try:
        return parse(ws.heading.atmosphere, "pressure", "", gauge=False)
    except InputError:
        return P_ATM


def _section_differences(mine: Worksheet, answer: Worksheet, section: str, tolerance: float) -> list[str]:
    a, b = mine.to_dict().get(section), answer.to_dict().get(section)
    atm = (_atmosphere(mine), _atmosphere(answer))
    if isinstance(a, list) or isinstance(b, list):
        a, b = list(a or []), list(b or [])
        out = []
        if len(a) != len(b):
            out.append(f"[[{section}]]: you have {len(a)}, the answer has {len(b)}")
        for i, (x, y) in enumerate(zip(a, b)):
            out += _table_differences(x, y, f"{section}[{i + 1}]", tolerance, atm)
        return out
    return _table_differences(a or {}, b or {}, section, tolerance, atm)


def _fluid_differences(mine: Worksheet, answer: Worksheet) -> list[str]:
    from ..models import canonical
    from ..species import lookup

    out = []
    try:
        same = lookup(mine.fluid.species).id == lookup(answer.fluid.species).id
    except BalanceError:
        same = False
    if not same:
        out.append("fluid.species: not the fluid of the exercise")
    try:
        same = canonical(mine.fluid.model) == canonical(answer.fluid.model)
    except BalanceError:
        same = False
    if not same:
        out.append("fluid.model: not the model the firm's answer uses")
    return out


def _result_differences(data: dict | None, answer_data: dict, tolerance: float) -> list[str]:
    if data is None or "error" in data:
        return ["results: not solved yet" if data is None else "results: the solve failed"]
    out = []
    for name in QUANTITIES:
        want = value_of(name, answer_data)
        if want is None or name == "residual":
            continue
        got = value_of(name, data)
        if got is None:
            out.append(f"{name}: your result has none")
        elif abs(got - want) > tolerance * max(abs(want), abs(got)) + _floor(name):
            out.append(f"{name}: differs from the answer by more than {tolerance:.0%}")
    return out


def _floor(name: str) -> float:
    """The smallest difference that counts, in the quantity's SI unit (a quantity that is zero
    in the answer is matched within this)."""
    return {"entropy": 1e-6, "entropy_rate": 1e-6, "energy": 1e-3, "power": 1e-3}.get(QUANTITIES[name].dimension, 0.0)


def _answer_lines(answer: Worksheet, step: str, answer_data: dict | None) -> tuple[str, ...]:
    if step == "results":
        if answer_data is None:
            return ()
        lines = []
        for name, q in QUANTITIES.items():
            value = value_of(name, answer_data)
            if value is not None and name != "residual":
                lines.append(f"{name} = {value:.6g} {DIMENSIONS[q.dimension].si_unit.replace('**', '^')}")
        return tuple(lines)
    import tomli_w

    data = answer.to_dict()
    part = {s: data[s] for s in STEP_SECTIONS.get(step, ()) if s in data and data[s] not in ({}, [])}
    return tuple(tomli_w.dumps(part).splitlines()) if part else ()


def compare_step(procedure: Procedure, exercise: Exercise, step: str, ws: Worksheet, data: dict | None = None,
                 answer_data: dict | None = None) -> StepVerdict:
    """The trainee's worksheet ``ws`` (and, at the results step, their solve entry's ``data``)
    against the exercise's answer for ``step``. ``answer_data`` is the answer's solve entry's
    data (the results step solves it when not given)."""
    answer = answer_of(exercise)
    if step not in KINDS[answer.system.kind].steps:
        raise InputError("practice", f"the exercise has no step {step!r}")
    tolerance = exercise.tolerance
    if step == "purpose":
        differences = [f"{f.rule}: the house requires it" for f in required_findings(procedure, ws)
                       if f.step == "purpose" and f.outcome != "pass"]
    elif step == "boundary":
        differences = [] if ws.system.kind == answer.system.kind else ["system.kind: not the kind of balance of the "
                                                                       "answer"]
    elif step == "fluid":
        differences = _fluid_differences(ws, answer)
    elif step == "results":
        if answer_data is None:
            answer_data = solve_answer(exercise)
        differences = _result_differences(data, answer_data, tolerance)
    elif step == "review":
        differences = []
    else:
        differences = [d for s in STEP_SECTIONS[step] for d in _section_differences(ws, answer, s, tolerance)]
    hint = exercise.hints.get(step) or procedure.guide(step).guidance
    return StepVerdict(step, not differences, tuple(differences), hint, _answer_lines(answer, step, answer_data))


def solve_answer(exercise: Exercise) -> dict:
    """The solve entry's data of the exercise's answer."""
    from .. import api

    return api.entry_data(api.attempt(api.read(Path(exercise.answer))))


@dataclass
class PracticeLog:
    """How a trainee got on, step by step: tries, right first time, the answer asked for."""

    steps: dict

    @classmethod
    def of(cls, data: dict | None) -> "PracticeLog":
        return cls(dict(data or {}))

    def record(self, verdict: StepVerdict) -> None:
        entry = dict(self.steps.get(verdict.step, {"tries": 0, "first": None, "revealed": False}))
        entry["tries"] += 1
        if entry["first"] is None:
            entry["first"] = verdict.right and not entry.get("revealed")  # right after the answer: not first time
        entry["right"] = verdict.right
        self.steps[verdict.step] = entry

    def revealed(self, step: str) -> None:
        entry = dict(self.steps.get(step, {"tries": 0, "first": None, "revealed": False}))
        entry["revealed"] = True
        self.steps[step] = entry

    def summary(self, order) -> list[str]:
        """One line a step, in the exercise's order: right first time, right after N tries,
        the answer shown, or not tried."""
        out = []
        for step in order:
            e = self.steps.get(step)
            if e is None or not (e.get("tries") or e.get("revealed")):
                out.append(f"{step}: not checked")
                continue
            tries = f"{e.get('tries', 0)} tr{'y' if e.get('tries') == 1 else 'ies'}"
            if not e.get("tries"):
                out.append(f"{step}: the answer was shown")
                continue
            if e.get("first"):
                text = "right first time"
            elif e.get("right"):
                text = f"right after {tries}"
            else:
                text = f"not right yet ({tries})"
            out.append(f"{step}: {text}" + ("; the answer was shown" if e.get("revealed") else ""))
        first = sum(1 for s in order if self.steps.get(s, {}).get("first"))
        out.append(f"{first} of {len(list(order))} steps right first time")
        return out
