"""Reading a record's bytes into entries, by the layout in :mod:`.layout`.

One reader with two paths over the same grammar. The fast path matches a
whole entry with one regular expression (:data:`.layout.ENTRY`) and goes
on only while everything is well formed; at the first entry it does not
accept, the line-by-line path takes over from that entry's first line and
finds the exact error and its line, or the torn tail. The fast path accepts
only what the line-by-line path accepts, with the same result: both are
built from the same line patterns and apply the same field checks, and a
test holds them equal on fuzzed records (``parse(..., line_by_line=True)``).
It never touches the disk.
"""

from __future__ import annotations

import itertools
import re
import tomllib
from dataclasses import dataclass

from ..errors import InputError
from .layout import (ANY_MAGIC, AT, BY, DATA_MARK, ENTRY, EXPECTED, FIXED_LINES, FOLLOWS, FORMAT, HEADER,
                     MAGIC, SEAL, TAG_FOLLOWS, TEXT, TEXT_MARK, Entry, author_problem, content, contents, is_marked,
                     MAX_DATA, kind_problem, nesting_problem, time_problem, value_problem)
from .shapes import shape_problem

_TOML_POS = re.compile(r"\(at line (\d+), column (\d+)\)")
_LONG_NUMBER = re.compile(r"[0-9_]{4000}")


@dataclass(frozen=True)
class Parsed:
    """What :func:`parse` found: the complete entries and any torn tail."""

    entries: tuple[Entry, ...]
    good: bytes
    """the bytes up to and including the last complete entry"""
    torn: bytes
    """what follows the last complete entry: an entry cut off while being written"""
    torn_line: int
    """line where the torn tail starts (0 when there is none)"""


def parse(data: bytes, source: str = "record", *, structure_only: bool = False,
          line_by_line: bool = False) -> Parsed:
    """Read a record's bytes into entries.

    Raises InputError naming the line for a malformed record. An entry cut
    off at the end of the data (no ``sha256`` line, or no final newline) is
    a torn tail, returned in ``Parsed.torn``, provided every complete line
    of it is a valid line of an entry; anything else is an error.

    With ``structure_only`` the text and data parts are not read (every
    ``text`` and ``data`` is empty): enough to check the chain quickly
    before reading everything. ``line_by_line`` reads every entry on the
    exact path, as the fast path hands over a file it does not accept: the
    result is the same, only slower.
    """
    if not data:
        raise InputError(f"{source}, line 1", "the file is empty: not a joulebook record")
    entries: list[Entry] = []
    i = 1  # next line, 0-based: the empty line before entry 1
    if not line_by_line:
        entries, stop = _read_fast(data, structure_only)
        if stop is None:
            return Parsed(tuple(entries), data, b"", 0)
        i = stop
    lines = _Lines(data, source)
    if lines.complete == 0:
        raise lines.error(1, f"is not a complete first line of a joulebook record (expected {MAGIC!r})")
    first = lines.text(0)
    if first != MAGIC:
        m = ANY_MAGIC.fullmatch(first)
        if m and int(m.group(1)) > FORMAT:
            raise lines.error(1, f"is a record of format {m.group(1)}; this joulebook reads format {FORMAT}: "
                                 "use a newer joulebook")
        raise lines.error(1, f"is not the first line of a joulebook record (expected {MAGIC!r})")
    good_end = lines.offsets[i]
    while i < len(lines.raw):
        if i == lines.complete and lines.raw[i] == b"":
            break  # the end of the data, after a newline
        start = i
        try:
            entry, i = _read_entry(lines, i, not structure_only)
        except _Torn:
            return Parsed(tuple(entries), data[:good_end], data[good_end:], start + 1)
        entries.append(entry)
        good_end = lines.offsets[i] if i < len(lines.offsets) else len(data)
    if not entries:
        raise lines.error(2, "the record has no entries after its first line")
    return Parsed(tuple(entries), data, b"", 0)


# -- the fast path ------------------------------------------------------------------------
def _read_fast(data: bytes, structure_only: bool) -> tuple[list[Entry], int | None]:
    """The entries of a well-formed record, one regular expression per entry.

    Returns the entries and None when it read the whole record; else the
    entries before the first one it does not accept and the index (0-based)
    of the empty line before that entry, where the line-by-line path goes on.
    """
    entries: list[Entry] = []
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        return entries, 1
    if not text.startswith(MAGIC + "\n") or "\r\n" in text:  # a line ending in a carriage return
        return entries, 1
    pos, index = len(MAGIC) + 1, 1
    match = ENTRY.match
    while pos < len(text):
        m = match(text, pos)
        if m is None:
            return entries, index
        kind, time, author = m["kind"], m["time"], m["author"]
        if kind_problem(kind) or time_problem(time) or author_problem(author):
            return entries, index
        text_part, data_part = m["text"], m["data"]
        parsed: dict = {}
        body = ""
        if not structure_only:
            fragment = contents(data_part)
            if len(fragment) > MAX_DATA or nesting_problem(fragment):
                return entries, index
            try:
                parsed = tomllib.loads(fragment)
            except ValueError:  # TOMLDecodeError, or an integer of too many digits for Python
                return entries, index
            if value_problem(parsed) or shape_problem(kind, parsed):
                return entries, index
            body = contents(text_part)
        entries.append(Entry(seq=int(m["seq"]), time=time, author=author, kind=kind, data=parsed, text=body,
                             prev_hash=m["prev"], hash=m["hash"], line=index + 2,
                             body=m["sealed"].encode("utf-8")))
        index += FIXED_LINES + text_part.count("\n") + data_part.count("\n")
        pos = m.end()
    if not entries:
        return entries, index
    return entries, None


