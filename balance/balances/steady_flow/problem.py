"""From a steady-flow worksheet as typed to a network in SI numbers.

``prepare(worksheet)`` reads every stream (its fluid, its given properties,
its rate as mass, molar or standard volume, its speed and height) and every
device (its kind, the streams it joins, its heat, work, efficiency and
pressure drops), and says in words what the network still lacks
(``Problem.dof``) by trying to solve it: the solution is propagation, so the
count and the solution are the same walk.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

from ...convention import Convention
from ...errors import BalanceError, InputError, SpecificationError
from ...state import blended_model, fluid_pair, make_fluid, read_specs
from ...units import P_ATM, parse, read_rate
from ...worksheet import DEVICE_KINDS, UNKNOWN, FieldProblem, Worksheet, place
from ..control_volume import Dof, Unknown, read_atmosphere
from .network import DeviceSpec, Network, Solved, StreamSpec

#: Devices that take heat (the others are adiabatic).
HEATED = ("heater", "cooler")
#: Devices that take work.
WORKED = ("compressor", "pump", "turbine", "expander")
#: Devices that take an isentropic efficiency.
EFFICIENT = (*WORKED, "nozzle", "diffuser")
#: The dead state exergy is counted against, unless the worksheet sets one [K].
T0_DEFAULT = 298.15


@dataclass
class Problem:
    """A steady-flow problem, every value in SI."""

    worksheet: Worksheet
    streams: list[StreamSpec]
    devices: list[DeviceSpec]
    convention: Convention
    p_atm: float
    rate_words: dict[str, str] = field(default_factory=dict)
    """for each stream with a rate: what was read ('mass rate', 'standard volume: ...')"""
    T0: float = T0_DEFAULT
    """the dead-state temperature exergy destroyed is counted at [K]"""
    solved: Solved | None = field(default=None, repr=False, compare=False)
    """the network as the count solved it (the same walk), which :meth:`solution` hands on"""
    blends: Blends = field(default_factory=lambda: Blends())
    """the streams whose composition a mixer of different fluids sets"""

    def network(self) -> Network:
        return Network(self.streams, self.devices, self._blends())

    def _blends(self):
        """What the network needs to blend: per mixer, the streams it sets and the model maker."""
        if not self.blends.follows:
            return None
        kij = self.worksheet.fluid.kij
        mixers = {m: self.blends.downstream(m) for m in self.blends.first_inlet}
        return mixers, lambda models, rates, field: blended_model(models, rates, kij, field)

    def solution(self) -> Solved:
        """The solved network: the one the count found, else solved now; raises SpecificationError or
        SolveError."""
        return self.solved if self.solved is not None else self.network().solve()

    @cached_property
    def dof(self) -> Dof:
        """What the network lacks, in words: the propagation tried once (it is cheap, and the
        count and the solution are the same walk)."""
        try:
            self.solved = self.network().solve()
        except SpecificationError as exc:
            return Dof((Unknown("state", "of the network"),), (), (), str(exc))
        except BalanceError:  # complete; the solve itself says what fails
            pass
        plural = lambda n, w: f"{n} {w}{'' if n == 1 else 's'}"  # noqa: E731
        return Dof((), (), (), f"{plural(len(self.devices), 'device')}, {plural(len(self.streams), 'stream')}: "
                               "ready to solve")


def prepare(ws: Worksheet) -> Problem:
    """Read a steady-flow worksheet into a Problem; raises InputError naming the field."""
    p_atm = read_atmosphere(ws.heading.atmosphere)
    if not ws.streams:
        raise InputError("stream", "give the streams: each a name and what is known of its state and rate")
    if not ws.devices:
        raise InputError("device", "give the devices: each a name, a kind and the streams it joins")
    default = None
    if ws.fluid.species or ws.fluid.composition:  # a model alone: each stream names its species
        default = fluid_pair(ws.fluid)
    names = [s.name for s in ws.streams]
    twice = sorted({n for n in names if names.count(n) > 1})
    if twice:
        raise InputError("stream", f"two streams are named {twice[0]!r}: give each its own name")
    words: dict[str, str] = {}
    blends = blended_streams(ws)
    built: dict[str, StreamSpec] = {}
    for st in ws.streams:  # first the streams of a fluid of their own, then those a blend sets
        if st.name not in blends.follows:
            built[st.name] = _stream(st, ws, default, p_atm, words)
    for st in _in_flow_order(ws, blends):
        built[st.name] = _blended_stream(st, built[blends.first_inlet[blends.follows[st.name]]].model, p_atm)
    streams = [built[st.name] for st in ws.streams]
    convention = Convention(ws.heading.convention)
    devices = [_device(d, convention, p_atm) for d in ws.devices]
    problem = Problem(ws, streams, devices, convention, p_atm, words, blends=blends)
    problem.network()  # the graph itself: streams named, arity, each stream in at most one device's inlets
    return problem


@dataclass(frozen=True)
class Blends:
    """The streams whose composition a mixer of different fluids sets: its outlet and what flows
    on from it through devices that keep a composition (heaters, valves, machines, splitters, one
    side of an exchanger)."""

    follows: dict[str, str] = field(default_factory=dict)
    """stream -> the mixer that sets its composition"""
    first_inlet: dict[str, str] = field(default_factory=dict)
    """mixer -> its first inlet (whose model stands in until the blend is known)"""

    def downstream(self, mixer: str) -> list[str]:
        return [s for s, m in self.follows.items() if m == mixer]


def _fluid_text(st, ws: Worksheet) -> str:
    return (st.species or ws.fluid.species or ("composition" if ws.fluid.composition else "")).strip().lower()


def blended_streams(ws: Worksheet) -> Blends:
    """Which streams a blend sets (:class:`Blends`): a mixer blends when its inlets name different
    fluids, or one of them is itself a blend."""
    by_name = {st.name: st for st in ws.streams}
    follows: dict[str, str] = {}
    first: dict[str, str] = {}
    for _ in range(len(ws.devices) + 1):  # a blend downstream of a blend: until nothing changes
        changed = False
        for d in ws.devices:
            if d.kind != "mixer" or not d.outlets or d.name in first:
                continue
            inlets = [by_name[s] for s in d.inlets if s in by_name]
            fluids = {_fluid_text(st, ws) for st in inlets}
            if len(fluids) > 1 or any(st.name in follows for st in inlets):
                first[d.name] = d.inlets[0]
                changed |= _follow(ws, d.outlets[0], d.name, follows)
        if not changed:
            break
    return Blends(follows, first)


def _follow(ws: Worksheet, start: str, mixer: str, follows: dict[str, str]) -> bool:
    """Mark ``start`` and every stream its composition reaches as set by ``mixer``."""
    todo, changed = [start], False
    while todo:
        name = todo.pop()
        if follows.get(name) == mixer:
            continue
        follows[name], changed = mixer, True
        for d in ws.devices:
            if name not in d.inlets or d.kind == "mixer":
                continue
            if d.kind == "exchanger":
                k = d.inlets.index(name)
                todo += [d.outlets[k]] if k < len(d.outlets) else []
            else:
                todo += list(d.outlets)
    return changed


def _in_flow_order(ws: Worksheet, blends: Blends) -> list:
    """The blended streams, each after the mixer inlet its stand-in model comes from."""
    pending = [st for st in ws.streams if st.name in blends.follows]
    done = {st.name for st in ws.streams if st.name not in blends.follows}
    order = []
    while pending:
        ready = [st for st in pending if blends.first_inlet[blends.follows[st.name]] in done]
        if not ready:
            raise InputError(f"stream '{pending[0].name}'", "is blended by a mixer whose inlets come from its own "
                                                            "blend: a recycle of a blend is not solved in this version")
        for st in ready:
            order.append(st)
            done.add(st.name)
            pending.remove(st)
    return order


def _blended_stream(st, stand_in, p_atm: float) -> StreamSpec:
    """A stream whose composition a blend sets: its T and P as given, its model a stand-in until
    the mixer solves (its rate and everything per kilogram follow from the blend)."""
    where = f"stream '{st.name}'"
    if st.species:
        raise InputError(f"{where}.species", "is set by the mixer upstream, which blends different fluids: leave "
                                             "the species out")
    for key in st.props:
        if key not in ("T", "P"):
            raise InputError(f"{where}.{key}", "a blended stream takes its T and P only: its composition, and so "
                                               "what a mole or a kilogram of it holds, follows from the mixer")
    if st.rate.strip() and st.rate.strip() != UNKNOWN:
        raise InputError(f"{where}.rate", "a blended stream's rate is the sum of the mixer's inlets: leave it out")
    given = read_specs(st.props, stand_in.species.M, where, p_atm)
    velocity = _optional(st.velocity, "velocity", f"{where}.velocity")
    if st.area.strip():
        raise InputError(f"{where}.area", "give a blended stream's velocity, not its flow area")
    z = _optional(st.z, "length", f"{where}.z", allow_negative=True) or 0.0
    return StreamSpec(st.name, stand_in, given, None, velocity or 0.0, None, z)


def _model_of(st, ws: Worksheet, default):
    """The property model a stream is balanced on: its own species and model, else the worksheet's."""
    where = f"stream '{st.name}'"
    if st.species or st.model:
        if not st.species and ws.fluid.composition:  # the worksheet's mixture on the stream's own model
            return fluid_pair(ws.fluid, st.model)[1]
        species = st.species or ws.fluid.species
        _, model = make_fluid(species, st.model or ws.fluid.model,
                              dict(ws.fluid.overrides) if species == ws.fluid.species else {},
                              fields=(f"{where}.species", f"{where}.model", "fluid.overrides"),
                              fractions=ws.fluid.fractions, normalise=ws.fluid.normalise,
                              named=ws.fluid.compositions, kij=ws.fluid.kij)
        return model
    if default is None:
        raise InputError("fluid.species", "give the species and model (for every stream, or each its own)")
    return default[1]


