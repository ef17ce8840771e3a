"""A sweep: one worksheet solved over a grid of inputs (or inputs that go together).

Each ``--vary PATH=VALUES`` names a field (:mod:`.paths`) and its values (:mod:`.ranges`). Several
make a grid, the last varying fastest, or go together value by value (``together``: each the same
count). Every case is the worksheet with those fields set, read again by every rule of reading a
worksheet, and solved by the function the façade hands in; a case that cannot be read or solved
is a row with its message: a sweep never stops on one bad case.

On a process pool (``jobs`` > 1) the cases go out as their worksheets' TOML text and come back in
their order, so the rows are those of the serial run, number for number.
"""

from __future__ import annotations

import itertools
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass
from typing import Callable, Sequence

from ..errors import InputError
from ..worksheet import Worksheet
from .paths import FieldPath, parse_path, with_value
from .ranges import MAX_POINTS, values

#: Cases handed to a worker at a time (few round trips, and still an even spread).
CHUNK = 8


@dataclass(frozen=True)
class Vary:
    """One field varied, and the texts it takes."""

    path: FieldPath
    texts: tuple[str, ...]


@dataclass(frozen=True)
class Row:
    """One case: the varied fields' texts, and its numbers or why there are none."""

    inputs: tuple[str, ...]
    ok: bool
    message: str
    values: dict
    """column -> number (:func:`balance.study.table.flatten`)"""
    main: tuple[str, ...] = ()
    """the columns of the kind's main results (:func:`balance.study.table.main_results`)"""


@dataclass(frozen=True)
class Sweep:
    """The rows of a sweep, in the order of its cases."""

    varies: tuple[Vary, ...]
    rows: tuple[Row, ...]

    @property
    def columns(self) -> list[str]:
        """Every number's column any case has, in the order they first appear."""
        seen: dict[str, None] = {}
        for r in self.rows:
            seen.update(dict.fromkeys(r.values))
        return list(seen)

    @property
    def main(self) -> list[str]:
        """The main results' columns (of the first case that solved)."""
        return list(next((r.main for r in self.rows if r.ok), ()))

    def failed(self) -> int:
        return sum(not r.ok for r in self.rows)

    def csv(self, handle) -> None:
        """One row per case: the varied fields as typed, solved or not and why, then every number;
        units in the header (each number's column names its unit in brackets)."""
        import csv

        columns = self.columns
        w = csv.writer(handle)
        w.writerow([str(v.path) for v in self.varies] + ["solved", "message"] + columns)
        for r in self.rows:
            w.writerow([*r.inputs, "yes" if r.ok else "no", r.message]
                       + [repr(r.values[c]) if c in r.values else "" for c in columns])


def read_varies(ws: Worksheet, specs: Sequence[str], points: int | None) -> tuple[Vary, ...]:
    """``PATH=VALUES`` each (see the module docstring), checked against the worksheet."""
    from .paths import get_value

    if not specs:
        raise InputError("--vary", "give at least one, like --vary initial.V-101.P='150 barg..180 barg'")
    out = []
    for spec in specs:
        path_text, eq, text = spec.partition("=")
        if not eq:
            raise InputError("--vary", f"{spec!r}: expected PATH=VALUES, like initial.V-101.P='150 barg..180 barg'")
        path = parse_path(path_text)
        get_value(ws, path)  # the path names a field of this worksheet (raises, listing what it has)
        out.append(Vary(path, tuple(values(text, points, f"--vary {path_text.strip()}"))))
    return tuple(out)


def cases(ws: Worksheet, varies: Sequence[Vary], together: bool = False) -> list[tuple[tuple[str, ...], object]]:
    """Each case's inputs and its worksheet (or the InputError it cannot be read past)."""
    if together:
        counts = {len(v.texts) for v in varies}
        if len(counts) > 1:
            raise InputError("--together", "the fields varied together need as many values each; got "
                                           + ", ".join(f"{v.path}: {len(v.texts)}" for v in varies))
        combos = list(zip(*(v.texts for v in varies)))
    else:
        total = 1
        for v in varies:
            total *= len(v.texts)
        if total > MAX_POINTS:
            raise InputError("--vary", f"the grid has {total} cases; at most {MAX_POINTS}")
        combos = list(itertools.product(*(v.texts for v in varies)))
    out = []
    for combo in combos:
        case: object = ws
        try:
            for v, text in zip(varies, combo):
                case = with_value(case, v.path, text, f"--vary {v.path}")
        except InputError as exc:
            case = exc
        out.append((combo, case))
    return out


def run(ws: Worksheet, varies: Sequence[Vary], solve_case: Callable[[str], dict], *, together: bool = False,
        jobs: int = 1, progress: Callable[[int, int], None] | None = None) -> Sweep:
    """Solve every case (see the module docstring). ``solve_case`` takes a case's TOML text and
    returns {"ok", "message", "values", "main"}; it must be a module-level function for a pool."""
    if jobs < 1:
        raise InputError("--jobs", f"must be 1 or more; got {jobs}")
    listed = cases(ws, varies, together)
    texts = [case.to_toml() for _, case in listed if isinstance(case, Worksheet)]
    total = len(listed)
    solved: list[dict] = []

    unread = total - len(texts)  # cases refused before a solve count as done at once

    def tick() -> None:
        if progress is not None:
            progress(unread + len(solved), total)

    if jobs == 1 or len(texts) < 2:
        for text in texts:
            solved.append(solve_case(text))
            tick()
    else:
        with ProcessPoolExecutor(max_workers=jobs) as pool:
            for out in pool.map(solve_case, texts, chunksize=max(1, min(CHUNK, len(texts) // (4 * jobs) or 1))):
                solved.append(out)
                tick()
    rows, k = [], 0
    for combo, case in listed:
        if isinstance(case, Worksheet):
            out = solved[k]
            k += 1
            rows.append(Row(tuple(combo), out["ok"], out["message"], out["values"], tuple(out.get("main", ()))))
        else:
            rows.append(Row(tuple(combo), False, f"{case.field}: {case.message}", {}))
    return Sweep(tuple(varies), tuple(rows))
