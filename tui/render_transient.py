"""Rich renderings of a transient result and of what a transient worksheet asks.

The same SI result the domain solved (:mod:`balance.balances.transient`), in the display
units of :mod:`.display`: the end state without time (each vessel at the start and the
end, its heat, the mass moved, S_gen; said to be the adiabatic bound where a wall's or a
given heat is left out), the history in time (how long to the end condition and how it
ended, the coldest and hottest gas and wall and when, the peak pressure, the mass moved
through each line, whether it was choked, the energy closure, S_gen), the equations with
numbers, the warnings and the cautions. Laid out for 80 columns.
"""

from __future__ import annotations

from rich import box
from rich.console import Group
from rich.table import Table
from rich.text import Text

from .display import show, unit_label
from .panels import closing_panels

#: An entropy generation below this share of n R is round-off and shown as 0.
ROUND_OFF = 1e-9
R = 8.314462618


def _T(x: float, units: str) -> str:
    return f"{show(x, 'T', units, 5)} {unit_label('T', units)}"


def _P(x: float, units: str) -> str:
    return f"{show(x, 'P', units, 5)} {unit_label('P', units)}"


def _m(x: float, units: str) -> str:
    return f"{show(x, 'm', units, 5)} {unit_label('m', units)}"


def duration(t: float) -> str:
    """A time as an engineer says it: s below two minutes, min below two hours, else h."""
    if t < 120:
        return f"{t:.4g} s"
    if t < 7200:
        return f"{t / 60:.4g} min"
    return f"{t / 3600:.4g} h"


def _S(S: float, n: float, units: str) -> str:
    if abs(S) < ROUND_OFF * max(n, 1e-300) * R:
        return f"0 {unit_label('S', units)} (round-off)"
    return f"{show(S, 'S', units, 5)} {unit_label('S', units)}"


def end_state_table(result, units: str) -> Table | None:
    """Each vessel a column: T, P and mass at the start and the end, heat, mass in and out, S_gen."""
    e = result.end_state
    if e is None:
        return None
    M = result.problem.M
    head = "End state without time" + (" (adiabatic bound)" if e.bound else f" ({e.heat})")
    t = Table(title=head, box=box.SIMPLE_HEAD, title_justify="left", pad_edge=False, padding=(0, 1, 0, 0))
    t.add_column("")
    t.add_column("unit", style="dim")
    for v in e.vessels:
        t.add_column(v.name, justify="right")
    t.add_row("T start", unit_label("T", units), *(show(v.start.T, "T", units) if v.start else "evacuated"
                                                     for v in e.vessels))
    t.add_row("P start", unit_label("P", units), *(show(v.start.P, "P", units) if v.start else "—"
                                                     for v in e.vessels))
    t.add_row("m start", unit_label("m", units), *(show(v.n1 * M, "m", units) for v in e.vessels))
    t.add_row("T end", unit_label("T", units), *(show(v.end.T, "T", units) for v in e.vessels))
    t.add_row("P end", unit_label("P", units), *(show(v.end.P, "P", units) for v in e.vessels))
    t.add_row("m end", unit_label("m", units), *(show(v.n2 * M, "m", units) for v in e.vessels))
    t.add_row("Q", unit_label("E", units), *(show(v.Q, "E", units) for v in e.vessels))
    t.add_row("S_gen", unit_label("S", units), *(_S(v.S_gen, max(v.n1, v.n2), units).split(" ")[0]
                                                 for v in e.vessels))
    return t


