"""The worksheet: what the engineer typed, kept exactly as typed.

A worksheet is a TOML file (layout in the README, "Worksheet format"). This
module reads and writes it and checks its structure; every value stays the
text the person typed (``"35 barg"``, ``"?"``) so nothing is lost and the
record can show it. Turning the text into SI numbers and a model happens in
:mod:`balance.balances` (the kind's own module, chosen in :mod:`balance.kinds`).

The sections:

``[worksheet]``  title, job, purpose, basis, assumptions, convention, atmosphere, procedure,
                 ``[worksheet.deviations]`` (a house rule's id = the written justification)
``[fluid]``      species, model, ``[fluid.overrides]``; a mixture's ``composition`` (a table of
                 fractions), ``fractions`` (mole or mass), ``normalise``; ``[fluid.compositions.NAME]``
                 named mixtures a stream may name as its species
``[system]``     kind (a name in :mod:`balance.kinds`: "closed"; "open" is reserved), inside, sketch
``[[initial]]``  one table per compartment at the start
``[final]``      the state at the end
``[[heat]]``     heat terms: name, Q, T_boundary
``[[work]]``     work terms: name, kind, W
``[process]``    constraints, polytropic n, dKE, dPE

and for a steady-flow worksheet (``[system] kind = "steady-flow"``), in place of the
compartments, terms and process:

``[[stream]]``   name, two of T, P, v, rho, u, h, s, x (or fewer: a device fixes the rest),
                 rate (mass, molar or standard volume), velocity or area, z, and the stream's own
                 species and model where they are not the worksheet's
``[[device]]``   name, kind, inlets, outlets, and what the kind takes: Q, W, eta, eta_poly, dP,
                 dP_cold, T_boundary, fractions, arrangement

and for a transient worksheet (``[system] kind = "transient"``), a vessel filled, vented,
blown down or equalised over time:

``[[vessel]]``   name, V, its state at the start (two of T, P, v, rho, or ``empty = true``),
                 heat (adiabatic, isothermal, given, wall) and what that takes (Q; wall_mass,
                 wall_cp, wall_area, h_inside, height, h_outside, T_ambient, fire_flux)
``[[line]]``     name, from (``supply`` or a vessel), to (a vessel or ``outside``), the supply's
                 T and P, back (the pressure outside), a restriction (orifice with Cd, or a
                 valve's Cv or Kv) or a given mass rate
``[end]``        what ends it: one of P, m, t, ``balanced = true``; the vessel it watches
``[history]``    the integrator's settings: method, rtol, points, t_max

A value of ``"?"`` marks an unknown to be solved for.
"""

from __future__ import annotations

import re
from dataclasses import asdict, dataclass, field, fields, replace

from .convention import CONVENTIONS
from .errors import InputError
from .kinds import kind_of, known

UNKNOWN = "?"

#: A worksheet file's sections, in the order a record takes them, and the attribute holding each.
SECTIONS = {
    "worksheet": "heading",
    "system": "system",
    "fluid": "fluid",
    "initial": "initial",
    "final": "final",
    "heat": "heat",
    "work": "work",
    "process": "process",
    "stream": "streams",
    "device": "devices",
    "vessel": "vessels",
    "line": "lines",
    "end": "end",
    "history": "history",
}

#: Properties a state may be given by (and their accepted spellings).
STATE_KEYS = ("T", "P", "v", "rho", "u", "h", "s", "x")
AMOUNT_KEYS = ("n", "m", "V")
CONSTRAINTS = (
    "rigid",
    "adiabatic",
    "isothermal",
    "isobaric",
    "reversible",
    "polytropic",
    "free-expansion",
    "membrane-rupture",
)
WORK_KINDS = ("shaft", "stirring", "electrical", "boundary", "other")
#: What a device of a steady-flow worksheet may be.
DEVICE_KINDS = ("valve", "heater", "cooler", "compressor", "pump", "turbine", "expander", "nozzle", "diffuser",
                "mixer", "splitter", "exchanger", "separator")
