"""Verification of a record: the chain, the rules between entries, and the sign-off signatures.

A record verifies when

1. its chain is intact (:func:`balance.record.chain.chain_break`);
2. entry 1 is the opening and no other entry is; each comment is on an
   earlier entry, each resolution resolves an open comment;
3. each sign-off covers the seal of the entry just before it, names the
   revision it is in, and keeps the sign-off rules
   (:mod:`balance.record.review`);
4. each signed sign-off's signature verifies with ``ssh-keygen -Y verify``
   for its signer against the allowed-signers file (a sign-off explicitly
   marked unsigned is reported as unsigned; without an allowed-signers file
   signatures are "not checked", which is not a pass);
5. the text of every entry is the rendering of its data, when the record
   was written by this joulebook version (otherwise this is noted, not
   checked).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from .chain import chain_break, head_of
from ..errors import InputError
from .format import COMMENT, OPENING, RESOLUTION, SIGN_OFF, SOLVE, Entry, normal_text, parse
from .house import house_report
from .review import comment_problem, open_comments, resolution_problem, revisions, signoff_problem
from .signing import NAMESPACE, message
from .signing import verify as verify_signature
from .text import render

VALID, INVALID, UNSIGNED, NOT_CHECKED = "valid", "invalid", "unsigned", "not checked"


@dataclass(frozen=True)
class SignoffStatus:
    """One sign-off and what verification found."""

    seq: int
    role: str
    signer: str
    time: str
    status: str
    """'valid', 'invalid', 'unsigned' or 'not checked'"""
    detail: str
    revision: int
    covers_seq: int
    """the sign-off covers entries 1 to covers_seq"""
    covers_hash: str


@dataclass(frozen=True)
class Verification:
    """The result of verifying a record.

    ``ok`` is True when the chain is intact, no rule is broken and every
    signed sign-off's signature is valid. ``broken_seq`` and ``reason`` name
    the first problem.
    """

    ok: bool
    chain_ok: bool
    broken_seq: int | None
    reason: str
    head: str
    entries: int
    revision: int
    signoffs: tuple[SignoffStatus, ...] = ()
    later: tuple[int, ...] = ()
    """entries after the last sign-off: covered by no sign-off"""
    open_comments: tuple[int, ...] = ()
    problems: tuple[tuple[int, str], ...] = ()
    notes: tuple[str, ...] = ()
    recovered: str | None = None
    source: str = "record"
    house: tuple[str, ...] = ()
    """what the record's house procedure says (:func:`.house.house_report`)"""

    @property
    def later_unsigned(self) -> int:
        """How many entries came after the last sign-off (covered by no sign-off)."""
        return len(self.later)

    def lines(self) -> list[str]:
        out = []
        if self.recovered:
            out.append(f"Recovered: {self.recovered}")
        if not self.chain_ok:
            where = f"entry {self.broken_seq}" if self.broken_seq else "the file"
            out.append(f"{self.source}: BROKEN at {where}: {self.reason}")
            return out
        out.append(f"{self.source}: {self.entries} entries, revision {self.revision}; chain intact")
        out.append(f"chain head: sha256 {self.head}")
        if not self.signoffs:
            out.append("sign-offs: none")
        for s in self.signoffs:
            out.append(f"entry {s.seq}: {s.role} by {s.signer} at {s.time}, revision {s.revision} "
                       f"(entries 1–{s.covers_seq}): {s.status.upper()}" + (f": {s.detail}" if s.detail else ""))
        if self.signoffs:
            if self.later:
                span = f"entry {self.later[0]}" if len(self.later) == 1 else f"entries {self.later[0]}–{self.later[-1]}"
                out.append(f"{span} came after the last sign-off: not covered by any signature "
                           f"(revision {self.revision} is unsigned)" if self.revision > self.signoffs[-1].revision
                           else f"{span} came after the last sign-off: not covered by any signature")
            else:
                out.append("every entry is covered by the last sign-off")
        if self.open_comments:
            out.append("open comments: " + ", ".join(f"entry {c}" for c in self.open_comments))
        out += list(self.house)
        out += [f"note: {n}" for n in self.notes]
        for seq, problem in self.problems:
            out.append(f"FAILED at entry {seq}: {problem}")
        if self.ok:
            out.append("verdict: intact" + (", all signatures valid" if any(s.status == VALID for s in self.signoffs)
                                            else ""))
        elif not self.problems:
            out.append("verdict: not verified: signatures were not checked (give an allowed-signers file)")
        else:
            out.append(f"verdict: FAILED at entry {self.broken_seq}")
        return out


def _same_version(entries: Sequence[Entry]) -> str | None:
    """The joulebook version other than the running one that wrote part of the record, if any."""
    from .. import __version__

    for e in entries:
        if e.kind in (OPENING, SOLVE):
            v = e.data.get("joulebook")
            if isinstance(v, str) and v != __version__:
                return v
    return None


