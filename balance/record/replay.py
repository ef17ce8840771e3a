"""Replay: the worksheet is the fold of the record's step entries; results are re-solved and compared.

The worksheet is never stored anywhere else: :func:`fold` takes every step
entry in order, a later entry of a section replacing an earlier one, and
:func:`worksheet_of` reads the result with ``Worksheet.from_dict``.

:func:`replay` rebuilds the inputs each solve entry was computed from,
solves them again with the running joulebook and compares every recorded
value with the new one (:func:`compare`). A number reproduces when it
differs from the recorded one by no more than ``tolerance`` times the
larger of its own magnitude and the largest recorded magnitude of the same
unit in that result (so a ΔU that is round-off near zero is judged against
the energies around it); numbers inside text (equations, warnings) are
compared the same way at the precision they are printed with (6 significant
digits). Text, phases and names must be equal, except the explanation and the
cautions of a solve worded in another edition (its ``wording``; see
:data:`REWORDED`): those are listed in a note, and its quantities judged.

A record whose chain is broken (:func:`balance.record.chain.chain_break`)
does not reproduce, whatever its numbers: the entries from the break on are
not those that were filed, so they are not replayed, and the report names
the break instead of calling any result reproduced.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Sequence

from .. import api
from ..errors import BalanceError
from ..kinds import KINDS
from ..worksheet import Worksheet
from .chain import chain_break
from .format import OPENING, SOLVE, Entry, prune
from .layout import check_depth

#: Keys of a solve entry that pin what the numbers depend on (compared separately).
PIN_KEYS = ("joulebook", "species_data_sha256")
#: Keys whose differences are reported but do not count as a failure to reproduce.
INFORMATIONAL = ("iterations", "method")
#: The energy balance closes below this relative residual (as the solver requires).
RESIDUAL_LIMIT = 1e-7
#: A steady-flow device's balances recomputed from its flows: judged as the residual is.
DEVICE_RESIDUALS = ("residual_mass", "residual_energy")
DEFAULT_TOLERANCE = 1e-9
#: A transient's history (its end, its extremes and when, its rows) is an integration to a relative
#: tolerance of 1e-8: it is compared to this (relative; an entropy against 1 J/K at least), and
#: its energy closure judged below CLOSURE_LIMIT rather than compared.
HISTORY_TOLERANCE = 1e-6
CLOSURE_LIMIT = 1e-6
#: A budget's coefficients are differences of two solves over 2h (h = u/10): a difference in the
#: results' last digits comes back multiplied by y/(c h), some 10³ for a 1 % uncertainty, so the
#: budget (under ``uncertainty``) is compared to this (relative), the results themselves as ever.
UNCERTAINTY_TOLERANCE = 1e-6
#: Numbers printed with 6 significant digits can differ by this much after rounding.
PRINTED = 1e-5
#: A solve's ``wording`` (absent: 1) is the edition of the words of its texts. A record worded
#: in another edition has these keys listed as notes, not judged: the explanation and the
#: cautions are words around numbers the quantities hold, and are judged as quantities.
REWORDED = ("wording", "equations", "cautions", "round_off")

_NUMBER = re.compile(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?")


def fold(entries: Sequence[Entry]) -> dict:
    """The worksheet's sections as plain data: each section from its latest step entry."""
    merged: dict = {}
    for e in entries:
        if e.section:
            merged[e.section] = e.data[e.section]
    return merged


def sections_of(ws: Worksheet) -> dict:
    """A worksheet's sections as plain data, as its step entries hold them: the sections its kind
    of balance reads (a steady-flow worksheet has no compartments or final state to record); every
    section for a kind that cannot be balanced (its failed solve is recorded with what was typed)."""
    sheet = ws.to_dict()
    kind = KINDS.get(ws.system.kind)
    return sheet if kind is None else {k: v for k, v in sheet.items() if k in kind.sections}


def worksheet_of(entries: Sequence[Entry]) -> Worksheet:
    """The worksheet as of the end of ``entries`` (raises InputError naming the field)."""
    return Worksheet.from_dict(fold(entries))


