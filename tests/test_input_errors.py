"""Bad input gets a clear message naming the field, never a traceback.

Facts checked here are the product's own contract (common practice, no
source): wrong dimensions, non-physical values, unknown names, under- and
over-specified worksheets, and a wet state asked of a cubic.
"""

from __future__ import annotations

import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from balance import api
from balance.errors import InputError, SpecificationError, TwoPhaseError
from balance.units import parse
from balance.worksheet import HeatTerm
from tests.helpers import ROOT, WET_WATER_PR, sheet

BASE = """
[fluid]
species = "N2"
model = "peng-robinson"
[[initial]]
name = "start"
T = "{T1}"
P = "{P1}"
V = "1 m3"
[final]
{final}
[process]
constraints = [{constraints}]
"""


def ws(T1="300 K", P1="10 bar", final='T = "?"', constraints='"rigid", "adiabatic"'):
    return sheet(BASE.format(T1=T1, P1=P1, final=final, constraints=constraints))


@pytest.mark.parametrize(
    "text, dimension, expected",
    [
        ("500 K", "pressure", "P1 must be a pressure"),
        ("35 bar", "temperature", "P1 must be a temperature"),
        ("hot", "temperature", "expected a number and a unit"),
        ("500", "temperature", "with a unit"),
        ("2 kg", "volume", "must be a volume"),
    ],
)
def test_wrong_dimension_names_field(text, dimension, expected):
    with pytest.raises(InputError) as err:
        parse(text, dimension, "P1")
    assert str(err.value).replace(":", "", 1).startswith("P1")
    assert expected.split(" ", 1)[1] in str(err.value)


def test_offset_temperatures_are_temperatures_not_differences():
    # 20 degC is 293.15 K; 68 degF is 293.15 K (definition of the scales).
    assert parse("20 degC", "temperature", "T") == pytest.approx(293.15)
    assert parse("68 degF", "temperature", "T") == pytest.approx(293.15)
    # gauge pressure adds the atmosphere given (default 1.01325 bar, the standard atmosphere)
    assert parse("3.2 barg", "pressure", "P") == pytest.approx(421325.0)
    assert parse("150 psig", "pressure", "P") == pytest.approx(150 * 6894.757293168 + 101325.0)
    assert parse("1 barg", "pressure", "P", p_atm=0.95e5) == pytest.approx(1.95e5)


@pytest.mark.parametrize(
    "kwargs, field",
    [
        (dict(T1="-5 K"), "initial 'start'.T"),
        (dict(T1="-300 degC"), "initial 'start'.T"),
        (dict(P1="0 bar"), "initial 'start'.P"),
        (dict(P1="-2 bar"), "initial 'start'.P"),
    ],
)
def test_non_physical_values(kwargs, field):
    with pytest.raises(InputError) as err:
        api.prepare(ws(**kwargs))
    assert err.value.field == field


def test_unknown_species_suggests():
    with pytest.raises(InputError, match="unknown species 'nitrogn'") as err:
        api.prepare(sheet(BASE.format(T1="300 K", P1="1 bar", final="", constraints="").replace('"N2"', '"nitrogn"')))
    assert err.value.field == "fluid.species"


def test_unknown_model():
    with pytest.raises(InputError, match="unknown model 'pengrobinson'"):
        api.prepare(sheet(BASE.format(T1="300 K", P1="1 bar", final="", constraints="").replace('"peng-robinson"', '"pengrobinson"')))


def test_under_specified_says_what_to_give():
    heated = ws(constraints='"rigid"').with_(heat=(HeatTerm("heater", "?", "400 K"),))
    p = api.prepare(heated)
    assert not p.dof.ok
    assert p.dof.message.startswith("2 unknowns, 1 equation: give 1 more value")
    assert "T2" in p.dof.message and "P2" in p.dof.message and "Q 'heater'" in p.dof.message
    with pytest.raises(SpecificationError, match="give 1 more value"):
        api.solve(heated)


def test_over_specified_final_state():
    with pytest.raises(SpecificationError, match="over-specified"):
        api.prepare(ws(final='T = "280 K"\nP = "5 bar"', constraints='"rigid", "adiabatic"'))


def test_over_specified_equations():
    p = api.prepare(ws(final='T = "280 K"', constraints='"rigid", "adiabatic"'))
    assert p.dof.message.startswith("0 unknowns, 1 equation: over-specified")


def test_two_phase_state_with_a_cubic_is_refused_with_advice():
    text = WET_WATER_PR + """
[final]
T = "?"
[process]
constraints = ["rigid", "adiabatic"]
"""
    with pytest.raises(TwoPhaseError, match="reference model"):
        api.prepare(sheet(text))


def test_unknown_key_is_named():
    with pytest.raises(InputError) as err:
        sheet("[final]\nTemp = '300 K'\n")
    assert err.value.field == "final.Temp"


def test_bad_toml_is_reported():
    with pytest.raises(InputError, match="not valid TOML"):
        sheet("[final\nT = 1")


def run_cli(*args, stdin=None):
    return subprocess.run([sys.executable, "-m", "tui.cli", *args], capture_output=True, text=True,
                          cwd=ROOT, timeout=300)


def test_cli_exit_codes_and_no_traceback(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(BASE.format(T1="300 K", P1="500 K", final='T = "?"', constraints='"rigid", "adiabatic"'))
    out = run_cli("solve", str(bad))
    assert out.returncode == 2
    assert "initial 'start'.P: must be a pressure" in out.stderr and "Traceback" not in out.stderr

    impossible = tmp_path / "impossible.toml"
    impossible.write_text("""
[fluid]
species = "N2"
model = "ideal-gas"
[[initial]]
T = "300 K"
P = "1 bar"
n = "1 mol"
[final]
T = "400 K"
[[heat]]
name = "reservoir"
Q = "?"
T_boundary = "320 K"
[process]
constraints = ["rigid"]
""")
    out = run_cli("solve", str(impossible))
    assert out.returncode == 1
    assert "impossible process" in out.stderr and "Traceback" not in out.stderr

    out = run_cli("solve", str(tmp_path / "missing.toml"))
    assert out.returncode == 2 and "cannot be read" in out.stderr

    out = run_cli("state", "N2", "--model", "pr", "--given", "T=300 K")
    assert out.returncode == 2 and "exactly two" in out.stderr


def test_blank_heat_value_is_not_turned_into_an_unknown():
    # Regression: a blank Q written out and read back must stay blank (an error
    # to fix), not become '?' (an unknown the solver would silently solve for).
    from balance.worksheet import Worksheet

    heated = ws(constraints='"rigid"').with_(heat=(HeatTerm("heater", "", "400 K"),))
    again = Worksheet.from_toml(heated.to_toml())
    assert again.heat[0].Q == ""
    with pytest.raises(InputError) as err:
        api.prepare(again)
    assert err.value.field == "heat 'heater'.Q"


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=30), st.sampled_from(["temperature", "pressure", "volume", "energy", "molar_volume"]))
def test_any_typed_text_is_a_value_or_a_clear_error(text, dimension):
    # Fuzz (hypothesis): whatever is typed, parse returns a float or raises InputError naming the field.
    try:
        value = parse(text, dimension, "field")
    except InputError as exc:
        assert exc.field == "field"
    else:
        assert isinstance(value, float)


def test_terms_need_distinct_names():
    # Regression: two heat terms with one name shared a single unknown.
    twins = ws(constraints='"rigid"').with_(heat=(HeatTerm("jacket", "?", "400 K"), HeatTerm("jacket", "5 kJ", "400 K")))
    with pytest.raises(InputError, match="two heat terms are named 'jacket'"):
        api.prepare(twins)
