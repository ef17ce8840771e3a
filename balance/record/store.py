"""Writing records safely: whole-file atomic replacement, a folder lock, torn tails set aside.

Every write of a record writes the complete new file to a temporary file in
the same folder, flushes it to disk (fsync), renames it over the record
(an atomic step on POSIX file systems) and flushes the folder. A reader, or
a writer killed at any moment, therefore sees either the old record or the
new one, never a part; the old file is never truncated or rewritten in
place. The cost is rewriting the file on each append, which for records of
tens to hundreds of kilobytes is well under the time of the fsync itself.

Writers of the same folder take an exclusive ``flock`` on the folder while
they check and replace a record, waiting for it at most :data:`WAIT`
seconds while another writer holds it (then nothing is written, and the
message says so). Under the lock a writer reads the record again; when
another writer appended meanwhile, the writer's own entry is made again
from what is on disk, after the rules are checked again against it
(:meth:`balance.record.Record` does that), so no writer ever replaces a
change it has not seen.

Every file joulebook writes here (a record, a side file, an export) is
written through a temporary file named ``.<name>.writing-<pid>-<8 hex>.tmp``,
created, renamed and removed only under the folder lock. So a temporary file
of that pattern that a writer finds while it holds the lock was left by a
writer that was killed, whichever file of the folder it was writing, and the
writer removes it before it writes (:func:`_remove_stale_temps`).

A torn tail (an entry cut off at the end of the file) can still reach a
record by other routes: a copy interrupted, a file system without atomic
rename, an editor. :func:`set_aside` moves such a tail into a side file
``<record>.torn-<UTC time>`` and rewrites the record without it.
"""

from __future__ import annotations

import contextlib
import os
import random
import re
import secrets
import time
from datetime import datetime
from pathlib import Path
from typing import Callable

from ..errors import InputError

try:  # POSIX
    import fcntl
except ImportError:  # pragma: no cover - not POSIX: no folder lock, still atomic rename
    fcntl = None


def read(path: Path) -> bytes:
    try:
        with open(path, "rb") as fh:
            return fh.read()
    except FileNotFoundError:
        raise InputError(str(path), "does not exist") from None
    except IsADirectoryError:
        raise InputError(str(path), "is a folder, not a record file") from None
    except OSError as exc:
        raise InputError(str(path), f"cannot be read: {exc.strerror}") from None


#: How long a writer waits for the folder lock while another writer holds it [s]. A write holds it
#: for a few milliseconds (mostly the fsyncs), so this is room for a queue of writers, not for one.
WAIT = 5.0


@contextlib.contextmanager
def locked(path: Path, wait: float = WAIT):
    """Hold an exclusive lock on the record's folder (not re-entrant), waiting at most ``wait`` seconds.

    Raises InputError naming the record when another writer holds the lock
    longer than that (nothing was written). Yields True when the lock is
    held; False on a file system without ``flock``, where reading the record
    again before replacing it is the only guard.
    """
    fd = None
    if fcntl is not None:
        try:
            fd = os.open(path.parent, os.O_RDONLY)
        except OSError:
            fd = None
    if fd is not None:
        try:
            _take(fd, path, wait)
        except _NoLocks:
            os.close(fd)
            fd = None
        except BaseException:
            os.close(fd)
            raise
    try:
        yield fd is not None
    finally:
        if fd is not None:
            fcntl.flock(fd, fcntl.LOCK_UN)
            os.close(fd)


class _NoLocks(Exception):
    """The file system does not lock."""


def _take(fd: int, path: Path, wait: float) -> None:
    """Take the lock on fd, polling (flock has no timeout) with short randomised pauses that grow."""
    deadline = time.monotonic() + wait
    pause = 0.001
    while True:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
            return
        except BlockingIOError:  # held by another writer
            pass
        except OSError:
            raise _NoLocks from None
        left = deadline - time.monotonic()
        if left <= 0:
            raise InputError(str(path), f"another writer has held its folder for more than {wait:g} s; "
                                        "nothing was written: try again")
        time.sleep(min(left, pause * random.uniform(0.5, 1.5)))
        pause = min(pause * 2, 0.005)


#: The temporary file of a write in progress (see the module docstring); nothing else is named so.
_TEMP = re.compile(r"\..+\.writing-[0-9]+-[0-9a-f]{8}\.tmp", re.S)


