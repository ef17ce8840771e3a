"""The Record: a record file, its entries, and the operations that append to it."""

from __future__ import annotations

import dataclasses
import re
from datetime import datetime, timezone
from pathlib import Path
from typing import Callable

from .. import api
from ..errors import InputError
from ..models import MODEL_NAMES
from ..worksheet import Worksheet
from . import store
from .chain import chain_break, head_of
from .format import (COMMENT, CONTENT_KINDS, FORMAT, GENESIS, LIST_SECTIONS, MAGIC_LINE, NOTE, OPENING, RESOLUTION,
                     SECTION_KINDS, SIGN_OFF, SOLVE, TAG_SEAL, Entry, clean_author, entry_lines,
                     format_time, parse, prune, seal)
from .layout import MAX_TEXT, value_problem
from .replay import DEFAULT_TOLERANCE, ReplayReport, fold, replay_entries, sections_of, solve_data, worksheet_of
from .review import (comment_problem, current_revision, open_comments, resolution_problem, roles_of,
                     signed_now, signoff_problem)
from .signing import NAMESPACE, ROLES, check_allowed_signers, message
from .signing import sign as ssh_sign
from .text import render
from .verify import Verification, verify_entries

Clock = Callable[[], datetime]
#: What an append works out its entry's data with, from the entries it follows (raising InputError
#: when the rules refuse it there).
Maker = Callable[[tuple[Entry, ...]], dict]
STEP_ORDER = tuple(SECTION_KINDS)


def utc_now() -> datetime:
    return datetime.now(timezone.utc)


