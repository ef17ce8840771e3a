"""The record of a steady-flow worksheet: filed, verified, replayed, compared, reported and signed as a closed one is.

A record is made from the letdown-skid sample (methane heated ahead of a
pressure-reducing valve) and from a compressor bench written here (an
invented scenario). Outside checks: the standard-volume rate against the
ideal-gas molar volume at DIN 1343 normal conditions (0 °C, 1.01325 bar:
22.413 969 L/mol, CODATA 2018 R); the heater duty against CoolProp 8.0's own
Peng-Robinson backend computed here; a changed isentropic efficiency against
its published definition, η_s = (h_2s - h_1)/(h_2 - h_1), which makes the
compressor's power inversely proportional to η_s at a fixed end pressure.
The rest is joulebook's record contract (README, "The record": a broken
chain is BROKEN, signatures by OpenSSH ssh-keygen(1); common practice, no source).
"""

from __future__ import annotations

import re

import pytest

from balance.errors import InputError
from balance.record import Record, diff, diff_records, export_html, export_markdown
from balance.record.format import parse
from balance.worksheet import Worksheet
from tests.helpers import sample
from tests.test_record_signing import reseal
from tests.test_record_support import Clock, allowed_signers, keygen, new_record
from tui.cli import main

LETDOWN = "gas-letdown-preheated.toml"
ALICE, BOB = "alice@example.com", "bob@example.com"
#: The molar gas constant [J/(mol K)], CODATA 2018 (exact since the 2019 SI).
R = 8.314462618

#: A compressor bench of our own: nitrogen from 1 barg to 6 barg at 200 Nm3/h, then an aftercooler.
BENCH = """
[worksheet]
title = "Test bench TB-3: nitrogen compressor K-1 and its aftercooler"
purpose = "Stage power and aftercooler duty"

[fluid]
species = "N2"
model = "peng-robinson"

[system]
kind = "steady-flow"
inside = "compressor K-1 and aftercooler E-1"

[[stream]]
name = "suction"
T = "20 degC"
P = "1 barg"
rate = "200 Nm3/h"

[[stream]]
name = "discharge"
P = "6 barg"

[[stream]]
name = "cooled"
T = "30 degC"

[[device]]
name = "K-1"
kind = "compressor"
inlets = ["suction"]
outlets = ["discharge"]
eta = "0.75"

[[device]]
name = "E-1"
kind = "cooler"
inlets = ["discharge"]
outlets = ["cooled"]
Q = "?"
T_boundary = "25 degC"
"""


def _q(d: dict, key: str) -> float:
    return d[key]["value"]


@pytest.fixture()
def letdown(tmp_path) -> Record:
    return new_record(tmp_path, LETDOWN)


@pytest.fixture()
def bench(tmp_path) -> Record:
    return Record.create(tmp_path / "bench.jbk", author="a.preparer", worksheet=Worksheet.from_toml(BENCH),
                         clock=Clock())


# -- filed as steps and a solve ------------------------------------------------------------------
def test_each_section_of_the_kind_is_a_step_and_the_worksheet_comes_back_equal(letdown):
    kinds = [e.kind for e in letdown.entries]
    # the kind's sections only: a steady-flow worksheet has no compartments or final state to file
    assert kinds == ["opening", "purpose and basis", "system boundary", "fluid and model", "streams", "devices",
                     "solve"]
    assert letdown.worksheet() == sample(LETDOWN)
    again = Record.load(letdown.path)
    assert again.worksheet() == sample(LETDOWN)
    streams = again.entries[4]
    assert [s["name"] for s in streams.data["stream"]] == ["pipeline", "heated", "header"]
    assert "stream 1 'pipeline'" in streams.text and "rate  2500 Nm3/h" in streams.text
    devices = again.entries[5]
    assert "device 2 'PCV-201'" in devices.text and "Q        ?  (unknown: to be solved)" in devices.text


