"""`check` applies every per-field rule `solve` applies, and `api.problems` lists every field at
fault, each with its field; the app's per-field checks (tui.fields) apply the same rules.

Facts: absolute zero is 0 K = -273.15 degC, a perfect vacuum is 0 Pa absolute, a gauge reading
is absolute minus atmospheric, a quality lies between 0 and 1 (the definitions; common
practice, no source).
"""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from balance import api
from balance.worksheet import FieldProblem
from tests.helpers import sheet
from tui import fields

BASE = """
[worksheet]
atmosphere = "{atm}"
[fluid]
species = "N2"
model = "peng-robinson"
[[initial]]
name = "tank"
T = "{T1}"
P = "{P1}"
V = "1 m3"
[final]
{final}
[[heat]]
name = "jacket"
Q = "?"
T_boundary = "{Tb}"
[process]
constraints = [{constraints}]
"""


def ws(atm="1.01325 bar", T1="300 K", P1="10 bar", final='T = "350 K"', Tb="400 K", constraints='"rigid"'):
    return sheet(BASE.format(atm=atm, T1=T1, P1=P1, final=final, Tb=Tb, constraints=constraints))


def test_the_base_worksheet_is_ready_and_has_no_problem():
    assert api.check(ws()).ready and api.problems(ws()) == ()


@pytest.mark.parametrize("final, field, words", [
    ('T = "0 K"', "final.T", "must be above absolute zero (0 K, -273.15 degC); got '0 K'"),
    ('T = "-5 K"', "final.T", "must be above absolute zero"),
    ('T = "-300 degC"', "final.T", "which is -26.85 K"),
    ('T = "?"\nP = "0 bar"', "final.P", "must be an absolute pressure above zero (a vacuum)"),
    ('T = "?"\nP = "-1 bar"', "final.P", "must be an absolute pressure above zero (a vacuum)"),
    ('T = "?"\nP = "-2 barg"', "final.P", "is at or below vacuum: '-2 barg' is -0.98675 bar absolute"),
    ('T = "?"\nv = "-1 m3/kg"', "final.v", "must be a positive volume"),
])
def test_check_refuses_what_solve_would_refuse_naming_the_field(final, field, words):
    check = api.check(ws(final=final))  # each of these was 'ready to solve', then refused by solve
    assert not check.ready and check.error_field == field and words in check.message
    found = api.problems(ws(final=final))
    assert [(p.field, p.part, p.key) for p in found] == [(field, "final", field.split(".")[1])]
    assert words in found[0].message


def test_a_given_final_state_that_a_constraint_contradicts_is_named_at_its_field():
    bad = ws(final='T = "350 K"\nP = "?"', constraints='"isothermal"')
    check = api.check(bad)
    assert check.error_field == "final.T"
    assert "T is given as 350 K but isothermal makes it 300 K: remove one" in check.message
    assert api.problems(bad) == (FieldProblem("final.T", "T is given as 350 K but isothermal makes it 300 K: "
                                                         "remove one", "final", None, "T"),)


@pytest.mark.parametrize("atm", ["-149 bar", "-200 bar", "0 bar", "1 barg"])
def test_the_atmosphere_is_refused_naming_itself(atm):
    # -149 bar made '150 barg' read as 1 bar; -200 bar was blamed on the compartment's P
    check = api.check(ws(atm=atm, P1="150 barg"))
    assert check.error_field == "worksheet.atmosphere"
    assert [p.field for p in api.problems(ws(atm=atm, P1="150 barg"))] == ["worksheet.atmosphere"]


def test_every_field_at_fault_is_listed_in_order_with_its_place():
    text = BASE.format(atm="-149 bar", T1="0 K", P1="1,5 bar", final='T = "-300 degC"\nP = "abc"', Tb="-5 K",
                       constraints='"polytropic"') + 'n = "1e9"\ndKE = "x"\n'
    found = api.problems(sheet(text))
    assert [(p.field, p.part, p.index, p.key) for p in found] == [
        ("worksheet.atmosphere", "worksheet", None, "atmosphere"),
        ("initial 'tank'.T", "initial", 0, "T"),
        ("initial 'tank'.P", "initial", 0, "P"),
        ("final.T", "final", None, "T"),
        ("final.P", "final", None, "P"),
        ("heat 'jacket'.T_boundary", "heat", 0, "T_boundary"),
        ("process.n", "process", None, "n"),
        ("process.dKE", "process", None, "dKE"),
    ]
    assert str(found[2]) == ("initial 'tank'.P: has a comma in its number; write a decimal point and no "
                             "thousands separators, like '35 bar'; got '1,5 bar'")
    # the example matches the field: a pressure's is a pressure
    assert "like '35 bar'; got 'abc'" in found[4].message


