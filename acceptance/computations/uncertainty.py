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

import math
import re
from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date, datetime
from enum import IntEnum, StrEnum

import numpy as np

from ._errors import ComputationError

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


# --------------------------------------------------------------------------------------------
# Formatting shared by the phrases


def _format_number(value: float) -> str:
    """Shortest positional text that reads back as the same float (no exponent)."""
    text = repr(float(value))
    if "e" in text or "n" in text:  # exponent form, inf or nan: let numpy write it out
        return str(np.format_float_positional(float(value), trim="-"))
    return text[:-2] if text.endswith(".0") else text


def _format_significant(value: float, digits: int = 2) -> str:
    """Round to ``digits`` significant digits, positional.

    JCGM 100:2008 clause 7.2.6: an uncertainty is usually quoted to at most two
    significant digits [M].
    """
    if value == 0 or not math.isfinite(value):
        return _format_number(value)
    exponent = math.floor(math.log10(abs(value)))
    decimals = digits - 1 - exponent
    rounded = round(value, decimals)
    return f"{rounded:.{max(decimals, 0)}f}"


def _with_unit(text: str, unit: str) -> str:
    return f"{text} {unit}" if unit else text


def _require_finite(name: str, value: float) -> None:
    if not math.isfinite(value):
        raise ComputationError(f"{name} {value!r} is not a finite number")


def _require_positive(name: str, value: float) -> None:
    _require_finite(name, value)
    if value <= 0:
        raise ComputationError(f"{name} {_format_number(value)} must be greater than zero")


def _require_non_negative(name: str, value: float) -> None:
    _require_finite(name, value)
    if value < 0:
        raise ComputationError(f"{name} {_format_number(value)} must be zero or greater")


# --------------------------------------------------------------------------------------------
# Accuracy specifications as printed on datasheets

ACCURACY_FORMS = (
    "±(0.5 % of reading + 2 digits)",
    "±(0.5% rdg + 2 dgt)",
    "±1 % of range",
    "±(2 % + 5 counts)",
    "±(1.0 % + 3)",
    "±0.05 Ω",
    "±(3 % of reading + 0.2 A)",
)
"""Examples of the accuracy specifications :func:`parse_accuracy_specification` reads."""

_ACCEPTED_FORMS_TEXT = (
    "accepted forms: "
    + ", ".join(ACCURACY_FORMS)
    + "; '+/-' may stand for '±'; a bare '%' means % of reading, and a bare number"
    " after a percentage means digits"
)

# Keys are compared after lower-casing and removing spaces, dots and hyphens, so that
# "f.s.", "F S" and "full-scale" all meet "fs" / "fullscale".
_READING_WORDS = frozenset(
    {"reading", "rdg", "rd", "value", "measuredvalue", "indication", "indicatedvalue"}
)
_RANGE_WORDS = frozenset({"range", "rng", "fullscale", "fs", "fsd"})
_DIGIT_WORDS = frozenset(
    {"digit", "digits", "dgt", "dgts", "dig", "d", "count", "counts", "ct", "cts", "lsd"}
)
_NUMBER = re.compile(r"^(?P<number>\d+(?:[.,]\d+)?|[.,]\d+)\s*(?P<rest>.*)$")
_UNIT = re.compile(r"^[A-Za-zΩµ°][A-Za-zΩµ°/·.²³0-9]*$")


def _word_key(text: str) -> str:
    key = text.strip().lower()
    if key.startswith("of "):
        key = key[3:]
    return re.sub(r"[\s.\-]", "", key)


def _normalise_unit(unit: str) -> str:
    """Spell a unit one way: Ω for ohm, µ (U+00B5) for micro, °C for degC."""
    unit = unit.replace("\u2126", "Ω").replace("\u03bc", "µ")
    unit = re.sub(r"(?i)ohms?$", "Ω", unit)
    unit = re.sub(r"(?i)^deg\s*C$", "°C", unit)
    unit = re.sub(r"^u(?=[AVFHSΩsWm]|$)", "µ", unit)
    return unit