#: A device's own values (text as typed), besides its name, kind, inlets and outlets.
DEVICE_VALUES = ("Q", "W", "eta", "eta_poly", "dP", "dP_cold", "T_boundary", "arrangement")
#: How a transient vessel's gas exchanges heat.
VESSEL_HEAT = ("adiabatic", "isothermal", "given", "wall")
#: A vessel's own values (text as typed), besides its name, volume, starting state and heat.
VESSEL_VALUES = ("Q", "wall_mass", "wall_cp", "wall_area", "h_inside", "height", "h_outside", "T_ambient",
                 "fire_flux")
#: A line's own values (text as typed), besides its name, ends and the supply's state.
LINE_VALUES = ("back", "orifice", "Cd", "Cv", "Kv", "rate")
#: What may end a transient: a pressure, a mass, a time, or the flow stopping.
END_KEYS = ("P", "m", "t")
#: The integrator's settings a worksheet may set.
HISTORY_KEYS = ("method", "rtol", "points", "t_max")


@dataclass(frozen=True)
class FieldProblem:
    """What is wrong with one field of a worksheet (or with one part as a whole), and where it is.

    ``field`` is the name messages use: ``worksheet.atmosphere``, ``fluid.species``,
    ``fluid.overrides.Tc``, ``initial 'tank'.T``, ``final.P``, ``heat 'jacket'.T_boundary``,
    ``work 'shaft'.W``, ``process.n``; a part alone (``initial 'tank'``, ``final``,
    ``process.constraints``) when no single field is at fault. ``part``, ``index`` and ``key``
    say the same as data: the section, which compartment or term of ``initial``, ``heat`` or
    ``work`` (0-based; None for the other sections, or for the list as a whole) and the key in
    it ('' for the part as a whole).
    """

    field: str
    message: str
    """what is wrong and what was expected"""
    part: str
    index: int | None = None
    key: str = ""

    def __str__(self) -> str:
        return f"{self.field}: {self.message}" if self.field else self.message


@dataclass(frozen=True)
class Heading:
    """Purpose and basis: what the calculation is for."""

    title: str = ""
    job: str = ""
    """job or calculation reference"""
    purpose: str = ""
    """what is asked"""
    basis: str = ""
    """e.g. 'the gas in both vessels', '1 mol'"""
    assumptions: tuple[str, ...] = ()
    convention: str = "work-on-system"
    """sign convention for work: a key of CONVENTIONS"""
    atmosphere: str = "1.01325 bar"
    """atmospheric pressure used for gauge readings"""
    procedure: str = ""
    """the house procedure the calculation follows (its id), or blank"""
    deviations: dict[str, str] = field(default_factory=dict)
    """a house rule's id -> the written justification for departing from it; treat as immutable"""


@dataclass(frozen=True)
class Fluid:
    species: str = ""
    """a species, a bundled composition's id (dry-air), or the name of the composition below"""
    model: str = ""
    overrides: dict[str, str] = field(default_factory=dict)
    """constant name -> text; treat as immutable (replace the Fluid to change it)"""
    composition: dict[str, str] = field(default_factory=dict)
    """a mixture: species -> fraction as typed; treat as immutable"""
    fractions: str = ""
    """mole (the default) or mass"""
    normalise: bool = False
    """scale fractions that do not add up to 1"""
    compositions: dict[str, dict[str, str]] = field(default_factory=dict)
    """named mixtures a stream may name as its species: name -> (species -> fraction as typed),
    read with the fractions basis and normalise above; treat as immutable"""
    kij: dict[str, str] = field(default_factory=dict)
    """a cubic mixture's binary interaction parameters: "A-B" -> kij as typed, in place of the
    bundled ones (:mod:`balance.interaction`); treat as immutable"""


@dataclass(frozen=True)
class System:
    kind: str = "closed"
    inside: str = ""
    """what the boundary encloses"""
    sketch: str = ""
    """a small text sketch of the boundary"""


@dataclass(frozen=True)
class StateInput:
    """One state as typed: intensive properties and the amount (text, or '?')."""

    name: str = ""
    props: dict[str, str] = field(default_factory=dict)
    """T, P, v, rho, u, h, s, x -> text"""
    amount: dict[str, str] = field(default_factory=dict)
    """n, m or V -> text"""
    empty: bool = False
    """an evacuated compartment: only V is given"""

    def unknowns(self) -> list[str]:
        return [k for k, v in {**self.props, **self.amount}.items() if v.strip() == UNKNOWN]


