"""The record file: writing, reading back, the layout's strictness, torn tails, and a fuzzed parser.

Facts checked here are joulebook's own contract for its record format
(README, "The record"; common practice, no source), and SHA-256 as
computed by Python's hashlib (FIPS 180-4).
"""

from __future__ import annotations

import hashlib
import string

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from balance.errors import InputError
from balance.record import Record
from balance.record.format import GENESIS, MAGIC_LINE, data_lines, parse
from tests.helpers import sample
from tests.test_record_support import AUTHOR, Clock, new_record, sample_names


@pytest.fixture(scope="module")
def n2_bytes(tmp_path_factory) -> bytes:
    folder = tmp_path_factory.mktemp("n2")
    new_record(folder)
    return (folder / "calc.jbk").read_bytes()


# -- writing and reading back -----------------------------------------------------------
@pytest.mark.parametrize("name", sample_names())
def test_import_replays_to_the_same_worksheet(tmp_path, name):
    rec = new_record(tmp_path, name)
    again = Record.load(tmp_path / "calc.jbk")
    assert again.entries == rec.entries
    assert again.worksheet() == sample(name)  # the worksheet is the replay of the entries
    assert [e.kind for e in rec.entries][0] == "opening"
    assert rec.entries[-1].kind == "solve" and "error" not in rec.entries[-1].data
    assert again.recovered is None


def test_entries_are_sealed_and_chained(tmp_path):
    rec = new_record(tmp_path)
    data = (tmp_path / "calc.jbk").read_bytes()
    assert data.startswith(MAGIC_LINE) and data.endswith(b"\n")
    assert GENESIS == hashlib.sha256(b"joulebook record, format 1\n").hexdigest()  # hashlib, FIPS 180-4
    prev = GENESIS
    for e in rec.entries:
        assert e.prev_hash == prev
        assert e.hash == hashlib.sha256(e.body).hexdigest()
        assert f"\nsha256  {e.hash}\n".encode() in data
        prev = e.hash
    assert rec.head == prev


def test_first_entry_pins_version_data_and_models(tmp_path):
    from balance import __version__
    from balance.models import MODEL_NAMES
    from balance.species import data_hash

    opening = new_record(tmp_path, None).entries[0]
    assert opening.data["joulebook"] == __version__
    assert opening.data["species_data_sha256"] == data_hash()
    assert opening.data["models"] == list(MODEL_NAMES)
    assert opening.data["roles"] == ["prepared", "checked", "approved"]


def test_a_step_says_what_changed_with_units_as_typed(tmp_path):
    rec = new_record(tmp_path)
    final = dict(rec.worksheet().to_dict()["final"])
    final["T"] = "-30 degC"
    e = rec.append_step("final", final, author="b.checker")
    assert e.kind == "final state" and e.author == "b.checker"
    assert "Final state: changed (T)" in e.text
    assert "T     -30 degC   (was: ?  (unknown: to be solved))" in e.text
    sun = {"name": "sun", "Q": "5 kJ", "T_boundary": "40 degC"}
    first = rec.append_step("heat", [sun])
    assert first.text.startswith("Heat terms (heat to the system is positive): set, 1 heat term")
    lamp = {"name": "lamp", "Q": "?"}
    heat = rec.append_step("heat", [sun, lamp])
    assert "heat term 1 'sun': unchanged" in heat.text and "heat term 2 'lamp': added" in heat.text
    assert "heat term 2 'lamp': added\n    Q  ?  (unknown: to be solved)" in heat.text
    gone = rec.append_step("heat", [])
    assert "heat term 1 'sun': removed (was: Q = 5 kJ, T_boundary = 40 degC)" in gone.text
    assert rec.worksheet().heat == () and rec.worksheet().final.props["T"] == "-30 degC"
    assert Record.load(rec.path).entries == rec.entries


def test_bad_step_data_is_refused_naming_the_field_and_nothing_is_written(tmp_path):
    rec = new_record(tmp_path)
    before = rec.path.read_bytes()
    with pytest.raises(InputError, match=r"final\.colour"):
        rec.append_step("final", {"colour": "red"})
    with pytest.raises(InputError, match="unknown section"):
        rec.append_step("kettle", {})
    with pytest.raises(InputError, match="list of tables"):
        rec.append_step("initial", {"T": "1 K"})
    assert rec.path.read_bytes() == before and len(rec.entries) == 8