@dataclass(frozen=True)
class AccuracySpec:
    """Instrument accuracy, ±(p_rdg % of reading + p_rng % of range + n digits + c).

    Parameters
    ----------
    percent_of_reading : float
        Percentage of the absolute reading. [%]
    percent_of_range : float
        Percentage of the range's full-scale value. [%]
    digits : float
        Number of counts of the least significant displayed digit. [unitless]
    absolute_value : float
        A fixed term in ``absolute_unit``. [absolute_unit]
    absolute_unit : str
        Unit of ``absolute_value`` as written on the datasheet, normalised (Ω, µ);
        required when ``absolute_value`` is not zero. [unitless]

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 4.3.7: a manufacturer's specification gives
       limits ±a inside which the value is taken to lie [S].
    """

    percent_of_reading: float = 0.0
    percent_of_range: float = 0.0
    digits: float = 0.0
    absolute_value: float = 0.0
    absolute_unit: str = ""

    def __post_init__(self) -> None:
        for name in ("percent_of_reading", "percent_of_range", "digits", "absolute_value"):
            _require_non_negative(name, getattr(self, name))
        if self.absolute_value > 0 and not self.absolute_unit:
            raise ComputationError(
                f"absolute_unit is empty but absolute_value is"
                f" {_format_number(self.absolute_value)}; a fixed accuracy term needs its unit"
                " (e.g. 'Ω', 'A')"
            )

    def describe(self) -> str:
        """Write the specification back as one canonical phrase.

        Returns
        -------
        str
            E.g. ``"±(0.5 % of reading + 2 digits)"`` or ``"±1 % of range"``; the
            phrase reads back through :func:`parse_accuracy_specification` to an
            equal specification.
        """
        terms = []
        if self.percent_of_reading:
            terms.append(f"{_format_number(self.percent_of_reading)} % of reading")
        if self.percent_of_range:
            terms.append(f"{_format_number(self.percent_of_range)} % of range")
        if self.digits:
            word = "digit" if self.digits == 1 else "digits"
            terms.append(f"{_format_number(self.digits)} {word}")
        if self.absolute_value:
            terms.append(f"{_format_number(self.absolute_value)} {self.absolute_unit}")
        if not terms:
            return "±0"
        if len(terms) == 1:
            return f"±{terms[0]}"
        return "±(" + " + ".join(terms) + ")"

    def limit(
        self,
        reading: float,
        resolution: float | None = None,
        range_full_scale: float | None = None,
        reading_unit: str | None = None,
    ) -> float:
        """Half-width a of the accuracy limits around a reading.

        Parameters
        ----------
        reading : float
            The displayed value; its magnitude is used. [reading unit]
        resolution : float, optional
            Value of one count of the least significant digit on the range used;
            needed when the specification has a digits term. [reading unit]
        range_full_scale : float, optional
            Full-scale value of the range used; needed for a percent-of-range
            term. The reading must not exceed it. [reading unit]
        reading_unit : str, optional
            When given, the fixed term's unit must match it (no conversion is
            made here). [unitless]

        Returns
        -------
        float
            a, so that the value lies within reading ± a. [reading unit]

        Notes
        -----
        a = p_rdg/100 · |reading| + p_rng/100 · range_full_scale + n · resolution + c

        References
        ----------
        .. [1] JCGM 100:2008 (GUM), clause 4.3.7 [S].
        """
        _require_finite("reading", reading)
        if resolution is not None:
            _require_positive("resolution", resolution)
        if range_full_scale is not None:
            _require_positive("range_full_scale", range_full_scale)
            if abs(reading) > range_full_scale:
                raise ComputationError(
                    f"reading {_format_number(reading)} exceeds range_full_scale "
                    f"{_format_number(range_full_scale)}; the specification {self.describe()}"
                    " covers readings within the range only"
                )
        if self.digits and resolution is None:
            raise ComputationError(
                f"resolution is missing; the specification {self.describe()} has a digits term,"
                " so the value of one count on the range used is needed"
            )
        if self.percent_of_range and range_full_scale is None:
            raise ComputationError(
                f"range_full_scale is missing; the specification {self.describe()} has a"
                " percent-of-range term, so the full-scale value of the range used is needed"
            )
        if (
            self.absolute_value
            and reading_unit is not None
            and _normalise_unit(reading_unit) != self.absolute_unit
        ):
            raise ComputationError(
                f"reading_unit {reading_unit!r} differs from the unit of the fixed term"
                f" {_format_number(self.absolute_value)} {self.absolute_unit}; convert the"
                " reading or the specification to one unit first"
            )
        reading_part = self.percent_of_reading / 100.0 * abs(reading)
        range_part = (
            0.0 if range_full_scale is None else self.percent_of_range / 100.0 * range_full_scale
        )
        digits_part = 0.0 if resolution is None else self.digits * resolution
        return reading_part + range_part + digits_part + self.absolute_value


def _specification_error(text: str, detail: str) -> ComputationError:
    return ComputationError(
        f"accuracy specification {text!r} cannot be read: {detail}; {_ACCEPTED_FORMS_TEXT}"
    )


