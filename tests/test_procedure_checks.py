"""House procedures applied to solved samples: acceptance checks, model rules, deviations, required fields.

The procedures are written here, small, one rule or a few at a time (an invented lab rig's);
the samples are solved once each (none on the reference model). The outcomes expected are
joulebook's contract (README, "House procedures"; common practice, no source); the values a
check reads are compared with what the worksheet typed and with closed forms, each named
beside its check.
"""

from __future__ import annotations

import dataclasses
import functools
from pathlib import Path

import pytest

from balance import api
from balance.procedures import blocking, findings, parse, value_of
from balance.worksheet import Worksheet
from tests.helpers import SAMPLES

R = 8.314462618  # J/(mol K), CODATA 2018
P_ATM = 101325.0  # Pa, the standard atmosphere (the samples' gauge readings)

#: an argon pot warmed in its rigid vessel, ideal gas: the heat has a closed form (invented scenario)
ARGON_POT = """
[worksheet]
title = "Argon pot warmed on the lab rig"
job = "LAB-T-01"
basis = "the argon in the pot"
[fluid]
species = "Ar"
model = "ideal-gas"
[system]
kind = "closed"
inside = "the argon in the pot"
[[initial]]
name = "cold"
T = "20 degC"
P = "5 bar"
V = "0.1 m3"
[final]
name = "warm"
T = "80 degC"
P = "?"
[[heat]]
name = "from the jacket"
Q = "?"
T_boundary = "90 degC"
[process]
constraints = ["rigid"]
"""


@pytest.fixture(autouse=True)
def _no_user_config(monkeypatch, tmp_path):
    monkeypatch.setenv("JOULEBOOK_CONFIG", str(tmp_path / "no-such-config.toml"))
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(tmp_path / "no-procedures-here"))


@functools.cache
def _solve(source: str) -> tuple[Worksheet, dict]:
    ws = Worksheet.from_toml(source) if "\n" in source else api.read(SAMPLES / source)
    return ws, api.entry_data(api.attempt(ws))


def solved(source: str) -> tuple[Worksheet, dict]:
    """The worksheet (a sample's file name, or TOML text) and its solve entry's data, solved once."""
    return _solve(source)


def procedure(*tables: str, kinds=("closed",)):
    """A small procedure of the lab rig with these rule tables (TOML)."""
    head = (f'[procedure]\nid = "lab-test"\ntitle = "Lab rig test rules"\nversion = "1"\n'
            f'owner = "Lab rig safety team"\nkinds = {list(kinds)!r}\n'.replace("'", '"'))
    return parse(head + "\n".join(tables), "lab-test.toml")


def check(rule_id: str, quantity: str, compare: str, limit: str, severity: str = "stop", extra: str = "") -> str:
    limit = limit if limit[0].isdigit() and " " not in limit else f'"{limit}"'
    return (f'[[check]]\nid = "{rule_id}"\nquantity = "{quantity}"\ncompare = "{compare}"\nlimit = {limit}\n'
            f'severity = "{severity}"\nmessage = "lab rig rule {rule_id}"\n{extra}\n')


def model_rule(rule_id: str, allowed, condition: str = "", severity: str = "stop") -> str:
    return (f'[[model_rule]]\nid = "{rule_id}"\nallowed = {list(allowed)!r}\n{condition}\n'
            f'text = "lab rig model rule {rule_id}"\nseverity = "{severity}"\n').replace("'", '"')


def with_heading(ws: Worksheet, **changes) -> Worksheet:
    return dataclasses.replace(ws, heading=dataclasses.replace(ws.heading, **changes))


def only(found, rule: str):
    mine = [f for f in found if f.rule == rule]
    assert len(mine) == 1, [f.line() for f in found]
    return mine[0]


