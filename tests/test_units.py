"""Readings as people write them, parsed into quantities in base units.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest

from acceptance.units import Basis, Dimension, UnitError, awg_area_mm2, parse_quantity

D = Dimension

# SI prefixes are exact powers of ten (SI Brochure, 9th ed., Table 7) [S]; the parsed value
# should be the double nearest the written decimal, so only float rounding may separate them.
FLOAT_RELATIVE = 1e-15

MICRO_SIGN = "\u00b5"
GREEK_MU = "\u03bc"


@pytest.mark.parametrize(
    ("text", "dimension", "base_value", "symbol"),
    [
        ("230 V", D.VOLTAGE, 230.0, "V"),
        ("11 kV", D.VOLTAGE, 11e3, "kV"),
        ("12.5 mV", D.VOLTAGE, 12.5e-3, "mV"),
        ("10.5 A", D.CURRENT, 10.5, "A"),
        ("450 mA", D.CURRENT, 0.45, "mA"),
        ("47.5 Ω", D.RESISTANCE, 47.5, "Ω"),  # U+03A9 Greek capital omega
        ("47.5 \u2126", D.RESISTANCE, 47.5, "Ω"),  # U+2126 ohm sign
        ("47.5 ohm", D.RESISTANCE, 47.5, "Ω"),
        ("47.5 ohms", D.RESISTANCE, 47.5, "Ω"),
        ("4.7 kΩ", D.RESISTANCE, 4.7e3, "kΩ"),
        ("4.7 kohm", D.RESISTANCE, 4.7e3, "kΩ"),
        ("250 MΩ", D.RESISTANCE, 250e6, "MΩ"),
        ("250 Mohm", D.RESISTANCE, 250e6, "MΩ"),
        ("30 mΩ", D.RESISTANCE, 30e-3, "mΩ"),
        ("30 mohm", D.RESISTANCE, 30e-3, "mΩ"),
        ("5.2 GΩ", D.RESISTANCE, 5.2e9, "GΩ"),
        ("220 pF", D.CAPACITANCE, 220e-12, "pF"),
        ("35 mm", D.LENGTH, 35e-3, "mm"),
        (f"33.3 {MICRO_SIGN}F", D.CAPACITANCE, 33.3e-6, "µF"),
        (f"33.3 {GREEK_MU}F", D.CAPACITANCE, 33.3e-6, "µF"),
        ("33.3 uF", D.CAPACITANCE, 33.3e-6, "µF"),
        ("100 nF", D.CAPACITANCE, 100e-9, "nF"),
        ("50 Hz", D.FREQUENCY, 50.0, "Hz"),
        ("40 °C", D.TEMPERATURE, 40.0, "°C"),
        ("40 degC", D.TEMPERATURE, 40.0, "°C"),
        ("-10 °C", D.TEMPERATURE, -10.0, "°C"),
        ("65 K", D.TEMPERATURE_DIFFERENCE, 65.0, "K"),
        ("750 W", D.POWER, 750.0, "W"),
        ("2.2 kW", D.POWER, 2.2e3, "kW"),
        ("3000 VA", D.APPARENT_POWER, 3000.0, "VA"),
        ("500 var", D.REACTIVE_POWER, 500.0, "var"),
        ("5 %", D.RATIO, 5.0, "%"),
        ("5%", D.RATIO, 5.0, "%"),
        ("5 s", D.TIME, 5.0, "s"),
        ("3 ms", D.TIME, 3e-3, "ms"),
        ("18 m", D.LENGTH, 18.0, "m"),
        ("2.5 mm²", D.AREA, 2.5, "mm²"),
        ("2.5 mm2", D.AREA, 2.5, "mm²"),
        ("0.75 mm^2", D.AREA, 0.75, "mm²"),
    ],
)
def test_unit_spellings(text, dimension, base_value, symbol):
    quantity = parse_quantity(text, dimension)
    assert quantity.dimension is dimension
    assert quantity.value == pytest.approx(base_value, rel=FLOAT_RELATIVE)
    assert quantity.unit == symbol
    assert quantity.text == text.strip()
    assert quantity.basis is None


def test_feet_are_international_feet():
    # International yard and pound agreement (1959): 1 ft = 0.3048 m exactly [S].
    assert parse_quantity("100 ft", D.LENGTH).value == pytest.approx(30.48, rel=FLOAT_RELATIVE)


def test_micro_sign_and_greek_mu_are_the_same_reading():
    written = [parse_quantity(f"470 {prefix}F", D.CAPACITANCE) for prefix in
               (MICRO_SIGN, GREEK_MU, "u")]
    assert {q.value for q in written} == {written[0].value}
    assert {q.unit for q in written} == {"µF"}


def test_prefixed_reading_is_the_nearest_double():
    # A prefix scales by an exact power of ten (SI Brochure Table 7) [S]; 16.2 µF must be
    # the same number as 16.2e-6 F, or a reading on a tolerance boundary (reference values §13,
    # K window 16.2–19.8 µF for 18 µF) falls outside by one unit in the last place.
    assert parse_quantity("16.2 µF", D.CAPACITANCE).value == 16.2e-6
    assert parse_quantity("19.8 µF", D.CAPACITANCE).value == 19.8e-6
    assert parse_quantity("0.3 kV", D.VOLTAGE).value == 300.0


# ASTM B258 defines AWG by d = 0.127 mm · 92^((36 − n)/39) [S]; table areas to 4 figures,
# hence the 5e-4 relative tolerance (half a unit in the fourth figure).
@pytest.mark.parametrize(
    ("text", "area_mm2"),
    [
        ("14 AWG", 2.081),  # ASTM B258 table [S]
        ("12 AWG", 3.309),  # ASTM B258 table [S]
        ("AWG 10", 5.261),  # ASTM B258 table [S]
        ("8 AWG", 8.367),  # ASTM B258 table [S]
        ("1/0 AWG", 53.49),  # ASTM B258 table [S]
        ("4/0 AWG", 107.2),  # ASTM B258 table [S]
    ],
)
def test_awg_sizes(text, area_mm2):
    quantity = parse_quantity(text, D.AREA)
    assert quantity.dimension is D.AREA
    assert quantity.unit == "mm²"
    assert quantity.value == pytest.approx(area_mm2, rel=5e-4)


def test_awg_formula_recomputed():
    # ASTM B258 geometric progression, recomputed here in full precision [S].
    diameter = 0.127 * 92 ** ((36 - 12) / 39)
    assert awg_area_mm2("12") == pytest.approx(math.pi / 4 * diameter**2, rel=1e-12)


def test_awg_only_where_an_area_is_expected():
    with pytest.raises(UnitError):
        parse_quantity("12 AWG", D.LENGTH)


@pytest.mark.parametrize(
    ("text", "basis", "symbol"),
    [
        ("6.3 A RMS", Basis.RMS, "A"),
        ("6.3 A rms", Basis.RMS, "A"),
        ("6.3 A true rms", Basis.RMS, "A"),
        ("6.3 A avg", Basis.AVERAGE, "A"),
        ("6.3 A average", Basis.AVERAGE, "A"),
        ("24 V d.c.", Basis.DC, "V"),
        ("24 V dc", Basis.DC, "V"),
        ("24 Vdc", Basis.DC, "V"),
        ("339 V peak", Basis.PEAK, "V"),
    ],
)
def test_qualifier_is_kept_as_basis(text, basis, symbol):
    quantity = parse_quantity(text, D.VOLTAGE, D.CURRENT)
    assert quantity.basis is basis
    assert quantity.unit == symbol
    assert quantity.text == text


def test_decimal_comma_is_refused_with_the_fix():
    with pytest.raises(UnitError) as caught:
        parse_quantity("1,5 V", D.VOLTAGE)
    assert str(caught.value) == (
        "'1,5 V' uses a comma; write the decimal separator as a point (e.g. '1.5 V') "
        "and no thousands separator")


def test_wrong_dimension():
    with pytest.raises(UnitError) as caught:
        parse_quantity("230 V", D.CURRENT)
    assert str(caught.value) == (
        "'230 V' is a voltage, but a current is expected here (A, kA, mA, µA)")


def test_unknown_unit_suggests_the_close_one():
    with pytest.raises(UnitError) as caught:
        parse_quantity("50 hz", D.FREQUENCY)
    assert str(caught.value) == "'50 hz': unknown unit 'hz'; did you mean 'Hz'?"


def test_number_without_unit_is_refused():
    with pytest.raises(UnitError) as caught:
        parse_quantity(230, D.VOLTAGE)
    assert str(caught.value) == (
        "the number 230 has no unit; write it with its unit, for example '230 V'")


def test_temperature_is_not_a_temperature_difference():
    # A rise (IEC 60034-1 limits, reference values §2) is a difference, in K; a temperature is in
    # °C. Mixing them is the classic error of reading a 40 °C ambient as a 40 K rise [P].
    with pytest.raises(UnitError) as caught:
        parse_quantity("40 °C", D.TEMPERATURE_DIFFERENCE)
    assert str(caught.value) == (
        "'40 °C' is a temperature; a temperature difference (rise) is written in K, "
        "for example '40 K'")
    with pytest.raises(UnitError) as caught:
        parse_quantity("65 K", D.TEMPERATURE)
    assert str(caught.value) == (
        "'65 K' is a temperature difference; a temperature is written in °C, "
        "for example '65 °C'")
    assert parse_quantity("40 °C", D.TEMPERATURE).dimension is not parse_quantity(
        "40 K", D.TEMPERATURE_DIFFERENCE).dimension


def test_absolute_zero():
    # Absolute zero is −273.15 °C by the definition of the Celsius scale (SI Brochure,
    # 9th ed., 2.3.1) [S]; at it is allowed, below it is not.
    assert parse_quantity("-273.15 °C", D.TEMPERATURE).value == -273.15
    with pytest.raises(UnitError) as caught:
        parse_quantity("-273.2 °C", D.TEMPERATURE)
    assert str(caught.value) == "'-273.2 °C' is below absolute zero (-273.15 °C)"


@pytest.mark.parametrize("text", ["nan", "inf", "-inf", "NaN V", "inf V", "1e999 V"])
def test_not_finite_text_is_refused(text):
    with pytest.raises(UnitError, match="not a finite number"):
        parse_quantity(text, D.VOLTAGE)


@pytest.mark.parametrize("value", [float("nan"), float("inf"), float("-inf")])
def test_not_finite_number_is_refused(value):
    with pytest.raises(UnitError, match="not a finite number"):
        parse_quantity(value, D.NUMBER)


@pytest.mark.parametrize("value", [None, True, False])
def test_no_value_is_not_a_quantity(value):
    with pytest.raises(UnitError, match="expected a voltage such as '230 V'"):
        parse_quantity(value, D.VOLTAGE)


def test_case_matters_for_prefixes():
    # "MV" (megavolt) is not "mV" (millivolt): a factor of 10⁹ (SI Brochure Table 7) [S].
    with pytest.raises(UnitError, match="unknown unit 'MV'"):
        parse_quantity("230 MV", D.VOLTAGE)
