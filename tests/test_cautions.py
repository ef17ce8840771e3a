"""The cautions a result must carry, and must not carry, where it can hurt someone.

The thresholds are the trade's, as balance/balances/cautions.py applies them (common
practice, no source): a pressure caution above 0.5 bar gauge (where the usual
pressure-equipment rules begin), a low-temperature caution below -29 °C
(-20 °F, below which carbon steels need impact-tested qualification under the
common pressure-vessel codes), a caution when the final pressure exceeds every
initial one, and always the statement that the calculation is not a design
and defers to the codes and a licensed engineer.
"""

from __future__ import annotations

import pytest

from balance import api
from tests.helpers import sheet

#: A phrase that identifies each caution in the text (the text itself is tested in the goldens).
DISCLAIMER = "checked by a competent, licensed engineer"
PRESSURE = "confirm the design pressure"
LOW_TEMPERATURE = "minimum design metal temperature"
ABOVE_INITIAL = "The final pressure exceeds every initial pressure"


def kinds(cautions) -> set[str]:
    """Which of the cautions above a result shows; each at most once."""
    found = set()
    for phrase in (DISCLAIMER, PRESSURE, LOW_TEMPERATURE, ABOVE_INITIAL):
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
    "argon-membrane-rupture.toml": {PRESSURE},                        # 80 bar start, settles at 20 bar, 4.7 °C
    "co2-cylinder-hot-store.toml": {PRESSURE, ABOVE_INITIAL},         # heated rigid: 51 to 92 bar
    "methane-piston-isothermal.toml": {PRESSURE, ABOVE_INITIAL},      # 5 bar to 60 bar at 25 °C
    "n2-accumulator-polytropic.toml": {PRESSURE, ABOVE_INITIAL},      # 90 bar to 210 bar
    "n2-buffer-into-receiver.toml": {PRESSURE},                       # 150 barg; cools to -10.8 °C only
    "steam-kettle-wet.toml": {PRESSURE, ABOVE_INITIAL},               # 1 atm heated rigid: 5.8 bar
}


@pytest.mark.parametrize("name", sorted(SAMPLES))
def test_each_sample_shows_the_cautions_its_case_needs(name):
    from tests.helpers import sample

    r = api.solve(sample(name))
    assert kinds(r.cautions) == {DISCLAIMER} | SAMPLES[name]


def test_the_table_covers_every_sample():
    from tests.test_record_support import sample_names

    assert sorted(SAMPLES) == sample_names()