# -- the quantities, against the worksheet's own inputs and closed forms ----------------------------
def test_closed_quantities_are_the_states_extremes():
    _, data = solved("n2-buffer-into-receiver.toml")
    states = data["states"]
    Ts = [s["T"]["value"] for s in states.values() if s.get("T")]
    Ps = [s["P"]["value"] for s in states.values() if s.get("P")]
    assert value_of("T_min", data) == min(Ts) == states["settled"]["T"]["value"]
    assert value_of("T_max", data) == max(Ts)
    # the typed inputs: V-101 at 20 degC and 150 barg (gauge + the standard atmosphere)
    assert value_of("T_max", data) == pytest.approx(293.15, abs=1e-9)
    assert value_of("P_max", data) == pytest.approx(150e5 + P_ATM, rel=1e-12)
    assert value_of("P_min", data) == min(Ps) == states["settled"]["P"]["value"]
    # the settled state: about -10.8 degC (the sample's stated result, tests/test_record_review.py: 262.388 K)
    assert value_of("T_min", data) - 273.15 == pytest.approx(-10.76, abs=0.01)
    assert value_of("residual", data) == abs(data["residual"]) < 1e-9
    assert value_of("S_gen", data) == data["S_gen"]["value"] > 0  # a free expansion generates entropy
    # quantities of other kinds: none in a closed result
    for name in ("t_end", "mass_moved", "Q_dot_max", "S_gen_rate"):
        assert value_of(name, data) is None


def test_the_highest_pressure_of_a_rupture_is_the_charged_chamber():
    _, data = solved("argon-membrane-rupture.toml")
    assert value_of("P_max", data) == pytest.approx(80e5, rel=1e-12)  # chamber A, typed 80 bar
    assert value_of("T_max", data) == pytest.approx(350.0, rel=1e-12)  # chamber B, typed 350 K
    assert value_of("T_min", data) == min(s["T"]["value"] for s in data["states"].values())


def test_the_heat_of_an_ideal_gas_warmed_rigid_is_n_cv_dT():
    """Q = n cv (T2 - T1) for a rigid ideal gas, cv = 3/2 R for a monatomic gas and n = P V / (R T)
    (common practice, no source): 5 bar, 0.1 m3, 20 degC to 80 degC."""
    _, data = solved(ARGON_POT)
    n = 5e5 * 0.1 / (R * 293.15)
    Q = n * 1.5 * R * (353.15 - 293.15)
    assert Q == pytest.approx(15350.5, abs=0.1)
    assert value_of("Q_total", data) == pytest.approx(Q, rel=1e-9)
    assert value_of("W_total", data) == 0.0  # rigid: no boundary work
    # and the final pressure of a rigid ideal gas: P2 = P1 T2 / T1 (Gay-Lussac; common practice)
    assert value_of("P_max", data) == pytest.approx(5e5 * 353.15 / 293.15, rel=1e-9)
    p = procedure(check("heat-budget", "Q_total", "<=", "15 kJ"), check("heat-known", "Q_total", ">", "15.3 kJ"))
    found = findings(p, *solved(ARGON_POT))
    assert only(found, "heat-budget").outcome == "stop"
    assert only(found, "heat-known").outcome == "pass"


def test_a_reversible_process_reads_zero_entropy_generated():
    """The reversible stroke solves to S_gen round-off: read as 0, so 'at least 0' holds and
    'above 0' does not (second law: S_gen = 0 for a reversible process; common practice)."""
    ws, data = solved("air-test-cylinder-reversible.toml")
    assert abs(data["S_gen"]["value"]) < 1e-12
    assert value_of("S_gen", data) == 0.0
    found = findings(procedure(check("second-law", "S_gen", ">=", "0 J/K"),
                               check("irreversible", "S_gen", ">", "0 J/K", severity="warn")), ws, data)
    assert only(found, "second-law").outcome == "pass"
    assert only(found, "irreversible").outcome == "warn"


