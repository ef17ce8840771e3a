"""Streams joined by devices: what is known, what follows, and what is missing, in words.

A steady-flow worksheet is a network: streams (each a state and a rate,
either given or to be found) and devices that join them. Solving it is
propagation: each device, in turn, works out whatever its own equations
fix from what is known around it — an outlet state from its inlet and its
specification, a rate from a mass or energy balance, a duty, a power or an
efficiency from both ends — until nothing more follows. Every device is
then checked by its three balances recomputed from the flows
(:func:`.devices.balance_of`). What is still unknown is said per device
("compressor K-1: give one of the outlet pressure, the efficiency, the
power"), as is what is given twice. Where propagation stalls but a tear
stream makes the worksheet square (a loop, or two devices that only their
balances together fix), :mod:`.together` solves the rest at once.

Every value in SI: rates molar [mol/s], states molar (:class:`Point`), heat
to and work on the fluid [W].
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ...errors import InputError, SolveError, SpecificationError
from ...models.base import Point, PropertyModel
from . import devices as dv
from .streams import G, Flow

#: A device's balances must close below this once solved (relative).
TOLERANCE = 1e-9


@dataclass(frozen=True)
class StreamSpec:
    """One stream as the worksheet gives it, in SI."""

    name: str
    model: PropertyModel
    given: dict[str, float]
    """intensive properties given (molar SI: T, P, v, u, h, s, x): none, one or two"""
    n_dot: float | None = None
    """molar rate [mol/s]; None when unknown"""
    velocity: float = 0.0
    """[m/s]"""
    area: float | None = None
    """flow area [m2]: the velocity follows from the rate and the state"""
    z: float = 0.0
    """elevation [m]"""


@dataclass(frozen=True)
class DeviceSpec:
    """One device as the worksheet gives it, in SI; None for a value to be found."""

    name: str
    kind: str
    inlets: tuple[str, ...]
    outlets: tuple[str, ...]
    Q_dot: float | None = 0.0
    """heat to the fluid [W] (0 for an adiabatic device; None: to be found)"""
    W_dot: float | None = 0.0
    """work done on the fluid [W] (None: to be found)"""
    eta: float | None = None
    """efficiency [-]: isentropic, or polytropic (``polytropic``), or a nozzle's; None: to be found"""
    polytropic: bool = False
    dP: tuple[float, ...] = ()
    """pressure drop per path [Pa] (an exchanger: hot side, cold side)"""
    T_boundary: float | None = None
    """where heat crosses [K]"""
    fractions: tuple[float, ...] = ()
    """a splitter's share of the inlet rate, per outlet"""
    counter: bool = True
    """an exchanger's arrangement: counter-flow, else co-current"""

    @property
    def where(self) -> str:
        return f"device '{self.name}'"


@dataclass
class Solved:
    """What the network came to: every stream's Flow and every device's terms."""

    flows: dict[str, Flow]
    Q_dot: dict[str, float]
    W_dot: dict[str, float]
    eta: dict[str, float | None]
    isentropic: dict[str, Point]
    balances: dict[str, dv.Balance]
    approach: dict[str, dv.Approach]
    notes: list[str] = field(default_factory=list)
    basis: str = ""
    """how the rates were fixed when none was given ('per kg/s of ...'), else empty"""


