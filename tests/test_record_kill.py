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
not yet reported) may be there. The next writer removes the killed writer's
temporary file. Expectations: joulebook's contract (README, "The record";
common practice, no source).
"""

from __future__ import annotations

import os
import random
import select
import shutil
import signal
import time

from balance.record import Record
from tests.test_record_support import Clock, new_record

TRIALS = 120


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
    totals = {"trials": 0, "reported": 0, "unreported_on_disk": 0, "killed_with_nothing_saved": 0, "temp_left": 0}
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
        totals["temp_left"] += any(p.name.startswith(f".{path.name}.writing-") for p in tmp_path.iterdir())
        rec.comment(1, "the next writer")  # goes on, and clears any temporary file of the killed one
        assert not any(p.name.startswith(f".{path.name}.writing-") for p in tmp_path.iterdir())
        path.unlink()
    assert totals["trials"] >= 100
    assert totals["reported"] > totals["trials"]  # the writers did save entries before being killed
    print(f"\nkill -9 loop: {totals}")
