"""Replay: the record's worksheet is re-solved and every recorded result must reproduce.

Each sample worksheet (samples/*.toml) is imported and replayed with the
running joulebook: every value must reproduce within the default tolerance.
Records changed behind joulebook's back (a recorded number, another
joulebook version) must be reported with what differs. Expectations:
joulebook's contract (README, "The record"; common practice, no source).
"""

from __future__ import annotations

import pytest

from balance.record import DEFAULT_TOLERANCE, Record
from balance.record.replay import compare, same_text
from tests.test_record_support import new_record, sample_names
from tests.test_record_signing import reseal
from tui.cli import main


@pytest.mark.parametrize("name", sample_names())
def test_every_sample_reproduces(tmp_path, name):
    rec = new_record(tmp_path, name)
    report = Record.load(rec.path).replay()
    assert report.ok, report.lines()
    assert [s.status for s in report.solves] == ["reproduced"]
    assert report.pins == () and report.worksheet == rec.worksheet()


def test_a_changed_recorded_number_does_not_reproduce(tmp_path):
    rec = new_record(tmp_path)
    data = rec.path.read_bytes()
    recorded_T = repr(rec.entries[-1].data["states"]["settled"]["T"]["value"]).encode()
    forged = data.replace(b"T = { value = " + recorded_T, b"T = { value = 250.0")
    assert forged != data
    (tmp_path / "f.record").write_bytes(reseal(forged))
    report = Record.load(tmp_path / "f.record").replay()
    assert not report.ok and report.solves[0].status == "differs"
    (diff,) = report.solves[0].differences
    assert diff.path == "states.settled.T" and diff.recorded == 250.0 and diff.unit == "K"
    assert any(line.startswith("  states.settled.T: recorded 250 K, now 262.38") for line in report.lines())


def test_another_version_and_species_data_are_listed(tmp_path):
    from balance import __version__, api

    real = api.pins()
    data = new_record(tmp_path).path.read_bytes()
    # the record as another joulebook with other species data wrote it: the opening and the
    # solve entry pin both, in their text and their data
    older = data.replace(f'joulebook = "{__version__}"'.encode(), b'joulebook = "0.0.9"')
    older = older.replace(f"with joulebook {__version__}".encode(), b"with joulebook 0.0.9")
    older = older.replace(real["species_data_sha256"].encode(), b"0" * 64)
    assert older.count(b"0.0.9") == 4 and older.count(b"0" * 64) == 4
    (tmp_path / "older.jbk").write_bytes(reseal(older))
    rec = Record.load(tmp_path / "older.jbk")
    report = rec.replay()
    assert report.ok  # the numbers still reproduce ...
    paths = [d.path for d in report.pins]  # ... and what differs is listed
    assert paths == ["opening.joulebook", "opening.species_data_sha256", "entry 8.joulebook",
                     "entry 8.species_data_sha256"]
    assert "Recorded with a different joulebook or species data:" in report.lines()
    assert rec.verify().notes  # texts written by another version are not re-rendered


def test_a_recorded_failure_that_fails_again_reproduces(tmp_path):
    rec = new_record(tmp_path)
    rec.append_step("process", {})
    rec.append_solve()
    report = rec.replay()
    assert report.ok and [s.status for s in report.solves] == ["reproduced", "failed as recorded"]


def test_the_tolerance_is_relative_to_the_largest_value_of_the_unit():
    recorded = {"dU": {"value": 5.7e-06, "unit": "J"}, "dU_ideal_gas": {"value": -7.9e6, "unit": "J"},
                "states": {"a": {"T": {"value": 300.0, "unit": "K"}}}, "iterations": 21, "residual": 1e-13}
    now = {"dU": {"value": -2.0e-06, "unit": "J"}, "dU_ideal_gas": {"value": -7.9e6, "unit": "J"},
           "states": {"a": {"T": {"value": 300.0 * (1 + 3e-9), "unit": "K"}}}, "iterations": 25, "residual": 4e-12}
    failing, info = compare(recorded, now, 1e-9)
    # round-off in dU (7.7 µJ beside 7.9 MJ) passes; T off by 3e-9 relative fails; the iteration count is a note
    assert [d.path for d in failing] == ["states.a.T"]
    assert [d.path for d in info] == ["iterations", "residual"]
    assert compare(recorded, now, 1e-8)[0] == []


def test_numbers_in_text_are_compared_at_printed_precision():
    assert same_text("ΔU = 5.73695e-09 kJ", "ΔU = 3.1e-09 kJ", 1e-9) is False
    assert same_text("ΔU = 12413 × -3479.96 - (-4.31966e+07) = 5.73695e-09 kJ",
                     "ΔU = 12413 × -3479.96 - (-4.31966e+07) = 3.1e-09 kJ", 1e-9)
    assert same_text("T = 262.388 K", "T = 262.389 K", 1e-9)  # one unit in the 6th digit: rounding
    assert not same_text("T = 262.388 K", "T = 262.398 K", 1e-9)
    assert not same_text("phase gas", "phase liquid", 1e-9)


def test_the_command_line_states_the_same_default_tolerance():
    from tui import record_cli

    assert record_cli.DEFAULT_TOLERANCE == DEFAULT_TOLERANCE


def test_replay_on_the_command_line(tmp_path, capsys):
    rec = new_record(tmp_path)
    assert main(["record", "replay", str(rec.path)]) == 0
    assert "entry 8 (solve): reproduced" in capsys.readouterr().out
    data = rec.path.read_bytes().replace(b'residual = ', b'residual = 1.0 #', 1)
    (tmp_path / "f.record").write_bytes(reseal(data))
    assert main(["record", "replay", str(tmp_path / "f.record")]) == 1
    assert "residual" in capsys.readouterr().out
    with pytest.raises(SystemExit) as stop:  # argparse refuses it, as for any bad option
        main(["record", "replay", str(rec.path), "--tolerance", "-1"])
    assert stop.value.code == 2 and "expected a relative tolerance" in capsys.readouterr().err
