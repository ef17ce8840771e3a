"""The uncertainty of a result: the notation, the first-order budget, Monte Carlo, the faces.

What the numbers are checked against, each beside its check:

* closed forms of a closed rigid ideal-gas vessel with a constant cv (no work, so Q = ΔU):
  Q = n cv (T2 − T1), and with the amount from the gas law n = P V/(R T1),
  Q = P V cv (T2 − T1)/(R T1), whose partial derivatives are written out in the tests;
* JCGM 100:2008 (GUM), clause numbers from memory: 5.1.2 the law of propagation of
  uncertainty for uncorrelated inputs, u_c² = Σ (cᵢ u(xᵢ))²; 5.1.3 the sensitivity coefficients
  cᵢ = ∂f/∂xᵢ; 6.2.1 the expanded uncertainty U = k u_c and 6.3 the coverage factor k; 4.3.3 a
  quoted uncertainty that is a multiple k of a standard deviation gives u = U/k; 4.3.7 a
  rectangular distribution of half-width a gives u = a/√3; 4.3.9 a triangular one u = a/√6;
* JCGM 101:2008 (Monte Carlo), from memory: 7.6 the standard deviation of the output values is
  the standard uncertainty, 7.7 the probabilistically symmetric coverage interval;
* the standard error of a sample standard deviation of N draws from a normal distribution,
  σ/√(2(N − 1)) (the large-N sampling distribution of s; common statistics, no source).
"""

from __future__ import annotations

import json
import math
import re

import pytest

from balance import api
from balance.errors import InputError
from balance.record.replay import UNCERTAINTY_TOLERANCE, compare
from balance.study.paths import values_of, with_value
from balance.study.table import flatten
from balance.study.uncertainty import interval, monte_carlo, uncertain_inputs
from balance.units import _NUMBER, difference_scale, parse, split_uncertainty
from tests.helpers import SAMPLES, sample, sheet

#: Molar gas constant [J/(mol K)], CODATA 2018 (exact by the 2019 SI).
R = 8.314462618
SAMPLE = "n2-sample-cylinder-bath-uncertain.toml"
P_ATM = 101325.0


def vessel(T1: str, P: str, T2: str, amount: str, cv: str = "20.8 J/(mol K)") -> str:
    """A rigid closed vessel of nitrogen as an ideal gas with a constant cv, heated from T1 to T2."""
    return f"""
[fluid]
species = "N2"
model = "ideal-gas"
[fluid.overrides]
cv = "{cv}"
[[initial]]
name = "cold"
T = "{T1}"
P = "{P}"
{amount}
[final]
name = "hot"
T = "{T2}"
[[heat]]
name = "jacket"
Q = "?"
[process]
constraints = ["rigid"]
"""


Q = "terms.jacket.value [J]"


def budget(prop, column):
    return next(b for b in prop.budgets if b.column == column)


def line(b, path):
    return next(li for li in b.lines if li.input.path == path)


# -- the notation ------------------------------------------------------------------------------
@pytest.mark.parametrize("text, dimension, u_si", [
    ("150 barg ± 2 bar", "pressure", 2e5),              # a bar beside barg is a bar of difference
    ("150 barg +- 2 bar", "pressure", 2e5),             # +- for keyboards without ±
    ("20 degC ± 1 K", "temperature", 1.0),              # a difference of one kelvin ...
    ("20 degC ± 1 degC", "temperature", 1.0),           # ... is one of a degree Celsius
    ("68 degF ± 1.8 degF", "temperature", 1.0),         # 1.8 °F is 1 K (1 °F = 5/9 K, by definition)
    ("2 m3 ± 0.5 %", "volume", 0.01),                   # relative: 0.5 % of 2 m3
    ("300 K ± 0.6 K (rectangular)", "temperature", 0.6 / math.sqrt(3)),  # JCGM 100:2008 4.3.7: a/√3
    ("300 K ± 0.6 K (triangular)", "temperature", 0.6 / math.sqrt(6)),   # JCGM 100:2008 4.3.9: a/√6
    ("5 bar ± 4 kPa (k=2)", "pressure", 2000.0),        # JCGM 100:2008 4.3.3: U/k
    ("5 bar ± 4 kPa (normal)", "pressure", 4000.0),     # the default, said
    ("1.3 ± 0.05", "dimensionless", 0.05),
])
def test_the_notation_gives_the_standard_uncertainty(text, dimension, u_si):
    value_text, unc = split_uncertainty(text)
    assert parse(text, dimension, "f") == parse(value_text, dimension, "f")  # the value alone is read
    ws = sheet(f'[fluid]\nspecies = "N2"\nmodel = "ideal-gas"\n[[initial]]\nname = "a"\nP = "{text}"\n') \
        if dimension == "pressure" else None
    u_typed = unc.standard(value_text, "f")
    unit = _NUMBER.match(value_text).group(2)
    assert u_typed * difference_scale(unit)[0] == pytest.approx(u_si, rel=1e-12)
    if ws is not None:
        (inp,) = uncertain_inputs(ws)
        assert inp.u == pytest.approx(u_si, rel=1e-12) and inp.si_unit == "Pa"


