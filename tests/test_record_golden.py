"""Golden records: the record of every sample, and of a review, as files to read and diff.

Each record is made with a fixed clock and author, so it is the same on
every run except for numbers in their last binary digits (other numpy,
scipy or CoolProp builds). The comparison therefore reads both records and
compares, entry by entry, the header, the text and the data with numbers
rounded: data values to 8 significant digits, and round-off shown as "≈0".
Round-off is a residual below 1e-7, a number below 1e-6 in the text, and a
data value below 1e-9 of its unit's scale in the entry: the largest value of
that unit there, but never less than the entry's own physical scale (n R for
J/K, n R T for J and R T for J/mol, n and T from the entry's data), because
in some processes every value of a unit is round-off (ΔS_system and S_gen of
a reversible adiabatic stroke, ±1e-15 J/K). A text table with a round-off
cell is compared cell by cell: that cell's printed width sets its column's
width. The seals, which hash the exact digits, are left out; the golden
files themselves are real records and must verify. A report golden is
compared the same way, line by line.

After a deliberate change, regenerate and read every diff:

    JOULEBOOK_UPDATE_GOLDEN=1 pytest tests/test_record_golden.py
"""

from __future__ import annotations

import difflib
import os
import re
from pathlib import Path

import pytest

from balance.record import Record, export_markdown
from balance.record.format import parse
from balance.record.replay import _scales  # the per-unit scales replay judges by
from tests.test_record_support import Clock, new_record, sample_names

GOLDEN = Path(__file__).resolve().parent / "golden"
UPDATE = os.environ.get("JOULEBOOK_UPDATE_GOLDEN") == "1"
AUTHOR = "golden.author"

#: The molar gas constant [J/(mol K)], CODATA 2018 (exact since the 2019 SI: N_A k).
R = 8.314462618

_HEX = re.compile(r"\b[0-9a-f]{64}\b")
_NUMBER = re.compile(r"(?<![\w.])-?(?:\d+\.\d*(?:[eE][-+]?\d+)?|\d+[eE][-+]?\d+)(?![\w.])")


def _text_line(line: str) -> str:
    line = _HEX.sub("<sha256>", line)
    return _NUMBER.sub(lambda m: "≈0" if abs(float(m.group(0))) < 1e-6 else m.group(0), line)


_RULE = re.compile(r"^\s*-+(?:  -+)*$")


def _text_lines(lines: list[str]) -> list[str]:
    """The entry's text lines to compare; a table holding a round-off cell as its cells.

    A table (``text.table``) is a header, a rule of dashes and rows up to
    the next blank line; each column is as wide as its widest cell. A
    round-off cell's printed width ("8.1532e-19", "-1.68615e-18") is itself
    round-off, so such a table is compared by its stripped cells, cut at the
    rule's column spans.
    """
    out = [_text_line(line) for line in lines]
    i = 1
    while i < len(lines):
        if not _RULE.match(lines[i]):
            i += 1
            continue
        end = next((k for k in range(i + 1, len(lines)) if not lines[k].strip()), len(lines))
        spans = [m.span() for m in re.finditer(r"-+", lines[i])]
        if any("≈0" in out[k] and "≈0" not in lines[k] for k in range(i + 1, end)):
            for k in [i - 1, *range(i + 1, end)]:
                cuts = [a for a, _ in spans[1:]]
                cells = [lines[k][a:b].strip() for a, b in zip([0, *cuts], [*cuts, len(lines[k])])]
                out[k] = "table: " + " | ".join(_text_line(c) for c in cells)
            out[i] = f"table: rule of {len(spans)} columns"
        i = end
    return out


def _physical_scales(data: dict) -> dict:
    """The least scale of each unit that a round-off-only unit is judged against."""
    n = data.get("n")
    if not (isinstance(n, dict) and isinstance(n.get("value"), (int, float))):
        return {}
    temps = [abs(float(s["T"]["value"])) for s in (data.get("states") or {}).values()
             if isinstance(s, dict) and isinstance(s.get("T"), dict)]
    T = max(temps, default=0.0)
    nR = abs(float(n["value"])) * R
    return {"J/K": nR, "J": nR * T, "J/mol": R * T}


