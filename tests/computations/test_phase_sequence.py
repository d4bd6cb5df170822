"""Checks of acceptance.computations.phase_sequence against independent constructions.

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
from acceptance.computations.phase_sequence import (
    NEGATIVE_SEQUENCE,
    POSITIVE_SEQUENCE,
    expected_rotation,
    phase_sequence,
)

ALPHA = cmath.exp(2j * math.pi / 3)


def _fortescue(angles: tuple[float, float, float]) -> tuple[float, float]:
    """|positive|, |negative| sequence components of three unit phasors (Fortescue)."""
    a, b, c = (cmath.exp(1j * math.radians(angle)) for angle in angles)
    positive = (a + ALPHA * b + ALPHA**2 * c) / 3
    negative = (a + ALPHA**2 * b + ALPHA * c) / 3
    return abs(positive), abs(negative)


def test_balanced_sets():
    # reference values §3, phase sequence definition [P]: in L1-L2-L3, L2 lags L1 by 120°
    # and L3 lags L2 by 120°
    positive = phase_sequence(0.0, -120.0, 120.0)
    assert (positive.sequence, positive.positive) == (POSITIVE_SEQUENCE, True)
    assert positive.displacements == (120.0, 120.0, 120.0)
    assert positive.largest_deviation == 0.0
    assert positive.describe() == "L1-L2-L3 (positive)"
    negative = phase_sequence(0.0, 120.0, -120.0)
    assert (negative.sequence, negative.positive) == (NEGATIVE_SEQUENCE, False)
    assert negative.displacements == (240.0, 240.0, 240.0)
    assert negative.describe() == "L1-L3-L2 (negative)"


def test_angles_from_any_reference():
    # the same set read against another reference, with the angles beyond ±360°
    shifted = phase_sequence(400.0, 280.0, 160.0)
    assert shifted.positive and shifted.largest_deviation == pytest.approx(0.0, abs=1e-9)


def test_deviation_is_reported():
    result = phase_sequence(0.0, -110.0, 115.0)
    assert result.positive
    assert result.displacements == pytest.approx((110.0, 135.0, 115.0), abs=1e-9)
    assert result.largest_deviation == pytest.approx(15.0, abs=1e-9)


@given(
    st.floats(min_value=-720.0, max_value=720.0),
    st.floats(min_value=-25.0, max_value=25.0),
    st.floats(min_value=-25.0, max_value=25.0),
    st.booleans(),
)
def test_sequence_agrees_with_symmetrical_components(offset, error_2, error_3, swap):
    # independent check: the larger of the positive- and negative-sequence components of
    # three unit phasors names the sequence (Fortescue) [P]
    second, third = -120.0 + error_2, 120.0 + error_3
    if swap:
        second, third = third, second
    angles = (offset, offset + second, offset + third)
    positive, negative = _fortescue(angles)
    assert phase_sequence(*angles).positive == (positive > negative)


@pytest.mark.parametrize(
    "angles",
    [
        (0.0, 0.0, 120.0),  # two phases in phase: a lost phase bridged by a load
        (0.0, 180.0, 90.0),  # two phases in opposition
        (0.0, -10.0, -20.0),  # all bunched together
    ],
)
def test_not_a_three_phase_set(angles):
    with pytest.raises(ComputationError) as caught:
        phase_sequence(*angles)
    assert "not a three-phase set (a lost phase or a wrong connection?)" in str(caught.value)


def test_message_names_the_lags():
    with pytest.raises(ComputationError) as caught:
        phase_sequence(0.0, 0.0, 120.0)
    assert str(caught.value) == (
        "angles 0°, 0°, 120° give lags of 0°, 240°, 120°: not a three-phase set "
        "(a lost phase or a wrong connection?); check the readings"
    )
    with pytest.raises(ComputationError) as caught:
        phase_sequence(0.0, math.nan, 120.0)
    assert str(caught.value) == "angle_l2 nan ° must be a finite number"


# -------------------------------------------------------------------------- rotation


@pytest.mark.parametrize(
    ("supply", "connection", "direction"),
    [
        # reference values §3, IEC 60034-8:2007: U1, V1, W1 fed in the supply's time
        # sequence → clockwise facing the drive-end shaft [M]
        ("L1-L2-L3", ("L1", "L2", "L3"), "clockwise"),
        ("L1-L2-L3", ("L2", "L3", "L1"), "clockwise"),  # a cyclic shift keeps the direction
        ("L1-L2-L3", ("L2", "L1", "L3"), "counter-clockwise"),  # swapping two lines reverses
        ("L1-L3-L2", ("L1", "L2", "L3"), "counter-clockwise"),  # reversed supply
        ("L3-L2-L1", ("L1", "L3", "L2"), "clockwise"),  # both reversed: back to clockwise
        ("l2-l3-l1", ("l1", "l2", "l3"), "clockwise"),  # spelling and rotation of the sequence
    ],
)
def test_expected_rotation(supply, connection, direction):
    rotation = expected_rotation(supply, connection)
    assert rotation.direction == direction
    assert rotation.terminal_sequence_positive == (direction == "clockwise")
    assert (rotation.standard, rotation.edition, rotation.status) == ("IEC 60034-8", "2007", "M")


def test_rotation_from_a_measured_sequence():
    measured = phase_sequence(10.0, 250.0, 130.0)
    assert expected_rotation(measured).describe() == "clockwise, facing the drive-end shaft"


@given(st.permutations(["L1", "L2", "L3"]), st.booleans())
def test_swapping_two_lines_always_reverses(connection, positive):
    supply = POSITIVE_SEQUENCE if positive else NEGATIVE_SEQUENCE
    swapped = (connection[1], connection[0], connection[2])
    assert (expected_rotation(supply, tuple(connection)).direction
            != expected_rotation(supply, swapped).direction)


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("L1-L1-L3",), "supply_sequence 'L1-L1-L3' is not a phase sequence; use L1-L2-L3 "
         "or L1-L3-L2"),
        (("L1-L2-L3", ("L1", "L1", "L3")), "connection ('L1', 'L1', 'L3') must name L1, L2 and "
         "L3 once each (the lines on U1, V1, W1)"),
    ],
)
def test_rotation_rejects_bad_input(args, message):
    with pytest.raises(ComputationError) as caught:
        expected_rotation(*args)
    assert str(caught.value) == message
