"""Plain text for the record: aligned tables drawn with spaces, wrapped lines, numbers to six digits.

No rich or textual: the record's text must be the same wherever it is made.
"""

from __future__ import annotations

import textwrap
import unicodedata
from typing import Sequence

WRAP = 96


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


def listed(data: dict, key: str) -> list:
    """``data[key]`` as a list (a lone value as a list of one; missing: empty)."""
    v = data.get(key, [])
    return v if isinstance(v, list) else [v]


def closing(data: dict) -> list[str]:
    """What ends every solve's text: its equations with numbers, warnings and cautions."""
    out = ["", "Equations with numbers"]
    out += ["  " + str(e) for e in listed(data, "equations")]
    out += ["", "Warnings"]
    for w in listed(data, "warnings") or ["none"]:
        out += wrap(str(w))
    out += ["", "Cautions"]
    for c in listed(data, "cautions") or ["none"]:
        out += wrap(str(c))
    return out