@dataclass(frozen=True)
class HeatTerm:
    name: str = "Q"
    Q: str = UNKNOWN
    """heat to the system, or '?'"""
    T_boundary: str = ""
    """temperature of the boundary or reservoir the heat crosses at"""


@dataclass(frozen=True)
class WorkTerm:
    name: str = "W"
    kind: str = "shaft"
    W: str = UNKNOWN
    """work in the worksheet's sign convention, or '?'"""


@dataclass(frozen=True)
class Process:
    constraints: tuple[str, ...] = ()
    n: str = ""
    """polytropic exponent, when 'polytropic' is a constraint"""
    dKE: str = ""
    """change of kinetic energy of the system"""
    dPE: str = ""
    """change of potential energy of the system"""


@dataclass(frozen=True)
class StreamInput:
    """One stream of a steady-flow worksheet, as typed."""

    name: str = ""
    props: dict[str, str] = field(default_factory=dict)
    """T, P, v, rho, u, h, s, x -> text (none, one or two: a device may fix the rest)"""
    rate: str = ""
    """a mass, molar or standard-volume rate ('12 t/h', '30 mol/s', '1500 Nm3/h'), or '?'"""
    velocity: str = ""
    area: str = ""
    """the flow area: the velocity follows from the rate and the state"""
    z: str = ""
    """elevation"""
    species: str = ""
    """the stream's own species, when it is not the worksheet's (an exchanger's other side)"""
    model: str = ""


@dataclass(frozen=True)
class DeviceInput:
    """One device of a steady-flow worksheet, as typed."""

    name: str = ""
    kind: str = ""
    """one of DEVICE_KINDS"""
    inlets: tuple[str, ...] = ()
    outlets: tuple[str, ...] = ()
    """stream names (an exchanger: the hot side first)"""
    values: dict[str, str] = field(default_factory=dict)
    """Q, W, eta, eta_poly, dP, dP_cold, T_boundary, arrangement -> text ('?' to be found)"""
    fractions: tuple[str, ...] = ()
    """a splitter's share of the inlet rate, per outlet"""


@dataclass(frozen=True)
class VesselInput:
    """One vessel of a transient worksheet, as typed."""

    name: str = ""
    V: str = ""
    props: dict[str, str] = field(default_factory=dict)
    """its state at the start: T, P, v, rho -> text"""
    empty: bool = False
    """evacuated at the start"""
    heat: str = "adiabatic"
    """one of VESSEL_HEAT"""
    values: dict[str, str] = field(default_factory=dict)
    """Q (heat = 'given'), the wall's keys (heat = 'wall') -> text"""
    Q_points: tuple[str, ...] = ()
    """a given heat rate in time, as 'time: rate' texts (in place of one Q)"""


@dataclass(frozen=True)
class LineInput:
    """One line of a transient worksheet: where gas comes from and goes to, and what restricts it."""

    name: str = ""
    source: str = ""
    """'supply' or a vessel's name (the TOML key is ``from``)"""
    target: str = ""
    """a vessel's name or 'outside' (the TOML key is ``to``)"""
    props: dict[str, str] = field(default_factory=dict)
    """the supply's state: T, P (from = 'supply')"""
    values: dict[str, str] = field(default_factory=dict)
    """back, orifice, Cd, Cv, Kv, rate -> text"""


@dataclass(frozen=True)
class EndInput:
    """What ends a transient, as typed."""

    values: dict[str, str] = field(default_factory=dict)
    """one of P, m, t -> text"""
    balanced: bool = False
    """until the flow stops (the pressures across the line meet)"""
    vessel: str = ""
    """the vessel the end condition watches (blank: the first)"""


