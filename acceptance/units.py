"""Quantities as people write them on site: ``"232.6 V"``, ``"31.7 µF"``, ``"0.16 Ω"``.

Raw strings become typed :class:`Quantity` values here and nowhere else. The unit
table is deliberately closed: only spellings a practitioner would write are
accepted, so a typo such as ``"MV"`` for ``"mV"`` is an error instead of a reading
a million times too large. A decimal comma (``"1,5 V"``) is refused, never
guessed. A temperature (``°C``) and a temperature difference (``K``) are separate
dimensions. A trailing qualifier (``RMS``, ``avg``, ``d.c.``, ``peak``) is kept as
the reading's *basis*, never silently dropped.
"""

from __future__ import annotations

import decimal
import difflib
import functools
import math
import re
from dataclasses import dataclass
from enum import Enum

__all__ = [
    "Basis",
    "Dimension",
    "Quantity",
    "UnitError",
    "format_number",
    "format_value",
    "parse_quantity",
    "awg_area_mm2",
    "unit_dimension",
]


class UnitError(ValueError):
    """A reading or a limit that cannot be read as a quantity of the expected kind."""


class Dimension(str, Enum):
    VOLTAGE = "voltage"
    CURRENT = "current"
    RESISTANCE = "resistance"
    CAPACITANCE = "capacitance"
    FREQUENCY = "frequency"
    TEMPERATURE = "temperature"
    TEMPERATURE_DIFFERENCE = "temperature difference"
    POWER = "power"
    APPARENT_POWER = "apparent power"
    REACTIVE_POWER = "reactive power"
    RATIO = "ratio"
    TIME = "time"
    LENGTH = "length"
    AREA = "area"
    ENERGY = "energy"
    CHARGE = "charge"
    NUMBER = "number"


class Basis(str, Enum):
    """How an electrical value was obtained; a nameplate current is stated on one of these."""

    RMS = "rms"
    AVERAGE = "average"
    DC = "dc"
    PEAK = "peak"

    @property
    def phrase(self) -> str:
        return {"rms": "RMS", "average": "average-responding", "dc": "d.c.", "peak": "peak"}[
            self.value
        ]


_SI_UNIT = {
    Dimension.VOLTAGE: "V",
    Dimension.CURRENT: "A",
    Dimension.RESISTANCE: "Ω",
    Dimension.CAPACITANCE: "F",
    Dimension.FREQUENCY: "Hz",
    Dimension.TEMPERATURE: "°C",
    Dimension.TEMPERATURE_DIFFERENCE: "K",
    Dimension.POWER: "W",
    Dimension.APPARENT_POWER: "VA",
    Dimension.REACTIVE_POWER: "var",
    Dimension.RATIO: "%",
    Dimension.TIME: "s",
    Dimension.LENGTH: "m",
    Dimension.AREA: "mm²",
    Dimension.ENERGY: "J",
    Dimension.CHARGE: "C",
    Dimension.NUMBER: "",
}

# spelling -> (dimension, factor to the unit in _SI_UNIT, canonical display symbol)
_UNITS: dict[str, tuple[Dimension, float, str]] = {}


def _add(dimension: Dimension, symbol: str, factor: float, *spellings: str) -> None:
    for spelling in (symbol, *spellings):
        _UNITS[spelling] = (dimension, factor, symbol)


_MICRO = ("µ", "μ", "u")  # micro sign U+00B5, Greek mu U+03BC, ASCII fallback

_add(Dimension.VOLTAGE, "V", 1.0)
_add(Dimension.VOLTAGE, "kV", 1e3)
_add(Dimension.VOLTAGE, "mV", 1e-3)
_add(Dimension.VOLTAGE, "µV", 1e-6, "μV", "uV")
_add(Dimension.CURRENT, "A", 1.0)
_add(Dimension.CURRENT, "kA", 1e3)
_add(Dimension.CURRENT, "mA", 1e-3)
_add(Dimension.CURRENT, "µA", 1e-6, "μA", "uA")
# The ohm sign U+2126 is a separate code point from Greek capital omega U+03A9; editors
# and keyboards produce both, so both are accepted (written as escapes to survive
# normalisation of this file).
_add(Dimension.RESISTANCE, "Ω", 1.0, "ohm", "ohms", "Ohm", "Ohms", "\u2126")
_add(Dimension.RESISTANCE, "mΩ", 1e-3, "mohm", "milliohm", "m\u2126")
_add(Dimension.RESISTANCE, "µΩ", 1e-6, "μΩ", "uohm", "µohm", "μohm")
_add(Dimension.RESISTANCE, "kΩ", 1e3, "kohm", "kohms", "kOhm", "k\u2126")
_add(Dimension.RESISTANCE, "MΩ", 1e6, "Mohm", "Mohms", "MOhm", "megohm", "megohms",
     "M\u2126")
