"""What a sweep varies a field over, as typed after ``--vary PATH=``.

* ``FROM..TO`` with ``--points N``: N values evenly spaced in the unit as typed, ends included
  (``150 barg..180 barg``; a bare number takes the other end's unit: ``150..180 barg``;
  ``-20 degC..40 degC``);
* a list, ``A,B,C``: each value as typed (``ideal-gas,peng-robinson,reference``,
  ``150 barg,165 barg``) — ``--points`` does not apply.

Each value is handed to the worksheet as text, so it is read by every rule a typed value is.
"""

from __future__ import annotations

import re

from ..errors import InputError

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
#: The most cases one --vary gives (a grid multiplies them).
MAX_POINTS = 100_000


def _split(end: str, field: str) -> tuple[float, str]:
    m = _NUMBER.match(end)
    if not m:
        raise InputError(field, f"{end.strip()!r} is not a number with an optional unit, like '150 barg'")
    return float(m.group(1)), m.group(2)


def values(spec: str, points: int | None, field: str = "--vary") -> list[str]:
    """The texts a field takes: from ``FROM..TO`` and ``points``, or from a list ``A,B,C``."""
    text = spec.strip()
    if not text:
        raise InputError(field, "give the values: FROM..TO (with --points) or a list A,B,C")
    if ".." in text:
        lo_text, _, hi_text = text.partition("..")
        lo, lo_unit = _split(lo_text, field)
        hi, hi_unit = _split(hi_text, field)
        if lo_unit and hi_unit and lo_unit != hi_unit:
            raise InputError(field, f"{text!r}: both ends in one unit, please ({lo_unit!r} and {hi_unit!r})")
        unit = lo_unit or hi_unit
        if points is None:
            raise InputError("--points", f"a range ({text}) needs --points N, the number of values from end to end")
        if not 2 <= points <= MAX_POINTS:
            raise InputError("--points", f"must be from 2 to {MAX_POINTS}; got {points}")
        step = (hi - lo) / (points - 1)
        return [f"{lo + k * step if k < points - 1 else hi:.12g}{' ' + unit if unit else ''}" for k in range(points)]
    items = [t.strip() for t in text.split(",")]
    if any(not t for t in items):
        raise InputError(field, f"{text!r}: a list has an empty value (two commas, or one at an end)")
    if len(items) > MAX_POINTS:
        raise InputError(field, f"a list takes at most {MAX_POINTS} values")
    return items
