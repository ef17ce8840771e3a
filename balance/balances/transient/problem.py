"""From a transient worksheet as typed to vessels, lines and an end condition in SI numbers.

``prepare(worksheet)`` reads every vessel (its volume, its state at the
start or evacuated, how its gas exchanges heat), every line (where the gas
comes from and goes to, the supply's state, the back pressure, the
restriction or a given rate), what ends the transient and the integrator's
settings, and says in words what is asked (``Problem.dof``): the end state
from the uniform-state balance, and the history in time where every line has
a restriction or a rate to integrate through.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

from ...errors import InputError
from ...state import fluid_pair, read_specs
from ...units import parse, read_rate
from ...worksheet import FieldProblem, Worksheet, place
from ..control_volume import Dof, read_atmosphere, read_volume

#: The ends of a line that are not vessels.
SUPPLY, OUTSIDE = "supply", "outside"
#: The integrators a worksheet may choose (scipy.integrate.solve_ivp's methods).
METHODS = ("LSODA", "RK45", "DOP853", "Radau", "BDF")
#: A history is balanced (the flow has stopped) when the pressures across its line are within
#: this fraction of the higher one.
BALANCED = 1e-4


@dataclass(frozen=True)
class Settings:
    """The integrator's settings, as the record keeps them."""

    method: str = "LSODA"
    rtol: float = 1e-8
    points: int = 500
    """rows of the history (evenly spaced in time)"""
    t_max: float = 86400.0
    """the longest time integrated [s]"""

    def words(self) -> str:
        return (f"scipy.integrate.solve_ivp, method {self.method}, rtol {self.rtol:g}, "
                f"{self.points} rows, at most {self.t_max:g} s")


@dataclass(frozen=True)
class VesselSpec:
    """A vessel in SI: its volume, its gas at the start, and how the gas exchanges heat."""

    name: str
    V: float
    """[m3]"""
    n0: float
    """amount at the start [mol] (0: evacuated)"""
    T0: float
    """temperature at the start [K] (an evacuated vessel: its wall's, or the first gas's)"""
    heat: str
    """'adiabatic', 'isothermal', 'given' or 'wall'"""
    Q_points: tuple[tuple[float, float], ...] = ()
    """a given heat rate to the gas: (t [s], Q̇ [W]) points, linear between, constant beyond"""
    wall: object = None
    """a :class:`~.wall.Wall` (heat = 'wall')"""
    empty: bool = False

    def Q_rate(self, t: float) -> float:
        """The given heat rate to the gas at t [W]."""
        pts = self.Q_points
        if not pts:
            return 0.0
        if t <= pts[0][0]:
            return pts[0][1]
        for (t1, q1), (t2, q2) in zip(pts, pts[1:]):
            if t <= t2:
                return q1 + (q2 - q1) * (t - t1) / (t2 - t1)
        return pts[-1][1]


@dataclass(frozen=True)
class LineSpec:
    """A line in SI: its ends, the supply's state or the back pressure, and what restricts it."""

    name: str
    source: str
    """SUPPLY or a vessel's name"""
    target: str
    """a vessel's name or OUTSIDE"""
    supply: tuple[float, float] | None = None
    """(T [K], P [Pa]) of the supply"""
    back: float | None = None
    """the pressure outside [Pa] (target OUTSIDE)"""
    back_words: str = ""
    restriction: object = None
    """a :class:`~.nozzle.Restriction`, or None"""
    rate: float | None = None
    """a given mass rate [kg/s], or None"""

    @property
    def timed(self) -> bool:
        """Whether the line's flow is known in time (a restriction or a rate)."""
        return self.restriction is not None or self.rate is not None


@dataclass(frozen=True)
class EndSpec:
    """What ends the transient."""

    kind: str
    """'P', 'm', 't' or 'balanced'"""
    value: float | None
    """[Pa], [kg] or [s]; None when balanced"""
    vessel: str
    text: str = ""

    def words(self) -> str:
        if self.kind == "balanced":
            return f"until the flow stops (the pressures across the line within {BALANCED:g} of each other)"
        what = {"P": "the pressure in", "m": "the mass in", "t": "the time"}[self.kind]
        return f"until {what}{'' if self.kind == 't' else f' {self.vessel!r}'} reaches {self.text}"