_add(Dimension.RESISTANCE, "GΩ", 1e9, "Gohm", "GOhm", "gigohm", "G\u2126")
_add(Dimension.CAPACITANCE, "F", 1.0)
_add(Dimension.CAPACITANCE, "mF", 1e-3)
_add(Dimension.CAPACITANCE, "µF", 1e-6, "μF", "uF")
_add(Dimension.CAPACITANCE, "nF", 1e-9)
_add(Dimension.CAPACITANCE, "pF", 1e-12)
_add(Dimension.FREQUENCY, "Hz", 1.0)
_add(Dimension.FREQUENCY, "kHz", 1e3)
_add(Dimension.TEMPERATURE, "°C", 1.0, "degC", "℃", "deg C", "° C")
_add(Dimension.TEMPERATURE_DIFFERENCE, "K", 1.0, "kelvin")
_add(Dimension.POWER, "W", 1.0)
_add(Dimension.POWER, "kW", 1e3)
_add(Dimension.POWER, "MW", 1e6)
_add(Dimension.APPARENT_POWER, "VA", 1.0)
_add(Dimension.APPARENT_POWER, "kVA", 1e3)
_add(Dimension.REACTIVE_POWER, "var", 1.0, "VAr", "VAR")
_add(Dimension.REACTIVE_POWER, "kvar", 1e3, "kVAr", "kVAR")
_add(Dimension.RATIO, "%", 1.0, "percent")
_add(Dimension.TIME, "s", 1.0)
_add(Dimension.TIME, "ms", 1e-3)
_add(Dimension.TIME, "µs", 1e-6, "μs", "us")
_add(Dimension.TIME, "min", 60.0)
_add(Dimension.TIME, "h", 3600.0)
_add(Dimension.LENGTH, "m", 1.0)
_add(Dimension.LENGTH, "mm", 1e-3)
_add(Dimension.LENGTH, "km", 1e3)
_add(Dimension.LENGTH, "ft", 0.3048)  # exact, international foot
_add(Dimension.AREA, "mm²", 1.0, "mm2", "mm^2", "sq mm", "sqmm")
_add(Dimension.ENERGY, "J", 1.0)
_add(Dimension.ENERGY, "kJ", 1e3)
_add(Dimension.ENERGY, "mJ", 1e-3)
_add(Dimension.CHARGE, "C", 1.0)
_add(Dimension.CHARGE, "mC", 1e-3)
_add(Dimension.CHARGE, "µC", 1e-6, "μC", "uC")

# Trailing words that say how a value was obtained.
_QUALIFIERS: dict[str, Basis] = {
    "rms": Basis.RMS,
    "true rms": Basis.RMS,
    "trms": Basis.RMS,
    "true-rms": Basis.RMS,
    "ac": Basis.RMS,
    "a.c.": Basis.RMS,
    "avg": Basis.AVERAGE,
    "average": Basis.AVERAGE,
    "mean": Basis.AVERAGE,
    "av": Basis.AVERAGE,
    "dc": Basis.DC,
    "d.c.": Basis.DC,
    "peak": Basis.PEAK,
    "pk": Basis.PEAK,
}

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_QUANTITY_RE = re.compile(rf"^\s*(?P<number>{_NUMBER})\s*(?P<rest>.*?)\s*$")
_DECIMAL_COMMA_RE = re.compile(r"^\s*[+-]?\d+,\d")
_THOUSANDS_RE = re.compile(r"^\s*[+-]?\d{1,3}(?:,\d{3})+(?!\d)(?:\s|$)")
_NOT_FINITE_RE = re.compile(r"^\s*[+-]?(?:nan|inf(?:inity)?)\b", re.I)
_AWG_RE = re.compile(r"^\s*(?:(?P<a>\d{1,2}|[1-4]/0)\s*AWG|AWG\s*(?P<b>\d{1,2}|[1-4]/0))\s*$", re.I)


