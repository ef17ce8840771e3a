"""The one place the terminal app touches files: the worksheet being edited,
its record (audit trail), the autosaved draft, and committing.

Screens never open a file; they hand the session a new :class:`Worksheet`
(``session.edit(ws)``) and ask it to commit a step (``session.commit(...)``).

Two files per worksheet:

``NAME.jbk``
    the record, written by :mod:`balance.record`: one entry per committed
    step, solve, comment and signature. Committing a step appends the
    changed sections of the worksheet to it. The record's own rules (is a
    solve due, is it signed, which role signs next) are its own
    (:class:`balance.record.Record`).
``NAME.jbk.draft``
    the autosaved draft (:mod:`tui.draft`), rewritten after every edit.
"""

from __future__ import annotations

import os
import tempfile
import threading
from dataclasses import dataclass, field
from pathlib import Path

from balance import api
from balance.errors import InputError
from balance.worksheet import LISTS, SECTIONS, Worksheet

from . import offload
from .draft import DRAFT_FORMAT, DraftFile, draft_path, worksheet_to_raw
from .steps import steps_of

#: The record file's extension.
RECORD_SUFFIX = ".jbk"
#: Sections whose value is a list of tables ([[initial]]); the rest are one table.
_LISTS = LISTS


def solve_sections(sections: dict) -> api.Attempt:
    """The record's sections solved, for its solve entry: in the reference-model process
    when they use that model (:func:`tui.offload.call`)."""
    from . import analysis

    return offload.call(sections.get("fluid", {}).get("model", ""), analysis.solve, sections)


def _entry_data(sections: dict) -> dict:
    """A new record's first solve entry (nothing has been solved for it yet)."""
    return api.entry_data(solve_sections(sections))


def section_data(ws: Worksheet, section: str):
    """One section of ``ws.to_dict()`` as the record stores it."""
    return ws.to_dict().get(section, [] if section in _LISTS else {})


def of_its_kind(ws: Worksheet) -> dict:
    """The sections of ``ws`` that its kind reads and its steps commit, as the record stores
    them: what a solve depends on (what was typed for another kind is left out)."""
    return {s: section_data(ws, s) for s in steps_of(ws.system.kind).committed()}


def overlay(base: Worksheet, top: Worksheet, sections) -> Worksheet:
    """``base`` with the given sections taken from ``top``."""
    return base.with_(**{SECTIONS[s]: getattr(top, SECTIONS[s]) for s in sections})


def first_free(directory: Path, stem: str) -> Path:
    """``stem.jbk`` in ``directory``, or ``stem-2.jbk`` ... when taken."""
    candidate = directory / f"{stem}{RECORD_SUFFIX}"
    i = 2
    while candidate.exists() or draft_path(candidate).exists():
        candidate = directory / f"{stem}-{i}{RECORD_SUFFIX}"
        i += 1
    return candidate


