"""Regression tests for the cache of parsed quantities (balance.units): a cached answer is
the answer, whatever field asks and whatever atmosphere a gauge reading is taken against.
Values: the SI definitions (1 bar = 1e5 Pa; 0 degC = 273.15 K) — common practice, no source.
"""

from __future__ import annotations

import pytest

from balance.errors import InputError
from balance.units import parse


def test_a_gauge_reading_is_read_against_each_callers_atmosphere():
    assert parse("2 barg", "pressure", "P1") == pytest.approx(2e5 + 101325.0, rel=1e-15)
    assert parse("2 barg", "pressure", "P1", p_atm=0.9e5) == pytest.approx(2.9e5, rel=1e-15)
    assert parse("2 barg", "pressure", "P1") == pytest.approx(301325.0, rel=1e-15)


def test_a_cached_error_names_the_field_that_asked():
    for field in ("P1", "state 'V-101'.P"):
        with pytest.raises(InputError) as caught:
            parse("3 kg", "pressure", field)
        assert caught.value.field == field and "must be a pressure" in caught.value.message


def test_the_same_text_of_another_dimension_is_not_confused():
    assert parse("20 degC", "temperature", "T") == pytest.approx(293.15, rel=1e-15)
    with pytest.raises(InputError, match="temperature difference"):
        parse("20 degC", "temperature_difference", "dT")
    assert parse("20 K", "temperature_difference", "dT") == 20.0