class Record:
    """A record file and its entries, immutable by convention.

    ``entries`` is a tuple of frozen :class:`Entry`; each append writes the
    whole new file atomically (see :mod:`balance.record.store`), then
    replaces the tuple, so the object always shows what is on disk. Build
    one with :meth:`create` or :meth:`load`.

    ``clock`` (a function returning an aware datetime) and ``author`` may be
    given to fix the time and author of new entries; by default the time is
    now (UTC) and the author comes from :func:`balance.record.default_author`.
    ``wait`` is how long a write waits for another writer of the record's
    folder [s] (:data:`.store.WAIT` by default).
    """

    def __init__(self, path: Path, entries: tuple[Entry, ...], raw: bytes, *, clock: Clock | None = None,
                 author: str | None = None, recovered: str | None = None, read_only: str | None = None,
                 wait: float = store.WAIT):
        self.path = Path(path)
        self.wait = wait
        self._entries = tuple(entries)
        self._raw = raw
        self.clock: Clock = clock or utc_now
        self.author = clean_author(author) if author is not None else None
        self.recovered = recovered
        """what load found and set aside (a torn last entry), or None"""
        self._read_only = read_only
        self._break = chain_break(self._entries)

    def __repr__(self) -> str:
        return f"Record({str(self.path)!r}, {len(self._entries)} entries, head {self.head[:12]})"

    # -- reading ---------------------------------------------------------------------
    @property
    def entries(self) -> tuple[Entry, ...]:
        return self._entries

    @property
    def head(self) -> str:
        """The chain head hash: the seal of the last entry."""
        return head_of(self._entries)

    @property
    def broken(self) -> tuple[int, str] | None:
        """Where the chain breaks, as (entry, reason) (:func:`.chain.chain_break`); None when intact.
        A broken record can be read, never extended."""
        return self._break

    @property
    def revision(self) -> int:
        return current_revision(self._entries)

    def entry(self, seq: int) -> Entry:
        if isinstance(seq, bool) or not isinstance(seq, int) or not 1 <= seq <= len(self._entries):
            raise InputError("entry", f"expected an entry number from 1 to {len(self._entries)}; got {seq!r}")
        return self._entries[seq - 1]

    def last_solve(self) -> Entry | None:
        return next((e for e in reversed(self._entries) if e.kind == SOLVE), None)

    @property
    def roles(self) -> tuple[str, ...]:
        """The sign-off roles, in their order (pinned in the opening entry)."""
        return roles_of(self._entries)

    def needs_solve(self) -> bool:
        """Whether the inputs changed since the last solve entry (a step entry follows it)."""
        for e in reversed(self._entries):
            if e.kind == SOLVE:
                return False
            if e.section:
                return True
        return False

    def signed(self) -> bool:
        """Whether a sign-off follows the last change of the calculation (only comments
        and resolutions may come after it)."""
        for e in reversed(self._entries):
            if e.kind == SIGN_OFF:
                return True
            if e.kind not in (COMMENT, RESOLUTION):
                return False
        return False

    def next_role(self) -> str:
        """The first role not yet signed since the calculation last changed (the last role
        once all are)."""
        signed = signed_now(self._entries)
        roles = self.roles
        return next((r for r in roles if r not in signed), roles[-1] if roles else "")

    def worksheet(self) -> Worksheet:
        """The current worksheet: the replay of every step entry (raises InputError naming the field)."""
        return worksheet_of(self._entries)

    def sections(self) -> dict:
        """The current worksheet's sections as plain data: what a solve entry is worked out from."""
        return fold(self._entries)

    def open_comments(self) -> list[Entry]:
        return open_comments(self._entries)

    def verify(self, allowed_signers=None) -> Verification:
        """Check the chain, the rules and (given an allowed-signers file) every signature."""
        if allowed_signers is not None:
            allowed_signers = check_allowed_signers(allowed_signers)
        return verify_entries(self._entries, allowed_signers, self.recovered, str(self.path))

    def replay(self, tolerance: float = DEFAULT_TOLERANCE) -> ReplayReport:
        """Re-solve every solve entry's inputs and compare with what was recorded."""
        return replay_entries(self._entries, tolerance)

    # -- making --------------------------------------------------------------------------
    @classmethod
    def create(cls, path, author: str | None = None, worksheet: Worksheet | None = None, *,
               clock: Clock | None = None, roles=None, solver: Callable[[dict], dict] | None = None,
               wait: float = store.WAIT, procedure=None, practice: str | None = None) -> "Record":
        """A new record file: the opening entry, then (given a worksheet) one step entry per
        section its kind of balance reads (:func:`.replay.sections_of`) and a solve entry. Written in one atomic step; refuses an existing file.

        ``roles`` overrides the sign-off roles and their order (pinned in the opening).
        ``procedure`` (a :class:`balance.procedures.Procedure`) is the house procedure the
        calculation follows: the opening pins its id, version, SHA-256 and rules, and its
        sign-off roles are the record's. ``practice`` (an exercise's id) marks a practice record:
        one that can never be signed.
        ``solver`` works out the solve entry's data from the sections: :func:`solve_data`
        by default, or the same in another process (the terminal app keeps CoolProp out of its own).
        """
        path = Path(path)
        if path.exists():
            raise InputError(str(path), "already exists; a record is never overwritten")
        if practice is not None and procedure is None:
            raise InputError("practice", "a practice record follows a procedure: give the procedure")
        if roles is None:
            roles = procedure.signoff.all_roles if procedure is not None else ROLES
        roles = tuple(roles)
        if not roles or len(set(roles)) != len(roles) or \
                not all(isinstance(r, str) and re.fullmatch(r"[a-z][a-z-]*", r) for r in roles):
            raise InputError("roles", "expected distinct lowercase names, like prepared, checked, approved")
        rec = cls(path, (), MAGIC_LINE, clock=clock, author=author, wait=wait)
        data = {"format": FORMAT, **api.pins(), "models": list(MODEL_NAMES), "roles": list(roles)}
        if procedure is not None:
            data["procedure"] = procedure.pin()
        if practice is not None:
            data["practice"] = {"exercise": _words(practice, "practice")}
        rec._stage(OPENING, data, None)
        if worksheet is not None:
            sheet = sections_of(worksheet)
            for section in STEP_ORDER:
                if section in sheet:
                    rec._stage(SECTION_KINDS[section], {section: sheet[section]}, None)
            rec._stage(SOLVE, (solver or solve_data)(fold(rec._entries)), None)
        store.create(path, rec._raw, wait)
        return rec

    @classmethod
    def load(cls, path, *, clock: Clock | None = None, author: str | None = None,
             wait: float = store.WAIT) -> "Record":
        """Read a record. A torn last entry is set aside into ``<record>.torn-<time>``
        (reported in ``recovered``); a malformed record raises InputError naming the line."""
        path = Path(path)
        raw = store.read(path)
        parsed = parse(raw, str(path))
        recovered = read_only = None
        if parsed.torn:
            if not parsed.entries:
                raise InputError(f"{path}, line {parsed.torn_line}", "the record's first entry is cut off: "
                                                                     "it has no complete entry")
            n = len(parsed.entries)
            what = (f"entry {n + 1} was cut off at the end of the file (from line {parsed.torn_line}, "
                    f"{len(parsed.torn)} bytes)")
            try:
                side = store.set_aside(path, raw, parsed.good, parsed.torn, (clock or utc_now)(), wait)
                recovered = f"{what} and was set aside in {side}; the {n} entries before it are intact"
            except InputError as exc:
                read_only = f"its cut-off last entry could not be set aside ({exc}); nothing can be added until it is"
                recovered = f"{what}; it could not be set aside: {exc}"
        return cls(path, parsed.entries, parsed.good, clock=clock, author=author, recovered=recovered,
                   read_only=read_only, wait=wait)

    # -- appending ------------------------------------------------------------------------
    def _who(self, author: str | None) -> str:
        if author is not None:
            return clean_author(author)
        if self.author is not None:
            return self.author
        from .author import default_author

        return default_author()

    def _stage(self, kind: str, data: dict, author: str | None, text: str | None = None) -> Entry:
        """Add an entry in memory (not written): returns it as a reader will see it."""
        problem = value_problem(data)  # what a reader would refuse is never written
        if problem:
            raise InputError(kind, f"its data {problem}")
        data = prune(data)
        if text is None:
            text = render(kind, data, self._entries)
        seq = len(self._entries) + 1
        lines = entry_lines(seq, format_time(self.clock()), self._who(author), kind, text, data, self.head)
        try:
            body, digest = seal(lines)
        except UnicodeEncodeError as exc:  # a lone surrogate: not a character UTF-8 can hold
            raise InputError(kind, f"contains {exc.object[exc.start:exc.end]!r}, which is not a valid "
                                   "Unicode character; retype it") from None
        block = b"\n" + body + (TAG_SEAL + digest + "\n").encode()
        # read the new entry back exactly as a reader of the file will
        back = parse(MAGIC_LINE + block, str(self.path))
        if back.torn or len(back.entries) != 1:  # pragma: no cover - a defect of the writer
            raise RuntimeError("an entry written did not read back whole")
        first_line = self._raw.count(b"\n") + 2
        entry = dataclasses.replace(back.entries[0], line=first_line)
        self._raw += block
        self._entries += (entry,)
        return entry

    def _check_writable(self) -> None:
        if self._read_only:
            raise InputError(str(self.path), self._read_only)
        if self._break:
            raise InputError(str(self.path), f"its chain is broken at entry {self._break[0]} ({self._break[1]}); "
                                             "a broken record cannot be extended: restore the filed copy")

    def _append(self, kind: str, make: Maker, author: str | None) -> Entry:
        """Append an entry of this kind whose data is ``make(entries)``, made after the entries it follows.

        The record is read again first, and once more under the folder lock (:func:`.store.commit`).
        When other writers appended since this object read it, their entries are taken in (this
        object shows them from then on, also when the append is refused) and the data is made after
        them, so the rules are checked against what is on disk; an entry that depends on the
        calculation (a step, a solve, a revision note, a sign-off) is refused when the calculation
        changed since. Nothing on disk is ever replaced unseen.
        """
        self._check_writable()
        seen = len(self._entries)
        current = store.read(self.path)  # a whole file, old or new (writers replace it atomically)
        if current != self._raw:
            self._catch_up(current, seen, kind)
        self._check_writable()
        data = make(self._entries)  # before the lock: a signature is made here, not while others wait
        staged: list = []

        def build(current: bytes) -> bytes:
            nonlocal data
            if current != self._raw:
                self._catch_up(current, seen, kind)
                data = make(self._entries)
            staged.append((self._raw, self._entries))
            staged.append(self._stage(kind, data, author))
            return self._raw

        try:
            store.commit(self.path, build, self.wait)
        except BaseException:
            if staged:
                self._raw, self._entries = staged[0]
            raise
        return staged[1]

    def _catch_up(self, current: bytes, seen: int, kind: str) -> None:
        """Take in the entries other writers appended since this object read the record (``current``
        is the file under the lock); refuse what is not an append, and an entry of ``kind`` that the
        appended entries make stale (see :meth:`_append`); ``seen`` entries are the caller's view."""
        where = str(self.path)
        if not current.startswith(self._raw):
            raise InputError(where, "was replaced by another writer since it was read (not appended to); "
                                    "load it again (nothing was written)")
        try:
            parsed = parse(MAGIC_LINE + current[len(self._raw):], where)  # only what was appended
        except InputError:
            parse(current, where)  # the same error, naming the line of the whole file
            raise
        if parsed.torn:
            raise InputError(where, "another writer left a cut-off entry at its end; load it again "
                                    "(nothing was written)")
        lines_before = self._raw.count(b"\n") - 1  # the tail was read after a first line of its own
        new = tuple(dataclasses.replace(e, line=e.line + lines_before) for e in parsed.entries)
        self._raw, self._entries = current, self._entries + new
        self._break = chain_break(self._entries)
        self._check_writable()
        if kind in CONTENT_KINDS or kind == SIGN_OFF:
            changed = next((e for e in self._entries[seen:] if e.kind in CONTENT_KINDS), None)
            if changed is not None:
                raise InputError(where, f"the calculation changed meanwhile (entry {changed.seq}, {changed.kind}, "
                                        f"by {changed.author}); nothing was written: review the change and "
                                        "try again")

    def append_step(self, section: str, data, author: str | None = None) -> Entry:
        """Set one worksheet section (its plain data, as in ``Worksheet.to_dict()``).

        ``section`` is one of worksheet, system, fluid, initial, final, heat,
        work, process; initial, heat and work take a list of tables.
        """
        if section not in SECTION_KINDS:
            raise InputError("section", f"unknown section {section!r}; expected one of {', '.join(SECTION_KINDS)}")
        if section in LIST_SECTIONS:
            if not isinstance(data, (list, tuple)) or not all(isinstance(d, dict) for d in data):
                raise InputError(section, f"expected a list of tables for [[{section}]]")
            data = [dict(d) for d in data]
        elif not isinstance(data, dict):
            raise InputError(section, f"expected a table for [{section}]")
        Worksheet.from_dict({section: data})  # raises InputError naming the field
        return self._append(SECTION_KINDS[section], lambda _: {section: data}, author)

    def append_solve(self, author: str | None = None, *, data: dict | None = None) -> Entry:
        """Solve the current worksheet and record the result (or the error: a failed solve is recorded).

        ``data`` is the entry's data when worked out elsewhere, by :func:`solve_data` from
        :meth:`sections` as they are now (the terminal app solves the reference model in another
        process); None solves here.
        """
        if data is None:
            data = solve_data(fold(self._entries))
        return self._append(SOLVE, lambda _: data, author)

    def note(self, text: str, author: str | None = None) -> Entry:
        """A revision note: why the calculation changes (counts as a change of the calculation)."""
        data = {"note": _words(text, "note")}
        return self._append(NOTE, lambda _: data, author)

    def comment(self, on_seq: int, text: str, author: str | None = None) -> Entry:
        """A review comment on entry ``on_seq``, open until resolved."""
        data = {"on": on_seq, "text": _words(text, "comment")}

        def make(entries) -> dict:
            problem = comment_problem(entries, on_seq)
            if problem:
                raise InputError("comment", problem)
            return data

        return self._append(COMMENT, make, author)

    def resolve(self, comment_seq: int, note: str, author: str | None = None) -> Entry:
        """Resolve the open comment in entry ``comment_seq``."""
        data = {"comment": comment_seq, "note": _words(note, "note")}

        def make(entries) -> dict:
            problem = resolution_problem(entries, comment_seq)  # another writer may have resolved it meanwhile
            if problem:
                raise InputError("resolve", problem)
            return data

        return self._append(RESOLUTION, make, author)

    def sign(self, role: str, key_path=None, signer: str | None = None, unsigned: bool = False,
             author: str | None = None) -> Entry:
        """Sign off the record as it stands (its chain head) in a role.

        Signs with ``ssh-keygen -Y sign`` and the key file ``key_path``, or,
        with ``unsigned=True``, records a sign-off without a signature.
        Raises InputError for a broken role order, a checker who prepared,
        approval with open comments, or an unsolved or failed calculation;
        also when another writer changed the calculation after this object
        read the record. When another writer appended only review entries
        meanwhile, the rules are checked again after them and the sign-off
        covers the new head (signed again with ssh-keygen, the record's folder
        held meanwhile).
        """
        who = self._who(author)
        signer = clean_author(signer if signer is not None else who, "signer")
        if unsigned and key_path is not None:
            raise InputError("sign-off", "a sign-off is either signed with a key or marked unsigned, not both")
        if not unsigned and key_path is None:
            raise InputError("--key", "give the SSH key to sign with, or mark the sign-off unsigned")

        def make(entries) -> dict:
            problem = signoff_problem(entries, role, signer)
            if problem:
                raise InputError("sign-off", problem)
            seq, covers = len(entries) + 1, head_of(entries)
            data: dict = {"role": role, "signer": signer, "revision": current_revision(entries), "covers": covers}
            if unsigned:
                data["unsigned"] = True
            else:
                lines, fingerprint = ssh_sign(key_path, message(seq, role, signer, covers))
                data["namespace"] = NAMESPACE
                if fingerprint:
                    data["key"] = fingerprint
                data["signature"] = lines
            return data

        return self._append(SIGN_OFF, make, who)


def _words(text, field: str) -> str:
    if not isinstance(text, str) or not text.strip():
        raise InputError(field, "must not be empty")
    text = text.strip()
    if len(text) > MAX_TEXT:
        raise InputError(field, f"is {len(text)} characters long; a record holds at most {MAX_TEXT} in one text")
    return text


__all__ = ["Record", "utc_now", "GENESIS"]
