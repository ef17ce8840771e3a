"""A solved steady-flow network: the streams, the devices, the equations with numbers, the cautions.

Each device carries its heat and work rates, its efficiency, its entropy
generation and the exergy it destroys, T0·Ṡ_gen (T0 stated), recomputed
from the flows; the network's Ṡ_gen is their sum. Warnings follow what an
engineer checks at each kind: a valve outlet below 0 °C or below the
low-temperature threshold, a machine's exit inside the dome, a pump's inlet
close to boiling. The cautions are those of every balance (pressure, low
temperature) and defer to the codes.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ...errors import InputError
from ...state import quantity
from ..cautions import DISCLAIMER, LOW_TEMPERATURE_K, Caution
from ..control_volume import factor, minus, number
from .network import Solved
from .problem import Problem
from .streams import Flow

#: A pump's inlet closer than this to its vapour pressure is warned about [Pa] (common practice
#: to want a margin of about a bar before looking at the pump's own NPSH; no source).
PUMP_MARGIN = 1e5
#: A mixture stream closer than this above its dew point is warned about [K] (common practice to
#: keep some ten kelvin of superheat on a fuel gas; no source).
DEW_MARGIN = 10.0


@dataclass(frozen=True)
class Device:
    """One device, solved."""

    name: str
    kind: str
    inlets: tuple[str, ...]
    outlets: tuple[str, ...]
    Q_dot: float
    """heat to the fluid [W]"""
    W_dot: float
    """work done on the fluid [W]"""
    eta: float | None
    """the efficiency given or found [-] (isentropic, polytropic or a nozzle's)"""
    S_gen_dot: float | None
    """[W/K]; None where heat crosses at no stated temperature"""
    exergy_destroyed: float | None
    """T0 Ṡ_gen [W]"""
    mass: float
    energy: float
    """its mass and energy balances recomputed from the flows, relative"""
    isentropic_T: float | None = None
    """the isentropic end state's temperature [K] (machines)"""
    approach: float | None = None
    """an exchanger's minimum temperature difference [K]"""


@dataclass(frozen=True)
class Result:
    """A solved steady-flow network, every value in SI."""

    problem: Problem
    flows: dict[str, Flow]
    devices: tuple[Device, ...]
    S_gen_dot: float | None
    basis: str
    equations: tuple[str, ...]
    warnings: tuple[str, ...]
    cautions: tuple[Caution, ...]
    edges: dict = field(default_factory=dict)
    """stream -> (bubble point, dew point) temperatures [K] at its pressure, each None where the
    search found none: for the streams of a mixture on a cubic or the reference model"""

    def as_json(self) -> dict:
        """Everything in the result; quantities as {"value", "unit"} (SI)."""
        p = self.problem
        streams = {}
        for name, f in self.flows.items():
            pt = f.point
            streams[name] = {
                "species": f.model.species.id, "model": f.model.name,
                **({"composition": dict(f.model.species.composition)} if f.model.species.composition else {}),
                **{k: quantity(getattr(pt, k), u) for k, u in (("T", "K"), ("P", "Pa"), ("v", "m**3/mol"),
                                                              ("h", "J/mol"), ("s", "J/(mol*K)"))},
                "x": quantity(pt.x, "dimensionless"), "phase": phase_words(pt),
                "m_dot": quantity(f.m_dot, "kg/s"), "n_dot": quantity(f.n_dot, "mol/s"),
                "V_dot": quantity(f.V_dot, "m**3/s"), "velocity": quantity(f.velocity, "m/s"),
                "rate_read_as": p.rate_words.get(name, ""),
                **({"bubble_point": quantity(self.edges[name][0], "K"), "dew_point": quantity(self.edges[name][1], "K")}
                   if name in self.edges else {}),
            }
        devices = {}
        for d in self.devices:
            devices[d.name] = {
                "kind": d.kind, "inlets": list(d.inlets), "outlets": list(d.outlets),
                "Q_dot": quantity(d.Q_dot, "W"),
                "W_dot": quantity(p.convention.shown("work", d.W_dot), "W"),
                "eta": quantity(d.eta, "dimensionless"), "S_gen_dot": quantity(d.S_gen_dot, "W/K"),
                "exergy_destroyed": quantity(d.exergy_destroyed, "W"),
                "isentropic_T": quantity(d.isentropic_T, "K"), "approach": quantity(d.approach, "K"),
                "residual_mass": d.mass, "residual_energy": d.energy,
            }
        return {
            "title": p.worksheet.heading.title, "kind": "steady-flow", "convention": p.convention.key,
            "basis": self.basis, "T0": quantity(p.T0, "K"),
            "streams": streams, "devices": devices, "S_gen_dot": quantity(self.S_gen_dot, "W/K"),
            "equations": list(self.equations), "warnings": list(self.warnings),
            "cautions": [c.text() for c in self.cautions],
        }


def phase_words(point) -> str:
    """A stream's phase in words: a saturated liquid or vapour (x = 0 or 1, a separator's
    outlets) is said to be one, not 'two-phase'."""
    if point.x == 0.0:
        return "saturated liquid"
    if point.x == 1.0:
        return "saturated vapour"
    return point.phase


def result_of(problem: Problem, solved: Solved) -> Result:
    """The Result of a solved network: devices' rows, the total entropy generation, words."""
    flows = solved.flows
    rows = []
    for spec in problem.devices:
        b = solved.balances[spec.name]
        S = b.S_gen_dot
        iso = solved.isentropic.get(spec.name)
        ap = solved.approach.get(spec.name)
        rows.append(Device(spec.name, spec.kind, spec.inlets, spec.outlets, solved.Q_dot[spec.name],
                           solved.W_dot[spec.name], solved.eta.get(spec.name), S,
                           None if S is None else problem.T0 * S, b.mass, b.energy,
                           None if iso is None else iso.T, None if ap is None else ap.minimum))
    total = None if any(d.S_gen_dot is None for d in rows) else sum(d.S_gen_dot for d in rows)
    warnings = list(solved.notes) + _warnings(problem, solved)
    for name, f in flows.items():
        warnings += [f"stream '{name}': {w}" for w in f.model.warnings(f.point)]
    edges = _edges(flows)
    for name, (_, dew) in edges.items():
        T = flows[name].point.T
        if dew is not None and T - dew < DEW_MARGIN:
            warnings.append(f"stream '{name}': {T - dew:.1f} K above its dew point ({dew - 273.15:.2f} degC at "
                            f"{flows[name].point.P / 1e5:.4g} bar) under {flows[name].model.label}; a cubic's dew "
                            "point of a natural gas can be several kelvin off its measured one: keep a margin, and "
                            "check the dew point against the gas's analysis")
    return Result(problem, flows, tuple(rows), total, solved.basis, tuple(explain(problem, solved, rows)),
                  tuple(warnings), tuple(_cautions(problem, flows)), edges)


def _edges(flows: dict[str, Flow]) -> dict[str, tuple[float | None, float | None]]:
    """The bubble and dew point temperatures [K] at each mixture stream's pressure, where its model
    gives them (a cubic's or the reference model's mixture: ``dew_bubble_T``)."""
    out = {}
    for name, f in flows.items():
        edges = getattr(f.model, "dew_bubble_T", None)
        if edges is not None:
            out[name] = edges(f.point.P)
    return out


def explain(problem: Problem, solved: Solved, rows: list[Device]) -> list[str]:
    """The equations of each device with their numbers (per mole and in kW)."""
    flows, out = solved.flows, []
    if solved.basis:
        out.append(f"Basis: {solved.basis}")
    for d, spec in zip(rows, problem.devices):
        ins = [flows[s] for s in d.inlets]
        outs = [flows[s] for s in d.outlets]
        head = f"{d.kind} {d.name}:"
        if d.kind == "valve":
            a, b = ins[0], outs[0]
            out.append(f"{head} adiabatic, no work: h_out = h_in = {a.point.h:.6g} J/mol; at P = "
                       f"{b.point.P / 1e5:.6g} bar: T = {b.point.T - 273.15:.6g} °C")
        elif d.kind in ("heater", "cooler"):
            a, b = ins[0], outs[0]
            out.append(f"{head} Q = ṅ (h_out - h_in) = {number(a.n_dot)} × ({number(b.point.h)}{minus(a.point.h)}) "
                       f"= {d.Q_dot / 1e3:.6g} kW")
        elif d.kind in ("compressor", "pump", "turbine", "expander"):
            a, b = ins[0], outs[0]
            iso = solved.isentropic.get(spec.name)
            h2s = iso.h if iso else math.nan
            if d.kind in ("compressor", "pump"):
                definition = (f"η_s = (h_2s - h_1)/(h_2 - h_1) = ({number(h2s)}{minus(a.point.h)})"
                              f"/({number(b.point.h)}{minus(a.point.h)})")
            else:
                definition = (f"η_s = (h_1 - h_2)/(h_1 - h_2s) = ({number(a.point.h)}{minus(b.point.h)})"
                              f"/({number(a.point.h)}{minus(h2s)})")
            eta_s = (h2s - a.point.h) / (b.point.h - a.point.h) if d.kind in ("compressor", "pump") else \
                (a.point.h - b.point.h) / (a.point.h - h2s)
            out.append(f"{head} h_2s = h(P2 = {b.point.P / 1e5:.6g} bar, s1 = {a.point.s:.6g} J/(mol K)) = "
                       f"{h2s:.6g} J/mol (T_2s = {iso.T - 273.15:.6g} °C); {definition} = {eta_s:.6g}"
                       + (" (the polytropic efficiency given: η_p = " + f"{spec.eta:.6g})" if spec.polytropic else ""))
            out.append(f"{head} W = ṅ (h_2 - h_1) = {number(a.n_dot)} × ({number(b.point.h)}{minus(a.point.h)}) "
                       f"= {d.W_dot / 1e3:.6g} kW (work done on the fluid)")
        elif d.kind in ("nozzle", "diffuser"):
            a, b = ins[0], outs[0]
            out.append(f"{head} V_out² = V_in² + 2 (h_in - h_out)/M: V_out = {b.velocity:.6g} m/s")
        elif d.kind == "mixer":
            terms = " + ".join(f"{number(f.n_dot)} × {factor(f.point.h)}" for f in ins)
            out.append(f"{head} ṅ_out h_out = Σ ṅ_in h_in: {number(outs[0].n_dot)} × {factor(outs[0].point.h)} = {terms}")
        elif d.kind == "splitter":
            out.append(f"{head} every outlet in the inlet's state; rates "
                       + ", ".join(f"{f.name} {f.n_dot:.6g} mol/s" for f in outs))
        elif d.kind == "exchanger":
            hot_in, cold_in = ins
            hot_out, cold_out = outs
            duty = hot_in.n_dot * (hot_in.point.h - hot_out.point.h)
            out.append(f"{head} Q = ṅ_hot (h_hot,in - h_hot,out) = {duty / 1e3:.6g} kW = ṅ_cold (h_cold,out - "
                       f"h_cold,in) = {cold_in.n_dot * (cold_out.point.h - cold_in.point.h) / 1e3:.6g} kW; "
                       f"minimum approach {d.approach:.4g} K")
        elif d.kind == "separator":
            out.append(f"{head} liquid {outs[0].n_dot:.6g} mol/s and vapour {outs[1].n_dot:.6g} mol/s at "
                       f"{outs[0].point.P / 1e5:.6g} bar (x = {outs[1].n_dot / ins[0].n_dot:.6g})")
        if d.S_gen_dot is not None:
            out.append(f"{head} Ṡ_gen = Σ ṅ_out s_out - Σ ṅ_in s_in - Q/T_b = {d.S_gen_dot:.6g} W/K; exergy "
                       f"destroyed T0 Ṡ_gen = {d.exergy_destroyed / 1e3:.6g} kW (T0 = {problem.T0 - 273.15:.4g} °C)")
        out.append(f"{head} balances recomputed from the flows: mass {d.mass:.1e}, energy {d.energy:.1e} (relative)")
    return out


def _warnings(problem: Problem, solved: Solved) -> list[str]:
    out = []
    flows = solved.flows
    for spec in problem.devices:
        outs = [flows[s] for s in spec.outlets]
        if spec.kind == "valve":
            b = outs[0]
            if b.point.T < LOW_TEMPERATURE_K:
                out.append(f"valve {spec.name}: the outlet is at {b.point.T - 273.15:.1f} °C, below "
                           f"{LOW_TEMPERATURE_K - 273.15:.0f} °C: see the low-temperature caution")
            elif b.point.T < 273.15 and b.point.x is None:  # a gas (a refrigerant flashing is meant to be cold)
                out.append(f"valve {spec.name}: the outlet is below 0 °C ({b.point.T - 273.15:.1f} °C): water the "
                           "gas carries can freeze or form hydrates; check its water dew point")
        if spec.kind in ("compressor", "turbine", "expander") and outs[0].point.x is not None:
            x = outs[0].point.x
            if x < 1.0:
                out.append(f"{spec.kind} {spec.name}: the exit is wet (x = {x:.4g}): liquid in a "
                           f"{'compressor damages it' if spec.kind == 'compressor' else 'turbine erodes its last stages'}")
        if spec.kind == "nozzle" and flows[spec.inlets[0]].point.x is None:
            out += _choked(spec.name, flows[spec.inlets[0]].point, outs[0].point)
        if spec.kind == "pump":
            a = flows[spec.inlets[0]]
            sat = _vapour_pressure(a)
            if sat is not None and a.point.P - sat < PUMP_MARGIN:
                out.append(f"pump {spec.name}: the inlet is {(a.point.P - sat) / 1e5:.3g} bar above its vapour "
                           f"pressure ({sat / 1e5:.4g} bar): check the pump's NPSH")
    return out


def _choked(name: str, inlet, outlet) -> list[str]:
    """A gas nozzle expanding past its critical pressure ratio (2/(k+1))^(k/(k-1)), k = cp/cv at
    the inlet (the ideal-gas estimate, common practice): a converging nozzle chokes there."""
    k = inlet.cp / inlet.cv if inlet.cv and math.isfinite(inlet.cp) else None
    if k is None or not k > 1.0:
        return []
    critical = (2.0 / (k + 1.0)) ** (k / (k - 1.0))
    if outlet.P >= critical * inlet.P:
        return []
    return [(f"nozzle {name}: the outlet pressure is {outlet.P / inlet.P:.3g} of the inlet's, below the critical "
             f"ratio (about {critical:.3g} for k = cp/cv = {k:.3g}): a converging nozzle chokes at about "
             f"{critical * inlet.P / 1e5:.4g} bar; the exit speed shown takes a converging-diverging nozzle")]


def _vapour_pressure(f: Flow) -> float | None:
    """The vapour pressure [Pa] at the stream's temperature, where its model has one."""
    model = f.model
    try:
        if model.two_phase:
            return model.flash({"T": f.point.T, "x": 0.0}).P
        sat = model.saturation(f.point.T) if hasattr(model, "saturation") else None
    except InputError:  # above the critical point, or outside the model's range: none
        return None
    return None if sat is None else sat[0]


def _cautions(problem: Problem, flows: dict[str, Flow]) -> list[Caution]:
    out = [DISCLAIMER]
    P_max = max(f.point.P for f in flows.values())
    if P_max > problem.p_atm + 0.5e5:
        out.append(Caution("pressure", "Pressures up to {} occur: confirm the design pressure of every device "
                                       "and pipe and the set pressure of each relief device.", (("P", P_max),)))
    coldest = min(flows.values(), key=lambda f: f.point.T)
    if coldest.point.T < LOW_TEMPERATURE_K:
        out.append(Caution(
            "low temperature",
            f"A temperature of {{}} occurs (stream '{coldest.name}'), below {{}}, the usual limit for carbon-steel "
            "equipment without impact testing (common practice): check the minimum design metal temperature of "
            "the pipe and devices it reaches before relying on this result. The limit depends on the material "
            "and on the code that governs the equipment: follow that code.",
            (("T", coldest.point.T), ("T limit", LOW_TEMPERATURE_K))))
    return out