class Network:
    """Streams and devices, solved by propagation."""

    def __init__(self, streams: list[StreamSpec], devices: list[DeviceSpec], blends=None):
        self.streams = {s.name: s for s in streams}
        self.blends, self.blend_model = blends if blends is not None else ({}, None)
        """mixer -> the streams whose composition it sets; and the maker of a blend's model"""
        self.blended = {s for names in self.blends.values() for s in names}
        self.devices = devices
        self.points: dict[str, Point] = {}
        self.rates: dict[str, float] = {s.name: s.n_dot for s in streams if s.n_dot is not None}
        self.Q: dict[str, float | None] = {d.name: d.Q_dot for d in devices}
        self.W: dict[str, float | None] = {d.name: d.W_dot for d in devices}
        self.eta: dict[str, float | None] = {d.name: d.eta for d in devices}
        self.isentropic: dict[str, Point] = {}
        self.speeds: dict[str, float] = {}
        self.checked: set[str] = set()
        """devices whose outlets were given in full and have been held to what the device makes of its inlet"""
        """speeds a device works out (a nozzle's outlet) [m/s], over the stream's own"""
        self.notes: list[str] = []
        self.basis = ""
        self._check_graph()

    # -- the graph ---------------------------------------------------------------------
    def _check_graph(self) -> None:
        seen_in: dict[str, str] = {}
        seen_out: dict[str, str] = {}
        for d in self.devices:
            if d.kind not in RULES:
                raise InputError(f"{d.where}.kind", f"expected one of {', '.join(RULES)}; got {d.kind!r}")
            n_in, n_out = ARITY[d.kind]
            if (n_in and len(d.inlets) != n_in) or (not n_in and len(d.inlets) < 2):
                raise InputError(f"{d.where}.inlets", f"a {d.kind} takes {n_in or 'two or more'} inlet"
                                                      f"{'' if n_in == 1 else 's'}; got {len(d.inlets)}")
            if (n_out and len(d.outlets) != n_out) or (not n_out and len(d.outlets) < 2):
                raise InputError(f"{d.where}.outlets", f"a {d.kind} takes {n_out or 'two or more'} outlet"
                                                       f"{'' if n_out == 1 else 's'}; got {len(d.outlets)}")
            for side, names in (("inlets", d.inlets), ("outlets", d.outlets)):
                for s in names:
                    if s not in self.streams:
                        raise InputError(f"{d.where}.{side}", f"names a stream {s!r} that no [[stream]] defines")
            self._check_species(d)
            for s in d.inlets:
                if s in seen_in:
                    raise InputError(f"{d.where}.inlets", f"stream {s!r} already enters device '{seen_in[s]}'")
                seen_in[s] = d.name
            for s in d.outlets:
                if s in seen_out:
                    raise InputError(f"{d.where}.outlets", f"stream {s!r} already leaves device '{seen_out[s]}'")
                seen_out[s] = d.name
        for name, spec in self.streams.items():
            if len(spec.given) > 2:
                raise SpecificationError(f"stream '{name}': {', '.join(spec.given)} are given but a state takes two")
            if len(spec.given) == 2 and name not in self.points and name not in self.blended:
                self.points[name] = spec.model.flash(dict(spec.given), field=f"stream '{name}'")

    def _check_species(self, d: DeviceSpec) -> None:
        """The streams a device joins carry one fluid (each side of an exchanger its own): a
        stream given another species is named, not left to fail the mass balance."""
        if d.name in self.blends:  # a blend of different fluids: each inlet its own, the outlet theirs
            return
        sides = ([(d.inlets[0], d.outlets[0]), (d.inlets[1], d.outlets[1])] if d.kind == "exchanger"
                 else [(*d.inlets, *d.outlets)])
        for side in sides:
            first = self.streams[side[0]].model.species
            for s in side[1:]:
                other = self.streams[s].model.species
                if other.id != first.id:
                    raise InputError(f"stream '{s}'.species",
                                     f"is {other.id} but {d.where} takes it with stream '{side[0]}' of "
                                     f"{first.id}: the streams a device joins carry one fluid (give the "
                                     f"stream's species and model as its partner's)")

    # -- what each rule may use ----------------------------------------------------------
    def known(self, name: str) -> bool:
        return name in self.points

    def P_of(self, name: str, device: DeviceSpec, inlet: str, k: int = 0) -> float | None:
        """An outlet's pressure: given on the stream, or the inlet's less the device's pressure drop."""
        given = self.streams[name].given.get("P")
        if given is not None:
            return given
        if inlet in self.points:
            dP = device.dP[k] if k < len(device.dP) else None
            if dP is not None:
                return self.points[inlet].P - dP
        return None

    def second(self, name: str) -> dict[str, float]:
        """The outlet's given properties other than P (what fixes its state with P)."""
        return {k: v for k, v in self.streams[name].given.items() if k != "P"}

    def flow(self, name: str) -> Flow:
        """The stream's Flow (its state and rate known), with its speed."""
        spec = self.streams[name]
        n = self.rates[name]
        v = self.speeds.get(name, spec.velocity)
        if spec.area is not None:
            v = n * self.points[name].v / spec.area
        return Flow(name, spec.model, self.points[name], n, v, spec.z)

    def inlet(self, name: str) -> Flow | None:
        """The stream as an inlet: its Flow, or where its rate is not known yet, its state and speed
        per mole/s (None while its speed waits for the rate, through a given flow area)."""
        if name in self.rates:
            return self.flow(name)
        spec = self.streams[name]
        if spec.area is not None:
            return None
        return Flow(name, spec.model, self.points[name], 1.0, self.speeds.get(name, spec.velocity), spec.z)

    def note(self, words: str) -> None:
        """Say something of the solution once, however often the rules pass."""
        if words not in self.notes:
            self.notes.append(words)

    def set_point(self, name: str, point: Point) -> None:
        spec = self.streams[name]
        for key, value in spec.given.items():  # what was given must hold (over-specified otherwise)
            got = point.x if key == "x" else point.get(key)
            if got is None or not math.isclose(got, value, rel_tol=1e-7, abs_tol=1e-9):
                raise SpecificationError(
                    f"stream '{name}': {key} is given as {value:.6g} (SI) but the devices make it {got:.6g}; "
                    "leave one of them to be found ('?')")
        self.points[name] = point

    # -- solving -----------------------------------------------------------------------
    def solve(self) -> Solved:
        for _ in range(4 * len(self.devices) + 4):
            progress = False
            for d in self.devices:
                progress |= bool(_rates(self, d))
                progress |= bool(RULES[d.kind](self, d))
            if not progress:
                break
        if not self.rates:  # no rate anywhere: per kilogram of the first inlet
            first = next((s for s in self._feeds()), None)
            if first is not None:
                self.rates[first] = 1.0 / self.streams[first].model.species.M
                self.basis = f"per 1 kg/s of stream '{first}' (no rate is given: kJ/kg and kW per kg/s)"
                return self.solve()
        missing = self.missing()
        if missing:
            # only where propagation stalls: a loop, or devices fixed only together
            from . import together

            if not together.solve(self):
                raise SpecificationError("; ".join(missing))
        return self._checked()

    def _feeds(self):
        leaving = {s for d in self.devices for s in d.outlets}
        return [s for d in self.devices for s in d.inlets if s not in leaving]

    def missing(self) -> list[str]:
        """What stops the solution, in words, per device (empty when everything is known)."""
        out = []
        for d in self.devices:
            words = WANTS[d.kind](self, d)
            if words:
                out.append(f"{d.kind} {d.name}: {words}")
        unknown = [s for s in self.streams if s not in self.points or s not in self.rates]
        if unknown and not out:
            out.append(f"stream{'s' if len(unknown) > 1 else ''} {', '.join(unknown)}: "
                       "give two properties and a rate, or join them to a device")
        return out

    def _checked(self) -> Solved:
        flows = {name: self.flow(name) for name in self.streams}
        balances, approaches = {}, {}
        for d in self.devices:
            ins, outs = [flows[s] for s in d.inlets], [flows[s] for s in d.outlets]
            b = dv.balance_of(ins, outs, self.Q[d.name] or 0.0, self.W[d.name] or 0.0, d.T_boundary)
            if abs(b.mass) > TOLERANCE or abs(b.energy) > TOLERANCE:
                raise SolveError(f"{d.where}: its balances do not close after solving (mass {b.mass:.2e}, "
                                 f"energy {b.energy:.2e}, relative): if every state and rate here is given, one "
                                 "of them is fixed by the others (leave it to be found, '?'); no result reported")
            if d.kind == "exchanger":
                ap = dv.approach(flows[d.inlets[0]], flows[d.outlets[0]], flows[d.inlets[1]], flows[d.outlets[1]],
                                 counter=d.counter, field=d.where)
                if ap.minimum < 0:
                    raise SolveError(f"{d.where}: the temperatures cross inside the exchanger (the hot side is "
                                     f"{-ap.minimum:.3g} K colder than the cold side at {ap.where:.0%} of the duty): "
                                     "no exchanger can do that; check the outlet temperatures and the rates")
                approaches[d.name] = ap
            if b.S_gen_dot is not None and b.S_gen_dot < -1e-9 * max(1.0, sum(abs(f.S_dot) for f in ins)):
                raise SolveError(f"{d.where}: impossible: S_gen = {b.S_gen_dot:.6g} W/K < 0 "
                                 f"({_impossible(d)})")
            balances[d.name] = b
        return Solved(flows, {k: v or 0.0 for k, v in self.Q.items()}, {k: v or 0.0 for k, v in self.W.items()},
                      dict(self.eta), dict(self.isentropic), balances, approaches, list(self.notes), self.basis)


