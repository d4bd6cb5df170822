"""Checks of acceptance.computations.thermography against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.thermography import (
    AMBIENT_BANDS,
    SIMILAR_COMPONENT_BANDS,
    ThermalSeverity,
    classify_thermal_survey,
    severity_over_ambient,
    severity_over_similar,
    terminal_temperature_rating,
)

S = ThermalSeverity


# NETA MTS/ATS thermographic table (reference values §12) [S, table number M]: over a similar
# component 1-3 possible, 4-15 probable, > 15 major. The 3 → 4 gap is closed as "ΔT < 4
# is possible" (module docstring).
@pytest.mark.parametrize(
    ("delta", "severity"),
    [
        (0.0, S.NO_INDICATION),
        (0.99, S.NO_INDICATION),
        (-5.0, S.NO_INDICATION),  # cooler than its twin: no hot-spot indication
        (1.0, S.POSSIBLE_DEFICIENCY),  # published lower bound, 1-3 °C [S]
        (3.0, S.POSSIBLE_DEFICIENCY),  # published upper bound [S]
        (3.5, S.POSSIBLE_DEFICIENCY),  # in the gap, closed downwards
        (3.999, S.POSSIBLE_DEFICIENCY),  # in the gap, closed downwards
        (4.0, S.PROBABLE_DEFICIENCY),  # published lower bound, 4-15 °C [S]
        (15.0, S.PROBABLE_DEFICIENCY),  # published upper bound [S]
        (15.01, S.MAJOR_DISCREPANCY),  # "> 15 °C" [S]
        (60.0, S.MAJOR_DISCREPANCY),
    ],
)
def test_over_similar_component(delta, severity):
    assert severity_over_similar(delta) is severity


# NETA MTS/ATS (reference values §12) [S]: over ambient 1-10 possible, 11-20 probable, 21-40
# monitor, > 40 major. Gaps 10 → 11 and 20 → 21 are closed downwards.
@pytest.mark.parametrize(
    ("delta", "severity"),
    [
        (0.5, S.NO_INDICATION),
        (1.0, S.POSSIBLE_DEFICIENCY),  # 1-10 °C [S]
        (10.0, S.POSSIBLE_DEFICIENCY),  # 1-10 °C [S]
        (10.5, S.POSSIBLE_DEFICIENCY),  # in the gap, closed downwards
        (11.0, S.PROBABLE_DEFICIENCY),  # 11-20 °C [S]
        (20.0, S.PROBABLE_DEFICIENCY),  # 11-20 °C [S]
        (20.5, S.PROBABLE_DEFICIENCY),  # in the gap, closed downwards
        (21.0, S.MONITOR),  # 21-40 °C [S]
        (40.0, S.MONITOR),  # 21-40 °C [S]
        (40.1, S.MAJOR_DISCREPANCY),  # > 40 °C [S]
    ],
)
def test_over_ambient(delta, severity):
    assert severity_over_ambient(delta) is severity


def test_bands_describe_their_closed_boundaries():
    assert [b.describe() for b in SIMILAR_COMPONENT_BANDS] == [
        "ΔT < 1 K", "1 K ≤ ΔT < 4 K", "4 K ≤ ΔT ≤ 15 K", "ΔT > 15 K",
    ]
    assert [b.describe() for b in AMBIENT_BANDS] == [
        "ΔT < 1 K", "1 K ≤ ΔT < 11 K", "11 K ≤ ΔT < 21 K", "21 K ≤ ΔT ≤ 40 K", "ΔT > 40 K",
    ]


@pytest.mark.parametrize("bands", [SIMILAR_COMPONENT_BANDS, AMBIENT_BANDS])
@given(delta=st.floats(min_value=-100.0, max_value=500.0))
def test_bands_cover_every_value_exactly_once(bands, delta):
    assert sum(b.contains(delta) for b in bands) == 1


@given(st.floats(min_value=-50, max_value=200), st.floats(min_value=-50, max_value=200))
def test_severity_never_falls_as_the_difference_grows(first, second):
    low, high = sorted((first, second))
    assert severity_over_similar(low) <= severity_over_similar(high)
    assert severity_over_ambient(low) <= severity_over_ambient(high)


@pytest.mark.parametrize(
    ("component", "similar", "ambient", "severity", "governing"),
    [
        # 5 K over its twin (probable) but 45 K over ambient (major): ambient governs
        (70.0, 65.0, 25.0, S.MAJOR_DISCREPANCY, "ambient"),
        # 20 K over its twin (major), 30 K over ambient (monitor): twin governs
        (55.0, 35.0, 25.0, S.MAJOR_DISCREPANCY, "similar component"),
        # both probable: the similar-component comparison is named
        (40.0, 35.0, 25.0, S.PROBABLE_DEFICIENCY, "similar component"),
        (40.0, None, 25.0, S.PROBABLE_DEFICIENCY, "ambient"),
        (40.0, 38.0, None, S.POSSIBLE_DEFICIENCY, "similar component"),
    ],
)
def test_survey_takes_the_worse_comparison(component, similar, ambient, severity, governing):
    # reference values §12: take the worse of the two comparisons
    finding = classify_thermal_survey(component, similar, ambient)
    assert (finding.severity, finding.governing_comparison) == (severity, governing)
    assert finding.action == severity.action


def test_survey_reports_both_differences():
    finding = classify_thermal_survey(70.0, 65.0, 25.0)
    assert (finding.over_similar, finding.over_ambient) == (5.0, 45.0)
    assert finding.severity_over_similar is S.PROBABLE_DEFICIENCY
    assert finding.action == "major discrepancy; repair immediately"  # NETA action [S]


@pytest.mark.parametrize(
    ("arguments", "message"),
    [
        ((40.0, None, None),
         "similar_component_temperature_c and ambient_temperature_c are both missing; "
         "give at least one reference temperature"),
        ((-300.0, None, 20.0), "component_temperature_c -300 °C is below absolute zero "
         "(-273.15 °C)"),
        ((40.0, -274.0, None), "similar_component_temperature_c -274 °C is below absolute "
         "zero (-273.15 °C)"),
        ((40.0, None, math.inf), "ambient_temperature_c inf °C must be a finite number"),
    ],
)
def test_survey_rejects_bad_input(arguments, message):
    with pytest.raises(ComputationError) as caught:
        classify_thermal_survey(*arguments)
    assert str(caught.value) == message


# -------------------------------------------------------------------------- NEC 110.14(C)


@pytest.mark.parametrize(
    ("kwargs", "temperature", "clause"),
    [
        # ≤ 100 A → 60 °C (NEC 110.14(C)(1)(a), reference values §12) [S]
        ({"circuit_rating": 100.0}, 60.0, "110.14(C)(1)(a)"),
        ({"circuit_rating": 20.0, "marked_conductor_gauge": 12}, 60.0, "110.14(C)(1)(a)"),
        # > 100 A → 75 °C (NEC 110.14(C)(1)(b)) [S]
        ({"circuit_rating": 125.0}, 75.0, "110.14(C)(1)(b)"),
        ({"circuit_rating": 200.0, "marked_conductor_gauge": "3/0"}, 75.0, "110.14(C)(1)(b)"),
        # marked 14-1 AWG → 60 °C even above 100 A (NEC 110.14(C)(1)(a)) [S]
        ({"circuit_rating": 110.0, "marked_conductor_gauge": 1}, 60.0, "110.14(C)(1)(a)"),
        # listed and identified for 75 °C (NEC 110.14(C)(1)(a)(3)) [S]
        ({"circuit_rating": 30.0, "listed_temperature_c": 75.0}, 75.0, "110.14(C)"),
        # motor design B, C or D on a small circuit → 75 °C (NEC 110.14(C)(1)(a)(4)) [M]
        ({"circuit_rating": 30.0, "motor_design_letter": "b"}, 75.0, "110.14(C)(1)(a)(4)"),
    ],
)
def test_terminal_rating(kwargs, temperature, clause):
    rating = terminal_temperature_rating(**kwargs)
    assert (rating.temperature_c, rating.clause, rating.standard) == (
        temperature, clause, "NFPA 70 (NEC)"
    )


def test_terminal_rating_rejects_zero_current():
    with pytest.raises(ComputationError) as caught:
        terminal_temperature_rating(0.0)
    assert str(caught.value) == "circuit_rating 0 A must be greater than 0 A"
