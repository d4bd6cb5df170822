"""Accuracy specifications as printed on data sheets, read into numbers."""

from __future__ import annotations

import re
from dataclasses import dataclass

from .._errors import ComputationError
from ._format import _format_number, _require_finite, _require_non_negative, _require_positive

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
