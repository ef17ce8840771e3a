"""Small builders shared by the tests."""

from __future__ import annotations

from pathlib import Path

from balance.worksheet import Worksheet

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"


def sheet(text: str) -> Worksheet:
    """A worksheet from TOML text."""
    return Worksheet.from_toml(text)


def sample(name: str) -> Worksheet:
    return Worksheet.load(SAMPLES / name)


#: Water at 100 degC and 1 m3/kg with Peng-Robinson: between saturated liquid and
#: vapour (iapws 1.5 IAPWS95: v'' = 1.6718 m3/kg; checked in
#: tests/test_reference_model.py, test_the_wet_water_sample_state_is_wet), so a wet state.
WET_WATER_PR = """
[fluid]
species = "H2O"
model = "peng-robinson"
[[initial]]
T = "100 degC"
v = "1 m3/kg"
m = "1 kg"
"""
