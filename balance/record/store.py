"""Writing records safely: whole-file atomic replacement, a folder lock, torn tails set aside.

Every write of a record writes the complete new file to a temporary file in
the same folder, flushes it to disk (fsync), renames it over the record
(an atomic step on POSIX file systems) and flushes the folder. A reader, or
a writer killed at any moment, therefore sees either the old record or the
new one, never a part; the old file is never truncated or rewritten in
place. The cost is rewriting the file on each append, which for records of
tens to hundreds of kilobytes is well under the time of the fsync itself.

Writers of the same folder take an exclusive ``flock`` on the folder while
they check and replace a record, and refuse to write when the record on
disk is no longer the one they read (another writer appended meanwhile).
Temporary files left by a writer that was killed are removed by the next
writer of that record, under the same lock.

A torn tail (an entry cut off at the end of the file) can still reach a
record by other routes: a copy interrupted, a file system without atomic
rename, an editor. :func:`set_aside` moves such a tail into a side file
``<record>.torn-<UTC time>`` and rewrites the record without it.
"""

from __future__ import annotations

import contextlib
import os
import secrets
from datetime import datetime
from pathlib import Path

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


@contextlib.contextmanager
def locked(path: Path):
    """Hold an exclusive lock on the record's folder (not re-entrant)."""
    folder = path.parent
    fd = None
    if fcntl is not None:
        try:
            fd = os.open(folder, os.O_RDONLY)
            fcntl.flock(fd, fcntl.LOCK_EX)
        except OSError:  # a file system without flock: the on-disk comparison still guards
            if fd is not None:
                os.close(fd)
            fd = None
    try:
        yield
    finally:
        if fd is not None:
            fcntl.flock(fd, fcntl.LOCK_UN)
            os.close(fd)


def _temp_prefix(path: Path) -> str:
    return f".{path.name}.writing-"


def _remove_stale_temps(path: Path) -> None:
    """Temporary files of killed writers (only called with the lock held)."""
    prefix = _temp_prefix(path)
    try:
        names = os.listdir(path.parent)
    except OSError:
        return
    for name in names:
        if name.startswith(prefix) and name.endswith(".tmp"):
            with contextlib.suppress(OSError):
                os.unlink(path.parent / name)


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
    temp = path.parent / f"{_temp_prefix(path)}{os.getpid()}-{secrets.token_hex(4)}.tmp"
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


def create(path: Path, data: bytes) -> None:
    """Write a new record; refuses if the file exists."""
    with locked(path):
        if path.exists():
            raise InputError(str(path), "already exists; a record is never overwritten")
        _remove_stale_temps(path)
        _write_replace(path, data, overwrite=False)


def commit(path: Path, data: bytes, expected: bytes) -> None:
    """Replace the record with data, provided the file on disk is still ``expected``."""
    with locked(path):
        current = read(path)
        if current != expected:
            raise InputError(str(path), "was changed by another writer since it was read; "
                                        "load it again (nothing was written)")
        _remove_stale_temps(path)
        _write_replace(path, data)


def side_path(path: Path, moment: datetime) -> Path:
    stamp = moment.strftime("%Y%m%dT%H%M%SZ")
    candidate = path.with_name(f"{path.name}.torn-{stamp}")
    k = 2
    while candidate.exists():
        candidate = path.with_name(f"{path.name}.torn-{stamp}-{k}")
        k += 1
    return candidate


def set_aside(path: Path, as_read: bytes, good: bytes, torn: bytes, moment: datetime) -> Path:
    """Move a torn tail into a side file and rewrite the record without it.

    The side file is written (and flushed) before the record is replaced, so
    the torn bytes exist on disk at every moment. Returns the side file.
    """
    with locked(path):
        if read(path) != as_read:
            raise InputError(str(path), "changed while it was being read; load it again")
        side = side_path(path, moment)
        _write_replace(side, torn, overwrite=False)
        _remove_stale_temps(path)
        _write_replace(path, good)
    return side


def write_output(path: Path, data: bytes) -> None:
    """Write an export (replacing any earlier export) atomically."""
    path = Path(path)
    if path.is_dir():
        raise InputError(str(path), "is a folder; give a file name")
    if not path.parent.is_dir():
        raise InputError(str(path), "its folder does not exist")
    _write_replace(path, data)
