"""The record's text layout: writing entries and reading a record file.

The layout (format 1) is described in the package docstring
(:mod:`balance.record`) and in the README, "The record". This module turns
entries into lines and lines back into entries. It never touches the disk:
:func:`parse` takes the file's bytes and returns the complete entries and
any torn tail, raising :class:`~balance.errors.InputError` naming the file
and line for anything that is neither.
"""

from __future__ import annotations

import hashlib
import itertools
import math
import re
import tomllib
import unicodedata
from dataclasses import dataclass, field
from datetime import datetime, timezone

from ..errors import InputError

FORMAT = 1
MAGIC = f"joulebook record, format {FORMAT}"
MAGIC_LINE = (MAGIC + "\n").encode()
#: ``follows`` of entry 1: the SHA-256 of the record's first line.
GENESIS = hashlib.sha256(MAGIC_LINE).hexdigest()

TAG_AT, TAG_BY, TAG_FOLLOWS, TAG_SEAL = "at      ", "by      ", "follows ", "sha256  "

# -- kinds ---------------------------------------------------------------------------
#: Worksheet section -> the readable kind of the step entry that sets it.
SECTION_KINDS = {
    "worksheet": "purpose and basis",
    "system": "system boundary",
    "fluid": "fluid and model",
    "initial": "initial state",
    "final": "final state",
    "heat": "heat terms",
    "work": "work terms",
    "process": "constraints",
}
KIND_SECTIONS = {kind: section for section, kind in SECTION_KINDS.items()}
#: Sections whose value is a list of tables (``[[initial]]``); the rest are one table.
LIST_SECTIONS = ("initial", "heat", "work")

OPENING, SOLVE, COMMENT, RESOLUTION, SIGN_OFF, NOTE = (
    "opening", "solve", "comment", "resolution", "sign-off", "revision note",
)
KINDS = (OPENING, *SECTION_KINDS.values(), SOLVE, COMMENT, RESOLUTION, SIGN_OFF, NOTE)
#: Kinds that change the calculation (a change after a sign-off starts a new revision).
CONTENT_KINDS = (*SECTION_KINDS.values(), SOLVE, NOTE)

_HEADER = re.compile(r"entry ([1-9][0-9]{0,8}): ([a-z][a-z -]*[a-z])")
_TIME = re.compile(r"[0-9]{4}-[0-9]{2}-[0-9]{2}T[0-9]{2}:[0-9]{2}:[0-9]{2}Z")
_HEX = re.compile(r"[0-9a-f]{64}")
_TOML_POS = re.compile(r"\(at line (\d+), column (\d+)\)")


@dataclass(frozen=True)
class Entry:
    """One sealed entry of a record.

    ``data`` is the machine-readable part (the TOML fragment, read back);
    treat it as immutable. ``text`` is the human-readable rendering, its
    lines joined by newlines. ``hash`` is the entry's stated seal and
    ``prev_hash`` the seal it follows; :meth:`computed_hash` is what the
    content actually hashes to (they differ when the entry was edited).
    """

    seq: int
    time: str
    """UTC, ``YYYY-MM-DDTHH:MM:SSZ``"""
    author: str
    kind: str
    data: dict
    text: str
    prev_hash: str
    hash: str
    line: int = 0
    """line of the file where the entry starts (1-based)"""
    body: bytes = field(default=b"", repr=False, compare=False)
    """the sealed bytes: the lines from ``entry`` to ``follows``, each with its newline"""

    def computed_hash(self) -> str:
        return hashlib.sha256(self.body).hexdigest()

    @property
    def section(self) -> str | None:
        """The worksheet section a step entry sets, else None."""
        return KIND_SECTIONS.get(self.kind)

    @property
    def when(self) -> datetime:
        return datetime.strptime(self.time, "%Y-%m-%dT%H:%M:%SZ").replace(tzinfo=timezone.utc)