@dataclass
class Problem:
    """A transient problem, every value in SI."""

    worksheet: Worksheet
    model: object
    vessels: list[VesselSpec]
    lines: list[LineSpec]
    end: EndSpec
    settings: Settings
    p_atm: float

    @property
    def M(self) -> float:
        return self.model.species.M

    def vessel(self, name: str) -> VesselSpec:
        return next(v for v in self.vessels if v.name == name)

    def vessel_names(self) -> set[str]:
        return {v.name for v in self.vessels}

    @property
    def timed(self) -> bool:
        """Whether a history can be integrated: every line has a restriction or a rate."""
        return all(line.timed for line in self.lines)

    @cached_property
    def dof(self) -> Dof:
        """What is asked, in words: every vessel starts known, the lines and the end condition
        fix the rest; the end state needs no time, the history needs every line's flow."""
        plural = lambda n, w: f"{n} {w}{'' if n == 1 else 's'}"  # noqa: E731
        levels = "the end state (uniform-state balance)"
        if self.timed:
            levels += " and the history in time"
        return Dof((), (), (), f"{plural(len(self.vessels), 'vessel')}, {plural(len(self.lines), 'line')}, "
                               f"{self.end.words()}: {levels}; ready to solve")


# -- reading ----------------------------------------------------------------------------------
def _optional(text: str, dimension: str, field: str, *, positive: bool = False) -> float | None:
    if not text.strip():
        return None
    value = parse(text, dimension, field)
    if (positive and not value > 0) or value < 0:
        raise InputError(field, f"must be {'positive' if positive else 'zero or more'}; got {text!r}")
    return value


def _required(values: dict, key: str, dimension: str, where: str, why: str, *, positive: bool = True) -> float:
    text = values.get(key, "")
    if not text.strip():
        raise InputError(f"{where}.{key}", why)
    return _optional(text, dimension, f"{where}.{key}", positive=positive)


def _heat_points(v, where: str) -> tuple[tuple[float, float], ...]:
    """A given heat rate: one Q (constant), or 'time: rate' points in rising time."""
    if v.Q_points:
        points = []
        for i, text in enumerate(v.Q_points):
            field = f"{where}.Q[{i + 1}]"
            t_text, sep, q_text = text.partition(":")
            if not sep:
                raise InputError(field, f"write each point as 'time: heat rate', like '5 min: 2 kW'; got {text!r}")
            t = parse(t_text.strip(), "time", field)
            q = parse(q_text.strip(), "power", field)
            if t < 0 or (points and t <= points[-1][0]):
                raise InputError(field, "the times must start at zero or later and rise from point to point")
            points.append((t, q))
        return tuple(points)
    text = v.values.get("Q", "")
    if not text.strip():
        raise InputError(f"{where}.Q", "give the heat rate to the gas (heat = 'given'), like '2 kW', or "
                                       "points in time, like ['0 s: 2 kW', '10 min: 0 kW']")
    return ((0.0, parse(text, "power", f"{where}.Q")),)


