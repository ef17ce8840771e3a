"""Review: comments, revisions, the sign-off rules, and the diff between two points of a record.

Revisions: revision 1 starts with the record. A new revision starts with the
first entry that changes the calculation (a step, a solve or a revision
note) after a sign-off; comments, resolutions and further sign-offs stay in
the revision they follow. A sign-off covers the chain head hash before it,
that is every entry up to it.

Sign-off rules (checked when signing and again when verifying):

- the role is one of the record's roles (pinned in its opening entry;
  ``prepared``, ``checked``, ``approved`` by default), signed in that order
  within a revision, each at most once a revision;
- the checker may not be the preparer of the same revision;
- approval is refused while any comment is open;
- the inputs must have been solved after their last change, and that solve
  must have succeeded;
- under a house procedure (pinned in the opening, :mod:`.house`): every role by a different
  person when it says so, and no rule of it that stops (a failed stop check, a model outside
  the allowed ones, a required field blank) unless the worksheet justifies the deviation;
  a practice record is never signed.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from ..errors import InputError
from .chain import chain_break
from .house import house_signoff_problem
from .format import COMMENT, CONTENT_KINDS, OPENING, RESOLUTION, SIGN_OFF, SOLVE, Entry
from .layout import check_depth
from .replay import Difference, compare, fold
from .signing import ROLES


def revisions(entries: Sequence[Entry]) -> list[int]:
    """The revision of each entry (see the module docstring)."""
    out, rev, signed = [], 1, False
    for e in entries:
        if e.kind in CONTENT_KINDS and signed:
            rev, signed = rev + 1, False
        if e.kind == SIGN_OFF:
            signed = True
        out.append(rev)
    return out


def current_revision(entries: Sequence[Entry]) -> int:
    revs = revisions(entries)
    return revs[-1] if revs else 1


def signed_now(entries: Sequence[Entry]) -> dict[str, Entry]:
    """The sign-offs of the current revision, by role: what the next sign-off, the house rules
    and the record's next role all read."""
    revs = revisions(entries)
    rev = revs[-1] if revs else 1
    return {e.data.get("role"): e for e, r in zip(entries, revs) if e.kind == SIGN_OFF and r == rev}


def roles_of(entries: Sequence[Entry]) -> tuple[str, ...]:
    opening = entries[0] if entries and entries[0].kind == OPENING else None
    return tuple(opening.data["roles"]) if opening else ROLES


def open_comments(entries: Sequence[Entry]) -> list[Entry]:
    """Comment entries without a resolution."""
    resolved = {e.data["comment"] for e in entries if e.kind == RESOLUTION}
    return [e for e in entries if e.kind == COMMENT and e.seq not in resolved]


def comment_problem(entries: Sequence[Entry], on: int) -> str | None:
    if isinstance(on, bool) or not isinstance(on, int) or not 1 <= on <= len(entries):
        return f"there is no entry {on} to comment on (entries 1–{len(entries)})"
    return None


def resolution_problem(entries: Sequence[Entry], comment_seq: int) -> str | None:
    by_seq = {e.seq: e for e in entries}
    target = by_seq.get(comment_seq)
    if target is None or target.kind != COMMENT:
        return f"entry {comment_seq} is not a comment"
    if any(e.kind == RESOLUTION and e.data["comment"] == comment_seq for e in entries):
        return f"comment {comment_seq} is already resolved"
    return None


def same_person(a: str, b: str) -> bool:
    return a.strip().casefold() == b.strip().casefold()