def _stream(st, ws: Worksheet, default, p_atm: float, words: dict[str, str], *, each=None) -> StreamSpec:
    """One stream in SI; raises InputError naming the field. With ``each`` (a list), every field at
    fault is appended to it instead (the first of them is still raised at the end)."""
    where = f"stream '{st.name}'"

    def read(fn, *args, **kwargs):
        try:
            return fn(*args, **kwargs)
        except InputError as exc:
            if each is None:
                raise
            each.append(exc)
            return None

    model = _model_of(st, ws, default)
    M = model.species.M
    if each is not None:  # each property on its own, so every one at fault is named
        for key, text in st.props.items():
            read(read_specs, {key: text}, M, where, p_atm)
    given = read(read_specs, st.props, M, where, p_atm) if not each else None
    rate = None
    if st.rate.strip() and st.rate.strip() != UNKNOWN:
        rate, words[st.name] = read(read_rate, st.rate, M, f"{where}.rate") or (None, "")
    velocity = read(_optional, st.velocity, "velocity", f"{where}.velocity")
    area = read(_optional, st.area, "area", f"{where}.area", positive=True)
    if velocity and area:
        read(_refuse, f"{where}.area", "give the velocity or the flow area, not both")
    z = read(_optional, st.z, "length", f"{where}.z", allow_negative=True) or 0.0
    if each:
        raise each[0]
    return StreamSpec(st.name, model, given, rate, velocity or 0.0, area, z)