def _unit_scales(data: dict) -> dict:
    scales = _scales(data, {})
    for unit, least in _physical_scales(data).items():
        scales[unit] = max(scales.get(unit, 0.0), least)
    return scales


def _data_lines(value, path: str, scales: dict, out: list) -> list:
    if isinstance(value, dict):
        if set(value) == {"value", "unit"} and isinstance(value["value"], (int, float)):
            x = float(value["value"])
            shown = "≈0" if abs(x) <= 1e-9 * scales.get(value["unit"], 0.0) else f"{x:.8g}"
            out.append(f"{path} = {shown} {value['unit']}")
        else:
            for k, v in value.items():
                _data_lines(v, f"{path}.{k}" if path else k, scales, out)
    elif isinstance(value, list):
        for i, v in enumerate(value):
            _data_lines(v, f"{path}[{i}]", scales, out)
    elif isinstance(value, float):
        shown = "<1e-7" if path == "residual" and value < 1e-7 else f"{value:.8g}"
        out.append(f"{path} = {shown}")
    elif isinstance(value, str):
        out.append(f"{path} = {_text_line(value)!r}")
    else:
        out.append(f"{path} = {value!r}")
    return out


def comparable(text: str, name: str) -> list[str]:
    """What must match between a record (or a report) and its golden file."""
    if not name.startswith("record-"):
        return [_text_line(line) for line in text.split("\n")]
    out = []
    for e in parse(text.encode("utf-8"), name).entries:
        out.append(f"entry {e.seq}: {e.kind} at {e.time} by {e.author}")
        out += ["| " + line for line in _text_lines(e.text.split("\n"))]
        out += [": " + line for line in _data_lines(e.data, "", _unit_scales(e.data), [])]
    return out


def check(name: str, text: str) -> None:
    path = GOLDEN / name
    if UPDATE:
        path.write_text(text, encoding="utf-8")
    assert path.exists(), f"no golden file {path}: run with JOULEBOOK_UPDATE_GOLDEN=1 and read it"
    want, got = comparable(path.read_text(encoding="utf-8"), name), comparable(text, name)
    if want != got:
        shown = "\n".join(list(difflib.unified_diff(want, got, "golden", "now", lineterm="", n=1))[:60])
        pytest.fail(f"{name} differs from the golden file; if the change is meant, regenerate with "
                    f"JOULEBOOK_UPDATE_GOLDEN=1 and read the diff:\n{shown}")


@pytest.mark.parametrize("sample_name", sample_names())
def test_the_record_of_each_sample(tmp_path, sample_name):
    rec = new_record(tmp_path, sample_name, author=AUTHOR, clock=Clock())
    check(f"record-{Path(sample_name).stem}.txt", rec.path.read_text(encoding="utf-8"))


def _review(folder: Path) -> Record:
    rec = new_record(folder, "n2-buffer-into-receiver.toml", author=AUTHOR, clock=Clock())
    c = rec.comment(5, "Is 150 barg the operating pressure or the relief set pressure?", author="b.checker")
    rec.resolve(c.seq, "The relief set pressure: the worst case for the receiver.")
    rec.sign("prepared", unsigned=True)
    rec.sign("checked", unsigned=True, author="b.checker")
    rec.note("The receiver V-102 is replaced by a 4 m3 vessel.")
    initial = rec.worksheet().to_dict()["initial"]
    initial[1]["V"] = "4 m3"
    rec.append_step("initial", initial)
    rec.append_solve()
    return rec


def test_a_reviewed_and_revised_record(tmp_path):
    rec = _review(tmp_path)
    check("record-review.txt", rec.path.read_text(encoding="utf-8"))


def test_the_report_of_a_reviewed_record(tmp_path):
    rec = _review(tmp_path)
    check("report-review.md", export_markdown(rec))


@pytest.mark.parametrize("path", sorted(GOLDEN.glob("record-*.txt")), ids=lambda p: p.name)
def test_the_golden_files_are_records_that_verify(path):
    rec = Record.load(path)
    v = rec.verify()
    assert v.chain_ok and not v.problems and rec.recovered is None