def test_a_structural_problem_is_listed_after_the_fields_when_no_field_accounts_for_it():
    text = BASE.format(atm="1.01325 bar", T1="300 K", P1="10 bar", final='T = "350 K"\nP = "?"', Tb="abc",
                       constraints='"isothermal"')
    assert [p.field for p in api.problems(sheet(text))] == ["heat 'jacket'.T_boundary", "final.T"]


def test_a_text_that_is_not_a_worksheet_is_one_problem_of_the_whole():
    (only,) = api.problems("[fluid\nspecies = ")
    assert only.part == "" and only.message.startswith("is not valid TOML")
    (kind,) = api.problems('[system]\nkind = "open"\n')
    assert (kind.field, kind.part, kind.key) == ("system.kind", "system", "kind")


@pytest.mark.parametrize("kind, text, words", [
    ("T", "0 K", "must be above absolute zero"),
    ("P", "-2 barg", "is at or below vacuum"),
    ("x", "1.5", "between 0 and 1"),
    ("n", "-1 mol", "must be positive; got '-1 mol'"),
    ("V", "0 L", "must be positive; got '0 L'"),
    ("pressure", "-149 bar", "must be an absolute pressure above zero"),   # the atmosphere's field
    ("pressure", "1 barg", "must be an absolute pressure, not a gauge reading"),
    ("temperature", "-5 K", "must be above absolute zero"),                # a boundary temperature
    ("dimensionless", "1e9", "expected a polytropic exponent from 0"),    # the polytropic n
    ("energy", "1,5 kJ", "has a comma in its number"),
    ("P", "500 K", "must be a pressure (like '35 bar')"),
])
def test_the_apps_field_checks_apply_the_rules_of_the_solve(kind, text, words):
    message = fields.problem(kind, text, "the field")
    assert message is not None and message.startswith("the field") and words in message


# -- the property: 'ready to solve' is never refused by solve for a field's value -------------------------
VALUES = {
    "T": ["300 K", "0 K", "-5 K", "-300 degC", "25 C", "1e308 K", "abc", "?", "1,5 K", "nan K"],
    "P": ["10 bar", "0 bar", "-1 bar", "-2 barg", "5 barg", "1e-400 bar", "1 10**10**10*bar", "500 K", "?"],
    "atm": ["1.01325 bar", "-149 bar", "-200 bar", "0.9 bar", "1 barg", "x"],
    "Tb": ["400 K", "-5 K", "0 K", "1e308 degC", "hot"],
}


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(T1=st.sampled_from(VALUES["T"][:7]), P1=st.sampled_from(VALUES["P"][:7]), T2=st.sampled_from(VALUES["T"]),
       P2=st.sampled_from(VALUES["P"]), atm=st.sampled_from(VALUES["atm"]), Tb=st.sampled_from(VALUES["Tb"]),
       constraints=st.sampled_from(['"rigid"', '"isothermal"', '"isobaric"', '"rigid", "reversible"']))
def test_check_is_ready_only_for_what_solve_accepts(T1, P1, T2, P2, atm, Tb, constraints):
    sheet_ = ws(atm=atm, T1=T1, P1=P1, final=f'T = "{T2}"\nP = "{P2}"', Tb=Tb, constraints=constraints)
    check = api.check(sheet_)
    found = api.problems(sheet_)
    assert (not found) == (not check.error), (check.message, found)
    if check.error:
        assert check.error_field in {p.field for p in found}
    if check.ready:
        attempt = api.attempt(sheet_)
        assert attempt.error_kind not in ("InputError",) and not attempt.error_kind.startswith("numerical"), \
            attempt.message


def test_joulebook_check_names_every_field_at_fault(tmp_path, capsys):
    from tui.cli import main

    path = tmp_path / "bad.toml"
    path.write_text(BASE.format(atm="-149 bar", T1="0 K", P1="1,5 bar", final='T = "-300 degC"', Tb="400 K",
                                constraints='"rigid"'), encoding="utf-8")
    assert main(["check", str(path)]) == 2
    assert capsys.readouterr().err.splitlines() == [
        "joulebook: worksheet.atmosphere: must be an absolute pressure above zero (a vacuum); got '-149 bar'",
        "joulebook: initial 'tank'.T: must be above absolute zero (0 K, -273.15 degC); got '0 K'",
        "joulebook: initial 'tank'.P: has a comma in its number; write a decimal point and no thousands "
        "separators, like '35 bar'; got '1,5 bar'",
        "joulebook: final.T: must be above absolute zero (0 K, -273.15 degC); got '-300 degC', which is -26.85 K",
    ]
