"""Checks of acceptance.computations.protective_device against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.disconnection import prospective_fault_current
from acceptance.computations.protective_device import (
    breaking_capacity_check,
    instantaneous_release_operating_current,
    mcb_operating_current,
    operating_current_from_curve,
)

FLOAT_RELATIVE = 1e-12


# -------------------------------------------------------------------------- §16 Ia


@pytest.mark.parametrize(
    ("curve", "rated", "current"),
    [
        ("B", 16.0, 80.0),  # IEC 60898-1:2015 Table 7, B: upper instantaneous limit 5 In [M]
        ("c", 16.0, 160.0),  # IEC 60898-1 Table 7, C: 10 In [M]
        ("D", 32.0, 640.0),  # IEC 60898-1 Table 7, D: 20 In [M]
    ],
)
def test_mcb_operating_current(curve, rated, current):
    ia = mcb_operating_current(curve, rated)
    assert ia.current == current
    assert ia.operating_time == 0.1  # IEC 60898-1 Table 7: trips in less than 0.1 s [M]
    assert (ia.standard, ia.status) == ("IEC 60898-1", "M")


def test_mcb_describes_its_basis():
    assert mcb_operating_current("C", 16.0).describe() == (
        "Ia = 160 A (C-type circuit-breaker: 10 × In, trips within 0.1 s)"
    )


def test_mcb_refuses_a_time_shorter_than_its_instantaneous_test():
    # TT above 230 V needs 0.07 s (Table 41.1 [M]); IEC 60898-1 guarantees only 0.1 s [M]
    assert mcb_operating_current("B", 10.0, required_time=0.1).current == 50.0
    with pytest.raises(ComputationError) as caught:
        mcb_operating_current("B", 10.0, required_time=0.07)
    assert str(caught.value) == (
        "required_time 0.07 s is shorter than the 0.1 s within which IEC 60898-1 makes a "
        "B-type breaker trip; give points of the manufacturer's time-current curve instead"
    )


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: mcb_operating_current("K", 16.0),
         "curve 'K' is not an IEC 60898-1 tripping type; use B, C or D"),
        (lambda: mcb_operating_current("C", 0.0), "rated_current 0 A must be greater than 0 A"),
        (lambda: instantaneous_release_operating_current(-100.0),
         "setting_current -100 A must be greater than 0 A"),
        (lambda: instantaneous_release_operating_current(100.0, 1.0),
         "tolerance 1 must be in 0 ≤ tolerance < 1 (0.2 = 20 %)"),
    ],
)
def test_operating_current_rejects_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


def test_instantaneous_release_adds_its_tolerance():
    # IEC 60947-2: instantaneous release within ±20 % of the setting [M] → Ia = 1.2 × Ii
    ia = instantaneous_release_operating_current(400.0)
    assert ia.current == pytest.approx(480.0, rel=FLOAT_RELATIVE)
    assert ia.operating_time is None
    assert instantaneous_release_operating_current(400.0, tolerance=0.0).current == 400.0


def test_curve_reproduces_a_power_law():
    # Independent formula check [P]: points on t = k·I⁻⁴ lie on a straight log-log line,
    # so the interpolated current for 0.4 s is (k/0.4)^(1/4) exactly.
    k = 1.6e9
    points = [(current, k * current**-4) for current in (100.0, 200.0, 400.0)]
    ia = operating_current_from_curve(points, 0.4, basis="gG 32 A, maker's curve")
    assert ia.current == pytest.approx((k / 0.4) ** 0.25, rel=1e-12)
    assert ia.current == pytest.approx(251.49, abs=5e-3)  # reference values §16
    assert ia.operating_time == 0.4
    assert ia.basis.startswith("gG 32 A, maker's curve: operates in 0.4 s")


@given(
    st.floats(min_value=1.5, max_value=6.0),  # slope n of t = k·I⁻ⁿ
    st.floats(min_value=0.05, max_value=5.0),  # required time, inside the points below
)
def test_curve_inverts_any_power_law(slope, required):
    k = 1e3 * 20.0**slope  # 1000 s at 20 A
    points = [(current, k * current**-slope) for current in (20.0, 60.0, 250.0, 2000.0)]
    if not points[-1][1] <= required <= points[0][1]:
        return
    ia = operating_current_from_curve(points, required)
    assert ia.current == pytest.approx((k / required) ** (1.0 / slope), rel=1e-9)


def test_curve_at_a_given_point_returns_its_current():
    points = [(50.0, 5.0), (120.0, 0.4), (300.0, 0.05)]
    assert operating_current_from_curve(points, 0.4).current == 120.0
    assert operating_current_from_curve(points, 5.0).current == 50.0
    assert operating_current_from_curve(points, 0.05).current == 300.0


@pytest.mark.parametrize(
    ("points", "time", "message"),
    [
        ([(50.0, 5.0), (120.0, 0.4)], 0.2,
         "required_time 0.2 s is outside the curve's points (0.4 s … 5 s); "
         "add points that bracket it"),
        ([(50.0, 5.0)], 0.4, "points has 1 pair(s); give at least two (current [A], time [s]) "
         "points of the time-current curve"),
        ([(50.0, 5.0), (40.0, 0.4)], 0.4, "point 2 (40 A, 0.4 s) does not follow point 1 "
         "(50 A, 5 s): give the points by rising current with falling time"),
        ([(50.0, 5.0), (60.0, 6.0)], 5.5, "point 2 (60 A, 6 s) does not follow point 1 "
         "(50 A, 5 s): give the points by rising current with falling time"),
        ([(50.0, 5.0), (120.0, 0.0)], 0.4, "point 2 time 0 s must be greater than 0 s"),
        ([(50.0, 5.0), (120.0,)], 0.4, "point 2 (120.0,) must be a (current [A], time [s]) pair"),
        ([(50.0, 5.0), (120.0, 0.4)], -1.0, "required_time -1 s must be greater than 0 s"),
    ],
)
def test_curve_rejects_bad_points(points, time, message):
    with pytest.raises(ComputationError) as caught:
        operating_current_from_curve(points, time)
    assert str(caught.value) == message


# -------------------------------------------------------------------------- §16 breaking capacity


def test_breaking_capacity():
    # Ipf compared with Icn / Icu (IEC 60364-4-43 434.5.1 [M]; reference values §16 [P])
    high = prospective_fault_current(230.0, 0.03)
    check = breaking_capacity_check(high, 6000.0)
    assert not check.passes and check.margin < 0
    assert check.describe() == "Ipf ≤ 6000 A"
    # at the rated capacity exactly the device suffices
    assert breaking_capacity_check(6000.0, 6000.0).passes
    assert breaking_capacity_check(657.0, 6000.0).margin == pytest.approx(0.8905, rel=1e-12)
    with pytest.raises(ComputationError) as caught:
        breaking_capacity_check(657.0, 0.0)
    assert str(caught.value) == "breaking_capacity 0 A must be greater than 0 A"
