"""The record's grammar (format 1): its lines, their order, and what each may hold.

The writer (:mod:`.writer`) makes every line with the functions here and
the reader (:mod:`.reader`) reads every line with the patterns here: the
one-expression-per-entry pattern of its fast path (:data:`ENTRY`) is put
together from the same line patterns its line-by-line path matches one at a
time, and both apply the same checks of a line's fields (:func:`kind_problem`,
:func:`time_problem`, :func:`author_problem`), so the fast path accepts only
what the line-by-line path accepts. After the first line (:data:`MAGIC`),
each entry is::

                                  (one empty line)
    entry N: KIND                 HEADER
    at      YYYY-MM-DDTHH:MM:SSZ  AT       (UTC, whole seconds)
    by      AUTHOR                BY       (one line of printable text, no spaces around it)
    | text                        TEXT     (any number; "|" alone is an empty line of text)
    : data                        DATA     (any number; together a TOML fragment)
    follows HEX                   FOLLOWS  (the seal of the entry before)
    sha256  HEX                   SEAL     (the SHA-256 of the lines from HEADER to FOLLOWS)

Every line is UTF-8 and ends in a newline, never a carriage return; a text
line never ends in a space or a tab. An entry's data stays within bounds that both
the writer and the reader apply (:func:`value_problem`, :func:`nesting_problem`):
tables and lists at most :data:`MAX_DEPTH` levels deep, texts of at most
:data:`MAX_TEXT` characters, a data part of at most :data:`MAX_DATA`, 64-bit
integers; so nothing after the reader recurses without end or reads without end. The README ("The record") and the package
docstring (:mod:`balance.record`) describe what the lines mean.
"""

from __future__ import annotations

import hashlib
import re
import unicodedata
from dataclasses import dataclass, field
from datetime import datetime, timezone

from ..errors import InputError

FORMAT = 1
MAGIC = f"joulebook record, format {FORMAT}"
MAGIC_LINE = (MAGIC + "\n").encode()
#: A first line of some format (a newer joulebook's record is named as such).
ANY_MAGIC = re.compile(r"joulebook record, format ([0-9]+)")
#: ``follows`` of entry 1: the SHA-256 of the record's first line.
GENESIS = hashlib.sha256(MAGIC_LINE).hexdigest()

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
    "stream": "streams",
    "device": "devices",
    "vessel": "vessels",
    "line": "lines",
    "end": "end condition",
    "history": "integrator settings",
}
KIND_SECTIONS = {kind: section for section, kind in SECTION_KINDS.items()}
#: Sections whose value is a list of tables (``[[initial]]``); the rest are one table.
LIST_SECTIONS = ("initial", "heat", "work", "stream", "device", "vessel", "line")

OPENING, SOLVE, COMMENT, RESOLUTION, SIGN_OFF, NOTE = (
    "opening", "solve", "comment", "resolution", "sign-off", "revision note",
)
KINDS = (OPENING, *SECTION_KINDS.values(), SOLVE, COMMENT, RESOLUTION, SIGN_OFF, NOTE)
#: Kinds that change the calculation (a change after a sign-off starts a new revision).
CONTENT_KINDS = (*SECTION_KINDS.values(), SOLVE, NOTE)

# -- the lines -------------------------------------------------------------------------
TAG_ENTRY, TAG_AT, TAG_BY, TAG_FOLLOWS, TAG_SEAL = "entry ", "at      ", "by      ", "follows ", "sha256  "
TEXT_MARK, DATA_MARK = "|", ":"
TIME_FORMAT = "%Y-%m-%dT%H:%M:%SZ"

_SEQ = r"[1-9][0-9]{0,8}"
_KIND = r"[a-z][a-z -]*[a-z]"
_TIME = r"[0-9]{4}-[0-9]{2}-[0-9]{2}T[0-9]{2}:[0-9]{2}:[0-9]{2}Z"
_HEX = r"[0-9a-f]{64}"

# Each line without its newline; the groups name the fields.
_HEADER = rf"{re.escape(TAG_ENTRY)}(?P<seq>{_SEQ}): (?P<kind>{_KIND})"
_AT = rf"{re.escape(TAG_AT)}(?P<time>{_TIME})"
_BY = rf"{re.escape(TAG_BY)}(?P<author>[^\n]*)"
_TEXT = rf"{re.escape(TEXT_MARK)}(?: [^\n]*[^ \t\n])?"  # not ending in a space or a tab
_DATA = rf"{re.escape(DATA_MARK)}(?: [^\n]*)?"
_FOLLOWS = rf"{re.escape(TAG_FOLLOWS)}(?P<prev>{_HEX})"
_SEAL = rf"{re.escape(TAG_SEAL)}(?P<hash>{_HEX})"

HEADER, AT, BY, TEXT, DATA, FOLLOWS, SEAL = (
    re.compile(p) for p in (_HEADER, _AT, _BY, _TEXT, _DATA, _FOLLOWS, _SEAL))
