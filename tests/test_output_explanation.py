"""The explanation reads as an engineer writes it: no ``- -``, no line that says nothing, every
solved term in the headline.

The numbers checked are closed forms of the ideal gas (common practice, no source): an
isothermal compression of n mol at T from P1 to P2 takes W = n R T ln(P2/P1) of work on the gas
and rejects Q = -W (ΔU = 0), with S_gen = 0 when the heat leaves at T.
"""

from __future__ import annotations

import io
import math
import re

import pytest
from rich.console import Console

from balance import api
from tests.helpers import sample, sheet
from tests.test_record_support import sample_names
from tui.render import headline, result_renderable

#: The molar gas constant [J/(mol K)], CODATA 2018 (exact since the 2019 SI).
R = 8.314462618

ISOTHERMAL = """
[fluid]
species = "N2"
model = "ideal-gas"
[[initial]]
name = "open"
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
name = "squeezed"
P = "10 bar"
[[heat]]
name = "wall"
Q = "?"
T_boundary = "300 K"
[process]
constraints = ["isothermal"]
"""

#: A number written right after an operator with its own minus sign: "- -3", "+ -3", "× -3".
DOUBLE_SIGN = re.compile(r"[-+×] -\d")


def cli_text(r, units: str = "metric") -> str:
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(result_renderable(r, units))
    return out.getvalue()


@pytest.fixture(scope="module")
def isothermal():
    return api.solve(sheet(ISOTHERMAL))


@pytest.mark.parametrize("name", sample_names())
def test_no_sample_writes_a_sign_after_an_operator(name):
    r = api.solve(sample(name))
    assert not [e for e in r.equations if DOUBLE_SIGN.search(e)]
    assert not any(e.startswith("Mass:") for e in r.equations)  # "n2" read as nitrogen


def test_the_isothermal_work_subtracts_a_negative_helmholtz_energy_as_a_sum(isothermal):
    first, final = isothermal.initial[0].point, isothermal.final.point
    assert first.a < 0 < final.a  # a1 negative: once written "(a2 - -a1)"
    (line,) = [e for e in isothermal.equations if e.startswith("Boundary work")]
    assert f"1 × ({final.a:.6g} + {-first.a:.6g})" in line
    W = 1.0 * R * 300.0 * math.log(10.0)  # closed form, 5743.4 J
    assert line.endswith(f"= {W / 1e3:.6g} kJ")
    assert line.startswith("Boundary work (isothermal, reversible), on the system:")


def test_the_entropy_lines_write_each_sign_once(isothermal):
    (dS,) = [e for e in isothermal.equations if e.startswith("ΔS_system")]
    s2, s1 = isothermal.final.point.s, isothermal.initial[0].point.s
    assert s2 < 0 and f"1 × ({s2:.6g})" in dS  # a negative factor in parentheses
    (surr,) = [e for e in isothermal.equations if e.startswith("ΔS_surroundings")]
    Q = -1.0 * R * 300.0 * math.log(10.0)  # heat leaves the gas
    assert surr == f"ΔS_surroundings = -Σ Q/T_boundary = {-Q:.6g}/300 = {-Q / 300:.6g} J/K"


def test_one_compartment_has_no_amount_line_and_two_name_theirs():
    r = api.solve(sample("n2-buffer-into-receiver.toml"))
    assert not any(e.startswith("Amount") for e in r.equations)
    assert any(e.startswith("State V-101:") and e.endswith("n = 12413 mol") for e in r.equations)
    r = api.solve(sample("argon-membrane-rupture.toml"))
    (line,) = [e for e in r.equations if e.startswith("Amount")]
    assert line == "Amount: n = n(chamber A) + n(chamber B) = 334.559 + 20.6305 = 355.19 mol"


def test_no_heat_term_says_so_instead_of_minus_zero():
    r = api.solve(sample("n2-buffer-into-receiver.toml"))
    assert "ΔS_surroundings = 0 J/K (no heat crosses the boundary)" in r.equations
    assert not any("-(0)" in e for e in r.equations)