def test_steady_flow_quantities_are_the_streams_and_devices():
    _, data = solved("gas-letdown-preheated.toml")
    streams = data["streams"]
    # the pipeline stream, typed 70 barg, is the highest; the header, typed 7 barg, the lowest
    assert value_of("P_max", data) == max(s["P"]["value"] for s in streams.values())
    assert value_of("P_max", data) == pytest.approx(70e5 + P_ATM, rel=1e-12)
    assert value_of("P_min", data) == pytest.approx(7e5 + P_ATM, rel=1e-12)
    assert value_of("T_min", data) == pytest.approx(273.15 + 8, abs=1e-9)  # the pipeline gas, typed 8 degC
    assert value_of("T_max", data) == pytest.approx(273.15 + 45, abs=1e-9)  # after the heater, typed 45 degC
    # the heater duty, and the first law of steady flow: Q = n_dot (h_out - h_in) (common practice, no source)
    heater = data["devices"]["E-201"]
    duty = streams["pipeline"]["n_dot"]["value"] * (streams["heated"]["h"]["value"] - streams["pipeline"]["h"]["value"])
    assert value_of("Q_dot_max", data) == heater["Q_dot"]["value"] == pytest.approx(duty, rel=1e-9)
    assert value_of("W_dot_max", data) == 0.0  # a heater and a valve: no shaft
    for name in ("S_gen", "Q_total", "t_end"):
        assert value_of(name, data) is None


def test_transient_quantities_are_over_the_history():
    ws, data = solved("n2-receivers-equalise.toml")
    history = data["history"]
    # R-41 typed at 60 barg: the highest pressure is where it starts; R-42, 5 barg, the lowest
    assert value_of("P_max", data) == pytest.approx(60e5 + P_ATM, rel=1e-12)
    assert value_of("P_min", data) == pytest.approx(5e5 + P_ATM, rel=1e-12)
    # the gas in R-41 cools as it empties and R-42's warms as it fills
    assert value_of("T_min", data) < 293.15 < value_of("T_max", data)
    assert value_of("T_min", data) <= min(history["rows"]["R-41 T [K]"])
    assert value_of("T_max", data) >= max(history["rows"]["R-42 T [K]"])
    # the mass through the line is what R-41 lost (mass conservation; common practice, no source)
    lost = history["rows"]["R-41 m [kg]"][0] - history["rows"]["R-41 m [kg]"][-1]
    assert value_of("mass_moved", data) == pytest.approx(lost, rel=1e-9)
    assert value_of("t_end", data) == history["t_end"]["value"] > 0
    assert value_of("T_wall_min", data) is None  # adiabatic vessels: no wall model
    assert value_of("Q_total", data) is None
    found = findings(procedure(check("quick", "t_end", "<=", "10 min"), check("dmmt", "T_min", ">=", "-29 degC"),
                               check("closure", "residual", "<=", "1e-6"), kinds=("transient",)), ws, data)
    assert [(f.rule, f.outcome) for f in found] == [("quick", "pass"), ("dmmt", "pass"), ("closure", "pass")]


# -- acceptance checks: pass and fail --------------------------------------------------------
def test_a_temperature_limit_passes_and_a_tighter_one_stops():
    ws, data = solved("n2-buffer-into-receiver.toml")
    found = findings(procedure(check("dmmt", "T_min", ">=", "-29 degC"), check("no-frost", "T_min", ">=", "0 degC")),
                     ws, data)
    dmmt, frost = only(found, "dmmt"), only(found, "no-frost")
    assert dmmt.outcome == "pass" and dmmt.kind == "check" and dmmt.step == "results"
    assert frost.outcome == "stop" and frost.blocks
    assert frost.message == "lab rig rule no-frost: T_min = 262.39 K (-10.76 °C), must be at least 0 degC"
    assert frost.line().startswith("STOP      no-frost: ")
    assert blocking(found) == [frost]
    # the limit in kelvin, and just either side of the result
    T = value_of("T_min", data)
    assert only(findings(procedure(check("k", "T_min", ">=", f"{T - 0.01} K")), ws, data), "k").outcome == "pass"
    assert only(findings(procedure(check("k", "T_min", ">=", f"{T + 0.01} K")), ws, data), "k").outcome == "stop"


