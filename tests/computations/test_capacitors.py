"""Checks of acceptance.computations.capacitors against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.capacitors import (
    capacitance_from_current,
    capacitance_window,
    capacitive_reactance,
    capacitor_current,
    discharge_time,
    equivalent_series_resistance,
    iec_60204_1_residual_voltage_check,
    maximum_bleeder_resistance,
    residual_voltage,
    stored_charge,
    stored_energy,
    tolerance_code,
)

MICRO = 1e-6
FLOAT_RELATIVE = 1e-12
# Figures quoted to two decimals: half a unit of the last decimal.
TWO_DECIMALS = 5e-3


# -------------------------------------------------------------------------- §13 tolerance


@pytest.mark.parametrize(
    ("letter", "lower", "upper"),
    [
        ("B", -0.001, 0.001),  # IEC 60062 (reference values §13) [M]
        ("C", -0.0025, 0.0025),  # IEC 60062 [M]
        ("D", -0.005, 0.005),  # IEC 60062 [M]
        ("F", -0.01, 0.01),  # IEC 60062 [M]
        ("G", -0.02, 0.02),  # IEC 60062 [M]
        ("J", -0.05, 0.05),  # IEC 60062 [M]
        ("K", -0.10, 0.10),  # IEC 60062 [M]
        ("M", -0.20, 0.20),  # IEC 60062 [M]
        ("N", -0.30, 0.30),  # IEC 60062 [M]
        ("z", -0.20, 0.80),  # IEC 60062, asymmetric −20/+80 % [M]
    ],
)
def test_tolerance_letters(letter, lower, upper):
    code = tolerance_code(letter)
    assert (code.lower, code.upper, code.absolute) == (lower, upper, False)


@pytest.mark.parametrize(
    ("letter", "low_uf", "high_uf"),
    [
        ("J", 17.10, 18.90),  # reference values §13, 18 µF J [M]
        ("K", 16.2, 19.8),  # reference values §13, 18 µF K [M]
        ("Z", 14.4, 32.4),  # IEC 60062 Z −20/+80 % of 18 µF [M]
    ],
)
def test_acceptance_windows_for_18_uf(letter, low_uf, high_uf):
    window = capacitance_window(18 * MICRO, letter)
    assert window.lower == pytest.approx(low_uf * MICRO, rel=FLOAT_RELATIVE)
    assert window.upper == pytest.approx(high_uf * MICRO, rel=FLOAT_RELATIVE)


def test_window_describes_itself():
    assert capacitance_window(18 * MICRO, "J").describe() == "17.1 µF ≤ C ≤ 18.9 µF"
    assert tolerance_code("Z").describe() == "Z: -20 / +80 %"
    assert tolerance_code("K").describe() == "K: ±10 %"


def test_small_capacitors_use_absolute_tolerances():
    # IEC 60062: below 10 pF the letters B-G are absolute, C = ±0.25 pF [M]
    window = capacitance_window(4.7e-12, "C")
    assert window.code.absolute
    assert window.lower == pytest.approx(4.45e-12, rel=1e-9)
    assert window.upper == pytest.approx(4.95e-12, rel=1e-9)
    assert not capacitance_window(4.7e-12, "K").code.absolute  # K stays relative


@given(
    st.floats(min_value=1e-12, max_value=1.0),
    st.sampled_from(list("BCDFGJKMNZ")),
)
def test_windows_contain_their_nominal(nominal, letter):
    window = capacitance_window(nominal, letter)
    assert window.contains(nominal)
    assert window.lower < nominal < window.upper


def test_unknown_letter():
    with pytest.raises(ComputationError) as caught:
        tolerance_code("X")
    assert str(caught.value) == (
        "letter 'X' is not an encoded IEC 60062 tolerance letter; "
        "use one of B, C, D, F, G, J, K, M, N, Z"
    )


# -------------------------------------------------------------------------- §13 a.c.


@pytest.mark.parametrize(
    ("frequency", "expected"),
    [
        (50.0, 176.84),  # reference values §13, 18 µF at 50 Hz [S, Xc = 1/(2πfC)]
        (60.0, 147.37),  # reference values §13, 18 µF at 60 Hz [S]
    ],
)
def test_reactance_of_18_uf(frequency, expected):
    assert capacitive_reactance(18 * MICRO, frequency) == pytest.approx(expected, abs=TWO_DECIMALS)


def test_current_of_18_uf_at_230_v():
    # reference values §13: 18 µF at 230 V 50 Hz → 1.3006 A; quoted to four decimals
    assert capacitor_current(18 * MICRO, 230.0, 50.0) == pytest.approx(1.3006, abs=5e-5)


@pytest.mark.parametrize(
    ("frequency", "field_factor", "tolerance"),
    [
        (50.0, 3183.0, 0.5),  # reference values §13: C[µF] = 3183·I/V at 50 Hz, rounded [P]
        (60.0, 2652.0, 1.0),  # reference values §13: 2652·I/V at 60 Hz, truncated from 2652.6 [P]
    ],
)
def test_field_estimate_factors(frequency, field_factor, tolerance):
    assert capacitance_from_current(1.0, 1.0, frequency) / MICRO == pytest.approx(
        field_factor, abs=tolerance
    )


@given(
    st.floats(min_value=1e-9, max_value=1e-2),
    st.floats(min_value=1.0, max_value=1e4),
    st.floats(min_value=1.0, max_value=1e3),
)
def test_estimate_inverts_current(capacitance, voltage, frequency):
    current = capacitor_current(capacitance, voltage, frequency)
    assert capacitance_from_current(current, voltage, frequency) == pytest.approx(
        capacitance, rel=1e-12
    )


def test_esr_from_dissipation_factor():
    # ESR ≈ tan δ · Xc (reference values §13) [P]: film capacitor tan δ 0.002, 18 µF at 50 Hz
    assert equivalent_series_resistance(0.002, 18 * MICRO, 50.0) == pytest.approx(
        0.002 / (2 * math.pi * 50.0 * 18 * MICRO), rel=FLOAT_RELATIVE
    )


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: capacitive_reactance(-18e-6, 50.0), "capacitance -1.8e-05 F must be greater "
         "than 0 F"),
        (lambda: capacitive_reactance(18e-6, 0.0), "frequency 0 Hz must be greater than 0 Hz"),
        (lambda: capacitor_current(18e-6, -230.0, 50.0), "voltage -230 V must not be negative"),
        (lambda: equivalent_series_resistance(-0.1, 18e-6, 50.0),
         "dissipation_factor -0.1 must not be negative"),
        (lambda: discharge_time(470e-6, 0.0, 565.7), "bleeder_resistance 0 Ω must be greater "
         "than 0 Ω"),
    ],
)
def test_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


# -------------------------------------------------------------------------- §7 stored energy


def test_stored_energy_example():
    # reference values §7: 470 µF at 565.7 V → 75.2 J, Q 0.266 C, Rmax 4.74 kΩ for 5 s
    # (E = ½CV², Q = CV, Rmax = t/(C ln(V0/60))) [S for IEC 60204-1 cl. 6.2.4 limits]
    assert stored_energy(470 * MICRO, 565.7) == pytest.approx(75.2, abs=0.05)
    assert stored_charge(470 * MICRO, 565.7) == pytest.approx(0.266, abs=5e-4)
    assert maximum_bleeder_resistance(470 * MICRO, 565.7) == pytest.approx(4740.0, abs=5.0)


def test_maximum_bleeder_meets_the_time_exactly():
    # t = RC ln(V0/Vsafe) is the inverse of Rmax = t/(C ln(V0/Vsafe))
    r_max = maximum_bleeder_resistance(470 * MICRO, 565.7, time_limit=5.0)
    assert discharge_time(470 * MICRO, r_max, 565.7) == pytest.approx(5.0, rel=1e-12)
    assert residual_voltage(470 * MICRO, r_max, 565.7, 5.0) == pytest.approx(60.0, rel=1e-12)


def test_already_safe_voltage():
    assert discharge_time(470 * MICRO, 1e3, 48.0) == 0.0
    assert maximum_bleeder_resistance(470 * MICRO, 48.0) == math.inf


@given(
    st.floats(min_value=1e-7, max_value=1e-2),
    st.floats(min_value=61.0, max_value=1e4),
    st.floats(min_value=1.0, max_value=1e7),
    st.floats(min_value=1.0, max_value=1e7),
)
def test_a_larger_bleeder_never_discharges_faster(capacitance, voltage, first, second):
    small, large = sorted((first, second))
    assert discharge_time(capacitance, large, voltage) >= discharge_time(
        capacitance, small, voltage
    )


@given(st.floats(min_value=1e-7, max_value=1e-2), st.floats(min_value=1.0, max_value=1e4))
def test_energy_is_half_charge_times_voltage(capacitance, voltage):
    # E = ½QV
    assert stored_energy(capacitance, voltage) == pytest.approx(
        0.5 * stored_charge(capacitance, voltage) * voltage, rel=1e-12
    )


@pytest.mark.parametrize(
    ("bleeder", "plug_pins", "passes"),
    [
        (4.7e3, False, True),  # below Rmax 4.74 kΩ: ≤ 60 V in 5 s (IEC 60204-1 cl. 6.2.4) [S]
        (4.8e3, False, False),  # above Rmax: still above 60 V at 5 s [S]
        (4.7e3, True, False),  # plug pins: 1 s (IEC 60204-1 cl. 6.2.4) [S]
        (None, False, False),  # no discharge path
    ],
)
def test_iec_60204_1_residual_voltage(bleeder, plug_pins, passes):
    check = iec_60204_1_residual_voltage_check(470 * MICRO, 565.7, bleeder, plug_pins)
    assert (check.passes, check.exempt) == (passes, False)
    assert check.time_limit == (1.0 if plug_pins else 5.0)
    assert (check.standard, check.clause) == ("IEC 60204-1", "cl. 6.2.4")


def test_small_charge_is_exempt():
    # IEC 60204-1 cl. 6.2.4: exempt if stored charge ≤ 60 µC [S]; 0.1 µF at 565.7 V = 56.6 µC
    check = iec_60204_1_residual_voltage_check(0.1 * MICRO, 565.7, None)
    assert check.exempt and check.passes
    assert check.time_to_safe_voltage == math.inf
    assert check.describe() == "U ≤ 60 V within 5 s, or Q ≤ 60 µC"
    assert not iec_60204_1_residual_voltage_check(0.11 * MICRO, 565.7, None).exempt  # 62.2 µC