@dataclass(frozen=True)
class Quantity:
    """A value in the base unit of its dimension (V, A, Ω, F, °C, K, mm², …).

    ``unit`` is the canonical spelling of the unit it was written in, kept for display;
    ``basis`` is the qualifier written after it, if any.
    """

    value: float
    dimension: Dimension
    unit: str = ""
    basis: Basis | None = None
    text: str = ""

    @property
    def base_unit(self) -> str:
        return _SI_UNIT[self.dimension]

    def in_unit(self, unit: str) -> float:
        dimension, factor, _ = _UNITS[unit]
        if dimension is not self.dimension:
            raise UnitError(f"cannot express {self.dimension.value} in {unit}")
        return self.value / factor

    def format(self, unit: str | None = None, digits: int = 4) -> str:
        """The value in ``unit`` (default: the unit it was written in) with its symbol."""
        unit = unit if unit is not None else (self.unit or self.base_unit)
        if not unit:
            return format_number(self.value, digits)
        return f"{format_number(self.in_unit(unit), digits)} {unit}"

    def __str__(self) -> str:
        return self.format()


def format_number(value: float, digits: int = 4) -> str:
    """Round to ``digits`` significant figures without scientific notation for field values."""
    if value == 0 or not math.isfinite(value):
        return "0" if value == 0 else str(value)
    magnitude = math.floor(math.log10(abs(value)))
    decimals = max(0, digits - 1 - magnitude)
    text = f"{value:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def format_value(value: float, dimension: Dimension, unit: str | None = None,
                 digits: int = 4) -> str:
    """Format a base-unit ``value`` in ``unit`` (default: the base unit of ``dimension``)."""
    return Quantity(value, dimension, unit if unit is not None else _SI_UNIT[dimension]).format(
        None, digits
    )


def awg_area_mm2(gauge: str) -> float:
    """Cross-section of an American Wire Gauge size.

    Notes
    -----
    d = 0.127 mm · 92^((36 − n)/39); 1/0, 2/0, 3/0, 4/0 are n = 0, −1, −2, −3.
    ASTM B258 defines the gauge by this geometric progression.
    """
    gauge = gauge.strip()
    number = -(int(gauge[0]) - 1) if "/" in gauge else int(gauge)
    if number > 40:
        raise UnitError(f"AWG {gauge} is outside the 4/0 … 40 AWG range")
    diameter = 0.127 * 92 ** ((36 - number) / 39)
    return math.pi / 4 * diameter**2


def _dimension_names(dimensions: tuple[Dimension, ...]) -> str:
    return " or ".join(d.value for d in dimensions)


def _examples(dimension: Dimension) -> str:
    spellings = sorted({symbol for (dim, _f, symbol) in _UNITS.values() if dim is dimension})
    return ", ".join(spellings[:6])


def parse_quantity(text: object, *expected: Dimension) -> Quantity:
    """Read ``text`` as a quantity of one of the ``expected`` dimensions.

    Results are cached: a job repeats the same few spellings (limits, ranges, units)
    thousands of times. Errors are not cached and raise every time.
    """
    if isinstance(text, str):
        return _parse_cached(text, expected)
    return _parse_quantity(text, *expected)


@functools.lru_cache(maxsize=16384)
def _parse_cached(text: str, expected: tuple[Dimension, ...]) -> Quantity:
    return _parse_quantity(text, *expected)