def test_every_comparison_holds_as_written():
    ws, data = solved("argon-membrane-rupture.toml")  # P_max 80 bar, typed
    below, above = "79.9 bar", "8.01 MPa"  # either side of it, in two units
    p = procedure(check("ge-below", "P_max", ">=", below), check("gt-below", "P_max", ">", below),
                  check("le-below", "P_max", "<=", below), check("lt-below", "P_max", "<", below),
                  check("ge-above", "P_max", ">=", above), check("gt-above", "P_max", ">", above),
                  check("le-above", "P_max", "<=", above), check("lt-above", "P_max", "<", above))
    outcomes = {f.rule: f.outcome for f in findings(p, ws, data)}
    assert outcomes == {"ge-below": "pass", "gt-below": "pass", "le-below": "stop", "lt-below": "stop",
                        "ge-above": "stop", "gt-above": "stop", "le-above": "pass", "lt-above": "pass"}


def test_the_second_law_and_closure_pass_on_every_fast_sample():
    p = procedure(check("second-law", "S_gen", ">=", "0 J/K"), check("closure", "residual", "<=", "1e-6"))
    for name in ("n2-buffer-into-receiver.toml", "argon-membrane-rupture.toml", "air-test-cylinder-reversible.toml"):
        found = findings(p, *solved(name))
        assert [(f.rule, f.outcome) for f in found] == [("second-law", "pass"), ("closure", "pass")], name


def test_a_pressure_limit_fails_on_a_high_pressure_sample():
    ws, data = solved("n2-buffer-into-receiver.toml")
    found = findings(procedure(check("rating", "P_max", "<=", "100 barg")), ws, data)
    rating = only(found, "rating")
    assert rating.outcome == "stop"
    # a gauge limit is also said absolute, as the value is: 100 barg = 101.01 bar(a), shown to 4 digits
    assert rating.message == ("lab rig rule rating: P_max = 151 bar(a), must be at most 100 barg (101 bar(a))")
    assert only(findings(procedure(check("rating", "P_max", "<=", "160 barg")), ws, data), "rating").outcome == "pass"


def test_warn_severity_warns_and_stop_severity_stops():
    ws, data = solved("n2-buffer-into-receiver.toml")
    found = findings(procedure(check("a", "P_max", "<=", "100 barg", severity="warn"),
                               check("b", "P_max", "<=", "100 barg", severity="stop")), ws, data)
    a, b = only(found, "a"), only(found, "b")
    assert (a.outcome, a.blocks) == ("warn", False) and a.line().startswith("WARN      a: ")
    assert (b.outcome, b.blocks) == ("stop", True)


def test_a_steady_flow_check_on_the_letdown():
    ws, data = solved("gas-letdown-preheated.toml")
    p = procedure(check("outlet-above-freezing", "T_min", ">=", "0 degC"),
                  check("heater-rating", "Q_dot_max", "<=", "40 kW"),
                  check("pipeline-rating", "P_max", "<=", "100 barg"), kinds=("steady-flow",))
    found = findings(p, ws, data)
    assert [(f.rule, f.outcome) for f in found] == [("outlet-above-freezing", "pass"), ("heater-rating", "stop"),
                                                    ("pipeline-rating", "pass")]
    assert "Q_dot_max = 5.088e+04 W" in only(found, "heater-rating").message


def test_a_quantity_the_kind_does_not_have_is_skipped():
    """A procedure for two kinds: a check of a steady-flow quantity is not applied to a closed
    worksheet, nor a check narrowed to steady flow; the closed one is."""
    ws, data = solved("n2-buffer-into-receiver.toml")
    p = procedure(check("heater-rating", "Q_dot_max", "<=", "40 kW"),
                  check("flow-only", "T_min", ">=", "0 degC", extra='kinds = ["steady-flow"]'),
                  check("dmmt", "T_min", ">=", "-29 degC"), kinds=("closed", "steady-flow"))
    assert [(f.rule, f.outcome) for f in findings(p, ws, data)] == [("dmmt", "pass")]
    assert [f.rule for f in findings(p, ws, None)] == ["dmmt"]