def test_the_record_verifies_intact_and_its_solve_reproduces(letdown):
    raw = letdown.path.read_bytes()
    assert parse(raw, "calc.jbk").entries == parse(raw, "calc.jbk", line_by_line=True).entries  # both readers
    v = Record.load(letdown.path).verify()
    assert v.chain_ok and not v.problems and v.lines()[-1] == "verdict: intact"
    report = letdown.replay()
    assert report.ok and [s.status for s in report.solves] == ["reproduced"]
    assert report.lines()[-1] == "All recorded results reproduce."


def test_replay_names_a_device_whose_recorded_duty_is_not_what_the_inputs_give(letdown):
    data = dict(letdown.last_solve().data)
    devices = {k: dict(v) for k, v in data["devices"].items()}
    devices["E-201"]["Q_dot"] = {"value": _q(devices["E-201"], "Q_dot") * 1.01, "unit": "W"}
    letdown.note("the heater duty as read off the vendor's sheet")
    letdown.append_solve(data={**data, "devices": devices})
    report = letdown.replay()
    assert not report.ok and report.solves[-1].status == "differs"
    assert [d.path for d in report.solves[-1].differences] == ["devices.E-201.Q_dot"]


def test_the_solve_text_shows_streams_devices_residuals_and_T0(letdown):
    solve = letdown.last_solve()
    text, d = solve.text, solve.data
    n = _q(d["streams"]["pipeline"], "n_dot")
    # 2500 Nm3/h at DIN 1343 normal conditions: n = P V / (R T) of an ideal gas at 0 °C, 1.01325 bar
    assert n == pytest.approx(2500 / 3600 * 101325 / (R * 273.15), rel=1e-12)
    M = _q(d["streams"]["pipeline"], "m_dot") / n
    h = _q(d["streams"]["pipeline"], "h") / M / 1e3
    # the stream table per kg, in °C and bar(a); the device table in kW; the check per device
    assert re.search(rf"pipeline +8 +71\.0132 +{h:.6g} ", text)
    assert re.search(r"E-201 +heater +50\.88\d* +0 ", text)
    assert re.search(r"PCV-201 +valve +0 +0 +— +0\.53\d* +158\.\d+", text)
    assert re.search(r"PCV-201 +\d\.\de[-+]\d\d +\d\.\de[-+]\d\d +yes +≥ 0", text)
    words = " ".join(text.replace("|", " ").split())  # the text's lines wrap at 96 columns
    assert "T0 = 25 °C (298.15 K)" in words  # the temperature the exergy destroyed is reckoned at
    assert "E-201 at no stated temperature" in words  # why the network's Ṡ_gen is not evaluated
    assert "Units (fixed, whatever the display): T in °C, P in bar(a)" in words
    assert "rate read as standard volume: normal m3 at 0 °C and 1.01325 bar (DIN 1343)" in words
    assert "Apply the codes that govern your equipment" in words
    assert "Pressures up to 71.01 bar(a) occur" in words


def test_the_heater_duty_agrees_with_coolprops_peng_robinson(letdown):
    CP = pytest.importorskip("CoolProp.CoolProp")
    d = letdown.last_solve().data
    st = CP.AbstractState("PR", "Methane")  # CoolProp 8.0's cubic backend
    st.specify_phase(CP.iphase_supercritical_gas)
    P = 70e5 + 101325.0
    st.update(CP.PT_INPUTS, P, 281.15)
    h1 = st.hmolar()
    st.update(CP.PT_INPUTS, P, 318.15)
    h2 = st.hmolar()
    Q = _q(d["streams"]["pipeline"], "n_dot") * (h2 - h1)
    # 0.2 %: the two PR implementations take their ideal-gas cp from different fits (NASA polynomials
    # here, CoolProp's reference equation's ideal part); measured 0.04 % apart
    assert _q(d["devices"]["E-201"], "Q_dot") == pytest.approx(Q, rel=2e-3)


