"""The diagrams: the process drawn as lines on the P-v and T-s planes (a closed system, :func:`trace`),
and a steady-flow network's devices on the T-s, h-s and P-h planes (:func:`flow_trace`).

Quasi-static paths are followed through the model: each point of a path is
a state the model computed. Processes without one (free expansion, a
ruptured membrane, a boundary work given as a number) join their end states
with a line marked as a jump. Where the model has a saturation curve (the
reference model, and the cubic equations, which compute their own) the
saturation dome is added.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from .errors import BalanceError


@dataclass(frozen=True)
class Curve:
    """Points of one line, molar SI: T [K], P [Pa], v [m3/mol], s [J/(mol K)]."""

    label: str
    T: tuple[float, ...]
    P: tuple[float, ...]
    v: tuple[float, ...]
    s: tuple[float, ...]
    style: str = "path"
    """'path', 'jump' (no quasi-static path: end states joined, dashed) or 'dome'"""


@dataclass(frozen=True)
class Trace:
    """What the P–v and T–s diagrams draw."""

    M: float
    """molar mass [kg/mol], to draw per unit mass"""
    states: tuple[tuple[str, float, float, float, float], ...]
    """(name, T, P, v, s) of every initial state and the final one"""
    curves: tuple[Curve, ...] = ()
    note: str = ""
    problems: tuple[str, ...] = field(default_factory=tuple)


N_PATH = 40


def trace(result) -> Trace:
    """The process drawn as a path between the initial and final states.

    Quasi-static paths are followed through the model: rigid (v fixed),
    isothermal, isobaric, polytropic (P vⁿ fixed) and reversible adiabatic
    (s fixed). Free expansion and membrane rupture have no such path; their
    end states are joined by a dashed jump.
    """
    import numpy as np

    p = result.problem
    model = p.model
    fin = result.final.point
    states = tuple((st.name, st.point.T, st.point.P, st.point.v, st.point.s) for st in result.initial)
    states += ((result.final.name, fin.T, fin.P, fin.v, fin.s),)
    curves: list[Curve] = []
    problems: list[str] = []
    note = ""
    first = result.initial[0].point
    heats = [t for t in result.terms if t.kind == "heat"]
    adiabatic = "adiabatic" in p.constraints or not heats

    def along(label, specs_of, grid):
        pts = []
        for g in grid:
            try:
                pts.append(model.flash(specs_of(g), field="path"))
            except BalanceError:
                continue
        if len(pts) >= 2:
            curves.append(Curve(label, tuple(q.T for q in pts), tuple(q.P for q in pts),
                                tuple(q.v for q in pts), tuple(q.s for q in pts)))
        else:
            problems.append(f"the {label} path could not be evaluated")

    if len(result.initial) > 1 or "free-expansion" in p.constraints or "membrane-rupture" in p.constraints:
        note = "no quasi-static path: the end states are joined by a dashed line"
        for st in result.initial:
            q = st.point
            curves.append(Curve(f"{st.name} → {result.final.name}", (q.T, fin.T), (q.P, fin.P),
                                (q.v, fin.v), (q.s, fin.s), style="jump"))
    elif p.path == "rigid":
        along("rigid (v fixed)", lambda T: {"T": float(T), "v": first.v}, np.linspace(first.T, fin.T, N_PATH))
    elif p.path == "isothermal":
        along("isothermal", lambda v: {"T": first.T, "v": float(v)}, np.geomspace(first.v, fin.v, N_PATH))
    elif p.path == "isobaric":
        along("isobaric", lambda v: {"P": first.P, "v": float(v)}, np.geomspace(first.v, fin.v, N_PATH))
    elif p.path == "polytropic":
        k = p.n_poly
        along(f"polytropic n = {k:g}", lambda v: {"P": first.P * (first.v / v) ** k, "v": float(v)},
              np.geomspace(first.v, fin.v, N_PATH))
    elif p.reversible and adiabatic:
        along("reversible adiabatic (s fixed)", lambda v: {"s": first.s, "v": float(v)},
              np.geomspace(first.v, fin.v, N_PATH))
    else:
        note = "the worksheet gives the boundary work, not the path: the end states are joined by a dashed line"
        curves.append(Curve("initial → final", (first.T, fin.T), (first.P, fin.P), (first.v, fin.v),
                            (first.s, fin.s), style="jump"))
    dome = _dome(model)
    if dome is not None:
        curves.append(dome)
    return Trace(model.species.M, states, tuple(curves), note, tuple(problems))


N_DOME = 30


def _dome(model) -> Curve | None:
    """The saturation curve (liquid side up to the critical point, vapour side down): from
    the model's two-phase states, or a cubic's own saturation (``Cubic.saturation``: the
    pressure and the two volumes at T, solved on equal fugacities); None for a model
    without one."""
    pts = _dome_points(model)
    if pts is None:
        return None
    return Curve("saturation", tuple(q.T for q in pts), tuple(q.P for q in pts), tuple(q.v for q in pts),
                 tuple(q.s for q in pts), style="dome")


def _dome_points(model) -> list | None:
    """The states of the saturation curve (liquid side up, vapour side down), or None (see :func:`_dome`)."""
    import numpy as np

    if getattr(model, "mixing", None) is not None:
        return None  # a cubic mixture's one-fluid dome is not its phase envelope: none is drawn
    if model.two_phase:
        lo, _ = model.T_bounds()
        Tc = model.species.Tc
        ends = (max(lo, 0.5 * Tc), Tc * 0.999)

        def pair(T: float):
            return (model.flash({"T": T, "x": 0.0}, field="dome"), model.flash({"T": T, "x": 1.0}, field="dome"))
    elif getattr(model, "saturation_curve", None) is not None:
        curve = model.saturation_curve
        Tc = model.Tc_eos
        if curve.at(0.999 * Tc) is None:  # builds the curve; None: this cubic has none to draw
            return None
        ends = (max(curve.T_low, 0.5 * Tc), Tc * 0.999)

        def pair(T: float):
            sat = model.saturation(T)
            if sat is None:
                raise BalanceError(f"no saturation at T = {T:g} K")
            _, v_l, v_v = sat
            return model.at_Tv(T, v_l, "dome"), model.at_Tv(T, v_v, "dome")
    else:
        return None
    liquid, vapour = [], []
    for T in np.linspace(ends[0], ends[1], N_DOME):
        try:
            l, v = pair(float(T))
        except (BalanceError, ArithmeticError, ValueError):
            continue
        liquid.append(l)
        vapour.append(v)
    if len(liquid) < 3 or len(vapour) < 3:
        return None
    return liquid + vapour[::-1]


# -- steady flow: each device's path on the T-s, h-s and P-h planes -----------------------------
#: The planes a steady-flow trace is drawn on: (x, y) of each, per unit mass.
PLANES = {"T-s": ("s", "T"), "h-s": ("s", "h"), "P-h": ("h", "P")}
AXIS_LABELS = {"s": "s [kJ/(kg K)]", "T": "T [K]", "h": "h [kJ/kg]", "P": "P [bar], log scale"}
MACHINES = ("compressor", "pump", "turbine", "expander", "nozzle", "diffuser")
HEATED = ("heater", "cooler")


@dataclass(frozen=True)
class FlowCurve:
    """Points of one line of a steady-flow diagram, molar SI: T [K], P [Pa], v [m3/mol], h [J/mol],
    s [J/(mol K)]; ``M`` [kg/mol] draws it per unit mass."""

    label: str
    device: str
    """the device whose path it is ('' for the dome)"""
    style: str
    """'isenthalpic' (a valve), 'isobar' (a heater, a cooler, an exchanger's side), 'isentropic' (a machine's
    or a nozzle's ideal path from its inlet), 'jump' (a machine's inlet joined to its actual outlet: no path
    is known between them), 'points' (a mixer's, splitter's or separator's streams) or 'dome'"""
    M: float
    T: tuple[float, ...]
    P: tuple[float, ...]
    v: tuple[float, ...]
    h: tuple[float, ...]
    s: tuple[float, ...]
    species: str = ""


@dataclass(frozen=True)
class FlowTrace:
    """What a steady-flow diagram draws on one plane: each device's path and the streams' states."""

    plane: str
    """'T-s', 'h-s' or 'P-h'"""
    states: tuple[tuple[str, float, float, float, float, float, float], ...]
    """(stream, M, T, P, v, h, s) of every stream, molar SI"""
    curves: tuple[FlowCurve, ...] = ()
    note: str = ""
    problems: tuple[str, ...] = ()

    @property
    def axes(self) -> tuple[str, str]:
        """The property on each axis: ('s', 'T'), ('s', 'h') or ('h', 'P')."""
        return PLANES[self.plane]

    @property
    def labels(self) -> tuple[str, str]:
        x, y = self.axes
        return AXIS_LABELS[x], AXIS_LABELS[y]

    def xy(self, curve: FlowCurve) -> tuple[tuple[float, ...], tuple[float, ...]]:
        """The curve's points on this plane, per unit mass in the axes' units (kJ/kg, kJ/(kg K), K, bar)."""
        return tuple(_per_mass(curve, self.axes[0])), tuple(_per_mass(curve, self.axes[1]))


def _per_mass(curve: FlowCurve, key: str):
    values = getattr(curve, key)
    if key in ("h", "s"):
        return (q / curve.M / 1e3 for q in values)
    if key == "P":
        return (q / 1e5 for q in values)
    return iter(values)


def flow_trace(result, plane: str = "T-s") -> FlowTrace:
    """A steady-flow result drawn on ``plane`` ('T-s', 'h-s' or 'P-h'; raises InputError otherwise).

    Each device's path, every point a state its model computed: a valve along its isenthalpic line
    (h from inlet to outlet, P stepped in ln P), a heater, cooler or either side of an exchanger along
    its isobar (h stepped, P linear over any pressure drop), a machine or a nozzle the isentropic line
    from its inlet to its outlet pressure and its inlet joined to its actual outlet, a mixer's,
    splitter's or separator's streams as points; the saturation dome of each model that has one
    (the reference model's; a cubic's own, ``Cubic.saturation``).
    """
    from .errors import InputError

    if plane not in PLANES:
        raise InputError("plane", f"expected one of {', '.join(PLANES)}; got {plane!r}")
    import numpy as np

    flows = result.flows
    states = tuple((n, f.M, f.point.T, f.point.P, f.point.v, f.point.h, f.point.s) for n, f in flows.items())
    curves: list[FlowCurve] = []
    problems: list[str] = []

    def line(label, device, style, model, pts):
        return FlowCurve(label, device, style, model.species.M, tuple(q.T for q in pts), tuple(q.P for q in pts),
                         tuple(q.v for q in pts), tuple(q.h for q in pts), tuple(q.s for q in pts),
                         model.species.id)

    def along(label, device, style, a, b, specs_of):
        """The states at N_PATH steps from stream a to stream b; the ends are the streams' own."""
        model = a.model
        pts = [a.point]
        for g in np.linspace(0.0, 1.0, N_PATH)[1:-1]:
            try:
                pts.append(model.flash(specs_of(float(g)), field="path"))
            except (BalanceError, ArithmeticError, ValueError):  # e.g. inside a cubic's dome: left out
                continue
        pts.append(b.point)
        if len(pts) < N_PATH // 2:
            problems.append(f"{label}: only {len(pts)} points of its path could be evaluated")
        curves.append(line(label, device, style, model, pts))

    for d in result.devices:
        ins, outs = [flows[s] for s in d.inlets], [flows[s] for s in d.outlets]
        head = f"{d.kind} {d.name}"
        if d.kind == "valve" or d.kind in HEATED:
            a, b = ins[0], outs[0]
            if d.kind == "valve":
                lnP = (np.log(a.point.P), np.log(b.point.P))
                along(f"{head} (isenthalpic)", d.name, "isenthalpic", a, b,
                      lambda g: {"P": float(np.exp(lnP[0] + g * (lnP[1] - lnP[0]))),
                                 "h": a.point.h + g * (b.point.h - a.point.h)})
            else:
                along(f"{head} (isobar)", d.name, "isobar", a, b,
                      lambda g: {"P": a.point.P + g * (b.point.P - a.point.P),
                                 "h": a.point.h + g * (b.point.h - a.point.h)})
        elif d.kind == "exchanger":
            for side, a, b in (("hot", ins[0], outs[0]), ("cold", ins[1], outs[1])):
                along(f"{head} {side} side (isobar)", d.name, "isobar", a, b,
                      lambda g, a=a, b=b: {"P": a.point.P + g * (b.point.P - a.point.P),
                                           "h": a.point.h + g * (b.point.h - a.point.h)})
        elif d.kind in MACHINES:
            a, b = ins[0], outs[0]
            model, s1 = a.model, a.point.s
            lnP = (np.log(a.point.P), np.log(b.point.P))
            pts = [a.point]
            for g in np.linspace(0.0, 1.0, N_PATH)[1:]:
                try:
                    pts.append(model.flash({"P": float(np.exp(lnP[0] + g * (lnP[1] - lnP[0]))), "s": s1},
                                           field="path"))
                except (BalanceError, ArithmeticError, ValueError):
                    continue
            if len(pts) < N_PATH // 2:
                problems.append(f"{head}: only {len(pts)} points of its isentropic line could be evaluated")
            curves.append(line(f"{head} (isentropic, from its inlet)", d.name, "isentropic", model, pts))
            curves.append(line(f"{head} (actual end)", d.name, "jump", model, [a.point, b.point]))
        else:  # mixer, splitter, separator: their streams, as points
            for f in (*ins, *outs):
                curves.append(line(f"{head}: {f.name}", d.name, "points", f.model, [f.point]))
    models = []
    for f in flows.values():
        if all(f.model is not m for m in models):
            models.append(f.model)
    for model in models:
        pts = _dome_points(model)
        if pts is not None:
            curves.append(line(f"saturation ({model.species.id})", "", "dome", model, pts))
    note = "a machine's path between its ends is not known: its inlet and actual outlet are joined by a dashed line" \
        if any(c.style == "jump" for c in curves) else ""
    return FlowTrace(plane, states, tuple(curves), note, tuple(problems))
