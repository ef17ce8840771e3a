"""The one place the terminal app touches files: the worksheet being edited,
its record (audit trail), the autosaved draft, and committing.

Screens never open a file; they hand the session a new :class:`Worksheet`
(``session.edit(ws)``) and ask it to commit a step (``session.commit(...)``).

Two files per worksheet:

``NAME.jbk``
    the record, written by :mod:`balance.record`: one entry per committed
    step, solve, comment and signature. Committing a step appends the
    changed sections of the worksheet to it.
``NAME.jbk.draft``
    the autosaved draft (JSON), rewritten atomically after every edit: the
    worksheet exactly as typed (blank fields and all), the step shown, the
    display units, and which sections were uncommitted. Closing the terminal
    or losing the SSH session loses nothing; reopening the record restores
    the draft over it.

When :mod:`balance.record` is not installed the session falls back to the
draft alone: commits are kept in the draft (as the committed worksheet) and
nothing else is written.
"""

from __future__ import annotations

import json
import os
import tempfile
import threading
from dataclasses import asdict, dataclass, field
from pathlib import Path

from balance import api
from balance.errors import InputError
from balance.worksheet import (
    SECTIONS,
    Fluid,
    HeatTerm,
    Heading,
    Process,
    StateInput,
    System,
    Worksheet,
    WorkTerm,
)

from . import offload
from .steps import STEP_SECTIONS

#: The record file's extension.
RECORD_SUFFIX = ".jbk"
#: Appended to the record's path for the autosaved draft.
DRAFT_SUFFIX = ".draft"
DRAFT_FORMAT = 1


def record_module():
    """:mod:`balance.record`, or None while it is not installed."""
    try:
        from balance import record
    except ImportError:
        return None
    return record


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
    data = ws.to_dict()
    default = [] if section in ("initial", "heat", "work") else {}
    return data.get(section, default)


# -- the draft's own plain-data form of a worksheet (keeps blank fields) -------
def worksheet_to_raw(ws: Worksheet) -> dict:
    return asdict(ws)


def worksheet_from_raw(raw: dict) -> Worksheet:
    """Inverse of :func:`worksheet_to_raw`; raises InputError on a damaged draft."""
    try:
        head = dict(raw["heading"])
        head["assumptions"] = tuple(head.get("assumptions", ()))
        proc = dict(raw["process"])
        proc["constraints"] = tuple(proc.get("constraints", ()))
        return Worksheet(
            heading=Heading(**head),
            fluid=Fluid(**raw["fluid"]),
            system=System(**raw["system"]),
            initial=tuple(StateInput(**s) for s in raw["initial"]),
            final=StateInput(**raw["final"]),
            heat=tuple(HeatTerm(**h) for h in raw["heat"]),
            work=tuple(WorkTerm(**w) for w in raw["work"]),
            process=Process(**proc),
        )
    except (KeyError, TypeError, ValueError) as exc:
        raise InputError("draft", f"is damaged and cannot be read ({exc})") from None


def overlay(base: Worksheet, top: Worksheet, sections) -> Worksheet:
    """``base`` with the given sections taken from ``top``."""
    return base.with_(**{SECTIONS[s]: getattr(top, SECTIONS[s]) for s in sections})


