"""Nothing lost: a writer killed with SIGKILL at random moments never costs an entry it reported saved.

Each trial forks a writer from this process (so it starts in microseconds
with joulebook already imported), lets it append entries to a copy of a
solved record as fast as it can, reporting each entry's number and seal
through a pipe once ``append`` has returned, and kills it with SIGKILL
once it has reported a random number of entries (0 to 5), after a further
random delay: so the kill lands anywhere in a write, however fast or slow
the machine is. The record must then load without recovery (writes
are whole-file and atomic), verify, keep every entry it had, and hold every
entry the writer reported, unchanged; at most one more entry (written but
not yet reported) may be there. After the next write no temporary file is
left in the folder.

An audit counted a temporary file left after the next write in 4 of 100
trials. The cases found, each held below with a writer killed (SIGKILL)
once it has written its temporary file and is flushing it: a killed writer's
temporary file was removed only by the next writer of the same record (not
by a write to another record of the folder, nor after a new record's import
was killed, the file never coming to exist); the side file a torn tail is
set aside into, and an export, were written through temporary files the
cleanup did not match (an export's also without the folder lock).
Expectations: joulebook's contract (README, "The record"; common practice, no source).
"""

from __future__ import annotations

import os
import random
import re
import select
import shutil
import signal
import time

import pytest

from balance.record import Record, export_markdown, store
from tests.test_record_support import Clock, new_record

TRIALS = 120
#: What joulebook names a temporary file while it writes (balance.record.store).
TEMP = re.compile(r"\..+\.writing-[0-9]+-[0-9a-f]{8}\.tmp")


def _temps(folder) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if TEMP.fullmatch(p.name))


def _writer(path, out_fd: int, trial: int) -> None:
    """Append comments until killed; report each one after append returns. Runs in the child."""
    rec = Record.load(path, clock=Clock(), author=f"writer-{trial}")
    k = 0
    while True:
        k += 1
        e = rec.comment(2, f"trial {trial}, comment {k}: " + "words to make the entry longer " * (k % 7))
        os.write(out_fd, f"{e.seq} {e.hash}\n".encode())


def _read_all(fd: int) -> bytes:
    chunks = []
    while True:
        ready, _, _ = select.select([fd], [], [], 5)
        if not ready:
            break
        chunk = os.read(fd, 65536)
        if not chunk:
            break
        chunks.append(chunk)
    return b"".join(chunks)


def _read_lines(fd: int, count: int) -> bytes:
    """What the writer reported until it has reported ``count`` entries (or went quiet for 30 s)."""
    got = b""
    while got.count(b"\n") < count:
        ready, _, _ = select.select([fd], [], [], 30)
        if not ready:
            break
        chunk = os.read(fd, 65536)
        if not chunk:
            break
        got += chunk
    return got


def test_a_writer_killed_at_random_moments_loses_no_saved_entry(tmp_path):
    base = new_record(tmp_path, name="base.record")
    base_entries = base.entries
    rng = random.Random(20250106)
    totals = {"trials": 0, "reported": 0, "unreported_on_disk": 0, "killed_with_nothing_saved": 0,
              "temp_left_by_the_kill": 0, "temp_left_after_the_next_write": 0}
    for trial in range(TRIALS):
        path = tmp_path / f"t{trial}.record"
        shutil.copyfile(base.path, path)
        read_fd, write_fd = os.pipe()
        pid = os.fork()
        if pid == 0:  # the writer
            try:
                os.close(read_fd)
                _writer(path, write_fd, trial)
            finally:
                os._exit(0)
        os.close(write_fd)
        seen = _read_lines(read_fd, rng.randrange(0, 6))
        time.sleep(rng.uniform(0.0, 0.005))
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
        reports = [line.split() for line in (seen + _read_all(read_fd)).decode().splitlines()]
        os.close(read_fd)

        rec = Record.load(path)
        assert rec.recovered is None  # whole-file atomic writes never leave a torn tail
        assert rec.verify().ok
        assert rec.entries[:len(base_entries)] == base_entries  # the existing record was never truncated
        for seq, digest in reports:
            assert rec.entries[int(seq) - 1].hash == digest  # every entry reported saved is there, unchanged
        last = int(reports[-1][0]) if reports else len(base_entries)
        assert len(rec.entries) in (last, last + 1)
        totals["trials"] += 1
        totals["reported"] += len(reports)
        totals["unreported_on_disk"] += len(rec.entries) - last
        totals["killed_with_nothing_saved"] += not reports
        totals["temp_left_by_the_kill"] += bool(_temps(tmp_path))
        rec.comment(1, "the next writer")  # goes on, and clears any temporary file of the killed one
        totals["temp_left_after_the_next_write"] += bool(_temps(tmp_path))
        path.unlink()
    print(f"\nkill -9 loop: {totals}")
    assert totals["trials"] >= 100
    assert totals["reported"] > totals["trials"]  # the writers did save entries before being killed
    assert totals["temp_left_after_the_next_write"] == 0


# -- a writer killed inside a write, whatever it was writing ------------------------------------------
def _killed_inside_a_write(action) -> None:
    """Run ``action`` in a forked child and kill it (SIGKILL) once it has written a temporary file and
    is flushing it to disk: its first fsync tells the parent, then waits to be killed."""
    read_fd, write_fd = os.pipe()
    pid = os.fork()
    if pid == 0:  # the writer
        try:
            os.close(read_fd)
            flush = os.fsync

            def flush_then_wait(fd):
                flush(fd)
                os.write(write_fd, b"written\n")
                time.sleep(120)

            os.fsync = flush_then_wait
            action()
        finally:
            os._exit(0)
    os.close(write_fd)
    ready, _, _ = select.select([read_fd], [], [], 60)
    os.kill(pid, signal.SIGKILL)
    os.waitpid(pid, 0)
    said = os.read(read_fd, 100) if ready else b""
    os.close(read_fd)
    assert said == b"written\n", "the writer never reached its write"


def _torn(rec: Record):
    """A copy of the record with a last entry cut off (as an interrupted copy leaves it)."""
    path = rec.path.with_name("torn.jbk")
    raw = rec.path.read_bytes()
    path.write_bytes(raw + raw[raw.rindex(b"\n\nentry ") + 1:][:-90])
    return path


CASES = {
    # what was killed inside its write: a function of (folder, the record A, another record B)
    "a comment to A": lambda folder, a, b: Record.load(a).comment(2, "killed"),
    "the import of a new record": lambda folder, a, b: new_record(folder, name="new.jbk"),
    "an export beside A": lambda folder, a, b: store.write_output(folder / "report.md",
                                                                  export_markdown(Record.load(a)).encode()),
    "setting a torn tail aside": lambda folder, a, b: Record.load(_torn(Record.load(a))),
}
NEXT = {
    "to A": lambda a, b: Record.load(a).comment(2, "the next writer"),
    "to another record of the folder": lambda a, b: Record.load(b).comment(2, "the next writer"),
}


@pytest.mark.parametrize("next_write", list(NEXT))
@pytest.mark.parametrize("killed", list(CASES))
def test_no_temporary_file_is_left_after_the_next_write(tmp_path, killed, next_write):
    a = new_record(tmp_path, name="a.jbk").path
    b = new_record(tmp_path, name="b.jbk").path
    _killed_inside_a_write(lambda: CASES[killed](tmp_path, a, b))
    left = _temps(tmp_path)
    assert len(left) == 1  # the kill landed inside the write
    NEXT[next_write](a, b)
    assert _temps(tmp_path) == []
    assert Record.load(a).verify().ok and Record.load(b).verify().ok