def test_a_failed_solve_is_recorded_not_raised(tmp_path):
    rec = new_record(tmp_path)
    rec.append_step("process", {})  # two compartments but no rigid boundary: refused when prepared
    e = rec.append_solve()
    assert e.kind == "solve" and e.data["error_kind"] == "InputError"
    assert e.data["error"].startswith("process.constraints:")
    assert e.text.startswith("Solve failed (inputs as of entry 9): InputError")
    assert Record.load(rec.path).entries[-1] == e


def test_data_lines_read_back_exactly():
    data = {"a": 1.0 / 3.0, "b": [1, 2.5e-300, "x\ny\"z\u2028"], "c": {"value": -0.0, "unit": "J"},
            "d": {"e": {"f": [{"g": "h", "q": {"value": 1e308, "unit": "Pa"}}]}}, "e": [], "n": None}
    import tomllib

    back = tomllib.loads("\n".join(data_lines(data)))
    assert back == {k: v for k, v in data.items() if v is not None}


def test_odd_characters_in_text_stay_on_one_line(tmp_path):
    rec = new_record(tmp_path, None)
    typed = "line\u2028separator, bell\x07 and\rreturn\x85end"
    e = rec.comment(1, typed)
    assert "\\u{2028}" in e.text and "\\u{0007}" in e.text and "\\u{0085}" in e.text
    assert e.data["text"] == typed  # the data keeps exactly what was typed
    raw = rec.path.read_bytes().decode("utf-8")
    assert raw.splitlines() == raw.split("\n")[:-1]  # no other program finds more lines than we write
    assert Record.load(rec.path).entries[-1] == e
    with pytest.raises(InputError, match="not a valid Unicode character"):
        rec.comment(1, "half a pair \ud800")
    assert Record.load(rec.path).entries[-1] == e


# -- never overwritten, never truncated -----------------------------------------------------
def test_an_existing_file_is_never_overwritten(tmp_path):
    path = tmp_path / "calc.jbk"
    path.write_text("my notes\n")
    with pytest.raises(InputError, match="already exists"):
        Record.create(path, author=AUTHOR, worksheet=sample("n2-buffer-into-receiver.toml"))
    assert path.read_text() == "my notes\n"


def test_a_second_writer_cannot_drop_the_first_writers_entry(tmp_path):
    new_record(tmp_path)
    first = Record.load(tmp_path / "calc.jbk", author="one")
    second = Record.load(tmp_path / "calc.jbk", author="two")
    kept = first.comment(2, "from the first writer")
    after = second.comment(2, "from the second writer")  # reads the record again, and appends after it
    on_disk = Record.load(tmp_path / "calc.jbk")
    assert on_disk.entries[-2:] == (kept, after) and after.seq == 10 and after.prev_hash == kept.hash
    assert second.entries == on_disk.entries and on_disk.verify().ok


def test_no_temporary_files_are_left(tmp_path):
    rec = new_record(tmp_path)
    rec.comment(1, "a comment")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["calc.jbk"]


# -- torn tails ------------------------------------------------------------------------------
def test_a_torn_last_entry_is_set_aside_at_every_cut(tmp_path):
    rec = new_record(tmp_path, None, clock=Clock())
    rec.comment(1, "the entry before the torn one")
    good = rec.path.read_bytes()
    rec.comment(1, "this entry will be cut off")
    full = rec.path.read_bytes()
    cuts = range(len(good), len(full))  # every length from the end of the good part to one byte short
    for k, cut in enumerate(cuts):
        folder = tmp_path / f"cut{k}"
        folder.mkdir()
        path = folder / "r.record"
        path.write_bytes(full[:cut])
        if cut == len(good):
            assert Record.load(path).recovered is None  # nothing torn: the file ends after an entry
            continue
        loaded = Record.load(path, clock=Clock())
        assert loaded.recovered and "set aside" in loaded.recovered
        assert len(loaded.entries) == 2 and path.read_bytes() == good
        side = [p for p in folder.iterdir() if p.name.startswith("r.record.torn-")]
        assert len(side) == 1 and side[0].read_bytes() == full[len(good):cut]
        assert Record.load(path).recovered is None
        loaded.comment(1, "work goes on")  # the recovered record can be extended