# -- tamper, sign ---------------------------------------------------------------------------------
def test_a_stream_line_changed_after_filing_breaks_the_chain(letdown, capsys):
    raw = letdown.path.read_bytes()
    assert raw.count(b': T = "8 degC"') == 1
    letdown.path.write_bytes(raw.replace(b': T = "8 degC"', b': T = "9 degC"'))
    v = Record.load(letdown.path).verify()
    assert not v.chain_ok and v.broken_seq == 5  # the streams entry
    assert "BROKEN at entry 5" in v.lines()[-1] and "does not match its sha256 seal" in v.lines()[-1]
    assert main(["record", "verify", str(letdown.path)]) == 1
    assert "broken at entry 5" in capsys.readouterr().err
    assert not Record.load(letdown.path).replay().ok


def test_a_resealed_solve_of_an_unknown_kind_is_refused_naming_its_line(letdown):
    raw = letdown.path.read_bytes()
    at = raw.rindex(b': kind = "steady-flow"')  # the solve's, after the system boundary's
    forged = reseal(raw[:at] + b': kind = "semi-open"' + raw[at + len(b': kind = "steady-flow"'):])
    with pytest.raises(InputError, match="unknown kind of balance 'semi-open'"):
        parse(forged, "calc.jbk")


def test_signed_off_with_ssh_keys_and_verified(letdown, tmp_path):
    keys = {ALICE: keygen(tmp_path, "alice"), BOB: keygen(tmp_path, "bob")}
    allowed = allowed_signers(tmp_path, keys)
    letdown.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    letdown.sign("checked", key_path=keys[BOB], signer=BOB, author="b.checker")
    v = Record.load(letdown.path).verify(allowed)
    assert v.ok and [s.status for s in v.signoffs] == ["valid", "valid"]
    assert v.lines()[-1] == "verdict: intact, all signatures valid"
    forged = allowed_signers(tmp_path, {ALICE: keys[BOB], BOB: keys[ALICE]}, "swapped")
    assert not Record.load(letdown.path).verify(forged).ok


# -- diff, export ----------------------------------------------------------------------------------
def test_diff_names_the_device_whose_efficiency_changed(bench):
    first = bench.last_solve()
    devices = bench.worksheet().to_dict()["device"]
    devices[0]["eta"] = "0.8"
    bench.note("K-1 re-rated by its vendor")
    bench.append_step("device", devices)
    second = bench.append_solve()
    lines = diff(bench, first.seq, second.seq).lines()
    assert "  device 'K-1'.eta: was '0.75', now '0.8'" in lines
    assert any(line.startswith("  devices.K-1.W_dot: was ") for line in lines)
    assert any(line.startswith("  streams.discharge.T: was ") for line in lines)
    assert not any("E-1.T_boundary" in line for line in lines)
    # the published definition: W = ṅ (h_2s - h_1) / η_s, the isentropic end state unchanged
    W1, W2 = (_q(e.data["devices"]["K-1"], "W_dot") for e in (first, second))
    assert W2 / W1 == pytest.approx(0.75 / 0.8, rel=1e-9)


def test_diff_between_a_record_and_its_variant_filed_apart(bench, tmp_path, capsys):
    variant = Record.create(tmp_path / "variant.jbk", author="a.preparer",
                            worksheet=Worksheet.from_toml(BENCH.replace('eta = "0.75"', 'eta = "0.8"')),
                            clock=Clock())
    d = diff_records(bench, variant)
    assert d.from_solve == d.to_solve == 7  # one number, two solves: compared all the same
    lines = d.lines()
    assert lines[0] == "From bench.jbk, entry 7 (revision 1), to variant.jbk, entry 7 (revision 1)"
    assert "  device 'K-1'.eta: was '0.75', now '0.8'" in lines
    assert any(line.startswith("  devices.K-1.W_dot: was ") for line in lines)
    assert main(["record", "diff", str(bench.path), "--against", str(variant.path)]) == 0
    assert "device 'K-1'.eta: was '0.75', now '0.8'" in capsys.readouterr().out
    assert main(["record", "diff", str(bench.path), "--against", str(bench.path)]) == 0
    out = capsys.readouterr().out
    assert "Inputs:\n  no change" in out and out.rstrip().endswith("no change")
    assert main(["record", "diff", str(bench.path)]) == 2  # neither --from nor --against
    assert "--from" in capsys.readouterr().err