def _refuse(field: str, message: str):
    raise InputError(field, message)


def _optional(text: str, dimension: str, field: str, *, positive: bool = False,
              allow_negative: bool = False) -> float | None:
    if not text.strip():
        return None
    value = parse(text, dimension, field)
    if (positive and not value > 0) or (not allow_negative and value < 0):
        raise InputError(field, f"must be {'positive' if positive else 'zero or more'}; got {text!r}")
    return value


def _device(d, convention: Convention, p_atm: float) -> DeviceSpec:
    where = f"device '{d.name}'"
    v = d.values
    if d.kind not in DEVICE_KINDS:
        got = f"; got {d.kind!r}" if d.kind.strip() else ""
        raise InputError(f"{where}.kind", f"expected one of {', '.join(DEVICE_KINDS)}{got}")

    def value(key: str, dimension: str, default=None, *, unknown_ok: bool = True):
        text = v.get(key, "").strip()
        if not text:
            return default
        if text == UNKNOWN:
            if not unknown_ok:
                raise InputError(f"{where}.{key}", "cannot be an unknown here")
            return None
        return parse(text, dimension, f"{where}.{key}")

    if "Q" in v and d.kind not in HEATED:
        raise InputError(f"{where}.Q", f"a {d.kind} here is adiabatic; heat is a heater's or a cooler's "
                                       "(add one beside it)")
    if "W" in v and d.kind not in WORKED:
        raise InputError(f"{where}.W", f"a {d.kind} takes no work; power is a compressor's, pump's, "
                                       "turbine's or expander's")
    Q = value("Q", "power") if d.kind in HEATED else 0.0
    W = value("W", "power") if d.kind in WORKED else 0.0
    if W is not None and d.kind in WORKED:
        W = convention.work_on(W)
    if v.get("eta", "").strip() and d.kind not in EFFICIENT:
        raise InputError(f"{where}.eta", f"a {d.kind} has no efficiency; an isentropic efficiency is a "
                                         "compressor's, pump's, turbine's, expander's, nozzle's or diffuser's")
    for key, kinds in (("fractions", ("splitter",)), ("dP_cold", ("exchanger",)), ("arrangement", ("exchanger",))):
        if (d.fractions if key == "fractions" else v.get(key, "").strip()) and d.kind not in kinds:
            owner = f"{'an' if kinds[0][0] in 'aeiou' else 'a'} {kinds[0]}'s"
            raise InputError(f"{where}.{key}", f"is {owner}; a {d.kind} takes none")
    eta = value("eta", "dimensionless")
    poly = value("eta_poly", "dimensionless")
    if eta is not None and poly is not None:
        raise InputError(f"{where}.eta_poly", "give the isentropic efficiency eta or the polytropic eta_poly, not both")
    if poly is not None and d.kind not in ("compressor", "pump"):
        raise InputError(f"{where}.eta_poly", "a polytropic efficiency is a compressor's")
    efficiency = poly if poly is not None else eta
    if efficiency is not None and not 0.0 < efficiency <= 1.0:
        key = "eta_poly" if poly is not None else "eta"
        raise InputError(f"{where}.{key}", f"must be an efficiency above 0 and at most 1; got {v[key]!r}")
    if d.kind in ("nozzle", "diffuser") and efficiency is None and not v.get("eta", "").strip():
        efficiency = 1.0  # an ideal nozzle unless said otherwise (its words say so)
    dP = tuple(_drop(v.get(k, ""), f"{where}.{k}") for k in ("dP", "dP_cold") if v.get(k, "").strip())
    T_b = value("T_boundary", "temperature", unknown_ok=False)
    fractions = tuple(parse(f, "dimensionless", f"{where}.fractions") for f in d.fractions)
    arrangement = v.get("arrangement", "counter").strip() or "counter"
    if arrangement not in ("counter", "co-current"):
        raise InputError(f"{where}.arrangement", f"expected 'counter' or 'co-current'; got {arrangement!r}")
    return DeviceSpec(d.name, d.kind, tuple(d.inlets), tuple(d.outlets), Q, W, efficiency, poly is not None, dP,
                      T_b, fractions, arrangement == "counter")