# -- the line-by-line path ------------------------------------------------------------------
class _Lines:
    def __init__(self, data: bytes, source: str):
        self.source = source
        self.data = data
        self.raw = data.split(b"\n")
        try:  # usually the whole file is UTF-8: decode once ("\n" never occurs inside a UTF-8 sequence)
            self.decoded: list[str] | None = data.decode("utf-8").split("\n")
        except UnicodeDecodeError:
            self.decoded = None
        # the last piece is b"" when the data ends with a newline; otherwise a partial line
        self.complete = len(self.raw) - 1
        #: byte offset where each line starts
        self.offsets = list(itertools.accumulate(map(len, self.raw[:-1]), lambda pos, n: pos + n + 1, initial=0))

    def error(self, number: int, message: str) -> InputError:
        return InputError(f"{self.source}, line {number}", message)

    def text(self, i: int) -> str:
        """Complete line i (0-based) as text; raises for bytes that are not UTF-8 or CRLF ends."""
        if self.decoded is not None:
            line = self.decoded[i]
        else:
            try:
                line = self.raw[i].decode("utf-8")
            except UnicodeDecodeError as exc:
                raise self.error(i + 1, f"is not UTF-8 text (byte {exc.start + 1} of the line)") from None
        if line.endswith("\r"):
            raise self.error(i + 1, "ends with a carriage return: the record's line ends were changed "
                                    "(an editor or a text-mode transfer); restore the filed copy")
        return line


class _Torn(Exception):
    """The data ended inside an entry."""


def _read_entry(lines: _Lines, i: int, with_data: bool = True) -> tuple[Entry, int]:
    """Read one entry starting at the blank line i; return it and the next line's index."""

    def line(j: int) -> str:
        if j >= lines.complete:
            raise _Torn
        return lines.text(j)

    def expect(j: int, pattern: re.Pattern) -> re.Match:
        m = pattern.fullmatch(line(j))
        if m is None:
            raise lines.error(j + 1, EXPECTED[pattern])
        return m

    def check(j: int, problem: str | None) -> None:
        if problem:
            raise lines.error(j + 1, problem)

    if line(i) != "":
        raise lines.error(i + 1, "expected an empty line between entries")
    head = expect(i + 1, HEADER)
    kind = head["kind"]
    check(i + 1, kind_problem(kind))
    time = expect(i + 2, AT)["time"]
    check(i + 2, time_problem(time))
    author = expect(i + 3, BY)["author"]
    check(i + 3, author_problem(author))
    j = i + 4
    text: list[str] = []
    data: list[str] = []
    data_start = 0
    while True:
        cur = line(j)
        if is_marked(cur, TEXT_MARK):
            if data:
                raise lines.error(j + 1, "a text line ('|') after the data part (':'); text comes first")
            expect(j, TEXT)
            text.append(content(cur))
        elif is_marked(cur, DATA_MARK):
            if not data:
                data_start = j + 1
            data.append(content(cur))
        elif cur.startswith(TAG_FOLLOWS):
            break
        else:
            raise lines.error(j + 1, "expected a text line ('| ...'), a data line (': ...') or 'follows'")
        j += 1
    prev = expect(j, FOLLOWS)["prev"]
    sealed = expect(j + 1, SEAL)["hash"]
    body = lines.data[lines.offsets[i + 1]:lines.offsets[j + 1]]
    parsed: dict = {}
    if with_data:
        where = data_start or j + 1
        parsed = _data(lines, data, where)
        problem = shape_problem(kind, parsed)
        if problem:
            raise lines.error(where, f"{kind} data: {problem}")
    entry = Entry(seq=int(head["seq"]), time=time, author=author, kind=kind, data=parsed,
                  text="\n".join(text) if with_data else "", prev_hash=prev, hash=sealed, line=i + 2, body=body)
    return entry, j + 2


def _data(lines: _Lines, data: list[str], first: int) -> dict:
    """The data part read as TOML, within the bounds of :func:`.layout.value_problem`; an error
    names the line of the record it is on (for data beyond the bounds, where the data part starts)."""
    fragment = "\n".join(data)
    if len(fragment) > MAX_DATA:
        raise lines.error(first, f"the data part is {len(fragment)} characters long; at most {MAX_DATA} are read")
    deep = nesting_problem(fragment)  # before the parser, which recurses once a level
    if deep:
        raise lines.error(first + deep[0], f"the data part {deep[1]}")
    try:
        parsed = tomllib.loads(fragment)
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        m = _TOML_POS.search(message)
        where = first + int(m.group(1)) - 1 if m else first
        message = _TOML_POS.sub("", message).strip()
        raise lines.error(where, f"the data part is not valid TOML: {message}") from None
    except ValueError:  # Python reads no integer of more than 4300 digits (TOML's have at most 19)
        long = next((k for k, line in enumerate(data) if _LONG_NUMBER.search(line)), 0)
        raise lines.error(first + long, "the data part holds an integer of thousands of digits; "
                                        "TOML integers are 64-bit (at most 19 digits)") from None
    problem = value_problem(parsed)
    if problem:
        raise lines.error(first, f"the data part {problem}")
    return parsed