def _impossible(d: DeviceSpec) -> str:
    if d.kind in ("compressor", "pump", "turbine", "expander", "nozzle", "diffuser"):
        return "an efficiency above 1, or an outlet state no adiabatic machine reaches"
    if d.kind in ("heater", "cooler"):
        return "heat flowing from a colder boundary into a hotter fluid, or the reverse; check T_boundary"
    return "check the given states and rates"


# -- rates: the mass balances ------------------------------------------------------------
def _rates(net: Network, d: DeviceSpec) -> bool:
    """Rates that the device's mass balance fixes (linear; a separator's needs the inlet's quality)."""
    r = net.rates
    if d.kind == "exchanger":  # two sides that do not mix
        pairs = [(d.inlets[0], d.outlets[0]), (d.inlets[1], d.outlets[1])]
    elif ARITY[d.kind] == (1, 1):
        pairs = [(d.inlets[0], d.outlets[0])]
    else:
        pairs = []
    progress = False
    for a, b in pairs:
        if a in r and b not in r:
            r[b] = r[a]
            progress = True
        elif b in r and a not in r:
            r[a] = r[b]
            progress = True
    if d.kind == "mixer":
        unknown = [s for s in (*d.inlets, *d.outlets) if s not in r]
        if len(unknown) == 1:
            s, out = unknown[0], d.outlets[0]
            r[s] = _positive(d, s, sum(r[x] for x in d.inlets) if s == out else
                             r[out] - sum(r[x] for x in d.inlets if x != s))
            progress = True
    if d.kind == "splitter" and d.fractions and d.inlets[0] not in r:
        known = next(((name, f) for name, f in zip(d.outlets, d.fractions) if name in r and f > 0), None)
        if known is not None:  # a branch's rate and its share give the inlet's
            r[d.inlets[0]] = r[known[0]] / known[1]
            progress = True
    if d.kind == "splitter" and d.inlets[0] in r and d.fractions:
        for name, f in zip(d.outlets, d.fractions):
            if name not in r:
                r[name] = r[d.inlets[0]] * f
                progress = True
    if d.kind == "splitter" and not d.fractions:
        streams = [*d.inlets, *d.outlets]
        unknown = [s for s in streams if s not in r]
        if len(unknown) == 1:
            s = unknown[0]
            if s == d.inlets[0]:
                r[s] = sum(r[x] for x in d.outlets)
            else:
                r[s] = _positive(d, s, r[d.inlets[0]] - sum(r[x] for x in d.outlets if x != s))
            progress = True
    return progress


