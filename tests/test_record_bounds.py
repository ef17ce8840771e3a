"""Entry data is bounded before anything walks it: nesting depth, the length of a text, of a data part, integers.

An audit found that a record line holding a 500-deep TOML array ended ``verify``,
``show`` and ``replay`` in a RecursionError: Python's TOML reader recurses once a
level, and so do the record's own walkers (prune, the renderings, replay's
compare, the diff). The reader now refuses such data before parsing it, naming
the file, the line and the limit, and every recursive walker refuses to go deeper
than the limit whatever data it is given. The limits are joulebook's own
(balance.record.layout: MAX_DEPTH, MAX_TEXT, MAX_DATA); TOML integers are 64-bit
(TOML 1.0.0, "Integer"); Python refuses to read integers of more than 4300 digits
(Python 3.11 documentation, "Integer string conversion length limitation").
"""

from __future__ import annotations

import re

import pytest

from balance.errors import InputError
from balance.record import Record
from balance.record.format import parse, seal
from balance.record.layout import MAX_DATA, MAX_DEPTH, MAX_TEXT, value_problem
from tests.test_record_support import new_record
from tui.cli import main

COMMANDS = (["verify"], ["show"], ["replay"], ["export", "--format", "md"], ["export", "--format", "html"],
            ["diff", "--from", "1"], ["worksheet"])
DEEP = f"nests tables and lists more than {MAX_DEPTH} levels deep"


def _with_comment(rec: Record, data_lines: list[str], name: str) -> tuple:
    """The record's file with one more sealed comment entry holding these data lines (each a line of
    TOML); returns the new file and the line number of the first data line."""
    raw = rec.path.read_bytes()
    head = re.findall(rb"sha256  ([0-9a-f]{64})\n", raw)[-1].decode()
    lines = [f"entry {len(rec.entries) + 1}: comment", "at      2025-01-06T09:00:00Z", "by      a.checker",
             "| Comment on entry 2 (system boundary), open until resolved:", "|   see the data",
             *(": " + line for line in data_lines), "follows " + head]
    body, digest = seal(lines)
    path = rec.path.with_name(name)
    path.write_bytes(raw + b"\n" + body + f"sha256  {digest}\n".encode())
    first_data = raw.count(b"\n") + 1 + 1 + 5  # the empty line, then the header, at, by and two text lines
    return path, first_data


@pytest.fixture()
def rec(tmp_path):
    return new_record(tmp_path)


def _same_on_both_paths(path):
    """The reader's fast path and its line-by-line path give the same error."""
    data = path.read_bytes()
    errors = []
    for line_by_line in (False, True):
        with pytest.raises(InputError) as caught:
            parse(data, str(path), line_by_line=line_by_line)
        errors.append(str(caught.value))
    assert errors[0] == errors[1]
    return errors[0]


@pytest.mark.parametrize("value", ["[" * 500 + "]" * 500, "{ a = " * 500 + "1" + " }" * 500,
                                   "[" * 300 + "{ a = " * 200 + "1" + " }" * 200 + "]" * 300],
                         ids=["arrays", "inline tables", "both"])
def test_a_500_deep_value_is_refused_naming_file_line_and_limit(rec, capsys, value):
    path, first = _with_comment(rec, ["on = 2", 'text = "see the data"', "deep = " + value], "deep.jbk")
    expected = f"{path}, line {first + 2}: the data part {DEEP}; at most {MAX_DEPTH} levels are allowed"
    assert _same_on_both_paths(path) == expected
    for command in COMMANDS:
        assert main(["record", command[0], str(path), *command[1:]]) == 2, command
        err = capsys.readouterr().err
        assert expected in err and "Traceback" not in err, command


def test_brackets_inside_strings_and_comments_do_not_count(rec):
    path, _ = _with_comment(rec, ["on = 2", "text = " + repr("[" * 500) + "  # " + "{" * 500,
                                  'note = "' + "]" * 40 + '"', 'more = """' + "[" * 40 + '"""',
                                  "also = '''" + "{" * 40 + "''''"], "text.jbk")
    loaded = Record.load(path)
    assert loaded.entries[-1].data["text"] == "[" * 500 and loaded.entries[-1].data["also"] == "{" * 40 + "'"
    assert Record.load(path).verify().chain_ok


@pytest.mark.parametrize("lines, where", [
    (["on = 2", 'text = "x"', "a" + ".a" * 499 + " = 1"], "'a.a.a.a.a.a …'"),  # dotted keys: no recursion
    (["on = 2", 'text = "x"', "", "[" + ".".join(["t"] * 100) + "]", "x = 1"], "'t.t.t.t.t.t …'"),
])
def test_deep_tables_made_of_keys_are_refused_where_the_data_starts(rec, lines, where):
    path, first = _with_comment(rec, lines, "keys.jbk")
    assert _same_on_both_paths(path) == (f"{path}, line {first}: the data part {DEEP} (at {where}); "
                                         f"at most {MAX_DEPTH} levels are allowed")


