"""The text of a solve entry: states, the energy and entropy balances, equations, warnings, cautions.

A solve's data name their kind of balance (``kind``; a closed system's name none):
:func:`solve_text` lays out a closed system's result here and a steady-flow
network's in :mod:`.solve_text_flow`; the error of a failed solve is the same for both.

Units: the rendering takes the molar SI values of ``Result.as_json()``
(K, Pa, m**3/mol, J/mol, J/(mol*K), J, J/K) and shows them as engineers read
them: T in K and °C, P in bar(a), intensive properties per kg (kJ/kg,
kJ/(kg·K), m³/kg), energies in kJ, entropies in kJ/K. The tables' rows are
also what the exported reports (:mod:`.export`) show.
"""

from __future__ import annotations

from ..worksheet import CONVENTIONS
from .plain import closing, g, listed, table, wrap
from .solve_text_flow import solve_text as flow_text
from .solve_text_transient import solve_text as transient_text

#: The units of a solve's text in the record, whatever units the app or the command line showed.
UNITS = ("Units (fixed, whatever the display): T in K and °C, P in bar(a), properties per kg, energies in "
         "kJ, entropies in kJ/K, cautions in °C and bar(a); the equations in molar SI; the data part in "
         "molar SI, each unit named.")


def _q(d, key):
    """The number of a quantity {"value", "unit"} in d, or None."""
    v = d.get(key) if isinstance(d, dict) else None
    x = v.get("value") if isinstance(v, dict) else None
    return x if isinstance(x, (int, float)) and not isinstance(x, bool) else None


_list = listed


def _kJ(x, zero: bool = False) -> str:
    return "—" if x is None else "0" if zero else g(x / 1e3)


def round_off(data: dict) -> tuple[float, float, float] | None:
    """(relative, energy scale [J], entropy scale [J/K]) below which a computed energy or entropy
    is round-off, shown as 0; None for a solve recorded without them (shown as it was written)."""
    ro = data.get("round_off")
    rel = ro.get("relative") if isinstance(ro, dict) else None
    E, S = _q(ro, "energy"), _q(ro, "entropy")
    if not isinstance(rel, (int, float)) or isinstance(rel, bool) or E is None or S is None:
        return None
    return float(rel), E, S


def _later(data: dict) -> bool:
    """Whether a solve was filed with wording 2 or later (see ``balance.balances.closed.explain.WORDING``)."""
    w = data.get("wording", 1)
    return isinstance(w, int) and not isinstance(w, bool) and w >= 2


def _zero(x, ro, unit: str = "J") -> bool:
    """Whether a computed value [J or J/K] is round-off of zero under the recorded scales."""
    if ro is None or x is None or x == 0:
        return False
    rel, E, S = ro
    return abs(x) < rel * (S if unit == "J/K" else E)


def solve_text(data: dict, inputs_seq: int | None = None) -> str:
    """The result of a solve entry, laid out by the kind of balance its data says (``kind``;
    a closed system's data have none): a closed system's states, energy and entropy balances,
    a steady-flow network's streams and devices (:mod:`.solve_text_flow`), then equations,
    warnings and cautions; or the error of a failed solve."""
    basis = f" (inputs as of entry {inputs_seq})" if inputs_seq else ""
    pins = ""
    if "joulebook" in data:
        pins = f"Solved with joulebook {data['joulebook']}; species data SHA-256 {data.get('species_data_sha256', '?')}"
    if "error" in data:
        out = [f"Solve failed{basis}: {data['error_kind']}"]
        out += wrap(data["error"], "  ", "  ")
        out.append("No result is recorded for these inputs.")
        if pins:
            out.append(pins.replace("Solved with", "Attempted with"))
        return "\n".join(out)
    text = _TEXTS[data.get("kind", "closed")](data, basis, pins)  # the reader refuses another kind
    if isinstance(data.get("uncertainty"), dict):  # only a worksheet with uncertain values has one
        text += "\n" + "\n".join(uncertainty_lines(data["uncertainty"]))
    return text


