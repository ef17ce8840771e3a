"""The cautions a result must carry, and must not carry, where it can hurt someone.

The thresholds are the trade's, as balance/balances/cautions.py applies them (common
practice, no source): a pressure caution above 0.5 bar gauge (where the usual
pressure-equipment rules begin), a low-temperature caution below -29 °C
(-20 °F, below which carbon steels need impact-tested qualification under the
common pressure-vessel codes), a caution when the final pressure exceeds every
initial one, and always the statement that the calculation is not a design
and defers to the codes and a licensed engineer.

Where compartments join suddenly, the gas left in an emptying compartment expands on its
own and is colder than the settled state; the caution takes the isentropic bound, checked
here against the ideal gas's closed form T2 = T1 (P2/P1)^(R/cp) (common practice, no
source) and against CoolProp 8.0's (P, s) flash of nitrogen.
"""

from __future__ import annotations

import pytest

from balance import api
from tests.helpers import sample, sheet

#: A phrase that identifies each caution in the text (the text itself is tested in the goldens).
DISCLAIMER = "checked by a competent, licensed engineer"
PRESSURE = "confirm the design pressure"
LOW_TEMPERATURE = "minimum design metal temperature"
ABOVE_INITIAL = "above every initial pressure"
DEPRESSURING = "depressuring standards"
FILL_HEATING = "Composite (type III and IV) tanks"


def kinds(cautions) -> set[str]:
    """Which of the cautions above a result shows; each at most once."""
    found = set()
    for phrase in (DISCLAIMER, PRESSURE, LOW_TEMPERATURE, ABOVE_INITIAL, DEPRESSURING, FILL_HEATING):
        hits = [str(c) for c in cautions if phrase in str(c)]
        assert len(hits) <= 1, hits
        if hits:
            found.add(phrase)
    return found


def held(T: str, P: str) -> str:
    """A closed, rigid vessel of nitrogen (ideal gas) held at its temperature: nothing changes."""
    return f"""
[fluid]
species = "N2"
model = "ideal-gas"
[[initial]]
T = "{T}"
P = "{P}"
n = "1 mol"
[final]
T = "{T}"
[[heat]]
name = "wall"
Q = "?"
T_boundary = "{T}"
[process]
constraints = ["rigid"]
"""


@pytest.mark.parametrize("P, shown", [("0.45 barg", False), ("0.55 barg", True), ("0.9 bar", False),
                                      ("10 bar", True)])
def test_pressure_caution_above_half_a_bar_gauge(P, shown):
    r = api.solve(sheet(held("20 degC", P)))
    assert kinds(r.cautions) == {DISCLAIMER} | ({PRESSURE} if shown else set())


@pytest.mark.parametrize("T, shown", [("-30 degC", "-30.0 °C"), ("-28 degC", None), ("-40 degF", "-40.0 °C"),
                                      ("20 degC", None)])
def test_low_temperature_caution_below_minus_29_C(T, shown):
    r = api.solve(sheet(held(T, "1 bar")))
    assert kinds(r.cautions) == {DISCLAIMER} | ({LOW_TEMPERATURE} if shown else set())
    if shown:  # -40 °F is -40 °C (the scales cross there)
        (c,) = [str(c) for c in r.cautions if LOW_TEMPERATURE in str(c)]
        assert c.startswith(f"A temperature of {shown} occurs (the final state 'final'), below -29 °C, the usual "
                            "limit for carbon-steel equipment without impact testing (common practice)")
        assert c.endswith("The limit depends on the material and on the code that governs the equipment: "
                          "follow that code.")


def test_a_heated_rigid_vessel_shows_its_rise():
    text = held("20 degC", "0.2 barg").replace('[final]\nT = "20 degC"', '[final]\nT = "200 degC"')
    r = api.solve(sheet(text.replace('T_boundary = "20 degC"', 'T_boundary = "250 degC"')))
    # P2 = P1 T2/T1 (ideal gas, rigid): 1.21 bar(a) x 473/293 = 1.96 bar(a), over 0.5 bar gauge
    assert r.final.point.P == pytest.approx(1.21325e5 * 473.15 / 293.15, rel=1e-9)
    assert kinds(r.cautions) == {DISCLAIMER, PRESSURE, ABOVE_INITIAL}


