"""The record of a transient worksheet: filed, verified, replayed, compared, reported and signed as
the other kinds are.

Records are made from the hydrogen blowdown and the nitrogen equalisation samples (invented
scenarios). Outside check: the blowdown's end state against a CoolProp 8.0 HEOS (P, s) flash from
the tank's initial entropy, computed here (the gas left in an adiabatic tank expands reversibly).
The rest is joulebook's record contract (README, "The record"; common practice, no source).
"""

from __future__ import annotations

import pytest

from balance.record import Record, diff_records, export_html, export_markdown
from balance.record.format import parse
from balance.record.replay import HISTORY_TOLERANCE
from tests.helpers import sample
from tests.test_record_support import Clock, allowed_signers, keygen, new_record
from tui.cli import main

BLOWDOWN = "h2-buffer-blowdown.toml"
EQUALISE = "n2-receivers-equalise.toml"
ALICE, BOB = "alice@example.com", "bob@example.com"


@pytest.fixture()
def blowdown(tmp_path) -> Record:
    return new_record(tmp_path, BLOWDOWN)


def test_each_section_of_the_kind_is_a_step_and_the_worksheet_comes_back_equal(blowdown):
    kinds = [e.kind for e in blowdown.entries]
    assert kinds == ["opening", "purpose and basis", "system boundary", "fluid and model", "vessels", "lines",
                     "end condition", "solve"]
    again = Record.load(blowdown.path)
    assert again.worksheet() == sample(BLOWDOWN)
    vessels = again.entries[4]
    assert "vessel 1 'T-201'" in vessels.text and "V     0.5 m3" in vessels.text
    assert "line 1 'vent stack'" in again.entries[5].text and "orifice  6 mm" in again.entries[5].text


def test_the_record_verifies_and_its_solve_reproduces_within_the_stated_tolerance(blowdown):
    raw = blowdown.path.read_bytes()
    assert parse(raw, "calc.jbk").entries == parse(raw, "calc.jbk", line_by_line=True).entries
    v = Record.load(blowdown.path).verify()
    assert v.chain_ok and not v.problems and v.lines()[-1] == "verdict: intact"
    report = blowdown.replay()
    assert report.ok and [s.status for s in report.solves] == ["reproduced"]
    assert any(f"{HISTORY_TOLERANCE:g}" in line for line in report.lines())  # the history's tolerance, stated


def test_the_solve_text_keeps_the_settings_the_extremes_and_a_resampled_history(blowdown):
    import CoolProp.CoolProp as CP

    solve = blowdown.last_solve()
    words = " ".join(solve.text.replace("|", " ").split())
    assert "method LSODA, rtol 1e-08, 500 rows" in words
    assert "History, resampled (41 rows of the integrator's)" in words
    assert "T-201 T min" in words and "closes" in words
    # the end state: the gas left in the tank on the isentrope of its start (CoolProp HEOS (P, s) flash)
    s1 = CP.PropsSI("Smolar", "T", 298.15, "P", 30e5 + 101325.0, "Hydrogen")
    T2 = CP.PropsSI("T", "P", 1e5 + 101325.0, "Smolar", s1, "Hydrogen")
    e = solve.data["end_state"]["vessels"]["T-201"]
    assert e["T2"]["value"] == pytest.approx(T2, abs=1e-6)
    assert solve.data["history"]["extremes"]["T-201 T min"]["value"]["value"] == pytest.approx(T2, abs=0.01)


def test_replay_names_an_extreme_not_what_the_inputs_give(blowdown):
    data = dict(blowdown.last_solve().data)
    history = dict(data["history"])
    extremes = {k: dict(v) for k, v in history["extremes"].items()}
    cold = extremes["T-201 T min"]
    extremes["T-201 T min"] = {**cold, "value": {"value": cold["value"]["value"] + 0.5, "unit": "K"}}
    blowdown.note("the lowest temperature as read off the plot")
    blowdown.append_solve(data={**data, "history": {**history, "extremes": extremes}})
    report = blowdown.replay()
    assert not report.ok and report.solves[-1].status == "differs"
    assert [d.path for d in report.solves[-1].differences] == ["history.extremes.T-201 T min.value"]


def test_a_closure_above_its_limit_does_not_reproduce(blowdown):
    data = dict(blowdown.last_solve().data)
    history = dict(data["history"])
    vessels = {k: dict(v) for k, v in history["vessels"].items()}
    vessels["T-201"]["closure"] = 1e-3
    blowdown.note("a hand-edited closure")
    blowdown.append_solve(data={**data, "history": {**history, "vessels": vessels}})
    report = blowdown.replay()
    assert not report.ok
    assert any("must be below 1e-06" in d.line() for d in report.solves[-1].differences)


def test_two_records_of_a_case_and_its_variant_differ_by_the_vessel_by_name(tmp_path):
    a = new_record(tmp_path, EQUALISE, name="a.jbk")
    ws = sample(EQUALISE)
    vessels = list(ws.vessels)
    from dataclasses import replace

    vessels[1] = replace(vessels[1], V="1.5 m3")
    b = Record.create(tmp_path / "b.jbk", author="a.preparer", worksheet=ws.with_(vessels=tuple(vessels)),
                      clock=Clock())
    d = diff_records(a, b)
    text = "\n".join(d.lines())
    assert "vessel 'R-42'.V" in text and "1.5 m3" in text
    assert "vessel 'R-41'" not in text.replace("vessel 'R-41' T", "")  # the other vessel unchanged


def test_the_report_exports_both_levels(blowdown):
    md = export_markdown(blowdown)
    assert "End state without time" in md and "History in time" in md and "T-201 T min" in md
    html = export_html(blowdown)
    assert "<table" in html and "History in time" in html


def test_signed_off_with_ssh_keys_and_verified(blowdown, tmp_path, capsys):
    keys = {ALICE: keygen(tmp_path, "alice"), BOB: keygen(tmp_path, "bob")}
    allowed = allowed_signers(tmp_path, keys)
    blowdown.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    blowdown.sign("checked", key_path=keys[BOB], signer=BOB, author="b.checker")
    v = Record.load(blowdown.path).verify(allowed)
    assert v.ok and v.lines()[-1] == "verdict: intact, all signatures valid"
    assert main(["record", "replay", str(blowdown.path)]) == 0
    assert "All recorded results reproduce." in capsys.readouterr().out