def _parse_quantity(text: object, *expected: Dimension) -> Quantity:
    """Read ``text`` as a quantity of one of the ``expected`` dimensions.

    A bare number is accepted only for :attr:`Dimension.NUMBER` (and as a percentage
    when :attr:`Dimension.RATIO` is expected and no unit is written).
    """
    if isinstance(text, bool) or text is None:
        got = "nothing" if text is None else str(text).lower()
        raise UnitError(f"expected a {_dimension_names(expected)} such as "
                        f"'{_example_value(expected[0])}', got {got}")
    if isinstance(text, int | float):
        if not math.isfinite(float(text)):
            raise UnitError(f"{text!r} is not a finite number; write the measured value")
        if Dimension.NUMBER in expected:
            return Quantity(float(text), Dimension.NUMBER, "", None, str(text))
        raise UnitError(
            f"the number {text!r} has no unit; write it with its unit, for example "
            f"'{text} {_SI_UNIT[expected[0]]}'"
        )
    if isinstance(text, list | tuple | dict):
        kind = "a mapping" if isinstance(text, dict) else "a list"
        raise UnitError(f"expected a {_dimension_names(expected)} such as "
                        f"'{_example_value(expected[0])}', got {kind}")
    raw = str(text)
    if Dimension.AREA in expected:
        awg = _AWG_RE.match(raw)
        if awg:
            gauge = awg.group("a") or awg.group("b")
            return Quantity(awg_area_mm2(gauge), Dimension.AREA, "mm²", None, raw.strip())
    if _THOUSANDS_RE.match(raw):
        written = raw.strip()
        number = written.split()[0]
        grouped = written.replace(number, number.replace(",", ""), 1)
        raise UnitError(
            f"'{written}' uses a comma; write '{grouped}' if it separates thousands, or "
            f"'{written.replace(',', '.', 1)}' if it is a decimal comma"
        )
    if _DECIMAL_COMMA_RE.match(raw):
        raise UnitError(
            f"'{raw.strip()}' uses a comma; write the decimal separator as a point "
            f"(e.g. '{raw.strip().replace(',', '.', 1)}') and no thousands separator"
        )
    match = _QUANTITY_RE.match(raw)
    if not match:
        if _NOT_FINITE_RE.match(raw):
            raise UnitError(f"'{raw.strip()}' is not a finite number; write the measured value")
        raise UnitError(
            f"'{raw.strip()}' is not a {_dimension_names(expected)}; "
            f"write a number and a unit, for example '{_example_value(expected[0])}'"
        )
    value = float(match.group("number"))
    if not math.isfinite(value):
        raise UnitError(f"'{raw.strip()}' is not a finite number; write the measured value")
    rest = match.group("rest")
    unit_text, basis = _split_qualifier(rest)
    if unit_text == "":
        if Dimension.NUMBER in expected:
            if value == 0 and decimal.Decimal(match.group("number")) != 0:
                raise UnitError(f"'{raw.strip()}' is too small to be told from zero; "
                                "check the value")
            return Quantity(value, Dimension.NUMBER, "", basis, raw.strip())
        raise UnitError(
            f"'{raw.strip()}' has no unit; write it with a unit of "
            f"{_dimension_names(expected)} ({_examples(expected[0])})"
        )
    unit_info = _UNITS.get(unit_text)
    if unit_info is None and unit_text[:1] in "±+-" and unit_text[:1]:
        raise UnitError(f"'{raw.strip()}': write the reading alone, e.g. "
                        f"'{match.group('number')} {_SI_UNIT[expected[0]]}'; the instrument's "
                        "accuracy belongs in instruments.yaml")
    if unit_info is None and unit_text[:1].isdigit():
        raise UnitError(f"'{raw.strip()}' holds more than one number; write one value and "
                        f"its unit, e.g. '{match.group('number')} {_SI_UNIT[expected[0]]}'")
    if unit_info is None:
        hint = _unit_hint(unit_text, expected)
        raise UnitError(f"'{raw.strip()}': unknown unit '{unit_text}'{hint}")
    dimension, factor, symbol = unit_info
    if dimension not in expected:
        if (
            dimension is Dimension.TEMPERATURE
            and Dimension.TEMPERATURE_DIFFERENCE in expected
        ):
            raise UnitError(
                f"'{raw.strip()}' is a temperature; a temperature difference (rise) is "
                f"written in K, for example '{format_number(value)} K'"
            )
        if (
            dimension is Dimension.TEMPERATURE_DIFFERENCE
            and Dimension.TEMPERATURE in expected
        ):
            if value >= 173.15:  # read as an absolute temperature in kelvin
                raise UnitError(
                    f"'{raw.strip()}' is a temperature difference; a temperature is written "
                    f"in °C: if it is {format_number(value)} kelvin, write "
                    f"'{format_number(value - 273.15)} °C'"
                )
            raise UnitError(
                f"'{raw.strip()}' is a temperature difference; a temperature is written "
                f"in °C, for example '{format_number(value)} °C'"
            )
        raise UnitError(
            f"'{raw.strip()}' is a {dimension.value}, but a {_dimension_names(expected)} "
            f"is expected here ({_examples(expected[0])})"
        )
    if dimension is Dimension.TEMPERATURE and value < -273.15:
        raise UnitError(f"'{raw.strip()}' is below absolute zero (-273.15 °C)")
    quantity_value = _scaled(match.group("number"), factor)
    if abs(quantity_value) > 1e15:
        raise UnitError(f"'{raw.strip()}' is implausibly large for a {dimension.value}; "
                        "check the value and its unit")
    if quantity_value != 0 and abs(quantity_value) < _SMALLEST or (
            quantity_value == 0 and decimal.Decimal(match.group("number")) != 0):
        raise UnitError(f"'{raw.strip()}' is implausibly small for a {dimension.value}; "
                        "check the value and its unit")
    return Quantity(quantity_value, dimension, symbol, basis, raw.strip())


