"""A field of a worksheet by its path, read and replaced.

A path is the one messages name a field by, in either spelling:

    fluid.model            fluid.overrides.Tc        fluid.composition.CH4     fluid.kij.CH4-CO2
    final.T                process.polytropic_n      end.P                     worksheet.atmosphere
    initial.V-101.P        initial 'V-101'.P         initial[1].P              (a list's item by name or number)
    heat.jacket.Q          work.stirrer.W            stream.feed.rate          device.K-1.eta
    vessel.R-41.P          line.stack.orifice

A list's item is found by its name first (names may hold dots: the longest name that fits is
taken), then by its number from 1. The worksheet is immutable: :func:`with_value` returns a new
one, rebuilt through its TOML layout so that every check of reading a worksheet applies.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..errors import InputError
from ..worksheet import LISTS, SECTIONS, Worksheet

#: The sections whose TOML layout is a list of tables (the worksheet's names).
_LIST_KEYS = {"initial": "initial", "heat": "heat", "work": "work", "stream": "stream", "device": "device",
              "vessel": "vessel", "line": "line"}
_QUOTED = re.compile(r"^(\w+) '([^']*)'\.(.+)$")
_NUMBERED = re.compile(r"^(\w+)\[(\d+)\]\.(.+)$")


@dataclass(frozen=True)
class FieldPath:
    """A field: its section, the item of a list section (a name, or a number from 1), its keys."""

    section: str
    item: str | int | None
    keys: tuple[str, ...]
    text: str
    """the path as typed"""

    def __str__(self) -> str:
        return self.text


def parse_path(text: str, field: str = "--vary") -> FieldPath:
    """The :class:`FieldPath` of ``text`` (its item not yet looked up). Raises InputError naming ``field``."""
    path = text.strip()
    m = _QUOTED.match(path) or _NUMBERED.match(path)
    if m:
        section, item, rest = m.group(1), m.group(2), m.group(3)
        if section not in LISTS:
            raise InputError(field, f"{path!r}: {section} holds no list of items; the lists are {', '.join(LISTS)}")
        return FieldPath(section, int(item) if _NUMBERED.match(path) else item, tuple(rest.split(".")), path)
    head, _, rest = path.partition(".")
    if head not in SECTIONS:
        raise InputError(field, f"{path!r}: expected a path like initial.V-101.P, heat.jacket.Q or fluid.model "
                                f"(a section of {', '.join(SECTIONS)}, then its field)")
    if not rest:
        raise InputError(field, f"{path!r}: name a field of {head}, like {head}.{'P' if head != 'fluid' else 'model'}")
    if head in LISTS:
        return FieldPath(head, rest, (), path)  # the item and key are split against the worksheet's names
    return FieldPath(head, None, tuple(rest.split(".")), path)


def _item(items: list, path: FieldPath, field: str) -> tuple[int, tuple[str, ...]]:
    """The index of the list item ``path`` names, and the keys after it."""
    if isinstance(path.item, int):
        if not 1 <= path.item <= len(items):
            raise InputError(field, f"{path}: {path.section} has {len(items)} item(s); no number {path.item}")
        return path.item - 1, path.keys
    if path.keys:  # quoted: the name is whole
        for i, it in enumerate(items):
            if it.get("name") == path.item:
                return i, path.keys
    else:
        rest = path.item
        best = None
        for i, it in enumerate(items):
            name = str(it.get("name", ""))
            if name and rest.startswith(name + ".") and (best is None or len(name) > len(items[best]["name"])):
                best = i
        if best is not None:
            return best, tuple(rest[len(items[best]["name"]) + 1:].split("."))
    names = ", ".join(repr(it.get("name", "")) for it in items) or "none"
    raise InputError(field, f"{path}: no {path.section} of that name; the worksheet's are {names}")


def _slot(ws: Worksheet, path: FieldPath, field: str) -> tuple[dict, dict, str]:
    """(the worksheet's TOML layout, the table holding the field, the field's key)."""
    data = ws.to_dict()
    if path.section in LISTS:
        items = data.get(_LIST_KEYS[path.section], [])
        i, keys = _item(items, path, field)
        table = items[i]
    else:
        table = data.setdefault(path.section, {})
        keys = path.keys
    for k in keys[:-1]:
        nxt = table.get(k)
        if nxt is None:
            nxt = table[k] = {}
        if not isinstance(nxt, dict):
            raise InputError(field, f"{path}: {k} is a value, not a table of fields")
        table = nxt
    if not keys or not keys[-1]:
        raise InputError(field, f"{path}: name the field, like {path.text}.P")
    return data, table, keys[-1]


def get_value(ws: Worksheet, path: FieldPath | str, field: str = "--vary"):
    """The field's text as the worksheet holds it ('' when it is not given)."""
    path = parse_path(path, field) if isinstance(path, str) else path
    _, table, key = _slot(ws, path, field)
    return table.get(key, "")


def with_value(ws: Worksheet, path: FieldPath | str, text: str, field: str = "--vary") -> Worksheet:
    """A copy of ``ws`` with the field at ``path`` set to ``text``; read back by every rule of
    reading a worksheet (a key the section does not take is refused, naming it)."""
    path = parse_path(path, field) if isinstance(path, str) else path
    data, table, key = _slot(ws, path, field)
    table[key] = text
    try:
        return Worksheet.from_dict(data)
    except InputError as exc:
        raise InputError(field, f"{path}: {exc.field}: {exc.message}") from None


def values_of(ws: Worksheet):
    """Every (path text, value text) the worksheet gives, in its layout's order: what may be
    varied, and where a value may carry an uncertainty."""
    data = ws.to_dict()

    def walk(prefix: str, table: dict):
        for k, v in table.items():
            if isinstance(v, dict):
                yield from walk(f"{prefix}.{k}", v)
            elif isinstance(v, str):
                yield f"{prefix}.{k}", v

    for section, table in data.items():
        if isinstance(table, list):
            for n, item in enumerate(table):
                name = item.get("name")
                head = f"{section} '{name}'" if name else f"{section}[{n + 1}]"
                for k, v in item.items():
                    if k != "name" and isinstance(v, str):
                        yield f"{head}.{k}", v
                    elif isinstance(v, dict):
                        yield from walk(f"{head}.{k}", v)
        elif isinstance(table, dict):
            yield from walk(section, table)