def signoff_problem(entries: Sequence[Entry], role: str, signer: str) -> str | None:
    """Why a sign-off with this role and signer may not follow ``entries`` (None if it may)."""
    roles = roles_of(entries)
    if role not in roles:
        return f"unknown role {role!r}; this record's roles are {', '.join(roles)}"
    rev = current_revision(entries)
    signed = signed_now(entries)
    if role in signed:
        return f"revision {rev} is already signed as {role} (entry {signed[role].seq})"
    missing = [r for r in roles[:roles.index(role)] if r not in signed]
    if missing:
        return (f"{role} follows {', '.join(roles[:roles.index(role)])} in each revision; "
                f"revision {rev} has no {missing[0]} sign-off yet")
    if role == "checked" and "prepared" in signed and same_person(signed["prepared"].data["signer"], signer):
        return f"the checker may not be the preparer: {signer} prepared revision {rev} (entry {signed['prepared'].seq})"
    house = house_signoff_problem(entries, role, signer, signed)
    if house and house.startswith("this is a practice record"):
        return house
    if role == "approved":
        still = open_comments(entries)
        if still:
            return (f"{len(still)} comment{'s are' if len(still) > 1 else ' is'} still open (entry "
                    + ", ".join(str(c.seq) for c in still) + "): resolve them before approval")
    last_step = max((e.seq for e in entries if e.section), default=0)
    solves = [e for e in entries if e.kind == SOLVE]
    if not solves:
        return "nothing has been solved yet: solve before signing"
    if solves[-1].seq < last_step:
        return f"the inputs changed (entry {last_step}) after the last solve (entry {solves[-1].seq}): solve before signing"
    if "error" in solves[-1].data:
        return f"the last solve (entry {solves[-1].seq}) failed: a failed calculation cannot be signed"
    return house


# -- diff -------------------------------------------------------------------------------------
@dataclass(frozen=True)
class RecordDiff:
    """What inputs and results differ between the record as of two entries."""

    from_seq: int
    to_seq: int
    inputs: tuple[Difference, ...]
    results: tuple[Difference, ...]
    from_solve: int | None
    """the solve entry whose results stand at from_seq (None: none yet)"""
    to_solve: int | None
    from_revision: int
    to_revision: int
    broken: tuple[int, str] | None = None
    """where the record's chain breaks (entry, reason); None when intact"""
    records: tuple[str, str] = ()
    """the two records compared (from, to), when they are two (:func:`diff_records`); () for one"""
    to_broken: tuple[int, str] | None = None
    """where the second record's chain breaks, when there are two"""

    def lines(self) -> list[str]:
        out = []
        names = self.records or ("the record", "the record")
        for name, brk in ((names[0], self.broken), (names[1], self.to_broken)):
            if brk:
                whose = f"of {name} " if self.records else ""
                out.append(f"The chain {whose}is BROKEN at entry {brk[0]}: {brk[1]}; from there on the "
                           "entries compared are shown as read, not as filed.")
        if self.records:
            out.append(f"From {names[0]}, entry {self.from_seq} (revision {self.from_revision}), "
                       f"to {names[1]}, entry {self.to_seq} (revision {self.to_revision})")
        else:
            out.append(f"From entry {self.from_seq} (revision {self.from_revision}) "
                       f"to entry {self.to_seq} (revision {self.to_revision})")
        out.append("Inputs:")
        out += [f"  {d.line('was', 'now')}" for d in self.inputs] or ["  no change"]
        out.append("Results" + (f" (solve entry {self.from_solve} against entry {self.to_solve})"
                                if self.from_solve and self.to_solve else "") + ":")
        if self.from_solve is None and self.to_solve is None:
            out.append("  nothing solved at either point")
        elif self.from_solve is None or self.to_solve is None:
            which = self.from_seq if self.from_solve is None else self.to_seq
            out.append(f"  nothing solved as of entry {which}")
        elif self.from_solve == self.to_solve and not self.records:  # in two records, one number is two solves
            out.append(f"  the same solve (entry {self.from_solve}) stands at both points")
        else:
            out += [f"  {d.line('was', 'now')}" for d in self.results] or ["  no change"]
        return out


#: Sections whose items the diff names by their name (``device 'K-1'.eta``), not their place.
BY_NAME = ("stream", "device", "vessel", "line")