@pytest.mark.parametrize("typed, words", [
    ('"300 K ± 1 bar"', "is a pressure difference, not of the dimension of '300 K'"),
    ('"300 K ± -1 K"', "an uncertainty is not negative"),
    ('"300 K ± 1 K (uniform)"', "distribution (uniform) is not one of (normal), (rectangular), (triangular)"),
    ('"300 K ± 1 K (k=0)"', "the coverage factor in (k=0) must be a number above 0"),
    ('"300 K ± 1"', "needs a unit beside '300 K'"),
    ('"300 K ± 1 K ± 2 K"', "give one uncertainty after one ±"),
    ('"300 K ± about 1 K"', "expected a number after ±"),
])
def test_a_bad_uncertainty_names_its_field(typed, words):
    text = vessel("300 K", "10 bar", "400 K", 'n = "2 mol"').replace('T = "300 K"', f"T = {typed}")
    with pytest.raises(InputError) as err:
        api.solve(sheet(text))
    assert err.value.field == "initial 'cold'.T" and words in err.value.message
    (problem,) = api.problems(sheet(text))  # the app's check lists it at the field, with the same words
    assert problem.field == "initial 'cold'.T" and words in problem.message


def test_an_amount_reads_its_dimension_from_the_value():
    # n takes an amount or a mass; the uncertainty must be of the value's
    assert api.read_field("n", "2 kg ± 0.1 kg", "n", M=0.028) == pytest.approx(2 / 0.028)
    with pytest.raises(InputError, match="the uncertainty '1 kg' is a mass"):
        api.read_field("n", "2 mol ± 1 kg", "n")


def _stripped(ws):
    """The worksheet with every uncertainty taken off its value."""
    for path, text in values_of(ws):
        value, unc = split_uncertainty(text)
        if unc is not None:
            ws = with_value(ws, path, value)
    return ws


@pytest.mark.parametrize("name", sorted(p.name for p in SAMPLES.glob("*.toml")))
def test_every_field_of_every_sample_takes_an_uncertainty_and_solves_as_before(name):
    # the nominal result is the result of the values alone, number for number
    from balance.kinds import KINDS

    ws = _stripped(sample(name))
    sections = KINDS[ws.system.kind].sections
    marked = ws
    for path, text in values_of(ws):
        if re.match(r"^\w+", path).group(0) in sections and re.match(r"^\s*[-+]?(?:\d|\.\d)", text):
            marked = with_value(marked, path, f"{text} ± 1 %")
    assert marked != ws
    plain, uncertain = api.attempt(ws), api.attempt(marked)
    assert plain.ok and uncertain.ok, uncertain.message
    assert flatten(api.as_json(uncertain.result)) == flatten(api.as_json(plain.result))


