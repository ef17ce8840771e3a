"""Re-checking an archive: every record under some folders verified and replayed, one row each.

:func:`recheck_one` is the whole work for one record and a pure function of
the file it reads (it writes nothing: a torn last entry is reported, not set
aside as :meth:`.Record.load` would). :func:`recheck_all` runs it over many
records, in this process, in a pool of processes or on a Dask cluster, and
returns the rows in the order of the sorted paths whatever ran them.

A record has one outcome, the first of :data:`OUTCOMES` that applies:

1. ``chain broken``: the record's grammar (the file cannot be read as a
   record, naming the line), its hash chain, or a last entry cut off;
2. ``unreadable``: the file cannot be opened (missing, no permission, not
   visible to a cluster's worker);
3. ``signature invalid``: a sign-off that verification fails (its signature
   does not verify with the allowed-signers file, it covers another hash,
   or it breaks the sign-off rules);
4. ``fails verification``: another rule verification checks (an entry's text
   is not the rendering of its data, a second opening, a comment on a later
   entry);
5. ``re-solve failed``: a solve that succeeded when recorded fails now, or
   the replay raised;
6. ``results changed``: a recorded result differs from the re-solve beyond
   the tolerance (or a recorded failure now solves, or fails otherwise);
7. ``not signed``: intact and reproduced, but no sign-off follows the last
   change of the calculation;
8. ``reproduced``: intact, reproduced and signed off.

Without an allowed-signers file, signatures are not checked: that does not
change the outcome, and the row says so (``signatures``, and its detail).
"""

from __future__ import annotations

import dataclasses
import math
import os
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterable, Sequence

from ..errors import BalanceError, InputError
from . import store
from .format import COMMENT, RESOLUTION, SIGN_OFF, Entry, parse
from .record import Record
from .replay import DEFAULT_TOLERANCE, ReplayReport
from .replay import _scales as scales_of  # what compare judges a number against: the largest of its unit
from .verify import INVALID, NOT_CHECKED, UNSIGNED

CHAIN_BROKEN = "chain broken"
UNREADABLE = "unreadable"
SIGNATURE_INVALID = "signature invalid"
FAILS_VERIFICATION = "fails verification"
RESOLVE_FAILED = "re-solve failed"
CHANGED = "results changed"
NOT_SIGNED = "not signed"
REPRODUCED = "reproduced"
#: Every outcome, first the one that wins when several apply (see the module docstring).
OUTCOMES = (CHAIN_BROKEN, UNREADABLE, SIGNATURE_INVALID, FAILS_VERIFICATION, RESOLVE_FAILED, CHANGED,
            NOT_SIGNED, REPRODUCED)
#: The columns of the table and of its CSV, in order (:meth:`RecheckRow.cells`).
COLUMNS = ("path", "outcome", "largest change", "revision", "signed roles", "detail")
SUFFIX = ".jbk"
#: How long a cluster with no worker yet is waited for [s].
WORKER_WAIT = 10.0

Progress = Callable[[int, int], None]
"""told (records done, records in all) as each record is done"""


@dataclass(frozen=True)
class RecheckRow:
    """What re-checking one record found (plain strings and SI floats: it crosses processes)."""

    path: str
    outcome: str
    """one of :data:`OUTCOMES`"""
    detail: str = ""
    quantity: str = ""
    """the recorded value that changed most, by its path in the solve's data (``states.settled.T``)"""
    change: float | None = None
    """its relative change [-]: (now − recorded) over the larger of the two and of the largest
    recorded value of its unit (what the tolerance is compared with); None when not a number"""
    entry: int | None = None
    """the solve entry of that change"""
    revision: int | None = None
    """the record's current revision; None when its chain is broken or it cannot be read"""
    roles: tuple[str, ...] = ()
    """the roles signed off since the calculation last changed, in their order"""
    signatures: str = ""
    """'valid', 'not checked', 'unsigned' (marked so), 'invalid', or '' when there is no sign-off"""

    @property
    def largest_change(self) -> str:
        if not self.quantity:
            return ""
        return self.quantity + ("" if self.change is None else f" {self.change:+.3g}")

    def cells(self) -> tuple[str, ...]:
        """The row as the table and the CSV show it (:data:`COLUMNS`)."""
        return (self.path, self.outcome, self.largest_change, "" if self.revision is None else str(self.revision),
                ", ".join(self.roles), self.detail)


