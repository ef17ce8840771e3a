"""Rich renderings of results, states and species for the command line."""

from __future__ import annotations

import math

from rich import box
from rich.console import Group
from rich.table import Table
from rich.text import Text

from balance.balances.closed import Problem, Result
from balance.balances.control_volume import Dof
from balance.species import Species
from balance.state import State

from .display import show, unit_label
from .panels import closing_panels

ROWS = (("T", "T"), ("P", "P"), ("v", "v"), ("u", "u"), ("h", "h"), ("s", "s"), ("cv", "cv"), ("cp", "cp"))


def states_table(states: list[State], units: str, title: str = "States") -> Table:
    t = Table(title=title, box=box.SIMPLE_HEAD, title_justify="left")
    t.add_column("property")
    t.add_column("unit", style="dim")
    for st in states:
        t.add_column(st.name, justify="right")
    for label, kind in ROWS:
        vals = []
        for st in states:
            p = st.point
            raw = getattr(p, label)
            value = raw if label in ("T", "P") else raw / st.M
            vals.append(show(value, kind, units))
        t.add_row(label, unit_label(kind, units), *vals)
    t.add_row("Z", "", *(f"{st.point.Z:.6g}" if math.isfinite(st.point.Z) else "—" for st in states))
    if any(st.point.x is not None for st in states):  # a quality only where a state has one
        t.add_row("x", "", *("—" if st.point.x is None else f"{st.point.x:.6g}" for st in states))
    t.add_row("phase", "", *(st.point.phase for st in states))
    t.add_row("n", unit_label("n", units), *(show(st.n, "n", units) for st in states))
    t.add_row("m", unit_label("m", units), *(show(st.m, "m", units) for st in states))
    t.add_row("V", unit_label("V", units), *(show(st.V, "V", units) for st in states))
    return t


def closed_headline(r: Result, units: str) -> str:
    """The result in one line: the final T and P, every solved term (heat, work, the moving
    boundary's work, the amount) and S_gen, in the display units; round-off shown as 0."""
    p = r.problem
    ro = r.round_off
    f = r.final

    def value(x: float, kind: str, digits: int = 5) -> str:
        zero = ro.zero(x, "J/K" if kind == "S" else "J") if kind in ("E", "S") else False
        return f"{'0' if zero else show(x, kind, units, digits)} {unit_label(kind, units)}"

    P = f"P = {value(f.point.P, 'P')}" if math.isfinite(f.point.P) else "P not determined by the model"
    parts = [f"{f.name}: T = {value(f.point.T, 'T')}, {P}"]
    for t in r.terms:
        if not t.solved or (t.kind == "boundary work" and t.name == "rigid"):  # rigid: 0 by its path
            continue
        label = {"heat": f"Q '{t.name}'", "work": f"W '{t.name}'"}.get(t.kind, f"W boundary ({t.name})")
        parts.append(f"{label} = {value(p.convention.shown(t.kind, t.value), 'E')}")
    if p.n is None:
        parts.append(f"n = {value(r.n, 'n')}")
    if r.S_gen is not None:
        parts.append("S_gen = 0 (reversible)" if ro.zero(r.S_gen, "J/K") or r.S_gen == 0
                     else f"S_gen = {value(r.S_gen, 'S', 4)}")
    return "; ".join(parts)