def test_data_at_the_limit_reads_and_renders_everywhere(rec, capsys):
    at_limit = "[" * (MAX_DEPTH - 1) + "1" + "]" * (MAX_DEPTH - 1)  # the data part is level 1
    path, _ = _with_comment(rec, ["on = 2", 'text = "see the data"', "deep = " + at_limit], "limit.jbk")
    loaded = Record.load(path)
    assert value_problem(loaded.entries[-1].data) is None
    for command in COMMANDS:
        code = main(["record", command[0], str(path), *command[1:]])
        err = capsys.readouterr().err
        assert code in (0, 1) and "Traceback" not in err, (command, err)  # 1: verify finds the text edited
    one_more, first = _with_comment(rec, ["on = 2", 'text = "x"', "deep = [" + at_limit + "]"], "over.jbk")
    assert _same_on_both_paths(one_more) == (f"{one_more}, line {first}: the data part {DEEP} (at "
                                             f"'deep[1][1][1][1][1] …'); at most {MAX_DEPTH} levels are allowed")


def test_a_long_text_and_a_long_data_part_are_refused(rec):
    path, first = _with_comment(rec, ["on = 2", 'text = "' + "w" * (MAX_TEXT + 1) + '"'], "long.jbk")
    assert _same_on_both_paths(path) == (f"{path}, line {first}: the data part holds a text of {MAX_TEXT + 1} "
                                         f"characters (at 'text'); at most {MAX_TEXT} are allowed")
    lines = ["on = 2", 'text = "' + "word " * 2_000_000 + '"']
    path, first = _with_comment(rec, lines, "huge.jbk")
    assert _same_on_both_paths(path) == (f"{path}, line {first}: the data part is {len(chr(10).join(lines))} "
                                         f"characters long; at most {MAX_DATA} are read")


def test_integers_beyond_toml_are_refused(rec):
    path, first = _with_comment(rec, ["on = 2", 'text = "x"', "n = " + "9" * 5000], "digits.jbk")
    assert _same_on_both_paths(path) == (f"{path}, line {first + 2}: the data part holds an integer of thousands "
                                         "of digits; TOML integers are 64-bit (at most 19 digits)")
    path, first = _with_comment(rec, ["on = 2", 'text = "x"', f"n = {2 ** 63}"], "int64.jbk")
    assert _same_on_both_paths(path) == (f"{path}, line {first}: the data part holds an integer outside "
                                         "TOML's 64-bit range (at 'n')")


def test_the_writer_refuses_what_the_reader_would(rec):
    with pytest.raises(InputError, match=rf"^comment: is {MAX_TEXT + 1} characters long; a record holds at most "
                                         rf"{MAX_TEXT} in one text$"):
        rec.comment(2, "w" * (MAX_TEXT + 1))
    deep: list = []
    for _ in range(MAX_DEPTH + 5):
        deep = [deep]
    with pytest.raises(InputError, match=rf"^solve: its data {DEEP} \(at 'x\[1\]\[1\]"):
        rec.append_solve(data={"x": deep})
    with pytest.raises(InputError, match="^data: takes .* characters in the record; a record holds at most"):
        rec.append_solve(data={"error_kind": "x", "error": "e", "many": ["w" * 1000] * 1001})
    assert len(Record.load(rec.path).entries) == len(rec.entries) == 8  # nothing was written


def test_every_recursive_walker_refuses_unchecked_deep_data():
    from balance.record.format import data_lines, prune
    from balance.record.replay import compare
    from balance.record.review import input_changes
    from balance.record.text import render

    deep: dict = {}
    for _ in range(2000):  # deeper than Python's recursion limit
        deep = {"a": deep}
    message = f"^data: {DEEP}; at most {MAX_DEPTH} levels are allowed$"
    for walk in (lambda: prune(deep), lambda: data_lines(deep), lambda: compare(deep, deep),
                 lambda: input_changes({"worksheet": deep}, {})):
        with pytest.raises(InputError, match=message):
            walk()
    with pytest.raises(InputError, match=f"^comment: its data {DEEP}"):
        render("comment", {"on": 1, "text": "x", "more": deep}, ())


def test_a_toml_date_is_refused_as_the_writer_cannot_write_one(rec):
    path, first = _with_comment(rec, ["on = 2", "text = 1979-05-27T07:32:00Z"], "date.jbk")
    assert _same_on_both_paths(path) == (f"{path}, line {first}: the data part holds a datetime (at 'text'); "
                                         "a record holds text, numbers, true or false, lists and tables")