def parse_accuracy_specification(text: str) -> AccuracySpec:
    """Read an accuracy specification as written on an instrument datasheet.

    Parameters
    ----------
    text : str
        E.g. ``"±(0.5 % of reading + 2 digits)"``, ``"±(0.5% rdg + 2 dgt)"``,
        ``"±1 % of range"``, ``"±(2 % + 5 counts)"``, ``"±(1.0 % + 3)"``,
        ``"±0.05 Ω"``, ``"±(3 % of reading + 0.2 A)"``; ``+/-`` or ``+-`` may stand
        for ``±``, and a decimal comma is read as a decimal point. [unitless]

    Returns
    -------
    AccuracySpec

    Raises
    ------
    ComputationError
        When the text is not one of the accepted forms; the message lists them.

    Notes
    -----
    Two datasheet conventions are applied [P]: a percentage with no basis
    (``2 %``) is a percentage of reading, and a bare number that follows a
    percentage (``±(1.0 % + 3)``) counts digits. A bare number alone (``±3``) is
    refused as ambiguous. Each kind of term may appear once.
    """
    if not isinstance(text, str):
        raise _specification_error(repr(text), "it is not text")
    body = text.strip().replace("+/-", "±").replace("+-", "±").replace("\u2213", "±")
    if not body:
        raise _specification_error(text, "it is empty")
    body = body.removeprefix("±").strip()
    if body.startswith("("):
        if not body.endswith(")"):
            raise _specification_error(text, "an opening '(' has no closing ')'")
        body = body[1:-1].strip()
    if "(" in body or ")" in body:
        raise _specification_error(text, "brackets must enclose the whole specification")

    fields: dict[str, float] = {}
    absolute_unit = ""
    bare_numbers: list[float] = []
    for term in re.split(r"\s*[+±]\s*", body):
        match = _NUMBER.match(term.strip())
        if not term.strip():
            raise _specification_error(text, "a term is empty")
        if match is None:
            raise _specification_error(text, f"term {term.strip()!r} does not start with a number")
        number = float(match["number"].replace(",", "."))
        rest = match["rest"].strip()
        if rest.startswith("%"):
            basis = _word_key(rest[1:])
            if basis == "" or basis in _READING_WORDS:
                kind = "percent_of_reading"
            elif basis in _RANGE_WORDS:
                kind = "percent_of_range"
            else:
                raise _specification_error(
                    text, f"'% {rest[1:].strip()}' is neither % of reading nor % of range"
                )
        elif _word_key(rest) in _DIGIT_WORDS:
            kind = "digits"
        elif rest == "":
            bare_numbers.append(number)
            continue
        elif _word_key(rest) in _READING_WORDS | _RANGE_WORDS:
            raise _specification_error(text, f"term {term.strip()!r} lacks its '%' sign")
        elif _UNIT.match(rest):
            kind = "absolute_value"
            absolute_unit = _normalise_unit(rest)
        else:
            raise _specification_error(text, f"{rest!r} in term {term.strip()!r} is not a unit")
        if kind in fields:
            raise _specification_error(text, f"it has two {kind.replace('_', ' ')} terms")
        fields[kind] = number

    if bare_numbers:
        if not any(kind.startswith("percent") for kind in fields):
            raise _specification_error(
                text, "a bare number is read as digits only after a percentage"
            )
        if len(bare_numbers) > 1 or "digits" in fields:
            raise _specification_error(text, "it has two digits terms")
        fields["digits"] = bare_numbers[0]
    if not any(fields.values()):
        raise _specification_error(text, "every term is zero")
    return AccuracySpec(absolute_unit=absolute_unit, **fields)


# --------------------------------------------------------------------------------------------
# Uncertainty budget


class Distribution(StrEnum):
    """Probability distribution assumed for an input quantity (JCGM 100:2008 clause 4.3)."""

    RECTANGULAR = "rectangular"
    TRIANGULAR = "triangular"
    NORMAL = "normal"


@dataclass(frozen=True)
class UncertaintyContribution:
    """One line of an uncertainty budget.

    Parameters
    ----------
    name : str
        What the contribution is, e.g. ``"instrument specification ±1 % of range"``.
    half_width : float
        Half-width a of the limits, or the expanded uncertainty quoted for a normal
        distribution. [reading unit]
    distribution : Distribution
        Assumed distribution.
    divisor : float
        half_width / divisor = standard uncertainty (√3 rectangular, √6 triangular,
        the quoted coverage factor for normal). [unitless]
    standard_uncertainty : float
        u(x_i). [reading unit]
    """

    name: str
    half_width: float
    distribution: Distribution
    divisor: float
    standard_uncertainty: float


@dataclass(frozen=True)
class UncertaintyBudget:
    """Contributions, their combination and the expanded uncertainty.

    Parameters
    ----------
    contributions : tuple of UncertaintyContribution
        Every input, in the order given.
    combined_standard_uncertainty : float
        u_c. [reading unit]
    coverage_factor : float
        k. [unitless]
    expanded_uncertainty : float
        U = k · u_c. [reading unit]
    """

    contributions: tuple[UncertaintyContribution, ...]
    combined_standard_uncertainty: float
    coverage_factor: float
    expanded_uncertainty: float


def rectangular_contribution(name: str, half_width: float) -> UncertaintyContribution:
    """Standard uncertainty of a quantity known only to lie within ±a.

    Parameters
    ----------
    name : str
        Label of the contribution.
    half_width : float
        a. [reading unit]

    Returns
    -------
    UncertaintyContribution

    Notes
    -----
    u = a / √3

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 4.3.7, equation (7) [S].
    """
    _require_non_negative("half_width", half_width)
    divisor = math.sqrt(3.0)
    return UncertaintyContribution(
        name, half_width, Distribution.RECTANGULAR, divisor, half_width / divisor
    )


def resolution_contribution(
    resolution: float, name: str = "display resolution"
) -> UncertaintyContribution:
    """Standard uncertainty from the resolution of a digital indication.

    Parameters
    ----------
    resolution : float
        δx, the value of one count of the least significant digit. [reading unit]
    name : str, optional
        Label of the contribution.

    Returns
    -------
    UncertaintyContribution
        Half-width δx/2, rectangular.

    Notes
    -----
    u = (δx / 2) / √3 = δx / (2√3) ≈ 0.29 δx

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause F.2.2.1 [S].
    """
    _require_positive("resolution", resolution)
    half_width = resolution / 2.0
    divisor = math.sqrt(3.0)
    return UncertaintyContribution(
        name, half_width, Distribution.RECTANGULAR, divisor, half_width / divisor
    )


def normal_contribution(
    name: str, quoted_uncertainty: float, coverage_factor: float
) -> UncertaintyContribution:
    """Standard uncertainty from an uncertainty quoted with a coverage factor.

    Parameters
    ----------
    name : str
        Label, e.g. ``"calibration certificate"``.
    quoted_uncertainty : float
        The expanded uncertainty as quoted, e.g. on a calibration certificate. [reading unit]
    coverage_factor : float
        The coverage factor it was quoted with. [unitless]

    Returns
    -------
    UncertaintyContribution

    Notes
    -----
    u = U_quoted / k

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 4.3.3 [S].
    """
    _require_non_negative("quoted_uncertainty", quoted_uncertainty)
    _require_positive("coverage_factor", coverage_factor)
    return UncertaintyContribution(
        name,
        quoted_uncertainty,
        Distribution.NORMAL,
        coverage_factor,
        quoted_uncertainty / coverage_factor,
    )


