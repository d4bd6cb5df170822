"""Checks of acceptance.computations.resistance against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.resistance import (
    ALUMINIUM_225,
    ALUMINIUM_228,
    ALUMINIUM_RESISTIVITY,
    ANNEALED_COPPER_RESISTIVITY,
    CONDUCTOR_CONSTANTS,
    COPPER_234_5,
    COPPER_235,
    awg_cross_section_mm2,
    awg_diameter_mm,
    awg_index,
    conductor_constant,
    conductor_resistance,
    expected_bonding_resistance,
    iec_60204_1_bonding_test_current,
    iec_60204_1_bonding_voltage_drop,
    iec_60228_resistance,
    nec_table_8_resistance,
    resistance_at_temperature,
    temperature_coefficient_at_20c,
)

# Figures quoted to four decimals are checked to half a unit of the last decimal: the four
# constants move the 22 → 75 °C example by at least 1 mΩ, twenty times this tolerance.
FOUR_DECIMALS = 5e-5
# Arithmetic recomputed here in full precision: only float rounding separates the two.
FLOAT_RELATIVE = 1e-12

FEET = 0.3048  # m, exact by definition of the international foot


# -------------------------------------------------------------------------- §1 correction


@pytest.mark.parametrize(
    ("constant", "expected"),
    [
        (COPPER_234_5, 3.0166),  # reference values §1, copper IEC 60228 / IEEE 112 [S]
        (COPPER_235, 3.0156),  # reference values §1, copper IEC 60034-1 / IEC 60076-2 [S]
        (ALUMINIUM_225, 3.0364),  # reference values §1, aluminium IEC 60034-1 / IEEE [M]
        (ALUMINIUM_228, 3.0300),  # reference values §1, aluminium IEC 60228 [S]
    ],
)
def test_correction_example_22_to_75_c(constant, expected):
    result = resistance_at_temperature(2.500, 22.0, 75.0, constant)
    assert result == pytest.approx(expected, abs=FOUR_DECIMALS)


def test_correction_accepts_a_bare_constant():
    # R2 = R1 (k + T2)/(k + T1) with k = 235, IEC 60034-1 [S]
    assert resistance_at_temperature(2.5, 22.0, 75.0, 235.0) == pytest.approx(
        2.5 * 310.0 / 257.0, rel=FLOAT_RELATIVE
    )


def test_iec_60228_boundary_example():
    # reference values §1: 100 m of 2.5 mm² class 2 copper, 0.755 Ω at 25 °C → 7.405 Ω/km at 20 °C,
    # inside the IEC 60228 Table 2 maximum of 7.41 Ω/km [S]. Quoted to 3 decimals in Ω/km.
    per_km = resistance_at_temperature(0.755, 25.0, 20.0, COPPER_234_5) * 10.0
    assert per_km == pytest.approx(7.405, abs=5e-4)
    assert per_km <= iec_60228_resistance(2.5, 2).tabulated_value


def test_linearised_vendor_factor_is_not_used():
    # reference values §1 trap: 1/(1 + 0.004·55) = 0.820, the formula gives 0.8223 (IEC 60228 k) [S]
    factor = resistance_at_temperature(1.0, 75.0, 20.0, COPPER_234_5)
    assert factor == pytest.approx(0.8223, abs=FOUR_DECIMALS)
    assert abs(factor - 1.0 / (1.0 + 0.004 * 55.0)) > 2e-3


@pytest.mark.parametrize(
    ("constant", "published_alpha"),
    [
        (COPPER_234_5, 0.00393),  # IEC 60228 Annex B, copper 0.00393 /K [M]
        (ALUMINIUM_228, 0.00403),  # IEC 60228 Annex B, aluminium 0.00403 /K [M]
    ],
)
def test_alpha_20(constant, published_alpha):
    # published to three significant figures: half a unit of the third figure
    assert temperature_coefficient_at_20c(constant) == pytest.approx(published_alpha, abs=5e-6)
    assert constant.alpha_20 == temperature_coefficient_at_20c(constant)


@pytest.mark.parametrize(
    ("material", "standard", "expected"),
    [
        ("copper", "IEC 60034-1", COPPER_235),  # reference values §1 [S]
        ("copper", "IEC 60076-2", COPPER_235),  # reference values §1 [S]
        ("copper", "IEEE C57.12.90", COPPER_234_5),  # reference values §1 [S]
        ("Cu", "iec60228", COPPER_234_5),  # reference values §1 [S]
        ("aluminum", "IEEE 112", ALUMINIUM_225),  # reference values §1 [M]
        ("aluminium", "IEC 60228", ALUMINIUM_228),  # reference values §1 [S]
    ],
)
def test_conductor_constant_by_standard(material, standard, expected):
    assert conductor_constant(material, standard) is expected


def test_constant_names_itself_for_the_record():
    assert COPPER_235.describe() == "copper k = 235 °C (IEC 60034-1, IEC 60076-2)"
    assert len({c.temperature_constant for c in CONDUCTOR_CONSTANTS}) == 4


@pytest.mark.parametrize(
    ("material", "standard", "message"),
    [
        ("silver", "IEC 60228", "material 'silver' is not known; use 'copper' or 'aluminium'"),
        ("copper", "IEC 99999",
         "standard 'IEC 99999' has no recorded copper constant; known: IEC 60034-1, "
         "IEC 60076-2, IEC 60228, IEEE 112, IEEE C57.12.90"),
    ],
)
def test_conductor_constant_unknown(material, standard, message):
    with pytest.raises(ComputationError) as caught:
        conductor_constant(material, standard)
    assert str(caught.value) == message


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        ((-1.0, 20.0, 75.0), "resistance -1 Ω must be greater than 0 Ω"),
        ((0.0, 20.0, 75.0), "resistance 0 Ω must be greater than 0 Ω"),
        ((1.0, -300.0, 75.0),
         "measured_temperature_c -300 °C is below absolute zero (-273.15 °C)"),
        ((1.0, 20.0, -274.0),
         "target_temperature_c -274 °C is below absolute zero (-273.15 °C)"),
        ((1.0, -250.0, 20.0),
         "measured_temperature_c -250 °C is at or below -k (-234.5 °C), "
         "where the linear resistance model does not hold"),
        ((math.nan, 20.0, 75.0), "resistance nan Ω must be a finite number"),
        (("1.0", 20.0, 75.0), "resistance '1.0' must be a number in Ω"),
    ],
)
def test_correction_rejects_bad_input(arguments, message):
    with pytest.raises(ComputationError) as caught:
        resistance_at_temperature(*arguments, COPPER_234_5)
    assert str(caught.value) == message


temperatures = st.floats(min_value=-40.0, max_value=250.0)
resistances = st.floats(min_value=1e-6, max_value=1e6)
constants = st.sampled_from(CONDUCTOR_CONSTANTS)


@given(resistances, temperatures, constants)
def test_same_temperature_changes_nothing(resistance, temperature, constant):
    assert resistance_at_temperature(resistance, temperature, temperature, constant) == (
        pytest.approx(resistance, rel=FLOAT_RELATIVE)
    )


@given(resistances, temperatures, temperatures, constants)
def test_correction_round_trips(resistance, first, second, constant):
    there = resistance_at_temperature(resistance, first, second, constant)
    back = resistance_at_temperature(there, second, first, constant)
    assert back == pytest.approx(resistance, rel=1e-9)  # two float divisions


@given(resistances, temperatures, temperatures, temperatures, constants)
def test_correction_composes(resistance, first, second, third, constant):
    via = resistance_at_temperature(
        resistance_at_temperature(resistance, first, second, constant), second, third, constant
    )
    direct = resistance_at_temperature(resistance, first, third, constant)
    assert via == pytest.approx(direct, rel=1e-9)


@given(resistances, temperatures, temperatures, constants)
def test_warmer_is_higher(resistance, first, second, constant):
    assume(abs(second - first) > 1e-6)
    corrected = resistance_at_temperature(resistance, first, second, constant)
    assert (corrected > resistance) == (second > first)


# -------------------------------------------------------------------------- resistivity


def test_annealed_copper_resistivity():
    # IEC 60028: 1/58 Ω·mm²/m = 0.017241 Ω·mm²/m (reference values §1) [S]; six decimals quoted
    assert ANNEALED_COPPER_RESISTIVITY.resistivity * 1e6 == pytest.approx(0.017241, abs=5e-7)
    assert "IEC 60028" in ANNEALED_COPPER_RESISTIVITY.describe()


def test_aluminium_resistivity_is_61_percent_iacs():
    # IEC 60889 hard-drawn aluminium 61 % IACS: ρ_Cu / 0.61 = 0.028264 Ω·mm²/m [M],
    # published to five significant figures
    assert ALUMINIUM_RESISTIVITY.resistivity == pytest.approx(
        ANNEALED_COPPER_RESISTIVITY.resistivity / 0.61, rel=5e-5
    )


def test_conductor_resistance_from_resistivity():
    # R = ρL/A: 1 km of 1 mm² annealed copper is 17.241 Ω (IEC 60028) [S]
    assert conductor_resistance(1000.0, 1.0, ANNEALED_COPPER_RESISTIVITY) == pytest.approx(
        1000.0 / 58.0, rel=FLOAT_RELATIVE
    )


# -------------------------------------------------------------------------- §8 tables


@pytest.mark.parametrize(
    ("gauge", "solid", "stranded"),
    [
        (14, 3.07, 3.14),  # NEC Chapter 9 Table 8 (reference values §8) [S]
        (12, 1.93, 1.98),  # NEC Chapter 9 Table 8 (reference values §8) [S]
        (10, 1.21, 1.24),  # NEC Chapter 9 Table 8 (reference values §8) [S]
        (8, 0.764, 0.778),  # NEC Chapter 9 Table 8 (reference values §8) [S]
    ],
)
def test_nec_table_8_published_rows(gauge, solid, stranded):
    assert nec_table_8_resistance(gauge, "solid").tabulated_value == solid
    row = nec_table_8_resistance(gauge, "stranded")
    assert row.tabulated_value == stranded
    assert row.status == "S"
    assert row.resistance_per_length == pytest.approx(stranded / (1000 * FEET), rel=FLOAT_RELATIVE)


@pytest.mark.parametrize(
    "gauge", [18, 16, 14, 12, 10, 8, 6, 4, 3, 2, 1, "1/0", "2/0", "3/0", "4/0"]
)
def test_nec_table_8_rows_agree_with_resistivity(gauge):
    # Independent check of every row, including those from memory [M]: annealed copper
    # (IEC 60028) at 75 °C (k 234.5, IEC 60228) over the ASTM B258 area. Solid wire matches
    # within 1.5 % (rounding, copper grade); stranding adds 1-4 % (lay length) [P].
    solid_estimate = resistance_at_temperature(
        conductor_resistance(1000 * FEET, awg_cross_section_mm2(gauge),
                             ANNEALED_COPPER_RESISTIVITY),
        20.0, 75.0, COPPER_234_5,
    )
    stranded = nec_table_8_resistance(gauge, "stranded").tabulated_value
    assert 1.0 < stranded / solid_estimate < 1.045
    if awg_index(gauge) >= 8:
        solid = nec_table_8_resistance(gauge, "solid").tabulated_value
        assert solid / solid_estimate == pytest.approx(1.0, abs=0.015)


@pytest.mark.parametrize(
    ("size", "class_12", "class_5"),
    [
        (1.5, 12.1, 13.3),  # IEC 60228 Tables 2 and 3 (reference values §8) [S]
        (2.5, 7.41, 7.98),  # IEC 60228 Tables 2 and 3 (reference values §8) [S]
        (4.0, 4.61, 4.95),  # IEC 60228 Tables 2 and 3 (reference values §8) [S]
        (6.0, 3.08, 3.30),  # IEC 60228 Tables 2 and 3 (reference values §8) [S]
    ],
)
def test_iec_60228_published_rows(size, class_12, class_5):
    assert iec_60228_resistance(size, 1).tabulated_value == class_12
    assert iec_60228_resistance(size, 2).tabulated_value == class_12
    row = iec_60228_resistance(size, 5)
    assert row.tabulated_value == class_5
    assert row.resistance_per_length == pytest.approx(class_5 / 1000, rel=FLOAT_RELATIVE)
    assert (row.standard, row.clause, row.status) == (
        "IEC 60228", "Table 3 (maximum resistance at 20 °C)", "S"
    )


@pytest.mark.parametrize("size", [0.5, 0.75, 1, 1.5, 2.5, 4, 6, 10, 16, 25, 35, 50, 70, 95, 120])
def test_iec_60228_rows_agree_with_resistivity(size):
    # Independent check of every row, including those from memory [M]: the maximum lies
    # above ρ/A of annealed copper (IEC 60028) by the allowance for stranding and for an
    # actual area below nominal, 4-13 % for class 1-2 and 10-17 % for class 5 [P]. A
    # misplaced digit or a swapped row falls outside these bands.
    nominal = conductor_resistance(1000.0, size, ANNEALED_COPPER_RESISTIVITY)
    assert 1.04 < iec_60228_resistance(size, 2).tabulated_value / nominal < 1.13
    assert 1.10 < iec_60228_resistance(size, 5).tabulated_value / nominal < 1.17


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: nec_table_8_resistance(20), "gauge 20 is not in the encoded NEC Chapter 9 "
         "Table 8 rows (18 AWG … 4/0 AWG)"),
        (lambda: nec_table_8_resistance(6, "solid"),
         "gauge 6 is tabulated only as stranded in NEC Chapter 9 Table 8"),
        (lambda: nec_table_8_resistance(12, "braided"),
         "stranding 'braided' must be 'solid' or 'stranded'"),
        (lambda: iec_60228_resistance(3.0), "cross_section_mm2 3 mm² is not a tabulated "
         "IEC 60228 size; use one of 0.5, 0.75, 1, 1.5, 2.5, 4, 6, 10, 16, 25, 35, 50, 70, "
         "95, 120"),
        (lambda: iec_60228_resistance(2.5, 6), "conductor_class 6 must be 1, 2 or 5"),
        (lambda: iec_60228_resistance(-2.5), "cross_section_mm2 -2.5 mm² must be greater than "
         "0 mm²"),
    ],
)
def test_tables_reject_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


# -------------------------------------------------------------------------- AWG


@pytest.mark.parametrize(
    ("gauge", "inches"),
    [
        (36, 0.0050),  # ASTM B258, defining point [S]
        ("4/0", 0.4600),  # ASTM B258, defining point [S]
        ("0000", 0.4600),  # ASTM B258, the same size written as zeros [S]
    ],
)
def test_awg_defining_diameters(gauge, inches):
    assert awg_diameter_mm(gauge) == pytest.approx(inches * 25.4, rel=FLOAT_RELATIVE)


@pytest.mark.parametrize(
    ("gauge", "circular_mils"),
    [
        (12, 6530),  # NEC Chapter 9 Table 8, area column [M]
        (10, 10380),  # NEC Chapter 9 Table 8, area column [M]
        ("1/0", 105600),  # NEC Chapter 9 Table 8, area column [M]
        ("4/0", 211600),  # NEC Chapter 9 Table 8, area column [M]
    ],
)
def test_awg_area_matches_nec_circular_mils(gauge, circular_mils):
    # circular mils = (diameter in mils)²; the table rounds to four significant figures
    # (≤ 5e-4) from diameters rounded to 0.1 mil (≤ 3e-4 for 1/0), hence 1e-3
    mils = awg_diameter_mm(gauge) / 0.0254
    assert mils**2 == pytest.approx(circular_mils, rel=1e-3)
    assert awg_cross_section_mm2(gauge) == pytest.approx(
        math.pi / 4 * awg_diameter_mm(gauge) ** 2, rel=FLOAT_RELATIVE
    )


@pytest.mark.parametrize(
    ("gauge", "index"),
    [(12, 12), ("12", 12), ("12 AWG", 12), ("1/0", 0), ("0", 0), ("2/0", -1), ("00", -1),
     ("3/0", -2), ("4/0", -3), ("4/0 awg", -3)],
)
def test_awg_index(gauge, index):
    assert awg_index(gauge) == index


@pytest.mark.parametrize("gauge", ["5/0", "00000", "abc", 41, 0.5, "-3"])
def test_awg_index_rejects(gauge):
    with pytest.raises(ComputationError) as caught:
        awg_index(gauge)
    assert str(caught.value) == (
        f"gauge {gauge!r} is not an AWG size; use 40 … 1, 1/0, 2/0, 3/0 or 4/0"
    )


@given(st.integers(min_value=-3, max_value=37))
def test_three_gauges_double_the_area(index):
    # ASTM B258 geometric series: area ratio over 3 gauges is 92^(6/39) ≈ 2.005 [S]
    gauge = str(index) if index > 0 else f"{1 - index}/0"
    smaller = str(index + 3)
    assert awg_cross_section_mm2(gauge) / awg_cross_section_mm2(smaller) == pytest.approx(
        92 ** (6 / 39), rel=1e-9
    )


# -------------------------------------------------------------------------- §6 bonding


def test_bonding_example_15_m_of_2_5_mm2():
    # reference values §6: 15 m of 2.5 mm² copper → 15 × 7.41 mΩ = 0.111 Ω at 20 °C [M, IEC 60228 S]
    estimate = expected_bonding_resistance(15.0, 2.5)
    assert estimate.resistance == pytest.approx(15 * 7.41e-3, rel=FLOAT_RELATIVE)
    assert estimate.resistance == pytest.approx(0.111, abs=5e-4)  # quoted to 3 decimals
    assert "IEC 60228" in estimate.basis


def test_bonding_corrected_to_conductor_temperature():
    # R(30 °C) = R20 (234.5 + 30)/(234.5 + 20), IEC 60228 Annex B [S]
    estimate = expected_bonding_resistance(15.0, 2.5, conductor_temperature_c=30.0)
    assert estimate.resistance == pytest.approx(15 * 7.41e-3 * 264.5 / 254.5, rel=FLOAT_RELATIVE)
    assert "corrected to 30 °C with copper k = 234.5 °C" in estimate.basis


def test_bonding_by_resistivity_for_aluminium():
    # ρ/A for aluminium (IEC 60889, 0.028264 Ω·mm²/m) [M] over 10 m of 16 mm²
    estimate = expected_bonding_resistance(10.0, 16.0, material="aluminium")
    assert estimate.resistance == pytest.approx(10 * 0.028264 / 16, rel=1e-9)


@pytest.mark.parametrize(
    ("size", "drop", "row"),
    [
        (1.0, 3.3, "1.0 mm²"),  # IEC 60204-1:2005 Table 9 (reference values §6) [M]
        (1.5, 2.6, "1.5 mm²"),  # IEC 60204-1:2005 Table 9 (reference values §6) [M]
        (2.5, 1.9, "2.5 mm²"),  # IEC 60204-1:2005 Table 9 (reference values §6) [M]
        (4.0, 1.4, "4.0 mm²"),  # IEC 60204-1:2005 Table 9 (reference values §6) [M]
        (10.0, 1.0, "> 6.0 mm²"),  # IEC 60204-1:2005 Table 9 (reference values §6) [M]
        (3.0, 1.9, "2.5 mm²"),  # between rows: the branch is at least 2.5 mm²
        (6.0, 1.4, "4.0 mm²"),  # 6.0 is not "> 6.0"
    ],
)
def test_iec_60204_1_2005_table_9(size, drop, row):
    limit = iec_60204_1_bonding_voltage_drop(size)
    assert (limit.max_voltage_drop, limit.table_row, limit.edition) == (drop, row, "2005")
    assert limit.max_resistance == pytest.approx(drop / 10.0, rel=FLOAT_RELATIVE)


def test_table_9_below_smallest_row():
    with pytest.raises(ComputationError) as caught:
        iec_60204_1_bonding_voltage_drop(0.75)
    assert str(caught.value) == (
        "cross_section_mm2 0.75 mm² is below the smallest row (1.0 mm²) of IEC 60204-1:2005 Table 9"
    )


@given(st.floats(min_value=1.0, max_value=300.0), st.floats(min_value=1.0, max_value=300.0))
def test_table_9_never_allows_more_for_a_larger_conductor(small, large):
    small, large = sorted((small, large))
    assert (iec_60204_1_bonding_voltage_drop(large).max_voltage_drop
            <= iec_60204_1_bonding_voltage_drop(small).max_voltage_drop)


# IEC 60204-1:2016 cl. 18.2.2: continuity test current at least 0.2 A, up to about 10 A [M]
@pytest.mark.parametrize(("current", "within"), [
    (0.19, False), (0.2, True), (10.0, True), (10.5, False)])
def test_bonding_test_current_range_of_iec_60204_1_2016(current, within):
    judged = iec_60204_1_bonding_test_current(current)
    assert judged.within_range is within
    assert (judged.edition, judged.clause, judged.status) == ("2016", "cl. 18.2.2", "M")
