"""Checks of acceptance.computations.temperature_rise against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.resistance import (
    ALUMINIUM_225,
    CONDUCTOR_CONSTANTS,
    COPPER_234_5,
    COPPER_235,
    resistance_at_temperature,
)
from acceptance.computations.temperature_rise import (
    THERMAL_CLASSES,
    ThermalClass,
    coil_rise_limit,
    iec_60034_1_rise_limit,
    nema_mg_1_rise_limit,
    temperature_rise_by_resistance,
    thermal_class,
    transformer_rise_limit,
    winding_temperature_by_resistance,
)

# Rises quoted to two decimals are checked to half a unit of the last decimal; the
# competing constants 235 and 234.5 move the §2 example by 0.16 K, thirty times this.
TWO_DECIMALS = 5e-3
FLOAT_RELATIVE = 1e-12


# -------------------------------------------------------------------------- §2 examples


def test_rise_example_small_winding():
    # reference values §2: R1 0.200 Ω at 20 °C, R2 0.210 Ω, θa 25 °C, k 235 → 7.75 K
    # (IEC 60034-1 cl. 8.6.2) [S]
    rise = temperature_rise_by_resistance(0.200, 0.210, 20.0, 25.0, COPPER_235)
    assert rise == pytest.approx(7.75, abs=TWO_DECIMALS)


@pytest.mark.parametrize(
    ("constant", "expected"),
    [
        (COPPER_235, 69.69),  # reference values §2, IEC 60034-1 copper [S]
        (COPPER_234_5, 69.53),  # reference values §2, IEEE 112 copper [S]
        (ALUMINIUM_225, 66.56),  # reference values §2, IEC 60034-1 aluminium [S]
    ],
)
def test_rise_example_by_constant(constant, expected):
    rise = temperature_rise_by_resistance(0.800, 1.050, 20.0, 30.0, constant)
    assert rise == pytest.approx(expected, abs=TWO_DECIMALS)


def test_winding_temperature_is_rise_plus_coolant():
    # θ2 = R2/R1 (k + θ1) − k equals Δθ + θa (IEC 60034-1 cl. 8.6.2) [S]
    temperature = winding_temperature_by_resistance(0.800, 1.050, 20.0, COPPER_235)
    assert temperature == pytest.approx(1.05 / 0.8 * 255.0 - 235.0, rel=FLOAT_RELATIVE)
    assert temperature - 30.0 == pytest.approx(
        temperature_rise_by_resistance(0.800, 1.050, 20.0, 30.0, COPPER_235), rel=FLOAT_RELATIVE
    )


@given(
    st.floats(min_value=1e-3, max_value=1e3),
    st.floats(min_value=-20.0, max_value=40.0),
    st.floats(min_value=-20.0, max_value=200.0),
    st.sampled_from(CONDUCTOR_CONSTANTS),
)
def test_resistance_method_inverts_temperature_correction(cold, cold_c, hot_c, constant):
    # The resistance method is the temperature correction solved for temperature
    # (IEC 60034-1 cl. 8.6.2; IEC 60228 Annex B) [S]
    hot = resistance_at_temperature(cold, cold_c, hot_c, constant)
    assert winding_temperature_by_resistance(cold, hot, cold_c, constant) == pytest.approx(
        hot_c, abs=1e-9
    )


@given(st.floats(min_value=1e-3, max_value=1e3), st.floats(min_value=-20.0, max_value=60.0))
def test_unchanged_resistance_means_no_rise_over_the_cold_temperature(resistance, cold_c):
    # R2 = R1 gives θ2 = θ1 (IEC 60034-1 cl. 8.6.2) [S]
    rise = temperature_rise_by_resistance(resistance, resistance, cold_c, cold_c, COPPER_235)
    assert rise == pytest.approx(0.0, abs=1e-9)


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        ((-0.2, 0.21, 20.0, 25.0), "cold_resistance -0.2 Ω must be greater than 0 Ω"),
        ((0.2, 0.0, 20.0, 25.0), "hot_resistance 0 Ω must be greater than 0 Ω"),
        ((0.2, 0.21, -300.0, 25.0),
         "cold_temperature_c -300 °C is below absolute zero (-273.15 °C)"),
        ((0.2, 0.21, 20.0, -280.0),
         "coolant_temperature_c -280 °C is below absolute zero (-273.15 °C)"),
        ((0.2, 0.21, -240.0, 25.0),
         "cold_temperature_c -240 °C is at or below -k (-235 °C), "
         "where the linear resistance model does not hold"),
    ],
)
def test_rise_rejects_bad_input(arguments, message):
    with pytest.raises(ComputationError) as caught:
        temperature_rise_by_resistance(*arguments, COPPER_235)
    assert str(caught.value) == message


# -------------------------------------------------------------------------- classes


@pytest.mark.parametrize(
    ("designation", "temperature", "letter"),
    [
        (90, 90, "Y"),  # IEC 60085 Table 1 (reference values §2) [S]
        ("A", 105, "A"),  # IEC 60085 Table 1 [S]
        ("120", 120, "E"),  # IEC 60085 Table 1 [S]
        ("class B", 130, "B"),  # IEC 60085 Table 1 [S]
        ("155 (F)", 155, "F"),  # IEC 60085 Table 1 [S]
        ("h", 180, "H"),  # IEC 60085 Table 1 [S]
        (200, 200, "N"),  # IEC 60085 Table 1 [S]
        ("R", 220, "R"),  # IEC 60085 Table 1 [S]
        (250, 250, None),  # IEC 60085 Table 1, no letter [S]
    ],
)
def test_thermal_classes(designation, temperature, letter):
    klass = thermal_class(designation)
    assert (klass.temperature_c, klass.letter) == (temperature, letter)
    assert thermal_class(klass) is klass


def test_thermal_classes_are_ordered_and_describe_themselves():
    assert list(THERMAL_CLASSES) == sorted(THERMAL_CLASSES)
    assert ThermalClass(155, "F").describe() == "155 (F)"
    assert ThermalClass(250, None).describe() == "250"


@pytest.mark.parametrize("designation", ["Q", 140, "155 (B)", ""])
def test_unknown_thermal_class(designation):
    with pytest.raises(ComputationError) as caught:
        thermal_class(designation)
    assert str(caught.value) == (
        f"thermal_class {designation!r} is not an IEC 60085 thermal class; use one of "
        "90 (Y), 105 (A), 120 (E), 130 (B), 155 (F), 180 (H), 200 (N), 220 (R), 250"
    )


# -------------------------------------------------------------------------- limits


@pytest.mark.parametrize(
    ("designation", "limit", "status"),
    [
        ("B", 80.0, "S"),  # IEC 60034-1 Table 7, by resistance (reference values §2) [S]
        ("F", 105.0, "S"),  # IEC 60034-1 Table 7, by resistance (reference values §2) [S]
        ("H", 125.0, "S"),  # IEC 60034-1 Table 7, by resistance (reference values §2) [S]
    ],
)
def test_iec_60034_1_limits(designation, limit, status):
    result = iec_60034_1_rise_limit(designation)
    assert (result.limit, result.status, result.standard) == (limit, status, "IEC 60034-1")
    assert result.coolant_temperature_c == 40.0
    assert result.clause.startswith("cl. 8.3, Table 7") and result.edition


def test_iec_60034_1_limit_describes_its_source():
    assert iec_60034_1_rise_limit("F").describe() == (
        "Δθ ≤ 105 K (class 155 (F), IEC 60034-1:2010 cl. 8.3, Table 7 (resistance method))"
    )


@pytest.mark.parametrize(
    ("coolant", "limit"),
    [
        (40.0, 105.0),  # IEC 60034-1 Table 7, reference coolant [S]
        (25.0, 105.0),  # IEC 60034-1 Table 10: no adjustment 0 … 40 °C [M]
        (45.0, 100.0),  # IEC 60034-1 Table 10: reduce by the excess over 40 °C [M]
        (60.0, 85.0),  # IEC 60034-1 Table 10: reduce by the excess over 40 °C [M]
    ],
)
def test_iec_60034_1_coolant_adjustment(coolant, limit):
    result = iec_60034_1_rise_limit("F", coolant)
    assert result.limit == limit
    if coolant > 40:
        assert result.note == f"reduced by {coolant - 40:g} K for a coolant of {coolant:g} °C"


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: iec_60034_1_rise_limit("F", 65.0),
         "coolant_temperature_c 65 °C is outside 0 … 60 °C; IEC 60034-1 leaves the limit "
         "to agreement there"),
        (lambda: iec_60034_1_rise_limit("N"),
         "thermal_class 200 (N) is not in IEC 60034-1:2010 Table 7, which holds 130 (B), "
         "155 (F) and 180 (H) only"),
        # IEC 60034-1:2010 Table 7 has no class 105 (A) or 120 (E) column [M]: the older
        # classes need a source that gives them (the manufacturer's limit).
        (lambda: iec_60034_1_rise_limit("A"),
         "thermal_class 105 (A) is not in IEC 60034-1:2010 Table 7, which holds 130 (B), "
         "155 (F) and 180 (H) only"),
        (lambda: iec_60034_1_rise_limit("E"),
         "thermal_class 120 (E) is not in IEC 60034-1:2010 Table 7, which holds 130 (B), "
         "155 (F) and 180 (H) only"),
        (lambda: nema_mg_1_rise_limit("H", 1.15),
         "thermal_class 180 (H) has no NEMA MG 1 rise limit for service factor 1.15; "
         "tabulated classes: A, B, F"),
        (lambda: nema_mg_1_rise_limit("B", 1.1),
         "service_factor 1.1 is not tabulated; NEMA MG 1 gives rows for 1.0 and for 1.15 "
         "or higher"),
        (lambda: nema_mg_1_rise_limit("B", -1.0), "service_factor -1 must be greater than 0"),
    ],
)
def test_limits_reject_what_they_do_not_cover(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


@pytest.mark.parametrize(
    ("designation", "service_factor", "limit"),
    [
        ("A", 1.0, 60.0),  # NEMA MG 1, SF 1.0 at 40 °C (reference values §2) [S]
        ("B", 1.0, 80.0),  # NEMA MG 1, SF 1.0 at 40 °C (reference values §2) [S]
        ("F", 1.0, 105.0),  # NEMA MG 1, SF 1.0 at 40 °C (reference values §2) [S]
        ("H", 1.0, 125.0),  # NEMA MG 1, SF 1.0 at 40 °C (reference values §2) [S]
        ("A", 1.15, 70.0),  # NEMA MG 1, SF 1.15 at 40 °C (reference values §2) [S]
        ("B", 1.15, 90.0),  # NEMA MG 1, SF 1.15 at 40 °C (reference values §2) [S]
        ("F", 1.15, 115.0),  # NEMA MG 1, SF 1.15 at 40 °C (reference values §2) [S]
        ("F", 1.25, 115.0),  # NEMA MG 1: the 1.15 row covers "1.15 or higher" [S]
    ],
)
def test_nema_mg_1_limits(designation, service_factor, limit):
    result = nema_mg_1_rise_limit(designation, service_factor)
    assert (result.limit, result.standard, result.status) == (limit, "NEMA MG 1", "S")
    assert "12.43" in result.clause


@given(st.sampled_from(["A", "B", "F"]))
def test_service_factor_row_is_ten_kelvin_higher(letter):
    # NEMA MG 1 (reference values §2): the SF 1.15 row sits 10 K above the SF 1.0 row [S]
    assert nema_mg_1_rise_limit(letter, 1.15).limit - nema_mg_1_rise_limit(letter, 1.0).limit == 10


@given(st.floats(min_value=40.0, max_value=60.0), st.floats(min_value=40.0, max_value=60.0))
def test_warmer_coolant_never_allows_more_rise(first, second):
    low, high = sorted((first, second))
    assert iec_60034_1_rise_limit("B", high).limit <= iec_60034_1_rise_limit("B", low).limit


@pytest.mark.parametrize(("designation", "limit"), [
    # IEC 60034-1:2010 Table 7 items 1d/1e (below 600 W; IC 40 or encapsulated): 5 K above
    # items 1a–1c [M]
    ("B", 85.0), ("F", 110.0), ("H", 130.0)])
def test_iec_60034_1_small_or_encapsulated_allowance(designation, limit):
    result = iec_60034_1_rise_limit(designation, small_or_encapsulated=True)
    assert result.limit == limit
    assert "items 1d/1e" in result.clause and result.edition == "2010"


@pytest.mark.parametrize(("designation", "limit"), [
    # IEC 60076-11:2018 dry-type transformers, average winding rise by class [M]
    ("A", 60.0), ("E", 75.0), ("B", 80.0), ("F", 100.0), ("H", 125.0), (200, 135.0),
    (220, 150.0)])
def test_transformer_limits_are_not_those_of_rotating_machines(designation, limit):
    result = transformer_rise_limit(designation)
    assert (result.limit, result.standard) == (limit, "IEC 60076-11")


def test_dc_coil_limit_from_class_and_hot_spot_allowance():
    # IEC 60085:2007 Table 1: class 155 (F) is 155 °C [S]; less the 40 °C coolant and a
    # 15 K hot-spot allowance [P]: 100 K, exact.
    result = coil_rise_limit("F", 15.0)
    assert result.limit == 100.0
    assert (result.standard, result.status) == ("IEC 60085", "P")
