"""Many writers of one record: each waits its turn for a bounded time, reads what the others wrote, and appends after it.

An audit ran eight processes commenting on one record at once (25 comments
each): nothing was lost, but 38 % of the comments were refused (exit 2) because
another writer had appended since the writer read the record. A writer now
waits for the folder lock (at most ``store.WAIT`` seconds, said in the message
when it runs out), reads the record again under the lock, checks the rules
again against what is on disk, and appends after it; it never replaces a change
it has not seen, and refuses an entry that the change makes stale (a sign-off or
a solve after another writer changed the calculation).
Expectations: joulebook's contract (README, "The record"; common practice, no source).
"""

from __future__ import annotations

import contextlib
import io
import multiprocessing
import os
import re

import pytest

from balance.errors import InputError
from balance.record import Record, store
from tests.test_record_support import new_record

WRITERS, EACH = 8, 25


def _commenter(path: str, writer: int, count: int, results) -> None:
    """One writer (a process of its own): ``count`` comments through the command line's entry point."""
    os.environ["JOULEBOOK_AUTHOR"] = f"writer-{writer}"
    from tui.cli import main

    outcomes = []
    for k in range(1, count + 1):
        out, err = io.StringIO(), io.StringIO()
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            code = main(["record", "comment", path, "2", f"writer {writer}, comment {k}"])
        outcomes.append((code, err.getvalue()))
    results.put((writer, outcomes))


def test_eight_processes_commenting_at_once_save_every_comment(tmp_path):
    base = new_record(tmp_path)
    ctx = multiprocessing.get_context("spawn")
    results = ctx.Queue()
    writers = [ctx.Process(target=_commenter, args=(str(base.path), w, EACH, results)) for w in range(WRITERS)]
    for p in writers:
        p.start()
    outcomes = dict(results.get(timeout=600) for _ in writers)  # a guard against a hung child, not a measure
    for p in writers:
        p.join()
    codes = [code for w in outcomes for code, _ in outcomes[w]]
    refusals = [err for w in outcomes for code, err in outcomes[w] if code]
    rec = Record.load(base.path)
    comments = [e for e in rec.entries if e.kind == "comment"]
    print(f"\n{WRITERS} writers x {EACH} comments: exit 0 for {codes.count(0)}/{len(codes)}; "
          f"{len(comments)}/{WRITERS * EACH} saved; verifies: {rec.verify().ok}")
    assert refusals == []
    assert codes == [0] * (WRITERS * EACH)
    assert rec.recovered is None and rec.verify().ok
    assert rec.entries[:len(base.entries)] == base.entries
    texts = sorted(e.data["text"] for e in comments)
    assert texts == sorted(f"writer {w}, comment {k}" for w in range(WRITERS) for k in range(1, EACH + 1))
    for e in comments:  # each under its own writer's name, each writer's in the order it wrote them
        assert e.author == "writer-" + re.match(r"writer (\d+),", e.data["text"]).group(1)
    for w in range(WRITERS):
        mine = [int(e.data["text"].rsplit(" ", 1)[1]) for e in comments if e.author == f"writer-{w}"]
        assert mine == list(range(1, EACH + 1))
    assert not [p for p in tmp_path.iterdir() if ".writing-" in p.name]


# -- what a writer re-checks after reading what the others wrote -----------------------------------
@pytest.fixture()
def path(tmp_path):
    return new_record(tmp_path).path


def test_a_signoff_is_refused_when_the_calculation_changed_meanwhile(path):
    one, two = Record.load(path, author="one"), Record.load(path, author="two")
    one.note("the receiver's volume is being measured again")
    with pytest.raises(InputError, match=r"the calculation changed meanwhile \(entry 9, revision note, by one\); "
                                         r"nothing was written: review the change and try again"):
        two.sign("prepared", unsigned=True)
    on_disk = Record.load(path)
    assert len(on_disk.entries) == 9 and two.entries == on_disk.entries  # it shows what it read


def test_a_solve_is_refused_when_a_step_came_meanwhile(path):
    one, two = Record.load(path, author="one"), Record.load(path, author="two")
    one.append_step("worksheet", {**one.sections()["worksheet"], "job": "PP-UT-0143"})
    with pytest.raises(InputError, match=r"the calculation changed meanwhile \(entry 9, purpose and basis, by one\)"):
        two.append_solve()
    assert len(Record.load(path).entries) == 9


def test_a_signoff_after_another_writers_comment_covers_it(path):
    one, two = Record.load(path, author="one"), Record.load(path, author="two")
    comment = one.comment(5, "are 150 barg right for V-101?")
    signed = two.sign("prepared", unsigned=True)
    assert signed.seq == 10 and signed.data["covers"] == comment.hash and signed.prev_hash == comment.hash
    assert Record.load(path).verify().ok


def test_approval_is_refused_when_a_comment_was_opened_meanwhile(path):
    rec = Record.load(path)
    rec.sign("prepared", unsigned=True, signer="alice")
    rec.sign("checked", unsigned=True, signer="bob")
    one, two = Record.load(path, author="one"), Record.load(path, author="carol")
    one.comment(8, "the cautions need a second look")
    with pytest.raises(InputError, match=r"^sign-off: 1 comment is still open \(entry 11\): resolve them before "
                                         r"approval$"):
        two.sign("approved", unsigned=True)
    one.resolve(11, "looked again: they stand")
    approved = two.sign("approved", unsigned=True)  # checked again, after the resolution
    assert approved.seq == 13 and Record.load(path).verify().ok


def test_a_comment_resolved_meanwhile_is_not_resolved_twice(path):
    rec = Record.load(path)
    rec.comment(3, "why adiabatic?")
    one, two = Record.load(path, author="one"), Record.load(path, author="two")
    one.resolve(9, "the event takes seconds")
    with pytest.raises(InputError, match=r"^resolve: comment 9 is already resolved$"):
        two.resolve(9, "fast event")
    assert [e.kind for e in Record.load(path).entries[8:]] == ["comment", "resolution"]


def test_a_step_after_another_writers_comment_is_saved(path):
    one, two = Record.load(path, author="one"), Record.load(path, author="two")
    one.comment(2, "boundary agreed")
    step = two.append_step("worksheet", {**two.sections()["worksheet"], "job": "PP-UT-0143"})
    assert step.seq == 10 and "changed (job)" in step.text
    assert Record.load(path).verify().ok


def test_a_record_replaced_meanwhile_is_not_written(path):
    rec = Record.load(path)
    path.write_bytes(path.read_bytes().replace(b"by      a.preparer", b"by      b.preparer", 1))
    with pytest.raises(InputError, match=r"was replaced by another writer since it was read \(not appended to\); "
                                         r"load it again \(nothing was written\)"):
        rec.comment(2, "x")


def test_a_writer_that_cannot_get_the_lock_says_so_and_writes_nothing(path):
    rec = Record.load(path, wait=0.2)
    before = path.read_bytes()
    with store.locked(path):  # another writer holding the folder (flock locks each opening of it)
        with pytest.raises(InputError, match=r"another writer has held its folder for more than 0.2 s; "
                                             r"nothing was written: try again"):
            rec.comment(2, "x")
    assert path.read_bytes() == before and len(rec.entries) == 8
    assert rec.comment(2, "x").seq == 9  # once it is free