@dataclass(frozen=True)
class Worksheet:
    """A whole worksheet, as typed (a closed system's sections, or a steady-flow one's)."""

    heading: Heading = field(default_factory=Heading)
    fluid: Fluid = field(default_factory=Fluid)
    system: System = field(default_factory=System)
    initial: tuple[StateInput, ...] = ()
    final: StateInput = field(default_factory=lambda: StateInput(name="final"))
    heat: tuple[HeatTerm, ...] = ()
    work: tuple[WorkTerm, ...] = ()
    process: Process = field(default_factory=Process)
    streams: tuple[StreamInput, ...] = ()
    devices: tuple[DeviceInput, ...] = ()
    vessels: tuple[VesselInput, ...] = ()
    lines: tuple[LineInput, ...] = ()
    end: EndInput = field(default_factory=EndInput)
    history: dict[str, str] = field(default_factory=dict)
    """the integrator's settings (HISTORY_KEYS -> text)"""

    # -- conversion -----------------------------------------------------------
    def to_dict(self) -> dict:
        """The TOML layout as plain data (empty values left out)."""
        out: dict = {}
        head = {k: v for k, v in asdict(self.heading).items() if v not in ("", (), {})}
        if "assumptions" in head:
            head["assumptions"] = list(head["assumptions"])
        out["worksheet"] = head
        fluid = {"species": self.fluid.species, "model": self.fluid.model}
        if self.fluid.overrides:
            fluid["overrides"] = dict(self.fluid.overrides)
        if self.fluid.composition:
            fluid["composition"] = dict(self.fluid.composition)
        fluid["fractions"] = self.fluid.fractions
        if self.fluid.normalise:
            fluid["normalise"] = True
        if self.fluid.compositions:
            fluid["compositions"] = {k: dict(v) for k, v in self.fluid.compositions.items()}
        if self.fluid.kij:
            fluid["kij"] = dict(self.fluid.kij)
        out["fluid"] = {k: v for k, v in fluid.items() if v not in ("", {})}
        out["system"] = {k: v for k, v in asdict(self.system).items() if v != ""}
        flow = self.system.kind != "closed"  # no compartments unless some were typed
        if self.initial or not flow:
            out["initial"] = [_state_dict(s) for s in self.initial]
        if self.final != StateInput(name="final") or not flow:
            out["final"] = _state_dict(self.final)
        if self.heat:
            # Q stays even when blank: dropped, it would come back as the default '?'
            out["heat"] = [{k: v for k, v in asdict(h).items() if v != "" or k == "Q"} for h in self.heat]
        if self.work:
            out["work"] = [asdict(w) for w in self.work]
        proc = {k: v for k, v in asdict(self.process).items() if v not in ("", ())}
        if "constraints" in proc:
            proc["constraints"] = list(proc["constraints"])
        if proc:
            out["process"] = proc
        if self.streams:
            out["stream"] = [_stream_dict(st) for st in self.streams]
        if self.devices:
            out["device"] = [_device_dict(d) for d in self.devices]
        if self.vessels:
            out["vessel"] = [_vessel_dict(v) for v in self.vessels]
        if self.lines:
            out["line"] = [_line_dict(line) for line in self.lines]
        end = _end_dict(self.end)
        if end:
            out["end"] = end
        if self.history:
            out["history"] = dict(self.history)
        return out

    def to_toml(self) -> str:
        import tomli_w

        return tomli_w.dumps(self.to_dict(), multiline_strings=True)

    @classmethod
    def from_toml(cls, text: str, source: str = "worksheet") -> "Worksheet":
        """A worksheet from its TOML text; its size and nesting are bounded before it is parsed."""
        import tomllib  # here: a new worksheet in the app reads no TOML

        if not isinstance(text, str):
            raise InputError(source, f"must be TOML text; got {type(text).__name__}")
        if len(text) > MAX_WORKSHEET:
            raise InputError(source, f"is {len(text)} characters long; a worksheet is at most {MAX_WORKSHEET}")
        deep = _nesting_problem(text)
        if deep:
            raise InputError(source, deep)
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise InputError(source, f"is not valid TOML: {exc}") from None
        except ValueError:  # an integer of more digits than Python converts (4300)
            raise InputError(source, "holds a number too long to read (thousands of digits); no field takes one") from None
        return cls.from_dict(data)

    @classmethod
    def load(cls, path) -> "Worksheet":
        try:
            with open(path, "rb") as fh:
                raw = fh.read()
        except OSError as exc:
            raise InputError(str(path), f"cannot be read: {exc.strerror}") from None
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError:
            raise InputError(str(path), "is not UTF-8 text") from None
        return cls.from_toml(text, str(path))

    @classmethod
    def from_dict(cls, data: dict) -> "Worksheet":
        _only(data, tuple(SECTIONS), "")
        head = _table(data, "worksheet")
        _only(head, [f.name for f in fields(Heading)], "worksheet")
        deviations = _table(head, "deviations", "worksheet")
        if len(deviations) > MAX_ITEMS:
            raise InputError("worksheet.deviations", f"takes at most {MAX_ITEMS} deviations")
        heading = Heading(
            **{k: _text(head, k, "worksheet") for k in head if k not in ("assumptions", "deviations")},
            assumptions=tuple(_text_list(head, "assumptions", "worksheet")),
            deviations={str(k): _text(deviations, k, "worksheet.deviations") for k in deviations},
        )
        if heading.convention not in CONVENTIONS:
            raise InputError(
                "worksheet.convention",
                f"expected one of {', '.join(CONVENTIONS)}; got {shown(heading.convention)}",
            )
        fl = _table(data, "fluid")
        _only(fl, ("species", "model", "overrides", "composition", "fractions", "normalise", "compositions", "kij"),
              "fluid")
        overrides = _table(fl, "overrides", "fluid")
        composition = _table(fl, "composition", "fluid")
        if len(composition) > MAX_ITEMS:
            raise InputError("fluid.composition", f"takes at most {MAX_ITEMS} components")
        normalise = fl.get("normalise", False)
        if not isinstance(normalise, bool):
            raise InputError("fluid.normalise", f"must be true or false; got {normalise!r}")
        fluid = Fluid(
            species=_text(fl, "species", "fluid"),
            model=_text(fl, "model", "fluid"),
            overrides={k: _text(overrides, k, "fluid.overrides") for k in overrides},
            composition={k: _text(composition, k, "fluid.composition") for k in composition},
            fractions=_text(fl, "fractions", "fluid"),
            normalise=normalise,
            compositions=_compositions(_table(fl, "compositions", "fluid")),
            kij=_kij_texts(_table(fl, "kij", "fluid")),
        )
        sy = _table(data, "system")
        _only(sy, ("kind", "inside", "sketch"), "system")
        system = System(**{k: _text(sy, k, "system") for k in sy})
        if not known(system.kind):  # a reserved kind is kept as typed; preparing it says why not yet
            kind_of(system.kind)
        initial = tuple(
            _state(t, f"initial[{i + 1}]", default_name=f"initial {i + 1}")
            for i, t in enumerate(_array(data, "initial"))
        )
        final = _state(_table(data, "final"), "final", default_name="final")
        heat = []
        for i, t in enumerate(_array(data, "heat")):
            where = f"heat[{i + 1}]"
            _only(t, ("name", "Q", "T_boundary"), where)
            heat.append(HeatTerm(**{k: _text(t, k, where) for k in t}))
        work = []
        for i, t in enumerate(_array(data, "work")):
            where = f"work[{i + 1}]"
            _only(t, ("name", "kind", "W"), where)
            w = WorkTerm(**{k: _text(t, k, where) for k in t})
            if w.kind not in WORK_KINDS:
                raise InputError(f"{where}.kind", f"expected one of {', '.join(WORK_KINDS)}; got {shown(w.kind)}")
            work.append(w)
        pr = _table(data, "process")
        _only(pr, ("constraints", "n", "dKE", "dPE"), "process")
        constraints = tuple(_text_list(pr, "constraints", "process"))
        for c in constraints:
            if c not in CONSTRAINTS:
                raise InputError("process.constraints", f"unknown constraint {shown(c)}; expected any of {', '.join(CONSTRAINTS)}")
        process = Process(
            constraints=constraints,
            **{k: _text(pr, k, "process") for k in ("n", "dKE", "dPE") if k in pr},
        )
        streams = tuple(_stream(t, f"stream[{i + 1}]") for i, t in enumerate(_array(data, "stream")))
        devices = tuple(_device(t, f"device[{i + 1}]") for i, t in enumerate(_array(data, "device")))
        vessels = tuple(_vessel(t, f"vessel[{i + 1}]") for i, t in enumerate(_array(data, "vessel")))
        lines = tuple(_line(t, f"line[{i + 1}]") for i, t in enumerate(_array(data, "line")))
        end = _end(_table(data, "end"))
        hist = _table(data, "history")
        _only(hist, HISTORY_KEYS, "history")
        history = {k: _text(hist, k, "history") for k in HISTORY_KEYS if k in hist}
        return cls(heading, fluid, system, initial, final, tuple(heat), tuple(work), process, streams, devices,
                   vessels, lines, end, history)

    def with_(self, **changes) -> "Worksheet":
        """A copy with some sections replaced (the worksheet is immutable)."""
        return replace(self, **changes)