def _positive(d: DeviceSpec, stream: str, n_dot: float) -> float:
    """A rate the mass balance gives [mol/s], refused unless it is positive (a branch asked for all the
    inlet brings, or more, has none left)."""
    if not n_dot > 0:
        raise SolveError(f"{d.where}: its mass balance leaves stream '{stream}' a rate of {n_dot:.6g} mol/s: "
                         "the rates given take all that comes in, or more; check them")
    return n_dot


# -- the rules: what each kind works out --------------------------------------------------
def _valve(net: Network, d: DeviceSpec) -> bool:
    a, b = d.inlets[0], d.outlets[0]
    if not net.known(a) or (net.known(b) and d.name in net.checked):
        return False
    if net.known(b):  # both ends given: the outlet's given values must be the throttle's (over-specified otherwise)
        net.checked.add(d.name)
    P = net.P_of(b, d, a)
    if P is None:
        return False
    spec = net.streams[b]
    if spec.area is not None and b not in net.rates:
        return False
    inlet = net.inlet(a)
    if inlet is None:
        return False
    point = _with_speed(net, b, lambda V: dv.throttle(inlet, P, b, V, spec.z, d.where).point)
    net.set_point(b, point)
    return True


def _with_speed(net: Network, name: str, state_at):
    """The outlet state, with its speed from its area where it is given (a few fixed-point passes)."""
    spec = net.streams[name]
    if spec.area is None:
        return state_at(spec.velocity)
    V, point = 0.0, None
    for _ in range(50):
        point = state_at(V)
        V_new = net.rates[name] * point.v / spec.area
        if abs(V_new - V) <= 1e-12 * max(V_new, 1.0):
            break
        V = V_new
    return point