# -- one record ------------------------------------------------------------------------
def recheck_one(path: str, allowed_signers: str | None = None, tolerance: float = DEFAULT_TOLERANCE) -> RecheckRow:
    """Verify and replay the record at ``path`` (read only), and say what was found.

    ``allowed_signers`` is an OpenSSH allowed-signers file (signatures are not checked without
    one; an unreadable one raises InputError naming ``--allowed-signers``); ``tolerance`` is
    the replay's relative tolerance [-].
    """
    path = str(path)
    _check_tolerance(tolerance)
    try:
        raw = store.read(Path(path))
    except InputError as exc:
        return RecheckRow(path, UNREADABLE, exc.message)
    try:
        parsed = parse(raw, path)
    except InputError as exc:
        return RecheckRow(path, CHAIN_BROKEN, str(exc))
    if parsed.torn:
        n = len(parsed.entries)
        return RecheckRow(path, CHAIN_BROKEN, f"entry {n + 1} is cut off at the end (from line {parsed.torn_line}); "
                                              f"the {n} entries before it are intact")
    rec = Record(Path(path), parsed.entries, parsed.good)  # not Record.load: nothing is set aside or written
    if rec.broken:
        return RecheckRow(path, CHAIN_BROKEN, rec.broken[1])

    v = rec.verify(allowed_signers)
    last = _last_change(rec.entries)
    roles = tuple(s.role for s in v.signoffs if s.seq > last)  # signed off since the calculation last changed
    statuses = {s.status for s in v.signoffs if s.seq > last}
    signatures = next((s for s in (INVALID, NOT_CHECKED, UNSIGNED, "valid") if s in statuses), "")
    found: dict[str, str] = {}  # outcome: its detail, for every outcome that applies
    invalid = {s.seq for s in v.signoffs if s.status == INVALID}
    for seq, problem in v.problems:
        found.setdefault(SIGNATURE_INVALID if seq in invalid else FAILS_VERIFICATION, f"entry {seq}: {problem}")

    change: tuple = ("", None, None)
    try:
        report = rec.replay(tolerance)
    except Exception as exc:  # one record's defect must not stop the archive: it is its row
        found[RESOLVE_FAILED] = f"the replay raised {type(exc).__name__}: {exc}"
        report = None
    if report is not None:
        change = _largest(report, rec.entries)
        for s in report.solves:
            if s.status == "now fails":
                found.setdefault(RESOLVE_FAILED, f"entry {s.seq}: solved when recorded, now fails: {s.differences[0].now}")
            elif not s.ok:
                found.setdefault(CHANGED, _changed(s, tolerance, change))
    if not roles:
        found[NOT_SIGNED] = f"{_reproduced(report)}; {_unsigned(rec)}"

    outcome = next((o for o in OUTCOMES if o in found), REPRODUCED)
    words = [found.get(outcome) or _reproduced(report)]
    if report is not None and report.pins:
        words.append(_pins(report))
    if signatures == NOT_CHECKED:
        words.append("signatures not checked (no allowed-signers file)")
    elif signatures == UNSIGNED:
        words.append("a sign-off is marked unsigned (no signature)")
    also = [o for o in OUTCOMES if o in found and o != outcome]
    if also:
        words.append("also " + ", ".join(also))
    return RecheckRow(path, outcome, "; ".join(words), *change, revision=v.revision, roles=roles,
                      signatures=signatures)


def _last_change(entries: Sequence[Entry]) -> int:
    """The last entry that is neither a sign-off nor a review entry (0 when none)."""
    return max((e.seq for e in entries if e.kind not in (SIGN_OFF, COMMENT, RESOLUTION)), default=0)


def _largest(report: ReplayReport, entries: Sequence[Entry]) -> tuple[str, float | None, int | None]:
    """The recorded value that changed most, as (its path, its relative change, its solve entry)."""
    best: tuple[str, float | None, int | None] = ("", None, None)
    size = -1.0
    for s in report.solves:
        if s.status != "differs":  # a solve that fails now, or solves now, has no values to compare
            continue
        scales = scales_of(entries[s.seq - 1].data)
        for d in s.differences:
            a, b = d.recorded, d.now
            if d.note or not all(isinstance(x, (int, float)) and not isinstance(x, bool) for x in (a, b)):
                if not best[0]:  # not a number (a phase, a unit, an error): named when nothing else is
                    best = (d.path, None, s.seq)
                continue
            scale = max(abs(a), abs(b), scales.get(d.unit, 0.0) if d.unit else 0.0)
            rel = (b - a) / scale if scale else 0.0
            key = math.inf if rel != rel else abs(rel)  # a nan is the largest change there is
            if key > size:
                best, size = (d.path, float(rel), s.seq), key
    return best