def expanded_uncertainty(standard_uncertainty: float, coverage_factor: float = 2.0) -> float:
    """Expanded uncertainty from a combined standard uncertainty.

    Parameters
    ----------
    standard_uncertainty : float
        u_c. [reading unit]
    coverage_factor : float, optional
        k; 2 gives a coverage probability of about 95 % for a normal distribution. [unitless]

    Returns
    -------
    float
        U. [reading unit]

    Notes
    -----
    U = k · u_c

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clauses 6.2.1 and 6.3.3 [S].
    """
    _require_non_negative("standard_uncertainty", standard_uncertainty)
    _require_positive("coverage_factor", coverage_factor)
    return coverage_factor * standard_uncertainty


def combine_contributions(
    contributions: Iterable[UncertaintyContribution], coverage_factor: float = 2.0
) -> UncertaintyBudget:
    """Combine uncorrelated contributions in quadrature and expand.

    Parameters
    ----------
    contributions : iterable of UncertaintyContribution
        At least one; each with sensitivity coefficient 1 (a direct reading).
    coverage_factor : float, optional
        k. [unitless]

    Returns
    -------
    UncertaintyBudget

    Notes
    -----
    u_c = √(Σ u_i²),  U = k · u_c

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clause 5.1.2, equation (10), uncorrelated inputs [S].
    .. [2] JCGM 100:2008 (GUM), clauses 6.2.1 and 6.3.3 [S].
    """
    items = tuple(contributions)
    if not items:
        raise ComputationError("contributions is empty; an uncertainty budget needs at least one")
    combined = math.sqrt(math.fsum(item.standard_uncertainty**2 for item in items))
    return UncertaintyBudget(
        items, combined, coverage_factor, expanded_uncertainty(combined, coverage_factor)
    )


def instrument_uncertainty(
    reading: float,
    specification: AccuracySpec,
    resolution: float | None = None,
    range_full_scale: float | None = None,
    coverage_factor: float = 2.0,
    include_resolution: bool | None = None,
    reading_unit: str | None = None,
) -> UncertaintyBudget:
    """Uncertainty budget of a single reading from the instrument's specification.

    Parameters
    ----------
    reading : float
        The displayed value. [reading unit]
    specification : AccuracySpec
        The accuracy for the function and range used.
    resolution : float, optional
        Value of one count on the range used. [reading unit]
    range_full_scale : float, optional
        Full-scale value of the range used. [reading unit]
    coverage_factor : float, optional
        k. [unitless]
    include_resolution : bool, optional
        Whether to add the resolution contribution. ``None`` (default) adds it
        only when the specification has no digits term and a resolution is
        given: a digits term already bounds the display's quantisation, so
        counting it again would double it [P]. The example of reference values §11
        follows this (U = 1.561 V, not 1.562 V).
    reading_unit : str, optional
        Checked against the specification's fixed-term unit. [unitless]

    Returns
    -------
    UncertaintyBudget

    Notes
    -----
    a = specification.limit(reading, resolution, range_full_scale);
    u_spec = a/√3; u_res = δx/(2√3); u_c = √(u_spec² + u_res²); U = k·u_c.

    References
    ----------
    .. [1] JCGM 100:2008 (GUM), clauses 4.3.7, F.2.2.1, 5.1.2, 6.2.1, 6.3.3 [S].
    """
    half_width = specification.limit(reading, resolution, range_full_scale, reading_unit)
    contributions = [
        rectangular_contribution(f"instrument specification {specification.describe()}", half_width)
    ]
    if include_resolution is None:
        include_resolution = resolution is not None and specification.digits == 0
    if include_resolution:
        if resolution is None:
            raise ComputationError(
                "resolution is missing; include_resolution is True, so the value of one count"
                " on the range used is needed"
            )
        contributions.append(resolution_contribution(resolution))
    return combine_contributions(contributions, coverage_factor)


# --------------------------------------------------------------------------------------------
# Decision rules


class DecisionRule(StrEnum):
    """How a reading's uncertainty enters the verdict (ILAC-G8:09/2019 clause 4.2).

    ``SIMPLE``: simple acceptance, guard band w = 0, binary (pass / fail),
    clause 4.2.1 [S]. ``GUARDED``: guarded acceptance, w = U, reported as the
    non-binary statement of clause 4.2.3 (pass / conditional pass / conditional
    fail / fail) [S]; only *pass* is an acceptance, which is the binary
    statement with guard band of clause 4.2.2 [S].
    """

    SIMPLE = "simple acceptance"
    GUARDED = "guarded acceptance"


class Statement(StrEnum):
    """Statement of conformity (ILAC-G8:09/2019 clause 4.2) [S]."""

    PASS = "pass"
    CONDITIONAL_PASS = "conditional pass"
    CONDITIONAL_FAIL = "conditional fail"
    FAIL = "fail"