# Every bundled sample, from the numbers its worksheet gives and its solved final state:
SAMPLES = {
    "air-test-cylinder-reversible.toml": {PRESSURE, ABOVE_INITIAL},   # 1 bar to 8 bar, 20 °C and hotter
    "argon-membrane-rupture.toml": {PRESSURE, LOW_TEMPERATURE},       # 80 bar to 20 bar: chamber A's gas -99 °C
    "co2-cylinder-hot-store.toml": {PRESSURE, ABOVE_INITIAL},         # heated rigid: 51 to 92 bar
    "methane-piston-isothermal.toml": {PRESSURE, ABOVE_INITIAL},      # 5 bar to 60 bar at 25 °C
    "n2-accumulator-polytropic.toml": {PRESSURE, ABOVE_INITIAL},      # 90 bar to 210 bar
    "n2-buffer-into-receiver.toml": {PRESSURE, LOW_TEMPERATURE},      # settles at -10.8 °C; V-101's gas -86 °C
    "n2-sample-cylinder-bath-uncertain.toml": {PRESSURE, ABOVE_INITIAL},  # heated rigid: 121 to 146 bar
    "steam-kettle-wet.toml": {PRESSURE, ABOVE_INITIAL},               # 1 atm heated rigid: 5.8 bar
    # steady flow: the highest stream pressure above 0.5 bar gauge; no stream below -29 °C
    "gas-letdown-preheated.toml": {PRESSURE},                         # 70 barg; the header at 17.7 °C
    "n2-two-stage-compressor.toml": {PRESSURE},                       # to 20.2 barg; 20 °C and hotter
    "steam-backpressure-turbine.toml": {PRESSURE},                    # 20 barg steam
    "feedwater-heater-steam-mix.toml": {PRESSURE},                    # 3 barg
    "r134a-chiller-evaporator-condenser.toml": {PRESSURE},            # 10.17 bar; coldest -5 °C
    "steam-condensate-flash-drum.toml": {PRESSURE},                   # 10 barg condensate
    "n2-feed-effluent-preheater.toml": {PRESSURE},                    # 9 barg; the loop solved together
    "ng-fuel-letdown-dewpoint.toml": {PRESSURE},                      # 55 barg; the header at -18.3 °C
    # transient: a vent's depressuring time, a fill's heating, the coldest gas or wall in the history
    "argon-buffer-pot-fill.toml": {PRESSURE, FILL_HEATING},           # 12 barg header; the pot peaks at 207 °C
    "h2-buffer-blowdown.toml": {PRESSURE, LOW_TEMPERATURE, DEPRESSURING},  # adiabatic: the gas to -145 °C
    "co2-receiver-flare-depressure.toml": {PRESSURE, DEPRESSURING},   # the shell keeps the gas above -10 °C
    "n2-receivers-equalise.toml": {PRESSURE},                         # 60 barg; R-41 to -10.5 °C, R-42 to 92 °C
}


@pytest.mark.parametrize("name", sorted(SAMPLES))
def test_each_sample_shows_the_cautions_its_case_needs(name):
    from tests.helpers import sample

    r = api.solve(sample(name))
    assert kinds(r.cautions) == {DISCLAIMER} | SAMPLES[name]


def test_the_table_covers_every_sample():
    from tests.test_record_support import sample_names

    assert sorted(SAMPLES) == sample_names()


# -- the gas left behind when compartments join suddenly --------------------------------------
def emptied(P1: str, V2: str, cp: str | None = None, model: str = "ideal-gas") -> str:
    """Nitrogen at 20 °C and P1 in 1 m3, let into an evacuated volume V2 (free expansion)."""
    overrides = f'[fluid.overrides]\ncp = "{cp}"\n' if cp else ""
    return f"""
[fluid]
species = "N2"
model = "{model}"
{overrides}[[initial]]
name = "source"
T = "20 degC"
P = "{P1}"
V = "1 m3"
[[initial]]
name = "receiver"
empty = true
V = "{V2}"
[final]
name = "settled"
T = "?"
P = "?"
[process]
constraints = ["free-expansion"]
"""