def test_a_torn_tail_that_cannot_be_set_aside_is_reported_and_kept(tmp_path, monkeypatch):
    from balance.record import store

    def refuse(*args, **kwargs):
        raise InputError("side file", "could not be written: No space left on device")

    rec = new_record(tmp_path, None)
    rec.comment(1, "cut me")
    data = rec.path.read_bytes()
    rec.path.write_bytes(data[:-10])
    monkeypatch.setattr(store, "set_aside", refuse)
    loaded = Record.load(rec.path)
    assert "could not be set aside" in loaded.recovered and len(loaded.entries) == 1
    with pytest.raises(InputError, match="nothing can be added"):
        loaded.comment(1, "no")
    assert rec.path.read_bytes() == data[:-10]  # the torn bytes are still in the file


# -- strict layout: errors name the line -------------------------------------------------------
def _replace_line(data: bytes, number: int, new: bytes) -> bytes:
    lines = data.split(b"\n")
    lines[number - 1] = new
    return b"\n".join(lines)


def _line_of(data: bytes, prefix: bytes) -> int:
    return next(i + 1 for i, ln in enumerate(data.split(b"\n")) if ln.startswith(prefix))


@pytest.mark.parametrize("change, where, message", [
    (lambda d: _replace_line(d, 1, b"joulebook record, format 9"), 1, "format 9"),
    (lambda d: _replace_line(d, 1, b"some other file"), 1, "not the first line"),
    (lambda d: _replace_line(d, 3, b"entry 1: lunch"), 3, "unknown kind"),
    (lambda d: _replace_line(d, 4, b"at      2025-13-40T10:00:00Z"), 4, "not a valid date"),
    (lambda d: _replace_line(d, 5, b"by      "), 5, "author"),
    (lambda d: _replace_line(d, 2, b" "), 2, "empty line between entries"),
    (lambda d: _replace_line(d, 6, b"|  trailing "), 6, "white space"),
    (lambda d: _replace_line(d, 6, b"Record opened"), 6, "expected a text line"),
    (lambda d: d.replace(b"\n", b"\r\n", 3), 1, "carriage return"),
    (lambda d: d.replace(b": format = 1", b": format = = 1"), b": format", "not valid TOML"),
    (lambda d: d.replace(b": format = 1", b": format = 1\n| late text"), b"| late", "after the data part"),
    (lambda d: d.replace(b"follows c", b"follows C"), b"follows C", "64 lowercase"),
    (lambda d: d.replace(b"Species data SHA-256", b"Species data SHA-256 \xff"), 7, "not UTF-8"),
    (lambda d: d.replace(b': roles = ["prepared", "checked", "approved"]', b": roles = 3"), b": format", "'roles'"),
])
def test_malformed_records_name_the_line(n2_bytes, change, where, message):
    data = change(n2_bytes)
    with pytest.raises(InputError) as info:
        parse(data, "calc.jbk")
    text = str(info.value)
    assert message in text
    if isinstance(where, bytes):  # the line that starts so (a shape error names the data part's first line)
        where = _line_of(data, where)
    assert text.startswith(f"calc.jbk, line {where}:"), text


def test_an_empty_or_foreign_file_is_refused(tmp_path):
    for content in (b"", b"joulebook", b"[worksheet]\ntitle = 'x'\n"):
        path = tmp_path / "x.record"
        path.write_bytes(content)
        with pytest.raises(InputError, match=r"x\.record, line 1:"):
            Record.load(path)
        assert path.read_bytes() == content  # nothing the user saved is touched
    with pytest.raises(InputError, match="does not exist"):
        Record.load(tmp_path / "missing.record")


# -- fuzzing ---------------------------------------------------------------------------------------
PREFIXES = ["", "| ", ": ", "entry 2: comment", "entry 9: solve", "at      2025-01-06T08:00:00Z", "by      x",
            "follows " + "0" * 64, "sha256  " + "a" * 64, "|", ":", ": [[initial]]", ": x = {", "joulebook record, format 1"]