def closed_result_renderable(r: Result, units: str = "metric", with_headline: bool = True) -> Group:
    """The result's tables, equations, warnings and cautions; ``with_headline`` starts them with
    the result in one line (the app shows that line above its tabs instead)."""
    p = r.problem
    head = p.worksheet.heading
    title = Text(head.title or "Closed-system balance", style="bold")
    meta = Text(
        f"{p.species.name} ({p.species.id}), {p.model.label}; convention: {p.convention.words}\n"
        f"gauge pressures read with atmosphere = {show(p.p_atm, 'P', units)} {unit_label('P', units)}",
        style="dim",
    )
    parts: list = [title, Text("Result: " + closed_headline(r, units))] if with_headline else [title]
    parts.append(meta)
    if p.species.overrides:
        parts.append(Text("overrides: " + ", ".join(f"{k} = {v}" for k, v in p.species.overrides), style="yellow"))
    parts.append(states_table([*r.initial, r.final], units))

    e = Table(title="Energy balance", box=box.SIMPLE_HEAD, title_justify="left")
    e.add_column("term")
    e.add_column("name")
    e.add_column(unit_label("E", units), justify="right")
    e.add_column("", style="dim")
    ro = r.round_off

    def computed(x: float | None, kind: str, note: str) -> tuple[str, str]:
        """A computed value in the display units, or 0 where it is round-off (said in its note;
        the rule and its scales are a line of the equations)."""
        if ro.zero(x, "J/K" if kind == "S" else "J") and x != 0:
            return "0", (note + "; " if note else "") + "round-off"
        return show(x, kind, units), note

    for term in r.terms:
        value = p.convention.shown(term.kind, term.value)
        label = "Q" if term.kind == "heat" else ("W" if term.kind == "work" else "W boundary")
        where = ""  # where heat crosses, when it is not the system's own temperature (detail)
        if term.kind == "heat" and term.T_boundary is not None and not term.detail:
            where = f", crosses at {show(term.T_boundary, 'T', units)} {unit_label('T', units)}"
        if term.kind == "boundary work" and term.name == "rigid":
            e.add_row(label, term.name, "0", "none: the boundary is rigid")
        elif term.solved:
            e.add_row(label, term.name, *computed(value, "E", "solved" + where))
        else:
            e.add_row(label, term.name, show(value, "E", units), "given" + where)
    e.add_row("ΔU", "", *computed(r.dU, "E", "n u2 - Σ n u1"))
    e.add_row("  ideal-gas part", "", *computed(r.dU_ig, "E", ""))
    e.add_row("  departure part", "", *computed(r.dU_dep, "E", ""))
    if p.dKE:
        e.add_row("ΔKE", "", show(p.dKE, "E", units), "given")
    if p.dPE:
        e.add_row("ΔPE", "", show(p.dPE, "E", units), "given")
    e.add_row("residual", "", f"{r.residual:.1e}", "relative, recomputed")
    parts.append(e)

    s = Table(title="Entropy balance", box=box.SIMPLE_HEAD, title_justify="left")
    s.add_column("term")
    s.add_column(unit_label("S", units), justify="right")
    s.add_column("", style="dim")
    s.add_row("ΔS system", *computed(r.dS_system, "S", ""))
    s.add_row("ΔS surroundings", *computed(r.dS_surroundings, "S", ""))
    s.add_row("S_gen", *computed(r.S_gen, "S", ""))
    parts.append(s)

    parts.extend(closing_panels(r, units, "Equations with numbers (molar SI, energies in kJ)"))
    return Group(*parts)


def closed_dof_renderable(p: Problem, dof: Dof) -> Group:
    t = Table(box=box.SIMPLE_HEAD, title="Degrees of freedom", title_justify="left")
    t.add_column("unknowns")
    t.add_column("equations")
    unknowns = [u.words() for u in dof.unknowns]
    for i in range(max(len(unknowns), len(dof.equations))):
        t.add_row(unknowns[i] if i < len(unknowns) else "", dof.equations[i] if i < len(dof.equations) else "")
    fixed = ", ".join(dof.fixed) or "nothing yet"
    style = "green" if dof.ok else "red"
    return Group(
        Text(f"{p.species.name}, {p.model.label}; path: {p.path}; constraints: {', '.join(p.constraints) or 'none'}"),
        Text(f"final state fixed by: {fixed}"),
        t,
        Text(dof.message, style=style),
    )


# -- by kind of balance: the one place a face chooses its rendering ------------------------
#: Each kind's (result, headline, degrees of freedom) renderings, by ``[system] kind``
#: (:data:`balance.kinds.KINDS`): named, so a kind's module loads on its first use.
FACES = {
    "closed": ("tui.render:closed_result_renderable", "tui.render:closed_headline", "tui.render:closed_dof_renderable"),
    "steady-flow": ("tui.render_flow:flow_result_renderable", "tui.render_flow:flow_headline",
                    "tui.render_flow:flow_dof_renderable"),
    "transient": ("tui.render_transient:transient_result_renderable", "tui.render_transient:transient_headline",
                  "tui.render_transient:transient_dof_renderable"),
}


def _face(problem, which: int):
    from importlib import import_module

    module, name = FACES[problem.worksheet.system.kind][which].split(":")
    return getattr(import_module(module), name)