#: The sections that hold a list of named items.
LISTS = ("initial", "heat", "work", "stream", "device", "vessel", "line")


def place(ws: "Worksheet", field: str, message: str) -> FieldProblem:
    """The problem a message names ``field`` for, placed in ``ws`` (``initial 'tank'.T`` is the
    compartment named 'tank', key T; ``heat[2]`` the second heat term; ``final.P``; ``stream
    'feed'.rate`` and ``device 'K-1'.eta`` the stream and the device of those names)."""
    for part in LISTS:
        items = getattr(ws, SECTIONS[part])
        for i, item in enumerate(items):
            for prefix in (f"{part} '{item.name}'", f"{part}[{i + 1}]"):
                if field == prefix or field.startswith(prefix + "."):
                    return FieldProblem(field, message, part, i, field[len(prefix) + 1:])
    m = re.match(rf"({'|'.join(LISTS)})\[(\d+)\](?:\.(.*))?$", field)
    if m:  # a compartment or term the worksheet could not be read far enough to hold
        return FieldProblem(field, message, m.group(1), int(m.group(2)) - 1, m.group(3) or "")
    head, _, key = field.partition(".")
    return FieldProblem(field, message, head if head in SECTIONS else "", None, key)


# -- how much a worksheet may hold: bounded before anything reads or walks it ----------------------
#: The longest worksheet text [characters]; one is a few thousand.
MAX_WORKSHEET = 1_000_000
#: The deepest nesting of arrays and inline tables (Python's TOML reader recurses once a level);
#: a worksheet needs one (a list of constraints).
MAX_DEPTH = 32
#: The longest text of one value [characters]: a title, an assumption, a sketch.
MAX_VALUE = 100_000
#: The longest name of a compartment, a term or a key [characters].
MAX_NAME = 200
#: The most texts in a list (assumptions, constraints).
MAX_ITEMS = 1000