def solve_data(sections: dict) -> dict:
    """A solve entry's data for these sections, solved here and now through the façade
    (:func:`balance.api.attempt`, then :func:`balance.api.entry_data`; values of None
    left out: TOML has no null). Replay's own job; a face that has solved already files
    its attempt with :func:`balance.api.entry_data` instead.
    """
    return prune(api.entry_data(api.attempt(sections)))


# -- comparison ------------------------------------------------------------------------
@dataclass(frozen=True)
class Difference:
    """One value that differs between a recorded result and another one."""

    path: str
    recorded: object
    now: object
    unit: str = ""
    note: str = ""

    def line(self, before: str = "recorded", after: str = "now") -> str:
        def show(v) -> str:
            if v is None:
                return "(absent)"
            if isinstance(v, float):
                return f"{v:.10g}" + (f" {self.unit}" if self.unit else "")
            return repr(v) if isinstance(v, str) else str(v)

        text = f"{self.path}: {before} {show(self.recorded)}, {after} {show(self.now)}"
        return text + (f" ({self.note})" if self.note else "")


def _is_quantity(v) -> bool:
    return isinstance(v, dict) and set(v) == {"value", "unit"} and isinstance(v["value"], (int, float)) \
        and not isinstance(v["value"], bool)


def _scales(data, out: dict | None = None, depth: int = 1) -> dict:
    out = {} if out is None else out
    if _is_quantity(data):
        out[data["unit"]] = max(out.get(data["unit"], 0.0), abs(float(data["value"])))
    elif isinstance(data, dict):
        check_depth(depth)
        for v in data.values():
            _scales(v, out, depth + 1)
    elif isinstance(data, list):
        check_depth(depth)
        for v in data:
            _scales(v, out, depth + 1)
    return out


def _close(a: float, b: float, tol: float, scale: float) -> bool:
    if a == b:
        return True
    if a != a or b != b:  # nan
        return False
    return abs(a - b) <= tol * max(abs(a), abs(b), scale)


def same_text(a: str, b: str, tol: float) -> bool:
    """Equal text, with numbers equal to printed precision (or ``tol``, if looser)."""
    if a == b:
        return True
    na, nb = _NUMBER.findall(a), _NUMBER.findall(b)
    if _NUMBER.sub("#", a) != _NUMBER.sub("#", b) or len(na) != len(nb):
        return False
    xa, xb = [float(x) for x in na], [float(x) for x in nb]
    scale = max([abs(x) for x in xa + xb] + [0.0])
    t = max(tol, PRINTED)
    return all(_close(x, y, t, scale) for x, y in zip(xa, xb))