def verify_entries(entries: Sequence[Entry], allowed_signers=None, recovered: str | None = None,
                   source: str = "record") -> Verification:
    """Verify parsed entries (see the module docstring)."""
    entries = tuple(entries)
    head = head_of(entries)
    broken = chain_break(entries)
    if broken:
        return Verification(False, False, broken[0], broken[1], head, len(entries), 0,
                            problems=(broken,), recovered=recovered, source=source)
    problems: list[tuple[int, str]] = []
    notes: list[str] = []
    revs = revisions(entries)
    if not entries or entries[0].kind != OPENING:
        problems.append((1, "entry 1 is not the opening entry"))
    other = _same_version(entries)
    if other:
        notes.append(f"written (in part) with joulebook {other}: entry texts were not re-rendered and compared")
    statuses: list[SignoffStatus] = []
    for i, e in enumerate(entries):
        before = entries[:i]
        if i and e.kind == OPENING:
            problems.append((e.seq, "a second opening entry"))
            continue
        if e.kind == COMMENT:
            p = comment_problem(before, e.data["on"])
            if p:
                problems.append((e.seq, f"comment: {p}"))
        elif e.kind == RESOLUTION:
            p = resolution_problem(before, e.data["comment"])
            if p:
                problems.append((e.seq, f"resolution: {p}"))
        elif e.kind == SIGN_OFF:
            statuses.append(_signoff(e, before, revs[i], allowed_signers, problems))
        if not other:
            try:
                rendered = normal_text(render(e.kind, e.data, before))
            except (KeyError, TypeError, ValueError, AttributeError):
                rendered = None
            if rendered != e.text:
                problems.append((e.seq, "its text is not the rendering of its data "
                                        "(the human-readable part was edited)"))
    problems.sort(key=lambda p: p[0])
    last_signoff = max((s.seq for s in statuses), default=None)
    later = tuple(e.seq for e in entries if last_signoff and e.seq > last_signoff and e.kind != SIGN_OFF)
    unchecked = any(s.status == NOT_CHECKED for s in statuses)
    ok = not problems and not unchecked
    first = problems[0] if problems else (None, "")
    if not problems and unchecked:
        first = (next(s.seq for s in statuses if s.status == NOT_CHECKED),
                 "signatures were not checked: give an allowed-signers file")
    return Verification(ok, True, first[0], first[1], head, len(entries), revs[-1] if revs else 1,
                        tuple(statuses), later, tuple(c.seq for c in open_comments(entries)),
                        tuple(problems), tuple(notes), recovered, source, tuple(house_report(entries)))


def _signoff(e: Entry, before: tuple[Entry, ...], revision: int, allowed_signers, problems: list) -> SignoffStatus:
    d = e.data
    role, signer, covers = d["role"], d["signer"], d["covers"]
    covered = before[-1] if before else None
    status, detail = NOT_CHECKED, ""

    def fail(text: str) -> None:
        nonlocal status, detail
        problems.append((e.seq, f"sign-off ({role} by {signer}): {text}"))
        if status != INVALID:
            status, detail = INVALID, text

    if covered is None or covers != covered.hash:
        fail(f"it covers sha256 {covers}, which is not the chain head before it "
             f"(entry {len(before)}: {covered.hash if covered else 'none'}): a signature over another hash")
    if d["revision"] != revision:
        fail(f"it names revision {d['revision']} but is in revision {revision}")
    rule = signoff_problem(before, role, signer)
    if rule:
        fail(rule)
    if d.get("unsigned") is True:
        if status != INVALID:
            status, detail = UNSIGNED, "marked unsigned: no signature"
    elif status != INVALID:
        if d.get("namespace", NAMESPACE) != NAMESPACE:
            fail(f"its namespace is {d.get('namespace')!r}, not {NAMESPACE!r}")
        elif allowed_signers is None:
            status, detail = NOT_CHECKED, "no allowed-signers file given"
        else:
            good, said = verify_signature(allowed_signers, signer, d["signature"], message(e.seq, role, signer, covers))
            if good:
                status, detail = VALID, said
            else:
                fail(f"the signature does not verify for {signer} with the allowed-signers file: {said}")
    return SignoffStatus(e.seq, role, signer, e.time, status, detail, revision, len(before), covers)


def inspect(data: bytes, source: str = "record", allowed_signers=None) -> Verification:
    """Verify a record's bytes as they are, without touching any file.

    A malformed record or a torn tail is a failure here (``Record.load``
    would set a torn tail aside; this reports it).
    """
    try:
        skeleton = parse(data, source, structure_only=True)
        broken = chain_break(skeleton.entries)
        if broken:  # found without reading the data parts
            return Verification(False, False, broken[0], broken[1], head_of(skeleton.entries), len(skeleton.entries),
                                0, problems=(broken,), source=source)
        parsed = parse(data, source)
    except InputError as exc:
        return Verification(False, False, None, str(exc), "", 0, 0, problems=((0, str(exc)),), source=source)
    v = verify_entries(parsed.entries, allowed_signers, source=source)
    if parsed.torn:
        reason = f"a torn entry from line {parsed.torn_line} ({len(parsed.torn)} bytes): cut off while being written"
        return Verification(False, v.chain_ok, len(parsed.entries) + 1, reason, v.head, v.entries, v.revision,
                            v.signoffs, v.later, v.open_comments, ((len(parsed.entries) + 1, reason), *v.problems),
                            v.notes, None, source)
    return v
