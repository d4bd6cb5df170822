"""Checks of acceptance.computations.uncertainty against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math
import statistics
from datetime import date, datetime

import pytest
from hypothesis import given
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from acceptance.computations import ComputationError
from acceptance.computations.uncertainty import (
    ACCURACY_FORMS,
    AccuracySpec,
    CalibrationState,
    DecisionRule,
    Distribution,
    MeasurementCategory,
    Statement,
    average_responding_finding,
    calibration_state,
    combine_contributions,
    conformance_probability,
    decide_conformity,
    expanded_uncertainty,
    instrument_uncertainty,
    measurement_category_finding,
    normal_contribution,
    parse_accuracy_specification,
    parse_measurement_category,
    rectangular_contribution,
    resolution_contribution,
)

# Published figures quoted to three decimals are checked to half a unit of the last
# decimal; that separates a/√3 (0.781) from a/√3 with the resolution term added (U 1.562).
THREE_DECIMALS = 5e-4
# Arithmetic recomputed here in full precision: only float rounding separates the two.
FLOAT_RELATIVE = 1e-12


# --------------------------------------------------------------------------------------------
# The worked example of reference values §11: 230.4 V, ±(0.5 % of reading + 2 digits), 0.1 V,
# window 207–253 V.

EXAMPLE_READING = 230.4  # V, reference values §11 [S]
EXAMPLE_SPEC = "±(0.5 % of reading + 2 digits)"  # reference values §11 [S]
EXAMPLE_RESOLUTION = 0.1  # V, reference values §11 [S]
EXAMPLE_LOWER, EXAMPLE_UPPER = 207.0, 253.0  # V, reference values §11 [S]


@pytest.fixture
def example_budget():
    spec = parse_accuracy_specification(EXAMPLE_SPEC)
    return instrument_uncertainty(EXAMPLE_READING, spec, resolution=EXAMPLE_RESOLUTION)


def test_example_half_width():
    spec = parse_accuracy_specification(EXAMPLE_SPEC)
    # reference values §11: a = 0.005 × 230.4 V + 2 × 0.1 V = 1.352 V [S]
    assert spec.limit(EXAMPLE_READING, resolution=EXAMPLE_RESOLUTION) == pytest.approx(
        1.352, rel=FLOAT_RELATIVE
    )


def test_example_standard_uncertainty(example_budget):
    # reference values §11 / JCGM 100:2008 cl. 4.3.7: u = a/√3 = 0.781 V [S]
    assert_allclose(example_budget.combined_standard_uncertainty, 0.781, atol=THREE_DECIMALS)
    assert_allclose(
        example_budget.combined_standard_uncertainty, 1.352 / math.sqrt(3), rtol=FLOAT_RELATIVE
    )


def test_example_expanded_uncertainty(example_budget):
    # reference values §11 / JCGM 100:2008 cl. 6.2.1, 6.3.3: U = 2u = 1.561 V [S]
    assert example_budget.coverage_factor == 2.0
    assert_allclose(example_budget.expanded_uncertainty, 1.561, atol=THREE_DECIMALS)


def test_example_budget_lines(example_budget):
    # reference values §11: the digits term already covers the display, one contribution only [S]
    (line,) = example_budget.contributions
    assert line.distribution is Distribution.RECTANGULAR
    assert line.half_width == pytest.approx(1.352, rel=FLOAT_RELATIVE)
    # JCGM 100:2008 cl. 4.3.7: divisor √3 for a rectangular distribution [S]
    assert line.divisor == pytest.approx(math.sqrt(3), rel=FLOAT_RELATIVE)
    assert line.name == "instrument specification ±(0.5 % of reading + 2 digits)"


@pytest.mark.parametrize("rule", list(DecisionRule))
def test_example_passes_under_both_rules(example_budget, rule):
    # reference values §11: pass under simple and guarded acceptance [S]
    decision = decide_conformity(
        EXAMPLE_READING,
        lower_limit=EXAMPLE_LOWER,
        upper_limit=EXAMPLE_UPPER,
        expanded_uncertainty=example_budget.expanded_uncertainty,
        rule=rule,
        unit="V",
    )
    assert decision.statement is Statement.PASS
    assert decision.accepted


def test_example_guarded_acceptance_limits(example_budget):
    # ILAC-G8:09/2019 cl. 4.2.2: AL = TL ∓ U, here 207 + 1.561 and 253 − 1.561 V [S]
    decision = decide_conformity(
        EXAMPLE_READING,
        lower_limit=EXAMPLE_LOWER,
        upper_limit=EXAMPLE_UPPER,
        expanded_uncertainty=example_budget.expanded_uncertainty,
        rule=DecisionRule.GUARDED,
        unit="V",
    )
    assert_allclose(decision.acceptance_lower, 208.561, atol=THREE_DECIMALS)
    assert_allclose(decision.acceptance_upper, 251.439, atol=THREE_DECIMALS)
    assert decision.guard_band == example_budget.expanded_uncertainty
    assert decision.description == (
        "pass: 230.4 V meets 207 V to 253 V with a margin of more than U = 1.6 V"
        " (guarded acceptance)"
    )


def test_example_simple_acceptance_description(example_budget):
    # ILAC-G8:09/2019 cl. 4.2.1: simple acceptance, w = 0, AL = TL [S]
    decision = decide_conformity(
        EXAMPLE_READING,
        lower_limit=EXAMPLE_LOWER,
        upper_limit=EXAMPLE_UPPER,
        expanded_uncertainty=example_budget.expanded_uncertainty,
        unit="V",
    )
    assert decision.rule is DecisionRule.SIMPLE
    assert decision.guard_band == 0.0
    assert (decision.acceptance_lower, decision.acceptance_upper) == (207.0, 253.0)
    assert decision.description == "pass: 230.4 V meets 207 V to 253 V (simple acceptance)"


def test_example_conformance_probability(example_budget):
    # JCGM 106:2012 cl. 7.3 [M]: 230.4 V lies 30 u inside the window, so pc rounds to 1
    probability = conformance_probability(
        EXAMPLE_READING, example_budget.combined_standard_uncertainty, EXAMPLE_LOWER, EXAMPLE_UPPER
    )
    assert probability == pytest.approx(1.0, abs=1e-12)


def test_resolution_term_when_asked(example_budget):
    # JCGM 100:2008 F.2.2.1: u_res = δx/(2√3) [S]; cl. 5.1.2 quadrature [S]
    spec = parse_accuracy_specification(EXAMPLE_SPEC)
    budget = instrument_uncertainty(
        EXAMPLE_READING, spec, resolution=EXAMPLE_RESOLUTION, include_resolution=True
    )
    expected = math.sqrt((1.352 / math.sqrt(3)) ** 2 + (0.1 / (2 * math.sqrt(3))) ** 2)
    assert_allclose(budget.combined_standard_uncertainty, expected, rtol=FLOAT_RELATIVE)
    # the published 1.561 V leaves this term out: with it U rounds to 1.562 V
    # [S, reference values §11]
    assert abs(budget.expanded_uncertainty - 1.561) > THREE_DECIMALS


# --------------------------------------------------------------------------------------------
# GUM building blocks


def test_resolution_contribution_is_029_of_a_digit():
    # JCGM 100:2008 F.2.2.1: u = 0.29 δx (quoted to two digits, hence 1 % relative) [S]
    assert_allclose(resolution_contribution(1.0).standard_uncertainty, 0.29, rtol=1e-2)
    assert_allclose(
        resolution_contribution(1.0).standard_uncertainty, 1 / math.sqrt(12), rtol=FLOAT_RELATIVE
    )


def test_rectangular_contribution_divisor():
    # JCGM 100:2008 cl. 4.3.7, eq. (7): u² = a²/3 [S]
    line = rectangular_contribution("limit", 3.0)
    assert_allclose(line.standard_uncertainty**2, 3.0, rtol=FLOAT_RELATIVE)


def test_normal_contribution_divides_by_k():
    # JCGM 100:2008 cl. 4.3.3: certificate U with k = 2 → u = U/2 [S]
    line = normal_contribution("calibration certificate", 0.04, 2.0)
    assert line.distribution is Distribution.NORMAL
    assert line.standard_uncertainty == pytest.approx(0.02, rel=FLOAT_RELATIVE)


def test_quadrature_of_uncorrelated_contributions():
    # JCGM 100:2008 cl. 5.1.2, eq. (10), unit sensitivities: 3-4-5 triangle [S]
    budget = combine_contributions(
        [normal_contribution("one", 3.0, 1.0), normal_contribution("two", 4.0, 1.0)],
        coverage_factor=2.0,
    )
    assert budget.combined_standard_uncertainty == pytest.approx(5.0, rel=FLOAT_RELATIVE)
    assert budget.expanded_uncertainty == pytest.approx(10.0, rel=FLOAT_RELATIVE)


def test_empty_budget_is_refused():
    with pytest.raises(ComputationError, match="contributions is empty"):
        combine_contributions([])


def test_spec_without_digits_adds_resolution_by_default():
    # JCGM 100:2008 F.2.2.1 [S]; the digits term, when present, already bounds it [P]
    spec = parse_accuracy_specification("±1 % of range")
    budget = instrument_uncertainty(12.0, spec, resolution=0.01, range_full_scale=60.0)
    names = [line.name for line in budget.contributions]
    assert names == ["instrument specification ±1 % of range", "display resolution"]
    expected = math.sqrt((0.6 / math.sqrt(3)) ** 2 + (0.01 / math.sqrt(12)) ** 2)
    assert_allclose(budget.combined_standard_uncertainty, expected, rtol=FLOAT_RELATIVE)


# --------------------------------------------------------------------------------------------
# Range change: same instrument, another range


def test_range_change_changes_digit_term():
    # 60 V range counts 0.01 V, 600 V range 0.1 V [P]: a = 0.5 % × 23.04 V + 2 counts
    spec = parse_accuracy_specification("±(0.5 % of reading + 2 digits)")
    low_range = spec.limit(23.04, resolution=0.01, range_full_scale=60.0)
    high_range = spec.limit(23.04, resolution=0.1, range_full_scale=600.0)
    assert low_range == pytest.approx(0.1152 + 0.02, rel=FLOAT_RELATIVE)
    assert high_range == pytest.approx(0.1152 + 0.2, rel=FLOAT_RELATIVE)


def test_range_change_changes_range_term():
    # a = 1 % of full scale: 0.6 V on 60 V, 6 V on 600 V (definition of % of range) [P]
    spec = parse_accuracy_specification("±1 % of range")
    assert spec.limit(23.04, range_full_scale=60.0) == pytest.approx(0.6, rel=FLOAT_RELATIVE)
    assert spec.limit(23.04, range_full_scale=600.0) == pytest.approx(6.0, rel=FLOAT_RELATIVE)


def test_reading_above_range_is_refused():
    spec = parse_accuracy_specification("±1 % of range")
    with pytest.raises(ComputationError, match="reading 61 exceeds range_full_scale 60"):
        spec.limit(61.0, range_full_scale=60.0)


def test_missing_resolution_is_named():
    spec = parse_accuracy_specification("±(0.5 % + 2 digits)")
    with pytest.raises(ComputationError, match="resolution is missing"):
        spec.limit(230.4)


def test_missing_range_is_named():
    spec = parse_accuracy_specification("±1 % of range")
    with pytest.raises(ComputationError, match="range_full_scale is missing"):
        spec.limit(10.0)


def test_fixed_term_unit_mismatch_is_refused():
    spec = parse_accuracy_specification("±(3 % of reading + 0.2 A)")
    assert spec.limit(10.0, reading_unit="A") == pytest.approx(0.5, rel=FLOAT_RELATIVE)
    with pytest.raises(ComputationError, match="reading_unit 'mA' differs"):
        spec.limit(10.0, reading_unit="mA")


def test_negative_reading_uses_magnitude():
    # the percentage applies to the magnitude of a d.c. reading of either sign [P]
    spec = parse_accuracy_specification("±(0.5 % + 2 digits)")
    assert spec.limit(-12.0, resolution=0.01) == spec.limit(12.0, resolution=0.01)


# --------------------------------------------------------------------------------------------
# Parser


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("±(0.5 % of reading + 2 digits)", AccuracySpec(percent_of_reading=0.5, digits=2)),
        ("±(0.5% rdg + 2 dgt)", AccuracySpec(percent_of_reading=0.5, digits=2)),
        ("±1 % of range", AccuracySpec(percent_of_range=1.0)),
        ("±(2 % + 5 counts)", AccuracySpec(percent_of_reading=2.0, digits=5)),
        ("±0.3 % of reading", AccuracySpec(percent_of_reading=0.3)),
        ("±(1.0 % + 3)", AccuracySpec(percent_of_reading=1.0, digits=3)),
        ("±0.05 Ω", AccuracySpec(absolute_value=0.05, absolute_unit="Ω")),
        (
            "±(3 % of reading + 0.2 A)",
            AccuracySpec(percent_of_reading=3.0, absolute_value=0.2, absolute_unit="A"),
        ),
        ("+/-(0.5 % of reading + 2 digits)", AccuracySpec(percent_of_reading=0.5, digits=2)),
        ("+-(0.5% rdg + 2 d)", AccuracySpec(percent_of_reading=0.5, digits=2)),
        ("± 0.05 ohm", AccuracySpec(absolute_value=0.05, absolute_unit="Ω")),
        ("±(0,8 % rdg + 1 dgt)", AccuracySpec(percent_of_reading=0.8, digits=1)),
        (
            "±(0.1 % rdg + 0.05 % f.s. + 1 digit)",
            AccuracySpec(percent_of_reading=0.1, percent_of_range=0.05, digits=1),
        ),
        ("±(2 % + 0.5 °C)", AccuracySpec(2.0, absolute_value=0.5, absolute_unit="°C")),
        ("0.5 % + 2", AccuracySpec(percent_of_reading=0.5, digits=2)),
    ],
)
def test_parser_reads_datasheet_forms(text, expected):
    # the datasheet forms listed for this module; bare '%' = % of reading, bare n = digits [P]
    assert parse_accuracy_specification(text) == expected


@pytest.mark.parametrize(
    ("spec", "phrase"),
    [
        (AccuracySpec(percent_of_reading=0.5, digits=2), "±(0.5 % of reading + 2 digits)"),
        (AccuracySpec(percent_of_range=1.0), "±1 % of range"),
        (AccuracySpec(percent_of_reading=1.0, digits=1), "±(1 % of reading + 1 digit)"),
        (AccuracySpec(absolute_value=0.05, absolute_unit="Ω"), "±0.05 Ω"),
        (
            AccuracySpec(percent_of_reading=3.0, absolute_value=0.2, absolute_unit="A"),
            "±(3 % of reading + 0.2 A)",
        ),
    ],
)
def test_describe_writes_canonical_phrase(spec, phrase):
    assert spec.describe() == phrase


def test_every_listed_form_parses():
    for text in ACCURACY_FORMS:
        parse_accuracy_specification(text)


@pytest.mark.parametrize(
    ("text", "detail"),
    [
        ("", "it is empty"),
        ("   ", "it is empty"),
        ("±(0.5 % of reading + 2 digits", "an opening '(' has no closing ')'"),
        ("±0.5 % (of reading)", "brackets must enclose the whole specification"),
        ("±(0.5 % of blah)", "'% of blah' is neither % of reading nor % of range"),
        ("±(0.5 % + 2 + 3)", "it has two digits terms"),
        ("±(0.5 % rdg + 1 % rdg)", "it has two percent of reading terms"),
        ("±3", "a bare number is read as digits only after a percentage"),
        ("±0.5 rdg", "term '0.5 rdg' lacks its '%' sign"),
        ("±(0.5 % + )", "a term is empty"),
        ("±(-0.5 %)", "term '-0.5 %' does not start with a number"),
        ("class 1", "term 'class 1' does not start with a number"),
        ("±(0 % + 0 digits)", "every term is zero"),
        ("±0.5 % of reading!", "'% of reading!' is neither % of reading nor % of range"),
    ],
)
def test_parser_refuses_bad_text_and_lists_forms(text, detail):
    with pytest.raises(ComputationError) as raised:
        parse_accuracy_specification(text)
    message = str(raised.value)
    assert message.startswith(f"accuracy specification {text!r} cannot be read: {detail}")
    assert "accepted forms: ±(0.5 % of reading + 2 digits), ±(0.5% rdg + 2 dgt)" in message
    assert "'+/-' may stand for '±'" in message


def test_parser_refuses_non_text():
    with pytest.raises(ComputationError, match="it is not text"):
        parse_accuracy_specification(0.5)  # type: ignore[arg-type]


def test_spec_refuses_negative_terms_and_unitless_fixed_term():
    with pytest.raises(ComputationError, match="digits -1 must be zero or greater"):
        AccuracySpec(digits=-1)
    with pytest.raises(ComputationError, match="a fixed accuracy term needs its unit"):
        AccuracySpec(absolute_value=0.1)


_decimal_term = st.one_of(
    st.just(0.0), st.integers(1, 5000).map(lambda hundredths: hundredths / 100)
)


@given(
    percent_of_reading=_decimal_term,
    percent_of_range=_decimal_term,
    digits=st.integers(0, 50).map(float),
    absolute_value=_decimal_term,
    unit=st.sampled_from(["Ω", "A", "mV", "°C", "MΩ", "µF"]),
)
def test_describe_reads_back_to_the_same_spec(
    percent_of_reading, percent_of_range, digits, absolute_value, unit
):
    spec = AccuracySpec(
        percent_of_reading, percent_of_range, digits, absolute_value, unit if absolute_value else ""
    )
    if spec == AccuracySpec():
        return
    assert parse_accuracy_specification(spec.describe()) == spec


# --------------------------------------------------------------------------------------------
# Decision rules at and around a limit.
# ILAC-G8:09/2019 cl. 4.2.1 (simple: pass inside, fail outside) and cl. 4.2.3 (pass below
# TU − w; conditional pass in [TU − w, TU]; conditional fail in [TU, TU + w]; fail above
# TU + w) [S]. U = 1.5 and the offsets are exact binary fractions so that each boundary is
# hit exactly.

U = 1.5
UPPER = 253.0
LOWER = 207.0

_P, _CP, _CF, _F = (
    Statement.PASS,
    Statement.CONDITIONAL_PASS,
    Statement.CONDITIONAL_FAIL,
    Statement.FAIL,
)

# offset outward from the limit (negative = inside), simple statement, guarded statement
_AROUND_A_LIMIT = [
    pytest.param(-2.0, _P, _P, id="inside by more than U"),
    pytest.param(-U, _P, _CP, id="exactly at the acceptance limit"),
    pytest.param(-0.25, _P, _CP, id="just inside"),
    pytest.param(0.0, _P, _CP, id="exactly at the limit"),
    pytest.param(0.25, _F, _CF, id="just outside"),
    pytest.param(U, _F, _CF, id="outside by exactly U"),
    pytest.param(2.0, _F, _F, id="outside by more than U"),
]


@pytest.mark.parametrize(("offset", "simple", "guarded"), _AROUND_A_LIMIT)
@pytest.mark.parametrize(
    ("window", "reading_at"),
    [
        pytest.param({"upper_limit": UPPER}, lambda d: UPPER + d, id="one-sided upper"),
        pytest.param({"lower_limit": LOWER}, lambda d: LOWER - d, id="one-sided lower"),
        pytest.param(
            {"lower_limit": LOWER, "upper_limit": UPPER}, lambda d: UPPER + d, id="two-sided, top"
        ),
        pytest.param(
            {"lower_limit": LOWER, "upper_limit": UPPER},
            lambda d: LOWER - d,
            id="two-sided, bottom",
        ),
    ],
)
def test_statements_around_a_limit(window, reading_at, offset, simple, guarded):
    reading = reading_at(offset)
    simple_decision = decide_conformity(reading, expanded_uncertainty=U, **window)
    guarded_decision = decide_conformity(
        reading, expanded_uncertainty=U, rule=DecisionRule.GUARDED, **window
    )
    assert simple_decision.statement is simple
    assert guarded_decision.statement is guarded
    # ILAC-G8:09/2019 cl. 4.2.2: with a guard band only "pass" is an acceptance [S]
    assert guarded_decision.accepted is (guarded is Statement.PASS)
    assert simple_decision.accepted is (simple is Statement.PASS)


def test_guarded_acceptance_limits_one_sided():
    # ILAC-G8:09/2019 cl. 4.2.2: AL = TU − w, w = U [S]
    decision = decide_conformity(
        250.0, upper_limit=UPPER, expanded_uncertainty=U, rule=DecisionRule.GUARDED
    )
    assert decision.acceptance_upper == UPPER - U
    assert decision.acceptance_lower is None
    assert decision.guard_band == U


@pytest.mark.parametrize(
    ("reading", "kwargs", "description"),
    [
        (
            252.0,
            {"lower_limit": LOWER, "upper_limit": UPPER},
            "conditional pass: 252 V meets 207 V to 253 V but lies within U = 1.5 V of the"
            " upper limit (guarded acceptance)",
        ),
        (
            253.5,
            {"upper_limit": UPPER},
            "conditional fail: 253.5 V is above the upper limit 253 V by no more than"
            " U = 1.5 V (guarded acceptance)",
        ),
        (
            205.0,
            {"lower_limit": LOWER},
            "fail: 205 V is below the lower limit 207 V by more than U = 1.5 V"
            " (guarded acceptance)",
        ),
        (
            208.0,
            {"lower_limit": 207.0, "upper_limit": 209.0},
            "conditional pass: 208 V meets 207 V to 209 V but lies within U = 1.5 V of both"
            " limits (guarded acceptance)",
        ),
    ],
)
def test_guarded_descriptions(reading, kwargs, description):
    decision = decide_conformity(
        reading, expanded_uncertainty=U, rule=DecisionRule.GUARDED, unit="V", **kwargs
    )
    assert decision.description == description


def test_simple_descriptions_one_sided():
    passed = decide_conformity(2.5, lower_limit=1.0, expanded_uncertainty=0.1, unit="MΩ")
    assert passed.description == "pass: 2.5 MΩ meets at least 1 MΩ (simple acceptance)"
    failed = decide_conformity(254.0, upper_limit=UPPER, unit="V")
    assert failed.description == "fail: 254 V is above the upper limit 253 V (simple acceptance)"


def test_window_narrower_than_two_u_has_no_pass():
    # ILAC-G8:09/2019 cl. 4.2.2: AL = TL ± w crosses over when the window is < 2w [S]
    decision = decide_conformity(
        208.0,
        lower_limit=207.0,
        upper_limit=209.0,
        expanded_uncertainty=U,
        rule="guarded acceptance",
    )
    assert decision.statement is Statement.CONDITIONAL_PASS
    assert decision.acceptance_lower > decision.acceptance_upper


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({}, "lower_limit and upper_limit are both missing"),
        ({"lower_limit": 10.0, "upper_limit": 5.0}, "lower_limit 10 is above upper_limit 5"),
        ({"upper_limit": 5.0, "expanded_uncertainty": -1.0}, "expanded_uncertainty -1 must be"),
        ({"upper_limit": math.nan}, "upper_limit nan is not a finite number"),
    ],
)
def test_decision_refuses_bad_input(kwargs, message):
    with pytest.raises(ComputationError, match=message):
        decide_conformity(1.0, **kwargs)


def test_unknown_rule_is_refused():
    with pytest.raises(ValueError, match="'strict' is not a valid DecisionRule"):
        decide_conformity(1.0, upper_limit=2.0, rule="strict")  # type: ignore[arg-type]


_finite = st.floats(min_value=-1e6, max_value=1e6, allow_nan=False, allow_infinity=False)
_uncertainty = st.floats(min_value=0.0, max_value=1e4, allow_nan=False, allow_infinity=False)


@st.composite
def _windows(draw):
    sides = draw(st.sampled_from(["upper", "lower", "both"]))
    first, second = sorted((draw(_finite), draw(_finite)))
    if sides == "upper":
        return {"upper_limit": second}
    if sides == "lower":
        return {"lower_limit": first}
    return {"lower_limit": first, "upper_limit": second}


@given(reading=_finite, window=_windows(), uncertainty=_uncertainty)
def test_guarded_is_never_more_favourable_than_simple(reading, window, uncertainty):
    # ILAC-G8:09/2019 cl. 4.2.2–4.2.3: the guard band only moves the acceptance limit inward [S]
    simple = decide_conformity(reading, expanded_uncertainty=uncertainty, **window)
    guarded = decide_conformity(
        reading, expanded_uncertainty=uncertainty, rule=DecisionRule.GUARDED, **window
    )
    if guarded.accepted:
        assert simple.accepted
    if simple.statement is Statement.FAIL:
        assert guarded.statement in (Statement.CONDITIONAL_FAIL, Statement.FAIL)
    # inside / outside the tolerance is the same call under both rules
    inside = guarded.statement in (Statement.PASS, Statement.CONDITIONAL_PASS)
    assert inside is simple.accepted


@given(
    standard_uncertainty=st.floats(min_value=0.0, max_value=1e6),
    smaller_k=st.floats(min_value=0.1, max_value=10.0),
    extra=st.floats(min_value=0.0, max_value=10.0),
)
def test_expanded_uncertainty_grows_with_k(standard_uncertainty, smaller_k, extra):
    # JCGM 100:2008 cl. 6.2.1: U = k u [S]
    assert expanded_uncertainty(standard_uncertainty, smaller_k + extra) >= expanded_uncertainty(
        standard_uncertainty, smaller_k
    )


# --------------------------------------------------------------------------------------------
# Conformance probability (JCGM 106:2012 cl. 7.3 [M])

# Standard normal CDF, NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.1 (table to
# five decimals, hence 5e-6) [S]: Φ(1) = 0.84134, Φ(2) = 0.97725.
TABLE_FIVE_DECIMALS = 5e-6


def test_one_sided_upper_two_u_inside():
    assert_allclose(
        conformance_probability(8.0, 1.0, upper_limit=10.0), 0.97725, atol=TABLE_FIVE_DECIMALS
    )


def test_one_sided_lower_one_u_inside():
    assert_allclose(
        conformance_probability(11.0, 1.0, lower_limit=10.0), 0.84134, atol=TABLE_FIVE_DECIMALS
    )


def test_reading_on_a_one_sided_limit_is_one_half():
    # JCGM 106:2012 [M]: a symmetric PDF centred on the limit puts half its mass inside
    assert conformance_probability(10.0, 0.3, upper_limit=10.0) == pytest.approx(0.5, abs=1e-15)


def test_two_sided_against_reference_library():
    # Python statistics.NormalDist.cdf, an independent Φ built on erfc (stdlib) [S]; both are
    # double-precision evaluations of one function, so they agree to float rounding
    normal = statistics.NormalDist(mu=230.4, sigma=12.0)
    expected = normal.cdf(253.0) - normal.cdf(207.0)
    assert_allclose(conformance_probability(230.4, 12.0, 207.0, 253.0), expected, rtol=1e-12)


def test_conformance_probability_refuses_zero_uncertainty():
    with pytest.raises(ComputationError, match="standard_uncertainty 0 must be greater than zero"):
        conformance_probability(1.0, 0.0, upper_limit=2.0)


@given(reading=_finite, standard_uncertainty=st.floats(1e-6, 1e6), window=_windows())
def test_conformance_probability_is_a_probability(reading, standard_uncertainty, window):
    probability = conformance_probability(reading, standard_uncertainty, **window)
    assert 0.0 <= probability <= 1.0


@given(
    centre=_finite,
    half_width=st.floats(min_value=1e-3, max_value=1e4),
    fraction=st.floats(min_value=1e-3, max_value=1.0),
)
def test_centre_of_window_with_small_u_is_at_least_half(centre, half_width, fraction):
    # 2Φ(h/u) − 1 ≥ 0.5 whenever u ≤ h/0.6745; u ≤ h is taken as "small" [S, normal table]
    probability = conformance_probability(
        centre, fraction * half_width, centre - half_width, centre + half_width
    )
    assert probability >= 0.5


# --------------------------------------------------------------------------------------------
# Measurement categories (IEC 61010; reference values §14 [S])


def test_cat_ii_600_on_cat_iii_400_is_a_finding():
    # reference values §14: category and voltage rating at least those of the point [S]
    finding = measurement_category_finding("CAT II", 600, "CAT III", 400)
    assert not finding.adequate
    assert finding.phrase == (
        "CAT II 600 V instrument is not adequate for a CAT III 400 V point:"
        " its category is below CAT III"
    )


def test_voltage_rating_below_working_voltage_is_a_finding():
    finding = measurement_category_finding(MeasurementCategory.CAT_IV, 300, "CAT III", 400)
    assert not finding.adequate
    assert finding.phrase.endswith("its voltage rating 300 V is below 400 V")


def test_both_shortfalls_are_named():
    finding = measurement_category_finding("CAT II", 300, "CAT IV", 400)
    assert finding.phrase.endswith(
        "its category is below CAT IV and its voltage rating 300 V is below 400 V"
    )


@pytest.mark.parametrize(
    ("instrument", "voltage", "point", "working"),
    [("CAT III", 600, "CAT III", 400), ("CAT IV", 600, "CAT II", 230), ("CAT III", 400, "3", 400)],
)
def test_adequate_ratings(instrument, voltage, point, working):
    finding = measurement_category_finding(instrument, voltage, point, working)
    assert finding.adequate
    assert "is adequate for" in finding.phrase


@pytest.mark.parametrize(
    ("text", "category"),
    [
        ("CAT III", MeasurementCategory.CAT_III),
        ("cat 3", MeasurementCategory.CAT_III),
        ("IV", MeasurementCategory.CAT_IV),
        ("CAT-II", MeasurementCategory.CAT_II),
        ("2", MeasurementCategory.CAT_II),
    ],
)
def test_parse_measurement_category(text, category):
    assert parse_measurement_category(text) is category


def test_unknown_category_is_refused():
    with pytest.raises(ComputationError, match="measurement category 'CAT V' is not one of"):
        parse_measurement_category("CAT V")


# --------------------------------------------------------------------------------------------
# Calibration state (due date inclusive [P])


@pytest.mark.parametrize(
    ("calibrated", "due", "visit", "state"),
    [
        (date(2025, 3, 1), date(2026, 3, 1), date(2025, 9, 15), CalibrationState.IN_CALIBRATION),
        (date(2025, 3, 1), date(2026, 3, 1), date(2026, 3, 1), CalibrationState.IN_CALIBRATION),
        (date(2025, 3, 1), date(2026, 3, 1), date(2025, 3, 1), CalibrationState.IN_CALIBRATION),
        (date(2025, 3, 1), date(2026, 3, 1), date(2026, 3, 2), CalibrationState.EXPIRED),
        (
            date(2025, 3, 1),
            date(2026, 3, 1),
            date(2025, 2, 28),
            CalibrationState.CALIBRATED_AFTER_VISIT,
        ),
        (date(2025, 3, 1), None, date(2025, 9, 15), CalibrationState.NO_DUE_DATE),
        (None, None, date(2025, 9, 15), CalibrationState.NOT_RECORDED),
    ],
)
def test_calibration_state(calibrated, due, visit, state):
    assert calibration_state(calibrated, due, visit) is state


def test_expired_calibration_phrase():
    state = calibration_state(date(2024, 1, 10), date(2025, 1, 10), date(2025, 6, 2))
    assert state is CalibrationState.EXPIRED
    assert state.phrase == "calibration due before the visit (expired)"
    assert not state.valid


def test_datetime_is_read_as_its_date():
    state = calibration_state(date(2025, 3, 1), date(2026, 3, 1), datetime(2026, 3, 1, 17, 30))
    assert state is CalibrationState.IN_CALIBRATION
    assert state.valid


def test_due_date_before_calibration_is_refused():
    with pytest.raises(ComputationError, match="due_date 2025-01-01 is before calibration_date"):
        calibration_state(date(2025, 3, 1), date(2025, 1, 1), date(2025, 6, 1))


# --------------------------------------------------------------------------------------------
# Average-responding instruments (reference values §9)


# reference values §9 [S for meter tables]: form factor, average-responding reading ÷ true rms;
# table to three decimals, hence 5e-4.
@pytest.mark.parametrize(
    ("form_factor", "ratio"),
    [
        pytest.param(math.pi / (2 * math.sqrt(2)), 1.000, id="sine"),
        pytest.param(1.0, 1.111, id="square"),
        pytest.param(2 / math.sqrt(3), 0.962, id="triangle"),
        pytest.param(math.pi / 2, 0.707, id="half-wave rectified"),
    ],
)
def test_reading_ratio_matches_waveform_table(form_factor, ratio):
    finding = average_responding_finding(False, form_factor=form_factor)
    assert_allclose(finding.reading_ratio, ratio, atol=THREE_DECIMALS)


def test_rectifier_current_is_flagged():
    # reference values §9 [P]: capacitor-input rectifier current, crest factor 2.5–4.5
    finding = average_responding_finding(False, crest_factor=3.0)
    assert finding.flagged
    assert finding.phrase == (
        "average-responding instrument used where the crest factor 3.00 departs from a sine's"
        " 1.41 by more than 5 %"
    )


def test_half_wave_reading_ratio_in_phrase():
    # reference values §9 [S]: half-wave rectified, FF 1.5708, reading ÷ rms 0.707
    finding = average_responding_finding(False, form_factor=1.5708)
    assert finding.flagged
    assert finding.phrase.endswith("it reads about 70.7 % of the true rms")


def test_true_rms_required_is_flagged_on_a_sine():
    finding = average_responding_finding(False, true_rms_required=True, crest_factor=math.sqrt(2))
    assert finding.flagged
    assert finding.phrase == "average-responding instrument used where true RMS is required"


def test_sine_with_average_responding_is_not_flagged():
    finding = average_responding_finding(False, crest_factor=1.42, form_factor=1.11)
    assert not finding.flagged


def test_true_rms_instrument_is_not_flagged():
    assert not average_responding_finding(True, true_rms_required=True, crest_factor=3.0).flagged


def test_crest_factor_below_one_is_refused():
    with pytest.raises(ComputationError, match="crest_factor 0.9 is below 1"):
        average_responding_finding(False, crest_factor=0.9)
