"""A record whose chain is broken fails replay as it fails verify, and every command that reads it says so.

Two ways a chain breaks, as an audit found them: the last entry appended twice
(a copy made by hand, a merge), and one entry's text edited after it was sealed.
``verify`` names the first entry where the chain fails; ``replay`` must not call
any result of such a record reproduced, and ``show``, ``diff``, ``export`` and
``worksheet``, which read a record without verifying it, print what they read
and say it is not the record as filed. All of them exit 1 (a check failed).
Expectations: joulebook's contract (README, "The record"; common practice, no source).
"""

from __future__ import annotations

import pytest

from balance.record import Record
from tests.test_record_support import new_record
from tui.cli import main


def _last_entry_twice(rec: Record) -> bytes:
    raw = rec.path.read_bytes()
    last = raw[raw.rindex(b"\n\nentry ") + 1:]
    return raw + last


@pytest.fixture()
def doubled(tmp_path):
    """The n2 sample's record (8 entries, a solve last) with its last entry appended twice."""
    rec = new_record(tmp_path)
    path = tmp_path / "doubled.jbk"
    path.write_bytes(_last_entry_twice(rec))
    return path


@pytest.fixture()
def edited(tmp_path):
    """The n2 sample's record with a comment after the solve, and entry 3's text edited."""
    rec = new_record(tmp_path)
    rec.comment(8, "the final pressure looks right")
    raw = rec.path.read_bytes()
    assert raw.count(b"| System boundary: set") == 1
    path = tmp_path / "edited.jbk"
    path.write_bytes(raw.replace(b"| System boundary: set", b"| System boundary: SET", 1))
    return path


def test_verify_names_the_doubled_entry(doubled, capsys):
    assert main(["record", "verify", str(doubled)]) == 1
    out = capsys.readouterr().out
    assert "BROKEN at entry 9" in out and "numbered 8 where entry 9 should be" in out


def test_replay_of_a_doubled_entry_says_broken_and_exits_1(doubled, capsys):
    assert main(["record", "replay", str(doubled)]) == 1
    captured = capsys.readouterr()
    out = captured.out
    assert "All recorded results reproduce." not in out
    assert "The chain is BROKEN at entry 9: the entry at line" in out
    assert "Only the entries before it were replayed; entry 9 was not: it is not the record as filed." in out
    assert out.rstrip().endswith("NOT reproduced: the record's chain is broken at entry 9; no result of a "
                                 "broken record is confirmed (restore the filed copy).")
    assert out.count("(solve): reproduced") == 1  # entry 8, before the break; the copy is not replayed
    assert "the chain is broken at entry 9" in captured.err and "nothing is confirmed" in captured.err


def test_replay_stops_at_an_edited_entry(edited):
    rec = Record.load(edited)
    assert rec.broken[0] == 3 and "does not match its sha256 seal" in rec.broken[1]
    report = rec.replay()
    assert not report.ok and report.broken == rec.broken and report.solves == ()
    lines = report.lines()
    assert "Only the entries before it were replayed; entries 3–9 were not: they are not the record as filed." in lines
    assert "No solve entries: nothing to reproduce." in lines  # entries 1 and 2 hold no solve


def test_an_intact_record_still_reproduces(tmp_path):
    rec = new_record(tmp_path)
    report = rec.replay()
    assert rec.broken is None and report.broken is None and report.ok
    assert report.lines()[-1] == "All recorded results reproduce."


def test_show_says_broken_at_the_top_and_exits_1(doubled, capsys):
    assert main(["record", "show", str(doubled)]) == 1
    captured = capsys.readouterr()
    flat = " ".join(captured.out.split())  # as printed, whatever the terminal's width wrapped
    assert flat.index("The chain is BROKEN at entry 9: ") < flat.index("entry 1 opening")  # before any entry
    assert "The entries below are shown as read, not as filed." in flat
    assert flat.rindex("BROKEN at entry 9") > flat.rindex("entry 8 solve")  # again after the copy of entry 8
    assert "the entries shown are not the record as filed" in captured.err


def test_diff_says_broken_and_exits_1(edited, capsys):
    assert main(["record", "diff", str(edited), "--from", "1"]) == 1
    captured = capsys.readouterr()
    assert captured.out.startswith("The chain is BROKEN at entry 3: entry 3 (line ")
    assert "the entries compared are shown as read, not as filed" in captured.out
    assert "the entries compared are not the record as filed" in captured.err


@pytest.mark.parametrize("fmt", ["md", "html"])
def test_export_warns_in_the_report_and_exits_1(doubled, tmp_path, capsys, fmt):
    out = tmp_path / f"report.{fmt}"
    assert main(["record", "export", str(doubled), "--format", fmt, "-o", str(out)]) == 1
    text = out.read_text()
    assert text.count("WARNING: this record&#x27;s chain is BROKEN at entry 9" if fmt == "html"
                      else "WARNING: this record's chain is BROKEN at entry 9") == 2  # under the title and the results
    assert "they cannot be relied on" in text
    assert "the report says so" in capsys.readouterr().err


def test_worksheet_says_broken_in_the_toml_and_exits_1(doubled, capsys):
    import tomllib

    assert main(["record", "worksheet", str(doubled)]) == 1
    captured = capsys.readouterr()
    assert captured.out.startswith("# joulebook: the record's chain is BROKEN at entry 9: this worksheet is "
                                   "folded from its entries as read, not as filed\n")
    assert tomllib.loads(captured.out)["fluid"]["species"] == "N2"  # still a worksheet
    assert "the worksheet printed is not the record's as filed" in captured.err


def test_an_intact_record_reads_without_warnings(tmp_path, capsys):
    rec = new_record(tmp_path)
    for command in (["show"], ["diff", "--from", "1"], ["worksheet"], ["export", "--format", "md"]):
        assert main(["record", command[0], str(rec.path), *command[1:]]) == 0
        captured = capsys.readouterr()
        assert "BROKEN" not in captured.out and captured.err == ""


def test_a_broken_record_is_never_extended(doubled, capsys):
    assert main(["record", "comment", str(doubled), "2", "one more"]) == 2
    err = capsys.readouterr().err
    assert "its chain is broken at entry 9" in err and "cannot be extended" in err


def test_update_refuses_a_broken_record_even_with_no_change(doubled, tmp_path, capsys):
    from tests.helpers import SAMPLES

    assert main(["record", "update", str(doubled), str(SAMPLES / "n2-buffer-into-receiver.toml")]) == 2
    captured = capsys.readouterr()
    assert "no change" not in captured.out
    assert "its chain is broken at entry 9" in captured.err and "restore the filed copy" in captured.err