# -- first order (JCGM 100:2008) ---------------------------------------------------------------
def test_a_linear_case_propagates_as_its_closed_form():
    # Q = n cv (T2 − T1) (first law, rigid, no work; ideal gas with a constant cv) is linear in
    # n, T1 and T2, so the first order is exact: c_n = cv (T2 − T1), c_T1 = −n cv, c_T2 = n cv
    # (JCGM 100:2008 5.1.3), u_c² = Σ (cᵢ uᵢ)² (5.1.2)
    n, cv, T1, T2 = 2.0, 20.8, 300.0, 400.0
    u_n, u_T1, u_T2 = 0.02, 0.5, 0.4 / math.sqrt(3)  # the last rectangular, a = 0.4 K (4.3.7)
    ws = sheet(vessel("300 K ± 0.5 K", "10 bar", "400 K ± 0.4 K (rectangular)", 'n = "2 mol ± 0.02 mol"'))
    b = budget(api.uncertainty(ws), Q)
    assert b.value == pytest.approx(n * cv * (T2 - T1), rel=1e-9)
    assert line(b, "initial 'cold'.n").c == pytest.approx(cv * (T2 - T1), rel=1e-7)
    assert line(b, "initial 'cold'.T").c == pytest.approx(-n * cv, rel=1e-7)
    assert line(b, "final.T").c == pytest.approx(n * cv, rel=1e-7)
    closed = math.sqrt((cv * (T2 - T1) * u_n) ** 2 + (n * cv * u_T1) ** 2 + (n * cv * u_T2) ** 2)
    assert b.u_c == pytest.approx(closed, rel=1e-7)
    assert b.U == pytest.approx(2 * closed, rel=1e-7)  # k = 2 by default (JCGM 100:2008 6.2.1, 6.3)


def test_the_gas_law_case_has_the_analytic_sensitivity_coefficients():
    # n = P V/(R T1), Q = n cv (T2 − T1) = P V cv (T2 − T1)/(R T1); so
    #   ∂Q/∂P = Q/P,  ∂Q/∂V = Q/V,  ∂Q/∂T1 = −P V cv T2/(R T1²),  ∂Q/∂T2 = P V cv/(R T1)
    # with P absolute: a gauge reading's coefficient is per pascal of difference, the same
    cv, V = 20.8, 0.05
    P, T1, T2 = 5e5 + P_ATM, 293.15, 353.15
    ws = sheet(vessel("20 degC ± 0.5 K", "5 barg ± 0.05 bar", "80 degC ± 0.3 K", 'V = "50 L ± 0.2 %"'))
    prop = api.uncertainty(ws)
    b = budget(prop, Q)
    Qc = P * V * cv * (T2 - T1) / (R * T1)
    assert b.value == pytest.approx(Qc, rel=1e-9)
    expected = {"initial 'cold'.P": Qc / P, "initial 'cold'.V": Qc / V,
                "initial 'cold'.T": -P * V * cv * T2 / (R * T1 ** 2), "final.T": P * V * cv / (R * T1)}
    for path, c in expected.items():
        assert line(b, path).c == pytest.approx(c, rel=1e-6), path
    # each u in SI: 0.05 bar = 5000 Pa, 0.2 % of 50 L, 0.5 K beside degC
    u = {i.path: (i.u, i.si_unit) for i in prop.inputs}
    assert u["initial 'cold'.P"] == (pytest.approx(5000.0), "Pa")
    assert u["initial 'cold'.V"] == (pytest.approx(1e-4), "m**3")
    assert u["initial 'cold'.T"] == (pytest.approx(0.5), "K")
    data = prop.as_json()
    row = next(r for r in next(r for r in data["results"] if r["result"] == Q)["budget"]
               if r["input"] == "initial 'cold'.P")
    assert row["c"]["unit"] == "J/Pa" and row["contribution"]["unit"] == "J"


