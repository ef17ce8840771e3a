"""Review: comments, the diff between two points of a record, the calculation report, the commands.

Expectations are joulebook's contract for its record (README, "The
record"; common practice, no source).
"""

from __future__ import annotations

import html
import re

import pytest

from balance.errors import InputError
from balance.record import Record, default_author, diff, export_html, export_markdown
from tests.helpers import SAMPLES
from tests.test_record_support import new_record
from tui.cli import main


def test_comments_open_and_resolve(tmp_path):
    rec = new_record(tmp_path)
    c1 = rec.comment(5, "Where does 150 barg come from?", author="b.checker")
    c2 = rec.comment(7, "Free expansion: is the line volume negligible?", author="b.checker")
    assert c1.text.startswith("Comment on entry 5 (initial state), open until resolved:")
    assert [c.seq for c in rec.open_comments()] == [c1.seq, c2.seq]
    r = rec.resolve(c1.seq, "PSV set pressure of V-101, see data sheet.")
    assert r.kind == "resolution" and r.text.startswith(f"Resolves comment {c1.seq} (on entry 5):")
    assert [c.seq for c in Record.load(rec.path).open_comments()] == [c2.seq]
    with pytest.raises(InputError, match="already resolved"):
        rec.resolve(c1.seq, "again")
    with pytest.raises(InputError, match="not a comment"):
        rec.resolve(5, "not a comment")
    with pytest.raises(InputError, match="no entry 99"):
        rec.comment(99, "nothing there")
    with pytest.raises(InputError, match="must not be empty"):
        rec.comment(5, "   ")
    assert rec.verify().open_comments == (c2.seq,)


def test_diff_names_changed_inputs_and_results(tmp_path):
    rec = new_record(tmp_path)
    rec.sign("prepared", unsigned=True)
    initial = rec.worksheet().to_dict()["initial"]
    initial[1]["V"] = "4 m3"
    rec.append_step("initial", initial)
    rec.append_solve()
    d = diff(rec, 9, 11)
    assert (d.from_revision, d.to_revision, d.from_solve, d.to_solve) == (1, 2, 8, 11)
    assert [(x.path, x.recorded, x.now) for x in d.inputs] == [("initial[2].V", "6 m3", "4 m3")]
    paths = [x.path for x in d.results]
    assert "states.settled.P" in paths and "states.V-101.P" not in paths
    before = next(x for x in d.results if x.path == "states.settled.P")
    assert before.unit == "Pa" and before.now > before.recorded  # less volume, higher pressure
    lines = d.lines()
    assert lines[0] == "From entry 9 (revision 1) to entry 11 (revision 2)"
    assert "  initial[2].V: was '6 m3', now '4 m3'" in lines
    same = diff(rec, 8, 9)
    assert same.inputs == () and "the same solve (entry 8) stands at both points" in same.lines()[-1]
    with pytest.raises(InputError, match="--to"):
        diff(rec, 1, 40)


def test_the_markdown_report_has_every_part(tmp_path):
    rec = new_record(tmp_path)
    rec.sign("prepared", unsigned=True, signer="alice")
    md = export_markdown(rec)
    assert md.startswith("# N2 buffer vessel V-101 emptied into evacuated receiver V-102\n")
    for part in ("| **Job** | PP-UT-0142 |", "## Assumptions", "1. both vessels and the connecting line are rigid",
                 "## Steps", "### Entry 5: initial state", "## Results", "### Equations with numbers",
                 "### Warnings", "### Cautions", "## Sign-off", "| prepared | alice |", rec.head):
        assert part in md, part
    assert "| T | K | 293.15 | 262.388 |" in md  # the states table, values as in the record's text


def test_the_html_report_stands_alone_and_escapes_what_was_typed(tmp_path):
    rec = new_record(tmp_path)
    rec.comment(2, "<script>alert('x')</script> & \"quotes\"")
    page = export_html(rec)
    assert page.startswith("<!DOCTYPE html>") and page.rstrip().endswith("</html>")
    assert "<script>" not in page and html.escape("<script>alert('x')</script>") in page
    assert not re.search(r"(src|href)=", page)  # nothing fetched from elsewhere
    assert "<h2>Sign-off</h2>" in page and rec.head in page


