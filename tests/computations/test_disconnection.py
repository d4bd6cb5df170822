"""Checks of acceptance.computations.disconnection against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.disconnection import (
    ColdMeasurementAllowance,
    cold_measurement_factor,
    iec_60364_4_41_disconnection_time,
    loop_impedance_check,
    loop_impedance_from_parts,
    maximum_loop_impedance,
    prospective_fault_current,
)
from acceptance.computations.protective_device import (
    MCB_INSTANTANEOUS_TRIP_TIME,
    mcb_operating_current,
)
from acceptance.computations.resistance import COPPER_234_5, resistance_at_temperature

FLOAT_RELATIVE = 1e-12
# Tabulated maxima quoted to two decimals: half a unit of the last decimal.
TWO_DECIMALS = 5e-3


# -------------------------------------------------------------------------- §16 times


@pytest.mark.parametrize(
    ("system", "voltage", "time"),
    [
        # IEC 60364-4-41:2005 Table 41.1, a.c., final circuits ≤ 32 A (reference values §16) [M]
        ("TN-S", 100.0, 0.8),
        ("TN-C-S", 230.0, 0.4),
        ("TN-C", 400.0, 0.2),
        ("TN", 480.0, 0.1),
        ("TT", 100.0, 0.3),
        ("TT", 230.0, 0.2),
        ("TT", 400.0, 0.07),
        ("TT", 480.0, 0.04),
    ],
)
def test_table_41_1(system, voltage, time):
    required = iec_60364_4_41_disconnection_time(system, voltage, 16.0)
    assert required.time == time
    assert (required.standard, required.clause, required.edition, required.status) == (
        "IEC 60364-4-41", "411.3.2.2, Table 41.1", "2005", "M"
    )


@pytest.mark.parametrize(
    ("voltage", "tn", "tt"),
    [
        # Table 41.1 bands are closed at their upper end: 120 < U0 ≤ 230 V etc. [M]
        (120.0, 0.8, 0.3),
        (120.5, 0.4, 0.2),
        (230.0, 0.4, 0.2),
        (230.5, 0.2, 0.07),
        (400.0, 0.2, 0.07),
        (400.5, 0.1, 0.04),
    ],
)
def test_table_41_1_band_edges(voltage, tn, tt):
    assert iec_60364_4_41_disconnection_time("TN-S", voltage, 32.0).time == tn
    assert iec_60364_4_41_disconnection_time("TT", voltage, 32.0).time == tt


@pytest.mark.parametrize(
    ("system", "rated", "final", "time", "clause"),
    [
        ("TN-C-S", 40.0, True, 5.0, "411.3.2.3"),  # IEC 60364-4-41:2005 411.3.2.3: TN 5 s [M]
        ("TN-S", 16.0, False, 5.0, "411.3.2.3"),  # distribution circuit, TN 5 s [M]
        ("TT", 63.0, True, 1.0, "411.3.2.4"),  # IEC 60364-4-41:2005 411.3.2.4: TT 1 s [M]
        ("TT", 25.0, False, 1.0, "411.3.2.4"),  # distribution circuit, TT 1 s [M]
    ],
)
def test_other_circuits(system, rated, final, time, clause):
    required = iec_60364_4_41_disconnection_time(system, 230.0, rated, final_circuit=final)
    assert (required.time, required.clause) == (time, clause)


def test_disconnection_time_describes_itself_and_judges_a_device():
    required = iec_60364_4_41_disconnection_time("TN-C-S", 230.0, 16.0)
    assert required.describe() == "t ≤ 0.4 s"
    assert "120 V < U0 ≤ 230 V" in required.scope
    assert required.met_by(0.4) and required.met_by(MCB_INSTANTANEOUS_TRIP_TIME)
    assert not required.met_by(0.41)


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("IT", 230.0, 16.0), "earthing_system 'IT': on a second fault the TN times apply where "
         "the exposed-conductive-parts are interconnected and the TT times where they are "
         "earthed separately (IEC 60364-4-41 411.6.4); give 'TN' or 'TT' accordingly"),
        (("TX", 230.0, 16.0), "earthing_system 'TX' is not known; use TN-S, TN-C, TN-C-S or TT"),
        (("TN-S", 48.0, 16.0), "nominal_voltage_to_earth 48 V is extra-low voltage: Table 41.1 "
         "starts above 50 V a.c."),
        (("TN-S", 0.0, 16.0), "nominal_voltage_to_earth 0 V must be greater than 0 V"),
        (("TN-S", 230.0, -16.0), "rated_current -16 A must be greater than 0 A"),
    ],
)
def test_disconnection_time_rejects_bad_input(args, message):
    with pytest.raises(ComputationError) as caught:
        iec_60364_4_41_disconnection_time(*args)
    assert str(caught.value) == message


# -------------------------------------------------------------------------- §16 Zs


@pytest.mark.parametrize(
    ("curve", "rated", "voltage_factor", "tabulated"),
    [
        # BS 7671:2018 Table 41.3, 0.4 s at U0 230 V, Zs = Cmin·U0/Ia with Cmin 0.95 [M]
        ("B", 6.0, 0.95, 7.28),
        ("B", 32.0, 0.95, 1.37),
        ("C", 32.0, 0.95, 0.68),
        # BS 7671:2008 Table 41.3, the same table before Cmin: Zs = U0/Ia [M]
        ("B", 6.0, 1.0, 7.67),
        ("B", 32.0, 1.0, 1.44),
        ("D", 16.0, 1.0, 0.72),
    ],
)
def test_maximum_zs_matches_tabulated_values(curve, rated, voltage_factor, tabulated):
    ia = mcb_operating_current(curve, rated).current
    zmax = maximum_loop_impedance(230.0, ia, allowance="none", voltage_factor=voltage_factor)
    assert zmax == pytest.approx(tabulated, abs=TWO_DECIMALS)


def test_cold_allowance_worked_example():
    # IEC 60364-6:2016 Annex C [M]: Zs(m) ≤ 2/3 × U0/Ia. Worked by hand: C16 at U0 230 V,
    # Ia = 160 A, U0/Ia = 1.4375 Ω, 2/3 of it 0.958333 Ω.
    check = loop_impedance_check(0.80, 230.0, 160.0)
    assert check.maximum_impedance == pytest.approx(0.958333, abs=5e-7)
    assert check.passes
    assert check.margin == pytest.approx(1 - 0.80 / 0.958333, abs=1e-6)
    assert check.prospective_fault_current == pytest.approx(287.5, rel=FLOAT_RELATIVE)
    assert check.describe() == "Zs ≤ 2/3 × 230 V / 160 A = 0.958 Ω"
    assert check.allowance_source.startswith("IEC 60364-6:2016 Annex C")
    assert (check.standard, check.clause, check.edition) == ("IEC 60364-4-41", "411.4.4", "2005")


@pytest.mark.parametrize(
    ("allowance", "factor", "status"),
    [
        ("two_thirds", 2 / 3, "M"),  # IEC 60364-6:2016 Annex C; IEC 60204-1:2016 Annex A [M]
        ("rule_of_thumb_0_8", 0.8, "P"),  # BS 7671:2018 Appendix 3 rule of thumb [P]
        (ColdMeasurementAllowance.NONE, 1.0, "M"),  # IEC 60364-4-41 411.4.4 as written [M]
    ],
)
def test_cold_allowances(allowance, factor, status):
    assert cold_measurement_factor(allowance) == factor
    check = loop_impedance_check(0.5, 230.0, 100.0, allowance=allowance)
    assert check.maximum_impedance == pytest.approx(factor * 2.3, rel=FLOAT_RELATIVE)
    assert check.allowance_status == status


def test_allowances_sit_near_copper_resistance_ratios():
    # Independent check [P]: R(20 °C)/R(θ) for copper, k = 234.5 (IEC 60228, reference values
    # §1 [S]) is 0.836 at 70 °C (thermoplastic in service) and 0.645 at 160 °C (its fault
    # limit); the 0.8 and 2/3 factors sit within 0.04 of those ratios.
    in_service = 1.0 / resistance_at_temperature(1.0, 20.0, 70.0, COPPER_234_5)
    in_fault = 1.0 / resistance_at_temperature(1.0, 20.0, 160.0, COPPER_234_5)
    assert in_service == pytest.approx(0.836, abs=5e-4)
    assert in_fault == pytest.approx(0.645, abs=5e-4)
    assert abs(cold_measurement_factor("rule_of_thumb_0_8") - in_service) < 0.04
    assert abs(cold_measurement_factor("two_thirds") - in_fault) < 0.04


def test_rule_of_thumb_on_cmin_describes_both_factors():
    check = loop_impedance_check(1.10, 230.0, 160.0, "rule_of_thumb_0_8", voltage_factor=0.95)
    assert check.maximum_impedance == pytest.approx(0.8 * 0.95 * 230 / 160, rel=FLOAT_RELATIVE)
    assert check.describe() == "Zs ≤ 0.8 × 0.95 × 230 V / 160 A = 1.09 Ω"
    assert not check.passes and check.margin < 0


def test_limit_is_shown_to_three_figures_without_exponent():
    assert loop_impedance_check(100.0, 230.0, 0.138, "none").describe() == (
        "Zs ≤ 230 V / 0.138 A = 1667 Ω"
    )


def test_zs_exactly_at_the_limit_passes():
    # Zs × Ia ≤ U0 (IEC 60364-4-41 411.4.4 [M]): 230/160 = 1.4375 Ω is exact in binary
    assert loop_impedance_check(1.4375, 230.0, 160.0, "none").passes
    assert loop_impedance_check(1.4375, 230.0, 160.0, "none").margin == 0.0
    assert not loop_impedance_check(1.4376, 230.0, 160.0, "none").passes


@given(
    st.floats(min_value=0.01, max_value=50.0),
    st.floats(min_value=60.0, max_value=500.0),
    st.floats(min_value=1.0, max_value=5000.0),
)
def test_check_agrees_with_zs_times_ia(zs, voltage, ia):
    # The check is Zs × Ia ≤ U0 rearranged (411.4.4 [M]); away from the boundary the two agree
    check = loop_impedance_check(zs, voltage, ia, "none")
    if abs(zs * ia - voltage) > 1e-9 * voltage:
        assert check.passes == (zs * ia <= voltage)


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: loop_impedance_check(0.0, 230.0, 160.0),
         "loop_impedance 0 Ω must be greater than 0 Ω"),
        (lambda: loop_impedance_check(0.5, 230.0, 160.0, "three_quarters"),
         "allowance 'three_quarters' is not a known cold-measurement allowance; "
         "use two_thirds, rule_of_thumb_0_8, none"),
        (lambda: maximum_loop_impedance(230.0, 160.0, voltage_factor=1.1),
         "voltage_factor 1.1 must be in 0 < Cmin ≤ 1"),
        (lambda: maximum_loop_impedance(230.0, -160.0),
         "operating_current -160 A must be greater than 0 A"),
        (lambda: maximum_loop_impedance(math.nan, 160.0),
         "nominal_voltage_to_earth nan V must be a finite number"),
    ],
)
def test_loop_impedance_rejects_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


def test_zs_from_parts():
    # Zs = Ze + (R1 + R2) (IEC 60364-6, fault loop by calculation [M]; common practice [P])
    assert loop_impedance_from_parts(0.35, 0.42) == pytest.approx(0.77, rel=FLOAT_RELATIVE)
    assert loop_impedance_from_parts(0.35, 0.0) == 0.35  # at the origin
    with pytest.raises(ComputationError) as caught:
        loop_impedance_from_parts(0.35, -0.1)
    assert str(caught.value) == "r1_plus_r2 -0.1 Ω must not be negative"
    with pytest.raises(ComputationError) as caught:
        loop_impedance_from_parts(0.0, 0.1)
    assert str(caught.value) == "external_loop_impedance 0 Ω must be greater than 0 Ω"


# -------------------------------------------------------------------------- §16 Ipf


def test_prospective_fault_current():
    # Ipf ≈ U0/Zs (reference values §16) [P]
    assert prospective_fault_current(230.0, 0.35) == pytest.approx(657.142857, rel=1e-8)
    assert prospective_fault_current(230.0, 0.03) == pytest.approx(7666.67, abs=5e-3)
    with pytest.raises(ComputationError) as caught:
        prospective_fault_current(230.0, -0.2)
    assert str(caught.value) == "loop_impedance -0.2 Ω must be greater than 0 Ω"
