"""Quantities as people type them, and text that is refused before anything evaluates it.

Values: the definitions of the temperature scales (0 degC = 273.15 K; T[degF] = T[K] x 9/5
- 459.67, so 77 degF = 298.15 K) and of the bar (1e5 Pa), common practice, no source; what
pint itself reads 'C' and 'F' as is asked of pint (0.25) in the test.
"""

from __future__ import annotations

import pytest

from balance.errors import InputError
from balance.units import MAX_TEXT, dimension_of, parse, registry


@pytest.mark.parametrize("text", ["25 C", "25 degc", "25 deg C", "25 °C", "25 ºC", "25 ℃", "25 celsius",
                                  "25 degC"])
def test_celsius_as_people_write_it_in_a_temperature_field(text):
    assert parse(text, "temperature", "T") == pytest.approx(298.15, abs=1e-12)


@pytest.mark.parametrize("text", ["77 F", "77 degf", "77 deg F", "77 °F"])
def test_fahrenheit_as_people_write_it(text):
    assert parse(text, "temperature", "T") == pytest.approx(298.15, abs=1e-12)


def test_pint_reads_C_as_the_coulomb_which_is_never_a_temperature():
    ureg = registry()
    assert ureg.parse_units("C") == ureg.coulomb and ureg.parse_units("F") == ureg.farad
    # so outside a temperature field 'C' keeps pint's meaning, and is refused where it does not fit
    with pytest.raises(InputError, match="must be an energy"):
        parse("25 C", "energy", "Q")
    # a difference written in C is an offset unit, refused as such
    with pytest.raises(InputError, match="temperature difference: write it in K or delta_degC"):
        parse("10 C", "temperature_difference", "dT")


@pytest.mark.parametrize("text, dimension", [("1,5 bar", "pressure"), ("1,000 kJ", "energy"), ("-0,5 kJ", "energy")])
def test_a_decimal_comma_is_named(text, dimension):
    with pytest.raises(InputError) as err:
        parse(text, dimension, "P")
    assert "has a comma in its number; write a decimal point and no thousands separators" in err.value.message


def test_a_decimal_comma_is_named_in_a_field_of_several_dimensions():
    with pytest.raises(InputError, match="has a comma in its number"):
        dimension_of("1,5 m3/kg", ("molar_volume", "specific_volume"), "v")


@pytest.mark.parametrize("dimension, example", [("pressure", "'35 bar'"), ("temperature", "'500 K'"),
                                                ("volume", "'1 L'"), ("energy", "'12 kJ'")])
def test_the_example_in_a_message_is_of_the_fields_own_dimension(dimension, example):
    with pytest.raises(InputError) as err:
        parse("abc", dimension, "field")
    assert f"a number and a unit, like {example}" in err.value.message


@pytest.mark.parametrize("text, words", [
    ("0 K", "must be above absolute zero (0 K, -273.15 degC); got '0 K'"),
    ("-5 K", "must be above absolute zero"),
    ("-300 degC", "got '-300 degC', which is -26.85 K"),
])
def test_a_temperature_is_above_absolute_zero(text, words):
    with pytest.raises(InputError) as err:
        parse(text, "temperature", "final.T")
    assert err.value.field == "final.T" and words in err.value.message


@pytest.mark.parametrize("text", ["0 bar", "-1 bar", "1e-400 bar"])
def test_an_absolute_pressure_is_above_vacuum(text):
    with pytest.raises(InputError, match=r"must be an absolute pressure above zero \(a vacuum\)"):
        parse(text, "pressure", "final.P")


def test_a_gauge_reading_below_vacuum_says_so_with_its_atmosphere():
    # -2 barg against 1.01325 bar is -0.98675 bar absolute (1 bar = 1e5 Pa)
    with pytest.raises(InputError) as err:
        parse("-2 barg", "pressure", "P")
    assert err.value.message == ("is at or below vacuum: '-2 barg' is -0.98675 bar absolute against an atmosphere "
                                 "of 1.01325 bar; a gauge reading cannot be below -1.01325 bar(g)")
    assert parse("-0.5 barg", "pressure", "P") == pytest.approx(51325.0, rel=1e-15)
    with pytest.raises(InputError, match="against an atmosphere of 0.9 bar"):
        parse("-0.95 barg", "pressure", "P", p_atm=0.9e5)


def test_a_gauge_reading_is_refused_where_only_an_absolute_pressure_can_be():
    with pytest.raises(InputError, match="must be an absolute pressure, not a gauge reading"):
        parse("1 barg", "pressure", "worksheet.atmosphere", gauge=False)


@pytest.mark.parametrize("text, words", [
    ("1 10**10**10*bar", "has a power of a power in its unit"),  # evaluated by pint, it hung
    ("1 (m**3)**4", "has a power of a power"),
    ("3 m**13", "has a power beyond ±12 in its unit"),
    ("1 1e308*bar", "has a number inside its unit"),
    ("1 10*bar", "has a number inside its unit"),
])
def test_a_unit_is_bounded_before_pint_evaluates_it(text, words):
    with pytest.raises(InputError, match=words.replace("(", r"\(").replace("*", r"\*").replace("+", r"\+")):
        parse(text, "pressure" if "bar" in text else "volume", "P")


def test_units_with_small_powers_still_read():
    assert parse("2 m3", "volume", "V") == 2.0
    assert parse("2 m**3", "volume", "V") == 2.0
    assert parse("1 kJ/(kg K)", "specific_entropy", "s") == pytest.approx(1000.0, rel=1e-15)
    assert parse("4 (m/s)**2", "specific_energy", "e") == pytest.approx(4.0, rel=1e-15)


def test_a_text_too_long_is_refused_before_it_is_read():
    text = "1" * 10_000_000 + " bar"  # 10 MB: refused by its length, not parsed
    with pytest.raises(InputError) as err:
        parse(text, "pressure", "P")
    assert err.value.message.startswith(f"is {len(text)} characters long; a pressure is a number and a unit")
    assert f"at most {MAX_TEXT} characters" in err.value.message


def test_a_value_too_large_for_a_float_after_conversion_is_refused():
    # 1e308 kJ is 1e311 J, beyond the largest double (about 1.8e308)
    with pytest.raises(InputError, match="is too large to compute with; got '1e308 kJ'"):
        parse("1e308 kJ", "energy", "process.dKE")


@pytest.mark.parametrize("value", [float("nan"), float("inf")])
def test_a_number_that_is_not_finite_is_refused(value):
    with pytest.raises(InputError, match="must be a finite number"):
        parse(value, "dimensionless", "process.n")