@dataclass
class Session:
    """The worksheet being edited, its record and its draft.

    ``worksheet`` is what the screens show (every edit, committed or not);
    ``committed`` is the worksheet as the record has it.
    """

    path: Path
    """the record's path (the draft sits beside it)"""
    worksheet: Worksheet = field(default_factory=Worksheet)
    committed: Worksheet = field(default_factory=Worksheet)
    step: str = "purpose"
    units: str = "metric"
    extras: dict = field(default_factory=dict)
    """small UI state kept in the draft (e.g. the default boundary temperature)"""
    record: object | None = None
    """the open :class:`balance.record.Record`, or None until the first commit creates it"""
    notes: list[str] = field(default_factory=list)
    """what the app should tell the user on opening (e.g. a draft restored)"""
    alarms: list[str] = field(default_factory=list)
    """what the app says first and keeps on screen a minute: the record cannot be trusted"""
    author: str | None = None
    hold: tuple[str, ...] = ()
    """sections never committed while they are so: fields of theirs are at fault (the app
    sets it from its check); they stay in the draft, uncommitted, until they are put right"""
    procedure: object | None = None
    """the house procedure the worksheet follows (:class:`balance.procedures.Procedure`), or None"""
    _guidance: object | None = field(default=None, repr=False, compare=False)
    """the procedure's current version in the folders, where the record pins an older one"""
    _lock: threading.RLock = field(default_factory=threading.RLock, repr=False, compare=False)
    _draft: DraftFile | None = field(default=None, repr=False, compare=False)

    def __post_init__(self) -> None:
        self.path = Path(self.path)
        self._draft = DraftFile(draft_path(self.path))

    # -- the house procedure ----------------------------------------------------------
    def _attach_procedure(self) -> None:
        """Find the procedure the record pins (or, before there is a record, the one the
        worksheet names) in the procedure folders; say where it is older, or missing."""
        from balance.procedures import find_or_none, from_pin

        pin = None
        if self.record is not None:
            from balance.record.house import pinned

            pin = pinned(self.record.entries)
        wanted = pin["id"] if pin else self.worksheet.heading.procedure
        if not wanted:
            self.procedure = None
            return
        found = find_or_none(wanted)
        if pin is not None and (found is None or found.sha256 != pin["sha256"]):
            try:
                rules = from_pin(pin)
            except InputError as exc:
                self.alarms.append(f"the record's procedure {wanted} does not read: {exc}")
                rules = None
            if found is None:
                self.notes.append(f"procedure {wanted} version {pin['version']} is not in the procedure folders: "
                                  "its rules apply as the record pinned them, without its guidance")
                self.procedure = rules
                return
            self.notes.append(f"this record was made under {wanted} version {pin['version']}; the folders now have "
                              f"version {found.version}: the guidance shown is the current one, the rules the "
                              "record's")
            self.procedure = rules if rules is not None else found
            self._guidance = found
            return
        if found is None:
            self.notes.append(f"the worksheet names procedure {wanted!r}, which is not in the procedure folders "
                              "(`joulebook procedure list`): it is followed without its rules")
        self.procedure = found

    def guidance(self, step: str) -> str:
        """The procedure's guidance for ``step`` ('' without a procedure or guidance)."""
        source = self._guidance or self.procedure
        return source.guide(step).guidance if source is not None else ""

    def exercise(self):
        """The exercise a practice session is for (:class:`balance.procedures.schema.Exercise`), or None."""
        practice = self.extras.get("practice")
        if not practice or self.procedure is None:
            return None
        source = self._guidance or self.procedure
        return source.exercise(practice.get("exercise", ""))

    def practise(self, step: str, data: dict | None = None):
        """Compare the worksheet's ``step`` with the exercise's model answer and log the try
        (:class:`balance.procedures.practice.StepVerdict`); None outside practice, or for a
        step the exercise does not compare (the review)."""
        exercise = self.exercise()
        if exercise is None or step == "review":
            return None
        import json

        from balance.kinds import STEP_SECTIONS
        from balance.procedures.practice import PracticeLog, StepVerdict, compare_step

        practice = dict(self.extras["practice"])
        typed = self.worksheet.to_dict()
        seen = json.dumps([typed.get(s) for s in STEP_SECTIONS.get(step, ())] if step != "results" else data,
                          sort_keys=True, default=str)
        last = practice.get("last", {}).get(step)
        if last is not None and last.get("seen") == seen:  # compared as it stands already: not another try
            return StepVerdict(step, last["right"], tuple(last["differences"]), last["hint"], tuple(last["answer"]))
        verdict = compare_step(self._guidance or self.procedure, exercise, step, self.worksheet, data)
        log = PracticeLog.of(practice.get("log"))
        log.record(verdict)
        practice["log"] = log.steps
        practice["last"] = {**practice.get("last", {}), step: {
            "right": verdict.right, "differences": list(verdict.differences), "hint": verdict.hint,
            "answer": list(verdict.answer), "seen": seen}}
        self.set_extra("practice", practice)
        return verdict

    def typed_at(self, step: str) -> bool:
        """Whether anything was typed in ``step``: its sections differ from a new worksheet's
        under the procedure."""
        blank = (house_worksheet(self.procedure) if self.procedure is not None else Worksheet()).to_dict()
        now = self.worksheet.to_dict()
        sections = steps_of(self.worksheet.system.kind)[step].sections if step in steps_of(
            self.worksheet.system.kind) else ()
        return any(now.get(s) != blank.get(s) for s in sections)

    def reveal(self, step: str) -> None:
        """Log that the trainee asked for the answer at ``step``."""
        from balance.procedures.practice import PracticeLog

        practice = dict(self.extras.get("practice") or {})
        if not practice:
            return
        log = PracticeLog.of(practice.get("log"))
        log.revealed(step)
        practice["log"] = log.steps
        self.set_extra("practice", practice)

    def practice_summary(self) -> list[str]:
        """Which steps were right first time ([] outside practice)."""
        from balance.procedures.practice import PracticeLog

        practice = self.extras.get("practice")
        if not practice:
            return []
        order = [s.id for s in steps_of(self.worksheet.system.kind) if s.id != "review"]
        return PracticeLog.of(practice.get("log")).summary(order)

    def findings(self, data: dict | None = None, ws: Worksheet | None = None) -> list:
        """The procedure's rules applied to ``ws`` (default: the worksheet being edited) and,
        once solved, to the solve entry's ``data`` (:func:`balance.procedures.findings`); []
        without a procedure."""
        if self.procedure is None:
            return []
        from balance.procedures import findings

        return findings(self.procedure, ws if ws is not None else self.worksheet, data)

    # -- opening ------------------------------------------------------------
    @classmethod
    def new(cls, path: Path | str | None = None, *, directory: Path | str | None = None, procedure=None,
            exercise: str | None = None) -> "Session":
        """A new, empty worksheet; its record is created at the first commit. Under a
        ``procedure`` the worksheet starts from its house defaults (the sign convention, the
        atmosphere, the display units and its first kind of balance); with ``exercise`` (an id
        of its exercises) it is a practice session, whose record can never be signed."""
        if path is None:
            path = first_free(Path(directory or os.getcwd()), f"practice-{exercise}" if exercise else "worksheet")
        session = cls(path=Path(path))
        session._restore_draft()
        if procedure is not None and not session.draft_path.exists():
            # the house heading is typed, not committed: the first commit writes it to the record
            session.worksheet = house_worksheet(procedure)
            session.units = procedure.defaults.get("units", session.units)
            if exercise is not None:
                if procedure.exercise(exercise) is None:
                    raise InputError("--exercise", f"procedure {procedure.id} has no exercise {exercise!r}; it has "
                                     + (", ".join(e.id for e in procedure.exercises) or "none"))
                session.extras = {**session.extras, "practice": {"exercise": exercise, "log": {}}}
            session.save_draft()
        session._attach_procedure()
        if procedure is not None and session.procedure is None:
            session.procedure = procedure  # given, though not in the folders: it is followed all the same
        return session

    @classmethod
    def from_worksheet(cls, ws: Worksheet, path: Path | str) -> "Session":
        """A new record seeded with a worksheet (a sample, or a TOML file)."""
        from balance.record import Record

        # every input step arrives filled in: count them as visited
        session = cls(path=Path(path), worksheet=ws, extras={"visited": list(steps_of(ws.system.kind).sections)})
        # the reference model solves in its own process (started here, warm for the app)
        session._attach_procedure()
        session.record = Record.create(str(path), author=session.author, worksheet=ws, solver=_entry_data,
                                       procedure=_pinnable(session.procedure))
        session.committed = session.record.worksheet()
        session.save_draft()
        return session

    @classmethod
    def open(cls, path: Path | str) -> "Session":
        """An existing record (or only its draft) at its current state."""
        session = cls(path=Path(path))
        if session.path.exists():
            from balance.record import Record

            session.record = Record.load(str(session.path))
            if session.record.recovered:
                session.notes.append(f"{session.path.name}: {session.record.recovered}")
            if session.record.broken is not None:
                seq, reason = session.record.broken
                session.alarms.append(f"{session.path.name}: the chain is BROKEN at entry {seq}: {reason}. It can "
                                     "be read, not extended: nothing is committed, solved or signed into it "
                                     "(what you type is kept in the draft); restore the filed copy")
            session.committed = session.worksheet = session.record.worksheet()
        elif not session.draft_path.exists():
            raise InputError(str(path), "does not exist (give a record .jbk, a worksheet .toml, or no file for a new worksheet)")
        session._restore_draft()
        session._attach_procedure()
        if session.record is not None:
            from balance.record.house import practice_of

            exercise = practice_of(session.record.entries)
            if exercise and not session.extras.get("practice"):
                session.extras = {**session.extras, "practice": {"exercise": exercise, "log": {}}}
        return session

    @property
    def draft_path(self) -> Path:
        return self._draft.path

    def take_write_error(self) -> str:
        """The last background draft write that failed ('' if none), once."""
        error, self._draft.write_error = self._draft.write_error, ""
        return error

    # -- editing -----------------------------------------------------------
    def edit(self, ws: Worksheet) -> None:
        """Replace the worksheet being edited and autosave the draft."""
        if ws == self.worksheet:
            return
        self.worksheet = ws
        self._draft.save_soon(self._snapshot())

    def set_step(self, step: str) -> None:
        if step != self.step:
            self.step = step
            self.save_draft()

    def set_units(self, units: str) -> None:
        if units != self.units:
            self.units = units
            self.save_draft()

    def set_extra(self, key: str, value) -> None:
        if self.extras.get(key) != value:
            self.extras = {**self.extras, key: value}
            self.save_draft()

    def changed(self) -> tuple[str, ...]:
        """Every section whose text differs from the committed worksheet, of any kind (what
        the draft keeps over the record)."""
        now, then = self.worksheet.to_dict(), self.committed.to_dict()
        empty = lambda s: [] if s in _LISTS else {}  # noqa: E731
        return tuple(s for s in SECTIONS if now.get(s, empty(s)) != then.get(s, empty(s)))

    def dirty(self) -> tuple[str, ...]:
        """The sections a commit writes: those of the worksheet's kind whose text differs from
        the committed worksheet. What was typed for another kind (the boundary's kind changed
        in step 2) stays in the draft, uncommitted, until that kind is chosen again."""
        ours = steps_of(self.worksheet.system.kind).committed()
        return tuple(s for s in self.changed() if s in ours)

    def dirty_steps(self) -> tuple[str, ...]:
        dirty = set(self.dirty())
        return tuple(step for step, secs in steps_of(self.worksheet.system.kind).sections.items()
                     if dirty & set(secs))

    def held(self) -> tuple[str, ...]:
        """The uncommitted sections that a commit leaves in the draft (:attr:`hold`)."""
        return tuple(s for s in self.dirty() if s in self.hold)

    # -- committing ---------------------------------------------------------
    def commit(self, sections=None) -> list:
        """Append each changed section (of ``sections``, default all) to the record,
        creating it at the first commit, except those held (:attr:`hold`: fields of theirs
        are at fault; they stay in the draft). Returns the entries written; raises
        BalanceError if the record refuses a section."""
        with self._lock:
            wanted = [s for s in self.dirty() if (sections is None or s in sections) and s not in self.hold]
            if not wanted:
                return []
            if self.record is None:
                from balance.record import Record

                self.path.parent.mkdir(parents=True, exist_ok=True)
                practice = self.extras.get("practice")
                procedure = _pinnable(self.procedure)
                self.record = Record.create(str(self.path), author=self.author, procedure=procedure,
                                            practice=practice["exercise"] if practice and procedure else None)
            written = []
            for section in wanted:
                written.append(
                    self.record.append_step(section, section_data(self.worksheet, section), author=self.author)
                )
                self.committed = overlay(self.committed, self.worksheet, [section])
            self.save_draft()
            return written

    # -- the record's other commands -------------------------------------------------
    def _need_record(self, what: str):
        if self.record is None:
            self.commit()
        if self.record is None:
            raise InputError("record", f"cannot {what} yet: nothing has been committed")
        return self.record

    def solve_due(self) -> dict | None:
        """The record's worksheet sections when a solve entry is due
        (:meth:`balance.record.Record.needs_solve`), else None."""
        with self._lock:
            return self.record.sections() if self.record is not None and self.record.needs_solve() else None

    def append_solve(self, solved: api.Attempt | None = None, data: dict | None = None):
        """Append a solve entry when the record's inputs changed since its last one.

        Call :meth:`commit` first (on the UI thread). ``solved`` is a solve already made
        (the one on the app's screen, :func:`tui.analysis.solve`): the entry is written from
        it, only while the record holds what it solved (a newer commit wants its own solve).
        Without it, the sections due are solved here, in the reference-model process when
        they use that model, with the session not held meanwhile (seconds, for that model:
        the app calls this from a worker). ``data``: the entry's data, when the caller has it
        (:func:`balance.api.entry_data` of ``solved``, worked out where the model runs: an
        uncertainty budget solves the worksheet again). Returns the entry, or None.
        """
        if solved is None:
            sections = self.solve_due()
            if sections is None:
                return None
            solved = solve_sections(sections)
        with self._lock:
            sections = self.solve_due()
            # the record holds what was solved: the sections the kind reads are the same (what
            # was typed for another kind does not enter the solve)
            if (sections is None or solved.worksheet is None
                    or of_its_kind(api.read(sections)) != of_its_kind(solved.worksheet)):
                return None
            entry = self.record.append_solve(author=self.author, data=data if data is not None
                                             else api.entry_data(solved))
            self.save_draft()
            return entry

    def signed(self) -> bool:
        """Whether a sign-off follows the last change of the calculation."""
        return self.record is not None and self.record.signed()

    def entries(self) -> list:
        return list(self.record.entries) if self.record is not None else []

    def open_comments(self) -> list:
        return list(self.record.open_comments()) if self.record is not None else []

    def comment(self, on_seq: int, text: str):
        entry = self._need_record("comment").comment(on_seq, text)
        self.save_draft()
        return entry

    def resolve(self, comment_seq: int, note: str):
        entry = self._need_record("resolve a comment").resolve(comment_seq, note)
        self.save_draft()
        return entry

    def sign(self, role: str, key_path: str | None = None, signer: str | None = None, unsigned: bool = False):
        """Sign off the record as it stands (committing and solving first: a sign-off covers a solve)."""
        with self._lock:
            self.commit()
            record = self._need_record("sign")
            self.append_solve()
            entry = record.sign(role, key_path=key_path, signer=signer or None, unsigned=unsigned)
            self.save_draft()
            return entry

    def report_path(self, fmt: str) -> Path:
        """Where a report is written by default: beside the record, ``NAME-report.md`` / ``.html``."""
        return self.path.with_name(f"{self.path.stem}-report.{fmt}")

    def export_report(self, fmt: str, path: Path | str | None = None) -> Path:
        """Write the calculation report of the record as it stands (Markdown ``md`` or
        standalone HTML ``html``, :mod:`balance.record.export`) and return where; raises
        BalanceError (e.g. nothing committed yet) or OSError."""
        from balance.record import default_allowed_signers, export_html, export_markdown
        from balance.record.store import write_output

        record = self._need_record("export a report")
        target = Path(path).expanduser() if path else self.report_path(fmt)
        allowed = default_allowed_signers()
        text = export_markdown(record, allowed) if fmt == "md" else export_html(record, allowed)
        write_output(target, text.encode("utf-8"))
        return target

    def verify(self):
        """The record's :class:`balance.record.Verification` (with the configured allowed signers)."""
        from balance.record import default_allowed_signers

        return self._need_record("verify").verify(default_allowed_signers())

    def roles(self) -> tuple[str, ...]:
        """The record's sign-off roles, in order (the default ones before it exists)."""
        from balance.record import ROLES

        return self.record.roles if self.record is not None else tuple(ROLES)

    def next_role(self) -> str:
        """The first role not yet signed since the calculation last changed."""
        return self.record.next_role() if self.record is not None else self.roles()[0]

    def default_author(self) -> str:
        if self.author:
            return self.author
        from balance.record import default_author

        try:
            return default_author()
        except InputError:
            return ""

    # -- the draft -------------------------------------------------------------
    def save_draft(self) -> None:
        """Write the draft now, atomically."""
        self._draft.save(self._snapshot())

    def flush(self) -> None:
        """Wait until the latest draft is on disk."""
        self._draft.flush()

    def _snapshot(self) -> tuple[int, dict]:
        with self._lock:
            return self._draft.number({
                "format": DRAFT_FORMAT,
                "record": self.path.name,
                "head": None if self.record is None else str(self.record.head),
                "step": self.step,
                "units": self.units,
                "extras": self.extras,
                "dirty": list(self.changed()),
                "worksheet": worksheet_to_raw(self.worksheet),
                "committed": worksheet_to_raw(self.committed),
            })

    def _restore_draft(self) -> None:
        if not self.draft_path.exists():
            return
        try:
            data = self._draft.read()
        except (OSError, ValueError, KeyError, TypeError, InputError) as exc:
            self.notes.append(f"the draft {self.draft_path.name} could not be read ({exc}); it was left as it is")
            return
        self.step = data.get("step", self.step)
        self.units = data.get("units", self.units)
        self.extras = dict(data.get("extras", {}))
        draft = data["worksheet"]
        if self.record is None:
            # no record yet: the draft holds both states
            self.worksheet, self.committed = draft, data["committed"]
            return
        dirty = [s for s in data.get("dirty", []) if s in SECTIONS]
        if data.get("head") == str(self.record.head):
            self.worksheet = draft
        else:
            # the record moved on since the draft (another command wrote to it):
            # keep the record's sections, and only the draft's uncommitted ones
            self.worksheet = overlay(self.committed, draft, dirty)
            if dirty:
                self.notes.append(
                    "the record changed since the draft was saved; uncommitted edits to "
                    f"{', '.join(dirty)} were kept over it"
                )
        if dirty:
            self.notes.append(f"restored uncommitted edits to {', '.join(dirty)} from the draft")


