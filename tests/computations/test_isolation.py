"""Absence of voltage at the point of work (acceptance.computations.isolation)."""

from __future__ import annotations

import pytest

from acceptance.computations import ComputationError
from acceptance.computations.isolation import (
    ABSENCE_OF_VOLTAGE_DEFAULT_LIMIT,
    assess_absence_of_voltage,
)


def test_zero_is_dead():
    # NFPA 70E:2024 120.6(7), EN 50110-1:2013 6.2.4: verify de-energized, no threshold [M].
    assert assess_absence_of_voltage(0.0).dead is True


def test_non_zero_needs_its_explanation():
    # Near-zero default with a note asked for any non-zero reading [P].
    assert assess_absence_of_voltage(0.4).dead is None
    assert assess_absence_of_voltage(0.4, explained=True).dead is True


def test_an_extra_low_voltage_is_not_absence():
    # 24 V lies inside IEC 60449 band I (≤ 50 V a.c.) [S], yet the conductor is not dead [P].
    judged = assess_absence_of_voltage(24.0, explained=True)
    assert judged.dead is False
    assert ABSENCE_OF_VOLTAGE_DEFAULT_LIMIT == 1.0


def test_a_job_limit_is_honoured():
    assert assess_absence_of_voltage(8.0, limit=12.0, explained=True).dead is True


def test_a_non_number_is_refused():
    with pytest.raises(ComputationError):
        assess_absence_of_voltage(float("nan"))