def _drop(text: str, field: str) -> float:
    """A pressure drop as typed [Pa]: a pressure difference, zero or more."""
    dP = parse(text, "pressure_difference", field)
    if dP < 0:
        raise InputError(field, f"a pressure drop is zero or more; got {text!r}")
    return dP


def problems(ws: Worksheet) -> list[FieldProblem]:
    """Every field at fault (the first each part reaches, read as :func:`prepare` reads it), then
    what stops the network; empty exactly when :func:`prepare` succeeds."""
    found: list[InputError] = []
    try:
        p_atm = read_atmosphere(ws.heading.atmosphere)
        default = fluid_pair(ws.fluid) \
            if ws.fluid.species or ws.fluid.composition else None
    except InputError:
        p_atm = default = None  # prepare names it, below
    if p_atm is not None:
        convention = Convention(ws.heading.convention)
        for st in ws.streams:
            each: list[InputError] = []
            try:
                _stream(st, ws, default, p_atm, {}, each=each)
            except InputError as exc:
                found += each or [exc]
        for d in ws.devices:
            try:
                _device(d, convention, p_atm)
            except InputError as exc:
                found.append(exc)
    out = [place(ws, exc.field, exc.message) for exc in found]
    if not out:  # no field of its own at fault: what stops the whole (a name twice, the graph, ...)
        try:
            prepare(ws)
        except InputError as exc:
            out.append(place(ws, exc.field, exc.message))
        except SpecificationError as exc:
            out.append(FieldProblem("", str(exc), ""))
    return out


__all__ = ["P_ATM", "Problem", "prepare", "problems"]
