"""Round-off is not shown as a result: a computed energy or entropy within the precision the
balances are solved to (1e-9 of their scale) is shown as 0 and said to be round-off, in the
explanation, the record's text and the command line's tables; the data keep the computed value.

The zeros themselves are laws, not joulebook's numbers: a rigid, adiabatic vessel with no work
has ΔU = Q + W = 0 (first law); a reversible adiabatic stroke has ΔS = 0, and an isothermal
reversible compression that rejects its heat at the gas's own temperature has S_gen = 0 (second
law; common practice, no source). Records written before round-off was recorded are kept under
tests/records/ as they were filed (the golden records of the commit before): they must still
verify and replay.
"""

from __future__ import annotations

import io
from pathlib import Path

import pytest
from rich.console import Console

from balance import api
from balance.record import Record
from balance.record.solve_text import energy_rows, entropy_rows
from tests.helpers import sample
from tui.render import result_renderable

RECORDS = Path(__file__).resolve().parent / "records"


def line(r, start: str) -> str:
    (found,) = [e for e in r.equations if e.startswith(start)]
    return found


def cli_text(r, units: str = "metric") -> str:
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(result_renderable(r, units))
    return out.getvalue()


def row(rows, label: str) -> list[str]:
    (found,) = [r for r in rows if r[0] == label]
    return found


@pytest.fixture(scope="module")
def demo():
    return api.solve(sample("n2-buffer-into-receiver.toml"))


@pytest.fixture(scope="module")
def stroke():
    return api.solve(sample("air-test-cylinder-reversible.toml"))


@pytest.fixture(scope="module")
def isothermal():
    return api.solve(sample("methane-piston-isothermal.toml"))


def test_a_rigid_adiabatic_vessel_shows_du_as_zero_and_keeps_the_computed_value(demo):
    assert demo.dU != 0 and abs(demo.dU) < 1e-9 * demo.round_off.energy  # round-off, kept as computed
    assert line(demo, "ΔU = n u2").endswith("= 0 kJ (round-off)")
    assert "First law: ΔU = Q + W:  0 kJ (round-off) = 0 kJ + 0 kJ" in demo.equations
    rule = demo.equations[-1]
    assert rule.startswith("Round-off: a computed energy smaller than 1e-9 × 30255.1 kJ")
    assert "the data keep the computed values" in rule
    data = api.as_json(demo)
    assert data["dU"]["value"] == demo.dU  # the data: the number as computed
    assert data["round_off"]["energy"] == {"value": demo.round_off.energy, "unit": "J"}
    # n R T at the initial state is the largest energy scale here: 12413 mol x R x 293.15 K
    assert demo.round_off.energy == pytest.approx(demo.n * 8.314462618 * 293.15, rel=1e-12)


def test_the_ideal_gas_and_departure_parts_are_not_round_off(demo):
    # they are 7.9 MJ each and cancel: neither is shown as 0
    assert "ideal-gas part Σ n (u_ig(T2) - u_ig(T1)) = -7942.64 kJ" in line(demo, "  ideal-gas part")


def test_a_reversible_stroke_shows_its_entropy_changes_as_zero(stroke):
    assert stroke.S_gen != 0 and stroke.dS_system != 0
    assert line(stroke, "ΔS_system").endswith("= 0 J/K (round-off)")
    assert line(stroke, "S_gen") == "S_gen = ΔS_system + ΔS_surroundings = 0 J/K (reversible by constraint; round-off)"
    assert "n R)" not in line(stroke, "S_gen")  # no ratio of round-off to n R


def test_a_reversible_isothermal_compression_shows_no_negative_entropy_generation(isothermal):
    assert isothermal.S_gen < 0  # -5.8e-11 J/K: round-off of 46 J/K flowing out with the heat
    assert line(isothermal, "S_gen") == ("S_gen = ΔS_system + ΔS_surroundings = 0 J/K "
                                         "(reversible to the precision of the calculation; round-off)")
    assert "-5.79" not in " ".join(isothermal.equations)


def test_a_real_result_is_never_shown_as_round_off():
    r = api.solve(sample("steam-kettle-wet.toml"))
    assert not any("round-off" in e for e in r.equations)
    assert "S_gen = ΔS_system + ΔS_surroundings = 39.5203 J/K (0.3624 n R)" in r.equations


def test_the_record_tables_show_zero_and_say_round_off(demo, stroke):
    data = api.entry_data(api.attempt(sample("n2-buffer-into-receiver.toml")))
    headers, rows = energy_rows(data)
    assert row(rows, "ΔU")[2:] == ["0", "n u2 - Σ n u1; round-off"]
    assert row(rows, "W boundary")[2:] == ["0", "none: the boundary is rigid"]  # 0 by its path, not round-off
    data = api.as_json(stroke)
    headers, rows = entropy_rows(data)
    assert headers == ["term", "kJ/K", ""]
    assert row(rows, "ΔS system") == ["ΔS system", "0", "round-off"]
    assert row(rows, "ΔS surroundings") == ["ΔS surroundings", "0", ""]
    assert row(rows, "S_gen") == ["S_gen", "0", "round-off"]


def test_the_command_line_tables_show_zero_and_say_round_off(isothermal):
    text = cli_text(isothermal, "us")
    (sgen,) = [ln for ln in text.splitlines() if ln.strip().startswith("S_gen ")]
    assert sgen.split() == ["S_gen", "0", "round-off"]
    tables = [ln for ln in text.split("Equations with numbers")[0].splitlines() if "residual" not in ln]
    assert not any("e-1" in ln for ln in tables)  # no round-off printed as a number


@pytest.mark.parametrize("name", ["n2-buffer-into-receiver", "air-test-cylinder-reversible"])
def test_a_record_written_before_round_off_was_recorded_verifies_and_replays(name):
    rec = Record.load(RECORDS / f"wording-1-{name}.jbk")
    assert rec.verify().ok  # its text is still the rendering of its data
    report = rec.replay()
    assert report.ok, report.lines()
    (solve,) = report.solves
    assert solve.status == "reproduced"
    assert [d.path for d in solve.notes if d.path == "wording"] == ["wording"]
    assert any("worded otherwise: not compared word for word" in ln for ln in report.lines())


def test_a_changed_number_in_an_old_record_still_fails_replay(tmp_path):
    from tests.test_record_signing import reseal

    old = (RECORDS / "wording-1-n2-buffer-into-receiver.jbk").read_bytes()
    forged = old.replace(b'S_gen = { value = 139368.', b'S_gen = { value = 139000.')
    assert forged != old
    (tmp_path / "forged.jbk").write_bytes(reseal(forged))
    report = Record.load(tmp_path / "forged.jbk").replay()
    assert not report.ok and [d.path for d in report.solves[0].differences] == ["S_gen"]