def compare(recorded: dict, now: dict, tolerance: float = DEFAULT_TOLERANCE) -> tuple[list[Difference], list[Difference]]:
    """Differences between two solve data: (those that fail reproduction, informational ones)."""
    scales = _scales(recorded)
    failing: list[Difference] = []
    info: list[Difference] = []
    editions = tuple(d.get("wording", 1) if isinstance(d, dict) else 1 for d in (recorded, now))
    if editions[0] != editions[1] and "wording" not in recorded:
        recorded = {**recorded, "wording": editions[0]}  # so that the walk meets it

    transient = isinstance(recorded, dict) and recorded.get("kind") == "transient"

    def walk(path: str, a, b, depth: int = 1):
        key = path.rsplit(".", 1)[-1]
        if path in PIN_KEYS:
            return
        if transient and path.startswith("history."):
            if key == "closure":
                if not (isinstance(a, (int, float)) and isinstance(b, (int, float))
                        and a < CLOSURE_LIMIT and b < CLOSURE_LIMIT):
                    failing.append(Difference(path, a, b, note=f"must be below {CLOSURE_LIMIT:g}"))
                elif a != b:
                    info.append(Difference(path, a, b, note="both close the energy balance"))
                return
            if key == "evaluations":
                if a != b:
                    info.append(Difference(path, a, b, note="the integrator's own count"))
                return
            if key == "S_gen" and _is_quantity(a) and _is_quantity(b):
                if abs(float(a["value"]) - float(b["value"])) > HISTORY_TOLERANCE * max(
                        abs(float(a["value"])), abs(float(b["value"])), 1.0):
                    failing.append(Difference(path, float(a["value"]), float(b["value"]), a["unit"]))
                return
            walk_at(path, a, b, depth, max(tolerance, HISTORY_TOLERANCE))
            return
        if path.startswith("uncertainty."):
            walk_at(path, a, b, depth, max(tolerance, UNCERTAINTY_TOLERANCE))
            return
        walk_at(path, a, b, depth, tolerance)

    def walk_at(path: str, a, b, depth: int, tolerance: float):
        key = path.rsplit(".", 1)[-1]
        if path in REWORDED and editions[0] != editions[1]:
            if path == "wording":
                info.append(Difference(path, editions[0], editions[1], note="the explanation and the cautions "
                                       "are worded otherwise: not compared word for word"))
            return
        if path in INFORMATIONAL:
            if a != b:
                info.append(Difference(path, a, b, note="does not affect the result"))
            return
        if path == "residual" or key in DEVICE_RESIDUALS:
            if not (isinstance(a, (int, float)) and isinstance(b, (int, float))
                    and a < RESIDUAL_LIMIT and b < RESIDUAL_LIMIT):
                failing.append(Difference(path, a, b, note=f"must be below {RESIDUAL_LIMIT:g}"))
            elif a != b:
                info.append(Difference(path, a, b, note="both close the balance"))
            return
        if _is_quantity(a) and _is_quantity(b):
            if a["unit"] != b["unit"]:
                failing.append(Difference(path, a["unit"], b["unit"], note="unit"))
            elif not _close(float(a["value"]), float(b["value"]), tolerance, scales.get(a["unit"], 0.0)):
                failing.append(Difference(path, float(a["value"]), float(b["value"]), a["unit"]))
            return
        if isinstance(a, dict) and isinstance(b, dict):
            check_depth(depth)
            for k in a:
                walk(f"{path}.{k}" if path else k, a[k], b.get(k), depth + 1)
            for k in b:
                if k not in a:
                    walk(f"{path}.{k}" if path else k, None, b[k], depth + 1)
            return
        if isinstance(a, list) and isinstance(b, list):
            check_depth(depth)
            for i in range(max(len(a), len(b))):
                walk(f"{path}[{i + 1}]", a[i] if i < len(a) else None, b[i] if i < len(b) else None, depth + 1)
            return
        if isinstance(a, str) and isinstance(b, str):
            if not same_text(a, b, tolerance):
                failing.append(Difference(path, a, b))
            return
        if isinstance(a, bool) or isinstance(b, bool) or a is None or b is None:
            if a != b:
                failing.append(Difference(path, a, b))
            return
        if isinstance(a, (int, float)) and isinstance(b, (int, float)):
            if not _close(float(a), float(b), tolerance, 0.0):
                failing.append(Difference(path, a, b))
            return
        if a != b:
            failing.append(Difference(path, a, b, note=f"key {key}"))

    walk("", recorded, now)
    return failing, info


# -- replay ----------------------------------------------------------------------------
@dataclass(frozen=True)
class SolveReplay:
    """One solve entry solved again."""

    seq: int
    ok: bool
    status: str
    """'reproduced', 'differs', 'failed as recorded', 'fails differently', 'now fails' or 'now solves'"""
    differences: tuple[Difference, ...] = ()
    notes: tuple[Difference, ...] = ()