@dataclass(frozen=True)
class Decision:
    """Verdict on one reading against a tolerance.

    Parameters
    ----------
    statement : Statement
        Pass, conditional pass, conditional fail or fail.
    rule : DecisionRule
        The decision rule applied.
    accepted : bool
        True only for ``Statement.PASS``. [unitless]
    reading : float
        [reading unit]
    expanded_uncertainty : float
        U of the reading. [reading unit]
    lower_limit, upper_limit : float or None
        Tolerance limits TL; ``None`` for the open side. [reading unit]
    acceptance_lower, acceptance_upper : float or None
        Acceptance limits AL = TL ∓ w. [reading unit]
    guard_band : float
        w: 0 for simple acceptance, U for guarded acceptance. [reading unit]
    description : str
        One phrase, e.g. ``"pass: 230.4 V meets 207 V to 253 V (simple acceptance)"``.
    """

    statement: Statement
    rule: DecisionRule
    accepted: bool
    reading: float
    expanded_uncertainty: float
    lower_limit: float | None
    upper_limit: float | None
    acceptance_lower: float | None
    acceptance_upper: float | None
    guard_band: float
    description: str


def _limits_phrase(lower: float | None, upper: float | None, unit: str) -> str:
    if lower is not None and upper is not None:
        lower_text = _with_unit(_format_number(lower), unit)
        return f"{lower_text} to {_with_unit(_format_number(upper), unit)}"
    if upper is not None:
        return f"at most {_with_unit(_format_number(upper), unit)}"
    if lower is not None:
        return f"at least {_with_unit(_format_number(lower), unit)}"
    raise ComputationError("lower_limit and upper_limit are both missing; give at least one")


def decide_conformity(
    reading: float,
    *,
    lower_limit: float | None = None,
    upper_limit: float | None = None,
    expanded_uncertainty: float = 0.0,
    rule: DecisionRule = DecisionRule.SIMPLE,
    unit: str = "",
) -> Decision:
    """State whether a reading conforms to a one- or two-sided tolerance.

    Parameters
    ----------
    reading : float
        Measured value y. [reading unit]
    lower_limit : float, optional
        Lower tolerance limit T_L (reading ≥ T_L); omit for an upper limit only. [reading unit]
    upper_limit : float, optional
        Upper tolerance limit T_U (reading ≤ T_U); omit for a lower limit only. [reading unit]
    expanded_uncertainty : float, optional
        U of the reading; the guard band under guarded acceptance. [reading unit]
    rule : DecisionRule, optional
        Simple (default) or guarded acceptance.
    unit : str, optional
        Unit written in the description. [unitless]

    Returns
    -------
    Decision

    Notes
    -----
    Tolerance limits are inclusive: a reading equal to a limit is inside.

    Simple acceptance (w = 0) is binary: pass when T_L ≤ y ≤ T_U, else fail.

    Guarded acceptance (w = U) is non-binary. With the margin m = min(y − T_L,
    T_U − y) taken over the limits present:

    - pass: m > U (inside the acceptance limits A_L = T_L + U, A_U = T_U − U);
    - conditional pass: 0 ≤ m ≤ U;
    - conditional fail: −U ≤ m < 0;
    - fail: m < −U.

    The intervals of ILAC-G8 clause 4.2.3 are closed, [T_U − w, T_U] and
    [T_U, T_U + w]; a reading exactly on an acceptance limit is therefore a
    conditional pass, and one exactly at T_U + U a conditional fail — the less
    favourable reading of each shared boundary, except at T_U itself, which stays
    inside as under simple acceptance. A window narrower than 2U has no pass zone.

    References
    ----------
    .. [1] ILAC-G8:09/2019, Guidelines on Decision Rules and Statements of
       Conformity, clause 4.2.1 (simple acceptance, Figure 3), clause 4.2.2
       (binary statement with guard band, Figure 4), clause 4.2.3 (non-binary
       statement with guard band, Figure 5) [S].
    """
    _require_finite("reading", reading)
    _require_non_negative("expanded_uncertainty", expanded_uncertainty)
    if lower_limit is None and upper_limit is None:
        raise ComputationError("lower_limit and upper_limit are both missing; give at least one")
    if lower_limit is not None:
        _require_finite("lower_limit", lower_limit)
    if upper_limit is not None:
        _require_finite("upper_limit", upper_limit)
    if lower_limit is not None and upper_limit is not None and lower_limit > upper_limit:
        raise ComputationError(
            f"lower_limit {_format_number(lower_limit)} is above upper_limit "
            f"{_format_number(upper_limit)}; the lower limit must not exceed the upper"
        )
    rule = DecisionRule(rule)

    margins: list[tuple[float, str, float]] = []
    if lower_limit is not None:
        margins.append((reading - lower_limit, "lower", lower_limit))
    if upper_limit is not None:
        margins.append((upper_limit - reading, "upper", upper_limit))
    margin, side, nearest_limit = min(margins, key=lambda item: item[0])

    guard_band = expanded_uncertainty if rule is DecisionRule.GUARDED else 0.0
    uncertainty_text = _with_unit(_format_significant(expanded_uncertainty), unit)
    reading_text = _with_unit(_format_number(reading), unit)
    limits_text = _limits_phrase(lower_limit, upper_limit, unit)
    limit_text = _with_unit(_format_number(nearest_limit), unit)
    direction = "below" if side == "lower" else "above"
    rule_text = f"({rule.value})"

    if rule is DecisionRule.SIMPLE:
        if margin >= 0:
            statement = Statement.PASS
            description = f"pass: {reading_text} meets {limits_text} {rule_text}"
        else:
            statement = Statement.FAIL
            description = (
                f"fail: {reading_text} is {direction} the {side} limit {limit_text} {rule_text}"
            )
    elif margin > guard_band:
        statement = Statement.PASS
        description = (
            f"pass: {reading_text} meets {limits_text} with a margin of more than"
            f" U = {uncertainty_text} {rule_text}"
        )
    elif margin >= 0:
        statement = Statement.CONDITIONAL_PASS
        near_both = len(margins) == 2 and max(item[0] for item in margins) <= guard_band
        which = "both limits" if near_both else f"the {side} limit"
        description = (
            f"conditional pass: {reading_text} meets {limits_text} but lies within"
            f" U = {uncertainty_text} of {which} {rule_text}"
        )
    elif margin >= -guard_band:
        statement = Statement.CONDITIONAL_FAIL
        description = (
            f"conditional fail: {reading_text} is {direction} the {side} limit {limit_text}"
            f" by no more than U = {uncertainty_text} {rule_text}"
        )
    else:
        statement = Statement.FAIL
        description = (
            f"fail: {reading_text} is {direction} the {side} limit {limit_text}"
            f" by more than U = {uncertainty_text} {rule_text}"
        )

    return Decision(
        statement=statement,
        rule=rule,
        accepted=statement is Statement.PASS,
        reading=reading,
        expanded_uncertainty=expanded_uncertainty,
        lower_limit=None if lower_limit is None else float(lower_limit),
        upper_limit=None if upper_limit is None else float(upper_limit),
        acceptance_lower=None if lower_limit is None else lower_limit + guard_band,
        acceptance_upper=None if upper_limit is None else upper_limit - guard_band,
        guard_band=guard_band,
        description=description,
    )


