"""Reading a procedure file: every key, every unit, every quantity named, each mistake by its line.

:func:`problems` lists every mistake in a file (what ``joulebook procedure check`` prints, one
a line, ``line N: key: what is wrong``); :func:`parse` returns the :class:`~.schema.Procedure` or
raises :class:`ProcedureError` holding them all. A record keeps a procedure's rule tables
(:meth:`~.schema.Procedure.pin`) and :func:`from_pin` reads them back by the same rules.
"""

from __future__ import annotations

import hashlib
import re
from dataclasses import dataclass
from pathlib import Path

from ..convention import CONVENTIONS
from ..errors import InputError
from ..kinds import KINDS
from ..models import MODEL_NAMES, canonical
from ..units import DIMENSIONS, parse as parse_quantity
from .quantities import QUANTITIES
from .schema import (COMPARISONS, REQUIRABLE, SEVERITIES, STOP, UNIT_SYSTEMS, Check, Escalation, Exercise,
                     ModelRule, Procedure, Signoff, StepGuide)

#: The largest procedure file read [bytes]: a firm's procedure is pages of text, not megabytes.
MAX_FILE = 256 * 1024
_ID = re.compile(r"^[a-z0-9][a-z0-9-]{0,39}$")
_ROLE = re.compile(r"^[a-z][a-z-]{0,29}$")

#: Every key of a procedure file, by table ("step.*" is any step's table).
KEYS = {
    "": ("procedure", "defaults", "step", "model_rule", "check", "signoff", "exercise"),
    "procedure": ("id", "title", "version", "owner", "kinds", "summary"),
    "defaults": ("units", "convention", "atmosphere"),
    "step.*": ("guidance", "required"),
    "model_rule": ("id", "allowed", "text", "P_above", "Tr_below", "severity"),
    "check": ("id", "quantity", "compare", "limit", "severity", "message", "kinds"),
    "signoff": ("roles", "distinct", "escalate"),
    "signoff.escalate": ("role", "quantity", "above", "text"),
    "exercise": ("id", "title", "brief", "answer", "tolerance", "hints"),
}


@dataclass(frozen=True)
class ProcedureProblem:
    line: int
    """the file's line (from 1; 0 where no line holds it, e.g. a key that is missing from a
    table the file does not have)"""
    key: str
    """``check[2].limit``: the table, which of its kind (from 1) and the key"""
    message: str

    def __str__(self) -> str:
        where = f"line {self.line}: " if self.line else ""
        return f"{where}{self.key}: {self.message}" if self.key else f"{where}{self.message}"


class ProcedureError(InputError):
    """A procedure file with mistakes; ``problems`` holds every one."""

    def __init__(self, source: str, problems: list[ProcedureProblem]):
        self.problems = tuple(problems)
        first = str(problems[0]) if problems else "is not a procedure"
        more = f" (and {len(problems) - 1} more: `joulebook procedure check` lists them)" if len(problems) > 1 else ""
        super().__init__(source, first + more)


