"""Every input pair of the cubics and the ideal gas: no wrong refusal, the pair met, one rule.

Sources of the check values:

* "our at_TP": each state is made from (T, P) by ``at_TP`` (checked against
  CoolProp 8.0's PR and SRK backends in tests/test_cubic_vs_coolprop.py);
  a flash from any two of its properties must give the same state back,
  with the pair met to 1e-9;
* "the saturation curve": the states within 5 % of the model's own
  saturation pressure below Tc are single-phase (liquid above it, vapour
  below: common practice, no source), so none may be refused as two-phase;
* "the one rule" (balance.models.base): where several states meet a pair,
  the one of largest volume is returned and the others named in its note.
"""

from __future__ import annotations

import itertools
import math
import re

import pytest

from balance.errors import InputError, TwoPhaseError
from balance.models import make_model
from balance.species import lookup
from balance.units import R

KEYS = ("T", "P", "v", "u", "h", "s")
PAIRS = list(itertools.combinations(KEYS, 2))
AMBIGUOUS = {("T", "h"), ("u", "h")}  # pairs a cubic can meet twice (Joule-Thomson inversion)


def grid(model, step: int = 1):
    """Gas, liquid, supercritical and near-saturation states of the model (over 500 with step 1)."""
    out = []
    for i in range(13):
        Tr = 0.55 + 0.43 * i / 12
        T = Tr * model.Tc_eos
        Ps = model.saturation(T)[0]
        ratios = [0.05 + 0.85 * j / 9 for j in range(10)] + [0.95 + 0.045 * j / 4 for j in range(5)]
        ratios += [1.005 + 0.045 * j / 4 for j in range(5)] + [1.1 + 18.9 * j / 9 for j in range(10)]
        out += [model.at_TP(T, r * Ps) for r in ratios]
    for i in range(12):
        Tr = 1.02 + 1.98 * i / 11
        out += [model.at_TP(Tr * model.Tc_eos, 0.05 * 120.0 ** (j / 9) * model.Pc_eos) for j in range(10)]
    return out[::step]


def _met(q, p, pair) -> None:
    for key in pair:
        floor = R * p.T if key in ("u", "h") else R if key == "s" else 0.0
        assert abs(q.get(key) - p.get(key)) <= 1e-9 * max(abs(p.get(key)), floor), (pair, key, p, q)


@pytest.mark.parametrize("name, sid, step", [("peng-robinson", "CH4", 1), ("soave-redlich-kwong", "CO2", 3),
                                             ("van-der-waals", "N2", 4), ("redlich-kwong", "C3H8", 4)])
def test_every_pair_gives_the_state_back(name, sid, step):
    model = make_model(name, lookup(sid))
    states = grid(model, step)
    if step == 1:
        assert len(states) >= 500
    for pair in PAIRS:
        for p in states[:: 5 if pair == ("u", "h") else 1]:  # (u, h) scans its whole line: a sample
            q = model.flash({k: p.get(k) for k in pair})  # never refused: raises otherwise
            _met(q, p, pair)
            if q.note:
                assert pair in AMBIGUOUS, (pair, q.note)
                assert q.v >= p.v * (1 - 1e-9), (pair, q.note)  # the largest volume is taken
                assert q.note in model.warnings(q)
            else:
                assert q.T == pytest.approx(p.T, rel=1e-8) and q.v == pytest.approx(p.v, rel=1e-7), (pair, p, q)


@pytest.mark.parametrize("name", ("peng-robinson", "soave-redlich-kwong"))
@pytest.mark.parametrize("ratio", (0.95, 1.05))
@pytest.mark.parametrize("Tr", (0.6, 0.8, 0.95))
def test_caloric_pairs_near_saturation_are_not_refused(name, ratio, Tr):
    """(h, s) and (u, s) at 0.95 and 1.05 of P_sat below Tc: valid single-phase states that the
    grid-scan flash used to refuse as two-phase."""
    model = make_model(name, lookup("CH4"))
    T = Tr * model.Tc_eos
    p = model.at_TP(T, ratio * model.saturation(T)[0])
    assert p.phase == ("gas" if ratio < 1 else "liquid")
    for pair in (("h", "s"), ("u", "s"), ("P", "h"), ("v", "u")):
        q = model.flash({k: p.get(k) for k in pair})
        assert q.T == pytest.approx(T, rel=1e-9) and q.v == pytest.approx(p.v, rel=1e-8), pair


@pytest.mark.parametrize("pair", [("P", "h"), ("h", "s"), ("u", "s"), ("v", "u"), ("T", "s")])
def test_a_wet_target_is_refused_with_its_quality(pair):
    """Halfway between saturated liquid and vapour at 0.8 Tc: a wet state, which a cubic cannot
    give; the refusal names its quality (0.5 to 1e-6, as printed) and the reference model."""
    model = make_model("peng-robinson", lookup("CH4"))
    T = 0.8 * model.Tc_eos
    P, v_l, v_v = model.saturation(T)
    liquid, vapour = model.point(T, v_l, ""), model.point(T, v_v, "")
    wet = {k: 0.5 * (liquid.get(k) + vapour.get(k)) for k in ("v", "u", "h", "s")}
    wet.update(T=T, P=P)
    with pytest.raises(TwoPhaseError) as err:
        model.flash({k: wet[k] for k in pair})
    words = str(err.value)
    x = float(re.search(r"quality x = ([0-9.e-]+?)\.? A cubic", words).group(1))
    assert x == pytest.approx(0.5, abs=1e-6) and "reference model" in words