def test_a_quantity_the_result_lacks_is_said_not_passed():
    """The letdown's heater has no boundary temperature: its entropy generated, and so the
    total, is not known; a check on the total says so at its severity rather than passing."""
    ws, data = solved("gas-letdown-preheated.toml")
    assert value_of("S_gen_rate", data) is None
    found = findings(procedure(check("second-law", "S_gen_rate", ">=", "0 W/K", severity="warn"),
                               kinds=("steady-flow",)), ws, data)
    f = only(found, "second-law")
    assert f.outcome == "warn" and f.message == "lab rig rule second-law (this result has no S_gen_rate)"


def test_unsolved_checks_are_not_applicable():
    ws, _ = solved("n2-buffer-into-receiver.toml")
    found = findings(procedure(check("no-frost", "T_min", ">=", "0 degC")), ws, None)
    f = only(found, "no-frost")
    assert (f.outcome, f.blocks) == ("n/a", False)
    assert f.message == "lab rig rule no-frost (not solved yet)" and f.line().startswith("n/a       no-frost: ")


def test_a_failed_solve_stops_its_checks():
    ws, _ = solved("n2-buffer-into-receiver.toml")
    found = findings(procedure(check("no-frost", "T_min", ">=", "0 degC")), ws, {"error": "did not converge"})
    f = only(found, "no-frost")
    assert f.outcome == "stop" and "(the solve failed)" in f.message


# -- model rules ---------------------------------------------------------------------------
def test_a_cubic_at_80_bar_outside_the_allowed_models_stops():
    ws, data = solved("argon-membrane-rupture.toml")  # Redlich-Kwong, chamber A at 80 bar
    p = procedure(model_rule("real-gas", ["reference", "peng-robinson"], 'P_above = "50 bar"'))
    f = only(findings(p, ws, data), "real-gas")
    assert (f.kind, f.outcome, f.step) == ("model", "stop", "fluid")
    assert f.message == ("lab rig model rule real-gas (the highest pressure 80 bar(a) is above 50 bar(a); "
                         "fluid.model is redlich-kwong)")
    # before the solve, the pressures typed say the same
    assert only(findings(p, ws, None), "real-gas").outcome == "stop"


def test_a_model_rule_whose_pressure_is_not_reached_does_not_apply():
    ws, data = solved("argon-membrane-rupture.toml")
    p = procedure(model_rule("real-gas", ["reference", "peng-robinson"], 'P_above = "100 bar"'))
    f = only(findings(p, ws, data), "real-gas")
    assert (f.outcome, f.blocks) == ("n/a", False) and "its conditions do not hold" in f.message
    assert only(findings(p, ws, None), "real-gas").outcome == "n/a"


def test_an_allowed_model_passes_and_a_rule_without_conditions_always_applies():
    ws, data = solved("n2-buffer-into-receiver.toml")  # Peng-Robinson at 151 bar
    p = procedure(model_rule("real-gas", ["reference", "pr"], 'P_above = "50 bar"'),
                  model_rule("reference-only", ["reference"], "", severity="warn"))
    found = findings(p, ws, data)
    assert only(found, "real-gas").outcome == "pass"
    always = only(found, "reference-only")
    assert always.outcome == "warn" and "(always; fluid.model is peng-robinson)" in always.message


def test_a_reduced_temperature_condition():
    """Argon: Tc = 150.687 K (CoolProp 6, Argon); the settled rupture at about 278 K is Tr 1.84."""
    ws, data = solved("argon-membrane-rupture.toml")
    assert value_of("T_min", data) / 150.687 == pytest.approx(1.844, abs=0.001)
    cold = procedure(model_rule("near-critical", ["reference"], "Tr_below = 2.0"))
    f = only(findings(cold, ws, data), "near-critical")
    assert f.outcome == "stop" and "the lowest reduced temperature T/Tc 1.84 is below 2" in f.message
    warm = procedure(model_rule("near-critical", ["reference"], "Tr_below = 1.5"))
    assert only(findings(warm, ws, data), "near-critical").outcome == "n/a"
    # either condition is enough: the pressure one holds here though the temperature one does not
    either = procedure(model_rule("either", ["reference"], 'Tr_below = 1.5\nP_above = "50 bar"'))
    assert only(findings(either, ws, data), "either").outcome == "stop"