@st.composite
def mutated(draw, base: bytes):
    lines = base.split(b"\n")
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["delete", "duplicate", "swap", "replace", "insert", "truncate", "bytes"]))
        i = draw(st.integers(0, len(lines) - 1))
        if op == "delete" and len(lines) > 1:
            del lines[i]
        elif op == "duplicate":
            lines.insert(i, lines[i])
        elif op == "swap":
            j = draw(st.integers(0, len(lines) - 1))
            lines[i], lines[j] = lines[j], lines[i]
        elif op in ("replace", "insert"):
            text = draw(st.sampled_from(PREFIXES)) + draw(st.text(string.printable + "é€\u2028\x00", max_size=30))
            if op == "replace":
                lines[i] = text.encode("utf-8")
            else:
                lines.insert(i, text.encode("utf-8"))
        elif op == "truncate":
            return b"\n".join(lines)[: draw(st.integers(0, len(base)))]
        else:
            raw = bytearray(lines[i])
            raw[draw(st.integers(0, len(raw))):0] = draw(st.binary(min_size=1, max_size=4))
            lines[i] = bytes(raw)
    return b"\n".join(lines)


_BASE = None


def _base() -> bytes:
    global _BASE
    if _BASE is None:
        import tempfile
        from pathlib import Path

        with tempfile.TemporaryDirectory() as tmp:
            rec = new_record(Path(tmp), "air-test-cylinder-reversible.toml")
            rec.comment(5, "check the mass")
            rec.sign("prepared", unsigned=True)
            _BASE = rec.path.read_bytes()
    return _BASE


def _parse_or_named_error(data: bytes) -> None:
    try:
        parsed = parse(data, "fuzz.record")
    except InputError as exc:
        assert str(exc).startswith("fuzz.record, line "), str(exc)
        return
    assert parsed.good + parsed.torn == data


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.data())
def test_fuzzed_records_give_a_named_line_never_a_traceback(data):
    _parse_or_named_error(data.draw(mutated(_base())))


@settings(max_examples=200, deadline=None)
@given(st.binary(max_size=300))
def test_random_bytes_give_a_named_line(raw):
    _parse_or_named_error(raw)
    _parse_or_named_error(MAGIC_LINE + b"\n" + raw)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.data())
def test_loading_fuzzed_files_never_loses_bytes(data):
    import tempfile
    from pathlib import Path

    raw = data.draw(mutated(_base()))
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "f.record"
        path.write_bytes(raw)
        try:
            rec = Record.load(path)
        except InputError as exc:
            assert "line " in str(exc)
            assert path.read_bytes() == raw  # a refused file is left as it was
            return
        kept = path.read_bytes()
        side = b"".join(p.read_bytes() for p in Path(tmp).iterdir() if ".torn-" in p.name)
        assert kept + side == raw  # everything is still on disk, in the record or the side file
        rec.verify()  # never raises, whatever it finds


def _outcome(raw: bytes, line_by_line: bool, structure_only: bool = False):
    try:
        parsed = parse(raw, "fuzz.record", line_by_line=line_by_line, structure_only=structure_only)
        return ("ok", [(e, e.line, e.body) for e in parsed.entries], parsed.good, parsed.torn, parsed.torn_line)
    except InputError as exc:
        return ("error", str(exc))


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.data())
def test_the_fast_path_agrees_with_the_line_by_line_path(data):
    raw = data.draw(st.one_of(mutated(_base()), st.just(_base())))
    assert _outcome(raw, False) == _outcome(raw, True)
    assert _outcome(raw, False, True) == _outcome(raw, True, True)


# -- records whose chain is intact but whose entries are odd (written by another program) ----
_scalars = st.one_of(st.text(max_size=12), st.integers(-5, 50), st.floats(allow_nan=False, width=32), st.booleans())
_values = st.recursive(_scalars, lambda inner: st.one_of(st.lists(inner, max_size=3),
                                                         st.dictionaries(st.text(max_size=6), inner, max_size=3)),
                       max_leaves=8)