def _exchange(net: Network, d: DeviceSpec) -> bool:
    a, b = d.inlets[0], d.outlets[0]
    if not net.known(a):
        return False
    P = net.P_of(b, d, a)
    if P is None and not d.dP and "P" not in net.streams[b].given:
        P = net.points[a].P  # no pressure drop given: none
        net.note(f"{d.kind} {d.name}: no pressure drop given: the outlet at the inlet's pressure")
    if P is None:
        return False
    if not net.known(b):
        second = net.second(b)
        if second:
            point = net.streams[b].model.flash({"P": P, **second}, field=f"stream '{b}'")
            net.set_point(b, point)
            return True
        if net.Q[d.name] is not None and a in net.rates:
            out, _ = dv.exchange(net.flow(a), P, b, Q_dot=net.Q[d.name], velocity=net.streams[b].velocity,
                                 z=net.streams[b].z, field=d.where)
            net.set_point(b, out.point)
            return True
        return False
    if net.Q[d.name] is None and a in net.rates and b in net.rates:
        net.Q[d.name] = net.rates[a] * (net.flow(b).e - net.flow(a).e)
        return True
    if d.Q_dot is not None:
        return _duty(net, d, a, b, d.Q_dot, "the heat Q")
    return False


def _duty(net: Network, d: DeviceSpec, a: str, b: str, given: float, words: str) -> bool:
    """A heat or power given [W] with both ends' states known: the rate follows where it is not known
    (ṅ = given / (e_out - e_in)); where it is, the given value must be the one the streams carry."""
    if a in net.rates or b in net.rates:
        key = f"{d.name} (duty)"
        if key in net.checked or a not in net.rates or b not in net.rates:
            return False
        net.checked.add(key)
        ea, eb = net.flow(a).e, net.flow(b).e
        implied = net.rates[a] * (eb - ea)
        if not math.isclose(implied, given, rel_tol=1e-7, abs_tol=1e-9 * net.rates[a] * max(abs(ea), abs(eb), 1.0)):
            raise SpecificationError(f"{d.kind} {d.name}: {words} is given as {given / 1e3:.6g} kW but its streams' "
                                     f"states and rate make it {implied / 1e3:.6g} kW; leave one of them to be "
                                     "found ('?')")
        return False
    ea, eb = _e(net, a), _e(net, b)
    if eb == ea:
        raise SolveError(f"{d.where}: its outlet carries its inlet's energy, so {words} cannot fix the rate")
    n = given / (eb - ea)
    if not n > 0:
        raise SolveError(f"{d.where}: {words} of {given / 1e3:.6g} kW and the states of '{a}' and '{b}' would need "
                         f"a rate of {n:.6g} mol/s; check the sign of {words} and the outlet's state")
    net.rates[a] = net.rates[b] = n
    return True


def _machine(net: Network, d: DeviceSpec) -> bool:
    a, b = d.inlets[0], d.outlets[0]
    compresses = d.kind in ("compressor", "pump")
    if not net.known(a):
        return False
    P = net.P_of(b, d, a)
    if P is None:
        return False
    inlet = Flow(a, net.streams[a].model, net.points[a], net.rates.get(a, 1.0))
    progress = False
    forward = None
    given_eta = d.eta is not None
    if given_eta and d.name not in net.checked:
        # the efficiency given: the outlet follows; an outlet given as well must be that one (set_point says
        # which value is given twice)
        net.checked.add(d.name)
        forward = dv.machine(inlet, P, b, compresses=compresses, eta=d.eta, polytropic=d.polytropic, field=d.where)
        net.set_point(b, forward.out.point)
        progress = True
    if not net.known(b):
        second = net.second(b)
        if second:
            point = net.streams[b].model.flash({"P": P, **second}, field=f"stream '{b}'")
        elif net.W[d.name] is not None and a in net.rates:
            e = net.flow(a).e + net.W[d.name] / net.rates[a]
            spec = net.streams[b]
            point = _with_speed(net, b, lambda V: net.streams[a].model.flash(
                {"P": P, "h": dv.h_for_energy(e, spec.model.species.M, V, spec.z)}, field=d.where))
        else:
            return False
        net.set_point(b, point)
        progress = True
    if d.name not in net.isentropic:
        if forward is None:  # the outlet from its state or the power: the efficiency it implies
            forward = dv.machine(inlet, P, b, compresses=compresses, point=net.points[b], field=d.where)
            net.eta[d.name] = forward.eta_isentropic
        net.isentropic[d.name] = forward.isentropic
        progress = True
    if net.W[d.name] is None and a in net.rates and b in net.rates:  # the energy carried: h, speed, height
        net.W[d.name] = net.rates[a] * (net.flow(b).e - net.flow(a).e)
        progress = True
    if d.W_dot is not None:
        progress |= _duty(net, d, a, b, d.W_dot, "the power W")
    return progress


