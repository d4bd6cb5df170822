"""Whether an instrument suits a point: category, calibration state, a.c. response."""

from __future__ import annotations

import re
from dataclasses import dataclass
from datetime import date, datetime
from enum import IntEnum, StrEnum

from .._errors import ComputationError
from ..sine import AVERAGE_RESPONDING_SCALE, SINE_CREST_FACTOR
from ._format import (
    _format_number,
    _format_significant,
    _require_finite,
    _require_non_negative,
    _require_positive,
)

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

# The meter's scale factor is the sine's form factor, 1.1107 (reference values §9) [S]; one
# definition, in computations.sine, serves both names.
SINE_FORM_FACTOR = AVERAGE_RESPONDING_SCALE_FACTOR = AVERAGE_RESPONDING_SCALE


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