def test_T_h_with_two_states_takes_the_larger_volume_and_names_the_other():
    """PR methane at 300 K: a gas at 20 bar and a dense state above 1000 bar share (T, h)
    (the isotherm's Joule-Thomson inversion; our at_TP, and brentq on the isotherm in
    tests/test_cubic_vs_coolprop.py)."""
    model = make_model("peng-robinson", lookup("CH4"))
    gas = model.at_TP(300.0, 2e6)
    q = model.flash({"T": 300.0, "h": gas.h})
    assert q.v == pytest.approx(gas.v, rel=1e-9)
    assert "2 states have T = 300 K" in q.note and "the one of largest volume is taken" in q.note
    other_P = float(q.note.split("also T = 300 K, P = ")[1].split(" Pa")[0])
    assert other_P > 1e8
    dense = model.at_TP(300.0, other_P)
    assert dense.h == pytest.approx(gas.h, abs=1e-4 * R * 300.0)  # the note prints P to 6 digits


@pytest.mark.parametrize("pair", [p for p in PAIRS if p not in {("T", "u"), ("T", "h"), ("u", "h")}])
@pytest.mark.parametrize("sid", ("N2", "CO2", "He"))
def test_ideal_gas_pairs_give_the_state_back(pair, sid):
    model = make_model("ideal-gas", lookup(sid))
    for T, P in ((80.0, 1e3), (300.0, 1e5), (900.0, 5e6), (2500.0, 2e7)):
        p = model.at_TP(T, P)
        q = model.flash({k: p.get(k) for k in pair})
        assert q.T == pytest.approx(T, rel=1e-12) and q.P == pytest.approx(P, rel=1e-11), (pair, T, P)


def test_a_pair_no_state_meets_is_refused_naming_the_field():
    model = make_model("peng-robinson", lookup("N2"))
    with pytest.raises(InputError) as err:
        model.flash({"P": 1e5, "h": 1e9}, field="final")
    assert err.value.field == "final" and "no state of Peng-Robinson" in str(err.value)
    assert not isinstance(err.value, TwoPhaseError)


@pytest.mark.parametrize("name", ("peng-robinson", "soave-redlich-kwong", "van-der-waals", "redlich-kwong"))
def test_the_saturation_curve_fit_against_the_exact_solution(name):
    """The fit (what every search uses) against Newton on equal fugacity: P_sat to 1e-9,
    from Tc/4 up to within 1e-9 of Tc, where the two volumes close on the critical volume."""
    model = make_model(name, lookup("CO2"))
    curve = model.saturation_curve
    for i in range(400):
        T = model.Tc_eos * (0.25 + 0.7499 * (i + 0.5) / 400)
        fit, exact = curve.at(T), curve.exact(T)
        assert fit[0] == pytest.approx(exact[0], rel=1e-9), T
        for k in (1, 2):
            assert fit[k] == pytest.approx(exact[k], rel=1e-8), (T, k)
    for gap in (1e-6, 1e-8, 1e-9):
        P, v_l, v_v = curve.at(model.Tc_eos * (1 - gap))
        assert P < model.Pc_eos and P == pytest.approx(model.Pc_eos, rel=10 * gap)
        assert v_l < model.vc_eos < v_v and v_v / v_l - 1 < 50 * math.sqrt(gap)
    assert curve.at(model.Tc_eos) is None and curve.T_at(model.Pc_eos) is None


def test_the_saturation_temperature_inverts_the_pressure():
    model = make_model("peng-robinson", lookup("C3H8"))
    for Tr in (0.3, 0.5, 0.7, 0.9, 0.99, 0.9999):
        T = Tr * model.Tc_eos
        assert model.saturation_curve.T_at(model.saturation(T)[0]) == pytest.approx(T, rel=1e-11)


@pytest.mark.parametrize("pair", [("T", "v"), ("P", "h"), ("h", "s")])
def test_a_wet_refusal_names_the_callers_field_and_speaks_of_the_worksheet(pair):
    """The refusal is said where the state was typed (the compartment), and advises the model by
    its worksheet name, not a command-line flag."""
    model = make_model("peng-robinson", lookup("CH4"))
    T = 0.8 * model.Tc_eos
    P, v_l, v_v = model.saturation(T)
    liquid, vapour = model.point(T, v_l, ""), model.point(T, v_v, "")
    wet = {k: 0.5 * (liquid.get(k) + vapour.get(k)) for k in ("v", "h", "s")}
    wet.update(T=T, P=P)
    with pytest.raises(TwoPhaseError) as err:
        model.flash({k: wet[k] for k in pair}, field="initial 'cyl-1'")
    assert err.value.field == "initial 'cyl-1'"
    assert "--model" not in str(err.value) and "reference model" in str(err.value)


def test_an_absurd_acentric_factor_is_refused_naming_the_override():
    from balance.species import with_overrides

    species, _ = with_overrides(lookup("N2"), {"omega": "1e308"})
    with pytest.raises(InputError) as err:
        make_model("peng-robinson", species)
    assert err.value.field == "fluid.overrides.omega" and "between -1 and 5" in str(err.value)
