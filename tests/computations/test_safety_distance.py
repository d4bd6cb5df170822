"""Checks of acceptance.computations.safety_distance against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.safety_distance import (
    intrusion_distance,
    iso_13855_maximum_stopping_time,
    iso_13855_minimum_distance,
    overall_stopping_time,
    stopping_time_trials,
)

FLOAT_RELATIVE = 1e-12


# -------------------------------------------------------------------------- §18 S = K T + C


def test_worked_example_recomputed_at_1600():
    # ISO 13855:2010, S = K × T + C [M] (reference values §18). Worked by hand:
    # light curtain d = 30 mm, device 20 ms + machine 280 ms → T = 0.3 s;
    # C = 8 × (30 − 14) = 128 mm; 2000 × 0.3 + 128 = 728 mm > 500 mm, so
    # S = 1600 × 0.3 + 128 = 608 mm (≥ 500 mm, stands).
    time = overall_stopping_time(0.280, 0.020)
    assert time == pytest.approx(0.3, rel=FLOAT_RELATIVE)
    result = iso_13855_minimum_distance(time, 30.0)
    assert result.distance_mm == pytest.approx(608.0, rel=FLOAT_RELATIVE)
    assert (result.approach_speed, result.intrusion_distance_mm) == (1600.0, 128.0)
    assert result.describe() == "S ≥ 608 mm"
    assert result.steps[0] == "C = 8 × (30 − 14) = 128 mm"
    assert result.steps[-1] == "728 mm > 500 mm: S = 1600 × 0.3 + 128 = 608 mm"
    assert (result.standard, result.edition, result.status) == ("ISO 13855", "2010", "M")
    assert "2024" in result.note


@pytest.mark.parametrize(
    ("time", "capability", "distance", "speed"),
    [
        # ISO 13855:2010, d ≤ 40 mm [M]; each figure worked by hand from S = K × T + C
        (0.1, 14.0, 200.0, 2000.0),  # 2000 × 0.1 + 0 = 200 mm, between 100 and 500 mm
        (0.02, 14.0, 100.0, 2000.0),  # 40 mm is below the 100 mm floor → 100 mm
        (0.25, 14.0, 500.0, 2000.0),  # exactly 500 mm: "S ≤ 500 mm" keeps K = 2000
        (0.26, 14.0, 500.0, 1600.0),  # 520 > 500 → 1600 × 0.26 = 416 < 500 → 500 mm
        (0.5, 20.0, 848.0, 1600.0),  # 1048 > 500 → 1600 × 0.5 + 48 = 848 mm
        (0.1, 10.0, 200.0, 2000.0),  # d < 14 mm: C = 8 (d − 14) is negative, taken as 0
        (0.1, 40.0, 408.0, 2000.0),  # d = 40 mm: C = 208, 200 + 208 = 408 mm
        # 40 mm < d ≤ 70 mm: S = 1600 × T + 850 [M]
        (0.2, 50.0, 1170.0, 1600.0),
        (0.0, 70.0, 850.0, 1600.0),
    ],
)
def test_minimum_distances(time, capability, distance, speed):
    result = iso_13855_minimum_distance(time, capability)
    assert result.distance_mm == pytest.approx(distance, rel=FLOAT_RELATIVE)
    assert result.approach_speed == speed


@pytest.mark.parametrize(
    ("capability", "intrusion"),
    [(14.0, 0.0), (20.0, 48.0), (30.0, 128.0), (40.0, 208.0), (8.0, 0.0)],  # C = 8 (d − 14) [M]
)
def test_intrusion_distance(capability, intrusion):
    assert intrusion_distance(capability) == pytest.approx(intrusion, rel=FLOAT_RELATIVE)


@given(st.floats(min_value=0.0, max_value=2.0), st.floats(min_value=0.0, max_value=2.0),
       st.sampled_from([10.0, 14.0, 20.0, 30.0, 40.0, 50.0, 70.0]))
def test_distance_never_falls_as_the_stop_gets_slower(first, second, capability):
    shorter, longer = sorted((first, second))
    assert (iso_13855_minimum_distance(shorter, capability).distance_mm
            <= iso_13855_minimum_distance(longer, capability).distance_mm)


@given(st.floats(min_value=0.0, max_value=3000.0),
       st.sampled_from([10.0, 14.0, 20.0, 30.0, 40.0, 50.0, 70.0]))
def test_maximum_stopping_time_inverts_the_distance(installed, capability):
    limit = iso_13855_maximum_stopping_time(installed, capability)
    if limit is None:
        assert not iso_13855_minimum_distance(0.0, capability).allows(installed)
        return
    # the distance for T_max fits (to rounding); a stop 1 ms slower does not
    assert iso_13855_minimum_distance(limit, capability).distance_mm <= installed * (1 + 1e-12)
    assert not iso_13855_minimum_distance(limit + 1e-3, capability).allows(installed)


def test_maximum_stopping_time_examples():
    # inverse of the worked example above: 608 mm with d = 30 mm allows T = 0.3 s [M]
    assert iso_13855_maximum_stopping_time(608.0, 30.0) == pytest.approx(0.3, rel=1e-12)
    # 300 mm with d = 14 mm: (300 − 0)/2000 = 0.15 s [M]
    assert iso_13855_maximum_stopping_time(300.0, 14.0) == pytest.approx(0.15, rel=1e-12)
    # 150 mm with d = 40 mm: C = 208 mm alone exceeds it, no stop is fast enough
    assert iso_13855_maximum_stopping_time(150.0, 40.0) is None
    assert iso_13855_maximum_stopping_time(90.0, 14.0) is None


def test_installed_distance_at_the_minimum_passes():
    result = iso_13855_minimum_distance(0.1, 14.0)
    assert result.allows(200.0) and result.allows(250.0)
    assert not result.allows(199.9)


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: iso_13855_minimum_distance(0.1, 80.0),
         "detection_capability_mm 80 mm is above 70 mm: multi-beam devices are placed by the "
         "number and heights of their beams, which is not encoded"),
        (lambda: iso_13855_minimum_distance(-0.1, 14.0),
         "overall_stopping_time -0.1 s must not be negative"),
        (lambda: iso_13855_minimum_distance(0.1, 0.0),
         "detection_capability_mm 0 mm must be greater than 0 mm"),
        (lambda: intrusion_distance(50.0),
         "detection_capability_mm 50 mm is above 40 mm: the formula C = 8 (d − 14) applies "
         "to d ≤ 40 mm"),
        (lambda: iso_13855_maximum_stopping_time(500.0, 90.0),
         "detection_capability_mm 90 mm is above 70 mm: multi-beam devices are placed by the "
         "number and heights of their beams, which is not encoded"),
        (lambda: iso_13855_minimum_distance(0.1, 14.0).allows(-5.0),
         "installed_distance_mm -5 mm must not be negative"),
        (lambda: overall_stopping_time(math.inf, 0.02),
         "machine_stopping_time inf s must be a finite number"),
    ],
)
def test_distance_rejects_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message


# -------------------------------------------------------------------------- stopping trials


def test_trial_statistics():
    # independent formula check [P]: 0.21, 0.23, 0.22 s → max 0.23, mean 0.22,
    # sample s = √((0.01² + 0.01² + 0)/2) = 0.01 s; max against 0.25 s passes with 8 % margin
    trials = stopping_time_trials([0.21, 0.23, 0.22], limit=0.25)
    assert trials.maximum == 0.23
    assert trials.mean == pytest.approx(0.22, rel=1e-12)
    assert trials.standard_deviation == pytest.approx(0.01, rel=1e-9)
    assert trials.passes and trials.margin == pytest.approx(0.08, rel=1e-9)
    assert trials.describe() == "t_max ≤ 0.25 s"


def test_the_maximum_decides_not_the_mean():
    # mean 0.24 s is inside 0.25 s, the slowest stop 0.27 s is not [P]
    trials = stopping_time_trials([0.22, 0.23, 0.27, 0.24], limit=0.25)
    assert trials.mean < 0.25 and not trials.passes and trials.margin < 0


def test_trial_at_the_limit_and_without_one():
    assert stopping_time_trials([0.2, 0.25], limit=0.25).passes
    alone = stopping_time_trials([0.2])
    assert (alone.standard_deviation, alone.limit, alone.passes, alone.margin) == (
        None, None, None, None
    )
    assert alone.describe() == "no limit given"


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (([],), "stopping_times is empty; give at least one trial"),
        (("0.2",), "stopping_times must be a list of times in s"),
        (([0.2, -0.1],), "stopping_times[1] -0.1 s must not be negative"),
        (([0.2], 0.0), "limit 0 s must be greater than 0 s"),
    ],
)
def test_trials_reject_bad_input(args, message):
    with pytest.raises(ComputationError) as caught:
        stopping_time_trials(*args)
    assert str(caught.value) == message