def _flatten(prefix: str, value, out: dict, depth: int = 1) -> None:
    if isinstance(value, dict):
        check_depth(depth)
        for k, v in value.items():
            _flatten(f"{prefix}.{k}" if prefix else k, v, out, depth + 1)
        if not value and prefix:
            out[prefix] = {}
    elif isinstance(value, list) and (value and all(isinstance(v, dict) for v in value)):
        check_depth(depth)
        names = [v.get("name") for v in value]
        if prefix in BY_NAME and all(isinstance(n, str) and n for n in names) and len(set(names)) == len(names):
            for n, v in zip(names, value):  # a stream or device is named: an insertion moves none of the others
                _flatten(f"{prefix} '{n}'", {k: x for k, x in v.items() if k != "name"}, out, depth + 1)
            return
        for i, v in enumerate(value):
            _flatten(f"{prefix}[{i + 1}]", v, out, depth + 1)
    else:
        out[prefix] = value


def input_changes(before: dict, after: dict) -> list[Difference]:
    """Every typed value that differs between two folds of the worksheet's sections."""
    a: dict = {}
    b: dict = {}
    for section in before:
        _flatten(section, before[section], a)
    for section in after:
        _flatten(section, after[section], b)
    out = []
    for k in list(a) + [k for k in b if k not in a]:
        if a.get(k) != b.get(k):
            out.append(Difference(k, a.get(k), b.get(k)))
    return out


def _check_point(name: str, seq, n: int) -> None:
    if isinstance(seq, bool) or not isinstance(seq, int) or not 1 <= seq <= n:
        raise InputError(name, f"expected an entry number from 1 to {n}; got {seq!r}")


def diff_entries(entries: Sequence[Entry], from_seq: int, to_seq: int, tolerance: float = 1e-9) -> RecordDiff:
    n = len(entries)
    for name, seq in (("--from", from_seq), ("--to", to_seq)):
        _check_point(name, seq, n)
    a, b = entries[:from_seq], entries[:to_seq]
    results, sa, sb = _result_changes(a, b, tolerance)
    revs = revisions(entries)
    return RecordDiff(from_seq, to_seq, tuple(input_changes(fold(a), fold(b))), tuple(results),
                      sa.seq if sa else None, sb.seq if sb else None, revs[from_seq - 1], revs[to_seq - 1],
                      chain_break(entries))


def diff_records(first: Sequence[Entry], second: Sequence[Entry], names: tuple[str, str], from_seq: int,
                 to_seq: int, tolerance: float = 1e-9) -> RecordDiff:
    """What inputs and results differ between one record as of entry ``from_seq`` and another as of
    ``to_seq`` (two versions of a calculation filed apart, a case and its variant)."""
    _check_point("--from", from_seq, len(first))
    _check_point("--to", to_seq, len(second))
    a, b = first[:from_seq], second[:to_seq]
    results, sa, sb = _result_changes(a, b, tolerance)
    return RecordDiff(from_seq, to_seq, tuple(input_changes(fold(a), fold(b))), tuple(results),
                      sa.seq if sa else None, sb.seq if sb else None, revisions(first)[from_seq - 1],
                      revisions(second)[to_seq - 1], chain_break(first), tuple(names), chain_break(second))


def _result_changes(a: Sequence[Entry], b: Sequence[Entry], tolerance: float):
    """The differences between the solves standing at the ends of ``a`` and ``b``, and those solves."""
    sa = next((e for e in reversed(a) if e.kind == SOLVE), None)
    sb = next((e for e in reversed(b) if e.kind == SOLVE), None)
    results: list[Difference] = []
    if sa is not None and sb is not None and sa.hash != sb.hash:
        da, db = sa.data, sb.data
        if "error" in da or "error" in db:
            if da.get("error") != db.get("error"):
                results.append(Difference("error", da.get("error"), db.get("error")))
        else:
            failing, info = compare(da, db, tolerance)
            # quantities first, then the text that carries them (equations, warnings, cautions)
            text_first = ("equations", "warnings", "cautions")
            results = sorted(failing, key=lambda d: d.path.startswith(text_first)) + info
    return results, sa, sb