_quantity = st.fixed_dictionaries({"value": st.floats(-1e6, 1e6), "unit": st.sampled_from(["K", "Pa", "J", "mol"])})


@st.composite
def odd_entry(draw):
    from balance.record.format import KINDS, SECTION_KINDS

    kind = draw(st.sampled_from(KINDS))
    section = {v: k for k, v in SECTION_KINDS.items()}.get(kind)
    if section in ("initial", "heat", "work"):
        data = {section: draw(st.lists(st.dictionaries(st.sampled_from(["name", "T", "P", "V", "Q", "W", "kind",
                                                                        "empty", "n"]), _scalars), max_size=2))}
    elif section:
        data = {section: draw(st.dictionaries(st.text(max_size=8), _scalars, max_size=3))}
    elif kind == "opening":
        data = {"format": 1, "joulebook": draw(st.text(max_size=5)), "species_data_sha256": "0" * 64,
                "models": [], "roles": draw(st.lists(st.sampled_from(["prepared", "checked", "x"]), max_size=3))}
    elif kind == "solve":
        data = draw(st.one_of(
            st.fixed_dictionaries({"error": st.text(max_size=20), "error_kind": st.text(max_size=8)}),
            st.fixed_dictionaries({"states": st.dictionaries(st.text(max_size=4), st.one_of(
                st.dictionaries(st.sampled_from(["T", "P", "n", "m", "v", "phase"]), st.one_of(_quantity, _scalars),
                                max_size=4), _scalars), max_size=2),
                "terms": st.lists(st.one_of(_values, st.dictionaries(st.sampled_from(["kind", "name", "value"]),
                                                                    st.one_of(_quantity, _scalars))), max_size=2),
                "equations": _values, "dU": st.one_of(_quantity, _scalars)})))
    elif kind == "comment":
        data = {"on": draw(st.integers(-2, 12)), "text": draw(st.text(min_size=1, max_size=20))}
    elif kind == "resolution":
        data = {"comment": draw(st.integers(-2, 12)), "note": draw(st.text(min_size=1, max_size=20))}
    elif kind == "sign-off":
        data = {"role": draw(st.sampled_from(["prepared", "checked", "approved", "boss"])),
                "signer": draw(st.sampled_from(["a", "b"])), "revision": draw(st.integers(0, 3)),
                "covers": draw(st.sampled_from(["0" * 64, "junk"]))}
        data.update(draw(st.sampled_from([{"unsigned": True}, {"signature": ["not", "a signature"]}])))
    else:
        data = {"note": draw(st.text(min_size=1, max_size=20))}
    return kind, data, draw(st.text(max_size=40))


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(odd_entry(), min_size=1, max_size=6))
def test_odd_but_sealed_records_are_reported_never_a_traceback(entries):
    import tempfile
    from pathlib import Path

    from balance.errors import BalanceError
    from balance.record import diff, export_html, export_markdown
    from balance.record.format import entry_lines, seal

    raw, prev = MAGIC_LINE, GENESIS
    for seq, (kind, data, text) in enumerate(entries, 1):
        body, prev = seal(entry_lines(seq, "2025-01-06T08:00:00Z", "someone", kind, text, data, prev))
        raw += b"\n" + body + f"sha256  {prev}\n".encode()
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "odd.jbk"
        path.write_bytes(raw)
        try:
            rec = Record.load(path)
        except InputError as exc:
            assert ", line " in str(exc)  # a shape the format does not allow: named
            return
        v = rec.verify()
        assert v.chain_ok
        v.lines()
        for call in (rec.worksheet, lambda: diff(rec, 1, len(rec.entries)), lambda: export_markdown(rec),
                     lambda: export_html(rec)):
            try:
                call()
            except BalanceError:
                pass  # a message for the user, as for any bad input


def test_the_record_package_imports_no_user_interface_and_no_coolprop():
    import json
    import subprocess
    import sys

    from tests.helpers import ROOT

    code = ("import sys, json, balance.record; "
            "print(json.dumps([m for m in ('textual', 'rich', 'tui', 'CoolProp') if m in sys.modules]))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert json.loads(out.stdout) == []