def test_boundary_work_in_the_work_by_convention_is_said_both_ways():
    r = api.solve(sample("n2-accumulator-polytropic.toml"))
    (line,) = [e for e in r.equations if e.startswith("Boundary work")]
    assert "on the system: W_b = (P2 V2 - P1 V1)/(n - 1)" in line
    assert line.endswith("= 64.7867 kJ; done by the system: -64.7867 kJ")
    assert "First law: ΔU = Q - W:  15.9243 kJ = -48.8624 kJ - (-64.7867 kJ)" in r.equations


def test_one_evaluation_is_singular():
    r = api.solve(sample("co2-cylinder-hot-store.toml"))
    assert r.equations[-1].endswith("; 1 balance evaluation")


def test_the_headline_shows_every_solved_term(isothermal):
    W = 1.0 * R * 300.0 * math.log(10.0) / 1e3  # kJ, closed form
    text = headline(isothermal, "metric")
    assert text == (f"squeezed: T = 26.85 °C, P = 10 bar(a); Q 'wall' = {-W:.5g} kJ; "
                    f"W boundary (isothermal) = {W:.5g} kJ; S_gen = 0 (reversible)")
    assert headline(isothermal, "us").startswith("squeezed: T = 80.33 °F, P = 145.04 psia; Q 'wall' = -5.4437 Btu")
    assert ("Result: " + text) in cli_text(isothermal)


def test_the_headline_leaves_out_a_rigid_boundary_and_shows_a_solved_amount():
    r = api.solve(sample("n2-buffer-into-receiver.toml"))
    assert headline(r, "metric") == "settled: T = -10.762 °C, P = 32.984 bar(a); S_gen = 139.4 kJ/K"
    amount = ISOTHERMAL.replace('n = "1 mol"', 'n = "?"').replace('Q = "?"', f'Q = "-{R * 300 * math.log(10):.6f} J"')
    r = api.solve(sheet(amount))
    assert r.n == pytest.approx(1.0, rel=1e-6)
    assert "; n = 0.001 kmol" in headline(r, "metric")
    assert "Amount: n = 1 mol, solved from the balances" in r.equations


def test_the_record_says_each_thing_once():
    from balance.record.solve_text import solve_text

    data = api.as_json(api.solve(sample("steam-kettle-wet.toml")))
    text = solve_text(data)
    assert text.count("Sign convention:") == 1  # the explanation's first law line says its form
    assert text.count(data["reference_state"].split(";")[0]) == 1  # in the explanation's model line
    assert text.count(data["method"]) == 1  # in the explanation's solver line
    assert "Species H2O, model reference\n" in text
    (w,) = [ln for ln in text.splitlines() if ln.split()[:3] == ["W", "boundary", "rigid"]]
    assert w.split()[3:] == ["0", "none:", "the", "boundary", "is", "rigid"]


def test_a_quality_row_only_where_a_state_has_one():
    from balance.record.solve_text import solve_text

    demo = api.solve(sample("n2-buffer-into-receiver.toml"))
    assert not any(ln.split()[:1] == ["x"] for ln in solve_text(api.as_json(demo)).splitlines())
    assert not any(ln.split()[:1] == ["x"] for ln in cli_text(demo).splitlines())
    kettle = api.solve(sample("steam-kettle-wet.toml"))
    assert any(ln.split()[:3] == ["x", "0.05", "0.259292"] for ln in cli_text(kettle).splitlines())


def test_the_command_line_says_where_heat_crosses_and_that_a_rigid_boundary_does_no_work():
    text = cli_text(api.solve(sample("steam-kettle-wet.toml")), "us")
    (q,) = [ln for ln in text.splitlines() if ln.split()[:2] == ["Q", "jacket"]]
    # 150 kJ = 142.173 Btu (1 Btu_IT = 1055.056 J, pint), 180 °C = 356 °F
    assert q.split()[2:] == ["142.173", "given,", "crosses", "at", "356", "°F"]
    (w,) = [ln for ln in text.splitlines() if ln.split()[:3] == ["W", "boundary", "rigid"]]
    assert w.split()[3:] == ["0", "none:", "the", "boundary", "is", "rigid"]
    (cp,) = [ln for ln in text.splitlines() if ln.split()[:1] == ["cp"]]
    assert cp.split()[2:] == ["∞", "∞"]  # a wet state's cp, not 'inf'
    assert "inf" not in text.split("Equations with numbers")[0]