def _changed(s, tolerance: float, change) -> str:
    if s.status == "now solves":
        return f"entry {s.seq}: recorded as failed ({s.differences[0].recorded}), now solves"
    if s.status == "fails differently":
        d = s.differences[0]
        return f"entry {s.seq}: failed when recorded and fails now, otherwise: recorded {d.recorded!r}, now {d.now!r}"
    n = len(s.differences)
    first = next((d for d in s.differences if (d.path, s.seq) == (change[0], change[2])), s.differences[0])
    lead = "largest" if first.path == change[0] and change[1] is not None else "first"
    return f"entry {s.seq}: {n} value{'s' if n != 1 else ''} beyond {tolerance:g}; {lead} {first.line()}"


def _unsigned(rec: Record) -> str:
    if not any(e.kind == SIGN_OFF for e in rec.entries):
        return "no sign-off"
    return f"revision {rec.revision} has no sign-off (an earlier revision was signed)"


def _reproduced(report: ReplayReport | None) -> str:
    n = len(report.solves) if report is not None else 0
    if not n:
        return "no solve entries: nothing to reproduce"
    return f"{n} solve{'s' if n != 1 else ''} reproduced"


def _pins(report: ReplayReport) -> str:
    said = []
    for d in report.pins:
        key = d.path.rsplit(".", 1)[-1]
        what = f"joulebook {d.recorded}" if key == "joulebook" else "other species data"
        if what not in said:
            said.append(what)
    return "recorded with " + " and ".join(said)


# -- many records ------------------------------------------------------------------------
def find_records(paths: Iterable[str]) -> list[str]:
    """Every record (``*.jbk``) under the folders given (recursively; symbolic links to folders
    are not followed), and every record file given itself, whatever its name: sorted, each once.
    Raises InputError naming a path that does not exist or a folder that cannot be read."""
    found: set[str] = set()
    for given in paths:
        p = Path(given)
        if p.is_dir():
            def refuse(exc: OSError) -> None:  # os.walk would skip an unreadable folder silently
                raise InputError(exc.filename or given, f"cannot be read: {exc.strerror}")

            for folder, dirs, files in os.walk(p, onerror=refuse):
                found.update(os.path.normpath(os.path.join(folder, f)) for f in files if f.endswith(SUFFIX))
        elif p.is_file():
            found.add(os.path.normpath(given))
        elif p.exists():
            raise InputError(given, "is neither a folder nor a record file")
        else:
            raise InputError(given, "does not exist: expected a folder of records or a record file")
    return sorted(found)


def recheck_all(paths: Iterable[str], jobs: int = 1, scheduler: str | None = None,
                allowed_signers: str | None = None, tolerance: float = DEFAULT_TOLERANCE,
                progress: Progress | None = None) -> list[RecheckRow]:
    """:func:`recheck_one` for every record path, in the order of the sorted paths.

    ``jobs`` 1 runs them here; more runs them in that many processes; ``scheduler`` (a Dask
    scheduler's address, ``tcp://host:8786``) runs them on its workers, which read the records
    themselves (at the same paths, made absolute here). ``progress`` is told (done, total).
    The processes are spawned, so a script that calls this with ``jobs`` > 1 keeps its own work
    under ``if __name__ == "__main__":`` (as :mod:`multiprocessing` requires).
    """
    paths = sorted(str(p) for p in paths)
    if isinstance(jobs, bool) or not isinstance(jobs, int) or jobs < 1:
        raise InputError("--jobs", f"expected a whole number of processes >= 1; got {jobs!r}")
    if scheduler is not None and jobs != 1:
        raise InputError("--jobs", "goes without --scheduler: the cluster's workers share the work")
    _check_tolerance(tolerance)
    tell = progress or (lambda done, total: None)
    if not paths:
        return []
    if scheduler is not None:
        return _on_cluster(paths, scheduler, allowed_signers, tolerance, tell)
    if jobs == 1:
        rows = []
        for p in paths:
            rows.append(recheck_one(p, allowed_signers, tolerance))
            tell(len(rows), len(paths))
        return rows
    return _in_processes(paths, jobs, allowed_signers, tolerance, tell)


def _check_tolerance(tolerance) -> None:
    if isinstance(tolerance, bool) or not isinstance(tolerance, (int, float)) or not tolerance >= 0:
        raise InputError("--tolerance", f"expected a relative tolerance >= 0, like 1e-9; got {tolerance!r}")