def _standard_normal_cdf(z: float) -> float:
    return 0.5 * (1.0 + math.erf(z / math.sqrt(2.0)))


def conformance_probability(
    reading: float,
    standard_uncertainty: float,
    lower_limit: float | None = None,
    upper_limit: float | None = None,
) -> float:
    """Probability that the measurand lies inside the tolerance, for a normal PDF.

    Parameters
    ----------
    reading : float
        Best estimate y. [reading unit]
    standard_uncertainty : float
        u(y), greater than zero. [reading unit]
    lower_limit : float, optional
        T_L. [reading unit]
    upper_limit : float, optional
        T_U. [reading unit]

    Returns
    -------
    float
        p_c in [0, 1]. [unitless]

    Notes
    -----
    Two-sided: p_c = Φ((T_U − y)/u) − Φ((T_L − y)/u).
    Upper limit only: p_c = Φ((T_U − y)/u). Lower limit only: p_c = 1 − Φ((T_L − y)/u).
    Φ(z) = ½ (1 + erf(z/√2)).

    References
    ----------
    .. [1] JCGM 106:2012, Evaluation of measurement data — The role of
       measurement uncertainty in conformity assessment, clause 7.3 (normal PDFs,
       one- and two-sided tolerance intervals) [M].
    """
    _require_finite("reading", reading)
    _require_positive("standard_uncertainty", standard_uncertainty)
    if lower_limit is None and upper_limit is None:
        raise ComputationError("lower_limit and upper_limit are both missing; give at least one")
    if lower_limit is not None and upper_limit is not None and lower_limit > upper_limit:
        raise ComputationError(
            f"lower_limit {_format_number(lower_limit)} is above upper_limit "
            f"{_format_number(upper_limit)}; the lower limit must not exceed the upper"
        )
    upper_part = (
        1.0
        if upper_limit is None
        else _standard_normal_cdf((upper_limit - reading) / standard_uncertainty)
    )
    lower_part = (
        0.0
        if lower_limit is None
        else _standard_normal_cdf((lower_limit - reading) / standard_uncertainty)
    )
    return min(max(upper_part - lower_part, 0.0), 1.0)


# --------------------------------------------------------------------------------------------
# Measurement category (IEC 61010)


class MeasurementCategory(IntEnum):
    """Measurement category of a point of measurement or an instrument rating.

    CAT IV: origin of the installation (service entrance, meters); CAT III:
    building installation (distribution boards, fixed wiring, permanently
    connected motors); CAT II: plugged-in equipment (reference values §14) [S].
    CAT I, from earlier editions of IEC 61010-1, covers circuits not connected
    to mains [M]; an instrument rated only CAT I is adequate for no mains point.

    References
    ----------
    .. [1] IEC 61010-2-030:2010, measurement categories (clause 3 definitions,
       Annex AA) [M]; IEC 61010-1:2010 [M].
    """

    CAT_I = 1
    CAT_II = 2
    CAT_III = 3
    CAT_IV = 4

    @property
    def phrase(self) -> str:
        """``"CAT III"`` and so on."""
        return "CAT " + ("I", "II", "III", "IV")[self.value - 1]


_CATEGORY_WORDS = {"i": 1, "ii": 2, "iii": 3, "iv": 4, "1": 1, "2": 2, "3": 3, "4": 4}