def test_the_budget_has_the_structure_of_the_law_of_propagation():
    # JCGM 100:2008 5.1.2: the squares of the contributions cᵢ u(xᵢ) add to u_c²; so the
    # shares of the variance add to 1; the budget lists the largest first; U = k u_c (6.2.1)
    prop = api.uncertainty(sample(SAMPLE), coverage=3.0)
    assert len(prop.inputs) == 4 and prop.budgets
    for b in prop.budgets:
        assert sum(li.contribution ** 2 for li in b.lines) == pytest.approx(b.u_c ** 2, rel=1e-12)
        if b.u_c > 0:
            assert sum(li.share for li in b.lines) == pytest.approx(1.0, rel=1e-12)
        sizes = [abs(li.contribution) for li in b.lines]
        assert sizes == sorted(sizes, reverse=True)
        assert b.U == pytest.approx(3.0 * b.u_c, rel=1e-15) and b.k == 3.0
        for li in b.lines:  # contribution = c u in SI, whatever unit the value was typed in
            assert li.contribution == pytest.approx(li.c * li.input.u, rel=1e-12, abs=1e-300)


def test_the_main_results_by_default_and_every_column_on_request():
    ws = sample(SAMPLE)
    main = [b.column for b in api.uncertainty(ws).budgets]
    assert main == ["states.warmed.T [K]", "states.warmed.P [Pa]", "terms.from bath.value [J]", "n [mol]",
                    "S_gen [J/K]"]
    every = [b.column for b in api.uncertainty(ws, columns="all").budgets]
    assert set(main) < set(every) and "states.warmed.u [J/mol]" in every
    assert [b.column for b in api.uncertainty(ws, columns=["n [mol]"]).budgets] == ["n [mol]"]
    with pytest.raises(InputError, match="'nope' is no result of this worksheet"):
        api.uncertainty(ws, columns=["nope"])
    with pytest.raises(InputError) as err:
        api.uncertainty(ws, coverage=0.0)
    assert err.value.field == "--coverage"


def test_a_case_that_fails_at_x_plus_or_minus_h_is_named_in_the_budget():
    # n − h = 0.01 − 0.05 mol is no amount: that input's coefficient cannot be had, and u_c is not
    # given (a sum leaving it out would understate u_c)
    ws = sheet(vessel("300 K ± 0.5 K", "10 bar", "400 K", 'n = "0.01 mol ± 0.5 mol"'))
    b = budget(api.uncertainty(ws), Q)
    failed = line(b, "initial 'cold'.n")
    assert "not solved at initial 'cold'.n = -0.04 mol" in failed.failed and "must be positive" in failed.failed
    assert not line(b, "initial 'cold'.T").failed
    assert b.u_c is None and b.U is None
    assert "initial 'cold'.n failed" in b.as_json()["incomplete"]


def test_an_exact_value_contributes_nothing():
    ws = sheet(vessel("300 K ± 0 K", "10 bar", "400 K ± 0.4 K", 'n = "2 mol"'))
    b = budget(api.uncertainty(ws), Q)
    assert line(b, "initial 'cold'.T").contribution == 0.0
    assert b.u_c == pytest.approx(2 * 20.8 * 0.4, rel=1e-7)


# -- Monte Carlo (JCGM 101:2008) ---------------------------------------------------------------
def test_monte_carlo_agrees_with_the_first_order_on_a_linear_case():
    # Q linear in normal inputs is normal with σ = u_c: the samples' standard deviation differs
    # from u_c by its sampling error only, the standard error of a standard deviation of a
    # normal output σ/√(2(N − 1)); within 3 of them. The mean within 3 u_c/√N of the nominal.
    N = 2000
    ws = sheet(vessel("300 K ± 0.5 K", "10 bar", "400 K ± 0.4 K", 'n = "2 mol ± 0.02 mol"'))
    prop = api.uncertainty(ws, monte_carlo=N, seed=7)
    b, run = budget(prop, Q), prop.monte_carlo
    (spread,) = [s for s in run.spreads if s.column == Q]
    assert run.failed == 0 and spread.count == N
    assert abs(spread.sd - b.u_c) < 3 * spread.sd / math.sqrt(2 * (N - 1))
    assert abs(spread.mean - b.value) < 3 * b.u_c / math.sqrt(N)
    # the 95 % interval of a normal output is about y ± 1.96 σ (JCGM 101:2008 7.7)
    assert spread.low == pytest.approx(b.value - 1.96 * b.u_c, rel=2e-3)
    assert spread.high == pytest.approx(b.value + 1.96 * b.u_c, rel=2e-3)