def _in_processes(paths: list[str], jobs: int, allowed: str | None, tolerance: float, tell: Progress) -> list[RecheckRow]:
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor, as_completed
    from concurrent.futures.process import BrokenProcessPool

    rows: list = [None] * len(paths)
    # spawned, not forked: a fork copies whatever threads the caller runs (a progress bar, an event loop)
    pool = ProcessPoolExecutor(max_workers=min(jobs, len(paths)), mp_context=multiprocessing.get_context("spawn"))
    try:
        futures = {pool.submit(recheck_one, p, allowed, tolerance): i for i, p in enumerate(paths)}
        for done, future in enumerate(as_completed(futures), 1):
            rows[futures[future]] = future.result()
            tell(done, len(paths))
    except BrokenProcessPool:
        raise BalanceError("--jobs: a worker process stopped before its records were re-checked (killed, out "
                           "of memory, or see the messages above); try fewer jobs") from None
    finally:
        pool.shutdown(wait=True, cancel_futures=True)  # on an error, what has not started never does
    return rows


def pins() -> dict:
    """The running joulebook's version and species data: what a worker must share with the caller."""
    from .. import api

    return api.pins()


def _on_cluster(paths: list[str], address: str, allowed: str | None, tolerance: float,
                tell: Progress) -> list[RecheckRow]:
    try:
        from dask.distributed import Client, as_completed
    except ImportError:
        raise InputError("--scheduler", "needs Dask, which is not installed here: "
                                        "pip install 'joulebook[cluster]'") from None
    try:
        client = Client(address)  # the connect timeout is Dask's own setting (distributed.comm.timeouts.connect)
    except (OSError, TimeoutError, ValueError, TypeError) as exc:
        raise InputError("--scheduler", f"cannot reach a Dask scheduler at {address!r}: {exc}") from None
    with client:
        _same_joulebook(client, address)
        where = [os.path.abspath(p) for p in paths]  # a worker's working folder is not ours
        allowed = os.path.abspath(allowed) if allowed is not None else None
        # pure=False: a re-check reads a file that may have changed; never reuse an earlier result
        futures = client.map(recheck_one, where, allowed_signers=allowed, tolerance=tolerance, pure=False)
        for done, _ in enumerate(as_completed(futures), 1):
            tell(done, len(paths))
        rows = client.gather(futures)
    return [dataclasses.replace(row, path=p) for row, p in zip(rows, paths)]


def _same_joulebook(client, address: str) -> None:
    """Refuse a cluster whose workers run another joulebook or species data: their replay would
    judge the records against other numbers than this one's."""
    if not client.scheduler_info().get("workers"):
        try:
            client.wait_for_workers(1, timeout=WORKER_WAIT)
        except TimeoutError:
            raise InputError("--scheduler", f"no worker is connected to the scheduler at {address} "
                                            f"(waited {WORKER_WAIT:g} s)") from None
    mine = pins()
    try:
        theirs = client.run(pins)
    except Exception as exc:  # a worker that cannot import joulebook fails here, whatever it raises
        raise InputError("--scheduler", f"a worker cannot run joulebook ({type(exc).__name__}: {exc}); "
                                        f"install joulebook {mine['joulebook']} on every worker") from None
    for worker, found in sorted(theirs.items()):
        if found != mine:
            what = (f"joulebook {found['joulebook']}" if found["joulebook"] != mine["joulebook"]
                    else "other species data")
            raise InputError("--scheduler", f"worker {worker} runs {what}; install joulebook "
                                            f"{mine['joulebook']} (the same as here) on every worker")


def worst(rows: Sequence[RecheckRow]) -> str | None:
    """The outcome that wins over the others found (:data:`OUTCOMES`); None when there are no rows."""
    present = {r.outcome for r in rows}
    return next((o for o in OUTCOMES if o in present), None)


def counts(rows: Sequence[RecheckRow]) -> dict[str, int]:
    """How many rows have each outcome, in the order of :data:`OUTCOMES` (those found only)."""
    return {o: n for o in OUTCOMES if (n := sum(r.outcome == o for r in rows))}


def as_csv(rows: Sequence[RecheckRow]) -> str:
    """The table as CSV: a header row (:data:`COLUMNS`), then one row per record."""
    import csv
    import io

    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(COLUMNS)
    writer.writerows(r.cells() for r in rows)
    return out.getvalue()