def parse_measurement_category(text: str | MeasurementCategory) -> MeasurementCategory:
    """Read ``"CAT III"``, ``"cat 3"``, ``"III"`` or ``"3"`` as a measurement category.

    Parameters
    ----------
    text : str or MeasurementCategory
        As written on the instrument or in the checklist. [unitless]

    Returns
    -------
    MeasurementCategory
    """
    if isinstance(text, MeasurementCategory):
        return text
    key = re.sub(r"^cat[\s\-]*", "", str(text).strip().lower())
    if key not in _CATEGORY_WORDS:
        raise ComputationError(
            f"measurement category {text!r} is not one of CAT I, CAT II, CAT III, CAT IV"
            " (also written 'CAT 3', 'III' or '3')"
        )
    return MeasurementCategory(_CATEGORY_WORDS[key])


@dataclass(frozen=True)
class CategoryFinding:
    """Whether an instrument's rating covers the point it was used on.

    Parameters
    ----------
    adequate : bool
        True when category and voltage ratings both cover the point. [unitless]
    instrument_category, point_category : MeasurementCategory
    instrument_voltage, working_voltage : float
        [V]
    phrase : str
        E.g. ``"CAT II 600 V instrument is not adequate for a CAT III 400 V point:
        its category is below CAT III"``.
    """

    adequate: bool
    instrument_category: MeasurementCategory
    instrument_voltage: float
    point_category: MeasurementCategory
    working_voltage: float
    phrase: str


def measurement_category_finding(
    instrument_category: MeasurementCategory | str,
    instrument_voltage: float,
    point_category: MeasurementCategory | str,
    working_voltage: float,
) -> CategoryFinding:
    """Check an instrument's measurement-category rating against a point of measurement.

    Parameters
    ----------
    instrument_category : MeasurementCategory or str
        The instrument's (or probe's) rated category. [unitless]
    instrument_voltage : float
        The voltage rating that goes with that category. [V]
    point_category : MeasurementCategory or str
        Category of the point of measurement. [unitless]
    working_voltage : float
        Voltage at the point, taken on the same basis as the rating (the rating
        is a voltage to earth [M]). [V]

    Returns
    -------
    CategoryFinding

    Notes
    -----
    adequate ⇔ instrument_category ≥ point_category and instrument_voltage ≥ working_voltage.
    A higher category at a lower voltage is not credited as equivalent, even
    where the rated impulse voltages coincide; the check is kept conservative [P].

    References
    ----------
    .. [1] IEC 61010-2-030:2010, measurement categories [M]; reference values §14 [S].
    """
    instrument = parse_measurement_category(instrument_category)
    point = parse_measurement_category(point_category)
    _require_positive("instrument_voltage", instrument_voltage)
    _require_non_negative("working_voltage", working_voltage)
    rating_text = f"{instrument.phrase} {_format_number(instrument_voltage)} V instrument"
    point_text = f"{point.phrase} {_format_number(working_voltage)} V point"
    reasons = []
    if instrument < point:
        reasons.append(f"its category is below {point.phrase}")
    if instrument_voltage < working_voltage:
        reasons.append(
            f"its voltage rating {_format_number(instrument_voltage)} V is below"
            f" {_format_number(working_voltage)} V"
        )
    adequate = not reasons
    if adequate:
        phrase = f"{rating_text} is adequate for a {point_text}"
    else:
        phrase = f"{rating_text} is not adequate for a {point_text}: " + " and ".join(reasons)
    return CategoryFinding(
        adequate, instrument, float(instrument_voltage), point, float(working_voltage), phrase
    )


# --------------------------------------------------------------------------------------------
# Calibration state


class CalibrationState(StrEnum):
    """Calibration state of an instrument on a visit date; the value is the phrase."""

    IN_CALIBRATION = "in calibration"
    EXPIRED = "calibration due before the visit (expired)"
    CALIBRATED_AFTER_VISIT = "calibrated after the visit; state on the visit date not recorded"
    NO_DUE_DATE = "calibrated, but no due date recorded"
    NOT_RECORDED = "no calibration recorded"

    @property
    def phrase(self) -> str:
        """The state in words, as shown in records."""
        return self.value

    @property
    def valid(self) -> bool:
        """True only when the visit falls inside a recorded calibration interval."""
        return self is CalibrationState.IN_CALIBRATION


def _as_date(name: str, value: date | None) -> date | None:
    if value is None:
        return None
    if isinstance(value, datetime):
        return value.date()
    if not isinstance(value, date):
        raise ComputationError(f"{name} {value!r} is not a date")
    return value


def calibration_state(
    calibration_date: date | None, due_date: date | None, visit_date: date
) -> CalibrationState:
    """Calibration state of an instrument on the date of a visit.

    Parameters
    ----------
    calibration_date : datetime.date or None
        Date of the last recorded calibration. [date]
    due_date : datetime.date or None
        Date the next calibration is due. [date]
    visit_date : datetime.date
        Date the readings were taken. [date]

    Returns
    -------
    CalibrationState

    Notes
    -----
    In calibration when calibration_date ≤ visit_date ≤ due_date; the due date
    itself is still inside the interval [P]. A visit before the calibration date
    is not covered by that calibration.
    """
    calibrated = _as_date("calibration_date", calibration_date)
    due = _as_date("due_date", due_date)
    visit = _as_date("visit_date", visit_date)
    if visit is None:
        raise ComputationError("visit_date is missing; the calibration state needs the visit date")
    if calibrated is None:
        return CalibrationState.NOT_RECORDED
    if due is not None and due < calibrated:
        raise ComputationError(
            f"due_date {due.isoformat()} is before calibration_date {calibrated.isoformat()};"
            " the due date must be on or after the calibration date"
        )
    if visit < calibrated:
        return CalibrationState.CALIBRATED_AFTER_VISIT
    if due is None:
        return CalibrationState.NO_DUE_DATE
    if visit > due:
        return CalibrationState.EXPIRED
    return CalibrationState.IN_CALIBRATION


