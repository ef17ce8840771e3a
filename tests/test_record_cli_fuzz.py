"""The record commands on hostile records: never a traceback, always exit 0, 1 or 2 with a message.

Real records (a solved sample with a comment, its resolution and a sign-off)
are mutated the ways an audit did and worse: bytes flipped, inserted or cut
off, a value nested hundreds of levels deep, huge lines of text and of data,
NaN and infinities where numbers were, unicode of every kind (lone surrogates
written as the bytes they would be), odd TOML values in place of real ones.
Half of the mutated records are sealed again, as a forger would, so their
chain holds and the data reaches everything after the reader: the
renderings, replay's compare, the export, the diff. Each record goes through
``joulebook record show``, ``verify``, ``replay``, ``export`` (Markdown and
HTML), ``diff`` and ``worksheet`` via the command line's entry point.
Expectations: joulebook's contract (README, "Exit codes"; common practice, no source).
"""

from __future__ import annotations

import contextlib
import hashlib
import io
import re
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tests.test_record_support import new_record
from tui.cli import main

COMMANDS = (["show", "--data"], ["verify"], ["replay"], ["export", "--format", "md"],
            ["export", "--format", "html"], ["diff", "--from", "2"], ["worksheet"])
_BASE: list[bytes] = []


def _base() -> bytes:
    if not _BASE:
        with tempfile.TemporaryDirectory() as tmp:
            rec = new_record(Path(tmp), "n2-buffer-into-receiver.toml")
            c = rec.comment(8, "is the settled pressure below the receiver's design pressure?")
            rec.resolve(c.seq, "yes: 37 bar(a) against 45 barg")
            rec.sign("prepared", unsigned=True)
            _BASE.append(rec.path.read_bytes())
    return _BASE[0]


_NUMBER = re.compile(rb"(?<=[ =\[,])-?[0-9][0-9.e+-]*(?=[,\] }\n])")
_scalar = st.one_of(st.sampled_from(["nan", "inf", "-inf", "+inf", "1e308", "-0.0", "9" * 25, "0x7fffffffffffffff",
                                     '""', "true", "[]", "{}", "1979-05-27T07:32:00Z", '"?"', '"-5 K"']),
                    st.integers(-10, 10).map(str))


def _unicode() -> st.SearchStrategy[bytes]:
    return st.text(st.characters(codec=None, exclude_categories=()), min_size=1, max_size=40).map(
        lambda t: t.encode("utf-8", "surrogatepass"))


@st.composite
def hostile(draw) -> bytes:
    raw = bytearray(_base())
    for _ in range(draw(st.integers(1, 3))):
        op = draw(st.sampled_from(["flip", "insert", "truncate", "deep", "huge text", "huge data", "number",
                                   "unicode", "value"]))
        lines = bytes(raw).split(b"\n")
        data_at = [i for i, ln in enumerate(lines) if ln.startswith(b": ")]
        text_at = [i for i, ln in enumerate(lines) if ln.startswith(b"| ")]
        if not raw or not data_at or not text_at:  # cut off before any: nothing more to change
            break
        if op == "flip":
            p = draw(st.integers(0, len(raw) - 1))
            raw[p] ^= draw(st.integers(1, 255))
            continue
        if op == "insert":
            p = draw(st.integers(0, len(raw)))
            raw[p:p] = draw(st.binary(min_size=1, max_size=8))
            continue
        if op == "truncate":
            del raw[draw(st.integers(0, len(raw))):]
            continue
        if op == "deep":
            depth = draw(st.sampled_from([31, 32, 33, 200, 600]))
            opener = draw(st.sampled_from(["[", "{ a = "]))
            closer = "]" if opener == "[" else " }"
            line = b": deep = " + (opener * depth + "1" + closer * depth).encode()
            lines.insert(draw(st.sampled_from(data_at)) + 1, line)
        elif op == "huge text":
            lines.insert(draw(st.sampled_from(text_at)) + 1, b"| " + b"long words " * draw(st.sampled_from([10, 10**4, 10**5])))
        elif op == "huge data":
            n = draw(st.sampled_from([10**4, 10**5 + 1, 10**6]))
            lines.insert(draw(st.sampled_from(data_at)) + 1, b': huge = "' + b"w" * n + b'"')
        elif op == "number":
            i = draw(st.sampled_from(data_at))
            lines[i] = _NUMBER.sub(draw(_scalar).encode(), lines[i], count=1)
        elif op == "unicode":
            i = draw(st.sampled_from(text_at + data_at))
            p = draw(st.integers(2, max(2, len(lines[i]))))
            lines[i] = lines[i][:p] + draw(_unicode()) + lines[i][p:]
        else:  # a value of another shape in place of a real one
            i = draw(st.sampled_from(data_at))
            if b" = " in lines[i]:
                lines[i] = lines[i].split(b" = ", 1)[0] + b" = " + draw(_scalar).encode()
        raw = bytearray(b"\n".join(lines))
    return reseal(bytes(raw)) if draw(st.booleans()) else bytes(raw)


def reseal(data: bytes) -> bytes:
    """Every 'follows' and 'sha256' line recomputed, as a forger who edited the file would (a cut-off
    last entry is left cut off)."""
    lines = data.split(b"\n")
    prev = hashlib.sha256(lines[0] + b"\n").hexdigest()
    start = 0
    for i, line in enumerate(lines):
        if line.startswith(b"entry "):
            start = i
        elif line.startswith(b"follows ") and i + 1 < len(lines):
            lines[i] = b"follows " + prev.encode()
            prev = hashlib.sha256(b"".join(ln + b"\n" for ln in lines[start:i + 1])).hexdigest()
            lines[i + 1] = b"sha256  " + prev.encode()
    return b"\n".join(lines)


def _run(command: list[str], path: Path) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(["record", command[0], str(path), *command[1:]])
    return code, err.getvalue()


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(hostile())
def test_the_record_commands_answer_hostile_records_with_a_message(raw):
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "hostile.jbk"
        path.write_bytes(raw)
        for command in COMMANDS:
            code, err = _run(command, path)
            assert code in (0, 1, 2), (command, code, err)
            assert "Traceback" not in err, (command, err)
            if code == 2:
                assert err.startswith("joulebook: ") and len(err.strip()) > len("joulebook: "), (command, err)


def test_the_fuzz_reaches_past_the_reader():
    """Sealed again, a record with NaN for a recorded number reads and is reported, not refused."""
    raw = _base().replace(b"residual = ", b"residual = nan #", 1)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "nan.jbk"
        path.write_bytes(reseal(raw))
        assert _run(["replay"], path)[0] == 1  # a residual that is not below the limit does not reproduce
        for command in COMMANDS:
            code, err = _run(command, path)
            assert code in (0, 1) and "Traceback" not in err, (command, err)