def _nozzle(net: Network, d: DeviceSpec) -> bool:
    a, b = d.inlets[0], d.outlets[0]
    if not net.known(a) or net.known(b):
        return False
    P = net.P_of(b, d, a)
    if P is None or net.eta[d.name] is None:
        return False
    spec = net.streams[b]
    if spec.velocity or spec.area is not None:
        raise SpecificationError(f"{d.kind} {d.name}: the outlet speed of '{b}' follows from its energy balance; "
                                 "leave out its velocity and area")
    inlet = net.inlet(a)
    if inlet is None:
        return False
    out = dv.nozzle(inlet, P, b, eta=net.eta[d.name], field=d.where)
    net.set_point(b, out.point)
    net.speeds[b] = out.velocity
    net.note(f"{d.kind} {d.name}: outlet speed {out.velocity:.4g} m/s")
    return True


def _mixer(net: Network, d: DeviceSpec) -> bool:
    b = d.outlets[0]
    if net.known(b) or not all(net.known(s) for s in d.inlets) or not all(s in net.rates for s in d.inlets):
        if net.known(b) and all(net.known(s) for s in d.inlets):
            return _rate_from_energy(net, d)
        return False
    P = net.streams[b].given.get("P")
    if P is None:
        P = min(net.points[s].P for s in d.inlets)
        net.note(f"mixer {d.name}: the outlet at the lowest inlet pressure, {P / 1e5:.6g} bar")
    model = None
    if d.name in net.blends:
        model = _blend(net, d)
    out = dv.mix([net.flow(s) for s in d.inlets], P, b, net.streams[b].velocity, net.streams[b].z, d.where, model)
    net.set_point(b, out.point)
    return True


def _blend(net: Network, d: DeviceSpec):
    """A mixer of different fluids: the outlet's model is the blend of its inlets at their rates,
    and every stream the blend reaches takes it (each was a stand-in until now)."""
    from dataclasses import replace

    model = net.blend_model([net.streams[s].model for s in d.inlets], [net.rates[s] for s in d.inlets], d.where)
    for s in net.blends[d.name]:
        net.streams[s] = replace(net.streams[s], model=model)
    words = ", ".join(f"{i} {y:.6g}" for i, y in model.species.composition)
    net.note(f"mixer {d.name}: blends {', '.join(repr(s) for s in d.inlets)} into {words} (mole fractions)")
    return model


def _rate_from_energy(net: Network, d: DeviceSpec) -> bool:
    """Every state known and one rate not: the (adiabatic) energy balance gives it, linearly."""
    streams = [*d.inlets, *d.outlets]
    unknown = [s for s in streams if s not in net.rates]
    if len(unknown) != 2 or d.kind != "mixer":
        return False
    # two unknown rates, one the outlet's: mass n_out = Σ n_in, energy n_out e_out = Σ n_in e_in
    out = d.outlets[0]
    if out not in unknown:
        return False
    x = next(s for s in unknown if s != out)
    e = {s: _e(net, s) for s in streams}
    known_in = [s for s in d.inlets if s != x]
    n_known = sum(net.rates[s] for s in known_in)
    E_known = sum(net.rates[s] * e[s] for s in known_in)
    # n_x e_x + E_known = (n_x + n_known) e_out
    denom = e[x] - e[out]
    if denom == 0:
        raise SolveError(f"{d.where}: the inlet '{x}' carries the outlet's own energy: its rate is not fixed")
    n_x = (n_known * e[out] - E_known) / denom
    if not n_x > 0:
        raise SolveError(f"{d.where}: no positive rate of '{x}' gives the outlet state (it would be {n_x:.6g} mol/s)")
    net.rates[x] = n_x
    net.rates[out] = n_x + n_known
    return True


