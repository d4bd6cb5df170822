"""Checks of acceptance.computations.duty against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.duty import (
    assess_intermittent_duty,
    duty_cycle_from_times,
    equivalent_thermal_current,
    nec_430_22_e_percent,
    nec_630_11_multiplier,
)

FLOAT_RELATIVE = 1e-12


def test_example_40_a_at_50_percent():
    # reference values §10: 40 A at 50 % → 28.4 A with the NEC Table 630.11(A) multiplier,
    # 28.28 A by √D [S]
    assert 40.0 * nec_630_11_multiplier(0.5).multiplier == pytest.approx(28.4, rel=FLOAT_RELATIVE)
    assert equivalent_thermal_current(40.0, 0.5) == pytest.approx(28.28, abs=5e-3)


@pytest.mark.parametrize(
    ("duty_cycle", "multiplier"),
    [
        (1.00, 1.00), (0.90, 0.95), (0.80, 0.89), (0.70, 0.84), (0.60, 0.78),
        (0.50, 0.71), (0.40, 0.63), (0.30, 0.55), (0.20, 0.45),
    ],
)
def test_nec_table_630_11_a_nonmotor_generator(duty_cycle, multiplier):
    # NEC Table 630.11(A), non-motor-generator welders (reference values §10) [S]
    result = nec_630_11_multiplier(duty_cycle)
    assert result.multiplier == multiplier
    assert (result.clause, result.status) == ("Table 630.11(A)", "S")
    # reference values §10 says the column equals √D rounded to two decimals; that holds for every
    # row but 60 %, where the table's 0.78 sits above √0.6 = 0.7746 (0.77): within 0.01
    assert multiplier == pytest.approx(math.sqrt(duty_cycle), abs=0.01)


@pytest.mark.parametrize(
    ("duty_cycle", "multiplier"),
    [(1.0, 1.00), (0.9, 0.96), (0.5, 0.75), (0.2, 0.55)],
)
def test_nec_table_630_11_a_motor_generator(duty_cycle, multiplier):
    # NEC Table 630.11(A), motor-generator welders [M]
    result = nec_630_11_multiplier(duty_cycle, "motor_generator")
    assert (result.multiplier, result.status) == (multiplier, "M")


@pytest.mark.parametrize(
    ("duty_cycle", "row", "multiplier"),
    [
        (0.55, "60 %", 0.78),  # between rows: next higher row, the larger multiplier
        (0.15, "20 % or less", 0.45),  # NEC Table 630.11(A), "20 or less" [S]
        (0.05, "20 % or less", 0.45),  # NEC Table 630.11(A), "20 or less" [S]
    ],
)
def test_nec_rows_between_and_below(duty_cycle, row, multiplier):
    result = nec_630_11_multiplier(duty_cycle)
    assert (result.table_row, result.multiplier) == (row, multiplier)


@given(st.floats(min_value=0.2, max_value=1.0))
def test_table_multiplier_never_below_the_square_root(duty_cycle):
    # Taking the next higher row keeps the multiplier at or above √D (to table rounding)
    assert nec_630_11_multiplier(duty_cycle).multiplier >= math.sqrt(duty_cycle) - 0.005


@given(st.floats(min_value=0.0, max_value=1e4), st.floats(min_value=1e-6, max_value=1.0))
def test_equivalent_current_never_exceeds_the_on_current(current, duty_cycle):
    assert equivalent_thermal_current(current, duty_cycle) <= current


@given(st.floats(min_value=0.0, max_value=1e4))
def test_continuous_duty_is_the_current_itself(current):
    assert equivalent_thermal_current(current, 1.0) == current


@given(st.floats(min_value=0.0, max_value=1e4), st.floats(min_value=1e-3, max_value=1.0))
def test_heating_is_preserved(current, duty_cycle):
    # I_eq² = D·I²: equal I²R over a period
    assert equivalent_thermal_current(current, duty_cycle) ** 2 == pytest.approx(
        duty_cycle * current**2, rel=1e-12, abs=1e-300
    )


def test_duty_cycle_from_times():
    # IEC 60974-1 rates welders over a 10-min period: 4 min on is 40 % [M]
    assert duty_cycle_from_times(240.0, 600.0) == pytest.approx(0.4, rel=FLOAT_RELATIVE)


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: equivalent_thermal_current(40.0, 1.2),
         "duty_cycle 1.2 must be a fraction in 0 < D ≤ 1 (1.0 = 100 %)"),
        (lambda: equivalent_thermal_current(40.0, 0.0),
         "duty_cycle 0 must be a fraction in 0 < D ≤ 1 (1.0 = 100 %)"),
        (lambda: equivalent_thermal_current(40.0, 60.0),
         "duty_cycle 60 must be a fraction in 0 < D ≤ 1 (1.0 = 100 %)"),
        (lambda: equivalent_thermal_current(-40.0, 0.5), "current -40 A must not be negative"),
        (lambda: nec_630_11_multiplier(0.5, "inverter"),
         "welder_kind 'inverter' must be 'nonmotor_generator' or 'motor_generator'"),
        (lambda: duty_cycle_from_times(700.0, 600.0),
         "on_time 700 s is longer than period 600 s"),
    ],
)
def test_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


def test_assessment_against_conductor_and_device():
    # 40 A at 50 %: I_eq 28.28 A. A 30 A conductor carries it (NEC 630.11(A)) [S]; a 60 A
    # device is within 200 % of the 40 A rating and of the 30 A ampacity (630.12) [M]
    result = assess_intermittent_duty(40.0, 0.5, conductor_ampacity=30.0, device_rating=60.0)
    assert result.equivalent_current == pytest.approx(40 * math.sqrt(0.5), rel=FLOAT_RELATIVE)
    assert result.conductor_adequate is True
    assert result.device_not_below_equivalent is True
    assert result.device_within_200_percent_of_rated is True
    assert result.device_within_200_percent_of_ampacity is True


def test_assessment_flags_an_oversized_device_and_a_small_conductor():
    result = assess_intermittent_duty(40.0, 0.5, conductor_ampacity=25.0, device_rating=90.0)
    assert result.conductor_adequate is False  # 25 A < 28.28 A
    assert result.device_within_200_percent_of_rated is False  # 90 A > 80 A
    assert result.device_within_200_percent_of_ampacity is False  # 90 A > 50 A


def test_assessment_without_ratings():
    result = assess_intermittent_duty(40.0, 0.5)
    assert (result.conductor_adequate, result.device_not_below_equivalent,
            result.device_within_200_percent_of_ampacity) == (None, None, None)


# NEC Table 430.22(E), percent of nameplate current by duty class and time rating [M]
# (reference values §10).
@pytest.mark.parametrize(("duty_class", "time_rating", "percent"), [
    ("short-time", "5 min", 110), ("short-time", "15 min", 120), ("short-time", "60 min", 150),
    ("intermittent", "5 min", 85), ("intermittent", "30 min", 90),
    ("intermittent", "continuous", 140), ("periodic", "15 min", 90),
    ("periodic", "continuous", 140), ("varying", "continuous", 200),
])
def test_nec_430_22_e_percentages(duty_class, time_rating, percent):
    row = nec_430_22_e_percent(duty_class, time_rating)
    assert row.percent == percent
    assert row.clause == "430.22(E), Table 430.22(E)"


def test_short_time_duty_has_no_continuous_rating():
    with pytest.raises(ComputationError, match="no percentage"):
        nec_430_22_e_percent("short-time", "continuous")