@pytest.mark.parametrize("word, a", [("rectangular", 3.0), ("triangular", 3.0)])
def test_monte_carlo_draws_the_declared_distribution(word, a):
    # one input, Q = n cv (T2 − T1) linear in T2: every sample lies within the half-width a of
    # the value (times |c|), and σ is a/√3 or a/√6 (JCGM 100:2008 4.3.7, 4.3.9) to sampling error
    N = 1000
    ws = sheet(vessel("300 K", "10 bar", f"400 K ± {a} K ({word})", 'n = "2 mol"'))
    run = monte_carlo(ws, api.case_row, N, seed=3, columns=["states.hot.T [K]"])
    (s,) = run.spreads
    assert 400 - a <= s.low and s.high <= 400 + a
    u = a / math.sqrt(3 if word == "rectangular" else 6)
    assert abs(s.sd - u) < 4 * u / math.sqrt(2 * (N - 1))


def test_monte_carlo_on_processes_gives_the_serial_numbers():
    ws = sheet(vessel("300 K ± 0.5 K", "10 bar", "400 K ± 0.4 K (triangular)", 'n = "2 mol ± 0.02 mol"'))
    serial = monte_carlo(ws, api.case_row, 40, seed=11)
    pooled = monte_carlo(ws, api.case_row, 40, seed=11, jobs=2)
    assert pooled.as_json() == serial.as_json()
    assert monte_carlo(ws, api.case_row, 40, seed=12).as_json() != serial.as_json()


def test_monte_carlo_counts_and_reports_the_samples_that_fail():
    # n = 0.05 ± 0.05 mol: about a sixth of the normal draws are no amount (below zero)
    ws = sheet(vessel("300 K", "10 bar", "400 K", 'n = "0.05 mol ± 0.05 mol"'))
    run = monte_carlo(ws, api.case_row, 200, seed=5, columns=[Q])
    assert 10 < run.failed < 60 and run.solved + run.failed == 200
    assert sum(n for _, n in run.failures) == run.failed
    assert all("must be positive" in m for m, _ in run.failures)
    assert run.spreads[0].count == run.solved


def test_the_coverage_interval_is_probabilistically_symmetric():
    # JCGM 101:2008 7.7 (from memory): M = 1000 sorted values, q = pM = 950, r = (M − q)/2 = 25:
    # the interval runs from the 25th to the 975th value
    values = [float(i) for i in range(1, 1001)]
    assert interval(values, 0.95) == (25.0, 975.0)
    assert interval(values[::-1], 0.95) == (25.0, 975.0)


def test_a_sample_without_uncertainties_has_no_inputs():
    ws = sample("co2-cylinder-hot-store.toml")
    assert uncertain_inputs(ws) == ()
    # a word field with a ± in it is no input
    titled = with_value(ws, "worksheet.title", "warming at 20 degC ± 1 K")
    assert uncertain_inputs(titled) == ()


# -- the record --------------------------------------------------------------------------------
def test_the_record_keeps_the_budget_and_replay_reproduces_it(tmp_path):
    from balance.record import Record

    rec = Record.create(tmp_path / "calc.jbk", author="a.engineer", worksheet=sample(SAMPLE))
    (solve,) = [e for e in rec.entries if e.kind == "solve"]
    kept = solve.data["uncertainty"]
    first = api.uncertainty(sample(SAMPLE)).as_json(monte_carlo=False)
    assert kept["results"] == json.loads(json.dumps(first["results"]))
    assert "monte_carlo" not in kept
    assert "Uncertainty of the results" in solve.text and "states.warmed.P [Pa]: " in solve.text
    assert re.search(r"initial 'filled'\.T +18 degC +0\.866025 K +rectangular", solve.text)
    report = rec.replay()
    assert report.ok, report.lines()
    assert any("uncertainty budget" in line for line in report.lines())