def result_renderable(r, units: str = "metric", with_headline: bool = True) -> Group:
    """The result's tables, equations, warnings and cautions, as its kind of balance shows them;
    ``with_headline`` starts them with the result in one line."""
    return _face(r.problem, 0)(r, units, with_headline)


def headline(r, units: str) -> str:
    """The result in one line, as its kind of balance says it."""
    return _face(r.problem, 1)(r, units)


def dof_renderable(p, dof: Dof) -> Group:
    """What the problem lacks or that it is ready, as its kind of balance says it."""
    return _face(p, 2)(p, dof)


def species_table(entries: list[Species]) -> Table:
    t = Table(box=box.SIMPLE_HEAD, caption="joulebook species NAME shows one with the source of every constant")
    for col in ("id", "name", "M g/mol", "Tc K", "Pc bar", "ω", "ref"):
        t.add_column(col, no_wrap=True, overflow="ellipsis", max_width=16 if col == "name" else None)
    for sp in entries:
        t.add_row(sp.id, sp.name, f"{sp.M * 1e3:.4f}", f"{sp.Tc:.2f}", f"{sp.Pc / 1e5:.3f}", f"{sp.omega:.4f}",
                  "yes" if sp.coolprop else "—")
    return t


def species_detail(sp: Species) -> Group:
    t = Table(box=box.SIMPLE_HEAD, title=f"{sp.name} ({sp.id})", title_justify="left")
    t.add_column("constant")
    t.add_column("value")
    t.add_column("source")
    t.add_row("formula", sp.formula, "")
    t.add_row("CAS", sp.cas, "")
    t.add_row("molar mass", f"{sp.M * 1e3:.6g} g/mol", "M")
    t.add_row("Tc", f"{sp.Tc:.6g} K", "critical")
    t.add_row("Pc", f"{sp.Pc / 1e5:.6g} bar", "critical")
    t.add_row("ω", f"{sp.omega:.6g}", "omega")
    if sp.Vc:
        t.add_row("Vc", f"{sp.Vc * 1e6:.6g} cm³/mol", "critical")
    if sp.Zc:
        t.add_row("Zc", f"{sp.Zc:.6g}", "critical")
    t.add_row("cp° ideal gas", sp.cp_ig.label, "cp")
    if sp.liquid:
        t.add_row("liquid", f"ρ = {sp.liquid.rho:.6g} kg/m³, cp = {sp.liquid.cp:.6g} J/(kg·K) at {sp.liquid.T:g} K",
                  "liquid")
    t.add_row("reference model", sp.coolprop or "not available", "")
    sources = Text()
    for key, text in sp.sources.items():
        sources.append(f"{key}: ", style="bold")
        sources.append(f"{text}\n")
    aliases = Text("aliases: " + (", ".join(sp.aliases) or "none"), style="dim")
    return Group(t, Text("Sources", style="bold underline"), sources, aliases)


def state_renderable(st: State, units: str, warnings: list[str], phases=()) -> Group:
    """One state's table, how its root was chosen, a mixture's phase envelope lines, the warnings."""
    parts: list = [
        Text(f"{st.model.species.name}, {st.model.label}; reference state: {st.model.reference_state}", style="dim"),
        states_table([st], units, title="State"),
        Text(f"root: {st.point.root}", style="dim"),
    ]
    if phases:
        parts.append(Text("\n".join(phases)))
    if warnings:
        parts.append(Text("\n".join(f"• {w}" for w in warnings), style="yellow"))
    return Group(*parts)


def split_renderable(species, model, lines) -> Group:
    """A mixture's (T, P) inside its phase envelope: the flash's lines under the fluid's name."""
    return Group(Text(f"{species.name}, {model.label}", style="dim"), Text("\n".join(lines)),
                 Text("A balance refuses a state inside the envelope: this version balances single-phase "
                      "mixture states only.", style="yellow"))


def kij_table(used, title: str) -> Table:
    """Binary interaction parameters, one row per pair: (id_i, id_j, kij, source) as ``KijSet.used`` holds them."""
    t = Table(box=box.SIMPLE_HEAD, title=title, title_justify="left")
    for col in ("pair", "kij", "source"):
        t.add_column(col, no_wrap=col != "source", justify="right" if col == "kij" else "left")
    for i, j, value, source in used:
        t.add_row(f"{i}-{j}", f"{value:.10g}", source)
    return t