#: What the TOML reader does not look into for nesting (strings and comments), and the brackets.
_TOML_TOKENS = re.compile(
    r'"""(?:[^"\\]|\\.|"(?!""))*"{3,5}|"(?:[^"\\\n]|\\.)*"'
    r"|'''.*?'{3,5}|'[^'\n]*'|#[^\n]*"
    r"|(?P<open>[\[{])|(?P<close>[\]}])", re.S)


def _nesting_problem(text: str) -> str:
    """Where arrays and inline tables nest deeper than MAX_DEPTH, found without parsing ('' when
    they do not). A string the scan misses (unterminated) is where the parser stops anyway."""
    if text.count("[") + text.count("{") <= MAX_DEPTH:  # cannot nest deeper: the usual case
        return ""
    depth = 0
    for m in _TOML_TOKENS.finditer(text):
        if m.lastgroup == "open":
            depth += 1
            if depth > MAX_DEPTH:
                line = text.count("\n", 0, m.start()) + 1
                return (f"nests arrays and tables more than {MAX_DEPTH} levels deep (line {line}); "
                        "a worksheet needs one level (a list of constraints)")
        elif m.lastgroup == "close":
            depth = max(0, depth - 1)
    return ""


def shown(text: str, limit: int = 60) -> str:
    """``text`` as a message quotes it: its repr, shortened past ``limit`` characters."""
    return repr(text) if len(text) <= limit else f"{text[:limit]!r}... ({len(text)} characters)"


def _state_dict(s: StateInput) -> dict:
    d: dict = {}
    if s.name:
        d["name"] = s.name
    if s.empty:
        d["empty"] = True
    d.update(s.props)
    d.update(s.amount)
    return d


def _state(t: dict, where: str, default_name: str) -> StateInput:
    _only(t, ("name", "empty", *STATE_KEYS, *AMOUNT_KEYS), where)
    empty = t.get("empty", False)
    if not isinstance(empty, bool):
        raise InputError(f"{where}.empty", f"must be true or false; got {empty!r}")
    return StateInput(
        name=_text(t, "name", where) or default_name,
        props={k: _text(t, k, where) for k in STATE_KEYS if k in t},
        amount={k: _text(t, k, where) for k in AMOUNT_KEYS if k in t},
        empty=empty,
    )