# -- deviations --------------------------------------------------------------------------
def test_a_justified_deviation_neither_stops_nor_is_hidden():
    ws, data = solved("n2-buffer-into-receiver.toml")
    p = procedure(check("no-frost", "T_min", ">=", "0 degC"))
    why = "The receiver's steel is rated to -40 degC; see the lab rig's vessel file."
    f = only(findings(p, with_heading(ws, deviations={"no-frost": why}), data), "no-frost")
    assert f.outcome == "justified" and f.justification == why and not f.blocks
    assert f.line() == f"deviation no-frost: {f.message} — justified: {why}"
    assert "must be at least 0 degC" in f.message  # the failure is still said


def test_a_deviation_of_a_passing_rule_changes_nothing():
    ws, data = solved("n2-buffer-into-receiver.toml")
    p = procedure(check("dmmt", "T_min", ">=", "-29 degC"))
    f = only(findings(p, with_heading(ws, deviations={"dmmt": "just in case"}), data), "dmmt")
    assert f.outcome == "pass" and f.justification == ""


def test_a_blank_justification_still_stops():
    ws, data = solved("n2-buffer-into-receiver.toml")
    p = procedure(check("no-frost", "T_min", ">=", "0 degC"))
    f = only(findings(p, with_heading(ws, deviations={"no-frost": "   "}), data), "no-frost")
    assert f.outcome == "stop" and f.blocks


def test_a_blank_justification_read_from_a_worksheet_file_still_stops():
    text = (SAMPLES / "n2-buffer-into-receiver.toml").read_text(encoding="utf-8")
    text = text.replace("[fluid]", '[worksheet.deviations]\nno-frost = ""\n\n[fluid]', 1)
    ws = Worksheet.from_toml(text)
    assert ws.heading.deviations == {"no-frost": ""}
    _, data = solved("n2-buffer-into-receiver.toml")
    f = only(findings(procedure(check("no-frost", "T_min", ">=", "0 degC")), ws, data), "no-frost")
    assert f.outcome == "stop"


def test_a_justified_model_rule():
    ws, data = solved("argon-membrane-rupture.toml")
    p = procedure(model_rule("real-gas", ["reference", "peng-robinson"], 'P_above = "50 bar"'))
    why = "Redlich-Kwong agrees with the reference model within 1 % here (lab rig note 7)."
    f = only(findings(p, with_heading(ws, deviations={"real-gas": why}), data), "real-gas")
    assert (f.outcome, f.justification) == ("justified", why)


def test_a_deviation_that_names_no_rule_warns():
    ws, data = solved("n2-buffer-into-receiver.toml")
    p = procedure(check("dmmt", "T_min", ">=", "-29 degC"))
    found = findings(p, with_heading(ws, deviations={"no-such-rule": "because"}), data)
    f = only(found, "no-such-rule")
    assert (f.kind, f.outcome, f.justification, f.blocks) == ("deviation", "warn", "because", False)
    assert f.message == "worksheet.deviations names 'no-such-rule', which is no rule of lab-test version 1"


# -- required fields --------------------------------------------------------------------
REQUIRED = '[step.purpose]\nrequired = ["worksheet.job", "worksheet.basis"]\n' \
           '[step.boundary]\nrequired = ["system.inside"]\n[step.terms]\nrequired = ["heat.T_boundary"]\n'


def test_required_fields_filled_pass():
    ws, data = solved(ARGON_POT)
    found = findings(procedure(REQUIRED), ws, data)
    assert [(f.rule, f.kind, f.outcome, f.step) for f in found] == [
        ("worksheet.job", "required", "pass", "purpose"), ("worksheet.basis", "required", "pass", "purpose"),
        ("system.inside", "required", "pass", "boundary"), ("heat.T_boundary", "required", "pass", "terms")]