def _e(net: Network, name: str) -> float:
    """The energy a stream carries per mole [J/mol], at its speed (its own, a device's, or through its
    flow area once its rate is known)."""
    if name in net.rates:
        return net.flow(name).e
    spec = net.streams[name]
    if spec.area is not None:
        raise SpecificationError(f"stream '{name}': its rate is to be found, so its speed cannot follow from its "
                                 "flow area; give its velocity instead")
    V = net.speeds.get(name, spec.velocity)
    return net.points[name].h + spec.model.species.M * (0.5 * V * V + G * spec.z)


def _splitter(net: Network, d: DeviceSpec) -> bool:
    """Every outlet in the inlet's state and, unless it is given its own speed or area, at the inlet's speed
    (so the energy per mole is the inlet's)."""
    a = d.inlets[0]
    if not net.known(a):
        return False
    inlet = net.inlet(a)
    if inlet is None:
        return False
    speed = inlet.velocity
    progress = False
    for b in d.outlets:
        if not net.known(b):
            net.set_point(b, net.points[a])
            if not net.streams[b].velocity and net.streams[b].area is None:
                net.speeds[b] = speed
            progress = True
    return progress


def _separator(net: Network, d: DeviceSpec) -> bool:
    a = d.inlets[0]
    liquid, vapour = d.outlets
    if not net.known(a) or a not in net.rates or (net.known(liquid) and net.known(vapour)):
        return False
    P = net.streams[liquid].given.get("P", net.streams[vapour].given.get("P"))
    lq, vp = dv.separate(net.flow(a), (liquid, vapour), P, d.where)
    net.set_point(liquid, lq.point)  # what is given of either outlet must hold
    net.set_point(vapour, vp.point)
    net.rates[liquid], net.rates[vapour] = lq.n_dot, vp.n_dot
    return True


def _exchanger(net: Network, d: DeviceSpec) -> bool:
    hot_in, cold_in = d.inlets
    hot_out, cold_out = d.outlets
    if not (net.known(hot_in) and net.known(cold_in)):
        return False
    P_hot = net.P_of(hot_out, d, hot_in, 0)
    P_cold = net.P_of(cold_out, d, cold_in, 1)
    P_hot = net.points[hot_in].P if P_hot is None else P_hot
    P_cold = net.points[cold_in].P if P_cold is None else P_cold
    progress = False
    for a, b, P in ((hot_in, hot_out, P_hot), (cold_in, cold_out, P_cold)):
        second = net.second(b)
        if not net.known(b) and second:
            net.set_point(b, net.streams[b].model.flash({"P": P, **second}, field=f"stream '{b}'"))
            progress = True
    sides = ((hot_in, hot_out, P_hot, -1.0), (cold_in, cold_out, P_cold, 1.0))
    for (a, b, P, sign), (c, c_out, _, _) in ((sides[0], sides[1]), (sides[1], sides[0])):
        # one side known end to end with its rate: the duty; the other side's outlet follows
        if net.known(b) or not net.known(c_out) or a not in net.rates or c not in net.rates:
            continue
        duty = net.rates[c] * abs(_e(net, c_out) - _e(net, c))
        h = net.points[a].h + sign * duty / net.rates[a]
        net.set_point(b, net.streams[b].model.flash({"P": P, "h": h}, field=d.where))
        progress = True
    if net.known(hot_out) and net.known(cold_out):  # both ends known: one unknown rate follows
        for (a, b), (c, c_out) in (((hot_in, hot_out), (cold_in, cold_out)), ((cold_in, cold_out), (hot_in, hot_out))):
            if a not in net.rates and c in net.rates:
                dh = abs(_e(net, b) - _e(net, a))
                if dh == 0:
                    raise SolveError(f"{d.where}: a side that neither heats nor cools cannot fix its rate")
                net.rates[a] = net.rates[c] * abs(_e(net, c_out) - _e(net, c)) / dh
                net.rates[b] = net.rates[a]
                progress = True
    return progress


RULES = {
    "valve": _valve, "heater": _exchange, "cooler": _exchange, "compressor": _machine, "pump": _machine,
    "turbine": _machine, "expander": _machine, "nozzle": _nozzle, "diffuser": _nozzle, "mixer": _mixer,
    "splitter": _splitter, "exchanger": _exchanger, "separator": _separator,
}
#: Inlets and outlets of each kind (0: two or more).
ARITY = {"valve": (1, 1), "heater": (1, 1), "cooler": (1, 1), "compressor": (1, 1), "pump": (1, 1),
         "turbine": (1, 1), "expander": (1, 1), "nozzle": (1, 1), "diffuser": (1, 1), "mixer": (0, 1),
         "splitter": (1, 0), "exchanger": (2, 2), "separator": (1, 2)}