def test_the_author_comes_from_the_environment_then_the_config_then_the_login(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path))
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "env author")
    assert default_author() == "env author"
    monkeypatch.delenv("JOULEBOOK_AUTHOR")
    (tmp_path / "joulebook").mkdir()
    (tmp_path / "joulebook" / "config.toml").write_text('author = "config author"\n')
    assert default_author() == "config author"
    (tmp_path / "joulebook" / "config.toml").write_text("author = [\n")
    with pytest.raises(InputError, match="config.toml: is not valid TOML"):
        default_author()
    (tmp_path / "joulebook" / "config.toml").unlink()
    monkeypatch.setattr("getpass.getuser", lambda: "login-name")
    assert default_author() == "login-name"
    rec = Record.create(tmp_path / "a.record")
    assert rec.entries[0].author == "login-name"


# -- the command line ---------------------------------------------------------------------------
def test_the_record_commands_end_to_end(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "a.preparer")
    record = str(tmp_path / "calc.jbk")
    sheet = str(SAMPLES / "argon-membrane-rupture.toml")
    assert main(["record", "import", sheet, record]) == 0
    assert "new record, 8 entries" in capsys.readouterr().out
    assert main(["record", "import", sheet, record]) == 2  # never overwritten
    assert "already exists" in capsys.readouterr().err

    assert main(["record", "show", record]) == 0
    out = capsys.readouterr().out
    assert "entry 8  solve" in out and "Solved (inputs as of entry 7)" in out and "verdict: intact" in out

    assert main(["record", "comment", record, "5", "Chamber B at 2 bar gauge or absolute?"]) == 0
    assert main(["record", "resolve", record, "9", "Absolute: see the test sheet."]) == 0
    assert "0 comment(s) still open" in capsys.readouterr().out

    assert main(["record", "worksheet", record]) == 0
    toml = capsys.readouterr().out
    assert 'P = "2 bar"' in toml
    edited = tmp_path / "edited.toml"
    edited.write_text(toml.replace('P = "2 bar"', 'P = "3 bar"'))
    assert main(["record", "update", record, str(edited), "--note", "B was at 3 bar"]) == 0
    out = capsys.readouterr().out
    assert "entry 11 (revision note)" in out and "entry 12 (initial state)" in out and "entry 13 (solve)" in out
    assert main(["record", "update", record, str(edited)]) == 0
    assert "no change" in capsys.readouterr().out

    assert main(["record", "diff", record, "--from", "8", "--to", "13"]) == 0
    assert "initial[2].P: was '2 bar', now '3 bar'" in capsys.readouterr().out

    for fmt in ("md", "html"):
        target = tmp_path / f"report.{fmt}"
        assert main(["record", "export", record, "--format", fmt, "-o", str(target)]) == 0
        assert "Bursting disc between two argon chambers" in target.read_text()
    assert main(["record", "verify", record]) == 0


def test_command_errors_are_messages_not_tracebacks(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "a.preparer")
    bad = tmp_path / "bad.record"
    bad.write_text("joulebook record, format 1\n\nentry 1: opening\nat      yesterday\n")
    assert main(["record", "show", str(bad)]) == 2
    assert f"{bad}, line 4: expected 'at'" in capsys.readouterr().err
    assert main(["record", "comment", str(tmp_path / "missing.record"), "1", "x"]) == 2
    assert "does not exist" in capsys.readouterr().err
    rec = new_record(tmp_path)
    assert main(["record", "diff", str(rec.path), "--from", "r7"]) == 2
    assert "there is no revision 7" in capsys.readouterr().err
    assert main(["record", "import", str(tmp_path / "nothing.toml"), str(tmp_path / "n.record")]) == 2
    assert not (tmp_path / "n.record").exists()
    sheet = tmp_path / "unsolvable.toml"
    sheet.write_text((SAMPLES / "n2-buffer-into-receiver.toml").read_text().replace('["free-expansion"]', "[]"))
    assert main(["record", "import", str(sheet), str(tmp_path / "u.record")]) == 1  # recorded, not solved
    assert "not solved (recorded in entry 7)" in capsys.readouterr().err  # no [process]: 7 entries
    assert Record.load(tmp_path / "u.record").entries[-1].data["error_kind"] == "InputError"
