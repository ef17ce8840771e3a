"""The text of a step entry: what a worksheet section sets, and what changed against its previous value."""

from __future__ import annotations

from ..worksheet import CONVENTIONS, UNKNOWN
from .layout import LIST_SECTIONS
from .plain import width


SECTION_TITLES = {
    "worksheet": "Purpose and basis",
    "system": "System boundary",
    "fluid": "Fluid and property model",
    "initial": "Initial state",
    "final": "Final state",
    "heat": "Heat terms (heat to the system is positive)",
    "work": "Work terms (in the worksheet's sign convention)",
    "process": "Constraints and process",
    "stream": "Streams",
    "device": "Devices (each joins its inlet streams to its outlet streams)",
    "vessel": "Vessels (each at the start, and how its gas exchanges heat)",
    "line": "Lines (where the gas comes from and goes to, and what restricts it)",
    "end": "End condition",
    "history": "Integrator settings",
}
ITEM_NOUNS = {"initial": "compartment", "heat": "heat term", "work": "work term", "stream": "stream",
              "device": "device", "vessel": "vessel", "line": "line"}


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