def test_the_report_holds_the_stream_and_device_tables(letdown):
    md = export_markdown(letdown)
    assert "### Streams\n\n| stream | T °C | P bar(a) | h kJ/kg | s kJ/(kg·K) | phase |" in md
    assert re.search(r"\| pipeline \| 8 \| 71\.0132 \| -128\.\d+ \| -2\.\d+ \| supercritical \|", md)
    assert "### Stream rates" in md and "| header | 0.497049 | 30.9827 |" in md
    assert "### Devices\n\n| device | kind | Q̇ kW | Ẇ on kW | η | Ṡ\\_gen kW/K | T0·Ṡ\\_gen kW |" in md
    assert re.search(r"\| E-201 \| heater \| 50\.88\d* \| 0 \| — \| — \| — \|", md)
    assert "### Each device's balances, recomputed from its flows" in md
    assert "T0 = 25 °C (298.15 K)" in md and "Apply the codes that govern your equipment" in md
    page = export_html(letdown)
    assert "<h3>Devices</h3>" in page and "<td>PCV-201</td>" in page and "<h3>Streams</h3>" in page


# -- the command line ------------------------------------------------------------------------------
def test_the_record_commands_on_a_steady_flow_worksheet(tmp_path, capsys):
    ws = tmp_path / "bench.toml"
    ws.write_text(BENCH, encoding="utf-8")
    rec = str(tmp_path / "bench.jbk")
    assert main(["record", "import", str(ws), rec]) == 0
    assert "new record, 7 entries" in capsys.readouterr().out
    assert main(["record", "show", rec]) == 0
    out = capsys.readouterr().out
    assert "Stream rates" in out and "K-1" in out and "isentropic end state T_2s" in out
    assert main(["record", "worksheet", rec]) == 0
    toml = capsys.readouterr().out
    assert "[final]" not in toml and "initial" not in toml  # a steady-flow worksheet has neither
    assert Worksheet.from_toml(toml) == Worksheet.from_toml(BENCH)
    ws.write_text(BENCH.replace('eta = "0.75"', 'eta = "0.8"'), encoding="utf-8")
    assert main(["record", "update", rec, str(ws), "--note", "K-1 re-rated"]) == 0
    out = capsys.readouterr().out
    assert "entry 8 (revision note)" in out and "entry 9 (devices)" in out and "entry 10 (solve)" in out
    assert "final state" not in out
    assert main(["record", "diff", rec, "--from", "7"]) == 0
    out = capsys.readouterr().out
    assert "device 'K-1'.eta: was '0.75', now '0.8'" in out
    assert main(["record", "replay", rec]) == 0
    assert "All recorded results reproduce." in capsys.readouterr().out
    report = tmp_path / "bench.md"
    assert main(["record", "export", rec, "--format", "md", "-o", str(report)]) == 0
    assert "### Devices" in report.read_text(encoding="utf-8")


def test_a_network_that_cannot_be_solved_is_recorded_as_failed(tmp_path):
    ws = Worksheet.from_toml(BENCH.replace('T = "30 degC"\n', ""))  # the aftercooler's outlet not given
    rec = Record.create(tmp_path / "open.jbk", author="a.preparer", worksheet=ws, clock=Clock())
    solve = rec.last_solve()
    assert "error" in solve.data and solve.text.startswith("Solve failed (inputs as of entry 6)")
    assert "E-1" in solve.data["error"]
    assert rec.verify().chain_ok and rec.replay().solves[0].status == "failed as recorded"