@dataclass(frozen=True)
class ReplayReport:
    """Whether every recorded result reproduces, and what differs."""

    ok: bool
    tolerance: float
    solves: tuple[SolveReplay, ...]
    pins: tuple[Difference, ...]
    """the recorded joulebook version and species data against the running ones"""
    worksheet: Worksheet | None
    worksheet_error: str = ""
    notes: tuple[str, ...] = field(default=())
    broken: tuple[int, str] | None = None
    """where the chain breaks (entry, reason), as :func:`.chain.chain_break` says; None when intact"""
    entries: int = 0
    """how many entries the record has (replayed or not)"""

    def lines(self) -> list[str]:
        out = [f"Replay with tolerance {self.tolerance:g} (relative; see README, 'Replay')."]
        if self.broken:
            seq, reason = self.broken
            rest = (f"entry {seq} was not: it is" if seq == self.entries else
                    f"entries {seq}–{self.entries} were not: they are")
            out.append(f"The chain is BROKEN at entry {seq}: {reason}.")
            out.append(f"Only the entries before it were replayed; {rest} not the record as filed.")
        if self.pins:
            out.append("Recorded with a different joulebook or species data:")
            out += ["  " + d.line() for d in self.pins]
        else:
            out.append("Same joulebook version and species data as recorded.")
        out += list(self.notes)
        if not self.solves:
            out.append("No solve entries: nothing to reproduce.")
        for s in self.solves:
            out.append(f"entry {s.seq} (solve): {s.status}")
            out += ["  " + d.line() for d in s.differences]
            out += ["  note: " + d.line() for d in s.notes]
        if self.worksheet_error:
            out.append(f"The replayed worksheet cannot be read: {self.worksheet_error}")
        if self.broken:
            out.append(f"NOT reproduced: the record's chain is broken at entry {self.broken[0]}; "
                       "no result of a broken record is confirmed (restore the filed copy).")
        else:
            out.append("All recorded results reproduce." if self.ok else "Some recorded results do NOT reproduce.")
        return out


def replay_entries(entries: Sequence[Entry], tolerance: float = DEFAULT_TOLERANCE) -> ReplayReport:
    """Solve each solve entry's inputs again and compare (see the module docstring); only
    the entries before a break of the chain are replayed."""
    if not tolerance >= 0:
        raise ValueError("the tolerance must be a number >= 0")
    count = len(entries)
    broken = chain_break(entries)
    if broken:
        entries = entries[:broken[0] - 1]
    now_pins = api.pins()
    pin_diffs: list[Difference] = []
    opening = next((e for e in entries if e.kind == OPENING), None)
    if opening is not None:
        for key in PIN_KEYS:
            if opening.data.get(key) != now_pins[key]:
                pin_diffs.append(Difference(f"opening.{key}", opening.data.get(key), now_pins[key]))
    solves = []
    for i, e in enumerate(entries):
        if e.kind != SOLVE:
            continue
        recorded = e.data
        for key in PIN_KEYS:
            if key in recorded and recorded[key] != now_pins[key]:
                pin_diffs.append(Difference(f"entry {e.seq}.{key}", recorded[key], now_pins[key]))
        now = solve_data(fold(entries[:i]))
        if "error" in recorded or "error" in now:
            if "error" in recorded and "error" in now:
                same = recorded["error"] == now["error"] and recorded.get("error_kind") == now.get("error_kind")
                status = "failed as recorded" if same else "fails differently"
                diffs = () if same else (Difference("error", recorded["error"], now["error"]),)
                solves.append(SolveReplay(e.seq, same, status, diffs))
            elif "error" in recorded:
                solves.append(SolveReplay(e.seq, False, "now solves",
                                          (Difference("error", recorded["error"], None),)))
            else:
                solves.append(SolveReplay(e.seq, False, "now fails",
                                          (Difference("error", None, now["error"]),)))
            continue
        failing, info = compare(recorded, now, tolerance)
        solves.append(SolveReplay(e.seq, not failing, "reproduced" if not failing else "differs",
                                  tuple(failing), tuple(info)))
    try:
        ws, ws_error = worksheet_of(entries), ""
    except BalanceError as exc:
        ws, ws_error = None, str(exc)
    ok = broken is None and all(s.ok for s in solves)
    notes = ()
    if any(e.kind == SOLVE and e.data.get("kind") == "transient" for e in entries):
        notes = (f"A transient's history (its end, extremes and rows) is compared to "
                 f"{max(tolerance, HISTORY_TOLERANCE):g} relative (an integration to rtol 1e-8), an entropy "
                 f"against 1 J/K at least; its energy closure is judged below {CLOSURE_LIMIT:g}.",)
    if any(e.kind == SOLVE and isinstance(e.data.get("uncertainty"), dict) for e in entries):
        notes += (f"An uncertainty budget (sensitivity coefficients by central differences) is compared to "
                  f"{max(tolerance, UNCERTAINTY_TOLERANCE):g} relative.",)
    return ReplayReport(ok, tolerance, tuple(solves), tuple(pin_diffs), ws, ws_error, notes=notes, broken=broken,
                        entries=count)