def _shown(q) -> str:
    """A quantity {"value", "unit"} to six digits with its unit ('—' when absent)."""
    if _q({"q": q}, "q") is None:
        return "—"
    unit = str(q.get("unit", ""))
    return g(q["value"]) + (f" {unit}" if unit and unit != "dimensionless" else "")


def uncertainty_lines(u: dict) -> list[str]:
    """The first-order uncertainty of the results, each with its budget (largest share first),
    in SI as the data hold it."""
    out = ["", "Uncertainty of the results"]
    if "error" in u:
        return out + wrap(f"not evaluated: {u['error']}", "  ", "  ")
    out += wrap(f"{u.get('method', '')}; coverage factor k = {g(u.get('coverage_factor'))}", "  ", "  ")
    for r in listed(u, "results"):
        if not isinstance(r, dict):
            continue
        if "u_c" in r:
            head = f"{r.get('result')}: {_shown(r.get('value'))} ± {_shown(r.get('U'))} (k = {g(r.get('k'))}), " \
                   f"u_c = {_shown(r.get('u_c'))}"
        else:
            head = f"{r.get('result')}: {_shown(r.get('value'))}; {r.get('incomplete', 'u_c not given')}"
        out += ["", *wrap(head, "  ", "    ")]
        rows = []
        for b in listed(r, "budget"):
            if not isinstance(b, dict):
                continue
            share = b.get("share")
            rows.append([str(b.get("input", "")), str(b.get("value", "")), _shown(b.get("u")),
                         str(b.get("distribution", "")), _shown(b.get("c")), _shown(b.get("contribution")),
                         "—" if not isinstance(share, (int, float)) else f"{100 * share:.1f} %"])
        out += table(["input", "value", "u", "distribution", "c (sensitivity)", "c·u", "share"], rows,
                     "llrlrrr", "    ")
        for b in listed(r, "budget"):
            if isinstance(b, dict) and b.get("failed"):
                out += wrap(f"{b.get('input')}: {b['failed']}", "    - ", "      ")
    return out


def _closed_text(data: dict, basis: str, pins: str) -> str:
    """The result of a closed-system solve entry."""
    out = [f"Solved{basis}: {data.get('title') or 'closed-system balance'}"]
    if pins:
        out.append(pins)
    # a solve filed before wording 2 is rendered as it was written; from it on the text says its
    # units, and what the equations say already (the reference state, the method) is said there only
    later = _later(data)
    species = f"Species {data.get('species', '?')}, model {data.get('model', '?')}"
    out.append(species if later else f"{species}; {data.get('method', '')}")
    if data.get("reference_state") and not later:
        out += wrap(f"Reference state: {data['reference_state']}", "", "  ")
    conv = str(data.get("convention", ""))
    out += wrap(f"Sign convention: {CONVENTIONS.get(conv, conv)}", "", "  ")
    if later:
        out += wrap(UNITS, "", "  ")
    if isinstance(data.get("overrides"), dict) and data["overrides"]:
        out.append("Overrides: " + ", ".join(f"{k} = {v}" for k, v in data["overrides"].items()))
    out += ["", "States"]
    out += _states(data.get("states", {}), later)
    out += ["", "Energy balance (heat to the system positive; work "
            + ("done by" if conv == "work-by-system" else "done on") + " the system positive)"]
    out += table(*energy_rows(data), "llrl")
    out += ["", "Entropy balance"]
    out += table(*entropy_rows(data), "lrl")
    out += closing(data)
    return "\n".join(out)


#: The text of a solved result, by the kind of balance its data name.
_TEXTS = {"closed": _closed_text, "steady-flow": flow_text, "transient": transient_text}


_STATE_ROWS = (
    # label, unit shown, key, factor: value in SI (molar) -> shown; per_mass divides by M
    ("T", "K", "T", 1.0, False),
    ("T", "°C", "T", None, False),
    ("P", "bar(a)", "P", 1e-5, False),
    ("v", "m³/kg", "v", 1.0, True),
    ("ρ", "kg/m³", "rho", 1.0, False),
    ("u", "kJ/kg", "u", 1e-3, True),
    ("h", "kJ/kg", "h", 1e-3, True),
    ("s", "kJ/(kg·K)", "s", 1e-3, True),
    ("cv", "kJ/(kg·K)", "cv", 1e-3, True),
    ("cp", "kJ/(kg·K)", "cp", 1e-3, True),
    ("Z", "", "Z", 1.0, False),
    ("x", "", "x", 1.0, False),
    ("n", "mol", "n", 1.0, False),
    ("m", "kg", "m", 1.0, False),
    ("V", "m³", "V", 1.0, False),
)