def _wall(v, T0: float, where: str, model):
    from .wall import Wall

    values = v.values
    mass = _required(values, "wall_mass", "mass", where, "give the wall's mass, like '850 kg'")
    cp = _required(values, "wall_cp", "specific_entropy", where,
                   "give the wall's specific heat, like '480 J/(kg K)' (carbon steel, about)")
    area = _required(values, "wall_area", "area", where, "give the wall's inside area, like '6.2 m2'")
    h_text = values.get("h_inside", "").strip()
    natural = h_text in ("", "natural")
    h_in = None if natural else _optional(h_text, "heat_transfer_coefficient", f"{where}.h_inside", positive=True)
    height = _optional(values.get("height", ""), "length", f"{where}.height", positive=True)
    if natural and height is None:
        raise InputError(f"{where}.height", "natural convection inside needs the vessel's height (the "
                                            "correlation's length), like '2.4 m'; or give h_inside as a number")
    if natural and not model.species.coolprop:
        raise InputError(f"{where}.h_inside", f"natural convection needs the gas's viscosity and conductivity, "
                                              f"which this program takes from CoolProp; {model.species.name} has "
                                              "none there: give h_inside as a number")
    h_out = _optional(values.get("h_outside", ""), "heat_transfer_coefficient", f"{where}.h_outside") or 0.0
    T_amb_text = values.get("T_ambient", "")
    T_amb = parse(T_amb_text, "temperature", f"{where}.T_ambient") if T_amb_text.strip() else T0
    fire = _optional(values.get("fire_flux", ""), "heat_flux", f"{where}.fire_flux") or 0.0
    return Wall(mass=mass, cp=cp, area=area, h_inside=h_in, height=height or 0.0, h_outside=h_out,
                T_ambient=T_amb, fire_flux=fire)


def _vessel(v, model, p_atm: float, supply_T: float | None) -> VesselSpec:
    where = f"vessel '{v.name}'"
    if not v.V.strip():
        raise InputError(f"{where}.V", "give the vessel's volume, like '2.5 m3'")
    V = read_volume(v.V, f"{where}.V")
    M = model.species.M
    if v.empty:
        extra = sorted(set(v.props) - {"T"})
        if extra:
            raise InputError(f"{where}.{extra[0]}", "an evacuated vessel has no gas to have a state; give only "
                                                    "its temperature T (of the wall), or untick 'empty'")
        T_text = v.props.get("T", "")
        T0 = parse(T_text, "temperature", f"{where}.T") if T_text.strip() else supply_T
        if T0 is None:
            raise InputError(f"{where}.T", "give the evacuated vessel's temperature (its wall's)")
        n0 = 0.0
    else:
        specs = read_specs(v.props, M, where, p_atm)
        if len(specs) != 2:
            listed = ", ".join(v.props) or "none"
            raise InputError(where, f"give its state at the start by two of T, P, v, rho (got {listed}), or tick "
                                    "'empty' for an evacuated vessel")
        point = model.flash(specs, field=where)
        if point.phase in ("two-phase", "liquid"):
            raise InputError(where, f"starts as {point.phase} ({point.T:.2f} K, {point.P / 1e5:.4g} bar): a "
                                    "vessel's history here is of a gas; a liquid or wet vessel is not modelled")
        n0, T0 = V / point.v, point.T
    heat = v.heat
    points = _heat_points(v, where) if heat == "given" else ()
    wall = _wall(v, T0, where, model) if heat == "wall" else None
    stray = [k for k in v.values if (k == "Q" and heat != "given") or (k != "Q" and heat != "wall")]
    if v.Q_points and heat != "given":
        stray.append("Q")
    if stray:
        raise InputError(f"{where}.{stray[0]}", f"is not used with heat = {heat!r}; "
                                                f"{'Q is for heat = given' if stray[0] == 'Q' else 'the wall keys are for heat = wall'}")
    return VesselSpec(v.name, V, n0, T0, heat, points, wall, v.empty)