#: One whole entry from the empty line before it to its seal line; ``sealed`` is the part the seal hashes.
ENTRY = re.compile(rf"\n(?P<sealed>{_HEADER}\n{_AT}\n{_BY}\n(?P<text>(?:{_TEXT}\n)*)(?P<data>(?:{_DATA}\n)*)"
                   rf"{_FOLLOWS}\n){_SEAL}\n")
#: Lines of an entry besides its text and data lines: the empty line, HEADER, AT, BY, FOLLOWS, SEAL.
FIXED_LINES = 6

#: What the reader says of a line that is not the line its place calls for.
EXPECTED = {
    HEADER: "expected an entry header like 'entry 7: initial state'",
    AT: "expected 'at' and a UTC time like 'at      2025-03-04T10:02:11Z'",
    BY: "expected 'by' and the author's name",
    TEXT: "a text line ends with white space",  # (a line ending in a carriage return is refused before)
    FOLLOWS: "expected 'follows' and a SHA-256 in 64 lowercase hexadecimal digits",
    SEAL: "expected 'sha256' and the entry's SHA-256 in 64 lowercase hexadecimal digits",
}


def header_line(seq: int, kind: str) -> str:
    return f"{TAG_ENTRY}{seq}: {kind}"


def text_line(value: str) -> str:
    """One line of the human-readable part (``value`` is a line of :func:`normal_text`)."""
    return f"{TEXT_MARK} {value}" if value else TEXT_MARK


def data_line(value: str) -> str:
    """One line of the machine-readable part (``value`` is a line of the TOML fragment)."""
    return f"{DATA_MARK} {value}" if value else DATA_MARK


def is_marked(line: str, mark: str) -> bool:
    """Whether a line is a text (``|``) or data (``:``) line: the mark alone, or the mark and a space."""
    return line == mark or line.startswith(mark + " ")


_MARKED = len(TEXT_MARK + " ")  # where a text or data line's value starts (both marks are one character)


def content(line: str) -> str:
    """What a text or data line holds: the line without its mark and the space after it."""
    return line[_MARKED:]


def contents(block: str) -> str:
    """What consecutive text or data lines hold, each line ending in a newline; joined by newlines."""
    return "\n".join(line[_MARKED:] for line in block.split("\n")[:-1])


# -- checks of a line's fields, beyond its pattern -----------------------------------------
def kind_problem(kind: str) -> str | None:
    if kind in KINDS:
        return None
    return f"unknown kind of entry {kind!r}; expected one of {', '.join(KINDS)}"


def time_problem(time: str) -> str | None:
    """``time`` matches the AT pattern; is it a real moment?"""
    try:
        datetime.fromisoformat(time[:-1])
    except ValueError:
        return f"{time!r} is not a valid date and time"
    return None


def author_problem(author: str) -> str | None:
    try:
        clean_author(author)
    except InputError:
        return "the author's name is empty or not printable text"
    if author != author.strip():
        return "the author's name has spaces before or after it"
    return None


# -- what a line may hold ----------------------------------------------------------------
#: Unicode categories of control and line-separator characters (and lone surrogates): a pager or
#: another program could break a line at one, or act on it.
_HIDDEN = ("Cc", "Zl", "Zp", "Cs")


def visible(text: str) -> str:
    """One line of text with control and line-separator characters shown as escapes.

    The record is split on newlines only; characters a pager or another
    program could treat as a line break or a terminal control are written
    as ``\\u{....}`` so every line of the file stays one line on screen.
    """
    if text.isprintable():  # none of them (the usual case)
        return text
    return "".join(f"\\u{{{ord(ch):04x}}}" if ch != "\t" and unicodedata.category(ch) in _HIDDEN else ch
                   for ch in text)


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
    if any(unicodedata.category(ch) in _HIDDEN for ch in name):
        raise InputError(field, f"must be one line of printable text; got {author!r}")
    return name


# -- how far a value may go ------------------------------------------------------------------
#: The deepest nesting of tables and lists in an entry's data (the data part itself is level 1). The
#: entries joulebook writes nest four levels (a solve's terms: a list of tables of quantities); readers
#: walk nesting recursively (Python's own TOML reader does), so deeper data is refused before anything
#: walks it.
MAX_DEPTH = 32
#: The longest text (or key) in an entry's data, in characters.
MAX_TEXT = 100_000
#: The longest data part of an entry, in characters of its TOML text (its lines joined by newlines):
#: a solve's takes some five thousand.
MAX_DATA = 1_000_000
#: TOML integers are 64-bit signed (TOML 1.0.0, "Integer"); larger ones do not become floats either.
_INT_MIN, _INT_MAX = -(2 ** 63), 2 ** 63 - 1

#: What Python's TOML reader does not look into for nesting: strings and comments (their brackets do
#: not nest). In turn: a multi-line basic string (up to two quotes end its content) or a basic string;
#: a multi-line literal string or a literal string; a comment.
_TOML_OPAQUE = (r'"(?:""(?:[^"\\]|\\.|"(?!""))*"{3,5}|[^"\\\n]*(?:\\.[^"\\\n]*)*")'
                r"|'(?:''.*?'{3,5}|[^'\n]*')"
                r"|#[^\n]*")
