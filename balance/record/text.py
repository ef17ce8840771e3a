"""The human-readable part of each entry, rendered from its data as plain text.

Everything here is a pure function of an entry's data and of the entries
before it, so a verifier can render an entry again and compare it with the
text in the file. No rich or textual: tables are drawn with spaces.

Units: the solve rendering takes the molar SI values of ``Result.as_json()``
(K, Pa, m**3/mol, J/mol, J/(mol*K), J, J/K) and shows them as engineers read
them: T in K and °C, P in bar(a), intensive properties per kg (kJ/kg,
kJ/(kg·K), m³/kg), energies in kJ, entropies in kJ/K.
"""

from __future__ import annotations

import textwrap
import unicodedata
from typing import Sequence

from ..worksheet import CONVENTIONS, UNKNOWN
from .format import (COMMENT, LIST_SECTIONS, NOTE, OPENING, RESOLUTION, SECTION_KINDS, SIGN_OFF,
                     SOLVE, Entry)

WRAP = 96


# -- a plain-text table ---------------------------------------------------------------
def width(text: str) -> int:
    """Columns a string takes in a terminal (East Asian wide characters count two)."""
    return sum(2 if unicodedata.east_asian_width(ch) in "WF" else
               0 if unicodedata.combining(ch) else 1 for ch in text)


def table(headers: Sequence[str], rows: Sequence[Sequence[str]], align: str = "", indent: str = "  ") -> list[str]:
    """Rows of text in aligned columns under a header and a rule of dashes.

    ``align`` has one letter a column, ``l`` or ``r`` (default ``l``).
    Trailing spaces are removed from every line.
    """
    ncol = len(headers)
    cells = [list(headers)] + [[str(c) for c in r] + [""] * (ncol - len(r)) for r in rows]
    widths = [max(width(r[i]) for r in cells) for i in range(ncol)]
    align = (align + "l" * ncol)[:ncol]

    def fmt(row) -> str:
        parts = []
        for i, cell in enumerate(row):
            pad = " " * (widths[i] - width(cell))
            parts.append(pad + cell if align[i] == "r" else cell + pad)
        return (indent + "  ".join(parts)).rstrip()

    out = [fmt(cells[0]), (indent + "  ".join("-" * w for w in widths)).rstrip()]
    out += [fmt(r) for r in cells[1:]]
    return out


def wrap(text: str, first: str = "  - ", rest: str = "    ") -> list[str]:
    return textwrap.wrap(text, WRAP, initial_indent=first, subsequent_indent=rest,
                         break_long_words=False, break_on_hyphens=False) or [first.rstrip()]


def g(x) -> str:
    """A number to six significant digits, as the equations show them."""
    if x is None:
        return "—"
    if isinstance(x, bool) or not isinstance(x, (int, float)):
        return str(x)
    s = f"{x:.6g}"
    return "0" if s in ("-0", "0") else s


# -- the opening ----------------------------------------------------------------------
def opening_text(data: dict) -> str:
    lines = [
        f"Record opened with joulebook {data['joulebook']} (record format {data['format']}).",
        f"Species data SHA-256: {data['species_data_sha256']}",
        "Property models: " + ", ".join(str(m) for m in data["models"]),
        "Sign-off roles, in order: " + ", ".join(data["roles"]),
        "Each entry is sealed: its 'sha256' line is the SHA-256 of its lines from 'entry' to",
        "'follows' (UTF-8, each line ending in a newline), and its 'follows' line repeats the",
        "seal of the entry before it (for entry 1, the SHA-256 of the record's first line).",
    ]
    return "\n".join(lines)


# -- steps: what changed in a section -------------------------------------------------
SECTION_TITLES = {
    "worksheet": "Purpose and basis",
    "system": "System boundary",
    "fluid": "Fluid and property model",
    "initial": "Initial state",
    "final": "Final state",
    "heat": "Heat terms (heat to the system is positive)",
    "work": "Work terms (in the worksheet's sign convention)",
    "process": "Constraints and process",
}
ITEM_NOUNS = {"initial": "compartment", "heat": "heat term", "work": "work term"}


def _value(key: str, v) -> list[str]:
    """A typed value as display lines (most values are one line)."""
    if isinstance(v, bool):
        return ["yes (evacuated: only its volume)" if key == "empty" and v else ("yes" if v else "no")]
    if isinstance(v, list):
        if key == "assumptions":
            return [f"{i + 1}. {a}" for i, a in enumerate(v)] or ["none"]
        return [", ".join(str(x) for x in v) or "none"]
    if isinstance(v, dict):
        return [", ".join(f"{k} = {x}" for k, x in v.items()) or "none"]
    text = str(v)
    if text.strip() == UNKNOWN:
        return ["?  (unknown: to be solved)"]
    if key == "convention" and text in CONVENTIONS:
        return [f"{text}: {CONVENTIONS[text]}"]
    return text.split("\n") if text else ['""']


def _short(key: str, v) -> str:
    lines = _value(key, v)
    return lines[0] + (" …" if len(lines) > 1 else "")


