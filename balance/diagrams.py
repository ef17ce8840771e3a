"""The diagrams: the process drawn as lines on the P-v and T-s planes.

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
    import numpy as np

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
    pts = liquid + vapour[::-1]
    return Curve("saturation", tuple(q.T for q in pts), tuple(q.P for q in pts), tuple(q.v for q in pts),
                 tuple(q.s for q in pts), style="dome")