def test_the_gas_left_behind_follows_the_ideal_gas_isentrope():
    from balance.balances.cautions import gas_left_behind

    r = api.solve(sheet(emptied("10 bar", "3 m3", cp="29.1 J/(mol K)")))
    # ideal gas, constant cp: the free expansion keeps T (Joule), P2 = P1/4, and the gas left
    # in the source expands isentropically: T = T1 (P2/P1)^(R/cp)
    assert r.final.point.T == pytest.approx(293.15, rel=1e-9)
    state, T, reason = gas_left_behind(r.initial, r.final)
    assert state.name == "source" and reason == ""
    assert T == pytest.approx(293.15 * 0.25 ** (8.314462618 / 29.1), abs=0.01)  # 197.4 K, -75.8 °C
    (c,) = [str(c) for c in r.cautions if LOW_TEMPERATURE in str(c)]
    assert c.startswith("During the event the gas left in 'source' expands from 10 bar(a) to 2.5 bar(a): ")
    assert f"it cools to {T - 273.15:.1f} °C, below -29 °C" in c
    assert "the settled 20.0 °C is the state after mixing" in c
    assert c.endswith("follow that code.")


def test_the_demo_bound_agrees_with_the_reference_equation_of_nitrogen():
    import CoolProp.CoolProp as CP

    from balance.balances.cautions import gas_left_behind

    r = api.solve(sample("n2-buffer-into-receiver.toml"))
    _, T, _ = gas_left_behind(r.initial, r.final)
    P1, P2 = r.initial[0].point.P, r.final.point.P
    s1 = CP.PropsSI("S", "T", 293.15, "P", P1, "Nitrogen")
    reference = CP.PropsSI("T", "P", P2, "S", s1, "Nitrogen")  # CoolProp 8.0: 186.33 K (-86.8 °C)
    assert T == pytest.approx(reference, abs=1.0)  # Peng-Robinson: 186.77 K
    (c,) = [str(c) for c in r.cautions if LOW_TEMPERATURE in str(c)]
    assert "it cools to -86.4 °C, below -29 °C" in c and "the settled -10.8 °C is the state after mixing" in c


def test_the_isentrope_of_the_reference_model_is_its_own_flash():
    from balance.api import fluid
    from balance.balances.cautions import isentropic_temperature

    _, model = fluid("N2", "reference")
    start = model.at_TP(293.15, 150e5)
    T = isentropic_temperature(model, start, 30e5)
    assert T == pytest.approx(model.flash({"P": 30e5, "s": start.s}).T, abs=1e-4)


def test_a_small_emptying_adds_no_low_temperature_caution():
    # 1.2 bar into a fifth more volume: the gas left behind cools only to about 278 K
    r = api.solve(sheet(emptied("1.2 bar", "0.2 m3")))
    assert kinds(r.cautions) == {DISCLAIMER}


def test_a_quasi_static_path_has_no_gas_left_behind():
    # the methane compression and the polytropic accumulator are not sudden: no such caution
    for name in ("methane-piston-isothermal.toml", "n2-accumulator-polytropic.toml"):
        r = api.solve(sample(name))
        assert not any("During the event" in str(c) for c in r.cautions)


def test_the_readme_says_what_the_demo_shows():
    import re

    from balance.balances.cautions import gas_left_behind
    from tests.helpers import ROOT

    readme = " ".join((ROOT / "README.md").read_text(encoding="utf-8").split())
    settled, behind = re.search(r"The demo settles at −(\d+\.\d) °C, above the limit, but the gas left in V-101 "
                                r"cools towards −(\d+) °C during the event", readme).groups()
    r = api.solve(sample("n2-buffer-into-receiver.toml"))
    assert f"{r.final.point.T - 273.15:.1f}" == f"-{settled}"
    assert round(gas_left_behind(r.initial, r.final)[1] - 273.15) == -int(behind)
    assert "below −29 °C / −20 °F" in readme and "No caution is shown above the limit" in readme


def test_a_final_pressure_above_the_rest_is_said_once():
    r = api.solve(sample("co2-cylinder-hot-store.toml"))
    (c,) = [str(c) for c in r.cautions if PRESSURE in str(c)]
    assert c == ("Pressures up to 91.81 bar(a) occur, in the final state, above every initial pressure: confirm "
                 "the design pressure of every vessel and pipe within the boundary and the set pressure of its "
                 "relief device; the boundary must be rated for it.")
    assert len(r.cautions) == 2  # and the disclaimer
    # below 0.5 bar gauge the rise alone is said
    text = held("20 degC", "0.1 barg").replace('[final]\nT = "20 degC"', '[final]\nT = "40 degC"')
    r = api.solve(sheet(text.replace('T_boundary = "20 degC"', 'T_boundary = "60 degC"')))
    assert [str(c) for c in r.cautions][1:] == [
        "The final pressure is above every initial pressure: the boundary must be rated for it."]