def test_the_report_exported_from_the_record_shows_the_budget(tmp_path):
    from balance.record import Record
    from balance.record.export import export_markdown

    rec = Record.create(tmp_path / "calc.jbk", author="a.engineer", worksheet=sample(SAMPLE))
    report = export_markdown(rec)
    assert "### Uncertainty of the results" in report and "(k = 2), u_c = " in report
    assert re.search(r"initial 'filled'\.T +18 degC +0\.866025 K +rectangular", report)


def test_a_worksheet_without_uncertainties_files_no_budget():
    data = api.entry_data(api.attempt(sample("co2-cylinder-hot-store.toml")))
    assert "uncertainty" not in data


def test_replay_judges_the_budget_to_its_own_tolerance():
    data = api.entry_data(api.attempt(sample(SAMPLE)))

    def moved(factor):
        copy = json.loads(json.dumps(data))
        c = copy["uncertainty"]["results"][1]["budget"][0]["c"]
        c["value"] *= factor
        return copy

    assert compare(data, moved(1 + UNCERTAINTY_TOLERANCE / 10))[0] == []
    failing, _ = compare(data, moved(1 + 10 * UNCERTAINTY_TOLERANCE))
    assert [d.path for d in failing] == ["uncertainty.results[2].budget[1].c"]


# -- the command line --------------------------------------------------------------------------
def test_solve_prints_each_main_result_with_its_uncertainty_and_budget(capsys):
    from tui.cli import main

    assert main(["solve", str(SAMPLES / SAMPLE)]) == 0
    out = capsys.readouterr().out
    b = budget(api.uncertainty(sample(SAMPLE)), "states.warmed.P [Pa]")
    assert f"states.warmed.P [Pa]: {b.value:.6g} Pa ± {b.U:.6g} Pa (k = 2), u_c = {b.u_c:.6g} Pa" in out
    assert "c (sensitivity)" in out and "share" in out and "18 degC ± 1.5 K" in out


def test_solve_json_has_the_uncertainty_and_the_options_apply(capsys):
    from tui.cli import main

    assert main(["solve", str(SAMPLES / SAMPLE), "--json", "--coverage", "3", "--monte-carlo", "20",
                 "--seed", "4", "--result", "states.warmed.P [Pa]"]) == 0
    data = json.loads(capsys.readouterr().out)
    (r,) = data["uncertainty"]["results"]
    assert r["result"] == "states.warmed.P [Pa]" and r["k"] == 3.0
    assert r["U"]["value"] == pytest.approx(3 * r["u_c"]["value"], rel=1e-12)
    mc = data["uncertainty"]["monte_carlo"]
    assert mc["samples"] == 20 and mc["seed"] == 4 and mc["solved"] + mc["failed"] == 20


def test_solve_says_when_there_is_nothing_to_propagate(capsys):
    from tui.cli import main

    assert main(["solve", str(SAMPLES / "co2-cylinder-hot-store.toml"), "--json", "--monte-carlo", "10"]) == 0
    captured = capsys.readouterr()
    assert "uncertainty" not in json.loads(captured.out)
    assert "--monte-carlo: no value of this worksheet carries an uncertainty" in captured.err


def test_solve_refuses_a_bad_option_by_its_name(capsys):
    from tui.cli import main

    assert main(["solve", str(SAMPLES / SAMPLE), "--coverage", "0"]) == 2
    assert "--coverage: the coverage factor must be a number above 0" in capsys.readouterr().err


def test_the_uncertainty_is_headless():
    # balance/ never imports the user interface; the command-line path needs no Textual nor CoolProp
    import subprocess
    import sys

    from tests.helpers import ROOT

    code = ("import sys, json, balance.study.uncertainty, contextlib, io\n"
            "from tui import cli\n"
            "loaded = [m for m in ('textual', 'rich', 'CoolProp') if m in sys.modules]\n"
            f"with contextlib.redirect_stdout(io.StringIO()): cli.main(['solve', {str(SAMPLES / SAMPLE)!r}, '--json'])\n"
            "print(json.dumps([loaded, [m for m in ('textual', 'CoolProp') if m in sys.modules]]))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert json.loads(out.stdout) == [[], []]