def history_lines(result, units: str) -> list[str]:
    """What the history says, a line each."""
    h = result.history
    if h is None:
        return [f"history: none — {result.history_why}"]
    out = [f"history: {h.stop} after {duration(h.t_end)}" + ("" if h.reached else " (not the end condition)")]
    cold = h.minimum("T")
    out.append(f"  coldest gas   {_T(cold.value, units)} in '{cold.where}' at t = {duration(cold.t)}")
    hot = h.maximum("T")
    out.append(f"  hottest gas   {_T(hot.value, units)} in '{hot.where}' at t = {duration(hot.t)}")
    wall = h.minimum("T_wall")
    if wall is not None:
        out.append(f"  coldest wall  {_T(wall.value, units)} of '{wall.where}' at t = {duration(wall.t)}")
        warm = h.maximum("T_wall")
        if warm.value > h.T_wall_start[warm.where] + 1e-6:
            out.append(f"  hottest wall  {_T(warm.value, units)} of '{warm.where}' at t = {duration(warm.t)}")
    P_max = max(float(c["P"].max()) for c in h.vessels.values())
    out.append(f"  peak pressure {_P(P_max, units)}")
    for name, pt in h.end_points.items():
        out.append(f"  '{name}' at the end: {_T(pt.T, units)}, {_P(pt.P, units)}, "
                   f"{_m(h.n_end[name] * result.problem.M, units)}")
    for name, moved in h.moved.items():
        choked = h.lines[name]["choked"]
        share = f"; choked for {choked.mean():.0%} of the time" if choked.any() else ""
        out.append(f"  line '{name}': {_m(moved, units)} moved{share}")
    for name in h.end_points:
        n = max(h.n_start[name], h.n_end[name])
        out.append(f"  '{name}': energy closure {h.closure(name):.1e}; S_gen {_S(h.S_gen(name), n, units)}")
    return out


def transient_headline(result, units: str) -> str:
    """The main figures in one line: the end, how long, the coldest (and hottest) gas, the wall."""
    parts = []
    h = result.history
    if h is not None:
        parts.append(f"{'reached' if h.reached else 'stopped'} in {duration(h.t_end)}")
        cold = h.minimum("T")
        if cold.t > 0:  # the gas cooled below where it started (a fill's coldest is its first gas)
            parts.append(f"coldest gas {_T(cold.value, units)} ('{cold.where}', {duration(cold.t)})")
        hot = h.maximum("T")
        if hot.t > 0:
            parts.append(f"hottest gas {_T(hot.value, units)} ('{hot.where}')")
        wall = h.minimum("T_wall")
        if wall is not None:
            parts.append(f"coldest wall {_T(wall.value, units)}")
    e = result.end_state
    if e is not None:
        ends = ", ".join(f"'{v.name}' {_T(v.end.T, units)}, {_P(v.end.P, units)}" for v in e.vessels)
        parts.append(f"end state{' (adiabatic bound)' if e.bound else ''}: {ends}")
        if e.heat == "isothermal":
            parts.append("Q = " + ", ".join(f"{show(v.Q, 'E', units, 5)} {unit_label('E', units)}"
                                            for v in e.vessels))
    return "; ".join(parts)


def transient_result_renderable(result, units: str = "metric", with_headline: bool = True) -> Group:
    """The result's tables, history, equations, warnings and cautions; ``with_headline`` starts
    them with its main figures in one line (the app shows that line above its tabs instead)."""
    p = result.problem
    title = Text(p.worksheet.heading.title or "Transient balance", style="bold")
    parts: list = [title, Text("Result: " + transient_headline(result, units))] if with_headline else [title]
    sp = p.model.species
    meta = [f"{sp.name} ({sp.id}), {p.model.label}; reference state: {p.model.reference_state}",
            f"{p.end.words()}",
            f"gauge pressures read with atmosphere = {_P(p.p_atm, units)}"]
    parts.append(Text("\n".join(meta), style="dim"))
    table = end_state_table(result, units)
    if table is not None:
        parts.append(table)
    else:
        parts.append(Text(f"end state without time: none — {result.end_state_why}", style="dim"))
    parts.append(Text("\n".join(history_lines(result, units))))
    parts.extend(closing_panels(result, units, "Equations with numbers (molar SI)"))
    return Group(*parts)