def _line(line, names: set[str], model, p_atm: float) -> LineSpec:
    where = f"line '{line.name}'"
    ends = f"a vessel's name ({', '.join(sorted(names))})"
    if line.source != SUPPLY and line.source not in names:
        raise InputError(f"{where}.from", f"expected 'supply' or {ends}; got {line.source!r}")
    if line.target != OUTSIDE and line.target not in names:
        raise InputError(f"{where}.to", f"expected 'outside' or {ends}; got {line.target!r}")
    if line.source == SUPPLY and line.target == OUTSIDE:
        raise InputError(f"{where}.to", "a line from the supply goes into a vessel")
    if line.source == line.target:
        raise InputError(f"{where}.to", "a line joins two different ends")
    v = line.values
    supply = None
    if line.source == SUPPLY:
        for key in ("T", "P"):
            if not line.props.get(key, "").strip():
                raise InputError(f"{where}.{key}", f"give the supply's {'temperature' if key == 'T' else 'pressure'}")
        T = parse(line.props["T"], "temperature", f"{where}.T")
        P = parse(line.props["P"], "pressure", f"{where}.P", p_atm=p_atm)
        point = model.flash({"T": T, "P": P}, field=where)
        if point.phase in ("two-phase", "liquid"):
            raise InputError(where, f"the supply is {point.phase} at {T:.2f} K and {P / 1e5:.4g} bar: a vessel "
                                    "is filled here with a gas")
        supply = (T, P)
    elif line.props:
        key = next(iter(line.props))
        raise InputError(f"{where}.{key}", "only a supply has a state of its own; a vessel's gas leaves at its "
                                           "own state")
    back, back_words = None, ""
    if line.target == OUTSIDE:
        text = v.get("back", "").strip() or "atmosphere"
        if text == "atmosphere":
            back, back_words = p_atm, "the atmosphere"
        else:
            back, back_words = parse(text, "pressure", f"{where}.back", p_atm=p_atm), text
    elif v.get("back", "").strip():
        raise InputError(f"{where}.back", "a back pressure is for a line to the outside; into a vessel the "
                                          "vessel's own pressure is the back pressure")
    given = [k for k in ("orifice", "Cv", "Kv", "rate") if v.get(k, "").strip()]
    if len(given) > 1:
        raise InputError(f"{where}.{given[1]}", f"give one of an orifice, Cv, Kv or a rate; got {' and '.join(given)}")
    restriction = rate = None
    if given and given[0] != "rate":
        from . import nozzle
    if "orifice" in given:
        d = _optional(v["orifice"], "length", f"{where}.orifice", positive=True)
        if not v.get("Cd", "").strip():
            raise InputError(f"{where}.Cd", "give the orifice's discharge coefficient, like 0.62 (a "
                                            "sharp-edged orifice, about) or 0.97 (a rounded nozzle)")
        Cd = parse(v["Cd"], "dimensionless", f"{where}.Cd")
        if not 0.0 < Cd <= 1.0:
            raise InputError(f"{where}.Cd", f"must be above 0 and at most 1; got {v['Cd']!r}")
        restriction = nozzle.orifice(d, Cd)
    elif v.get("Cd", "").strip():
        raise InputError(f"{where}.Cd", "a discharge coefficient is an orifice's; give the orifice's diameter")
    for key in ("Cv", "Kv"):
        if key in given:
            value = parse(v[key], "dimensionless", f"{where}.{key}")
            if not value > 0:
                raise InputError(f"{where}.{key}", f"must be a positive flow coefficient; got {v[key]!r}")
            restriction = nozzle.valve(**{key: value})
    if "rate" in given:
        rate = read_rate(v["rate"], model.species.M, f"{where}.rate")[0] * model.species.M
    return LineSpec(line.name, line.source, line.target, supply, back, back_words, restriction, rate)


def _end(ws: Worksheet, names: list[str], p_atm: float) -> EndSpec:
    e = ws.end
    given = [k for k, t in e.values.items() if t.strip()] + (["balanced"] if e.balanced else [])
    if not given:
        raise InputError("end", "say what ends it: a pressure P, a mass m, a time t, or balanced = true "
                                "(until the flow stops)")
    if len(given) > 1:
        raise InputError(f"end.{given[1]}", f"give one end condition; got {' and '.join(given)}")
    vessel = e.vessel or names[0]
    if vessel not in names:
        raise InputError("end.vessel", f"expected a vessel's name ({', '.join(names)}); got {e.vessel!r}")
    kind = given[0]
    if kind == "balanced":
        return EndSpec("balanced", None, vessel)
    text = e.values[kind]
    dimension = {"P": "pressure", "m": "mass", "t": "time"}[kind]
    value = parse(text, dimension, f"end.{kind}", p_atm=p_atm) if kind == "P" else parse(text, dimension, f"end.{kind}")
    if not value >= 0 or (kind == "t" and not value > 0):
        raise InputError(f"end.{kind}", f"must be positive; got {text!r}")
    return EndSpec(kind, value, vessel, text)