# Below this, in the base unit, no value of an electrical acceptance check can be told from
# zero (a femtofarad is 1e-15 F): a value such as '1e-400 V' underflows or is a typing slip.
_SMALLEST = 1e-18


def _scaled(number: str, factor: float) -> float:
    """``number × factor`` rounded once: '16.2 µF' is the double nearest 16.2e-6 F.

    Multiplying two doubles rounds twice and can land one unit in the last place off,
    enough to put a reading written exactly on a tolerance boundary outside it.
    """
    with decimal.localcontext() as context:
        context.prec = 40
        return float(decimal.Decimal(number) * decimal.Decimal(repr(factor)))


def unit_dimension(unit: str) -> Dimension:
    """The dimension of a unit as a checklist or a register names it (``"V"``, ``"µF"``)."""
    spelled = unit.strip() if isinstance(unit, str) else ""
    if not spelled:
        raise UnitError("no unit is given; write the unit the value is read in, e.g. 'V'")
    info = _UNITS.get(spelled)
    if info is None:
        close = difflib.get_close_matches(spelled, list(_UNITS), n=1, cutoff=0.5)
        if not close:
            close = [s for s in _UNITS if s.lower() == spelled.lower()]
        hint = (f"; did you mean '{close[0]}'?" if close
                else "; the units read are listed in the README under 'Units'")
        raise UnitError(f"unknown unit '{spelled}'{hint}")
    return info[0]


def _split_qualifier(rest: str) -> tuple[str, Basis | None]:
    lowered = rest.lower()
    for qualifier in sorted(_QUALIFIERS, key=len, reverse=True):
        for sep in (" ", ""):
            suffix = sep + qualifier
            if lowered.endswith(suffix) and len(lowered) > len(suffix):
                unit = rest[: len(rest) - len(suffix)].strip()
                if unit and (unit in _UNITS):
                    return unit, _QUALIFIERS[qualifier]
    if lowered.strip() in _QUALIFIERS:
        return "", _QUALIFIERS[lowered.strip()]
    return rest.strip(), None


def _unit_hint(unit_text: str, expected: tuple[Dimension, ...]) -> str:
    candidates = [s for s, (d, _f, _c) in _UNITS.items() if d in expected]
    # A wrong letter case ('MV' for 'mV', 'hz') is the commonest slip; offer that first.
    close = [c for c in candidates if c.lower() == unit_text.lower()][:1]
    if not close:
        close = difflib.get_close_matches(unit_text, candidates, n=1, cutoff=0.5)
    if close:
        return f"; did you mean '{close[0]}'?"
    return f"; use one of {_examples(expected[0])}"


def _example_value(dimension: Dimension) -> str:
    return {
        Dimension.VOLTAGE: "230 V",
        Dimension.CURRENT: "9.5 A",
        Dimension.RESISTANCE: "34.6 Ω",
        Dimension.CAPACITANCE: "31.7 µF",
        Dimension.FREQUENCY: "50 Hz",
        Dimension.TEMPERATURE: "21 °C",
        Dimension.TEMPERATURE_DIFFERENCE: "65 K",
        Dimension.POWER: "2.2 kW",
        Dimension.APPARENT_POWER: "3 kVA",
        Dimension.REACTIVE_POWER: "500 var",
        Dimension.RATIO: "5 %",
        Dimension.TIME: "5 s",
        Dimension.LENGTH: "18 m",
        Dimension.AREA: "2.5 mm²",
        Dimension.ENERGY: "75 J",
        Dimension.CHARGE: "60 µC",
        Dimension.NUMBER: "3",
    }[dimension]
