"""Checks of acceptance.computations.rcd against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.rcd import (
    TOUCH_VOLTAGE_LIMIT,
    RcdType,
    maximum_earth_electrode_resistance,
    rcd_test_current,
    rcd_time_limit,
    rcd_trip_test,
    rcd_type_covers,
    tt_earth_electrode_check,
)

FLOAT_RELATIVE = 1e-12
# Tabulated resistances quoted to whole ohms: half an ohm.
WHOLE_OHMS = 0.5


# -------------------------------------------------------------------------- §17 time limits


@pytest.mark.parametrize(
    ("multiple", "selectivity", "minimum", "maximum", "phrase"),
    [
        # IEC 61008-1:2010 / IEC 61009-1:2010 Table 1, general type (reference values §17) [M]
        (1, "general", None, 0.3, "t ≤ 300 ms"),
        (2, "general", None, 0.15, "t ≤ 150 ms"),
        (5, "general", None, 0.04, "t ≤ 40 ms"),
        # the same table, type S: non-actuating time to maximum break time [M]
        (1, "selective", 0.13, 0.5, "130 ms ≤ t ≤ 500 ms"),
        (2, "selective", 0.06, 0.2, "60 ms ≤ t ≤ 200 ms"),
        (5, "Selective", 0.05, 0.15, "50 ms ≤ t ≤ 150 ms"),
    ],
)
def test_break_time_limits(multiple, selectivity, minimum, maximum, phrase):
    limit = rcd_time_limit(multiple, selectivity)
    assert (limit.minimum_time, limit.maximum_time, limit.must_trip) == (minimum, maximum, True)
    assert limit.describe() == phrase
    assert (limit.standard, limit.edition, limit.status) == (
        "IEC 61008-1 / IEC 61009-1", "2010", "M"
    )


def test_no_trip_at_half_rated_current():
    # IEC 61008-1 / IEC 61009-1: tripping current between ½ IΔn and IΔn → no trip at ½ IΔn [M]
    for selectivity in ("general", "selective"):
        limit = rcd_time_limit(0.5, selectivity)
        assert limit.describe() == "no trip"
        assert limit.passes(None)
        assert not limit.passes(0.8)


@pytest.mark.parametrize(
    ("selectivity", "time", "passes"),
    [
        # boundaries of IEC 61008-1 Table 1 at IΔn [M]: both ends are inside the limit
        ("general", 0.3, True),
        ("general", 0.301, False),
        ("general", 0.0, True),
        ("selective", 0.13, True),
        ("selective", 0.129, False),
        ("selective", 0.5, True),
        ("selective", 0.501, False),
    ],
)
def test_limit_boundaries(selectivity, time, passes):
    assert rcd_time_limit(1, selectivity).passes(time) is passes


def test_must_trip_fails_without_a_trip():
    assert not rcd_time_limit(1).passes(None)
    with pytest.raises(ComputationError) as caught:
        rcd_time_limit(1).passes(-0.01)
    assert str(caught.value) == "trip_time -0.01 s must not be negative"


# -------------------------------------------------------------------------- §17 types


@pytest.mark.parametrize(
    ("rated", "multiple", "waveform", "current"),
    [
        (0.030, 1, "sinusoidal", 0.030),  # IEC 61008-1 Table 1: I = IΔn [M]
        (0.030, 5, "sinusoidal", 0.150),  # 5 IΔn [M]
        (0.030, 1, "half_wave", 0.042),  # type A, IΔn > 10 mA: 1.4 IΔn [M]
        (0.030, 5, "half_wave", 0.210),  # type A: 7 IΔn [M]
        (0.010, 1, "half_wave", 0.020),  # type A, IΔn ≤ 10 mA: 2 IΔn [M]
        (0.030, 1, "smooth_dc", 0.060),  # IEC 62423 type B smooth d.c.: 2 IΔn [M]
        (0.030, 5, "smooth_dc", 0.300),  # IEC 62423 type B: 10 IΔn [M]
    ],
)
def test_test_currents(rated, multiple, waveform, current):
    assert rcd_test_current(rated, multiple, waveform) == pytest.approx(current, rel=1e-12)


@pytest.mark.parametrize(
    ("rcd_type", "sinusoidal", "half_wave", "smooth_dc"),
    [
        # IEC 61008-1 / IEC 61009-1 types AC and A; IEC 62423 types F and B [M]
        ("AC", True, False, False),
        ("A", True, True, False),
        ("f", True, True, False),
        (RcdType.B, True, True, True),
    ],
)
def test_types_cover_waveforms(rcd_type, sinusoidal, half_wave, smooth_dc):
    assert rcd_type_covers(rcd_type, "sinusoidal") is sinusoidal
    assert rcd_type_covers(rcd_type, "half_wave") is half_wave
    assert rcd_type_covers(rcd_type, "smooth_dc") is smooth_dc


def test_drive_needs_type_b():
    # A three-phase drive can produce smooth d.c. residual current; only type B is
    # specified for it (IEC 60364-5-53, choice of RCD type [M]; reference values §17)
    assert [t for t in ("AC", "A", "F", "B") if rcd_type_covers(t, "smooth_dc")] == ["B"]


def test_scaled_waveforms_keep_the_break_times():
    # type A half-wave and type B smooth d.c. rows: same times at the scaled currents [M]
    for waveform, rcd_type in (("half_wave", "A"), ("smooth_dc", "B")):
        for multiple, maximum in ((1, 0.3), (2, 0.15), (5, 0.04)):
            limit = rcd_time_limit(multiple, waveform=waveform, rcd_type=rcd_type)
            assert limit.maximum_time == maximum
    assert rcd_time_limit(1, waveform="smooth_dc").standard == "IEC 62423"


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"multiple": 1, "waveform": "half_wave", "rcd_type": "AC"},
         "a type AC RCD is not specified for half-wave (pulsating d.c.) residual current; "
         "test it with a waveform it covers"),
        ({"multiple": 1, "waveform": "smooth_dc", "rcd_type": "A"},
         "a type A RCD is not specified for smooth d.c. residual current; "
         "test it with a waveform it covers"),
        ({"multiple": 0.5, "waveform": "half_wave"},
         "the no-trip test at ½ IΔn is encoded for sinusoidal current only, not half-wave "
         "(pulsating d.c.): that tripping range starts lower"),
        ({"multiple": 3}, "multiple 3 has no encoded limit; use 0.5, 1, 2 or 5 (× IΔn)"),
        ({"multiple": 1, "selectivity": "delayed"},
         "selectivity 'delayed' is not known; use general, selective"),
        ({"multiple": 1, "waveform": "square"},
         "waveform 'square' is not known; use sinusoidal, half_wave, smooth_dc"),
        ({"multiple": 1, "rcd_type": "G"}, "rcd_type 'G' is not known; use AC, A, F, B"),
    ],
)
def test_time_limit_rejects_bad_input(kwargs, message):
    with pytest.raises(ComputationError) as caught:
        rcd_time_limit(**kwargs)
    assert str(caught.value) == message


def test_test_current_rejects_bad_input():
    with pytest.raises(ComputationError) as caught:
        rcd_test_current(0.0, 1)
    assert str(caught.value) == "rated_residual_current 0 A must be greater than 0 A"
    with pytest.raises(ComputationError) as caught:
        rcd_test_current(0.03, -1)
    assert str(caught.value) == "multiple -1 must be greater than 0"


# -------------------------------------------------------------------------- 0° and 180°


def test_both_phase_angles_must_pass_and_the_slower_is_reported():
    # [P] test at 0° and 180°; the longer time decides. Limit IEC 61008-1 Table 1 [M].
    result = rcd_trip_test(rcd_time_limit(1), [0.024, 0.031])
    assert (result.passes, result.worst) == (True, 0.031)
    slow = rcd_trip_test(rcd_time_limit(1), [0.024, 0.312])
    assert (slow.passes, slow.worst) == (False, 0.312)
    missing = rcd_trip_test(rcd_time_limit(1), [0.024, None])
    assert (missing.passes, missing.worst) == (False, None)


def test_no_trip_test_over_both_angles():
    half = rcd_time_limit(0.5)
    assert rcd_trip_test(half, [None, None]).passes
    tripped = rcd_trip_test(half, [None, 0.2])
    assert (tripped.passes, tripped.worst) == (False, 0.2)


def test_trip_test_rejects_bad_input():
    with pytest.raises(ComputationError) as caught:
        rcd_trip_test(rcd_time_limit(1), [])
    assert str(caught.value) == "trip_times is empty; give at least one result"
    with pytest.raises(ComputationError) as caught:
        rcd_trip_test(rcd_time_limit(1), [0.02, -0.03])
    assert str(caught.value) == "trip_times[1] -0.03 s must not be negative"


# -------------------------------------------------------------------------- §17 TT electrode


@pytest.mark.parametrize(
    ("rated", "maximum"),
    [
        # RA ≤ 50 V / IΔn (IEC 60364-4-41:2005 411.5.3 [M]); the same figures are
        # tabulated in BS 7671 Table 41.5 as 1667, 500, 167 and 100 Ω [M]
        (0.030, 1667.0),
        (0.100, 500.0),
        (0.300, 167.0),
        (0.500, 100.0),
    ],
)
def test_maximum_electrode_resistance(rated, maximum):
    assert maximum_earth_electrode_resistance(rated) == pytest.approx(maximum, abs=WHOLE_OHMS)


def test_electrode_check_at_and_over_the_limit():
    # 50/0.1 = 500 Ω exactly: RA at the limit passes (411.5.3 RA × IΔn ≤ 50 V [M])
    at_limit = tt_earth_electrode_check(500.0, 0.1)
    assert at_limit.passes and at_limit.touch_voltage == pytest.approx(50.0, rel=FLOAT_RELATIVE)
    over = tt_earth_electrode_check(520.0, 0.1)
    assert not over.passes and over.touch_voltage == pytest.approx(52.0, rel=FLOAT_RELATIVE)
    assert tt_earth_electrode_check(200.0, 0.03).describe() == "RA ≤ 50 V / 0.03 A = 1667 Ω"
    assert (at_limit.standard, at_limit.clause, at_limit.edition) == (
        "IEC 60364-4-41", "411.5.3", "2005"
    )


@given(st.floats(min_value=0.1, max_value=5000.0), st.floats(min_value=0.001, max_value=3.0))
def test_electrode_check_is_ra_times_idn(resistance, rated):
    check = tt_earth_electrode_check(resistance, rated)
    if abs(resistance * rated - TOUCH_VOLTAGE_LIMIT) > 1e-9:
        assert check.passes == (resistance * rated <= TOUCH_VOLTAGE_LIMIT)


def test_local_touch_voltage_limit():
    # a lower conventional touch voltage where a local rule sets one (25 V) [P]
    assert maximum_earth_electrode_resistance(0.03, 25.0) == pytest.approx(833.33, abs=5e-3)


def test_electrode_rejects_bad_input():
    with pytest.raises(ComputationError) as caught:
        tt_earth_electrode_check(-5.0, 0.03)
    assert str(caught.value) == "earth_resistance -5 Ω must be greater than 0 Ω"
    with pytest.raises(ComputationError) as caught:
        maximum_earth_electrode_resistance(0.0)
    assert str(caught.value) == "rated_residual_current 0 A must be greater than 0 A"