def test_a_blank_required_field_stops():
    ws, data = solved(ARGON_POT)
    f = only(findings(procedure(REQUIRED), with_heading(ws, job=""), data), "worksheet.job")
    assert f.outcome == "stop" and f.message == "the house asks for a job or calculation number: worksheet.job is blank"
    # before a solve too: a required field needs no result
    assert only(findings(procedure(REQUIRED), with_heading(ws, job=""), None), "worksheet.job").outcome == "stop"
    # justified, it does not stop
    f = only(findings(procedure(REQUIRED), with_heading(ws, job="", deviations={"worksheet.job": "a lab trial"}),
                      data), "worksheet.job")
    assert f.outcome == "justified"


def test_a_blank_boundary_temperature_and_inside_stop():
    text = ARGON_POT.replace('T_boundary = "90 degC"\n', "").replace('inside = "the argon in the pot"\n', "")
    ws = Worksheet.from_toml(text)
    found = findings(procedure(REQUIRED), ws, None)
    assert only(found, "heat.T_boundary").outcome == "stop"
    assert only(found, "system.inside").outcome == "stop"
    assert only(found, "worksheet.job").outcome == "pass"


# -- `joulebook solve` of a worksheet that names a procedure ------------------------------------
def _named(tmp_path: Path, deviations: str = "") -> Path:
    text = (SAMPLES / "n2-buffer-into-receiver.toml").read_text(encoding="utf-8")
    text = text.replace('atmosphere = "1.01325 bar"\n', f'atmosphere = "1.01325 bar"\nprocedure = "lab-test"\n{deviations}', 1)
    path = tmp_path / "calc.toml"
    path.write_text(text, encoding="utf-8")
    return path


def _firm(tmp_path: Path, monkeypatch, *tables: str) -> None:
    folder = tmp_path / "firm"
    folder.mkdir()
    head = ('[procedure]\nid = "lab-test"\ntitle = "Lab rig test rules"\nversion = "1"\n'
            'owner = "Lab rig safety team"\nkinds = ["closed"]\n')
    (folder / "lab-test.toml").write_text(head + "\n".join(tables), encoding="utf-8")
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(folder))


def test_solve_exits_3_when_a_rule_stops_and_lists_the_findings(tmp_path, monkeypatch, capsys):
    import json

    from tui.cli import main

    _firm(tmp_path, monkeypatch, check("no-frost", "T_min", ">=", "0 degC"), check("dmmt", "T_min", ">=", "-29 degC"))
    assert main(["solve", str(_named(tmp_path)), "--json"]) == 3
    out = json.loads(capsys.readouterr().out)
    assert (out["house"]["procedure"], out["house"]["version"]) == ("lab-test", "1")
    assert [(f["rule"], f["outcome"]) for f in out["house"]["findings"]] == [("no-frost", "stop"), ("dmmt", "pass")]


def test_solve_exits_0_when_the_stop_is_justified(tmp_path, monkeypatch, capsys):
    import json

    from tui.cli import main

    _firm(tmp_path, monkeypatch, check("no-frost", "T_min", ">=", "0 degC"))
    path = _named(tmp_path, '\n[worksheet.deviations]\nno-frost = "V-102 is rated to -40 degC"\n')
    # atmosphere is the heading's last key in the sample: the table follows it
    text = path.read_text(encoding="utf-8")
    assert Worksheet.from_toml(text).heading.deviations == {"no-frost": "V-102 is rated to -40 degC"}
    assert main(["solve", str(path), "--json"]) == 0
    (f,) = json.loads(capsys.readouterr().out)["house"]["findings"]
    assert (f["outcome"], f["justification"]) == ("justified", "V-102 is rated to -40 degC")


def test_solve_of_a_worksheet_naming_a_missing_procedure_says_so(tmp_path, monkeypatch, capsys):
    from tui.cli import main

    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(tmp_path / "empty"))
    assert main(["solve", str(_named(tmp_path)), "--json"]) == 0
    err = capsys.readouterr().err
    assert "worksheet.procedure: 'lab-test' is not in the procedure folders" in err