def _settings(ws: Worksheet) -> Settings:
    h = ws.history
    method = h.get("method", "").strip() or "LSODA"
    if method not in METHODS:
        raise InputError("history.method", f"expected one of {', '.join(METHODS)}; got {method!r}")
    rtol = parse(h["rtol"], "dimensionless", "history.rtol") if h.get("rtol", "").strip() else 1e-8
    if not 1e-13 <= rtol <= 1e-3:
        raise InputError("history.rtol", f"expected a relative tolerance from 1e-13 to 1e-3; got {h['rtol']!r}")
    points = parse(h["points"], "dimensionless", "history.points") if h.get("points", "").strip() else 500
    if points != int(points) or not 10 <= points <= 100_000:
        raise InputError("history.points", f"expected a whole number of rows from 10 to 100000; got {h['points']!r}")
    t_max = parse(h["t_max"], "time", "history.t_max") if h.get("t_max", "").strip() else 86400.0
    if not 0 < t_max <= 365 * 86400.0:
        raise InputError("history.t_max", f"expected a time above zero and at most a year; got {h['t_max']!r}")
    return Settings(method, rtol, int(points), t_max)


def prepare(ws: Worksheet) -> Problem:
    """Read a transient worksheet into a Problem; raises InputError naming the field."""
    p_atm = read_atmosphere(ws.heading.atmosphere)
    if not ws.fluid.species or not ws.fluid.model:
        raise InputError("fluid.species" if not ws.fluid.species else "fluid.model",
                         "give the species and the model of the vessel's gas")
    _, model = fluid_pair(ws.fluid)
    from .gas import tv_function

    tv_function(model)  # refuses a model with no gas
    if not ws.vessels:
        raise InputError("vessel", "give the vessel: a name, its volume and its state at the start (or empty)")
    if len(ws.vessels) > 2:
        raise InputError("vessel", "one vessel, or two equalising through a line, are balanced here")
    names = [v.name for v in ws.vessels]
    twice = sorted({n for n in names if names.count(n) > 1})
    if twice:
        raise InputError("vessel", f"two vessels are named {twice[0]!r}: give each its own name")
    if not ws.lines:
        raise InputError("line", "give the line the gas moves through: from 'supply' or a vessel, to a vessel "
                                 "or 'outside'")
    lines = [_line(line, set(names), model, p_atm) for line in ws.lines]
    supply_T = next((line.supply[0] for line in lines if line.supply), None)
    vessels = [_vessel(v, model, p_atm, supply_T) for v in ws.vessels]
    end = _end(ws, names, p_atm)
    problem = Problem(ws, model, vessels, lines, end, _settings(ws), p_atm)
    _check_whole(problem)
    return problem


def _check_whole(p: Problem) -> None:
    """What no single field says: every vessel joined, something to move, an end in reach."""
    for v in p.vessels:
        if not any(v.name in (line.source, line.target) for line in p.lines):
            raise InputError(f"vessel '{v.name}'", "no line joins it: give a line from or to it")
        if v.empty and not any(line.target == v.name for line in p.lines):
            raise InputError(f"vessel '{v.name}'.empty", "an evacuated vessel with no line into it has nothing to "
                                                         "move: give a line filling it")
    if p.end.kind == "t" and not p.timed:
        untimed = next(line for line in p.lines if not line.timed)
        raise InputError(f"line '{untimed.name}'", "a time needs every line's flow in time: give it an orifice, "
                                                   "a valve's Cv or Kv, or a rate")
    if len(p.vessels) == 2 and not any(line.source in p.vessel_names() and line.target in p.vessel_names()
                                       for line in p.lines):
        raise InputError("line", "two vessels are balanced here when a line joins them (equalisation)")
    if p.end.kind in ("P", "m"):
        _check_reach(p)