# --------------------------------------------------------------------------------------------
# Average-responding instruments on distorted waveforms

SINE_CREST_FACTOR = math.sqrt(2.0)
"""Peak ÷ rms of a sine wave (reference values §9) [S]."""

SINE_FORM_FACTOR = math.pi / (2.0 * math.sqrt(2.0))
"""Rms ÷ rectified mean of a sine wave, 1.1107 (reference values §9) [S]."""

AVERAGE_RESPONDING_SCALE_FACTOR = SINE_FORM_FACTOR
"""An average-responding, rms-calibrated meter shows this × mean(|x|) [S, reference values §9]."""


@dataclass(frozen=True)
class ResponseFinding:
    """Whether an instrument's response suits the waveform it measured.

    Parameters
    ----------
    flagged : bool
        True when an average-responding instrument was used where true RMS is
        required or on a waveform that departs from a sine. [unitless]
    crest_factor_deviation, form_factor_deviation : float or None
        |CF − √2|/√2 and |FF − 1.1107|/1.1107 when given. [unitless]
    reading_ratio : float or None
        Expected average-responding reading ÷ true rms, 1.1107/FF, when the form
        factor is given. [unitless]
    phrase : str
    """

    flagged: bool
    crest_factor_deviation: float | None
    form_factor_deviation: float | None
    reading_ratio: float | None
    phrase: str


def average_responding_finding(
    instrument_true_rms: bool,
    true_rms_required: bool = False,
    crest_factor: float | None = None,
    form_factor: float | None = None,
    deviation_threshold: float = 0.05,
) -> ResponseFinding:
    """Flag an average-responding instrument used where its reading is biased.

    Parameters
    ----------
    instrument_true_rms : bool
        True for a true-RMS instrument. [unitless]
    true_rms_required : bool, optional
        True when the checklist item asks for a true-RMS reading. [unitless]
    crest_factor : float, optional
        Peak ÷ rms of the measured waveform, at least 1. [unitless]
    form_factor : float, optional
        Rms ÷ rectified mean of the measured waveform, at least 1. [unitless]
    deviation_threshold : float, optional
        Relative departure of the crest or form factor from a sine's beyond which
        the waveform counts as distorted; 5 % by default, above the 1–3 % basic
        accuracy of a typical clamp meter [P]. [unitless]

    Returns
    -------
    ResponseFinding

    Notes
    -----
    An average-responding meter displays (π/(2√2)) · mean(|x|), so its reading
    ÷ true rms = (π/(2√2)) / FF: 1.000 for a sine, 1.111 square, 0.962 triangle,
    0.707 half-wave rectified. A crest factor far from √2 flags distortion even
    where the form factor is not known.

    References
    ----------
    .. [1] reference values §9, form and crest factors of common waveforms and the
       average-responding scale factor [S]; 30–45 % under-reading on
       capacitor-input rectifier currents [P].
    """
    _require_non_negative("deviation_threshold", deviation_threshold)
    crest_deviation = form_deviation = ratio = None
    if crest_factor is not None:
        _require_finite("crest_factor", crest_factor)
        if crest_factor < 1:
            raise ComputationError(
                f"crest_factor {_format_number(crest_factor)} is below 1; peak ÷ rms is at least 1"
            )
        crest_deviation = abs(crest_factor - SINE_CREST_FACTOR) / SINE_CREST_FACTOR
    if form_factor is not None:
        _require_finite("form_factor", form_factor)
        if form_factor < 1:
            raise ComputationError(
                f"form_factor {_format_number(form_factor)} is below 1;"
                " rms ÷ rectified mean is at least 1"
            )
        form_deviation = abs(form_factor - SINE_FORM_FACTOR) / SINE_FORM_FACTOR
        ratio = AVERAGE_RESPONDING_SCALE_FACTOR / form_factor

    if instrument_true_rms:
        return ResponseFinding(
            False,
            crest_deviation,
            form_deviation,
            ratio,
            "true-RMS instrument: no average-responding error",
        )
    reasons = []
    if true_rms_required:
        reasons.append("true RMS is required")
    threshold_text = f"{_format_number(deviation_threshold * 100)} %"
    if crest_factor is not None and crest_deviation is not None:
        if crest_deviation > deviation_threshold:
            reasons.append(
                f"the crest factor {_format_significant(crest_factor, 3)} departs from a sine's"
                f" 1.41 by more than {threshold_text}"
            )
    if form_factor is not None and form_deviation is not None:
        if form_deviation > deviation_threshold:
            reasons.append(
                f"the form factor {_format_significant(form_factor, 3)} departs from a sine's"
                f" 1.11 by more than {threshold_text}"
            )
    if not reasons:
        return ResponseFinding(
            False,
            crest_deviation,
            form_deviation,
            ratio,
            "average-responding instrument on a near-sinusoidal waveform",
        )
    phrase = "average-responding instrument used where " + "; ".join(reasons)
    if ratio is not None:
        phrase += f"; it reads about {_format_significant(ratio * 100, 3)} % of the true rms"
    return ResponseFinding(True, crest_deviation, form_deviation, ratio, phrase)