def state_rows(states: dict, compact: bool = False) -> tuple[list[str], list[list[str]]]:
    """Headers and rows of the states table (display units; see the module docstring);
    ``compact`` leaves out the quality where no state has one."""
    names = list(states)
    rows = []
    for label, unit, key, factor, per_mass in _STATE_ROWS:
        if compact and key == "x" and all(_q(st, key) is None for st in states.values()):
            continue
        row = [label, unit]
        for name in names:
            st = states[name] if isinstance(states[name], dict) else {}
            v = _q(st, key)
            if v is None:
                row.append("—")
                continue
            if factor is None:  # °C
                row.append(g(v - 273.15))
                continue
            if per_mass:
                n, m = _q(st, "n"), _q(st, "m")
                if not n or not m:
                    row.append("—")
                    continue
                v = v / (m / n)
            row.append(g(v * factor))
        rows.append(row)
    rows.append(["phase", "", *(str(states[n].get("phase", "—")) if isinstance(states[n], dict) else "—"
                                for n in names)])
    return ["", "unit", *names], rows


def _states(states: dict, compact: bool = False) -> list[str]:
    if not states:
        return ["  (none)"]
    headers, rows = state_rows(states, compact)
    return table(headers, rows, "ll" + "r" * (len(headers) - 2))


def energy_rows(data: dict) -> tuple[list[str], list[list[str]]]:
    """Headers and rows of the energy balance, term by term, in kJ."""
    ro = round_off(data)
    later = _later(data)
    rows = []
    for t in data.get("terms", []):
        if not isinstance(t, dict):
            continue
        label = {"heat": "Q", "work": "W"}.get(str(t.get("kind")), "W boundary")
        note = "solved" if t.get("solved") else "given"
        if t.get("kind") == "heat" and _q(t, "T_boundary") is not None:
            note += f", crosses at {g(_q(t, 'T_boundary'))} K"
        elif later and t.get("kind") == "boundary work" and t.get("detail") == "rigid":
            note = "none: the boundary is rigid"
        elif t.get("detail"):
            note += f", {t['detail']}"
        value = _q(t, "value")
        zero = bool(t.get("solved")) and _zero(value, ro)
        rows.append([label, str(t.get("name", "")), _kJ(value, zero), note + (", round-off" if zero else "")])
    for label, key, note in (("ΔU", "dU", "n u2 - Σ n u1"),
                             ("  ideal-gas part", "dU_ideal_gas", "Σ n (u_ig(T2) - u_ig(T1))"),
                             ("  departure part", "dU_departure", "Σ n (u_dep2 - u_dep1)")):
        zero = _zero(_q(data, key), ro)
        rows.append([label, "", _kJ(_q(data, key), zero), note + ("; round-off" if zero else "")])
    residual = data.get("residual")
    rows.append(["residual", "", "—" if not isinstance(residual, (int, float)) else f"{residual:.1e}",
                 "relative, recomputed from the states"])
    return ["term", "name", "kJ", ""], rows


def entropy_rows(data: dict) -> tuple[list[str], list[list[str]]]:
    """Headers and rows of the entropy balance, in kJ/K (with a note column where the solve
    records its round-off scales)."""
    ro = round_off(data)
    rows = []
    for label, key in (("ΔS system", "dS_system"), ("ΔS surroundings", "dS_surroundings"), ("S_gen", "S_gen")):
        x = _q(data, key)
        zero = _zero(x, ro, "J/K")
        shown = _kJ(x, zero) if key in data or key == "dS_system" else "not evaluated"
        rows.append([label, shown] + ([] if ro is None else ["round-off" if zero else ""]))
    return ["term", "kJ/K"] + ([] if ro is None else [""]), rows

