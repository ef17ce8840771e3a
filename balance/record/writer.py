"""Writing an entry: its lines as the layout (:mod:`.layout`) gives them, and its seal.

The data part is a TOML fragment written compactly, in the shape of a
worksheet file, and checked to read back to the same data (else the plain
TOML writer is used). A :class:`~balance.record.record.Record` reads every
new entry back with the reader (:mod:`.reader`) before it files it.
"""

from __future__ import annotations

import hashlib
import math
import tomllib
import unicodedata

from ..errors import InputError
from .layout import (KINDS, MAX_DATA, TAG_AT, TAG_BY, TAG_FOLLOWS, check_depth, data_line, header_line,
                     normal_text, text_line)


# -- the data part: a TOML fragment ---------------------------------------------------
def _scalar(value) -> str:
    import tomli_w

    if isinstance(value, float) and not math.isfinite(value):
        return "nan" if math.isnan(value) else ("inf" if value > 0 else "-inf")
    return tomli_w.dumps({"k": value})[4:-1]


def _key(key: str) -> str:
    import tomli_w

    return tomli_w.dumps({key: 0})[: -len(" = 0\n")]


def prune(value, depth: int = 1):
    """TOML has no null: None values of tables are left out; tuples become lists.
    Refuses data nested deeper than a record holds (:data:`.layout.MAX_DEPTH`)."""
    if isinstance(value, dict):
        check_depth(depth)
        return {str(k): prune(v, depth + 1) for k, v in value.items() if v is not None}
    if isinstance(value, (list, tuple)):
        check_depth(depth)
        return [prune(v, depth + 1) for v in value]
    return value


def _is_scalar(v) -> bool:
    return isinstance(v, (str, int, float, bool))


def _inline(v) -> bool:
    return isinstance(v, dict) and len(v) <= 4 and all(_is_scalar(x) for x in v.values())


def _literal(v, indent: str = "", depth: int = 2) -> list[str]:
    """A value as one or more lines (the first continues ``key = ``)."""
    check_depth(depth)
    if _is_scalar(v):
        return [_scalar(v)]
    if isinstance(v, dict):
        return ["{ " + ", ".join(f"{_key(k)} = {_literal(x, depth=depth + 1)[0]}" for k, x in v.items()) + " }"
                if v else "{}"]
    if isinstance(v, list):
        if not v:
            return ["[]"]
        if all(_is_scalar(x) for x in v) and sum(len(_scalar(x)) for x in v) < 60:
            return ["[" + ", ".join(_scalar(x) for x in v) + "]"]
        lines = ["["]
        for x in v:
            item = _literal(x, indent + "    ", depth + 1)
            lines.append(indent + "    " + item[0] + ("," if len(item) == 1 else ""))
            lines.extend(item[1:-1])
            if len(item) > 1:
                lines.append(item[-1] + ",")
        lines.append(indent + "]")
        return lines
    raise TypeError(f"cannot write {type(v).__name__} in a record")


def _quantity_like(v) -> bool:
    return isinstance(v, dict) and (not v or set(v) <= {"value", "unit"})


def _table_lines(table: dict, name: str, depth: int = 1) -> list[str]:
    check_depth(depth)
    lines: list[str] = []
    later: list[tuple[str, object]] = []
    for k, v in table.items():
        # a worksheet section at the top is a [table], as in a worksheet file; quantities stay inline
        if isinstance(v, dict) and not (_quantity_like(v) if not name else _inline(v)):
            later.append((k, v))
        elif isinstance(v, list) and v and all(isinstance(x, dict) for x in v) and \
                all(all(_is_scalar(y) or _inline(y) for y in x.values()) for x in v):
            later.append((k, v))
        else:
            lit = _literal(v, depth=depth + 1)
            lines.append(f"{_key(k)} = {lit[0]}")
            lines.extend(lit[1:])
    for k, v in later:
        full = f"{name}.{_key(k)}" if name else _key(k)
        if lines:
            lines.append("")
        if isinstance(v, list):
            for i, item in enumerate(v):
                if i:
                    lines.append("")
                lines.append(f"[[{full}]]")
                for ik, iv in item.items():
                    lines.append(f"{_key(ik)} = {_literal(iv, depth=depth + 3)[0]}")
        else:
            sub = _table_lines(v, full, depth + 1)
            if not sub or sub[0].startswith("["):  # only sub-tables: the header is implied
                lines.extend(sub if sub else [f"[{full}]"])
            else:
                lines.append(f"[{full}]")
                lines.extend(sub)
    return lines


def data_lines(data: dict) -> list[str]:
    """The machine-readable part of an entry: TOML lines that read back to ``data``.

    Values of None are left out (TOML has no null). Small tables of scalars
    (a quantity's ``{value, unit}``) are written inline; lists of tables
    as ``[[name]]`` blocks, as in a worksheet file.
    """
    data = prune(data)
    lines = [_escape(line) for line in _table_lines(data, "")]
    try:
        same = tomllib.loads("\n".join(lines)) == data
    except tomllib.TOMLDecodeError:
        same = False
    if not same:  # a shape the compact writer does not cover: the plain writer
        import tomli_w

        lines = [_escape(line) for line in tomli_w.dumps(data).rstrip("\n").split("\n")]
    size = sum(map(len, lines)) + len(lines) - 1  # as a reader joins them
    if size > MAX_DATA:
        raise InputError("data", f"takes {size} characters in the record; a record holds at most {MAX_DATA} "
                                 "in one entry")
    return lines


def _escape(line: str) -> str:
    """Control and line-separator characters (only ever inside TOML strings here) as \\uXXXX escapes,
    so that no program sees a line break inside a line of the record."""
    if line.isprintable():
        return line
    return "".join(f"\\u{ord(ch):04x}" if unicodedata.category(ch) in ("Cc", "Zl", "Zp") else ch
                   for ch in line)


# -- an entry ----------------------------------------------------------------------------
def entry_lines(seq: int, time: str, author: str, kind: str, text: str, data: dict, prev: str) -> list[str]:
    """The sealed lines of an entry, from ``entry`` to ``follows`` (without newlines)."""
    if kind not in KINDS:
        raise ValueError(f"unknown entry kind {kind!r}")
    lines = [header_line(seq, kind), TAG_AT + time, TAG_BY + author]
    lines += [text_line(line) for line in normal_text(text).split("\n")]
    lines += [data_line(line) for line in data_lines(data)]
    lines.append(TAG_FOLLOWS + prev)
    return lines


def seal(lines: list[str]) -> tuple[bytes, str]:
    """The sealed bytes of an entry's lines (each ending in a newline) and their SHA-256."""
    body = "".join(line + "\n" for line in lines).encode("utf-8")
    return body, hashlib.sha256(body).hexdigest()