def _fields(new: dict, old: dict | None, indent: str, quiet: tuple[str, ...] = ()) -> list[str]:
    """Each field of a table, with what changed against the old table.

    Fields named in ``quiet`` (an item's name, already in its heading) are
    shown only when they changed.
    """
    rows: list[tuple[str, list[str], str]] = []
    for k, v in new.items():
        mark = ""
        if old is not None:
            if k not in old:
                mark = "(new)"
            elif old[k] != v:
                mark = f"(was: {_short(k, old[k])})"
        if k in quiet and not mark:
            continue
        rows.append((k, _value(k, v), mark))
    if old is not None:
        for k, v in old.items():
            if k not in new:
                rows.append((k, ["removed"], f"(was: {_short(k, v)})"))
    if not rows:
        return [indent + "(nothing given)"]
    kw = max(width(k) for k, _, _ in rows)
    out = []
    for k, vals, mark in rows:
        first = vals[0] + (f"   {mark}" if mark and len(vals) == 1 else "")
        out.append((indent + k + " " * (kw - width(k)) + "  " + first).rstrip())
        for cont in vals[1:]:
            out.append((indent + " " * (kw + 2) + cont).rstrip())
        if mark and len(vals) > 1:
            out.append(indent + " " * (kw + 2) + mark)
    return out


def _changed_keys(new: dict, old: dict) -> list[str]:
    return [k for k in new if k not in old or old[k] != new[k]] + [k for k in old if k not in new]


def step_text(section: str, new, old) -> str:
    """What a step entry sets, and what changed against the section's previous value.

    ``old`` is None when the section is set for the first time. Values are
    shown as typed, with their units.
    """
    title = SECTION_TITLES[section]
    if section in LIST_SECTIONS:
        return "\n".join(_list_text(section, title, new, old))
    if old is None:
        head = f"{title}: set"
    elif old == new:
        head = f"{title}: recorded again, unchanged"
    else:
        head = f"{title}: changed ({', '.join(_changed_keys(new, old))})"
    return "\n".join([head, *_fields(new, old, "  ")])


def _item_name(section: str, i: int, item: dict) -> str:
    name = item.get("name")
    return f"{ITEM_NOUNS[section]} {i + 1}" + (f" '{name}'" if name else "")


def _list_text(section: str, title: str, new: list, old: list | None) -> list[str]:
    noun = ITEM_NOUNS[section]
    count = f"{len(new)} {noun}{'s' if len(new) != 1 else ''}"
    if old is None:
        lines = [f"{title}: set, {count}"]
    elif old == new:
        lines = [f"{title}: recorded again, unchanged, {count}"]
    else:
        lines = [f"{title}: changed, {count} (before: {len(old)})"]
    if not new and not old:
        lines.append(f"  (no {noun}s)")
    for i, item in enumerate(new):
        before = None if old is None or i >= len(old) else old[i]
        if old is None:
            status = ""
        elif before is None:
            status = ": added"
        elif before == item:
            status = ": unchanged"
        else:
            status = f": changed ({', '.join(_changed_keys(item, before))})"
        lines.append(f"  {_item_name(section, i, item)}{status}")
        lines += _fields(item, before, "    ", quiet=("name",))
    for i in range(len(new), len(old or ())):
        item = old[i]
        lines.append(f"  {_item_name(section, i, item)}: removed (was: "
                     + ", ".join(f"{k} = {_short(k, v)}" for k, v in item.items() if k != "name") + ")")
    return lines


# -- solve ------------------------------------------------------------------------------
def _q(d, key):
    """The number of a quantity {"value", "unit"} in d, or None."""
    v = d.get(key) if isinstance(d, dict) else None
    x = v.get("value") if isinstance(v, dict) else None
    return x if isinstance(x, (int, float)) and not isinstance(x, bool) else None


def _list(data: dict, key: str) -> list:
    v = data.get(key, [])
    return v if isinstance(v, list) else [v]


def _kJ(x) -> str:
    return "—" if x is None else g(x / 1e3)


