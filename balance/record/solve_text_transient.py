"""The text of a transient solve entry: the end state without time, the history's figures, the
integrator's settings, a resampled history table, the equations, warnings and cautions.

Units: the rendering takes the SI values of the transient result's JSON (K, Pa, kg, J, J/K, s,
kg/s) and shows them in the record's fixed units, whatever the display: T in °C, P in bar(a),
masses in kg, heat in kJ, entropy in kJ/K, times in s, mass rates in kg/s. The text is a
function of the entry's data alone, as verify requires; the tables are also what the exported
reports (:mod:`.export`) show.
"""

from __future__ import annotations

from .plain import closing, g, table, wrap
from .solve_text_flow import _q, _table

UNITS = ("Units (fixed, whatever the display): T in °C, P in bar(a), masses in kg, heat in kJ, entropy in "
         "kJ/K, times in s, mass rates in kg/s, cautions in °C and bar(a); the equations in molar SI; the data "
         "part in SI, each unit named.")

#: A history's energy closure must be below this (relative), as the solver checks it.
CLOSES = 1e-6


def _c(x) -> str:
    return "—" if x is None else g(x - 273.15)


def _bar(x) -> str:
    return "—" if x is None else g(x / 1e5)


def _k(x) -> str:
    return "—" if x is None else g(x / 1e3)


def _plain(x) -> str:
    return "—" if x is None else g(x)


def end_state_rows(data: dict) -> tuple[list[str], list[list[str]], str] | None:
    """Headers, rows and alignment of the end state without time, one vessel a row; None without one."""
    e = data.get("end_state")
    if not isinstance(e, dict):
        return None
    rows = []
    for name, v in _table(e, "vessels").items():
        rows.append([name, _c(_q(v, "T1")), _bar(_q(v, "P1")), _plain(_q(v, "m1")), _c(_q(v, "T2")),
                     _bar(_q(v, "P2")), _plain(_q(v, "m2")), _k(_q(v, "Q")), _k(_q(v, "S_gen"))])
    return (["vessel", "T1 °C", "P1 bar(a)", "m1 kg", "T2 °C", "P2 bar(a)", "m2 kg", "Q kJ", "S_gen kJ/K"], rows,
            "lrrrrrrrr")


def extreme_rows(data: dict) -> tuple[list[str], list[list[str]], str] | None:
    """The history's lowest and highest temperatures (gas and wall) and when, one a row."""
    h = data.get("history")
    if not isinstance(h, dict):
        return None
    rows = []
    for key, e in _table(h, "extremes").items():
        rows.append([key, _c(_q(e, "value")), _plain(_q(e, "t"))])
    return ["extreme", "T °C", "at t s"], rows, "lrr"


def vessel_end_rows(data: dict) -> tuple[list[str], list[list[str]], str] | None:
    """Each vessel at the history's end: T, P, m, heat, S_gen and the energy closure."""
    h = data.get("history")
    if not isinstance(h, dict):
        return None
    rows = []
    for name, v in _table(h, "vessels").items():
        closure = v.get("closure")
        ok = isinstance(closure, (int, float)) and not isinstance(closure, bool) and closure <= CLOSES
        rows.append([name, _c(_q(v, "T2")), _bar(_q(v, "P2")), _plain(_q(v, "m2")), _c(_q(v, "T_wall2")),
                     _k(_q(v, "Q")), _k(_q(v, "S_gen")),
                     "—" if not isinstance(closure, (int, float)) else f"{closure:.1e}", "yes" if ok else "NO"])
    return (["vessel", "T °C", "P bar(a)", "m kg", "wall °C", "Q kJ", "S_gen kJ/K", "closure", "closes"], rows,
            "lrrrrrrrl")


def history_table(data: dict) -> tuple[list[str], list[list[str]], str] | None:
    """The resampled history: one row per time, the columns of the data's table in record units."""
    h = data.get("history")
    rows_data = h.get("rows") if isinstance(h, dict) else None
    if not isinstance(rows_data, dict) or not rows_data:
        return None
    heads, cols = [], []
    for head, values in rows_data.items():
        if not isinstance(values, list):
            continue
        name, _, unit = str(head).rpartition(" [")
        unit = unit.rstrip("]")
        if unit == "K":
            heads.append(f"{name} °C")
            cols.append([_c(x) if isinstance(x, (int, float)) else "—" for x in values])
        elif unit == "Pa":
            heads.append(f"{name} bar(a)")
            cols.append([_bar(x) if isinstance(x, (int, float)) else "—" for x in values])
        else:
            heads.append(f"{name} {unit}")
            cols.append([_plain(x) if isinstance(x, (int, float)) else "—" for x in values])
    n = min(len(c) for c in cols)
    return heads, [[c[i] for c in cols] for i in range(n)], "r" * len(heads)


def solve_text(data: dict, basis: str, pins: str) -> str:
    """The result of a transient solve entry (``basis``: the inputs it was solved from, in words;
    ``pins``: the joulebook and species data it was solved with)."""
    out = [f"Solved{basis}: {data.get('title') or 'transient balance'}"]
    if pins:
        out.append(pins)
    out.append(f"Species {data.get('species', '?')}, model {data.get('model', '?')}; case: {data.get('case', '?')}")
    out += wrap(f"End: {data.get('end', '?')}", "", "  ")
    out += wrap(UNITS, "", "  ")
    out += ["", "End state without time (the integrated uniform-state balance)"]
    rows = end_state_rows(data)
    if rows is None:
        out += wrap(f"none: {data.get('end_state_why', '?')}", "  ", "    ")
    else:
        e = data["end_state"]
        out += wrap(f"heat: {e.get('heat', '?')}" + ("; the adiabatic bound (a wall's or a given heat is left out)"
                                                     if e.get("adiabatic_bound") else ""), "  ", "    ")
        out += table(*rows)
        residual = e.get("residual")
        if isinstance(residual, (int, float)):
            out.append(f"  energy balance recomputed from the states: residual {residual:.1e} (relative)")
    out += ["", "History in time"]
    h = data.get("history")
    if not isinstance(h, dict):
        out += wrap(f"none: {data.get('history_why', '?')}", "  ", "    ")
    else:
        out += wrap(f"integrator: {h.get('settings', '?')}; {h.get('evaluations', '?')} evaluations", "  ", "    ")
        out += wrap(f"{h.get('stop', '?')} at t = {_plain(_q(h, 't_end'))} s"
                    + ("" if h.get("reached") else " (the end condition was not reached)"), "  ", "    ")
        for title, rows in (("Extremes", extreme_rows(data)), ("Each vessel at the end", vessel_end_rows(data))):
            if rows is not None:
                out += ["", f"  {title}"]
                out += table(*rows)
        if isinstance(h.get("moved"), dict):
            out.append("")
            for name, q in h["moved"].items():
                value = q.get("value") if isinstance(q, dict) else None
                out.append(f"  line '{name}': {_plain(value)} kg moved")
        rows = history_table(data)
        if rows is not None:
            out += ["", f"  History, resampled ({len(rows[1])} rows of the integrator's)"]
            out += table(*rows)
    out += closing(data)
    return "\n".join(out)


__all__ = ["CLOSES", "UNITS", "end_state_rows", "extreme_rows", "history_table", "solve_text", "vessel_end_rows"]