def format_time(moment: datetime) -> str:
    """A moment as the record writes it: UTC, whole seconds."""
    if moment.tzinfo is None:
        raise ValueError("the record's clock must give timezone-aware times")
    return moment.astimezone(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")


# -- text sanitising ----------------------------------------------------------------
def visible(text: str) -> str:
    """One line of text with control and line-separator characters shown as escapes.

    The record is split on newlines only; characters a pager or another
    program could treat as a line break or a terminal control are written
    as ``\\u{....}`` so every line of the file stays one line on screen.
    """
    out = []
    for ch in text:
        if ch == "\t":
            out.append(ch)
        elif unicodedata.category(ch) in ("Cc", "Zl", "Zp", "Cs"):
            out.append(f"\\u{{{ord(ch):04x}}}")
        else:
            out.append(ch)
    return "".join(out)


def normal_text(text: str) -> str:
    """Human text as the record keeps it: each line made visible, trailing white space removed."""
    return "\n".join(visible(line).rstrip() for line in text.split("\n"))


def clean_author(author: str, field: str = "author") -> str:
    """An author or signer name fit for one line of the record."""
    if not isinstance(author, str):
        raise InputError(field, f"must be text; got {type(author).__name__}")
    name = author.strip()
    if not name:
        raise InputError(field, "must not be empty")
    if any(unicodedata.category(ch) in ("Cc", "Zl", "Zp", "Cs") for ch in name):
        raise InputError(field, f"must be one line of printable text; got {author!r}")
    return name


# -- the data part: a TOML fragment ---------------------------------------------------
def _scalar(value) -> str:
    import tomli_w

    if isinstance(value, float) and not math.isfinite(value):
        return "nan" if math.isnan(value) else ("inf" if value > 0 else "-inf")
    return tomli_w.dumps({"k": value})[4:-1]


def _key(key: str) -> str:
    import tomli_w

    return tomli_w.dumps({key: 0})[: -len(" = 0\n")]


def prune(value):
    """TOML has no null: None values of tables are left out; tuples become lists."""
    if isinstance(value, dict):
        return {str(k): prune(v) for k, v in value.items() if v is not None}
    if isinstance(value, (list, tuple)):
        return [prune(v) for v in value]
    return value


def _is_scalar(v) -> bool:
    return isinstance(v, (str, int, float, bool))


def _inline(v) -> bool:
    return isinstance(v, dict) and len(v) <= 4 and all(_is_scalar(x) for x in v.values())


def _literal(v, indent: str = "") -> list[str]:
    """A value as one or more lines (the first continues ``key = ``)."""
    if _is_scalar(v):
        return [_scalar(v)]
    if isinstance(v, dict):
        return ["{ " + ", ".join(f"{_key(k)} = {_literal(x)[0]}" for k, x in v.items()) + " }" if v else "{}"]
    if isinstance(v, list):
        if not v:
            return ["[]"]
        if all(_is_scalar(x) for x in v) and sum(len(_scalar(x)) for x in v) < 60:
            return ["[" + ", ".join(_scalar(x) for x in v) + "]"]
        lines = ["["]
        for x in v:
            item = _literal(x, indent + "    ")
            lines.append(indent + "    " + item[0] + ("," if len(item) == 1 else ""))
            lines.extend(item[1:-1])
            if len(item) > 1:
                lines.append(item[-1] + ",")
        lines.append(indent + "]")
        return lines
    raise TypeError(f"cannot write {type(v).__name__} in a record")


def _quantity_like(v) -> bool:
    return isinstance(v, dict) and (not v or set(v) <= {"value", "unit"})


def _table_lines(table: dict, name: str) -> list[str]:
    lines: list[str] = []
    later: list[tuple[str, object]] = []
    for k, v in table.items():
        # a worksheet section at the top is a [table], as in a worksheet file; quantities stay inline
        if isinstance(v, dict) and not (_quantity_like(v) if not name else _inline(v)):
            later.append((k, v))
        elif isinstance(v, list) and v and all(isinstance(x, dict) for x in v) and \
                all(all(_is_scalar(y) or _inline(y) for y in x.values()) for x in v):
            later.append((k, v))
        else:
            lit = _literal(v)
            lines.append(f"{_key(k)} = {lit[0]}")
            lines.extend(lit[1:])
    for k, v in later:
        full = f"{name}.{_key(k)}" if name else _key(k)
        if lines:
            lines.append("")
        if isinstance(v, list):
            for i, item in enumerate(v):
                if i:
                    lines.append("")
                lines.append(f"[[{full}]]")
                for ik, iv in item.items():
                    lines.append(f"{_key(ik)} = {_literal(iv)[0]}")
        else:
            sub = _table_lines(v, full)
            if not sub or sub[0].startswith("["):  # only sub-tables: the header is implied
                lines.extend(sub if sub else [f"[{full}]"])
            else:
                lines.append(f"[{full}]")
                lines.extend(sub)
    return lines


def data_lines(data: dict) -> list[str]:
    """The machine-readable part of an entry: TOML lines that read back to ``data``.

    Values of None are left out (TOML has no null). Small tables of scalars
    (a quantity's ``{value, unit}``) are written inline; lists of tables
    as ``[[name]]`` blocks, as in a worksheet file.
    """
    data = prune(data)
    lines = [_escape(line) for line in _table_lines(data, "")]
    try:
        same = tomllib.loads("\n".join(lines)) == data
    except tomllib.TOMLDecodeError:
        same = False
    if not same:  # a shape the compact writer does not cover: the plain writer
        import tomli_w

        lines = [_escape(line) for line in tomli_w.dumps(data).rstrip("\n").split("\n")]
    return lines


def _escape(line: str) -> str:
    """Control and line-separator characters (only ever inside TOML strings here) as \\uXXXX escapes,
    so that no program sees a line break inside a line of the record."""
    if line.isprintable():
        return line
    return "".join(f"\\u{ord(ch):04x}" if unicodedata.category(ch) in ("Cc", "Zl", "Zp") else ch
                   for ch in line)


# -- writing an entry ------------------------------------------------------------------
def entry_lines(seq: int, time: str, author: str, kind: str, text: str, data: dict, prev: str) -> list[str]:
    """The sealed lines of an entry, from ``entry`` to ``follows`` (without newlines)."""
    if kind not in KINDS:
        raise ValueError(f"unknown entry kind {kind!r}")
    lines = [f"entry {seq}: {kind}", TAG_AT + time, TAG_BY + author]
    for line in normal_text(text).split("\n"):
        lines.append(f"| {line}" if line else "|")
    for line in data_lines(data):
        lines.append(f": {line}" if line else ":")
    lines.append(TAG_FOLLOWS + prev)
    return lines


def seal(lines: list[str]) -> tuple[bytes, str]:
    body = "".join(line + "\n" for line in lines).encode("utf-8")
    return body, hashlib.sha256(body).hexdigest()


# -- reading a record -------------------------------------------------------------------
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


def parse(data: bytes, source: str = "record", *, structure_only: bool = False) -> Parsed:
    """Read a record's bytes into entries.

    Raises InputError naming the line for a malformed record. An entry cut
    off at the end of the data (no ``sha256`` line, or no final newline) is
    a torn tail, returned in ``Parsed.torn``, provided every complete line
    of it is a valid line of an entry; anything else is an error.

    With ``structure_only`` the data parts are not read (every ``data`` is
    empty): enough to check the chain quickly before reading everything.
    """
    if not data:
        raise InputError(f"{source}, line 1", "the file is empty: not a joulebook record")
    entries: list[Entry] = []
    i = 1  # next line, 0-based: the empty line before entry 1
    if _FAST:
        fast = _parse_fast(data, structure_only)
        if isinstance(fast, Parsed):
            return fast
        entries, i = fast  # the well-formed entries before the first line it could not read
    lines = _Lines(data, source)
    if lines.complete == 0:
        raise lines.error(1, f"is not a complete first line of a joulebook record (expected {MAGIC!r})")
    first = lines.text(0)
    if first != MAGIC:
        m = re.fullmatch(r"joulebook record, format ([0-9]+)", first)
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
            entry, i = _entry(lines, i, not structure_only)
        except _Torn:
            return Parsed(tuple(entries), data[:good_end], data[good_end:], start + 1)
        entries.append(entry)
        good_end = lines.offsets[i] if i < len(lines.offsets) else len(data)
    if not entries:
        raise lines.error(2, "the record has no entries after its first line")
    return Parsed(tuple(entries), data, b"", 0)


#: One whole well-formed entry, from the empty line before it to its sha256 line.
_ENTRY = re.compile(
    r"\n(entry ([1-9][0-9]{0,8}): ([a-z][a-z -]*[a-z])\n"
    r"at      ([0-9]{4}-[0-9]{2}-[0-9]{2}T[0-9]{2}:[0-9]{2}:[0-9]{2}Z)\n"
    r"by      ([^\n]*)\n"
    r"((?:\|(?: [^\n]*)?\n)*)"
    r"((?::(?: [^\n]*)?\n)*)"
    r"follows ([0-9a-f]{64})\n)"
    r"sha256  ([0-9a-f]{64})\n"
)
#: The fast reader is used when it can be: it accepts only what the line-by-line reader accepts,
#: and hands every other file to it (for its error naming the line, or its torn tail).
_FAST = True


def _parse_fast(data: bytes, structure_only: bool) -> Parsed | tuple[list[Entry], int]:
    """Read a well-formed record with one regular expression per entry.

    Returns the Parsed record, or the entries read before the first thing
    it does not accept and the index of the line where the line-by-line
    reader must go on (for its error naming the line, or a torn tail).
    """
    entries: list[Entry] = []
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        return entries, 1
    if not text.startswith(MAGIC + "\n"):
        return entries, 1
    pos, index = len(MAGIC) + 1, 1  # index: 0-based line of the empty line before the next entry
    match = _ENTRY.match
    while pos < len(text):
        m = match(text, pos)
        if m is None:
            return entries, index
        kind, time, author = m.group(3), m.group(4), m.group(5)
        if kind not in KINDS or author != author.strip():
            return entries, index
        try:
            datetime.fromisoformat(time[:-1])
            clean_author(author)
        except (ValueError, InputError):
            return entries, index
        text_part, data_part = m.group(6), m.group(7)
        if " \n" in text_part or "\t\n" in text_part or "\r\n" in text_part or "\r\n" in data_part:
            return entries, index  # white space or a carriage return ending a line: the line reader names it
        parsed: dict = {}
        body = ""
        if not structure_only:
            try:
                parsed = tomllib.loads("\n".join(d[2:] for d in data_part.split("\n")[:-1]))
            except tomllib.TOMLDecodeError:
                return entries, index
            if not _shape_ok(kind, parsed):
                return entries, index
            body = "\n".join(t[2:] for t in text_part.split("\n")[:-1])
        entries.append(Entry(seq=int(m.group(2)), time=time, author=author, kind=kind, data=parsed, text=body,
                             prev_hash=m.group(8), hash=m.group(9), line=index + 2,
                             body=m.group(1).encode("utf-8")))
        index += 6 + text_part.count("\n") + data_part.count("\n")
        pos = m.end()
    if not entries:
        return entries, index
    return Parsed(tuple(entries), data, b"", 0)


def _shape_ok(kind: str, data: dict) -> bool:
    try:
        _check_shape(None, kind, data, 0)
    except _BadShape:
        return False
    return True


class _BadShape(Exception):
    pass


def _entry(lines: _Lines, i: int, with_data: bool = True) -> tuple[Entry, int]:
    """Read one entry starting at the blank line i; return it and the next line's index."""

    def line(j: int) -> str:
        if j >= lines.complete:
            raise _Torn
        return lines.text(j)

    if line(i) != "":
        raise lines.error(i + 1, "expected an empty line between entries")
    head = line(i + 1)
    m = _HEADER.fullmatch(head)
    if not m:
        raise lines.error(i + 2, "expected an entry header like 'entry 7: initial state'")
    seq, kind = int(m.group(1)), m.group(2)
    if kind not in KINDS:
        raise lines.error(i + 2, f"unknown kind of entry {kind!r}; expected one of {', '.join(KINDS)}")
    at = line(i + 2)
    if not at.startswith(TAG_AT) or not _TIME.fullmatch(at[len(TAG_AT):]):
        raise lines.error(i + 3, "expected 'at' and a UTC time like 'at      2025-03-04T10:02:11Z'")
    time = at[len(TAG_AT):]
    try:
        datetime.fromisoformat(time[:-1])
    except ValueError:
        raise lines.error(i + 3, f"{time!r} is not a valid date and time") from None
    by = line(i + 3)
    if not by.startswith(TAG_BY):
        raise lines.error(i + 4, "expected 'by' and the author's name")
    author = by[len(TAG_BY):]
    try:
        clean_author(author)
    except InputError:
        raise lines.error(i + 4, "the author's name is empty or not printable text") from None
    if author != author.strip():
        raise lines.error(i + 4, "the author's name has spaces before or after it")
    j = i + 4
    text: list[str] = []
    data: list[str] = []
    data_start = 0
    while True:
        cur = line(j)
        if cur == "|" or cur.startswith("| "):
            if data:
                raise lines.error(j + 1, "a text line ('|') after the data part (':'); text comes first")
            if cur.endswith(" ") or cur.endswith("\t"):
                raise lines.error(j + 1, "a text line ends with white space")
            text.append(cur[2:])
        elif cur == ":" or cur.startswith(": "):
            if not data:
                data_start = j + 1
            data.append(cur[2:])
        elif cur.startswith(TAG_FOLLOWS):
            break
        else:
            raise lines.error(j + 1, "expected a text line ('| ...'), a data line (': ...') or 'follows'")
        j += 1
    prev = cur[len(TAG_FOLLOWS):]
    if not _HEX.fullmatch(prev):
        raise lines.error(j + 1, "expected 'follows' and a SHA-256 in 64 lowercase hexadecimal digits")
    sealed = line(j + 1)
    if not sealed.startswith(TAG_SEAL) or not _HEX.fullmatch(sealed[len(TAG_SEAL):]):
        raise lines.error(j + 2, "expected 'sha256' and the entry's SHA-256 in 64 lowercase hexadecimal digits")
    body = lines.data[lines.offsets[i + 1]:lines.offsets[j + 1]]
    parsed: dict = {}
    if with_data:
        parsed = _data(lines, data, data_start or j + 1)
        _check_shape(lines, kind, parsed, data_start or j + 1)
    entry = Entry(seq=seq, time=time, author=author, kind=kind, data=parsed, text="\n".join(text),
                  prev_hash=prev, hash=sealed[len(TAG_SEAL):], line=i + 2, body=body)
    return entry, j + 2


def _data(lines: _Lines, data: list[str], first: int) -> dict:
    try:
        return tomllib.loads("\n".join(data))
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        m = _TOML_POS.search(message)
        where = first + int(m.group(1)) - 1 if m else first
        message = _TOML_POS.sub("", message).strip()
        raise lines.error(where, f"the data part is not valid TOML: {message}") from None


#: Required keys and their types in the data of each kind that is not a step.
_SHAPES = {
    OPENING: {"format": int, "joulebook": str, "species_data_sha256": str, "models": list, "roles": list},
    COMMENT: {"on": int, "text": str},
    RESOLUTION: {"comment": int, "note": str},
    SIGN_OFF: {"role": str, "signer": str, "covers": str, "revision": int},
    NOTE: {"note": str},
}


def _check_shape(lines: _Lines | None, kind: str, data: dict, where: int) -> None:
    def bad(message: str) -> Exception:
        if lines is None:
            return _BadShape(message)
        return lines.error(where, f"{kind} data: {message}")

    section = KIND_SECTIONS.get(kind)
    if section:
        if list(data) != [section]:
            raise bad(f"expected exactly the section [{section}]")
        value = data[section]
        if section in LIST_SECTIONS:
            if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
                raise bad(f"[[{section}]] must be a list of tables")
        elif not isinstance(value, dict):
            raise bad(f"[{section}] must be a table")
        return
    if kind == SOLVE:
        if "error" in data:
            if not isinstance(data["error"], str) or not isinstance(data.get("error_kind"), str):
                raise bad("a failed solve needs 'error' and 'error_kind' as text")
        elif not isinstance(data.get("states"), dict) or not isinstance(data.get("terms"), list):
            raise bad("a solve needs 'states' and 'terms', or 'error'")
        return
    for key, typ in _SHAPES[kind].items():
        value = data.get(key)
        if not isinstance(value, typ) or isinstance(value, bool):
            raise bad(f"'{key}' is missing or not {typ.__name__}")
    if kind == SIGN_OFF:
        unsigned = data.get("unsigned", False)
        signature = data.get("signature")
        if unsigned is not True and not (isinstance(signature, list) and signature
                                         and all(isinstance(s, str) for s in signature)):
            raise bad("a sign-off needs a 'signature' (lines of text) or 'unsigned = true'")
        if unsigned is True and signature is not None:
            raise bad("a sign-off marked unsigned must not carry a signature")
    if kind == OPENING and not all(isinstance(r, str) for r in data["roles"]):
        raise bad("'roles' must be a list of text")