def _check_reach(p: Problem) -> None:
    """An end pressure or mass the watched vessel can reach: between where it starts and where its
    lines would take it (a supply's pressure, the back pressure, the other vessel's)."""
    v = p.vessel(p.end.vessel)
    start = _start_pressure(p, v)
    toward = []
    for line in p.lines:
        if line.target == v.name:
            toward.append(line.supply[1] if line.supply else _start_pressure(p, p.vessel(line.source)))
        elif line.source == v.name:
            toward.append(line.back if line.target == OUTSIDE else _start_pressure(p, p.vessel(line.target)))
    unit = lambda P: f"{P / 1e5:.6g} bar(a)"  # noqa: E731
    if p.end.kind == "P":
        P = p.end.value
        if math.isclose(P, start, rel_tol=1e-9):
            raise InputError("end.P", f"is the pressure {v.name!r} starts at: nothing would move")
        lo, hi = min(start, *toward), max(start, *toward)
        if not lo < P < hi:
            raise InputError("end.P", f"{v.name!r} starts at {unit(start)} and its lines take it toward "
                                      f"{' and '.join(unit(x) for x in toward)}: an end pressure between "
                                      f"{unit(lo)} and {unit(hi)} can be reached; got {p.end.text!r}")
    else:
        m0 = v.n0 * p.M
        fills = any(line.target == v.name for line in p.lines)
        empties = any(line.source == v.name for line in p.lines)
        if math.isclose(p.end.value, m0, rel_tol=1e-9, abs_tol=1e-12):
            raise InputError("end.m", f"is the mass {v.name!r} starts with ({m0:.6g} kg): nothing would move")
        if (p.end.value > m0 and not fills) or (p.end.value < m0 and not empties):
            raise InputError("end.m", f"{v.name!r} starts with {m0:.6g} kg and its lines only "
                                      f"{'empty' if empties else 'fill'} it; got {p.end.text!r}")


def _start_pressure(p: Problem, v: VesselSpec) -> float:
    return p.model.at_Tv(v.T0, v.V / v.n0).P if v.n0 > 0 else 0.0


def problems(ws: Worksheet) -> list[FieldProblem]:
    """Every field at fault (each vessel and line read on its own), then what stops the whole;
    empty exactly when :func:`prepare` succeeds."""
    found: list[InputError] = []
    model = None
    try:
        p_atm = read_atmosphere(ws.heading.atmosphere)
    except InputError as exc:
        found.append(exc)
        p_atm = None
    if ws.fluid.species and ws.fluid.model:
        try:
            model = fluid_pair(ws.fluid)[1]
        except InputError as exc:
            found.append(exc)
    if model is not None and p_atm is not None:
        names = {v.name for v in ws.vessels}
        supply_T = None
        for line in ws.lines:
            try:
                spec = _line(line, names, model, p_atm)
                supply_T = supply_T or (spec.supply[0] if spec.supply else None)
            except InputError as exc:
                found.append(exc)
        for v in ws.vessels:
            try:
                _vessel(v, model, p_atm, supply_T if supply_T is not None else 293.15)
            except InputError as exc:
                found.append(exc)
        for read in (lambda: _end(ws, [v.name for v in ws.vessels], p_atm) if ws.vessels else None,
                     lambda: _settings(ws)):
            try:
                read()
            except InputError as exc:
                found.append(exc)
    out = [place(ws, exc.field, exc.message) for exc in found]
    if not out:
        try:
            prepare(ws)
        except InputError as exc:
            out.append(place(ws, exc.field, exc.message))
    return out


__all__ = ["BALANCED", "METHODS", "OUTSIDE", "SUPPLY", "EndSpec", "LineSpec", "Problem", "Settings",
           "VesselSpec", "prepare", "problems"]