def solve_text(data: dict, inputs_seq: int | None = None) -> str:
    """The result of a solve entry: states, energy and entropy balances, equations,
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
    out = [f"Solved{basis}: {data.get('title') or 'closed-system balance'}"]
    if pins:
        out.append(pins)
    out.append(f"Species {data.get('species', '?')}, model {data.get('model', '?')}; "
               f"{data.get('method', '')}")
    if data.get("reference_state"):
        out += wrap(f"Reference state: {data['reference_state']}", "", "  ")
    conv = str(data.get("convention", ""))
    out += wrap(f"Sign convention: {CONVENTIONS.get(conv, conv)}", "", "  ")
    if isinstance(data.get("overrides"), dict) and data["overrides"]:
        out.append("Overrides: " + ", ".join(f"{k} = {v}" for k, v in data["overrides"].items()))
    out += ["", "States"]
    out += _states(data.get("states", {}))
    out += ["", "Energy balance (heat to the system positive; work "
            + ("done by" if conv == "work-by-system" else "done on") + " the system positive)"]
    out += table(*energy_rows(data), "llrl")
    out += ["", "Entropy balance"]
    out += table(*entropy_rows(data), "lr")
    out += ["", "Equations with numbers"]
    out += ["  " + str(e) for e in _list(data, "equations")]
    out += ["", "Warnings"]
    for w in _list(data, "warnings") or ["none"]:
        out += wrap(str(w))
    out += ["", "Cautions"]
    for c in _list(data, "cautions") or ["none"]:
        out += wrap(str(c))
    return "\n".join(out)


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


def state_rows(states: dict) -> tuple[list[str], list[list[str]]]:
    """Headers and rows of the states table (display units; see the module docstring)."""
    names = list(states)
    rows = []
    for label, unit, key, factor, per_mass in _STATE_ROWS:
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


def _states(states: dict) -> list[str]:
    if not states:
        return ["  (none)"]
    headers, rows = state_rows(states)
    return table(headers, rows, "ll" + "r" * (len(headers) - 2))


def energy_rows(data: dict) -> tuple[list[str], list[list[str]]]:
    """Headers and rows of the energy balance, term by term, in kJ."""
    rows = []
    for t in data.get("terms", []):
        if not isinstance(t, dict):
            continue
        label = {"heat": "Q", "work": "W"}.get(str(t.get("kind")), "W boundary")
        note = "solved" if t.get("solved") else "given"
        if t.get("kind") == "heat" and _q(t, "T_boundary") is not None:
            note += f", crosses at {g(_q(t, 'T_boundary'))} K"
        elif t.get("detail"):
            note += f", {t['detail']}"
        rows.append([label, str(t.get("name", "")), _kJ(_q(t, "value")), note])
    rows.append(["ΔU", "", _kJ(_q(data, "dU")), "n u2 - Σ n u1"])
    rows.append(["  ideal-gas part", "", _kJ(_q(data, "dU_ideal_gas")), "Σ n (u_ig(T2) - u_ig(T1))"])
    rows.append(["  departure part", "", _kJ(_q(data, "dU_departure")), "Σ n (u_dep2 - u_dep1)"])
    residual = data.get("residual")
    rows.append(["residual", "", "—" if not isinstance(residual, (int, float)) else f"{residual:.1e}",
                 "relative, recomputed from the states"])
    return ["term", "name", "kJ", ""], rows


def entropy_rows(data: dict) -> tuple[list[str], list[list[str]]]:
    """Headers and rows of the entropy balance, in kJ/K."""
    rows = [["ΔS system", _kJ(_q(data, "dS_system"))],
            ["ΔS surroundings", _kJ(_q(data, "dS_surroundings")) if "dS_surroundings" in data else "not evaluated"],
            ["S_gen", _kJ(_q(data, "S_gen")) if "S_gen" in data else "not evaluated"]]
    return ["term", "kJ/K"], rows


# -- review and sign-off -----------------------------------------------------------------
def comment_text(data: dict, target: Entry | None) -> str:
    about = f"entry {data['on']}" + (f" ({target.kind})" if target else "")
    return "\n".join([f"Comment on {about}, open until resolved:", *wrap(data["text"], "  ", "  ")])


def resolution_text(data: dict, comment: Entry | None) -> str:
    about = f"comment {data['comment']}"
    if comment is not None and comment.kind == COMMENT:
        about += f" (on entry {comment.data.get('on')})"
    return "\n".join([f"Resolves {about}:", *wrap(data["note"], "  ", "  ")])


def signoff_text(data: dict, seq: int) -> str:
    covered = seq - 1
    lines = [f"{data['role'].capitalize()} by {data['signer']}: revision {data['revision']} "
             f"(entries 1–{covered}).",
             f"Covers the chain head: entry {covered}, sha256 {data['covers']}"]
    if data.get("unsigned") is True:
        lines.append("Not signed cryptographically: marked unsigned.")
    else:
        key = data.get("key")
        lines.append(f"Signed with ssh-keygen -Y sign, namespace {data.get('namespace', '?')}"
                     + (f", key {key}" if key else "") + ".")
    return "\n".join(lines)


def note_text(data: dict) -> str:
    return "\n".join(["Revision note:", *wrap(data["note"], "  ", "  ")])


# -- any entry -----------------------------------------------------------------------------
def render(kind: str, data: dict, before: Sequence[Entry]) -> str:
    """The human text of an entry of this kind and data, placed after ``before``."""
    if kind == OPENING:
        return opening_text(data)
    for section, k in SECTION_KINDS.items():
        if k == kind:
            old = None
            for e in reversed(before):
                if e.kind == kind:
                    old = e.data.get(section)
                    break
            return step_text(section, data[section], old)
    if kind == SOLVE:
        steps = [e.seq for e in before if e.section]
        return solve_text(data, steps[-1] if steps else None)
    by_seq = {e.seq: e for e in before}
    if kind == COMMENT:
        return comment_text(data, by_seq.get(data["on"]))
    if kind == RESOLUTION:
        return resolution_text(data, by_seq.get(data["comment"]))
    if kind == SIGN_OFF:
        return signoff_text(data, len(before) + 1)
    if kind == NOTE:
        return note_text(data)
    raise ValueError(f"unknown entry kind {kind!r}")