def _temp_path(path: Path) -> Path:
    return path.parent / f".{path.name}.writing-{os.getpid()}-{secrets.token_hex(4)}.tmp"


def _remove_stale_temps(folder: Path, held: bool) -> None:
    """Remove the temporary files of killed writers from the folder, whatever file they were writing;
    only while the folder lock is held (``held``), when no temporary file there is in use."""
    if not held:  # a file system without flock: another writer may be using one
        return
    try:
        names = os.listdir(folder)
    except OSError:
        return
    for name in names:
        if _TEMP.fullmatch(name):
            with contextlib.suppress(OSError):
                os.unlink(folder / name)


def _fsync_folder(folder: Path) -> None:
    with contextlib.suppress(OSError):
        fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


def _write_replace(path: Path, data: bytes, overwrite: bool = True) -> None:
    """Write data to a temporary file beside path, fsync, and rename it into place.

    With overwrite False the final step is a hard link, which fails if path
    exists, so nothing is ever overwritten.
    """
    temp = _temp_path(path)
    try:
        fd = os.open(temp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
        try:
            view = memoryview(data)
            while view:
                written = os.write(fd, view)
                view = view[written:]
            os.fsync(fd)
        finally:
            os.close(fd)
        if overwrite:
            with contextlib.suppress(OSError):
                os.chmod(temp, os.stat(path).st_mode & 0o7777)
            os.replace(temp, path)
        else:
            try:
                os.link(temp, path)
            except FileExistsError:
                raise InputError(str(path), "already exists; a record is never overwritten") from None
            except OSError:  # no hard links here: rename (the lock and the check above guard it)
                if path.exists():
                    raise InputError(str(path), "already exists; a record is never overwritten") from None
                os.replace(temp, path)
        _fsync_folder(path.parent)
    except OSError as exc:
        raise InputError(str(path), f"could not be written: {exc.strerror or exc}; "
                                    "the file on disk is unchanged") from None
    finally:
        with contextlib.suppress(OSError):
            os.unlink(temp)


def create(path: Path, data: bytes, wait: float = WAIT) -> None:
    """Write a new record; refuses if the file exists."""
    with locked(path, wait) as held:
        _remove_stale_temps(path.parent, held)
        if path.exists():
            raise InputError(str(path), "already exists; a record is never overwritten")
        _write_replace(path, data, overwrite=False)


def commit(path: Path, build: Callable[[bytes], bytes], wait: float = WAIT) -> None:
    """Replace the record with ``build(current)``, ``current`` being the file as it is on disk
    under the folder lock; ``build`` raises to write nothing."""
    with locked(path, wait) as held:
        _remove_stale_temps(path.parent, held)
        data = build(read(path))
        _write_replace(path, data)


def side_path(path: Path, moment: datetime) -> Path:
    stamp = moment.strftime("%Y%m%dT%H%M%SZ")
    candidate = path.with_name(f"{path.name}.torn-{stamp}")
    k = 2
    while candidate.exists():
        candidate = path.with_name(f"{path.name}.torn-{stamp}-{k}")
        k += 1
    return candidate


def set_aside(path: Path, as_read: bytes, good: bytes, torn: bytes, moment: datetime, wait: float = WAIT) -> Path:
    """Move a torn tail into a side file and rewrite the record without it.

    The side file is written (and flushed) before the record is replaced, so
    the torn bytes exist on disk at every moment. Returns the side file.
    """
    with locked(path, wait) as held:
        _remove_stale_temps(path.parent, held)
        if read(path) != as_read:
            raise InputError(str(path), "changed while it was being read; load it again")
        side = side_path(path, moment)
        _write_replace(side, torn, overwrite=False)
        _write_replace(path, good)
    return side


def write_output(path: Path, data: bytes, wait: float = WAIT) -> None:
    """Write an export (replacing any earlier export) atomically, under its folder's lock as every
    write of joulebook's is (its temporary file is then one the next writer may remove)."""
    path = Path(path)
    if path.is_dir():
        raise InputError(str(path), "is a folder; give a file name")
    if not path.parent.is_dir():
        raise InputError(str(path), "its folder does not exist")
    with locked(path, wait) as held:
        _remove_stale_temps(path.parent, held)
        _write_replace(path, data)