_STREAM_KEYS = ("rate", "velocity", "area", "z", "species", "model")


def _stream_dict(s: StreamInput) -> dict:
    d: dict = {"name": s.name} if s.name else {}
    d.update(s.props)
    d.update({k: getattr(s, k) for k in _STREAM_KEYS if getattr(s, k)})
    return d


def _stream(t: dict, where: str) -> StreamInput:
    _only(t, ("name", *STATE_KEYS, *_STREAM_KEYS), where)
    name = _text(t, "name", where)
    if not name:
        raise InputError(f"{where}.name", "give the stream a name (the devices join streams by name)")
    return StreamInput(name=name, props={k: _text(t, k, where) for k in STATE_KEYS if k in t},
                       **{k: _text(t, k, where) for k in _STREAM_KEYS if k in t})


def _device_dict(d: DeviceInput) -> dict:
    out: dict = {"name": d.name, "kind": d.kind, "inlets": list(d.inlets), "outlets": list(d.outlets)}
    out.update(d.values)
    if d.fractions:
        out["fractions"] = list(d.fractions)
    return out


def _device(t: dict, where: str) -> DeviceInput:
    _only(t, ("name", "kind", "inlets", "outlets", "fractions", *DEVICE_VALUES), where)
    name = _text(t, "name", where)
    if not name:
        raise InputError(f"{where}.name", "give the device a name, e.g. 'PV-101'")
    where = f"device '{name}'"
    kind = _text(t, "kind", where)
    if kind not in DEVICE_KINDS:
        raise InputError(f"{where}.kind", f"expected one of {', '.join(DEVICE_KINDS)}; got {shown(kind)}")
    fractions = [repr(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else v
                 for v in (t.get("fractions") or [])]
    return DeviceInput(name=name, kind=kind, inlets=tuple(_text_list(t, "inlets", where)),
                       outlets=tuple(_text_list(t, "outlets", where)),
                       values={k: _text(t, k, where) for k in DEVICE_VALUES if k in t},
                       fractions=tuple(_text_list({"fractions": fractions}, "fractions", where)))


def _flag(t: dict, key: str, where: str) -> bool:
    value = t.get(key, False)
    if not isinstance(value, bool):
        raise InputError(f"{where}.{key}", f"must be true or false; got {shown(str(value))}")
    return value


_VESSEL_STATE = ("T", "P", "v", "rho")


def _vessel_dict(v: VesselInput) -> dict:
    d: dict = {"name": v.name}
    if v.V:
        d["V"] = v.V
    if v.empty:
        d["empty"] = True
    d.update(v.props)
    d["heat"] = v.heat
    d.update(v.values)
    if v.Q_points:
        d["Q"] = list(v.Q_points)
    return d


def _vessel(t: dict, where: str) -> VesselInput:
    _only(t, ("name", "V", "empty", *_VESSEL_STATE, "heat", *VESSEL_VALUES), where)
    name = _text(t, "name", where)
    if not name:
        raise InputError(f"{where}.name", "give the vessel a name, e.g. 'V-12' (lines join vessels by name)")
    where = f"vessel '{name}'"
    heat = _text(t, "heat", where) or "adiabatic"
    if heat not in VESSEL_HEAT:
        raise InputError(f"{where}.heat", f"expected one of {', '.join(VESSEL_HEAT)}; got {shown(heat)}")
    points: tuple[str, ...] = ()
    values = {k: _text(t, k, where) for k in VESSEL_VALUES if k in t and not isinstance(t[k], list)}
    if isinstance(t.get("Q"), list):
        points = tuple(_text_list(t, "Q", where))
    return VesselInput(name=name, V=_text(t, "V", where), empty=_flag(t, "empty", where),
                       props={k: _text(t, k, where) for k in _VESSEL_STATE if k in t}, heat=heat,
                       values=values, Q_points=points)


def _line_dict(line: LineInput) -> dict:
    d: dict = {"name": line.name, "from": line.source, "to": line.target}
    d.update(line.props)
    d.update(line.values)
    return d


def _line(t: dict, where: str) -> LineInput:
    _only(t, ("name", "from", "to", "T", "P", *LINE_VALUES), where)
    name = _text(t, "name", where)
    if not name:
        raise InputError(f"{where}.name", "give the line a name, e.g. 'fill line'")
    where = f"line '{name}'"
    return LineInput(name=name, source=_text(t, "from", where), target=_text(t, "to", where),
                     props={k: _text(t, k, where) for k in ("T", "P") if k in t},
                     values={k: _text(t, k, where) for k in LINE_VALUES if k in t})


def _end_dict(end: EndInput) -> dict:
    d: dict = dict(end.values)
    if end.balanced:
        d["balanced"] = True
    if end.vessel:
        d["vessel"] = end.vessel
    return d


def _end(t: dict) -> EndInput:
    _only(t, (*END_KEYS, "balanced", "vessel"), "end")
    return EndInput(values={k: _text(t, k, "end") for k in END_KEYS if k in t},
                    balanced=_flag(t, "balanced", "end"), vessel=_text(t, "vessel", "end"))


def _kij_texts(table: dict) -> dict[str, str]:
    """``[fluid.kij]``: pair -> kij as typed (read against the mixture's components when solved)."""
    if len(table) > MAX_ITEMS:
        raise InputError("fluid.kij", f"takes at most {MAX_ITEMS} pairs")
    return {str(k): _text(table, k, "fluid.kij") for k in table}


def _compositions(table: dict) -> dict[str, dict[str, str]]:
    """``[fluid.compositions.NAME]`` tables: each a mixture's fractions by species, as typed."""
    if len(table) > MAX_ITEMS:
        raise InputError("fluid.compositions", f"takes at most {MAX_ITEMS} compositions")
    out = {}
    for name, fractions in table.items():
        if len(str(name)) > MAX_NAME:
            raise InputError("fluid.compositions", f"{shown(str(name), MAX_NAME)}: a composition's name is at most "
                                                   f"{MAX_NAME} characters")
        where = f"fluid.compositions.{name}"
        if not isinstance(fractions, dict):
            raise InputError(where, "must be a table of fractions by species, like {CH4 = 0.9, C2H6 = 0.1}")
        if len(fractions) > MAX_ITEMS:
            raise InputError(where, f"takes at most {MAX_ITEMS} components")
        out[str(name)] = {k: _text(fractions, k, where) for k in fractions}
    return out


def _only(table: dict, allowed, where: str) -> None:
    for key in table:
        if key not in allowed:
            key = str(key) if len(str(key)) <= MAX_NAME else shown(str(key), MAX_NAME)
            name = f"{where}.{key}" if where else key
            raise InputError(name, f"is not a known key here; expected one of {', '.join(allowed)}")


def _table(data: dict, key: str, where: str = "") -> dict:
    value = data.get(key, {})
    if not isinstance(value, dict):
        raise InputError(f"{where}.{key}" if where else key, "must be a table")
    return value


def _array(data: dict, key: str) -> list[dict]:
    value = data.get(key, [])
    if isinstance(value, dict):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
        raise InputError(key, f"must be an array of tables ([[{key}]])")
    return value


def _text(table: dict, key: str, where: str) -> str:
    """A value as the text a person typed; numbers are kept as their text. A name is at most
    MAX_NAME characters, any other text MAX_VALUE."""
    value = table.get(key, "")
    if isinstance(value, bool):
        raise InputError(f"{where}.{key}", f"must be text or a number; got {value!r}")
    if isinstance(value, (int, float)):
        if isinstance(value, int) and abs(value) >= 10 ** 30:  # no field takes it, and its text is long
            raise InputError(f"{where}.{key}", f"is an integer of {len(str(abs(value)))} digits; no field takes one")
        return repr(value)
    if not isinstance(value, str):
        raise InputError(f"{where}.{key}", f"must be text; got {type(value).__name__}")
    limit = MAX_NAME if key == "name" else MAX_VALUE
    if len(value) > limit:
        raise InputError(f"{where}.{key}", f"is {len(value)} characters long; at most {limit} are taken here")
    return value


def _text_list(table: dict, key: str, where: str) -> list[str]:
    value = table.get(key, [])
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise InputError(f"{where}.{key}", "must be a list of text")
    if len(value) > MAX_ITEMS or any(len(v) > MAX_VALUE for v in value):
        raise InputError(f"{where}.{key}", f"takes at most {MAX_ITEMS} texts of at most {MAX_VALUE} characters each")
    return value