def first_free(directory: Path, stem: str) -> Path:
    """``stem.jbk`` in ``directory``, or ``stem-2.jbk`` ... when taken."""
    candidate = directory / f"{stem}{RECORD_SUFFIX}"
    i = 2
    while candidate.exists() or Path(str(candidate) + DRAFT_SUFFIX).exists():
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
    """the open :class:`balance.record.Record`, or None (not created yet, or no record package)"""
    notes: list[str] = field(default_factory=list)
    """what the app should tell the user on opening (e.g. a draft restored)"""
    author: str | None = None
    _lock: threading.RLock = field(default_factory=threading.RLock, repr=False, compare=False)
    _write_lock: threading.Lock = field(default_factory=threading.Lock, repr=False, compare=False)
    _wake: threading.Event = field(default_factory=threading.Event, repr=False, compare=False)
    _writer: threading.Thread | None = field(default=None, repr=False, compare=False)
    _pending: tuple | None = field(default=None, repr=False, compare=False)
    _seq: int = field(default=0, repr=False, compare=False)
    _written: int = field(default=0, repr=False, compare=False)
    write_error: str = ""
    """the last draft write that failed (shown by the app), or ''"""

    # -- opening ------------------------------------------------------------
    @classmethod
    def new(cls, path: Path | str | None = None, *, directory: Path | str | None = None) -> "Session":
        """A new, empty worksheet; its record is created at the first commit."""
        if path is None:
            path = first_free(Path(directory or os.getcwd()), "worksheet")
        path = Path(path)
        session = cls(path=path)
        session._restore_draft()
        return session

    @classmethod
    def from_worksheet(cls, ws: Worksheet, path: Path | str) -> "Session":
        """A new record seeded with a worksheet (a sample, or a TOML file)."""
        path = Path(path)
        # every input step arrives filled in: count them as visited
        session = cls(path=path, worksheet=ws, extras={"visited": list(STEP_SECTIONS)})
        rec = record_module()
        if rec is not None:
            # the reference model solves in its own process (started here, warm for the app)
            session.record = rec.Record.create(str(path), author=session.author, worksheet=ws, solver=_entry_data)
            session.committed = session.record.worksheet()
        else:
            session.committed = ws
        session.save_draft()
        return session

    @classmethod
    def open(cls, path: Path | str) -> "Session":
        """An existing record (or only its draft) at its current state."""
        path = Path(path)
        session = cls(path=path)
        rec = record_module()
        if path.exists():
            if rec is None:
                session.notes.append(
                    f"{path.name} is a record, but the record package is not installed: "
                    "only its draft can be shown"
                )
            else:
                session.record = rec.Record.load(str(path))
                if session.record.recovered:
                    session.notes.append(f"{path.name}: {session.record.recovered}")
                session.committed = session.worksheet = session.record.worksheet()
        elif not session.draft_path.exists():
            raise InputError(str(path), "does not exist (give a record .jbk, a worksheet .toml, or no file for a new worksheet)")
        session._restore_draft()
        return session

    @property
    def draft_path(self) -> Path:
        return Path(str(self.path) + DRAFT_SUFFIX)

    @property
    def has_record(self) -> bool:
        return self.record is not None

    @property
    def record_available(self) -> bool:
        """Whether commits go to a record (the record package is installed)."""
        return record_module() is not None

    # -- editing -----------------------------------------------------------
    def edit(self, ws: Worksheet) -> None:
        """Replace the worksheet being edited and autosave the draft."""
        if ws == self.worksheet:
            return
        self.worksheet = ws
        self.save_draft_soon()

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

    def dirty(self) -> tuple[str, ...]:
        """Sections whose text differs from the committed worksheet."""
        now, then = self.worksheet.to_dict(), self.committed.to_dict()
        empty = lambda s: [] if s in ("initial", "heat", "work") else {}  # noqa: E731
        return tuple(s for s in SECTIONS if now.get(s, empty(s)) != then.get(s, empty(s)))

    def dirty_steps(self) -> tuple[str, ...]:
        dirty = set(self.dirty())
        return tuple(step for step, secs in STEP_SECTIONS.items() if dirty & set(secs))

    # -- committing ---------------------------------------------------------
    def commit(self, sections=None) -> list:
        """Append each changed section (of ``sections``, default all) to the record.

        Returns the entries written (the sections committed, without a record
        package). Raises BalanceError if the record refuses a section.
        """
        with self._lock:
            return self._commit(sections)

    def _commit(self, sections) -> list:
        wanted = [s for s in self.dirty() if sections is None or s in sections]
        if not wanted:
            return []
        rec = record_module()
        written: list = []
        if rec is None:
            self.committed = overlay(self.committed, self.worksheet, wanted)
            written = list(wanted)
        else:
            if self.record is None:
                self.path.parent.mkdir(parents=True, exist_ok=True)
                self.record = rec.Record.create(str(self.path), author=self.author)
            for section in wanted:
                written.append(
                    self.record.append_step(section, section_data(self.worksheet, section), author=self.author)
                )
                self.committed = overlay(self.committed, self.worksheet, [section])
        self.save_draft()
        return written

    def commit_step(self, step: str) -> list:
        return self.commit(STEP_SECTIONS.get(step, ()))

    # -- the record's other commands (through the record package) -------------
    def _need_record(self, what: str):
        if record_module() is None:
            raise InputError("record", f"cannot {what}: the record package is not installed in this build")
        if self.record is None:
            self.commit()
        if self.record is None:
            raise InputError("record", f"cannot {what} yet: nothing has been committed")
        return self.record

    def needs_solve(self) -> bool:
        """Whether the record's inputs changed since its last solve entry (or it has none)."""
        rec = record_module()
        if rec is None or self.record is None:
            return False
        content = set(rec.SECTION_KINDS.values())
        for e in reversed(self.record.entries):
            if e.kind == "solve":
                return False
            if e.kind in content:
                return True
        return False

    def solve_due(self) -> dict | None:
        """The record's worksheet sections when a solve entry is due (:meth:`needs_solve`), else None."""
        with self._lock:
            return self.record.sections() if self.needs_solve() else None

    def append_solve(self, solved: api.Attempt | None = None):
        """Append a solve entry when the record's inputs changed since its last one.

        Call :meth:`commit` first (on the UI thread). ``solved`` is a solve already made
        (the one on the app's screen, :func:`tui.analysis.solve`): the entry is written from
        it, only while the record holds what it solved (a newer commit wants its own solve).
        Without it, the sections due are solved here, in the reference-model process when
        they use that model, with the session not held meanwhile (seconds, for that model:
        the app calls this from a worker). Returns the entry, or None.
        """
        if solved is None:
            sections = self.solve_due()
            if sections is None:
                return None
            solved = solve_sections(sections)
        with self._lock:
            sections = self.solve_due()
            if sections is None or solved.worksheet is None or api.read(sections) != solved.worksheet:
                return None
            entry = self.record.append_solve(author=self.author, data=api.entry_data(solved))
            self.save_draft()
            return entry

    def signed(self) -> bool:
        """Whether a sign-off follows the last change of the calculation."""
        if self.record is None:
            return False
        for e in reversed(self.record.entries):
            if e.kind == "sign-off":
                return True
            if e.kind not in ("comment", "resolution"):
                return False
        return False

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

    def verify(self):
        """The record's :class:`balance.record.Verification` (with the configured allowed signers)."""
        rec = record_module()
        record = self._need_record("verify")
        return record.verify(rec.default_allowed_signers())

    def roles(self) -> tuple[str, ...]:
        """The record's sign-off roles, in order."""
        rec = record_module()
        if rec is None:
            return ()
        if self.record is not None and self.record.entries and self.record.entries[0].kind == "opening":
            return tuple(self.record.entries[0].data.get("roles", rec.ROLES))
        return tuple(rec.ROLES)

    def next_role(self) -> str:
        """The first role not yet signed since the calculation last changed."""
        signed = set()
        for e in reversed(self.entries()):
            if e.kind == "sign-off":
                signed.add(e.data.get("role"))
            elif e.kind not in ("comment", "resolution"):
                break
        return next((r for r in self.roles() if r not in signed), self.roles()[-1] if self.roles() else "")

    def default_author(self) -> str:
        rec = record_module()
        if self.author:
            return self.author
        if rec is None:
            return ""
        try:
            return rec.default_author()
        except InputError:
            return ""

    # -- the draft -------------------------------------------------------------
    def _head(self) -> str | None:
        if self.record is None:
            return None
        return str(self.record.head)

    def save_draft(self) -> None:
        """Write the draft now, atomically (temporary file, then rename)."""
        self._write(self._snapshot())

    def save_draft_soon(self) -> None:
        """Write the draft from a background thread (a rename can take tens of ms on a busy disk).

        Only the latest snapshot is written; :meth:`flush` waits for it.
        """
        snapshot = self._snapshot()
        with self._lock:
            self._pending = snapshot
            if self._writer is None or not self._writer.is_alive():
                self._writer = threading.Thread(target=self._write_pending, name="joulebook-draft", daemon=True)
                self._writer.start()
            self._wake.set()

    def flush(self) -> None:
        """Wait until the latest draft is on disk."""
        with self._lock:
            pending, self._pending = self._pending, None
        if pending is not None:
            self._write(pending)

    def _write_pending(self) -> None:
        while True:
            self._wake.wait()
            self._wake.clear()
            with self._lock:
                pending, self._pending = self._pending, None
            if pending is not None:
                try:
                    self._write(pending)
                except OSError as exc:
                    self.write_error = f"{self.draft_path}: {exc.strerror}"

    def _snapshot(self) -> tuple[int, dict]:
        with self._lock:
            self._seq += 1
            return self._seq, {
                "format": DRAFT_FORMAT,
                "record": self.path.name,
                "head": self._head(),
                "step": self.step,
                "units": self.units,
                "extras": self.extras,
                "dirty": list(self.dirty()),
                "worksheet": worksheet_to_raw(self.worksheet),
                "committed": worksheet_to_raw(self.committed),
            }

    def _write(self, snapshot: tuple[int, dict]) -> None:
        seq, data = snapshot
        with self._write_lock:
            if seq <= self._written:
                return  # a newer draft is already on disk
            target = self.draft_path
            target.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.", suffix=".tmp")
            try:
                with os.fdopen(fd, "w", encoding="utf-8") as fh:
                    json.dump(data, fh, ensure_ascii=False, indent=1)
                os.replace(tmp, target)
            except BaseException:
                try:
                    os.unlink(tmp)
                except OSError:
                    pass
                raise
            self._written = seq

    def _restore_draft(self) -> None:
        path = self.draft_path
        if not path.exists():
            return
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
            draft = worksheet_from_raw(data["worksheet"])
            committed = worksheet_from_raw(data["committed"])
        except (OSError, ValueError, KeyError, TypeError, InputError) as exc:
            self.notes.append(f"the draft {path.name} could not be read ({exc}); it was left as it is")
            return
        self.step = data.get("step", self.step)
        self.units = data.get("units", self.units)
        self.extras = dict(data.get("extras", {}))
        if self.record is None:
            # no record (yet, or no record package): the draft holds both states
            self.worksheet, self.committed = draft, committed
            return
        dirty = [s for s in data.get("dirty", []) if s in SECTIONS]
        if data.get("head") == self._head():
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
    if path.exists() or Path(str(path) + DRAFT_SUFFIX).exists():
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
