"""A record made under a house procedure: its pin, its part of the sign-off rules, its report.

The opening entry pins the procedure (id, version, the file's SHA-256 and its rule tables) and
marks a practice record. From the pin alone the record's rules can be applied wherever it is
read; with the procedure folders at hand, :func:`house_report` also says whether the record was
made under the version there now, and applies that version's checks too.
"""

from __future__ import annotations

from typing import Sequence

from ..errors import InputError
from ..procedures import Procedure, blocking, escalated_roles, find_or_none, findings, from_pin
from ..worksheet import Worksheet
from .format import OPENING, SOLVE, Entry
from .replay import fold


def _opening(entries: Sequence[Entry]) -> dict:
    return entries[0].data if entries and entries[0].kind == OPENING else {}


def pinned(entries: Sequence[Entry]) -> dict | None:
    """The procedure pin of the record's opening (None: made under no procedure)."""
    pin = _opening(entries).get("procedure")
    return pin if isinstance(pin, dict) else None


def practice_of(entries: Sequence[Entry]) -> str | None:
    """The exercise a practice record is for (None: not a practice record)."""
    practice = _opening(entries).get("practice")
    return practice.get("exercise") if isinstance(practice, dict) else None


def procedure_of(entries: Sequence[Entry]) -> Procedure | None:
    """The pinned procedure's rules (None: none pinned). Raises InputError when the pin does
    not read as a procedure's rules."""
    pin = pinned(entries)
    return from_pin(pin) if pin is not None else None


def _last_solve(entries: Sequence[Entry]) -> dict | None:
    solves = [e for e in entries if e.kind == SOLVE]
    return solves[-1].data if solves else None


def _worksheet(entries: Sequence[Entry]) -> Worksheet:
    return Worksheet.from_dict(fold(entries))


def house_signoff_problem(entries: Sequence[Entry], role: str, signer: str, signed: dict[str, Entry]) -> str | None:
    """Why the procedure's rules refuse this sign-off (None: they allow it). ``signed``: the
    sign-offs of the current revision so far, by role."""
    exercise = practice_of(entries)
    if exercise is not None:
        return f"this is a practice record (exercise {exercise}): a practice record can never be signed"
    pin = pinned(entries)
    if pin is None:
        return None
    try:
        procedure = from_pin(pin)
    except InputError as exc:
        return f"the pinned procedure {pin.get('id')} does not read: {exc}"
    if procedure.signoff.distinct:
        for other, entry in signed.items():
            if entry.data.get("signer", "").strip().casefold() == signer.strip().casefold():
                return (f"procedure {procedure.id} wants every role signed by a different person: {signer} signed "
                        f"this revision as {other} (entry {entry.seq})")
    data = _last_solve(entries)
    if data is None or "error" in data:
        return None  # the record's own rules refuse it
    try:
        ws = _worksheet(entries)
    except InputError as exc:
        return f"the worksheet cannot be rebuilt from the record to apply procedure {procedure.id}: {exc}"
    stops = blocking(findings(procedure, ws, data))
    if stops:
        first = stops[0]
        more = f" (and {len(stops) - 1} more)" if len(stops) > 1 else ""
        return (f"procedure {procedure.id} version {procedure.version} stops at rule {first.rule!r}: {first.message}"
                f"{more}; put it right, or justify the deviation in writing under [worksheet.deviations] "
                f"({first.rule} = \"why\")")
    return None


def house_report(entries: Sequence[Entry]) -> list[str]:
    """What ``record verify`` says of the procedure: the pin, whether it is the version in the
    folders now, and its rules applied again to the last solve (and the current version's, when
    that is another). A sign-off the pinned rules refuse is found where every sign-off's rules are
    checked again (:func:`.review.signoff_problem`)."""
    pin = pinned(entries)
    lines: list[str] = []
    exercise = practice_of(entries)
    if exercise is not None:
        lines.append(f"PRACTICE record (exercise {exercise}): never signed")
    if pin is None:
        return lines
    lines.append(f"house procedure: {pin.get('id')} version {pin.get('version')} (file sha256 {pin.get('sha256')})")
    try:
        procedure = from_pin(pin)
    except InputError as exc:
        return lines + [f"  the pinned procedure does not read: {exc}"]
    current = find_or_none(procedure.id)
    if current is None:
        lines.append("  not in the procedure folders here: its rules are applied as the record pinned them")
    elif current.sha256 == procedure.sha256:
        lines.append(f"  the current version ({current.path})")
    else:
        lines.append(f"  an OLDER version: the folders now have version {current.version} (sha256 {current.sha256}) "
                     f"at {current.path}")
    data = _last_solve(entries)
    try:
        ws = _worksheet(entries)
    except InputError as exc:
        return lines + [f"  the worksheet cannot be rebuilt from the record: {exc}; its rules were not applied"]
    found = findings(procedure, ws, data)
    lines.append(f"  rules re-applied (as pinned) to the last solve: {_tally(found)}")
    lines += [f"    {f.line()}" for f in found]
    if current is not None and current.sha256 != procedure.sha256:
        now = findings(current, ws, data)
        lines.append(f"  rules of the current version {current.version}: {_tally(now)}")
        lines += [f"    {f.line()}" for f in now]
    signed = _signed_now(entries)
    for role, why in escalated_roles(procedure, data):
        state = f"signed (entry {signed[role]})" if role in signed else "NOT signed yet"
        lines.append(f"  {role} is required, {state}: {why}")
    missing = [r for r in procedure.signoff.roles if r not in signed]
    if missing:
        lines.append(f"  not yet signed as {', '.join(missing)}")
    return lines


def _signed_now(entries: Sequence[Entry]) -> dict[str, int]:
    """The roles signed since the calculation last changed, and the entry of each."""
    from .review import signed_now

    return {role: e.seq for role, e in signed_now(entries).items()}


def _tally(found) -> str:
    counts: dict[str, int] = {}
    for f in found:
        counts[f.outcome] = counts.get(f.outcome, 0) + 1
    return ", ".join(f"{n} {outcome}" for outcome, n in counts.items()) or "no rules apply"