# -- where each key is written ------------------------------------------------------------
_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?\s*(?:#.*)?$")
_KEY = re.compile(r"""^\s*("[^"]+"|'[^']+'|[A-Za-z0-9_-]+)\s*=""")


def _lines_of(text: str) -> dict[tuple, int]:
    """The line of every table header and key: ``("check", 1, "limit") -> 42``. Array tables
    are counted from 0 in the order they are written; text inside multi-line strings is
    skipped. A locator for messages only: tomllib has already read the file."""
    where: dict[tuple, int] = {}
    counts: dict[tuple, int] = {}
    current: tuple = ()
    quote = None
    for number, line in enumerate(text.splitlines(), start=1):
        if quote:
            if line.count(quote) % 2:
                quote = None
            continue
        header = _HEADER.match(line)
        if header:
            names = tuple(n.strip().strip('"').strip("'") for n in header.group(2).split("."))
            if header.group(1) == "[[":
                index = counts.get(names, 0)
                counts[names] = index + 1
                current = names + (index,)
            else:
                parent = names[:-1]
                # a sub-table of the last array table: [signoff] after [[...]] is not one
                current = next((k + (counts[k] - 1,) + names[len(k):] for k in counts
                                if k == names[:len(k)] and len(k) < len(names)), names) if parent else names
            where.setdefault(current, number)
            continue
        key = _KEY.match(line)
        if key:
            name = key.group(1).strip('"').strip("'")
            where.setdefault(current + (name,), number)
            rest = line[key.end():]
            for mark in ('"""', "'''"):
                if rest.count(mark) % 2:
                    quote = mark
    return where


class _Reader:
    """Reads the tables of one file, keeping every problem with its line."""

    def __init__(self, text: str, lines: dict[tuple, int] | None = None):
        self.lines = lines if lines is not None else _lines_of(text)
        self.problems: list[ProcedureProblem] = []

    def fault(self, path: tuple, message: str) -> None:
        line, probe = 0, path
        while probe and not line:
            line = self.lines.get(probe, 0)
            probe = probe[:-1]
        self.problems.append(ProcedureProblem(line, _key_name(path), message))

    def table(self, data, path: tuple, allowed: tuple[str, ...]) -> dict:
        if not isinstance(data, dict):
            self.fault(path, "must be a table")
            return {}
        for key in data:
            if key not in allowed:
                self.fault(path + (key,), f"is not a key of this table; expected one of {', '.join(allowed)}")
        return data

    def array(self, data, path: tuple) -> list[dict]:
        if data is None:
            return []
        if not isinstance(data, list) or not all(isinstance(t, dict) for t in data):
            self.fault(path, f"must be an array of tables ([[{'.'.join(map(str, path))}]])")
            return []
        return data

    def text(self, table: dict, path: tuple, key: str, *, required: bool = False, limit: int = 4000) -> str:
        value = table.get(key)
        if value is None:
            if required:
                self.fault(path, f"{key} is missing: it is required")  # its table's line: the key has none
            return ""
        if not isinstance(value, str):
            self.fault(path + (key,), f"must be text; got {_shown(value)}")
            return ""
        if required and not value.strip():
            self.fault(path + (key,), "must not be blank")
        if len(value) > limit:
            self.fault(path + (key,), f"is {len(value)} characters long; at most {limit}")
        return value.strip()

    def ident(self, table: dict, path: tuple, key: str = "id") -> str:
        value = self.text(table, path, key, required=True, limit=200)
        if value and not _ID.match(value):
            self.fault(path + (key,), f"expected lowercase letters, digits and hyphens (at most 40); got {value!r}")
        return value

    def texts(self, table: dict, path: tuple, key: str, *, required: bool = False) -> list[str]:
        value = table.get(key)
        if value is None:
            if required:
                self.fault(path, f"{key} is missing: it is required")
            return []
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            self.fault(path + (key,), f"must be a list of text; got {_shown(value)}")
            return []
        if required and not value:
            self.fault(path + (key,), "must not be empty")
        return [v.strip() for v in value]

    def quantity(self, table: dict, path: tuple, key: str, dimension: str, *, required: bool = False) -> float | None:
        value = table.get(key)
        if value is None:
            if required:
                self.fault(path, f"{key} is missing: it is required")
            return None
        if isinstance(value, (int, float)) and not isinstance(value, bool) and dimension != "dimensionless":
            self.fault(path + (key,), f"must be {DIMENSIONS[dimension].phrase} with its unit, as text like "
                                      f"'{_example(dimension)}'; got {value!r}")
            return None
        try:
            return parse_quantity(value, dimension, "", gauge=dimension == "pressure")
        except InputError as exc:
            self.fault(path + (key,), exc.message)
            return None


def _example(dimension: str) -> str:
    from ..units import _example as example

    return example(dimension)


def _key_name(path: tuple) -> str:
    out = ""
    for part in path:
        if isinstance(part, int):
            out += f"[{part + 1}]"
        else:
            out += ("." if out else "") + str(part)
    return out


def _shown(value) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


# -- the tables ---------------------------------------------------------------------------
def _read(data: dict, reader: _Reader, *, source_dir: Path | None, sha256: str, path: Path | None) -> Procedure | None:
    reader.table(data, (), KEYS[""])
    head = reader.table(data.get("procedure", {}), ("procedure",), KEYS["procedure"])
    if "procedure" not in data:
        reader.fault((), "has no [procedure] table (id, title, version, owner, kinds)")
    pid = reader.ident(head, ("procedure",))
    title = reader.text(head, ("procedure",), "title", required=True, limit=200)
    version = head.get("version")
    if isinstance(version, int) and not isinstance(version, bool):
        version = str(version)
        head = {**head, "version": version}
    version = reader.text(head, ("procedure",), "version", required=True, limit=40)
    owner = reader.text(head, ("procedure",), "owner", required=True, limit=200)
    kinds = reader.texts(head, ("procedure",), "kinds", required=True)
    for k in kinds:
        if k not in KINDS:
            reader.fault(("procedure", "kinds"), f"{k!r} is not a kind of balance; expected {', '.join(KINDS)}")
    kinds = [k for k in kinds if k in KINDS]
    summary = reader.text(head, ("procedure",), "summary")

    defaults = _defaults(reader, data.get("defaults", {}))
    steps = _steps(reader, data.get("step", {}), kinds)
    model_rules = [_model_rule(reader, t, ("model_rule", i)) for i, t in
                   enumerate(reader.array(data.get("model_rule"), ("model_rule",)))]
    checks = [_check(reader, t, ("check", i), kinds) for i, t in
              enumerate(reader.array(data.get("check"), ("check",)))]
    signoff = _signoff(reader, data.get("signoff", {}), kinds)
    exercises = [_exercise(reader, t, ("exercise", i), kinds, source_dir) for i, t in
                 enumerate(reader.array(data.get("exercise"), ("exercise",)))]

    ids: dict[str, str] = {}
    named = ([(("step", s.step, "required"), f"step.{s.step}.required", f) for s in steps.values() for f in s.required]
             + [(("model_rule", i, "id"), f"model_rule[{i + 1}]", r.id) for i, r in enumerate(model_rules) if r]
             + [(("check", i, "id"), f"check[{i + 1}]", c.id) for i, c in enumerate(checks) if c])
    for at, where, rule_id in named:
        if rule_id in ids and rule_id:
            reader.fault(at, f"two rules have the id {rule_id!r} ({ids[rule_id]} and {where}); a deviation names "
                             "one rule by its id")
        ids.setdefault(rule_id, where)
    seen: set[str] = set()
    for i, e in enumerate(exercises):
        if e and e.id in seen:
            reader.fault(("exercise", i, "id"), f"two exercises have the id {e.id!r}")
        if e:
            seen.add(e.id)
    if reader.problems:
        return None
    rules = {"kinds": list(kinds), "owner": owner,
             "step": {s: {"required": list(g.required)} for s, g in steps.items() if g.required}}
    for key in ("model_rule", "check", "signoff"):
        if key in data:
            rules[key] = data[key]
    return Procedure(pid, title, version, owner, tuple(kinds), summary, defaults, steps, tuple(model_rules),
                     tuple(checks), signoff, tuple(exercises), sha256, path, rules)


def _defaults(reader: _Reader, data) -> dict[str, str]:
    table = reader.table(data, ("defaults",), KEYS["defaults"])
    out = {}
    units = reader.text(table, ("defaults",), "units")
    if units and units not in UNIT_SYSTEMS:
        reader.fault(("defaults", "units"), f"expected one of {', '.join(UNIT_SYSTEMS)}; got {units!r}")
    convention = reader.text(table, ("defaults",), "convention")
    if convention and convention not in CONVENTIONS:
        reader.fault(("defaults", "convention"), f"expected one of {', '.join(CONVENTIONS)}; got {convention!r}")
    if "atmosphere" in table:
        P = reader.quantity(table, ("defaults",), "atmosphere", "pressure")
        if P is not None and not 50e3 <= P <= 110e3:
            reader.fault(("defaults", "atmosphere"), f"{table['atmosphere']!r} is not an atmosphere on this planet "
                                                     "(50 to 110 kPa absolute)")
    for key, value in (("units", units), ("convention", convention), ("atmosphere", table.get("atmosphere"))):
        if isinstance(value, str) and value:
            out[key] = value.strip()
    return out


def _steps(reader: _Reader, data, kinds: list[str]) -> dict[str, StepGuide]:
    table = reader.table(data, ("step",), ()) if not isinstance(data, dict) else data
    known = [s for k in kinds for s in KINDS[k].steps]
    if not kinds:
        return {}  # no kind read: its steps are not known, and [procedure] kinds says why
    steps: dict[str, StepGuide] = {}
    for step, body in table.items():
        path = ("step", step)
        if step not in known:
            reader.fault(path, f"is not a step of {' or '.join(kinds) or 'these kinds'}; expected one of "
                               f"{', '.join(dict.fromkeys(known))}")
            continue
        body = reader.table(body, path, KEYS["step.*"])
        guidance = reader.text(body, path, "guidance")
        required = reader.texts(body, path, "required")
        for name in required:
            if name not in REQUIRABLE:
                reader.fault(path + ("required",), f"{name!r} is not a field a procedure can require; expected one of "
                                                   f"{', '.join(REQUIRABLE)}")
            elif REQUIRABLE[name].step != step:
                reader.fault(path + ("required",), f"{name} is typed at the {REQUIRABLE[name].step} step, not "
                                                   f"at {step}: require it under [step.{REQUIRABLE[name].step}]")
        steps[step] = StepGuide(step, guidance, tuple(r for r in required if r in REQUIRABLE))
    return steps


def _severity(reader: _Reader, table: dict, path: tuple, default: str | None = None) -> str:
    value = reader.text(table, path, "severity", required=default is None)
    if not value:
        return default or STOP
    if value not in SEVERITIES:
        reader.fault(path + ("severity",), f"expected stop or warn; got {value!r}")
    return value


def _model_rule(reader: _Reader, table, path: tuple) -> ModelRule | None:
    table = reader.table(table, path, KEYS["model_rule"])
    rule_id = reader.ident(table, path)
    allowed = []
    for name in reader.texts(table, path, "allowed", required=True):
        try:
            allowed.append(canonical(name, ""))
        except InputError:
            reader.fault(path + ("allowed",), f"{name!r} is not a property model; expected {', '.join(MODEL_NAMES)}")
    text = reader.text(table, path, "text", required=True)
    P_above = reader.quantity(table, path, "P_above", "pressure")
    Tr_below = table.get("Tr_below")
    if Tr_below is not None and (isinstance(Tr_below, bool) or not isinstance(Tr_below, (int, float))
                                 or not 0 < Tr_below < 100):
        reader.fault(path + ("Tr_below",), f"must be a reduced temperature T/Tc, a number above 0; got {_shown(Tr_below)}")
        Tr_below = None
    severity = _severity(reader, table, path, STOP)
    return ModelRule(rule_id, tuple(allowed), text, P_above, None if Tr_below is None else float(Tr_below), severity)


def _check(reader: _Reader, table, path: tuple, kinds: list[str]) -> Check | None:
    table = reader.table(table, path, KEYS["check"])
    check_id = reader.ident(table, path)
    name = reader.text(table, path, "quantity", required=True)
    quantity = QUANTITIES.get(name)
    if name and quantity is None:
        reader.fault(path + ("quantity",), f"{name!r} is not a result quantity; expected one of {', '.join(QUANTITIES)}")
    check_kinds = reader.texts(table, path, "kinds")
    for k in check_kinds:
        if k not in kinds:
            reader.fault(path + ("kinds",), f"{k!r} is not one of this procedure's kinds ({', '.join(kinds)})")
    if quantity is not None and kinds and not set(check_kinds or kinds) & set(quantity.kinds):
        reader.fault(path + ("quantity",), f"{name} is a result of {', '.join(quantity.kinds)} balances, not of "
                                           f"{', '.join(check_kinds or kinds)}")
    compare = reader.text(table, path, "compare", required=True)
    if compare and compare not in COMPARISONS:
        reader.fault(path + ("compare",), f"expected one of {', '.join(COMPARISONS)}; got {compare!r}")
    limit = None
    if quantity is not None:
        limit = reader.quantity(table, path, "limit", quantity.dimension, required=True)
    limit_text = table.get("limit")
    severity = _severity(reader, table, path)
    message = reader.text(table, path, "message", required=True)
    if limit is None or quantity is None:
        return None
    return Check(check_id, name, compare, limit, str(limit_text), severity, message, tuple(check_kinds))


def _signoff(reader: _Reader, data, kinds: list[str]) -> Signoff:
    table = reader.table(data, ("signoff",), KEYS["signoff"])
    roles = reader.texts(table, ("signoff",), "roles") or ["prepared", "checked"]
    for role in roles:
        if not _ROLE.match(role):
            reader.fault(("signoff", "roles"), f"expected lowercase names like prepared, checked; got {role!r}")
    if len(set(roles)) != len(roles):
        reader.fault(("signoff", "roles"), "names a role twice")
    distinct = table.get("distinct", True)
    if not isinstance(distinct, bool):
        reader.fault(("signoff", "distinct"), f"must be true or false; got {_shown(distinct)}")
        distinct = True
    escalations = []
    for i, t in enumerate(reader.array(table.get("escalate"), ("signoff", "escalate"))):
        path = ("signoff", "escalate", i)
        t = reader.table(t, path, KEYS["signoff.escalate"])
        role = reader.text(t, path, "role", required=True)
        if role and not _ROLE.match(role):
            reader.fault(path + ("role",), f"expected a lowercase name like approved; got {role!r}")
        if role in roles:
            reader.fault(path + ("role",), f"{role} is always required already (signoff.roles)")
        name = reader.text(t, path, "quantity", required=True)
        quantity = QUANTITIES.get(name)
        if name and quantity is None:
            reader.fault(path + ("quantity",), f"{name!r} is not a result quantity; expected one of "
                                               f"{', '.join(QUANTITIES)}")
        above = reader.quantity(t, path, "above", quantity.dimension, required=True) if quantity else None
        text = reader.text(t, path, "text", required=True)
        if role and quantity is not None and above is not None:
            escalations.append(Escalation(role, name, above, str(t["above"]), text))
    return Signoff(tuple(roles), distinct, tuple(escalations))


def _exercise(reader: _Reader, table, path: tuple, kinds: list[str], source_dir: Path | None) -> Exercise | None:
    table = reader.table(table, path, KEYS["exercise"])
    ex_id = reader.ident(table, path)
    title = reader.text(table, path, "title", required=True, limit=200)
    brief = reader.text(table, path, "brief", required=True)
    answer = reader.text(table, path, "answer", required=True, limit=300)
    tolerance = table.get("tolerance", 0.01)
    if isinstance(tolerance, bool) or not isinstance(tolerance, (int, float)) or not 0 < tolerance < 0.5:
        reader.fault(path + ("tolerance",), f"must be a relative tolerance above 0 and below 0.5; got {_shown(tolerance)}")
        tolerance = 0.01
    hints = reader.table(table.get("hints", {}), path + ("hints",), tuple(s for k in kinds for s in KINDS[k].steps))
    hints = {k: v.strip() for k, v in hints.items() if isinstance(v, str)}
    target = None
    if answer:
        if source_dir is None:
            reader.fault(path + ("answer",), "names a worksheet, but this procedure was not read from a file")
        else:
            target = (source_dir / answer).resolve()
            if not target.is_file():
                reader.fault(path + ("answer",), f"{answer!r}: no such worksheet beside the procedure ({target})")
            else:
                _answer_problem(reader, path, target, kinds)
    if reader.problems or target is None:
        return None
    return Exercise(ex_id, title, brief, target, float(tolerance), hints)


def _answer_problem(reader: _Reader, path: tuple, target: Path, kinds: list[str]) -> None:
    from ..worksheet import Worksheet

    try:
        ws = Worksheet.load(target)
    except InputError as exc:
        reader.fault(path + ("answer",), f"the answer worksheet {target.name} is not a worksheet: {exc}")
        return
    if ws.system.kind not in kinds:
        reader.fault(path + ("answer",), f"the answer worksheet {target.name} is a {ws.system.kind} balance; this "
                                         f"procedure is for {', '.join(kinds)}")


# -- the entry points ---------------------------------------------------------------------
def _toml(text: str, source: str) -> tuple[dict | None, list[ProcedureProblem]]:
    import tomllib

    if len(text) > MAX_FILE:
        return None, [ProcedureProblem(0, "", f"is {len(text)} characters long; a procedure is at most {MAX_FILE}")]
    try:
        return tomllib.loads(text), []
    except tomllib.TOMLDecodeError as exc:
        line = getattr(exc, "lineno", 0) or int((re.search(r"line (\d+)", str(exc)) or [0, 0])[1])
        return None, [ProcedureProblem(line, "", f"is not valid TOML: {exc}")]


def problems(text: str, source: str = "procedure", *, source_dir: Path | None = None) -> list[ProcedureProblem]:
    """Every mistake in a procedure file's text (empty: it reads)."""
    data, found = _toml(text, source)
    if data is None:
        return found
    reader = _Reader(text)
    _read(data, reader, source_dir=source_dir, sha256="", path=None)
    return sorted(reader.problems, key=lambda p: p.line)


def parse(text: str, source: str = "procedure", *, path: Path | None = None) -> Procedure:
    """The procedure in ``text``; raises ProcedureError naming every mistake."""
    data, found = _toml(text, source)
    if data is None:
        raise ProcedureError(source, found)
    reader = _Reader(text)
    sha = hashlib.sha256(text.encode("utf-8")).hexdigest()
    procedure = _read(data, reader, source_dir=path.parent if path else None, sha256=sha, path=path)
    if procedure is None:
        raise ProcedureError(source, reader.problems)
    return procedure


def read_text(path: Path) -> str:
    """A procedure file's text; raises InputError naming the file."""
    try:
        raw = Path(path).read_bytes()
    except OSError as exc:
        raise InputError(str(path), f"cannot be read: {exc.strerror}") from None
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(str(path), "is not UTF-8 text") from None


def load(path) -> Procedure:
    path = Path(path)
    return parse(read_text(path), str(path), path=path)


def check_file(path) -> list[ProcedureProblem]:
    """Every mistake in the procedure file at ``path``."""
    path = Path(path)
    return problems(read_text(path), str(path), source_dir=path.parent)


def from_pin(pin: dict) -> Procedure:
    """The procedure's rules as a record pinned them (no guidance, no exercises)."""
    rules = pin.get("rules", {}) if isinstance(pin, dict) else {}
    data = {"procedure": {"id": pin.get("id"), "title": pin.get("title"), "version": pin.get("version"),
                          "owner": rules.get("owner", ""), "kinds": rules.get("kinds", [])},
            **{k: rules[k] for k in ("step", "model_rule", "check", "signoff") if k in rules}}
    reader = _Reader("", {})
    procedure = _read(data, reader, source_dir=None, sha256=str(pin.get("sha256", "")), path=None)
    if procedure is None:
        raise ProcedureError("opening.procedure", reader.problems)
    return procedure
