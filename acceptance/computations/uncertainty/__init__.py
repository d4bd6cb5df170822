"""Measurement uncertainty of field readings and the decision rules that use it.

An instrument's datasheet accuracy, read as a rectangular limit, gives a
standard uncertainty (GUM); the expanded uncertainty then sets the guard band of
a decision rule (ILAC-G8). Also here: conformance probability (JCGM 106), the
measurement-category rating of an instrument against the point it is used on
(IEC 61010), the calibration state of an instrument on a visit date, and a flag
for average-responding instruments on distorted waveforms.

Every function is pure: plain numbers, dates and strings in; numbers, enums and
frozen dataclasses out. Units are the caller's: every value of one reading
(reading, resolution, range, absolute accuracy term, limits, uncertainty) is in
the same unit.
"""


from __future__ import annotations

from .budget import (
    Distribution,
    UncertaintyBudget,
    UncertaintyContribution,
    combine_contributions,
    expanded_uncertainty,
    instrument_uncertainty,
    normal_contribution,
    rectangular_contribution,
    resolution_contribution,
)
from .decision import Decision, DecisionRule, Statement, conformance_probability, decide_conformity
from .specification import ACCURACY_FORMS, AccuracySpec, parse_accuracy_specification
from .suitability import (
    AVERAGE_RESPONDING_SCALE_FACTOR,
    SINE_CREST_FACTOR,
    SINE_FORM_FACTOR,
    CalibrationState,
    CategoryFinding,
    MeasurementCategory,
    ResponseFinding,
    average_responding_finding,
    calibration_state,
    measurement_category_finding,
    parse_measurement_category,
)

__all__ = [
    "ACCURACY_FORMS",
    "AVERAGE_RESPONDING_SCALE_FACTOR",
    "SINE_CREST_FACTOR",
    "SINE_FORM_FACTOR",
    "AccuracySpec",
    "CalibrationState",
    "CategoryFinding",
    "DecisionRule",
    "Decision",
    "Distribution",
    "MeasurementCategory",
    "ResponseFinding",
    "Statement",
    "UncertaintyBudget",
    "UncertaintyContribution",
    "average_responding_finding",
    "calibration_state",
    "combine_contributions",
    "conformance_probability",
    "decide_conformity",
    "expanded_uncertainty",
    "instrument_uncertainty",
    "measurement_category_finding",
    "normal_contribution",
    "parse_accuracy_specification",
    "parse_measurement_category",
    "rectangular_contribution",
    "resolution_contribution",
]