def transient_dof_renderable(problem, dof) -> Group:
    """What the worksheet asks, in words: the vessels, the lines, the end; ready or not."""
    t = Table(box=box.SIMPLE_HEAD, title="Vessels", title_justify="left")
    for col in ("vessel", "volume", "at the start", "heat"):
        t.add_column(col)
    for v in problem.vessels:
        start = "evacuated" if v.empty else f"{v.T0:.2f} K, {v.n0 * problem.M:.6g} kg"
        t.add_row(v.name, f"{v.V:.6g} m³", start, v.heat)
    lines = Table(box=box.SIMPLE_HEAD, title="Lines", title_justify="left")
    for col in ("line", "from → to", "through"):
        lines.add_column(col)
    for ln in problem.lines:
        how = (ln.restriction.words.split(":")[0] if ln.restriction is not None
               else f"{ln.rate:.6g} kg/s given" if ln.rate is not None else "no restriction: end state only")
        lines.add_row(ln.name, f"{ln.source} → {ln.target}", how)
    style = "green" if dof.ok else "red"
    return Group(Text(f"transient: {len(problem.vessels)} vessel(s), {len(problem.lines)} line(s)"), t, lines,
                 Text(dof.message, style=style))


__all__ = ["duration", "end_state_table", "history_lines", "transient_dof_renderable", "transient_headline",
           "transient_result_renderable"]


# -- the history as a table and as a plot (``joulebook solve --csv FILE``, ``--plot``) -------------
def history_columns(result, units: str) -> list[tuple[str, list[float]]]:
    """Every row of the history, column by column, in the display units: (header with its unit,
    values)."""
    from .display import converter

    h = result.history
    T, P, m, mdot = (converter(k, units) for k in ("T", "P", "m", "mdot"))
    cols = [("t [s]", [float(x) for x in h.t])]
    for name, c in h.vessels.items():
        cols.append((f"{name} T [{unit_label('T', units)}]", [T(x) for x in c["T"]]))
        cols.append((f"{name} P [{unit_label('P', units)}]", [P(x) for x in c["P"]]))
        cols.append((f"{name} m [{unit_label('m', units)}]", [m(x) for x in c["m"]]))
        if "T_wall" in c:
            cols.append((f"{name} T_wall [{unit_label('T', units)}]", [T(x) for x in c["T_wall"]]))
    for name, c in h.lines.items():
        cols.append((f"{name} mdot [{unit_label('mdot', units)}]", [mdot(x) for x in c["mdot"]]))
        cols.append((f"{name} choked", [float(x) for x in c["choked"]]))
    return cols


def history_csv(result, units: str) -> str:
    """The whole history as CSV: a header of names with their units, one row per time."""
    import csv
    import io

    cols = history_columns(result, units)
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow([head for head, _ in cols])
    for i in range(len(cols[0][1])):
        w.writerow([f"{values[i]:.10g}" for _, values in cols])
    return out.getvalue()


def history_plot(result, units: str, width: int = 80, height: int = 14) -> str:
    """The gas's (and wall's) temperature and the pressure against time, drawn in text (plotext)."""
    import plotext as plt

    h = result.history
    t = [float(x) for x in h.t]
    scale, t_unit = (1.0, "s") if h.t_end < 120 else (60.0, "min") if h.t_end < 7200 else (3600.0, "h")
    t = [x / scale for x in t]
    cols = dict(history_columns(result, units))
    out = []
    for what, key in (("temperature", "T"), ("pressure", "P")):
        plt.clear_figure()
        plt.plotsize(width, height)
        plt.theme("clear")
        for name, c in h.vessels.items():
            plt.plot(t, cols[f"{name} {key} [{unit_label(key, units)}]"], label=f"{name} gas" if key == "T" else name)
            if key == "T" and "T_wall" in c:
                plt.plot(t, cols[f"{name} T_wall [{unit_label('T', units)}]"], label=f"{name} wall")
        plt.title(f"{what} [{unit_label(key, units)}] against time")
        plt.xlabel(f"t [{t_unit}]")
        out.append(_ANSI.sub("", plt.build()))  # plain text: it goes to a file or a pipe as well
    plt.clear_figure()
    return "\n".join(out)


_ANSI = __import__("re").compile(r"\x1b\[[0-9;]*m")