# -- what is missing, in words -------------------------------------------------------------
def _wants_one_in_one_out(net: Network, d: DeviceSpec) -> str:
    a, b = d.inlets[0], d.outlets[0]
    if not net.known(a):
        return f"its inlet '{a}' is not known: give two of its properties" if not _fed(net, a) else ""
    if net.known(b):
        if d.kind in ("heater", "cooler") and net.Q[d.name] is None and not (a in net.rates and b in net.rates):
            return "give a rate of its stream"
        return ""
    options = []
    heated = d.kind in ("heater", "cooler")
    if heated and net.Q[d.name] is not None and a not in net.rates:
        return "give a rate of its stream (the heat Q is given as a rate: the outlet follows once the rate is known)"
    if d.kind in ("compressor", "pump", "turbine", "expander") and net.W[d.name] is not None \
            and net.eta[d.name] is None and a not in net.rates:
        return "give a rate of its stream (the power W is given: the outlet follows once the rate is known)"
    if net.P_of(b, d, a) is None and not (heated and not d.dP):  # a heater without a drop keeps its inlet's P
        options.append(f"the outlet pressure (P of '{b}')" + (", or its pressure drop" if d.kind in ("heater", "cooler") else ""))
        return "give " + " ".join(options)
    if d.kind == "valve":
        return ""
    if d.kind in ("heater", "cooler"):
        return f"give one of the heat Q, or a second property of '{b}' (T, h, x ...)"
    if d.kind in ("nozzle", "diffuser"):
        return "give its efficiency eta (1 for an isentropic one)"
    return f"give one of the efficiency eta, the power W, a second property of '{b}' (T, h ...)"


def _fed(net: Network, name: str) -> bool:
    """Whether some device upstream puts out this stream (its state may yet follow)."""
    return any(name in d.outlets for d in net.devices)


def _wants_mixer(net: Network, d: DeviceSpec) -> str:
    if net.known(d.outlets[0]) and all(s in net.rates for s in (*d.inlets, *d.outlets)):
        return ""
    gaps = [s for s in d.inlets if not net.known(s) and not _fed(net, s)]
    if gaps:
        return f"give two properties of its inlet{'s' if len(gaps) > 1 else ''} {', '.join(gaps)}"
    rates = [s for s in (*d.inlets, *d.outlets) if s not in net.rates]
    if rates and not net.known(d.outlets[0]):
        return f"give the rates of {', '.join(rates)}, or the outlet's state (then one rate follows)"
    return ""


def _wants_splitter(net: Network, d: DeviceSpec) -> str:
    if all(s in net.rates for s in (*d.inlets, *d.outlets)):
        return ""
    if d.fractions:
        return "give the rate of its inlet or of one of its outlets"
    return "give its fractions, or the rates of all outlets but one"


def _wants_exchanger(net: Network, d: DeviceSpec) -> str:
    if all(net.known(s) for s in (*d.inlets, *d.outlets)) and all(s in net.rates for s in (*d.inlets, *d.outlets)):
        return ""
    gaps = [s for s in d.inlets if not net.known(s) and not _fed(net, s)]
    if gaps:
        return f"give two properties of {', '.join(gaps)}"
    return "give one outlet's second property (T ...) and both rates, or both outlets' and one rate"


def _wants_separator(net: Network, d: DeviceSpec) -> str:
    a = d.inlets[0]
    if net.known(d.outlets[0]) and net.known(d.outlets[1]):
        return ""
    if not net.known(a) and not _fed(net, a):
        return f"give two properties of its inlet '{a}'"
    if a not in net.rates:
        return f"give the rate of '{a}'"
    return ""


WANTS = {k: _wants_one_in_one_out for k in RULES}
WANTS.update(mixer=_wants_mixer, splitter=_wants_splitter, exchanger=_wants_exchanger, separator=_wants_separator)


__all__ = ["ARITY", "DeviceSpec", "Network", "RULES", "Solved", "StreamSpec"]