_OPAQUE = re.compile(_TOML_OPAQUE, re.S)
_NOT_BRACKETS = re.compile(r"[^\[\]{}]+")
#: The same, and what the reader recurses on: arrays and inline tables.
_TOML_TOKENS = re.compile(_TOML_OPAQUE + r"|(?P<open>[\[{])|(?P<close>[\]}])", re.S)


def nesting_problem(fragment: str) -> tuple[int, str] | None:
    """Where the arrays and inline tables of a TOML fragment nest deeper than :data:`MAX_DEPTH`,
    found without parsing it: (the line of the fragment, 0-based; what is wrong), or None.

    Run before the fragment is parsed: the parser recurses once a level. A string the scan does
    not see as one (unterminated) is where the parser stops with an error, so what follows it
    is never parsed, however deep.
    """
    if fragment.count("[") + fragment.count("{") <= MAX_DEPTH:  # cannot nest deeper (the usual case)
        return None
    depth = 0
    for ch in _NOT_BRACKETS.sub("", _OPAQUE.sub("", fragment)):  # the brackets outside strings, in order
        if ch in "[{":
            depth += 1
            if depth > MAX_DEPTH:
                break
        else:
            depth = max(0, depth - 1)  # more closing than opening: the parser refuses it, at no depth
    else:
        return None
    depth = 0
    for m in _TOML_TOKENS.finditer(fragment):  # the same scan again, for the line
        if m.lastgroup == "open":
            depth += 1
            if depth > MAX_DEPTH:
                return fragment.count("\n", 0, m.start()), _too_deep()
        elif m.lastgroup == "close":
            depth = max(0, depth - 1)
    raise RuntimeError("the two scans of a TOML fragment disagree")  # pragma: no cover - a defect


def _too_deep(where: str = "") -> str:
    at = f" (at {where})" if where else ""
    return f"nests tables and lists more than {MAX_DEPTH} levels deep{at}; at most {MAX_DEPTH} levels are allowed"


def value_problem(data) -> str | None:
    """What puts an entry's data beyond what a record may hold (None when nothing does): tables and
    lists nested more than :data:`MAX_DEPTH` levels, a text or key of more than :data:`MAX_TEXT`
    characters, an integer outside TOML's 64-bit range, a value of another kind (a TOML date or time).

    Walks without recursion, so it is safe on any data. Every entry the reader returns and every
    entry the writer writes has passed it: the code after them may walk entry data recursively.
    """
    stack = [(data, 1, ())]
    while stack:
        value, depth, path = stack.pop()
        if isinstance(value, dict):
            if depth > MAX_DEPTH:
                return _too_deep(_path(path))
            for k, v in value.items():
                if isinstance(k, str) and len(k) > MAX_TEXT:
                    return f"has a key of {len(k)} characters (at {_path(path)}); at most {MAX_TEXT} are allowed"
                stack.append((v, depth + 1, (*path, k)))
        elif isinstance(value, (list, tuple)):
            if depth > MAX_DEPTH:
                return _too_deep(_path(path))
            stack.extend((v, depth + 1, (*path, i + 1)) for i, v in enumerate(value))
        elif isinstance(value, str):
            if len(value) > MAX_TEXT:
                return f"holds a text of {len(value)} characters (at {_path(path)}); at most {MAX_TEXT} are allowed"
        elif isinstance(value, int) and not isinstance(value, bool):
            if not _INT_MIN <= value <= _INT_MAX:
                return f"holds an integer outside TOML's 64-bit range (at {_path(path)})"
        elif not (value is None or isinstance(value, (float, bool))):  # None: left out when written (no null)
            return (f"holds a {type(value).__name__} (at {_path(path)}); a record holds text, numbers, "
                    "true or false, lists and tables")
    return None


def check_depth(depth: int, field: str = "data") -> None:
    """For a recursive walker of entry data, at each level: refuse to go deeper than :data:`MAX_DEPTH`
    (data that did not come through :func:`value_problem` cannot make it recurse without end)."""
    if depth > MAX_DEPTH:
        raise InputError(field, _too_deep())


def _path(path: tuple) -> str:
    """Where a value sits, as ``'a.b[2].c'``: its first levels only, when it sits deep."""
    text = ""
    for part in path[:6]:
        text += f"[{part}]" if isinstance(part, int) else (f".{part}" if text else str(part))
    if not text:
        return "the top"
    return repr(text[:80] + (" …" if len(path) > 6 or len(text) > 80 else ""))


# -- an entry -------------------------------------------------------------------------------
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
        return datetime.strptime(self.time, TIME_FORMAT).replace(tzinfo=timezone.utc)


def format_time(moment: datetime) -> str:
    """A moment as the record writes it: UTC, whole seconds."""
    if moment.tzinfo is None:
        raise ValueError("the record's clock must give timezone-aware times")
    return moment.astimezone(timezone.utc).strftime(TIME_FORMAT)