def _pinnable(procedure):
    """The procedure a new record pins: one read from its file (with its SHA-256), not rules
    read back from another record's pin."""
    return procedure if procedure is not None and procedure.path is not None else None


def house_worksheet(procedure) -> Worksheet:
    """A new worksheet under ``procedure``: its id and house defaults in the heading, its
    first kind of balance."""
    from balance.worksheet import Heading, System

    heading = Heading(procedure=procedure.id, **{k: v for k, v in procedure.defaults.items()
                                                   if k in ("convention", "atmosphere")})
    return Worksheet(heading=heading, system=System(kind=procedure.kinds[0]))


def open_target(target: str | None, *, must_exist: bool = False) -> Session:
    """The session for what the command line names.

    ``None``: a new worksheet (``worksheet.jbk`` in the current directory, or
    the next free name). A ``.toml`` worksheet: a new record seeded with it,
    beside it in the current directory (``NAME.jbk``, or the next free name).
    A record (``.jbk``): opened at its current state with its draft; a path
    that does not exist yet starts a new record there unless ``must_exist``.
    """
    if target is None:
        return Session.new()
    path = Path(target).expanduser()
    if path.suffix == ".toml":
        ws = Worksheet.load(path)
        return Session.from_worksheet(ws, first_free(Path(os.getcwd()), path.stem))
    if path.exists() or draft_path(path).exists():
        return Session.open(path)
    if must_exist:
        raise InputError(str(path), "does not exist (a record .jbk, or a worksheet .toml to start one from)")
    if path.suffix != RECORD_SUFFIX:
        raise InputError(str(path), f"is not a record: give a {RECORD_SUFFIX} record or a .toml worksheet")
    return Session.new(path)


def demo_session(sample: Path | str, record: Path | str | None = None) -> Session:
    """The bundled demo as a new record (in a temporary folder unless ``record`` is given)."""
    ws = Worksheet.load(sample)
    if record is None:
        folder = Path(tempfile.mkdtemp(prefix="joulebook-demo-"))
        record = folder / (Path(sample).stem + RECORD_SUFFIX)
    session = Session.from_worksheet(ws, record)
    session.notes.append(f"demo record: {session.path}")
    return session
