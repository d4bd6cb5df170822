"""Checks of acceptance.computations.supply against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import cmath
import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.resistance import (
    COPPER_235,
    iec_60228_resistance,
    nec_table_8_resistance,
)
from acceptance.computations.supply import (
    ansi_c84_1_window,
    cable_voltage_drop,
    current_unbalance_nema,
    iec_60204_1_frequency_window,
    iec_60204_1_unbalance_limit,
    iec_60204_1_voltage_window,
    iec_60364_5_52_recommended_drop,
    nec_210_19_recommended_drop,
    nema_derating_factor,
    source_impedance_from_voltage_sag,
    voltage_unbalance,
    voltage_unbalance_nema,
    voltage_unbalance_sequence,
)

FLOAT_RELATIVE = 1e-12
# Percentages quoted to three decimals, checked as fractions to half a unit of the last
# decimal: the NEMA and sequence definitions differ by 0.13 % or more in the §4 examples.
THREE_DECIMAL_PERCENT = 5e-6
FEET = 0.3048  # m, exact
ALPHA = cmath.exp(2j * math.pi / 3)


# -------------------------------------------------------------------------- §3 windows


def test_iec_60204_1_example_400_v_50_hz():
    # reference values §3: 400 V 50 Hz → 360.0-440.0 V and 49.50-50.50 Hz; 432 V at 50.2 Hz
    # passes (IEC 60204-1 cl. 4.3.2) [M]
    voltage = iec_60204_1_voltage_window(400.0)
    frequency = iec_60204_1_frequency_window(50.0)
    assert voltage.describe() == "360.0 V ≤ U ≤ 440.0 V"
    assert frequency.describe() == "49.50 Hz ≤ f ≤ 50.50 Hz"
    assert voltage.contains(432.0) and frequency.contains(50.2)
    assert (voltage.standard, voltage.clause, voltage.status) == ("IEC 60204-1", "cl. 4.3.2", "M")


def test_iec_60204_1_short_time_frequency():
    # IEC 60204-1 cl. 4.3.2: 0.98-1.02 fn short time (reference values §3) [M]
    window = iec_60204_1_frequency_window(60.0, short_time=True)
    assert (window.lower, window.upper) == pytest.approx((58.8, 61.2), rel=FLOAT_RELATIVE)


@pytest.mark.parametrize(
    ("system", "range_a", "range_b", "status"),
    [
        ("120", (114, 126), (110, 127), "S"),  # ANSI C84.1 Table 1 (reference values §3) [S]
        (240, (228, 252), (220, 254), "M"),  # ANSI C84.1 Table 1 (reference values §3) [M]
        ("480 V", (456, 504), (440, 508), "M"),  # ANSI C84.1 Table 1 (reference values §3) [M]
        ("208Y/120", (197, 218), (191, 220), "M"),  # ANSI C84.1 Table 1 (reference values §3) [M]
    ],
)
def test_ansi_c84_1_ranges(system, range_a, range_b, status):
    a = ansi_c84_1_window(system, "A")
    b = ansi_c84_1_window(system, "Range B")
    assert ((a.lower, a.upper), (b.lower, b.upper)) == (range_a, range_b)
    assert a.status == status and "Range A" in a.clause


@pytest.mark.parametrize(("system", "range_a", "range_b"), [
    # ANSI C84.1 Table 1, utilization voltage at the equipment's terminals: minimum below the
    # service minimum, maximum shared (reference values §3) [M].
    ("120", (108, 126), (104, 127)),
    ("240", (216, 252), (208, 254)),
    ("480", (432, 504), (416, 508)),
    ("208Y/120", (187, 218), (180, 220)),
])
def test_ansi_c84_1_utilization_ranges_apply_at_the_machine(system, range_a, range_b):
    a = ansi_c84_1_window(system, "A", location="utilization")
    b = ansi_c84_1_window(system, "B", location="utilization")
    assert ((a.lower, a.upper), (b.lower, b.upper)) == (range_a, range_b)
    assert "utilization voltage" in a.clause
    assert "service voltage" in ansi_c84_1_window(system, "A").clause


def test_447_v_at_a_480_v_machine_is_inside_utilization_range_a():
    # reference values §3: at the service point 447 V is outside Range A (456 V minimum); at
    # the machine's terminals Range A's utilization minimum is 432 V [M].
    assert ansi_c84_1_window(480, "A", location="utilization").contains(447.0)
    with pytest.raises(ComputationError, match="location 'panel' must be"):
        ansi_c84_1_window(480, "A", location="panel")


def test_ansi_example_447_v_on_480_v():
    # reference values §3: 480 V nominal, 447 V measured → outside Range A, inside Range B [M]
    assert not ansi_c84_1_window(480, "A").contains(447.0)
    assert ansi_c84_1_window(480, "B").contains(447.0)


@given(st.floats(min_value=1.0, max_value=1e5), st.booleans())
def test_windows_contain_their_nominal(nominal, short_time):
    assert iec_60204_1_voltage_window(nominal).contains(nominal)
    assert iec_60204_1_frequency_window(nominal, short_time).contains(nominal)


@pytest.mark.parametrize("system", ["120", "240", "480", "208Y/120"])
@pytest.mark.parametrize("voltage_range", ["A", "B"])
def test_ansi_windows_contain_their_nominal(system, voltage_range):
    window = ansi_c84_1_window(system, voltage_range)
    assert window.contains(window.nominal)


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: ansi_c84_1_window("600"), "nominal_system '600' is not an encoded ANSI C84.1 "
         "system; use one of 120, 240, 480, 208Y/120"),
        (lambda: ansi_c84_1_window("480", "C"), "voltage_range 'C' must be 'A' or 'B'"),
        (lambda: iec_60204_1_voltage_window(0.0), "nominal_voltage 0 V must be greater than 0 V"),
    ],
)
def test_windows_reject_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


# -------------------------------------------------------------------------- §4 unbalance


def _sequence_by_phasors(v_ab: float, v_bc: float, v_ca: float) -> tuple[float, float]:
    """|U1|, |U2| by building the line-voltage triangle and applying Fortescue."""
    angle = math.acos((v_ab**2 + v_bc**2 - v_ca**2) / (2 * v_ab * v_bc))
    ab = complex(v_ab, 0.0)
    bc = v_bc * cmath.exp(1j * (math.pi + angle))
    ca = -(ab + bc)
    positive = (ab + ALPHA * bc + ALPHA**2 * ca) / 3
    negative = (ab + ALPHA**2 * bc + ALPHA * ca) / 3
    return abs(positive), abs(negative)


@pytest.mark.parametrize(
    ("voltages", "nema", "sequence"),
    [
        ((460.0, 467.0, 450.0), 0.01961, 0.02146),  # reference values §4 [S; IEC form M]
        ((480.0, 476.0, 472.0), 0.00840, 0.00970),  # reference values §4 [S; IEC form M]
    ],
)
def test_unbalance_examples(voltages, nema, sequence):
    result = voltage_unbalance(*voltages)
    assert result.nema == pytest.approx(nema, abs=THREE_DECIMAL_PERCENT)
    assert result.sequence == pytest.approx(sequence, abs=THREE_DECIMAL_PERCENT)


def test_sequence_magnitudes_example():
    # reference values §4: 460/467/450 V → |V1| 458.95 V, |V2| 9.85 V (two decimals)
    components = voltage_unbalance_sequence(460.0, 467.0, 450.0)
    assert components.positive_sequence == pytest.approx(458.95, abs=5e-3)
    assert components.negative_sequence == pytest.approx(9.85, abs=5e-3)
    # and the explicit phasor construction agrees to float precision
    positive, negative = _sequence_by_phasors(460.0, 467.0, 450.0)
    assert components.positive_sequence == pytest.approx(positive, rel=1e-9)
    assert components.negative_sequence == pytest.approx(negative, rel=1e-9)


def test_max_minus_min_is_not_the_definition():
    # reference values §4: (max − min)/avg = 3.70 % is wrong for 460/467/450 V
    assert (467 - 450) / 459 == pytest.approx(0.0370, abs=5e-5)
    assert abs(voltage_unbalance_nema(460.0, 467.0, 450.0) - 0.0370) > 0.01


@given(
    st.floats(min_value=100.0, max_value=1000.0),
    st.floats(min_value=0.0, max_value=0.3),
    st.floats(min_value=-math.pi, max_value=math.pi),
)
def test_sequence_formula_matches_fortescue(positive, ratio, angle):
    # β-formula (IEC 61000-4-30 form [M]) against symmetrical components built directly:
    # U_ab = U1 + U2, U_bc = a²U1 + aU2, U_ca = aU1 + a²U2 (no zero sequence in line voltages)
    u1 = complex(positive, 0.0)
    u2 = positive * ratio * cmath.exp(1j * angle)
    lines = (u1 + u2, ALPHA**2 * u1 + ALPHA * u2, ALPHA * u1 + ALPHA**2 * u2)
    result = voltage_unbalance_sequence(*(abs(v) for v in lines))
    assert result.unbalance == pytest.approx(ratio, abs=1e-7)
    assert result.positive_sequence == pytest.approx(positive, rel=1e-9)


@given(st.floats(min_value=1.0, max_value=1e5))
def test_equal_voltages_have_no_unbalance(voltage):
    result = voltage_unbalance(voltage, voltage, voltage)
    assert result.nema == pytest.approx(0.0, abs=1e-15)  # the average rounds in the last bit
    # the β form cancels 1 − √(3 − 6β): float rounding leaves up to ~1e-8
    assert result.sequence == pytest.approx(0.0, abs=1e-7)


@given(
    st.floats(min_value=380.0, max_value=420.0),
    st.floats(min_value=380.0, max_value=420.0),
    st.floats(min_value=380.0, max_value=420.0),
    st.floats(min_value=0.01, max_value=100.0),
)
def test_unbalance_is_scale_free(v_ab, v_bc, v_ca, scale):
    plain = voltage_unbalance(v_ab, v_bc, v_ca)
    scaled = voltage_unbalance(v_ab * scale, v_bc * scale, v_ca * scale)
    assert scaled.nema == pytest.approx(plain.nema, rel=1e-9, abs=1e-12)
    assert scaled.sequence == pytest.approx(plain.sequence, rel=1e-6, abs=1e-7)


@pytest.mark.parametrize(
    ("voltages", "message"),
    [
        ((100.0, 100.0, 250.0), "line voltages 100 V, 100 V, 250 V cannot form a triangle: "
         "250 V exceeds the sum of the other two (200 V); check the readings"),
        ((400.0, 0.0, 400.0), "v_bc 0 V must be greater than 0 V"),
        ((400.0, 400.0, -400.0), "v_ca -400 V must be greater than 0 V"),
    ],
)
@pytest.mark.parametrize("function", [voltage_unbalance_nema, voltage_unbalance_sequence])
def test_unbalance_rejects_impossible_readings(function, voltages, message):
    with pytest.raises(ComputationError) as caught:
        function(*voltages)
    assert str(caught.value) == message


def test_degenerate_triangle_is_complete_unbalance():
    # 200 = 100 + 100: the line phasors are collinear, |U1| = |U2|
    assert voltage_unbalance_sequence(100.0, 100.0, 200.0).unbalance == pytest.approx(1.0)


@pytest.mark.parametrize(
    ("currents", "unbalance", "line"),
    [
        # reference values §4: NEMA MG 1 14.36 applied to currents [S definition, P use]; by hand:
        # average 48 A, largest deviation 2 A (L1 and L3 tie, the first is named) → 4.1667 %
        ((50.0, 48.0, 46.0), 2 / 48, "L1"),
        # a lost phase: average 13.33 A, L1 deviates by all of it → 100 %
        ((0.0, 20.0, 20.0), 1.0, "L1"),
        ((10.2, 10.2, 11.1), 0.6 / 10.5, "L3"),
    ],
)
def test_current_unbalance(currents, unbalance, line):
    result = current_unbalance_nema(*currents)
    assert result.unbalance == pytest.approx(unbalance, rel=1e-12)
    assert result.line == line


def test_current_and_voltage_unbalance_share_the_definition():
    # the §4 example's figures read as amperes give the voltage unbalance's 1.961 % [S]
    currents = current_unbalance_nema(460.0, 467.0, 450.0)
    assert currents.unbalance == pytest.approx(voltage_unbalance_nema(460.0, 467.0, 450.0),
                                               rel=FLOAT_RELATIVE)
    assert currents.unbalance == pytest.approx(0.01961, abs=THREE_DECIMAL_PERCENT)
    assert currents.average_current == pytest.approx(459.0, rel=FLOAT_RELATIVE)
    assert currents.largest_deviation == pytest.approx(9.0, rel=FLOAT_RELATIVE)


@given(st.floats(min_value=0.01, max_value=1e4))
def test_equal_currents_have_no_unbalance(current):
    assert current_unbalance_nema(current, current, current).unbalance == pytest.approx(
        0.0, abs=1e-15
    )


@pytest.mark.parametrize(
    ("currents", "message"),
    [
        ((0.0, 0.0, 0.0), "i_l1, i_l2 and i_l3 are all 0 A: current unbalance needs the "
         "machine running"),
        ((10.0, -10.0, 10.0), "i_l2 -10 A must not be negative"),
        ((10.0, 10.0, math.nan), "i_l3 nan A must be a finite number"),
    ],
)
def test_current_unbalance_rejects_bad_input(currents, message):
    with pytest.raises(ComputationError) as caught:
        current_unbalance_nema(*currents)
    assert str(caught.value) == message


def test_iec_60204_1_unbalance_limit():
    # IEC 60204-1 cl. 4.3.2: negative sequence ≤ 2 % of positive (reference values §3) [M]
    limit = iec_60204_1_unbalance_limit()
    assert limit.passes(0.02) and not limit.passes(0.02146)
    assert limit.describe() == "unbalance ≤ 2 % (negative-to-positive sequence)"


@pytest.mark.parametrize(
    ("percent", "factor"),
    [
        (0.0, 1.00), (0.5, 1.00), (1.5, 0.97), (2.0, 0.95), (2.5, 0.93), (3.0, 0.89),
        (3.5, 0.85), (4.0, 0.82), (4.5, 0.78), (5.0, 0.76),
    ],
)
def test_nema_derating_points(percent, factor):
    # NEMA MG 1 Figure 14-1 read off the curve (reference values §4) [S, ±0.01]; the points
    # themselves are reproduced exactly
    result = nema_derating_factor(percent / 100)
    assert result.factor == pytest.approx(factor, abs=1e-12)
    assert result.advised


def test_nema_derating_interpolates_and_stops_at_5_percent():
    # NEMA MG 1-2016 12.45 [M]: rated load up to 1 % unbalance, so no derating at 1 %; between
    # 1 % (1.00) and 1.5 % (0.97) linear: 0.982 at 1.3 % (reference values §4) [S ±0.01].
    assert nema_derating_factor(0.01).factor == 1.0
    assert "rated load up to 1 % unbalance" in nema_derating_factor(0.009).note
    assert nema_derating_factor(0.013).factor == pytest.approx(0.982, abs=1e-12)
    beyond = nema_derating_factor(0.06)
    assert (beyond.factor, beyond.advised) == (None, False)
    assert beyond.note == "unbalance 6.00 % is above 5 %: operation is not advised"


@given(st.floats(min_value=0.0, max_value=0.05), st.floats(min_value=0.0, max_value=0.05))
def test_derating_never_rises_with_unbalance(first, second):
    low, high = sorted((first, second))
    assert nema_derating_factor(high).factor <= nema_derating_factor(low).factor


# -------------------------------------------------------------------------- §8 voltage drop


def test_voltage_drop_example_12_awg():
    # reference values §8: 12 AWG stranded (NEC Ch. 9 Table 8, 1.98 Ω/1000 ft at 75 °C), 100 ft
    # one-way, 16 A, 120 V → 6.336 V = 5.28 %, exceeding the 3 % of NEC 210.19(A) [S]
    per_metre = nec_table_8_resistance(12, "stranded").resistance_per_length
    drop = cable_voltage_drop(16.0, 100 * FEET, per_metre, nominal_voltage=120.0)
    assert drop.voltage_drop == pytest.approx(6.336, rel=1e-9)
    assert drop.fraction_of_nominal == pytest.approx(0.0528, abs=5e-5)
    assert not nec_210_19_recommended_drop("branch").passes(drop.fraction_of_nominal)
    assert drop.model == "single-phase: ΔU = 2·I·L·(R cos φ + X sin φ)"


def test_voltage_drop_example_cord_at_20_and_70_c():
    # reference values §8: 6 m two-core 2.5 mm² class 5 cord (IEC 60228 7.98 Ω/km), 16 A, 230 V,
    # resistive: 1.532 V (0.666 %) at 20 °C; 1.833 V (0.797 %) at 70 °C [S]
    per_metre = iec_60228_resistance(2.5, 5).resistance_per_length
    cold = cable_voltage_drop(16.0, 6.0, per_metre, nominal_voltage=230.0)
    assert cold.voltage_drop == pytest.approx(1.532, abs=5e-4)
    assert cold.fraction_of_nominal == pytest.approx(0.00666, abs=5e-6)
    hot = cable_voltage_drop(16.0, 6.0, per_metre, nominal_voltage=230.0,
                             resistance_temperature_c=20.0, conductor_temperature_c=70.0)
    assert hot.voltage_drop == pytest.approx(1.833, abs=5e-4)
    assert hot.fraction_of_nominal == pytest.approx(0.00797, abs=5e-6)
    assert hot.model.endswith("R corrected from 20 °C to 70 °C with copper k = 234.5 °C "
                              "(IEC 60228, IEEE 112, IEEE C57.12.90)")
    # k 235 instead of 234.5 shifts the result by 0.6 mV, visible at 1e-4 relative
    other = cable_voltage_drop(16.0, 6.0, per_metre, resistance_temperature_c=20.0,
                               conductor_temperature_c=70.0, constant=COPPER_235)
    assert other.voltage_drop == pytest.approx(1.53216 * 305 / 255, rel=1e-9)
    assert hot.voltage_drop == pytest.approx(1.53216 * 304.5 / 254.5, rel=1e-9)


def test_three_phase_drop_formula():
    # IEC 60364-5-52 Annex G: ΔU = √3·I·L·(R cos φ + X sin φ) for balanced three-phase [S]
    drop = cable_voltage_drop(100.0, 50.0, 0.524e-3, phases=3, reactance_per_length=0.08e-3,
                              power_factor=0.85, nominal_voltage=400.0)
    expected = math.sqrt(3) * 100 * 50 * (0.524e-3 * 0.85 + 0.08e-3 * math.sqrt(1 - 0.85**2))
    assert drop.voltage_drop == pytest.approx(expected, rel=FLOAT_RELATIVE)
    assert drop.model.startswith("three-phase")


@pytest.mark.parametrize(
    ("supply", "load", "limit"),
    [
        ("public", "lighting", 0.03),  # IEC 60364-5-52 Annex G (reference values §8) [S]
        ("public", "other", 0.05),  # IEC 60364-5-52 Annex G (reference values §8) [S]
        ("private", "lighting", 0.06),  # IEC 60364-5-52 Annex G (reference values §8) [S]
        ("private", "other", 0.08),  # IEC 60364-5-52 Annex G (reference values §8) [S]
    ],
)
def test_iec_recommended_drop(supply, load, limit):
    result = iec_60364_5_52_recommended_drop(supply, load)
    assert (result.limit, result.advisory) == (limit, True)


def test_nec_recommended_drop():
    # NEC 210.19(A) informational note: 3 % branch, 5 % total (reference values §8) [S]
    assert nec_210_19_recommended_drop("branch").limit == 0.03
    total = nec_210_19_recommended_drop("total")
    assert total.limit == 0.05
    assert total.describe() == "ΔU ≤ 5 % of nominal (feeder and branch circuit)"


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"phases": 2}, "phases 2 must be 1 (single-phase or d.c.) or 3 (three-phase)"),
        ({"power_factor": 0.0}, "power_factor 0 must be in 0 < cos φ ≤ 1"),
        ({"power_factor": 1.2}, "power_factor 1.2 must be in 0 < cos φ ≤ 1"),
        ({"resistance_temperature_c": 20.0},
         "resistance_temperature_c and conductor_temperature_c must be given together"),
        ({"resistance_temperature_c": 20.0, "conductor_temperature_c": -300.0},
         "target_temperature_c -300 °C is below absolute zero (-273.15 °C)"),
        ({"current": -16.0}, "current -16 A must not be negative"),
    ],
)
def test_voltage_drop_rejects_bad_input(kwargs, message):
    arguments = {"current": 16.0, "length": 6.0, "resistance_per_length": 7.98e-3} | kwargs
    with pytest.raises(ComputationError) as caught:
        cable_voltage_drop(**arguments)
    assert str(caught.value) == message


# -------------------------------------------------------------------------- sag


def test_source_impedance_from_sag():
    # Thevenin source [P]: 230 V → 225 V at 20 A gives 0.25 Ω loop impedance;
    # 400 V → 392 V line-to-line at 50 A gives 8/(√3·50) Ω per phase
    assert source_impedance_from_voltage_sag(230.0, 225.0, 20.0) == pytest.approx(
        0.25, rel=FLOAT_RELATIVE
    )
    assert source_impedance_from_voltage_sag(400.0, 392.0, 50.0, phases=3) == pytest.approx(
        8 / (math.sqrt(3) * 50), rel=FLOAT_RELATIVE
    )


@given(st.floats(min_value=0.1, max_value=100.0), st.floats(min_value=1.0, max_value=200.0))
def test_sag_recovers_a_resistive_cable(current, length):
    # A resistive cable's drop, read back as a sag, gives its loop resistance 2·R·L
    per_metre = 7.98e-3
    drop = cable_voltage_drop(current, length, per_metre).voltage_drop
    assert source_impedance_from_voltage_sag(230.0 + drop, 230.0, current) == pytest.approx(
        2 * per_metre * length, rel=1e-9
    )


def test_sag_rejects_a_voltage_rise():
    with pytest.raises(ComputationError) as caught:
        source_impedance_from_voltage_sag(230.0, 232.0, 10.0)
    assert str(caught.value) == (
        "load_voltage 232 V is above no_load_voltage 230 V; the sag model needs a drop "
        "(a leading load or a changing supply can cause a rise)"
    )
